/* csvout.h - the CSV files of `reduce`: points, summary, curve and the batch
 * summary (SPEC "Outputs of reduce"). Quoting by libcsv; numbers with six
 * significant digits; a value that does not apply is an empty field. */
#ifndef SEDGRADE_CSVOUT_H
#define SEDGRADE_CSVOUT_H

#include <stdbool.h>
#include <stdio.h>

#include "sedgrade/error.h"
#include "sedgrade/result.h"

/* <id>.points.csv: one row per measured point. with_u adds percent_finer_u. */
enum sg_status sg_csvout_points(FILE *fp, const struct sg_result *res, bool with_u, struct sg_error *err);

/* <id>.summary.csv: quantity,value,unit,note (+ u,low95,high95 with with_u). */
enum sg_status sg_csvout_summary(FILE *fp, const struct sg_result *res, bool with_u, struct sg_error *err);

/* <id>.curve.csv: the interpolated curve at per_decade log-spaced diameters
 * between the finest and the coarsest point. */
enum sg_status sg_csvout_curve(FILE *fp, const struct sg_result *res, unsigned per_decade,
                               struct sg_error *err);

/* Batch summary.csv: header "id,status,<quantity names of res>", then one
 * row per result in the order given (the caller sorts). Results whose status
 * is not "ok"/"qc_warning"/"qc_failed" (refused tests) carry only id and status. */
enum sg_status sg_csvout_batch(FILE *fp, const struct sg_result *const *results, const char *const *status,
                               size_t n, struct sg_error *err);

/* Rows assembled in memory and handed to stdio in large fwrites (a
 * per-test file has hundreds of fields: a stdio call per character, as
 * csv_fwrite makes, or per field costs more than the numbers). Quoting by
 * libcsv's csv_write. Initialise with {.fp = fp}; end with sg_csvout_flush. */
struct sg_csvout_row {
    FILE *fp;
    size_t n;
    char buf[4096];
};

/* Appends one field, quoted when it holds a comma, quote or line break,
 * with a separator before it unless first. */
void sg_csvout_field(struct sg_csvout_row *r, const char *s, bool first);

/* Appends len bytes that already form a CSV field (quoted where needed),
 * with a separator before them unless first. */
void sg_csvout_raw_field(struct sg_csvout_row *r, const char *s, size_t len, bool first);

/* Ends the row with '\n'; rows are written out when the buffer is half
 * full (errors show on ferror(fp)). */
void sg_csvout_end_row(struct sg_csvout_row *r);

/* Writes out the rows still held (call before closing or flushing fp). */
void sg_csvout_flush(struct sg_csvout_row *r);

/* Formats a number as the CSV files do (%.6g; "" for NaN). buf >= 32 bytes. */
void sg_csvout_number(double x, char *buf, size_t size);

#endif
