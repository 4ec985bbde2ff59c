/* classify.c - summary quantities read off the grading curve: D-values, Cu,
 * Cc, size fractions of four systems, USDA texture, USCS and ISO grading
 * terms, and the sieve/sedimentation junction gap (METHODS.md 6-8). */
#include "sedgrade/classify.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "sedgrade/reduce.h"

/* ISO 14688-1 boundaries, mm (METHODS.md 8.1, memory, high confidence; silt read 20). */
#define ISO_CLAY_SILT_MM 0.002
#define ISO_FSI_MSI_MM 0.0063
#define ISO_MSI_CSI_MM 0.02
#define ISO_SILT_SAND_MM 0.063
#define ISO_FSA_MSA_MM 0.2
#define ISO_MSA_CSA_MM 0.63
#define ISO_SAND_GRAVEL_MM 2.0
#define ISO_FGR_MGR_MM 6.3
#define ISO_MGR_CGR_MM 20.0
#define ISO_GRAVEL_COBBLE_MM 63.0
#define ISO_COBBLE_BOULDER_MM 200.0

/* ASTM D2487 boundaries, mm (METHODS.md 8.2, memory, high confidence; fines read 20). */
#define USCS_FINES_MM 0.075        /* No. 200 */
#define USCS_FSA_MSA_MM 0.425      /* No. 40 */
#define USCS_MSA_CSA_MM 2.0        /* No. 10 */
#define USCS_SAND_GRAVEL_MM 4.75   /* No. 4 */
#define USCS_FGR_CGR_MM 19.0       /* 3/4 in */
#define USCS_GRAVEL_COBBLE_MM 75.0 /* 3 in */
#define USCS_COBBLE_BOULDER_MM 300.0
/* ASTM D2487 fines limits, % of the fraction finer than 75 mm (METHODS.md 8.2). */
#define USCS_CLEAN_MAX_PCT 5.0
#define USCS_DUAL_MAX_PCT 12.0
#define USCS_FINE_GRAINED_MIN_PCT 50.0
/* ASTM D2487 grading limits (METHODS.md 7.3 and 13.6 #55). */
#define USCS_GW_CU_MIN 4.0
#define USCS_SW_CU_MIN 6.0
#define USCS_CC_MIN 1.0
#define USCS_CC_MAX 3.0

/* AASHTO M 145 boundaries, mm (METHODS.md 8.3). */
#define AASHTO_CLAY_SILT_MM 0.002
#define AASHTO_SILT_SAND_MM 0.075
#define AASHTO_FSA_CSA_MM 0.425
#define AASHTO_SAND_GRAVEL_MM 2.0
#define AASHTO_GRAVEL_BOULDER_MM 75.0

/* USDA separates, mm (METHODS.md 8.4, read 21). */
#define USDA_CLAY_SILT_MM 0.002
#define USDA_SILT_SAND_MM 0.05
#define USDA_VFS_FS_MM 0.10
#define USDA_FS_MS_MM 0.25
#define USDA_MS_CS_MM 0.5
#define USDA_CS_VCS_MM 1.0
#define USDA_FINE_EARTH_MM 2.0

/* Frost screen size, mm (METHODS.md 9.3, Casagrande 1931, read 34). */
#define FROST_SIZE_MM 0.02

/* ISO 14688-2 grading limits (METHODS.md 7.3; FROM MEMORY, 2004 wording,
 * to be verified against the standard). */
#define ISO_GAP_CC_MAX 0.5
#define ISO_MULTI_CU_MIN 15.0
#define ISO_MULTI_CC_MIN 1.0
#define ISO_MULTI_CC_MAX 3.0
#define ISO_EVEN_CU_MAX 6.0

/* A separate may be this far below 0 % and still count as 0 % (it rounds
 * to 0.0 % at the 0.1 % step used by the USDA texture, METHODS.md 8.4). */
#define USDA_NEGATIVE_TOL_PCT 0.05
/* A fraction more negative than this is reported with a warning note
 * (round-off, common practice). */
#define NEGATIVE_FRACTION_PCT (-1e-9)

/* snprintf into a fixed buffer; notes longer than the buffer are cut
 * (the result's fields have fixed sizes). */
