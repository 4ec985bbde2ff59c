/* plan.h - schedules for a sedimentation run: when to sample with the pipette
 * or read the hydrometer so that a target Stokes diameter is caught, and which
 * diameters each standard reading time can represent across a hydrometer's
 * scale. Pure computation on top of water.h and stokes.h. */
#ifndef SEDGRADE_PLAN_H
#define SEDGRADE_PLAN_H

#include <stddef.h>

#include "sedgrade/error.h"
#include "sedgrade/record.h"

/* Conditions of one run, resolved once: the water properties at temp_c and the
 * Stokes density term of the chosen standard (sg_stokes_density_diff_kg_m3). */
struct sg_plan {
    enum sg_standard standard;
    double temp_c;                 /* suspension temperature, C */
    double particle_density_mg_m3; /* rho_s, Mg/m3 */
    double water_density_kg_m3;    /* rho_w(temp_c), Tanaka 2001 */
    double viscosity_pa_s;         /* eta(temp_c), IAPWS 2008 */
    double density_diff_kg_m3;     /* the standard's (rho_s - rho_liquid) */
};

/* Fills p for a run at temp_c (0-40 C) with particles of
 * particle_density_mg_m3 (1.5-5 Mg/m3, the range sg_record_validate accepts)
 * under the conventions of standard (SG_STANDARD_NONE: exact physics,
 * rho_s - rho_w(T); SG_STANDARD_BS1377_2: rho_s - 1 Mg/m3; ...).
 * Returns SG_OK; SG_EDOM for a temperature outside 0-40 C; SG_EINVAL for a
 * particle density outside 1.5-5 Mg/m3 or not a number. */
enum sg_status sg_plan_init(struct sg_plan *p, enum sg_standard standard, double temp_c,
                            double particle_density_mg_m3, struct sg_error *err);

/* Time, min, for a sphere of diameter_mm to settle depth_mm under p:
 * t = 18 eta H / ((rho_s - rho_liquid) g D^2). With SG_STANDARD_BS1377_2 this
 * is BS 1377-2's t = 0.005531^2 eta H / ((rho_s - 1) D^2) (METHODS.md 2.3,
 * 4.2). diameter_mm and depth_mm finite and > 0, else SG_EINVAL. */
enum sg_status sg_plan_time_min(const struct sg_plan *p, double diameter_mm, double depth_mm,
                                double *elapsed_min, struct sg_error *err);

/* Diameter, mm, that has just settled depth_mm at elapsed_min under p (the
 * inverse of sg_plan_time_min). Both inputs finite and > 0, else SG_EINVAL. */
enum sg_status sg_plan_diameter_mm(const struct sg_plan *p, double elapsed_min, double depth_mm,
                                   double *diameter_mm, struct sg_error *err);

/* Particle Reynolds number of a sphere of diameter_mm settling freely under
 * p (rho_w v D / eta, exact physics for v whatever the standard). */
double sg_plan_reynolds(const struct sg_plan *p, double diameter_mm);

/* A named series of hydrometer reading times. */
struct sg_plan_series {
    const char *name;        /* "astm-d7928", "astm-d422", "bs1377-2" */
    const char *description; /* one line: whose schedule it is and its provenance */
    const double *times_min; /* elapsed times, min, strictly increasing */
    size_t n_times;
};

/* The number of built-in series and the i-th of them (NULL when i is out of
 * range), for listing. The tables are constant and shared: never freed. */
size_t sg_plan_series_count(void);
const struct sg_plan_series *sg_plan_series_at(size_t i);

/* The series called name (also accepted: "d7928", "d422", "astm-d422",
 * "bs1377"). Returns SG_OK; SG_ENOTFOUND with a message listing the known
 * names when there is none; SG_EINVAL when name is NULL. */
enum sg_status sg_plan_series_find(const char *name, const struct sg_plan_series **out,
                                   struct sg_error *err);

/* The series a standard prescribes: BS 1377-2 -> "bs1377-2"; ASTM D7928 ->
 * "astm-d7928"; none or ISO 17892-4 (no series recorded in METHODS.md 3.5) ->
 * "astm-d7928". Never NULL. */
