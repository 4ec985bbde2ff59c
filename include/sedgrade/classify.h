/* classify.h - what the engineer reads off the curve: D-values, Cu, Cc,
 * grading descriptions, size fractions by ISO 14688-1, ASTM D2487 (USCS),
 * AASHTO M 145 and USDA, and the USDA texture class. */
#ifndef SEDGRADE_CLASSIFY_H
#define SEDGRADE_CLASSIFY_H

#include <stdbool.h>

#include "sedgrade/curve.h"
#include "sedgrade/error.h"
#include "sedgrade/record.h"
#include "sedgrade/result.h"

struct sg_reduce_options;

/* Adds the summary quantities to res from the curve (fractions are
 * P(b) - P(a) read off the curve with its own interpolation; nothing is
 * extrapolated). In this order:
 *
 *  always (SPEC): d10_mm d15_mm d30_mm d50_mm d60_mm d85_mm (mm), cu cc (-),
 *   clay_pct silt_pct sand_pct gravel_pct (ISO 14688-1: 0.002 / 0.063 / 2 /
 *   63 mm), fines_pct (= P(0.075 mm)), usda_sand_pct usda_silt_pct
 *   usda_clay_pct (% of the fraction finer than 2 mm: sand 0.05-2, silt
 *   0.002-0.05, clay < 0.002 mm), usda_texture (text).
 *  then: d<x>_mm for each opt->extra_dx (x with '.' written '_': 2.5 ->
 *   d2_5_mm; a name already present is skipped; a non-finite x is skipped;
 *   x outside (0, 100] is added as not determined);
 *   cobbles_pct (ISO 14688-1, 63-200 mm);
 *   iso_fine_silt_pct iso_medium_silt_pct iso_coarse_silt_pct
 *   iso_fine_sand_pct iso_medium_sand_pct iso_coarse_sand_pct
 *   iso_fine_gravel_pct iso_medium_gravel_pct iso_coarse_gravel_pct
 *   (0.002 / 0.0063 / 0.02 / 0.063 / 0.2 / 0.63 / 2 / 6.3 / 20 / 63 mm);
 *   uscs_cobbles_pct (75-300 mm) uscs_gravel_pct (4.75-75)
 *   uscs_coarse_gravel_pct (19-75) uscs_fine_gravel_pct (4.75-19)
 *   uscs_sand_pct (0.075-4.75) uscs_coarse_sand_pct (2-4.75)
 *   uscs_medium_sand_pct (0.425-2) uscs_fine_sand_pct (0.075-0.425)
 *   uscs_fines_pct (< 0.075) (ASTM D2487, % of the whole sample);
 *   aashto_gravel_pct (2-75) aashto_coarse_sand_pct (0.425-2)
 *   aashto_fine_sand_pct (0.075-0.425) aashto_silt_pct (0.002-0.075)
 *   aashto_clay_pct (< 0.002) (AASHTO M 145);
 *   usda_very_coarse_sand_pct (1-2) usda_coarse_sand_pct (0.5-1)
 *   usda_medium_sand_pct (0.25-0.5) usda_fine_sand_pct (0.10-0.25)
 *   usda_very_fine_sand_pct (0.05-0.10) (% of the fraction finer than 2 mm);
 *   finer_0_02_mm_pct (frost screen input, METHODS.md 9.3);
 *   passing_2_00_mm_pct passing_0_425_mm_pct passing_0_075_mm_pct
 *   (No. 10 / 40 / 200, AASHTO M 145 group criteria);
 *   uscs_grading (text: "well graded", "poorly graded", "not applicable,
 *   fines over 12 %" or "not applicable, fine-grained"); uscs_group (text:
 *   GW, GP, SW or SP when fines < 5 %; otherwise not determined, the note
 *   says which symbols remain and that plasticity is needed);
 *   iso_grading (text, sg_classify_iso_grading);
 *   junction_gap_pct (percentage points; see below).
 *
 * USCS decisions (ASTM D2487) use percentages of the fraction finer than
 * 75 mm (P(75) must be determined): fines f = 100 P(0.075) / P(75);
 * coarse-grained when f < 50 %; gravel when the gravel fraction
 * (4.75-75 mm) is larger than the sand fraction (0.075-4.75 mm), else sand;
 * clean when f < 5 %, dual symbol when 5 <= f <= 12 %, silty/clayey when
 * f > 12 %. Grading (sg_classify_uscs_well_graded) is given when f <= 12 %.
 * Thresholds are compared on the unrounded values.
 *
 * junction_gap_pct: at the finest aperture among the sieve and fine-sieve
 * points (the sieve set's value where both have it), the sieve percent
 * passing minus the sedimentation-only percent finer at that size. The
 * latter is interpolated log-linearly between the sedimentation points
 * (hydrometer or pipette, including those kept off the curve because they
 * are coarser than the finest sieve) that straddle the aperture; when they
 * do not straddle it, it is extrapolated log-linearly from the two
 * sedimentation points (distinct sizes) nearest to it, which are the two
 * coarsest in the usual case. That extrapolation is a QC indicator only and
 * the note says so. Not determined without sieve or sedimentation points,
 * or with a single sedimentation size when extrapolation would be needed.
 *
 * A quantity the curve cannot give is added as not determined with the
 * reason in its note (an empty curve makes every quantity not determined).
 * rec may be NULL (it is not used at present); opt may be NULL (no extra
 * D-values). Returns SG_OK or SG_ENOMEM. */
