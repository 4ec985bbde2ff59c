/* test_curve.c - the grading curve: ordering, duplicate sizes, log-linear and
 * Steffen interpolation both ways, plateaus, non-monotone data, the
 * no-extrapolation rule and its two documented end exceptions. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdbool.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_interp.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>

#include "sedgrade/curve.h"

static void setup(void) { gsl_set_error_handler_off(); }

TestSuite(curve, .init = setup);

/* A straight line on semi-log paper, P = 50 + 25 log10(D / 0.1 mm): every
 * size and percent on it is exact by hand (METHODS.md 7.2 formulas,
 * derived). Points at 0.002, 0.01, 0.1, 1, 10 mm. */
static double line_p(double d_mm) { return 50.0 + 25.0 * log10(d_mm / 0.1); }
static double line_d(double p) { return 0.1 * pow(10.0, (p - 50.0) / 25.0); }

static const struct sg_curve_point line_pts[] = {
    {10.0, 100.0, 0}, {0.01, 25.0, 2}, {1.0, 75.0, 0}, {0.002, 0.0, 2}, {0.1, 50.0, 1},
};

static void build_line(struct sg_curve *c, enum sg_interp m, double finest_d)
{
    struct sg_curve_point p[5];
    memcpy(p, line_pts, sizeof p);
    p[3].diameter_mm = finest_d;
    p[3].percent_finer = line_p(finest_d);
    sg_curve_init(c);
    struct sg_error e;
    cr_assert_eq(sg_curve_build(c, p, 5, m, &e), SG_OK, "%s", e.msg);
}

static double rel(double a, double b) { return fabs(a - b) / fabs(b); }

Test(curve, sorted_strictly_increasing)
{
    struct sg_curve c;
    build_line(&c, SG_INTERP_LOGLINEAR, 0.002);
    cr_assert_eq(c.n, 5);
    for (size_t i = 1; i < c.n; i++)
        cr_assert(c.log10_d[i] > c.log10_d[i - 1]);
    cr_assert_float_eq(c.log10_d[0], log10(0.002), 1e-15);
    cr_assert_float_eq(c.percent[4], 100.0, 1e-12);
    sg_curve_release(&c);
    cr_assert_eq(c.n, 0);
    cr_assert_null(c.log10_d);
    sg_curve_release(&c); /* twice is fine */
    sg_curve_release(NULL);
}

Test(curve, loglinear_exact_on_semilog_line)
{
    /* D10 = 0.1 * 10^(-1.6) mm exactly (derived from the line); the same for every p */
    struct sg_curve c;
    build_line(&c, SG_INTERP_LOGLINEAR, 0.002);
    const double ps[] = {10.0, 15.0, 30.0, 50.0, 60.0, 85.0, 99.9};
    for (size_t i = 0; i < sizeof ps / sizeof ps[0]; i++) {
        double d = 0;
        cr_assert_eq(sg_curve_diameter_at(&c, ps[i], &d, NULL), SG_OK);
        cr_assert(rel(d, line_d(ps[i])) < 1e-12, "D%g %.15g vs %.15g", ps[i], d, line_d(ps[i]));
    }
    double d10 = 0;
    (void)sg_curve_diameter_at(&c, 10.0, &d10, NULL);
    cr_assert(rel(d10, 0.1 * pow(10.0, -1.6)) < 1e-12);
    cr_assert_float_eq(d10, 0.00251188643150958, 1e-16); /* 0.1 * 10^-1.6, python3 */
    const double ds[] = {0.002, 0.0031, 0.063, 0.075, 0.1, 0.425, 2.0, 4.75, 10.0};
    for (size_t i = 0; i < sizeof ds / sizeof ds[0]; i++) {
        double p = 0;
        cr_assert_eq(sg_curve_percent_at(&c, ds[i], &p, NULL), SG_OK);
        cr_assert_float_eq(p, line_p(ds[i]), 1e-11, "P(%g) %.15g", ds[i], p);
    }
    sg_curve_release(&c);
}

Test(curve, monotone_exact_on_semilog_line)
{
    /* GSL's Steffen takes the secant slope at the end nodes and the common
     * slope inside, so collinear data give the same straight line (derived). */
    struct sg_curve c;
    build_line(&c, SG_INTERP_MONOTONE, 0.002);
    cr_assert_not_null(c.impl);
    for (double p = 8.0; p < 100.0; p += 3.7) { /* the finest point is at 7.53 % */
        double d = 0;
        cr_assert_eq(sg_curve_diameter_at(&c, p, &d, NULL), SG_OK);
        cr_assert(rel(d, line_d(p)) < 1e-9, "D%g %.15g vs %.15g", p, d, line_d(p));
    }
    double p = 0;
    cr_assert_eq(sg_curve_percent_at(&c, 0.05, &p, NULL), SG_OK);
    cr_assert_float_eq(p, line_p(0.05), 1e-10); /* 50 + 25 log10(0.5) = 42.4742501084 */
    cr_assert_float_eq(p, 42.4742501084, 1e-9);
    sg_curve_release(&c);
}

