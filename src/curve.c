/* curve.c - the grading curve: sorted, merged nodes on log10(D) and
 * interpolation both ways, log-linear (METHODS.md 7.2) or GSL Steffen,
 * never extrapolated. */
#include "sedgrade/curve.h"

#include <float.h>
#include <math.h>
#include <stdbool.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_interp.h>
#include <gsl/gsl_roots.h>

/* Brent iterations before giving up; it converges in well under 100 on a
 * monotone cubic segment (common practice). */
#define ROOT_MAX_ITER 200
/* Root tolerance in log10(D) units (2.3e-12 relative in D). */
#define ROOT_TOL_LOG10_D 1e-12
/* Steffen needs at least this many nodes (GSL documentation, gsl_interp_steffen). */
#define STEFFEN_MIN_NODES 3

struct curve_impl {
    gsl_interp *interp;
};

void sg_curve_init(struct sg_curve *c)
{
    if (c == NULL)
        return;
    memset(c, 0, sizeof *c);
    c->method = SG_INTERP_LOGLINEAR;
}

static void free_impl(struct sg_curve *c)
{
    struct curve_impl *im = c->impl;
    if (im != NULL) {
        gsl_interp_free(im->interp);
        free(im);
    }
    c->impl = NULL;
}

void sg_curve_release(struct sg_curve *c)
{
    if (c == NULL)
        return;
    free_impl(c);
    free(c->log10_d);
    free(c->percent);
    free(c->scratch);
    sg_curve_init(c);
}

void sg_curve_clear(struct sg_curve *c)
{
    if (c == NULL)
        return;
    free_impl(c);
    c->n = 0;
    c->method = SG_INTERP_LOGLINEAR;
}

/* A point with its input position, so equal diameters of equal rank keep
 * the first in input order whatever qsort does. */
struct sorted_point {
    double log10_d;
    double percent;
    int rank;
    size_t index;
};

/* The curve's order: by size, then rank, then input position (a total order,
 * so every sorting method gives the same sequence). */
static bool after(const struct sorted_point *x, const struct sorted_point *y)
{
    if (x->log10_d != y->log10_d)
        return x->log10_d > y->log10_d;
    if (x->rank != y->rank)
        return x->rank > y->rank;
    return x->index > y->index;
}

/* Room for n nodes (and the sorting scratch), keeping what a previous build
 * left when it is large enough. */
static enum sg_status reserve(struct sg_curve *c, size_t n)
{
    if (n <= c->cap && c->log10_d != NULL && c->percent != NULL && c->scratch != NULL)
        return SG_OK;
    c->n_memo = 0; /* the scratch layout changes with its size */
    double *l = realloc(c->log10_d, n * sizeof *l);
    if (l != NULL)
        c->log10_d = l;
    double *p = realloc(c->percent, n * sizeof *p);
    if (p != NULL)
        c->percent = p;
    /* sorted points, then the previous build's diameters and their log10 */
    void *s = realloc(c->scratch, n * (sizeof(struct sorted_point) + 2 * sizeof(double)));
    if (s != NULL)
        c->scratch = s;
    if (l == NULL || p == NULL || s == NULL)
        return SG_ENOMEM;
    c->cap = n;
    return SG_OK;
}

static enum sg_status translate_gsl(int gsl_status, const char *what, struct sg_error *err)
{
    return sg_error_set(err, SG_ENUMERIC, 0, 0, "%s failed: %s (GSL status %d; check the curve's points)",
                        what, gsl_strerror(gsl_status), gsl_status);
}

static enum sg_status prepare_steffen(struct sg_curve *c, struct sg_error *err)
{
    struct curve_impl *im = calloc(1, sizeof *im);
    if (im == NULL)
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory preparing the monotone interpolation");
    im->interp = gsl_interp_alloc(gsl_interp_steffen, c->n);
    if (im->interp == NULL) {
        free(im);
        return sg_error_set(err, SG_ENOMEM, 0, 0,
                            "out of memory preparing the monotone interpolation of %zu points", c->n);
    }
    int gs = gsl_interp_init(im->interp, c->log10_d, c->percent, c->n);
    if (gs != GSL_SUCCESS) {
        gsl_interp_free(im->interp);
        free(im);
        return translate_gsl(gs, "monotone (Steffen) interpolation set-up", err);
    }
    c->impl = im;
    return SG_OK;
}

/* Whether a point can go on a curve: a positive, finite diameter and a
 * finite percent. */
