/* report.c - the one-page A4 PDF test report: identification, method,
 * specimen, chart, results, sieve and reading tables, QC, calibrations,
 * cautions and sign-off, on one fixed layout. */
#include "sedgrade/report.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "io/draw.h"
#include "sedgrade/axis.h"
#include "sedgrade/plot.h"
#include "sedgrade/qc.h"

#ifndef SG_VERSION
#define SG_VERSION "0.0.0"
#endif

/* Page geometry, pt. */
#define MARGIN_X 36.0
#define MARGIN_TOP 30.0
#define MARGIN_BOTTOM 24.0
#define CONTENT_W (SG_REPORT_WIDTH_PT - 2.0 * MARGIN_X)
#define CHART_H 192.0     /* the chart's height when the tables need the room */
#define CHART_H_MAX 270.0 /* ... the most it grows into room the tables leave */
#define CHART_H_MIN 130.0 /* ... and the least it shrinks to when the minimum tables need more */
#define GUTTER 14.0

/* Text sizes and line spacing, pt. */
#define BODY_PT 7.4
#define BODY_LEAD 9.0
#define TABLE_PT 6.6
#define TABLE_LEAD 7.8
#define HEAD_PT 8.6
#define SMALL_PT 6.4

static const double INK[3] = {0.10, 0.10, 0.12};
static const double MUTED[3] = {0.38, 0.38, 0.42};
static const double RULE = 0.55;
static const double ZEBRA = 0.955;

/* The standard's method statement (METHODS.md 12.2). */
static void method_statement(const struct sg_record *rec, char *buf, size_t size)
{
    const bool pip = rec->method == SG_METHOD_PIPETTE;
    switch (rec->standard) {
    case SG_STANDARD_ASTM_D7928:
        (void)snprintf(buf, size, "ASTM D7928-17 %s, with sieving",
                       pip ? "conventions, pipette sampling" : "hydrometer analysis");
        return;
    case SG_STANDARD_BS1377_2:
        (void)snprintf(buf, size, "BS 1377-2:1990 cl. 9 (9.2/9.3 sieving, %s)", pip ? "9.4 pipette" : "9.5 hydrometer");
        return;
    case SG_STANDARD_ISO17892_4:
        (void)snprintf(buf, size, "ISO 17892-4:2016, sieving and %s sedimentation", pip ? "pipette" : "hydrometer");
        return;
    case SG_STANDARD_NONE: break;
    }
    (void)snprintf(buf, size, "sieving and %s sedimentation; no standard selected", pip ? "pipette" : "hydrometer");
}

static const char *conventions(enum sg_standard s)
{
    switch (s) {
    case SG_STANDARD_ASTM_D7928: return "ASTM D7928 conventions where standards differ";
    case SG_STANDARD_BS1377_2: return "BS 1377-2 conventions where standards differ";
    case SG_STANDARD_ISO17892_4: return "ISO 17892-4 conventions where standards differ";
    case SG_STANDARD_NONE: break;
    }
    return "exact physics: \xcf\x81s \xe2\x88\x92 \xcf\x81w(T), water density and viscosity at T";
}

/* ---- small text helpers ---- */

struct page {
    cairo_t *cr;
    const struct sg_result *res;
    const struct sg_record *rec;
    const char *points_file;   /* where the rows cut from the tables are; NULL: not written */
    const char *findings_file; /* where the QC findings cut are; NULL: not written */
};

static void ink(cairo_t *cr)
{
    sg_draw_rgb(cr, INK);
}

static double heading(cairo_t *cr, double x, double y, const char *s)
{
    ink(cr);
    sg_draw_font(cr, HEAD_PT, true);
    sg_draw_text(cr, x, y, 0.0, s);
    return y + BODY_LEAD + 1.5;
}

/* "label: value" with the label in grey, the value from tab on, wrapped
 * onto a second line when it is long. */
static double field(cairo_t *cr, double x, double y, double w, double tab, const char *label, const char *value)
{
    sg_draw_font(cr, BODY_PT, false);
    sg_draw_rgb(cr, MUTED);
    sg_draw_text_fit(cr, x, y, tab - 4.0, 0.0, label);
    ink(cr);
    const int n = sg_draw_text_wrap(cr, x + tab, y, w - tab, BODY_LEAD, 2, true, value[0] ? value : "\xe2\x80\x94");
    return y + (n > 1 ? n : 1) * BODY_LEAD;
}

static void rule(cairo_t *cr, double x0, double x1, double y, double width)
{
    cairo_set_source_rgb(cr, RULE, RULE, RULE);
    cairo_set_line_width(cr, width);
    cairo_move_to(cr, x0, y);
    cairo_line_to(cr, x1, y);
    cairo_stroke(cr);
}

static void num_sig(double v, int sig, char *buf, size_t size)
{
    sg_axis_format_sig(v, sig, buf, size);
}

static void num_fix(double v, int dec, char *buf, size_t size)
{
    sg_axis_format_fixed(v, dec, buf, size);
}

/* A sieve aperture as labs write it: 37.5, 2, 0.425, 0.063. */
static void aperture(double v, char *buf, size_t size)
{
    if (!isfinite(v))
        buf[0] = '\0';
    else
        (void)snprintf(buf, size, "%.4g", v);
}

/* A mass or other given value: "" when 0 (= not given). */
static void given(double v, int dec, const char *unit, char *buf, size_t size)
{
    if (!(v > 0.0) || !isfinite(v)) {
        buf[0] = '\0';
        return;
    }
    char n[32];
    num_fix(v, dec, n, sizeof n);
    (void)snprintf(buf, size, "%s %s", n, unit);
}

/* ---- header and identification ---- */

