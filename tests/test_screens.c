/* test_screens.c - Hazen permeability, the 0.02 mm frost screen and
 * Terzaghi's filter ratios (METHODS.md 9.1, 9.3, 9.4; 13.7 #66, #67, #70,
 * #72). */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "sedgrade/curve.h"
#include "sedgrade/reduce.h"
#include "sedgrade/result.h"
#include "sedgrade/screens.h"

static void setup(void) { gsl_set_error_handler_off(); }

TestSuite(hazen, .init = setup);
TestSuite(frost, .init = setup);
TestSuite(filter, .init = setup);

static const struct sg_quantity *qty(const struct sg_result *res, const char *name)
{
    const struct sg_quantity *q = sg_result_quantity(res, name);
    cr_assert_not_null(q, "%s missing", name);
    return q;
}

/* Result holding d10_mm, cu and finer_0_02_mm_pct (NaN: not determined). */
static void run(struct sg_result *res, double d10, double cu, double p002, bool values_only)
{
    sg_result_init(res);
    const struct {
        const char *name;
        double v;
    } in[] = {{"d10_mm", d10}, {"cu", cu}, {"finer_0_02_mm_pct", p002}};
    for (size_t i = 0; i < 3; i++)
        if (isfinite(in[i].v))
            cr_assert_eq(sg_result_add_value(res, in[i].name, "", in[i].v, ""), SG_OK);
        else
            cr_assert_eq(sg_result_add_undetermined(res, in[i].name, "", "no"), SG_OK);
    struct sg_reduce_options o = sg_reduce_options_default();
    o.values_only = values_only;
    struct sg_error e;
    cr_assert_eq(sg_screens_summarise(NULL, &o, res, &e), SG_OK, "%s", e.msg);
}

Test(hazen, formula)
{
    /* METHODS.md 13.7 #66: k[cm/s] = 1.0 D10[mm]^2: D10 0.10 mm -> 0.01 cm/s
     * (1.0e-4 m/s); 0.20 mm -> 0.04 cm/s (form read 26, C typical). */
    cr_assert_float_eq(sg_screens_hazen_k_cm_s(0.10), 0.01, 1e-15);
    cr_assert_float_eq(sg_screens_hazen_k_cm_s(0.20), 0.04, 1e-15);
}

Test(hazen, validity_window)
{
    /* METHODS.md 13.7 #67: validity D10 0.1-2.5 mm (read 27). */
    cr_assert(sg_screens_hazen_valid(0.1));
    cr_assert(sg_screens_hazen_valid(2.5));
    cr_assert(sg_screens_hazen_valid(0.42));
    cr_assert(!sg_screens_hazen_valid(0.0999));
    cr_assert(!sg_screens_hazen_valid(2.51));
    cr_assert(!sg_screens_hazen_valid(NAN));
}

Test(hazen, summary_rows)
{
    struct sg_result res;
    run(&res, 0.20, 3.1, 0.5, false);
    const struct sg_quantity *k = qty(&res, "hazen_k_cm_s");
    cr_assert(k->determined);
    cr_assert_float_eq(k->value, 0.04, 1e-15); /* #66 */
    cr_assert_str_eq(k->unit, "cm/s");
    cr_assert(strstr(k->note, "C = 1 (cm/s)/mm^2") != NULL, "%s", k->note);
    cr_assert(strstr(k->note, "not a design value") != NULL, "%s", k->note);
    cr_assert(strstr(k->note, "Cu >= 5") == NULL, "%s", k->note);
    sg_result_release(&res);

    run(&res, 0.20, 8.0, 0.5, false); /* Cu 8: noted (METHODS.md 9.1, Cu < 5) */
    cr_assert(strstr(qty(&res, "hazen_k_cm_s")->note, "Cu >= 5") != NULL);
    sg_result_release(&res);

    run(&res, 0.012, 20.0, 30.0, false); /* silt: outside the window (#67) */
    k = qty(&res, "hazen_k_cm_s");
    cr_assert(!k->determined);
    cr_assert(strstr(k->note, "outside Hazen's validity") != NULL, "%s", k->note);
    sg_result_release(&res);

    run(&res, NAN, NAN, NAN, false);
    cr_assert(!qty(&res, "hazen_k_cm_s")->determined);
    cr_assert(!qty(&res, "frost_screen")->determined);
    sg_result_release(&res);

    run(&res, 0.20, 3.1, 0.5, true); /* values only: no notes */
    cr_assert_str_empty(qty(&res, "hazen_k_cm_s")->note);
    cr_assert_str_empty(qty(&res, "frost_screen")->note);
    sg_result_release(&res);
}

