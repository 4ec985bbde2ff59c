/* csvout.c - CSV writers for reduction results. */
#include "sedgrade/csvout.h"

#include <csv.h>
#include <stdbool.h>
#include <errno.h>
#include <math.h>
#include <stdint.h>
#include <string.h>

#include "sedgrade/qc.h"

/* Powers of ten that a double holds exactly (10^22 is the largest). */
static const double pow10_exact[23] = {1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,  1e8,  1e9,  1e10, 1e11,
                                       1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};

/* Writes the six significant digits of a (finite, > 0) as the integer m in
 * [100000, 999999] with decimal exponent *e, or returns false when the
 * rounding is too close to call (then the caller asks snprintf). The scaled
 * value carries an error of about 1e-10 units of the sixth digit, far below
 * the 1e-6 tie guard, so the digits equal printf's correctly rounded ones. */
static bool six_digits(double a, int *e, long *m)
{
    /* floor(log10(a)) from the binary exponent (a = f 2^e2, 0.5 <= f < 1):
     * (e2 - 1) log10(2) is at most one below it, and the loop below moves
     * ex up when the scaled value has seven digits (no log10 call) */
    int e2 = 0;
    uint64_t bits;
    memcpy(&bits, &a, sizeof bits);
    const int biased = (int)((bits >> 52) & 0x7ffu);
    if (biased > 0) /* normal: the exponent field is frexp's e2 plus 1022 */
        e2 = biased - 1022;
    else
        (void)frexp(a, &e2);
    /* floor((e2 - 1) * 1233 / 4096), 1233 / 4096 = 0.30103 - 5e-6: at most
     * one below floor((e2 - 1) log10(2)) over the double range */
    const int t = (e2 - 1) * 1233;
    int ex = t >= 0 ? t / 4096 : -((-t + 4095) / 4096);
    for (int tries = 0; tries < 3; tries++) {
        const int k = 5 - ex;
        if (k > 22 || k < -22)
            return false;
        const double s = k >= 0 ? a * pow10_exact[k] : a / pow10_exact[-k];
        if (!(s < 1e7)) { /* ex one low: next try */
            ex++;
            continue;
        }
        const double fl = (double)(long)s, frac = s - fl; /* s > 0: truncation is floor */
        if (fabs(frac - 0.5) < 1e-6)
            return false;
        const long v = (long)fl + (frac > 0.5);
        if (v >= 1000000)
            ex++;
        else if (v < 100000)
            ex--;
        else {
            *e = ex;
            *m = v;
            return true;
        }
    }
    return false;
}

/* printf's "%.6g" for a finite non-zero x, without printf on the common path:
 * the CSV writers format hundreds of numbers per test (test_csvout compares
 * it with snprintf on millions of values). */
static size_t format_g6(double x, char *buf, size_t size)
{
    int e = 0;
    long m = 0;
    if (!six_digits(fabs(x), &e, &m)) {
        const int w = snprintf(buf, size, "%.6g", x);
        return w < 0 ? 0 : (size_t)w < size ? (size_t)w : size - 1;
    }
    /* the six digits two at a time (three divisions instead of six) */
    static const char pairs[] = "00010203040506070809101112131415161718192021222324252627282930313233343536373839"
                                "40414243444546474849505152535455565758596061626364656667686970717273747576777879"
                                "8081828384858687888990919293949596979899";
    char dig[6];
    const long hi = m / 10000, mid = m / 100 % 100, lo = m % 100;
    memcpy(dig, pairs + 2 * hi, 2);
    memcpy(dig + 2, pairs + 2 * mid, 2);
    memcpy(dig + 4, pairs + 2 * lo, 2);
    int nd = 6;
    while (nd > 1 && dig[nd - 1] == '0')
        nd--;
    char tmp[40];
    char *out = size >= sizeof tmp ? buf : tmp; /* straight into buf when it surely fits */
    size_t n = 0;
    if (x < 0)
        out[n++] = '-';
    if (e < -4 || e >= 6) {
        out[n++] = dig[0];
        if (nd > 1)
            out[n++] = '.';
        for (int i = 1; i < nd; i++)
            out[n++] = dig[i];
        out[n++] = 'e';
        out[n++] = e < 0 ? '-' : '+';
        int ae = e < 0 ? -e : e;
        if (ae >= 100) {
            out[n++] = (char)('0' + ae / 100);
            ae %= 100;
        }
        out[n++] = (char)('0' + ae / 10);
        out[n++] = (char)('0' + ae % 10);
    } else if (e >= 0) {
        for (int i = 0; i <= e; i++)
            out[n++] = dig[i];
        if (nd > e + 1)
            out[n++] = '.';
        for (int i = e + 1; i < nd; i++)
            out[n++] = dig[i];
    } else {
        out[n++] = '0';
        out[n++] = '.';
        for (int i = 0; i < -e - 1; i++)
            out[n++] = '0';
        for (int i = 0; i < nd; i++)
            out[n++] = dig[i];
    }
    out[n] = '\0';
    if (out == buf)
        return n;
    if (n < size) {
        memcpy(buf, out, n + 1);
        return n;
    }
    (void)snprintf(buf, size, "%s", out);
    return size - 1;
}

