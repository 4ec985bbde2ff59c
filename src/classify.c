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

static double limit_tol(double limit)
{
    return SG_CLASSIFY_LIMIT_TOL * fmax(fabs(limit), 1.0);
}

bool sg_classify_at_least(double x, double limit)
{
    return isfinite(x) && x >= limit - limit_tol(limit);
}

bool sg_classify_at_most(double x, double limit)
{
    return isfinite(x) && x <= limit + limit_tol(limit);
}

bool sg_classify_uscs_well_graded(bool is_gravel, double cu, double cc)
{
    if (!isfinite(cu) || !isfinite(cc))
        return false;
    const double cu_min = is_gravel ? USCS_GW_CU_MIN : USCS_SW_CU_MIN;
    return sg_classify_at_least(cu, cu_min) && sg_classify_at_least(cc, USCS_CC_MIN) &&
           sg_classify_at_most(cc, USCS_CC_MAX);
}

const char *sg_classify_iso_grading(double cu, double cc)
{
    if (!isfinite(cu) || !isfinite(cc) || !sg_classify_at_least(cu, 1.0))
        return NULL;
    if (!sg_classify_at_least(cc, ISO_GAP_CC_MAX))
        return "gap-graded";
    if (!sg_classify_at_most(cu, ISO_MULTI_CU_MIN))
        return !sg_classify_at_most(cc, ISO_MULTI_CC_MIN) && !sg_classify_at_least(cc, ISO_MULTI_CC_MAX)
                   ? "multi-graded"
                   : NULL;
    if (sg_classify_at_least(cu, ISO_EVEN_CU_MAX))
        return "medium-graded";
    return "even-graded";
}

/* ---- summary ----------------------------------------------------------- */

/* The sizes at which the summary reads the curve, each read once per
 * summary (many fractions share a boundary), in increasing order. log10 of
 * each is written out
 * so that no logarithm is taken per reading: the correctly rounded values
 * (checked against 60-digit decimal arithmetic), which are also what the C
 * library's log10() returns for these sizes. */
enum bound {
    B_0_002, B_0_0063, B_0_02, B_0_05, B_0_063, B_0_075, B_0_1, B_0_2, B_0_25, B_0_425, B_0_5,
    B_0_63, B_1, B_2, B_4_75, B_6_3, B_19, B_20, B_63, B_75, B_200, B_300,
    N_BOUNDS,
    B_ZERO = N_BOUNDS /* lower size 0: "finer than" the upper size */
};

static const double bound_mm[N_BOUNDS] = {
    [B_0_002] = ISO_CLAY_SILT_MM, /* = AASHTO, USDA clay/silt */
    [B_0_0063] = ISO_FSI_MSI_MM,
    [B_0_02] = ISO_MSI_CSI_MM, /* = FROST_SIZE_MM */
    [B_0_05] = USDA_SILT_SAND_MM,
    [B_0_063] = ISO_SILT_SAND_MM,
    [B_0_075] = USCS_FINES_MM, /* = AASHTO_SILT_SAND_MM */
    [B_0_1] = USDA_VFS_FS_MM,
    [B_0_2] = ISO_FSA_MSA_MM,
    [B_0_25] = USDA_FS_MS_MM,
    [B_0_425] = USCS_FSA_MSA_MM, /* = AASHTO_FSA_CSA_MM */
    [B_0_5] = USDA_MS_CS_MM,
    [B_0_63] = ISO_MSA_CSA_MM,
    [B_1] = USDA_CS_VCS_MM,
    [B_2] = ISO_SAND_GRAVEL_MM, /* = USCS, AASHTO, USDA 2 mm */
    [B_4_75] = USCS_SAND_GRAVEL_MM,
    [B_6_3] = ISO_FGR_MGR_MM,
    [B_19] = USCS_FGR_CGR_MM,
    [B_20] = ISO_MGR_CGR_MM,
    [B_63] = ISO_GRAVEL_COBBLE_MM,
    [B_75] = USCS_GRAVEL_COBBLE_MM, /* = AASHTO_GRAVEL_BOULDER_MM */
    [B_200] = ISO_COBBLE_BOULDER_MM,
    [B_300] = USCS_COBBLE_BOULDER_MM,
};
static const double bound_log10[N_BOUNDS] = {
    [B_0_002] = -2.6989700043360187,
    [B_0_0063] = -2.2006594505464183,
    [B_0_02] = -1.6989700043360187,
    [B_0_05] = -1.3010299956639813,
    [B_0_063] = -1.2006594505464183,
    [B_0_075] = -1.1249387366083,
    [B_0_1] = -1.0,
    [B_0_2] = -0.6989700043360187,
    [B_0_25] = -0.6020599913279624,
    [B_0_425] = -0.37161106994968846,
    [B_0_5] = -0.3010299956639812,
    [B_0_63] = -0.2006594505464183,
    [B_1] = 0.0,
    [B_2] = 0.3010299956639812,
    [B_4_75] = 0.6766936096248666,
    [B_6_3] = 0.7993405494535817,
    [B_19] = 1.2787536009528289,
    [B_20] = 1.3010299956639813,
    [B_63] = 1.7993405494535817,
    [B_75] = 1.8750612633917,
    [B_200] = 2.3010299956639813,
    [B_300] = 2.4771212547196626,
};

#define MSG_MAX sizeof ((struct sg_error *)0)->msg

struct ctx {
    const struct sg_curve *curve;
    struct sg_result *res;
    struct sg_error *err;
    const char *interp_word; /* "log-linear" or "monotone (Steffen)" */
    bool quiet;              /* opt->values_only or skip_notes: empty notes, nothing formatted */
    const char *limits_given; /* "" or, when the record gives the Atterberg limits, where the group is */
    /* the curve at each bound: percent finer, status, and (not quiet) why not */
    double p[N_BOUNDS];
    enum sg_status pst[N_BOUNDS];
    char why[N_BOUNDS][MSG_MAX];
    /* the percent finer where determined, else NaN; pv[B_ZERO] = 0 (a
     * fraction is then one subtraction, NaN when either bound is not) */
    double pv[N_BOUNDS + 1];
};

/* A value read off the curve: determined, or the reason why not (empty
 * when quiet). */
struct reading {
    bool ok;
    double value;
    const char *why;
};

