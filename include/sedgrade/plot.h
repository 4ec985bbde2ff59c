/* plot.h - the grading curve drawn with cairo: one drawing path for PNG, SVG
 * and PDF. */
#ifndef SEDGRADE_PLOT_H
#define SEDGRADE_PLOT_H

#include "sedgrade/error.h"
#include "sedgrade/record.h"
#include "sedgrade/result.h"

enum sg_plot_format { SG_PLOT_PNG = 0, SG_PLOT_SVG, SG_PLOT_PDF };

/* Draws res (points, curve, D-values, fraction bands, and the Monte Carlo
 * band when points carry percent_finer_u) into path in format fmt, written
 * atomically. SG_EIO when the file cannot be written. */
enum sg_status sg_plot_write(const struct sg_result *res, const struct sg_record *rec, enum sg_plot_format fmt,
                             const char *path, struct sg_error *err);

/* File name extension for a format ("png", "svg", "pdf"). */
const char *sg_plot_extension(enum sg_plot_format fmt);

#endif
