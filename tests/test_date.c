/* test_date.c - ISO 8601 dates and day arithmetic. */
#include <criterion/criterion.h>

#include "sedgrade/date.h"

Test(date, parse_and_format)
{
    struct sg_date d;
    char buf[11];
    cr_assert_eq(sg_date_parse("2026-10-14", &d, NULL), SG_OK);
    cr_assert_eq(d.year, 2026);
    cr_assert_eq(d.month, 10);
    cr_assert_eq(d.day, 14);
    sg_date_format(d, buf);
    cr_assert_str_eq(buf, "2026-10-14");
    cr_assert(sg_date_is_set(d));
}

Test(date, calendar_rules)
{
    /* Gregorian leap years: 2024 yes, 1900 no, 2000 yes (ISO 8601 calendar, common knowledge) */
    struct sg_date d;
    struct sg_error err;
    cr_assert_eq(sg_date_parse("2024-02-29", &d, NULL), SG_OK);
    cr_assert_eq(sg_date_parse("2000-02-29", &d, NULL), SG_OK);
    cr_assert_eq(sg_date_parse("1900-02-29", &d, &err), SG_EPARSE);
    cr_assert(strstr(err.msg, "YYYY-MM-DD") != NULL);
    const char *bad[] = {"2026-13-01", "2026-04-31", "26-10-14", "2026/10/14", "2026-10-14x", "", "2026-1-14"};
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++)
        cr_assert_eq(sg_date_parse(bad[i], &d, NULL), SG_EPARSE, "%s", bad[i]);
}

Test(date, day_numbers)
{
    /* 1970-01-01 is day 0 (POSIX epoch); 2000-03-01 is day 11017 (date -d 2000-03-01 +%s / 86400) */
    const struct sg_date epoch = {1970, 1, 1}, d2000 = {2000, 3, 1};
    cr_assert_eq(sg_date_days(epoch), 0);
    cr_assert_eq(sg_date_days(d2000), 11017);
    for (long n = -1000; n < 40000; n += 37) {
        const struct sg_date d = sg_date_from_days(n);
        cr_assert_eq(sg_date_days(d), n);
    }
    const struct sg_date a = {2026, 10, 14}, b = {2027, 10, 14};
    cr_assert_eq(sg_date_days(b) - sg_date_days(a), 365);
}