static double block_header(const struct page *pg, double y)
{
    cairo_t *cr = pg->cr;
    ink(cr);
    sg_draw_font(cr, 14.0, true);
    sg_draw_text(cr, MARGIN_X, y + 12.0, 0.0, "Particle size distribution \xe2\x80\x94 test report");
    sg_draw_font(cr, 9.0, true);
    char s[160];
    (void)snprintf(s, sizeof s, "Report %s", pg->res->id);
    sg_draw_text_fit(cr, MARGIN_X + CONTENT_W, y + 5.0, 180.0, 1.0, s);
    sg_draw_font(cr, BODY_PT, false);
    sg_draw_rgb(cr, MUTED);
    sg_draw_text(cr, MARGIN_X + CONTENT_W, y + 14.5, 1.0, "page 1 of 1");
    char date[11] = "";
    if (sg_date_is_set(pg->rec->date))
        sg_date_format(pg->rec->date, date);
    (void)snprintf(s, sizeof s, "Sieving and sedimentation by %s \xc2\xb7 test %s \xc2\xb7 tested %s",
                   pg->rec->method == SG_METHOD_PIPETTE ? "pipette" : "hydrometer", pg->res->id,
                   date[0] ? date : "(no date)");
    sg_draw_text_fit(cr, MARGIN_X, y + 25.0, CONTENT_W - 120.0, 0.0, s);
    rule(cr, MARGIN_X, MARGIN_X + CONTENT_W, y + 30.0, 1.0);
    return y + 42.0;
}

static void instruments(const struct sg_record *rec, char *buf, size_t size)
{
    buf[0] = '\0';
    const struct {
        const char *what, *id;
    } ins[] = {{"hydrometer", rec->hydrometer},
               {"pipette", rec->pipette_id},
               {"cylinder", rec->cylinder},
               {"thermometer", rec->thermometer}};
    size_t used = 0;
    for (size_t i = 0; i < sizeof ins / sizeof ins[0]; i++) {
        if (ins[i].id[0] == '\0')
            continue;
        const int k = snprintf(buf + used, size - used, "%s%s %s", used ? ", " : "", ins[i].what, ins[i].id);
        if (k < 0 || (size_t)k >= size - used)
            break;
        used += (size_t)k;
    }
}

static double block_identification(const struct page *pg, double y)
{
    cairo_t *cr = pg->cr;
    const struct sg_record *rec = pg->rec;
    const double wl = 300.0, wr = CONTENT_W - wl - GUTTER;
    const double xl = MARGIN_X, xr = MARGIN_X + wl + GUTTER;
    char v[400], a[64], b[64];

    double yl = heading(cr, xl, y, "Test and method");
    yl = field(cr, xl, yl, wl, 70.0, "Test ID", pg->res->id);
    char date[11] = "";
    if (sg_date_is_set(rec->date))
        sg_date_format(rec->date, date);
    yl = field(cr, xl, yl, wl, 70.0, "Date of test", date);
    method_statement(rec, v, sizeof v);
    yl = field(cr, xl, yl, wl, 70.0, "Method followed", v);
    yl = field(cr, xl, yl, wl, 70.0, "Reduction", conventions(rec->standard));
    if (rec->method == SG_METHOD_HYDROMETER)
        (void)snprintf(v, sizeof v, "%s", rec->scale == SG_SCALE_DENSITY
                                              ? "density: (\xcf\x81 \xe2\x88\x92 1) \xc3\x97 1000, \xcf\x81 in g/mL"
                                              : "g/L (soil of Gs 2.65 per litre)");
    else
        (void)snprintf(v, sizeof v, "pipette samples, net dry solids (g)");
    yl = field(cr, xl, yl, wl, 70.0, rec->method == SG_METHOD_HYDROMETER ? "Reading scale" : "Sampling", v);
    instruments(rec, v, sizeof v);
    yl = field(cr, xl, yl, wl, 70.0, "Instruments", v);
    (void)snprintf(v, sizeof v, "%s in log10 D between points; never extrapolated",
                   pg->res->curve.method == SG_INTERP_MONOTONE ? "monotone (Steffen)" : "linear");
    yl = field(cr, xl, yl, wl, 70.0, "Curve", v);

    double yr = heading(cr, xr, y, "Specimen");
    given(rec->particle_density_mg_m3, 3, "Mg/m\xc2\xb3", v, sizeof v);
    yr = field(cr, xr, yr, wr, 100.0, "Particle density", v);
    given(rec->sample_dry_mass_g, 2, "g", v, sizeof v);
    yr = field(cr, xr, yr, wr, 100.0, "Whole sample, dry mass", v);
    if (rec->split_aperture_mm > 0.0) {
        aperture(rec->split_aperture_mm, a, sizeof a);
        num_fix(pg->res->pp_split, 1, b, sizeof b);
        (void)snprintf(v, sizeof v, "%s mm (%s %% passes)", a, b[0] ? b : "?");
    } else {
        v[0] = '\0';
    }
    yr = field(cr, xr, yr, wr, 100.0, "Split sieve", v);
    given(rec->specimen_dry_mass_g, 2, "g", v, sizeof v);
    yr = field(cr, xr, yr, wr, 100.0, "Specimen, dry mass", v);
    given(rec->suspension_volume_ml, 0, "mL", v, sizeof v);
    yr = field(cr, xr, yr, wr, 100.0, "Suspension volume", v);
    if (rec->has_dispersant) {
        given(rec->dispersant_mass_g, 3, "g in the suspension", v, sizeof v);
        yr = field(cr, xr, yr, wr, 100.0, "Dispersant", v);
    }
    v[0] = '\0';
    if (rec->has_liquid_limit || rec->has_plastic_limit) {
        num_fix(rec->has_liquid_limit ? rec->liquid_limit_pct : (double)NAN, 0, a, sizeof a);
        num_fix(rec->has_plastic_limit ? rec->plastic_limit_pct : (double)NAN, 0, b, sizeof b);
        (void)snprintf(v, sizeof v, "LL %s %%, PL %s %%", a[0] ? a : "\xe2\x80\x94", b[0] ? b : "\xe2\x80\x94");
    }
    yr = field(cr, xr, yr, wr, 100.0, "Atterberg limits", v);
    if (rec->has_natural_moisture) {
        num_fix(rec->natural_moisture_pct, 1, a, sizeof a);
        (void)snprintf(v, sizeof v, "%s %%", a);
        yr = field(cr, xr, yr, wr, 100.0, "Natural moisture content", v);
    }
    return (yl > yr ? yl : yr) + 2.0;
}

