/* test_sieve.c - sieve reduction: cumulative retained, percent retained and
 * percent passing (METHODS.md 5.2), the pan, and the input errors. */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "sedgrade/sieve.h"

static void setup(void) { gsl_set_error_handler_off(); }

TestSuite(sieve, .init = setup);

static struct sg_sieve_row row(double aperture_mm, double retained_g, unsigned line)
{
    return (struct sg_sieve_row){.aperture_mm = aperture_mm, .retained_g = retained_g, .pos = {line, 7}};
}

Test(sieve, methods_5_2_hand_set)
{
    /* METHODS.md 5.2 (D6913 CMR/PR/PP naming, read 1): M_d = 500.0 g;
     * retained 12.5 / 37.5 / 150.0 / 200.0 g on 4.75 / 2.00 / 0.425 / 0.075 mm,
     * 25.0 g in the pan. By hand: CMR 12.5, 50, 200, 400; PR 2.5, 7.5, 30, 40 %;
     * PP = 100 (500 - CMR)/500 = 97.5, 90, 60, 20 %; the pan's 25 g is not
     * subtracted from the finest sieve's passing (fines = 500 - 400 = 100 g). */
    const struct sg_sieve_row rows[] = {row(0.425, 150.0, 13), row(SG_SIEVE_PAN_MM, 25.0, 15),
                                        row(4.75, 12.5, 11),  row(0.075, 200.0, 14), row(2.0, 37.5, 12)};
    struct sg_sieve_line out[5];
    struct sg_error e;
    cr_assert_eq(sg_sieve_reduce(rows, 5, 500.0, out, &e), SG_OK, "%s", e.msg);
    const double ap[] = {4.75, 2.0, 0.425, 0.075, 0.0};
    const double cmr[] = {12.5, 50.0, 200.0, 400.0, 425.0};
    const double pr[] = {2.5, 7.5, 30.0, 40.0, 5.0};
    const double pp[] = {97.5, 90.0, 60.0, 20.0, 15.0};
    const unsigned line[] = {11, 12, 13, 14, 15};
    for (int i = 0; i < 5; i++) {
        cr_assert_float_eq(out[i].aperture_mm, ap[i], 1e-12, "row %d", i);
        cr_assert_float_eq(out[i].cumulative_retained_g, cmr[i], 1e-12, "row %d", i);
        cr_assert_float_eq(out[i].percent_retained, pr[i], 1e-12, "row %d", i);
        cr_assert_float_eq(out[i].percent_passing, pp[i], 1e-12, "row %d", i);
        cr_assert_eq(out[i].line, line[i], "row %d", i);
    }
    /* the pan sorts last */
    cr_assert_float_eq(out[4].aperture_mm, SG_SIEVE_PAN_MM, 0.0);
}

Test(sieve, high_entropy_masses)
{
    /* the same formulas with awkward numbers (METHODS.md 5.2, derived) */
    const double m = 1234.56;
    const struct sg_sieve_row rows[] = {row(0.063, 101.23, 4), row(6.3, 87.65, 2), row(0.63, 333.33, 3)};
    struct sg_sieve_line out[3];
    cr_assert_eq(sg_sieve_reduce(rows, 3, m, out, NULL), SG_OK);
    cr_assert_float_eq(out[0].percent_passing, 100.0 * (m - 87.65) / m, 1e-12);
    cr_assert_float_eq(out[1].percent_passing, 100.0 * (m - 87.65 - 333.33) / m, 1e-12);
    cr_assert_float_eq(out[2].percent_passing, 100.0 * (m - 87.65 - 333.33 - 101.23) / m, 1e-12);
    cr_assert_float_eq(out[2].percent_passing, 57.70071928460341, 1e-10); /* python3: 100 (m - 522.21)/m */
    cr_assert_float_eq(out[1].percent_retained, 100.0 * 333.33 / m, 1e-12);
}

Test(sieve, pan_does_not_change_sieve_passing)
{
    /* METHODS.md 5.2: everything through the finest sieve (washed out + pan)
     * is passing; with or without a pan row the sieves' PP are the same */
    const struct sg_sieve_row with_pan[] = {row(2.0, 40.0, 2), row(0.075, 160.0, 3), row(0.0, 12.0, 4)};
    struct sg_sieve_line a[3], b[2];
    cr_assert_eq(sg_sieve_reduce(with_pan, 3, 400.0, a, NULL), SG_OK);
    cr_assert_eq(sg_sieve_reduce(with_pan, 2, 400.0, b, NULL), SG_OK);
    for (int i = 0; i < 2; i++)
        cr_assert_float_eq(a[i].percent_passing, b[i].percent_passing, 1e-12);
    cr_assert_float_eq(a[1].percent_passing, 50.0, 1e-12); /* 100 (400 - 200)/400 */
    /* total retained includes the pan; percent passing a split excludes it */
    cr_assert_float_eq(sg_sieve_total_retained(with_pan, 3), 212.0, 1e-12);
    cr_assert_float_eq(sg_sieve_percent_passing(with_pan, 3, 400.0, 2.0), 90.0, 1e-12);
    /* a split between sieves: what is retained on sieves >= the split */
    cr_assert_float_eq(sg_sieve_percent_passing(with_pan, 3, 400.0, 1.0), 90.0, 1e-12);
    cr_assert_float_eq(sg_sieve_percent_passing(with_pan, 3, 400.0, 0.075), 50.0, 1e-12);
    cr_assert_float_eq(sg_sieve_percent_passing(with_pan, 3, 400.0, 5.0), 100.0, 1e-12);
}

