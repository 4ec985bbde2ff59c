/* constants.h - physical constants used by the core, each with its source. */
#ifndef SEDGRADE_CONSTANTS_H
#define SEDGRADE_CONSTANTS_H

/* Standard acceleration of gravity, m/s^2 (CGPM 1901, conventional value). */
#define SG_GRAVITY_M_S2 9.80665

/* pi, written out because -std=c11 hides M_PI. */
#define SG_PI 3.14159265358979323846

/* Celsius to kelvin offset (SI definition). */
#define SG_KELVIN_OFFSET 273.15

/* IAPWS 2008 reducing constants for viscosity (IAPWS R12-08, section 2.2). */
#define SG_IAPWS_T_STAR_K 647.096
#define SG_IAPWS_RHO_STAR_KG_M3 322.0
#define SG_IAPWS_MU_STAR_PA_S 1.00e-6

/* Density of the liquid assumed by the conventional (BS 1377-2, ASTM D422)
 * forms of Stokes' law and of the hydrometer percent-finer formula: exactly
 * 1 Mg/m3 (METHODS.md 2.2, 2.3). */
#define SG_UNIT_LIQUID_DENSITY_KG_M3 1000.0

/* Particle density on which the 152H-type g/L scale is graduated, Mg/m3
 * (ASTM E100 152H; ASTM D422 Table 1 basis a(2.65) = 1.00). */
#define SG_GL_SCALE_BASIS_GS 2.65

/* Hydrometers are graduated at 20 C (ASTM D422 section 7; ASTM E100). */
#define SG_HYDROMETER_REF_TEMP_C 20.0

/* Validity range of the water property formulas used here, C: Tanaka et al.
 * (2001) is stated for 0-40 C; sedimentation is never run outside it. */
#define SG_WATER_TEMP_MIN_C 0.0
#define SG_WATER_TEMP_MAX_C 40.0

#endif
