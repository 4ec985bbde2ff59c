/* calib.c - calibration register core: fits of raw calibration observations
 * (GSL least squares), acceptance decisions, the entry in force on a date and
 * an instrument's status (METHODS.md 3.3, 3.4, 10; doc/register.md). */
#include "sedgrade/calib.h"

#include <gsl/gsl_errno.h>
#include <gsl/gsl_fit.h>
#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "sedgrade/constants.h"
#include "sedgrade/water.h"

/* ---- names -------------------------------------------------------------- */

static const char *const kind_names[] = {"", "hydrometer", "cylinder", "thermometer", "pipette"};
static const char *const event_names[] = {"calibration", "verification",   "adjustment", "repair",
                                          "out_of_service", "retirement", "relocation"};
static const char *const part_names[] = {"depth", "meniscus", "blank", "scale", "area", "volume", "offset"};
static const char *const obs_names[] = {"bulb_volume_ml", "bulb_length_mm", "neck_mm",  "meniscus",
                                        "blank",          "scale_ref",      "scale_liquid", "graduation",
                                        "delivery",       "ice_point",      "comparison"};
static const char *const state_names[] = {"in_service", "due_soon", "overdue", "out_of_service", "retired"};

static const enum sg_cal_part obs_part[] = {
    SG_CAL_PART_DEPTH, SG_CAL_PART_DEPTH, SG_CAL_PART_DEPTH, SG_CAL_PART_MENISCUS,
    SG_CAL_PART_BLANK, SG_CAL_PART_SCALE, SG_CAL_PART_SCALE, SG_CAL_PART_AREA,
    SG_CAL_PART_VOLUME, SG_CAL_PART_OFFSET, SG_CAL_PART_OFFSET};

const char *sg_cal_kind_name(enum sg_cal_kind k)
{
    return (unsigned)k < sizeof kind_names / sizeof kind_names[0] ? kind_names[k] : "";
}

const char *sg_cal_event_type_name(enum sg_cal_event_type t)
{
    return (unsigned)t < sizeof event_names / sizeof event_names[0] ? event_names[t] : "";
}

const char *sg_cal_part_name(enum sg_cal_part p)
{
    return (unsigned)p < sizeof part_names / sizeof part_names[0] ? part_names[p] : "";
}

const char *sg_cal_obs_name(enum sg_cal_obs_kind k)
{
    return (unsigned)k < sizeof obs_names / sizeof obs_names[0] ? obs_names[k] : "";
}

const char *sg_cal_state_name(enum sg_cal_state s)
{
    return (unsigned)s < sizeof state_names / sizeof state_names[0] ? state_names[s] : "";
}

bool sg_cal_kind_parse(const char *text, enum sg_cal_kind *out)
{
    for (size_t i = 1; i < sizeof kind_names / sizeof kind_names[0]; i++)
        if (strcmp(text, kind_names[i]) == 0) {
            *out = (enum sg_cal_kind)i;
            return true;
        }
    return false;
}

bool sg_cal_event_type_parse(const char *text, enum sg_cal_event_type *out)
{
    for (size_t i = 0; i < sizeof event_names / sizeof event_names[0]; i++)
        if (strcmp(text, event_names[i]) == 0) {
            *out = (enum sg_cal_event_type)i;
            return true;
        }
    return false;
}

bool sg_cal_obs_parse(const char *text, enum sg_cal_obs_kind *out)
{
    for (size_t i = 0; i < sizeof obs_names / sizeof obs_names[0]; i++)
        if (strcmp(text, obs_names[i]) == 0) {
            *out = (enum sg_cal_obs_kind)i;
            return true;
        }
    return false;
}

enum sg_cal_part sg_cal_obs_part(enum sg_cal_obs_kind k)
{
    return (unsigned)k < SG_CAL_OBS_COUNT ? obs_part[k] : SG_CAL_PART_COUNT;
}

enum sg_cal_kind sg_cal_part_kind(enum sg_cal_part p)
{
    switch (p) {
    case SG_CAL_PART_DEPTH:
    case SG_CAL_PART_MENISCUS:
    case SG_CAL_PART_BLANK:
    case SG_CAL_PART_SCALE: return SG_CAL_HYDROMETER;
    case SG_CAL_PART_AREA: return SG_CAL_CYLINDER;
    case SG_CAL_PART_VOLUME: return SG_CAL_PIPETTE;
    case SG_CAL_PART_OFFSET: return SG_CAL_THERMOMETER;
    case SG_CAL_PART_COUNT: break;
    }
    return SG_CAL_KIND_NONE;
}

bool sg_cal_part_required(enum sg_cal_part p)
{
    return p != SG_CAL_PART_BLANK && p != SG_CAL_PART_SCALE && p < SG_CAL_PART_COUNT;
}

bool sg_cal_event_is_entry(enum sg_cal_event_type t)
{
    return t == SG_CAL_EV_CALIBRATION || t == SG_CAL_EV_VERIFICATION;
}

unsigned sg_cal_event_parts(const struct sg_cal_event *ev)
{
    unsigned bits = 0;
    for (size_t i = 0; i < ev->n_obs; i++) {
        const enum sg_cal_part p = sg_cal_obs_part(ev->obs[i].kind);
        if (p < SG_CAL_PART_COUNT)
            bits |= 1u << p;
    }
    return bits;
}

/* ---- lifecycle ---------------------------------------------------------- */

void sg_cal_event_init(struct sg_cal_event *ev)
{
    memset(ev, 0, sizeof *ev);
    ev->water_temp_c = (double)NAN;
    ev->air_density_g_ml = (double)NAN;
    ev->weights_density_g_ml = (double)NAN;
    ev->expansion_per_k = (double)NAN;
}

void sg_cal_event_release(struct sg_cal_event *ev)
{
    if (ev == NULL)
        return;
    free(ev->obs);
    sg_cal_event_init(ev);
}

void sg_cal_instrument_init(struct sg_cal_instrument *ins)
{
    memset(ins, 0, sizeof *ins);
}

void sg_cal_instrument_release(struct sg_cal_instrument *ins)
{
    if (ins == NULL)
        return;
    for (size_t i = 0; i < ins->n_events; i++)
        sg_cal_event_release(&ins->events[i]);
    free(ins->events);
    sg_cal_instrument_init(ins);
}