Test(curve, any_input_order_same_curve)
{
    /* sorting is part of the contract: shuffled input, identical nodes */
    struct sg_curve_point base[12];
    for (int i = 0; i < 12; i++) {
        const double d = 0.0013 * pow(2.37, i);
        base[i] = (struct sg_curve_point){d, 8.0 + 7.5 * i, i < 6 ? 2 : 0};
    }
    struct sg_curve ref;
    sg_curve_init(&ref);
    cr_assert_eq(sg_curve_build(&ref, base, 12, SG_INTERP_MONOTONE, NULL), SG_OK);
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    for (unsigned long seed = 1; seed <= 20; seed++) {
        gsl_rng_set(r, seed);
        struct sg_curve_point s[12];
        memcpy(s, base, sizeof s);
        gsl_ran_shuffle(r, s, 12, sizeof s[0]);
        struct sg_curve c;
        sg_curve_init(&c);
        cr_assert_eq(sg_curve_build(&c, s, 12, SG_INTERP_MONOTONE, NULL), SG_OK);
        cr_assert_eq(c.n, 12);
        for (size_t i = 0; i < 12; i++) {
            cr_assert_eq(c.log10_d[i], ref.log10_d[i], "seed %lu node %zu", seed, i);
            cr_assert_eq(c.percent[i], ref.percent[i], "seed %lu node %zu", seed, i);
        }
        double d1 = 0, d2 = 0;
        cr_assert_eq(sg_curve_diameter_at(&c, 47.3, &d1, NULL), SG_OK);
        cr_assert_eq(sg_curve_diameter_at(&ref, 47.3, &d2, NULL), SG_OK);
        cr_assert_float_eq(d1, d2, 1e-15);
        sg_curve_release(&c);
    }
    gsl_rng_free(r);
    sg_curve_release(&ref);
}

Test(curve, duplicate_sizes_coarser_set_kept)
{
    /* ASTM D6913 12.6.2.5 (METHODS.md 5.5, 6.3 #3, 13.5 #47, read 1): where two
     * stages give a value at the same size, the coarser set's value is kept.
     * rank 0 sieve, 1 fine sieve, 2 sedimentation. */
    const struct sg_curve_point a[] = {
        {0.063, 31.7, 2}, {2.0, 88.0, 1}, {0.063, 33.9, 1}, {2.0, 86.5, 0},
        {0.02, 20.4, 2},  {5.0, 100.0, 0}, {0.063, 34.4, 0},
    };
    const size_t na = sizeof a / sizeof a[0];
    /* every rotation of the input gives the same kept values */
    for (size_t rot = 0; rot < na; rot++) {
        struct sg_curve_point b[7];
        for (size_t i = 0; i < na; i++)
            b[i] = a[(i + rot) % na];
        struct sg_curve c;
        sg_curve_init(&c);
        cr_assert_eq(sg_curve_build(&c, b, na, SG_INTERP_LOGLINEAR, NULL), SG_OK);
        cr_assert_eq(c.n, 4, "rotation %zu", rot);
        double p = 0;
        cr_assert_eq(sg_curve_percent_at(&c, 0.063, &p, NULL), SG_OK);
        cr_assert_float_eq(p, 34.4, 1e-12, "rotation %zu: %g", rot, p);
        cr_assert_eq(sg_curve_percent_at(&c, 2.0, &p, NULL), SG_OK);
        cr_assert_float_eq(p, 86.5, 1e-12, "rotation %zu: %g", rot, p);
        sg_curve_release(&c);
    }
    /* same size and same rank: the first in input order is kept (documented) */
    const struct sg_curve_point d[] = {{0.01, 12.0, 2}, {0.01, 14.0, 2}, {0.1, 40.0, 2}};
    struct sg_curve c;
    sg_curve_init(&c);
    cr_assert_eq(sg_curve_build(&c, d, 3, SG_INTERP_LOGLINEAR, NULL), SG_OK);
    cr_assert_eq(c.n, 2);
    cr_assert_float_eq(c.percent[0], 12.0, 1e-12);
    /* sizes that differ only by round-off are one size */
    const struct sg_curve_point e[] = {{0.075 * (1 + 1e-14), 20.0, 2}, {0.075, 22.0, 0}, {1.0, 60.0, 0}};
    cr_assert_eq(sg_curve_build(&c, e, 3, SG_INTERP_LOGLINEAR, NULL), SG_OK);
    cr_assert_eq(c.n, 2);
    cr_assert_float_eq(c.percent[0], 22.0, 1e-12);
    sg_curve_release(&c);
}

Test(curve, plateau_scan_from_coarse)
{
    /* METHODS.md 7.2 (practice): on a plateau pick the first segment from the
     * coarse end with P_fine < p <= P_coarse. Hand values on semi-log paper. */
    const struct sg_curve_point pts[] = {{0.01, 10.0, 2}, {0.1, 30.0, 0}, {1.0, 30.0, 0}, {10.0, 80.0, 0}};
    for (int m = 0; m < 2; m++) {
        struct sg_curve c;
        sg_curve_init(&c);
        cr_assert_eq(sg_curve_build(&c, pts, 4, m ? SG_INTERP_MONOTONE : SG_INTERP_LOGLINEAR, NULL), SG_OK);
        double d = 0;
        /* p equal to the plateau level: segment 0.01-0.1 mm, its coarse end */
        cr_assert_eq(sg_curve_diameter_at(&c, 30.0, &d, NULL), SG_OK);
        cr_assert_float_eq(d, 0.1, 1e-12, "method %d: %g", m, d);
        /* above the plateau: segment 1-10 mm */
        cr_assert_eq(sg_curve_diameter_at(&c, 31.0, &d, NULL), SG_OK);
        cr_assert(d > 1.0 && d < 10.0, "method %d: %g", m, d);
        if (m == 0) /* log10 D = 0 + (50 - 30)/(80 - 30) = 0.4 */
            cr_assert(rel(d, 1.0 * pow(10.0, 0.02)) < 1e-12);
        cr_assert_eq(sg_curve_diameter_at(&c, 50.0, &d, NULL), SG_OK);
        if (m == 0)
            cr_assert(rel(d, pow(10.0, 0.4)) < 1e-12, "%g", d);
        /* percent on the plateau is the plateau (Steffen keeps it flat) */
        double p = 0;
        cr_assert_eq(sg_curve_percent_at(&c, 0.3, &p, NULL), SG_OK);
        cr_assert_float_eq(p, 30.0, 1e-12, "method %d: %g", m, p);
        sg_curve_release(&c);
    }
}

