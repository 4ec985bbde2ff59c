/* axis.h - the geometry of a grading chart without any drawing: particle
 * diameter (mm) on a log10 axis, percent finer on a linear axis, tick values
 * and their labels, "nice" linear ticks for calibration charts, the
 * size-fraction bands drawn along the top of the chart, and number
 * formatting for labels and report tables. Pure functions, no I/O. */
#ifndef SEDGRADE_AXIS_H
#define SEDGRADE_AXIS_H

#include <stdbool.h>
#include <stddef.h>

#include "sedgrade/error.h"
#include "sedgrade/record.h"

/* Default diameter range of a grading chart, mm: 0.001 to 100 mm, five
 * decades from clay to coarse gravel (common practice for grading charts). A
 * chart is widened by whole decades when points lie outside it. */
#define SG_AXIS_DEFAULT_LO_MM 0.001
#define SG_AXIS_DEFAULT_HI_MM 100.0

/* Limits of a diameter axis, mm: 1e-6 mm (1 nm) to 1e4 mm (10 m); no soil
 * test reports sizes outside them (common practice). */
#define SG_AXIS_MIN_MM 1e-6
#define SG_AXIS_MAX_MM 1e4

/* A log10 diameter axis mapped onto device coordinates: lo_mm lands on
 * x_fine and hi_mm on x_coarse. x_fine < x_coarse puts fine sizes on the
 * left (sedgrade's default); x_fine > x_coarse mirrors the axis. */
struct sg_axis_log {
    double lo_mm, hi_mm;     /* 0 < lo_mm < hi_mm */
    double x_fine, x_coarse; /* device coordinates of lo_mm and hi_mm; must differ */
};

/* Device x of diameter d_mm (linear in log10 d; values outside [lo, hi]
 * map outside [x_fine, x_coarse]). NaN when d_mm is not a positive finite
 * number or the axis is degenerate. */
double sg_axis_log_x(const struct sg_axis_log *a, double d_mm);

/* Diameter, mm, at device x (inverse of sg_axis_log_x); NaN for a
 * degenerate axis or non-finite x. */
double sg_axis_log_d(const struct sg_axis_log *a, double x);

/* A linear axis: value lo lands on device p_lo and hi on p_hi (for a
 * percent axis drawn upwards on a y-down device, p_lo > p_hi). */
struct sg_axis_lin {
    double lo, hi;     /* lo != hi */
    double p_lo, p_hi; /* device coordinates of lo and hi */
};

/* Device coordinate of v; NaN for a degenerate axis or non-finite v. */
double sg_axis_lin_map(const struct sg_axis_lin *a, double v);

/* Value at device coordinate p (inverse of sg_axis_lin_map). */
double sg_axis_lin_value(const struct sg_axis_lin *a, double p);

/* The diameter range of a chart: the default 0.001-100 mm widened by whole
 * decades to hold [dmin_mm, dmax_mm]. Either bound may be NaN (no data:
 * that side keeps its default). SG_EINVAL when a given bound is not
 * positive and finite, when dmin_mm > dmax_mm, or when the data lie outside
 * SG_AXIS_MIN_MM..SG_AXIS_MAX_MM. */
enum sg_status sg_axis_log_range(double dmin_mm, double dmax_mm, double *lo_mm, double *hi_mm,
                                 struct sg_error *err);

#define SG_AXIS_LABEL_MAX 24

/* One tick: its value, whether it is a major tick (decade, or a labelled
 * step on a linear axis), and its label text. */
struct sg_axis_tick {
    double value;
    bool major;
    char label[SG_AXIS_LABEL_MAX];
};