static void fmt_into(char *buf, size_t n, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;

static void fmt_into(char *buf, size_t n, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    (void)vsnprintf(buf, n, fmt, ap);
    va_end(ap);
}

/* ---- USDA texture ------------------------------------------------------ */

const char *sg_classify_usda_texture(double sand_pct, double silt_pct, double clay_pct)
{
    double v[3] = {sand_pct, silt_pct, clay_pct};
    double sum = 0.0;
    for (int i = 0; i < 3; i++) {
        if (!isfinite(v[i]) || v[i] < -USDA_NEGATIVE_TOL_PCT)
            return NULL;
        v[i] = fmax(v[i], 0.0);
        sum += v[i];
    }
    if (!(sum > 0.0))
        return NULL;
    /* scale to 100 %, round to tenths, keep the sum at 1000 tenths by moving
     * the odd tenth to (or from) the component whose rounding moved it most */
    long t[3];
    double rem[3];
    long total = 0;
    for (int i = 0; i < 3; i++) {
        const double tenths = 1000.0 * v[i] / sum;
        t[i] = lround(tenths);
        rem[i] = tenths - (double)t[i];
        total += t[i];
    }
    while (total != 1000) {
        const long step = total < 1000 ? 1 : -1;
        int k = 0;
        for (int i = 1; i < 3; i++)
            if (step > 0 ? rem[i] > rem[k] : rem[i] < rem[k])
                k = i;
        if (t[k] + step < 0)
            return NULL; /* cannot happen with non-negative inputs */
        t[k] += step;
        rem[k] -= (double)step;
        total += step;
    }
    const long sa = t[0], si = t[1], cl = t[2];

    /* METHODS.md 8.4 inequalities in tenths of a percent (x10); 1.5 cl is
     * written 3 cl / 2, so "si + 1.5 cl < 15" becomes 2 si + 3 cl < 300. */
    struct {
        const char *name;
        int match;
    } cls[] = {
        {"sand", 2 * si + 3 * cl < 300},
        {"loamy sand", 2 * si + 3 * cl >= 300 && si + 2 * cl < 300},
        {"sandy loam", (cl >= 70 && cl < 200 && sa > 520 && si + 2 * cl >= 300) ||
                           (cl < 70 && si < 500 && si + 2 * cl >= 300)},
        {"loam", cl >= 70 && cl < 270 && si >= 280 && si < 500 && sa <= 520},
        {"silt loam", (si >= 500 && cl >= 120 && cl < 270) || (si >= 500 && si < 800 && cl < 120)},
        {"silt", si >= 800 && cl < 120},
        {"sandy clay loam", cl >= 200 && cl < 350 && si < 280 && sa > 450},
        {"clay loam", cl >= 270 && cl < 400 && sa > 200 && sa <= 450},
        {"silty clay loam", cl >= 270 && cl < 400 && sa <= 200},
        {"sandy clay", cl >= 350 && sa > 450},
        {"silty clay", cl >= 400 && si >= 400},
        {"clay", cl >= 400 && sa <= 450 && si < 400},
    };
    /* The classes partition the triangle (METHODS.md 8.4, grid-verified);
     * anything but exactly one match would be a defect, reported as NULL. */
    const char *found = NULL;
    int matches = 0;
    for (size_t i = 0; i < sizeof cls / sizeof cls[0]; i++)
        if (cls[i].match) {
            found = cls[i].name;
            matches++;
        }
    return matches == 1 ? found : NULL;
}

/* ---- grading terms ----------------------------------------------------- */

bool sg_classify_uscs_well_graded(bool is_gravel, double cu, double cc)
{
    if (!isfinite(cu) || !isfinite(cc))
        return false;
    const double cu_min = is_gravel ? USCS_GW_CU_MIN : USCS_SW_CU_MIN;
    return cu >= cu_min && cc >= USCS_CC_MIN && cc <= USCS_CC_MAX;
}

const char *sg_classify_iso_grading(double cu, double cc)
{
    if (!isfinite(cu) || !isfinite(cc) || cu < 1.0)
        return NULL;
    if (cc < ISO_GAP_CC_MAX)
        return "gap-graded";
    if (cu > ISO_MULTI_CU_MIN)
        return cc > ISO_MULTI_CC_MIN && cc < ISO_MULTI_CC_MAX ? "multi-graded" : NULL;
    if (cu >= ISO_EVEN_CU_MAX)
        return "medium-graded";
    return "even-graded";
}

/* ---- summary ----------------------------------------------------------- */

struct ctx {
    const struct sg_curve *curve;
    struct sg_result *res;
    struct sg_error *err;
    const char *interp_word; /* "log-linear" or "monotone (Steffen)" */
};

/* A value read off the curve: determined, or the reason why not. */
struct reading {
    bool ok;
    double value;
    char why[sizeof ((struct sg_error *)0)->msg];
};

static enum sg_status nomem(struct ctx *x)
{
    return sg_error_set(x->err, SG_ENOMEM, 0, 0, "out of memory adding summary quantities");
}

static enum sg_status add_value(struct ctx *x, const char *name, const char *unit, double v, const char *note)
{
    return sg_result_add_value(x->res, name, unit, v, note) == SG_OK ? SG_OK : nomem(x);
}

static enum sg_status add_undet(struct ctx *x, const char *name, const char *unit, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 4, 5)))
#endif
    ;

static enum sg_status add_undet(struct ctx *x, const char *name, const char *unit, const char *fmt, ...)
{
    char note[SG_QNOTE_MAX];
    va_list ap;
    va_start(ap, fmt);
    (void)vsnprintf(note, sizeof note, fmt, ap);
    va_end(ap);
    return sg_result_add_undetermined(x->res, name, unit, note) == SG_OK ? SG_OK : nomem(x);
}

static enum sg_status add_text(struct ctx *x, const char *name, const char *text, const char *note)
{
    return sg_result_add_text(x->res, name, text, note) == SG_OK ? SG_OK : nomem(x);
}

