/* axis.c - chart geometry without drawing: log10 diameter axis, linear
 * percent axis, ticks and labels, size-fraction bands, label numbers. */
#include "sedgrade/axis.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Tolerance on log10 values and tick positions, so that 0.001 (whose log10
 * may round to -2.9999999999999996) counts as a whole decade. */
#define AXIS_LOG_TOL 1e-9

/* Decimal places that are never needed on a chart or in a report. */
#define AXIS_MAX_DECIMALS 12

/* Power of ten 10^k for an integer k, as the nearest double to the decimal
 * literal (10^-3 computed as 1/1000 rounds exactly like 0.001). */
static double pow10i(int k)
{
    double p = 1.0;
    for (int i = 0; i < abs(k); i++)
        p *= 10.0;
    return k < 0 ? 1.0 / p : p;
}

double sg_axis_log_x(const struct sg_axis_log *a, double d_mm)
{
    if (!(d_mm > 0.0) || !isfinite(d_mm) || !(a->lo_mm > 0.0) || !(a->hi_mm > a->lo_mm) ||
        a->x_fine == a->x_coarse)
        return (double)NAN;
    const double l0 = log10(a->lo_mm);
    const double t = (log10(d_mm) - l0) / (log10(a->hi_mm) - l0);
    return a->x_fine + t * (a->x_coarse - a->x_fine);
}

double sg_axis_log_d(const struct sg_axis_log *a, double x)
{
    if (!isfinite(x) || !(a->lo_mm > 0.0) || !(a->hi_mm > a->lo_mm) || a->x_fine == a->x_coarse)
        return (double)NAN;
    const double l0 = log10(a->lo_mm);
    const double t = (x - a->x_fine) / (a->x_coarse - a->x_fine);
    return pow(10.0, l0 + t * (log10(a->hi_mm) - l0));
}

double sg_axis_lin_map(const struct sg_axis_lin *a, double v)
{
    if (!isfinite(v) || a->lo == a->hi)
        return (double)NAN;
    return a->p_lo + (v - a->lo) / (a->hi - a->lo) * (a->p_hi - a->p_lo);
}

double sg_axis_lin_value(const struct sg_axis_lin *a, double p)
{
    if (!isfinite(p) || a->p_lo == a->p_hi)
        return (double)NAN;
    return a->lo + (p - a->p_lo) / (a->p_hi - a->p_lo) * (a->hi - a->lo);
}

static bool in_limits(double d)
{
    return d >= SG_AXIS_MIN_MM * (1.0 - AXIS_LOG_TOL) && d <= SG_AXIS_MAX_MM * (1.0 + AXIS_LOG_TOL);
}

enum sg_status sg_axis_log_range(double dmin_mm, double dmax_mm, double *lo_mm, double *hi_mm,
                                 struct sg_error *err)
{
    const bool has_min = !isnan(dmin_mm), has_max = !isnan(dmax_mm);
    if ((has_min && (!(dmin_mm > 0.0) || !isfinite(dmin_mm))) ||
        (has_max && (!(dmax_mm > 0.0) || !isfinite(dmax_mm))))
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "diameter range %g-%g mm is not positive and finite (give positive sizes in mm)",
                            dmin_mm, dmax_mm);
    if (has_min && has_max && dmin_mm > dmax_mm)
        return sg_error_set(err, SG_EINVAL, 0, 0, "diameter range %g-%g mm is reversed (give the finer size first)",
                            dmin_mm, dmax_mm);
    if ((has_min && !in_limits(dmin_mm)) || (has_max && !in_limits(dmax_mm)))
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "diameter range %g-%g mm lies outside %g-%g mm (check the units: sizes are in mm)",
                            dmin_mm, dmax_mm, SG_AXIS_MIN_MM, SG_AXIS_MAX_MM);
    double lo = SG_AXIS_DEFAULT_LO_MM, hi = SG_AXIS_DEFAULT_HI_MM;
    if (has_min && dmin_mm < lo)
        lo = pow10i((int)floor(log10(dmin_mm) + AXIS_LOG_TOL));
    if (has_max && dmax_mm > hi)
        hi = pow10i((int)ceil(log10(dmax_mm) - AXIS_LOG_TOL));
    *lo_mm = lo;
    *hi_mm = hi;
    return SG_OK;
}

/* Fixed-point text without "-0": a negative sign is dropped when every
 * printed digit is zero. */
static void fixed(double v, int decimals, char *buf, size_t size)
{
    (void)snprintf(buf, size, "%.*f", decimals, v);
    if (buf[0] == '-' && strspn(buf + 1, "0.") == strlen(buf + 1))
        memmove(buf, buf + 1, strlen(buf));
}

