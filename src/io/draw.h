/* draw.h - cairo drawing shared by plots, reports and calibration charts
 * (private to src/io): documents written through the atomic writer, text,
 * markers, the grading chart and the fit chart. */
#ifndef SEDGRADE_IO_DRAW_H
#define SEDGRADE_IO_DRAW_H

#include <cairo.h>
#include <stdbool.h>

#include "sedgrade/atomic.h"
#include "sedgrade/axis.h"
#include "sedgrade/error.h"
#include "sedgrade/plot.h"
#include "sedgrade/record.h"
#include "sedgrade/result.h"

/* One output document: a cairo surface writing into an atomic file. */
struct sg_draw_doc {
    enum sg_plot_format fmt;
    cairo_surface_t *surface;
    cairo_t *cr;
    struct sg_atomic_file af;
    bool opened;
    /* SVG is drawn into memory first, to number its surfaces from 1 (cairo
     * numbers them per process, which would make files differ run to run) */
    FILE *svg_mem;
    char *svg_buf;
    size_t svg_len;
};

/* PDF metadata (ignored for PNG and SVG). create_date "YYYY-MM-DD" or NULL. */
struct sg_draw_meta {
    const char *title;
    const char *subject;
    const char *create_date;
};

/* Opens path for writing and a surface of width x height pt in fmt (PNG:
 * SG_PLOT_PNG_PX_PER_PT px per pt), painted white; d->cr draws in pt.
 * On failure nothing is left open. */
enum sg_status sg_draw_open(struct sg_draw_doc *d, enum sg_plot_format fmt, double width_pt, double height_pt,
                            const struct sg_draw_meta *meta, const char *path, struct sg_error *err);

/* Finishes the drawing, writes it and renames the file into place; on any
 * cairo or write error the temporary file is removed. Always releases d. */
enum sg_status sg_draw_close(struct sg_draw_doc *d, struct sg_error *err);

/* Drops the document and its temporary file. Accepts a failed open. */
void sg_draw_abort(struct sg_draw_doc *d);

/* Status for a cairo error (memory -> SG_ENOMEM, else SG_EIO), with the
 * path in the message. */
enum sg_status sg_draw_cairo_error(cairo_status_t cs, const char *path, struct sg_error *err);

/* Text in SG_PLOT_FONT_FAMILY at size pt. */
void sg_draw_font(cairo_t *cr, double size_pt, bool bold);
double sg_draw_text_width(cairo_t *cr, const char *s);
/* Draws s with its baseline at y; align 0 puts x at the left end, 0.5 in
 * the middle, 1 at the right end. */
void sg_draw_text(cairo_t *cr, double x, double y, double align, const char *s);
/* As sg_draw_text, but cuts s with an ellipsis to fit max_w. */
void sg_draw_text_fit(cairo_t *cr, double x, double y, double max_w, double align, const char *s);

/* Word-wraps s into lines of at most max_w pt, the first baseline at y,
 * then every leading pt; at most max_lines lines (the last cut with an
 * ellipsis when text remains). draw false only measures. Returns the number
 * of lines (0 for an empty s). */
int sg_draw_text_wrap(cairo_t *cr, double x, double y, double max_w, double leading, int max_lines, bool draw,
                      const char *s);

void sg_draw_rgb(cairo_t *cr, const double rgb[3]);

enum sg_draw_marker { SG_MARK_SQUARE = 0, SG_MARK_DIAMOND, SG_MARK_CIRCLE, SG_MARK_TRIANGLE };

/* The marker of each source: sieve square, fine sieve diamond, hydrometer
 * circle, pipette triangle. */
enum sg_draw_marker sg_draw_marker_for(enum sg_source s);
/* Colour of each source's markers. */
const double *sg_draw_colour_for(enum sg_source s);
/* Draws a marker of about size pt centred at (x, y); hollow: white inside. */
void sg_draw_marker(cairo_t *cr, enum sg_draw_marker m, double x, double y, double size, bool hollow,
                    const double rgb[3]);

struct sg_draw_chart_opts {
    bool coarse_left;
    enum sg_axis_bands bands;
    bool title;      /* title and subtitle lines at the top */
    bool side_panel; /* legend and key results at the right */
};

/* Draws the grading chart of res into the box (x, y, w, h), pt. rec may be
 * NULL. Drawing cannot fail for valid input; points that cannot be placed
 * (non-positive diameters) are skipped. */
void sg_draw_grading_chart(cairo_t *cr, double x, double y, double w, double h, const struct sg_result *res,
                           const struct sg_record *rec, const struct sg_draw_chart_opts *o);

/* Draws a straight-line fit chart (and its residual panel) into the box. */
void sg_draw_fit_chart(cairo_t *cr, double x, double y, double w, double h, const struct sg_plot_fit *fit);

/* Reads "YYYY-MM-DD" dates as PDF dates "YYYY-MM-DDT00:00:00Z" into buf
 * (>= 24 bytes); a missing or malformed date gives 2000-01-01. */
/* A categorical quantity's text, with the Monte Carlo probability of its
 * class in whole percent when res holds it ("silty clay loam (p = 72 %)"; a
 * probability under 0.5 % or from 99.5 % to under 100 % reads "< 1 %" or
 * "> 99 %", never 0 or 100 unless it is). */
void sg_draw_class_text(const struct sg_result *res, const struct sg_quantity *q, char *buf, size_t size);

void sg_draw_pdf_date(const char *date, char *buf, size_t size);

#endif
