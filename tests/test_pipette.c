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

/* Guards: each refused input says what to do (the "(what to do)" part of
 * every message). Inputs invented. */
Test(pipette, errors_say_what_to_do)
{
    const struct sg_pipette_input good = {
        .standard = SG_STANDARD_NONE, .elapsed_min = 4.5, .temp_c = 20.6, .depth_mm = 100.0, .solids_g = 0.4822,
        .pipette_volume_ml = 25.0, .suspension_volume_ml = 500.0, .dispersant_mass_g = 0.75,
        .particle_density_mg_m3 = 2.71, .specimen_dry_mass_g = 20.014};
    struct sg_pipette_point out;
    struct sg_error err;
    static const struct {
        int field;
        double v;
        const char *frag;
    } cases[] = {
        {0, -1.5, "elapsed time -1.5 min must be positive (give the minutes since the start"},
        {1, -100, "sampling depth -100 mm must be positive (give the depth below the surface"},
        {2, 25.0, "suspension volume 25 mL must exceed the pipette volume 25 mL (the pipette samples"},
        {3, 0.0, "specimen dry mass 0 g must be positive (give the oven-dry mass"},
        {4, -0.75, "dispersant mass -0.75 g must not be negative (give the total mass of dispersant"},
        {5, -0.01, "pipette solids -0.01 g must not be negative (give the dry mass of solids"},
        {6, 0.9, "particle density 0.9 Mg/m3 must be greater than 1 (give it in Mg/m3"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        struct sg_pipette_input in = good;
        double *const slot[] = {&in.elapsed_min, &in.depth_mm, &in.suspension_volume_ml, &in.specimen_dry_mass_g,
                                &in.dispersant_mass_g, &in.solids_g, &in.particle_density_mg_m3};
        *slot[cases[i].field] = cases[i].v;
        cr_assert_eq(sg_pipette_reduce(&in, &out, &err), SG_EINVAL, "case %zu", i);
        cr_assert(strstr(err.msg, cases[i].frag) != NULL, "case %zu: %s", i, err.msg);
    }
}