enum sg_status sg_cal_instrument_add_event(struct sg_cal_instrument *ins, struct sg_cal_event *ev,
                                           struct sg_error *err)
{
    if (ins->n_events >= SG_CAL_EVENTS_MAX)
        return sg_error_set(err, SG_ELIMIT, ev->line, 1,
                            "more than %d events for one instrument (start a new register file for it)",
                            SG_CAL_EVENTS_MAX);
    if (ins->n_events == ins->cap_events) {
        const size_t cap = ins->cap_events ? 2 * ins->cap_events : 8;
        struct sg_cal_event *p = realloc(ins->events, cap * sizeof *p);
        if (p == NULL)
            return sg_error_set(err, SG_ENOMEM, ev->line, 1, "out of memory reading the register");
        ins->events = p;
        ins->cap_events = cap;
    }
    ins->events[ins->n_events++] = *ev;
    sg_cal_event_init(ev);
    return SG_OK;
}

enum sg_status sg_cal_event_add_obs(struct sg_cal_event *ev, struct sg_cal_obs obs, struct sg_error *err)
{
    if (ev->n_obs == ev->cap_obs) {
        const size_t cap = ev->cap_obs ? 2 * ev->cap_obs : 16;
        struct sg_cal_obs *p = realloc(ev->obs, cap * sizeof *p);
        if (p == NULL)
            return sg_error_set(err, SG_ENOMEM, obs.pos.line, obs.pos.col, "out of memory reading the register");
        ev->obs = p;
        ev->cap_obs = cap;
    }
    ev->obs[ev->n_obs++] = obs;
    return SG_OK;
}

/* ---- elementary fits and conversions -------------------------------------- */

enum sg_status sg_cal_fit_line(const double *x, const double *y, size_t n, struct sg_cal_line *line,
                               double *residual, struct sg_error *err)
{
    memset(line, 0, sizeof *line);
    if (n < 2)
        return sg_error_set(err, SG_EINVAL, 0, 0, "a straight line needs at least 2 points, got %zu", n);
    bool distinct = false;
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(x[i]) || !isfinite(y[i]))
            return sg_error_set(err, SG_EINVAL, 0, 0, "point %zu (%g, %g) is not a finite number", i + 1, x[i],
                                y[i]);
        if (x[i] != x[0])
            distinct = true;
    }
    if (!distinct)
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "all %zu points share x = %g: a line needs at least two different values", n, x[0]);
    double c0 = 0.0, c1 = 0.0, cov00 = 0.0, cov01 = 0.0, cov11 = 0.0, sumsq = 0.0;
    const int gs = gsl_fit_linear(x, 1, y, 1, n, &c0, &c1, &cov00, &cov01, &cov11, &sumsq);
    if (gs != GSL_SUCCESS || !isfinite(c0) || !isfinite(c1))
        return sg_error_set(err, SG_ENUMERIC, 0, 0, "least-squares line failed: %s", gsl_strerror(gs));
    line->c0 = c0;
    line->c1 = c1;
    line->n = n;
    line->sumsq = sumsq;
    if (n > 2) {
        line->cov00 = cov00;
        line->cov01 = cov01;
        line->cov11 = cov11;
        line->s = sqrt(sumsq / (double)(n - 2));
    }
    if (residual != NULL)
        for (size_t i = 0; i < n; i++)
            residual[i] = y[i] - (c0 + c1 * x[i]);
    return SG_OK;
}

double sg_cal_line_eval(const struct sg_cal_line *line, double x)
{
    return line->c0 + line->c1 * x;
}

double sg_cal_line_u(const struct sg_cal_line *line, double x)
{
    const double v = line->cov00 + 2.0 * x * line->cov01 + x * x * line->cov11;
    return v > 0.0 ? sqrt(v) : 0.0;
}

/* 1 mL = 1000 mm3. */
#define MM3_PER_ML 1000.0

double sg_cal_depth_rise_term_mm(double bulb_volume_ml, double bulb_length_mm, double area_mm2)
{
    if (!(bulb_volume_ml > 0.0) || !(bulb_length_mm > 0.0) || !(area_mm2 > 0.0) || !isfinite(area_mm2))
        return (double)NAN;
    return 0.5 * (bulb_length_mm - MM3_PER_ML * bulb_volume_ml / area_mm2);
}

double sg_cal_pipette_z_ml_g(double temp_c, double air_density_g_ml, double weights_density_g_ml)
{
    if (!(temp_c >= SG_WATER_TEMP_MIN_C && temp_c <= SG_WATER_TEMP_MAX_C) || !(air_density_g_ml >= 0.0) ||
        !(weights_density_g_ml > 0.0))
        return (double)NAN;
    const double rho_w = sg_water_density_kg_m3(temp_c) / 1000.0; /* kg/m3 -> g/mL */
    if (!(rho_w > air_density_g_ml))
        return (double)NAN;
    return (1.0 / (rho_w - air_density_g_ml)) * (1.0 - air_density_g_ml / weights_density_g_ml);
}

double sg_cal_pipette_volume_ml(double mass_g, double temp_c, double air_density_g_ml,
                                double weights_density_g_ml, double expansion_per_k)
{
    const double z = sg_cal_pipette_z_ml_g(temp_c, air_density_g_ml, weights_density_g_ml);
    if (!isfinite(z) || !(mass_g > 0.0) || !isfinite(expansion_per_k))
        return (double)NAN;
    return mass_g * z * (1.0 - expansion_per_k * (temp_c - SG_CAL_GLASS_REF_TEMP_C));
}

double sg_cal_scale_reference(enum sg_scale scale, double rho_g_ml)
{
    if (!(rho_g_ml > 0.0) || !isfinite(rho_g_ml))
        return (double)NAN;
    switch (scale) {
    case SG_SCALE_DENSITY:
        return (rho_g_ml - 1.0) * 1000.0;
    case SG_SCALE_G_PER_L: {
        const double rho_ref = sg_water_density_kg_m3(SG_HYDROMETER_REF_TEMP_C) / 1000.0;
        const double gs = SG_GL_SCALE_BASIS_GS;
        return (rho_g_ml / rho_ref - 1.0) * 1000.0 * gs / (gs - 1.0);
    }
    case SG_SCALE_NONE: break;
    }
    return (double)NAN;
}

