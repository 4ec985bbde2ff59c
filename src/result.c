/* result.c - the result container: points, quantities, flags. */
#include "sedgrade/result.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void sg_result_init(struct sg_result *r)
{
    memset(r, 0, sizeof *r);
    sg_curve_init(&r->curve);
    r->pp_split = NAN;
}

void sg_result_release(struct sg_result *r)
{
    if (r == NULL)
        return;
    free(r->points);
    free(r->quantities);
    free(r->flags);
    sg_curve_release(&r->curve);
    sg_result_init(r);
}

void sg_result_clear(struct sg_result *r)
{
    r->n_points = 0;
    r->n_quantities = 0;
    r->n_flags = 0;
    r->id[0] = '\0';
    r->calibration_used[0] = '\0';
    r->pp_split = NAN;
    r->has_keys = false;
    sg_curve_clear(&r->curve); /* its buffers serve the next record */
}

/* Copies src into dst of size n (n > 0), cut at n - 1 bytes like
 * snprintf(dst, n, "%s", src), without going through printf. */
static void copy_text(char *dst, size_t n, const char *src)
{
    if (src == NULL || src[0] == '\0') { /* units and notes often are (values-only summaries) */
        dst[0] = '\0';
        return;
    }
    size_t len = strlen(src);
    if (len > n - 1)
        len = n - 1;
    memcpy(dst, src, len);
    dst[len] = '\0';
}

static enum sg_status grow(void **items, size_t n, size_t *cap, size_t size)
{
    if (n < *cap)
        return SG_OK;
    size_t ncap = *cap ? 2 * *cap : 16;
    void *p = realloc(*items, ncap * size);
    if (p == NULL)
        return SG_ENOMEM;
    *items = p;
    *cap = ncap;
    return SG_OK;
}

enum sg_status sg_result_add_point(struct sg_result *r, const struct sg_point *p)
{
    void *items = r->points;
    enum sg_status st = grow(&items, r->n_points, &r->cap_points, sizeof *p);
    r->points = items;
    if (st != SG_OK)
        return st;
    r->points[r->n_points++] = *p;
    return SG_OK;
}

enum sg_status sg_result_add_flag(struct sg_result *r, const char *name, enum sg_severity sev, unsigned line,
                                  const char *fmt, ...)
{
    void *items = r->flags;
    enum sg_status st = grow(&items, r->n_flags, &r->cap_flags, sizeof *r->flags);
    r->flags = items;
    if (st != SG_OK)
        return st;
    struct sg_flag *f = &r->flags[r->n_flags++];
    memset(f, 0, sizeof *f);
    copy_text(f->name, sizeof f->name, name);
    f->severity = sev;
    f->line = line;
    va_list ap;
    va_start(ap, fmt);
    (void)vsnprintf(f->message, sizeof f->message, fmt, ap);
    va_end(ap);
    return SG_OK;
}

enum sg_status sg_result_reserve_quantity(struct sg_result *r)
{
    void *items = r->quantities;
    enum sg_status st = grow(&items, r->n_quantities, &r->cap_quantities, sizeof *r->quantities);
    r->quantities = items;
    return st;
}

void sg_quantity_copy_note(struct sg_quantity *q, const char *note)
{
    copy_text(q->note, sizeof q->note, note);
}

void sg_quantity_set_text(struct sg_quantity *q, const char *text)
{
    q->is_text = true;
    q->determined = text != NULL && text[0] != '\0';
    copy_text(q->text, sizeof q->text, text);
}

/* Copies src (NULL: empty) into dst of size n, zero-filled beforehand, cut
 * at n - 1 bytes. */
static void pad_into(char *dst, size_t n, const char *src)
{
    if (src != NULL)
        memcpy(dst, src, strnlen(src, n - 1));
}

/* A row named by a string: the name and unit zero-padded first, so that
 * equal names are equal arrays (a cheap first test in mc.c). */
static struct sg_quantity *new_quantity(struct sg_result *r, const char *name, const char *unit,
                                        const char *note)
{
    char padded[SG_QNAME_MAX] = "", padded_unit[SG_QUNIT_MAX] = "";
    pad_into(padded, sizeof padded, name);
    pad_into(padded_unit, sizeof padded_unit, unit);
    return sg_result_new_quantity(r, padded, padded_unit, note);
}

