/* test_plasticity.c - plasticity and liquidity indices, Casagrande chart,
 * ASTM D2487 symbols, BS 5930 terms, Skempton activity and the consistency
 * flags. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "sedgrade/curve.h"
#include "sedgrade/plasticity.h"
#include "sedgrade/record.h"
#include "sedgrade/reduce.h"
#include "sedgrade/result.h"

static void setup(void) { gsl_set_error_handler_off(); }

TestSuite(chart, .init = setup);
TestSuite(uscs, .init = setup);
TestSuite(terms, .init = setup);
TestSuite(summary, .init = setup);

/* ---- chart ------------------------------------------------------------- */

Test(chart, line_equations)
{
    /* A-line 0.73 (LL - 20), U-line 0.9 (LL - 8): ASTM D2487 Fig. 4 (from
     * memory; METHODS.md 8.2); values derived from the equations. */
    cr_assert_float_eq(sg_plasticity_a_line_pi(50.0), 21.9, 1e-12);
    cr_assert_float_eq(sg_plasticity_a_line_pi(41.0), 15.33, 1e-12);
    cr_assert_float_eq(sg_plasticity_u_line_pi(50.0), 37.8, 1e-12);
    cr_assert_float_eq(sg_plasticity_u_line_pi(16.0), 7.2, 1e-12);
}

Test(chart, zones)
{
    /* Positions derived from the line equations above. */
    static const struct {
        double ll, pi;
        enum sg_chart_zone z;
    } c[] = {
        {40.0, 20.0, SG_CHART_ABOVE_A},   /* A 14.6, U 28.8 */
        {40.0, 10.0, SG_CHART_BELOW_A},   /* below A 14.6 */
        {22.0, 5.0, SG_CHART_CL_ML},      /* A horizontal at 4 below LL 25.5 */
        {22.0, 3.5, SG_CHART_BELOW_A},    /* PI < 4 */
        {30.0, 7.0, SG_CHART_BELOW_A},    /* A 7.3 > 7: below, so ML */
        {25.0, 7.0, SG_CHART_CL_ML},      /* A 3.65, read as 4 */
        {30.0, 30.0, SG_CHART_ABOVE_U},   /* U 19.8 */
        {14.0, 3.0, SG_CHART_ABOVE_U},    /* left of the vertical U at LL 16 */
        {50.0, 21.9, SG_CHART_ABOVE_A},   /* on the A-line counts as above */
        {50.0, 37.8, SG_CHART_ABOVE_A},   /* on the U-line is not beyond it */
        {80.0, 30.0, SG_CHART_BELOW_A},   /* A 43.8 */
        {35.0, 0.0, SG_CHART_NON_PLASTIC},
    };
    for (size_t i = 0; i < sizeof c / sizeof c[0]; i++)
        cr_assert_eq(sg_plasticity_chart_zone(c[i].ll, c[i].pi), c[i].z, "LL %g PI %g: got %s", c[i].ll, c[i].pi,
                     sg_plasticity_zone_name(sg_plasticity_chart_zone(c[i].ll, c[i].pi)));
}

/* ---- ASTM D2487 symbols ------------------------------------------------ */

Test(uscs, fine_grained_symbols)
{
    /* ASTM D2487 fine-grained rules (from memory; METHODS.md 8.2). */
    static const struct {
        double ll, pi;
        const char *sym;
    } c[] = {
        {41.0, 20.0, "CL"},    /* PI > 7, A 15.33 */
        {45.0, 10.0, "ML"},    /* below A 18.25 */
        {22.0, 5.0, "CL-ML"},  /* 4 <= PI <= 7 on or above A */
        {25.0, 3.0, "ML"},     /* PI < 4 */
        {60.0, 35.0, "CH"},    /* A 29.2 */
        {60.0, 20.0, "MH"},    /* below A 29.2 */
        {50.0, 21.9, "CH"},    /* on the A-line at LL 50: CH */
        {49.9, 21.9, "CL"},    /* LL < 50 */
        {35.0, 0.0, "ML"},     /* non-plastic */
    };
    for (size_t i = 0; i < sizeof c / sizeof c[0]; i++) {
        const char *s = sg_plasticity_uscs_fine(c[i].ll, c[i].pi);
        cr_assert_not_null(s);
        cr_assert_str_eq(s, c[i].sym, "LL %g PI %g", c[i].ll, c[i].pi);
    }
    cr_assert_null(sg_plasticity_uscs_fine(NAN, 10.0));
}

