/* reduce.h - the one entry point that turns a test record into results:
 * sieve reduction, sedimentation reduction, splice, curve, summary and QC.
 * The CLI, batch runs and Monte Carlo all call sg_reduce(). */
#ifndef SEDGRADE_REDUCE_H
#define SEDGRADE_REDUCE_H

#include <stdbool.h>
#include <stddef.h>

#include "sedgrade/curve.h"
#include "sedgrade/error.h"
#include "sedgrade/qc.h"
#include "sedgrade/record.h"
#include "sedgrade/result.h"

/* Instrument constants resolved for one test, from the calibration register
 * (calib.h) or from the record's inline values (sg_constants_from_record). */
struct sg_constants {
    bool has_depth_line;
    double depth_at_zero_mm;     /* effective depth at (meniscus-corrected) reading 0, mm */
    double depth_per_unit_mm;    /* change per reading unit, mm */
    double depth_cov[3];         /* var(c0) mm^2, cov(c0,c1) mm^2, var(c1) mm^2 of the fit; 0 if unknown */
    double meniscus_correction;  /* scale units */
    double meniscus_u;           /* standard uncertainty, scale units; 0 if unknown */
    bool has_blank_line;         /* blank = c0 + c1 T within [tmin, tmax] */
    double blank_c0, blank_c1, blank_tmin_c, blank_tmax_c, blank_u;
    bool has_blank_const;        /* blank = blank_const at any temperature */
    double blank_const;
    bool has_pipette_volume;
    double pipette_volume_ml, pipette_volume_u_ml;
    double thermometer_offset_c; /* added to every temperature read */
    bool has_scale_range;
    double scale_min, scale_max; /* hydrometer scale, reading units */
    double scale_division;       /* hydrometer's smallest division, reading units (register); 0 if unknown */
    char calibration_used[256];  /* "instrument@date;..." or "inline" */
    /* Register findings to be shown as QC flags (overdue calibration, ...). */
    size_t n_notes;
    struct {
        char name[40];
        enum sg_severity severity;
        char message[200];
    } notes[8];
};

struct sg_reduce_options {
    enum sg_interp interp;       /* default SG_INTERP_LOGLINEAR */
    struct sg_qc_limits qc;      /* default sg_qc_limits_default() */
    const double *extra_dx;      /* additional D_x percentages to report (may be NULL) */
    size_t n_extra_dx;
    bool values_only;            /* Monte Carlo draws (mc.h): values only; QC, register notes and
                                    summary notes may be skipped, and of each point only source,
                                    line, diameter_mm, percent_finer, on_curve and the flag
                                    SG_PF_COARSER_THAN_SIEVE are filled (no QC flags; the
                                    other values stay NaN). Default false. */
    bool skip_notes;             /* every summary note left empty, nothing else changed (QC, flags and
                                    their messages kept): for callers that write no per-test summary
                                    (a batch with --outputs none). Default false. */
    /* Terzaghi's filter screen of each test as a filter over one base soil
     * (reduce --base-soil): with has_base_soil the screens add
     * filter_retention_ratio, filter_permeability_ratio and filter_screen.
     * Sizes in mm from the base soil's own reduction. Default off. */
    bool has_base_soil;
    double base_d15_mm, base_d85_mm;
    char base_soil_id[64];
    /* The base soil's own QC verdict ("failed": each test gets the warning
     * flag base_soil_qc, its D15 and D85 being doubtful); default false. */
    bool base_soil_qc_failed;
};

/* Defaults: loglinear, default QC limits, no extra D_x. */
struct sg_reduce_options sg_reduce_options_default(void);

/* Fills k from the record's inline constants (depth_line_mm,
 * meniscus_correction, composite_correction, pipette_volume_ml) and sets
 * calibration_used to "inline". */
void sg_constants_from_record(const struct sg_record *rec, struct sg_constants *k);

/* Reduces rec with constants k into res (which must be initialised; it is
 * cleared first). Returns SG_OK when results were produced (QC findings are
 * flags in res, not errors); SG_EINVAL/SG_EDOM with a located message (err
 * line/col) when the record cannot be reduced, in which case res holds no
 * usable results. */
enum sg_status sg_reduce(const struct sg_record *rec, const struct sg_constants *k,
                         const struct sg_reduce_options *opt, struct sg_result *res, struct sg_error *err);

#endif
