/* draw.c - cairo drawing shared by plots, reports and calibration charts:
 * one code path for PNG, SVG and PDF, written through the atomic writer. */
#include "io/draw.h"

#include <cairo-pdf.h>
#include <cairo-svg.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "sedgrade/curve.h"
#include "sedgrade/mc.h"

/* ---- palette: dark inks that stay distinct in grey print ---- */
static const double INK[3] = {0.10, 0.10, 0.12};
static const double GREY_TEXT[3] = {0.35, 0.35, 0.38};
static const double CURVE[3] = {0.08, 0.22, 0.50};     /* dark blue: prints dark grey */
static const double SIEVE[3] = {0.08, 0.22, 0.50};     /* sieve markers: as the curve */
static const double SEDIMENT[3] = {0.60, 0.18, 0.06};  /* dark rust: prints mid-dark grey */
static const double BAND95[3] = {0.62, 0.72, 0.90};    /* light blue: prints light grey */
static const double STRIP_A[3] = {0.89, 0.88, 0.85};
static const double STRIP_B[3] = {0.96, 0.955, 0.94};
static const double GRID_MAJOR = 0.60;                 /* grey levels of gridlines */
static const double GRID_MINOR = 0.80;
static const double GRID_FAINT = 0.91;
static const double BOUNDARY = 0.42;

/* ---- documents ---- */

static cairo_status_t write_fp(void *closure, const unsigned char *data, unsigned int length)
{
    FILE *fp = closure;
    return fwrite(data, 1, length, fp) == length ? CAIRO_STATUS_SUCCESS : CAIRO_STATUS_WRITE_ERROR;
}

enum sg_status sg_draw_cairo_error(cairo_status_t cs, const char *path, struct sg_error *err)
{
    if (cs == CAIRO_STATUS_NO_MEMORY)
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory drawing '%s'", path);
    return sg_error_set(err, SG_EIO, 0, 0, "cannot write '%s': %s (nothing was written; free space or fix "
                                           "permissions and run again)",
                        path, cairo_status_to_string(cs));
}

void sg_draw_pdf_date(const char *date, char *buf, size_t size)
{
    struct sg_date d;
    if (date == NULL || sg_date_parse(date, &d, NULL) != SG_OK)
        d = (struct sg_date){2000, 1, 1};
    (void)snprintf(buf, size, "%04d-%02d-%02dT00:00:00Z", d.year, d.month, d.day);
}

enum sg_status sg_draw_open(struct sg_draw_doc *d, enum sg_plot_format fmt, double width_pt, double height_pt,
                            const struct sg_draw_meta *meta, const char *path, struct sg_error *err)
{
    memset(d, 0, sizeof *d);
    d->fmt = fmt;
    if (fmt != SG_PLOT_PNG && fmt != SG_PLOT_SVG && fmt != SG_PLOT_PDF)
        return sg_error_set(err, SG_EINVAL, 0, 0, "'%s': unknown picture format %d (use png, svg or pdf)", path,
                            (int)fmt);
    enum sg_status st = sg_atomic_open(&d->af, path, err);
    if (st != SG_OK)
        return st;
    d->opened = true;
    double scale = 1.0;
    switch (fmt) {
    case SG_PLOT_PNG:
        scale = SG_PLOT_PNG_PX_PER_PT;
        d->surface = cairo_image_surface_create(CAIRO_FORMAT_RGB24, (int)lround(width_pt * scale),
                                                (int)lround(height_pt * scale));
        break;
    case SG_PLOT_SVG:
        d->svg_mem = open_memstream(&d->svg_buf, &d->svg_len);
        if (d->svg_mem == NULL) {
            sg_draw_abort(d);
            return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory drawing '%s'", path);
        }
        d->surface = cairo_svg_surface_create_for_stream(write_fp, d->svg_mem, width_pt, height_pt);
        break;
    case SG_PLOT_PDF:
        d->surface = cairo_pdf_surface_create_for_stream(write_fp, d->af.fp, width_pt, height_pt);
        if (cairo_surface_status(d->surface) == CAIRO_STATUS_SUCCESS) {
            char date[32];
            sg_draw_pdf_date(meta ? meta->create_date : NULL, date, sizeof date);
            cairo_pdf_surface_set_metadata(d->surface, CAIRO_PDF_METADATA_CREATOR, "sedgrade");
            cairo_pdf_surface_set_metadata(d->surface, CAIRO_PDF_METADATA_CREATE_DATE, date);
            cairo_pdf_surface_set_metadata(d->surface, CAIRO_PDF_METADATA_MOD_DATE, date);
            if (meta != NULL && meta->title != NULL)
                cairo_pdf_surface_set_metadata(d->surface, CAIRO_PDF_METADATA_TITLE, meta->title);
            if (meta != NULL && meta->subject != NULL)
                cairo_pdf_surface_set_metadata(d->surface, CAIRO_PDF_METADATA_SUBJECT, meta->subject);
        }
        break;
    }
    cairo_status_t cs = cairo_surface_status(d->surface);
    if (cs == CAIRO_STATUS_SUCCESS) {
        d->cr = cairo_create(d->surface);
        cs = cairo_status(d->cr);
    }
    if (cs != CAIRO_STATUS_SUCCESS) {
        st = sg_draw_cairo_error(cs, path, err);
        sg_draw_abort(d);
        return st;
    }
    cairo_scale(d->cr, scale, scale);
    cairo_set_source_rgb(d->cr, 1.0, 1.0, 1.0);
    cairo_paint(d->cr);
    return SG_OK;
}

void sg_draw_abort(struct sg_draw_doc *d)
{
    if (d->cr != NULL)
        cairo_destroy(d->cr);
    d->cr = NULL;
    if (d->surface != NULL) {
        /* finishing would flush into the file we are about to remove: harmless */
        cairo_surface_finish(d->surface);
        cairo_surface_destroy(d->surface);
    }
    d->surface = NULL;
    if (d->svg_mem != NULL)
        (void)fclose(d->svg_mem);
    d->svg_mem = NULL;
    free(d->svg_buf);
    d->svg_buf = NULL;
    if (d->opened)
        sg_atomic_abort(&d->af);
    d->opened = false;
}

/* Writes the SVG held in memory with every "surface<N>" reference (id="..."
 * and "#...") renumbered 1, 2, ... in order of first appearance. */
