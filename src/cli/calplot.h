/* calplot.h - `sedgrade cal show|fit --plot FORMAT`: a chart of each part of a
 * calibration entry (observations, the fitted line or mean, residuals),
 * drawn by plot.h's sg_plot_fit_write. */
#ifndef SEDGRADE_CLI_CALPLOT_H
#define SEDGRADE_CLI_CALPLOT_H

#include <stdbool.h>
#include <stddef.h>

#include "sedgrade/calib.h"
#include "sedgrade/plot.h"

/* Writes the chart of res (part res->part of entry i of ins) into out_dir
 * as "<label>.<part>.<ext>" (label from sg_cal_entry_label, '@' and '#'
 * written '_'), and prints "  chart: <path>" to stdout. The line drawn is
 * the one the residuals are taken from (fit, mean, or reading = reference
 * for a scale check). Returns the exit status: SG_EXIT_OK, or, with the
 * problem printed to stderr, SG_EXIT_IO when the file cannot be written
 * (the status of sg_cli_exit_for). */
int sg_cli_cal_plot(const struct sg_cal_instrument *ins, size_t i, const struct sg_cal_result *res,
                     enum sg_plot_format fmt, const char *out_dir);

#endif
