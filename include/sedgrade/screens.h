/* screens.h - empirical screens read off the grading curve: Hazen's
 * permeability estimate from D10, the 0.02 mm frost-susceptibility screen
 * and Terzaghi's filter ratios. Screens with validity limits, never design
 * values (METHODS.md 9.1, 9.3, 9.4). */
#ifndef SEDGRADE_SCREENS_H
#define SEDGRADE_SCREENS_H

#include <stdbool.h>

#include "sedgrade/error.h"
#include "sedgrade/record.h"
#include "sedgrade/result.h"

struct sg_reduce_options;

/* Hazen: k[cm/s] = C D10[mm]^2 with C = 1.0 (cm/s)/mm^2, i.e. the classical
 * C_H = 100 (cm s)^-1 with D10 in cm (METHODS.md 9.1, Carrier 2003 read 26;
 * C varies widely, see there). */
#define SG_HAZEN_C_CM_S_PER_MM2 1.0
/* Validity window of D10, mm (METHODS.md 9.1, read 27). */
#define SG_HAZEN_D10_MIN_MM 0.1
#define SG_HAZEN_D10_MAX_MM 2.5
/* Hazen's formula was made for uniform filter sands: a Cu of this or more
 * is noted (METHODS.md 9.1, "Cu < 5", from memory). */
#define SG_HAZEN_CU_NOTE 5.0

/* Frost screen on the percent finer than 0.02 mm (METHODS.md 9.3): for
 * non-uniform soils frost susceptible from 3 %, possibly from 1.5 % (US Army
 * TI 850-02, read 32); for uniform soils possibly from 3 % and susceptible
 * from 10 % (Casagrande 1931 via read 34; Corps PFS sands 3-10 %, memory). */
#define SG_FROST_SIZE_MM 0.02
#define SG_FROST_POSSIBLE_PCT 1.5
#define SG_FROST_SUSCEPTIBLE_PCT 3.0
#define SG_FROST_UNIFORM_POSSIBLE_PCT 3.0
#define SG_FROST_UNIFORM_SUSCEPTIBLE_PCT 10.0
/* A soil counts as uniform ("very uniform" in Casagrande's statement) when
 * Cu is below this (from memory; common practice). */
#define SG_FROST_UNIFORM_CU_MAX 5.0

/* Terzaghi's filter rule (METHODS.md 9.4, read 35): retention
 * D15(filter) / D85(base) <= 4 and permeability D15(filter) / D15(base) >= 4
 * (both quoted as 4-5; 4 is the conservative end of each). */
#define SG_TERZAGHI_RETENTION_MAX 4.0
#define SG_TERZAGHI_PERMEABILITY_MIN 4.0

/* Hazen's k, cm/s, for d10_mm; the validity check is separate. */
double sg_screens_hazen_k_cm_s(double d10_mm);

/* True when d10_mm lies within SG_HAZEN_D10_MIN_MM..SG_HAZEN_D10_MAX_MM. */
bool sg_screens_hazen_valid(double d10_mm);

enum sg_frost_class {
    SG_FROST_NOT_SUSCEPTIBLE = 0,
    SG_FROST_POSSIBLY,
    SG_FROST_SUSCEPTIBLE
};

/* Frost screen from the percent finer than 0.02 mm; uniform selects the
 * uniform-soil limits. percent_finer must be finite. */
enum sg_frost_class sg_screens_frost(double finer_0_02_mm_pct, bool uniform);
const char *sg_screens_frost_name(enum sg_frost_class c);

struct sg_filter_ratios {
    double retention;    /* D15(filter) / D85(base), should be <= SG_TERZAGHI_RETENTION_MAX */
    double permeability; /* D15(filter) / D15(base), should be >= SG_TERZAGHI_PERMEABILITY_MIN */
    bool retention_ok;
    bool permeability_ok;
};

/* Terzaghi ratios for a filter over a base soil. All sizes in mm, finite
 * and > 0, else SG_EINVAL. */
enum sg_status sg_screens_terzaghi(double base_d15_mm, double base_d85_mm, double filter_d15_mm,
                                   struct sg_filter_ratios *out, struct sg_error *err);

/* Adds hazen_k_cm_s (cm/s; not determined outside the D10 window, with the
 * reason) and frost_screen (text) to res, reading d10_mm, cu and
 * finer_0_02_mm_pct (or the curve); with opt->has_base_soil also
 * filter_retention_ratio, filter_permeability_ratio (this test's D15 over the
 * base soil's D85 and D15) and filter_screen (text: "meets both",
 * "fails retention", "fails permeability" or "fails both"). Notes state the formula, C, units and
 * that these are screens. With opt->values_only notes are left out. opt may
 * be NULL. Returns SG_OK or SG_ENOMEM. */
enum sg_status sg_screens_summarise(const struct sg_record *rec, const struct sg_reduce_options *opt,
                                    struct sg_result *res, struct sg_error *err);

#endif
