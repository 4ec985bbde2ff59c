/* screens.c - Hazen permeability, the 0.02 mm frost screen and Terzaghi's
 * filter ratios (METHODS.md 9.1, 9.3, 9.4): screens, not design values. */
#include "sedgrade/screens.h"

#include <math.h>
#include <stdio.h>

#include "sedgrade/classify.h"
#include "sedgrade/curve.h"
#include "sedgrade/reduce.h"

double sg_screens_hazen_k_cm_s(double d10_mm)
{
    return SG_HAZEN_C_CM_S_PER_MM2 * d10_mm * d10_mm;
}

bool sg_screens_hazen_valid(double d10_mm)
{
    return sg_classify_at_least(d10_mm, SG_HAZEN_D10_MIN_MM) && sg_classify_at_most(d10_mm, SG_HAZEN_D10_MAX_MM);
}

enum sg_frost_class sg_screens_frost(double finer_0_02_mm_pct, bool uniform)
{
    const double p = finer_0_02_mm_pct;
    const double possible = uniform ? SG_FROST_UNIFORM_POSSIBLE_PCT : SG_FROST_POSSIBLE_PCT;
    const double susceptible = uniform ? SG_FROST_UNIFORM_SUSCEPTIBLE_PCT : SG_FROST_SUSCEPTIBLE_PCT;
    if (sg_classify_at_least(p, susceptible))
        return SG_FROST_SUSCEPTIBLE;
    if (sg_classify_at_least(p, possible))
        return SG_FROST_POSSIBLY;
    return SG_FROST_NOT_SUSCEPTIBLE;
}

const char *sg_screens_frost_name(enum sg_frost_class c)
{
    switch (c) {
    case SG_FROST_NOT_SUSCEPTIBLE: return "not frost susceptible";
    case SG_FROST_POSSIBLY: return "possibly frost susceptible";
    case SG_FROST_SUSCEPTIBLE: return "frost susceptible";
    }
    return "";
}

enum sg_status sg_screens_terzaghi(double base_d15_mm, double base_d85_mm, double filter_d15_mm,
                                   struct sg_filter_ratios *out, struct sg_error *err)
{
    const double v[3] = {base_d15_mm, base_d85_mm, filter_d15_mm};
    static const char *const what[3] = {"base soil D15", "base soil D85", "filter D15"};
    for (int i = 0; i < 3; i++)
        if (!isfinite(v[i]) || v[i] <= 0.0)
            return sg_error_set(err, SG_EINVAL, 0, 0, "%s %g mm must be a positive size (give it in mm)", what[i],
                                v[i]);
    out->retention = filter_d15_mm / base_d85_mm;
    out->permeability = filter_d15_mm / base_d15_mm;
    out->retention_ok = out->retention <= SG_TERZAGHI_RETENTION_MAX;
    out->permeability_ok = out->permeability >= SG_TERZAGHI_PERMEABILITY_MIN;
    return SG_OK;
}

static enum sg_status nomem(struct sg_error *err)
{
    return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory adding the screens");
}

/* The hazen_k_cm_s and frost_screen rows are named by static names
 * (result.h: SG_STATIC_QNAME), copied as one block and kept by address:
 * they are added once per Monte Carlo draw. */
SG_STATIC_QNAME(N_HAZEN_K_CM_S, "hazen_k_cm_s");
SG_STATIC_QNAME(N_FROST_SCREEN, "frost_screen");