/* ---- results ---- */

/* A quantity as text: value (and its 95 % interval when Monte Carlo ran),
 * "not determined" otherwise. sig > 0: significant digits, else decimals. */
static void qtext(const struct sg_result *res, const char *name, int sig, int dec, const char *unit, char *buf,
                  size_t size)
{
    const struct sg_quantity *q = sg_result_quantity(res, name);
    if (q == NULL) {
        (void)snprintf(buf, size, "\xe2\x80\x94");
        return;
    }
    if (!q->determined) {
        (void)snprintf(buf, size, "not determined");
        return;
    }
    if (q->is_text) {
        sg_draw_class_text(res, q, buf, size);
        return;
    }
    char v[40], lo[40], hi[40];
    if (sig > 0) {
        num_sig(q->value, sig, v, sizeof v);
        num_sig(q->low95, sig, lo, sizeof lo);
        num_sig(q->high95, sig, hi, sizeof hi);
    } else {
        num_fix(q->value, dec, v, sizeof v);
        num_fix(q->low95, dec, lo, sizeof lo);
        num_fix(q->high95, dec, hi, sizeof hi);
    }
    if (q->has_u && lo[0] && hi[0])
        (void)snprintf(buf, size, "%s%s%s [%s\xe2\x80\x93%s]", v, unit[0] ? " " : "", unit, lo, hi);
    else
        (void)snprintf(buf, size, "%s%s%s", v, unit[0] ? " " : "", unit);
}

struct qrow {
    const char *name, *label, *unit;
    int sig, dec;
};

static double qcolumn(cairo_t *cr, const struct sg_result *res, double x, double y, double w, double tab,
                      const struct qrow *rows, size_t n)
{
    char v[SG_QTEXT_MAX + 64];
    for (size_t i = 0; i < n; i++) {
        qtext(res, rows[i].name, rows[i].sig, rows[i].dec, rows[i].unit, v, sizeof v);
        y = field(cr, x, y, w, tab, rows[i].label, v);
    }
    return y;
}

static double caption(cairo_t *cr, double x, double y, const char *s)
{
    sg_draw_font(cr, SMALL_PT, false);
    sg_draw_rgb(cr, MUTED);
    sg_draw_text(cr, x, y, 0.0, s);
    return y + BODY_LEAD;
}

static double block_results(const struct page *pg, double y, enum sg_axis_bands sys)
{
    cairo_t *cr = pg->cr;
    /* three columns: characteristic sizes, fractions, classification */
    const double w1 = 178.0, w2 = 150.0, w3 = CONTENT_W - w1 - w2 - 2.0 * GUTTER;
    const double x1 = MARGIN_X, x2 = x1 + w1 + GUTTER, x3 = x2 + w2 + GUTTER;
    bool mc = false;
    for (size_t i = 0; i < pg->res->n_quantities; i++)
        mc = mc || pg->res->quantities[i].has_u;
    y = heading(cr, x1, y,
                mc ? "Results  (Monte Carlo: 95 % intervals in brackets, class probabilities as p)"
                   : "Results");
    static const struct qrow dv[] = {
        {"d10_mm", "D10", "mm", 4, 0}, {"d15_mm", "D15", "mm", 4, 0}, {"d30_mm", "D30", "mm", 4, 0},
        {"d50_mm", "D50", "mm", 4, 0}, {"d60_mm", "D60", "mm", 4, 0}, {"d85_mm", "D85", "mm", 4, 0},
        {"cu", "Cu", "", 3, 0},        {"cc", "Cc", "", 3, 0},
    };
    static const struct qrow iso[] = {
        {"cobbles_pct", "Cobbles 63\xe2\x80\x93" "200", "%", 0, 1},
        {"gravel_pct", "Gravel 2\xe2\x80\x93" "63", "%", 0, 1},
        {"sand_pct", "Sand 0.063\xe2\x80\x93" "2", "%", 0, 1},
        {"silt_pct", "Silt 0.002\xe2\x80\x93" "0.063", "%", 0, 1},
        {"clay_pct", "Clay < 0.002", "%", 0, 1},
    };
    static const struct qrow uscs[] = {
        {"uscs_gravel_pct", "Gravel 4.75\xe2\x80\x93" "75", "%", 0, 1},
        {"uscs_sand_pct", "Sand 0.075\xe2\x80\x93" "4.75", "%", 0, 1},
        {"fines_pct", "Fines < 0.075", "%", 0, 1},
    };
    static const struct qrow usda[] = {
        {"usda_sand_pct", "Sand 0.05\xe2\x80\x93" "2", "%", 0, 1},
        {"usda_silt_pct", "Silt 0.002\xe2\x80\x93" "0.05", "%", 0, 1},
        {"usda_clay_pct", "Clay < 0.002", "%", 0, 1},
        {"usda_texture", "Texture class", "", 0, 0},
    };
    /* the ASTM D2487 group: the symbol with the Atterberg limits when the
     * record gives them (a fine-grained group needs them), else the group
     * from the grading alone; Skempton's activity when it was worked out */
    const struct sg_quantity *sym = sg_result_quantity(pg->res, "uscs_symbol");
    const bool by_symbol = sym != NULL && sym->determined;
    const struct qrow cls[] = {
        {"iso_grading", "ISO 14688-2", "", 0, 0},
        {"uscs_grading", "ASTM D2487", "", 0, 0},
        {by_symbol ? "uscs_symbol" : "uscs_group", "USCS group", "", 0, 0},
        {"activity", "Activity", "", 2, 0},
    };
    const size_t n_cls = sg_result_quantity(pg->res, "activity") != NULL ? 4 : 3;
    double ya = caption(cr, x1, y, "Sizes in mm; Cu = D60/D10, Cc = D30\xc2\xb2/(D10\xc2\xb7" "D60)");
    ya = qcolumn(cr, pg->res, x1, ya, w1, 36.0, dv, sizeof dv / sizeof dv[0]);

    /* the record's system first, then the other */
    double yb = caption(cr, x2, y, sys == SG_BANDS_USCS ? "ASTM D2487, % of the sample (mm)"
                                                        : "ISO 14688-1, % of the sample (mm)");
    if (sys == SG_BANDS_USCS) {
        yb = qcolumn(cr, pg->res, x2, yb, w2, 70.0, uscs, 3);
        yb = caption(cr, x2, yb, "ISO 14688-1");
        yb = qcolumn(cr, pg->res, x2, yb, w2, 70.0, iso + 3, 2);
    } else {
        yb = qcolumn(cr, pg->res, x2, yb, w2, 70.0, iso + 1, 4);
        yb = qcolumn(cr, pg->res, x2, yb, w2, 70.0, uscs + 2, 1);
        yb = caption(cr, x2, yb, "ASTM D2487");
        yb = qcolumn(cr, pg->res, x2, yb, w2, 70.0, uscs, 2);
    }

    double yc = caption(cr, x3, y, "USDA, % of the fraction < 2 mm");
    yc = qcolumn(cr, pg->res, x3, yc, w3, 64.0, usda, 4);
    yc = caption(cr, x3, yc, "Grading terms (screens)");
    yc = qcolumn(cr, pg->res, x3, yc, w3, 64.0, cls, n_cls);
    double yy = ya;
    if (yb > yy)
        yy = yb;
    if (yc > yy)
        yy = yc;
    return yy + 2.0;
}