static bool point_ok(const struct sg_curve_point *p)
{
    return p->diameter_mm > 0.0 && p->diameter_mm <= DBL_MAX && fabs(p->percent_finer) <= DBL_MAX;
}

/* The message for the first of pts (in input order) that is not point_ok;
 * SG_OK when there is none. */
static enum sg_status check_points(const struct sg_curve_point *pts, size_t n, struct sg_error *err)
{
    for (size_t i = 0; i < n; i++) {
        if (point_ok(&pts[i]))
            continue;
        if (!isfinite(pts[i].diameter_mm) || pts[i].diameter_mm <= 0.0)
            return sg_error_set(err, SG_EINVAL, 0, 0, "curve point %zu: diameter %g mm must be positive and finite",
                                i + 1, pts[i].diameter_mm);
        return sg_error_set(err, SG_EINVAL, 0, 0, "curve point %zu at %g mm: percent finer %g is not a number",
                            i + 1, pts[i].diameter_mm, pts[i].percent_finer);
    }
    return SG_OK;
}

enum sg_status sg_curve_build(struct sg_curve *c, const struct sg_curve_point *pts, size_t n,
                              enum sg_interp method, struct sg_error *err)
{
    free_impl(c);
    c->n = 0;
    enum sg_status st = SG_OK;
    if (pts == NULL && n > 0) {
        st = sg_error_set(err, SG_EINVAL, 0, 0, "no points given for %zu curve points", n);
        goto cleanup;
    }
    if (method != SG_INTERP_LOGLINEAR && method != SG_INTERP_MONOTONE) {
        st = sg_error_set(err, SG_EINVAL, 0, 0, "unknown interpolation method %d (use loglinear or monotone)",
                          (int)method);
        goto cleanup;
    }
    /* the points are checked in the sorting pass below (one walk over
     * them per Monte Carlo draw instead of two) when there is one */
    if (n < 2 || reserve(c, n) != SG_OK) {
        if ((st = check_points(pts, n, err)) != SG_OK)
            goto cleanup;
        if (n < 2)
            st = sg_error_set(err, SG_EDOM, 0, 0,
                              "%zu point%s on the curve: at least two sizes are needed to interpolate", n,
                              n == 1 ? "" : "s");
        else
            st = sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory building a curve of %zu points", n);
        goto cleanup;
    }
    /* Insertion sort, fed from the last point: the pipeline lists each
     * source from coarse to fine, so the reversed input is (nearly) in
     * order and the sort costs one comparison per point. */
    struct sorted_point *s = c->scratch;
    /* log10 of each diameter, kept for the next build: repeated builds
     * (Monte Carlo draws) mostly repeat the sieve apertures */
    double *memo_d = (double *)(s + c->cap), *memo_log10 = memo_d + c->cap;
    const size_t n_memo = c->n_memo;
    c->n_memo = 0;
    for (size_t i = n, done = 0; i-- > 0; done++) {
        if (!point_ok(&pts[i])) {
            st = check_points(pts, n, err); /* the message for the first one in input order */
            goto cleanup;
        }
        const double d = pts[i].diameter_mm;
        if (!(i < n_memo && memo_d[i] == d)) {
            memo_d[i] = d;
            memo_log10[i] = log10(d);
        }
        const struct sorted_point p = {memo_log10[i], pts[i].percent_finer, pts[i].rank, i};
        size_t j = done;
        while (j > 0 && after(&s[j - 1], &p)) {
            s[j] = s[j - 1];
            j--;
        }
        s[j] = p;
    }
    c->n_memo = n;

    /* A run of the same size (within SG_CURVE_SAME_LOG10_D of its first
     * member) becomes one node: the member with the lowest rank, then the
     * earliest in input order; the node sits at the run's first size. */
    size_t m = 0;
    size_t rising_from = 0;
    double pmin = INFINITY, pmax = -INFINITY; /* the percents are finite (point_ok) */
    for (size_t i = 0; i < n;) {
        size_t best = i, j = i + 1;
        for (; j < n && s[j].log10_d - s[i].log10_d <= SG_CURVE_SAME_LOG10_D; j++)
            if (s[j].rank < s[best].rank || (s[j].rank == s[best].rank && s[j].index < s[best].index))
                best = j;
        const double pc = s[best].percent;
        if (pc < pmin)
            pmin = pc;
        if (pc > pmax)
            pmax = pc;
        if (m > 0 && pc < c->percent[m - 1])
            rising_from = m;
        c->log10_d[m] = s[i].log10_d;
        c->percent[m] = pc;
        m++;
        i = j;
    }
    c->n = m;
    c->rising_from = rising_from;
    c->percent_min = pmin;
    c->percent_max = pmax;
    c->method = method;
    if (m < 2) {
        st = sg_error_set(err, SG_EDOM, 0, 0,
                          "all %zu curve points are at one size (%g mm): at least two sizes are needed", n,
                          pow(10.0, c->log10_d[0]));
        goto cleanup;
    }
    if (method == SG_INTERP_MONOTONE && m >= STEFFEN_MIN_NODES)
        st = prepare_steffen(c, err);

cleanup:
    if (st != SG_OK)
        sg_curve_release(c);
    return st;
}

