/* test_axis.c - chart geometry: log10 diameter axis, percent axis, ticks,
 * fraction bands and label numbers. */
#include <criterion/criterion.h>
#include <gsl/gsl_errno.h>
#include <math.h>
#include <string.h>

#include "sedgrade/axis.h"

/* NaN and infinity as doubles (the macros are float). */
#define DNAN ((double)NAN)
#define DINF ((double)INFINITY)

static void setup(void)
{
    gsl_set_error_handler_off();
}

TestSuite(axis, .init = setup);

/* A 5-decade axis 0.001-100 mm on 100..600 device units (100 per decade). */
static const struct sg_axis_log five = {0.001, 100.0, 100.0, 600.0};

Test(axis, log_x_decades_land_on_whole_steps)
{
    /* derived: x = x_fine + (log10 d - log10 lo) / (log10 hi - log10 lo) * (x_coarse - x_fine) */
    cr_assert_float_eq(sg_axis_log_x(&five, 0.001), 100.0, 1e-9);
    cr_assert_float_eq(sg_axis_log_x(&five, 0.01), 200.0, 1e-9);
    cr_assert_float_eq(sg_axis_log_x(&five, 1.0), 400.0, 1e-9);
    cr_assert_float_eq(sg_axis_log_x(&five, 100.0), 600.0, 1e-9);
}

Test(axis, log_x_between_decades)
{
    /* derived: log10(0.063) = -1.2006594505464183, so x = 100 + 1.7993405494535817 * 100 */
    cr_assert_float_eq(sg_axis_log_x(&five, 0.063), 279.93405494535817, 1e-9);
    /* derived: log10(2) = 0.30102999566398120 */
    cr_assert_float_eq(sg_axis_log_x(&five, 2.0), 430.10299956639812, 1e-9);
    /* outside the range maps outside, linearly in log10 (no clamping here) */
    cr_assert_float_eq(sg_axis_log_x(&five, 1000.0), 700.0, 1e-9);
    cr_assert_float_eq(sg_axis_log_x(&five, 0.0001), 0.0, 1e-9);
}

Test(axis, log_x_mirrored_puts_fine_on_the_right)
{
    const struct sg_axis_log m = {0.001, 100.0, 600.0, 100.0};
    cr_assert_float_eq(sg_axis_log_x(&m, 0.001), 600.0, 1e-9);
    cr_assert_float_eq(sg_axis_log_x(&m, 100.0), 100.0, 1e-9);
    /* derived: mirror of 279.934... about 350 */
    cr_assert_float_eq(sg_axis_log_x(&m, 0.063), 420.06594505464183, 1e-9);
}

Test(axis, log_x_rejects_what_has_no_logarithm)
{
    cr_assert(isnan(sg_axis_log_x(&five, 0.0)));
    cr_assert(isnan(sg_axis_log_x(&five, -0.5)));
    cr_assert(isnan(sg_axis_log_x(&five, DNAN)));
    cr_assert(isnan(sg_axis_log_x(&five, DINF)));
    const struct sg_axis_log flat = {0.001, 100.0, 300.0, 300.0};
    cr_assert(isnan(sg_axis_log_x(&flat, 0.1)));
    const struct sg_axis_log rev = {1.0, 0.1, 0.0, 100.0};
    cr_assert(isnan(sg_axis_log_x(&rev, 0.5)));
    cr_assert(isnan(sg_axis_log_d(&flat, 300.0)));
    cr_assert(isnan(sg_axis_log_d(&five, DNAN)));
}

Test(axis, log_d_inverts_log_x)
{
    const double ds[] = {0.0013, 0.002, 0.0427, 0.063, 0.425, 4.75, 37.5, 100.0};
    for (size_t i = 0; i < sizeof ds / sizeof ds[0]; i++) {
        const double x = sg_axis_log_x(&five, ds[i]);
        cr_assert_float_eq(sg_axis_log_d(&five, x) / ds[i], 1.0, 1e-12, "d = %g", ds[i]);
    }
}

