/* date.c - ISO 8601 calendar dates and day arithmetic (civil-from-days algorithm). */
#include "sedgrade/date.h"

#include <ctype.h>
#include <stdio.h>
#include <string.h>


static bool is_leap(int y)
{
    return (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
}

static int days_in_month(int y, int m)
{
    static const int dm[12] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
    return m == 2 && is_leap(y) ? 29 : dm[m - 1];
}

enum sg_status sg_date_parse(const char *text, struct sg_date *out, struct sg_error *err)
{
    static const char shape[] = "dddd-dd-dd";
    if (text == NULL || strlen(text) != sizeof shape - 1)
        goto bad;
    for (size_t i = 0; i < sizeof shape - 1; i++) {
        if (shape[i] == 'd' ? !isdigit((unsigned char)text[i]) : text[i] != '-')
            goto bad;
    }
    int y = 0, m = 0, d = 0;
    if (sscanf(text, "%4d-%2d-%2d", &y, &m, &d) != 3 || y < 1900 || y > 2999 || m < 1 || m > 12 ||
        d < 1 || d > days_in_month(y, m))
        goto bad;
    out->year = y;
    out->month = m;
    out->day = d;
    return SG_OK;
bad:
    return sg_error_set(err, SG_EPARSE, 0, 0, "date '%s' is not a valid calendar date (write it as YYYY-MM-DD)",
                        text ? text : "");
}

long sg_date_days(struct sg_date d)
{
    /* Howard Hinnant's days_from_civil. */
    long y = d.year - (d.month <= 2);
    long era = (y >= 0 ? y : y - 399) / 400;
    long yoe = y - era * 400;
    long mp = (d.month + 9) % 12;
    long doy = (153 * mp + 2) / 5 + d.day - 1;
    long doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    return era * 146097 + doe - 719468;
}

struct sg_date sg_date_from_days(long z)
{
    z += 719468;
    long era = (z >= 0 ? z : z - 146096) / 146097;
    long doe = z - era * 146097;
    long yoe = (doe - doe / 1460 + doe / 36524 - doe / 146096) / 365;
    long y = yoe + era * 400;
    long doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    long mp = (5 * doy + 2) / 153;
    long d = doy - (153 * mp + 2) / 5 + 1;
    long m = mp < 10 ? mp + 3 : mp - 9;
    struct sg_date out = {(int)(y + (m <= 2)), (int)m, (int)d};
    return out;
}

void sg_date_format(struct sg_date d, char buf[static 11])
{
    const unsigned y = (unsigned)d.year % 10000u, m = (unsigned)d.month % 13u, dd = (unsigned)d.day % 32u;
    buf[0] = (char)('0' + y / 1000);
    buf[1] = (char)('0' + y / 100 % 10);
    buf[2] = (char)('0' + y / 10 % 10);
    buf[3] = (char)('0' + y % 10);
    buf[4] = '-';
    buf[5] = (char)('0' + m / 10);
    buf[6] = (char)('0' + m % 10);
    buf[7] = '-';
    buf[8] = (char)('0' + dd / 10);
    buf[9] = (char)('0' + dd % 10);
    buf[10] = '\0';
}

bool sg_date_is_set(struct sg_date d)
{
    return d.year != 0;
}