/* P(d). ENOMEM is the only status passed on; anything else becomes a reason. */
static enum sg_status percent_at(struct ctx *x, double d_mm, struct reading *r)
{
    struct sg_error e;
    sg_error_clear(&e);
    r->value = NAN;
    r->why[0] = '\0';
    enum sg_status st = sg_curve_percent_at(x->curve, d_mm, &r->value, &e);
    r->ok = st == SG_OK;
    if (st == SG_ENOMEM)
        return sg_error_set(x->err, SG_ENOMEM, 0, 0, "%s", e.msg);
    if (!r->ok)
        fmt_into(r->why, sizeof r->why, "%s", e.msg);
    return SG_OK;
}

static enum sg_status diameter_at(struct ctx *x, double p, struct reading *r)
{
    struct sg_error e;
    sg_error_clear(&e);
    r->value = NAN;
    r->why[0] = '\0';
    enum sg_status st = sg_curve_diameter_at(x->curve, p, &r->value, &e);
    r->ok = st == SG_OK;
    if (st == SG_ENOMEM)
        return sg_error_set(x->err, SG_ENOMEM, 0, 0, "%s", e.msg);
    if (!r->ok)
        fmt_into(r->why, sizeof r->why, "%s", e.msg);
    return SG_OK;
}

/* The percentage x written for a quantity name: 2.5 -> "2_5", 10 -> "10". */
static void dx_label(double p, char *buf, size_t n)
{
    fmt_into(buf, n, "%.6f", p);
    char *dot = strchr(buf, '.');
    if (dot != NULL) {
        char *end = buf + strlen(buf);
        while (end > dot + 1 && end[-1] == '0')
            *--end = '\0';
        if (end == dot + 1)
            *dot = '\0';
        else
            *dot = '_';
    }
}

/* Adds d<x>_mm; stores the reading in *out when out is not NULL. */
static enum sg_status add_dx(struct ctx *x, double p, struct reading *out)
{
    char label[24], name[SG_QNAME_MAX];
    dx_label(p, label, sizeof label);
    fmt_into(name, sizeof name, "d%s_mm", label);
    struct reading r;
    enum sg_status st = diameter_at(x, p, &r);
    if (st != SG_OK)
        return st;
    if (out != NULL)
        *out = r;
    if (!r.ok)
        return add_undet(x, name, "mm", "D%g not determined: %s", p, r.why);
    char note[SG_QNOTE_MAX];
    fmt_into(note, sizeof note, "size at which %g %% is finer (%s interpolation on log10 D)", p,
                   x->interp_word);
    return add_value(x, name, "mm", r.value, note);
}

/* Percent finer at the lower and upper sizes of a fraction; lower_mm 0
 * means "finer than upper_mm". The reason for a failure lands in why. */
static enum sg_status fraction(struct ctx *x, double lower_mm, double upper_mm, struct reading *r)
{
    struct reading hi, lo;
    enum sg_status st = percent_at(x, upper_mm, &hi);
    if (st != SG_OK)
        return st;
    if (lower_mm > 0.0) {
        if ((st = percent_at(x, lower_mm, &lo)) != SG_OK)
            return st;
    } else {
        lo = (struct reading){.ok = true, .value = 0.0};
    }
    r->ok = hi.ok && lo.ok;
    r->value = r->ok ? hi.value - lo.value : (double)NAN;
    r->why[0] = '\0';
    if (!hi.ok)
        fmt_into(r->why, sizeof r->why, "%s", hi.why);
    else if (!lo.ok)
        fmt_into(r->why, sizeof r->why, "%s", lo.why);
    return SG_OK;
}

/* Adds a fraction of the whole sample (or, with basis > 0, of the part
 * whose percent of the sample is basis). what describes it for the note. */
static enum sg_status add_fraction_on(struct ctx *x, const char *name, double lower_mm, double upper_mm,
                                      const struct reading *basis, const char *what)
{
    struct reading r;
    enum sg_status st = fraction(x, lower_mm, upper_mm, &r);
    if (st != SG_OK)
        return st;
    if (!r.ok)
        return add_undet(x, name, "%", "not determined: %s", r.why);
    char note[SG_QNOTE_MAX];
    double v = r.value;
    if (basis != NULL) {
        if (!basis->ok)
            return add_undet(x, name, "%", "not determined: the basis (percent finer than 2 mm) is not: %s",
                             basis->why);
        if (!(basis->value > 0.0))
            return add_undet(x, name, "%", "not determined: no material finer than 2 mm (%g %%)",
                             basis->value);
        v = 100.0 * r.value / basis->value;
    }
    if (v < NEGATIVE_FRACTION_PCT)
        fmt_into(note, sizeof note,
                       "%s; negative: the curve rises with falling size in this range (see the QC flags)", what);
    else
        fmt_into(note, sizeof note, "%s", what);
    return add_value(x, name, "%", v, note);
}

static enum sg_status add_fraction(struct ctx *x, const char *name, double lower_mm, double upper_mm,
                                   const char *what)
{
    return add_fraction_on(x, name, lower_mm, upper_mm, NULL, what);
}