Test(axis, percent_axis_upwards_on_a_y_down_device)
{
    /* percent 0 at y = 400, 100 at y = 50 (device y grows downwards) */
    const struct sg_axis_lin y = {0.0, 100.0, 400.0, 50.0};
    cr_assert_float_eq(sg_axis_lin_map(&y, 0.0), 400.0, 1e-12);
    cr_assert_float_eq(sg_axis_lin_map(&y, 100.0), 50.0, 1e-12);
    /* derived: 400 - 0.6 * 350 */
    cr_assert_float_eq(sg_axis_lin_map(&y, 60.0), 190.0, 1e-12);
    cr_assert_float_eq(sg_axis_lin_map(&y, 37.25), 269.625, 1e-12);
    cr_assert_float_eq(sg_axis_lin_value(&y, 190.0), 60.0, 1e-12);
    cr_assert_float_eq(sg_axis_lin_value(&y, 269.625), 37.25, 1e-12);
    cr_assert(isnan(sg_axis_lin_map(&y, DNAN)));
    const struct sg_axis_lin flat = {5.0, 5.0, 0.0, 1.0};
    cr_assert(isnan(sg_axis_lin_map(&flat, 5.0)));
    const struct sg_axis_lin flatp = {0.0, 1.0, 3.0, 3.0};
    cr_assert(isnan(sg_axis_lin_value(&flatp, 3.0)));
}

Test(axis, range_default_and_widened_by_decades)
{
    double lo, hi;
    cr_assert_eq(sg_axis_log_range(DNAN, DNAN, &lo, &hi, NULL), SG_OK);
    cr_assert_float_eq(lo, 0.001, 1e-15);
    cr_assert_float_eq(hi, 100.0, 1e-12);
    /* data inside the default range keep it */
    cr_assert_eq(sg_axis_log_range(0.0015, 75.0, &lo, &hi, NULL), SG_OK);
    cr_assert_float_eq(lo, 0.001, 1e-15);
    cr_assert_float_eq(hi, 100.0, 1e-12);
    /* exactly on the default ends: no widening */
    cr_assert_eq(sg_axis_log_range(0.001, 100.0, &lo, &hi, NULL), SG_OK);
    cr_assert_float_eq(lo, 0.001, 1e-15);
    cr_assert_float_eq(hi, 100.0, 1e-12);
    /* a 0.7 um Stokes diameter and a 125 mm cobble widen each side by one decade */
    cr_assert_eq(sg_axis_log_range(0.0007, 125.0, &lo, &hi, NULL), SG_OK);
    cr_assert_float_eq(lo, 0.0001, 1e-16);
    cr_assert_float_eq(hi, 1000.0, 1e-9);
}

Test(axis, range_errors)
{
    double lo, hi;
    struct sg_error e;
    cr_assert_eq(sg_axis_log_range(0.0, 1.0, &lo, &hi, &e), SG_EINVAL);
    cr_assert(strstr(e.msg, "mm") != NULL);
    cr_assert_eq(sg_axis_log_range(0.1, -1.0, &lo, &hi, NULL), SG_EINVAL);
    cr_assert_eq(sg_axis_log_range(0.1, DINF, &lo, &hi, NULL), SG_EINVAL);
    cr_assert_eq(sg_axis_log_range(2.0, 1.0, &lo, &hi, &e), SG_EINVAL);
    cr_assert(strstr(e.msg, "reversed") != NULL);
    cr_assert_eq(sg_axis_log_range(1e-8, 1.0, &lo, &hi, NULL), SG_EINVAL);
    cr_assert_eq(sg_axis_log_range(0.1, 2e4, &lo, &hi, NULL), SG_EINVAL);
}

