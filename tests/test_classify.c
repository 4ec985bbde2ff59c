/* test_classify.c - summary quantities read off the curve: D-values, Cu, Cc,
 * fractions of ISO 14688-1, ASTM D2487, AASHTO M 145 and USDA, the USDA
 * texture class, USCS and ISO grading terms and the junction gap. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>

#include "sedgrade/classify.h"
#include "sedgrade/curve.h"
#include "sedgrade/record.h"
#include "sedgrade/reduce.h"
#include "sedgrade/result.h"

static void setup(void) { gsl_set_error_handler_off(); }

TestSuite(usda, .init = setup);
TestSuite(grading, .init = setup);
TestSuite(summary, .init = setup);
TestSuite(junction, .init = setup);
TestSuite(acceptance, .init = setup);

/* ---- helpers ----------------------------------------------------------- */

static void summarise(struct sg_result *res, const struct sg_curve_point *p, size_t n, enum sg_interp m,
                      const struct sg_reduce_options *opt)
{
    struct sg_error e;
    sg_error_clear(&e);
    if (n > 0)
        cr_assert_eq(sg_curve_build(&res->curve, p, n, m, &e), SG_OK, "%s", e.msg);
    cr_assert_eq(sg_classify_summarise(&res->curve, NULL, opt, res, &e), SG_OK, "%s", e.msg);
}

static const struct sg_quantity *qty(const struct sg_result *res, const char *name)
{
    const struct sg_quantity *q = sg_result_quantity(res, name);
    cr_assert_not_null(q, "quantity %s missing", name);
    return q;
}

static double val(const struct sg_result *res, const char *name)
{
    const struct sg_quantity *q = qty(res, name);
    cr_assert(q->determined, "%s not determined: %s", name, q->note);
    cr_assert(!q->is_text, "%s is text", name);
    return q->value;
}

static const char *txt(const struct sg_result *res, const char *name)
{
    const struct sg_quantity *q = qty(res, name);
    cr_assert(q->determined, "%s not determined: %s", name, q->note);
    cr_assert(q->is_text, "%s is not text", name);
    return q->text;
}

static void undet(const struct sg_result *res, const char *name, const char *fragment)
{
    const struct sg_quantity *q = qty(res, name);
    cr_assert(!q->determined, "%s should not be determined (value %g '%s')", name, q->value, q->text);
    cr_assert(q->note[0] != '\0', "%s: no reason given", name);
    if (fragment != NULL)
        cr_assert(strstr(q->note, fragment) != NULL, "%s: note '%s' lacks '%s'", name, q->note, fragment);
}

static double rel(double a, double b) { return fabs(a - b) / fabs(b); }

/* ---- USDA texture ------------------------------------------------------- */

struct usda_case {
    double sand, silt, clay;
    const char *cls;
};

Test(usda, methods_test_points)
{
    /* every test point of METHODS.md 8.4 (derived from the inequalities,
     * SSSA glossary read 22 + Soil Survey Manual ch. 3) */
    const struct usda_case c[] = {
        {30, 40, 30, "clay loam"},  {40, 30, 30, "clay loam"},       {50, 20, 30, "sandy clay loam"},
        {40, 40, 20, "loam"},       {20, 20, 60, "clay"},            {60, 30, 10, "sandy loam"},
        {50, 10, 40, "sandy clay"}, {80, 15, 5, "loamy sand"},       {92, 5, 3, "sand"},
        {85, 14, 1, "loamy sand"},  {86, 10, 4, "loamy sand"},       {100, 0, 0, "sand"},
        {0, 100, 0, "silt"},        {0, 0, 100, "clay"},             {10, 85, 5, "silt"},
        {15, 80, 5, "silt"},        {8, 81, 11, "silt"},             {8, 80, 12, "silt loam"},
        {20, 65, 15, "silt loam"},  {30, 58, 12, "silt loam"},
    };
    for (size_t i = 0; i < sizeof c / sizeof c[0]; i++) {
        const char *got = sg_classify_usda_texture(c[i].sand, c[i].silt, c[i].clay);
        cr_assert_not_null(got, "%g/%g/%g", c[i].sand, c[i].silt, c[i].clay);
        cr_assert_str_eq(got, c[i].cls, "%g/%g/%g: %s, expected %s", c[i].sand, c[i].silt, c[i].clay, got,
                         c[i].cls);
    }
}

Test(usda, class_edges)
{
    /* a point on each class edge and one 0.1 % across it; expected classes
     * from the METHODS.md 8.4 inequalities (lower bounds inclusive, upper
     * exclusive), checked with exact rational arithmetic in python3 */
    const struct usda_case c[] = {
        {85, 15, 0, "loamy sand"},        {85.1, 14.9, 0, "sand"},             /* si + 1.5 cl = 15 */
        {70, 30, 0, "sandy loam"},        {70.1, 29.9, 0, "loamy sand"},       /* si + 2 cl = 30 */
        {52, 40, 8, "loam"},              {52.1, 39.9, 8, "sandy loam"},       /* sa = 52 */
        {45, 48, 7, "loam"},              {45.1, 48, 6.9, "sandy loam"},       /* cl = 7 */
        {53, 40, 7, "sandy loam"},        {52, 41, 7, "loam"},                 /* cl = 7 and sa = 52 */
        {40, 50, 10, "silt loam"},        {40.1, 49.9, 10, "loam"},            /* si = 50 */
        {35, 38, 27, "clay loam"},        {35.1, 38, 26.9, "loam"},            /* cl = 27 */
        {50, 28, 22, "loam"},             {50.1, 27.9, 22, "sandy clay loam"}, /* si = 28 */
        {60, 20, 20, "sandy clay loam"},  {60.1, 20, 19.9, "sandy loam"},      /* cl = 20 */
        {45, 25, 30, "clay loam"},        {45.1, 24.9, 30, "sandy clay loam"}, /* sa = 45 */
        {20, 50, 30, "silty clay loam"},  {20.1, 49.9, 30, "clay loam"},       /* sa = 20 */
        {10, 63, 27, "silty clay loam"},  {10, 63.1, 26.9, "silt loam"},       /* cl = 27 */
        {55, 10, 35, "sandy clay"},       {55.1, 10, 34.9, "sandy clay loam"}, /* cl = 35 */
        {30, 30, 40, "clay"},             {30, 30.1, 39.9, "clay loam"},       /* cl = 40 */
        {10, 50, 40, "silty clay"},       {10, 50.1, 39.9, "silty clay loam"}, /* cl = 40 */
        {15, 40, 45, "silty clay"},       {15.1, 39.9, 45, "clay"},            /* si = 40 */
        {45, 10, 45, "clay"},             {45.1, 9.9, 45, "sandy clay"},       /* sa = 45 */
        {20, 68, 12, "silt loam"},        {20, 68.1, 11.9, "silt loam"},       /* cl = 12 inside silt loam */
        {12, 80, 8, "silt"},              {12.1, 79.9, 8, "silt loam"},        /* si = 80 */
    };
    for (size_t i = 0; i < sizeof c / sizeof c[0]; i++) {
        const char *got = sg_classify_usda_texture(c[i].sand, c[i].silt, c[i].clay);
        cr_assert_not_null(got, "%g/%g/%g", c[i].sand, c[i].silt, c[i].clay);
        cr_assert_str_eq(got, c[i].cls, "%g/%g/%g: %s, expected %s", c[i].sand, c[i].silt, c[i].clay, got,
                         c[i].cls);
    }
}

Test(usda, partition_on_the_grid)
{
    /* METHODS.md 8.4 [derived]: on the 0.1 % grid every point satisfies
     * exactly one class; the function returns NULL on 0 or 2+ matches */
    size_t n = 0;
    for (int cl = 0; cl <= 1000; cl++)
        for (int si = 0; si + cl <= 1000; si++) {
            const int sa = 1000 - cl - si;
            const char *got = sg_classify_usda_texture(sa / 10.0, si / 10.0, cl / 10.0);
            cr_assert_not_null(got, "no single class at %d/%d/%d tenths", sa, si, cl);
            n++;
        }
    cr_assert_eq(n, 501501);
}

