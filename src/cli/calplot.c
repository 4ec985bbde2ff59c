/* calplot.c - calibration charts for `sedgrade cal show|fit --plot`. */
#include "cli/calplot.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "cli/cli.h"

/* Axis labels of each part (calib.h: what x and y hold). */
static void labels(const struct sg_cal_result *r, const char **x, const char **y, const char **res)
{
    switch (r->part) {
    case SG_CAL_PART_DEPTH:
        *x = "reading (scale units)";
        *y = r->has_intercept ? "effective depth H (mm)" : "neck to graduation (mm)";
        *res = "residual (mm)";
        return;
    case SG_CAL_PART_MENISCUS:
        *x = "reading at the top of the meniscus (scale units)";
        *y = "meniscus correction (scale units)";
        *res = "residual (scale units)";
        return;
    case SG_CAL_PART_BLANK:
        *x = "temperature (\xc2\xb0" "C)";
        *y = "blank (composite) reading (scale units)";
        *res = "residual (scale units)";
        return;
    case SG_CAL_PART_SCALE:
        *x = "reference (scale units)";
        *y = "hydrometer reading (scale units)";
        *res = "scale error (scale units)";
        return;
    case SG_CAL_PART_AREA:
        *x = "graduation (mL)";
        *y = "height above datum (mm)";
        *res = "residual (mm)";
        return;
    case SG_CAL_PART_VOLUME:
        *x = "water delivered (g)";
        *y = "volume (mL)";
        *res = "residual (mL)";
        return;
    case SG_CAL_PART_OFFSET:
    case SG_CAL_PART_COUNT: break;
    }
    *x = "reference temperature (\xc2\xb0" "C)";
    *y = "correction (\xc2\xb0" "C)";
    *res = "residual (\xc2\xb0" "C)";
}

/* The straight line through the fitted values y - residual (least squares,
 * exact when they lie on a line; a constant when x does not vary). */
static void line_of(const struct sg_cal_result *r, double *c0, double *c1)
{
    double mx = 0.0, mf = 0.0;
    for (size_t i = 0; i < r->n; i++) {
        mx += r->x[i];
        mf += r->y[i] - r->residual[i];
    }
    mx /= (double)r->n;
    mf /= (double)r->n;
    double sxx = 0.0, sxf = 0.0;
    for (size_t i = 0; i < r->n; i++) {
        sxx += (r->x[i] - mx) * (r->x[i] - mx);
        sxf += (r->x[i] - mx) * (r->y[i] - r->residual[i] - mf);
    }
    *c1 = sxx > 0.0 ? sxf / sxx : 0.0;
    *c0 = mf - *c1 * mx;
}

int sg_cli_cal_plot(const struct sg_cal_instrument *ins, size_t i, const struct sg_cal_result *res,
                    enum sg_plot_format fmt, const char *out_dir)
{
    if (res->n < 1)
        return SG_EXIT_OK; /* nothing observed: nothing to draw */
    char label[96], name[128], path[4096], title[200], note[400], date[11];
    sg_cal_entry_label(ins, i, label, sizeof label);
    for (char *p = label; *p; p++)
        if (*p == '@' || *p == '#' || *p == '/')
            *p = '_';
    const char *part = sg_cal_part_name(res->part);
    (void)snprintf(name, sizeof name, "%s.%s.%s", label, part, sg_plot_extension(fmt));
    if (snprintf(path, sizeof path, "%s/%s", out_dir, name) >= (int)sizeof path) {
        sg_cli_errorf("'%s': output path too long", name);
        return SG_EXIT_IO;
    }
    sg_date_format(ins->events[i].date, date);
    (void)snprintf(title, sizeof title, "%s \xe2\x80\x94 %s, %s %s", ins->id, part,
                   sg_cal_event_type_name(ins->events[i].type), date);
    (void)snprintf(note, sizeof note, "%s", res->decision);
    const char *xl, *yl, *rl;
    labels(res, &xl, &yl, &rl);
    struct sg_plot_fit f = {
        .title = title,
        .note = note,
        .x_label = xl,
        .y_label = yl,
        .residual_label = rl,
        .xs = res->x,
        .ys = res->y,
        .n = res->n,
        .residuals = true,
        .create_date = date,
    };
    line_of(res, &f.c0, &f.c1);
    char caption[96];
    if (res->part == SG_CAL_PART_SCALE) {
        f.line_label = "line: reading = reference";
    } else if (res->part == SG_CAL_PART_MENISCUS || res->part == SG_CAL_PART_VOLUME ||
               res->part == SG_CAL_PART_OFFSET) {
        (void)snprintf(caption, sizeof caption, "mean = %.5g", res->value);
        f.line_label = caption;
    }
    struct sg_error err;
    const enum sg_status st = sg_plot_fit_write(&f, fmt, path, &err);
    if (st != SG_OK) {
        sg_cli_report(NULL, &err);
        return sg_cli_exit_for(st);
    }
    printf("  chart: %s\n", path);
    return SG_EXIT_OK;
}
