/* curve.c - PLACEHOLDER (loglinear only); to be replaced by the full module. */
#include "sedgrade/curve.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

void sg_curve_init(struct sg_curve *c) { memset(c, 0, sizeof *c); }

void sg_curve_release(struct sg_curve *c)
{
    if (c == NULL)
        return;
    free(c->log10_d);
    free(c->percent);
    sg_curve_init(c);
}

static int cmp(const void *a, const void *b)
{
    const struct sg_curve_point *x = a, *y = b;
    if (x->diameter_mm != y->diameter_mm)
        return (x->diameter_mm > y->diameter_mm) - (x->diameter_mm < y->diameter_mm);
    return x->rank - y->rank;
}

enum sg_status sg_curve_build(struct sg_curve *c, const struct sg_curve_point *pts, size_t n,
                              enum sg_interp method, struct sg_error *err)
{
    sg_curve_release(c);
    struct sg_curve_point *s = malloc((n ? n : 1) * sizeof *s);
    c->log10_d = malloc((n ? n : 1) * sizeof *c->log10_d);
    c->percent = malloc((n ? n : 1) * sizeof *c->percent);
    if (!s || !c->log10_d || !c->percent) {
        free(s);
        sg_curve_release(c);
        return sg_error_set(err, SG_ENOMEM, 0, 0, "out of memory");
    }
    if (n)
        memcpy(s, pts, n * sizeof *s);
    qsort(s, n, sizeof *s, cmp);
    size_t m = 0;
    for (size_t i = 0; i < n; i++) {
        if (m > 0 && s[i].diameter_mm == pow(10.0, c->log10_d[m - 1]))
            continue;
        c->log10_d[m] = log10(s[i].diameter_mm);
        c->percent[m] = s[i].percent_finer;
        m++;
    }
    free(s);
    c->n = m;
    c->method = method;
    if (m < 2) {
        sg_curve_release(c);
        return sg_error_set(err, SG_EDOM, 0, 0, "fewer than two points: no curve");
    }
    return SG_OK;
}

enum sg_status sg_curve_percent_at(const struct sg_curve *c, double d_mm, double *percent,
                                   struct sg_error *err)
{
    if (c->n < 2)
        return sg_error_set(err, SG_EDOM, 0, 0, "no curve");
    double x = log10(d_mm);
    if (x < c->log10_d[0] || x > c->log10_d[c->n - 1])
        return sg_error_set(err, SG_EDOM, 0, 0, "outside the measured range");
    for (size_t i = 1; i < c->n; i++)
        if (x <= c->log10_d[i]) {
            double f = (x - c->log10_d[i - 1]) / (c->log10_d[i] - c->log10_d[i - 1]);
            *percent = c->percent[i - 1] + f * (c->percent[i] - c->percent[i - 1]);
            return SG_OK;
        }
    *percent = c->percent[c->n - 1];
    return SG_OK;
}

enum sg_status sg_curve_diameter_at(const struct sg_curve *c, double p, double *d_mm, struct sg_error *err)
{
    for (size_t i = c->n; i-- > 1;) {
        double pc = c->percent[i], pf = c->percent[i - 1];
        if (pf < p && p <= pc) {
            double x = c->log10_d[i - 1] + (p - pf) * (c->log10_d[i] - c->log10_d[i - 1]) / (pc - pf);
            *d_mm = pow(10.0, x);
            return SG_OK;
        }
    }
    return sg_error_set(err, SG_EDOM, 0, 0, "not reached by the curve");
}
