/* qc.c - quality-control rules for a reduced run (METHODS.md 2.6, 3.7, 5.3,
 * 6.3). Each rule sets point bits and adds one named flag per run; the rule
 * table and its thresholds are documented in qc.h. */
#include "sedgrade/qc.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "sedgrade/record.h"
#include "sedgrade/reduce.h"
#include "sedgrade/result.h"
#include "sedgrade/sieve.h"

/* A value counts as beyond its limit only past this relative slack, so that a
 * value equal to the limit in its decimal form is not flagged by binary
 * rounding (e.g. 100 * 5 / 500 against 1.0). Common practice. */
#define QC_REL_SLACK 1e-9

/* Grams per litre from grams per millilitre. */
#define QC_ML_PER_L 1000.0

/* How many line numbers a flag message lists before "and N more". */
#define QC_LINES_LISTED 6

static const struct sg_qc_rule rules[] = {
    {"reynolds", SG_SEVERITY_WARNING, SG_PF_REYNOLDS, "particle Reynolds number above 0.2 on the curve",
     "METHODS.md 2.6 (IS 5282 summary 0.2; ISO 13317-4 0.25)"},
    {"brownian", SG_SEVERITY_WARNING, SG_PF_BROWNIAN, "Stokes diameter below 0.0002 mm",
     "METHODS.md 2.6 (ASTM D7928 scope, about 0.2 um)"},
    {"coarser_than_sieve", SG_SEVERITY_INFO, SG_PF_COARSER_THAN_SIEVE,
     "sedimentation diameter at or above the finest sieve (kept off the curve)", "METHODS.md 6.2, 6.3 #5"},
    {"concentration", SG_SEVERITY_WARNING, SG_PF_CONCENTRATION, "first reading above 50 g/L",
     "METHODS.md 2.6, 3.7 #7 (ASTM D422/D7928 about 50 g/L, from memory)"},
    {"not_falling", SG_SEVERITY_FAILURE, SG_PF_NOT_FALLING,
     "percent of specimen above an earlier reading's by more than 1.0 point",
     "METHODS.md 3.7 #3 (derived); tolerance common practice"},
    {"temperature_range", SG_SEVERITY_WARNING, SG_PF_TEMP_RANGE, "temperature outside 15-30 C",
     "common practice (ASTM D422 Table 3 covers 16-30 C, METHODS.md 2.2)"},
    {"temperature_drift", SG_SEVERITY_WARNING, SG_PF_TEMP_DRIFT,
     "temperature change above 1.0 C since the previous reading",
     "METHODS.md 3.7 #2 (from memory; AS 1289 +-1 C)"},
    {"off_scale", SG_SEVERITY_FAILURE, SG_PF_OFF_SCALE, "reading outside the hydrometer's registered scale",
     "common practice"},
    {"over_100", SG_SEVERITY_FAILURE, SG_PF_OVER_100, "percent finer above 101",
     "METHODS.md 3.7 #4 (derived); tolerance common practice"},
    {"negative", SG_SEVERITY_FAILURE, SG_PF_NEGATIVE, "percent finer below -1",
     "derived; tolerance common practice"},
    {"non_monotone", SG_SEVERITY_FAILURE, SG_PF_NON_MONOTONE,
     "curve point above a coarser point by more than 1.0 point", "METHODS.md 6.3 #1 (practice)"},
    {"junction_gap", SG_SEVERITY_WARNING, 0, "sieve/sedimentation gap above 5 points",
     "METHODS.md 6.3 #2 (practice)"},
    {"mass_balance", SG_SEVERITY_WARNING, 0,
     "sieve masses incl. pan differ from the sample (or fine sieves' from the specimen) mass by > 1 %",
     "METHODS.md 5.3 (EN 933-1 1 %, from memory)"},
};

size_t sg_qc_rule_count(void)
{
    return sizeof rules / sizeof rules[0];
}

const struct sg_qc_rule *sg_qc_rule_at(size_t i)
{
    return i < sg_qc_rule_count() ? &rules[i] : NULL;
}

const struct sg_qc_rule *sg_qc_rule_find(const char *name)
{
    for (size_t i = 0; name != NULL && i < sg_qc_rule_count(); i++)
        if (strcmp(rules[i].name, name) == 0)
            return &rules[i];
    return NULL;
}