Test(usda, rounding_scaling_and_invalid)
{
    /* round to 0.1 % first (METHODS.md 8.4): 19.99996 % clay is 20.0 % */
    cr_assert_str_eq(sg_classify_usda_texture(60.00004, 20.0, 19.99996), "sandy clay loam");
    cr_assert_str_eq(sg_classify_usda_texture(60.04, 20.0, 19.96), "sandy clay loam");
    cr_assert_str_eq(sg_classify_usda_texture(60.06, 20.0, 19.94), "sandy loam");
    /* inputs are scaled to 100 (fractions of anything) */
    cr_assert_str_eq(sg_classify_usda_texture(0.6, 0.8, 0.6), "clay loam"); /* 30/40/30 */
    cr_assert_str_eq(sg_classify_usda_texture(46.0, 18.4, 27.6), "sandy clay loam"); /* 50/20/30 x 0.92 */
    /* tiny negatives from round-off count as 0 */
    cr_assert_str_eq(sg_classify_usda_texture(100.0, -1e-12, 0.0), "sand");
    cr_assert_null(sg_classify_usda_texture(101.0, -1.0, 0.0));
    cr_assert_null(sg_classify_usda_texture(NAN, 50.0, 50.0));
    cr_assert_null(sg_classify_usda_texture(50.0, INFINITY, 50.0));
    cr_assert_null(sg_classify_usda_texture(0.0, 0.0, 0.0));
}

/* ---- grading words ------------------------------------------------------ */

Test(grading, uscs_limits)
{
    /* ASTM D2487 (METHODS.md 7.3, 13.6 #55): GW Cu >= 4 and 1 <= Cc <= 3;
     * SW Cu >= 6 and 1 <= Cc <= 3 */
    cr_assert(sg_classify_uscs_well_graded(true, 4.0, 1.0));
    cr_assert(sg_classify_uscs_well_graded(true, 4.0, 3.0));
    cr_assert(!sg_classify_uscs_well_graded(true, 3.999, 2.0));
    cr_assert(!sg_classify_uscs_well_graded(true, 12.0, 0.999));
    cr_assert(!sg_classify_uscs_well_graded(true, 12.0, 3.001));
    cr_assert(sg_classify_uscs_well_graded(false, 6.0, 1.0));
    cr_assert(sg_classify_uscs_well_graded(false, 6.0, 3.0));
    cr_assert(!sg_classify_uscs_well_graded(false, 5.999, 2.0));
    cr_assert(!sg_classify_uscs_well_graded(false, 4.0, 1.5)); /* GW limits do not make a sand SW */
    cr_assert(!sg_classify_uscs_well_graded(false, 20.0, 0.99));
    cr_assert(!sg_classify_uscs_well_graded(true, NAN, 2.0));
    cr_assert(!sg_classify_uscs_well_graded(false, 8.0, NAN));
}

/* The limit comparisons count a value within 1e-9 (relative) of a limit
 * as on it, and nothing further off (common practice: the tolerance only
 * absorbs floating-point rounding). */
Test(grading, limits_with_rounding_tolerance)
{
    cr_assert(sg_classify_at_least(0.6 / 0.1, 6.0)); /* 5.999999999999999 */
    cr_assert(sg_classify_at_most(3.0000000000000004, 3.0));
    cr_assert(sg_classify_at_least(100.0 * 4.85 / 97.0, 5.0));
    cr_assert(!sg_classify_at_least(5.99999, 6.0));
    cr_assert(!sg_classify_at_most(3.00001, 3.0));
    cr_assert(sg_classify_at_least(0.0, 0.0) && sg_classify_at_most(0.0, 0.0));
    cr_assert(!sg_classify_at_least(NAN, 1.0) && !sg_classify_at_most(NAN, 1.0));
    cr_assert(!sg_classify_at_least(-INFINITY, 1.0) && !sg_classify_at_most(INFINITY, 1.0));
    cr_assert(sg_classify_uscs_well_graded(false, 0.6 / 0.1, 1.5));
    cr_assert(sg_classify_uscs_well_graded(true, 8.0 / 2.0 - 4e-16, 1.0 - 2e-16));
    cr_assert_str_eq(sg_classify_iso_grading(0.6 / 0.1, 0.8), "medium-graded");
}

Test(grading, iso_14688_2_limits)
{
    /* ISO 14688-2 (METHODS.md 7.3, 13.6 #56; limits from memory) */
    cr_assert_str_eq(sg_classify_iso_grading(20.0, 1.5), "multi-graded");
    cr_assert_str_eq(sg_classify_iso_grading(15.01, 2.99), "multi-graded");
    cr_assert_null(sg_classify_iso_grading(20.0, 3.0));   /* 1 < Cc < 3 strict, 2004 wording */
    cr_assert_null(sg_classify_iso_grading(20.0, 1.0));
    cr_assert_null(sg_classify_iso_grading(20.0, 0.8));
    cr_assert_str_eq(sg_classify_iso_grading(15.0, 0.8), "medium-graded"); /* 6-15 */
    cr_assert_str_eq(sg_classify_iso_grading(6.0, 0.8), "medium-graded");
    cr_assert_str_eq(sg_classify_iso_grading(5.99, 0.8), "even-graded");
    /* a single-sized soil, Cu = Cc = 1, is even-graded (read 16) */
    cr_assert_str_eq(sg_classify_iso_grading(1.0, 1.0), "even-graded");
    cr_assert_str_eq(sg_classify_iso_grading(40.0, 0.49), "gap-graded"); /* Cc < 0.5 */
    cr_assert_str_eq(sg_classify_iso_grading(8.0, 0.3), "gap-graded");
    cr_assert_str_eq(sg_classify_iso_grading(8.0, 0.5), "medium-graded");
    cr_assert_null(sg_classify_iso_grading(0.5, 1.0)); /* Cu < 1 is impossible */
    cr_assert_null(sg_classify_iso_grading(NAN, 1.0));
}

/* ---- summary on a straight semi-log line ---------------------------------- */

/* P = 50 + 25 log10(D / 0.1 mm): 0 % at 0.001 mm, 100 % at 10 mm; every
 * D-value and fraction is exact by hand (METHODS.md 7.2 formulas, derived). */
static double line_p(double d) { return 50.0 + 25.0 * log10(d / 0.1); }

static void line_curve(struct sg_result *res, enum sg_interp m, const struct sg_reduce_options *opt)
{
    /* deliberately unsorted */
    const double d[] = {0.2, 0.001, 10.0, 0.02, 2.0, 0.002};
    struct sg_curve_point p[6];
    for (int i = 0; i < 6; i++)
        p[i] = (struct sg_curve_point){d[i], line_p(d[i]), 0};
    summarise(res, p, 6, m, opt);
}

static const char *const spec_names[] = {
    "d10_mm",    "d15_mm",   "d30_mm",   "d50_mm",     "d60_mm",        "d85_mm",
    "cu",        "cc",       "clay_pct", "silt_pct",   "sand_pct",      "gravel_pct",
    "fines_pct", "usda_sand_pct", "usda_silt_pct", "usda_clay_pct", "usda_texture",
};

Test(summary, spec_order_first)
{
    /* SPEC "Outputs of reduce": the always-present quantities, in order */
    struct sg_result res;
    sg_result_init(&res);
    line_curve(&res, SG_INTERP_LOGLINEAR, NULL);
    cr_assert(res.n_quantities > 17);
    for (size_t i = 0; i < 17; i++)
        cr_assert_str_eq(res.quantities[i].name, spec_names[i], "position %zu", i);
    cr_assert_str_eq(res.quantities[0].unit, "mm");
    cr_assert_str_eq(res.quantities[8].unit, "%");
    cr_assert(res.quantities[16].is_text);
    /* names are unique */
    for (size_t i = 0; i < res.n_quantities; i++)
        for (size_t j = i + 1; j < res.n_quantities; j++)
            cr_assert(strcmp(res.quantities[i].name, res.quantities[j].name) != 0, "%s twice",
                      res.quantities[i].name);
    sg_result_release(&res);
}