/* Keeps key k of the result (result.h): the number of the row at index
 * row, as a lookup by its name would give it. */
static void keep(struct ctx *x, enum sg_key k, size_t row)
{
    x->res->keys[k] = sg_quantity_number(&x->res->quantities[row]);
}

/* Keeps key k: the curve's percent finer at bound b, NaN where it gives none. */
static void keep_reading(struct ctx *x, enum sg_key k, enum bound b)
{
    x->res->keys[k] = x->pv[b];
}

static enum sg_status nomem(struct ctx *x)
{
    return sg_error_set(x->err, SG_ENOMEM, 0, 0, "out of memory adding summary quantities");
}

/* Names and units are whole arrays, zero after the text (table entries,
 * static names or, for names built at run time, buffers),
 * copied by the result as one block. */
static const char UNIT_MM[SG_QUNIT_MAX] = "mm", UNIT_PCT[SG_QUNIT_MAX] = "%", UNIT_NONE[SG_QUNIT_MAX] = "";

static enum sg_status add_value(struct ctx *x, const char name[SG_QNAME_MAX], const char unit[SG_QUNIT_MAX], double v,
                                const char *note)
{
    struct sg_quantity *q = sg_result_new_quantity(x->res, name, unit, x->quiet ? "" : note);
    if (q == NULL)
        return nomem(x);
    sg_quantity_set_value(q, v);
    return SG_OK;
}

static enum sg_status add_undet(struct ctx *x, const char name[SG_QNAME_MAX], const char unit[SG_QUNIT_MAX], const char *fmt,
                                ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 4, 5)))
#endif
    ;

/* The note of an undetermined row: fmt formatted, or empty when quiet. */
static void undet_note(const struct ctx *x, char note[SG_QNOTE_MAX], const char *fmt, va_list ap)
{
    note[0] = '\0';
    if (!x->quiet)
        (void)vsnprintf(note, SG_QNOTE_MAX, fmt, ap);
}

static enum sg_status add_undet(struct ctx *x, const char name[SG_QNAME_MAX], const char unit[SG_QUNIT_MAX], const char *fmt,
                                ...)
{
    char note[SG_QNOTE_MAX];
    va_list ap;
    va_start(ap, fmt);
    undet_note(x, note, fmt, ap);
    va_end(ap);
    return sg_result_new_quantity(x->res, name, unit, note) != NULL ? SG_OK : nomem(x);
}

/* The same, and a text row, for rows named by static names (result.h: struct
 * sg_static_qname, whose address the row keeps). */
static enum sg_status add_value_s(struct ctx *x, const struct sg_static_qname *name, const char unit[SG_QUNIT_MAX],
                                  double v, const char *note)
{
    struct sg_quantity *q = sg_result_new_quantity_static(x->res, name, unit, x->quiet ? "" : note);
    if (q == NULL)
        return nomem(x);
    sg_quantity_set_value(q, v);
    return SG_OK;
}

static enum sg_status add_undet_s(struct ctx *x, const struct sg_static_qname *name, const char unit[SG_QUNIT_MAX],
                                  const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 4, 5)))
#endif
    ;

static enum sg_status add_undet_s(struct ctx *x, const struct sg_static_qname *name, const char unit[SG_QUNIT_MAX],
                                  const char *fmt, ...)
{
    char note[SG_QNOTE_MAX];
    va_list ap;
    va_start(ap, fmt);
    undet_note(x, note, fmt, ap);
    va_end(ap);
    return sg_result_new_quantity_static(x->res, name, unit, note) != NULL ? SG_OK : nomem(x);
}

static enum sg_status add_text_s(struct ctx *x, const struct sg_static_qname *name, const char *text,
                                 const char *note)
{
    struct sg_quantity *q = sg_result_new_quantity_static(x->res, name, UNIT_NONE, x->quiet ? "" : note);
    if (q == NULL)
        return nomem(x);
    sg_quantity_set_text(q, text);
    return SG_OK;
}

/* Static names of the rows below (result.h: SG_STATIC_QNAME). */
SG_STATIC_QNAME(N_CU, "cu");
SG_STATIC_QNAME(N_CC, "cc");
SG_STATIC_QNAME(N_USDA_TEXTURE, "usda_texture");
SG_STATIC_QNAME(N_USCS_GRADING, "uscs_grading");
SG_STATIC_QNAME(N_USCS_GROUP, "uscs_group");
SG_STATIC_QNAME(N_ISO_GRADING, "iso_grading");
SG_STATIC_QNAME(N_CLAY_PCT, "clay_pct");
SG_STATIC_QNAME(N_SILT_PCT, "silt_pct");
SG_STATIC_QNAME(N_SAND_PCT, "sand_pct");
SG_STATIC_QNAME(N_GRAVEL_PCT, "gravel_pct");
SG_STATIC_QNAME(N_FINES_PCT, "fines_pct");

/* Copies an error message (both buffers MSG_MAX bytes). */
static void copy_msg(char *dst, const char *src)
{
    memcpy(dst, src, strlen(src) + 1);
}

/* Reads the curve at every bound, in one walk (the bounds are in order).
 * ENOMEM is the only status passed on; anything else is kept as the reason
 * for that bound. */
static enum sg_status read_bounds(struct ctx *x)
{
    sg_curve_percent_at_sorted(x->curve, bound_mm, bound_log10, N_BOUNDS, x->p, x->pst);
    x->pv[B_ZERO] = 0.0;
    for (size_t b = 0; b < N_BOUNDS; b++) {
        x->pv[b] = x->pst[b] == SG_OK ? x->p[b] : (double)NAN;
        if (x->pst[b] == SG_OK)
            continue;
        if (x->pst[b] == SG_ENOMEM)
            return nomem(x);
        if (!x->quiet) { /* the message, from the single-size reading */
            struct sg_error e;
            double v = NAN;
            sg_error_clear(&e);
            (void)sg_curve_percent_at_log10(x->curve, bound_mm[b], bound_log10[b], &v, &e);
            copy_msg(x->why[b], e.msg);
        }
    }
    return SG_OK;
}

/* P(d) at a bound (B_ZERO: 0 %, determined). */
static struct reading at(const struct ctx *x, enum bound b)
{
    if (b == B_ZERO)
        return (struct reading){true, 0.0, ""};
    const bool ok = x->pst[b] == SG_OK;
    return (struct reading){ok, x->p[b], ok || x->quiet ? "" : x->why[b]};
}

