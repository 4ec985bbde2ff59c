/* qc.h - named quality-control rules for a sedimentation run, each with a
 * documented, adjustable threshold.
 *
 * Rules (the flag name is what points.csv, the summary's qc_flags and the
 * report show). Severity: info is shown only; a warning fails the run only
 * with --strict; a failure fails it (exit 1, results still written).
 *
 *  name                 severity  default threshold (struct sg_qc_limits)        source
 *  reynolds             warning   Re > 0.2 on a point on the curve (reynolds_max)  METHODS.md 2.6: IS 5282 summary 0.2,
 *                                                                                 ISO 13317-4 0.25
 *  brownian             warning   D < 0.0002 mm (diameter_min_mm)                   METHODS.md 2.6: ASTM D7928 scope
 *  coarser_than_sieve   info      D >= finest sieve: kept off the curve (set by     METHODS.md 6.2, 6.3 #5
 *                                 sg_reduce; QC names it)
 *  concentration        warning   first reading > 50 g/L (concentration_max_g_l)   METHODS.md 2.6, 3.7 #7 (D422/D7928,
 *                                                                                 from memory)
 *  not_falling          failure   percent of specimen of a reading above the       METHODS.md 3.7 #3 (derived);
 *                                 lowest of the earlier readings by > 1.0 point     tolerance common practice
 *                                 (monotone_tolerance_pct)
 *  temperature_range    warning   T < 15 C or T > 30 C (temp_min_c, temp_max_c)    common practice (D422 Table 3 K
 *                                                                                 covers 16-30 C, METHODS.md 2.2)
 *  temperature_drift    warning   |T - T(previous reading)| > 1.0 C                 METHODS.md 3.7 #2 (from memory;
 *                                 (temp_drift_max_c)                                AS 1289 +-1 C)
 *  off_scale            failure   reading outside the hydrometer's scale, when the  common practice: a value off the
 *                                 register gives it (sg_constants has_scale_range)  graduation was not read
 *  over_100             failure   percent finer (of the sample or of the specimen)  METHODS.md 3.7 #4 (derived);
 *                                 > 100 + 1.0 (percent_tolerance)                   tolerance common practice
 *  negative             failure   percent finer < -1.0 (percent_tolerance)          derived; tolerance common practice
 *  non_monotone         failure   a curve point whose percent finer (of the sample) METHODS.md 6.3 #1 (practice)
 *                                 is above the lowest of the coarser points' by
 *                                 > 1.0 point (equal diameters not compared)
 *                                 (monotone_tolerance_pct)
 *  junction_gap         warning   |summary junction_gap_pct| > 5 points             METHODS.md 6.3 #2 (practice)
 *                                 (junction_gap_max_pct)
 *  mass_balance         warning   sieve rows with a pan: |sample mass - sum         METHODS.md 5.3 (EN 933-1 1 %,
 *                                 retained incl. pan| > 1.0 % of the sample mass    from memory; ASTM C136 uses 0.3 %)
 *                                 (mass_balance_max_pct); no pan: not checked
 *                                 (the washed-out fines were not weighed)
 *  calibration_overdue  (register) added by the calibration register code          METHODS.md 10.8
 *  curve                warning   too few points for a curve (added by sg_reduce)
 *
 * Other modules add flags of their own before QC runs (the register's notes,
 * sg_reduce's and classify's findings); qc_status and qc_flags count them too.
 *
 * A value equal to its threshold is never flagged. Elapsed times that do not
 * rise are refused by sg_record_validate() before any reduction, so they have
 * no QC rule. Each rule adds at most one named flag (struct sg_flag) per run,
 * located at the worst line concerned (the first, for coarser_than_sieve) and
 * listing the lines; the per-point bits below mark every point concerned.
 * sg_qc_evaluate() also adds the summary quantities "sieve_loss_pct" (not
 * determined without a pan), "qc_status" (ok / warning / failed) and
 * "qc_flags" (the names of all flags of the run, '|' separated). */
#ifndef SEDGRADE_QC_H
#define SEDGRADE_QC_H

#include <stdbool.h>
#include <stddef.h>

#include "sedgrade/error.h"