/* ---- limits ---------------------------------------------------------------- */

struct limit_def {
    const char *name;
    enum sg_cal_part part;
    bool required; /* the part cannot be decided without it */
    const char *unit;
};

static const struct limit_def limit_defs[] = {
    {"depth_residual_mm", SG_CAL_PART_DEPTH, true, "mm"},
    {"meniscus_spread", SG_CAL_PART_MENISCUS, true, "reading units"},
    {"meniscus_max", SG_CAL_PART_MENISCUS, false, "reading units"},
    {"blank_residual", SG_CAL_PART_BLANK, true, "reading units"},
    {"scale_error_max", SG_CAL_PART_SCALE, true, "reading units"},
    {"graduation_residual_mm", SG_CAL_PART_AREA, true, "mm"},
    {"volume_error_ml", SG_CAL_PART_VOLUME, true, "mL"},
    {"volume_sd_ml", SG_CAL_PART_VOLUME, false, "mL"},
    {"correction_max_c", SG_CAL_PART_OFFSET, true, "C"},
    {"residual_max_c", SG_CAL_PART_OFFSET, false, "C"},
};
#define N_LIMIT_DEFS (sizeof limit_defs / sizeof limit_defs[0])

static const struct limit_def *limit_def_find(const char *name)
{
    for (size_t i = 0; i < N_LIMIT_DEFS; i++)
        if (strcmp(limit_defs[i].name, name) == 0)
            return &limit_defs[i];
    return NULL;
}

static const struct sg_cal_limit *event_limit(const struct sg_cal_event *ev, const char *name)
{
    for (size_t i = 0; i < ev->n_limits; i++)
        if (strcmp(ev->limits[i].name, name) == 0)
            return &ev->limits[i];
    return NULL;
}

/* Appends "; <text>" (or <text>) to the decision. */
static void decision_add(struct sg_cal_result *res, const char *what, double value, const char *unit,
                         const struct sg_cal_limit *lim)
{
    const bool ok = value <= lim->value;
    if (!ok)
        res->accepted = false;
    const size_t len = strlen(res->decision);
    (void)snprintf(res->decision + len, sizeof res->decision - len, "%s%s %.4g %s %s %s %.4g",
                   len ? "; " : "", what, value, unit, ok ? "<=" : ">", lim->name, lim->value);
}

/* Prefixes the decision with accepted/rejected once all limits are checked. */
static void decision_close(struct sg_cal_result *res)
{
    char body[sizeof res->decision];
    (void)snprintf(body, sizeof body, "%s", res->decision);
    (void)snprintf(res->decision, sizeof res->decision, "%s: %.225s", res->accepted ? "accepted" : "rejected",
                   body);
}

/* ---- evaluation of one part ------------------------------------------------- */

static double max_abs(const double *v, size_t n)
{
    double m = 0.0;
    for (size_t i = 0; i < n; i++)
        if (fabs(v[i]) > m)
            m = fabs(v[i]);
    return m;
}

static void range_of(const double *v, size_t n, double *lo, double *hi)
{
    *lo = (double)INFINITY;
    *hi = -(double)INFINITY;
    for (size_t i = 0; i < n; i++) {
        if (v[i] < *lo)
            *lo = v[i];
        if (v[i] > *hi)
            *hi = v[i];
    }
}

/* Gathers the observations of the given kinds into res->x/y. */
static enum sg_status gather(const struct sg_cal_event *ev, enum sg_cal_obs_kind k1, enum sg_cal_obs_kind k2,
                             struct sg_cal_result *res, struct sg_error *err)
{
    res->n = 0;
    for (size_t i = 0; i < ev->n_obs; i++) {
        const struct sg_cal_obs *o = &ev->obs[i];
        if (o->kind != k1 && o->kind != k2)
            continue;
        if (res->n >= SG_CAL_OBS_MAX)
            return sg_error_set(err, SG_ELIMIT, o->pos.line, o->pos.col,
                                "more than %d '%s' observations in one event (split them over two events)",
                                SG_CAL_OBS_MAX, sg_cal_obs_name(o->kind));
        res->x[res->n] = o->x;
        res->y[res->n] = o->y;
        res->n++;
    }
    return SG_OK;
}

static double mean_of(const struct sg_cal_event *ev, enum sg_cal_obs_kind kind, size_t *count)
{
    double sum = 0.0;
    size_t n = 0;
    for (size_t i = 0; i < ev->n_obs; i++)
        if (ev->obs[i].kind == kind) {
            sum += ev->obs[i].x;
            n++;
        }
    *count = n;
    return n ? sum / (double)n : (double)NAN;
}

static enum sg_status too_few(const struct sg_cal_event *ev, struct sg_error *err, const char *part, size_t need,
                              const char *row, size_t got)
{
    return sg_error_set(err, SG_EINVAL, ev->line, 1,
                        "the %s calibration needs at least %zu '%s' rows, this event has %zu (add the missing "
                        "observations)",
                        part, need, row, got);
}

/* Fits a line and translates a failure into a located message. */
static enum sg_status fit_part(const struct sg_cal_event *ev, struct sg_cal_result *res, const char *what,
                               struct sg_error *err)
{
    struct sg_error e;
    sg_error_clear(&e);
    const enum sg_status st = sg_cal_fit_line(res->x, res->y, res->n, &res->line, res->residual, &e);
    if (st != SG_OK)
        return sg_error_set(err, st, ev->line, 1, "%s: %s (check the observation rows)", what, e.msg);
    return SG_OK;
}

static double resolution_var(const struct sg_cal_instrument *ins)
{
    /* Rectangular distribution of half-width half a division: u^2 = d^2/12 (GUM 4.3.7). */
    return ins->has_division ? ins->division * ins->division / 12.0 : 0.0;
}