/* The reading of D at percent p from the curve's answer (value, status
 * got); when it failed and the result is not quiet, the answer and its
 * reason come from asking again with a message, the reason landing in
 * why_buf (MSG_MAX bytes). ENOMEM is the only status passed on. */
static enum sg_status dx_reading(struct ctx *x, double p, double value, enum sg_status got, struct reading *r,
                                 char *why_buf)
{
    struct sg_error e;
    r->value = got == SG_OK ? value : (double)NAN;
    r->why = "";
    if (got != SG_OK && !x->quiet) {
        sg_error_clear(&e);
        r->value = NAN;
        got = sg_curve_diameter_at(x->curve, p, &r->value, &e);
    }
    r->ok = got == SG_OK;
    if (got == SG_ENOMEM) /* the monotone curve's root finder, the only allocation */
        return sg_error_set(x->err, SG_ENOMEM, 0, 0, "%s", x->quiet ? "out of memory for the root finder" : e.msg);
    if (!r->ok && !x->quiet) {
        copy_msg(why_buf, e.msg);
        r->why = why_buf;
    }
    return SG_OK;
}

/* D at percent p (one reading; the summary's six are read together). */
static enum sg_status diameter_at(struct ctx *x, double p, struct reading *r, char *why_buf)
{
    double v = NAN;
    const enum sg_status got = sg_curve_diameter_at(x->curve, p, &v, NULL);
    return dx_reading(x, p, v, got, r, why_buf);
}

/* The percentage x written for a quantity name: 2.5 -> "2_5", 10 -> "10"
 * (as "%.6f" with trailing zeros and a bare point dropped, '.' -> '_'). */