/* sg_csvout_number, returning the length written. */
static size_t number_into(double x, char *buf, size_t size)
{
    if (!isfinite(x)) {
        buf[0] = '\0';
        return 0;
    }
    if (x == 0.0) { /* also -0: no "-0" */
        buf[0] = '0';
        buf[1] = '\0';
        return 1;
    }
    return format_g6(x, buf, size);
}

void sg_csvout_number(double x, char *buf, size_t size)
{
    if (size < 2) {
        if (size == 1)
            buf[0] = '\0';
        return;
    }
    (void)number_into(x, buf, size);
}

static void row_flush(struct sg_csvout_row *r)
{
    if (r->n > 0)
        (void)fwrite(r->buf, 1, r->n, r->fp);
    r->n = 0;
}

void sg_csvout_field(struct sg_csvout_row *r, const char *s, bool first)
{
    const size_t len = strlen(s);
    /* worst case: a separator, two quotes and every character doubled */
    if (r->n + 2 * len + 3 > sizeof r->buf) {
        row_flush(r);
        if (2 * len + 3 > sizeof r->buf) { /* longer than any field sedgrade makes */
            if (!first)
                (void)fputc(',', r->fp);
            (void)csv_fwrite(r->fp, s, len);
            return;
        }
    }
    if (!first)
        r->buf[r->n++] = ',';
    if (strpbrk(s, ",\"\r\n") != NULL) {
        r->n += csv_write(r->buf + r->n, sizeof r->buf - r->n, s, len);
    } else {
        memcpy(r->buf + r->n, s, len);
        r->n += len;
    }
}

void sg_csvout_raw_field(struct sg_csvout_row *r, const char *s, size_t len, bool first)
{
    if (r->n + len + 1 > sizeof r->buf) {
        row_flush(r);
        if (len + 1 > sizeof r->buf) {
            if (!first)
                (void)fputc(',', r->fp);
            (void)fwrite(s, 1, len, r->fp);
            return;
        }
    }
    if (!first)
        r->buf[r->n++] = ',';
    memcpy(r->buf + r->n, s, len);
    r->n += len;
}

void sg_csvout_end_row(struct sg_csvout_row *r)
{
    if (r->n + 1 > sizeof r->buf)
        row_flush(r);
    r->buf[r->n++] = '\n';
    if (r->n > sizeof r->buf / 2) /* whole rows go out in large writes */
        row_flush(r);
}

void sg_csvout_flush(struct sg_csvout_row *r)
{
    row_flush(r);
}

/* A number goes straight into the row: its characters (digits, sign,
 * point, exponent) never need quotes. */
static void num(struct sg_csvout_row *r, double x, bool first)
{
    if (r->n + 41 > sizeof r->buf)
        row_flush(r);
    if (!first)
        r->buf[r->n++] = ',';
    r->n += number_into(x, r->buf + r->n, 40);
}

static enum sg_status finish(FILE *fp, struct sg_error *err)
{
    if (ferror(fp))
        return sg_error_set(err, SG_EIO, 0, 0, "write failed: %s", strerror(errno ? errno : EIO));
    return SG_OK;
}

enum sg_status sg_csvout_points(FILE *fp, const struct sg_result *res, bool with_u, struct sg_error *err)
{
    static const char *const head[] = {
        "source", "line", "diameter_mm", "percent_finer", "percent_specimen", "elapsed_min", "temp_c",
        "reading", "blank_reading", "corrected_reading", "depth_reading", "effective_depth_mm",
        "concentration_g_l", "solids_g", "net_solids_g", "water_density_kg_m3", "viscosity_mpa_s",
        "reynolds", "retained_g", "cumulative_retained_g", "on_curve", "flags"};
    struct sg_csvout_row r = {.fp = fp, .n = 0};
    for (size_t i = 0; i < sizeof head / sizeof head[0]; i++)
        sg_csvout_field(&r, head[i], i == 0);
    if (with_u)
        sg_csvout_field(&r, "percent_finer_u", false);
    sg_csvout_end_row(&r);
    for (size_t i = 0; i < res->n_points; i++) {
        const struct sg_point *p = &res->points[i];
        char line[16], flags[256];
        (void)snprintf(line, sizeof line, "%u", p->line);
        sg_qc_point_flags_format(p->flags, flags, sizeof flags);
        sg_csvout_field(&r, sg_source_name(p->source), true);
        sg_csvout_field(&r, line, false);
        const double v[] = {p->diameter_mm, p->percent_finer, p->percent_specimen, p->elapsed_min, p->temp_c,
                            p->reading, p->blank_reading, p->corrected_reading, p->depth_reading,
                            p->effective_depth_mm, p->concentration_g_l, p->solids_g, p->net_solids_g,
                            p->water_density_kg_m3, p->viscosity_mpa_s, p->reynolds, p->retained_g,
                            p->cumulative_retained_g};
        for (size_t j = 0; j < sizeof v / sizeof v[0]; j++)
            num(&r, v[j], false);
        sg_csvout_field(&r, p->on_curve ? "yes" : "no", false);
        sg_csvout_field(&r, flags, false);
        if (with_u)
            num(&r, p->percent_finer_u, false);
        sg_csvout_end_row(&r);
    }
    sg_csvout_flush(&r);
    return finish(fp, err);
}