Test(axis, log_ticks_one_two_five)
{
    struct sg_axis_tick t[64];
    size_t n = 0;
    cr_assert_eq(sg_axis_log_ticks(0.001, 100.0, t, 64, &n, NULL), SG_OK);
    /* 5 decades x (1, 2, 5) + the closing 100 */
    cr_assert_eq(n, 16);
    static const char *const want[] = {"0.001", "0.002", "0.005", "0.01", "0.02", "0.05", "0.1", "0.2",
                                       "0.5",   "1",     "2",     "5",    "10",   "20",   "50",  "100"};
    for (size_t i = 0; i < n; i++) {
        cr_assert_str_eq(t[i].label, want[i], "tick %zu", i);
        cr_assert_float_eq(t[i].value, strtod(want[i], NULL), 1e-15 * t[i].value, "tick %zu", i);
        cr_assert_eq(t[i].major, want[i][strcspn(want[i], "125")] == '1', "tick %zu", i);
        if (i > 0)
            cr_assert(t[i].value > t[i - 1].value);
    }
}

Test(axis, log_ticks_partial_decades)
{
    struct sg_axis_tick t[16];
    size_t n = 0;
    cr_assert_eq(sg_axis_log_ticks(0.0015, 0.3, t, 16, &n, NULL), SG_OK);
    /* 0.002 0.005 0.01 0.02 0.05 0.1 0.2 */
    cr_assert_eq(n, 7);
    cr_assert_str_eq(t[0].label, "0.002");
    cr_assert_str_eq(t[6].label, "0.2");
    cr_assert(t[2].major);
    cr_assert(!t[0].major);
}

Test(axis, log_ticks_errors)
{
    struct sg_axis_tick t[4];
    size_t n = 99;
    struct sg_error e;
    cr_assert_eq(sg_axis_log_ticks(0.001, 100.0, t, 4, &n, &e), SG_ELIMIT);
    cr_assert_eq(e.code, SG_ELIMIT);
    cr_assert_eq(sg_axis_log_ticks(1.0, 1.0, t, 4, &n, NULL), SG_EINVAL);
    cr_assert_eq(n, 0);
    cr_assert_eq(sg_axis_log_ticks(0.0, 1.0, t, 4, &n, NULL), SG_EINVAL);
    cr_assert_eq(sg_axis_log_ticks(1e-9, 1.0, t, 4, &n, NULL), SG_EINVAL);
}

Test(axis, nice_range_steps)
{
    double lo, hi, step;
    /* effective depth 80.3-181.7 mm over about 5 intervals: raw 20.3, the next 1-2-5 step is 50 */
    cr_assert_eq(sg_axis_nice_range(80.3, 181.7, 5, &lo, &hi, &step, NULL), SG_OK);
    cr_assert_float_eq(step, 50.0, 1e-12);
    cr_assert_float_eq(lo, 50.0, 1e-12);
    cr_assert_float_eq(hi, 200.0, 1e-12);
    /* temperature 16.2-28.9 C: raw 2.54 -> 5 */
    cr_assert_eq(sg_axis_nice_range(16.2, 28.9, 5, &lo, &hi, &step, NULL), SG_OK);
    cr_assert_float_eq(step, 5.0, 1e-12);
    cr_assert_float_eq(lo, 15.0, 1e-12);
    cr_assert_float_eq(hi, 30.0, 1e-12);
    /* residuals -0.43 .. 0.61 mm over 4: raw 0.26 -> 0.5 */
    cr_assert_eq(sg_axis_nice_range(-0.43, 0.61, 4, &lo, &hi, &step, NULL), SG_OK);
    cr_assert_float_eq(step, 0.5, 1e-12);
    cr_assert_float_eq(lo, -0.5, 1e-12);
    cr_assert_float_eq(hi, 1.0, 1e-12);
    /* exact multiples stay: 0..100 over 10 -> step 10 */
    cr_assert_eq(sg_axis_nice_range(0.0, 100.0, 10, &lo, &hi, &step, NULL), SG_OK);
    cr_assert_float_eq(step, 10.0, 1e-12);
    cr_assert_float_eq(lo, 0.0, 1e-12);
    cr_assert_float_eq(hi, 100.0, 1e-12);
    /* one value is widened around itself */
    cr_assert_eq(sg_axis_nice_range(0.0, 0.0, 4, &lo, &hi, &step, NULL), SG_OK);
    cr_assert(lo < 0.0 && hi > 0.0);
    cr_assert_eq(sg_axis_nice_range(20.0, 20.0, 4, &lo, &hi, &step, NULL), SG_OK);
    cr_assert(lo < 20.0 && hi > 20.0);
}