static enum sg_status add_hazen(struct sg_result *res, bool quiet, struct sg_error *err)
{
    char note[SG_QNOTE_MAX];
    note[0] = '\0';
    const double d10 = sg_result_key(res, SG_KEY_D10_MM), cu = sg_result_key(res, SG_KEY_CU);
    const char *why = note;
    double k = NAN; /* not determined */
    if (!isfinite(d10))
        why = quiet ? "" : "not determined: D10 is not determined";
    else if (!sg_screens_hazen_valid(d10)) {
        if (!quiet)
            (void)snprintf(note, sizeof note,
                           "not determined: D10 %.3g mm is outside Hazen's validity window %g-%g mm (empirical "
                           "screen for loose clean sands)",
                           d10, SG_HAZEN_D10_MIN_MM, SG_HAZEN_D10_MAX_MM);
    } else {
        k = sg_screens_hazen_k_cm_s(d10);
        if (!quiet)
            (void)snprintf(note, sizeof note,
                           "empirical screen, not a design value: Hazen k = C D10^2, C = %g (cm/s)/mm^2, D10 %.3g mm "
                           "(%.2g m/s); for loose clean sands, D10 %g-%g mm%s",
                           SG_HAZEN_C_CM_S_PER_MM2, d10, k / 100.0, SG_HAZEN_D10_MIN_MM, SG_HAZEN_D10_MAX_MM,
                           sg_classify_at_least(cu, SG_HAZEN_CU_NOTE) ? "; Cu >= 5: not the uniform sand Hazen assumed"
                                                                  : "");
    }
    struct sg_quantity *q = sg_result_new_quantity_static(res, &N_HAZEN_K_CM_S, SG_QUNIT("cm/s"), why);
    if (q == NULL)
        return nomem(err);
    sg_quantity_set_value(q, k);
    return SG_OK;
}

static enum sg_status add_frost(struct sg_result *res, bool quiet, struct sg_error *err)
{
    char note[SG_QNOTE_MAX];
    note[0] = '\0';
    double p = sg_result_key(res, SG_KEY_FINER_0_02_MM_PCT);
    if (!isfinite(p) && sg_curve_percent_at(&res->curve, SG_FROST_SIZE_MM, &p, NULL) != SG_OK)
        p = NAN;
    const char *why = note, *class_name = NULL; /* NULL: not determined (a numeric row) */
    if (!isfinite(p)) {
        why = quiet ? "" : "not determined: the percent finer than 0.02 mm is not determined";
    } else {
        const double cu = sg_result_key(res, SG_KEY_CU);
        const bool uniform = isfinite(cu) && !sg_classify_at_least(cu, SG_FROST_UNIFORM_CU_MAX);
        class_name = sg_screens_frost_name(sg_screens_frost(p, uniform));
        if (!quiet)
            (void)snprintf(note, sizeof note,
                           "empirical screen, not a design decision: %.1f %% finer than 0.02 mm; %s limits %g %% "
                           "(possibly) and %g %% (Casagrande 1931, US Army TI 850-02)%s",
                           p, uniform ? "uniform-soil" : "non-uniform-soil",
                           uniform ? SG_FROST_UNIFORM_POSSIBLE_PCT : SG_FROST_POSSIBLE_PCT,
                           uniform ? SG_FROST_UNIFORM_SUSCEPTIBLE_PCT : SG_FROST_SUSCEPTIBLE_PCT,
                           isfinite(cu) ? "" : "; Cu not determined, non-uniform limits used");
    }
    struct sg_quantity *q = sg_result_new_quantity_static(res, &N_FROST_SCREEN, SG_QUNIT(""), why);
    if (q == NULL)
        return nomem(err);
    if (class_name != NULL)
        sg_quantity_set_text(q, class_name);
    return SG_OK;
}

/* One Terzaghi ratio row: D15 of this test over the base soil's size
 * (what: "D85" or "D15"), with its limit in the note, or not determined
 * with why_not. */
static enum sg_status ratio_row(struct sg_result *res, const char *name, bool have, double ratio, double d15,
                                double base_mm, const char *what, const char *id, double limit, const char *bound,
                                const char *criterion, const char *why_not, bool quiet)
{
    char note[SG_QNOTE_MAX];
    note[0] = '\0';
    if (!quiet && have)
        (void)snprintf(note, sizeof note,
                       "D15 %.3g mm of this test / %s %.3g mm of base soil %.63s; %s %g (Terzaghi %s; a screen)",
                       d15, what, base_mm, id, bound, limit, criterion);
    else if (!quiet)
        (void)snprintf(note, sizeof note, "not determined: %s", why_not);
    return sg_result_add_value(res, name, "", have ? ratio : (double)NAN, note);
}