static void quantity_value(const struct sg_quantity *q, char *buf, size_t size)
{
    if (!q->determined)
        buf[0] = '\0';
    else if (q->is_text)
        (void)snprintf(buf, size, "%s", q->text);
    else
        sg_csvout_number(q->value, buf, size);
}

enum sg_status sg_csvout_summary(FILE *fp, const struct sg_result *res, bool with_u, struct sg_error *err)
{
    (void)fputs(with_u ? "quantity,value,unit,note,u,low95,high95\n" : "quantity,value,unit,note\n", fp);
    struct sg_csvout_row r = {.fp = fp, .n = 0};
    for (size_t i = 0; i < res->n_quantities; i++) {
        const struct sg_quantity *q = &res->quantities[i];
        char value[SG_QTEXT_MAX];
        quantity_value(q, value, sizeof value);
        sg_csvout_field(&r, q->name, true);
        sg_csvout_field(&r, value, false);
        sg_csvout_field(&r, q->unit, false);
        sg_csvout_field(&r, q->note, false);
        if (with_u) {
            num(&r, q->has_u ? q->u : (double)NAN, false);
            num(&r, q->has_u ? q->low95 : (double)NAN, false);
            num(&r, q->has_u ? q->high95 : (double)NAN, false);
        }
        sg_csvout_end_row(&r);
    }
    sg_csvout_flush(&r);
    return finish(fp, err);
}

enum sg_status sg_csvout_curve(FILE *fp, const struct sg_result *res, unsigned per_decade,
                               struct sg_error *err)
{
    (void)fputs("diameter_mm,percent_finer\n", fp);
    struct sg_csvout_row r = {.fp = fp, .n = 0};
    const struct sg_curve *c = &res->curve;
    if (c->n >= 2 && per_decade > 0) {
        const double x0 = c->log10_d[0], x1 = c->log10_d[c->n - 1];
        const double step = 1.0 / per_decade;
        const size_t n = (size_t)ceil((x1 - x0) / step - 1e-9);
        /* the sizes in increasing order, read in one walk per chunk */
        enum { CHUNK = 64 };
        double x[CHUNK], d[CHUNK], p[CHUNK];
        enum sg_status pst[CHUNK];
        for (size_t i0 = 0; i0 <= n; i0 += CHUNK) {
            const size_t m = n + 1 - i0 < CHUNK ? n + 1 - i0 : CHUNK;
            for (size_t j = 0; j < m; j++) {
                const size_t i = i0 + j;
                x[j] = i == n ? x1 : x0 + (double)i * step;
                d[j] = pow(10.0, x[j]);
            }
            sg_curve_percent_at_sorted(c, d, x, m, p, pst);
            for (size_t j = 0; j < m; j++) {
                if (pst[j] != SG_OK)
                    continue;
                num(&r, d[j], true);
                num(&r, p[j], false);
                sg_csvout_end_row(&r);
            }
        }
    }
    sg_csvout_flush(&r);
    return finish(fp, err);
}

enum sg_status sg_csvout_batch(FILE *fp, const struct sg_result *const *results, const char *const *status,
                               size_t n, struct sg_error *err)
{
    /* The columns are the quantities of the first fully reduced result. */
    const struct sg_result *model = NULL;
    struct sg_csvout_row out = {.fp = fp, .n = 0};
    for (size_t i = 0; i < n && model == NULL; i++)
        if (results[i] != NULL && results[i]->n_quantities > 0)
            model = results[i];
    sg_csvout_field(&out, "id", true);
    sg_csvout_field(&out, "status", false);
    for (size_t j = 0; model != NULL && j < model->n_quantities; j++)
        sg_csvout_field(&out, model->quantities[j].name, false);
    sg_csvout_end_row(&out);
    for (size_t i = 0; i < n; i++) {
        const struct sg_result *r = results[i];
        sg_csvout_field(&out, r ? r->id : "", true);
        sg_csvout_field(&out, status[i], false);
        for (size_t j = 0; model != NULL && j < model->n_quantities; j++) {
            char value[SG_QTEXT_MAX] = "";
            const struct sg_quantity *q =
                r && r->n_quantities ? sg_result_quantity(r, model->quantities[j].name) : NULL;
            if (q != NULL)
                quantity_value(q, value, sizeof value);
            sg_csvout_field(&out, value, false);
        }
        sg_csvout_end_row(&out);
    }
    sg_csvout_flush(&out);
    return finish(fp, err);
}