Test(axis, nice_range_errors)
{
    double lo, hi, step;
    cr_assert_eq(sg_axis_nice_range(1.0, 0.0, 4, &lo, &hi, &step, NULL), SG_EINVAL);
    cr_assert_eq(sg_axis_nice_range(DNAN, 1.0, 4, &lo, &hi, &step, NULL), SG_EINVAL);
    cr_assert_eq(sg_axis_nice_range(0.0, 1.0, 0, &lo, &hi, &step, NULL), SG_EINVAL);
}

Test(axis, lin_ticks_labels)
{
    struct sg_axis_tick t[32];
    size_t n = 0;
    cr_assert_eq(sg_axis_lin_ticks(0.0, 100.0, 10.0, t, 32, &n, NULL), SG_OK);
    cr_assert_eq(n, 11);
    cr_assert_str_eq(t[0].label, "0");
    cr_assert_str_eq(t[6].label, "60");
    cr_assert_str_eq(t[10].label, "100");
    cr_assert_eq(sg_axis_lin_ticks(-0.5, 1.0, 0.5, t, 32, &n, NULL), SG_OK);
    cr_assert_eq(n, 4);
    cr_assert_str_eq(t[0].label, "-0.5");
    cr_assert_str_eq(t[1].label, "0.0");
    cr_assert_str_eq(t[3].label, "1.0");
    /* 0.1 * 3 is not exactly 0.3: labels still exact */
    cr_assert_eq(sg_axis_lin_ticks(0.0, 0.3, 0.1, t, 32, &n, NULL), SG_OK);
    cr_assert_eq(n, 4);
    cr_assert_str_eq(t[3].label, "0.3");
    /* a range between two ticks has none */
    cr_assert_eq(sg_axis_lin_ticks(0.1, 0.2, 1.0, t, 32, &n, NULL), SG_OK);
    cr_assert_eq(n, 0);
}

Test(axis, lin_ticks_errors)
{
    struct sg_axis_tick t[4];
    size_t n;
    cr_assert_eq(sg_axis_lin_ticks(0.0, 100.0, 10.0, t, 4, &n, NULL), SG_ELIMIT);
    cr_assert_eq(sg_axis_lin_ticks(0.0, 1.0, 0.0, t, 4, &n, NULL), SG_EINVAL);
    cr_assert_eq(sg_axis_lin_ticks(2.0, 1.0, 0.5, t, 4, &n, NULL), SG_EINVAL);
    cr_assert_eq(sg_axis_lin_ticks(0.0, DINF, 0.5, t, 4, &n, NULL), SG_EINVAL);
}

/* Looks a band up by tier and lower bound. */
static const struct sg_axis_band *band(enum sg_axis_bands sys, int tier, double lo_mm)
{
    size_t n;
    const struct sg_axis_band *b = sg_axis_bands_get(sys, &n);
    for (size_t i = 0; i < n; i++)
        if (b[i].tier == tier && fabs(b[i].lo_mm - lo_mm) <= 1e-12)
            return &b[i];
    return NULL;
}