Test(summary, semilog_line_hand_values)
{
    for (int m = 0; m < 2; m++) {
        struct sg_result res;
        sg_result_init(&res);
        line_curve(&res, m ? SG_INTERP_MONOTONE : SG_INTERP_LOGLINEAR, NULL);
        const double tol = m ? 1e-9 : 1e-12;
        /* D_p = 0.1 * 10^((p - 50)/25) mm: D10 = 0.1 * 10^-1.6 (derived) */
        cr_assert(rel(val(&res, "d10_mm"), 0.1 * pow(10.0, -1.6)) < tol);
        cr_assert(rel(val(&res, "d10_mm"), 0.00251188643150958) < tol); /* python3 */
        cr_assert(rel(val(&res, "d15_mm"), 0.1 * pow(10.0, -1.4)) < tol);
        cr_assert(rel(val(&res, "d30_mm"), 0.1 * pow(10.0, -0.8)) < tol);
        cr_assert(rel(val(&res, "d50_mm"), 0.1) < tol);
        cr_assert(rel(val(&res, "d60_mm"), 0.1 * pow(10.0, 0.4)) < tol);
        cr_assert(rel(val(&res, "d85_mm"), 0.1 * pow(10.0, 1.4)) < tol);
        /* Cu = D60/D10 = 10^2; Cc = D30^2/(D10 D60) = 10^-0.4 (METHODS.md 7.1) */
        cr_assert(rel(val(&res, "cu"), 100.0) < tol);
        cr_assert(rel(val(&res, "cc"), pow(10.0, -0.4)) < tol);
        cr_assert(rel(val(&res, "cc"), 0.398107170553497) < tol); /* python3 */
        /* ISO fractions (METHODS.md 8.1): 25 log10 of the size ratios */
        cr_assert_float_eq(val(&res, "clay_pct"), line_p(0.002), 1e-9);
        cr_assert_float_eq(val(&res, "clay_pct"), 7.52574989159953, 1e-9); /* 50 + 25 log10 0.02 */
        cr_assert_float_eq(val(&res, "silt_pct"), 25.0 * log10(0.063 / 0.002), 1e-9);
        cr_assert_float_eq(val(&res, "sand_pct"), 25.0 * log10(2.0 / 0.063), 1e-9);
        /* gravel: P(63) = 100 because the coarsest point (10 mm) is at 100 % */
        cr_assert_float_eq(val(&res, "gravel_pct"), 100.0 - line_p(2.0), 1e-9);
        cr_assert_float_eq(val(&res, "fines_pct"), line_p(0.075), 1e-9);
        cr_assert_float_eq(val(&res, "fines_pct"), 46.8765316, 1e-6); /* 50 + 25 log10 0.75 */
        /* USDA on the fraction finer than 2 mm (METHODS.md 8.4) */
        const double p2 = line_p(2.0), p005 = line_p(0.05), p0002 = line_p(0.002);
        cr_assert_float_eq(val(&res, "usda_sand_pct"), 100.0 * (p2 - p005) / p2, 1e-9);
        cr_assert_float_eq(val(&res, "usda_silt_pct"), 100.0 * (p005 - p0002) / p2, 1e-9);
        cr_assert_float_eq(val(&res, "usda_clay_pct"), 100.0 * p0002 / p2, 1e-9);
        cr_assert_float_eq(val(&res, "usda_sand_pct") + val(&res, "usda_silt_pct") + val(&res, "usda_clay_pct"),
                           100.0, 1e-9);
        /* 48.5 / 42.3 / 9.1: 7 <= cl < 27, 28 <= si < 50, sa <= 52 -> loam */
        cr_assert_str_eq(txt(&res, "usda_texture"), "loam");
        cr_assert(strstr(qty(&res, "usda_texture")->note, "rock fragments") != NULL);
        /* frost screen and passing sieves */
        cr_assert_float_eq(val(&res, "finer_0_02_mm_pct"), line_p(0.02), 1e-9);
        cr_assert_float_eq(val(&res, "passing_2_00_mm_pct"), line_p(2.0), 1e-9);
        cr_assert_float_eq(val(&res, "passing_0_425_mm_pct"), line_p(0.425), 1e-9);
        cr_assert_float_eq(val(&res, "passing_0_075_mm_pct"), line_p(0.075), 1e-9);
        /* 46.9 % fines: silty/clayey, grading not used (ASTM D2487) */
        cr_assert_str_eq(txt(&res, "uscs_grading"), "not applicable, fines over 12 %");
        undet(&res, "uscs_group", "SM, SC or SC-SM");
        /* Cc 0.40 < 0.5: gap-graded by the ISO 14688-2 limits */
        cr_assert_str_eq(txt(&res, "iso_grading"), "gap-graded");
        undet(&res, "junction_gap_pct", "no sieve points");
        sg_result_release(&res);
    }
}

/* ---- fraction boundaries of every system --------------------------------- */

/* Every boundary size is a node, so each fraction is exactly the difference
 * of two node percents; a wrong boundary shows as a wrong value. */
static const double node_d[] = {0.0015, 0.002, 0.0063, 0.02, 0.05, 0.063, 0.075, 0.1, 0.2, 0.25,  0.425, 0.5,
                                0.63,   1.0,   2.0,    4.75, 6.3,  19.0,  20.0,  63.0, 75.0, 200.0, 300.0, 400.0};
#define N_NODES (sizeof node_d / sizeof node_d[0])

static double node_p(double d)
{
    for (size_t i = 0; i < N_NODES; i++)
        if (d == node_d[i])
            return 1.3 + 98.7 * pow((double)i / (N_NODES - 1), 1.37);
    if (d == 0.0)
        return 0.0;
    cr_assert_fail("%g mm is not a node", d);
    return NAN;
}

struct frac {
    const char *name;
    double lower, upper; /* mm; lower 0: finer than upper */
    bool of_fine_earth;
};

Test(summary, fraction_boundaries)
{
    /* boundaries: ISO 14688-1 (METHODS.md 8.1, 13.6 #58), ASTM D2487 (8.2,
     * #60), AASHTO M 145 (8.3, #61), USDA (8.4, #63), frost 0.02 mm (9.3) */
    const struct frac f[] = {
        {"clay_pct", 0, 0.002, false},
        {"silt_pct", 0.002, 0.063, false},
        {"sand_pct", 0.063, 2.0, false},
        {"gravel_pct", 2.0, 63.0, false},
        {"fines_pct", 0, 0.075, false},
        {"usda_sand_pct", 0.05, 2.0, true},
        {"usda_silt_pct", 0.002, 0.05, true},
        {"usda_clay_pct", 0, 0.002, true},
        {"cobbles_pct", 63.0, 200.0, false},
        {"iso_fine_silt_pct", 0.002, 0.0063, false},
        {"iso_medium_silt_pct", 0.0063, 0.02, false},
        {"iso_coarse_silt_pct", 0.02, 0.063, false},
        {"iso_fine_sand_pct", 0.063, 0.2, false},
        {"iso_medium_sand_pct", 0.2, 0.63, false},
        {"iso_coarse_sand_pct", 0.63, 2.0, false},
        {"iso_fine_gravel_pct", 2.0, 6.3, false},
        {"iso_medium_gravel_pct", 6.3, 20.0, false},
        {"iso_coarse_gravel_pct", 20.0, 63.0, false},
        {"uscs_cobbles_pct", 75.0, 300.0, false},
        {"uscs_gravel_pct", 4.75, 75.0, false},
        {"uscs_coarse_gravel_pct", 19.0, 75.0, false},
        {"uscs_fine_gravel_pct", 4.75, 19.0, false},
        {"uscs_sand_pct", 0.075, 4.75, false},
        {"uscs_coarse_sand_pct", 2.0, 4.75, false},
        {"uscs_medium_sand_pct", 0.425, 2.0, false},
        {"uscs_fine_sand_pct", 0.075, 0.425, false},
        {"uscs_fines_pct", 0, 0.075, false},
        {"aashto_gravel_pct", 2.0, 75.0, false},
        {"aashto_coarse_sand_pct", 0.425, 2.0, false},
        {"aashto_fine_sand_pct", 0.075, 0.425, false},
        {"aashto_silt_pct", 0.002, 0.075, false},
        {"aashto_clay_pct", 0, 0.002, false},
        {"usda_very_coarse_sand_pct", 1.0, 2.0, true},
        {"usda_coarse_sand_pct", 0.5, 1.0, true},
        {"usda_medium_sand_pct", 0.25, 0.5, true},
        {"usda_fine_sand_pct", 0.1, 0.25, true},
        {"usda_very_fine_sand_pct", 0.05, 0.1, true},
        {"finer_0_02_mm_pct", 0, 0.02, false},
        {"passing_2_00_mm_pct", 0, 2.0, false},
        {"passing_0_425_mm_pct", 0, 0.425, false},
        {"passing_0_075_mm_pct", 0, 0.075, false},
    };
    struct sg_curve_point p[N_NODES];
    for (size_t i = 0; i < N_NODES; i++)
        p[N_NODES - 1 - i] = (struct sg_curve_point){node_d[i], node_p(node_d[i]), 0};
    for (int m = 0; m < 2; m++) {
        struct sg_result res;
        sg_result_init(&res);
        summarise(&res, p, N_NODES, m ? SG_INTERP_MONOTONE : SG_INTERP_LOGLINEAR, NULL);
        for (size_t i = 0; i < sizeof f / sizeof f[0]; i++) {
            double want = node_p(f[i].upper) - node_p(f[i].lower);
            if (f[i].of_fine_earth)
                want = 100.0 * want / node_p(2.0);
            cr_assert_float_eq(val(&res, f[i].name), want, 1e-9, "%s (method %d)", f[i].name, m);
            cr_assert_str_eq(qty(&res, f[i].name)->unit, "%");
        }
        /* the subfractions add up to their fractions */
        cr_assert_float_eq(val(&res, "iso_fine_silt_pct") + val(&res, "iso_medium_silt_pct") +
                               val(&res, "iso_coarse_silt_pct"),
                           val(&res, "silt_pct"), 1e-9);
        cr_assert_float_eq(val(&res, "uscs_coarse_sand_pct") + val(&res, "uscs_medium_sand_pct") +
                               val(&res, "uscs_fine_sand_pct"),
                           val(&res, "uscs_sand_pct"), 1e-9);
        cr_assert_float_eq(val(&res, "usda_very_coarse_sand_pct") + val(&res, "usda_coarse_sand_pct") +
                               val(&res, "usda_medium_sand_pct") + val(&res, "usda_fine_sand_pct") +
                               val(&res, "usda_very_fine_sand_pct"),
                           val(&res, "usda_sand_pct"), 1e-9);
        sg_result_release(&res);
    }
}