Test(sieve, empty_set)
{
    struct sg_sieve_line out[1];
    cr_assert_eq(sg_sieve_reduce(NULL, 0, 100.0, out, NULL), SG_OK);
    cr_assert_float_eq(sg_sieve_total_retained(NULL, 0), 0.0, 0.0);
}

Test(sieve, duplicate_aperture)
{
    const struct sg_sieve_row rows[] = {row(2.0, 40.0, 8), row(0.425, 60.0, 9), row(2.0, 5.0, 12)};
    struct sg_sieve_line out[3];
    struct sg_error e;
    cr_assert_eq(sg_sieve_reduce(rows, 3, 400.0, out, &e), SG_EINVAL);
    cr_assert_eq(e.code, SG_EINVAL);
    cr_assert(strstr(e.msg, "2 mm appears twice") != NULL, "%s", e.msg);
    cr_assert(e.line == 8 || e.line == 12, "line %u", e.line);
    cr_assert_eq(e.col, 7, "col %u", e.col);
    /* two pans are a duplicate too */
    const struct sg_sieve_row pans[] = {row(0.075, 40.0, 8), row(0.0, 5.0, 9), row(0.0, 6.0, 10)};
    cr_assert_eq(sg_sieve_reduce(pans, 3, 400.0, out, &e), SG_EINVAL);
}

Test(sieve, mass_exceeding_total)
{
    /* cumulative 410 g on the 0.425 mm sieve > 400 g dry mass */
    const struct sg_sieve_row rows[] = {row(2.0, 150.0, 5), row(0.425, 260.0, 6), row(0.075, 1.0, 7)};
    struct sg_sieve_line out[3];
    struct sg_error e;
    cr_assert_eq(sg_sieve_reduce(rows, 3, 400.0, out, &e), SG_EINVAL);
    cr_assert_eq(e.line, 6);
    cr_assert_eq(e.col, 7, "the error points at the sieve's aperture, not column 0 (col %u)", e.col);
    cr_assert(strstr(e.msg, "exceeds the dry mass 400 g") != NULL, "%s", e.msg);
    /* exactly the total is fine (all retained, 0 % passing) */
    const struct sg_sieve_row all[] = {row(2.0, 150.0, 5), row(0.425, 250.0, 6)};
    cr_assert_eq(sg_sieve_reduce(all, 2, 400.0, out, &e), SG_OK);
    cr_assert_float_eq(out[1].percent_passing, 0.0, 1e-12);
    /* a pan that takes the sum above the total is a mass-balance matter for
     * QC (METHODS.md 5.3), not an input error (sieve.h) */
    const struct sg_sieve_row gain[] = {row(2.0, 150.0, 5), row(0.0, 260.0, 6)};
    cr_assert_eq(sg_sieve_reduce(gain, 2, 400.0, out, &e), SG_OK);
    cr_assert_float_eq(out[1].percent_passing, -2.5, 1e-12);
}

Test(sieve, invalid_values)
{
    struct sg_sieve_line out[2];
    struct sg_error e;
    const struct sg_sieve_row neg_ap[] = {row(-2.0, 10.0, 3), row(0.425, 5.0, 4)};
    cr_assert_eq(sg_sieve_reduce(neg_ap, 2, 100.0, out, &e), SG_EINVAL);
    cr_assert_eq(e.line, 3);
    cr_assert_eq(e.col, 7);
    cr_assert(strstr(e.msg, "-2 mm") != NULL, "%s", e.msg);
    const struct sg_sieve_row nan_ap[] = {row(NAN, 10.0, 3)};
    cr_assert_eq(sg_sieve_reduce(nan_ap, 1, 100.0, out, &e), SG_EINVAL);
    const struct sg_sieve_row neg_m[] = {row(2.0, 10.0, 3), row(0.425, -5.0, 4)};
    cr_assert_eq(sg_sieve_reduce(neg_m, 2, 100.0, out, &e), SG_EINVAL);
    cr_assert_eq(e.line, 4);
    cr_assert(strstr(e.msg, "-5 g") != NULL, "%s", e.msg);
    const struct sg_sieve_row inf_m[] = {row(2.0, INFINITY, 3)};
    cr_assert_eq(sg_sieve_reduce(inf_m, 1, 100.0, out, &e), SG_EINVAL);
    const struct sg_sieve_row ok[] = {row(2.0, 10.0, 3)};
    cr_assert_eq(sg_sieve_reduce(ok, 1, 0.0, out, &e), SG_EINVAL);
    cr_assert(strstr(e.msg, "dry mass") != NULL, "%s", e.msg);
    cr_assert_eq(sg_sieve_reduce(ok, 1, -3.0, out, &e), SG_EINVAL);
    cr_assert_eq(sg_sieve_reduce(ok, 1, NAN, out, NULL), SG_EINVAL); /* err may be NULL */
}

/* Guards: the refused masses say what to do (the "(what to do)" part). */
Test(sieve, errors_say_what_to_do)
{
    struct sg_sieve_line out[1];
    struct sg_error e;
    const struct sg_sieve_row neg[] = {row(0.425, -12.37, 9)};
    cr_assert_eq(sg_sieve_reduce(neg, 1, 500.0, out, &e), SG_EINVAL);
    cr_assert(strstr(e.msg, "retained mass -12.37 g must not be negative (give the dry mass retained") != NULL, "%s",
              e.msg);
    const struct sg_sieve_row ok[] = {row(0.425, 12.37, 9)};
    cr_assert_eq(sg_sieve_reduce(ok, 1, -500.0, out, &e), SG_EINVAL);
    cr_assert(strstr(e.msg, "dry mass -500 g must be positive (give the oven-dry mass in grams") != NULL, "%s", e.msg);
}