Test(axis, iso_bands_follow_iso_14688_1)
{
    /* METHODS.md 8.1 (ISO 14688-1): 0.002 / 0.063 / 2 / 63 / 200 mm */
    const struct sg_axis_band *b = band(SG_BANDS_ISO14688, 0, 0.002);
    cr_assert_not_null(b);
    cr_assert_str_eq(b->name, "Silt");
    cr_assert_float_eq(b->hi_mm, 0.063, 1e-15);
    b = band(SG_BANDS_ISO14688, 0, 0.063);
    cr_assert_str_eq(b->name, "Sand");
    cr_assert_float_eq(b->hi_mm, 2.0, 1e-15);
    b = band(SG_BANDS_ISO14688, 0, 2.0);
    cr_assert_str_eq(b->name, "Gravel");
    cr_assert_float_eq(b->hi_mm, 63.0, 1e-15);
    b = band(SG_BANDS_ISO14688, 0, 63.0);
    cr_assert_str_eq(b->name, "Cobbles");
    cr_assert_float_eq(b->hi_mm, 200.0, 1e-15);
    b = band(SG_BANDS_ISO14688, 0, 0.0);
    cr_assert_str_eq(b->name, "Clay");
    cr_assert_float_eq(b->hi_mm, 0.002, 1e-15);
    /* subdivisions: fine/medium/coarse silt 0.0063 / 0.02, sand 0.2 / 0.63, gravel 6.3 / 20 */
    cr_assert_float_eq(band(SG_BANDS_ISO14688, 1, 0.002)->hi_mm, 0.0063, 1e-15);
    cr_assert_str_eq(band(SG_BANDS_ISO14688, 1, 0.0063)->name, "medium");
    cr_assert_float_eq(band(SG_BANDS_ISO14688, 1, 0.0063)->hi_mm, 0.02, 1e-15);
    cr_assert_float_eq(band(SG_BANDS_ISO14688, 1, 0.2)->hi_mm, 0.63, 1e-15);
    cr_assert_str_eq(band(SG_BANDS_ISO14688, 1, 20.0)->name, "coarse");
    cr_assert_float_eq(band(SG_BANDS_ISO14688, 1, 20.0)->hi_mm, 63.0, 1e-15);
}

Test(axis, uscs_bands_follow_astm_d2487)
{
    /* METHODS.md 8.2 (ASTM D2487): fines <= 0.075 < sand <= 4.75 < gravel <= 75 < cobbles <= 300 */
    cr_assert_float_eq(band(SG_BANDS_USCS, 0, 0.0)->hi_mm, 0.075, 1e-15);
    cr_assert_float_eq(band(SG_BANDS_USCS, 0, 0.075)->hi_mm, 4.75, 1e-15);
    cr_assert_float_eq(band(SG_BANDS_USCS, 0, 4.75)->hi_mm, 75.0, 1e-15);
    cr_assert_float_eq(band(SG_BANDS_USCS, 0, 75.0)->hi_mm, 300.0, 1e-15);
    /* sand fine 0.075-0.425, medium 0.425-2.00, coarse 2.00-4.75; gravel fine 4.75-19, coarse 19-75 */
    cr_assert_float_eq(band(SG_BANDS_USCS, 1, 0.075)->hi_mm, 0.425, 1e-15);
    cr_assert_float_eq(band(SG_BANDS_USCS, 1, 0.425)->hi_mm, 2.0, 1e-15);
    cr_assert_float_eq(band(SG_BANDS_USCS, 1, 2.0)->hi_mm, 4.75, 1e-15);
    cr_assert_float_eq(band(SG_BANDS_USCS, 1, 4.75)->hi_mm, 19.0, 1e-15);
    cr_assert_float_eq(band(SG_BANDS_USCS, 1, 19.0)->hi_mm, 75.0, 1e-15);
}

