/* plan.c - pipette sampling times and hydrometer reading schedules from
 * Stokes' law (METHODS.md 2, 3.3, 3.5, 4.2). */
#include "sedgrade/plan.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "sedgrade/stokes.h"
#include "sedgrade/water.h"

/* Same accepted range as sg_record_validate (src/record.c): organic soils to
 * heavy minerals (common practice). */
#define PLAN_PARTICLE_DENSITY_MIN_MG_M3 1.5
#define PLAN_PARTICLE_DENSITY_MAX_MG_M3 5.0

#define SECONDS_PER_MINUTE 60.0
#define MINUTES_PER_DAY 1440L
#define SECONDS_PER_DAY 86400L
/* Longest time formatted: about two years, far beyond any sedimentation run;
 * keeps the integer second count well inside a long. */
#define PLAN_FORMAT_MAX_MIN 1.0e6

/* Reading-time series, METHODS.md 3.5. Every one of them is marked "from
 * memory" there: verify against a current copy of the standard before relying
 * on it. */

/* ASTM D7928-17: 1, 2, 4, 15, 30, 60, 240, 1440 min (from memory, METHODS.md 3.5). */
static const double series_d7928[] = {1.0, 2.0, 4.0, 15.0, 30.0, 60.0, 240.0, 1440.0};
/* ASTM D422-63 (withdrawn 2016): 2, 5, 15, 30, 60, 250, 1440 min (from memory,
 * METHODS.md 3.5; one published procedure reads at 4 instead of 5 min). */
static const double series_d422[] = {2.0, 5.0, 15.0, 30.0, 60.0, 250.0, 1440.0};
/* BS 1377-2:1990: 0.5, 1, 2, 4 min with the hydrometer left in, then 8, 30 min,
 * 2, 8, 24 h (from memory, METHODS.md 3.5). */
static const double series_bs1377[] = {0.5, 1.0, 2.0, 4.0, 8.0, 30.0, 120.0, 480.0, 1440.0};

#define N_OF(a) (sizeof(a) / sizeof((a)[0]))

static const struct sg_plan_series series_table[] = {
    {"astm-d7928", "ASTM D7928-17 hydrometer reading times (from memory, METHODS.md 3.5)", series_d7928,
     N_OF(series_d7928)},
    {"astm-d422", "ASTM D422-63 hydrometer reading times (withdrawn standard; from memory, METHODS.md 3.5)",
     series_d422, N_OF(series_d422)},
    {"bs1377-2", "BS 1377-2:1990 hydrometer reading times (from memory, METHODS.md 3.5)", series_bs1377,
     N_OF(series_bs1377)},
};

static const struct {
    const char *alias;
    size_t index;
} series_alias[] = {{"d7928", 0}, {"d422", 1}, {"bs1377", 2}};

static enum sg_status check_positive(double x, const char *what, const char *unit, struct sg_error *err)
{
    if (!isfinite(x) || x <= 0.0)
        return sg_error_set(err, SG_EINVAL, 0, 0, "%s %g %s must be a positive number", what, x, unit);
    return SG_OK;
}

enum sg_status sg_plan_init(struct sg_plan *p, enum sg_standard standard, double temp_c,
                            double particle_density_mg_m3, struct sg_error *err)
{
    memset(p, 0, sizeof *p);
    if (!isfinite(particle_density_mg_m3) || particle_density_mg_m3 < PLAN_PARTICLE_DENSITY_MIN_MG_M3 ||
        particle_density_mg_m3 > PLAN_PARTICLE_DENSITY_MAX_MG_M3)
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "particle density %g Mg/m3 is outside %g-%g Mg/m3 (give the measured or "
                            "assumed particle density, e.g. 2.65)",
                            particle_density_mg_m3, PLAN_PARTICLE_DENSITY_MIN_MG_M3,
                            PLAN_PARTICLE_DENSITY_MAX_MG_M3);
    double rho_w = 0.0, eta = 0.0;
    enum sg_status st = sg_water_properties(temp_c, &rho_w, &eta, err);
    if (st != SG_OK)
        return st;
    p->standard = standard;
    p->temp_c = temp_c;
    p->particle_density_mg_m3 = particle_density_mg_m3;
    p->water_density_kg_m3 = rho_w;
    p->viscosity_pa_s = eta;
    p->density_diff_kg_m3 = sg_stokes_density_diff_kg_m3(standard, particle_density_mg_m3, temp_c);
    return SG_OK;
}

enum sg_status sg_plan_time_min(const struct sg_plan *p, double diameter_mm, double depth_mm,
                                double *elapsed_min, struct sg_error *err)
{
    enum sg_status st;
    if ((st = check_positive(diameter_mm, "diameter", "mm", err)) ||
        (st = check_positive(depth_mm, "settling depth", "mm", err)))
        return st;
    double t_s = 0.0;
    st = sg_stokes_time_s(p->viscosity_pa_s, depth_mm / 1000.0, p->density_diff_kg_m3, diameter_mm / 1000.0,
                          &t_s, err);
    if (st != SG_OK)
        return st;
    *elapsed_min = t_s / SECONDS_PER_MINUTE;
    return SG_OK;
}

