/* water.h - density and dynamic viscosity of liquid water at 0.1 MPa, the
 * properties Stokes' law needs at the temperature of each reading. */
#ifndef SEDGRADE_WATER_H
#define SEDGRADE_WATER_H

#include "sedgrade/error.h"

/* Density of air-free SMOW at 101 325 Pa by Tanaka et al. (2001), kg/m3.
 * temp_c: any value (the formula is stated for 0-40 C; no range check here). */
double sg_water_density_kg_m3(double temp_c);

/* IAPWS 2008 viscosity (IAPWS R12-08) from temperature and density, without
 * the critical enhancement (mu2 = 1), Pa s. temp_k > 0, density_kg_m3 > 0. */
double sg_water_viscosity_iapws_pa_s(double temp_k, double density_kg_m3);

/* Dynamic viscosity of liquid water at 0.1 MPa, Pa s: IAPWS 2008 evaluated at
 * the Tanaka density for temp_c. */
double sg_water_viscosity_pa_s(double temp_c);

/* Both properties with a range check. temp_c must be finite and within
 * SG_WATER_TEMP_MIN_C..SG_WATER_TEMP_MAX_C, else SG_EDOM with a message.
 * Either output pointer may be NULL. */
enum sg_status sg_water_properties(double temp_c, double *density_kg_m3, double *viscosity_pa_s,
                                   struct sg_error *err);

#endif