/* Per-point flag bits (struct sg_point.flags). */
enum sg_point_flag {
    SG_PF_REYNOLDS = 1u << 0,      /* particle Reynolds number above the limit */
    SG_PF_BROWNIAN = 1u << 1,      /* diameter below the Brownian-motion limit */
    SG_PF_COARSER_THAN_SIEVE = 1u << 2, /* sedimentation point coarser than the finest sieve (not on curve) */
    SG_PF_CONCENTRATION = 1u << 3, /* suspension too concentrated for free settling */
    SG_PF_NOT_FALLING = 1u << 4,   /* reading/percent did not fall with time */
    SG_PF_TEMP_RANGE = 1u << 5,    /* temperature outside the lab's range */
    SG_PF_TEMP_DRIFT = 1u << 6,    /* temperature changed too much since the previous reading */
    SG_PF_OFF_SCALE = 1u << 7,     /* reading outside the instrument's scale */
    SG_PF_OVER_100 = 1u << 8,      /* percent finer above 100 */
    SG_PF_NEGATIVE = 1u << 9,      /* percent finer below 0 */
    SG_PF_NON_MONOTONE = 1u << 10, /* curve rises with falling diameter here */
    SG_PF_BLANK_EXTRAPOLATED = 1u << 11 /* blank taken outside the calibrated temperature range */
};

enum sg_severity {
    SG_SEVERITY_INFO = 0,
    SG_SEVERITY_WARNING, /* shown; fails the run only with --strict */
    SG_SEVERITY_FAILURE  /* the run fails QC (exit 1) */
};

/* Thresholds, each a lab setting; defaults by sg_qc_limits_default(). */
struct sg_qc_limits {
    double reynolds_max;            /* 0.2 (IS 5282 summary; ISO 13317-4 uses 0.25) */
    double diameter_min_mm;         /* 0.0002 (ASTM D7928 scope: about 0.2 um) */
    double concentration_max_g_l;   /* 50 (ASTM D422/D7928 practice, from memory) */
    double temp_min_c;              /* 15 lab range, common practice */
    double temp_max_c;              /* 30 lab range, common practice */
    double temp_drift_max_c;        /* 1.0 between readings (METHODS.md 3.7; AS 1289 +-1 C) */
    double percent_tolerance;       /* 1.0 percentage point beyond 0..100 before flagging */
    double monotone_tolerance_pct;  /* 1.0 percentage point rise allowed as reading noise */
    double junction_gap_max_pct;    /* 5 percentage points (METHODS.md 6.3, practice) */
    double mass_balance_max_pct;    /* 1.0 % sieve loss/gain (EN 933-1 style, from memory) */
    bool strict;                    /* warnings count as failures */
};

/* One rule of the table above, for documentation, reports and tests. */
struct sg_qc_rule {
    const char *name;          /* flag name, e.g. "reynolds" */
    enum sg_severity severity; /* severity of the flag it raises */
    unsigned point_bit;        /* enum sg_point_flag bit it sets, 0 for run-level rules */
    const char *threshold;     /* the default threshold in words */
    const char *source;        /* where the rule and its default come from */
};

/* Number of rules in the table and rule i (NULL past the end). */
size_t sg_qc_rule_count(void);
const struct sg_qc_rule *sg_qc_rule_at(size_t i);
/* The rule called name, or NULL. */
const struct sg_qc_rule *sg_qc_rule_find(const char *name);

/* Run status from the worst severity of its flags: "failed" for a failure
 * (or a warning when strict), "warning" for a warning, else "ok". */
const char *sg_qc_status_name(enum sg_severity worst, bool strict);

/* Short name of one point flag bit ("reynolds", "brownian", ...); "" if unknown. */
const char *sg_qc_point_flag_name(enum sg_point_flag bit);

/* Writes the names of all bits set in flags into buf, separated by '|'
 * ("" when none). Truncates to size. */
void sg_qc_point_flags_format(unsigned flags, char *buf, size_t size);

/* The documented defaults above. */
struct sg_qc_limits sg_qc_limits_default(void);

struct sg_record;
struct sg_result;
struct sg_constants;

/* Applies every rule to a reduced result: sets point flag bits and adds named
 * flags (struct sg_flag) with their severity, then the summary quantities
 * sieve_loss_pct, qc_status and qc_flags. Called by sg_reduce() after the
 * curve and summary are built (and after the register's notes were added as
 * flags, so qc_status and qc_flags include them). rec may be NULL (no
 * mass-balance check), k may be NULL (no scale-range check; no pipette
 * concentration), lim may be NULL (defaults). Sedimentation points are
 * taken in the order they were added (time order). Returns SG_OK, or
 * SG_ENOMEM with err set (res then holds part of the flags). */
enum sg_status sg_qc_evaluate(const struct sg_record *rec, const struct sg_constants *k,
                              const struct sg_qc_limits *lim, struct sg_result *res, struct sg_error *err);

/* Sets (adds or overwrites) qc_status and qc_flags from every flag res holds
 * now: the last step of sg_qc_evaluate, again after a later step added flags
 * (sg_mc_run's mc_refused_draws). lim may be NULL (defaults; only its
 * strict setting is used). SG_OK or SG_ENOMEM. */
enum sg_status sg_qc_summarise(const struct sg_qc_limits *lim, struct sg_result *res, struct sg_error *err);

#endif