Test(curve, non_monotone_scan_from_coarse)
{
    /* rises with falling size between 0.05 and 0.01 mm and at the finest point */
    const struct sg_curve_point pts[] = {{0.001, 20.0, 2}, {0.002, 15.0, 2}, {0.01, 40.0, 2},
                                         {0.05, 35.0, 2},  {0.1, 60.0, 0},   {1.0, 100.0, 0}};
    struct sg_curve c;
    sg_curve_init(&c);
    cr_assert_eq(sg_curve_build(&c, pts, 6, SG_INTERP_LOGLINEAR, NULL), SG_OK);
    double d = 0;
    /* 37 % is on 0.01-0.05 (falling, never used), 0.002-0.01 and 0.05-0.1:
     * the coarse scan takes 0.05-0.1 (hand: log10 0.05 + (2/25) log10 2) */
    cr_assert_eq(sg_curve_diameter_at(&c, 37.0, &d, NULL), SG_OK);
    cr_assert(rel(d, pow(10.0, log10(0.05) + 2.0 / 25.0 * log10(2.0))) < 1e-12, "%.12g", d);
    /* 18 %: only the rising 0.002-0.01 segment */
    cr_assert_eq(sg_curve_diameter_at(&c, 18.0, &d, NULL), SG_OK);
    cr_assert(rel(d, pow(10.0, log10(0.002) + 3.0 / 25.0 * log10(5.0))) < 1e-12, "%.12g", d);
    /* 15 %: reached only at the local minimum node */
    cr_assert_eq(sg_curve_diameter_at(&c, 15.0, &d, NULL), SG_OK);
    cr_assert_float_eq(d, 0.002, 1e-15);
    /* 12 %: never reached, though the finest point is at 20 % */
    struct sg_error e;
    cr_assert_eq(sg_curve_diameter_at(&c, 12.0, &d, &e), SG_EDOM);
    cr_assert(strstr(e.msg, "15-100") != NULL, "%s", e.msg);
    /* percent_at on a falling segment is still plain interpolation */
    double p = 0;
    cr_assert_eq(sg_curve_percent_at(&c, sqrt(0.01 * 0.05), &p, NULL), SG_OK);
    cr_assert_float_eq(p, 37.5, 1e-12);
    /* monotone: Steffen is monotone between nodes, so the same bracket */
    cr_assert_eq(sg_curve_build(&c, pts, 6, SG_INTERP_MONOTONE, NULL), SG_OK);
    cr_assert_eq(sg_curve_diameter_at(&c, 37.0, &d, NULL), SG_OK);
    cr_assert(d > 0.05 && d < 0.1, "%g", d);
    cr_assert_eq(sg_curve_percent_at(&c, d, &p, NULL), SG_OK);
    cr_assert_float_eq(p, 37.0, 1e-9);
    sg_curve_release(&c);
}

Test(curve, no_extrapolation)
{
    /* METHODS.md 7.2: never extrapolate; the message gives the range */
    struct sg_curve c;
    build_line(&c, SG_INTERP_LOGLINEAR, 0.0021);
    struct sg_error e;
    double v = -1;
    cr_assert_eq(sg_curve_percent_at(&c, 0.0015, &v, &e), SG_EDOM);
    cr_assert_eq(e.code, SG_EDOM);
    cr_assert(strstr(e.msg, "0.0015 mm is finer than the finest point 0.0021 mm") != NULL, "%s", e.msg);
    /* D5 below the finest point's 8.06 % (= line_p(0.0021)) */
    cr_assert_eq(sg_curve_diameter_at(&c, 5.0, &v, &e), SG_EDOM);
    cr_assert(strstr(e.msg, "below the finest point") != NULL, "%s", e.msg);
    /* exactly the finest point's percent: that point's size */
    cr_assert_eq(sg_curve_diameter_at(&c, line_p(0.0021), &v, NULL), SG_OK);
    cr_assert(rel(v, 0.0021) < 1e-12);
    /* above 100 % */
    cr_assert_eq(sg_curve_diameter_at(&c, 100.5, &v, &e), SG_EDOM);
    cr_assert(strstr(e.msg, "above the coarsest point") != NULL, "%s", e.msg);
    /* the ends themselves are inside */
    cr_assert_eq(sg_curve_percent_at(&c, 0.0021, &v, NULL), SG_OK);
    cr_assert_eq(sg_curve_percent_at(&c, 10.0, &v, NULL), SG_OK);
    cr_assert_float_eq(v, 100.0, 1e-12);
    sg_curve_release(&c);
}

