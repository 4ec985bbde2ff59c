/* plasticity.c - plasticity and liquidity indices, the Casagrande chart,
 * ASTM D2487 symbols where plasticity decides, BS 5930 terms, Skempton
 * activity and the fines/plasticity consistency checks (METHODS.md 8.2, 9.2). */
#include "sedgrade/plasticity.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "sedgrade/classify.h"
#include "sedgrade/curve.h"
#include "sedgrade/reduce.h"

/* Liquid limits outside this range are not credible test results, %
 * (common practice: natural soils lie within about 10-500 %). */
#define LL_MAX_PCT 1000.0
/* A point within this many percent of PI of the A-line counts as on it
 * (round-off in 0.73 (LL - 20); limits are reported to 1 %). */
#define ON_LINE_TOL_PCT 1e-9
/* The activity note gives A on the basis of the fraction finer than
 * 0.425 mm when more than this much of the sample is coarser, % (a tenth
 * of a percent: the precision the percentages are shown to). */
#define ACTIVITY_BASIS_NOTE_PCT 0.05

double sg_plasticity_a_line_pi(double ll_pct)
{
    return SG_PLAST_A_SLOPE * (ll_pct - SG_PLAST_A_LL0_PCT);
}

double sg_plasticity_u_line_pi(double ll_pct)
{
    return SG_PLAST_U_SLOPE * (ll_pct - SG_PLAST_U_LL0_PCT);
}

/* On or above the A-line as D2487 reads it (horizontal at PI = 4). */
static bool on_or_above_a(double ll_pct, double pi_pct)
{
    return pi_pct >= fmax(SG_PLAST_CLML_PI_MIN, sg_plasticity_a_line_pi(ll_pct)) - ON_LINE_TOL_PCT;
}

enum sg_chart_zone sg_plasticity_chart_zone(double ll_pct, double pi_pct)
{
    if (!(pi_pct > 0.0))
        return SG_CHART_NON_PLASTIC;
    if (ll_pct < SG_PLAST_U_VERTICAL_LL_PCT || pi_pct > sg_plasticity_u_line_pi(ll_pct) + ON_LINE_TOL_PCT)
        return SG_CHART_ABOVE_U;
    if (!on_or_above_a(ll_pct, pi_pct))
        return SG_CHART_BELOW_A;
    if (ll_pct < SG_PLAST_LL_HIGH_PCT && pi_pct <= SG_PLAST_CLML_PI_MAX)
        return SG_CHART_CL_ML;
    return SG_CHART_ABOVE_A;
}

const char *sg_plasticity_zone_name(enum sg_chart_zone z)
{
    switch (z) {
    case SG_CHART_NON_PLASTIC: return "non-plastic";
    case SG_CHART_BELOW_A: return "below A-line";
    case SG_CHART_CL_ML: return "CL-ML band";
    case SG_CHART_ABOVE_A: return "above A-line";
    case SG_CHART_ABOVE_U: return "above U-line";
    }
    return "";
}

const char *sg_plasticity_uscs_fine(double ll_pct, double pi_pct)
{
    if (!isfinite(ll_pct) || !isfinite(pi_pct))
        return NULL;
    const bool above = on_or_above_a(ll_pct, pi_pct);
    if (ll_pct >= SG_PLAST_LL_HIGH_PCT)
        return above ? "CH" : "MH";
    if (pi_pct < SG_PLAST_CLML_PI_MIN || !above)
        return "ML";
    return pi_pct <= SG_PLAST_CLML_PI_MAX ? "CL-ML" : "CL";
}