/* Clamps x into [lo, hi] when it is outside by no more than round-off;
 * returns false when it is really outside. */
static int within_range(double *x, double lo, double hi)
{
    if (*x < lo && lo - *x <= SG_CURVE_SAME_LOG10_D)
        *x = lo;
    if (*x > hi && *x - hi <= SG_CURVE_SAME_LOG10_D)
        *x = hi;
    return *x >= lo && *x <= hi;
}

/* Index i (1..n-1) of the segment [x[i-1], x[i]] holding x, for x within range. */
static size_t segment_of(const struct sg_curve *c, double x)
{
    size_t lo = 0, hi = c->n - 1;
    while (hi - lo > 1) {
        size_t mid = lo + (hi - lo) / 2;
        if (c->log10_d[mid] <= x)
            lo = mid;
        else
            hi = mid;
    }
    return hi;
}

static double loglinear_percent(const struct sg_curve *c, size_t i, double x)
{
    const double x0 = c->log10_d[i - 1], x1 = c->log10_d[i];
    const double p0 = c->percent[i - 1], p1 = c->percent[i];
    if (x <= x0)
        return p0;
    if (x >= x1)
        return p1;
    return p0 + (p1 - p0) * (x - x0) / (x1 - x0);
}

static enum sg_status steffen_percent(const struct sg_curve *c, double x, double *percent, struct sg_error *err)
{
    const struct curve_impl *im = c->impl;
    gsl_interp_accel acc = {0, 0, 0};
    int gs = gsl_interp_eval_e(im->interp, c->log10_d, c->percent, x, &acc, percent);
    if (gs != GSL_SUCCESS)
        return translate_gsl(gs, "monotone (Steffen) interpolation", err);
    return SG_OK;
}

enum sg_status sg_curve_percent_at(const struct sg_curve *c, double d_mm, double *percent,
                                   struct sg_error *err)
{
    if (c == NULL || c->n < 2 || c->log10_d == NULL || c->percent == NULL)
        return sg_error_set(err, SG_EDOM, 0, 0, "no grading curve (fewer than two sizes measured)");
    if (percent == NULL)
        return sg_error_set(err, SG_EINVAL, 0, 0, "no place to store the percent finer");
    if (!isfinite(d_mm) || d_mm <= 0.0)
        return sg_error_set(err, SG_EINVAL, 0, 0, "diameter %g mm must be positive and finite", d_mm);
    return sg_curve_percent_at_log10(c, d_mm, log10(d_mm), percent, err);
}

enum sg_status sg_curve_percent_at_log10(const struct sg_curve *c, double d_mm, double log10_d_mm,
                                         double *percent, struct sg_error *err)
{
    if (c == NULL || c->n < 2 || c->log10_d == NULL || c->percent == NULL)
        return sg_error_set(err, SG_EDOM, 0, 0, "no grading curve (fewer than two sizes measured)");
    if (percent == NULL)
        return sg_error_set(err, SG_EINVAL, 0, 0, "no place to store the percent finer");
    if (!isfinite(d_mm) || d_mm <= 0.0)
        return sg_error_set(err, SG_EINVAL, 0, 0, "diameter %g mm must be positive and finite", d_mm);
    const size_t last = c->n - 1;
    double x = log10_d_mm;
    if (!within_range(&x, c->log10_d[0], c->log10_d[last])) {
        if (x > c->log10_d[last]) {
            if (fabs(c->percent[last] - 100.0) <= SG_CURVE_END_TOL_PCT) {
                *percent = 100.0;
                return SG_OK;
            }
            return sg_error_set(err, SG_EDOM, 0, 0,
                                "%g mm is coarser than the coarsest point %g mm (%g %% finer there, not 100 %%; "
                                "the curve is not extrapolated)",
                                d_mm, pow(10.0, c->log10_d[last]), c->percent[last]);
        }
        if (fabs(c->percent[0]) <= SG_CURVE_END_TOL_PCT) {
            *percent = 0.0;
            return SG_OK;
        }
        return sg_error_set(err, SG_EDOM, 0, 0,
                            "%g mm is finer than the finest point %g mm (%g %% finer there; the curve is not "
                            "extrapolated)",
                            d_mm, pow(10.0, c->log10_d[0]), c->percent[0]);
    }
    if (c->impl != NULL)
        return steffen_percent(c, x, percent, err);
    *percent = loglinear_percent(c, segment_of(c, x), x);
    return SG_OK;
}