enum sg_status sg_classify_summarise(const struct sg_curve *curve, const struct sg_record *rec,
                                     const struct sg_reduce_options *opt, struct sg_result *res,
                                     struct sg_error *err);

/* USDA texture class (METHODS.md 8.4, the 12 classes as inequalities) of a
 * fine-earth fraction with sand_pct (0.05-2 mm), silt_pct (0.002-0.05 mm)
 * and clay_pct (< 0.002 mm). The three are first scaled to sum to 100, then
 * rounded to 0.1 % with the sum kept at exactly 100 (largest-remainder
 * rounding), and the inequalities are evaluated exactly on tenths of a
 * percent. Returns the class name in lower case ("sand", "loamy sand",
 * "sandy loam", "loam", "silt loam", "silt", "sandy clay loam",
 * "clay loam", "silty clay loam", "sandy clay", "silty clay", "clay"), a
 * static string; NULL when an input is not finite, any is below -0.05
 * (values from -0.05 to 0 count as 0) or the sum is not positive. */
const char *sg_classify_usda_texture(double sand_pct, double silt_pct, double clay_pct);

/* Published limits (Cu >= 6, fines < 5 %, Cc <= 3, the Hazen window, ...)
 * are compared with a relative tolerance: a value computed through log10
 * and back (Cu = 0.6 / 0.1 comes out 5.999999999999999, a fines content
 * 4.85 / 97 x 100 comes out 4.999999999999999) counts as on the limit, as
 * the same value worked out by hand would. The tolerance is far below any
 * difference a measurement can make. */
#define SG_CLASSIFY_LIMIT_TOL 1e-9

/* x >= limit, a value within SG_CLASSIFY_LIMIT_TOL x max(|limit|, 1) of the
 * limit counting as equal to it; false for a non-finite x. */
bool sg_classify_at_least(double x, double limit);

/* x <= limit, with the same tolerance; false for a non-finite x. A strict
 * "x > limit" is !sg_classify_at_most(x, limit) (for a finite x). */
bool sg_classify_at_most(double x, double limit);

/* ASTM D2487 grading of a coarse-grained soil (METHODS.md 7.3): well graded
 * when Cu >= 4 and 1 <= Cc <= 3 for a gravel, Cu >= 6 and 1 <= Cc <= 3 for a
 * sand; poorly graded otherwise (also for non-finite Cu or Cc). Limits as
 * sg_classify_at_least. */
bool sg_classify_uscs_well_graded(bool is_gravel, double cu, double cc);

/* ISO 14688-2 grading term from Cu and Cc (METHODS.md 7.3; numeric limits
 * from memory, 2004 edition wording, to be verified against the standard):
 *   Cc < 0.5                      -> "gap-graded"
 *   Cu > 15 and 1 < Cc < 3        -> "multi-graded"
 *   6 <= Cu <= 15 (Cc >= 0.5)     -> "medium-graded"
 *   Cu < 6 (Cc >= 0.5)            -> "even-graded"
 *   Cu > 15, 0.5 <= Cc <= 1 or Cc >= 3 -> NULL (no term of the table fits)
 * The table's Cc < 1 for medium- and even-graded soils is not required:
 * a single-sized soil (Cu = Cc = 1) is even-graded. Returns a static
 * string, or NULL when no term fits or an input is not finite or Cu < 1. */
const char *sg_classify_iso_grading(double cu, double cc);

#endif