/* ---- not determined exactly when the curve does not reach ---------------- */

Test(summary, undetermined_when_not_reached)
{
    /* finest point 0.0031 mm at 23.4 %, coarsest 20 mm at 95 %: D10, D15,
     * clay, gravel not reached (METHODS.md 7.2: no extrapolation) */
    const struct sg_curve_point p[] = {{0.0031, 23.4, 2}, {0.012, 38.0, 2}, {0.063, 52.0, 0},
                                       {0.425, 70.0, 0},  {2.0, 81.0, 0},   {20.0, 95.0, 0}};
    struct sg_result res;
    sg_result_init(&res);
    summarise(&res, p, 6, SG_INTERP_LOGLINEAR, NULL);
    undet(&res, "d10_mm", "D10 not determined");
    undet(&res, "d10_mm", "below the finest point (23.4 % finer at 0.0031 mm)");
    undet(&res, "d15_mm", "D15 not determined");
    cr_assert(val(&res, "d30_mm") > 0.0031);
    val(&res, "d85_mm"); /* 85 % < 95 % is reached */
    undet(&res, "cu", "D10 not determined");
    undet(&res, "cc", "D10 not determined");
    undet(&res, "clay_pct", "0.002 mm is finer than the finest point 0.0031 mm");
    undet(&res, "silt_pct", "finer than the finest point");
    val(&res, "sand_pct");
    undet(&res, "gravel_pct", "63 mm is coarser than the coarsest point 20 mm");
    val(&res, "fines_pct");
    val(&res, "usda_sand_pct");
    undet(&res, "usda_silt_pct", "0.0031 mm");
    undet(&res, "usda_clay_pct", "0.0031 mm");
    undet(&res, "usda_texture", "0.0031 mm");
    undet(&res, "cobbles_pct", "coarser than the coarsest point");
    undet(&res, "uscs_gravel_pct", "75 mm");
    undet(&res, "uscs_grading", "75 mm");
    undet(&res, "uscs_group", "75 mm");
    undet(&res, "iso_grading", "Cu and Cc");
    val(&res, "iso_coarse_silt_pct");
    undet(&res, "iso_fine_silt_pct", NULL);
    sg_result_release(&res);

    /* the same curve reaching exactly 0.002 mm and 100 % at 63 mm: determined */
    const struct sg_curve_point q[] = {{0.002, 20.0, 2}, {0.012, 38.0, 2}, {0.063, 52.0, 0},
                                       {0.425, 70.0, 0}, {2.0, 81.0, 0},   {63.0, 100.0, 0}};
    sg_result_init(&res);
    summarise(&res, q, 6, SG_INTERP_LOGLINEAR, NULL);
    cr_assert_float_eq(val(&res, "clay_pct"), 20.0, 1e-12);
    cr_assert_float_eq(val(&res, "gravel_pct"), 19.0, 1e-12);
    undet(&res, "d15_mm", "below the finest point (20 % finer at 0.002 mm)");
    /* P(0.05) = 38 + 14 log10(0.05/0.012)/log10(0.063/0.012) = 50.05 (hand): sand 38.2, silt 37.1,
     * clay 24.7 % of the 81 % finer than 2 mm -> loam (METHODS.md 8.4) */
    cr_assert_str_eq(txt(&res, "usda_texture"), "loam");
    sg_result_release(&res);
}

/* The numbers the summary keeps for the later summaries (result.h) are
 * what looking up their rows, or reading the curve, gives: with and
 * without notes, on a curve that reaches everything and on one that
 * reaches neither D10 nor 0.002 mm nor 75 mm. */
Test(summary, kept_keys_equal_the_lookups)
{
    const struct sg_curve_point full[] = {{0.001, 4.0, 2},  {0.0031, 12.0, 2}, {0.012, 38.0, 2}, {0.063, 52.0, 0},
                                          {0.425, 70.0, 0}, {2.0, 81.0, 0},    {75.0, 100.0, 0}};
    const struct sg_curve_point part[] = {{0.0031, 23.4, 2}, {0.012, 38.0, 2}, {0.063, 52.0, 0},
                                          {0.425, 70.0, 0},  {2.0, 81.0, 0},   {20.0, 95.0, 0}};
    const struct {
        const struct sg_curve_point *p;
        size_t n;
    } curves[] = {{full, sizeof full / sizeof full[0]}, {part, sizeof part / sizeof part[0]}};
    for (size_t c = 0; c < 2; c++)
        for (int quiet = 0; quiet < 2; quiet++) {
            struct sg_reduce_options opt = sg_reduce_options_default();
            opt.values_only = quiet;
            struct sg_result res;
            sg_result_init(&res);
            summarise(&res, curves[c].p, curves[c].n, SG_INTERP_LOGLINEAR, &opt);
            cr_assert(res.has_keys);
            for (int k = 0; k < SG_N_KEYS; k++) {
                const double kept = sg_result_key(&res, (enum sg_key)k);
                res.has_keys = false;
                const double looked_up = sg_result_key(&res, (enum sg_key)k);
                res.has_keys = true;
                cr_assert(memcmp(&kept, &looked_up, sizeof kept) == 0 || (isnan(kept) && isnan(looked_up)),
                          "curve %zu, quiet %d, key %d: kept %g, looked up %g", c, quiet, k, kept, looked_up);
            }
            if (c == 1) /* D10, clay and P(75 mm) not reached */
                cr_assert(isnan(res.keys[SG_KEY_D10_MM]) && isnan(res.keys[SG_KEY_CLAY_PCT]) &&
                          isnan(res.keys[SG_KEY_P_75_MM_PCT]) && !isnan(res.keys[SG_KEY_FINER_0_02_MM_PCT]));
            else
                for (int k = 0; k < SG_N_KEYS; k++)
                    cr_assert(isfinite(res.keys[k]), "key %d not kept", k);
            sg_result_clear(&res);
            cr_assert(!res.has_keys);
            sg_result_release(&res);
        }
}

/* The six D-values, read together in one walk (sg_curve_diameters_at_sorted),
 * are what sg_curve_diameter_at gives one by one, with its message when
 * not determined: on curves that fall below a sieve point at the splice,
 * have a plateau at 30 % and 85 %, and do not reach 10 % or 15 %, with and
 * without notes, both interpolations. Invented curves. */
