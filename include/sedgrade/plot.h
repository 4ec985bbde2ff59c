/* plot.h - the grading curve drawn with cairo: one drawing path for PNG, SVG
 * and PDF. Also the calibration charts of the register (a straight-line fit
 * with its residuals) and the font check the install step relies on.
 *
 * The grading chart (fixed layout, 720 x 450 pt; PNG at 2 px per pt):
 *  - x: particle diameter in mm on a log10 axis, FINE SIZES ON THE LEFT
 *    (diameter increasing to the right, as on ISO 17892-4 / BS 1377 charts;
 *    sg_plot_options.coarse_left mirrors it), 0.001-100 mm widened by whole
 *    decades to hold every point; ticks and gridlines at 1, 2 and 5 per
 *    decade with plain decimal labels, faint lines at the other integers;
 *  - y: percent finer by mass, 0-100, gridlines every 10;
 *  - along the top, the size fractions of the record's system: ISO 14688-1
 *    (clay/silt/sand/gravel/cobbles, fine/medium/coarse) by default, ASTM
 *    D2487 (USCS) when the record's standard is astm-d7928 (axis.h);
 *  - sieve points as filled squares, fine-sieve points (the specimen sieved
 *    after sedimentation) as diamonds, hydrometer points as circles, pipette
 *    points as triangles; a point not used for the curve (on_curve false,
 *    e.g. a sedimentation point coarser than the finest sieve) is drawn
 *    hollow; a point with a QC finding of its own (Reynolds, Brownian,
 *    temperature, not falling...) is ringed;
 *  - the interpolated curve (res->curve, its own interpolation method);
 *  - D10, D30 and D60, when determined, with thin dashed drop lines and
 *    labels; with Monte Carlo results a whisker shows each one's 95 %
 *    interval (low95-high95);
 *  - the 95 % band when points carry a finite percent_finer_u: a shaded
 *    polygon through percent_finer -/+ 1.96 u at the points on the curve
 *    (normal coverage factor, JCGM 100:2008 Table G.1), clipped to 0-100 %;
 *  - a side panel with the legend, D-values, Cu, Cc, fractions and the
 *    USDA texture.
 * Colours are chosen to stay distinct in grey print: shapes, not hues,
 * tell the sources apart. Text uses the DejaVu Sans font (Debian package
 * fonts-dejavu-core) through cairo's toy font API. */
#ifndef SEDGRADE_PLOT_H
#define SEDGRADE_PLOT_H

#include <stdbool.h>
#include <stddef.h>

#include "sedgrade/axis.h"
#include "sedgrade/error.h"
#include "sedgrade/record.h"
#include "sedgrade/result.h"

enum sg_plot_format { SG_PLOT_PNG = 0, SG_PLOT_SVG, SG_PLOT_PDF };

/* Size of a grading chart, pt (1/72 in), and of its PNG, px per pt. */
#define SG_PLOT_WIDTH_PT 720.0
#define SG_PLOT_HEIGHT_PT 450.0
#define SG_PLOT_PNG_PX_PER_PT 2.0

/* Size of a calibration chart, pt. */
#define SG_PLOT_FIT_WIDTH_PT 600.0
#define SG_PLOT_FIT_HEIGHT_PT 450.0

/* The font every chart and report asks for, and the Debian package that
 * provides it. */
#define SG_PLOT_FONT_FAMILY "DejaVu Sans"
#define SG_PLOT_FONT_PACKAGE "fonts-dejavu-core"

/* Coverage factor for the drawn 95 % band from a standard uncertainty,
 * normal distribution (JCGM 100:2008 Table G.1: k = 1.960 for 95 %; the
 * standard normal 97.5 % quantile). */
#define SG_PLOT_K95 1.96

struct sg_plot_options {
    bool coarse_left;         /* false (default): fine sizes on the left */
    bool auto_bands;          /* true (default): bands by the record's standard */
    enum sg_axis_bands bands; /* used when auto_bands is false */
};

/* Defaults: fine sizes on the left, bands chosen by the record's standard. */
struct sg_plot_options sg_plot_options_default(void);

/* Draws res (points, curve, D-values, fraction bands, and the Monte Carlo
 * band when points carry percent_finer_u) into path in format fmt, written
 * atomically (nothing is left at path on failure). rec gives the title
 * line (method, date, standard) and the fraction system; it may be NULL
 * (ISO 14688-1 bands, no method line). A PDF's creation date is the
 * test date (reproducible files). SG_EINVAL for a NULL res or path or an
 * unknown format; SG_EIO when the file cannot be written; SG_ENOMEM. */
enum sg_status sg_plot_write(const struct sg_result *res, const struct sg_record *rec, enum sg_plot_format fmt,
                             const char *path, struct sg_error *err);

/* sg_plot_write with options (opt NULL: defaults). */
enum sg_status sg_plot_write_opts(const struct sg_result *res, const struct sg_record *rec,
                                  const struct sg_plot_options *opt, enum sg_plot_format fmt, const char *path,
                                  struct sg_error *err);

/* File name extension for a format ("png", "svg", "pdf"); "" if unknown. */
const char *sg_plot_extension(enum sg_plot_format fmt);

/* Parses "png", "svg" or "pdf" (exact, lower case). SG_EINVAL otherwise,
 * naming the text and the choices. */
enum sg_status sg_plot_format_parse(const char *text, enum sg_plot_format *fmt, struct sg_error *err);

/* A straight-line calibration fit y = c0 + c1 x over n observations, for
 * the register's charts: effective depth against reading, composite
 * correction against temperature, and the like. Strings are UTF-8; labels
 * carry their units ("reading (g/L)", "effective depth H (mm)"). */
struct sg_plot_fit {
    const char *title;          /* e.g. "RML-H152-01 effective depth, 2026-09-30" */
    const char *note;           /* optional second line (fit statistics); may be NULL */
    const char *x_label;
    const char *y_label;
    const char *residual_label; /* residual axis; NULL: "residual" */
    const double *xs, *ys;      /* n observations */
    size_t n;
    double c0, c1;              /* the fitted line */
    bool residuals;             /* draw a residual panel (y - fit) under the fit */
    const char *line_label;     /* caption of the line; NULL: "fit: y = c0 + c1 x (n = ...)" */
    const char *create_date;    /* PDF creation date "YYYY-MM-DD" (the calibration date); NULL: 2000-01-01 */
};

/* Draws the observations, the fitted line (with its equation) and, when
 * asked, the residuals, into path (600 x 450 pt; PNG at 2 px per pt).
 * SG_EINVAL for NULL arguments, n < 1, non-finite observations or
 * coefficients; SG_EIO when the file cannot be written; SG_ENOMEM. */
enum sg_status sg_plot_fit_write(const struct sg_plot_fit *fit, enum sg_plot_format fmt, const char *path,
                                 struct sg_error *err);

/* Resolves the font charts use and writes the family fontconfig chose into
 * family (size bytes). SG_ENOTFOUND when it is not DejaVu Sans (cairo would
 * fall back to another face): the message names the package to install. */
enum sg_status sg_plot_font_check(char *family, size_t size, struct sg_error *err);

/* Releases cairo's and fontconfig's process-wide caches (call once at the
 * end of the program, after every chart and report is written, from one
 * thread; it makes leak checkers quiet). */
void sg_plot_cleanup(void);

#endif
