/* result.h - the results of reducing one test: measured points with their
 * intermediate values, the spliced curve, summary quantities with notes, and
 * QC flags. Filled by sg_reduce(); read by the writers, plots and reports. */
#ifndef SEDGRADE_RESULT_H
#define SEDGRADE_RESULT_H

#include <math.h>
#include <stdbool.h>
#include <stddef.h>
#include <string.h>

#include "sedgrade/curve.h"
#include "sedgrade/error.h"
#include "sedgrade/qc.h"

enum sg_source { SG_SOURCE_SIEVE = 0, SG_SOURCE_FINE_SIEVE, SG_SOURCE_HYDROMETER, SG_SOURCE_PIPETTE };

/* One measured point. Fields that do not apply to the source are NaN. */
struct sg_point {
    enum sg_source source;
    unsigned line;              /* input line of the row */
    double diameter_mm;         /* sieve aperture or Stokes diameter */
    double percent_finer;       /* percent of the whole sample */
    double percent_specimen;    /* percent of the sedimentation specimen (sieve: = percent_finer) */
    /* sieves */
    double retained_g;
    double cumulative_retained_g;
    /* sedimentation */
    double elapsed_min;
    double temp_c;              /* thermometer correction applied */
    double reading;             /* hydrometer reading as read */
    double blank_reading;       /* blank (composite) reading used */
    double corrected_reading;   /* reading - blank */
    double depth_reading;       /* reading + meniscus correction */
    double effective_depth_mm;  /* hydrometer effective depth or pipette sampling depth */
    double concentration_g_l;   /* hydrometer: soil per litre at the effective depth */
    double solids_g;            /* pipette: solids in the sample */
    double net_solids_g;        /* pipette: solids less the dispersant share */
    double water_density_kg_m3;
    double viscosity_mpa_s;
    double reynolds;
    /* Monte Carlo standard uncertainty of percent_finer; NaN unless --mc */
    double percent_finer_u;
    unsigned flags;             /* enum sg_point_flag bits */
    bool on_curve;              /* used to build the curve */
};

#define SG_QNAME_MAX 40
#define SG_QUNIT_MAX 16
#define SG_QTEXT_MAX 256 /* room for qc_flags, every QC flag name joined by '|' */
#define SG_QNOTE_MAX 512 /* a note and the Monte Carlo class probabilities after it */

/* One summary quantity (a row of <id>.summary.csv). */
struct sg_quantity {
    char name[SG_QNAME_MAX];  /* e.g. "d10_mm" */
    char unit[SG_QUNIT_MAX];  /* "mm", "%", "" */
    bool determined;          /* false: value empty, note says why */
    bool is_text;             /* categorical value in text (e.g. usda_texture) */
    bool has_u;               /* Monte Carlo: u, low95 and high95 are set */
    double value;
    /* Monte Carlo (has_u): standard uncertainty and 95 % coverage interval
     * (kept before the long strings: a row's fields that every reduction
     * writes then share three cache lines instead of five; the flags side
     * by side and the four numbers in a row, so that a new row's blanks
     * take few stores) */
    double u, low95, high95;
    /* The static name the row was written from (sg_result_new_quantity_static),
     * else NULL. Equal and not NULL in two rows: the same immutable array,
     * hence the same name (a cheap first test in mc.c). Whoever changes
     * name after writing the row sets name_src NULL. */
    const struct sg_static_qname *name_src;
    char text[SG_QTEXT_MAX];
    char note[SG_QNOTE_MAX];
};

#define SG_FLAG_NAME_MAX 40
#define SG_FLAG_MSG_MAX 240

/* One QC finding. */
struct sg_flag {
    char name[SG_FLAG_NAME_MAX]; /* e.g. "reynolds", "junction_gap" */
    enum sg_severity severity;
    unsigned line;               /* input line concerned, 0 = whole test */
    char message[SG_FLAG_MSG_MAX];
};

/* Numbers of the summary that the later summaries read back (plasticity,
 * screens): rows by name, and the curve's percent finer at the ASTM D2487
 * sizes. sg_classify_summarise keeps them as it adds the rows, so that a
 * Monte Carlo draw (which runs every summary) needs no name lookups. */
enum sg_key {
    SG_KEY_D10_MM,            /* row d10_mm */
    SG_KEY_D15_MM,            /* row d15_mm */
    SG_KEY_CU,                /* row cu */
    SG_KEY_CC,                /* row cc */
    SG_KEY_CLAY_PCT,          /* row clay_pct */
    SG_KEY_FINER_0_02_MM_PCT, /* row finer_0_02_mm_pct */
    SG_KEY_P_75_MM_PCT,       /* the curve at 75 mm */
    SG_KEY_P_4_75_MM_PCT,     /* the curve at 4.75 mm */
    SG_KEY_P_0_075_MM_PCT,    /* the curve at 0.075 mm */
    SG_N_KEYS
};

