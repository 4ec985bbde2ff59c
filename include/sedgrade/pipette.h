/* pipette.h - one pipette sample -> percent of specimen finer and the Stokes
 * diameter at the sampling depth and time. */
#ifndef SEDGRADE_PIPETTE_H
#define SEDGRADE_PIPETTE_H

#include "sedgrade/error.h"
#include "sedgrade/record.h"

struct sg_pipette_input {
    enum sg_standard standard;
    double elapsed_min;           /* > 0 */
    double temp_c;                /* thermometer correction applied */
    double depth_mm;              /* sampling depth below the surface, > 0 */
    double solids_g;              /* dry solids in the pipette sample, g (dispersant included) */
    double pipette_volume_ml;     /* > 0 */
    double suspension_volume_ml;  /* > pipette volume */
    double dispersant_mass_g;     /* total dispersant in the suspension, g, >= 0 */
    double particle_density_mg_m3;
    double specimen_dry_mass_g;   /* > 0 */
};

struct sg_pipette_point {
    double net_solids_g;        /* solids - dispersant share of the sample */
    double percent_specimen;    /* 100 (solids - disp Vp/V) (V/Vp) / m */
    double water_density_kg_m3;
    double viscosity_pa_s;
    double density_diff_kg_m3;
    double diameter_mm;
    double velocity_mm_s;
    double reynolds;
};

/* Reduces one sample (METHODS.md 4.1, 4.4). SG_EINVAL for non-positive time,
 * depth, volumes or mass, or a pipette volume not smaller than the suspension
 * volume; SG_EDOM for a temperature outside 0-40 C. */
enum sg_status sg_pipette_reduce(const struct sg_pipette_input *in, struct sg_pipette_point *out,
                                 struct sg_error *err);

#endif