/* Cu and Cc from D10, D30, D60. */
static enum sg_status add_cu_cc(struct ctx *x, const struct reading *d10, const struct reading *d30,
                                const struct reading *d60, double *cu, double *cc)
{
    *cu = *cc = NAN;
    char missing[64] = "";
    const struct reading *d[3] = {d10, d30, d60};
    const char *label[3] = {"D10", "D30", "D60"};
    for (int i = 0; i < 3; i++)
        if (!d[i]->ok) {
            size_t len = strlen(missing);
            fmt_into(missing + len, sizeof missing - len, "%s%s", len ? ", " : "", label[i]);
        }
    enum sg_status st;
    if (!d10->ok || !d60->ok)
        st = add_undet(x, "cu", "", "not determined: %s not determined (Cu = D60 / D10)", missing);
    else {
        *cu = d60->value / d10->value;
        st = add_value(x, "cu", "", *cu, "coefficient of uniformity D60 / D10");
    }
    if (st != SG_OK)
        return st;
    if (missing[0] != '\0')
        return add_undet(x, "cc", "", "not determined: %s not determined (Cc = D30^2 / (D10 D60))", missing);
    *cc = d30->value * d30->value / (d10->value * d60->value);
    return add_value(x, "cc", "", *cc, "coefficient of curvature D30^2 / (D10 D60)");
}

static enum sg_status add_usda(struct ctx *x, struct reading *p2)
{
    struct reading p005, p0002;
    enum sg_status st;
    if ((st = percent_at(x, USDA_FINE_EARTH_MM, p2)) != SG_OK ||
        (st = percent_at(x, USDA_SILT_SAND_MM, &p005)) != SG_OK ||
        (st = percent_at(x, USDA_CLAY_SILT_MM, &p0002)) != SG_OK)
        return st;
    const char *names[3] = {"usda_sand_pct", "usda_silt_pct", "usda_clay_pct"};
    const char *what[3] = {"USDA sand 0.05-2 mm, % of the fraction finer than 2 mm",
                           "USDA silt 0.002-0.05 mm, % of the fraction finer than 2 mm",
                           "USDA clay < 0.002 mm, % of the fraction finer than 2 mm"};
    const struct reading *upper[3] = {p2, &p005, &p0002};
    const struct reading *lower[3] = {&p005, &p0002, NULL};
    double v[3] = {NAN, NAN, NAN};
    bool all = true;
    char why[SG_QNOTE_MAX] = "";
    for (int i = 0; i < 3; i++) {
        const struct reading *bad = !p2->ok ? p2 : !upper[i]->ok ? upper[i] : (lower[i] && !lower[i]->ok) ? lower[i] : NULL;
        if (bad != NULL) {
            all = false;
            fmt_into(why, sizeof why, "%s", bad->why);
            if ((st = add_undet(x, names[i], "%", "not determined: %s", bad->why)) != SG_OK)
                return st;
            continue;
        }
        if (!(p2->value > 0.0)) {
            all = false;
            fmt_into(why, sizeof why, "no material finer than 2 mm (%g %%)", p2->value);
            if ((st = add_undet(x, names[i], "%", "not determined: %s", why)) != SG_OK)
                return st;
            continue;
        }
        v[i] = 100.0 * (upper[i]->value - (lower[i] ? lower[i]->value : 0.0)) / p2->value;
        if ((st = add_value(x, names[i], "%", v[i], what[i])) != SG_OK)
            return st;
    }
    if (!all)
        return add_undet(x, "usda_texture", "", "not determined: %s", why);
    const char *cls = sg_classify_usda_texture(v[0], v[1], v[2]);
    if (cls == NULL)
        return add_undet(x, "usda_texture", "",
                         "not determined: a separate is negative (sand %.1f, silt %.1f, clay %.1f %%; the curve "
                         "rises with falling size, see the QC flags)",
                         v[0], v[1], v[2]);
    char note[SG_QNOTE_MAX];
    if (p2->value < 100.0 - SG_CURVE_END_TOL_PCT)
        fmt_into(note, sizeof note,
                       "USDA texture triangle on the fraction finer than 2 mm; rock fragments > 2 mm (%.1f %% of "
                       "the sample by mass) are excluded and no modifier (gravelly ...) is assigned",
                       100.0 - p2->value);
    else
        fmt_into(note, sizeof note, "USDA texture triangle on the fraction finer than 2 mm");
    return add_text(x, "usda_texture", cls, note);
}

static enum sg_status add_extra_dx(struct ctx *x, const struct sg_reduce_options *opt)
{
    if (opt == NULL || opt->extra_dx == NULL)
        return SG_OK;
    for (size_t i = 0; i < opt->n_extra_dx; i++) {
        const double p = opt->extra_dx[i];
        if (!isfinite(p))
            continue;
        char label[24], name[SG_QNAME_MAX];
        dx_label(p, label, sizeof label);
        fmt_into(name, sizeof name, "d%s_mm", label);
        if (sg_result_quantity(x->res, name) != NULL)
            continue;
        enum sg_status st;
        if (p <= 0.0 || p > 100.0)
            st = add_undet(x, name, "mm", "not determined: %g %% is not a percentage in (0, 100]", p);
        else
            st = add_dx(x, p, NULL);
        if (st != SG_OK)
            return st;
    }
    return SG_OK;
}