struct sg_result {
    char id[64];
    struct sg_point *points;
    size_t n_points, cap_points;
    struct sg_quantity *quantities;
    size_t n_quantities, cap_quantities;
    struct sg_flag *flags;
    size_t n_flags, cap_flags;
    struct sg_curve curve;
    double pp_split;             /* percent of the whole sample passing the split sieve */
    char calibration_used[256];  /* "instrument@date;..." or "inline" */
    /* keys[k] as sg_result_key gives it, kept by sg_classify_summarise;
     * has_keys false (results built row by row, or before the summary):
     * sg_result_key looks them up. A caller that changes those rows or the
     * curve after the summary sets has_keys false. */
    bool has_keys;
    double keys[SG_N_KEYS];
};

void sg_result_init(struct sg_result *r);
/* Frees everything; r is re-initialised. Accepts NULL. */
void sg_result_release(struct sg_result *r);
/* Empties r but keeps its buffers (for reuse across records). */
void sg_result_clear(struct sg_result *r);

/* Appenders: SG_OK or SG_ENOMEM. */
enum sg_status sg_result_add_point(struct sg_result *r, const struct sg_point *p);
enum sg_status sg_result_add_flag(struct sg_result *r, const char *name, enum sg_severity sev, unsigned line,
                                  const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 5, 6)))
#endif
    ;
/* Adds a determined numeric quantity. */
enum sg_status sg_result_add_value(struct sg_result *r, const char *name, const char *unit, double value,
                                   const char *note);
/* Adds a quantity that could not be determined; note says why. */
enum sg_status sg_result_add_undetermined(struct sg_result *r, const char *name, const char *unit,
                                          const char *note);
/* Adds a categorical quantity (text value). */
enum sg_status sg_result_add_text(struct sg_result *r, const char *name, const char *text, const char *note);

/* Makes room for one more quantity row: SG_OK or SG_ENOMEM (the rare path
 * of sg_result_new_quantity). */
enum sg_status sg_result_reserve_quantity(struct sg_result *r);

/* A name or unit literal as the whole array sg_result_new_quantity takes,
 * zero after the text: SG_QNAME("d10_mm"), SG_QUNIT("mm"). */
#define SG_QNAME(s) ((const char[SG_QNAME_MAX]){s})
#define SG_QUNIT(s) ((const char[SG_QUNIT_MAX]){s})

/* A row name with static storage duration, for sg_result_new_quantity_static:
 * declare it only with SG_STATIC_QNAME or as an entry of a `static const`
 * table (file scope or a block's static), never as an automatic variable
 * nor a compound literal (automatic in a function). A row keeps its
 * address, so the array must outlive every result and never change.
 * A type of its own, so that SG_QNAME(...) and name buffers do not
 * convert to it. */
struct sg_static_qname {
    char s[SG_QNAME_MAX]; /* zero after the text */
};

/* Declares id, a row name with static storage duration (see above). */
#define SG_STATIC_QNAME(id, text) static const struct sg_static_qname id = {text}

/* Copies note into q->note, cut to fit (the rare part of
 * sg_result_new_quantity: values-only rows have no notes). */
void sg_quantity_copy_note(struct sg_quantity *q, const char *note);

/* The body of the two writers below (not for callers: name_src unset). */
static inline struct sg_quantity *sg_result_new_row_(struct sg_result *r, const char name[SG_QNAME_MAX],
                                                     const char unit[SG_QUNIT_MAX], const char *note)
{
    if (r->n_quantities == r->cap_quantities && sg_result_reserve_quantity(r) != SG_OK)
        return NULL;
    struct sg_quantity *q = &r->quantities[r->n_quantities++];
    memcpy(q->name, name, SG_QNAME_MAX); /* one block: no strlen */
    q->name[SG_QNAME_MAX - 1] = '\0';
    memcpy(q->unit, unit, SG_QUNIT_MAX);
    q->unit[SG_QUNIT_MAX - 1] = '\0';
    q->determined = false;
    q->is_text = false;
    q->has_u = false;
    q->value = q->u = q->low95 = q->high95 = (double)NAN;
    q->text[0] = '\0';
    if (note != NULL && note[0] != '\0')
        sg_quantity_copy_note(q, note);
    else
        q->note[0] = '\0';
    return q;
}