Test(frost, screen_limits)
{
    /* METHODS.md 13.7 #70 (TI 850-02, read 32): 3 % for non-uniform soils,
     * 1.5-3 % possibly, about 10 % for uniform sands. */
    cr_assert_eq(sg_screens_frost(3.0, false), SG_FROST_SUSCEPTIBLE);
    cr_assert_eq(sg_screens_frost(2.9, false), SG_FROST_POSSIBLY);
    cr_assert_eq(sg_screens_frost(1.5, false), SG_FROST_POSSIBLY);
    cr_assert_eq(sg_screens_frost(1.4, false), SG_FROST_NOT_SUSCEPTIBLE);
    cr_assert_eq(sg_screens_frost(10.0, true), SG_FROST_SUSCEPTIBLE);
    cr_assert_eq(sg_screens_frost(9.9, true), SG_FROST_POSSIBLY);
    cr_assert_eq(sg_screens_frost(2.9, true), SG_FROST_NOT_SUSCEPTIBLE);
    cr_assert_str_eq(sg_screens_frost_name(SG_FROST_POSSIBLY), "possibly frost susceptible");
}

Test(frost, summary_row)
{
    struct sg_result res;
    run(&res, 0.2, 12.0, 4.0, false); /* non-uniform, 4 % >= 3 % */
    cr_assert_str_eq(qty(&res, "frost_screen")->text, "frost susceptible");
    cr_assert(strstr(qty(&res, "frost_screen")->note, "not a design decision") != NULL);
    sg_result_release(&res);
    run(&res, 0.2, 2.0, 4.0, false); /* uniform (Cu 2), 4 % < 10 % */
    cr_assert_str_eq(qty(&res, "frost_screen")->text, "possibly frost susceptible");
    sg_result_release(&res);
    run(&res, 0.2, NAN, 2.0, false); /* Cu unknown: non-uniform limits */
    cr_assert_str_eq(qty(&res, "frost_screen")->text, "possibly frost susceptible");
    cr_assert(strstr(qty(&res, "frost_screen")->note, "non-uniform limits used") != NULL);
    sg_result_release(&res);
}

Test(frost, from_the_curve_when_the_row_is_missing)
{
    /* P(0.02) on the straight log segment 0.063 mm 30 % .. 0.002 mm 6 %:
     * 6 + 24 log(0.02/0.002)/log(0.063/0.002) = 22.02 % (derived). */
    const struct sg_curve_point pts[] = {{0.063, 30.0, 0}, {0.002, 6.0, 2}};
    struct sg_result res;
    sg_result_init(&res);
    struct sg_error e;
    cr_assert_eq(sg_curve_build(&res.curve, pts, 2, SG_INTERP_LOGLINEAR, &e), SG_OK, "%s", e.msg);
    cr_assert_eq(sg_screens_summarise(NULL, NULL, &res, &e), SG_OK, "%s", e.msg);
    cr_assert_str_eq(qty(&res, "frost_screen")->text, "frost susceptible");
    cr_assert(strstr(qty(&res, "frost_screen")->note, "22.0 %") != NULL, "%s", qty(&res, "frost_screen")->note);
    cr_assert(!qty(&res, "hazen_k_cm_s")->determined);
    sg_result_release(&res);
    cr_assert_eq(sg_screens_summarise(NULL, NULL, NULL, &e), SG_EINVAL);
}