enum sg_status sg_axis_log_ticks(double lo_mm, double hi_mm, struct sg_axis_tick *out, size_t cap, size_t *n,
                                 struct sg_error *err)
{
    static const int mantissa[] = {1, 2, 5};
    *n = 0;
    if (!(lo_mm > 0.0) || !(hi_mm > lo_mm) || !isfinite(hi_mm) || !in_limits(lo_mm) || !in_limits(hi_mm))
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "diameter axis %g-%g mm is not a range within %g-%g mm (give 0 < low < high)", lo_mm,
                            hi_mm, SG_AXIS_MIN_MM, SG_AXIS_MAX_MM);
    const int k0 = (int)floor(log10(lo_mm) + AXIS_LOG_TOL);
    const int k1 = (int)ceil(log10(hi_mm) - AXIS_LOG_TOL);
    size_t count = 0;
    for (int k = k0; k <= k1; k++) {
        for (size_t m = 0; m < sizeof mantissa / sizeof mantissa[0]; m++) {
            /* m * 10^k computed as m / 10^-k for k < 0 so that 2e-3 prints as 0.002 */
            const double v = k < 0 ? mantissa[m] / pow10i(-k) : mantissa[m] * pow10i(k);
            if (v < lo_mm * (1.0 - AXIS_LOG_TOL) || v > hi_mm * (1.0 + AXIS_LOG_TOL))
                continue;
            if (count >= cap)
                return sg_error_set(err, SG_ELIMIT, 0, 0,
                                    "diameter axis %g-%g mm needs more than %zu ticks (give a narrower range)",
                                    lo_mm, hi_mm, cap);
            out[count].value = v;
            out[count].major = mantissa[m] == 1;
            fixed(v, k < 0 ? -k : 0, out[count].label, sizeof out[count].label);
            count++;
        }
    }
    *n = count;
    return SG_OK;
}

enum sg_status sg_axis_nice_range(double lo, double hi, unsigned max_ticks, double *nice_lo, double *nice_hi,
                                  double *step, struct sg_error *err)
{
    if (!isfinite(lo) || !isfinite(hi) || lo > hi || max_ticks < 1)
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "axis range %g to %g with %u ticks cannot be scaled (give finite low <= high and "
                            "at least one tick)",
                            lo, hi, max_ticks);
    if (lo == hi) {
        /* one value: a range of 1 unit, or 10 % of the value, around it */
        const double half = lo == 0.0 ? 0.5 : fabs(lo) * 0.05;
        lo -= half;
        hi += half;
    }
    const double raw = (hi - lo) / max_ticks;
    const double mag = pow(10.0, floor(log10(raw)));
    const double norm = raw / mag;
    const double s = (norm <= 1.0 + AXIS_LOG_TOL   ? 1.0
                      : norm <= 2.0 + AXIS_LOG_TOL ? 2.0
                      : norm <= 5.0 + AXIS_LOG_TOL ? 5.0
                                                   : 10.0) *
                     mag;
    *nice_lo = floor(lo / s + AXIS_LOG_TOL) * s;
    *nice_hi = ceil(hi / s - AXIS_LOG_TOL) * s;
    *step = s;
    return SG_OK;
}

/* Decimals needed to print multiples of step exactly (0.5 -> 1, 0.25 -> 2, 10 -> 0). */
static int step_decimals(double step)
{
    for (int d = 0; d < AXIS_MAX_DECIMALS; d++) {
        const double s = step * pow10i(d);
        if (fabs(s - round(s)) <= 1e-6 * s)
            return d;
    }
    return AXIS_MAX_DECIMALS;
}

enum sg_status sg_axis_lin_ticks(double lo, double hi, double step, struct sg_axis_tick *out, size_t cap,
                                 size_t *n, struct sg_error *err)
{
    *n = 0;
    if (!isfinite(lo) || !isfinite(hi) || lo > hi || !(step > 0.0) || !isfinite(step))
        return sg_error_set(err, SG_EINVAL, 0, 0,
                            "axis %g to %g with step %g cannot be ticked (give finite low <= high and a "
                            "positive step)",
                            lo, hi, step);
    const double first = ceil(lo / step - AXIS_LOG_TOL);
    const double last = floor(hi / step + AXIS_LOG_TOL);
    if (last < first)
        return SG_OK;
    if (last - first + 1.0 > (double)cap)
        return sg_error_set(err, SG_ELIMIT, 0, 0,
                            "axis %g to %g with step %g needs more than %zu ticks (give a larger step)", lo, hi,
                            step, cap);
    const int dec = step_decimals(step);
    const size_t count = (size_t)(last - first) + 1;
    for (size_t i = 0; i < count; i++) {
        double v = (first + (double)i) * step;
        if (fabs(v) < step * AXIS_LOG_TOL)
            v = 0.0;
        out[i].value = v;
        out[i].major = true;
        fixed(v, dec, out[i].label, sizeof out[i].label);
    }
    *n = count;
    return SG_OK;
}