void sg_curve_percent_at_sorted(const struct sg_curve *c, const double *d_mm, const double *log10_d_mm, size_t m,
                                double *percent, enum sg_status *st)
{
    if (c == NULL || c->n < 2 || c->log10_d == NULL || c->percent == NULL || c->impl != NULL) {
        for (size_t i = 0; i < m; i++) {
            percent[i] = NAN;
            st[i] = sg_curve_percent_at_log10(c, d_mm[i], log10_d_mm[i], &percent[i], NULL);
        }
        return;
    }
    /* log-linear: one walk along the segments, the sizes being in order */
    const double *const lg = c->log10_d, *const pc = c->percent;
    const size_t last = c->n - 1;
    const double x_lo = lg[0], x_hi = lg[last];
    /* the end rules of sg_curve_percent_at_log10 */
    const bool top_100 = fabs(pc[last] - 100.0) <= SG_CURVE_END_TOL_PCT;
    const bool bottom_0 = fabs(pc[0]) <= SG_CURVE_END_TOL_PCT;
    size_t seg = 1; /* first node coarser than x (segment_of), never moving back */
    for (size_t i = 0; i < m; i++) {
        const double d = d_mm[i];
        if (!(d > 0.0 && d <= DBL_MAX)) { /* not positive and finite */
            percent[i] = NAN;
            st[i] = SG_EINVAL;
            continue;
        }
        double x = log10_d_mm[i];
        /* within_range changes nothing inside the range, so it is asked
         * only outside */
        if (!(x >= x_lo && x <= x_hi) && !within_range(&x, x_lo, x_hi)) {
            const bool above = x > x_hi;
            if (above ? top_100 : bottom_0) {
                percent[i] = above ? 100.0 : 0.0;
                st[i] = SG_OK;
            } else {
                percent[i] = NAN;
                st[i] = SG_EDOM;
            }
            continue;
        }
        while (seg < last && lg[seg] <= x)
            seg++;
        /* loglinear_percent, written out */
        const double x0 = lg[seg - 1], x1 = lg[seg], p0 = pc[seg - 1], p1 = pc[seg];
        percent[i] = x <= x0 ? p0 : x >= x1 ? p1 : p0 + (p1 - p0) * (x - x0) / (x1 - x0);
        st[i] = SG_OK;
    }
}

struct root_params {
    const struct sg_curve *c;
    double target;
};

/* Steffen interpolant minus the target percent; NaN (which Brent reports
 * as GSL_EBADFUNC) if GSL cannot evaluate. */
static double steffen_minus_target(double x, void *params)
{
    const struct root_params *rp = params;
    const struct curve_impl *im = rp->c->impl;
    gsl_interp_accel acc = {0, 0, 0};
    double y;
    if (gsl_interp_eval_e(im->interp, rp->c->log10_d, rp->c->percent, x, &acc, &y) != GSL_SUCCESS)
        return NAN;
    return y - rp->target;
}

/* log10(D) in segment i (P[i-1] < p < P[i]) where the Steffen interpolant
 * equals p. The root finder is *kept when kept is not NULL (allocated here
 * if *kept is NULL; the caller frees it), else allocated and freed here;
 * gsl_root_fsolver_set sets the whole Brent state, so a kept one gives the
 * same answers as a fresh one. */
