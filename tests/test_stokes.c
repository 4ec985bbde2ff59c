/* test_stokes.c - Stokes' law, settling time and the particle Reynolds number. */
#include <criterion/criterion.h>
#include <math.h>

#include "sedgrade/constants.h"
#include "sedgrade/stokes.h"
#include "sedgrade/water.h"

Test(stokes, bs_constant)
{
    /* BS 1377-2: D = 0.005531 sqrt(eta H / ((rho_s - 1) t)), D mm, eta mPa s, H mm, t min
     * (METHODS.md 2.3, 13.2 #18; 0.0055310 with g = 9.80665). Unit values give the constant. */
    double d = 0;
    cr_assert_eq(sg_stokes_diameter_m(1e-3, 1e-3, 1000.0, 60.0, &d, NULL), SG_OK);
    cr_assert(fabs(d * 1000.0 - 0.0055310) < 1e-7, "%.8f", d * 1000.0);
}

Test(stokes, bs_pipette_sheet_constant_25c)
{
    /* BS pipette sheet: at 25 C D = 0.05221 sqrt(1/((ps - 1) t)), H = 100 mm, eta 0.891 mPa s
     * (METHODS.md 2.3, 13.2 #19) */
    double d = 0;
    cr_assert_eq(sg_stokes_diameter_m(0.891e-3, 0.1, 1000.0, 60.0, &d, NULL), SG_OK);
    cr_assert(fabs(d * 1000.0 - 0.05221) < 1e-5);
}

Test(stokes, d422_k_factor)
{
    /* ASTM D422 K = sqrt(30 n / (980 (G - 1))), n poise (METHODS.md 2.2, 13.2 #20-21). K formula column
     * with Swindells eta: 20 C, Gs 2.65 -> 0.01363 (eta 1.0020 mPa s). D = K sqrt(L/T), so with L = 1 cm
     * and T = 1 min, D(mm) = K up to the g convention (D422 uses 980 cm/s2; we use 980.665). */
    double d = 0;
    cr_assert_eq(sg_stokes_diameter_m(1.0020e-3, 0.01, 1650.0, 60.0, &d, NULL), SG_OK);
    const double k_980 = d * 1000.0 * sqrt(9.80665 / 9.80);
    cr_assert(fabs(k_980 - 0.01363) < 1e-5, "%.6f", k_980);
}

Test(stokes, time_is_inverse_of_diameter)
{
    double t = 0, d = 0;
    cr_assert_eq(sg_stokes_time_s(0.8900e-3, 0.1, 1650.0, 20e-6, &t, NULL), SG_OK);
    cr_assert_eq(sg_stokes_diameter_m(0.8900e-3, 0.1, 1650.0, t, &d, NULL), SG_OK);
    cr_assert(fabs(d / 20e-6 - 1.0) < 1e-12);
    /* METHODS.md 4.2: 25 C, 100 mm, rho_s 2.65 (BS form rho_s - 1), 20 um -> 4.125 min, within 1 s */
    cr_assert(fabs(t - 4.125 * 60.0) < 1.0, "%.3f s", t);
}

Test(stokes, reynolds_quartz_20c)
{
    /* Quartz spheres (2650 kg/m3) in water at 20 C: D 0.05 / 0.063 / 0.075 / 0.1 mm -> Re 0.11 / 0.22 /
     * 0.378 / 0.90 (METHODS.md 2.6, 13.2 #23, derived) */
    const double rho_w = sg_water_density_kg_m3(20.0), eta = sg_water_viscosity_pa_s(20.0);
    const double dmm[] = {0.05, 0.063, 0.075, 0.1};
    const double re[] = {0.11, 0.22, 0.378, 0.90};
    const double tol[] = {0.005, 0.005, 0.005, 0.01};
    for (int i = 0; i < 4; i++) {
        const double d = dmm[i] / 1000.0;
        const double v = sg_stokes_velocity_m_s(eta, 2650.0 - rho_w, d);
        const double r = sg_stokes_reynolds(rho_w, v, d, eta);
        cr_assert(fabs(r - re[i]) < tol[i], "D %g mm: Re %.4f", dmm[i], r);
    }
}

Test(stokes, max_diameter_for_reynolds_limit)
{
    /* Gs 2.65, 20 C, Re 0.2 -> D_max 60.7 um (METHODS.md 2.6, 13.2 #22, tolerance 0.5 um) */
    const double rho_w = sg_water_density_kg_m3(20.0), eta = sg_water_viscosity_pa_s(20.0);
    const double d = sg_stokes_max_diameter_m(eta, rho_w, 2650.0 - rho_w, 0.2);
    cr_assert(fabs(d * 1e6 - 60.7) < 0.5, "%.2f um", d * 1e6);
}

Test(stokes, density_term_by_standard)
{
    const double t = 23.4;
    const double rho_w = sg_water_density_kg_m3(t);
    cr_assert(fabs(sg_stokes_density_diff_kg_m3(SG_STANDARD_NONE, 2.71, t) - (2710.0 - rho_w)) < 1e-9);
    cr_assert(fabs(sg_stokes_density_diff_kg_m3(SG_STANDARD_ISO17892_4, 2.71, t) - (2710.0 - rho_w)) < 1e-9);
    cr_assert(fabs(sg_stokes_density_diff_kg_m3(SG_STANDARD_BS1377_2, 2.71, t) - 1710.0) < 1e-9);
    cr_assert(fabs(sg_stokes_density_diff_kg_m3(SG_STANDARD_ASTM_D7928, 2.71, t) - rho_w * 1.71) < 1e-9);
    /* given the water density, the very same value */
    const enum sg_standard all[] = {SG_STANDARD_NONE, SG_STANDARD_ASTM_D7928, SG_STANDARD_BS1377_2,
                                    SG_STANDARD_ISO17892_4};
    for (size_t i = 0; i < sizeof all / sizeof all[0]; i++)
        cr_assert(sg_stokes_density_diff_rho_w_kg_m3(all[i], 2.71, rho_w) ==
                      sg_stokes_density_diff_kg_m3(all[i], 2.71, t),
                  "standard %d", (int)all[i]);
}

Test(stokes, invalid_inputs)
{
    struct sg_error err;
    double d = 0;
    cr_assert_eq(sg_stokes_diameter_m(1e-3, 0.1, 1650.0, 0.0, &d, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "elapsed time") != NULL, "%s", err.msg);
    cr_assert_eq(sg_stokes_diameter_m(1e-3, -0.1, 1650.0, 60.0, &d, &err), SG_EINVAL);
    cr_assert_eq(sg_stokes_diameter_m(1e-3, 0.1, -5.0, 60.0, &d, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "density difference") != NULL);
    cr_assert_eq(sg_stokes_diameter_m(NAN, 0.1, 1650.0, 60.0, &d, NULL), SG_EINVAL);
    cr_assert_eq(sg_stokes_time_s(1e-3, 0.1, 1650.0, 0.0, &d, &err), SG_EINVAL);
}

/* Guards: a non-positive input says where to look (the "(what to do)" part). */
Test(stokes, errors_say_what_to_do)
{
    struct sg_error err;
    double d = 0;
    cr_assert_eq(sg_stokes_diameter_m(1.002e-3, 0.1632, 1650.0, -30.0, &d, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "elapsed time -30 s must be a positive number (check the record value or option") !=
                  NULL,
              "%s", err.msg);
    cr_assert_eq(sg_stokes_time_s(1.002e-3, 0.1632, 1650.0, 0.0, &d, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "diameter 0 m must be a positive number (check") != NULL, "%s", err.msg);
}
