/* pipette.c - reduction of one pipette sample (METHODS.md 4). */
#include "sedgrade/pipette.h"

#include <math.h>

#include "sedgrade/stokes.h"
#include "sedgrade/water.h"

enum sg_status sg_pipette_reduce(const struct sg_pipette_input *in, struct sg_pipette_point *out,
                                 struct sg_error *err)
{
    if (!isfinite(in->elapsed_min) || in->elapsed_min <= 0.0)
        return sg_error_set(err, SG_EINVAL, 0, 0, "elapsed time %g min must be positive (give the minutes since the start of "
                            "sedimentation, e.g. 0.5)",
                            in->elapsed_min);
    if (!isfinite(in->depth_mm) || in->depth_mm <= 0.0)
        return sg_error_set(err, SG_EINVAL, 0, 0, "sampling depth %g mm must be positive (give the depth below the surface of "
                            "the suspension in millimetres, e.g. 100)",
                            in->depth_mm);
    if (!isfinite(in->pipette_volume_ml) || in->pipette_volume_ml <= 0.0)
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "pipette volume %g mL must be positive (give 'test,pipette_volume_ml' or "
                            "name a calibrated pipette)",
                            in->pipette_volume_ml);
    if (!isfinite(in->suspension_volume_ml) || in->suspension_volume_ml <= in->pipette_volume_ml)
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "suspension volume %g mL must exceed the pipette volume %g mL (the pipette "
                            "samples the suspension: check both volumes and their units)",
                            in->suspension_volume_ml, in->pipette_volume_ml);
    if (!isfinite(in->specimen_dry_mass_g) || in->specimen_dry_mass_g <= 0.0)
        return sg_error_set(err, SG_EINVAL, 0, 0, "specimen dry mass %g g must be positive (give the oven-dry mass of the "
                            "sedimentation specimen in grams, e.g. 20.01)",
                            in->specimen_dry_mass_g);
    if (!isfinite(in->dispersant_mass_g) || in->dispersant_mass_g < 0.0)
        return sg_error_set(err, SG_EINVAL, 0, 0, "dispersant mass %g g must not be negative (give the total mass of dispersant "
                            "in the suspension in grams, or 0 if none was added)",
                            in->dispersant_mass_g);
    if (!isfinite(in->solids_g) || in->solids_g < 0.0)
        return sg_error_set(err, SG_EINVAL, 0, 0, "pipette solids %g g must not be negative (give the dry mass of solids in the "
                            "pipette sample in grams, e.g. 0.2483)",
                            in->solids_g);
    if (!(in->particle_density_mg_m3 > 1.0))
        return sg_error_set(err, SG_EINVAL, 0, 0, "particle density %g Mg/m3 must be greater than 1 (give it in Mg/m3, e.g. 2.65)",
                            in->particle_density_mg_m3);

    double rho_w = 0.0, eta = 0.0;
    enum sg_status st = sg_water_properties(in->temp_c, &rho_w, &eta, err);
    if (st != SG_OK)
        return st;

    const double ratio = in->suspension_volume_ml / in->pipette_volume_ml;
    out->net_solids_g = in->solids_g - in->dispersant_mass_g / ratio;
    out->percent_specimen = 100.0 * out->net_solids_g * ratio / in->specimen_dry_mass_g;
    out->water_density_kg_m3 = rho_w;
    out->viscosity_pa_s = eta;
    out->density_diff_kg_m3 =
        sg_stokes_density_diff_rho_w_kg_m3(in->standard, in->particle_density_mg_m3, rho_w);
    double d_m = 0.0;
    st = sg_stokes_diameter_m(eta, in->depth_mm / 1000.0, out->density_diff_kg_m3, in->elapsed_min * 60.0,
                              &d_m, err);
    if (st != SG_OK)
        return st;
    out->diameter_mm = d_m * 1000.0;
    const double v = sg_stokes_velocity_m_s(eta, out->density_diff_kg_m3, d_m);
    out->velocity_mm_s = v * 1000.0;
    out->reynolds = sg_stokes_reynolds(rho_w, v, d_m, eta);
    return SG_OK;
}
