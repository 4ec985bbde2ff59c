/* test_pipette.c - one pipette sample: percent of specimen and diameter. */
#include <criterion/criterion.h>
#include <math.h>

#include "sedgrade/pipette.h"

/* METHODS.md 13.10 V2-C: BS-style pipette, m 12.00 g, Vp 10.0 mL, V 500 mL, dispersant 1.0 g per 500 mL,
 * 25 C, eta 0.8900 mPa s, H 100 mm, rho_s 2.65 [derived vectors]. */
Test(pipette, v2c_vectors)
{
    const double t[] = {4.125, 45.838, 412.538};
    const double d[] = {0.020, 0.006, 0.002};
    const double mr[] = {0.1500, 0.1100, 0.0800};
    const double p[] = {54.17, 37.50, 25.00};
    for (int i = 0; i < 3; i++) {
        const struct sg_pipette_input in = {
            .standard = SG_STANDARD_BS1377_2, .elapsed_min = t[i], .temp_c = 25.0, .depth_mm = 100.0,
            .solids_g = mr[i], .pipette_volume_ml = 10.0, .suspension_volume_ml = 500.0,
            .dispersant_mass_g = 1.0, .particle_density_mg_m3 = 2.65, .specimen_dry_mass_g = 12.00};
        struct sg_pipette_point out;
        cr_assert_eq(sg_pipette_reduce(&in, &out, NULL), SG_OK);
        cr_assert(fabs(out.percent_specimen - p[i]) < 0.01, "P %.4f", out.percent_specimen);
        cr_assert(fabs(out.diameter_mm - d[i]) < 1e-5, "D %.6f", out.diameter_mm);
    }
}

Test(pipette, errors)
{
    struct sg_pipette_input in = {
        .standard = SG_STANDARD_NONE, .elapsed_min = 4.2, .temp_c = 24.7, .depth_mm = 100.0, .solids_g = 0.153,
        .pipette_volume_ml = 10.0, .suspension_volume_ml = 500.0, .dispersant_mass_g = 1.0,
        .particle_density_mg_m3 = 2.65, .specimen_dry_mass_g = 12.0};
    struct sg_pipette_point out;
    struct sg_error err;
    cr_assert_eq(sg_pipette_reduce(&in, &out, &err), SG_OK);
    in.pipette_volume_ml = 0;
    cr_assert_eq(sg_pipette_reduce(&in, &out, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "pipette volume") != NULL);
    in.pipette_volume_ml = 600;
    cr_assert_eq(sg_pipette_reduce(&in, &out, &err), SG_EINVAL);
    in.pipette_volume_ml = 10;
    in.depth_mm = 0;
    cr_assert_eq(sg_pipette_reduce(&in, &out, &err), SG_EINVAL);
    in.depth_mm = 100;
    in.solids_g = -0.1;
    cr_assert_eq(sg_pipette_reduce(&in, &out, &err), SG_EINVAL);
    in.solids_g = 0.1;
    in.dispersant_mass_g = -1;
    cr_assert_eq(sg_pipette_reduce(&in, &out, &err), SG_EINVAL);
    in.dispersant_mass_g = 1;
    in.temp_c = -3;
    cr_assert_eq(sg_pipette_reduce(&in, &out, &err), SG_EDOM);
    in.temp_c = 25;
    in.elapsed_min = -1;
    cr_assert_eq(sg_pipette_reduce(&in, &out, &err), SG_EINVAL);
}