static void dx_label(double p, char *buf, size_t n)
{
    if (p >= 1.0 && p <= 100.0 && p == floor(p) && n >= 4) { /* whole percentages: no printf */
        unsigned v = (unsigned)p;
        char tmp[4];
        size_t k = 0;
        do {
            tmp[k++] = (char)('0' + v % 10u);
            v /= 10u;
        } while (v > 0u);
        for (size_t i = 0; i < k; i++)
            buf[i] = tmp[k - 1 - i];
        buf[k] = '\0';
        return;
    }
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

/* Appends the strings of a NULL-terminated list to buf (size n), cut like snprintf. */
static void join(char *buf, size_t n, const char *first, ...)
{
    size_t used = 0;
    va_list ap;
    va_start(ap, first);
    for (const char *s = first; s != NULL; s = va_arg(ap, const char *)) {
        size_t len = strlen(s);
        if (len > n - 1 - used)
            len = n - 1 - used;
        memcpy(buf + used, s, len);
        used += len;
    }
    va_end(ap);
    buf[used] = '\0';
}

/* Adds d<x>_mm for the reading r of D at percent p, named sname (a static
 * name: the row keeps its address) or else name (NULL: from p), with p
 * written as shown (p as "%g" would write it; NULL: formatted). */
static enum sg_status add_dx_row(struct ctx *x, double p, const struct sg_static_qname *sname,
                                 const char name[SG_QNAME_MAX], const char *shown, const struct reading *r)
{
    char label[24], name_buf[SG_QNAME_MAX];
    if (sname == NULL && name == NULL) {
        dx_label(p, label, sizeof label);
        memset(name_buf, 0, sizeof name_buf);
        join(name_buf, sizeof name_buf, "d", label, "_mm", (const char *)NULL);
        name = name_buf;
    }
    if (!r->ok)
        return sname != NULL ? add_undet_s(x, sname, UNIT_MM, "D%g not determined: %s", p, r->why)
                             : add_undet(x, name, UNIT_MM, "D%g not determined: %s", p, r->why);
    char note[SG_QNOTE_MAX];
    note[0] = '\0';
    if (!x->quiet) {
        if (shown != NULL)
            join(note, sizeof note, "size at which ", shown, " % is finer (", x->interp_word,
                 " interpolation on log10 D)", (const char *)NULL);
        else
            fmt_into(note, sizeof note, "size at which %g %% is finer (%s interpolation on log10 D)", p,
                     x->interp_word);
    }
    return sname != NULL ? add_value_s(x, sname, UNIT_MM, r->value, note) : add_value(x, name, UNIT_MM, r->value, note);
}

/* Adds d<x>_mm as add_dx_row, reading D at p from the curve. */
static enum sg_status add_dx(struct ctx *x, double p, const char name[SG_QNAME_MAX], const char *shown,
                             char *why_buf)
{
    struct reading r;
    enum sg_status st = diameter_at(x, p, &r, why_buf);
    if (st != SG_OK)
        return st;
    return add_dx_row(x, p, NULL, name, shown, &r);
}

/* Percent finer between two bounds (lower B_ZERO: finer than upper); the
 * reason for a failure is the upper bound's, else the lower's. */
static struct reading fraction(const struct ctx *x, enum bound lower, enum bound upper)
{
    const struct reading hi = at(x, upper), lo = at(x, lower);
    struct reading r;
    r.ok = hi.ok && lo.ok;
    r.value = r.ok ? hi.value - lo.value : (double)NAN;
    r.why = !hi.ok ? hi.why : !lo.ok ? lo.why : "";
    return r;
}

/* add_fraction_on with the note, and the reason when not determined. */
static enum sg_status add_fraction_noted(struct ctx *x, const struct sg_static_qname *name, enum bound lower,
                                         enum bound upper, const struct reading *basis, const char *what)
{
    const struct reading r = fraction(x, lower, upper);
    if (!r.ok)
        return add_undet_s(x, name, UNIT_PCT, "not determined: %s", r.why);
    double v = r.value;
    if (basis != NULL) {
        if (!basis->ok)
            return add_undet_s(x, name, UNIT_PCT, "not determined: the basis (percent finer than 2 mm) is not: %s",
                             basis->why);
        if (!(basis->value > 0.0))
            return add_undet_s(x, name, UNIT_PCT, "not determined: no material finer than 2 mm (%g %%)",
                             basis->value);
        v = 100.0 * r.value / basis->value;
    }
    /* the basis is named: a fraction of the whole sample, or (USDA) of the
     * fraction finer than 2 mm, which what names already */
    const char *whole = basis == NULL ? "; % of the whole sample" : "";
    char note[SG_QNOTE_MAX];
    if (v < NEGATIVE_FRACTION_PCT)
        join(note, sizeof note, what, whole,
             "; negative: the curve rises with falling size in this range (see the QC flags)", (const char *)NULL);
    else
        join(note, sizeof note, what, whole, (const char *)NULL);
    return add_value_s(x, name, UNIT_PCT, v, note);
}

/* Adds a fraction of the whole sample (or, with basis > 0, of the part
 * whose percent of the sample is basis). what describes it for the note.
 * Quiet: the same rows without the notes' reasons, the Monte Carlo draws'
 * path; inline, so that the 38 fraction rows a draw adds are written
 * within the loops over the tables, without a call each. */
static inline enum sg_status add_fraction_on(struct ctx *x, const struct sg_static_qname *name, enum bound lower,
                                             enum bound upper, const struct reading *basis, const char *what)
{
    if (!x->quiet)
        return add_fraction_noted(x, name, lower, upper, basis, what);
    double v = x->pv[upper] - x->pv[lower]; /* NaN unless both are determined */
    if (basis != NULL)
        v = basis->ok && basis->value > 0.0 ? 100.0 * v / basis->value : (double)NAN;
    struct sg_quantity *q = sg_result_new_quantity_static(x->res, name, UNIT_PCT, NULL);
    if (q == NULL)
        return nomem(x);
    sg_quantity_set_value(q, isfinite(v) ? v : (double)NAN);
    return SG_OK;
}

static enum sg_status add_fraction(struct ctx *x, const struct sg_static_qname *name, enum bound lower, enum bound upper,
                                   const char *what)
{
    return add_fraction_on(x, name, lower, upper, NULL, what);
}

/* Cu and Cc from D10, D30, D60. */
static enum sg_status add_cu_cc(struct ctx *x, const struct reading *d10, const struct reading *d30,
                                const struct reading *d60, double *cu, double *cc)
{
    *cu = *cc = NAN;
    char missing[64] = "";
    if (!x->quiet) {
        const struct reading *d[3] = {d10, d30, d60};
        const char *label[3] = {"D10", "D30", "D60"};
        for (int i = 0; i < 3; i++)
            if (!d[i]->ok) {
                size_t len = strlen(missing);
                join(missing + len, sizeof missing - len, len ? ", " : "", label[i], (const char *)NULL);
            }
    }
    enum sg_status st;
    if (!d10->ok || !d60->ok)
        st = add_undet_s(x, &N_CU, UNIT_NONE, "not determined: %s not determined (Cu = D60 / D10)", missing);
    else {
        *cu = d60->value / d10->value;
        st = add_value_s(x, &N_CU, UNIT_NONE, *cu, "coefficient of uniformity D60 / D10");
    }
    if (st != SG_OK)
        return st;
    if (!d10->ok || !d30->ok || !d60->ok)
        return add_undet_s(x, &N_CC, UNIT_NONE, "not determined: %s not determined (Cc = D30^2 / (D10 D60))", missing);
    *cc = d30->value * d30->value / (d10->value * d60->value);
    return add_value_s(x, &N_CC, UNIT_NONE, *cc, "coefficient of curvature D30^2 / (D10 D60)");
}

static enum sg_status add_usda(struct ctx *x, struct reading *p2)
{
    *p2 = at(x, B_2);
    const struct reading p005 = at(x, B_0_05), p0002 = at(x, B_0_002);
    enum sg_status st;
    static const struct sg_static_qname names[3] = {{"usda_sand_pct"}, {"usda_silt_pct"}, {"usda_clay_pct"}};
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
            if (!x->quiet)
                join(why, sizeof why, bad->why, (const char *)NULL);
            if ((st = add_undet_s(x, &names[i], UNIT_PCT, "not determined: %s", bad->why)) != SG_OK)
                return st;
            continue;
        }
        if (!(p2->value > 0.0)) {
            all = false;
            if (!x->quiet)
                fmt_into(why, sizeof why, "no material finer than 2 mm (%g %%)", p2->value);
            if ((st = add_undet_s(x, &names[i], UNIT_PCT, "not determined: %s", why)) != SG_OK)
                return st;
            continue;
        }
        v[i] = 100.0 * (upper[i]->value - (lower[i] ? lower[i]->value : 0.0)) / p2->value;
        if ((st = add_value_s(x, &names[i], UNIT_PCT, v[i], what[i])) != SG_OK)
            return st;
    }
    if (!all)
        return add_undet_s(x, &N_USDA_TEXTURE, UNIT_NONE, "not determined: %s", why);
    const char *cls = sg_classify_usda_texture(v[0], v[1], v[2]);
    if (cls == NULL)
        return add_undet_s(x, &N_USDA_TEXTURE, UNIT_NONE,
                         "not determined: a separate is negative (sand %.1f, silt %.1f, clay %.1f %%; the curve "
                         "rises with falling size, see the QC flags)",
                         v[0], v[1], v[2]);
    char note[SG_QNOTE_MAX];
    note[0] = '\0';
    if (!x->quiet && p2->value < 100.0 - SG_CURVE_END_TOL_PCT)
        fmt_into(note, sizeof note,
                 "USDA texture triangle on the fraction finer than 2 mm; rock fragments > 2 mm (%.1f %% of "
                 "the sample by mass) are excluded and no modifier (gravelly ...) is assigned",
                 100.0 - p2->value);
    else if (!x->quiet)
        join(note, sizeof note, "USDA texture triangle on the fraction finer than 2 mm", (const char *)NULL);
    return add_text_s(x, &N_USDA_TEXTURE, cls, note);
}

static enum sg_status add_extra_dx(struct ctx *x, const struct sg_reduce_options *opt)
{
    if (opt == NULL || opt->extra_dx == NULL)
        return SG_OK;
    char why[MSG_MAX];
    for (size_t i = 0; i < opt->n_extra_dx; i++) {
        const double p = opt->extra_dx[i];
        if (!isfinite(p))
            continue;
        char label[24], name[SG_QNAME_MAX];
        dx_label(p, label, sizeof label);
        memset(name, 0, sizeof name); /* zero after the text (add_value, add_undet) */
        join(name, sizeof name, "d", label, "_mm", (const char *)NULL);
        if (sg_result_quantity(x->res, name) != NULL)
            continue;
        enum sg_status st;
        if (p <= 0.0 || p > 100.0)
            st = add_undet(x, name, UNIT_MM, "not determined: %g %% is not a percentage in (0, 100]", p);
        else
            st = add_dx(x, p, name, NULL, why);
        if (st != SG_OK)
            return st;
    }
    return SG_OK;
}