static enum sg_status eval_depth(const struct sg_cal_instrument *ins, const struct sg_cal_event *ev,
                                 double area_mm2, struct sg_cal_result *res, struct sg_error *err)
{
    size_t nv = 0, nh = 0;
    (void)ins;
    res->bulb_volume_ml = mean_of(ev, SG_CAL_OBS_BULB_VOLUME, &nv);
    res->bulb_length_mm = mean_of(ev, SG_CAL_OBS_BULB_LENGTH, &nh);
    if (nv == 0)
        return too_few(ev, err, "depth", 1, "bulb_volume_ml", 0);
    if (nh == 0)
        return too_few(ev, err, "depth", 1, "bulb_length_mm", 0);
    enum sg_status st = gather(ev, SG_CAL_OBS_NECK, SG_CAL_OBS_NECK, res, err);
    if (st != SG_OK)
        return st;
    if (res->n < 3)
        return too_few(ev, err, "depth", 3, "neck_mm", res->n);
    if ((st = fit_part(ev, res, "depth line", err)) != SG_OK)
        return st;
    if (!(res->line.c1 < 0.0))
        return sg_error_set(err, SG_EINVAL, ev->line, 1,
                            "neck-to-graduation distance rises with the reading (slope %+.4g mm per unit): "
                            "it must fall, since readings increase down the stem (check the order "
                            "'neck_mm,<reading>,<distance mm>')",
                            res->line.c1);
    res->neck_c0_mm = res->line.c0;
    res->area_mm2 = area_mm2;
    res->rise_term_mm = sg_cal_depth_rise_term_mm(res->bulb_volume_ml, res->bulb_length_mm, area_mm2);
    res->has_intercept = isfinite(res->rise_term_mm);
    if (res->has_intercept) {
        res->line.c0 += res->rise_term_mm;
        for (size_t i = 0; i < res->n; i++)
            res->y[i] += res->rise_term_mm;
    } else {
        res->line.c0 = (double)NAN;
    }
    range_of(res->x, res->n, &res->xmin, &res->xmax);
    res->worst = max_abs(res->residual, res->n);
    res->u = res->line.s;
    res->sd = res->line.s;
    decision_add(res, "max |residual|", res->worst, "mm", event_limit(ev, "depth_residual_mm"));
    return SG_OK;
}

/* Mean, sample standard deviation and residuals about the mean of res->y. */
static void mean_sd(struct sg_cal_result *res)
{
    res->value = gsl_stats_mean(res->y, 1, res->n);
    res->sd = res->n > 1 ? gsl_stats_sd_m(res->y, 1, res->n, res->value) : 0.0;
    for (size_t i = 0; i < res->n; i++)
        res->residual[i] = res->y[i] - res->value;
}

static enum sg_status eval_meniscus(const struct sg_cal_instrument *ins, const struct sg_cal_event *ev,
                                    struct sg_cal_result *res, struct sg_error *err)
{
    enum sg_status st = gather(ev, SG_CAL_OBS_MENISCUS, SG_CAL_OBS_MENISCUS, res, err);
    if (st != SG_OK)
        return st;
    if (res->n < 1)
        return too_few(ev, err, "meniscus", 1, "meniscus", 0);
    /* x = top, y = bottom: the correction of each pair is bottom - top. */
    for (size_t i = 0; i < res->n; i++) {
        const double top = res->x[i];
        res->y[i] = res->y[i] - top;
    }
    mean_sd(res);
    if (res->value < 0.0)
        return sg_error_set(err, SG_EINVAL, ev->line, 1,
                            "meniscus correction %.4g is negative: readings increase down the stem, so the "
                            "bottom of the meniscus reads higher than the top (check the order "
                            "'meniscus,<top>,<bottom>')",
                            res->value);
    res->u = sqrt(res->sd * res->sd / (double)res->n + resolution_var(ins));
    double lo = 0.0, hi = 0.0;
    range_of(res->y, res->n, &lo, &hi);
    res->xmin = lo;
    res->xmax = hi;
    res->worst = hi - lo;
    decision_add(res, "spread", res->worst, "units", event_limit(ev, "meniscus_spread"));
    const struct sg_cal_limit *lm = event_limit(ev, "meniscus_max");
    if (lm != NULL)
        decision_add(res, "correction", fabs(res->value), "units", lm);
    return SG_OK;
}

static enum sg_status eval_blank(const struct sg_cal_instrument *ins, const struct sg_cal_event *ev,
                                 struct sg_cal_result *res, struct sg_error *err)
{
    enum sg_status st = gather(ev, SG_CAL_OBS_BLANK, SG_CAL_OBS_BLANK, res, err);
    if (st != SG_OK)
        return st;
    if (res->n < 3)
        return too_few(ev, err, "blank", 3, "blank", res->n);
    if ((st = fit_part(ev, res, "blank line", err)) != SG_OK)
        return st;
    range_of(res->x, res->n, &res->xmin, &res->xmax);
    res->sd = res->line.s;
    res->u = sqrt(res->line.s * res->line.s + resolution_var(ins));
    res->worst = max_abs(res->residual, res->n);
    decision_add(res, "max |residual|", res->worst, "units", event_limit(ev, "blank_residual"));
    return SG_OK;
}

static enum sg_status eval_scale(const struct sg_cal_instrument *ins, const struct sg_cal_event *ev,
                                 struct sg_cal_result *res, struct sg_error *err)
{
    res->n = 0;
    for (size_t i = 0; i < ev->n_obs; i++) {
        const struct sg_cal_obs *o = &ev->obs[i];
        if (o->kind != SG_CAL_OBS_SCALE_REF && o->kind != SG_CAL_OBS_SCALE_LIQUID)
            continue;
        if (res->n >= SG_CAL_OBS_MAX)
            return sg_error_set(err, SG_ELIMIT, o->pos.line, o->pos.col,
                                "more than %d scale observations in one event", SG_CAL_OBS_MAX);
        double ref = o->x;
        if (o->kind == SG_CAL_OBS_SCALE_LIQUID) {
            ref = sg_cal_scale_reference(ins->scale, o->x);
            if (!isfinite(ref))
                return sg_error_set(err, SG_EINVAL, o->pos.line, o->pos.col,
                                    "'scale_liquid' needs the hydrometer's scale and a positive density in "
                                    "g/mL, got %g (add 'scale,g_per_l' or 'scale,density' to the identity)",
                                    o->x);
        }
        res->x[res->n] = ref;
        res->y[res->n] = o->y;
        res->n++;
    }
    if (res->n < 3)
        return too_few(ev, err, "scale", 3, "scale_ref' or 'scale_liquid", res->n);
    enum sg_status st = fit_part(ev, res, "scale verification", err);
    if (st != SG_OK)
        return st;
    /* The scale error at each point (reading - reference) is what is judged. */
    double sum = 0.0;
    for (size_t i = 0; i < res->n; i++) {
        res->residual[i] = res->y[i] - res->x[i];
        sum += res->residual[i];
    }
    res->value = sum / (double)res->n;
    range_of(res->x, res->n, &res->xmin, &res->xmax);
    res->sd = res->line.s;
    res->worst = max_abs(res->residual, res->n);
    decision_add(res, "max |reading - reference|", res->worst, "units", event_limit(ev, "scale_error_max"));
    return SG_OK;
}