/* Terzaghi's ratios of this test as a filter over the base soil of opt.
 * The base soil's D85 is required (the CLI checks it); a fine base soil
 * often has no D15, and then only retention is screened. */
static enum sg_status add_filter(struct sg_result *res, const struct sg_reduce_options *opt, bool quiet,
                                 struct sg_error *err)
{
    const double d15 = sg_result_key(res, SG_KEY_D15_MM);
    const double base15 = opt->base_d15_mm, base85 = opt->base_d85_mm;
    const char *id = opt->base_soil_id;
    char note[SG_QNOTE_MAX];
    note[0] = '\0';
    const bool have = isfinite(d15) && d15 > 0.0 && isfinite(base85) && base85 > 0.0;
    const bool have_perm = have && isfinite(base15) && base15 > 0.0;
    /* without the base soil's D15 only retention is screened: the same ratio, given a stand-in D15 */
    struct sg_filter_ratios fr = {(double)NAN, (double)NAN, false, false};
    if (have)
        (void)sg_screens_terzaghi(have_perm ? base15 : base85, base85, d15, &fr, NULL);
    if (ratio_row(res, "filter_retention_ratio", have, fr.retention, d15, base85, "D85", id,
                  SG_TERZAGHI_RETENTION_MAX, "at most", "retention",
                  isfinite(d15) ? "the base soil's D85 is not usable" : "D15 of this test is not determined",
                  quiet) != SG_OK ||
        ratio_row(res, "filter_permeability_ratio", have_perm, fr.permeability, d15, base15, "D15", id,
                  SG_TERZAGHI_PERMEABILITY_MIN, "at least", "permeability",
                  !isfinite(d15) ? "D15 of this test is not determined"
                                 : "the base soil's D15 is not determined (its curve does not reach 15 %)",
                  quiet) != SG_OK)
        return nomem(err);
    const char *verdict = !have                                   ? ""
                          : !have_perm                            ? (fr.retention_ok ? "meets retention" : "fails retention")
                          : fr.retention_ok && fr.permeability_ok ? "meets both"
                          : fr.permeability_ok                    ? "fails retention"
                          : fr.retention_ok                       ? "fails permeability"
                                                                  : "fails both";
    if (!quiet)
        (void)snprintf(note, sizeof note,
                       "Terzaghi: retention <= %g, permeability >= %g%s against base soil %.63s; a screen, not a "
                       "filter design (granular bases; others need the local code's criteria)",
                       SG_TERZAGHI_RETENTION_MAX, SG_TERZAGHI_PERMEABILITY_MIN, have_perm ? "" : " (not checked)",
                       id);
    if (sg_result_add_text(res, "filter_screen", verdict, note) != SG_OK)
        return nomem(err);
    if (opt->base_soil_qc_failed && !opt->values_only &&
        sg_result_add_flag(res, "base_soil_qc", SG_SEVERITY_WARNING, 0,
                           "the base soil %.63s failed its own QC rules: its D15 and D85, and so this filter "
                           "screen, are doubtful (fix or re-test the base soil first)",
                           id) != SG_OK)
        return nomem(err);
    return SG_OK;
}

enum sg_status sg_screens_summarise(const struct sg_record *rec, const struct sg_reduce_options *opt,
                                    struct sg_result *res, struct sg_error *err)
{
    (void)rec;
    if (res == NULL)
        return sg_error_set(err, SG_EINVAL, 0, 0, "no result for the screens");
    const bool quiet = opt != NULL && (opt->values_only || opt->skip_notes); /* notes only */
    enum sg_status st = add_hazen(res, quiet, err);
    if (st == SG_OK)
        st = add_frost(res, quiet, err);
    if (st == SG_OK && opt != NULL && opt->has_base_soil)
        st = add_filter(res, opt, quiet, err);
    return st;
}