Test(curve, end_exceptions_100_and_0)
{
    /* documented in curve.h: above a coarsest point at 100 % the percent
     * finer is 100; below a finest point at 0 % it is 0 */
    for (int m = 0; m < 2; m++) {
        struct sg_curve c;
        build_line(&c, m ? SG_INTERP_MONOTONE : SG_INTERP_LOGLINEAR, 0.001); /* line_p(0.001) = 0 */
        double p = -1;
        cr_assert_eq(sg_curve_percent_at(&c, 63.0, &p, NULL), SG_OK);
        cr_assert_float_eq(p, 100.0, 1e-12);
        cr_assert_eq(sg_curve_percent_at(&c, 0.0002, &p, NULL), SG_OK);
        cr_assert_float_eq(p, 0.0, 1e-12);
        sg_curve_release(&c);
    }
    /* within 1e-9 of 100 counts; 99.9 does not */
    const struct sg_curve_point near[] = {{0.1, 40.0, 0}, {2.0, 100.0 - 5e-10, 0}};
    const struct sg_curve_point short_[] = {{0.1, 40.0, 0}, {2.0, 99.9, 0}};
    struct sg_curve c;
    sg_curve_init(&c);
    double p = 0;
    cr_assert_eq(sg_curve_build(&c, near, 2, SG_INTERP_LOGLINEAR, NULL), SG_OK);
    cr_assert_eq(sg_curve_percent_at(&c, 63.0, &p, NULL), SG_OK);
    cr_assert_float_eq(p, 100.0, 1e-12);
    cr_assert_eq(sg_curve_build(&c, short_, 2, SG_INTERP_LOGLINEAR, NULL), SG_OK);
    struct sg_error e;
    cr_assert_eq(sg_curve_percent_at(&c, 63.0, &p, &e), SG_EDOM);
    cr_assert(strstr(e.msg, "63 mm is coarser than the coarsest point 2 mm") != NULL, "%s", e.msg);
    /* the finest point at 40 %: below it nothing is known */
    cr_assert_eq(sg_curve_percent_at(&c, 0.05, &p, &e), SG_EDOM);
    sg_curve_release(&c);
}

/* smooth reference curve: logistic in log10 D, D50 = 0.05 mm (invented shape) */
static double smooth_p(double d) { return 100.0 / (1.0 + pow(10.0, -1.3 * (log10(d) - log10(0.05)))); }
static double smooth_d(double p) { return 0.05 * pow(10.0, -log10(100.0 / p - 1.0) / 1.3); }

Test(curve, monotone_and_loglinear_agree_when_dense)
{
    /* 30 log-spaced points 0.0005-5 mm on a smooth curve: both methods within
     * 1 % of each other (and of the true curve) for D-values, and within 0.1
     * points for percents (common practice expectation) */
    struct sg_curve_point pts[30];
    for (int i = 0; i < 30; i++) {
        const double d = 0.0005 * pow(10.0, 4.0 * i / 29.0);
        pts[i] = (struct sg_curve_point){d, smooth_p(d), 2};
    }
    struct sg_curve lin, mon;
    sg_curve_init(&lin);
    sg_curve_init(&mon);
    cr_assert_eq(sg_curve_build(&lin, pts, 30, SG_INTERP_LOGLINEAR, NULL), SG_OK);
    cr_assert_eq(sg_curve_build(&mon, pts, 30, SG_INTERP_MONOTONE, NULL), SG_OK);
    const double ps[] = {10, 15, 30, 50, 60, 85, 90};
    for (size_t i = 0; i < sizeof ps / sizeof ps[0]; i++) {
        double a = 0, b = 0;
        cr_assert_eq(sg_curve_diameter_at(&lin, ps[i], &a, NULL), SG_OK);
        cr_assert_eq(sg_curve_diameter_at(&mon, ps[i], &b, NULL), SG_OK);
        cr_assert(rel(a, b) < 0.01, "D%g: %g vs %g", ps[i], a, b);
        cr_assert(rel(b, smooth_d(ps[i])) < 0.01, "D%g monotone %g vs true %g", ps[i], b, smooth_d(ps[i]));
    }
    double maxdiff = 0.0;
    for (double d = 0.0006; d < 5.0; d *= 1.037) {
        double a = 0, b = 0;
        cr_assert_eq(sg_curve_percent_at(&lin, d, &a, NULL), SG_OK);
        cr_assert_eq(sg_curve_percent_at(&mon, d, &b, NULL), SG_OK);
        maxdiff = fmax(maxdiff, fabs(a - b));
    }
    cr_assert(maxdiff < 0.25, "largest difference %g points", maxdiff);
    sg_curve_release(&lin);
    sg_curve_release(&mon);
}