static enum sg_status eval_area(const struct sg_cal_event *ev, struct sg_cal_result *res, struct sg_error *err)
{
    enum sg_status st = gather(ev, SG_CAL_OBS_GRADUATION, SG_CAL_OBS_GRADUATION, res, err);
    if (st != SG_OK)
        return st;
    if (res->n < 3)
        return too_few(ev, err, "area", 3, "graduation", res->n);
    if ((st = fit_part(ev, res, "graduation line", err)) != SG_OK)
        return st;
    if (!(res->line.c1 > 0.0))
        return sg_error_set(err, SG_EINVAL, ev->line, 1,
                            "graduation heights do not rise with volume (slope %.4g mm/mL; check the order "
                            "'graduation,<mL>,<height mm>')",
                            res->line.c1);
    /* height = c0 + c1 V: A = dV/dh = 1000 mm3/mL / c1. */
    res->value = MM3_PER_ML / res->line.c1;
    res->u = MM3_PER_ML * sqrt(res->line.cov11) / (res->line.c1 * res->line.c1);
    res->sd = res->line.s;
    range_of(res->x, res->n, &res->xmin, &res->xmax);
    res->worst = max_abs(res->residual, res->n);
    decision_add(res, "max |residual|", res->worst, "mm", event_limit(ev, "graduation_residual_mm"));
    return SG_OK;
}

static double or_default(double v, double def)
{
    return isnan(v) ? def : v;
}

static enum sg_status eval_volume(const struct sg_cal_instrument *ins, const struct sg_cal_event *ev,
                                  struct sg_cal_result *res, struct sg_error *err)
{
    enum sg_status st = gather(ev, SG_CAL_OBS_DELIVERY, SG_CAL_OBS_DELIVERY, res, err);
    if (st != SG_OK)
        return st;
    if (res->n < 3)
        return too_few(ev, err, "volume", 3, "delivery", res->n);
    if (isnan(ev->water_temp_c))
        return sg_error_set(err, SG_EINVAL, ev->line, 1,
                            "the volume calibration needs the water temperature (add 'water_temp_c,<C>')");
    if (!ins->has_nominal)
        return sg_error_set(err, SG_EINVAL, ev->line, 1,
                            "the pipette's nominal volume is not known (add 'nominal_ml,<mL>' to the "
                            "identity rows)");
    const double air = or_default(ev->air_density_g_ml, SG_CAL_AIR_DENSITY_G_ML);
    const double weights = or_default(ev->weights_density_g_ml, SG_CAL_WEIGHTS_DENSITY_G_ML);
    const double gamma = or_default(ev->expansion_per_k, SG_CAL_GLASS_EXPANSION_PER_K);
    res->water_temp_c = ev->water_temp_c;
    res->z_ml_g = sg_cal_pipette_z_ml_g(ev->water_temp_c, air, weights);
    if (!isfinite(res->z_ml_g))
        return sg_error_set(err, SG_EINVAL, ev->pos_water_temp.line ? ev->pos_water_temp.line : ev->line,
                            ev->pos_water_temp.col ? ev->pos_water_temp.col : 1,
                            "cannot compute the conversion factor Z at %g C with air %g g/mL and weights %g "
                            "g/mL (the water temperature must be 0-40 C, densities positive)",
                            ev->water_temp_c, air, weights);
    double msum = 0.0;
    for (size_t i = 0; i < res->n; i++) {
        msum += res->x[i];
        res->y[i] = sg_cal_pipette_volume_ml(res->x[i], ev->water_temp_c, air, weights, gamma);
        if (!isfinite(res->y[i]))
            return sg_error_set(err, SG_EINVAL, ev->line, 1, "delivery %zu of %g g gives no volume", i + 1,
                                res->x[i]);
    }
    res->mean_mass_g = msum / (double)res->n;
    mean_sd(res);
    res->u = res->sd / sqrt((double)res->n);
    range_of(res->y, res->n, &res->xmin, &res->xmax);
    res->worst = fabs(res->value - ins->nominal_ml);
    decision_add(res, "|mean - nominal|", res->worst, "mL", event_limit(ev, "volume_error_ml"));
    const struct sg_cal_limit *lsd = event_limit(ev, "volume_sd_ml");
    if (lsd != NULL)
        decision_add(res, "s", res->sd, "mL", lsd);
    return SG_OK;
}

static enum sg_status eval_offset(const struct sg_cal_instrument *ins, const struct sg_cal_event *ev,
                                  struct sg_cal_result *res, struct sg_error *err)
{
    enum sg_status st = gather(ev, SG_CAL_OBS_ICE_POINT, SG_CAL_OBS_COMPARISON, res, err);
    if (st != SG_OK)
        return st;
    if (res->n < 1)
        return too_few(ev, err, "offset", 1, "ice_point' or 'comparison", 0);
    /* correction = reference - observed (ice point: 0 - observed; METHODS.md 10.5). */
    for (size_t i = 0; i < res->n; i++)
        res->y[i] = res->x[i] - res->y[i];
    mean_sd(res);
    res->u = sqrt(res->sd * res->sd / (double)res->n + resolution_var(ins));
    range_of(res->x, res->n, &res->xmin, &res->xmax);
    res->worst = fabs(res->value);
    decision_add(res, "|correction|", res->worst, "C", event_limit(ev, "correction_max_c"));
    const struct sg_cal_limit *lr = event_limit(ev, "residual_max_c");
    if (lr != NULL)
        decision_add(res, "max |residual|", max_abs(res->residual, res->n), "C", lr);
    return SG_OK;
}