/* ASTM D2487 grading word and group symbol (coarse-grained soils). */
static enum sg_status add_uscs(struct ctx *x, double cu, double cc)
{
    const struct reading p75 = at(x, B_75), p475 = at(x, B_4_75), p0075 = at(x, B_0_075);
    enum sg_status st;
    const struct reading *bad = !p75.ok ? &p75 : !p475.ok ? &p475 : !p0075.ok ? &p0075 : NULL;
    if (bad != NULL) {
        if ((st = add_undet_s(x, &N_USCS_GRADING, UNIT_NONE, "not determined (needs P at 75, 4.75, 0.075 mm): %s",
                            bad->why)) != SG_OK)
            return st;
        return add_undet_s(x, &N_USCS_GROUP, UNIT_NONE, "not determined (needs P at 75, 4.75, 0.075 mm): %s", bad->why);
    }
    if (!(p75.value > 0.0)) {
        if ((st = add_undet_s(x, &N_USCS_GRADING, UNIT_NONE, "not determined: no material finer than 75 mm")) != SG_OK)
            return st;
        return add_undet_s(x, &N_USCS_GROUP, UNIT_NONE, "not determined: no material finer than 75 mm");
    }
    const double fines = 100.0 * p0075.value / p75.value;
    const double gravel = 100.0 * (p75.value - p475.value) / p75.value;
    const double sand = 100.0 * (p475.value - p0075.value) / p75.value;
    const bool is_gravel = !sg_classify_at_most(gravel, sand); /* a tie is a sand */
    const char *kind = is_gravel ? "gravel" : "sand";
    char basis[120];
    basis[0] = '\0';
    if (!x->quiet)
        fmt_into(basis, sizeof basis, "of the fraction finer than 75 mm: gravel %.1f %%, sand %.1f %%, fines %.1f %%",
                 gravel, sand, fines);
    char note[SG_QNOTE_MAX];
    note[0] = '\0';

    if (sg_classify_at_least(fines, USCS_FINE_GRAINED_MIN_PCT)) {
        if (!x->quiet)
            fmt_into(note, sizeof note,
                     "ASTM D2487 fine-grained soil (fines %.1f %% >= 50 %%): grading terms apply to "
                     "coarse-grained soils",
                     fines);
        if ((st = add_text_s(x, &N_USCS_GRADING, "not applicable, fine-grained", note)) != SG_OK)
            return st;
        return add_undet_s(x, &N_USCS_GROUP, UNIT_NONE,
                         "fine-grained soil (fines %.1f %% >= 50 %%): ML, CL, MH, CH, OL or OH needs the "
                         "Atterberg limits (and organic content)%s",
                         fines, x->limits_given);
    }
    if (!sg_classify_at_most(fines, USCS_DUAL_MAX_PCT)) {
        if (!x->quiet)
            fmt_into(note, sizeof note,
                     "ASTM D2487: with fines over 12 %% (%s) the soil is named by the plasticity of its "
                     "fines, not by its grading",
                     basis);
        if ((st = add_text_s(x, &N_USCS_GRADING, "not applicable, fines over 12 %", note)) != SG_OK)
            return st;
        return add_undet_s(x, &N_USCS_GROUP, UNIT_NONE, "%s with fines over 12 %% (%s): %s needs the Atterberg limits%s",
                         kind, basis, is_gravel ? "GM, GC or GC-GM" : "SM, SC or SC-SM", x->limits_given);
    }
    if (!isfinite(cu) || !isfinite(cc)) {
        if ((st = add_undet_s(x, &N_USCS_GRADING, UNIT_NONE,
                            "not determined: Cu and Cc are needed (D10, D30 and D60; %s)", basis)) != SG_OK)
            return st;
        return add_undet_s(x, &N_USCS_GROUP, UNIT_NONE, "not determined: Cu and Cc are needed (%s)", basis);
    }
    const bool well = sg_classify_uscs_well_graded(is_gravel, cu, cc);
    if (!x->quiet)
        fmt_into(note, sizeof note, "ASTM D2487 %s (%s): %s needs Cu >= %g and 1 <= Cc <= 3; Cu %.2f, Cc %.2f",
                 kind, basis, is_gravel ? "GW" : "SW", is_gravel ? USCS_GW_CU_MIN : USCS_SW_CU_MIN, cu, cc);
    if ((st = add_text_s(x, &N_USCS_GRADING, well ? "well graded" : "poorly graded", note)) != SG_OK)
        return st;
    const char *sym = is_gravel ? (well ? "GW" : "GP") : (well ? "SW" : "SP");
    if (!sg_classify_at_least(fines, USCS_CLEAN_MAX_PCT)) {
        if (!x->quiet)
            fmt_into(note, sizeof note, "ASTM D2487 coarse-grained, fines %.1f %% < 5 %% (%s)", fines, basis);
        return add_text_s(x, &N_USCS_GROUP, sym, note);
    }
    return add_undet_s(x, &N_USCS_GROUP, UNIT_NONE,
                     "dual symbol %s-%cM or %s-%cC (fines %.1f %%, 5-12 %%): the second part needs the "
                     "Atterberg limits of the fines%s",
                     sym, is_gravel ? 'G' : 'S', sym, is_gravel ? 'G' : 'S', fines, x->limits_given);
}

static enum sg_status add_iso_grading(struct ctx *x, double cu, double cc)
{
    if (!isfinite(cu) || !isfinite(cc))
        return add_undet_s(x, &N_ISO_GRADING, UNIT_NONE, "not determined: Cu and Cc are needed (D10, D30 and D60)");
    const char *term = sg_classify_iso_grading(cu, cc);
    if (term == NULL)
        return add_undet_s(x, &N_ISO_GRADING, UNIT_NONE,
                         "no ISO 14688-2 term fits Cu %.2f, Cc %.2f (multi-graded needs Cu > 15 and 1 < Cc < 3; "
                         "gap-graded Cc < 0.5)",
                         cu, cc);
    char note[SG_QNOTE_MAX];
    note[0] = '\0';
    if (!x->quiet)
        fmt_into(note, sizeof note,
                 "ISO 14688-2 from Cu %.2f and Cc %.2f (limits from memory: multi Cu > 15 and 1 < Cc < 3, "
                 "medium 6-15, even < 6, gap Cc < 0.5)",
                 cu, cc);
    return add_text_s(x, &N_ISO_GRADING, term, note);
}