Test(axis, bands_tile_without_gaps)
{
    const enum sg_axis_bands systems[] = {SG_BANDS_ISO14688, SG_BANDS_USCS};
    for (size_t s = 0; s < 2; s++) {
        size_t n;
        const struct sg_axis_band *b = sg_axis_bands_get(systems[s], &n);
        cr_assert(n > 0);
        /* main fractions: consecutive, from 0 to infinity */
        double at = 0.0;
        size_t mains = 0;
        for (size_t i = 0; i < n; i++) {
            if (b[i].tier != 0)
                continue;
            cr_assert_float_eq(b[i].lo_mm, at, 1e-15, "system %zu band %s", s, b[i].name);
            at = b[i].hi_mm;
            mains++;
        }
        cr_assert(isinf(at));
        cr_assert(mains >= 4);
        /* every subdivision lies inside one main fraction */
        for (size_t i = 0; i < n; i++) {
            if (b[i].tier != 1)
                continue;
            bool inside = false;
            for (size_t j = 0; j < n; j++)
                if (b[j].tier == 0 && b[i].lo_mm >= b[j].lo_mm && b[i].hi_mm <= b[j].hi_mm)
                    inside = true;
            cr_assert(inside, "system %zu sub-band from %g mm", s, b[i].lo_mm);
        }
    }
}

Test(axis, bands_chosen_by_standard)
{
    cr_assert_eq(sg_axis_bands_for_standard(SG_STANDARD_NONE), SG_BANDS_ISO14688);
    cr_assert_eq(sg_axis_bands_for_standard(SG_STANDARD_ISO17892_4), SG_BANDS_ISO14688);
    cr_assert_eq(sg_axis_bands_for_standard(SG_STANDARD_BS1377_2), SG_BANDS_ISO14688);
    cr_assert_eq(sg_axis_bands_for_standard(SG_STANDARD_ASTM_D7928), SG_BANDS_USCS);
    cr_assert_str_eq(sg_axis_bands_name(SG_BANDS_ISO14688), "ISO 14688-1");
    cr_assert(strstr(sg_axis_bands_name(SG_BANDS_USCS), "D2487") != NULL);
    size_t n;
    cr_assert_eq(sg_axis_bands_get((enum sg_axis_bands)42, &n), sg_axis_bands_get(SG_BANDS_ISO14688, &n));
}

Test(axis, format_significant_digits)
{
    char b[32];
    sg_axis_format_sig(0.00042134, 4, b, sizeof b);
    cr_assert_str_eq(b, "0.0004213");
    sg_axis_format_sig(0.0421349, 4, b, sizeof b);
    cr_assert_str_eq(b, "0.04213");
    sg_axis_format_sig(63.0, 4, b, sizeof b);
    cr_assert_str_eq(b, "63.00");
    sg_axis_format_sig(9.99961, 4, b, sizeof b);
    cr_assert_str_eq(b, "10.00");
    sg_axis_format_sig(123456.0, 3, b, sizeof b);
    cr_assert_str_eq(b, "123456");
    sg_axis_format_sig(-2.5e-3, 2, b, sizeof b);
    cr_assert_str_eq(b, "-0.0025");
    sg_axis_format_sig(0.0, 4, b, sizeof b);
    cr_assert_str_eq(b, "0");
    sg_axis_format_sig(DNAN, 4, b, sizeof b);
    cr_assert_str_eq(b, "");
    sg_axis_format_sig(3.2e-12, 3, b, sizeof b);
    cr_assert_str_eq(b, "3.2e-12");
}

Test(axis, format_fixed_decimals)
{
    char b[32];
    sg_axis_format_fixed(37.25, 1, b, sizeof b);
    cr_assert_str_eq(b, "37.2"); /* round half to even on the binary value 37.25 */
    sg_axis_format_fixed(99.96, 1, b, sizeof b);
    cr_assert_str_eq(b, "100.0");
    sg_axis_format_fixed(-0.04, 1, b, sizeof b);
    cr_assert_str_eq(b, "0.0");
    sg_axis_format_fixed(DINF, 1, b, sizeof b);
    cr_assert_str_eq(b, "");
    sg_axis_format_fixed(12.0, -3, b, sizeof b);
    cr_assert_str_eq(b, "12");
}
