/* hydrometer.h - one hydrometer reading -> corrected reading, effective depth,
 * suspension concentration, percent of specimen finer and Stokes diameter. */
#ifndef SEDGRADE_HYDROMETER_H
#define SEDGRADE_HYDROMETER_H

#include <stdbool.h>

#include "sedgrade/error.h"
#include "sedgrade/record.h"

/* Everything one reading's reduction needs, already resolved from the record
 * and the calibration register. */
struct sg_hydrometer_input {
    enum sg_scale scale;
    enum sg_standard standard;
    double reading;             /* as read, top of meniscus, scale units */
    double blank_reading;       /* control-cylinder reading at the same temperature, scale units */
    double meniscus_correction; /* scale units, added to the reading for the effective depth */
    double depth_at_zero_mm;    /* effective depth at reading 0 (meniscus-corrected), mm */
    double depth_per_unit_mm;   /* change of effective depth per reading unit, mm (negative) */
    double temp_c;              /* suspension temperature (thermometer correction applied), C */
    double elapsed_min;         /* time since the start of sedimentation, min, > 0 */
    double particle_density_mg_m3; /* 1.5-5 */
    double specimen_dry_mass_g;    /* > 0 */
    double suspension_volume_ml;   /* > 0 */
};

struct sg_hydrometer_point {
    double corrected_reading;   /* reading - blank, scale units */
    double depth_reading;       /* reading + meniscus correction, scale units */
    double effective_depth_mm;  /* H = depth line at depth_reading */
    double concentration_g_l;   /* soil in suspension at the effective depth, g/L */
    double percent_specimen;    /* percent of the specimen finer than diameter_mm */
    double water_density_kg_m3; /* at temp_c */
    double viscosity_pa_s;      /* at temp_c */
    double density_diff_kg_m3;  /* the Stokes density term of the chosen standard */
    double diameter_mm;         /* Stokes equivalent diameter */
    double velocity_mm_s;       /* settling velocity of that diameter */
    double reynolds;            /* particle Reynolds number */
};

/* Concentration factor: g/L of soil per scale unit of (reading - blank).
 *   g_per_l scale: a = 1.65 Gs / (2.65 (Gs - 1))  (ASTM D422 Table 1 formula);
 *   density scale: Gs / (Gs - 1)  (BS 1377-2 K formula, per 1000 mL).
 * Gs is the particle density in Mg/m3. Returns NaN for SG_SCALE_NONE or Gs <= 1. */
double sg_hydrometer_concentration_factor(enum sg_scale scale, double particle_density_mg_m3);

/* What every reading of a test shares, checked and worked out once by
 * sg_hydrometer_prepare (a test has a dozen readings, and a Monte Carlo run
 * reduces them again in every draw). */
struct sg_hydrometer_shared {
    double concentration_factor; /* g/L per scale unit (sg_hydrometer_concentration_factor) */
    double suspension_volume_l;
    bool values_only; /* velocity_mm_s and reynolds are left NaN (a Monte Carlo draw reads neither) */
};

/* Reduces one reading. Returns SG_OK; SG_EINVAL for a scale of
 * SG_SCALE_NONE, a non-positive mass or volume, a particle density not
 * above 1, a non-positive time or a non-positive effective depth (checked
 * in that order); SG_EDOM for a temperature outside 0-40 C. The message has
 * no location: the caller adds the row's line. sg_hydrometer_prepare
 * followed by sg_hydrometer_reduce_shared. */
enum sg_status sg_hydrometer_reduce(const struct sg_hydrometer_input *in, struct sg_hydrometer_point *out,
                                    struct sg_error *err);

/* The test's part of sg_hydrometer_reduce: checks in's scale, specimen
 * mass, suspension volume and particle density (the messages of
 * sg_hydrometer_reduce) and fills sh. With values_only the readings
 * reduced with sh skip the settling velocity and Reynolds number (left
 * NaN); every other output is the same. */
enum sg_status sg_hydrometer_prepare(const struct sg_hydrometer_input *in, bool values_only,
                                     struct sg_hydrometer_shared *sh, struct sg_error *err);

/* The reading's part: reduces in with sh prepared from an input with the
 * same scale, specimen mass, suspension volume and particle density (the
 * other fields may differ from reading to reading). Same results and
 * statuses as sg_hydrometer_reduce for those inputs. */
enum sg_status sg_hydrometer_reduce_shared(const struct sg_hydrometer_input *in, const struct sg_hydrometer_shared *sh,
                                           struct sg_hydrometer_point *out, struct sg_error *err);

#endif
