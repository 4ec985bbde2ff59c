/* test_csvout.c - the CSV writers' number format and file shapes. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "sedgrade/csvout.h"

/* The reference is the C library's own "%.6g" (ISO C 7.21.6.1), which the
 * files promise; the fast path must give the same text for every value. */
static void same_as_printf(double x)
{
    char want[64], got[64];
    snprintf(want, sizeof want, "%.6g", x == 0.0 ? 0.0 : x);
    sg_csvout_number(x, got, sizeof got);
    cr_assert_str_eq(got, want, "x = %.17g", x);
}

Test(csvout, number_edge_cases)
{
    const double xs[] = {1.0,       -1.0,       0.1,        1e-5,       1e-4,        9.999995e-5, 0.000123456,
                         123456.0,  999999.0,   999999.5,   999999.4,   1e6,         1234567.0,   9.999995,
                         9.9999949, 0.0000125,  2.5,        1.00000049, 16.295,      0.05882,     0.0055310,
                         1e-300,    1e300,      -3.21212,   79.11,      0.002,       0.063,       2.0,
                         63.0,      100.0,      4.9e-324,   1.7976931348623157e308};
    for (size_t i = 0; i < sizeof xs / sizeof xs[0]; i++)
        same_as_printf(xs[i]);
    /* every binary exponent, at both ends of its octave (the decimal exponent is estimated from it) */
    for (int e = -1074; e <= 1023; e++) {
        same_as_printf(ldexp(1.0, e));
        same_as_printf(ldexp(1.9999999999999998, e - 1 < -1074 ? -1074 : e - 1));
        same_as_printf(-ldexp(1.4142135623730951, e));
    }
    /* the powers of ten and their neighbours */
    for (int k = -300; k <= 300; k++) {
        const double p = pow(10.0, k);
        same_as_printf(p);
        same_as_printf(nextafter(p, 0.0));
        same_as_printf(nextafter(p, INFINITY));
        same_as_printf(p * 0.9999995);
    }
    char buf[32];
    sg_csvout_number(-0.0, buf, sizeof buf);
    cr_assert_str_eq(buf, "0");
    sg_csvout_number(NAN, buf, sizeof buf);
    cr_assert_str_eq(buf, "");
    sg_csvout_number(INFINITY, buf, sizeof buf);
    cr_assert_str_eq(buf, "");
}

Test(csvout, number_random_values)
{
    /* 500 000 values over 40 decades, and the decimal values with 1-8 digits the lab types */
    unsigned long long s = 88172645463325252ULL;
    for (int i = 0; i < 500000; i++) {
        s ^= s << 13;
        s ^= s >> 7;
        s ^= s << 17;
        const double u = (double)(s >> 11) / 9007199254740992.0;
        const double x = (i & 1 ? -1.0 : 1.0) * pow(10.0, -20.0 + 40.0 * u);
        same_as_printf(x);
        if (i % 8 == 0)
            same_as_printf((double)(long long)(s % 100000000ULL) / pow(10.0, (double)(s % 9)));
    }
}

Test(csvout, summary_quotes_and_empty_values)
{
    struct sg_result r;
    sg_result_init(&r);
    cr_assert_eq(sg_result_add_value(&r, "d60_mm", "mm", 0.0661297, "size at which 60 % is finer"), SG_OK);
    cr_assert_eq(sg_result_add_undetermined(&r, "d10_mm", "mm", "not determined: below 0.0013 mm, \"finest\""),
                 SG_OK);
    cr_assert_eq(sg_result_add_text(&r, "usda_texture", "clay loam", "on the fraction, finer than 2 mm"), SG_OK);
    char *text = NULL;
    size_t len = 0;
    FILE *fp = open_memstream(&text, &len);
    cr_assert_eq(sg_csvout_summary(fp, &r, false, NULL), SG_OK);
    fclose(fp);
    cr_assert_str_eq(text, "quantity,value,unit,note\n"
                           "d60_mm,0.0661297,mm,size at which 60 % is finer\n"
                           "d10_mm,,mm,\"not determined: below 0.0013 mm, \"\"finest\"\"\"\n"
                           "usda_texture,clay loam,,\"on the fraction, finer than 2 mm\"\n");
    free(text);
    sg_result_release(&r);
}

Test(csvout, row_writer_quotes_like_rfc4180_and_takes_long_fields)
{
    /* RFC 4180, section 2 (rules 6 and 7): a field with a comma, quote or line break is enclosed in quotes
     * and its quotes are doubled. Fields longer than the row buffer go out whole. */
    char *out = NULL;
    size_t len = 0;
    FILE *fp = open_memstream(&out, &len);
    cr_assert_not_null(fp);
    struct sg_csvout_row *r = malloc(sizeof *r);
    cr_assert_not_null(r);
    *r = (struct sg_csvout_row){.fp = fp, .n = 0};
    sg_csvout_field(r, "plain", true);
    sg_csvout_field(r, "a,b", false);
    sg_csvout_field(r, "say \"hi\"", false);
    sg_csvout_field(r, "two\nlines", false);
    sg_csvout_field(r, "", false);
    sg_csvout_end_row(r);
    const size_t big = 3 * sizeof r->buf;
    char *s = malloc(big + 1);
    cr_assert_not_null(s);
    for (size_t i = 0; i < big; i++)
        s[i] = i % 100 == 99 ? ',' : 'x';
    s[big] = '\0';
    sg_csvout_field(r, "id", true);
    sg_csvout_field(r, s, false);
    sg_csvout_end_row(r);
    sg_csvout_flush(r);
    fclose(fp);
    const char *first = "plain,\"a,b\",\"say \"\"hi\"\"\",\"two\nlines\",\n";
    cr_assert_eq(strncmp(out, first, strlen(first)), 0, "%s", out);
    const char *second = out + strlen(first);
    cr_assert_eq(strlen(second), strlen("id,\"") + big + strlen("\"\n"));
    cr_assert_eq(strncmp(second, "id,\"", 4), 0);
    cr_assert_eq(memcmp(second + 4, s, big), 0);
    cr_assert_str_eq(second + 4 + big, "\"\n");
    free(s);
    free(r);
    free(out);
}