Test(uscs, group_symbol_table)
{
    /* ASTM D2487 coarse-grained table (METHODS.md 8.2; dual-symbol fines kind
     * from memory: CL-ML fines give C for 5-12 % fines, C-M over 12 %). */
    static const struct {
        double gravel, sand, fines, cu, cc, ll, pi;
        const char *sym;
    } c[] = {
        {60, 37, 3, 8.0, 1.5, NAN, NAN, "GW"},
        {60, 37, 3, 3.0, 1.5, NAN, NAN, "GP"},
        {60, 37, 3, 8.0, 0.8, NAN, NAN, "GP"},  /* Cc < 1 */
        {37, 60, 3, 7.0, 2.0, NAN, NAN, "SW"},
        {37, 60, 3, 5.0, 2.0, NAN, NAN, "SP"},  /* Cu < 6 for sand */
        {47.5, 47.5, 5, 7.0, 2.0, 30, 2, "SW-SM"}, /* gravel = sand -> sand; 5 % is dual */
        {62, 30, 8, 8.0, 1.5, 22, 5, "GW-GC"},  /* CL-ML fines */
        {62, 30, 8, 8.0, 1.5, 30, 2, "GW-GM"},
        {62, 30, 8, 2.0, 1.5, 45, 10, "GP-GM"}, /* below A */
        {30, 62, 8, 2.0, 1.5, 41, 20, "SP-SC"},
        {30, 58, 12, 9.0, 1.2, 60, 35, "SW-SC"}, /* 12 % still dual */
        {30, 50, 20, NAN, NAN, 41, 20, "SC"},   /* grading not needed over 12 % */
        {30, 50, 20, NAN, NAN, 45, 10, "SM"},
        {30, 50, 20, NAN, NAN, 22, 5, "SC-SM"},
        {55, 25, 20, NAN, NAN, 60, 35, "GC"},
        {55, 25, 20, NAN, NAN, 60, 20, "GM"},
        {55, 25, 20, NAN, NAN, 22, 5, "GC-GM"},
        {10, 30, 60, NAN, NAN, 41, 20, "CL"},   /* fine-grained */
        {0, 50, 50, NAN, NAN, 60, 20, "MH"},    /* 50 % is fine-grained */
    };
    for (size_t i = 0; i < sizeof c / sizeof c[0]; i++) {
        const struct sg_uscs_input in = {c[i].gravel, c[i].sand, c[i].fines, c[i].cu, c[i].cc, c[i].ll, c[i].pi};
        const char *why = NULL;
        const char *s = sg_plasticity_uscs_symbol(&in, &why);
        cr_assert_not_null(s, "case %zu: %s", i, why);
        cr_assert_str_eq(s, c[i].sym, "case %zu", i);
    }
}

Test(uscs, missing_inputs)
{
    const char *why = NULL;
    struct sg_uscs_input in = {30, 50, 20, NAN, NAN, NAN, NAN};
    cr_assert_null(sg_plasticity_uscs_symbol(&in, &why));
    cr_assert(strstr(why, "liquid and plastic limits") != NULL, "%s", why);
    in = (struct sg_uscs_input){60, 37, 3, NAN, 1.5, NAN, NAN};
    cr_assert_null(sg_plasticity_uscs_symbol(&in, &why));
    cr_assert(strstr(why, "Cu and Cc") != NULL, "%s", why);
    in = (struct sg_uscs_input){60, 37, NAN, 8, 1.5, NAN, NAN};
    cr_assert_null(sg_plasticity_uscs_symbol(&in, &why));
    cr_assert(strstr(why, "fines") != NULL, "%s", why);
    in = (struct sg_uscs_input){NAN, NAN, 20, NAN, NAN, 41, 20};
    cr_assert_null(sg_plasticity_uscs_symbol(&in, NULL));
}