const char *sg_qc_status_name(enum sg_severity worst, bool strict)
{
    if (worst == SG_SEVERITY_FAILURE || (strict && worst == SG_SEVERITY_WARNING))
        return "failed";
    return worst == SG_SEVERITY_WARNING ? "warning" : "ok";
}

const char *sg_qc_point_flag_name(enum sg_point_flag bit)
{
    switch (bit) {
    case SG_PF_REYNOLDS: return "reynolds";
    case SG_PF_BROWNIAN: return "brownian";
    case SG_PF_COARSER_THAN_SIEVE: return "coarser_than_sieve";
    case SG_PF_CONCENTRATION: return "concentration";
    case SG_PF_NOT_FALLING: return "not_falling";
    case SG_PF_TEMP_RANGE: return "temperature_range";
    case SG_PF_TEMP_DRIFT: return "temperature_drift";
    case SG_PF_OFF_SCALE: return "off_scale";
    case SG_PF_OVER_100: return "over_100";
    case SG_PF_NEGATIVE: return "negative";
    case SG_PF_NON_MONOTONE: return "non_monotone";
    case SG_PF_BLANK_EXTRAPOLATED: return "blank_extrapolated";
    }
    return "";
}

void sg_qc_point_flags_format(unsigned flags, char *buf, size_t size)
{
    if (size == 0)
        return;
    buf[0] = '\0';
    size_t used = 0;
    for (unsigned bit = 1; bit != 0 && bit <= flags; bit <<= 1) {
        if (!(flags & bit))
            continue;
        const char *name = sg_qc_point_flag_name((enum sg_point_flag)bit);
        if (name[0] == '\0')
            continue;
        const int n = snprintf(buf + used, size - used, "%s%s", used ? "|" : "", name);
        if (n < 0 || (size_t)n >= size - used) {
            buf[used] = '\0'; /* whole names only */
            break;
        }
        used += (size_t)n;
    }
}

struct sg_qc_limits sg_qc_limits_default(void)
{
    struct sg_qc_limits l = {
        .reynolds_max = 0.2,             /* METHODS.md 2.6: IS 5282 summary; ISO 13317-4 uses 0.25 */
        .diameter_min_mm = 0.0002,       /* METHODS.md 2.6: ASTM D7928 scope, about 0.2 um */
        .concentration_max_g_l = 50.0,   /* METHODS.md 2.6: ASTM D422/D7928, from memory */
        .temp_min_c = 15.0,              /* common practice */
        .temp_max_c = 30.0,              /* common practice */
        .temp_drift_max_c = 1.0,         /* METHODS.md 3.7 #2, from memory */
        .percent_tolerance = 1.0,        /* common practice */
        .monotone_tolerance_pct = 1.0,   /* common practice */
        .junction_gap_max_pct = 5.0,     /* METHODS.md 6.3 #2, practice */
        .mass_balance_max_pct = 1.0,     /* METHODS.md 5.3: EN 933-1, from memory */
        .strict = false,
    };
    return l;
}

/* value > limit, with the slack described at QC_REL_SLACK. */
static bool above(double value, double limit)
{
    return isfinite(value) && value > limit + QC_REL_SLACK * fmax(1.0, fabs(limit));
}

static bool below(double value, double limit)
{
    return isfinite(value) && value < limit - QC_REL_SLACK * fmax(1.0, fabs(limit));
}

static bool is_sedimentation(const struct sg_point *p)
{
    return p->source == SG_SOURCE_HYDROMETER || p->source == SG_SOURCE_PIPETTE;
}

/* The points one rule found: their count, lines, and the worst one. */
struct tally {
    size_t count;
    unsigned lines[QC_LINES_LISTED];
    double worst;         /* the value furthest past the limit */
    double worst_excess;  /* how far past; larger is worse */
    double worst_aux;     /* a second value of the worst point (rule-specific) */
    unsigned worst_line;
};

static void tally_init(struct tally *t)
{
    memset(t, 0, sizeof *t);
    t->worst = t->worst_aux = (double)NAN;
    t->worst_excess = -(double)INFINITY;
}

static void tally_add(struct tally *t, unsigned line, double value, double excess, double aux)
{
    if (t->count < QC_LINES_LISTED)
        t->lines[t->count] = line;
    t->count++;
    if (excess > t->worst_excess) {
        t->worst_excess = excess;
        t->worst = value;
        t->worst_aux = aux;
        t->worst_line = line;
    }
}