/* ---- tables ---- */

struct column {
    const char *head, *unit;
    double w;     /* pt */
    double align; /* 0 left, 1 right */
};

static double table_header(cairo_t *cr, double x, double y, const struct column *c, size_t n)
{
    double cx = x;
    for (size_t i = 0; i < n; i++) {
        const double tx = c[i].align > 0.5 ? cx + c[i].w - 2.0 : cx + 5.0;
        ink(cr);
        sg_draw_font(cr, TABLE_PT, true);
        sg_draw_text_fit(cr, tx, y, c[i].w - 2.0, c[i].align, c[i].head);
        sg_draw_font(cr, SMALL_PT, false);
        sg_draw_rgb(cr, MUTED);
        sg_draw_text_fit(cr, tx, y + TABLE_LEAD - 0.5, c[i].w - 2.0, c[i].align, c[i].unit);
        cx += c[i].w;
    }
    rule(cr, x, cx, y + TABLE_LEAD + 2.0, 0.6);
    return y + 2.0 * TABLE_LEAD + 2.5;
}

static void table_row(cairo_t *cr, double x, double y, const struct column *c, size_t n, char cells[][48],
                      bool shade)
{
    double total = 0.0;
    for (size_t i = 0; i < n; i++)
        total += c[i].w;
    if (shade) {
        cairo_set_source_rgb(cr, ZEBRA, ZEBRA, ZEBRA);
        cairo_rectangle(cr, x, y - TABLE_LEAD + 2.2, total, TABLE_LEAD);
        cairo_fill(cr);
    }
    ink(cr);
    sg_draw_font(cr, TABLE_PT, false);
    double cx = x;
    for (size_t i = 0; i < n; i++) {
        const double tx = c[i].align > 0.5 ? cx + c[i].w - 2.0 : cx + 5.0;
        sg_draw_text_fit(cr, tx, y, c[i].w - 2.0, c[i].align, cells[i]);
        cx += c[i].w;
    }
}

/* Writes into buf the line that stands for what a table or list leaves
 * out: head ("... 12 more rows") and where the rest is, file (and column,
 * may be NULL) named when it fits in w pt in the current font, else the
 * file's kind ("the points file"); or that no such file was written when
 * file is NULL. The caller still fits the result to w. */
static void more_text(cairo_t *cr, double w, const char *head, const char *file, const char *column,
                      const char *kind, char *buf, size_t size)
{
    const char *sep = column != NULL ? ", " : "", *col = column != NULL ? column : "";
    if (file == NULL) {
        (void)snprintf(buf, size, "%s (no %s file was written)", head, kind);
        return;
    }
    (void)snprintf(buf, size, "%s (see %s%s%s)", head, file, sep, col);
    if (sg_draw_text_width(cr, buf) > w)
        (void)snprintf(buf, size, "%s (see the %s file%s%s)", head, kind, sep, col);
}

static double more_rows(const struct page *pg, double x, double y, double w, size_t more)
{
    cairo_t *cr = pg->cr;
    char head[64], s[SG_ID_MAX + 160];
    (void)snprintf(head, sizeof head, "\xe2\x80\xa6 %zu more row%s", more, more == 1 ? "" : "s");
    sg_draw_font(cr, TABLE_PT, false);
    sg_draw_rgb(cr, MUTED);
    more_text(cr, w - 1.0, head, pg->points_file, NULL, "points", s, sizeof s);
    sg_draw_text_fit(cr, x + 1.0, y, w - 1.0, 0.0, s);
    return y + TABLE_LEAD;
}

static size_t count_source(const struct sg_result *res, bool sieve)
{
    size_t n = 0;
    for (size_t i = 0; i < res->n_points; i++) {
        const enum sg_source s = res->points[i].source;
        if ((s == SG_SOURCE_SIEVE || s == SG_SOURCE_FINE_SIEVE) == sieve)
            n++;
    }
    return n;
}