static bool write_svg_renumbered(const char *buf, size_t len, FILE *fp)
{
    static const char key[] = "surface";
    const size_t klen = sizeof key - 1;
    unsigned long seen[16];
    size_t n_seen = 0;
    size_t i = 0, from = 0;
    while (i + klen < len) {
        if (memcmp(buf + i, key, klen) != 0 || !(i > 0 && (buf[i - 1] == '"' || buf[i - 1] == '#')) ||
            !(buf[i + klen] >= '0' && buf[i + klen] <= '9')) {
            i++;
            continue;
        }
        size_t j = i + klen;
        unsigned long v = 0;
        while (j < len && buf[j] >= '0' && buf[j] <= '9' && v < 100000000ul)
            v = v * 10 + (unsigned long)(buf[j++] - '0');
        size_t k = 0;
        while (k < n_seen && seen[k] != v)
            k++;
        if (k == n_seen && n_seen < sizeof seen / sizeof seen[0])
            seen[n_seen++] = v;
        if (fwrite(buf + from, 1, i + klen - from, fp) != i + klen - from)
            return false;
        if (fprintf(fp, "%zu", k + 1) < 0)
            return false;
        from = i = j;
    }
    return fwrite(buf + from, 1, len - from, fp) == len - from;
}

enum sg_status sg_draw_close(struct sg_draw_doc *d, struct sg_error *err)
{
    const char *path = d->af.path;
    cairo_status_t cs = cairo_status(d->cr);
    if (cs == CAIRO_STATUS_SUCCESS) {
        cairo_destroy(d->cr);
        d->cr = NULL;
        if (d->fmt == SG_PLOT_PNG) {
            cairo_surface_flush(d->surface);
            cs = cairo_surface_write_to_png_stream(d->surface, write_fp, d->af.fp);
        } else {
            cairo_surface_finish(d->surface);
            cs = cairo_surface_status(d->surface);
        }
    }
    if (cs == CAIRO_STATUS_SUCCESS && d->svg_mem != NULL) {
        const int e = fclose(d->svg_mem);
        d->svg_mem = NULL;
        if (e != 0)
            cs = CAIRO_STATUS_NO_MEMORY;
        else if (!write_svg_renumbered(d->svg_buf, d->svg_len, d->af.fp))
            cs = CAIRO_STATUS_WRITE_ERROR;
        free(d->svg_buf);
        d->svg_buf = NULL;
    }
    if (cs != CAIRO_STATUS_SUCCESS) {
        char p[sizeof d->af.path];
        (void)snprintf(p, sizeof p, "%s", path);
        sg_draw_abort(d);
        return sg_draw_cairo_error(cs, p, err);
    }
    cairo_surface_destroy(d->surface);
    d->surface = NULL;
    d->opened = false;
    return sg_atomic_commit(&d->af, err);
}

/* ---- text and markers ---- */