/* "1 point (line 12)", "3 points (lines 12, 14, 15)", "9 points (lines 1, ..., 6 and 3 more)". */
static void tally_where(const struct tally *t, const char *what, char *buf, size_t size)
{
    int n = snprintf(buf, size, "%zu %s%s (line%s", t->count, what, t->count == 1 ? "" : "s",
                     t->count == 1 ? "" : "s");
    size_t used = n > 0 ? (size_t)n : 0;
    const size_t listed = t->count < QC_LINES_LISTED ? t->count : QC_LINES_LISTED;
    for (size_t i = 0; i < listed && used < size; i++) {
        n = snprintf(buf + used, size - used, "%s%u", i ? ", " : " ", t->lines[i]);
        used += n > 0 ? (size_t)n : 0;
    }
    if (used < size) {
        if (t->count > listed)
            (void)snprintf(buf + used, size - used, " and %zu more)", t->count - listed);
        else
            (void)snprintf(buf + used, size - used, ")");
    }
}

/* Adds rule name's flag with its table severity. */
static enum sg_status flag(struct sg_result *res, const char *name, unsigned line, struct sg_error *err,
                           const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 5, 6)))
#endif
    ;

static enum sg_status flag(struct sg_result *res, const char *name, unsigned line, struct sg_error *err,
                           const char *fmt, ...)
{
    char msg[SG_FLAG_MSG_MAX];
    va_list ap;
    va_start(ap, fmt);
    (void)vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    const struct sg_qc_rule *rule = sg_qc_rule_find(name);
    const enum sg_severity sev = rule != NULL ? rule->severity : SG_SEVERITY_WARNING;
    if (sg_result_add_flag(res, name, sev, line, "%s", msg) != SG_OK)
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory adding the QC flag '%s'", name);
    return SG_OK;
}

/* Stokes range: Reynolds number above the laminar limit, diameter below the
 * Brownian limit (METHODS.md 2.6). Points off the curve (coarser than the
 * finest sieve, where the sieve data hold) carry the bit but raise no warning. */
static enum sg_status rule_stokes_range(const struct sg_qc_limits *lim, struct sg_result *res,
                                        struct sg_error *err)
{
    struct tally re, br, coarse;
    tally_init(&re);
    tally_init(&br);
    tally_init(&coarse);
    double finest_sieve_mm = (double)INFINITY;
    for (size_t i = 0; i < res->n_points; i++) {
        struct sg_point *p = &res->points[i];
        if (!is_sedimentation(p)) {
            if (isfinite(p->diameter_mm) && p->diameter_mm < finest_sieve_mm)
                finest_sieve_mm = p->diameter_mm;
            continue;
        }
        if (above(p->reynolds, lim->reynolds_max)) {
            p->flags |= SG_PF_REYNOLDS;
            if (p->on_curve)
                tally_add(&re, p->line, p->reynolds, p->reynolds, p->diameter_mm);
        }
        if (below(p->diameter_mm, lim->diameter_min_mm)) {
            p->flags |= SG_PF_BROWNIAN;
            tally_add(&br, p->line, p->diameter_mm, -p->diameter_mm, (double)NAN);
        }
        if (p->flags & SG_PF_COARSER_THAN_SIEVE)
            tally_add(&coarse, p->line, p->diameter_mm, p->diameter_mm, (double)NAN);
    }
    char where[96];
    enum sg_status st = SG_OK;
    if (re.count > 0) {
        tally_where(&re, "point", where, sizeof where);
        st = flag(res, "reynolds", re.worst_line, err,
                  "particle Reynolds number %.3g at %.3g mm is above %g, outside the laminar range of "
                  "Stokes' law; %s (treat those diameters as approximate)",
                  re.worst, re.worst_aux, lim->reynolds_max, where);
    }
    if (st == SG_OK && br.count > 0) {
        tally_where(&br, "point", where, sizeof where);
        st = flag(res, "brownian", br.worst_line, err,
                  "Stokes diameter %.3g mm is below %g mm, where Brownian motion disturbs settling; %s "
                  "(report those diameters as indicative only)",
                  br.worst, lim->diameter_min_mm, where);
    }
    if (st == SG_OK && coarse.count > 0) {
        tally_where(&coarse, "point", where, sizeof where);
        if (isfinite(finest_sieve_mm))
            st = flag(res, "coarser_than_sieve", coarse.lines[0], err,
                      "sedimentation diameters up to %.3g mm are not finer than the finest sieve (%g mm) and "
                      "are kept off the curve; %s (the sieve data cover that range)",
                      coarse.worst, finest_sieve_mm, where);
        else
            st = flag(res, "coarser_than_sieve", coarse.lines[0], err,
                      "sedimentation diameters up to %.3g mm are kept off the curve; %s", coarse.worst, where);
    }
    return st;
}