/* ASTM D2487 grading word and group symbol (coarse-grained soils). */
static enum sg_status add_uscs(struct ctx *x, double cu, double cc)
{
    struct reading p75, p475, p0075;
    enum sg_status st;
    if ((st = percent_at(x, USCS_GRAVEL_COBBLE_MM, &p75)) != SG_OK ||
        (st = percent_at(x, USCS_SAND_GRAVEL_MM, &p475)) != SG_OK ||
        (st = percent_at(x, USCS_FINES_MM, &p0075)) != SG_OK)
        return st;
    const struct reading *bad = !p75.ok ? &p75 : !p475.ok ? &p475 : !p0075.ok ? &p0075 : NULL;
    if (bad != NULL) {
        if ((st = add_undet(x, "uscs_grading", "", "not determined (needs P at 75, 4.75, 0.075 mm): %s",
                            bad->why)) != SG_OK)
            return st;
        return add_undet(x, "uscs_group", "", "not determined (needs P at 75, 4.75, 0.075 mm): %s", bad->why);
    }
    if (!(p75.value > 0.0)) {
        if ((st = add_undet(x, "uscs_grading", "", "not determined: no material finer than 75 mm")) != SG_OK)
            return st;
        return add_undet(x, "uscs_group", "", "not determined: no material finer than 75 mm");
    }
    const double fines = 100.0 * p0075.value / p75.value;
    const double gravel = 100.0 * (p75.value - p475.value) / p75.value;
    const double sand = 100.0 * (p475.value - p0075.value) / p75.value;
    const bool is_gravel = gravel > sand;
    const char *kind = is_gravel ? "gravel" : "sand";
    char basis[120];
    fmt_into(basis, sizeof basis, "of the fraction finer than 75 mm: gravel %.1f %%, sand %.1f %%, fines %.1f %%",
                   gravel, sand, fines);
    char note[SG_QNOTE_MAX];

    if (fines >= USCS_FINE_GRAINED_MIN_PCT) {
        fmt_into(note, sizeof note,
                       "ASTM D2487 fine-grained soil (fines %.1f %% >= 50 %%): grading terms apply to "
                       "coarse-grained soils",
                       fines);
        if ((st = add_text(x, "uscs_grading", "not applicable, fine-grained", note)) != SG_OK)
            return st;
        return add_undet(x, "uscs_group", "",
                         "fine-grained soil (fines %.1f %% >= 50 %%): ML, CL, MH, CH, OL or OH needs the "
                         "Atterberg limits (and organic content)",
                         fines);
    }
    if (fines > USCS_DUAL_MAX_PCT) {
        fmt_into(note, sizeof note,
                       "ASTM D2487: with fines over 12 %% (%s) the soil is named by the plasticity of its "
                       "fines, not by its grading",
                       basis);
        if ((st = add_text(x, "uscs_grading", "not applicable, fines over 12 %", note)) != SG_OK)
            return st;
        return add_undet(x, "uscs_group", "", "%s with fines over 12 %% (%s): %s needs the Atterberg limits",
                         kind, basis, is_gravel ? "GM, GC or GC-GM" : "SM, SC or SC-SM");
    }
    if (!isfinite(cu) || !isfinite(cc)) {
        if ((st = add_undet(x, "uscs_grading", "",
                            "not determined: Cu and Cc are needed (D10, D30 and D60; %s)", basis)) != SG_OK)
            return st;
        return add_undet(x, "uscs_group", "", "not determined: Cu and Cc are needed (%s)", basis);
    }
    const bool well = sg_classify_uscs_well_graded(is_gravel, cu, cc);
    fmt_into(note, sizeof note, "ASTM D2487 %s (%s): %s needs Cu >= %g and 1 <= Cc <= 3; Cu %.2f, Cc %.2f",
                   kind, basis, is_gravel ? "GW" : "SW", is_gravel ? USCS_GW_CU_MIN : USCS_SW_CU_MIN, cu, cc);
    if ((st = add_text(x, "uscs_grading", well ? "well graded" : "poorly graded", note)) != SG_OK)
        return st;
    const char *sym = is_gravel ? (well ? "GW" : "GP") : (well ? "SW" : "SP");
    if (fines < USCS_CLEAN_MAX_PCT) {
        fmt_into(note, sizeof note, "ASTM D2487 coarse-grained, fines %.1f %% < 5 %% (%s)", fines, basis);
        return add_text(x, "uscs_group", sym, note);
    }
    return add_undet(x, "uscs_group", "",
                     "dual symbol %s-%cM or %s-%cC (fines %.1f %%, 5-12 %%): the second part needs the "
                     "Atterberg limits of the fines",
                     sym, is_gravel ? 'G' : 'S', sym, is_gravel ? 'G' : 'S', fines);
}

