/* plasticity.h - the fines and plasticity check: plasticity and liquidity
 * indices, position on the Casagrande plasticity chart, the ASTM D2487 group
 * symbol where plasticity decides, BS 5930 plasticity terms, Skempton's
 * activity, and consistency checks between the grading and the limits. */
#ifndef SEDGRADE_PLASTICITY_H
#define SEDGRADE_PLASTICITY_H

#include <stdbool.h>

#include "sedgrade/error.h"
#include "sedgrade/record.h"
#include "sedgrade/result.h"

struct sg_reduce_options;

/* Casagrande chart lines (ASTM D2487 Fig. 4; METHODS.md 8.2; from memory,
 * high confidence). A-line PI = 0.73 (LL - 20), horizontal at PI = 4 below
 * LL = 25.5 for the D2487 decisions; U-line PI = 0.9 (LL - 8), vertical at
 * LL = 16 up to PI = 7 (upper limit of natural soils). */
#define SG_PLAST_A_SLOPE 0.73
#define SG_PLAST_A_LL0_PCT 20.0
#define SG_PLAST_U_SLOPE 0.9
#define SG_PLAST_U_LL0_PCT 8.0
#define SG_PLAST_U_VERTICAL_LL_PCT 16.0
/* D2487 CL-ML band and the PI limits of the fine-grained rules (from memory). */
#define SG_PLAST_CLML_PI_MIN 4.0
#define SG_PLAST_CLML_PI_MAX 7.0
/* D2487 liquid limit separating L and H (LL < 50: L). */
#define SG_PLAST_LL_HIGH_PCT 50.0
/* D2487 fines limits, % of the fraction finer than 75 mm (METHODS.md 8.2). */
#define SG_PLAST_CLEAN_MAX_PCT 5.0
#define SG_PLAST_DUAL_MAX_PCT 12.0
#define SG_PLAST_FINE_GRAINED_MIN_PCT 50.0
/* Distance from a fines limit, percentage points, within which the soil is
 * reported as borderline (common practice: about the repeatability of the
 * washing; the Monte Carlo run gives the class probabilities). */
#define SG_PLAST_BORDERLINE_PP 2.0
/* BS 5930 plasticity terms by liquid limit (from memory): low < 35,
 * intermediate 35-50, high 50-70, very high 70-90, extremely high >= 90. */
#define SG_PLAST_BS_LL_I_PCT 35.0
#define SG_PLAST_BS_LL_H_PCT 50.0
#define SG_PLAST_BS_LL_V_PCT 70.0
#define SG_PLAST_BS_LL_E_PCT 90.0
/* Skempton activity classes (METHODS.md 9.2, read 31): inactive A < 0.75,
 * normal 0.75-1.25, active A > 1.25. */
#define SG_ACTIVITY_INACTIVE_MAX 0.75
#define SG_ACTIVITY_ACTIVE_MIN 1.25
/* Range of activity of the common clay minerals (METHODS.md 9.2 and 13.7
 * #69, Grim via Handy & Spangler, read 30): kaolinite about 0.3 to
 * Na-smectite about 7. Outside it, suspect the PI or the clay fraction. */
#define SG_ACTIVITY_MINERAL_MIN 0.3
#define SG_ACTIVITY_MINERAL_MAX 7.0
/* Clay fraction, %, from which a soil is expected to be plastic (Handy &
 * Spangler: plasticity starts at about 10 % clay, METHODS.md 9.2, read 30). */
#define SG_PLAST_PLASTIC_CLAY_MIN_PCT 10.0

/* Where a point (LL, PI) lies on the plasticity chart. */
enum sg_chart_zone {
    SG_CHART_NON_PLASTIC = 0, /* PI <= 0 */
    SG_CHART_BELOW_A,         /* below the A-line (or PI < 4): silts, M */
    SG_CHART_CL_ML,           /* 4 <= PI <= 7 on or above the A-line: the CL-ML band */
    SG_CHART_ABOVE_A,         /* on or above the A-line, PI > 7 (or LL >= 50): clays, C */
    SG_CHART_ABOVE_U          /* beyond the U-line: not a natural soil, re-test */
};