Test(curve, steffen_never_overshoots)
{
    /* a sharp step (uniform sand on a coarse sieve set): a natural cubic
     * spline rises above 100 % here; Steffen must not (TOOLCHAIN.md, GSL docs) */
    const double d[] = {0.063, 0.125, 0.25, 0.3, 0.5, 1.0, 2.0, 4.0};
    const double p[] = {0.0, 0.5, 2.0, 97.0, 100.0, 100.0, 100.0, 100.0};
    struct sg_curve_point pts[8];
    double x[8];
    for (int i = 0; i < 8; i++) {
        pts[i] = (struct sg_curve_point){d[i], p[i], 0};
        x[i] = log10(d[i]);
    }
    struct sg_curve c;
    sg_curve_init(&c);
    cr_assert_eq(sg_curve_build(&c, pts, 8, SG_INTERP_MONOTONE, NULL), SG_OK);
    gsl_interp *cs = gsl_interp_alloc(gsl_interp_cspline, 8);
    cr_assert_eq(gsl_interp_init(cs, x, p, 8), GSL_SUCCESS);
    double cs_max = 0.0, st_max = 0.0, st_min = 100.0, prev = -1.0;
    for (int k = 0; k <= 4000; k++) {
        const double xx = fmin(x[0] + (x[7] - x[0]) * k / 4000.0, x[7]);
        double v = 0, w = 0;
        cr_assert_eq(sg_curve_percent_at(&c, pow(10.0, xx), &v, NULL), SG_OK);
        cr_assert_eq(gsl_interp_eval_e(cs, x, p, xx, NULL, &w), GSL_SUCCESS);
        cr_assert(v >= prev - 1e-12, "not monotone at %g mm: %g after %g", pow(10.0, xx), v, prev);
        prev = v;
        st_max = fmax(st_max, v);
        st_min = fmin(st_min, v);
        cs_max = fmax(cs_max, w);
    }
    cr_assert(cs_max > 100.5, "the check data must make a cubic spline overshoot (%g)", cs_max);
    cr_assert(st_max <= 100.0 + 1e-12, "Steffen overshoots: %.15g", st_max);
    cr_assert(st_min >= -1e-12, "Steffen undershoots: %.15g", st_min);
    gsl_interp_free(cs);
    sg_curve_release(&c);
}

Test(curve, monotone_root_matches_forward)
{
    /* diameter_at inverts percent_at on the Steffen curve (Brent root, 1e-12 in log10 D) */
    const struct sg_curve_point pts[] = {{0.0012, 4.1, 2},  {0.0031, 11.9, 2}, {0.0087, 23.6, 2},
                                         {0.024, 41.3, 2},  {0.063, 57.0, 0},  {0.212, 71.8, 0},
                                         {0.6, 88.2, 0},    {2.0, 97.4, 0},    {6.3, 100.0, 0}};
    struct sg_curve c;
    sg_curve_init(&c);
    cr_assert_eq(sg_curve_build(&c, pts, 9, SG_INTERP_MONOTONE, NULL), SG_OK);
    for (double p = 4.2; p < 100.0; p += 1.9) {
        double d = 0, back = 0;
        cr_assert_eq(sg_curve_diameter_at(&c, p, &d, NULL), SG_OK);
        cr_assert_eq(sg_curve_percent_at(&c, d, &back, NULL), SG_OK);
        cr_assert_float_eq(back, p, 1e-8, "p %g -> %g mm -> %g", p, d, back);
    }
    /* nodes are exact */
    double d = 0;
    cr_assert_eq(sg_curve_diameter_at(&c, 57.0, &d, NULL), SG_OK);
    cr_assert(rel(d, 0.063) < 1e-12);
    sg_curve_release(&c);
}

Test(curve, monotone_two_points_falls_back_to_linear)
{
    /* documented in curve.h: Steffen needs 3 nodes; 2 nodes are linear in log10 D */
    const struct sg_curve_point pts[] = {{0.075, 12.0, 0}, {2.0, 64.0, 0}};
    struct sg_curve c;
    sg_curve_init(&c);
    cr_assert_eq(sg_curve_build(&c, pts, 2, SG_INTERP_MONOTONE, NULL), SG_OK);
    cr_assert_eq(c.method, SG_INTERP_MONOTONE);
    cr_assert_null(c.impl);
    double p = 0, d = 0;
    cr_assert_eq(sg_curve_percent_at(&c, 0.425, &p, NULL), SG_OK);
    cr_assert_float_eq(p, 12.0 + 52.0 * log10(0.425 / 0.075) / log10(2.0 / 0.075), 1e-12);
    cr_assert_eq(sg_curve_diameter_at(&c, 38.0, &d, NULL), SG_OK);
    cr_assert(rel(d, 0.075 * pow(2.0 / 0.075, 0.5)) < 1e-12);
    sg_curve_release(&c);
}

