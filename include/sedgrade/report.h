/* report.h - the one-page A4 PDF test report.
 *
 * One page, portrait A4 (595.28 x 841.89 pt), fixed layout, top to bottom:
 * title and test identification; method and the standard followed;
 * specimen data; the grading chart (the same drawing code as plot.h);
 * results (D-values, Cu, Cc, fractions by ISO 14688-1 and the record's
 * system, fines, USDA separates and texture class, with the 95 % intervals
 * when Monte Carlo ran); the sieve table; the sedimentation readings with
 * every correction applied (thermometer, blank/composite, meniscus,
 * effective depth, viscosity); QC flags; the calibration entries used with
 * their dates; the cautions; sign-off lines; and the report ID with "page 1
 * of 1, end of report" at the foot. Long tables are cut to fit with a line
 * "... n more rows (see <id>.points.csv)", QC findings with "... n more
 * findings (see <id>.summary.csv, qc_flags)"; struct sg_report_files names
 * other files, or says that none was written. Each such line stays inside
 * its column (a long name gives way to "the points file", and so on).
 *
 * Text is real PDF text (cairo toy font API, DejaVu Sans from
 * fonts-dejavu-core), so it can be searched and extracted (pdftotext). The
 * PDF's title is "Particle size distribution - <id>", its creator
 * "sedgrade" and its creation date the test date, so the same input gives
 * the same file. */
#ifndef SEDGRADE_REPORT_H
#define SEDGRADE_REPORT_H

#include "sedgrade/error.h"
#include "sedgrade/record.h"
#include "sedgrade/result.h"

/* Page size of the report, pt (ISO 216 A4: 210 x 297 mm). */
#define SG_REPORT_WIDTH_PT 595.276
#define SG_REPORT_HEIGHT_PT 841.890

/* Where the report sends the reader for what its page cannot hold: file
 * names as the reader finds them beside the report, or NULL when no such
 * file was written (the report then says so). */
struct sg_report_files {
    const char *points;   /* every measured point, e.g. "<id>.points.csv" */
    const char *findings; /* every QC finding in a qc_flags column or row, e.g. "<id>.summary.csv" */
};

/* Writes the report for one reduced test to path (atomically: nothing is
 * left at path on failure), referring to "<id>.points.csv" and
 * "<id>.summary.csv" for what is cut. SG_EINVAL for a NULL res, rec or
 * path; SG_EIO when the file cannot be written; SG_ENOMEM. */
enum sg_status sg_report_write(const struct sg_result *res, const struct sg_record *rec, const char *path,
                               struct sg_error *err);

/* As sg_report_write, referring to files (NULL: the default names above)
 * for what is cut. */
enum sg_status sg_report_write_with(const struct sg_result *res, const struct sg_record *rec,
                                    const struct sg_report_files *files, const char *path, struct sg_error *err);

#endif
