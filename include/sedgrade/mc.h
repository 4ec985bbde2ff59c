/* mc.h - Monte Carlo propagation of input uncertainties through the whole
 * reduction (JCGM 101:2008, GUM Supplement 1): every draw perturbs a private
 * copy of the record and the instrument constants and re-runs sg_reduce
 * (Stokes, corrections, splice, interpolation, summary). */
#ifndef SEDGRADE_MC_H
#define SEDGRADE_MC_H

#include <stdbool.h>
#include <stddef.h>

#include "sedgrade/error.h"
#include "sedgrade/record.h"
#include "sedgrade/reduce.h"
#include "sedgrade/result.h"

/* ---- Default standard uncertainties of the inputs ------------------------
 * Used when neither the record (test,u_<input>,<value>; struct sg_record_u,
 * negative = not given) nor the calibration register (struct sg_constants:
 * meniscus_u, blank_u, pipette_volume_u_ml, depth_cov) gives a value.
 * Precedence: record, then register, then these defaults. Every draw is
 * independent of every other draw; within a draw, "per row" inputs get an
 * independent error for each row and "per test" inputs one error shared by
 * all rows (a systematic effect of the instrument or the specimen).
 *
 * A value given as a standard uncertainty (record, register, or the
 * defaults below unless stated otherwise) is drawn from a normal
 * distribution (JCGM 101 6.4.7: the maximum-entropy PDF for an estimate and
 * a standard uncertainty). Values drawn below zero for masses are set to 0
 * (a mass cannot be negative) and a mass of exactly 0 (an empty sieve) is
 * not varied; any other draw the reduction refuses (e.g. a temperature
 * pushed outside 0-40 C) counts as a refused draw.
 *
 * Not included (add them to the laboratory's own budget if they matter):
 * sampling and subsampling of the specimen (often the largest term for the
 * sieve part, METHODS.md 11.3), sieve aperture deviations, the suspension
 * volume, the thermometer's calibration offset, dispersion efficiency and
 * the model error of Stokes' law itself. */

/* Hydrometer reading, per row: the scale is read to one division, so the
 * resolution error is rectangular with half-width 0.5 division (GUM Type B,
 * METHODS.md 11.1: u = 0.289 division), plus a normal reading-repeatability
 * term of 0.25 division (common practice: reading the top of the meniscus
 * in an opaque suspension; replace it with the laboratory's own
 * duplicate-reading figure). Combined u = 0.382 division. A division is the
 * register's `division` of the hydrometer (sg_constants scale_division),
 * else one reading unit; the defaults below in divisions (reading, blank,
 * meniscus) are multiplied by it. A record's u_reading replaces both
 * reading terms (normal). */
#define SG_MC_READING_RESOLUTION_HALF_WIDTH 0.5
#define SG_MC_U_READING_REPEAT 0.25
/* Suspension temperature, per row, C (common practice: a 0.1 C-graduated
 * thermometer read in a bath; the calibration offset is the register's
 * thermometer_offset_c, applied, not varied). */
#define SG_MC_U_TEMP_C 0.2
/* Elapsed time, per row, min (common practice: about 3 s of timing error). */
#define SG_MC_U_ELAPSED_MIN 0.05
/* Every balance mass (sample, specimen, retained on each sieve, dispersant),
 * each weighed once, g (AASHTO T 88: masses to 0.01 g, METHODS.md 3.6). */
#define SG_MC_U_MASS_G 0.01
/* Particle density, per test, Mg/m3 (common practice for a measured value,
 * e.g. by small pyknometer; an assumed 2.65 deserves a larger value). */
#define SG_MC_U_PARTICLE_DENSITY_MG_M3 0.02
/* Blank (composite) reading, divisions: per row where the row gives its
 * own blank reading, per test where it comes from the record's
 * composite_correction or the register's blank line (common practice: half
 * a division; the register's blank_u, from its fit, is used when known). */
#define SG_MC_U_BLANK 0.5
/* Meniscus correction, per test, divisions (common practice: a quarter
 * division; the register's meniscus_u is used when known). */
#define SG_MC_U_MENISCUS 0.25
/* Effective-depth line H = c0 + c1 R: bivariate normal with the register
 * fit's covariance depth_cov; when that is unknown (all zero, e.g. inline
 * depth_line_mm), 1 mm on c0 and nothing on c1 (common practice). A
 * record's u_depth_mm replaces it (on c0 only). Pipette sampling depth, per
 * row: 1 mm (common practice), or the record's u_depth_mm. */