static enum sg_status steffen_solve(const struct sg_curve *c, size_t i, double p, double *x,
                                    gsl_root_fsolver **kept, struct sg_error *err)
{
    struct root_params rp = {c, p};
    gsl_function f = {steffen_minus_target, &rp};
    gsl_root_fsolver *s = kept != NULL ? *kept : NULL;
    if (s == NULL) {
        s = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
        if (s == NULL)
            return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory for the root finder");
        if (kept != NULL)
            *kept = s;
    }
    enum sg_status st = SG_OK;
    int gs = gsl_root_fsolver_set(s, &f, c->log10_d[i - 1], c->log10_d[i]);
    if (gs != GSL_SUCCESS) {
        st = translate_gsl(gs, "bracketing the size on the monotone curve", err);
        goto cleanup;
    }
    for (int iter = 0; iter < ROOT_MAX_ITER; iter++) {
        gs = gsl_root_fsolver_iterate(s);
        if (gs != GSL_SUCCESS) {
            st = translate_gsl(gs, "finding the size on the monotone curve", err);
            goto cleanup;
        }
        gs = gsl_root_test_interval(gsl_root_fsolver_x_lower(s), gsl_root_fsolver_x_upper(s),
                                    ROOT_TOL_LOG10_D, 0.0);
        if (gs == GSL_SUCCESS) {
            *x = gsl_root_fsolver_root(s);
            goto cleanup;
        }
        if (gs != GSL_CONTINUE) {
            st = translate_gsl(gs, "testing convergence on the monotone curve", err);
            goto cleanup;
        }
    }
    st = sg_error_set(err, SG_ENUMERIC, 0, 0,
                      "finding the size at %g %% finer did not converge in %d iterations (report this curve)",
                      p, ROOT_MAX_ITER);
cleanup:
    if (kept == NULL)
        gsl_root_fsolver_free(s);
    return st;
}

/* The message for a percent the curve never reaches. */
static enum sg_status not_reached(const struct sg_curve *c, double p, struct sg_error *err)
{
    if (err == NULL)
        return SG_EDOM;
    const size_t last = c->n - 1;
    const double pmin = c->percent_min, pmax = c->percent_max;
    if (p < pmin && pmin == c->percent[0])
        return sg_error_set(err, SG_EDOM, 0, 0,
                            "%g %% finer is below the finest point (%g %% finer at %g mm); the curve is not "
                            "extrapolated",
                            p, c->percent[0], pow(10.0, c->log10_d[0]));
    if (p > pmax && pmax == c->percent[last])
        return sg_error_set(err, SG_EDOM, 0, 0,
                            "%g %% finer is above the coarsest point (%g %% finer at %g mm); the curve is not "
                            "extrapolated",
                            p, c->percent[last], pow(10.0, c->log10_d[last]));
    return sg_error_set(err, SG_EDOM, 0, 0,
                        "%g %% finer is outside the %g-%g %% finer the curve reaches between %g and %g mm; the "
                        "curve is not extrapolated",
                        p, pmin, pmax, pow(10.0, c->log10_d[0]), pow(10.0, c->log10_d[last]));
}

/* log10 of the diameter at percent p on segment i, where P[i-1] < p <=
 * P[i] (solver: as for steffen_solve). */
static enum sg_status log10_d_on_segment(const struct sg_curve *c, size_t i, double p, double *x,
                                         gsl_root_fsolver **solver, struct sg_error *err)
{
    const double pf = c->percent[i - 1], pc = c->percent[i];
    if (p == pc) {
        *x = c->log10_d[i];
        return SG_OK;
    }
    if (c->impl != NULL)
        return steffen_solve(c, i, p, x, solver, err);
    *x = c->log10_d[i - 1] + (p - pf) * (c->log10_d[i] - c->log10_d[i - 1]) / (pc - pf);
    return SG_OK;
}

/* The diameter at percent p on segment i, where P[i-1] < p <= P[i]. */
static enum sg_status diameter_on_segment(const struct sg_curve *c, size_t i, double p, double *d_mm,
                                          struct sg_error *err)
{
    double x = NAN;
    const enum sg_status st = log10_d_on_segment(c, i, p, &x, NULL, err);
    if (st == SG_OK)
        *d_mm = pow(10.0, x);
    return st;
}

/* Where a finite p lies outside (P[k], P[last]] (k = rising_from) is read:
 * the first rising segment from the coarse end with P_fine < p <= P_coarse
 * (none above node k, where the percent never falls, and segment k falls),
 * else the first node from the coarse end at exactly p. */
enum reach { REACH_NONE, REACH_SEGMENT, REACH_NODE };

static enum reach reach_below_rising(const struct sg_curve *c, double p, size_t *at)
{
    /* no segment and no node has a p outside the nodes' range */
    if (p < c->percent_min || p > c->percent_max)
        return REACH_NONE;
    for (size_t i = c->rising_from; i >= 1; i--)
        if (c->percent[i - 1] < p && p <= c->percent[i]) {
            *at = i;
            return REACH_SEGMENT;
        }
    /* reached only at a node (the finest point or a local minimum) */
    for (size_t i = c->n; i-- > 0;)
        if (c->percent[i] == p) {
            *at = i;
            return REACH_NODE;
        }
    return REACH_NONE;
}