/* Free settling: the first reading's suspension concentration (METHODS.md
 * 2.6, 3.7 #7). Hydrometer: concentration at the effective depth; pipette:
 * net solids per litre sampled. */
static enum sg_status rule_concentration(const struct sg_constants *k, const struct sg_qc_limits *lim,
                                         struct sg_result *res, struct sg_error *err)
{
    for (size_t i = 0; i < res->n_points; i++) {
        struct sg_point *p = &res->points[i];
        if (!is_sedimentation(p))
            continue;
        double c_g_l = p->concentration_g_l;
        if (p->source == SG_SOURCE_PIPETTE)
            c_g_l = k != NULL && k->has_pipette_volume && k->pipette_volume_ml > 0.0
                        ? p->net_solids_g * QC_ML_PER_L / k->pipette_volume_ml
                        : (double)NAN;
        if (!above(c_g_l, lim->concentration_max_g_l))
            return SG_OK;
        p->flags |= SG_PF_CONCENTRATION;
        return flag(res, "concentration", p->line, err,
                    "suspension concentration %.3g g/L at the first reading is above %g g/L, too dense for "
                    "free settling (use a smaller specimen)",
                    c_g_l, lim->concentration_max_g_l);
    }
    return SG_OK;
}

/* Whether the run's sedimentation points are pipette samples (advice in the
 * messages names what a pipette test weighs, not a hydrometer's blank). */
static bool has_pipette(const struct sg_result *res)
{
    for (size_t i = 0; i < res->n_points; i++)
        if (res->points[i].source == SG_SOURCE_PIPETTE)
            return true;
    return false;
}

/* Sedimentation readings in time order: percent must fall, temperature stay
 * in range and steady, readings on the scale (METHODS.md 3.7 #2, #3). */