#define SG_MC_U_DEPTH_MM 1.0
/* Pipette volume, per test, mL (Class A 10 mL pipette tolerance 0.020 mL,
 * METHODS.md 10.6 and 13.8 #74, taken as a standard uncertainty; the
 * register's pipette_volume_u_ml from its gravimetric calibration is used
 * when known). */
#define SG_MC_U_PIPETTE_VOLUME_ML 0.02
/* Pipette solids (net dry residue), per row, g (common practice: a 0.1 mg
 * analytical balance, weighing by difference plus drying). */
#define SG_MC_U_SOLIDS_G 0.0005

/* Share of refused draws (percent of M) above which the run gets an
 * "mc_refused_draws" warning, and above which that flag is a failure: the
 * refused draws are those the inputs' tails pushed outside the reduction's
 * validity (e.g. a temperature outside the calibrated blank range), so the
 * other draws' statistics are biased, the more so the larger the share
 * (common practice; below the first limit the flag is for information). */
#define SG_MC_REFUSED_WARNING_PCT 1.0
#define SG_MC_REFUSED_FAILURE_PCT 10.0

/* Coverage probability of the reported intervals (SPEC low95/high95). */
#define SG_MC_COVERAGE 0.95
/* Fewer draws than this get a note on mc_draws that u and the intervals
 * are rough: JCGM 101 7.2 asks for M much larger than 1/(1 - p) = 20 and
 * suggests 10^6; 10^4 gives the 2.5 % tails 250 draws each (common
 * practice). */
#define SG_MC_DRAWS_ADVISED 10000
/* A quantity determined in the nominal result but not in more than this
 * share of the accepted draws gets no u and no coverage interval, only a
 * note: the draws that cannot determine it lie to one side of the others
 * (a D-value beyond the curve's finest point), so those that can are a
 * biased sample. Half of 1 - SG_MC_COVERAGE: up to that share the missing
 * draws are fewer than the tail the interval leaves out at either end, so
 * the interval from the others is off by at most that share of probability
 * at one end (derived from JCGM 101 7.7). At or below it, u and the interval
 * come from the draws that determine it, and the note gives the share. */
#define SG_MC_UNDETERMINED_MAX_SHARE ((1.0 - SG_MC_COVERAGE) / 2.0)
/* Most draws accepted in one run. Memory: about 0.6 bytes per draw per
 * numeric summary quantity (only the 2.5 % tails needed for the coverage
 * interval are kept, with room to spare), so 10^6 draws of 55 quantities
 * take about 33 MB and 10^7 draws about 330 MB. */
#define SG_MC_DRAWS_MAX 10000000u
/* Draws are generated in blocks of this size; each block has its own seed
 * derived from (seed, block index), so the output does not depend on the
 * number of threads. */
#define SG_MC_BLOCK_DRAWS 1024u
/* Categorical quantities whose class probabilities are also added as
 * numeric summary rows "<name>_p_<class>" (percent of draws). Every
 * categorical quantity (except calibration_used) gets its class
 * probabilities in its note. */
#define SG_MC_CLASS_ROWS_FOR "usda_texture uscs_grading uscs_symbol"

struct sg_mc_options {
    size_t draws;        /* number of Monte Carlo trials M, 2..SG_MC_DRAWS_MAX */
    unsigned long seed;  /* RNG seed: the same seed gives the same output */
    unsigned threads;    /* worker threads (0 or 1: the calling thread only) */
};

/* Where an input's standard uncertainty came from. */
enum sg_mc_origin { SG_MC_FROM_DEFAULT = 0, SG_MC_FROM_RECORD, SG_MC_FROM_REGISTER };

struct sg_mc_input {
    double u;                 /* standard uncertainty in the input's unit (normal) */
    enum sg_mc_origin origin;
};

/* The uncertainty budget actually used for one record (for the report and
 * for tests): every field resolved from record, register and defaults. */
