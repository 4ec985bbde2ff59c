/* curve.h - the spliced grading curve: points ordered by diameter and
 * interpolation both ways on log10(D) (percent finer at a size, size at a
 * percent finer), with no extrapolation. */
#ifndef SEDGRADE_CURVE_H
#define SEDGRADE_CURVE_H

#include <stddef.h>

#include "sedgrade/error.h"

enum sg_interp {
    SG_INTERP_LOGLINEAR = 0, /* linear in log10(D) between neighbours (semi-log paper) */
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

/* The curve. Fields are read-only for callers; build with sg_curve_build. */
struct sg_curve {
    enum sg_interp method;
    size_t n;         /* number of nodes (distinct diameters) */
    double *log10_d;  /* strictly increasing, n values */
    double *percent;  /* percent finer at each node, n values */
    void *impl;       /* GSL interpolation state (monotone method) */
};

/* Sets an empty curve (safe to release). */
void sg_curve_init(struct sg_curve *c);

/* Releases a curve's memory; it is empty afterwards. Accepts NULL. */
void sg_curve_release(struct sg_curve *c);

/* Builds the curve from n points in any order: sorts by diameter, merges
 * equal diameters by rank, and prepares interpolation. Non-positive or
 * non-finite diameters are SG_EINVAL. Fewer than 2 distinct diameters gives
 * SG_EDOM (nothing to interpolate). The caller keeps pts. On failure c is
 * left empty. */
enum sg_status sg_curve_build(struct sg_curve *c, const struct sg_curve_point *pts, size_t n,
                              enum sg_interp method, struct sg_error *err);

/* Percent finer at diameter d_mm. SG_EDOM (with the reason in err) when d_mm
 * lies outside the measured range [min D, max D]; never extrapolates. */
enum sg_status sg_curve_percent_at(const struct sg_curve *c, double d_mm, double *percent,
                                   struct sg_error *err);

/* Diameter, mm, at which percent_finer percent is finer (D_x). Convention for
 * plateaus and non-monotone data: scanning from the coarse end, the first
 * segment with P_fine < p <= P_coarse. SG_EDOM when p is below the finest
 * point's percent or above the coarsest point's percent (not determined). */
enum sg_status sg_curve_diameter_at(const struct sg_curve *c, double percent_finer, double *d_mm,
                                    struct sg_error *err);

#endif