const char *sg_plasticity_uscs_symbol(const struct sg_uscs_input *in, const char **why)
{
    static const char *const need_fines = "the fines content (percent finer than 0.075 mm) is not determined";
    static const char *const need_limits = "the plasticity of the fines (liquid and plastic limits) is needed";
    static const char *const need_grading = "Cu and Cc (D10, D30, D60) are needed for the grading part";
    static const char *const need_fractions = "the gravel and sand fractions are not determined";
    const char *dummy;
    if (why == NULL)
        why = &dummy;
    *why = "";
    if (!isfinite(in->fines_pct)) {
        *why = need_fines;
        return NULL;
    }
    const bool limits = isfinite(in->ll_pct) && isfinite(in->pi_pct);
    if (sg_classify_at_least(in->fines_pct, SG_PLAST_FINE_GRAINED_MIN_PCT)) {
        if (!limits) {
            *why = need_limits;
            return NULL;
        }
        return sg_plasticity_uscs_fine(in->ll_pct, in->pi_pct);
    }
    if (!isfinite(in->gravel_pct) || !isfinite(in->sand_pct)) {
        *why = need_fractions;
        return NULL;
    }
    const bool gravel = !sg_classify_at_most(in->gravel_pct, in->sand_pct); /* a tie is a sand */
    /* the fines' kind: C for CL, CH and (5-12 %) CL-ML; CL-ML over 12 % gives the C-M pair */
    const char *fine = limits ? sg_plasticity_uscs_fine(in->ll_pct, in->pi_pct) : NULL;
    if (!sg_classify_at_most(in->fines_pct, SG_PLAST_DUAL_MAX_PCT)) {
        if (fine == NULL) {
            *why = need_limits;
            return NULL;
        }
        if (strcmp(fine, "CL-ML") == 0)
            return gravel ? "GC-GM" : "SC-SM";
        if (fine[0] == 'C')
            return gravel ? "GC" : "SC";
        return gravel ? "GM" : "SM";
    }
    if (!isfinite(in->cu) || !isfinite(in->cc)) {
        *why = need_grading;
        return NULL;
    }
    const bool well = sg_classify_uscs_well_graded(gravel, in->cu, in->cc);
    if (!sg_classify_at_least(in->fines_pct, SG_PLAST_CLEAN_MAX_PCT))
        return gravel ? (well ? "GW" : "GP") : (well ? "SW" : "SP");
    if (fine == NULL) {
        *why = need_limits;
        return NULL;
    }
    const bool clayey = fine[0] == 'C'; /* CL, CH, CL-ML */
    static const char *const dual[2][2][2] = {
        /* [gravel][well][clayey] */
        {{"SP-SM", "SP-SC"}, {"SW-SM", "SW-SC"}},
        {{"GP-GM", "GP-GC"}, {"GW-GM", "GW-GC"}},
    };
    return dual[gravel][well][clayey];
}

const char *sg_plasticity_bs5930_term(double ll_pct, char *letter)
{
    char l = '\0';
    const char *t = NULL;
    if (!isfinite(ll_pct) || ll_pct < 0.0)
        t = NULL;
    else if (ll_pct < SG_PLAST_BS_LL_I_PCT)
        t = "low", l = 'L';
    else if (ll_pct < SG_PLAST_BS_LL_H_PCT)
        t = "intermediate", l = 'I';
    else if (ll_pct < SG_PLAST_BS_LL_V_PCT)
        t = "high", l = 'H';
    else if (ll_pct < SG_PLAST_BS_LL_E_PCT)
        t = "very high", l = 'V';
    else
        t = "extremely high", l = 'E';
    if (letter != NULL)
        *letter = l;
    return t;
}

const char *sg_plasticity_activity_class(double activity)
{
    if (!isfinite(activity) || activity < 0.0)
        return NULL;
    if (!sg_classify_at_least(activity, SG_ACTIVITY_INACTIVE_MAX))
        return "inactive";
    if (!sg_classify_at_most(activity, SG_ACTIVITY_ACTIVE_MIN))
        return "active";
    return "normal";
}

/* ---- summary ------------------------------------------------------------- */

struct ctx {
    struct sg_result *res;
    struct sg_error *err;
    bool quiet;    /* values only: no flags (and no notes) */
    bool no_notes; /* values only or skip_notes: empty notes */
};

static enum sg_status nomem(struct ctx *x)
{
    return sg_error_set(x->err, SG_ENOMEM, 0, 0, "out of memory adding the plasticity rows");
}

/* Row names: static (result.h: SG_STATIC_QNAME), each row keeps the address. */
SG_STATIC_QNAME(N_ACTIVITY, "activity");
SG_STATIC_QNAME(N_ACTIVITY_CLASS, "activity_class");
SG_STATIC_QNAME(N_BS5930_PLASTICITY, "bs5930_plasticity");
SG_STATIC_QNAME(N_CASAGRANDE_CHART, "casagrande_chart");
SG_STATIC_QNAME(N_LIQUIDITY_INDEX, "liquidity_index");
SG_STATIC_QNAME(N_PLASTICITY_INDEX_PCT, "plasticity_index_pct");
SG_STATIC_QNAME(N_USCS_SYMBOL, "uscs_symbol");

/* Rows named by static names and units as whole arrays (SG_QUNIT), copied
 * as blocks. */