Test(curve, build_errors)
{
    struct sg_curve c;
    sg_curve_init(&c);
    struct sg_error e;
    const struct sg_curve_point one[] = {{0.1, 20.0, 0}};
    cr_assert_eq(sg_curve_build(&c, one, 0, SG_INTERP_LOGLINEAR, &e), SG_EDOM);
    cr_assert_eq(sg_curve_build(&c, NULL, 0, SG_INTERP_LOGLINEAR, &e), SG_EDOM);
    cr_assert_eq(sg_curve_build(&c, one, 1, SG_INTERP_LOGLINEAR, &e), SG_EDOM);
    cr_assert_eq(e.code, SG_EDOM);
    cr_assert_eq(sg_curve_build(&c, NULL, 3, SG_INTERP_LOGLINEAR, &e), SG_EINVAL);
    const struct sg_curve_point same[] = {{0.1, 20.0, 0}, {0.1, 22.0, 1}, {0.1, 25.0, 2}};
    cr_assert_eq(sg_curve_build(&c, same, 3, SG_INTERP_MONOTONE, &e), SG_EDOM);
    cr_assert(strstr(e.msg, "one size") != NULL, "%s", e.msg);
    cr_assert_eq(c.n, 0);
    const struct sg_curve_point neg[] = {{0.1, 20.0, 0}, {-0.2, 22.0, 1}};
    cr_assert_eq(sg_curve_build(&c, neg, 2, SG_INTERP_LOGLINEAR, &e), SG_EINVAL);
    cr_assert(strstr(e.msg, "-0.2 mm") != NULL, "%s", e.msg);
    const struct sg_curve_point zero[] = {{0.0, 0.0, 0}, {0.2, 22.0, 1}};
    cr_assert_eq(sg_curve_build(&c, zero, 2, SG_INTERP_LOGLINEAR, &e), SG_EINVAL);
    const struct sg_curve_point nan_d[] = {{NAN, 20.0, 0}, {0.2, 22.0, 1}};
    cr_assert_eq(sg_curve_build(&c, nan_d, 2, SG_INTERP_LOGLINEAR, &e), SG_EINVAL);
    const struct sg_curve_point inf_p[] = {{0.1, INFINITY, 0}, {0.2, 22.0, 1}};
    cr_assert_eq(sg_curve_build(&c, inf_p, 2, SG_INTERP_LOGLINEAR, &e), SG_EINVAL);
    /* one bad point alone is refused as bad, not as too few; of several,
     * the first in input order is named */
    const struct sg_curve_point bad_one[] = {{-0.1, 20.0, 0}};
    cr_assert_eq(sg_curve_build(&c, bad_one, 1, SG_INTERP_LOGLINEAR, &e), SG_EINVAL);
    const struct sg_curve_point two_bad[] = {{1.0, 90.0, 0}, {0.5, NAN, 0}, {0.3, 40.0, 0}, {-0.2, 22.0, 1}};
    cr_assert_eq(sg_curve_build(&c, two_bad, 4, SG_INTERP_LOGLINEAR, &e), SG_EINVAL);
    cr_assert(strstr(e.msg, "curve point 2 at 0.5 mm: percent finer nan") != NULL, "%s", e.msg);
    const struct sg_curve_point ok[] = {{0.1, 20.0, 0}, {0.2, 22.0, 1}};
    cr_assert_eq(sg_curve_build(&c, ok, 2, (enum sg_interp)7, &e), SG_EINVAL);
    cr_assert_eq(c.n, 0);
    /* a failed build over a built curve leaves it empty, not half-built */
    cr_assert_eq(sg_curve_build(&c, ok, 2, SG_INTERP_LOGLINEAR, &e), SG_OK);
    cr_assert_eq(sg_curve_build(&c, neg, 2, SG_INTERP_LOGLINEAR, NULL), SG_EINVAL);
    cr_assert_eq(c.n, 0);
    cr_assert_null(c.percent);
    sg_curve_release(&c);
}

Test(curve, query_errors)
{
    struct sg_curve c;
    sg_curve_init(&c);
    struct sg_error e;
    double v = 0;
    cr_assert_eq(sg_curve_percent_at(&c, 0.1, &v, &e), SG_EDOM); /* empty curve */
    cr_assert_eq(sg_curve_diameter_at(&c, 10.0, &v, &e), SG_EDOM);
    cr_assert_eq(sg_curve_percent_at(NULL, 0.1, &v, &e), SG_EDOM);
    build_line(&c, SG_INTERP_MONOTONE, 0.002);
    cr_assert_eq(sg_curve_percent_at(&c, 0.0, &v, &e), SG_EINVAL);
    cr_assert_eq(sg_curve_percent_at(&c, -1.0, &v, &e), SG_EINVAL);
    cr_assert_eq(sg_curve_percent_at(&c, NAN, &v, &e), SG_EINVAL);
    cr_assert_eq(sg_curve_percent_at(&c, 0.1, NULL, &e), SG_EINVAL);
    cr_assert_eq(sg_curve_diameter_at(&c, NAN, &v, &e), SG_EINVAL);
    cr_assert_eq(sg_curve_diameter_at(&c, 10.0, NULL, &e), SG_EINVAL);
    cr_assert_eq(sg_curve_diameter_at(&c, 10.0, &v, NULL), SG_OK); /* err may be NULL */
    sg_curve_release(&c);
}

/* The convention of sg_curve_diameter_at as curve.h states it, by a plain
 * scan of the nodes: the diameter in log10, or NAN where p is not reached. */
static double documented_log10_d(const struct sg_curve *c, double p)
{
    for (size_t i = c->n - 1; i >= 1; i--) {
        const double pf = c->percent[i - 1], pc = c->percent[i];
        if (pf < p && p <= pc)
            return c->log10_d[i - 1] + (p - pf) * (c->log10_d[i] - c->log10_d[i - 1]) / (pc - pf);
    }
    for (size_t i = c->n; i-- > 0;)
        if (c->percent[i] == p)
            return c->log10_d[i];
    return NAN;
}

