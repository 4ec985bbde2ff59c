/* report.h - the one-page A4 PDF test report. */
#ifndef SEDGRADE_REPORT_H
#define SEDGRADE_REPORT_H

#include "sedgrade/error.h"
#include "sedgrade/record.h"
#include "sedgrade/result.h"

/* Writes the report for one reduced test to path (atomically). */
enum sg_status sg_report_write(const struct sg_result *res, const struct sg_record *rec, const char *path,
                               struct sg_error *err);

#endif