/* ---- junction gap ------------------------------------------------------ */

/* A sedimentation point; ordered by size, then input line (the order the
 * rules below speak of: "the two coarsest" and so on). */
struct sed_point {
    double d_mm;
    double percent;
    unsigned line;
};

static bool sed_before(const struct sed_point *a, const struct sed_point *b)
{
    if (a->d_mm != b->d_mm)
        return a->d_mm < b->d_mm;
    return a->line < b->line;
}

static bool usable(const struct sg_point *p)
{
    return isfinite(p->diameter_mm) && p->diameter_mm > 0.0 && isfinite(p->percent_finer);
}

static bool is_sed(const struct sg_point *p)
{
    return p->source == SG_SOURCE_HYDROMETER || p->source == SG_SOURCE_PIPETTE;
}

static double loglinear(double d, double d0, double p0, double d1, double p1)
{
    const double l0 = log10(d0); /* once: log10 is not free */
    return p0 + (p1 - p0) * (log10(d) - l0) / (log10(d1) - l0);
}

/* The sedimentation points around a size a, in their (size, line) order:
 * lo1, the last one finer than a, and lo2, the last one finer than lo1's
 * size (the next size down); hi1, the first one not finer than a, and
 * hi2, the first one coarser than hi1's size. One scan, no sorting: each
 * point only moves these four along the order. */
struct around {
    bool has_lo1, has_lo2, has_hi1, has_hi2;
    struct sed_point lo1, lo2, hi1, hi2;
};

static void around_add(struct around *a, double a_mm, const struct sed_point *s)
{
    if (s->d_mm < a_mm) {
        if (!a->has_lo1 || !sed_before(s, &a->lo1)) { /* s is the new last (ties: the later) */
            if (a->has_lo1 && a->lo1.d_mm < s->d_mm) {
                a->lo2 = a->lo1; /* the last of all before s, all finer than s */
                a->has_lo2 = true;
            }
            a->lo1 = *s;
            a->has_lo1 = true;
        } else if (s->d_mm < a->lo1.d_mm && (!a->has_lo2 || !sed_before(s, &a->lo2))) {
            a->lo2 = *s;
            a->has_lo2 = true;
        }
    } else {
        if (!a->has_hi1 || sed_before(s, &a->hi1)) { /* s is the new first (ties: the earlier) */
            if (a->has_hi1 && a->hi1.d_mm > s->d_mm) {
                a->hi2 = a->hi1;
                a->has_hi2 = true;
            }
            a->hi1 = *s;
            a->has_hi1 = true;
        } else if (s->d_mm > a->hi1.d_mm && (!a->has_hi2 || sed_before(s, &a->hi2))) {
            a->hi2 = *s;
            a->has_hi2 = true;
        }
    }
}

static enum sg_status add_junction_gap(struct ctx *x)
{
    const struct sg_result *res = x->res;
    SG_STATIC_QNAME(name, "junction_gap_pct");
    double a_mm = INFINITY, p_sieve = NAN;
    bool a_from_sieve = false;
    /* each point tested for use once: sieves here, sedimentation below */
    for (size_t i = 0; i < res->n_points; i++) {
        const struct sg_point *p = &res->points[i];
        if (is_sed(p) || !usable(p))
            continue;
        const bool is_sieve = p->source == SG_SOURCE_SIEVE;
        /* the finest aperture; at equal apertures the sieve set's value (D6913) */
        if (p->diameter_mm < a_mm || (p->diameter_mm == a_mm && is_sieve && !a_from_sieve)) {
            a_mm = p->diameter_mm;
            p_sieve = p->percent_finer;
            a_from_sieve = is_sieve;
        }
    }
    if (!isfinite(a_mm))
        return add_undet_s(x, &name, UNIT_PCT, "not determined: no sieve points");

    struct around ar;
    memset(&ar, 0, sizeof ar);
    for (size_t i = 0; i < res->n_points; i++) {
        const struct sg_point *p = &res->points[i];
        if (is_sed(p) && usable(p)) {
            const struct sed_point s = {p->diameter_mm, p->percent_finer, p->line};
            around_add(&ar, a_mm, &s);
        }
    }
    if (!ar.has_lo1 && !ar.has_hi1) /* the first point sets one of them */
        return add_undet_s(x, &name, UNIT_PCT, "not determined: no sedimentation points");
    double p_sed = NAN;
    char how[160];
    how[0] = '\0';
    if (ar.has_hi1 && ar.hi1.d_mm == a_mm) {
        p_sed = ar.hi1.percent;
        if (!x->quiet)
            join(how, sizeof how, "sedimentation point at that size", (const char *)NULL);
    } else if (ar.has_lo1 && ar.has_hi1) {
        p_sed = loglinear(a_mm, ar.lo1.d_mm, ar.lo1.percent, ar.hi1.d_mm, ar.hi1.percent);
        if (!x->quiet)
            fmt_into(how, sizeof how, "interpolated log-linearly between sedimentation points at %g and %g mm",
                     ar.lo1.d_mm, ar.hi1.d_mm);
    } else {
        /* all on one side: the nearest point and the next distinct size beyond it */
        const bool all_finer = !ar.has_hi1; /* the two coarsest; else the two finest */
        const struct sed_point s0 = all_finer ? ar.lo1 : ar.hi1, s1 = all_finer ? ar.lo2 : ar.hi2;
        if (!(all_finer ? ar.has_lo2 : ar.has_hi2))
            return add_undet_s(x, &name, UNIT_PCT,
                             "not determined: sedimentation points at one size only (%g mm), none at the finest "
                             "sieve %g mm",
                             s0.d_mm, a_mm);
        p_sed = loglinear(a_mm, s0.d_mm, s0.percent, s1.d_mm, s1.percent);
        if (!x->quiet)
            fmt_into(how, sizeof how,
                     "extrapolated log-linearly from the sedimentation points at %g and %g mm (QC indicator "
                     "only, not a point of the curve)",
                     s1.d_mm, s0.d_mm);
    }
    char note[SG_QNOTE_MAX];
    note[0] = '\0';
    if (!x->quiet)
        fmt_into(note, sizeof note, "%s %g mm passing %.2f %% minus sedimentation %.2f %% at that size, %s",
                 a_from_sieve ? "sieve" : "fine sieve", a_mm, p_sieve, p_sed, how);
    return add_value_s(x, &name, UNIT_PCT, p_sieve - p_sed, note);
}