enum sg_status sg_cal_evaluate(const struct sg_cal_instrument *ins, const struct sg_cal_event *ev,
                               enum sg_cal_part part, double area_mm2, struct sg_cal_result *res,
                               struct sg_error *err)
{
    memset(res, 0, sizeof *res);
    res->part = part;
    res->accepted = true;
    if ((unsigned)part >= SG_CAL_PART_COUNT || (sg_cal_event_parts(ev) & (1u << part)) == 0)
        return sg_error_set(err, SG_ENOTFOUND, ev->line, 1, "the event of line %u has no %s observations",
                            ev->line, sg_cal_part_name(part));
    /* Every limit the part needs must be named by the event. */
    for (size_t i = 0; i < N_LIMIT_DEFS; i++)
        if (limit_defs[i].part == part && limit_defs[i].required && event_limit(ev, limit_defs[i].name) == NULL)
            return sg_error_set(err, SG_EINVAL, ev->line, 1,
                                "the %s calibration names no acceptance limit (add 'limit,%s,<%s>')",
                                sg_cal_part_name(part), limit_defs[i].name, limit_defs[i].unit);
    enum sg_status st = SG_OK;
    switch (part) {
    case SG_CAL_PART_DEPTH: st = eval_depth(ins, ev, area_mm2, res, err); break;
    case SG_CAL_PART_MENISCUS: st = eval_meniscus(ins, ev, res, err); break;
    case SG_CAL_PART_BLANK: st = eval_blank(ins, ev, res, err); break;
    case SG_CAL_PART_SCALE: st = eval_scale(ins, ev, res, err); break;
    case SG_CAL_PART_AREA: st = eval_area(ev, res, err); break;
    case SG_CAL_PART_VOLUME: st = eval_volume(ins, ev, res, err); break;
    case SG_CAL_PART_OFFSET: st = eval_offset(ins, ev, res, err); break;
    case SG_CAL_PART_COUNT: break;
    }
    if (st != SG_OK)
        return st;
    decision_close(res);
    return SG_OK;
}

/* ---- validation ------------------------------------------------------------------ */

static enum sg_status validate_event(const struct sg_cal_instrument *ins, const struct sg_cal_event *ev,
                                     struct sg_error *err)
{
    const char *tname = sg_cal_event_type_name(ev->type);
    char date[11];
    sg_date_format(ev->date, date);
    if (ev->by[0] == '\0')
        return sg_error_set(err, SG_EINVAL, ev->line, 1,
                            "the %s of %s does not say who did it (add 'by,<name>' after the event row)", tname,
                            date);
    if (ev->type == SG_CAL_EV_RELOCATION && ev->location[0] == '\0')
        return sg_error_set(err, SG_EINVAL, ev->line, 1,
                            "the relocation of %s names no location (add 'location,<where>')", date);
    if (!sg_cal_event_is_entry(ev->type)) {
        if (ev->n_obs > 0)
            return sg_error_set(err, SG_EINVAL, ev->obs[0].pos.line, ev->obs[0].pos.col,
                                "observation rows belong to a calibration or verification, not to a %s "
                                "(record the observations as a separate calibration event)",
                                tname);
        if (ev->n_limits > 0)
            return sg_error_set(err, SG_EINVAL, ev->limits[0].pos.line, ev->limits[0].pos.col,
                                "acceptance limits belong to a calibration or verification, not to a %s", tname);
        if (ev->has_due)
            return sg_error_set(err, SG_EINVAL, ev->pos_due.line, ev->pos_due.col,
                                "a due date belongs to a calibration or verification, not to a %s", tname);
        return SG_OK;
    }
    if (ev->method[0] == '\0')
        return sg_error_set(err, SG_EINVAL, ev->line, 1,
                            "the %s of %s names no method (add 'method,<procedure and revision>')", tname, date);
    if (!ev->has_due)
        return sg_error_set(err, SG_EINVAL, ev->line, 1,
                            "the %s of %s gives no due date for the next one (add 'due,YYYY-MM-DD')", tname,
                            date);
    if (sg_date_days(ev->due) <= sg_date_days(ev->date)) {
        char due[11];
        sg_date_format(ev->due, due);
        return sg_error_set(err, SG_EINVAL, ev->pos_due.line, ev->pos_due.col,
                            "due date %s is not after the event date %s (give the date the next one is due)", due,
                            date);
    }
    if (ev->n_obs == 0)
        return sg_error_set(err, SG_EINVAL, ev->line, 1,
                            "the %s of %s has no observation rows (results are computed from the raw "
                            "observations: add them)",
                            tname, date);
    const unsigned parts = sg_cal_event_parts(ev);
    for (size_t i = 0; i < ev->n_obs; i++) {
        const enum sg_cal_part p = sg_cal_obs_part(ev->obs[i].kind);
        if (ins->kind != SG_CAL_KIND_NONE && sg_cal_part_kind(p) != ins->kind)
            return sg_error_set(err, SG_EINVAL, ev->obs[i].pos.line, ev->obs[i].pos.col,
                                "'%s' is a %s observation and '%s' is a %s (remove the row or move it to the "
                                "right instrument's file)",
                                sg_cal_obs_name(ev->obs[i].kind), sg_cal_kind_name(sg_cal_part_kind(p)), ins->id,
                                sg_cal_kind_name(ins->kind));
    }
    for (size_t i = 0; i < ev->n_limits; i++) {
        const struct sg_cal_limit *l = &ev->limits[i];
        const struct limit_def *d = limit_def_find(l->name);
        if (d == NULL)
            return sg_error_set(err, SG_EINVAL, l->pos.line, l->pos.col,
                                "unknown limit '%s' (known: depth_residual_mm, meniscus_spread, meniscus_max, "
                                "blank_residual, scale_error_max, graduation_residual_mm, volume_error_ml, "
                                "volume_sd_ml, correction_max_c, residual_max_c)",
                                l->name);
        if ((parts & (1u << d->part)) == 0)
            return sg_error_set(err, SG_EINVAL, l->pos.line, l->pos.col,
                                "limit '%s' applies to %s observations and this event has none (remove the "
                                "limit or add the observations)",
                                l->name, sg_cal_part_name(d->part));
        for (size_t j = 0; j < i; j++)
            if (strcmp(ev->limits[j].name, l->name) == 0)
                return sg_error_set(err, SG_EINVAL, l->pos.line, l->pos.col,
                                    "limit '%s' is given twice in one event (first at line %u)", l->name,
                                    ev->limits[j].pos.line);
    }
    if ((parts & (1u << SG_CAL_PART_DEPTH)) && ev->cylinder[0] == '\0')
        return sg_error_set(err, SG_EINVAL, ev->line, 1,
                            "a depth calibration is made in a cylinder: name it (add 'cylinder,<ID>')");
    if (!(parts & (1u << SG_CAL_PART_VOLUME)) &&
        (!isnan(ev->water_temp_c) || !isnan(ev->air_density_g_ml) || !isnan(ev->weights_density_g_ml) ||
         !isnan(ev->expansion_per_k)))
        return sg_error_set(err, SG_EINVAL, ev->pos_water_temp.line ? ev->pos_water_temp.line : ev->line, 1,
                            "gravimetric conditions are given but there are no 'delivery' rows");
    for (unsigned p = 0; p < SG_CAL_PART_COUNT; p++) {
        if (!(parts & (1u << p)))
            continue;
        struct sg_cal_result *res = malloc(sizeof *res);
        if (res == NULL)
            return sg_error_set(err, SG_ENOMEM, ev->line, 1, "out of memory");
        const enum sg_status st = sg_cal_evaluate(ins, ev, (enum sg_cal_part)p, (double)NAN, res, err);
        free(res);
        if (st != SG_OK)
            return st;
    }
    return SG_OK;
}

