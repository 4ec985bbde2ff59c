/* hydrometer.c - reduction of one hydrometer reading (METHODS.md 3.2-3.4). */
#include "sedgrade/hydrometer.h"

#include <math.h>

#include "sedgrade/constants.h"
#include "sedgrade/stokes.h"
#include "sedgrade/water.h"

double sg_hydrometer_concentration_factor(enum sg_scale scale, double particle_density_mg_m3)
{
    const double gs = particle_density_mg_m3;
    if (!(gs > 1.0))
        return NAN;
    switch (scale) {
    case SG_SCALE_G_PER_L:
        return (SG_GL_SCALE_BASIS_GS - 1.0) * gs / (SG_GL_SCALE_BASIS_GS * (gs - 1.0));
    case SG_SCALE_DENSITY:
        return gs / (gs - 1.0);
    case SG_SCALE_NONE:
        break;
    }
    return NAN;
}

enum sg_status sg_hydrometer_prepare(const struct sg_hydrometer_input *in, bool values_only,
                                     struct sg_hydrometer_shared *sh, struct sg_error *err)
{
    if (in->scale == SG_SCALE_NONE)
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "hydrometer reading scale is not set (add 'test,reading_scale,g_per_l' or "
                            "'test,reading_scale,density')");
    if (!isfinite(in->specimen_dry_mass_g) || in->specimen_dry_mass_g <= 0.0)
        return sg_error_set(err, SG_EINVAL, 0, 0, "specimen dry mass %g g must be positive (give the oven-dry mass of the "
                            "sedimentation specimen in grams, e.g. 50.12)",
                            in->specimen_dry_mass_g);
    if (!isfinite(in->suspension_volume_ml) || in->suspension_volume_ml <= 0.0)
        return sg_error_set(err, SG_EINVAL, 0, 0, "suspension volume %g mL must be positive (give it in millilitres, e.g. 1000)",
                            in->suspension_volume_ml);
    const double a = sg_hydrometer_concentration_factor(in->scale, in->particle_density_mg_m3);
    if (!isfinite(a))
        return sg_error_set(err, SG_EINVAL, 0, 0, "particle density %g Mg/m3 must be greater than 1 (give it in Mg/m3, e.g. 2.65)",
                            in->particle_density_mg_m3);
    sh->concentration_factor = a;
    sh->suspension_volume_l = in->suspension_volume_ml / 1000.0;
    sh->values_only = values_only;
    return SG_OK;
}

enum sg_status sg_hydrometer_reduce_shared(const struct sg_hydrometer_input *in, const struct sg_hydrometer_shared *sh,
                                           struct sg_hydrometer_point *out, struct sg_error *err)
{
    if (!isfinite(in->elapsed_min) || in->elapsed_min <= 0.0)
        return sg_error_set(err, SG_EINVAL, 0, 0, "elapsed time %g min must be positive (give the minutes since the start of "
                            "sedimentation, e.g. 0.5)",
                            in->elapsed_min);

    double rho_w = 0.0, eta = 0.0;
    enum sg_status st = sg_water_properties(in->temp_c, &rho_w, &eta, err);
    if (st != SG_OK)
        return st;

    out->corrected_reading = in->reading - in->blank_reading;
    out->depth_reading = in->reading + in->meniscus_correction;
    out->effective_depth_mm = in->depth_at_zero_mm + in->depth_per_unit_mm * out->depth_reading;
    if (!(out->effective_depth_mm > 0.0))
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "effective depth %.4g mm at reading %g is not positive (check the depth "
                            "line and the reading scale)",
                            out->effective_depth_mm, out->depth_reading);
    out->concentration_g_l = out->corrected_reading * sh->concentration_factor;
    out->percent_specimen = 100.0 * out->concentration_g_l * sh->suspension_volume_l / in->specimen_dry_mass_g;
    out->water_density_kg_m3 = rho_w;
    out->viscosity_pa_s = eta;
    out->density_diff_kg_m3 = sg_stokes_density_diff_rho_w_kg_m3(in->standard, in->particle_density_mg_m3, rho_w);

    double d_m = 0.0;
    st = sg_stokes_diameter_m(eta, out->effective_depth_mm / 1000.0, out->density_diff_kg_m3,
                              in->elapsed_min * 60.0, &d_m, err);
    if (st != SG_OK)
        return st;
    out->diameter_mm = d_m * 1000.0;
    if (sh->values_only) {
        out->velocity_mm_s = out->reynolds = NAN;
        return SG_OK;
    }
    const double v = sg_stokes_velocity_m_s(eta, out->density_diff_kg_m3, d_m);
    out->velocity_mm_s = v * 1000.0;
    out->reynolds = sg_stokes_reynolds(rho_w, v, d_m, eta);
    return SG_OK;
}

enum sg_status sg_hydrometer_reduce(const struct sg_hydrometer_input *in, struct sg_hydrometer_point *out,
                                    struct sg_error *err)
{
    struct sg_hydrometer_shared sh;
    enum sg_status st = sg_hydrometer_prepare(in, false, &sh, err);
    return st != SG_OK ? st : sg_hydrometer_reduce_shared(in, &sh, out, err);
}