static enum sg_status value(struct ctx *x, const struct sg_static_qname *name, const char unit[SG_QUNIT_MAX], double v,
                            const char *note)
{
    struct sg_quantity *q = sg_result_new_quantity_static(x->res, name, unit, x->no_notes ? "" : note);
    if (q == NULL)
        return nomem(x);
    sg_quantity_set_value(q, v);
    return SG_OK;
}

/* Inline: without the limits (most records, and every Monte Carlo draw of
 * them) the summary is seven such rows. */
static inline enum sg_status undet(struct ctx *x, const struct sg_static_qname *name, const char unit[SG_QUNIT_MAX],
                            const char *note)
{
    return sg_result_new_quantity_static(x->res, name, unit, x->no_notes ? "" : note) != NULL ? SG_OK : nomem(x);
}

static enum sg_status text(struct ctx *x, const struct sg_static_qname *name, const char *t, const char *note)
{
    struct sg_quantity *q = sg_result_new_quantity_static(x->res, name, SG_QUNIT(""), x->no_notes ? "" : note);
    if (q == NULL)
        return nomem(x);
    sg_quantity_set_text(q, t);
    return SG_OK;
}

#define FLAG(x, name, sev, ...)                                                                    \
    ((x)->quiet ? SG_OK                                                                            \
                : (sg_result_add_flag((x)->res, (name), (sev), 0, __VA_ARGS__) == SG_OK ? SG_OK : nomem(x)))

/* D2487 fractions of the material finer than 75 mm, from the curve's
 * percent finer at 75, 4.75 and 0.075 mm (METHODS.md 8.2). */
static void uscs_fractions(const struct sg_result *res, double *gravel, double *sand, double *fines)
{
    const double p75 = sg_result_key(res, SG_KEY_P_75_MM_PCT), p0075 = sg_result_key(res, SG_KEY_P_0_075_MM_PCT);
    *gravel = *sand = *fines = NAN;
    if (isnan(p0075) || !(p75 > 0.0))
        return;
    *fines = 100.0 * p0075 / p75;
    const double p475 = sg_result_key(res, SG_KEY_P_4_75_MM_PCT);
    if (isnan(p475))
        return;
    *gravel = 100.0 * (p75 - p475) / p75;
    *sand = 100.0 * (p475 - p0075) / p75;
}

static enum sg_status add_limits(struct ctx *x, const struct sg_record *rec, double *ll, double *pi)
{
    char note[SG_QNOTE_MAX];
    note[0] = '\0';
    enum sg_status st;
    *ll = *pi = NAN;
    const bool have_ll = rec->has_liquid_limit, have_pl = rec->has_plastic_limit;
    if (!have_ll || !have_pl) {
        if (have_ll != have_pl &&
            (st = FLAG(x, "atterberg_limits", SG_SEVERITY_WARNING,
                       "only the %s limit is given: the plasticity index needs both (add "
                       "'test,%s,<percent>')",
                       have_ll ? "liquid" : "plastic", have_ll ? "plastic_limit_pct" : "liquid_limit_pct")) != SG_OK)
            return st;
        if ((st = undet(x, &N_PLASTICITY_INDEX_PCT, SG_QUNIT("%"),
                        "not determined: needs the liquid and plastic limits (test,liquid_limit_pct and "
                        "test,plastic_limit_pct, ASTM D4318 or BS 1377-2)")) != SG_OK)
            return st;
        return undet(x, &N_LIQUIDITY_INDEX, SG_QUNIT(""), "not determined: needs the liquid and plastic limits");
    }
    const double l = rec->liquid_limit_pct, p = rec->plastic_limit_pct;
    if (!isfinite(l) || !isfinite(p) || l <= 0.0 || p <= 0.0 || l > LL_MAX_PCT || p > LL_MAX_PCT) {
        if ((st = FLAG(x, "atterberg_limits", SG_SEVERITY_WARNING,
                       "liquid limit %g %% and plastic limit %g %% are not credible (give both in percent of "
                       "dry mass, within 0-%g %%)",
                       l, p, LL_MAX_PCT)) != SG_OK)
            return st;
        if ((st = undet(x, &N_PLASTICITY_INDEX_PCT, SG_QUNIT("%"), "not determined: liquid or plastic limit not credible")) !=
            SG_OK)
            return st;
        return undet(x, &N_LIQUIDITY_INDEX, SG_QUNIT(""), "not determined: liquid or plastic limit not credible");
    }
    *ll = l;
    if (p >= l) {
        *pi = 0.0;
        if (!x->no_notes)
            (void)snprintf(note, sizeof note,
                           "non-plastic: the plastic limit %g %% is not below the liquid limit %g %% (ASTM D4318 "
                           "reports NP)",
                           p, l);
        if ((st = value(x, &N_PLASTICITY_INDEX_PCT, SG_QUNIT("%"), 0.0, note)) != SG_OK)
            return st;
        return undet(x, &N_LIQUIDITY_INDEX, SG_QUNIT(""), "not determined: non-plastic (PI 0)");
    }
    *pi = l - p;
    if (!x->no_notes)
        (void)snprintf(note, sizeof note, "PI = LL - PL = %g - %g (limits as given in the record)", l, p);
    if ((st = value(x, &N_PLASTICITY_INDEX_PCT, SG_QUNIT("%"), *pi, note)) != SG_OK)
        return st;
    if (!rec->has_natural_moisture || !isfinite(rec->natural_moisture_pct) || rec->natural_moisture_pct < 0.0)
        return undet(x, &N_LIQUIDITY_INDEX, SG_QUNIT(""),
                     "not determined: needs the natural moisture content (test,natural_moisture_pct)");
    const double li = (rec->natural_moisture_pct - p) / *pi;
    if (!x->no_notes)
        (void)snprintf(note, sizeof note, "LI = (w - PL) / PI with w = %g %%: %s", rec->natural_moisture_pct,
                       li < 0.0   ? "drier than the plastic limit (semi-solid)"
                       : li > 1.0 ? "wetter than the liquid limit (liquid when remoulded; sensitive)"
                                  : "between the plastic and liquid limits (plastic)");
    return value(x, &N_LIQUIDITY_INDEX, SG_QUNIT(""), li, note);
}