static enum sg_status rule_readings(const struct sg_constants *k, const struct sg_qc_limits *lim,
                                    struct sg_result *res, struct sg_error *err)
{
    const bool pipette = has_pipette(res);
    struct tally fall, range, drift, scale;
    tally_init(&fall);
    tally_init(&range);
    tally_init(&drift);
    tally_init(&scale);
    double min_pct = (double)INFINITY; /* lowest percent of specimen of the earlier readings */
    double prev_temp_c = (double)NAN;
    const bool has_scale = k != NULL && k->has_scale_range;
    for (size_t i = 0; i < res->n_points; i++) {
        struct sg_point *p = &res->points[i];
        if (!is_sedimentation(p))
            continue;
        if (isfinite(min_pct) && above(p->percent_specimen, min_pct + lim->monotone_tolerance_pct)) {
            p->flags |= SG_PF_NOT_FALLING;
            tally_add(&fall, p->line, p->percent_specimen, p->percent_specimen - min_pct,
                      p->percent_specimen - min_pct);
        }
        if (isfinite(p->percent_specimen))
            min_pct = fmin(min_pct, p->percent_specimen);
        if (below(p->temp_c, lim->temp_min_c) || above(p->temp_c, lim->temp_max_c)) {
            p->flags |= SG_PF_TEMP_RANGE;
            tally_add(&range, p->line, p->temp_c,
                      fmax(lim->temp_min_c - p->temp_c, p->temp_c - lim->temp_max_c), (double)NAN);
        }
        if (isfinite(prev_temp_c) && above(fabs(p->temp_c - prev_temp_c), lim->temp_drift_max_c)) {
            p->flags |= SG_PF_TEMP_DRIFT;
            tally_add(&drift, p->line, p->temp_c - prev_temp_c, fabs(p->temp_c - prev_temp_c), (double)NAN);
        }
        if (isfinite(p->temp_c))
            prev_temp_c = p->temp_c;
        if (has_scale && p->source == SG_SOURCE_HYDROMETER &&
            (below(p->reading, k->scale_min) || above(p->reading, k->scale_max))) {
            p->flags |= SG_PF_OFF_SCALE;
            tally_add(&scale, p->line, p->reading, fmax(k->scale_min - p->reading, p->reading - k->scale_max),
                      (double)NAN);
        }
    }
    char where[96];
    enum sg_status st = SG_OK;
    if (fall.count > 0) {
        tally_where(&fall, "reading", where, sizeof where);
        st = flag(res, "not_falling", fall.worst_line, err,
                  "percent of specimen %.4g %% is %.3g points above an earlier %s, but it must fall "
                  "with time (noise tolerance %g); %s (%s)",
                  fall.worst, fall.worst_aux, pipette ? "sample's" : "reading's", lim->monotone_tolerance_pct, where,
                  pipette ? "check those samples' solids weighings, the sampling depth and the temperature"
                          : "check those readings, the blank and the temperature");
    }
    if (st == SG_OK && range.count > 0) {
        tally_where(&range, "reading", where, sizeof where);
        st = flag(res, "temperature_range", range.worst_line, err,
                  "temperature %.3g C is outside the lab's range %g-%g C; %s (check the bath or the room "
                  "temperature)",
                  range.worst, lim->temp_min_c, lim->temp_max_c, where);
    }
    if (st == SG_OK && drift.count > 0) {
        tally_where(&drift, "reading", where, sizeof where);
        st = flag(res, "temperature_drift", drift.worst_line, err,
                  "temperature changed by %+.3g C since the previous reading, more than %g C; %s (keep the "
                  "cylinders in a constant-temperature bath)",
                  drift.worst, lim->temp_drift_max_c, where);
    }
    if (st == SG_OK && scale.count > 0) {
        tally_where(&scale, "reading", where, sizeof where);
        st = flag(res, "off_scale", scale.worst_line, err,
                  "reading %g is outside the hydrometer's scale %g to %g; %s (a value off the graduation "
                  "cannot have been read: check the record)",
                  scale.worst, k->scale_min, k->scale_max, where);
    }
    return st;
}

/* Percent finer within 0..100 (METHODS.md 3.7 #4), both of the whole sample
 * and of the sedimentation specimen. */
static enum sg_status rule_percent_range(const struct sg_qc_limits *lim, struct sg_result *res,
                                         struct sg_error *err)
{
    const double hi = 100.0 + lim->percent_tolerance, lo = -lim->percent_tolerance;
    struct tally over, neg;
    tally_init(&over);
    tally_init(&neg);
    for (size_t i = 0; i < res->n_points; i++) {
        struct sg_point *p = &res->points[i];
        const double pf = p->percent_finer, ps = p->percent_specimen;
        /* The specimen's percent is the larger one below the split sieve. */
        const bool specimen_top = isfinite(ps) && (!isfinite(pf) || ps > pf);
        const double top = specimen_top ? ps : pf;
        if (above(top, hi)) {
            p->flags |= SG_PF_OVER_100;
            tally_add(&over, p->line, top, top, specimen_top ? 1.0 : 0.0);
        }
        const double bottom = isfinite(ps) && (!isfinite(pf) || ps < pf) ? ps : pf;
        if (below(bottom, lo)) {
            p->flags |= SG_PF_NEGATIVE;
            tally_add(&neg, p->line, bottom, -bottom, (double)NAN);
        }
    }
    char where[96];
    enum sg_status st = SG_OK;
    if (over.count > 0) {
        tally_where(&over, "point", where, sizeof where);
        st = flag(res, "over_100", over.worst_line, err,
                  "percent finer %.4g %% (of the %s) is above 100 %% by more than %g; %s (check the specimen "
                  "mass, %s)",
                  over.worst, over.worst_aux > 0.0 ? "specimen" : "sample", lim->percent_tolerance, where,
                  has_pipette(res) ? "the pipette volume and the solids weighings"
                                   : "the particle density and the blank reading");
    }
    if (st == SG_OK && neg.count > 0) {
        tally_where(&neg, "point", where, sizeof where);
        st = flag(res, "negative", neg.worst_line, err, "percent finer %.4g %% is below 0 by more than %g; %s (%s)",
                  neg.worst, lim->percent_tolerance, where,
                  has_pipette(res) ? "check the solids weighings and the dispersant mass, which is subtracted"
                                   : "check the blank (composite) reading");
    }
    return st;
}