/* Draws up to max_rows data rows of the sieve table (one of them becomes
 * the "more rows" line when the table is cut). */
static double sieve_table(const struct page *pg, double x, double y, double w, size_t max_rows)
{
    cairo_t *cr = pg->cr;
    const struct column c[] = {
        {"Sieved", "", 0.16, 0.0},        {"Aperture", "mm", 0.16, 1.0},       {"Retained", "g", 0.17, 1.0},
        {"Cumulative", "g retained", 0.19, 1.0}, {"Passing", "% of set", 0.16, 1.0}, {"Passing", "% whole", 0.16, 1.0},
    };
    struct column cols[6];
    for (size_t i = 0; i < 6; i++) {
        cols[i] = c[i];
        cols[i].w = c[i].w * w;
    }
    y = heading(cr, x, y, "Sieve analysis");
    const size_t n = count_source(pg->res, true);
    if (n == 0) {
        sg_draw_font(cr, BODY_PT, false);
        sg_draw_rgb(cr, MUTED);
        sg_draw_text(cr, x, y, 0.0, "no sieve rows in the record");
        return y + BODY_LEAD;
    }
    y = table_header(cr, x, y, cols, 6);
    const size_t shown = n <= max_rows ? n : (max_rows > 0 ? max_rows - 1 : 0);
    size_t k = 0;
    char cells[6][48];
    for (size_t i = 0; i < pg->res->n_points && k < shown; i++) {
        const struct sg_point *p = &pg->res->points[i];
        if (p->source != SG_SOURCE_SIEVE && p->source != SG_SOURCE_FINE_SIEVE)
            continue;
        (void)snprintf(cells[0], sizeof cells[0], "%s", p->source == SG_SOURCE_SIEVE ? "sample" : "specimen");
        aperture(p->diameter_mm, cells[1], sizeof cells[1]);
        num_fix(p->retained_g, 2, cells[2], sizeof cells[2]);
        num_fix(p->cumulative_retained_g, 2, cells[3], sizeof cells[3]);
        num_fix(p->percent_specimen, 1, cells[4], sizeof cells[4]);
        num_fix(p->percent_finer, 1, cells[5], sizeof cells[5]);
        table_row(cr, x, y, cols, 6, cells, k % 2 == 1);
        y += TABLE_LEAD;
        k++;
    }
    if (shown < n)
        y = more_rows(pg, x, y, w, n - shown);
    return y;
}

static void flags_cell(unsigned flags, bool on_curve, char *buf, size_t size)
{
    sg_qc_point_flags_format(flags, buf, size);
    if (!on_curve && !(flags & SG_PF_COARSER_THAN_SIEVE)) {
        const size_t used = strlen(buf);
        (void)snprintf(buf + used, size - used, "%soff curve", used ? " " : "");
    }
    for (char *p = buf; *p; p++)
        if (*p == '|')
            *p = ' ';
}

static double readings_table(const struct page *pg, double y, size_t max_rows)
{
    cairo_t *cr = pg->cr;
    const bool hyd = pg->rec->method != SG_METHOD_PIPETTE;
    static const struct column hc[] = {
        {"Line", "", 22.0, 1.0},
        {"t", "min", 32.0, 1.0},
        {"T", "\xc2\xb0" "C", 28.0, 1.0},
        {"R", "as read", 30.0, 1.0},
        {"Blank", "composite", 38.0, 1.0},
        {"R\xe2\x88\x92" "blank", "corrected", 36.0, 1.0},
        {"R+Cm", "meniscus", 34.0, 1.0},
        {"H", "mm", 30.0, 1.0},
        {"\xce\xb7", "mPa\xc2\xb7s", 32.0, 1.0},
        {"c", "g/L", 30.0, 1.0},
        {"D", "mm", 40.0, 1.0},
        {"Finer", "% spec.", 34.0, 1.0},
        {"Finer", "% whole", 34.0, 1.0},
        {"Flags", "", 103.2, 0.0},
    };
    static const struct column pc[] = {
        {"Line", "", 22.0, 1.0},
        {"t", "min", 34.0, 1.0},
        {"T", "\xc2\xb0" "C", 30.0, 1.0},
        {"Depth", "mm", 32.0, 1.0},
        {"Solids", "g", 36.0, 1.0},
        {"Net solids", "g", 40.0, 1.0},
        {"\xcf\x81w", "kg/m\xc2\xb3", 38.0, 1.0},
        {"\xce\xb7", "mPa\xc2\xb7s", 34.0, 1.0},
        {"Re", "", 34.0, 1.0},
        {"D", "mm", 42.0, 1.0},
        {"Finer", "% spec.", 38.0, 1.0},
        {"Finer", "% whole", 38.0, 1.0},
        {"Flags", "", 105.2, 0.0},
    };
    const struct column *cols = hyd ? hc : pc;
    const size_t nc = hyd ? sizeof hc / sizeof hc[0] : sizeof pc / sizeof pc[0];
    y = heading(cr, MARGIN_X, y, hyd ? "Hydrometer readings, every correction applied" : "Pipette samples");
    const size_t n = count_source(pg->res, false);
    if (n == 0) {
        sg_draw_font(cr, BODY_PT, false);
        sg_draw_rgb(cr, MUTED);
        sg_draw_text(cr, MARGIN_X, y, 0.0, "no sedimentation rows in the record");
        return y + BODY_LEAD;
    }
    y = table_header(cr, MARGIN_X, y, cols, nc);
    const size_t shown = n <= max_rows ? n : (max_rows > 0 ? max_rows - 1 : 0);
    size_t k = 0;
    char cells[14][48];
    for (size_t i = 0; i < pg->res->n_points && k < shown; i++) {
        const struct sg_point *p = &pg->res->points[i];
        if (p->source == SG_SOURCE_SIEVE || p->source == SG_SOURCE_FINE_SIEVE)
            continue;
        size_t j = 0;
        (void)snprintf(cells[j++], 48, "%u", p->line);
        num_sig(p->elapsed_min, 4, cells[j++], 48);
        num_fix(p->temp_c, 1, cells[j++], 48);
        if (hyd) {
            num_sig(p->reading, 4, cells[j++], 48);
            num_sig(p->blank_reading, 3, cells[j++], 48);
            num_fix(p->corrected_reading, 2, cells[j++], 48);
            num_fix(p->depth_reading, 2, cells[j++], 48);
            num_fix(p->effective_depth_mm, 1, cells[j++], 48);
            num_sig(p->viscosity_mpa_s, 4, cells[j++], 48);
            num_fix(p->concentration_g_l, 2, cells[j++], 48);
        } else {
            num_fix(p->effective_depth_mm, 1, cells[j++], 48);
            num_fix(p->solids_g, 4, cells[j++], 48);
            num_fix(p->net_solids_g, 4, cells[j++], 48);
            num_fix(p->water_density_kg_m3, 2, cells[j++], 48);
            num_sig(p->viscosity_mpa_s, 4, cells[j++], 48);
            if (isfinite(p->reynolds))
                (void)snprintf(cells[j++], 48, "%.2g", p->reynolds);
            else
                cells[j++][0] = '\0';
        }
        num_sig(p->diameter_mm, 4, cells[j++], 48);
        num_fix(p->percent_specimen, 1, cells[j++], 48);
        num_fix(p->percent_finer, 1, cells[j++], 48);
        flags_cell(p->flags, p->on_curve, cells[j++], 48);
        table_row(cr, MARGIN_X, y, cols, nc, cells, k % 2 == 1);
        y += TABLE_LEAD;
        k++;
    }
    if (shown < n)
        y = more_rows(pg, MARGIN_X, y, CONTENT_W, n - shown);
    sg_draw_font(cr, SMALL_PT, false);
    sg_draw_rgb(cr, MUTED);
    const int fn = sg_draw_text_wrap(
        cr, MARGIN_X, y + 1.0, CONTENT_W, 7.4, 2, true,
        hyd ? "T includes the thermometer correction. R\xe2\x88\x92" "blank (the composite correction) gives the "
              "concentration c; R+Cm (the meniscus correction) gives the effective depth H; \xce\xb7: viscosity of "
              "water at T; D by Stokes' law; % whole = % spec. \xc3\x97 percent passing the split sieve / 100."
            : "T includes the thermometer correction. Net solids: less the dispersant in the sample; \xcf\x81w, "
              "\xce\xb7: water at T; Re: particle Reynolds number; D by Stokes' law; % whole = % spec. \xc3\x97 "
              "percent passing the split sieve / 100.");
    return y + fn * 7.4 + 2.0;
}