static enum sg_status add_chart(struct ctx *x, double ll, double pi)
{
    char note[SG_QNOTE_MAX];
    note[0] = '\0';
    enum sg_status st;
    if (!isfinite(ll) || !isfinite(pi)) {
        if ((st = undet(x, &N_CASAGRANDE_CHART, SG_QUNIT(""), "not determined: needs the liquid and plastic limits")) != SG_OK)
            return st;
        return undet(x, &N_BS5930_PLASTICITY, SG_QUNIT(""), "not determined: needs the liquid and plastic limits");
    }
    const enum sg_chart_zone z = sg_plasticity_chart_zone(ll, pi);
    const double a_pi = sg_plasticity_a_line_pi(ll);
    if (!x->no_notes)
        (void)snprintf(note, sizeof note,
                       "plasticity chart: LL %g %%, PI %g %%; A-line PI %.1f %% (0.73 (LL - 20))%s, U-line PI %.1f "
                       "%% (0.9 (LL - 8))%s",
                       ll, pi, a_pi,
                       a_pi < SG_PLAST_CLML_PI_MIN ? ", read by ASTM D2487 as PI 4 % where it lies lower" : "",
                       sg_plasticity_u_line_pi(ll),
                       z == SG_CHART_ABOVE_U ? "; beyond the upper limit of natural soils: re-test the limits" : "");
    if ((st = text(x, &N_CASAGRANDE_CHART, sg_plasticity_zone_name(z), note)) != SG_OK)
        return st;
    if (z == SG_CHART_ABOVE_U &&
        (st = FLAG(x, "plasticity_u_line", SG_SEVERITY_WARNING,
                   "LL %g %% and PI %g %% plot above the U-line (PI %.1f %%), the upper limit of natural soils "
                   "(re-test the liquid and plastic limits)",
                   ll, pi, sg_plasticity_u_line_pi(ll))) != SG_OK)
        return st;

