/* qc.h - named quality-control rules for a sedimentation run, each with a
 * documented, adjustable threshold. */
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
 * flags (struct sg_flag) with their severity. Called by sg_reduce() after the
 * curve and summary are built. Returns SG_OK or SG_ENOMEM. */
enum sg_status sg_qc_evaluate(const struct sg_record *rec, const struct sg_constants *k,
                              const struct sg_qc_limits *lim, struct sg_result *res, struct sg_error *err);

#endif