/* ---- QC, calibrations, cautions ---- */

/* Draws the calibration and QC column (draw false: only measures) in at
 * most max_h pt; findings that do not fit become one "... n more" line.
 * Returns the height used. */
static double qc_calibration(const struct page *pg, double x, double y, double w, double max_h, bool draw)
{
    cairo_t *cr = pg->cr;
    const double y0 = y;
    if (draw)
        heading(cr, x, y, "Calibrations used");
    y += BODY_LEAD + 1.5;
    sg_draw_font(cr, BODY_PT, false);
    const char *cal = pg->res->calibration_used;
    if (cal[0] == '\0' || strcmp(cal, "inline") == 0) {
        if (draw) {
            ink(cr);
            sg_draw_text_fit(cr, x, y, w, 0.0, "none from the register: constants given in the test record");
        }
        y += BODY_LEAD;
    } else {
        const char *p = cal;
        while (*p != '\0') {
            const size_t len = strcspn(p, ";");
            char item[160], line[200];
            (void)snprintf(item, sizeof item, "%.*s", (int)(len < sizeof item ? len : sizeof item - 1), p);
            char *at = strchr(item, '@');
            if (at != NULL) {
                *at = '\0';
                (void)snprintf(line, sizeof line, "%s \xe2\x80\x94 calibration of %s", item, at + 1);
            } else {
                (void)snprintf(line, sizeof line, "%s", item);
            }
            if (draw && item[0] != '\0') {
                ink(cr);
                sg_draw_text_fit(cr, x, y, w, 0.0, line);
            }
            if (item[0] != '\0')
                y += BODY_LEAD;
            p += len;
            if (*p == ';')
                p++;
        }
    }
    y += 3.0;
    if (draw)
        heading(cr, x, y, "Quality control");
    y += BODY_LEAD + 1.5;
    const struct sg_quantity *qs = sg_result_quantity(pg->res, "qc_status");
    char s[SG_FLAG_MSG_MAX + 128];
    sg_draw_font(cr, BODY_PT, false);
    if (qs != NULL && qs->is_text && qs->determined) {
        const struct sg_quantity *gap = sg_result_quantity(pg->res, "junction_gap_pct");
        char g[40] = "";
        if (gap != NULL && gap->determined && !gap->is_text)
            num_fix(gap->value, 1, g, sizeof g);
        if (g[0])
            (void)snprintf(s, sizeof s, "Status: %s \xc2\xb7 junction gap (sieve \xe2\x88\x92 sedimentation) %s "
                                        "points", qs->text, g);
        else
            (void)snprintf(s, sizeof s, "Status: %s", qs->text);
        if (draw) {
            ink(cr);
            sg_draw_text_fit(cr, x, y, w, 0.0, s);
        }
        y += BODY_LEAD;
    }
    if (pg->res->n_flags == 0) {
        if (draw) {
            ink(cr);
            sg_draw_text(cr, x, y, 0.0, "no QC findings");
        }
        return y + BODY_LEAD - y0;
    }
    for (size_t i = 0; i < pg->res->n_flags; i++) {
        const struct sg_flag *f = &pg->res->flags[i];
        char where[32] = "";
        if (f->line > 0)
            (void)snprintf(where, sizeof where, " (line %u)", f->line);
        (void)snprintf(s, sizeof s, "%s %s%s: %s", sg_severity_name(f->severity), f->name, where, f->message);
        sg_draw_font(cr, TABLE_PT, false);
        const int need = sg_draw_text_wrap(cr, x, y, w, TABLE_LEAD, 3, false, s);
        const double after = y + need * TABLE_LEAD - y0; /* height with this finding */
        const bool last = i + 1 == pg->res->n_flags;
        if ((last && after > max_h) || (!last && after + TABLE_LEAD > max_h)) {
            char head[64];
            (void)snprintf(head, sizeof head, "\xe2\x80\xa6 %zu more finding%s", pg->res->n_flags - i,
                           pg->res->n_flags - i == 1 ? "" : "s");
            more_text(cr, w, head, pg->findings_file, "qc_flags", "summary", s, sizeof s);
            if (draw) {
                sg_draw_rgb(cr, MUTED);
                sg_draw_text_fit(cr, x, y, w, 0.0, s);
            }
            y += TABLE_LEAD;
            break;
        }
        if (draw) {
            if (f->severity == SG_SEVERITY_FAILURE)
                sg_draw_font(cr, TABLE_PT, true);
            ink(cr);
            sg_draw_text_wrap(cr, x, y, w, TABLE_LEAD, 3, true, s);
        }
        y += need * TABLE_LEAD;
    }
    return y - y0;
}