    char letter = '\0';
    const char *term = sg_plasticity_bs5930_term(ll, &letter);
    if (term == NULL)
        return undet(x, &N_BS5930_PLASTICITY, SG_QUNIT(""), "not determined: liquid limit not credible");
    /* "<M|C><letter>: <silt|clay> of <term> plasticity" (well within the
     * text's size). BS 5930's chart divides clay from silt by the A-line
     * itself: it has no PI 4 floor and no CL-ML band (those are ASTM
     * D2487's), so a low-plasticity point above the line is a clay. */
    char t[SG_QTEXT_MAX] = "non-plastic";
    if (z != SG_CHART_NON_PLASTIC) {
        const bool silt = pi < a_pi - ON_LINE_TOL_PCT;
        const char *kind = silt ? "silt" : "clay";
        const size_t lt = strlen(term);
        t[0] = silt ? 'M' : 'C';
        t[1] = letter;
        memcpy(t + 2, ": ", 2);
        memcpy(t + 4, kind, 4);
        memcpy(t + 8, " of ", 4);
        memcpy(t + 12, term, lt);
        memcpy(t + 12 + lt, " plasticity", sizeof " plasticity");
    }
    return text(x, &N_BS5930_PLASTICITY, t,
                "BS 5930 plasticity by liquid limit (from memory): low < 35, intermediate 35-50, high 50-70, "
                "very high 70-90, extremely high >= 90 %; C on or above the A-line, M below");
}

static enum sg_status add_uscs(struct ctx *x, const struct sg_result *res, double ll, double pi)
{
    struct sg_uscs_input in = {
        .cu = sg_result_key(res, SG_KEY_CU), .cc = sg_result_key(res, SG_KEY_CC), .ll_pct = ll, .pi_pct = pi};
    uscs_fractions(res, &in.gravel_pct, &in.sand_pct, &in.fines_pct);
    const char *why = "";
    const char *sym = sg_plasticity_uscs_symbol(&in, &why);
    enum sg_status st;
    char note[SG_QNOTE_MAX];
    note[0] = '\0';
    if (isfinite(in.fines_pct) && !x->quiet) {
        const double f = in.fines_pct;
        const enum sg_severity sev =
            sg_classify_at_least(f, SG_PLAST_FINE_GRAINED_MIN_PCT) ? SG_SEVERITY_WARNING : SG_SEVERITY_INFO;
        if (!isfinite(ll) && sg_classify_at_least(f, SG_PLAST_CLEAN_MAX_PCT) &&
            (st = FLAG(x, "fines_without_limits", sev,
                       "fines %.1f %% of the fraction finer than 75 mm: the ASTM D2487 group needs the liquid and "
                       "plastic limits of the fines (add test,liquid_limit_pct and test,plastic_limit_pct)",
                       f)) != SG_OK)
            return st;
        static const double limits[] = {SG_PLAST_CLEAN_MAX_PCT, SG_PLAST_DUAL_MAX_PCT,
                                        SG_PLAST_FINE_GRAINED_MIN_PCT};
        for (size_t i = 0; i < sizeof limits / sizeof limits[0]; i++)
            if (fabs(f - limits[i]) <= SG_PLAST_BORDERLINE_PP &&
                (st = FLAG(x, "fines_borderline", SG_SEVERITY_INFO,
                           "fines %.1f %% lie within %g percentage points of the ASTM D2487 limit %g %%: the group "
                           "symbol is borderline (see its Monte Carlo probabilities with --mc)",
                           f, SG_PLAST_BORDERLINE_PP, limits[i])) != SG_OK)
                return st;
    }
    if (sym == NULL) {
        if (!x->no_notes)
            (void)snprintf(note, sizeof note, "not determined: %s", why);
        return undet(x, &N_USCS_SYMBOL, SG_QUNIT(""), note);
    }
    if (!x->no_notes)
        (void)snprintf(note, sizeof note,
                       "ASTM D2487 group symbol (rules from memory) from fines %.1f %% of the fraction finer than "
                       "75 mm%s; inorganic assumed (OL/OH need the oven-dried liquid limit)",
                       in.fines_pct,
                       isfinite(ll) ? " and the plasticity of the fines" : "");
    return text(x, &N_USCS_SYMBOL, sym, note);
}