struct curve_pt {
    double d_mm;
    double pct;
    size_t index;
};

/* Coarsest first, then in point order (a total order: any sort gives it). */
static bool goes_after(const struct curve_pt *x, const struct curve_pt *y)
{
    if (x->d_mm != y->d_mm)
        return x->d_mm < y->d_mm;
    return x->index > y->index;
}

/* Curve points checked without a heap allocation (a record has a few dozen). */
#define MONOTONE_ON_STACK 64

/* The curve's points must not rise as the diameter falls (METHODS.md 6.3
 * #1): each point is compared with the lowest percent of the strictly coarser
 * points. Points at equal diameters (a sieve and a fine sieve of one
 * aperture) are not compared with each other. */
static enum sg_status rule_monotone(const struct sg_qc_limits *lim, struct sg_result *res, struct sg_error *err)
{
    size_t n = 0;
    for (size_t i = 0; i < res->n_points; i++)
        n += res->points[i].on_curve && isfinite(res->points[i].diameter_mm) &&
             isfinite(res->points[i].percent_finer);
    if (n < 2)
        return SG_OK;
    struct curve_pt local[MONOTONE_ON_STACK];
    struct curve_pt *cp = n <= MONOTONE_ON_STACK ? local : malloc(n * sizeof *cp);
    if (cp == NULL)
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory checking the curve (%zu points)", n);
    /* insertion sort: the points come coarse to fine per source, so nearly
     * every point goes straight to the end */
    size_t m = 0;
    for (size_t i = 0; i < res->n_points; i++) {
        const struct sg_point *p = &res->points[i];
        if (!(p->on_curve && isfinite(p->diameter_mm) && isfinite(p->percent_finer)))
            continue;
        const struct curve_pt c = {p->diameter_mm, p->percent_finer, i};
        size_t j = m++;
        while (j > 0 && goes_after(&cp[j - 1], &c)) {
            cp[j] = cp[j - 1];
            j--;
        }
        cp[j] = c;
    }
    struct tally rise;
    tally_init(&rise);
    double min_coarser = (double)INFINITY;
    for (size_t i = 0; i < n;) {
        size_t j = i; /* [i, j) share one diameter */
        while (j < n && cp[j].d_mm == cp[i].d_mm)
            j++;
        double group_min = (double)INFINITY;
        for (size_t g = i; g < j; g++) {
            struct sg_point *p = &res->points[cp[g].index];
            if (isfinite(min_coarser) && above(cp[g].pct, min_coarser + lim->monotone_tolerance_pct)) {
                p->flags |= SG_PF_NON_MONOTONE;
                tally_add(&rise, p->line, cp[g].pct, cp[g].pct - min_coarser, cp[g].d_mm);
            }
            group_min = fmin(group_min, cp[g].pct);
        }
        min_coarser = fmin(min_coarser, group_min);
        i = j;
    }
    if (cp != local)
        free(cp);
    if (rise.count == 0)
        return SG_OK;
    char where[96];
    tally_where(&rise, "point", where, sizeof where);
    return flag(res, "non_monotone", rise.worst_line, err,
                "the curve rises to %.4g %% at %.3g mm, %.3g points above a coarser point (noise tolerance %g); %s "
                "(check the splice: specimen mass, split sieve percentage, dispersion)",
                rise.worst, rise.worst_aux, rise.worst_excess, lim->monotone_tolerance_pct, where);
}

/* Junction gap between the sieve and sedimentation curves, measured by the
 * summary (quantity junction_gap_pct; METHODS.md 6.3 #2). */
static enum sg_status rule_junction(const struct sg_qc_limits *lim, struct sg_result *res, struct sg_error *err)
{
    const struct sg_quantity *q = sg_result_quantity(res, "junction_gap_pct");
    if (q == NULL || !q->determined || q->is_text || !above(fabs(q->value), lim->junction_gap_max_pct))
        return SG_OK;
    return flag(res, "junction_gap", 0, err,
                "the sedimentation curve differs from the sieve curve by %.3g points at the junction, more "
                "than %g (check dispersion, particle density and the split sieve percentage)",
                q->value, lim->junction_gap_max_pct);
}