Test(summary, dx_rows_equal_the_single_reading)
{
    const struct sg_curve_point dip[] = {{0.002, 18.0, 2}, {0.01, 30.0, 2}, {0.05, 47.0, 2}, {0.063, 44.0, 0},
                                         {0.2, 60.0, 0},   {0.6, 85.0, 0},  {2.0, 85.0, 0},  {6.3, 97.0, 0},
                                         {20.0, 100.0, 0}};
    const struct sg_curve_point flat[] = {{0.001, 5.0, 2},  {0.004, 30.0, 2}, {0.02, 30.0, 2},
                                          {0.075, 61.0, 0}, {0.3, 55.0, 0},   {1.0, 85.0, 0},
                                          {4.75, 85.0, 0},  {10.0, 90.0, 0}};
    const struct {
        const struct sg_curve_point *p;
        size_t n;
    } curves[] = {{dip, sizeof dip / sizeof dip[0]}, {flat, sizeof flat / sizeof flat[0]}};
    static const char *const names[] = {"d10_mm", "d15_mm", "d30_mm", "d50_mm", "d60_mm", "d85_mm"};
    static const double pcts[] = {10.0, 15.0, 30.0, 50.0, 60.0, 85.0};
    for (size_t c = 0; c < 2; c++)
        for (int m = 0; m < 2; m++)
            for (int quiet = 0; quiet < 2; quiet++) {
                struct sg_reduce_options opt = sg_reduce_options_default();
                opt.values_only = quiet;
                struct sg_result res;
                sg_result_init(&res);
                summarise(&res, curves[c].p, curves[c].n, m ? SG_INTERP_MONOTONE : SG_INTERP_LOGLINEAR, &opt);
                for (size_t i = 0; i < 6; i++) {
                    struct sg_error e;
                    sg_error_clear(&e);
                    double want = NAN;
                    const enum sg_status st = sg_curve_diameter_at(&res.curve, pcts[i], &want, &e);
                    const struct sg_quantity *q = qty(&res, names[i]);
                    cr_assert_eq(q->determined, st == SG_OK, "curve %zu, method %d, quiet %d, %s", c, m, quiet,
                                 names[i]);
                    if (st == SG_OK)
                        cr_assert(memcmp(&q->value, &want, sizeof want) == 0, "curve %zu, %s: %.17g, single %.17g",
                                  c, names[i], q->value, want);
                    else if (!quiet)
                        cr_assert(strstr(q->note, e.msg) != NULL, "curve %zu, %s: note '%s' lacks '%s'", c,
                                  names[i], q->note, e.msg);
                }
                if (c == 0) /* D10 and D15 not reached, the rest read on the dip's rules */
                    cr_assert(!qty(&res, "d10_mm")->determined && !qty(&res, "d15_mm")->determined &&
                              qty(&res, "d30_mm")->determined && qty(&res, "d85_mm")->determined);
                sg_result_release(&res);
            }
}

Test(summary, empty_curve_all_undetermined)
{
    struct sg_result res;
    sg_result_init(&res); /* curve left empty, as sg_reduce leaves it with < 2 points */
    summarise(&res, NULL, 0, SG_INTERP_LOGLINEAR, NULL);
    for (size_t i = 0; i < 17; i++) {
        cr_assert_str_eq(res.quantities[i].name, spec_names[i]);
        /* Cu and Cc say which D-values are missing; the rest say there is no curve */
        undet(&res, spec_names[i], i == 6 || i == 7 ? "D10, D30, D60 not determined" : "no grading curve");
    }
    sg_result_release(&res);
}

Test(summary, extra_dx_names)
{
    const double extra[] = {5.0, 95.0, 2.5, 10.0, 150.0, NAN, 97.25};
    struct sg_reduce_options opt = sg_reduce_options_default();
    opt.extra_dx = extra;
    opt.n_extra_dx = sizeof extra / sizeof extra[0];
    struct sg_result res;
    sg_result_init(&res);
    line_curve(&res, SG_INTERP_LOGLINEAR, &opt);
    /* they follow the SPEC's 17, in the order given */
    cr_assert_str_eq(res.quantities[17].name, "d5_mm");
    cr_assert_str_eq(res.quantities[18].name, "d95_mm");
    cr_assert_str_eq(res.quantities[19].name, "d2_5_mm");
    cr_assert_str_eq(res.quantities[20].name, "d150_mm"); /* 10 already there, NAN skipped */
    cr_assert_str_eq(res.quantities[21].name, "d97_25_mm");
    cr_assert(rel(val(&res, "d5_mm"), 0.1 * pow(10.0, -1.8)) < 1e-12);
    cr_assert(rel(val(&res, "d95_mm"), 0.1 * pow(10.0, 1.8)) < 1e-12);
    cr_assert(rel(val(&res, "d2_5_mm"), 0.1 * pow(10.0, -1.9)) < 1e-12);
    cr_assert(rel(val(&res, "d97_25_mm"), 0.1 * pow(10.0, 1.89)) < 1e-12);
    undet(&res, "d150_mm", "not a percentage");
    size_t n10 = 0;
    for (size_t i = 0; i < res.n_quantities; i++)
        n10 += strcmp(res.quantities[i].name, "d10_mm") == 0;
    cr_assert_eq(n10, 1);
    sg_result_release(&res);
}

/* ---- USCS groups -------------------------------------------------------- */

static void uscs_case(const struct sg_curve_point *p, size_t n, struct sg_result *res)
{
    sg_result_init(res);
    summarise(res, p, n, SG_INTERP_LOGLINEAR, NULL);
}

Test(summary, uscs_clean_sand_sw)
{
    /* D10 0.1, D30 0.3, D60 0.8 mm at nodes: Cu 8 >= 6, Cc 0.09/0.08 = 1.125
     * in 1-3; fines 3 % < 5 %; sand 92 % > gravel 5 % -> SW (ASTM D2487,
     * METHODS.md 8.2) */
    const struct sg_curve_point p[] = {{0.075, 3.0, 0}, {0.1, 10.0, 0}, {0.3, 30.0, 0}, {0.8, 60.0, 0},
                                       {2.0, 85.0, 0},  {4.75, 95.0, 0}, {9.5, 100.0, 0}};
    struct sg_result res;
    uscs_case(p, 7, &res);
    cr_assert_float_eq(val(&res, "cu"), 8.0, 1e-12);
    cr_assert_float_eq(val(&res, "cc"), 1.125, 1e-12);
    cr_assert_str_eq(txt(&res, "uscs_grading"), "well graded");
    cr_assert_str_eq(txt(&res, "uscs_group"), "SW");
    cr_assert_str_eq(txt(&res, "iso_grading"), "medium-graded"); /* Cu 8 in 6-15 */
    sg_result_release(&res);
}

Test(summary, uscs_clean_gravel_gw_and_gp)
{
    /* D10 2, D30 5, D60 10 mm: Cu 5 >= 4, Cc 25/20 = 1.25; gravel 72 % (P(4.75) = 28 %)
     * > sand; fines 2 % -> GW */
    const struct sg_curve_point gw[] = {{0.075, 2.0, 0}, {2.0, 10.0, 0}, {5.0, 30.0, 0}, {10.0, 60.0, 0},
                                        {37.5, 100.0, 0}};
    struct sg_result res;
    uscs_case(gw, 5, &res);
    cr_assert_float_eq(val(&res, "cu"), 5.0, 1e-12);
    cr_assert_str_eq(txt(&res, "uscs_grading"), "well graded");
    cr_assert_str_eq(txt(&res, "uscs_group"), "GW");
    sg_result_release(&res);
    /* D10 4.75, D30 6, D60 8 mm: Cu 1.68 < 4 -> GP */
    const struct sg_curve_point gp[] = {{0.075, 2.0, 0}, {4.75, 10.0, 0}, {6.0, 30.0, 0}, {8.0, 60.0, 0},
                                        {19.0, 90.0, 0}, {37.5, 100.0, 0}};
    uscs_case(gp, 6, &res);
    cr_assert_str_eq(txt(&res, "uscs_grading"), "poorly graded");
    cr_assert_str_eq(txt(&res, "uscs_group"), "GP");
    cr_assert_float_eq(val(&res, "uscs_gravel_pct"), 90.0, 1e-12);
    cr_assert_str_eq(txt(&res, "iso_grading"), "even-graded");
    sg_result_release(&res);
}

