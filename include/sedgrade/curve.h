/* curve.h - the spliced grading curve: points ordered by diameter and
 * interpolation both ways on log10(D) (percent finer at a size, size at a
 * percent finer), with no extrapolation. */
#ifndef SEDGRADE_CURVE_H
#define SEDGRADE_CURVE_H

#include <stddef.h>

#include "sedgrade/error.h"

enum sg_interp {
    SG_INTERP_LOGLINEAR = 0, /* linear in log10(D) between neighbours (semi-log paper, METHODS.md 7.2) */
    SG_INTERP_MONOTONE       /* GSL Steffen on log10(D): smooth, never overshoots */
};

/* One input point. rank orders sources for duplicate sizes: where two points
 * share a diameter the one with the lower rank is kept (ASTM D6913: the
 * coarser sieve set's value), so give sieve points rank 0, fine-sieve 1,
 * sedimentation 2. */
struct sg_curve_point {
    double diameter_mm;
    double percent_finer;
    int rank;
};

/* The curve. Fields are read-only for callers; build with sg_curve_build.
 *
 * SG_INTERP_MONOTONE uses gsl_interp_steffen on (log10 D, percent), which
 * needs at least 3 nodes. A curve of exactly 2 nodes built with
 * SG_INTERP_MONOTONE keeps method == SG_INTERP_MONOTONE but is evaluated
 * linearly in log10(D) (impl stays NULL): with two nodes there is no
 * curvature to fit, and the straight line is what a monotone interpolant
 * through two points reduces to on a single segment. The Steffen
 * interpolant is monotone on every segment (no value outside the range of
 * its two end nodes), so it never rises above 100 % when the data do not. */
struct sg_curve {
    enum sg_interp method;
    size_t n;         /* number of nodes (distinct diameters) */
    double *log10_d;  /* strictly increasing, n values */
    double *percent;  /* percent finer at each node, n values */
    double percent_min, percent_max; /* lowest and highest percent of the nodes */
    size_t rising_from; /* the percent never falls from node rising_from up to the coarsest */
    void *impl;       /* GSL interpolation state (monotone method, n >= 3); NULL otherwise */
    /* storage kept from build to build (sg_curve_clear keeps it): */
    size_t cap;       /* room in log10_d and percent, nodes */
    void *scratch;    /* sorting work space for cap points, the last build's diameters and log10 */
    size_t n_memo;    /* diameters remembered in scratch */
};

/* Two diameters whose log10 values differ by no more than this are the same
 * size (about 2.3e-12 relative; common practice, guards against round-off in
 * values that were converted back and forth). */
#define SG_CURVE_SAME_LOG10_D 1e-12

/* A node within this many percentage points of 100 % (coarsest) or 0 %
 * (finest) counts as 100 % / 0 % for the end-of-curve rules below. */
#define SG_CURVE_END_TOL_PCT 1e-9

/* Sets an empty curve (safe to release). */
void sg_curve_init(struct sg_curve *c);

/* Releases a curve's memory and GSL state; it is empty afterwards. Accepts NULL. */
void sg_curve_release(struct sg_curve *c);

/* Empties a curve (no nodes, no GSL state) but keeps its buffers for the
 * next sg_curve_build, which then allocates nothing when the new curve
 * fits. Release it with sg_curve_release as usual. Accepts NULL. */
void sg_curve_clear(struct sg_curve *c);

/* Builds the curve from n points in any order: sorts by diameter, merges
 * equal diameters (see SG_CURVE_SAME_LOG10_D) keeping the point with the
 * lowest rank (ASTM D6913: the coarser set's value; among equal ranks the
 * first in input order), and prepares interpolation (Steffen state for
 * SG_INTERP_MONOTONE with 3 or more nodes). c must have been initialised
 * (sg_curve_init) or built (or cleared) before; any previous content is
 * replaced, its buffers reused when large enough.
 * Returns SG_EINVAL for a NULL pts with n > 0, an unknown method, a
 * non-positive or non-finite diameter or a non-finite percent; SG_EDOM for
 * fewer than 2 distinct diameters (nothing to interpolate); SG_ENOMEM;
 * SG_ENUMERIC if GSL refuses the data. The caller keeps pts. On failure c
 * is left empty. */