/* Adds or overwrites a numeric or undetermined quantity. */
static enum sg_status set_value(struct sg_result *res, const char *name, const char *unit, double value,
                                const char *note, struct sg_error *err)
{
    struct sg_quantity *q = sg_result_quantity(res, name);
    enum sg_status st = SG_OK;
    if (q == NULL) {
        st = isfinite(value) ? sg_result_add_value(res, name, unit, value, note)
                             : sg_result_add_undetermined(res, name, unit, note);
    } else {
        q->is_text = false;
        q->determined = isfinite(value);
        q->value = value;
        (void)snprintf(q->note, sizeof q->note, "%s", note);
    }
    if (st != SG_OK)
        return sg_error_set(err, st, 0, 0, "out of memory adding the quantity '%s'", name);
    return SG_OK;
}

static enum sg_status set_text(struct sg_result *res, const char *name, const char *text, const char *note,
                               struct sg_error *err)
{
    struct sg_quantity *q = sg_result_quantity(res, name);
    if (q == NULL) {
        if (sg_result_add_text(res, name, text, note) != SG_OK)
            return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory adding the quantity '%s'", name);
        return SG_OK;
    }
    q->is_text = true;
    q->determined = text[0] != '\0';
    (void)snprintf(q->text, sizeof q->text, "%s", text);
    (void)snprintf(q->note, sizeof q->note, "%s", note);
    return SG_OK;
}

/* The mass balance of sieve rows against mass_g: whether a pan is among
 * them (else nothing to balance), the sum retained including the pan, and
 * the loss in percent of mass_g (negative: a gain), 0 when exact to the
 * masses' own digits rather than the round-off of summing them (e.g.
 * -1.2e-14 %). */
static bool balance(const struct sg_sieve_row *rows, size_t n, double mass_g, double *total_g, double *loss_pct)
{
    bool has_pan = false;
    for (size_t i = 0; i < n; i++)
        has_pan |= rows[i].aperture_mm <= SG_SIEVE_PAN_MM;
    *total_g = sg_sieve_total_retained(rows, n);
    double loss_g = mass_g - *total_g;
    if (fabs(loss_g) <= 1e-9 * mass_g)
        loss_g = 0.0;
    *loss_pct = 100.0 * loss_g / mass_g;
    return has_pan;
}

/* Sieve mass balance (METHODS.md 5.3): only when a pan was weighed. The
 * quantity sieve_loss_pct is always added (undetermined without a pan) so
 * that batch summaries keep one set of columns. */
static enum sg_status rule_mass_balance(const struct sg_record *rec, const struct sg_qc_limits *lim,
                                        struct sg_result *res, struct sg_error *err)
{
    if (rec == NULL || rec->n_sieve == 0)
        return set_value(res, "sieve_loss_pct", "%", (double)NAN, "no sieve rows", err);
    double total_g = 0.0, loss_pct = 0.0;
    if (!(rec->sample_dry_mass_g > 0.0) ||
        !balance(rec->sieve, rec->n_sieve, rec->sample_dry_mass_g, &total_g, &loss_pct))
        return set_value(res, "sieve_loss_pct", "%", (double)NAN,
                         "no pan row: the fines washed through were not weighed, so no mass balance", err);
    enum sg_status st = set_value(res, "sieve_loss_pct", "%", loss_pct,
                                  "100 (sample dry mass - sum retained incl. pan) / sample dry mass; "
                                  "negative: a gain (METHODS.md 5.3)",
                                  err);
    if (st != SG_OK || !above(fabs(loss_pct), lim->mass_balance_max_pct))
        return st;
    return flag(res, "mass_balance", rec->pos_sample_mass.line, err,
                "sieve masses including the pan sum to %.5g g, %.3g %% %s the sample's dry mass %.5g g, "
                "beyond %g %% (reweigh the fractions or repeat the sieving)",
                total_g, fabs(loss_pct), loss_pct > 0.0 ? "less than" : "more than", rec->sample_dry_mass_g,
                lim->mass_balance_max_pct);
}

/* The specimen's fine sieving (METHODS.md 5.3, as for the sample): when its
 * pan (the fines washed through, weighed or by difference) is given, the
 * fine-sieve masses with the pan must make up the specimen's dry mass. A
 * mass_balance flag, like the sample's; no summary row of its own. */