Test(curve, diameter_at_follows_the_scan_on_any_shape)
{
    /* Curves that rise, fall and have plateaus (percent on a 5 % grid so
     * that equal nodes and a p equal to a node are common), asked at every
     * 2.5 %: the answer is the documented scan's, on rising tails, falls
     * and plateaus alike. */
    gsl_rng *g = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(g, 7);
    for (int trial = 0; trial < 300; trial++) {
        struct sg_curve_point pts[12];
        const size_t n = 2 + gsl_rng_uniform_int(g, 11);
        double pct = 5.0 * (double)gsl_rng_uniform_int(g, 5);
        for (size_t i = 0; i < n; i++) {
            pts[i] = (struct sg_curve_point){0.001 * pow(2.0, (double)i), pct, 2};
            pct += 5.0 * ((double)gsl_rng_uniform_int(g, 5) - (trial % 3 == 0 ? 0.0 : 1.0));
            pct = pct < 0.0 ? 0.0 : pct > 100.0 ? 100.0 : pct;
        }
        struct sg_curve c;
        sg_curve_init(&c);
        cr_assert_eq(sg_curve_build(&c, pts, n, SG_INTERP_LOGLINEAR, NULL), SG_OK);
        for (double p = -2.5; p <= 102.5; p += 2.5) {
            const double want = documented_log10_d(&c, p);
            double d = NAN;
            const enum sg_status st = sg_curve_diameter_at(&c, p, &d, NULL);
            if (isnan(want)) {
                cr_assert_eq(st, SG_EDOM, "trial %d, p %g", trial, p);
            } else {
                cr_assert_eq(st, SG_OK, "trial %d, p %g", trial, p);
                cr_assert(d == pow(10.0, want), "trial %d, p %g: %.17g, scan %.17g", trial, p, d,
                          pow(10.0, want));
            }
        }
        sg_curve_release(&c);
    }
    gsl_rng_free(g);
}

/* A random curve for the sorted readers: n nodes (2-14) at increasing,
 * unevenly spaced sizes; percents that rise, fall and stay level, on a
 * 5 % grid (equal nodes and asked percents equal to a node are common) or
 * continuous with repeated values (plateaus). Invented data. */
static size_t random_curve(gsl_rng *g, int trial, struct sg_curve_point *pts)
{
    const size_t n = 2 + gsl_rng_uniform_int(g, 13);
    const bool grid = trial % 2 == 0;
    double lg = -3.0 + gsl_rng_uniform(g);
    double pct = grid ? 5.0 * (double)gsl_rng_uniform_int(g, 5) : 30.0 * gsl_rng_uniform(g);
    for (size_t i = 0; i < n; i++) {
        pts[i] = (struct sg_curve_point){pow(10.0, lg), pct, (int)gsl_rng_uniform_int(g, 3)};
        lg += 0.05 + 0.6 * gsl_rng_uniform(g);
        const unsigned kind = (unsigned)gsl_rng_uniform_int(g, 6); /* 0 fall, 1 level, else rise */
        const double step = grid ? 5.0 * (double)(1 + gsl_rng_uniform_int(g, 3)) : 25.0 * gsl_rng_uniform(g);
        pct += kind == 0 ? -step : kind == 1 ? 0.0 : step;
        pct = pct < 0.0 ? 0.0 : pct > 100.0 ? 100.0 : pct;
    }
    return n;
}

