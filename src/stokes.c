/* stokes.c - Stokes' law and the particle Reynolds number. */
#include "sedgrade/stokes.h"

#include <math.h>

#include "sedgrade/constants.h"
#include "sedgrade/water.h"

double sg_stokes_velocity_m_s(double viscosity_pa_s, double density_diff_kg_m3, double diameter_m)
{
    return density_diff_kg_m3 * SG_GRAVITY_M_S2 * diameter_m * diameter_m / (18.0 * viscosity_pa_s);
}

static enum sg_status check_positive(double x, const char *what, const char *unit, struct sg_error *err)
{
    if (!isfinite(x) || x <= 0.0)
        return sg_error_set(err, SG_EINVAL, 0, 0, "%s %g %s must be a positive number (check the record value or option it "
                            "comes from, and its unit)",
                            what, x, unit);
    return SG_OK;
}

enum sg_status sg_stokes_diameter_m(double viscosity_pa_s, double depth_m, double density_diff_kg_m3,
                                    double time_s, double *diameter_m, struct sg_error *err)
{
    enum sg_status st;
    if ((st = check_positive(viscosity_pa_s, "viscosity", "Pa s", err)) ||
        (st = check_positive(depth_m, "settling depth", "m", err)) ||
        (st = check_positive(density_diff_kg_m3, "density difference between particles and liquid",
                             "kg/m3", err)) ||
        (st = check_positive(time_s, "elapsed time", "s", err)))
        return st;
    *diameter_m = sqrt(18.0 * viscosity_pa_s * depth_m / (density_diff_kg_m3 * SG_GRAVITY_M_S2 * time_s));
    return SG_OK;
}

enum sg_status sg_stokes_time_s(double viscosity_pa_s, double depth_m, double density_diff_kg_m3,
                                double diameter_m, double *time_s, struct sg_error *err)
{
    enum sg_status st;
    if ((st = check_positive(viscosity_pa_s, "viscosity", "Pa s", err)) ||
        (st = check_positive(depth_m, "settling depth", "m", err)) ||
        (st = check_positive(density_diff_kg_m3, "density difference between particles and liquid",
                             "kg/m3", err)) ||
        (st = check_positive(diameter_m, "diameter", "m", err)))
        return st;
    *time_s = 18.0 * viscosity_pa_s * depth_m /
              (density_diff_kg_m3 * SG_GRAVITY_M_S2 * diameter_m * diameter_m);
    return SG_OK;
}

double sg_stokes_reynolds(double water_density_kg_m3, double velocity_m_s, double diameter_m,
                          double viscosity_pa_s)
{
    return water_density_kg_m3 * velocity_m_s * diameter_m / viscosity_pa_s;
}

double sg_stokes_max_diameter_m(double viscosity_pa_s, double water_density_kg_m3,
                                double density_diff_kg_m3, double re_limit)
{
    /* Re = rho_w drho g D^3 / (18 eta^2)  =>  D = cbrt(18 eta^2 Re / (rho_w drho g)). */
    return cbrt(18.0 * viscosity_pa_s * viscosity_pa_s * re_limit /
                (water_density_kg_m3 * density_diff_kg_m3 * SG_GRAVITY_M_S2));
}

double sg_stokes_density_diff_kg_m3(enum sg_standard standard, double particle_density_mg_m3,
                                    double temp_c)
{
    return sg_stokes_density_diff_rho_w_kg_m3(standard, particle_density_mg_m3, sg_water_density_kg_m3(temp_c));
}

double sg_stokes_density_diff_rho_w_kg_m3(enum sg_standard standard, double particle_density_mg_m3,
                                          double water_density_kg_m3)
{
    const double rho_s = particle_density_mg_m3 * 1000.0;
    switch (standard) {
    case SG_STANDARD_BS1377_2:
        return rho_s - SG_UNIT_LIQUID_DENSITY_KG_M3;
    case SG_STANDARD_ASTM_D7928:
        return water_density_kg_m3 * (particle_density_mg_m3 - 1.0);
    case SG_STANDARD_NONE:
    case SG_STANDARD_ISO17892_4:
        break;
    }
    return rho_s - water_density_kg_m3;
}