/* Ticks of a log10 axis at 1, 2 and 5 times each power of ten within
 * [lo_mm, hi_mm] (inclusive, with a relative tolerance of 1e-9), in
 * increasing order; powers of ten are major. Labels are plain decimals
 * ("0.001", "0.002", "0.005", "0.01", ..., "1", "2", "100"), never
 * exponents. Writes at most cap ticks to out and the count to *n.
 * SG_EINVAL for a range that is not 0 < lo < hi within
 * SG_AXIS_MIN_MM..SG_AXIS_MAX_MM; SG_ELIMIT when more than cap ticks would
 * be needed (nothing useful is in out then). */
enum sg_status sg_axis_log_ticks(double lo_mm, double hi_mm, struct sg_axis_tick *out, size_t cap, size_t *n,
                                 struct sg_error *err);

/* Widens [lo, hi] to a "nice" range for a linear axis with about
 * max_ticks intervals: the step is 1, 2 or 5 times a power of ten and the
 * ends are multiples of it. A zero-width range (lo == hi) is widened around
 * the value. Outputs the new ends and the step. SG_EINVAL for non-finite
 * input, lo > hi or max_ticks < 1. */
enum sg_status sg_axis_nice_range(double lo, double hi, unsigned max_ticks, double *nice_lo, double *nice_hi,
                                  double *step, struct sg_error *err);

/* Ticks of a linear axis from lo to hi (inclusive, tolerance 1e-9 of the
 * step) every step, all major, labelled with as many decimals as the step
 * needs ("0", "0.5", "1", ... or "10", "20"). SG_EINVAL for non-finite
 * input, lo > hi or a step that is not positive; SG_ELIMIT when more than
 * cap ticks would be needed. */
enum sg_status sg_axis_lin_ticks(double lo, double hi, double step, struct sg_axis_tick *out, size_t cap,
                                 size_t *n, struct sg_error *err);

/* Size-fraction systems that can be drawn along the top of a chart. */
enum sg_axis_bands {
    SG_BANDS_ISO14688 = 0, /* ISO 14688-1: clay, silt, sand, gravel, cobbles, boulders (METHODS.md 8.1) */
    SG_BANDS_USCS          /* ASTM D2487: fines, sand, gravel, cobbles, boulders (METHODS.md 8.2) */
};

/* One band: the sizes from lo_mm to hi_mm (lo_mm 0: everything finer;
 * hi_mm INFINITY: everything coarser). tier 0 is a main fraction (one row),
 * tier 1 its subdivision (fine/medium/coarse, a second row). */
struct sg_axis_band {
    double lo_mm, hi_mm;
    int tier;
    const char *name;   /* "Silt", "fine" */
    const char *symbol; /* short form when the name does not fit: "Si", "F" */
};

/* The bands of a system, main fractions first in increasing size, then the
 * subdivisions in increasing size; *n receives the count. The array is
 * static and read-only. An unknown system gives ISO 14688-1. */
const struct sg_axis_band *sg_axis_bands_get(enum sg_axis_bands sys, size_t *n);

/* The system a record's `standard` selects: astm-d7928 -> USCS (ASTM
 * D2487), everything else (none, bs1377-2, iso17892-4) -> ISO 14688-1,
 * which BS 5930:2015 also uses. */
enum sg_axis_bands sg_axis_bands_for_standard(enum sg_standard std);

/* Name of a system for captions: "ISO 14688-1", "ASTM D2487 (USCS)". */
const char *sg_axis_bands_name(enum sg_axis_bands sys);

/* Formats v with sig significant digits (1-15) in plain decimal notation,
 * never an exponent, for values from 1e-9 to 1e12 ("0.0004213",
 * "0.04213", "63.00", "1234"); larger or smaller magnitudes fall back to
 * %g. Non-finite v gives "". No "-0". buf must hold size bytes (>= 2). */
void sg_axis_format_sig(double v, int sig, char *buf, size_t size);

/* Formats v with a fixed number of decimals (0-12) ("12.3" for one); ""
 * for non-finite v; no "-0". */
void sg_axis_format_fixed(double v, int decimals, char *buf, size_t size);

#endif