/* A-line and U-line PI at a liquid limit, % (the plain equations). */
double sg_plasticity_a_line_pi(double ll_pct);
double sg_plasticity_u_line_pi(double ll_pct);

/* Chart zone of (ll_pct, pi_pct). Beyond the U-line when PI > 0.9 (LL - 8)
 * or, left of its vertical part, LL < 16 with PI > 0. On or above the
 * A-line means PI >= max(4, 0.73 (LL - 20)). Inputs must be finite. */
enum sg_chart_zone sg_plasticity_chart_zone(double ll_pct, double pi_pct);
const char *sg_plasticity_zone_name(enum sg_chart_zone z);

/* ASTM D2487 inorganic fine-grained symbol from LL and PI (from memory):
 * LL < 50: PI > 7 on or above A -> "CL"; 4 <= PI <= 7 on or above A ->
 * "CL-ML"; PI < 4 or below A -> "ML". LL >= 50: on or above A -> "CH",
 * below -> "MH". A point beyond the U-line is still given its symbol.
 * Returns NULL for non-finite input. Organic soils (OL, OH) need the
 * oven-dried liquid limit and are not distinguished. */
const char *sg_plasticity_uscs_fine(double ll_pct, double pi_pct);

/* Inputs to the complete D2487 group symbol. Percentages are of the
 * fraction finer than 75 mm; NaN where not determined or not given. */
struct sg_uscs_input {
    double gravel_pct; /* 4.75-75 mm */
    double sand_pct;   /* 0.075-4.75 mm */
    double fines_pct;  /* < 0.075 mm */
    double cu, cc;
    double ll_pct, pi_pct;
};

/* ASTM D2487 group symbol (from memory; METHODS.md 8.2): fines >= 50 %:
 * sg_plasticity_uscs_fine; otherwise gravel (G) when gravel > sand, else
 * sand (S); fines < 5 %: GW/GP/SW/SP by Cu and Cc (GW: Cu >= 4, SW: Cu >= 6,
 * both 1 <= Cc <= 3); 5-12 %: dual GW-GM, GW-GC, GP-GM, GP-GC (S...
 * likewise), C when the fines are CL, CH or CL-ML; > 12 %: GM, GC, GC-GM
 * (SM, SC, SC-SM). Returns the symbol, or NULL with *why (a static text)
 * saying what is missing. */
const char *sg_plasticity_uscs_symbol(const struct sg_uscs_input *in, const char **why);

/* BS 5930 plasticity term from the liquid limit: "low", "intermediate",
 * "high", "very high", "extremely high" and its letter (L, I, H, V, E).
 * Returns NULL for a non-finite or negative LL. */
const char *sg_plasticity_bs5930_term(double ll_pct, char *letter);

/* Skempton activity class of A: "inactive", "normal", "active" (NULL for a
 * non-finite or negative A). */
const char *sg_plasticity_activity_class(double activity);

/* Adds the plasticity rows to res (after the classify rows, which it reads:
 * clay_pct, cu, cc, and the curve for the D2487 fractions):
 * plasticity_index_pct, liquidity_index, casagrande_chart,
 * bs5930_plasticity, uscs_symbol, activity, activity_class; each not
 * determined, with the reason, when its inputs are missing. Consistency
 * findings become flags (info or warning): atterberg_limits,
 * plasticity_u_line, fines_without_limits, fines_borderline,
 * activity_range, activity_not_computed, nonplastic_clay. With
 * opt->values_only (Monte Carlo draws) notes and flags are left out.
 * opt may be NULL. Returns SG_OK or SG_ENOMEM. */
enum sg_status sg_plasticity_summarise(const struct sg_record *rec, const struct sg_reduce_options *opt,
                                       struct sg_result *res, struct sg_error *err);

#endif