void sg_draw_font(cairo_t *cr, double size_pt, bool bold)
{
    cairo_select_font_face(cr, SG_PLOT_FONT_FAMILY, CAIRO_FONT_SLANT_NORMAL,
                           bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
    cairo_set_font_size(cr, size_pt);
}

double sg_draw_text_width(cairo_t *cr, const char *s)
{
    cairo_text_extents_t te;
    cairo_text_extents(cr, s, &te);
    return te.x_advance;
}

void sg_draw_text(cairo_t *cr, double x, double y, double align, const char *s)
{
    if (s == NULL || s[0] == '\0')
        return;
    const double w = sg_draw_text_width(cr, s);
    cairo_move_to(cr, x - align * w, y);
    cairo_show_text(cr, s);
    cairo_new_path(cr);
}

void sg_draw_text_fit(cairo_t *cr, double x, double y, double max_w, double align, const char *s)
{
    if (s == NULL || s[0] == '\0')
        return;
    if (sg_draw_text_width(cr, s) <= max_w) {
        sg_draw_text(cr, x, y, align, s);
        return;
    }
    static const char ellipsis[] = "\xe2\x80\xa6"; /* U+2026 */
    char buf[512];
    size_t len = strlen(s);
    if (len >= sizeof buf - sizeof ellipsis)
        len = sizeof buf - sizeof ellipsis;
    while (len > 0) {
        len--;
        while (len > 0 && ((unsigned char)s[len] & 0xC0) == 0x80)
            len--; /* never cut inside a UTF-8 sequence */
        (void)snprintf(buf, sizeof buf, "%.*s%s", (int)len, s, ellipsis);
        if (sg_draw_text_width(cr, buf) <= max_w)
            break;
    }
    if (len > 0)
        sg_draw_text(cr, x, y, align, buf);
}

int sg_draw_text_wrap(cairo_t *cr, double x, double y, double max_w, double leading, int max_lines, bool draw,
                      const char *s)
{
    if (s == NULL || max_lines < 1)
        return 0;
    char line[512];
    int lines = 0;
    const char *p = s;
    while (*p == ' ')
        p++;
    while (*p != '\0' && lines < max_lines) {
        /* the longest run of whole words that fits */
        size_t fit = 0, at = 0;
        while (p[at] != '\0') {
            size_t end = at;
            while (p[end] == ' ')
                end++;
            while (p[end] != '\0' && p[end] != ' ')
                end++;
            if (end >= sizeof line)
                break;
            (void)snprintf(line, sizeof line, "%.*s", (int)end, p);
            if (fit > 0 && sg_draw_text_width(cr, line) > max_w)
                break;
            fit = end;
            at = end;
        }
        if (fit == 0) /* a single word longer than the line */
            fit = strcspn(p, " ") < sizeof line ? strcspn(p, " ") : sizeof line - 1;
        const bool last = lines + 1 == max_lines && p[fit] != '\0' && p[fit + strspn(p + fit, " ")] != '\0';
        if (draw) {
            if (last) {
                (void)snprintf(line, sizeof line, "%s", p);
            } else {
                (void)snprintf(line, sizeof line, "%.*s", (int)fit, p);
            }
            sg_draw_text_fit(cr, x, y + lines * leading, max_w, 0.0, line);
        }
        lines++;
        p += fit;
        while (*p == ' ')
            p++;
    }
    return lines;
}

void sg_draw_rgb(cairo_t *cr, const double rgb[3])
{
    cairo_set_source_rgb(cr, rgb[0], rgb[1], rgb[2]);
}

static void grey(cairo_t *cr, double level)
{
    cairo_set_source_rgb(cr, level, level, level);
}

enum sg_draw_marker sg_draw_marker_for(enum sg_source s)
{
    switch (s) {
    case SG_SOURCE_SIEVE: return SG_MARK_SQUARE;
    case SG_SOURCE_FINE_SIEVE: return SG_MARK_DIAMOND;
    case SG_SOURCE_HYDROMETER: return SG_MARK_CIRCLE;
    case SG_SOURCE_PIPETTE: return SG_MARK_TRIANGLE;
    }
    return SG_MARK_CIRCLE;
}

const double *sg_draw_colour_for(enum sg_source s)
{
    return s == SG_SOURCE_SIEVE || s == SG_SOURCE_FINE_SIEVE ? SIEVE : SEDIMENT;
}

void sg_draw_marker(cairo_t *cr, enum sg_draw_marker m, double x, double y, double size, bool hollow,
                    const double rgb[3])
{
    const double h = size / 2.0;
    cairo_new_path(cr);
    switch (m) {
    case SG_MARK_SQUARE:
        cairo_rectangle(cr, x - 0.88 * h, y - 0.88 * h, 1.76 * h, 1.76 * h);
        break;
    case SG_MARK_DIAMOND:
        cairo_move_to(cr, x, y - 1.2 * h);
        cairo_line_to(cr, x + 1.2 * h, y);
        cairo_line_to(cr, x, y + 1.2 * h);
        cairo_line_to(cr, x - 1.2 * h, y);
        cairo_close_path(cr);
        break;
    case SG_MARK_CIRCLE:
        cairo_arc(cr, x, y, h, 0.0, 2.0 * 3.14159265358979323846);
        break;
    case SG_MARK_TRIANGLE:
        cairo_move_to(cr, x, y - 1.2 * h);
        cairo_line_to(cr, x + 1.1 * h, y + 0.75 * h);
        cairo_line_to(cr, x - 1.1 * h, y + 0.75 * h);
        cairo_close_path(cr);
        break;
    }
    if (hollow)
        cairo_set_source_rgb(cr, 1.0, 1.0, 1.0);
    else
        sg_draw_rgb(cr, rgb);
    cairo_fill_preserve(cr);
    sg_draw_rgb(cr, rgb);
    cairo_set_line_width(cr, hollow ? 1.1 : 0.6);
    cairo_set_dash(cr, NULL, 0, 0.0);
    cairo_stroke(cr);
}

/* ---- the grading chart ---- */

struct chart {
    cairo_t *cr;
    double left, right, top, bottom; /* plot area, pt */
    struct sg_axis_log xa;
    struct sg_axis_lin ya;
    bool fine_left;
};

static double cx(const struct chart *c, double d_mm)
{
    return sg_axis_log_x(&c->xa, d_mm);
}

static double cy(const struct chart *c, double pct)
{
    return sg_axis_lin_map(&c->ya, pct);
}

static bool placeable(double d_mm)
{
    return isfinite(d_mm) && d_mm >= SG_AXIS_MIN_MM && d_mm <= SG_AXIS_MAX_MM;
}

static void hline(cairo_t *cr, double x0, double x1, double y)
{
    cairo_move_to(cr, x0, y);
    cairo_line_to(cr, x1, y);
    cairo_stroke(cr);
}

static void vline(cairo_t *cr, double x, double y0, double y1)
{
    cairo_move_to(cr, x, y0);
    cairo_line_to(cr, x, y1);
    cairo_stroke(cr);
}

/* The axis range: the default widened to hold every point and curve node. */
static void chart_range(const struct sg_result *res, double *lo, double *hi)
{
    double dmin = (double)NAN, dmax = (double)NAN;
    for (size_t i = 0; i < res->n_points; i++) {
        const double d = res->points[i].diameter_mm;
        if (!placeable(d))
            continue;
        if (isnan(dmin) || d < dmin)
            dmin = d;
        if (isnan(dmax) || d > dmax)
            dmax = d;
    }
    if (sg_axis_log_range(dmin, dmax, lo, hi, NULL) != SG_OK) {
        *lo = SG_AXIS_DEFAULT_LO_MM;
        *hi = SG_AXIS_DEFAULT_HI_MM;
    }
}

static const char *standard_caption(enum sg_standard s)
{
    switch (s) {
    case SG_STANDARD_ASTM_D7928: return "ASTM D7928 conventions";
    case SG_STANDARD_BS1377_2: return "BS 1377-2 conventions";
    case SG_STANDARD_ISO17892_4: return "ISO 17892-4 conventions";
    case SG_STANDARD_NONE: break;
    }
    return "exact physics (no standard's conventions)";
}

static void chart_title(cairo_t *cr, double x, double y, double w, const struct sg_result *res,
                        const struct sg_record *rec)
{
    char line[400];
    sg_draw_rgb(cr, INK);
    sg_draw_font(cr, 13.0, true);
    (void)snprintf(line, sizeof line, "Grading curve \xe2\x80\x94 %s", res->id[0] ? res->id : "(no id)");
    sg_draw_text_fit(cr, x, y + 13.0, w, 0.0, line);
    sg_draw_rgb(cr, GREY_TEXT);
    sg_draw_font(cr, 8.5, false);
    if (rec != NULL) {
        char date[11] = "";
        if (sg_date_is_set(rec->date))
            sg_date_format(rec->date, date);
        (void)snprintf(line, sizeof line, "%s and sieving \xc2\xb7 tested %s \xc2\xb7 %s \xc2\xb7 curve %s in log10 D",
                       rec->method == SG_METHOD_PIPETTE ? "Pipette" : "Hydrometer", date[0] ? date : "(no date)",
                       standard_caption(rec->standard),
                       res->curve.method == SG_INTERP_MONOTONE ? "monotone (Steffen)" : "linear");
    } else {
        (void)snprintf(line, sizeof line, "curve %s in log10 D",
                       res->curve.method == SG_INTERP_MONOTONE ? "monotone (Steffen)" : "linear");
    }
    sg_draw_text_fit(cr, x, y + 26.0, w, 0.0, line);
}

/* Does any subdivision lie inside main band b? */
static bool has_subdivisions(const struct sg_axis_band *bands, size_t n, const struct sg_axis_band *b)
{
    for (size_t i = 0; i < n; i++)
        if (bands[i].tier == 1 && bands[i].lo_mm >= b->lo_mm && bands[i].hi_mm <= b->hi_mm)
            return true;
    return false;
}

/* Writes the longest of name / symbol that fits in w, centred at x. */
static void cell_label(cairo_t *cr, double x, double y, double w, const struct sg_axis_band *b)
{
    const double pad = 4.0;
    if (sg_draw_text_width(cr, b->name) + pad <= w)
        sg_draw_text(cr, x, y, 0.5, b->name);
    else if (sg_draw_text_width(cr, b->symbol) + pad / 2.0 <= w)
        sg_draw_text(cr, x, y, 0.5, b->symbol);
}

/* The fraction bands in two rows above the plot area, row_h pt each. */
static void chart_bands(const struct chart *c, enum sg_axis_bands sys, double row_h)
{
    cairo_t *cr = c->cr;
    size_t n;
    const struct sg_axis_band *b = sg_axis_bands_get(sys, &n);
    const double y0 = c->top - 2.0 * row_h, y1 = c->top - row_h;
    size_t k = 0;
    for (size_t i = 0; i < n; i++) {
        const double lo = b[i].lo_mm > c->xa.lo_mm ? b[i].lo_mm : c->xa.lo_mm;
        const double hi = b[i].hi_mm < c->xa.hi_mm ? b[i].hi_mm : c->xa.hi_mm;
        if (!(hi > lo))
            continue;
        double xa = cx(c, lo), xb = cx(c, hi);
        if (xa > xb) {
            const double t = xa;
            xa = xb;
            xb = t;
        }
        const bool main = b[i].tier == 0;
        const bool span = main && !has_subdivisions(b, n, &b[i]);
        const double top = main ? y0 : y1, h = span ? 2.0 * row_h : row_h;
        cairo_rectangle(cr, xa, top, xb - xa, h);
        if (main)
            sg_draw_rgb(cr, k++ % 2 == 0 ? STRIP_A : STRIP_B);
        else
            cairo_set_source_rgb(cr, 1.0, 1.0, 1.0);
        cairo_fill_preserve(cr);
        grey(cr, BOUNDARY);
        cairo_set_line_width(cr, 0.6);
        cairo_stroke(cr);
        sg_draw_rgb(cr, INK);
        sg_draw_font(cr, main ? 7.5 : 6.5, main);
        cell_label(cr, (xa + xb) / 2.0, top + h / 2.0 + (main ? 2.7 : 2.3), xb - xa, &b[i]);
    }
    /* main boundaries continue through the plot */
    grey(cr, BOUNDARY);
    cairo_set_line_width(cr, 0.9);
    for (size_t i = 0; i < n; i++) {
        if (b[i].tier != 0 || !(b[i].lo_mm > c->xa.lo_mm) || !(b[i].lo_mm < c->xa.hi_mm))
            continue;
        vline(cr, cx(c, b[i].lo_mm), c->top, c->bottom);
    }
}

static void chart_grid(const struct chart *c)
{
    cairo_t *cr = c->cr;
    struct sg_axis_tick t[64];
    size_t n = 0;
    cairo_set_dash(cr, NULL, 0, 0.0);
    /* faint lines at 3, 4, 6, 7, 8, 9 per decade, as on semi-log paper */
    grey(cr, GRID_FAINT);
    cairo_set_line_width(cr, 0.35);
    for (int k = (int)floor(log10(c->xa.lo_mm) - 1e-9); k <= (int)ceil(log10(c->xa.hi_mm)); k++) {
        for (int m = 3; m <= 9; m++) {
            if (m == 5)
                continue;
            const double v = m * pow(10.0, k);
            if (v > c->xa.lo_mm && v < c->xa.hi_mm)
                vline(cr, cx(c, v), c->top, c->bottom);
        }
    }
    if (sg_axis_log_ticks(c->xa.lo_mm, c->xa.hi_mm, t, 64, &n, NULL) == SG_OK) {
        for (size_t i = 0; i < n; i++) {
            grey(cr, t[i].major ? GRID_MAJOR : GRID_MINOR);
            cairo_set_line_width(cr, t[i].major ? 0.6 : 0.4);
            vline(cr, cx(c, t[i].value), c->top, c->bottom);
        }
    }
    for (int p = 10; p < 100; p += 10) {
        grey(cr, p == 50 ? GRID_MAJOR : GRID_MINOR);
        cairo_set_line_width(cr, p == 50 ? 0.55 : 0.4);
        hline(cr, c->left, c->right, cy(c, p));
    }
}

static void chart_axes(const struct chart *c)
{
    cairo_t *cr = c->cr;
    struct sg_axis_tick t[64];
    size_t n = 0;
    sg_draw_rgb(cr, INK);
    cairo_set_line_width(cr, 0.9);
    cairo_rectangle(cr, c->left, c->top, c->right - c->left, c->bottom - c->top);
    cairo_stroke(cr);
    if (sg_axis_log_ticks(c->xa.lo_mm, c->xa.hi_mm, t, 64, &n, NULL) == SG_OK) {
        for (size_t i = 0; i < n; i++) {
            const double x = cx(c, t[i].value);
            sg_draw_rgb(cr, INK);
            cairo_set_line_width(cr, 0.7);
            vline(cr, x, c->bottom, c->bottom + (t[i].major ? 4.0 : 2.5));
            if (t[i].major) {
                sg_draw_font(cr, 8.0, false);
            } else {
                sg_draw_font(cr, 6.5, false);
                sg_draw_rgb(cr, GREY_TEXT);
            }
            sg_draw_text(cr, x, c->bottom + 12.0, 0.5, t[i].label);
        }
    }
    if (sg_axis_lin_ticks(0.0, 100.0, 10.0, t, 64, &n, NULL) == SG_OK) {
        sg_draw_font(cr, 8.0, false);
        for (size_t i = 0; i < n; i++) {
            const double y = cy(c, t[i].value);
            sg_draw_rgb(cr, INK);
            cairo_set_line_width(cr, 0.7);
            hline(cr, c->left - 3.0, c->left, y);
            sg_draw_text(cr, c->left - 5.0, y + 2.8, 1.0, t[i].label);
        }
    }
    sg_draw_rgb(cr, INK);
    sg_draw_font(cr, 8.5, false);
    sg_draw_text(cr, (c->left + c->right) / 2.0, c->bottom + 25.0, 0.5,
                 c->fine_left ? "Particle diameter (mm), log scale: sieve aperture or equivalent spherical (Stokes) "
                                "diameter \xe2\x86\x92"
                              : "\xe2\x86\x90 Particle diameter (mm), log scale: sieve aperture or equivalent "
                                "spherical (Stokes) diameter");
    cairo_save(cr);
    cairo_translate(cr, c->left - 27.0, (c->top + c->bottom) / 2.0);
    cairo_rotate(cr, -3.14159265358979323846 / 2.0);
    sg_draw_text(cr, 0.0, 0.0, 0.5, "Percent finer by mass (%)");
    cairo_restore(cr);
}

static int cmp_point_d(const void *a, const void *b)
{
    const struct sg_point *const *pa = a, *const *pb = b;
    return ((*pa)->diameter_mm > (*pb)->diameter_mm) - ((*pa)->diameter_mm < (*pb)->diameter_mm);
}

static double clamp_pct(double p)
{
    return p < 0.0 ? 0.0 : p > 100.0 ? 100.0 : p;
}

/* The 95 % band through the points on the curve that carry a finite u.
 * Returns true when it was drawn. */
static bool chart_band95(const struct chart *c, const struct sg_result *res)
{
    const struct sg_point **pts = malloc((res->n_points ? res->n_points : 1) * sizeof *pts);
    if (pts == NULL)
        return false;
    size_t n = 0;
    for (size_t i = 0; i < res->n_points; i++) {
        const struct sg_point *p = &res->points[i];
        if (p->on_curve && placeable(p->diameter_mm) && isfinite(p->percent_finer) && isfinite(p->percent_finer_u) &&
            p->percent_finer_u >= 0.0)
            pts[n++] = p;
    }
    if (n >= 2) {
        qsort(pts, n, sizeof *pts, cmp_point_d);
        cairo_t *cr = c->cr;
        cairo_new_path(cr);
        for (size_t i = 0; i < n; i++)
            cairo_line_to(cr, cx(c, pts[i]->diameter_mm),
                          cy(c, clamp_pct(pts[i]->percent_finer + SG_PLOT_K95 * pts[i]->percent_finer_u)));
        for (size_t i = n; i-- > 0;)
            cairo_line_to(cr, cx(c, pts[i]->diameter_mm),
                          cy(c, clamp_pct(pts[i]->percent_finer - SG_PLOT_K95 * pts[i]->percent_finer_u)));
        cairo_close_path(cr);
        cairo_set_source_rgba(cr, BAND95[0], BAND95[1], BAND95[2], 0.55);
        cairo_fill(cr);
    }
    free(pts);
    return n >= 2;
}

/* Steps per curve segment: enough for a smooth Steffen curve; a log-linear
 * segment is straight anyway. */
#define CURVE_STEPS 16

static void chart_curve(const struct chart *c, const struct sg_result *res)
{
    const struct sg_curve *cv = &res->curve;
    if (cv->n < 2)
        return;
    cairo_t *cr = c->cr;
    cairo_new_path(cr);
    cairo_move_to(cr, cx(c, pow(10.0, cv->log10_d[0])), cy(c, cv->percent[0]));
    for (size_t i = 0; i + 1 < cv->n; i++) {
        for (int s = 1; s < CURVE_STEPS; s++) {
            const double l = cv->log10_d[i] + (cv->log10_d[i + 1] - cv->log10_d[i]) * s / CURVE_STEPS;
            double p;
            if (sg_curve_percent_at(cv, pow(10.0, l), &p, NULL) == SG_OK)
                cairo_line_to(cr, cx(c, pow(10.0, l)), cy(c, p));
        }
        cairo_line_to(cr, cx(c, pow(10.0, cv->log10_d[i + 1])), cy(c, cv->percent[i + 1]));
    }
    sg_draw_rgb(cr, CURVE);
    cairo_set_line_width(cr, 1.6);
    cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
    cairo_set_dash(cr, NULL, 0, 0.0);
    cairo_stroke(cr);
}

/* Text on a white backing so gridlines do not run through it. */
static void backed_text(cairo_t *cr, double x, double y, double align, const char *s)
{
    const double w = sg_draw_text_width(cr, s);
    cairo_rectangle(cr, x - align * w - 1.5, y - 7.0, w + 3.0, 9.0);
    cairo_set_source_rgba(cr, 1.0, 1.0, 1.0, 0.85);
    cairo_fill(cr);
    sg_draw_rgb(cr, INK);
    sg_draw_text(cr, x, y, align, s);
}

static void chart_dvalues(const struct chart *c, const struct sg_result *res)
{
    static const struct {
        const char *name, *label;
        double pct;
    } dv[] = {{"d10_mm", "D10", 10.0}, {"d30_mm", "D30", 30.0}, {"d60_mm", "D60", 60.0}};
    cairo_t *cr = c->cr;
    static const double dash[] = {3.0, 2.0};
    for (size_t i = 0; i < sizeof dv / sizeof dv[0]; i++) {
        const struct sg_quantity *q = sg_result_quantity(res, dv[i].name);
        if (q == NULL || !q->determined || q->is_text || !(q->value > 0.0) || !placeable(q->value))
            continue;
        const double x = cx(c, q->value), y = cy(c, dv[i].pct);
        if (x < fmin(c->left, c->right) - 0.5 || x > fmax(c->left, c->right) + 0.5)
            continue;
        sg_draw_rgb(cr, INK);
        cairo_set_line_width(cr, 0.6);
        cairo_set_dash(cr, dash, 2, 0.0);
        hline(cr, c->left, x, y);
        vline(cr, x, y, c->bottom);
        cairo_set_dash(cr, NULL, 0, 0.0);
        double right = x; /* right end of what is drawn at the point */
        if (q->has_u && placeable(q->low95) && placeable(q->high95)) {
            const double xa = cx(c, q->low95), xb = cx(c, q->high95);
            right = fmax(right, fmax(xa, xb));
            cairo_set_line_width(cr, 1.0);
            hline(cr, xa, xb, y);
            vline(cr, xa, y - 3.0, y + 3.0);
            vline(cr, xb, y - 3.0, y + 3.0);
        }
        char num[32], text[64];
        sg_axis_format_sig(q->value, 4, num, sizeof num);
        (void)snprintf(text, sizeof text, "%s = %s mm", dv[i].label, num);
        sg_draw_font(cr, 7.5, false);
        const double w = sg_draw_text_width(cr, text);
        /* Beside the percent axis, on the side of the line the curve does
         * not occupy (above it with fine sizes on the left); next to the
         * point when the axis side is too narrow. */
        const bool room = x - c->left > w + 10.0;
        const bool above = c->fine_left ? room : !room;
        const double ty = above ? y - 3.0 : y + 9.0;
        if (room)
            backed_text(cr, c->left + 4.0, ty, 0.0, text);
        else
            backed_text(cr, right + 4.0, ty, 0.0, text);
    }
}

/* A point carries a QC finding of its own (other than lying coarser than
 * the finest sieve, which the hollow marker already shows). */
static bool qc_flagged(const struct sg_point *p)
{
    return (p->flags & ~(unsigned)SG_PF_COARSER_THAN_SIEVE) != 0;
}

/* The ring drawn around a point with a QC finding. */
static void ring(cairo_t *cr, double x, double y)
{
    cairo_new_path(cr);
    cairo_arc(cr, x, y, 5.6, 0.0, 2.0 * 3.14159265358979323846);
    sg_draw_rgb(cr, INK);
    cairo_set_line_width(cr, 0.9);
    cairo_set_dash(cr, NULL, 0, 0.0);
    cairo_stroke(cr);
}

static void chart_points(const struct chart *c, const struct sg_result *res)
{
    for (size_t i = 0; i < res->n_points; i++) {
        const struct sg_point *p = &res->points[i];
        if (!placeable(p->diameter_mm) || !isfinite(p->percent_finer))
            continue;
        const double x = cx(c, p->diameter_mm), y = cy(c, p->percent_finer);
        sg_draw_marker(c->cr, sg_draw_marker_for(p->source), x, y, 5.2, !p->on_curve, sg_draw_colour_for(p->source));
        if (qc_flagged(p))
            ring(c->cr, x, y);
    }
}

/* One "label  value" line of the side panel. */
static double panel_row(cairo_t *cr, double x, double y, double w, const char *label, const char *value)
{
    sg_draw_font(cr, 7.5, false);
    sg_draw_rgb(cr, INK);
    sg_draw_text_fit(cr, x, y, w * 0.55, 0.0, label);
    sg_draw_text_fit(cr, x + w, y, w * 0.45, 1.0, value);
    return y + 10.0;
}

void sg_draw_class_text(const struct sg_result *res, const struct sg_quantity *q, char *buf, size_t size)
{
    double pct = 0.0;
    if (!sg_mc_class_probability(res, q->name, q->text, &pct)) {
        (void)snprintf(buf, size, "%s", q->text);
        return;
    }
    char p[16];
    if (pct > 0.0 && pct < 0.5)
        (void)snprintf(p, sizeof p, "< 1 %%");
    else if (pct >= 99.5 && pct < 100.0)
        (void)snprintf(p, sizeof p, "> 99 %%");
    else
        (void)snprintf(p, sizeof p, "%.0f %%", pct);
    (void)snprintf(buf, size, "%s (p = %s)", q->text, p);
}

static void quantity_text(const struct sg_result *res, const char *name, int sig, int decimals, const char *unit,
                          char *buf, size_t size)
{
    const struct sg_quantity *q = sg_result_quantity(res, name);
    if (q == NULL || !q->determined) {
        (void)snprintf(buf, size, "n.d.");
        return;
    }
    if (q->is_text) {
        sg_draw_class_text(res, q, buf, size);
        return;
    }
    char num[40];
    if (sig > 0)
        sg_axis_format_sig(q->value, sig, num, sizeof num);
    else
        sg_axis_format_fixed(q->value, decimals, num, sizeof num);
    (void)snprintf(buf, size, "%s%s%s", num, unit[0] ? " " : "", unit);
}

static double panel_heading(cairo_t *cr, double x, double y, const char *s)
{
    sg_draw_font(cr, 8.0, true);
    sg_draw_rgb(cr, INK);
    sg_draw_text(cr, x, y, 0.0, s);
    return y + 11.0;
}

static void chart_panel(cairo_t *cr, double x, double y, double w, const struct sg_result *res,
                        enum sg_axis_bands sys, bool band95)
{
    bool seen[4] = {false, false, false, false}, hollow = false, flagged = false;
    for (size_t i = 0; i < res->n_points; i++) {
        if ((unsigned)res->points[i].source < 4)
            seen[res->points[i].source] = true;
        if (!res->points[i].on_curve)
            hollow = true;
        if (qc_flagged(&res->points[i]))
            flagged = true;
    }
    static const char *const names[4] = {"Sieve (whole sample)", "Fine sieve (specimen)", "Hydrometer", "Pipette"};
    y = panel_heading(cr, x, y, "Legend");
    sg_draw_font(cr, 7.5, false);
    for (int s = 0; s < 4; s++) {
        if (!seen[s])
            continue;
        sg_draw_marker(cr, sg_draw_marker_for((enum sg_source)s), x + 6.0, y - 2.7, 5.2, false,
                       sg_draw_colour_for((enum sg_source)s));
        sg_draw_rgb(cr, INK);
        sg_draw_font(cr, 7.5, false);
        sg_draw_text_fit(cr, x + 16.0, y, w - 16.0, 0.0, names[s]);
        y += 10.0;
    }
    if (hollow) {
        sg_draw_marker(cr, SG_MARK_CIRCLE, x + 6.0, y - 2.7, 5.2, true, SEDIMENT);
        sg_draw_rgb(cr, INK);
        sg_draw_text_fit(cr, x + 16.0, y, w - 16.0, 0.0, "hollow: not used for the curve");
        y += 10.0;
    }
    if (flagged) {
        sg_draw_marker(cr, SG_MARK_CIRCLE, x + 6.0, y - 2.7, 5.2, false, SEDIMENT);
        ring(cr, x + 6.0, y - 2.7);
        sg_draw_rgb(cr, INK);
        sg_draw_font(cr, 7.5, false);
        sg_draw_text_fit(cr, x + 16.0, y, w - 16.0, 0.0, "ringed: QC finding at the point");
        y += 10.0;
    }
    sg_draw_rgb(cr, CURVE);
    cairo_set_line_width(cr, 1.6);
    hline(cr, x, x + 12.0, y - 2.7);
    sg_draw_rgb(cr, INK);
    sg_draw_text_fit(cr, x + 16.0, y, w - 16.0, 0.0, "Interpolated curve");
    y += 10.0;
    if (band95) {
        cairo_rectangle(cr, x, y - 6.5, 12.0, 7.0);
        cairo_set_source_rgba(cr, BAND95[0], BAND95[1], BAND95[2], 0.55);
        cairo_fill(cr);
        sg_draw_rgb(cr, INK);
        sg_draw_text_fit(cr, x + 16.0, y, w - 16.0, 0.0, "95 % band (\xc2\xb1" "1.96 u)");
        y += 10.0;
    }
    y += 6.0;
    char v[SG_QTEXT_MAX + 16];
    y = panel_heading(cr, x, y, "Characteristic sizes");
    static const struct {
        const char *name, *label;
    } dv[] = {{"d10_mm", "D10"}, {"d30_mm", "D30"}, {"d50_mm", "D50"}, {"d60_mm", "D60"}};
    for (size_t i = 0; i < sizeof dv / sizeof dv[0]; i++) {
        quantity_text(res, dv[i].name, 4, 0, "mm", v, sizeof v);
        y = panel_row(cr, x, y, w, dv[i].label, v);
    }
    quantity_text(res, "cu", 3, 0, "", v, sizeof v);
    y = panel_row(cr, x, y, w, "Cu", v);
    quantity_text(res, "cc", 3, 0, "", v, sizeof v);
    y = panel_row(cr, x, y, w, "Cc", v);
    y += 6.0;
    char heading[64];
    (void)snprintf(heading, sizeof heading, "Fractions, %s", sg_axis_bands_name(sys));
    y = panel_heading(cr, x, y, heading);
    static const struct {
        const char *name, *label;
    } iso[] = {{"gravel_pct", "Gravel 2\xe2\x80\x93" "63 mm"},
               {"sand_pct", "Sand 0.063\xe2\x80\x93" "2"},
               {"silt_pct", "Silt 0.002\xe2\x80\x93" "0.063"},
               {"clay_pct", "Clay < 0.002"}},
      uscs[] = {{"uscs_gravel_pct", "Gravel 4.75\xe2\x80\x93" "75 mm"},
                {"uscs_sand_pct", "Sand 0.075\xe2\x80\x93" "4.75"},
                {"fines_pct", "Fines < 0.075"},
                {"clay_pct", "Clay size < 0.002"}};
    for (size_t i = 0; i < 4; i++) {
        const char *name = sys == SG_BANDS_USCS ? uscs[i].name : iso[i].name;
        quantity_text(res, name, 0, 1, "%", v, sizeof v);
        y = panel_row(cr, x, y, w, sys == SG_BANDS_USCS ? uscs[i].label : iso[i].label, v);
    }
    if (sys != SG_BANDS_USCS) {
        quantity_text(res, "fines_pct", 0, 1, "%", v, sizeof v);
        y = panel_row(cr, x, y, w, "Finer than 0.075", v);
    }
    y += 6.0;
    y = panel_heading(cr, x, y, "USDA texture (< 2 mm)");
    quantity_text(res, "usda_texture", 0, 0, "", v, sizeof v);
    sg_draw_font(cr, 7.5, false);
    sg_draw_text_fit(cr, x, y, w, 0.0, v);
    y += 10.0;
    const struct sg_quantity *qs = sg_result_quantity(res, "qc_status");
    if (qs != NULL && qs->determined && qs->is_text) {
        y += 6.0;
        y = panel_heading(cr, x, y, "QC");
        sg_draw_font(cr, 7.5, false);
        sg_draw_text_fit(cr, x, y, w, 0.0, qs->text);
    }
}

void sg_draw_grading_chart(cairo_t *cr, double x, double y, double w, double h, const struct sg_result *res,
                           const struct sg_record *rec, const struct sg_draw_chart_opts *o)
{
    cairo_save(cr);
    struct chart c = {.cr = cr, .fine_left = !o->coarse_left};
    double top = y;
    if (o->title) {
        chart_title(cr, x, y, w, res, rec);
        top += 36.0;
    }
    const double panel_w = o->side_panel ? 150.0 : 0.0;
    const double row_h = 12.0;
    c.left = x + 40.0;
    c.right = x + w - panel_w - (o->side_panel ? 18.0 : 6.0);
    c.top = top + 2.0 * row_h + 2.0;
    c.bottom = y + h - 32.0;
    double lo, hi;
    chart_range(res, &lo, &hi);
    c.xa = (struct sg_axis_log){lo, hi, c.fine_left ? c.left : c.right, c.fine_left ? c.right : c.left};
    c.ya = (struct sg_axis_lin){0.0, 100.0, c.bottom, c.top};

    chart_grid(&c);
    chart_bands(&c, o->bands, row_h);

    cairo_save(cr);
    cairo_rectangle(cr, c.left, c.top, c.right - c.left, c.bottom - c.top);
    cairo_clip(cr);
    const bool band95 = chart_band95(&c, res);
    chart_curve(&c, res);
    chart_dvalues(&c, res);
    cairo_restore(cr);

    chart_axes(&c);
    /* markers may overhang the frame by half their size at 0 % and 100 % */
    cairo_save(cr);
    cairo_rectangle(cr, c.left - 5.0, c.top - 5.0, c.right - c.left + 10.0, c.bottom - c.top + 10.0);
    cairo_clip(cr);
    chart_points(&c, res);
    cairo_restore(cr);

    if (o->side_panel)
        chart_panel(cr, x + w - panel_w, c.top - 2.0 * row_h + 8.0, panel_w - 4.0, res, o->bands, band95);
    cairo_restore(cr);
}

/* ---- the straight-line fit chart ---- */

struct lin_axes {
    struct sg_axis_lin xa, ya;
    double left, right, top, bottom;
    double xstep, ystep;
};

static void lin_panel(cairo_t *cr, const struct lin_axes *a, const char *y_label, bool x_labels, const char *x_label)
{
    struct sg_axis_tick t[64];
    size_t n = 0;
    cairo_set_dash(cr, NULL, 0, 0.0);
    if (sg_axis_lin_ticks(a->xa.lo, a->xa.hi, a->xstep, t, 64, &n, NULL) == SG_OK) {
        for (size_t i = 0; i < n; i++) {
            const double px = sg_axis_lin_map(&a->xa, t[i].value);
            grey(cr, GRID_MINOR);
            cairo_set_line_width(cr, 0.4);
            vline(cr, px, a->top, a->bottom);
            sg_draw_rgb(cr, INK);
            cairo_set_line_width(cr, 0.7);
            vline(cr, px, a->bottom, a->bottom + 3.0);
            if (x_labels) {
                sg_draw_font(cr, 8.0, false);
                sg_draw_text(cr, px, a->bottom + 12.0, 0.5, t[i].label);
            }
        }
    }
    if (sg_axis_lin_ticks(a->ya.lo, a->ya.hi, a->ystep, t, 64, &n, NULL) == SG_OK) {
        for (size_t i = 0; i < n; i++) {
            const double py = sg_axis_lin_map(&a->ya, t[i].value);
            grey(cr, GRID_MINOR);
            cairo_set_line_width(cr, 0.4);
            hline(cr, a->left, a->right, py);
            sg_draw_rgb(cr, INK);
            cairo_set_line_width(cr, 0.7);
            hline(cr, a->left - 3.0, a->left, py);
            sg_draw_font(cr, 8.0, false);
            sg_draw_text(cr, a->left - 5.0, py + 2.8, 1.0, t[i].label);
        }
    }
    sg_draw_rgb(cr, INK);
    cairo_set_line_width(cr, 0.9);
    cairo_rectangle(cr, a->left, a->top, a->right - a->left, a->bottom - a->top);
    cairo_stroke(cr);
    sg_draw_font(cr, 8.5, false);
    if (x_labels && x_label != NULL)
        sg_draw_text(cr, (a->left + a->right) / 2.0, a->bottom + 25.0, 0.5, x_label);
    if (y_label != NULL) {
        cairo_save(cr);
        cairo_translate(cr, a->left - 36.0, (a->top + a->bottom) / 2.0);
        cairo_rotate(cr, -3.14159265358979323846 / 2.0);
        sg_draw_text_fit(cr, 0.0, 0.0, a->bottom - a->top, 0.5, y_label);
        cairo_restore(cr);
    }
}

/* Widens [lo, hi] to a nice range; falls back to the raw range. */
static void nice(double lo, double hi, unsigned ticks, double *nlo, double *nhi, double *step)
{
    if (sg_axis_nice_range(lo, hi, ticks, nlo, nhi, step, NULL) != SG_OK) {
        *nlo = lo - 1.0;
        *nhi = hi + 1.0;
        *step = 1.0;
    }
}

void sg_draw_fit_chart(cairo_t *cr, double x, double y, double w, double h, const struct sg_plot_fit *fit)
{
    cairo_save(cr);
    sg_draw_rgb(cr, INK);
    sg_draw_font(cr, 12.0, true);
    sg_draw_text_fit(cr, x, y + 12.0, w, 0.0, fit->title ? fit->title : "Calibration");
    double top = y + 20.0;
    if (fit->note != NULL && fit->note[0] != '\0') {
        sg_draw_font(cr, 8.5, false);
        sg_draw_rgb(cr, GREY_TEXT);
        sg_draw_text_fit(cr, x, y + 26.0, w, 0.0, fit->note);
        top += 10.0;
    }
    top += 8.0;
    double xmin = fit->xs[0], xmax = fit->xs[0], ymin = fit->ys[0], ymax = fit->ys[0], rmax = 0.0;
    for (size_t i = 0; i < fit->n; i++) {
        xmin = fmin(xmin, fit->xs[i]);
        xmax = fmax(xmax, fit->xs[i]);
        ymin = fmin(ymin, fit->ys[i]);
        ymax = fmax(ymax, fit->ys[i]);
        rmax = fmax(rmax, fabs(fit->ys[i] - (fit->c0 + fit->c1 * fit->xs[i])));
    }
    struct lin_axes a;
    double xlo, xhi;
    nice(xmin, xmax, 6, &xlo, &xhi, &a.xstep);
    /* the line across the whole x range belongs in the chart too */
    const double f0 = fit->c0 + fit->c1 * xlo, f1 = fit->c0 + fit->c1 * xhi;
    double ylo, yhi;
    nice(fmin(ymin, fmin(f0, f1)), fmax(ymax, fmax(f0, f1)), 5, &ylo, &yhi, &a.ystep);
    a.left = x + 52.0;
    a.right = x + w - 12.0;
    a.top = top;
    const double bottom = y + h - 34.0;
    const double split = fit->residuals ? top + (bottom - top) * 0.68 : bottom;
    a.bottom = fit->residuals ? split - 10.0 : bottom;
    a.xa = (struct sg_axis_lin){xlo, xhi, a.left, a.right};
    a.ya = (struct sg_axis_lin){ylo, yhi, a.bottom, a.top};
    lin_panel(cr, &a, fit->y_label, !fit->residuals, fit->x_label);

    cairo_save(cr);
    cairo_rectangle(cr, a.left, a.top, a.right - a.left, a.bottom - a.top);
    cairo_clip(cr);
    sg_draw_rgb(cr, SEDIMENT);
    cairo_set_line_width(cr, 1.4);
    cairo_move_to(cr, sg_axis_lin_map(&a.xa, xlo), sg_axis_lin_map(&a.ya, f0));
    cairo_line_to(cr, sg_axis_lin_map(&a.xa, xhi), sg_axis_lin_map(&a.ya, f1));
    cairo_stroke(cr);
    cairo_restore(cr);
    /* markers may overhang the frame by half their size */
    cairo_save(cr);
    cairo_rectangle(cr, a.left - 4.0, a.top - 4.0, a.right - a.left + 8.0, a.bottom - a.top + 8.0);
    cairo_clip(cr);
    for (size_t i = 0; i < fit->n; i++)
        sg_draw_marker(cr, SG_MARK_CIRCLE, sg_axis_lin_map(&a.xa, fit->xs[i]), sg_axis_lin_map(&a.ya, fit->ys[i]),
                       5.2, false, CURVE);
    cairo_restore(cr);

    char c0[40], c1[40], eq[128];
    sg_axis_format_sig(fit->c0, 5, c0, sizeof c0);
    sg_axis_format_sig(fabs(fit->c1), 5, c1, sizeof c1);
    if (fit->line_label != NULL)
        (void)snprintf(eq, sizeof eq, "%s   (n = %zu)", fit->line_label, fit->n);
    else
        (void)snprintf(eq, sizeof eq, "fit: y = %s %s %s x   (n = %zu)", c0, fit->c1 < 0.0 ? "\xe2\x88\x92" : "+",
                       c1, fit->n);
    sg_draw_font(cr, 8.0, false);
    /* the equation goes in the corner the line leaves free */
    const bool rising = fit->c1 >= 0.0;
    backed_text(cr, rising ? a.left + 6.0 : a.right - 6.0, a.top + 12.0, rising ? 0.0 : 1.0, eq);

    if (fit->residuals) {
        struct lin_axes r = a;
        double rlo, rhi;
        const double span = rmax > 0.0 ? rmax : 1.0;
        nice(-span, span, 4, &rlo, &rhi, &r.ystep);
        r.top = split + 4.0;
        r.bottom = bottom;
        r.ya = (struct sg_axis_lin){rlo, rhi, r.bottom, r.top};
        lin_panel(cr, &r, fit->residual_label ? fit->residual_label : "residual", true, fit->x_label);
        cairo_save(cr);
        cairo_rectangle(cr, r.left - 4.0, r.top - 4.0, r.right - r.left + 8.0, r.bottom - r.top + 8.0);
        cairo_clip(cr);
        sg_draw_rgb(cr, SEDIMENT);
        cairo_set_line_width(cr, 1.0);
        hline(cr, r.left, r.right, sg_axis_lin_map(&r.ya, 0.0));
        for (size_t i = 0; i < fit->n; i++) {
            const double px = sg_axis_lin_map(&r.xa, fit->xs[i]);
            const double py = sg_axis_lin_map(&r.ya, fit->ys[i] - (fit->c0 + fit->c1 * fit->xs[i]));
            sg_draw_rgb(cr, CURVE);
            cairo_set_line_width(cr, 0.7);
            vline(cr, px, sg_axis_lin_map(&r.ya, 0.0), py);
            sg_draw_marker(cr, SG_MARK_CIRCLE, px, py, 4.6, false, CURVE);
        }
        cairo_restore(cr);
    }
    cairo_restore(cr);
}
