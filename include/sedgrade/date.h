/* date.h - calendar dates (ISO 8601 YYYY-MM-DD) as day numbers, for test
 * dates, calibration dates and due dates. */
#ifndef SEDGRADE_DATE_H
#define SEDGRADE_DATE_H

#include <stdbool.h>

#include "sedgrade/error.h"

struct sg_date {
    int year;
    int month; /* 1-12 */
    int day;   /* 1-31, valid for the month */
};

/* Parses exactly "YYYY-MM-DD" (years 1900-2999) with calendar validation.
 * Returns SG_OK or SG_EPARSE with a message naming the text. */
enum sg_status sg_date_parse(const char *text, struct sg_date *out, struct sg_error *err);

/* Days since 1970-01-01 (proleptic Gregorian); differences give day counts. */
long sg_date_days(struct sg_date d);

/* The date of a day number (inverse of sg_date_days). */
struct sg_date sg_date_from_days(long days);

/* Writes "YYYY-MM-DD" into buf (at least 11 bytes). */
void sg_date_format(struct sg_date d, char buf[static 11]);

/* true when d is a set (non-zero) date. */
bool sg_date_is_set(struct sg_date d);

#endif