enum sg_status sg_plan_diameter_mm(const struct sg_plan *p, double elapsed_min, double depth_mm,
                                   double *diameter_mm, struct sg_error *err)
{
    enum sg_status st;
    if ((st = check_positive(elapsed_min, "elapsed time", "min", err)) ||
        (st = check_positive(depth_mm, "settling depth", "mm", err)))
        return st;
    double d_m = 0.0;
    st = sg_stokes_diameter_m(p->viscosity_pa_s, depth_mm / 1000.0, p->density_diff_kg_m3,
                              elapsed_min * SECONDS_PER_MINUTE, &d_m, err);
    if (st != SG_OK)
        return st;
    *diameter_mm = d_m * 1000.0;
    return SG_OK;
}

double sg_plan_reynolds(const struct sg_plan *p, double diameter_mm)
{
    /* Free settling is physics, whatever convention the standard uses for the
     * time: rho_s - rho_w(T). */
    const double drho = p->particle_density_mg_m3 * 1000.0 - p->water_density_kg_m3;
    const double d_m = diameter_mm / 1000.0;
    const double v = sg_stokes_velocity_m_s(p->viscosity_pa_s, drho, d_m);
    return sg_stokes_reynolds(p->water_density_kg_m3, v, d_m, p->viscosity_pa_s);
}

size_t sg_plan_series_count(void)
{
    return N_OF(series_table);
}

const struct sg_plan_series *sg_plan_series_at(size_t i)
{
    return i < N_OF(series_table) ? &series_table[i] : NULL;
}

enum sg_status sg_plan_series_find(const char *name, const struct sg_plan_series **out,
                                   struct sg_error *err)
{
    if (name == NULL)
        return sg_error_set(err, SG_EINVAL, 0, 0, "reading series name is missing (name one of astm-d7928, "
                                                  "astm-d422, bs1377-2)");
    for (size_t i = 0; i < N_OF(series_table); i++)
        if (strcmp(name, series_table[i].name) == 0) {
            *out = &series_table[i];
            return SG_OK;
        }
    for (size_t i = 0; i < N_OF(series_alias); i++)
        if (strcmp(name, series_alias[i].alias) == 0) {
            *out = &series_table[series_alias[i].index];
            return SG_OK;
        }
    return sg_error_set(err, SG_ENOTFOUND, 0, 0,
                        "unknown reading series '%s' (use astm-d7928, astm-d422 or bs1377-2)", name);
}

const struct sg_plan_series *sg_plan_series_for_standard(enum sg_standard standard)
{
    switch (standard) {
    case SG_STANDARD_BS1377_2:
        return &series_table[2];
    case SG_STANDARD_ASTM_D7928:
    case SG_STANDARD_ISO17892_4:
    case SG_STANDARD_NONE:
        break;
    }
    return &series_table[0];
}

static double depth_at(const struct sg_plan_hydrometer *h, double reading)
{
    return h->depth_at_zero_mm + h->depth_per_unit_mm * (reading + h->meniscus_correction);
}

enum sg_status sg_plan_hydrometer_depths(const struct sg_plan_hydrometer *h, double *shallow_mm,
                                         double *deep_mm, struct sg_error *err)
{
    if (!isfinite(h->depth_at_zero_mm) || !isfinite(h->depth_per_unit_mm) ||
        !isfinite(h->meniscus_correction))
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "hydrometer depth line %g mm + %g mm per unit (meniscus %g) is not a number "
                            "(give the depth line as two numbers)",
                            h->depth_at_zero_mm, h->depth_per_unit_mm, h->meniscus_correction);
    if (!isfinite(h->scale_min) || !isfinite(h->scale_max) || !(h->scale_min < h->scale_max))
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "hydrometer scale %g to %g must run from a lower to a higher reading "
                            "(give the readings at the ends of the stem)",
                            h->scale_min, h->scale_max);
    const double at_min = depth_at(h, h->scale_min);
    const double at_max = depth_at(h, h->scale_max);
    if (!(at_min > 0.0) || !(at_max > 0.0)) {
        const double r = at_min > 0.0 ? h->scale_max : h->scale_min;
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "effective depth %.4g mm at reading %g is not positive (check the depth line "
                            "and the scale ends)",
                            at_min > 0.0 ? at_max : at_min, r);
    }
    *shallow_mm = fmin(at_min, at_max);
    *deep_mm = fmax(at_min, at_max);
    return SG_OK;
}