static const char *const cautions[] = {
    "These results relate only to the specimen tested, as received and prepared by the laboratory.",
    "Sizes finer than the sieves are equivalent spherical diameters by Stokes' law, which assumes rigid spheres "
    "settling freely and slowly in still water of known temperature; flocculation, high concentration, platy "
    "particles, an assumed particle density and pretreatment affect them. Points outside the Reynolds or Brownian "
    "limits are flagged.",
    "Sieve sizes are aperture sizes, not particle dimensions; percentages are by dry mass and assume "
    "near-equidimensional particles.",
    "Classifications, texture classes, grading terms and any derived estimates are indicative screens, not design "
    "values; engineering behaviour depends on much more than grading. Defer to the applicable local codes and to "
    "a licensed professional for any engineering use.",
    "This report shall not be reproduced except in full without the written approval of the laboratory.",
};

static double block_cautions(cairo_t *cr, double y, bool draw)
{
    const double y0 = y;
    if (draw)
        heading(cr, MARGIN_X, y, "Cautions");
    y += BODY_LEAD + 1.0;
    sg_draw_font(cr, SMALL_PT, false);
    for (size_t i = 0; i < sizeof cautions / sizeof cautions[0]; i++) {
        char num[8];
        (void)snprintf(num, sizeof num, "%zu.", i + 1);
        if (draw) {
            ink(cr);
            sg_draw_text(cr, MARGIN_X, y, 0.0, num);
        }
        const int n = sg_draw_text_wrap(cr, MARGIN_X + 10.0, y, CONTENT_W - 10.0, 7.6, 4, draw, cautions[i]);
        y += n * 7.6 + 0.8;
    }
    return y - y0;
}

static void block_signoff(cairo_t *cr, double y)
{
    static const char *const who[] = {"Tested by", "Checked by", "Approved for issue by", "Date of issue"};
    const double w = CONTENT_W / 4.0;
    for (size_t i = 0; i < 4; i++) {
        const double x = MARGIN_X + i * w;
        rule(cr, x, x + w - 12.0, y, 0.5);
        sg_draw_font(cr, SMALL_PT, false);
        sg_draw_rgb(cr, MUTED);
        sg_draw_text(cr, x, y + 7.5, 0.0, who[i]);
    }
}

static void block_footer(const struct page *pg)
{
    cairo_t *cr = pg->cr;
    const double y = SG_REPORT_HEIGHT_PT - MARGIN_BOTTOM + 8.0;
    rule(cr, MARGIN_X, MARGIN_X + CONTENT_W, y - 9.0, 0.6);
    char s[200];
    sg_draw_font(cr, SMALL_PT, false);
    sg_draw_rgb(cr, MUTED);
    (void)snprintf(s, sizeof s, "Report %s \xc2\xb7 page 1 of 1 \xc2\xb7 end of report", pg->res->id);
    sg_draw_text(cr, MARGIN_X, y, 0.0, s);
    (void)snprintf(s, sizeof s, "produced with sedgrade %s", SG_VERSION);
    sg_draw_text(cr, MARGIN_X + CONTENT_W, y, 1.0, s);
}

/* ---- the page ---- */

/* Height of a table block: heading, two-line header, rows (the "more
 * rows" line counts as one of them). */
static double table_h(size_t rows)
{
    return BODY_LEAD + 1.5 + 2.0 * TABLE_LEAD + 2.5 + (double)rows * TABLE_LEAD;
}

/* Draws the page with a chart chart_h pt high; returns the room left
 * between the readings table and the cautions, pt. */