/* ---- BS 5930 and activity ---------------------------------------------- */

Test(terms, bs5930_plasticity)
{
    /* BS 5930 terms by liquid limit (from memory): L < 35 <= I < 50 <= H < 70
     * <= V < 90 <= E. */
    static const struct {
        double ll;
        const char *term;
        char letter;
    } c[] = {{20, "low", 'L'},         {34.9, "low", 'L'},      {35, "intermediate", 'I'},
             {49.9, "intermediate", 'I'}, {50, "high", 'H'},   {70, "very high", 'V'},
             {89.9, "very high", 'V'},  {90, "extremely high", 'E'}, {140, "extremely high", 'E'}};
    for (size_t i = 0; i < sizeof c / sizeof c[0]; i++) {
        char l = '\0';
        const char *t = sg_plasticity_bs5930_term(c[i].ll, &l);
        cr_assert_not_null(t);
        cr_assert_str_eq(t, c[i].term, "LL %g", c[i].ll);
        cr_assert_eq(l, c[i].letter, "LL %g", c[i].ll);
    }
    cr_assert_null(sg_plasticity_bs5930_term(NAN, NULL));
    cr_assert_null(sg_plasticity_bs5930_term(-1.0, NULL));
}

Test(terms, activity_classes)
{
    /* METHODS.md 13.7 #68 (read 29, read 31): A(PI 25, CF 40) = 0.625
     * inactive; A(60, 50) = 1.20 normal; A(30, 20) = 1.50 active; A(12, 30)
     * = 0.40 inactive; classes at 0.75 / 1.25. */
    cr_assert_str_eq(sg_plasticity_activity_class(25.0 / 40.0), "inactive");
    cr_assert_str_eq(sg_plasticity_activity_class(60.0 / 50.0), "normal");
    cr_assert_str_eq(sg_plasticity_activity_class(30.0 / 20.0), "active");
    cr_assert_str_eq(sg_plasticity_activity_class(12.0 / 30.0), "inactive");
    cr_assert_str_eq(sg_plasticity_activity_class(0.75), "normal");
    cr_assert_str_eq(sg_plasticity_activity_class(1.25), "normal");
    cr_assert_str_eq(sg_plasticity_activity_class(0.7499), "inactive");
    cr_assert_str_eq(sg_plasticity_activity_class(1.2501), "active");
    cr_assert_null(sg_plasticity_activity_class(NAN));
}

/* ---- summary ----------------------------------------------------------- */

static void limits(struct sg_record *rec, double ll, double pl, double w)
{
    sg_record_init(rec);
    if (isfinite(ll)) {
        rec->has_liquid_limit = true;
        rec->liquid_limit_pct = ll;
    }
    if (isfinite(pl)) {
        rec->has_plastic_limit = true;
        rec->plastic_limit_pct = pl;
    }
    if (isfinite(w)) {
        rec->has_natural_moisture = true;
        rec->natural_moisture_pct = w;
    }
}

/* Summarises with a result holding only clay_pct (NaN: not determined). */
static void run(struct sg_result *res, const struct sg_record *rec, double clay_pct, bool values_only)
{
    struct sg_error e;
    sg_result_init(res);
    if (isfinite(clay_pct))
        cr_assert_eq(sg_result_add_value(res, "clay_pct", "%", clay_pct, ""), SG_OK);
    else
        cr_assert_eq(sg_result_add_undetermined(res, "clay_pct", "%", "not reached"), SG_OK);
    struct sg_reduce_options o = sg_reduce_options_default();
    o.values_only = values_only;
    cr_assert_eq(sg_plasticity_summarise(rec, &o, res, &e), SG_OK, "%s", e.msg);
}