enum sg_status sg_plan_reading_range(const struct sg_plan *p, const struct sg_plan_hydrometer *h,
                                     double elapsed_min, struct sg_plan_reading *out,
                                     struct sg_error *err)
{
    struct sg_plan_reading r = {0};
    enum sg_status st = sg_plan_hydrometer_depths(h, &r.depth_shallow_mm, &r.depth_deep_mm, err);
    if (st != SG_OK)
        return st;
    r.elapsed_min = elapsed_min;
    r.depth_mid_mm = 0.5 * (r.depth_shallow_mm + r.depth_deep_mm);
    if ((st = sg_plan_diameter_mm(p, elapsed_min, r.depth_shallow_mm, &r.diameter_small_mm, err)) ||
        (st = sg_plan_diameter_mm(p, elapsed_min, r.depth_mid_mm, &r.diameter_mid_mm, err)) ||
        (st = sg_plan_diameter_mm(p, elapsed_min, r.depth_deep_mm, &r.diameter_large_mm, err)))
        return st;
    r.reynolds_max = sg_plan_reynolds(p, r.diameter_large_mm);
    *out = r;
    return SG_OK;
}

enum sg_status sg_plan_target_window(const struct sg_plan *p, const struct sg_plan_hydrometer *h,
                                     double diameter_mm, struct sg_plan_window *out,
                                     struct sg_error *err)
{
    struct sg_plan_window w = {0};
    enum sg_status st = sg_plan_hydrometer_depths(h, &w.depth_shallow_mm, &w.depth_deep_mm, err);
    if (st != SG_OK)
        return st;
    w.diameter_mm = diameter_mm;
    w.depth_mid_mm = 0.5 * (w.depth_shallow_mm + w.depth_deep_mm);
    if ((st = sg_plan_time_min(p, diameter_mm, w.depth_shallow_mm, &w.early_min, err)) ||
        (st = sg_plan_time_min(p, diameter_mm, w.depth_mid_mm, &w.mid_min, err)) ||
        (st = sg_plan_time_min(p, diameter_mm, w.depth_deep_mm, &w.late_min, err)))
        return st;
    w.reynolds = sg_plan_reynolds(p, diameter_mm);
    *out = w;
    return SG_OK;
}

static int two_digits(const char *s)
{
    if (s[0] < '0' || s[0] > '9' || s[1] < '0' || s[1] > '9')
        return -1;
    return (s[0] - '0') * 10 + (s[1] - '0');
}

enum sg_status sg_plan_clock_parse(const char *text, int *minute_of_day, struct sg_error *err)
{
    if (text == NULL || strlen(text) != 5 || text[2] != ':')
        return sg_error_set(err, SG_EPARSE, 0, 0, "clock time '%s' is not HH:MM (write e.g. 08:30)",
                            text != NULL ? text : "");
    const int hh = two_digits(text);
    const int mm = two_digits(text + 3);
    if (hh < 0 || mm < 0 || hh > 23 || mm > 59)
        return sg_error_set(err, SG_EPARSE, 0, 0,
                            "clock time '%s' is not a time of day 00:00-23:59 (write e.g. 08:30)", text);
    *minute_of_day = hh * 60 + mm;
    return SG_OK;
}

/* Whole seconds in elapsed_min, or -1 when it cannot be formatted. */
static long rounded_seconds(double elapsed_min)
{
    if (!isfinite(elapsed_min) || elapsed_min < 0.0 || elapsed_min >= PLAN_FORMAT_MAX_MIN)
        return -1;
    return lround(elapsed_min * SECONDS_PER_MINUTE);
}

enum sg_status sg_plan_clock_format(int start_minute_of_day, double elapsed_min, char *buf,
                                    size_t size, struct sg_error *err)
{
    if (size > 0)
        buf[0] = '\0';
    const long s = rounded_seconds(elapsed_min);
    if (s < 0 || start_minute_of_day < 0 || start_minute_of_day >= MINUTES_PER_DAY)
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "cannot format %g min after minute %d of the day as a clock time (need "
                            "0 <= time < %g min)",
                            elapsed_min, start_minute_of_day, PLAN_FORMAT_MAX_MIN);
    const long total = (long)start_minute_of_day * 60L + s;
    const long days = total / SECONDS_PER_DAY;
    const long of_day = total % SECONDS_PER_DAY;
    char day_suffix[24] = "";
    if (days > 0)
        snprintf(day_suffix, sizeof day_suffix, "+%ldd", days);
    const int n = snprintf(buf, size, "%02ld:%02ld:%02ld%s", of_day / 3600L, (of_day / 60L) % 60L,
                           of_day % 60L, day_suffix);
    if (n < 0 || (size_t)n >= size)
        return sg_error_set(err, SG_EINVAL, 0, 0, "clock buffer of %zu bytes is too small", size);
    return SG_OK;
}

enum sg_status sg_plan_duration_format(double elapsed_min, char *buf, size_t size, struct sg_error *err)
{
    if (size > 0)
        buf[0] = '\0';
    const long s = rounded_seconds(elapsed_min);
    if (s < 0)
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "cannot format %g min as a duration (need 0 <= time < %g min)", elapsed_min,
                            PLAN_FORMAT_MAX_MIN);
    const int n = snprintf(buf, size, "%ld:%02ld:%02ld", s / 3600L, (s / 60L) % 60L, s % 60L);
    if (n < 0 || (size_t)n >= size)
        return sg_error_set(err, SG_EINVAL, 0, 0, "duration buffer of %zu bytes is too small", size);
    return SG_OK;
}