/* Appends a row that is not determined (value NaN, empty text, no u), to be
 * filled in place, for callers that add many rows from tables of names:
 * name is a whole SG_QNAME_MAX-byte array and unit a whole SG_QUNIT_MAX-byte
 * array, zero after their text (e.g. entries of static tables), each copied
 * as one block without measuring it; note as for sg_result_add_value
 * (NULL or "": none). name_src NULL. NULL when out of memory.
 * Inline: a reduction adds about 90 rows, and as many per Monte Carlo
 * draw. */
static inline struct sg_quantity *sg_result_new_quantity(struct sg_result *r, const char name[SG_QNAME_MAX],
                                                         const char unit[SG_QUNIT_MAX], const char *note)
{
    struct sg_quantity *q = sg_result_new_row_(r, name, unit, note);
    if (q != NULL)
        q->name_src = NULL;
    return q;
}

/* As sg_result_new_quantity, named by a static name (struct
 * sg_static_qname: static storage only, see there), whose address the row
 * keeps in name_src. */
static inline struct sg_quantity *sg_result_new_quantity_static(struct sg_result *r,
                                                                const struct sg_static_qname *name,
                                                                const char unit[SG_QUNIT_MAX], const char *note)
{
    struct sg_quantity *q = sg_result_new_row_(r, name->s, unit, note);
    if (q != NULL)
        q->name_src = name;
    return q;
}

/* Fills a row made by sg_result_new_quantity: the number v (determined
 * when finite), as sg_result_add_value does. */
static inline void sg_quantity_set_value(struct sg_quantity *q, double v)
{
    q->determined = isfinite(v);
    q->value = v;
}

/* Fills a row made by sg_result_new_quantity: the categorical text
 * (determined when not NULL nor empty), as sg_result_add_text does. */
void sg_quantity_set_text(struct sg_quantity *q, const char *text);

/* The quantity called name, or NULL. */
struct sg_quantity *sg_result_quantity(const struct sg_result *r, const char *name);

/* The value of a determined numeric quantity, else NaN. */
static inline double sg_quantity_number(const struct sg_quantity *q)
{
    return q->determined && !q->is_text ? q->value : (double)NAN;
}

/* A number the later summaries read: with has_keys the kept one, else the
 * row's sg_quantity_number (NaN when there is no such row) or the curve's
 * percent finer (NaN where the curve gives none). */
double sg_result_key(const struct sg_result *r, enum sg_key k);

/* A point initialised with NaN in every numeric field that may not apply. */
struct sg_point sg_point_blank(enum sg_source source, unsigned line);

/* Makes room for one more point: SG_OK or SG_ENOMEM (the rare path of
 * sg_result_new_point). */
enum sg_status sg_result_reserve_point(struct sg_result *r);

/* Sets every field of *p as sg_point_blank(source, line) has it, one store
 * each (no memset and no struct copy: a copy read back right after
 * narrower stores stalls on store forwarding). */
static inline void sg_point_blank_into(struct sg_point *p, enum sg_source source, unsigned line)
{
    p->source = source;
    p->line = line;
    p->diameter_mm = p->percent_finer = p->percent_specimen = NAN;
    p->retained_g = p->cumulative_retained_g = NAN;
    p->elapsed_min = p->temp_c = p->reading = p->blank_reading = p->corrected_reading = NAN;
    p->depth_reading = p->effective_depth_mm = p->concentration_g_l = NAN;
    p->solids_g = p->net_solids_g = NAN;
    p->water_density_kg_m3 = p->viscosity_mpa_s = p->reynolds = NAN;
    p->percent_finer_u = NAN;
    p->flags = 0;
    p->on_curve = false;
}

/* Appends sg_point_blank(source, line) and returns it, to be filled in
 * place (no copy of the whole point); NULL when out of memory. The pointer
 * is valid until the next point is added. Inline, as
 * sg_result_new_quantity: a reduction adds a point per sieve and reading,
 * and as many per Monte Carlo draw. */
static inline struct sg_point *sg_result_new_point(struct sg_result *r, enum sg_source source, unsigned line)
{
    if (r->n_points == r->cap_points && sg_result_reserve_point(r) != SG_OK)
        return NULL;
    struct sg_point *p = &r->points[r->n_points++];
    sg_point_blank_into(p, source, line);
    return p;
}

/* Worst severity among the flags (SG_SEVERITY_INFO when none). */
enum sg_severity sg_result_worst(const struct sg_result *r);

const char *sg_source_name(enum sg_source s);
const char *sg_severity_name(enum sg_severity s);

#endif