/* ---- entry point ------------------------------------------------------- */

enum sg_status sg_classify_summarise(const struct sg_curve *curve, const struct sg_record *rec,
                                     const struct sg_reduce_options *opt, struct sg_result *res,
                                     struct sg_error *err)
{
    if (curve == NULL || res == NULL)
        return sg_error_set(err, SG_EINVAL, 0, 0, "no curve or no result to summarise");
    /* fields one by one: the message buffers stay untouched unless used */
    struct ctx x;
    x.curve = curve;
    x.res = res;
    x.err = err;
    x.interp_word = curve->impl != NULL ? "monotone (Steffen)" : "log-linear";
    x.quiet = opt != NULL && (opt->values_only || opt->skip_notes);
    /* uscs_group is the grading's part of ASTM D2487; with the limits the
     * whole group symbol is uscs_symbol (plasticity.h) */
    x.limits_given = rec != NULL && rec->has_liquid_limit && rec->has_plastic_limit
                         ? "; the record gives them: the group symbol with them is uscs_symbol"
                         : "";
    enum sg_status st;
    res->has_keys = false; /* until every key is kept */

    /* the six D-values, read in one walk along the curve (the percents
     * in increasing order) */
    enum { N_DP = 6 };
    static const double dp_pct[N_DP] = {10.0, 15.0, 30.0, 50.0, 60.0, 85.0};
    static const struct {
        struct sg_static_qname name;
        const char *shown;
    } dp[N_DP] = {{{"d10_mm"}, "10"}, {{"d15_mm"}, "15"}, {{"d30_mm"}, "30"},
                  {{"d50_mm"}, "50"}, {{"d60_mm"}, "60"}, {{"d85_mm"}, "85"}};
    double dv[N_DP];
    enum sg_status dst[N_DP];
    sg_curve_diameters_at_sorted(curve, dp_pct, N_DP, dv, dst);
    struct reading d[N_DP];
    char d_why[N_DP][MSG_MAX];
    const size_t d10_row = res->n_quantities; /* then d15_mm, ..., one row each */
    for (size_t i = 0; i < N_DP; i++) {
        if (x.quiet && dst[i] != SG_ENOMEM) {
            /* values only (each Monte Carlo draw): the rows of dx_reading
             * and add_dx_row without their notes */
            const bool ok = dst[i] == SG_OK;
            d[i] = (struct reading){ok, ok ? dv[i] : (double)NAN, ""};
            st = ok ? add_value_s(&x, &dp[i].name, UNIT_MM, dv[i], "")
                    : add_undet_s(&x, &dp[i].name, UNIT_MM, "D%g not determined", dp_pct[i]);
        } else if ((st = dx_reading(&x, dp_pct[i], dv[i], dst[i], &d[i], d_why[i])) == SG_OK) {
            st = add_dx_row(&x, dp_pct[i], &dp[i].name, NULL, dp[i].shown, &d[i]);
        }
        if (st != SG_OK)
            return st;
    }
    keep(&x, SG_KEY_D10_MM, d10_row);
    keep(&x, SG_KEY_D15_MM, d10_row + 1);
    double cu, cc;
    if ((st = add_cu_cc(&x, &d[0], &d[2], &d[4], &cu, &cc)) != SG_OK)
        return st;
    keep(&x, SG_KEY_CU, res->n_quantities - 2);
    keep(&x, SG_KEY_CC, res->n_quantities - 1);

    if ((st = read_bounds(&x)) != SG_OK)
        return st;
    keep_reading(&x, SG_KEY_P_75_MM_PCT, B_75);
    keep_reading(&x, SG_KEY_P_4_75_MM_PCT, B_4_75);
    keep_reading(&x, SG_KEY_P_0_075_MM_PCT, B_0_075);
    struct reading p2;
    const size_t clay_row = res->n_quantities;
    if ((st = add_fraction(&x, &N_CLAY_PCT, B_ZERO, B_0_002, "ISO 14688-1 clay, finer than 0.002 mm")) ||
        (st = add_fraction(&x, &N_SILT_PCT, B_0_002, B_0_063, "ISO 14688-1 silt, 0.002-0.063 mm")) ||
        (st = add_fraction(&x, &N_SAND_PCT, B_0_063, B_2, "ISO 14688-1 sand, 0.063-2 mm")) ||
        (st = add_fraction(&x, &N_GRAVEL_PCT, B_2, B_63, "ISO 14688-1 gravel, 2-63 mm")) ||
        (st = add_fraction(&x, &N_FINES_PCT, B_ZERO, B_0_075, "percent finer than 0.075 mm (No. 200)")) ||
        (st = add_usda(&x, &p2)))
        return st;
    keep(&x, SG_KEY_CLAY_PCT, clay_row);

    if ((st = add_extra_dx(&x, opt)) != SG_OK)
        return st;