enum sg_status sg_curve_diameter_at(const struct sg_curve *c, double p, double *d_mm, struct sg_error *err)
{
    if (c == NULL || c->n < 2 || c->log10_d == NULL || c->percent == NULL)
        return sg_error_set(err, SG_EDOM, 0, 0, "no grading curve (fewer than two sizes measured)");
    if (d_mm == NULL)
        return sg_error_set(err, SG_EINVAL, 0, 0, "no place to store the diameter");
    if (!isfinite(p))
        return sg_error_set(err, SG_EINVAL, 0, 0, "percent finer %g is not a number", p);
    const size_t last = c->n - 1, k = c->rising_from;
    /* Above node k the percent never falls, so at most one segment there
     * has P_fine < p <= P_coarse, and when P[k] < p <= P[last] one does
     * (the first node at or above p closes it): the highest such segment,
     * the one the scan from the coarse end would find first, found by
     * bisection. */
    if (c->percent[k] < p && p <= c->percent[last]) {
        size_t lo = k, hi = last; /* P[lo] < p <= P[hi] */
        while (hi - lo > 1) {
            const size_t mid = lo + (hi - lo) / 2;
            if (c->percent[mid] < p)
                lo = mid;
            else
                hi = mid;
        }
        return diameter_on_segment(c, hi, p, d_mm, err);
    }
    size_t at = 0;
    switch (reach_below_rising(c, p, &at)) {
    case REACH_SEGMENT:
        return diameter_on_segment(c, at, p, d_mm, err);
    case REACH_NODE:
        *d_mm = pow(10.0, c->log10_d[at]);
        return SG_OK;
    case REACH_NONE:
        break;
    }
    return not_reached(c, p, err);
}

void sg_curve_diameters_at_sorted(const struct sg_curve *c, const double *percent_finer, size_t m, double *d_mm,
                                  enum sg_status *st)
{
    if (c == NULL || c->n < 2 || c->log10_d == NULL || c->percent == NULL) {
        for (size_t i = 0; i < m; i++) {
            d_mm[i] = NAN;
            st[i] = sg_curve_diameter_at(c, percent_finer[i], &d_mm[i], NULL);
        }
        return;
    }
    const double *const lg = c->log10_d, *const pc = c->percent;
    const size_t k = c->rising_from;
    const double p_k = pc[k], p_last = pc[c->n - 1];
    gsl_root_fsolver *solver = NULL; /* one root finder for all percents (monotone curve) */
    /* Between P[k] and P[last] the segment is the one closing at the first
     * node from k up at or above p (as the bisection in sg_curve_diameter_at
     * finds it); for percents in increasing order that node never moves
     * back, so one walk finds them all. */
    size_t hi = k + 1;
    double p_prev = -INFINITY; /* the last percent read there */
    for (size_t i = 0; i < m; i++) {
        const double p = percent_finer[i];
        size_t seg = 0;
        if (p_k < p && p <= p_last) { /* false for NaN and -inf, and +inf is above P[last] */
            if (p < p_prev)           /* out of order: walk again from node k */
                hi = k + 1;
            p_prev = p;
            while (pc[hi] < p) /* stops at last at the latest: p <= P[last] */
                hi++;
            seg = hi;
        } else if (!isfinite(p)) {
            d_mm[i] = NAN;
            st[i] = SG_EINVAL;
            continue;
        } else {
            const enum reach r = reach_below_rising(c, p, &seg);
            if (r != REACH_SEGMENT) {
                d_mm[i] = r == REACH_NODE ? pow(10.0, lg[seg]) : (double)NAN;
                st[i] = r == REACH_NODE ? SG_OK : SG_EDOM;
                continue;
            }
        }
        /* as log10_d_on_segment, the log-linear case written out */
        double x;
        if (p == pc[seg]) {
            x = lg[seg];
        } else if (c->impl == NULL) {
            x = lg[seg - 1] + (p - pc[seg - 1]) * (lg[seg] - lg[seg - 1]) / (pc[seg] - pc[seg - 1]);
        } else {
            const enum sg_status s = steffen_solve(c, seg, p, &x, &solver, NULL);
            if (s != SG_OK) {
                d_mm[i] = NAN;
                st[i] = s;
                continue;
            }
        }
        d_mm[i] = pow(10.0, x);
        st[i] = SG_OK;
    }
    if (solver != NULL)
        gsl_root_fsolver_free(solver);
}