static enum sg_status add_iso_grading(struct ctx *x, double cu, double cc)
{
    if (!isfinite(cu) || !isfinite(cc))
        return add_undet(x, "iso_grading", "", "not determined: Cu and Cc are needed (D10, D30 and D60)");
    const char *term = sg_classify_iso_grading(cu, cc);
    char note[SG_QNOTE_MAX];
    if (term == NULL)
        return add_undet(x, "iso_grading", "",
                         "no ISO 14688-2 term fits Cu %.2f, Cc %.2f (multi-graded needs Cu > 15 and 1 < Cc < 3; "
                         "gap-graded Cc < 0.5)",
                         cu, cc);
    fmt_into(note, sizeof note,
                   "ISO 14688-2 from Cu %.2f and Cc %.2f (limits from memory: multi Cu > 15 and 1 < Cc < 3, "
                   "medium 6-15, even < 6, gap Cc < 0.5)",
                   cu, cc);
    return add_text(x, "iso_grading", term, note);
}

/* ---- junction gap ------------------------------------------------------ */

struct sed_point {
    double d_mm;
    double percent;
    unsigned line;
};

static int sed_by_size(const void *a, const void *b)
{
    const struct sed_point *x = a, *y = b;
    if (x->d_mm != y->d_mm)
        return (x->d_mm > y->d_mm) - (x->d_mm < y->d_mm);
    return (x->line > y->line) - (x->line < y->line);
}

static bool usable(const struct sg_point *p)
{
    return isfinite(p->diameter_mm) && p->diameter_mm > 0.0 && isfinite(p->percent_finer);
}

static double loglinear(double d, double d0, double p0, double d1, double p1)
{
    return p0 + (p1 - p0) * (log10(d) - log10(d0)) / (log10(d1) - log10(d0));
}

static enum sg_status add_junction_gap(struct ctx *x)
{
    const struct sg_result *res = x->res;
    const char *name = "junction_gap_pct";
    double a_mm = INFINITY, p_sieve = NAN;
    bool a_from_sieve = false;
    size_t n_sed = 0;
    for (size_t i = 0; i < res->n_points; i++) {
        const struct sg_point *p = &res->points[i];
        if (!usable(p))
            continue;
        if (p->source == SG_SOURCE_HYDROMETER || p->source == SG_SOURCE_PIPETTE) {
            n_sed++;
            continue;
        }
        const bool is_sieve = p->source == SG_SOURCE_SIEVE;
        /* the finest aperture; at equal apertures the sieve set's value (D6913) */
        if (p->diameter_mm < a_mm || (p->diameter_mm == a_mm && is_sieve && !a_from_sieve)) {
            a_mm = p->diameter_mm;
            p_sieve = p->percent_finer;
            a_from_sieve = is_sieve;
        }
    }
    if (!isfinite(a_mm))
        return add_undet(x, name, "%", "not determined: no sieve points");
    if (n_sed == 0)
        return add_undet(x, name, "%", "not determined: no sedimentation points");

    struct sed_point *s = malloc(n_sed * sizeof *s);
    if (s == NULL)
        return nomem(x);
    size_t m = 0;
    for (size_t i = 0; i < res->n_points; i++) {
        const struct sg_point *p = &res->points[i];
        if (usable(p) && (p->source == SG_SOURCE_HYDROMETER || p->source == SG_SOURCE_PIPETTE))
            s[m++] = (struct sed_point){p->diameter_mm, p->percent_finer, p->line};
    }
    qsort(s, m, sizeof *s, sed_by_size);

    size_t k = 0; /* first sedimentation point not finer than the aperture */
    while (k < m && s[k].d_mm < a_mm)
        k++;
    double p_sed = NAN;
    char how[160];
    if (k < m && s[k].d_mm == a_mm) {
        p_sed = s[k].percent;
        fmt_into(how, sizeof how, "sedimentation point at that size");
    } else if (k > 0 && k < m) {
        p_sed = loglinear(a_mm, s[k - 1].d_mm, s[k - 1].percent, s[k].d_mm, s[k].percent);
        fmt_into(how, sizeof how, "interpolated log-linearly between sedimentation points at %g and %g mm",
                       s[k - 1].d_mm, s[k].d_mm);
    } else {
        /* all on one side: the nearest point and the next distinct size beyond it */
        size_t i0, i1;
        bool found = false;
        if (k == m) { /* all finer: the two coarsest */
            i0 = m - 1;
            for (i1 = i0; i1-- > 0;)
                if (s[i1].d_mm < s[i0].d_mm) {
                    found = true;
                    break;
                }
        } else { /* all coarser: the two finest */
            i0 = 0;
            for (i1 = 1; i1 < m; i1++)
                if (s[i1].d_mm > s[i0].d_mm) {
                    found = true;
                    break;
                }
        }
        if (!found) {
            const double d_only = s[0].d_mm;
            free(s);
            return add_undet(x, name, "%",
                             "not determined: sedimentation points at one size only (%g mm), none at the finest "
                             "sieve %g mm",
                             d_only, a_mm);
        }
        p_sed = loglinear(a_mm, s[i0].d_mm, s[i0].percent, s[i1].d_mm, s[i1].percent);
        fmt_into(how, sizeof how,
                       "extrapolated log-linearly from the sedimentation points at %g and %g mm (QC indicator "
                       "only, not a point of the curve)",
                       s[i1].d_mm, s[i0].d_mm);
    }
    free(s);
    char note[SG_QNOTE_MAX];
    fmt_into(note, sizeof note, "%s %g mm passing %.2f %% minus sedimentation %.2f %% at that size, %s",
                   a_from_sieve ? "sieve" : "fine sieve", a_mm, p_sieve, p_sed, how);
    return add_value(x, name, "%", p_sieve - p_sed, note);
}