struct sg_mc_budget {
    double reading_half_width;      /* rectangular resolution term, scale units (0 if the record gives u_reading) */
    struct sg_mc_input reading;     /* normal term: repeatability, or the record's whole u_reading */
    struct sg_mc_input temp_c;
    struct sg_mc_input elapsed_min;
    struct sg_mc_input mass_g;
    struct sg_mc_input particle_density_mg_m3;
    struct sg_mc_input blank_row;   /* a row's own blank reading */
    struct sg_mc_input blank_test;  /* composite_correction or the register's blank */
    struct sg_mc_input meniscus;
    struct sg_mc_input depth_c0_mm; /* used when depth_cov is not (origin != REGISTER) */
    double depth_cov[3];            /* var(c0), cov(c0,c1), var(c1) when origin of depth_c0_mm is REGISTER */
    struct sg_mc_input pipette_volume_ml;
    struct sg_mc_input solids_g;
    struct sg_mc_input sampling_depth_mm;
};

/* Resolves the budget for rec with constants k (k may be NULL: inline). */
void sg_mc_budget_resolve(const struct sg_record *rec, const struct sg_constants *k,
                          struct sg_mc_budget *b);

/* Short name of an origin: "default", "record", "register". */
const char *sg_mc_origin_name(enum sg_mc_origin o);

/* JCGM 101 7.7: q = pM rounded to the nearest integer, r = (M - q)/2 when
 * integral, else (M - q + 1)/2; the probabilistically symmetric coverage
 * interval is [y_(r), y_(r+q)] in 1-based order statistics. r is at least
 * 1 and r + q at most M (tiny M). Returns false when m < 2 or p is not in
 * (0, 1). Check: M = 10^6, p = 0.95 -> q = 950 000, r = 25 000. */
bool sg_mc_coverage_indices(size_t m, double p, size_t *r, size_t *q);

/* Per-point results of a run (same order as res->points). */
struct sg_mc_point_stats {
    size_t n;                    /* draws in which the point was computed */
    double percent_finer_mean, percent_finer_u;
    double diameter_mean_mm, diameter_u_mm;
};

/* Optional detail of a run (sg_mc_run_ex). Owned by the caller:
 * sg_mc_detail_init before, sg_mc_detail_release after. */
struct sg_mc_detail {
    size_t draws;                /* M */
    size_t failed;               /* draws the reduction refused */
    char first_failure[400];     /* message of the first refused draw (lowest draw index) */
    struct sg_mc_point_stats *points;
    size_t n_points;
};

void sg_mc_detail_init(struct sg_mc_detail *d);
void sg_mc_detail_release(struct sg_mc_detail *d);

/* Runs the draws for the record and adds to res (the nominal result of
 * sg_reduce with the same rec, k, opt; its values are kept as the estimates):
 * u/low95/high95 (has_u) for every numeric quantity determined in the
 * nominal result and in at least 2 draws (a note gives the share of draws in
 * which it could not be determined, if any), percent_finer_u for every point,
 * class probabilities for categorical quantities (note, and rows
 * "<name>_p_<class>" for SG_MC_CLASS_ROWS_FOR), and a row "mc_draws".
 * k may be NULL (inline constants from the record); opt may be NULL.
 * Returns SG_OK; SG_EINVAL for fewer than 2 draws or a res without points
 * (the nominal reduction failed); SG_ELIMIT for more than SG_MC_DRAWS_MAX
 * draws; SG_EDOM when every draw is refused by the reduction (with the
 * message of the first); SG_ENOMEM; SG_EIO if a thread cannot be started.
 * When the draws fail, res is unchanged. */
enum sg_status sg_mc_run(const struct sg_record *rec, const struct sg_constants *k,
                         const struct sg_reduce_options *opt, const struct sg_mc_options *mc,
                         struct sg_result *res, struct sg_error *err);

/* The Monte Carlo probability, percent, of class text ("" = not
 * determined) of the categorical quantity named quantity (one of
 * SG_MC_CLASS_ROWS_FOR): the value of the row "<quantity>_p_<class>" that
 * sg_mc_run added to res. False (pct untouched) when res holds no such row:
 * no Monte Carlo run, another quantity, or a class no draw gave. */
bool sg_mc_class_probability(const struct sg_result *res, const char *quantity, const char *text, double *pct);

/* As sg_mc_run, and fills detail (may be NULL) with per-point statistics
 * (percent finer and diameter) and the count of refused draws. */
enum sg_status sg_mc_run_ex(const struct sg_record *rec, const struct sg_constants *k,
                            const struct sg_reduce_options *opt, const struct sg_mc_options *mc,
                            struct sg_result *res, struct sg_mc_detail *detail, struct sg_error *err);

#endif