Test(summary, uscs_dual_and_silty_and_fine_grained)
{
    /* fines 8 % (5-12 %): SP, so SP-SM or SP-SC needs plasticity */
    const struct sg_curve_point dual[] = {{0.075, 8.0, 0}, {0.15, 10.0, 0}, {0.25, 30.0, 0},
                                          {0.4, 60.0, 0},  {1.0, 95.0, 0},  {2.0, 100.0, 0}};
    struct sg_result res;
    uscs_case(dual, 6, &res);
    cr_assert_str_eq(txt(&res, "uscs_grading"), "poorly graded"); /* Cu 2.67 < 6 */
    undet(&res, "uscs_group", "SP-SM or SP-SC");
    undet(&res, "uscs_group", "Atterberg");
    sg_result_release(&res);
    /* fines 12 % exactly still takes the dual symbol (5-12 % inclusive) */
    const struct sg_curve_point twelve[] = {{0.01, 5.0, 2}, {0.075, 12.0, 0}, {0.25, 30.0, 0},
                                            {0.4, 60.0, 0}, {1.0, 95.0, 0},   {2.0, 100.0, 0}};
    uscs_case(twelve, 6, &res);
    undet(&res, "uscs_group", "SP-SM or SP-SC");
    sg_result_release(&res);
    /* fines 30 %: SM/SC, grading not applicable */
    const struct sg_curve_point silty[] = {{0.002, 8.0, 2}, {0.075, 30.0, 0}, {0.425, 70.0, 0},
                                           {4.75, 90.0, 0}, {19.0, 100.0, 0}};
    uscs_case(silty, 5, &res);
    cr_assert_str_eq(txt(&res, "uscs_grading"), "not applicable, fines over 12 %");
    undet(&res, "uscs_group", "SM, SC or SC-SM");
    sg_result_release(&res);
    /* 30 % fines but gravel (60 %) > sand (10 %): GM, GC or GC-GM */
    const struct sg_curve_point gm[] = {{0.002, 8.0, 2}, {0.075, 30.0, 0}, {4.75, 40.0, 0}, {37.5, 100.0, 0}};
    uscs_case(gm, 4, &res);
    undet(&res, "uscs_group", "GM, GC or GC-GM");
    sg_result_release(&res);
    /* fines 50 %: fine-grained (ASTM D2487: 50 % or more passes No. 200) */
    const struct sg_curve_point fine[] = {{0.002, 20.0, 2}, {0.075, 50.0, 0}, {2.0, 100.0, 0}};
    uscs_case(fine, 3, &res);
    cr_assert_str_eq(txt(&res, "uscs_grading"), "not applicable, fine-grained");
    undet(&res, "uscs_group", "ML, CL, MH, CH");
    sg_result_release(&res);
    /* D10 not reached with 4 % fines: grading and group need Cu and Cc */
    const struct sg_curve_point nod10[] = {{0.075, 4.0, 0}, {2.0, 100.0, 0}};
    uscs_case(nod10, 2, &res);
    val(&res, "d10_mm"); /* 4 % < 10 %: reached */
    sg_result_release(&res);
    /* fines 11 % at the finest point: D10 is not reached */
    const struct sg_curve_point nod10b[] = {{0.075, 11.0, 0}, {2.0, 100.0, 0}};
    uscs_case(nod10b, 2, &res);
    undet(&res, "uscs_grading", "Cu and Cc");
    undet(&res, "uscs_group", "Cu and Cc");
    sg_result_release(&res);
}

/* A curve whose D-values or fines sit exactly on a D2487 limit: the values
 * pass through log10 and back (Cu = 0.6 / 0.1 = 5.999999999999999, fines
 * 100 x 4.85 / 97 = 4.999999999999999) and must still count as on the
 * limit (ASTM D2487 Table 1: SW needs Cu >= 6 and 1 <= Cc <= 3, GW Cu >= 4;
 * dual symbols for 5-12 % fines; METHODS.md 7.3, 8.2, rules from memory). */
Test(summary, uscs_limits_met_exactly_through_the_curve)
{
    /* sand: D10 0.1, D30 0.3, D60 0.6 mm, 4 % fines: Cu 6, Cc 1.5 -> SW */
    const struct sg_curve_point sw[] = {{0.075, 4.0, 0}, {0.1, 10.0, 0}, {0.3, 30.0, 0}, {0.6, 60.0, 0},
                                        {4.75, 100.0, 0}};
    struct sg_result res;
    uscs_case(sw, 5, &res);
    cr_assert_float_eq(val(&res, "cu"), 6.0, 1e-12);
    cr_assert_str_eq(txt(&res, "uscs_grading"), "well graded");
    cr_assert_str_eq(txt(&res, "uscs_group"), "SW");
    cr_assert_str_eq(txt(&res, "iso_grading"), "medium-graded"); /* Cu 6: medium 6-15 */
    sg_result_release(&res);
    /* sand: D10 0.1, D30 0.3, D60 0.9 mm: Cu 9, Cc 0.09 / 0.09 = 1 -> SW */
    const struct sg_curve_point cc1[] = {{0.075, 4.0, 0}, {0.1, 10.0, 0}, {0.3, 30.0, 0}, {0.9, 60.0, 0},
                                         {4.75, 100.0, 0}};
    uscs_case(cc1, 5, &res);
    cr_assert_float_eq(val(&res, "cc"), 1.0, 1e-12);
    cr_assert_str_eq(txt(&res, "uscs_group"), "SW");
    sg_result_release(&res);
    /* gravel: D10 2, D30 4, D60 8 mm, 4.9 % fines: Cu 4, Cc 1 -> GW */
    const struct sg_curve_point gw[] = {{0.075, 4.9, 0}, {2.0, 10.0, 0}, {4.0, 30.0, 0}, {8.0, 60.0, 0},
                                        {37.5, 100.0, 0}};
    uscs_case(gw, 5, &res);
    cr_assert_float_eq(val(&res, "cu"), 4.0, 1e-12);
    cr_assert_str_eq(txt(&res, "uscs_group"), "GW");
    sg_result_release(&res);
    /* 3 % coarser than 75 mm and 4.85 % of the sample finer than 0.075 mm:
     * fines 5 % of the fraction finer than 75 mm -> a dual symbol, not SW */
    const struct sg_curve_point five[] = {{0.075, 4.85, 0}, {0.1, 10.0, 0}, {0.3, 30.0, 0}, {0.6, 60.0, 0},
                                          {4.75, 90.0, 0},  {75.0, 97.0, 0}, {150.0, 100.0, 0}};
    uscs_case(five, 7, &res);
    undet(&res, "uscs_group", "SW-SM or SW-SC");
    /* each fraction row names its basis: the whole sample (the D2487 rows
     * too; the group itself uses the fraction finer than 75 mm), or, for the
     * USDA separates, the fraction finer than 2 mm */
    cr_assert(strstr(qty(&res, "uscs_fines_pct")->note, "% of the whole sample") != NULL);
    cr_assert(strstr(qty(&res, "gravel_pct")->note, "% of the whole sample") != NULL);
    cr_assert(strstr(qty(&res, "usda_very_coarse_sand_pct")->note, "% of the fraction finer than 2 mm") != NULL);
    cr_assert(strstr(qty(&res, "usda_very_coarse_sand_pct")->note, "whole sample") == NULL);
    cr_assert(strstr(qty(&res, "uscs_grading")->note, "of the fraction finer than 75 mm") != NULL);
    sg_result_release(&res);
}

Test(summary, uscs_group_points_to_uscs_symbol_when_limits_are_given)
{
    /* uscs_group is only the grading's part of ASTM D2487; when the record
     * gives the liquid and plastic limits the whole group symbol is the
     * plasticity check's uscs_symbol, and the note says so (and does not
     * when they are missing) */
    const struct sg_curve_point fine[] = {{0.002, 20.0, 2}, {0.075, 60.0, 0}, {2.0, 100.0, 0}};
    struct sg_record rec;
    sg_record_init(&rec);
    struct sg_result res;
    struct sg_error e;
    sg_error_clear(&e);
    for (int given = 0; given < 2; given++) {
        rec.has_liquid_limit = rec.has_plastic_limit = given;
        rec.liquid_limit_pct = 42.0;
        rec.plastic_limit_pct = 21.0;
        sg_result_init(&res);
        cr_assert_eq(sg_curve_build(&res.curve, fine, 3, SG_INTERP_LOGLINEAR, &e), SG_OK, "%s", e.msg);
        cr_assert_eq(sg_classify_summarise(&res.curve, &rec, NULL, &res, &e), SG_OK, "%s", e.msg);
        undet(&res, "uscs_group", "ML, CL, MH, CH");
        const bool points = strstr(qty(&res, "uscs_group")->note, "uscs_symbol") != NULL;
        cr_assert_eq(points, given == 1, "limits %s: note '%s'", given ? "given" : "missing",
                     qty(&res, "uscs_group")->note);
        sg_result_release(&res);
    }
    sg_record_release(&rec);
}