static enum sg_status add_activity(struct ctx *x, const struct sg_result *res, double pi)
{
    enum sg_status st;
    char note[SG_QNOTE_MAX];
    note[0] = '\0';
    const double cf = sg_result_key(res, SG_KEY_CLAY_PCT);
    if (!isfinite(pi)) {
        if ((st = undet(x, &N_ACTIVITY, SG_QUNIT(""), "not determined: needs the plasticity index")) != SG_OK)
            return st;
        return undet(x, &N_ACTIVITY_CLASS, SG_QUNIT(""), "not determined: needs the plasticity index");
    }
    if (!isfinite(cf)) {
        if ((st = FLAG(x, "activity_not_computed", SG_SEVERITY_INFO,
                       "the clay fraction (finer than 0.002 mm) is not determined: the curve does not reach 2 um, "
                       "so Skempton's activity cannot be computed (extend the readings to a finer size)")) != SG_OK)
            return st;
        if ((st = undet(x, &N_ACTIVITY, SG_QUNIT(""),
                        "not determined: the clay fraction is not determined (the curve does not reach 0.002 mm)")) !=
            SG_OK)
            return st;
        return undet(x, &N_ACTIVITY_CLASS, SG_QUNIT(""), "not determined: the clay fraction is not determined");
    }
    if (pi <= 0.0) {
        if (cf >= SG_PLAST_PLASTIC_CLAY_MIN_PCT &&
            (st = FLAG(x, "nonplastic_clay", SG_SEVERITY_WARNING,
                       "non-plastic limits with %.1f %% clay-size material (from %g %% a soil is normally plastic): "
                       "check the limits, the dispersion or whether the fines are rock flour",
                       cf, SG_PLAST_PLASTIC_CLAY_MIN_PCT)) != SG_OK)
            return st;
        if ((st = undet(x, &N_ACTIVITY, SG_QUNIT(""), "not determined: non-plastic (PI 0)")) != SG_OK)
            return st;
        return undet(x, &N_ACTIVITY_CLASS, SG_QUNIT(""), "not determined: non-plastic");
    }
    if (!(cf > 0.0)) {
        if ((st = undet(x, &N_ACTIVITY, SG_QUNIT(""), "not determined: no clay-size material (clay fraction 0 %)")) != SG_OK)
            return st;
        return undet(x, &N_ACTIVITY_CLASS, SG_QUNIT(""), "not determined: no clay-size material");
    }
    const double a = pi / cf;
    if (!x->no_notes) {
        const int w = snprintf(note, sizeof note,
                               "Skempton activity A = PI / clay fraction = %g / %.2f (clay: %% of the whole sample "
                               "finer than 0.002 mm)",
                               pi, cf);
        /* the limits are measured on the fraction finer than 0.425 mm: with
         * coarser material in the sample, say what A is on that basis too
         * (the value stays Skempton's, on the whole sample, METHODS.md 9.2) */
        const struct sg_quantity *q = sg_result_quantity(x->res, "passing_0_425_mm_pct");
        if (w > 0 && (size_t)w < sizeof note && q != NULL && q->determined && !q->is_text && q->value > cf &&
            q->value < 100.0 - ACTIVITY_BASIS_NOTE_PCT)
            (void)snprintf(note + w, sizeof note - (size_t)w,
                           "; the limits are of the fraction finer than 0.425 mm (%.1f %% of the sample): on that "
                           "basis the clay fraction is %.1f %% and A = %.2f",
                           q->value, 100.0 * cf / q->value, pi * q->value / (100.0 * cf));
    }
    if ((st = value(x, &N_ACTIVITY, SG_QUNIT(""), a, note)) != SG_OK)
        return st;
    if ((a < SG_ACTIVITY_MINERAL_MIN || a > SG_ACTIVITY_MINERAL_MAX) &&
        (st = FLAG(x, "activity_range", SG_SEVERITY_WARNING,
                   "activity %.2f is outside %g-%g, the range of the common clay minerals (kaolinite to "
                   "Na-smectite): check the plasticity index and the clay fraction",
                   a, SG_ACTIVITY_MINERAL_MIN, SG_ACTIVITY_MINERAL_MAX)) != SG_OK)
        return st;
    return text(x, &N_ACTIVITY_CLASS, sg_plasticity_activity_class(a),
                "Skempton (1953) classes: inactive < 0.75, normal 0.75-1.25, active > 1.25");
}

enum sg_status sg_plasticity_summarise(const struct sg_record *rec, const struct sg_reduce_options *opt,
                                       struct sg_result *res, struct sg_error *err)
{
    if (rec == NULL || res == NULL)
        return sg_error_set(err, SG_EINVAL, 0, 0, "no record or no result for the plasticity check");
    struct ctx x = {res, err, opt != NULL && opt->values_only,
                    opt != NULL && (opt->values_only || opt->skip_notes)};
    double ll, pi;
    enum sg_status st;
    if ((st = add_limits(&x, rec, &ll, &pi)) != SG_OK || (st = add_chart(&x, ll, pi)) != SG_OK ||
        (st = add_uscs(&x, res, ll, pi)) != SG_OK || (st = add_activity(&x, res, pi)) != SG_OK)
        return st;
    return SG_OK;
}