enum sg_status sg_cal_validate(const struct sg_cal_instrument *ins, struct sg_error *err)
{
    if (ins->id[0] == '\0')
        return sg_error_set(err, SG_EINVAL, 1, 1, "no 'instrument,<ID>' row (the first row names the instrument)");
    if (ins->kind == SG_CAL_KIND_NONE)
        return sg_error_set(err, SG_EINVAL, ins->line ? ins->line : 1, 1,
                            "instrument '%s' has no kind (add 'kind,hydrometer|cylinder|thermometer|pipette')",
                            ins->id);
    if (ins->kind == SG_CAL_HYDROMETER && ins->scale == SG_SCALE_NONE)
        return sg_error_set(err, SG_EINVAL, ins->pos_kind.line, 1,
                            "hydrometer '%s' names no scale (add 'scale,g_per_l' or 'scale,density')", ins->id);
    if (ins->kind == SG_CAL_PIPETTE && !ins->has_nominal)
        return sg_error_set(err, SG_EINVAL, ins->pos_kind.line, 1,
                            "pipette '%s' names no nominal volume (add 'nominal_ml,<mL>')", ins->id);
    return sg_cal_validate_history(ins, err);
}

enum sg_status sg_cal_validate_history(const struct sg_cal_instrument *ins, struct sg_error *err)
{
    for (size_t i = 0; i < ins->n_events; i++) {
        const struct sg_cal_event *ev = &ins->events[i];
        if (i > 0) {
            const struct sg_cal_event *prev = &ins->events[i - 1];
            char a[11], b[11];
            sg_date_format(ev->date, a);
            sg_date_format(prev->date, b);
            if (sg_date_days(ev->date) < sg_date_days(prev->date))
                return sg_error_set(err, SG_EINVAL, ev->line, 7,
                                    "event date %s is earlier than the previous event's %s (line %u): the "
                                    "history is append-only and in date order (record a late event with the "
                                    "date it is entered and say so in a note)",
                                    a, b, prev->line);
            if (prev->type == SG_CAL_EV_RETIREMENT)
                return sg_error_set(err, SG_EINVAL, ev->line, 1,
                                    "'%s' was retired on %s (line %u): no event may follow a retirement", ins->id,
                                    b, prev->line);
        }
        const enum sg_status st = validate_event(ins, ev, err);
        if (st != SG_OK)
            return st;
    }
    return SG_OK;
}

/* ---- status and entries in force ------------------------------------------------------ */

static bool supersedes(enum sg_cal_event_type t)
{
    return t == SG_CAL_EV_ADJUSTMENT || t == SG_CAL_EV_REPAIR || t == SG_CAL_EV_OUT_OF_SERVICE;
}

enum sg_status sg_cal_status(const struct sg_cal_instrument *ins, struct sg_date on, long within_days,
                             struct sg_cal_status *out, struct sg_error *err)
{
    return sg_cal_status_with(ins, on, within_days, NULL, NULL, out, err);
}

enum sg_status sg_cal_status_with(const struct sg_cal_instrument *ins, struct sg_date on, long within_days,
                                  sg_cal_evaluator eval, void *ctx, struct sg_cal_status *out,
                                  struct sg_error *err)
{
    memset(out, 0, sizeof *out);
    for (size_t p = 0; p < SG_CAL_PART_COUNT; p++)
        out->entry[p] = -1;
    out->last_event = -1;
    (void)snprintf(out->location, sizeof out->location, "%s", ins->location);
    const long day = sg_date_days(on);
    char date[11], when[11];
    sg_date_format(on, date);

