/* stokes.h - Stokes' law for a sphere settling in water: equivalent diameter
 * from depth and time, settling time for a diameter, and the particle
 * Reynolds number that bounds the law's validity. SI units throughout. */
#ifndef SEDGRADE_STOKES_H
#define SEDGRADE_STOKES_H

#include "sedgrade/error.h"
#include "sedgrade/record.h"

/* Terminal velocity v = (rho_s - rho_w) g D^2 / (18 eta), m/s. */
double sg_stokes_velocity_m_s(double viscosity_pa_s, double density_diff_kg_m3, double diameter_m);

/* Diameter of a sphere that settles depth_m in time_s:
 * D = sqrt(18 eta H / ((rho_s - rho_w) g t)), m. All inputs must be finite
 * and > 0, else SG_EINVAL. */
enum sg_status sg_stokes_diameter_m(double viscosity_pa_s, double depth_m, double density_diff_kg_m3,
                                    double time_s, double *diameter_m, struct sg_error *err);

/* Time for a sphere of diameter_m to settle depth_m, s (inverse of the above). */
enum sg_status sg_stokes_time_s(double viscosity_pa_s, double depth_m, double density_diff_kg_m3,
                                double diameter_m, double *time_s, struct sg_error *err);

/* Particle Reynolds number Re = rho_w v D / eta (dimensionless). */
double sg_stokes_reynolds(double water_density_kg_m3, double velocity_m_s, double diameter_m,
                          double viscosity_pa_s);

/* Largest diameter, m, whose Reynolds number stays at or below re_limit. */
double sg_stokes_max_diameter_m(double viscosity_pa_s, double water_density_kg_m3,
                                double density_diff_kg_m3, double re_limit);

/* The density difference (rho_s - rho_liquid), kg/m3, that a standard's form
 * of Stokes' law uses at temp_c for particles of particle_density_mg_m3:
 *   SG_STANDARD_NONE, SG_STANDARD_ISO17892_4: rho_s - rho_w(T) (exact physics);
 *   SG_STANDARD_BS1377_2: rho_s - 1 Mg/m3 (BS 1377-2 "ps - 1");
 *   SG_STANDARD_ASTM_D7928: rho_w(T) (Gs - 1), Gs = rho_s / 1 Mg/m3 (D7928, from memory). */
double sg_stokes_density_diff_kg_m3(enum sg_standard standard, double particle_density_mg_m3,
                                    double temp_c);

/* The same with the water density at the temperature given, for a caller
 * that has it already (sg_water_density_kg_m3(temp_c), as sg_water_properties
 * gives it): the same value, without working the density out again. */
double sg_stokes_density_diff_rho_w_kg_m3(enum sg_standard standard, double particle_density_mg_m3,
                                          double water_density_kg_m3);

#endif