static double draw_page(const struct page *pg, double chart_h)
{
    cairo_t *cr = pg->cr;
    const enum sg_axis_bands sys = sg_axis_bands_for_standard(pg->rec->standard);
    double y = block_header(pg, MARGIN_TOP);
    y = block_identification(pg, y);

    const struct sg_draw_chart_opts co = {.coarse_left = false, .bands = sys, .title = false, .side_panel = false};
    sg_draw_grading_chart(cr, MARGIN_X - 4.0, y, CONTENT_W + 4.0, chart_h, pg->res, pg->rec, &co);
    y += chart_h + 4.0;
    y = block_results(pg, y, sys);
    y += 4.0;

    /* Bottom up: footer, sign-off, cautions; the tables share what is left.
     * Band 1: the sieve table beside calibrations and QC; band 2: the
     * readings table with its two-line footnote. */
    const double sign_y = SG_REPORT_HEIGHT_PT - MARGIN_BOTTOM - 20.0;
    const double caut_y = sign_y - 18.0 - block_cautions(cr, 0.0, false);
    const double avail = caut_y - y - 4.0;
    const double colw = (CONTENT_W - GUTTER) / 2.0;
    const size_t n_sieve = count_source(pg->res, true), n_sed = count_source(pg->res, false);
    /* the QC column: what it needs (up to a quarter of the page), and at
     * least its calibrations, status and one line */
    double qc_h = qc_calibration(pg, 0.0, 0.0, colw, SG_REPORT_HEIGHT_PT / 4.0, false);
    const double qc_min = qc_calibration(pg, 0.0, 0.0, colw, 0.0, false);
    const double foot_h = 2.0 * 7.4 + 2.0 + 4.0;
    size_t sieve_rows = n_sieve > 0 ? n_sieve : 1, sed_rows = n_sed > 0 ? n_sed : 1;
    const size_t min_rows = 3; /* two rows and the "more rows" line */
    for (;;) {
        const double band1 = fmax(table_h(sieve_rows), qc_h);
        if (band1 + table_h(sed_rows) + foot_h <= avail)
            break;
        /* shrink the taller of the two bands by one line */
        const bool band1_can = (sieve_rows > min_rows && table_h(sieve_rows) >= band1 - 0.01) ||
                               (qc_h > qc_min && qc_h >= band1 - 0.01);
        const bool sed_can = sed_rows > min_rows;
        if (band1_can && (band1 >= table_h(sed_rows) || !sed_can)) {
            const double target = band1 - TABLE_LEAD;
            while (sieve_rows > min_rows && table_h(sieve_rows) > target)
                sieve_rows--;
            if (qc_h > target)
                qc_h = fmax(target, qc_min);
        } else if (sed_can) {
            sed_rows--;
        } else {
            break; /* at the minimum: the chart gives way (layout_and_draw) */
        }
    }
    const double ys = sieve_table(pg, MARGIN_X, y, colw, sieve_rows);
    const double band1 = fmax(ys - y, qc_h);
    /* (qc_h may exceed what is drawn: the column stops at band1) */
    (void)qc_calibration(pg, MARGIN_X + colw + GUTTER, y, colw, band1, true);
    const double y_end = readings_table(pg, y + band1 + 4.0, sed_rows);

    block_cautions(cr, caut_y, true);
    block_signoff(cr, sign_y);
    block_footer(pg);
    return caut_y - 12.0 - y_end;
}

/* Text measured for layout as on a PDF surface: unhinted metrics. */
static void pdf_metrics(cairo_t *cr)
{
    cairo_font_options_t *fo = cairo_font_options_create();
    cairo_font_options_set_hint_metrics(fo, CAIRO_HINT_METRICS_OFF);
    cairo_font_options_set_hint_style(fo, CAIRO_HINT_STYLE_NONE);
    cairo_set_font_options(cr, fo);
    cairo_font_options_destroy(fo);
}

/* Lays the page out once on a scratch surface to find the room the tables
 * leave, gives it to the chart, and draws the page for real. */
static enum sg_status layout_and_draw(const struct page *pg)
{
    cairo_surface_t *scratch = cairo_recording_surface_create(CAIRO_CONTENT_COLOR_ALPHA, NULL);
    cairo_t *cr = cairo_create(scratch);
    pdf_metrics(cr);
    struct page dry = *pg;
    dry.cr = cr;
    const double room = draw_page(&dry, CHART_H);
    const cairo_status_t cs = cairo_status(cr);
    cairo_destroy(cr);
    cairo_surface_destroy(scratch);
    if (cs == CAIRO_STATUS_NO_MEMORY)
        return SG_ENOMEM;
    double chart_h = CHART_H + room;
    if (chart_h > CHART_H_MAX)
        chart_h = CHART_H_MAX;
    if (chart_h < CHART_H_MIN)
        chart_h = CHART_H_MIN;
    pdf_metrics(pg->cr);
    (void)draw_page(pg, chart_h);
    return SG_OK;
}

enum sg_status sg_report_write(const struct sg_result *res, const struct sg_record *rec, const char *path,
                               struct sg_error *err)
{
    return sg_report_write_with(res, rec, NULL, path, err);
}

enum sg_status sg_report_write_with(const struct sg_result *res, const struct sg_record *rec,
                                    const struct sg_report_files *files, const char *path, struct sg_error *err)
{
    if (res == NULL || rec == NULL || path == NULL)
        return sg_error_set(err, SG_EINVAL, 0, 0, "no result, record or path for the report (internal error)");
    char title[160], date[11] = "";
    (void)snprintf(title, sizeof title, "Particle size distribution - %s", res->id);
    if (sg_date_is_set(rec->date))
        sg_date_format(rec->date, date);
    const struct sg_draw_meta meta = {title, "test report", date[0] ? date : NULL};
    struct sg_draw_doc doc;
    enum sg_status st = sg_draw_open(&doc, SG_PLOT_PDF, SG_REPORT_WIDTH_PT, SG_REPORT_HEIGHT_PT, &meta, path, err);
    if (st != SG_OK)
        return st;
    char points[sizeof res->id + 16], findings[sizeof res->id + 16];
    (void)snprintf(points, sizeof points, "%s.points.csv", res->id);
    (void)snprintf(findings, sizeof findings, "%s.summary.csv", res->id);
    const struct page pg = {doc.cr, res, rec, files != NULL ? files->points : points,
                            files != NULL ? files->findings : findings};
    if ((st = layout_and_draw(&pg)) != SG_OK) {
        sg_draw_abort(&doc);
        return sg_error_set(err, st, 0, 0, "out of memory laying out '%s'", path);
    }
    return sg_draw_close(&doc, err);
}