/* ISO 14688-1 (METHODS.md 8.1): clay <= 0.002 < silt <= 0.063 < sand <= 2
 * < gravel <= 63 < cobbles <= 200 < boulders; silt, sand and gravel split
 * fine/medium/coarse at 0.0063/0.02, 0.2/0.63 and 6.3/20 mm. */
static const struct sg_axis_band iso_bands[] = {
    {0.0, 0.002, 0, "Clay", "Cl"},
    {0.002, 0.063, 0, "Silt", "Si"},
    {0.063, 2.0, 0, "Sand", "Sa"},
    {2.0, 63.0, 0, "Gravel", "Gr"},
    {63.0, 200.0, 0, "Cobbles", "Co"},
    {200.0, (double)INFINITY, 0, "Boulders", "Bo"},
    {0.002, 0.0063, 1, "fine", "F"},
    {0.0063, 0.02, 1, "medium", "M"},
    {0.02, 0.063, 1, "coarse", "C"},
    {0.063, 0.2, 1, "fine", "F"},
    {0.2, 0.63, 1, "medium", "M"},
    {0.63, 2.0, 1, "coarse", "C"},
    {2.0, 6.3, 1, "fine", "F"},
    {6.3, 20.0, 1, "medium", "M"},
    {20.0, 63.0, 1, "coarse", "C"},
};

/* ASTM D2487 (METHODS.md 8.2): fines (silt or clay, told apart by
 * plasticity, not size) <= 0.075 < sand <= 4.75 < gravel <= 75 < cobbles
 * <= 300 < boulders; sand fine/medium/coarse at 0.425/2.00 mm, gravel
 * fine/coarse at 19 mm. */
static const struct sg_axis_band uscs_bands[] = {
    {0.0, 0.075, 0, "Fines (silt or clay)", "Fines"},
    {0.075, 4.75, 0, "Sand", "Sa"},
    {4.75, 75.0, 0, "Gravel", "Gr"},
    {75.0, 300.0, 0, "Cobbles", "Co"},
    {300.0, (double)INFINITY, 0, "Boulders", "Bo"},
    {0.075, 0.425, 1, "fine", "F"},
    {0.425, 2.0, 1, "medium", "M"},
    {2.0, 4.75, 1, "coarse", "C"},
    {4.75, 19.0, 1, "fine", "F"},
    {19.0, 75.0, 1, "coarse", "C"},
};

const struct sg_axis_band *sg_axis_bands_get(enum sg_axis_bands sys, size_t *n)
{
    if (sys == SG_BANDS_USCS) {
        *n = sizeof uscs_bands / sizeof uscs_bands[0];
        return uscs_bands;
    }
    *n = sizeof iso_bands / sizeof iso_bands[0];
    return iso_bands;
}

enum sg_axis_bands sg_axis_bands_for_standard(enum sg_standard std)
{
    return std == SG_STANDARD_ASTM_D7928 ? SG_BANDS_USCS : SG_BANDS_ISO14688;
}

const char *sg_axis_bands_name(enum sg_axis_bands sys)
{
    return sys == SG_BANDS_USCS ? "ASTM D2487 (USCS)" : "ISO 14688-1";
}

void sg_axis_format_fixed(double v, int decimals, char *buf, size_t size)
{
    if (size == 0)
        return;
    if (!isfinite(v)) {
        buf[0] = '\0';
        return;
    }
    if (decimals < 0)
        decimals = 0;
    if (decimals > AXIS_MAX_DECIMALS)
        decimals = AXIS_MAX_DECIMALS;
    fixed(v, decimals, buf, size);
}

void sg_axis_format_sig(double v, int sig, char *buf, size_t size)
{
    if (size == 0)
        return;
    if (!isfinite(v)) {
        buf[0] = '\0';
        return;
    }
    if (sig < 1)
        sig = 1;
    if (sig > 15)
        sig = 15;
    if (v == 0.0) {
        (void)snprintf(buf, size, "0");
        return;
    }
    const double a = fabs(v);
    if (a < 1e-9 || a >= 1e12) {
        (void)snprintf(buf, size, "%.*g", sig, v);
        return;
    }
    /* The exponent after rounding to sig digits (9.9996 -> 1.000e+01). */
    char e[40];
    (void)snprintf(e, sizeof e, "%.*e", sig - 1, v);
    const char *ep = strchr(e, 'e');
    const int exp10 = ep != NULL ? atoi(ep + 1) : 0;
    int decimals = sig - 1 - exp10;
    if (decimals < 0)
        decimals = 0;
    fixed(v, decimals, buf, size);
}