enum sg_status sg_result_add_value(struct sg_result *r, const char *name, const char *unit, double value,
                                   const char *note)
{
    struct sg_quantity *q = new_quantity(r, name, unit, note);
    if (q == NULL)
        return SG_ENOMEM;
    sg_quantity_set_value(q, value);
    return SG_OK;
}

enum sg_status sg_result_add_undetermined(struct sg_result *r, const char *name, const char *unit,
                                          const char *note)
{
    return new_quantity(r, name, unit, note) != NULL ? SG_OK : SG_ENOMEM;
}

enum sg_status sg_result_add_text(struct sg_result *r, const char *name, const char *text, const char *note)
{
    struct sg_quantity *q = new_quantity(r, name, "", note);
    if (q == NULL)
        return SG_ENOMEM;
    sg_quantity_set_text(q, text);
    return SG_OK;
}

struct sg_quantity *sg_result_quantity(const struct sg_result *r, const char *name)
{
    const size_t len = strlen(name);
    if (len >= SG_QNAME_MAX)
        return NULL;
    /* first letter and length (the terminator in place) before the bytes */
    for (size_t i = 0; i < r->n_quantities; i++) {
        const char *qn = r->quantities[i].name;
        if (qn[0] == name[0] && qn[len] == '\0' && memcmp(qn, name, len) == 0)
            return &r->quantities[i];
    }
    return NULL;
}

double sg_result_key(const struct sg_result *r, enum sg_key k)
{
    /* ASTM D2487 sizes, mm, and their log10, correctly rounded (checked
     * against 60-digit decimal arithmetic; what log10() returns for them) */
    static const struct {
        const char *row; /* NULL: a reading of the curve at d_mm */
        double d_mm, log10_d;
    } src[SG_N_KEYS] = {
        [SG_KEY_D10_MM] = {"d10_mm", 0.0, 0.0},
        [SG_KEY_D15_MM] = {"d15_mm", 0.0, 0.0},
        [SG_KEY_CU] = {"cu", 0.0, 0.0},
        [SG_KEY_CC] = {"cc", 0.0, 0.0},
        [SG_KEY_CLAY_PCT] = {"clay_pct", 0.0, 0.0},
        [SG_KEY_FINER_0_02_MM_PCT] = {"finer_0_02_mm_pct", 0.0, 0.0},
        [SG_KEY_P_75_MM_PCT] = {NULL, 75.0, 1.8750612633917},
        [SG_KEY_P_4_75_MM_PCT] = {NULL, 4.75, 0.6766936096248666},
        [SG_KEY_P_0_075_MM_PCT] = {NULL, 0.075, -1.1249387366083},
    };
    if ((unsigned)k >= SG_N_KEYS)
        return NAN;
    if (r->has_keys)
        return r->keys[k];
    if (src[k].row != NULL) {
        const struct sg_quantity *q = sg_result_quantity(r, src[k].row);
        return q != NULL ? sg_quantity_number(q) : (double)NAN;
    }
    double p;
    return sg_curve_percent_at_log10(&r->curve, src[k].d_mm, src[k].log10_d, &p, NULL) == SG_OK ? p : (double)NAN;
}

struct sg_point sg_point_blank(enum sg_source source, unsigned line)
{
    struct sg_point p;
    memset(&p, 0, sizeof p);
    sg_point_blank_into(&p, source, line);
    return p;
}

enum sg_status sg_result_reserve_point(struct sg_result *r)
{
    void *items = r->points;
    enum sg_status st = grow(&items, r->n_points, &r->cap_points, sizeof *r->points);
    r->points = items;
    return st;
}

enum sg_severity sg_result_worst(const struct sg_result *r)
{
    enum sg_severity w = SG_SEVERITY_INFO;
    for (size_t i = 0; i < r->n_flags; i++)
        if (r->flags[i].severity > w)
            w = r->flags[i].severity;
    return w;
}

const char *sg_source_name(enum sg_source s)
{
    switch (s) {
    case SG_SOURCE_SIEVE: return "sieve";
    case SG_SOURCE_FINE_SIEVE: return "fine_sieve";
    case SG_SOURCE_HYDROMETER: return "hydrometer";
    case SG_SOURCE_PIPETTE: return "pipette";
    }
    return "";
}

const char *sg_severity_name(enum sg_severity s)
{
    switch (s) {
    case SG_SEVERITY_INFO: return "info";
    case SG_SEVERITY_WARNING: return "warning";
    case SG_SEVERITY_FAILURE: return "failure";
    }
    return "";
}