Test(summary, uscs_on_the_fraction_finer_than_75_mm)
{
    /* 20 % cobbles: fines 4 % of the sample is 5 % of the minus-75 mm
     * fraction -> dual symbol, not clean (ASTM D2487 classifies the
     * fraction passing 75 mm) */
    const struct sg_curve_point p[] = {{0.075, 4.0, 0}, {0.15, 10.0, 0}, {0.25, 30.0, 0},
                                       {0.4, 60.0, 0},  {2.0, 80.0, 0},  {75.0, 80.0, 0}, {150.0, 100.0, 0}};
    struct sg_result res;
    uscs_case(p, 7, &res);
    cr_assert_float_eq(val(&res, "uscs_fines_pct"), 4.0, 1e-12);
    cr_assert_float_eq(val(&res, "uscs_cobbles_pct"), 20.0, 1e-12);
    undet(&res, "uscs_group", "SP-SM or SP-SC");
    sg_result_release(&res);
}

Test(summary, negative_fraction_is_reported)
{
    /* non-monotone data: the curve rises with falling size between 0.02
     * and 0.063 mm; the fraction is negative and the note says why */
    const struct sg_curve_point p[] = {{0.002, 10.0, 2}, {0.02, 45.0, 2}, {0.063, 40.0, 0}, {2.0, 100.0, 0}};
    struct sg_result res;
    sg_result_init(&res);
    summarise(&res, p, 4, SG_INTERP_LOGLINEAR, NULL);
    cr_assert_float_eq(val(&res, "iso_coarse_silt_pct"), -5.0, 1e-12);
    cr_assert(strstr(qty(&res, "iso_coarse_silt_pct")->note, "negative") != NULL);
    sg_result_release(&res);
}

/* ---- junction gap ------------------------------------------------------- */

static void add_pt(struct sg_result *res, enum sg_source src, double d, double p, bool on_curve)
{
    struct sg_point pt = sg_point_blank(src, (unsigned)(res->n_points + 10));
    pt.diameter_mm = d;
    pt.percent_finer = p;
    pt.on_curve = on_curve;
    cr_assert_eq(sg_result_add_point(res, &pt), SG_OK);
}

static void curve_from_points(struct sg_result *res)
{
    struct sg_curve_point cp[32];
    size_t n = 0;
    for (size_t i = 0; i < res->n_points && n < 32; i++)
        if (res->points[i].on_curve)
            cp[n++] = (struct sg_curve_point){res->points[i].diameter_mm, res->points[i].percent_finer,
                                              res->points[i].source == SG_SOURCE_SIEVE ? 0 : 2};
    summarise(res, cp, n, SG_INTERP_LOGLINEAR, NULL);
}

Test(junction, straddling_points_interpolate)
{
    /* finest sieve 0.063 mm passing 40 %; sedimentation at 0.08 mm (off the
     * curve) 45 % and 0.05 mm 36 %: 36 + 9 log10(0.063/0.05)/log10(0.08/0.05)
     * = 40.4255 % (hand), gap 40 - 40.4255 = -0.4255 points */
    struct sg_result res;
    sg_result_init(&res);
    add_pt(&res, SG_SOURCE_SIEVE, 2.0, 82.0, true);
    add_pt(&res, SG_SOURCE_SIEVE, 0.063, 40.0, true);
    add_pt(&res, SG_SOURCE_SIEVE, 0.425, 61.0, true);
    add_pt(&res, SG_SOURCE_HYDROMETER, 0.08, 45.0, false);
    add_pt(&res, SG_SOURCE_HYDROMETER, 0.05, 36.0, true);
    add_pt(&res, SG_SOURCE_HYDROMETER, 0.03, 30.0, true);
    add_pt(&res, SG_SOURCE_HYDROMETER, 0.01, 20.0, true);
    curve_from_points(&res);
    const double want = 40.0 - (36.0 + 9.0 * log10(0.063 / 0.05) / log10(0.08 / 0.05));
    cr_assert_float_eq(val(&res, "junction_gap_pct"), want, 1e-12);
    cr_assert_float_eq(val(&res, "junction_gap_pct"), -0.4255, 1e-4);
    cr_assert(strstr(qty(&res, "junction_gap_pct")->note, "interpolated") != NULL);
    sg_result_release(&res);
}

Test(junction, extrapolated_from_two_coarsest)
{
    /* no sedimentation point at or above 0.063 mm: from 0.05 (36 %) and 0.03
     * (30 %): 36 + 6 log10(0.063/0.05)/log10(0.05/0.03) = 38.7146 % (hand) */
    struct sg_result res;
    sg_result_init(&res);
    add_pt(&res, SG_SOURCE_SIEVE, 2.0, 82.0, true);
    add_pt(&res, SG_SOURCE_FINE_SIEVE, 0.063, 41.0, true); /* the sieve set's value wins (D6913) */
    add_pt(&res, SG_SOURCE_SIEVE, 0.063, 40.0, true);
    add_pt(&res, SG_SOURCE_PIPETTE, 0.01, 20.0, true);
    add_pt(&res, SG_SOURCE_PIPETTE, 0.05, 36.0, true);
    add_pt(&res, SG_SOURCE_PIPETTE, 0.03, 30.0, true);
    curve_from_points(&res);
    const double want = 40.0 - (36.0 + 6.0 * log10(0.063 / 0.05) / log10(0.05 / 0.03));
    cr_assert_float_eq(val(&res, "junction_gap_pct"), want, 1e-12);
    cr_assert_float_eq(val(&res, "junction_gap_pct"), 1.2854, 1e-4);
    const char *note = qty(&res, "junction_gap_pct")->note;
    cr_assert(strstr(note, "extrapolated") != NULL && strstr(note, "QC") != NULL, "%s", note);
    sg_result_release(&res);
}

Test(junction, undetermined_cases)
{
    struct sg_result res;
    sg_result_init(&res);
    add_pt(&res, SG_SOURCE_SIEVE, 2.0, 82.0, true);
    add_pt(&res, SG_SOURCE_SIEVE, 0.063, 40.0, true);
    curve_from_points(&res);
    undet(&res, "junction_gap_pct", "no sedimentation points");
    sg_result_release(&res);

    sg_result_init(&res);
    add_pt(&res, SG_SOURCE_HYDROMETER, 0.05, 36.0, true);
    add_pt(&res, SG_SOURCE_HYDROMETER, 0.01, 20.0, true);
    curve_from_points(&res);
    undet(&res, "junction_gap_pct", "no sieve points");
    sg_result_release(&res);

    sg_result_init(&res);
    add_pt(&res, SG_SOURCE_SIEVE, 2.0, 82.0, true);
    add_pt(&res, SG_SOURCE_SIEVE, 0.063, 40.0, true);
    add_pt(&res, SG_SOURCE_HYDROMETER, 0.03, 30.0, true);
    curve_from_points(&res);
    undet(&res, "junction_gap_pct", "one size only");
    sg_result_release(&res);
}

/* ---- acceptance: independent semi-log calculation -------------------------- */

/* A plain semi-log implementation written independently of src/curve.c:
 * power form D = D1 (D2/D1)^f and natural logs, points sorted by insertion. */
struct ref_curve {
    size_t n;
    double d[64], p[64];
};

static void ref_build(struct ref_curve *r, const struct sg_curve_point *pts, size_t n)
{
    r->n = 0;
    for (size_t i = 0; i < n; i++) {
        size_t j = r->n++;
        while (j > 0 && r->d[j - 1] > pts[i].diameter_mm) {
            r->d[j] = r->d[j - 1];
            r->p[j] = r->p[j - 1];
            j--;
        }
        r->d[j] = pts[i].diameter_mm;
        r->p[j] = pts[i].percent_finer;
    }
}

static bool ref_p(const struct ref_curve *r, double d, double *p)
{
    if (d > r->d[r->n - 1]) {
        *p = 100.0;
        return r->p[r->n - 1] == 100.0;
    }
    if (d < r->d[0]) {
        *p = 0.0;
        return r->p[0] == 0.0;
    }
    for (size_t i = 0; i + 1 < r->n; i++)
        if (r->d[i] <= d && d <= r->d[i + 1]) {
            *p = r->p[i] + (r->p[i + 1] - r->p[i]) * log(d / r->d[i]) / log(r->d[i + 1] / r->d[i]);
            return true;
        }
    return false;
}

static bool ref_d(const struct ref_curve *r, double x, double *d)
{
    for (size_t i = r->n - 1; i > 0; i--)
        if (r->p[i - 1] < x && x <= r->p[i]) {
            *d = r->d[i - 1] * pow(r->d[i] / r->d[i - 1], (x - r->p[i - 1]) / (r->p[i] - r->p[i - 1]));
            return true;
        }
    if (x == r->p[0]) {
        *d = r->d[0];
        return true;
    }
    return false;
}