static const struct sg_quantity *qty(const struct sg_result *res, const char *name)
{
    const struct sg_quantity *q = sg_result_quantity(res, name);
    cr_assert_not_null(q, "%s missing", name);
    return q;
}

static bool has_flag(const struct sg_result *res, const char *name)
{
    for (size_t i = 0; i < res->n_flags; i++)
        if (strcmp(res->flags[i].name, name) == 0)
            return true;
    return false;
}

Test(summary, indices_activity_and_class)
{
    /* METHODS.md 13.7 #68: PI 25 with CF 40 -> A 0.625, inactive. LL 45,
     * PL 20, w 30: LI = (30 - 20) / 25 = 0.4 (derived). */
    struct sg_record rec;
    struct sg_result res;
    limits(&rec, 45.0, 20.0, 30.0);
    run(&res, &rec, 40.0, false);
    cr_assert_float_eq(qty(&res, "plasticity_index_pct")->value, 25.0, 1e-12);
    cr_assert_float_eq(qty(&res, "liquidity_index")->value, 0.4, 1e-12);
    cr_assert_float_eq(qty(&res, "activity")->value, 0.625, 1e-12);
    cr_assert_str_eq(qty(&res, "activity_class")->text, "inactive");
    cr_assert_str_eq(qty(&res, "casagrande_chart")->text, "above A-line"); /* A(45) 18.25 */
    cr_assert_str_eq(qty(&res, "bs5930_plasticity")->text, "CI: clay of intermediate plasticity");
    cr_assert(!qty(&res, "uscs_symbol")->determined); /* no curve */
    cr_assert(!has_flag(&res, "activity_range"));
    sg_result_release(&res);

    /* #68: A(60, 50) = 1.20 normal; A(30, 20) = 1.50 active; A(12, 30) = 0.40 */
    static const struct {
        double ll, pl, cf, a;
        const char *cls;
    } c[] = {{90, 30, 50, 1.20, "normal"}, {50, 20, 20, 1.50, "active"}, {30, 18, 30, 0.40, "inactive"}};
    for (size_t i = 0; i < sizeof c / sizeof c[0]; i++) {
        limits(&rec, c[i].ll, c[i].pl, NAN);
        run(&res, &rec, c[i].cf, false);
        cr_assert_float_eq(qty(&res, "activity")->value, c[i].a, 1e-12);
        cr_assert_str_eq(qty(&res, "activity_class")->text, c[i].cls);
        cr_assert(!qty(&res, "liquidity_index")->determined);
        sg_result_release(&res);
    }
}

/* Below LL 25.5 the A-line lies under PI 4. ASTM D2487 reads it as PI 4
 * there (ML below), and the chart's note says so; BS 5930's chart divides
 * clay from silt by the A-line itself (no PI 4 floor, no CL-ML band), so
 * LL 22, PI 3.9 is a clay of low plasticity there (both from memory,
 * METHODS.md 8.2). */
Test(summary, low_plasticity_below_pi_4)
{
    struct sg_record rec;
    struct sg_result res;
    limits(&rec, 22.0, 18.1, NAN);
    run(&res, &rec, 10.0, false);
    const struct sg_quantity *chart = qty(&res, "casagrande_chart");
    cr_assert_str_eq(chart->text, "below A-line");
    cr_assert(strstr(chart->note, "A-line PI 1.5 % (0.73 (LL - 20)), read by ASTM D2487 as PI 4 %") != NULL, "%s",
              chart->note);
    cr_assert_str_eq(sg_plasticity_uscs_fine(22.0, 22.0 - 18.1), "ML");
    cr_assert_str_eq(qty(&res, "bs5930_plasticity")->text, "CL: clay of low plasticity");
    sg_result_release(&res);
    /* on the CL-ML band (LL 30, PI 6: A-line 7.3): D2487 ML, BS 5930 a silt */
    limits(&rec, 30.0, 24.0, NAN);
    run(&res, &rec, 10.0, false);
    cr_assert_str_eq(qty(&res, "bs5930_plasticity")->text, "ML: silt of low plasticity");
    cr_assert(strstr(qty(&res, "casagrande_chart")->note, "read by ASTM") == NULL);
    sg_result_release(&res);
}

