/* plot.c - PLACEHOLDER until the plotting module lands. */
#include "sedgrade/plot.h"

enum sg_status sg_plot_write(const struct sg_result *res, const struct sg_record *rec, enum sg_plot_format fmt,
                             const char *path, struct sg_error *err)
{
    (void)res;
    (void)rec;
    (void)fmt;
    return sg_error_set(err, SG_EINVAL, 0, 0, "'%s': plotting is not available in this build", path);
}

const char *sg_plot_extension(enum sg_plot_format fmt)
{
    switch (fmt) {
    case SG_PLOT_PNG: return "png";
    case SG_PLOT_SVG: return "svg";
    case SG_PLOT_PDF: return "pdf";
    }
    return "";
}