/* ---- entry point ------------------------------------------------------- */

enum sg_status sg_classify_summarise(const struct sg_curve *curve, const struct sg_record *rec,
                                     const struct sg_reduce_options *opt, struct sg_result *res,
                                     struct sg_error *err)
{
    (void)rec;
    if (curve == NULL || res == NULL)
        return sg_error_set(err, SG_EINVAL, 0, 0, "no curve or no result to summarise");
    struct ctx x = {curve, res, err,
                    curve->impl != NULL ? "monotone (Steffen)" : "log-linear"};
    enum sg_status st;

    static const double dp[] = {10.0, 15.0, 30.0, 50.0, 60.0, 85.0};
    struct reading d[6];
    for (size_t i = 0; i < sizeof dp / sizeof dp[0]; i++)
        if ((st = add_dx(&x, dp[i], &d[i])) != SG_OK)
            return st;
    double cu, cc;
    if ((st = add_cu_cc(&x, &d[0], &d[2], &d[4], &cu, &cc)) != SG_OK)
        return st;

    struct reading p2;
    if ((st = add_fraction(&x, "clay_pct", 0.0, ISO_CLAY_SILT_MM, "ISO 14688-1 clay, finer than 0.002 mm")) ||
        (st = add_fraction(&x, "silt_pct", ISO_CLAY_SILT_MM, ISO_SILT_SAND_MM, "ISO 14688-1 silt, 0.002-0.063 mm")) ||
        (st = add_fraction(&x, "sand_pct", ISO_SILT_SAND_MM, ISO_SAND_GRAVEL_MM, "ISO 14688-1 sand, 0.063-2 mm")) ||
        (st = add_fraction(&x, "gravel_pct", ISO_SAND_GRAVEL_MM, ISO_GRAVEL_COBBLE_MM,
                           "ISO 14688-1 gravel, 2-63 mm")) ||
        (st = add_fraction(&x, "fines_pct", 0.0, USCS_FINES_MM, "percent finer than 0.075 mm (No. 200)")) ||
        (st = add_usda(&x, &p2)))
        return st;

    if ((st = add_extra_dx(&x, opt)) != SG_OK)
        return st;