/* The limits are measured on the fraction finer than 0.425 mm: with 25 %
 * of the sample coarser, the activity note also gives A on that basis
 * (PI 20, clay 15 % of the sample, 75 % passing 0.425 mm: clay 20 % of
 * that fraction, A = 1.00; the value stays PI / clay of the whole sample,
 * 1.33, as METHODS.md 9.2 defines it). */
Test(summary, activity_note_on_the_fraction_tested_for_limits)
{
    struct sg_record rec;
    struct sg_result res;
    struct sg_error e;
    limits(&rec, 45.0, 25.0, NAN);
    sg_result_init(&res);
    cr_assert_eq(sg_result_add_value(&res, "clay_pct", "%", 15.0, ""), SG_OK);
    cr_assert_eq(sg_result_add_value(&res, "passing_0_425_mm_pct", "%", 75.0, ""), SG_OK);
    struct sg_reduce_options o = sg_reduce_options_default();
    cr_assert_eq(sg_plasticity_summarise(&rec, &o, &res, &e), SG_OK, "%s", e.msg);
    const struct sg_quantity *a = qty(&res, "activity");
    cr_assert_float_eq(a->value, 20.0 / 15.0, 1e-12);
    cr_assert(strstr(a->note, "(75.0 % of the sample): on that basis the clay fraction is 20.0 % and A = 1.00") !=
                  NULL,
              "%s", a->note);
    sg_result_release(&res);
    /* all of it finer than 0.425 mm: nothing to add */
    run(&res, &rec, 15.0, false);
    cr_assert(strstr(qty(&res, "activity")->note, "0.425") == NULL);
    sg_result_release(&res);
}

Test(summary, consistency_flags)
{
    struct sg_record rec;
    struct sg_result res;
    /* activity 60 / 5 = 12 > 7: outside the common clay minerals (METHODS.md 9.2) */
    limits(&rec, 90.0, 30.0, NAN);
    run(&res, &rec, 5.0, false);
    cr_assert(has_flag(&res, "activity_range"));
    sg_result_release(&res);
    /* clay fraction not determined: activity cannot be computed */
    limits(&rec, 45.0, 20.0, NAN);
    run(&res, &rec, NAN, false);
    cr_assert(has_flag(&res, "activity_not_computed"));
    cr_assert(!qty(&res, "activity")->determined);
    cr_assert(strstr(qty(&res, "activity")->note, "0.002 mm") != NULL);
    sg_result_release(&res);
    /* above the U-line: LL 30, PI 25 > 19.8 */
    limits(&rec, 30.0, 5.0, NAN);
    run(&res, &rec, 30.0, false);
    cr_assert(has_flag(&res, "plasticity_u_line"));
    cr_assert_str_eq(qty(&res, "casagrande_chart")->text, "above U-line");
    sg_result_release(&res);
    /* non-plastic with 20 % clay */
    limits(&rec, 25.0, 26.0, NAN);
    run(&res, &rec, 20.0, false);
    cr_assert(has_flag(&res, "nonplastic_clay"));
    cr_assert_float_eq(qty(&res, "plasticity_index_pct")->value, 0.0, 1e-12);
    cr_assert_str_eq(qty(&res, "casagrande_chart")->text, "non-plastic");
    cr_assert_str_eq(qty(&res, "bs5930_plasticity")->text, "non-plastic");
    sg_result_release(&res);
    /* only one limit */
    limits(&rec, 25.0, NAN, NAN);
    run(&res, &rec, 20.0, false);
    cr_assert(has_flag(&res, "atterberg_limits"));
    cr_assert(!qty(&res, "plasticity_index_pct")->determined);
    sg_result_release(&res);
    /* not credible */
    limits(&rec, -5.0, 20.0, NAN);
    run(&res, &rec, 20.0, false);
    cr_assert(has_flag(&res, "atterberg_limits"));
    sg_result_release(&res);
    /* no limits at all: rows present, not determined, no flags without a curve */
    limits(&rec, NAN, NAN, NAN);
    run(&res, &rec, 20.0, false);
    cr_assert(!qty(&res, "plasticity_index_pct")->determined);
    cr_assert(!qty(&res, "activity")->determined);
    cr_assert_eq(res.n_flags, 0);
    sg_result_release(&res);
}