static void compare_with_reference(const struct sg_curve_point *pts, size_t n, const char *what)
{
    struct ref_curve r;
    ref_build(&r, pts, n);
    const double extra[] = {5.0, 20.0, 40.0, 70.0, 90.0, 95.0};
    struct sg_reduce_options opt = sg_reduce_options_default();
    opt.extra_dx = extra;
    opt.n_extra_dx = 6;
    struct sg_result res;
    sg_result_init(&res);
    summarise(&res, pts, n, SG_INTERP_LOGLINEAR, &opt);
    const double dx[] = {10, 15, 30, 50, 60, 85, 5, 20, 40, 70, 90, 95};
    for (size_t i = 0; i < sizeof dx / sizeof dx[0]; i++) {
        char name[40];
        snprintf(name, sizeof name, "d%g_mm", dx[i]);
        double want = 0;
        const bool ok = ref_d(&r, dx[i], &want);
        const struct sg_quantity *q = qty(&res, name);
        cr_assert_eq(q->determined, ok, "%s %s: determined %d, reference %d (%s)", what, name, q->determined, ok,
                     q->note);
        if (ok) /* acceptance: D-values within 0.5 % */
            cr_assert(rel(q->value, want) < 0.005, "%s %s: %.9g vs reference %.9g", what, name, q->value, want);
    }
    const struct frac f[] = {
        {"clay_pct", 0, 0.002, false},          {"silt_pct", 0.002, 0.063, false},
        {"sand_pct", 0.063, 2.0, false},        {"gravel_pct", 2.0, 63.0, false},
        {"fines_pct", 0, 0.075, false},         {"usda_sand_pct", 0.05, 2.0, true},
        {"usda_silt_pct", 0.002, 0.05, true},   {"usda_clay_pct", 0, 0.002, true},
        {"iso_medium_silt_pct", 0.0063, 0.02, false}, {"uscs_fine_sand_pct", 0.075, 0.425, false},
        {"aashto_silt_pct", 0.002, 0.075, false}, {"finer_0_02_mm_pct", 0, 0.02, false},
    };
    for (size_t i = 0; i < sizeof f / sizeof f[0]; i++) {
        double hi = 0, lo = 0, p2 = 0;
        bool ok = ref_p(&r, f[i].upper, &hi);
        if (f[i].lower > 0)
            ok = ref_p(&r, f[i].lower, &lo) && ok;
        if (f[i].of_fine_earth)
            ok = ref_p(&r, 2.0, &p2) && ok && p2 > 0;
        const struct sg_quantity *q = qty(&res, f[i].name);
        cr_assert_eq(q->determined, ok, "%s %s: determined %d, reference %d (%s)", what, f[i].name, q->determined,
                     ok, q->note);
        if (!ok)
            continue;
        const double want = f[i].of_fine_earth ? 100.0 * (hi - lo) / p2 : hi - lo;
        /* acceptance: fractions within 0.1 percentage point */
        cr_assert(fabs(q->value - want) < 0.1, "%s %s: %.9g vs reference %.9g", what, f[i].name, q->value, want);
    }
    sg_result_release(&res);
}

Test(acceptance, methods_v2_vectors_python_frozen)
{
    /* METHODS.md 13.10 V2-B (BS-style hydrometer) and V2-A (D422 152H)
     * diameter / percent-finer columns as a curve; expected values by a
     * separate python3 semi-log calculation (log10 interpolation, scan from
     * the coarse end), frozen here */
    const struct sg_curve_point v2b[] = {{0.05882, 86.73, 2}, {0.04227, 81.91, 2}, {0.03052, 75.48, 2},
                                         {0.02212, 67.45, 2}, {0.01602, 59.42, 2}, {0.00861, 44.97, 2},
                                         {0.00447, 30.52, 2}, {0.00229, 19.27, 2}, {0.00134, 12.85, 2}};
    struct sg_result res;
    sg_result_init(&res);
    summarise(&res, v2b, 9, SG_INTERP_LOGLINEAR, NULL);
    undet(&res, "d10_mm", "below the finest point");
    cr_assert(rel(val(&res, "d15_mm"), 0.001603408575037337) < 1e-9);
    cr_assert(rel(val(&res, "d30_mm"), 0.004333923687465559) < 1e-9);
    cr_assert(rel(val(&res, "d50_mm"), 0.01068736729169797) < 1e-9);
    cr_assert(rel(val(&res, "d60_mm"), 0.016397719290292708) < 1e-9);
    cr_assert(rel(val(&res, "d85_mm"), 0.052242316700643165) < 1e-9);
    cr_assert_float_eq(val(&res, "clay_pct"), 17.647819297348235, 1e-9);
    cr_assert_float_eq(val(&res, "finer_0_02_mm_pct"), 64.94252695663619, 1e-9);
    cr_assert_float_eq(val(&res, "iso_fine_silt_pct"), 38.0843143628261 - 17.647819297348235, 1e-9);
    cr_assert_float_eq(val(&res, "iso_medium_silt_pct"), 64.94252695663619 - 38.0843143628261, 1e-9);
    undet(&res, "silt_pct", "coarser than the coarsest point 0.05882 mm");
    sg_result_release(&res);

    const struct sg_curve_point v2a[] = {{0.02743, 79.11, 2}, {0.01799, 71.20, 2}, {0.01083, 61.31, 2},
                                         {0.00790, 53.40, 2}, {0.00575, 45.49, 2}, {0.00293, 33.62, 2},
                                         {0.00128, 19.78, 2}};
    sg_result_init(&res);
    summarise(&res, v2a, 7, SG_INTERP_MONOTONE, NULL);
    /* Steffen, dense enough: within 0.5 % of the semi-log values */
    cr_assert(rel(val(&res, "d30_mm"), 0.0023593659951228352) < 0.005, "%g", val(&res, "d30_mm"));
    cr_assert(rel(val(&res, "d50_mm"), 0.006891714672688079) < 0.005, "%g", val(&res, "d50_mm"));
    cr_assert(rel(val(&res, "d60_mm"), 0.010278724580368544) < 0.005, "%g", val(&res, "d60_mm"));
    undet(&res, "d85_mm", "above the coarsest point");
    sg_result_release(&res);

    compare_with_reference(v2b, 9, "V2-B");
    compare_with_reference(v2a, 7, "V2-A");
}

Test(acceptance, random_curves_against_reference)
{
    /* 500 random monotone curves (3-40 points, 0.0005-150 mm, coarsest at
     * 100 % half of the time, finest at 0 % sometimes), given in random
     * order; every D-value within 0.5 % and every fraction within 0.1 point of
     * the independent calculation, and determined exactly when it is */
    gsl_rng *rng = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(rng, 20240611);
    for (int k = 0; k < 500; k++) {
        const size_t n = 3 + gsl_rng_uniform_int(rng, 38);
        double d[64], p[64];
        for (size_t i = 0; i < n; i++) {
            d[i] = 0.0005 * pow(10.0, gsl_rng_uniform(rng) * log10(150.0 / 0.0005));
            p[i] = 100.0 * gsl_rng_uniform(rng);
        }
        /* sort both arrays independently: a monotone curve */
        for (size_t i = 1; i < n; i++)
            for (size_t j = i; j > 0 && d[j - 1] > d[j]; j--) {
                double t = d[j]; d[j] = d[j - 1]; d[j - 1] = t;
            }
        for (size_t i = 1; i < n; i++)
            for (size_t j = i; j > 0 && p[j - 1] > p[j]; j--) {
                double t = p[j]; p[j] = p[j - 1]; p[j - 1] = t;
            }
        bool distinct = true;
        for (size_t i = 1; i < n; i++)
            distinct = distinct && d[i] > d[i - 1] * (1 + 1e-9);
        if (!distinct)
            continue;
        if (gsl_rng_uniform(rng) < 0.5)
            p[n - 1] = 100.0;
        if (gsl_rng_uniform(rng) < 0.2)
            p[0] = 0.0;
        struct sg_curve_point pts[64];
        for (size_t i = 0; i < n; i++)
            pts[i] = (struct sg_curve_point){d[i], p[i], i % 3 == 0 ? 0 : 2};
        gsl_ran_shuffle(rng, pts, n, sizeof pts[0]);
        char what[40];
        snprintf(what, sizeof what, "curve %d", k);
        compare_with_reference(pts, n, what);
    }
    gsl_rng_free(rng);
}