    static const struct {
        const char *name;
        double lower_mm, upper_mm;
        bool of_fine_earth; /* USDA separates: % of the fraction finer than 2 mm */
        const char *what;
    } fr[] = {
        {"cobbles_pct", ISO_GRAVEL_COBBLE_MM, ISO_COBBLE_BOULDER_MM, false, "ISO 14688-1 cobbles, 63-200 mm"},
        {"iso_fine_silt_pct", ISO_CLAY_SILT_MM, ISO_FSI_MSI_MM, false, "ISO 14688-1 fine silt, 0.002-0.0063 mm"},
        {"iso_medium_silt_pct", ISO_FSI_MSI_MM, ISO_MSI_CSI_MM, false, "ISO 14688-1 medium silt, 0.0063-0.02 mm"},
        {"iso_coarse_silt_pct", ISO_MSI_CSI_MM, ISO_SILT_SAND_MM, false, "ISO 14688-1 coarse silt, 0.02-0.063 mm"},
        {"iso_fine_sand_pct", ISO_SILT_SAND_MM, ISO_FSA_MSA_MM, false, "ISO 14688-1 fine sand, 0.063-0.2 mm"},
        {"iso_medium_sand_pct", ISO_FSA_MSA_MM, ISO_MSA_CSA_MM, false, "ISO 14688-1 medium sand, 0.2-0.63 mm"},
        {"iso_coarse_sand_pct", ISO_MSA_CSA_MM, ISO_SAND_GRAVEL_MM, false, "ISO 14688-1 coarse sand, 0.63-2 mm"},
        {"iso_fine_gravel_pct", ISO_SAND_GRAVEL_MM, ISO_FGR_MGR_MM, false, "ISO 14688-1 fine gravel, 2-6.3 mm"},
        {"iso_medium_gravel_pct", ISO_FGR_MGR_MM, ISO_MGR_CGR_MM, false, "ISO 14688-1 medium gravel, 6.3-20 mm"},
        {"iso_coarse_gravel_pct", ISO_MGR_CGR_MM, ISO_GRAVEL_COBBLE_MM, false, "ISO 14688-1 coarse gravel, 20-63 mm"},
        {"uscs_cobbles_pct", USCS_GRAVEL_COBBLE_MM, USCS_COBBLE_BOULDER_MM, false, "ASTM D2487 cobbles, 75-300 mm"},
        {"uscs_gravel_pct", USCS_SAND_GRAVEL_MM, USCS_GRAVEL_COBBLE_MM, false, "ASTM D2487 gravel, 4.75-75 mm"},
        {"uscs_coarse_gravel_pct", USCS_FGR_CGR_MM, USCS_GRAVEL_COBBLE_MM, false, "ASTM D2487 coarse gravel, 19-75 mm"},
        {"uscs_fine_gravel_pct", USCS_SAND_GRAVEL_MM, USCS_FGR_CGR_MM, false, "ASTM D2487 fine gravel, 4.75-19 mm"},
        {"uscs_sand_pct", USCS_FINES_MM, USCS_SAND_GRAVEL_MM, false, "ASTM D2487 sand, 0.075-4.75 mm"},
        {"uscs_coarse_sand_pct", USCS_MSA_CSA_MM, USCS_SAND_GRAVEL_MM, false, "ASTM D2487 coarse sand, 2.00-4.75 mm"},
        {"uscs_medium_sand_pct", USCS_FSA_MSA_MM, USCS_MSA_CSA_MM, false, "ASTM D2487 medium sand, 0.425-2.00 mm"},
        {"uscs_fine_sand_pct", USCS_FINES_MM, USCS_FSA_MSA_MM, false, "ASTM D2487 fine sand, 0.075-0.425 mm"},
        {"uscs_fines_pct", 0.0, USCS_FINES_MM, false, "ASTM D2487 fines (silt and clay), finer than 0.075 mm"},
        {"aashto_gravel_pct", AASHTO_SAND_GRAVEL_MM, AASHTO_GRAVEL_BOULDER_MM, false, "AASHTO M 145 gravel, 2.00-75 mm"},
        {"aashto_coarse_sand_pct", AASHTO_FSA_CSA_MM, AASHTO_SAND_GRAVEL_MM, false,
         "AASHTO M 145 coarse sand, 0.425-2.00 mm"},
        {"aashto_fine_sand_pct", AASHTO_SILT_SAND_MM, AASHTO_FSA_CSA_MM, false,
         "AASHTO M 145 fine sand, 0.075-0.425 mm"},
        {"aashto_silt_pct", AASHTO_CLAY_SILT_MM, AASHTO_SILT_SAND_MM, false, "AASHTO M 145 silt, 0.002-0.075 mm"},
        {"aashto_clay_pct", 0.0, AASHTO_CLAY_SILT_MM, false, "AASHTO M 145 clay, finer than 0.002 mm"},
        {"usda_very_coarse_sand_pct", USDA_CS_VCS_MM, USDA_FINE_EARTH_MM, true,
         "USDA very coarse sand 1-2 mm, % of the fraction finer than 2 mm"},
        {"usda_coarse_sand_pct", USDA_MS_CS_MM, USDA_CS_VCS_MM, true,
         "USDA coarse sand 0.5-1 mm, % of the fraction finer than 2 mm"},
        {"usda_medium_sand_pct", USDA_FS_MS_MM, USDA_MS_CS_MM, true,
         "USDA medium sand 0.25-0.5 mm, % of the fraction finer than 2 mm"},
        {"usda_fine_sand_pct", USDA_VFS_FS_MM, USDA_FS_MS_MM, true,
         "USDA fine sand 0.10-0.25 mm, % of the fraction finer than 2 mm"},
        {"usda_very_fine_sand_pct", USDA_SILT_SAND_MM, USDA_VFS_FS_MM, true,
         "USDA very fine sand 0.05-0.10 mm, % of the fraction finer than 2 mm"},
        {"finer_0_02_mm_pct", 0.0, FROST_SIZE_MM, false,
         "percent finer than 0.02 mm, input to frost-susceptibility screens (a screen, not a design value)"},
        {"passing_2_00_mm_pct", 0.0, AASHTO_SAND_GRAVEL_MM, false, "percent passing 2.00 mm (No. 10)"},
        {"passing_0_425_mm_pct", 0.0, AASHTO_FSA_CSA_MM, false, "percent passing 0.425 mm (No. 40)"},
        {"passing_0_075_mm_pct", 0.0, AASHTO_SILT_SAND_MM, false, "percent passing 0.075 mm (No. 200)"},
    };
    for (size_t i = 0; i < sizeof fr / sizeof fr[0]; i++)
        if ((st = add_fraction_on(&x, fr[i].name, fr[i].lower_mm, fr[i].upper_mm, fr[i].of_fine_earth ? &p2 : NULL,
                                  fr[i].what)) != SG_OK)
            return st;

    if ((st = add_uscs(&x, cu, cc)) != SG_OK || (st = add_iso_grading(&x, cu, cc)) != SG_OK ||
        (st = add_junction_gap(&x)) != SG_OK)
        return st;
    return SG_OK;
}