Test(summary, values_only_has_no_notes_or_flags)
{
    struct sg_record rec;
    struct sg_result res;
    limits(&rec, 90.0, 30.0, 40.0);
    run(&res, &rec, 5.0, true);
    cr_assert_eq(res.n_flags, 0);
    for (size_t i = 0; i < res.n_quantities; i++)
        if (strcmp(res.quantities[i].name, "clay_pct") != 0)
            cr_assert_str_empty(res.quantities[i].note, "%s", res.quantities[i].name);
    cr_assert_float_eq(qty(&res, "activity")->value, 12.0, 1e-12);
    sg_result_release(&res);
}

Test(summary, uscs_from_the_curve)
{
    /* A curve with 20 % fines (P(0.075) 20), sand dominant, LL 41 / PL 21
     * (CL fines) -> SC; fines borderline flag absent (20 % is far from
     * 5/12/50). Points chosen for a round check, derived. */
    const struct sg_curve_point pts[] = {
        {75.0, 100.0, 0}, {4.75, 90.0, 0}, {0.075, 20.0, 0}, {0.002, 8.0, 2}, {0.001, 5.0, 2}};
    struct sg_record rec;
    limits(&rec, 41.0, 21.0, NAN);
    struct sg_result res;
    sg_result_init(&res);
    struct sg_error e;
    cr_assert_eq(sg_curve_build(&res.curve, pts, 5, SG_INTERP_LOGLINEAR, &e), SG_OK, "%s", e.msg);
    cr_assert_eq(sg_result_add_value(&res, "clay_pct", "%", 8.0, ""), SG_OK);
    cr_assert_eq(sg_plasticity_summarise(&rec, NULL, &res, &e), SG_OK, "%s", e.msg);
    cr_assert_str_eq(qty(&res, "uscs_symbol")->text, "SC");
    cr_assert(!has_flag(&res, "fines_borderline"));
    sg_result_release(&res);

    /* 51 % fines without limits: fine-grained, the group needs the limits */
    const struct sg_curve_point fine[] = {{2.0, 100.0, 0}, {0.075, 51.0, 0}, {0.002, 20.0, 2}};
    limits(&rec, NAN, NAN, NAN);
    sg_result_init(&res);
    cr_assert_eq(sg_curve_build(&res.curve, fine, 3, SG_INTERP_LOGLINEAR, &e), SG_OK, "%s", e.msg);
    cr_assert_eq(sg_plasticity_summarise(&rec, NULL, &res, &e), SG_OK, "%s", e.msg);
    cr_assert(!qty(&res, "uscs_symbol")->determined);
    cr_assert(has_flag(&res, "fines_without_limits"));
    cr_assert(has_flag(&res, "fines_borderline")); /* 51 within 2 of 50 */
    sg_result_release(&res);
}

Test(summary, errors)
{
    struct sg_error e;
    struct sg_result res;
    sg_result_init(&res);
    cr_assert_eq(sg_plasticity_summarise(NULL, NULL, &res, &e), SG_EINVAL);
    struct sg_record rec;
    sg_record_init(&rec);
    cr_assert_eq(sg_plasticity_summarise(&rec, NULL, NULL, &e), SG_EINVAL);
    sg_result_release(&res);
}
