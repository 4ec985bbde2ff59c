/* plot.c - grading charts and calibration charts written as PNG, SVG or PDF
 * (one drawing path, draw.c), and the font check. */
#include "sedgrade/plot.h"

#include <cairo-ft.h>
#include <fontconfig/fontconfig.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "io/draw.h"

struct sg_plot_options sg_plot_options_default(void)
{
    return (struct sg_plot_options){.coarse_left = false, .auto_bands = true, .bands = SG_BANDS_ISO14688};
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

enum sg_status sg_plot_format_parse(const char *text, enum sg_plot_format *fmt, struct sg_error *err)
{
    static const enum sg_plot_format all[] = {SG_PLOT_PNG, SG_PLOT_SVG, SG_PLOT_PDF};
    for (size_t i = 0; text != NULL && i < sizeof all / sizeof all[0]; i++) {
        if (strcmp(text, sg_plot_extension(all[i])) == 0) {
            *fmt = all[i];
            return SG_OK;
        }
    }
    return sg_error_set(err, SG_EINVAL, 0, 0, "unknown picture format '%s' (use png, svg or pdf)",
                        text ? text : "");
}

enum sg_status sg_plot_write_opts(const struct sg_result *res, const struct sg_record *rec,
                                  const struct sg_plot_options *opt, enum sg_plot_format fmt, const char *path,
                                  struct sg_error *err)
{
    if (res == NULL || path == NULL)
        return sg_error_set(err, SG_EINVAL, 0, 0, "no result or no path to plot (internal error)");
    const struct sg_plot_options def = sg_plot_options_default();
    if (opt == NULL)
        opt = &def;
    char title[128], date[11] = "";
    (void)snprintf(title, sizeof title, "Grading curve - %s", res->id);
    if (rec != NULL && sg_date_is_set(rec->date))
        sg_date_format(rec->date, date);
    const struct sg_draw_meta meta = {title, "particle size distribution", date[0] ? date : NULL};
    struct sg_draw_doc doc;
    enum sg_status st = sg_draw_open(&doc, fmt, SG_PLOT_WIDTH_PT, SG_PLOT_HEIGHT_PT, &meta, path, err);
    if (st != SG_OK)
        return st;
    const struct sg_draw_chart_opts co = {
        .coarse_left = opt->coarse_left,
        .bands = opt->auto_bands ? sg_axis_bands_for_standard(rec ? rec->standard : SG_STANDARD_NONE) : opt->bands,
        .title = true,
        .side_panel = true,
    };
    /* 18 pt margins all round */
    sg_draw_grading_chart(doc.cr, 18.0, 14.0, SG_PLOT_WIDTH_PT - 30.0, SG_PLOT_HEIGHT_PT - 22.0, res, rec, &co);
    return sg_draw_close(&doc, err);
}

enum sg_status sg_plot_write(const struct sg_result *res, const struct sg_record *rec, enum sg_plot_format fmt,
                             const char *path, struct sg_error *err)
{
    return sg_plot_write_opts(res, rec, NULL, fmt, path, err);
}

enum sg_status sg_plot_fit_write(const struct sg_plot_fit *fit, enum sg_plot_format fmt, const char *path,
                                 struct sg_error *err)
{
    if (fit == NULL || path == NULL || fit->xs == NULL || fit->ys == NULL)
        return sg_error_set(err, SG_EINVAL, 0, 0, "no calibration data or no path to plot (internal error)");
    if (fit->n < 1)
        return sg_error_set(err, SG_EINVAL, 0, 0, "'%s': no observations to plot (record at least one)", path);
    if (!isfinite(fit->c0) || !isfinite(fit->c1))
        return sg_error_set(err, SG_EINVAL, 0, 0, "'%s': fitted line %g + %g x is not finite (refit the calibration)",
                            path, fit->c0, fit->c1);
    for (size_t i = 0; i < fit->n; i++)
        if (!isfinite(fit->xs[i]) || !isfinite(fit->ys[i]))
            return sg_error_set(err, SG_EINVAL, 0, 0,
                                "'%s': observation %zu (%g, %g) is not finite (check the register entry)", path,
                                i + 1, fit->xs[i], fit->ys[i]);
    const struct sg_draw_meta meta = {fit->title, "calibration", fit->create_date};
    struct sg_draw_doc doc;
    enum sg_status st = sg_draw_open(&doc, fmt, SG_PLOT_FIT_WIDTH_PT, SG_PLOT_FIT_HEIGHT_PT, &meta, path, err);
    if (st != SG_OK)
        return st;
    sg_draw_fit_chart(doc.cr, 18.0, 14.0, SG_PLOT_FIT_WIDTH_PT - 36.0, SG_PLOT_FIT_HEIGHT_PT - 22.0, fit);
    return sg_draw_close(&doc, err);
}

enum sg_status sg_plot_font_check(char *family, size_t size, struct sg_error *err)
{
    if (size > 0)
        family[0] = '\0';
    cairo_surface_t *s = cairo_image_surface_create(CAIRO_FORMAT_RGB24, 1, 1);
    cairo_t *cr = cairo_create(s);
    cairo_select_font_face(cr, SG_PLOT_FONT_FAMILY, CAIRO_FONT_SLANT_NORMAL, CAIRO_FONT_WEIGHT_NORMAL);
    cairo_set_font_size(cr, 10.0);
    cairo_scaled_font_t *sf = cairo_get_scaled_font(cr);
    char got[128] = "";
    if (cairo_scaled_font_status(sf) == CAIRO_STATUS_SUCCESS && cairo_scaled_font_get_type(sf) == CAIRO_FONT_TYPE_FT) {
        FT_Face face = cairo_ft_scaled_font_lock_face(sf);
        if (face != NULL && face->family_name != NULL)
            (void)snprintf(got, sizeof got, "%s", face->family_name);
        cairo_ft_scaled_font_unlock_face(sf);
    }
    cairo_destroy(cr);
    cairo_surface_destroy(s);
    if (size > 0)
        (void)snprintf(family, size, "%s", got);
    if (strcmp(got, SG_PLOT_FONT_FAMILY) != 0)
        return sg_error_set(err, SG_ENOTFOUND, 0, 0,
                            "font '%s' not found, pictures would use '%s' (install the %s package)",
                            SG_PLOT_FONT_FAMILY, got[0] ? got : "a built-in fallback", SG_PLOT_FONT_PACKAGE);
    return SG_OK;
}

void sg_plot_cleanup(void)
{
    cairo_debug_reset_static_data();
    FcFini();
}