    long sup = -1;
    for (size_t i = 0; i < ins->n_events; i++) {
        const struct sg_cal_event *ev = &ins->events[i];
        if (sg_date_days(ev->date) > day)
            continue;
        out->last_event = (long)i;
        if (supersedes(ev->type))
            sup = (long)i;
        if (ev->type == SG_CAL_EV_RELOCATION)
            (void)snprintf(out->location, sizeof out->location, "%s", ev->location);
        if (ev->type == SG_CAL_EV_RETIREMENT) {
            sg_date_format(ev->date, when);
            out->state = SG_CAL_RETIRED;
            (void)snprintf(out->reason, sizeof out->reason, "retired on %s", when);
            return SG_OK;
        }
    }
    bool any = false;
    for (size_t i = (size_t)(sup + 1); i < ins->n_events; i++) {
        const struct sg_cal_event *ev = &ins->events[i];
        if (sg_date_days(ev->date) > day || !sg_cal_event_is_entry(ev->type))
            continue;
        const unsigned parts = sg_cal_event_parts(ev);
        for (unsigned p = 0; p < SG_CAL_PART_COUNT; p++)
            if (parts & (1u << p)) {
                out->entry[p] = (long)i;
                any = true;
            }
    }
    out->state = SG_CAL_OUT_OF_SERVICE;
    if (!any) {
        if (sup >= 0) {
            sg_date_format(ins->events[sup].date, when);
            (void)snprintf(out->reason, sizeof out->reason, "%s on %s and not calibrated since",
                           sg_cal_event_type_name(ins->events[sup].type), when);
        } else {
            (void)snprintf(out->reason, sizeof out->reason, "no calibration on or before %s", date);
        }
        return SG_OK;
    }
    /* Each entry's result: evaluated here into one buffer, or kept by eval. */
    struct sg_cal_result *own = NULL;
    if (eval == NULL && (own = malloc(sizeof *own)) == NULL)
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory");
    enum sg_status st = SG_OK;
    long due_day = 0;
    int due_part = -1;
    for (unsigned p = 0; p < SG_CAL_PART_COUNT && st == SG_OK; p++) {
        const enum sg_cal_kind kind = sg_cal_part_kind((enum sg_cal_part)p);
        if (out->entry[p] < 0) {
            if (kind == ins->kind && sg_cal_part_required((enum sg_cal_part)p) && out->reason[0] == '\0')
                (void)snprintf(out->reason, sizeof out->reason, "no %s calibration in force on %s",
                               sg_cal_part_name((enum sg_cal_part)p), date);
            continue;
        }
        const struct sg_cal_event *ev = &ins->events[out->entry[p]];
        const struct sg_cal_result *res = own;
        if (eval != NULL)
            st = eval(ctx, (size_t)out->entry[p], (enum sg_cal_part)p, &res, err);
        else
            st = sg_cal_evaluate(ins, ev, (enum sg_cal_part)p, (double)NAN, own, err);
        if (st != SG_OK)
            break;
        if (!res->accepted && out->reason[0] == '\0') {
            sg_date_format(ev->date, when);
            (void)snprintf(out->reason, sizeof out->reason, "the %s %s of %s was %.180s",
                           sg_cal_part_name((enum sg_cal_part)p), sg_cal_event_type_name(ev->type), when,
                           res->decision);
        }
        if (ev->has_due && (due_part < 0 || sg_date_days(ev->due) < due_day)) {
            due_day = sg_date_days(ev->due);
            due_part = (int)p;
        }
    }
    free(own);
    if (st != SG_OK)
        return st;
    if (due_part >= 0) {
        out->has_due = true;
        out->due = sg_date_from_days(due_day);
        out->days_to_due = due_day - day;
    }
    if (out->reason[0] != '\0')
        return SG_OK; /* out of service: reason says why */
    if (!out->has_due) {
        out->state = SG_CAL_IN_SERVICE;
        return SG_OK;
    }
    const struct sg_cal_event *dev = &ins->events[out->entry[due_part]];
    char due[11];
    sg_date_format(out->due, due);
    sg_date_format(dev->date, when);
    if (out->days_to_due < 0) {
        out->state = SG_CAL_OVERDUE;
        (void)snprintf(out->reason, sizeof out->reason, "the %s %s of %s was due on %s (%ld days ago)",
                       sg_cal_part_name((enum sg_cal_part)due_part), sg_cal_event_type_name(dev->type), when, due,
                       -out->days_to_due);
    } else if (out->days_to_due <= within_days) {
        out->state = SG_CAL_DUE_SOON;
        (void)snprintf(out->reason, sizeof out->reason, "the %s %s of %s is due on %s (in %ld days)",
                       sg_cal_part_name((enum sg_cal_part)due_part), sg_cal_event_type_name(dev->type), when, due,
                       out->days_to_due);
    } else {
        out->state = SG_CAL_IN_SERVICE;
    }
    return SG_OK;
}

void sg_cal_entry_label(const struct sg_cal_instrument *ins, size_t i, char *buf, size_t size)
{
    char date[11];
    const struct sg_cal_event *ev = &ins->events[i];
    sg_date_format(ev->date, date);
    const long day = sg_date_days(ev->date);
    size_t same = 0, ordinal = 0;
    for (size_t j = 0; j < ins->n_events; j++) {
        const struct sg_cal_event *e = &ins->events[j];
        if (!sg_cal_event_is_entry(e->type) || sg_date_days(e->date) != day)
            continue;
        same++;
        if (j <= i)
            ordinal = same;
    }
    if (same > 1)
        (void)snprintf(buf, size, "%s@%s#%zu", ins->id, date, ordinal);
    else
        (void)snprintf(buf, size, "%s@%s", ins->id, date);
}

enum sg_status sg_cal_find_entry(const struct sg_cal_instrument *ins, const char *label_date, size_t *index,
                                 struct sg_error *err)
{
    char date_text[11];
    size_t want = 0;
    const size_t len = strlen(label_date);
    if (len < 10 || (len > 10 && label_date[10] != '#'))
        return sg_error_set(err, SG_EPARSE, 0, 0, "'%s' does not name an entry (write YYYY-MM-DD or YYYY-MM-DD#n)",
                            label_date);
    memcpy(date_text, label_date, 10);
    date_text[10] = '\0';
    struct sg_date d;
    enum sg_status st = sg_date_parse(date_text, &d, err);
    if (st != SG_OK)
        return st;
    if (len > 10) {
        char *end = NULL;
        const unsigned long n = strtoul(label_date + 11, &end, 10);
        if (label_date[11] == '\0' || *end != '\0' || n == 0 || n > SG_CAL_EVENTS_MAX)
            return sg_error_set(err, SG_EPARSE, 0, 0, "'%s': the number after '#' must be 1, 2, ...", label_date);
        want = (size_t)n;
    }
    const long day = sg_date_days(d);
    size_t seen = 0;
    bool found = false;
    for (size_t j = 0; j < ins->n_events; j++) {
        const struct sg_cal_event *e = &ins->events[j];
        if (!sg_cal_event_is_entry(e->type) || sg_date_days(e->date) != day)
            continue;
        seen++;
        if (want == 0 || seen == want) {
            *index = j;
            found = true;
            if (want != 0)
                break;
        }
    }
    if (!found)
        return sg_error_set(err, SG_ENOTFOUND, 0, 0,
                            "'%s' has no calibration or verification dated %s (see 'sedgrade cal show %s')",
                            ins->id, label_date, ins->id);
    return SG_OK;
}