static int cmp_double(const void *a, const void *b)
{
    const double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* Asks the sorted reader for ps[0..m) and checks every answer against
 * sg_curve_diameter_at: the same status, the same value bit for bit
 * (NaN where it fails). */
static void check_sorted_against_single(const struct sg_curve *c, const double *ps, size_t m, const char *what,
                                        int trial)
{
    double d[64];
    enum sg_status st[64];
    cr_assert(m <= 64);
    sg_curve_diameters_at_sorted(c, ps, m, d, st);
    for (size_t i = 0; i < m; i++) {
        double want = NAN;
        const enum sg_status want_st = sg_curve_diameter_at(c, ps[i], &want, NULL);
        cr_assert_eq(st[i], want_st, "%s, trial %d, p %.17g: status %d, single %d", what, trial, ps[i], (int)st[i],
                     (int)want_st);
        if (want_st == SG_OK)
            cr_assert(memcmp(&d[i], &want, sizeof want) == 0, "%s, trial %d, p %.17g: %.17g, single %.17g", what,
                      trial, ps[i], d[i], want);
        else
            cr_assert(isnan(d[i]), "%s, trial %d, p %.17g: %g where it fails", what, trial, ps[i], d[i]);
    }
}

Test(curve, diameters_at_sorted_equal_the_single_reading)
{
    /* Random curves with falls and plateaus, both interpolations, read at
     * increasing percents that include every node's percent, values just
     * off them, unreachable ones (below 0, above 100, outside the curve's
     * span) and random ones; then the same percents shuffled, which the
     * sorted reader must answer alike. */
    gsl_rng *g = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(g, 20261202);
    for (int trial = 0; trial < 1200; trial++) {
        struct sg_curve_point pts[14];
        const size_t n = random_curve(g, trial, pts);
        double ps[64];
        size_t m = 0;
        ps[m++] = -5.0;
        ps[m++] = 0.0;
        ps[m++] = 100.0;
        ps[m++] = 105.0;
        for (size_t i = 0; i < n; i++) {
            ps[m++] = pts[i].percent_finer;
            ps[m++] = nextafter(pts[i].percent_finer, INFINITY);
            ps[m++] = nextafter(pts[i].percent_finer, -INFINITY);
        }
        while (m < 60)
            ps[m++] = 110.0 * gsl_rng_uniform(g) - 5.0;
        qsort(ps, m, sizeof ps[0], cmp_double);
        for (int method = 0; method < 2; method++) {
            const enum sg_interp how = method == 0 ? SG_INTERP_LOGLINEAR : SG_INTERP_MONOTONE;
            struct sg_curve c;
            sg_curve_init(&c);
            if (sg_curve_build(&c, pts, n, how, NULL) != SG_OK) {
                sg_curve_release(&c);
                continue;
            }
            check_sorted_against_single(&c, ps, m, how == SG_INTERP_LOGLINEAR ? "log-linear" : "monotone",
                                        trial);
            double shuffled[64];
            memcpy(shuffled, ps, m * sizeof ps[0]);
            gsl_ran_shuffle(g, shuffled, m, sizeof shuffled[0]);
            check_sorted_against_single(&c, shuffled, m, "shuffled", trial);
            sg_curve_release(&c);
        }
    }
    gsl_rng_free(g);
}

Test(curve, diameters_at_sorted_refusals)
{
    /* non-finite percents, an empty curve: the statuses of the single
     * reading, NaN values; m == 0 touches nothing */
    struct sg_curve c;
    build_line(&c, SG_INTERP_LOGLINEAR, 0.002);
    const double ps[] = {-INFINITY, NAN, 10.0, 50.0, INFINITY};
    double d[5];
    enum sg_status st[5];
    sg_curve_diameters_at_sorted(&c, ps, 5, d, st);
    const enum sg_status want[] = {SG_EINVAL, SG_EINVAL, SG_OK, SG_OK, SG_EINVAL};
    for (size_t i = 0; i < 5; i++) {
        cr_assert_eq(st[i], want[i], "p %g: status %d", ps[i], (int)st[i]);
        cr_assert(want[i] == SG_OK ? isfinite(d[i]) : isnan(d[i]));
    }
    cr_assert(rel(d[2], line_d(10.0)) < 1e-13);
    cr_assert(rel(d[3], 0.1) < 1e-13);
    sg_curve_release(&c);
    sg_curve_diameters_at_sorted(&c, ps + 2, 2, d, st); /* empty curve */
    cr_assert_eq(st[0], SG_EDOM);
    cr_assert_eq(st[1], SG_EDOM);
    cr_assert(isnan(d[0]) && isnan(d[1]));
    sg_curve_diameters_at_sorted(&c, ps, 0, NULL, NULL);
}

Test(curve, percent_at_sorted_equals_the_single_reading)
{
    /* The same random curves, read at increasing sizes: every node, sizes
     * just off a node and off the ends by less than SG_CURVE_SAME_LOG10_D,
     * sizes beyond both ends (the 0 % / 100 % end rules), random ones, and
     * non-positive or non-finite sizes: the same percent bit for bit and
     * the same status as sg_curve_percent_at_log10. */
    gsl_rng *g = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(g, 1202);
    for (int trial = 0; trial < 1200; trial++) {
        struct sg_curve_point pts[14];
        const size_t n = random_curve(g, trial, pts);
        if (trial % 4 == 1)
            pts[n - 1].percent_finer = 100.0; /* end rules apply */
        if (trial % 4 == 2)
            pts[0].percent_finer = 0.0;
        double xs[64];
        size_t m = 0;
        for (size_t i = 0; i < n; i++) {
            const double x = log10(pts[i].diameter_mm);
            xs[m++] = x;
            xs[m++] = nextafter(x, INFINITY);
            xs[m++] = x - 0.5e-12;
            xs[m++] = x + 0.5e-12;
        }
        const double x_lo = log10(pts[0].diameter_mm), x_hi = log10(pts[n - 1].diameter_mm);
        xs[m++] = x_lo - 0.1;
        xs[m++] = x_hi + 0.1;
        xs[m++] = x_lo - 2e-12;
        xs[m++] = x_hi + 2e-12;
        while (m < 60)
            xs[m++] = x_lo - 0.2 + (x_hi - x_lo + 0.4) * gsl_rng_uniform(g);
        qsort(xs, m, sizeof xs[0], cmp_double);
        double ds[64];
        for (size_t i = 0; i < m; i++)
            ds[i] = pow(10.0, xs[i]);
        ds[0] = trial % 3 == 0 ? 0.0 : trial % 3 == 1 ? -1.0 : (double)NAN; /* refused whatever its log10 */
        ds[m - 1] = trial % 2 == 0 ? (double)INFINITY : ds[m - 1];
        for (int method = 0; method < 2; method++) {
            const enum sg_interp how = method == 0 ? SG_INTERP_LOGLINEAR : SG_INTERP_MONOTONE;
            struct sg_curve c;
            sg_curve_init(&c);
            if (sg_curve_build(&c, pts, n, how, NULL) != SG_OK) {
                sg_curve_release(&c);
                continue;
            }
            double p[64];
            enum sg_status st[64];
            sg_curve_percent_at_sorted(&c, ds, xs, m, p, st);
            for (size_t i = 0; i < m; i++) {
                double want = NAN;
                const enum sg_status want_st = sg_curve_percent_at_log10(&c, ds[i], xs[i], &want, NULL);
                cr_assert_eq(st[i], want_st, "trial %d, method %d, log10 D %.17g: status %d, single %d", trial,
                             method, xs[i], (int)st[i], (int)want_st);
                if (want_st == SG_OK)
                    cr_assert(memcmp(&p[i], &want, sizeof want) == 0, "trial %d, method %d, log10 D %.17g: %.17g, "
                              "single %.17g", trial, method, xs[i], p[i], want);
                else
                    cr_assert(isnan(p[i]), "trial %d: %g where it fails", trial, p[i]);
            }
            sg_curve_release(&c);
        }
    }
    gsl_rng_free(g);
}