enum sg_status sg_curve_build(struct sg_curve *c, const struct sg_curve_point *pts, size_t n,
                              enum sg_interp method, struct sg_error *err);

/* Percent finer at diameter d_mm (> 0). Never extrapolates: SG_EDOM, with
 * the measured range in the message, when d_mm lies outside
 * [min D, max D]. Two exceptions, which are not extrapolation but what the
 * points say: above the coarsest point, when that point is at 100 %
 * (within SG_CURVE_END_TOL_PCT), the percent finer is 100; below the
 * finest point, when that point is at 0 % (within SG_CURVE_END_TOL_PCT),
 * it is 0. SG_EINVAL for a non-positive or non-finite d_mm; SG_EDOM for an
 * empty curve; SG_ENUMERIC if GSL fails. */
enum sg_status sg_curve_percent_at(const struct sg_curve *c, double d_mm, double *percent,
                                   struct sg_error *err);

/* sg_curve_percent_at with log10(d_mm) computed by the caller (for sizes
 * evaluated again and again, e.g. the fixed class boundaries):
 * log10_d_mm must be log10(d_mm). Same results, statuses and messages. */
enum sg_status sg_curve_percent_at_log10(const struct sg_curve *c, double d_mm, double log10_d_mm,
                                         double *percent, struct sg_error *err);

/* Percent finer at m sizes given in increasing order, each with its
 * log10 as for sg_curve_percent_at_log10, in one walk along the curve:
 * percent[i] and st[i] are what sg_curve_percent_at_log10 would give
 * (percent NaN where st is not SG_OK), without messages (ask that function
 * for the message of a size that failed). */
void sg_curve_percent_at_sorted(const struct sg_curve *c, const double *d_mm, const double *log10_d_mm, size_t m,
                                double *percent, enum sg_status *st);

/* Diameter, mm, at which percent_finer percent is finer (D_x).
 * Convention for plateaus and non-monotone data (METHODS.md 7.2): scanning
 * segments from the coarse end, the first with P_fine < p <= P_coarse is
 * used (so a value equal to a plateau's level gives the fine end of the
 * plateau's rising segment); falling segments are never used. If no segment
 * qualifies but a node has exactly percent p (the finest point, or a local
 * minimum), that node's diameter is returned, the first found from the
 * coarse end. Loglinear: inverse of the straight segment; monotone: Brent
 * root bracketing (gsl_root_fsolver_brent) on the Steffen interpolant
 * inside that segment, to 1e-12 in log10(D).
 * SG_EDOM when the curve never reaches p (p below the lowest or above the
 * highest percent on the curve; for monotone data: below the finest or
 * above the coarsest point's percent) with the span in the message;
 * SG_EINVAL for a non-finite p; SG_ENUMERIC if GSL fails. */
enum sg_status sg_curve_diameter_at(const struct sg_curve *c, double percent_finer, double *d_mm,
                                    struct sg_error *err);

/* Diameters at m percents finer, given in increasing order, in one walk
 * along the curve (the D-values of a summary, asked for once per Monte
 * Carlo draw): d_mm[i] and st[i] are what sg_curve_diameter_at would give
 * for percent_finer[i] (d_mm NaN where st is not SG_OK), without messages
 * (ask that function for the message of a percent that failed). Percents
 * out of order are answered the same, only walking back. The monotone
 * method allocates one root finder for the call; SG_ENOMEM in st[i] when
 * it cannot. */
void sg_curve_diameters_at_sorted(const struct sg_curve *c, const double *percent_finer, size_t m, double *d_mm,
                                  enum sg_status *st);

#endif