static enum sg_status rule_fine_mass_balance(const struct sg_record *rec, const struct sg_qc_limits *lim,
                                             struct sg_result *res, struct sg_error *err)
{
    if (rec == NULL || rec->n_fine_sieve == 0 || !(rec->specimen_dry_mass_g > 0.0))
        return SG_OK;
    double total_g = 0.0, loss_pct = 0.0;
    if (!balance(rec->fine_sieve, rec->n_fine_sieve, rec->specimen_dry_mass_g, &total_g, &loss_pct) ||
        !above(fabs(loss_pct), lim->mass_balance_max_pct))
        return SG_OK;
    return flag(res, "mass_balance", rec->pos_specimen_mass.line, err,
                "fine-sieve masses of the specimen including the pan sum to %.5g g, %.3g %% %s the specimen's "
                "dry mass %.5g g, beyond %g %% (reweigh the fractions, or give the pan as the specimen's mass "
                "minus the sum retained)",
                total_g, fabs(loss_pct), loss_pct > 0.0 ? "less than" : "more than", rec->specimen_dry_mass_g,
                lim->mass_balance_max_pct);
}

enum sg_status sg_qc_summarise(const struct sg_qc_limits *lim, struct sg_result *res, struct sg_error *err)
{
    struct sg_qc_limits def;
    if (lim == NULL) {
        def = sg_qc_limits_default();
        lim = &def;
    }
    char names[SG_QTEXT_MAX];
    size_t used = 0;
    bool truncated = false;
    names[0] = '\0';
    for (size_t i = 0; i < res->n_flags; i++) {
        bool seen = false;
        for (size_t j = 0; j < i && !seen; j++)
            seen = strcmp(res->flags[j].name, res->flags[i].name) == 0;
        if (seen)
            continue;
        const size_t sep = used ? 1 : 0, len = strlen(res->flags[i].name);
        if (sep + len >= sizeof names - used) { /* whole names only */
            names[used] = '\0';
            truncated = true;
            break;
        }
        if (sep)
            names[used] = '|';
        memcpy(names + used + sep, res->flags[i].name, len + 1);
        used += sep + len;
    }
    const enum sg_severity worst = sg_result_worst(res);
    char note[SG_QNOTE_MAX];
    const char *wname = res->n_flags ? sg_severity_name(worst) : "none";
    const char *tail = lim->strict ? "; strict: warnings count as failures" : "; warnings fail only with --strict";
    /* "worst QC flag: <name><tail>", well within the note's size */
    const size_t lw = strlen(wname), lt = strlen(tail);
    memcpy(note, "worst QC flag: ", 15);
    memcpy(note + 15, wname, lw);
    memcpy(note + 15 + lw, tail, lt + 1);
    enum sg_status st = set_text(res, "qc_status", sg_qc_status_name(worst, lim->strict), note, err);
    if (st != SG_OK)
        return st;
    return set_text(res, "qc_flags", names,
                    truncated ? "QC flag names, '|' separated (list truncated: see the flags in the report)"
                    : used ? "QC flag names, '|' separated (messages in the report)"
                           : "no QC flags",
                    err);
}

enum sg_status sg_qc_evaluate(const struct sg_record *rec, const struct sg_constants *k,
                              const struct sg_qc_limits *lim, struct sg_result *res, struct sg_error *err)
{
    struct sg_qc_limits def;
    if (lim == NULL) {
        def = sg_qc_limits_default();
        lim = &def;
    }
    enum sg_status st = rule_stokes_range(lim, res, err);
    if (st == SG_OK)
        st = rule_concentration(k, lim, res, err);
    if (st == SG_OK)
        st = rule_readings(k, lim, res, err);
    if (st == SG_OK)
        st = rule_percent_range(lim, res, err);
    if (st == SG_OK)
        st = rule_monotone(lim, res, err);
    if (st == SG_OK)
        st = rule_junction(lim, res, err);
    if (st == SG_OK)
        st = rule_mass_balance(rec, lim, res, err);
    if (st == SG_OK)
        st = rule_fine_mass_balance(rec, lim, res, err);
    if (st == SG_OK)
        st = sg_qc_summarise(lim, res, err);
    return st;
}