Test(filter, terzaghi_ratios)
{
    /* METHODS.md 13.7 #72 (read 35): D15F/D85B <= 4 (retention), D15F/D15B
     * >= 4 (permeability). Ratios derived from the sizes. */
    struct sg_filter_ratios r;
    struct sg_error e;
    cr_assert_eq(sg_screens_terzaghi(0.05, 0.30, 1.0, &r, &e), SG_OK);
    cr_assert_float_eq(r.retention, 1.0 / 0.30, 1e-12);
    cr_assert_float_eq(r.permeability, 20.0, 1e-12);
    cr_assert(r.retention_ok && r.permeability_ok);

    cr_assert_eq(sg_screens_terzaghi(0.05, 0.30, 1.5, &r, &e), SG_OK);
    cr_assert_float_eq(r.retention, 5.0, 1e-12); /* too coarse: fines pass */
    cr_assert(!r.retention_ok && r.permeability_ok);

    cr_assert_eq(sg_screens_terzaghi(0.05, 0.30, 0.15, &r, &e), SG_OK);
    cr_assert_float_eq(r.permeability, 3.0, 1e-12); /* too fine: not free draining */
    cr_assert(r.retention_ok && !r.permeability_ok);

    cr_assert_eq(sg_screens_terzaghi(0.05, 0.30, 1.2, &r, &e), SG_OK); /* exactly 4: passes */
    cr_assert(r.retention_ok);
    cr_assert_eq(sg_screens_terzaghi(0.05, 0.30, 0.2, &r, &e), SG_OK); /* exactly 4: passes */
    cr_assert(r.permeability_ok);

    cr_assert_eq(sg_screens_terzaghi(0.0, 0.30, 1.0, &r, &e), SG_EINVAL);
    cr_assert(strstr(e.msg, "base soil D15") != NULL, "%s", e.msg);
    cr_assert_eq(sg_screens_terzaghi(0.05, NAN, 1.0, &r, &e), SG_EINVAL);
    cr_assert_eq(sg_screens_terzaghi(0.05, 0.3, -1.0, &r, &e), SG_EINVAL);
}

/* Result holding d15_mm, screened as a filter over a base soil (METHODS.md 13.7 #72, read 35). */
static void run_filter(struct sg_result *res, double d15, double base15, double base85)
{
    sg_result_init(res);
    cr_assert_eq(sg_result_add_value(res, "d15_mm", "mm", d15, ""), SG_OK);
    struct sg_reduce_options o = sg_reduce_options_default();
    o.has_base_soil = true;
    o.base_d15_mm = base15;
    o.base_d85_mm = base85;
    strcpy(o.base_soil_id, "BASE-1");
    struct sg_error e;
    cr_assert_eq(sg_screens_summarise(NULL, &o, res, &e), SG_OK, "%s", e.msg);
}

Test(filter, summary_rows_against_a_base_soil)
{
    /* METHODS.md 13.7 #72: D15F/D85B <= 4, D15F/D15B >= 4; the ratios are derived from the sizes. */
    struct sg_result res;
    run_filter(&res, 0.3, 0.02, 0.1);
    cr_assert_float_eq(qty(&res, "filter_retention_ratio")->value, 3.0, 1e-12);
    cr_assert_float_eq(qty(&res, "filter_permeability_ratio")->value, 15.0, 1e-12);
    cr_assert_str_eq(qty(&res, "filter_screen")->text, "meets both");
    cr_assert(strstr(qty(&res, "filter_screen")->note, "not a filter design") != NULL);
    sg_result_release(&res);

    run_filter(&res, 0.5, 0.02, 0.1); /* 5 > 4: the base soil's fines would wash through */
    cr_assert_str_eq(qty(&res, "filter_screen")->text, "fails retention");
    sg_result_release(&res);

    run_filter(&res, 0.06, 0.02, 0.1); /* 3 < 4: not free-draining enough */
    cr_assert_str_eq(qty(&res, "filter_screen")->text, "fails permeability");
    sg_result_release(&res);

    /* a fine base soil without a D15: retention only, said in the notes */
    run_filter(&res, 0.3, NAN, 0.1);
    cr_assert(qty(&res, "filter_retention_ratio")->determined);
    cr_assert(!qty(&res, "filter_permeability_ratio")->determined);
    cr_assert(strstr(qty(&res, "filter_permeability_ratio")->note, "base soil's D15") != NULL);
    cr_assert_str_eq(qty(&res, "filter_screen")->text, "meets retention");
    sg_result_release(&res);

    /* no D15 for the filter itself: nothing to screen */
    sg_result_init(&res);
    cr_assert_eq(sg_result_add_undetermined(&res, "d15_mm", "mm", "no"), SG_OK);
    struct sg_reduce_options o = sg_reduce_options_default();
    o.has_base_soil = true;
    o.base_d15_mm = 0.02;
    o.base_d85_mm = 0.1;
    struct sg_error e;
    cr_assert_eq(sg_screens_summarise(NULL, &o, &res, &e), SG_OK);
    cr_assert(!qty(&res, "filter_retention_ratio")->determined);
    cr_assert(!qty(&res, "filter_screen")->determined);
    sg_result_release(&res);
}