    static const struct {
        struct sg_static_qname name; /* static: the rows keep its address */
        enum bound lower, upper;
        bool of_fine_earth; /* USDA separates: % of the fraction finer than 2 mm */
        const char *what;
    } fr[] = {
        {{"cobbles_pct"}, B_63, B_200, false, "ISO 14688-1 cobbles, 63-200 mm"},
        {{"iso_fine_silt_pct"}, B_0_002, B_0_0063, false, "ISO 14688-1 fine silt, 0.002-0.0063 mm"},
        {{"iso_medium_silt_pct"}, B_0_0063, B_0_02, false, "ISO 14688-1 medium silt, 0.0063-0.02 mm"},
        {{"iso_coarse_silt_pct"}, B_0_02, B_0_063, false, "ISO 14688-1 coarse silt, 0.02-0.063 mm"},
        {{"iso_fine_sand_pct"}, B_0_063, B_0_2, false, "ISO 14688-1 fine sand, 0.063-0.2 mm"},
        {{"iso_medium_sand_pct"}, B_0_2, B_0_63, false, "ISO 14688-1 medium sand, 0.2-0.63 mm"},
        {{"iso_coarse_sand_pct"}, B_0_63, B_2, false, "ISO 14688-1 coarse sand, 0.63-2 mm"},
        {{"iso_fine_gravel_pct"}, B_2, B_6_3, false, "ISO 14688-1 fine gravel, 2-6.3 mm"},
        {{"iso_medium_gravel_pct"}, B_6_3, B_20, false, "ISO 14688-1 medium gravel, 6.3-20 mm"},
        {{"iso_coarse_gravel_pct"}, B_20, B_63, false, "ISO 14688-1 coarse gravel, 20-63 mm"},
        {{"uscs_cobbles_pct"}, B_75, B_300, false, "ASTM D2487 cobbles, 75-300 mm"},
        {{"uscs_gravel_pct"}, B_4_75, B_75, false, "ASTM D2487 gravel, 4.75-75 mm"},
        {{"uscs_coarse_gravel_pct"}, B_19, B_75, false, "ASTM D2487 coarse gravel, 19-75 mm"},
        {{"uscs_fine_gravel_pct"}, B_4_75, B_19, false, "ASTM D2487 fine gravel, 4.75-19 mm"},
        {{"uscs_sand_pct"}, B_0_075, B_4_75, false, "ASTM D2487 sand, 0.075-4.75 mm"},
        {{"uscs_coarse_sand_pct"}, B_2, B_4_75, false, "ASTM D2487 coarse sand, 2.00-4.75 mm"},
        {{"uscs_medium_sand_pct"}, B_0_425, B_2, false, "ASTM D2487 medium sand, 0.425-2.00 mm"},
        {{"uscs_fine_sand_pct"}, B_0_075, B_0_425, false, "ASTM D2487 fine sand, 0.075-0.425 mm"},
        {{"uscs_fines_pct"}, B_ZERO, B_0_075, false, "ASTM D2487 fines (silt and clay), finer than 0.075 mm"},
        {{"aashto_gravel_pct"}, B_2, B_75, false, "AASHTO M 145 gravel, 2.00-75 mm"},
        {{"aashto_coarse_sand_pct"}, B_0_425, B_2, false, "AASHTO M 145 coarse sand, 0.425-2.00 mm"},
        {{"aashto_fine_sand_pct"}, B_0_075, B_0_425, false, "AASHTO M 145 fine sand, 0.075-0.425 mm"},
        {{"aashto_silt_pct"}, B_0_002, B_0_075, false, "AASHTO M 145 silt, 0.002-0.075 mm"},
        {{"aashto_clay_pct"}, B_ZERO, B_0_002, false, "AASHTO M 145 clay, finer than 0.002 mm"},
        {{"usda_very_coarse_sand_pct"}, B_1, B_2, true,
         "USDA very coarse sand 1-2 mm, % of the fraction finer than 2 mm"},
        {{"usda_coarse_sand_pct"}, B_0_5, B_1, true, "USDA coarse sand 0.5-1 mm, % of the fraction finer than 2 mm"},
        {{"usda_medium_sand_pct"}, B_0_25, B_0_5, true,
         "USDA medium sand 0.25-0.5 mm, % of the fraction finer than 2 mm"},
        {{"usda_fine_sand_pct"}, B_0_1, B_0_25, true, "USDA fine sand 0.10-0.25 mm, % of the fraction finer than 2 mm"},
        {{"usda_very_fine_sand_pct"}, B_0_05, B_0_1, true,
         "USDA very fine sand 0.05-0.10 mm, % of the fraction finer than 2 mm"},
        {{"finer_0_02_mm_pct"}, B_ZERO, B_0_02, false,
         "percent finer than 0.02 mm, input to frost-susceptibility screens (a screen, not a design value)"},
        {{"passing_2_00_mm_pct"}, B_ZERO, B_2, false, "percent passing 2.00 mm (No. 10)"},
        {{"passing_0_425_mm_pct"}, B_ZERO, B_0_425, false, "percent passing 0.425 mm (No. 40)"},
        {{"passing_0_075_mm_pct"}, B_ZERO, B_0_075, false, "percent passing 0.075 mm (No. 200)"},
    };
    if (x.quiet) {
        /* the Monte Carlo draws' path: add_fraction_on's quiet rows in one
         * loop, without its test of quiet per row */
        const double basis_pct = p2.ok && p2.value > 0.0 ? p2.value : (double)NAN;
        for (size_t i = 0; i < sizeof fr / sizeof fr[0]; i++) {
            double v = x.pv[fr[i].upper] - x.pv[fr[i].lower]; /* NaN unless both are determined */
            if (fr[i].of_fine_earth)
                v = 100.0 * v / basis_pct;
            struct sg_quantity *q = sg_result_new_quantity_static(res, &fr[i].name, UNIT_PCT, NULL);
            if (q == NULL)
                return nomem(&x);
            if (isfinite(v)) { /* else as written: not determined, value NaN */
                q->determined = true;
                q->value = v;
            }
            if (fr[i].lower == B_ZERO && fr[i].upper == B_0_02) /* finer_0_02_mm_pct */
                keep(&x, SG_KEY_FINER_0_02_MM_PCT, res->n_quantities - 1);
        }
    } else {
        for (size_t i = 0; i < sizeof fr / sizeof fr[0]; i++) {
            if ((st = add_fraction_on(&x, &fr[i].name, fr[i].lower, fr[i].upper, fr[i].of_fine_earth ? &p2 : NULL,
                                      fr[i].what)) != SG_OK)
                return st;
            if (fr[i].lower == B_ZERO && fr[i].upper == B_0_02) /* finer_0_02_mm_pct */
                keep(&x, SG_KEY_FINER_0_02_MM_PCT, res->n_quantities - 1);
        }
    }

    if ((st = add_uscs(&x, cu, cc)) != SG_OK || (st = add_iso_grading(&x, cu, cc)) != SG_OK ||
        (st = add_junction_gap(&x)) != SG_OK)
        return st;
    res->has_keys = true;
    return SG_OK;
}