const struct sg_plan_series *sg_plan_series_for_standard(enum sg_standard standard);

/* A hydrometer as far as timing goes: its effective-depth line
 * H(R) = depth_at_zero_mm + depth_per_unit_mm * (R + meniscus_correction)
 * (METHODS.md 3.3) and the readings at the ends of its scale, as read. */
struct sg_plan_hydrometer {
    double depth_at_zero_mm;    /* effective depth at meniscus-corrected reading 0, mm */
    double depth_per_unit_mm;   /* change of effective depth per reading unit, mm */
    double meniscus_correction; /* reading units, added to a reading for its depth */
    double scale_min;           /* lowest reading on the stem, reading units */
    double scale_max;           /* highest reading on the stem, reading units */
};

/* Effective depths at the two ends of the scale: shallow_mm <= deep_mm.
 * Returns SG_OK; SG_EINVAL when a value is not finite, scale_min >= scale_max,
 * or a depth at either end is not positive (the message names the reading). */
enum sg_status sg_plan_hydrometer_depths(const struct sg_plan_hydrometer *h, double *shallow_mm,
                                         double *deep_mm, struct sg_error *err);

/* What one reading at elapsed_min can represent: the diameter reaching the
 * effective depth, across the scale (the depth depends on the reading). */
struct sg_plan_reading {
    double elapsed_min;
    double depth_shallow_mm, depth_mid_mm, depth_deep_mm; /* scale max, middle, min */
    double diameter_small_mm; /* at the shallowest depth (highest reading) */
    double diameter_mid_mm;   /* at the depth of mid-scale */
    double diameter_large_mm; /* at the deepest depth (lowest reading) */
    double reynolds_max;      /* Reynolds number of diameter_large_mm */
};

/* Fills out for a reading at elapsed_min (> 0). Status as for
 * sg_plan_hydrometer_depths and sg_plan_diameter_mm. */
enum sg_status sg_plan_reading_range(const struct sg_plan *p, const struct sg_plan_hydrometer *h,
                                     double elapsed_min, struct sg_plan_reading *out,
                                     struct sg_error *err);

/* When a target diameter is reached: the window of times from its arrival at
 * the shallowest effective depth (early) to the deepest (late). The reading
 * taken at time t represents diameter_mm exactly when the effective depth at
 * that reading equals the depth it has settled; any reading inside the window
 * can, depending on what the hydrometer shows. */
struct sg_plan_window {
    double diameter_mm;
    double depth_shallow_mm, depth_mid_mm, depth_deep_mm;
    double early_min; /* at depth_shallow_mm */
    double mid_min;   /* at depth_mid_mm */
    double late_min;  /* at depth_deep_mm */
    double reynolds;  /* of diameter_mm */
};

/* Fills out for diameter_mm (> 0). Status as for sg_plan_hydrometer_depths
 * and sg_plan_time_min. */
enum sg_status sg_plan_target_window(const struct sg_plan *p, const struct sg_plan_hydrometer *h,
                                     double diameter_mm, struct sg_plan_window *out,
                                     struct sg_error *err);

/* Parses a clock time "HH:MM" (00:00-23:59, exactly two digits each) into
 * minutes after midnight. Returns SG_OK or SG_EPARSE naming the text. */
enum sg_status sg_plan_clock_parse(const char *text, int *minute_of_day, struct sg_error *err);

/* Writes the clock time elapsed_min after start_minute_of_day as "hh:mm:ss",
 * rounded to the nearest second, with "+Nd" appended when it falls N days
 * later (e.g. "06:52:32+1d"). buf of at least 24 bytes. elapsed_min must be
 * finite, >= 0 and below 1e6 min; else buf gets "" and SG_EINVAL. */
enum sg_status sg_plan_clock_format(int start_minute_of_day, double elapsed_min, char *buf,
                                    size_t size, struct sg_error *err);

/* Writes elapsed_min as "h:mm:ss" (hours unbounded, nearest second), e.g.
 * 412.532 -> "6:52:32". Same limits and status as sg_plan_clock_format. */
enum sg_status sg_plan_duration_format(double elapsed_min, char *buf, size_t size, struct sg_error *err);

#endif
