/* record.c - the parsed test record: lifecycle, row arrays and validation. */
#include "sedgrade/record.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#define DEFAULT_SUSPENSION_VOLUME_ML 1000.0 /* SPEC default */

void sg_record_init(struct sg_record *rec)
{
    memset(rec, 0, sizeof *rec);
    rec->suspension_volume_ml = DEFAULT_SUSPENSION_VOLUME_ML;
    rec->u = (struct sg_record_u){-1, -1, -1, -1, -1, -1, -1, -1, -1, -1};
}

void sg_record_release(struct sg_record *rec)
{
    if (rec == NULL)
        return;
    free(rec->sieve);
    free(rec->fine_sieve);
    free(rec->readings);
    free(rec->pipettes);
    sg_record_init(rec);
}

static void *dup_array(const void *src, size_t n, size_t size, bool *fail)
{
    if (n == 0 || src == NULL)
        return NULL;
    void *p = malloc(n * size);
    if (p == NULL) {
        *fail = true;
        return NULL;
    }
    memcpy(p, src, n * size);
    return p;
}

enum sg_status sg_record_copy(struct sg_record *dst, const struct sg_record *src)
{
    bool fail = false;
    *dst = *src;
    dst->sieve = dup_array(src->sieve, src->n_sieve, sizeof *src->sieve, &fail);
    dst->fine_sieve = dup_array(src->fine_sieve, src->n_fine_sieve, sizeof *src->fine_sieve, &fail);
    dst->readings = dup_array(src->readings, src->n_readings, sizeof *src->readings, &fail);
    dst->pipettes = dup_array(src->pipettes, src->n_pipettes, sizeof *src->pipettes, &fail);
    dst->cap_sieve = src->n_sieve;
    dst->cap_fine_sieve = src->n_fine_sieve;
    dst->cap_readings = src->n_readings;
    dst->cap_pipettes = src->n_pipettes;
    if (fail) {
        sg_record_release(dst);
        return SG_ENOMEM;
    }
    return SG_OK;
}

static enum sg_status grow(void **items, size_t *n, size_t *cap, size_t size)
{
    if (*n < *cap)
        return SG_OK;
    size_t ncap = *cap ? 2 * *cap : 16;
    void *p = realloc(*items, ncap * size);
    if (p == NULL)
        return SG_ENOMEM;
    *items = p;
    *cap = ncap;
    return SG_OK;
}

#define DEFINE_ADD(fn, field, type)                                                            \
    enum sg_status fn(struct sg_record *rec, type row)                                         \
    {                                                                                          \
        void *items = rec->field;                                                              \
        enum sg_status st = grow(&items, &rec->n_##field, &rec->cap_##field, sizeof row);      \
        rec->field = items;                                                                    \
        if (st != SG_OK)                                                                       \
            return st;                                                                         \
        rec->field[rec->n_##field++] = row;                                                    \
        return SG_OK;                                                                          \
    }

DEFINE_ADD(sg_record_add_sieve, sieve, struct sg_sieve_row)
DEFINE_ADD(sg_record_add_fine_sieve, fine_sieve, struct sg_sieve_row)
DEFINE_ADD(sg_record_add_reading, readings, struct sg_reading_row)
DEFINE_ADD(sg_record_add_pipette, pipettes, struct sg_pipette_row)

/* ---- accepted ranges -------------------------------------------------------------- */

enum range_kind {
    POSITIVE, /* > 0, then within [min, max] */
    NONNEG,   /* >= 0, then <= max */
    BETWEEN,  /* within [min, max] */
    NEGATIVE  /* < 0, then >= min (max is 0) */
};

struct range {
    const char *what;       /* as the record names it: its key, or the field's name */
    const char *unit;
    enum range_kind kind;
    double min, max;
    const char *not_positive; /* POSITIVE: the phrase for a value <= 0; NEGATIVE: for a value >= 0 */
    const char *advice;       /* what to do, for a value too low or not finite */
    const char *advice_high;  /* for a value above max (NULL: advice) */
};

#define DEPTH_LINE_ADVICE "depth_line_mm is <depth at reading 0>,<change per reading unit>, both in millimetres"

static const struct range RANGES[SG_VALUE_COUNT] = {
    [SG_VALUE_SAMPLE_MASS] = {"sample_dry_mass_g", "g", POSITIVE, SG_RECORD_MASS_MIN_G, SG_RECORD_MASS_MAX_G,
                              "must be a positive number",
                              "give the oven-dry mass of the whole sample in grams, e.g. 1850.4", NULL},
    [SG_VALUE_SPECIMEN_MASS] = {"specimen_dry_mass_g", "g", POSITIVE, SG_RECORD_MASS_MIN_G, SG_RECORD_MASS_MAX_G,
                                "must be a positive number",
                                "give the oven-dry mass of the sedimentation specimen in grams, e.g. 50.12", NULL},
    [SG_VALUE_SPLIT_APERTURE] = {"split_aperture_mm", "mm", POSITIVE, SG_RECORD_APERTURE_MIN_MM,
                                 SG_RECORD_APERTURE_MAX_MM, "must be a positive number",
                                 "give the aperture of the sieve the specimen passed, in millimetres, e.g. 2", NULL},
    [SG_VALUE_SUSPENSION_VOLUME] = {"suspension volume", "mL", POSITIVE, SG_RECORD_VOLUME_MIN_ML,
                                    SG_RECORD_VOLUME_MAX_ML, "must be positive",
                                    "give the volume of the suspension in millilitres, e.g. 1000, or leave "
                                    "'test,suspension_volume_ml' out for 1000 mL",
                                    NULL},
    [SG_VALUE_PARTICLE_DENSITY] = {"particle density", "Mg/m3", BETWEEN, SG_RECORD_PARTICLE_DENSITY_MIN_MG_M3,
                                   SG_RECORD_PARTICLE_DENSITY_MAX_MG_M3, NULL, "give it in Mg/m3, e.g. 2.65",
                                   NULL},
    [SG_VALUE_PIPETTE_VOLUME] = {"pipette volume", "mL", POSITIVE, SG_RECORD_PIPETTE_VOLUME_MIN_ML,
                                 SG_RECORD_PIPETTE_VOLUME_MAX_ML, "must be positive",
                                 "give the pipette's volume in millilitres, e.g. 25, or name a calibrated pipette "
                                 "with 'test,pipette_id,<id>'",
                                 NULL},
    [SG_VALUE_DISPERSANT_MASS] = {"dispersant mass", "g", NONNEG, 0.0, SG_RECORD_MASS_MAX_G, NULL,
                                  "give the total mass of dispersant in the suspension in grams, e.g. 2.5, or 0 "
                                  "if none was added",
                                  NULL},
    [SG_VALUE_DEPTH_AT_ZERO] = {"effective depth at reading 0 of", "mm", POSITIVE, SG_RECORD_DEPTH_MIN_MM,
                                SG_RECORD_DEPTH_MAX_MM, "must be positive", DEPTH_LINE_ADVICE, NULL},
    [SG_VALUE_DEPTH_PER_UNIT] = {"effective depth change per reading unit of", "mm", NEGATIVE,
                                 -SG_RECORD_DEPTH_PER_UNIT_ABS_MAX_MM, 0.0,
                                 "must be negative: readings rise down the stem, so the effective depth falls as "
                                 "the reading rises (e.g. -1.64 for a 152H-type hydrometer)",
                                 DEPTH_LINE_ADVICE, NULL},
    [SG_VALUE_MENISCUS] = {"meniscus correction", "reading units", BETWEEN, -SG_RECORD_READING_ABS_MAX,
                           SG_RECORD_READING_ABS_MAX, NULL, "give it in reading units, e.g. 0.5", NULL},
    [SG_VALUE_COMPOSITE] = {"composite correction", "reading units", BETWEEN, -SG_RECORD_READING_ABS_MAX,
                            SG_RECORD_READING_ABS_MAX, NULL,
                            "give the control cylinder's blank reading in reading units, e.g. 5.5", NULL},
    [SG_VALUE_SIEVE_APERTURE] = {"sieve aperture", "mm", POSITIVE, SG_RECORD_APERTURE_MIN_MM,
                                 SG_RECORD_APERTURE_MAX_MM, "must be positive", "write 'pan' for the pan",
                                 "give the aperture in millimetres, e.g. 0.425"},
    [SG_VALUE_RETAINED_MASS] = {"retained mass", "g", NONNEG, 0.0, SG_RECORD_MASS_MAX_G, NULL,
                                "give the dry mass retained on the sieve in grams, 0 if it held nothing", NULL},
    [SG_VALUE_ELAPSED] = {"elapsed time", "min", POSITIVE, SG_RECORD_ELAPSED_MIN_MIN, SG_RECORD_ELAPSED_MAX_MIN,
                          "must be positive", "give the minutes since the start of sedimentation, e.g. 0.5", NULL},
    [SG_VALUE_READING] = {"hydrometer reading", "reading units", BETWEEN, -SG_RECORD_READING_ABS_MAX,
                          SG_RECORD_READING_ABS_MAX, NULL,
                          "give the reading in the hydrometer's scale units, e.g. 24.5", NULL},
    [SG_VALUE_TEMP] = {"temperature", "C", BETWEEN, SG_RECORD_TEMP_MIN_C, SG_RECORD_TEMP_MAX_C, NULL,
                       "give it in degrees Celsius", NULL},
    [SG_VALUE_BLANK] = {"blank reading", "reading units", BETWEEN, -SG_RECORD_READING_ABS_MAX,
                        SG_RECORD_READING_ABS_MAX, NULL,
                        "give the control cylinder's blank reading in reading units, e.g. 5.5", NULL},
    [SG_VALUE_SAMPLING_DEPTH] = {"sampling depth", "mm", POSITIVE, SG_RECORD_DEPTH_MIN_MM, SG_RECORD_DEPTH_MAX_MM,
                                 "must be positive",
                                 "give the depth below the surface of the suspension in millimetres, e.g. 100",
                                 NULL},
    [SG_VALUE_SOLIDS] = {"pipette solids", "g", NONNEG, 0.0, SG_RECORD_MASS_MAX_G, NULL,
                         "give the dry mass of solids in the pipette sample in grams, e.g. 0.2483", NULL},
};

enum sg_status sg_record_check_value(enum sg_record_value which, double v, struct sg_srcpos pos,
                                     struct sg_error *err)
{
    if ((unsigned)which >= SG_VALUE_COUNT)
        return sg_error_set(err, SG_EINVAL, pos.line, pos.col, "unknown record value %d (a program error)",
                            (int)which);
    const struct range *r = &RANGES[which];
    const char *high = r->advice_high != NULL ? r->advice_high : r->advice;
    switch (r->kind) {
    case POSITIVE:
    case NEGATIVE: /* its max is 0: the test after the switch never fires */
        if (!isfinite(v) || (r->kind == POSITIVE ? v <= 0.0 : v >= 0.0))
            return sg_error_set(err, SG_EINVAL, pos.line, pos.col, "%s %g %s %s (%s)", r->what, v, r->unit,
                                r->not_positive, r->advice);
        if (v < r->min)
            return sg_error_set(err, SG_EINVAL, pos.line, pos.col,
                                "%s %g %s is below %g %s, the smallest accepted (%s)", r->what, v, r->unit, r->min,
                                r->unit, r->advice);
        break;
    case NONNEG:
        if (!isfinite(v) || v < 0.0)
            return sg_error_set(err, SG_EINVAL, pos.line, pos.col, "%s %g %s must not be negative (%s)", r->what,
                                v, r->unit, r->advice);
        break;
    case BETWEEN:
        if (!isfinite(v) || v < r->min || v > r->max)
            return sg_error_set(err, SG_EINVAL, pos.line, pos.col, "%s %g %s is outside %g%s%g %s (%s)", r->what,
                                v, r->unit, r->min, r->min < 0.0 ? " to " : "-", r->max, r->unit,
                                v > r->max ? high : r->advice);
        return SG_OK;
    }
    if (v > r->max)
        return sg_error_set(err, SG_EINVAL, pos.line, pos.col, "%s %g %s is above %g %s, the largest accepted (%s)",
                            r->what, v, r->unit, r->max, r->unit, high);
    return SG_OK;
}

/* ---- validation ------------------------------------------------------------------- */

/* Validation collects every problem; report() adds one. */
struct checker {
    struct sg_diag_list *diags;
    struct sg_error *err;
    size_t count;
};

static void report(struct checker *c, struct sg_srcpos pos, struct sg_error *e)
{
    e->line = pos.line;
    e->col = pos.col;
    if (c->count == 0 && c->err != NULL)
        *c->err = *e;
    c->count++;
    (void)sg_diag_add(c->diags, e);
}

#define REPORT(c, pos, ...)                                                                    \
    do {                                                                                       \
        struct sg_error e_;                                                                    \
        sg_error_set(&e_, SG_EINVAL, 0, 0, __VA_ARGS__);                                       \
        report((c), (pos), &e_);                                                               \
    } while (0)

/* Whether RANGES[which] accepts v: the test of sg_record_check_value
 * without building a message (validation runs once per Monte Carlo draw,
 * over some 70 values). NaN fails every comparison; the limits are finite,
 * so an infinity fails too. */
static inline bool within(enum sg_record_value which, double v)
{
    const struct range *r = &RANGES[which];
    if (!(v <= r->max))
        return false;
    switch (r->kind) {
    case POSITIVE: return v > 0.0 && v >= r->min;
    case NONNEG: return v >= 0.0;
    case BETWEEN: return v >= r->min;
    case NEGATIVE: return v < 0.0 && v >= r->min;
    }
    return false;
}

/* The rare path of check(): the message, reported. */
static bool check_report(struct checker *c, enum sg_record_value which, double v, struct sg_srcpos pos)
{
    struct sg_error e;
    if (sg_record_check_value(which, v, pos, &e) == SG_OK)
        return true;
    report(c, pos, &e);
    return false;
}

/* Reports v if it is outside its accepted range; true if it is within. */
static inline bool check(struct checker *c, enum sg_record_value which, double v, struct sg_srcpos pos)
{
    if ((unsigned)which < SG_VALUE_COUNT && within(which, v))
        return true;
    return check_report(c, which, v, pos);
}

/* A key that must be given: missing (unless the reader refused it, having
 * said so), or checked against its range. */
static void check_required(struct checker *c, const struct sg_record *rec, enum sg_record_part part,
                           enum sg_record_value which, double v, struct sg_srcpos pos, const char *key,
                           const char *unit, struct sg_srcpos fallback)
{
    if (pos.line != 0)
        (void)check(c, which, v, pos);
    else if (!(rec->refused & (unsigned)part))
        REPORT(c, fallback, "required key '%s' is missing (add a row 'test,%s,<value in %s>')", key, key, unit);
}

static bool is_id_char(char ch)
{
    return (ch >= 'A' && ch <= 'Z') || (ch >= 'a' && ch <= 'z') || (ch >= '0' && ch <= '9') || ch == '.' ||
           ch == '_' || ch == '-';
}

bool sg_record_id_is_file_name(const char *id)
{
    if (id[0] == '\0' || id[0] == '.')
        return false;
    for (const char *c = id; *c != '\0'; c++)
        if (!is_id_char(*c))
            return false;
    return true;
}

/* The id names output files: [A-Za-z0-9._-], not starting with '.' (a
 * hidden file; "." and ".." are folders), and not ending in ".report":
 * test "X.report"'s plot X.report.pdf is test X's report. */
#define ID_REPORT_SUFFIX ".report"
#define ID_REPORT_SUFFIX_LEN (sizeof ID_REPORT_SUFFIX - 1)
static void check_id(struct checker *c, const struct sg_record *rec, struct sg_srcpos top)
{
    if (rec->pos_id.line == 0 || rec->id[0] == '\0') {
        if (!(rec->refused & SG_PART_ID))
            REPORT(c, top, "required key 'id' is missing (add a row 'test,id,<test identifier>')");
        return;
    }
    const size_t len = strnlen(rec->id, sizeof rec->id);
    if (len == sizeof rec->id || !sg_record_id_is_file_name(rec->id))
        REPORT(c, rec->pos_id,
               "test id '%.*s' is not accepted (it names the output files: use letters, digits, '.', '_' and "
               "'-', starting with a letter or digit, e.g. BH1-2.5)",
               (int)(len < sizeof rec->id ? len : sizeof rec->id - 1), rec->id);
    else if (len > ID_REPORT_SUFFIX_LEN && strcmp(rec->id + len - ID_REPORT_SUFFIX_LEN, ID_REPORT_SUFFIX) == 0)
        REPORT(c, rec->pos_id,
               "test id '%s' is not accepted: its PDF plot '%s.pdf' would take the name of the report of a test "
               "'%.*s' (drop or change the '.report' ending)",
               rec->id, rec->id, (int)(len - ID_REPORT_SUFFIX_LEN), rec->id);
}

/* Elapsed times: each within range, strictly increasing. Called row by row
 * in order; *last is the previous accepted time (NAN: none, or the previous
 * row's time was refused). Inline: it runs for every row of every Monte
 * Carlo draw, and the call cost as much as the test. */
static inline void check_time(struct checker *c, double t, struct sg_srcpos pos, double *last)
{
    if (!check(c, SG_VALUE_ELAPSED, t, pos)) {
        *last = (double)NAN;
        return;
    }
    if (t == *last)
        REPORT(c, pos, "elapsed time %g min repeats the previous row's (each row needs its own time)", t);
    else if (t < *last)
        REPORT(c, pos, "elapsed time %g min is earlier than the previous row's %g min (rows must be in time order)",
               t, *last);
    *last = t;
}

static void check_sieve_rows(struct checker *c, const struct sg_sieve_row *rows, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        /* aperture 0 is the pan (SG_SIEVE_PAN_MM in sieve.h) */
        if (rows[i].aperture_mm != 0.0)
            (void)check(c, SG_VALUE_SIEVE_APERTURE, rows[i].aperture_mm, rows[i].pos);
        (void)check(c, SG_VALUE_RETAINED_MASS, rows[i].retained_g, rows[i].pos);
    }
}

enum sg_status sg_record_validate(const struct sg_record *rec, struct sg_diag_list *diags,
                                  struct sg_error *err)
{
    struct checker c = {diags, err, 0};
    const struct sg_srcpos top = {1, 1};
    const unsigned refused = rec->refused;

    check_id(&c, rec, top);
    if (rec->method == SG_METHOD_NONE && !(refused & SG_PART_METHOD))
        REPORT(&c, top, "required key 'method' is missing (add 'test,method,hydrometer' or "
                        "'test,method,pipette')");

    if (rec->pos_particle_density.line != 0)
        (void)check(&c, SG_VALUE_PARTICLE_DENSITY, rec->particle_density_mg_m3, rec->pos_particle_density);
    else if (!(refused & SG_PART_PARTICLE_DENSITY))
        REPORT(&c, top, "required key 'particle_density_mg_m3' is missing (add a row "
                        "'test,particle_density_mg_m3,<value>', e.g. 2.65 if assumed)");

    check_required(&c, rec, SG_PART_SPECIMEN_MASS, SG_VALUE_SPECIMEN_MASS, rec->specimen_dry_mass_g,
                   rec->pos_specimen_mass, "specimen_dry_mass_g", "g", top);
    const bool volume_ok = !(refused & SG_PART_VOLUME) &&
                           check(&c, SG_VALUE_SUSPENSION_VOLUME, rec->suspension_volume_ml, rec->pos_volume);

    /* Sample mass and split aperture: required with sieve rows (a refused
     * sieve row counts: the sample was sieved), checked whenever given. */
    const bool sieved = rec->n_sieve > 0 || (refused & SG_PART_SIEVE);
    const struct sg_srcpos sieve_at = rec->n_sieve > 0 ? rec->sieve[0].pos : top;
    if (rec->pos_sample_mass.line != 0 || sieved)
        check_required(&c, rec, SG_PART_SAMPLE_MASS, SG_VALUE_SAMPLE_MASS, rec->sample_dry_mass_g,
                       rec->pos_sample_mass, "sample_dry_mass_g", "g", sieve_at);
    if (rec->pos_split_aperture.line != 0 || sieved)
        check_required(&c, rec, SG_PART_SPLIT_APERTURE, SG_VALUE_SPLIT_APERTURE, rec->split_aperture_mm,
                       rec->pos_split_aperture, "split_aperture_mm", "mm", sieve_at);

    /* The specimen is part of the sample. Both are needed here, each
     * within its range (else it was reported above). */
    if (rec->pos_sample_mass.line != 0 && rec->pos_specimen_mass.line != 0 &&
        within(SG_VALUE_SAMPLE_MASS, rec->sample_dry_mass_g) &&
        within(SG_VALUE_SPECIMEN_MASS, rec->specimen_dry_mass_g) &&
        rec->specimen_dry_mass_g >
            rec->sample_dry_mass_g * (1.0 + SG_RECORD_SPECIMEN_OVER_SAMPLE_MAX_PCT / 100.0))
        REPORT(&c, rec->pos_specimen_mass,
               "specimen_dry_mass_g %g g is more than sample_dry_mass_g %g g on line %u, the whole sample's dry "
               "mass (the specimen is taken from the sample: check both masses and their units)",
               rec->specimen_dry_mass_g, rec->sample_dry_mass_g, rec->pos_sample_mass.line);

    if (rec->n_fine_sieve > 0 && rec->pos_split_aperture.line != 0 && isfinite(rec->split_aperture_mm) &&
        rec->split_aperture_mm > 0.0) {
        for (size_t i = 0; i < rec->n_fine_sieve; i++)
            if (rec->fine_sieve[i].aperture_mm > rec->split_aperture_mm)
                REPORT(&c, rec->fine_sieve[i].pos,
                       "fine sieve %g mm is coarser than the split aperture %g mm (the specimen passed "
                       "the split sieve; list this sieve as 'sieve')",
                       rec->fine_sieve[i].aperture_mm, rec->split_aperture_mm);
    }
    /* 'fine_sieve,pan' is accepted and kept, as 'sieve,pan' is, rather than
     * refused: a laboratory that weighed the specimen's pan expects to record
     * it, and the records in use do. What lies in a pan passed the finest
     * sieve and counts as passing (a pan mass is never subtracted, METHODS.md
     * 5.2), so it changes no point of the curve; what it is for is the mass
     * balance, specimen dry mass against the fine-sieve masses and pan, the
     * counterpart of the sample's balance on 'sieve,pan' (that rule belongs
     * to the QC module). */
    check_sieve_rows(&c, rec->sieve, rec->n_sieve);
    check_sieve_rows(&c, rec->fine_sieve, rec->n_fine_sieve);

    if (rec->has_depth_line) {
        (void)check(&c, SG_VALUE_DEPTH_AT_ZERO, rec->depth_line_mm[0], rec->pos_depth_line);
        (void)check(&c, SG_VALUE_DEPTH_PER_UNIT, rec->depth_line_mm[1], rec->pos_depth_line);
    }
    if (rec->has_meniscus)
        (void)check(&c, SG_VALUE_MENISCUS, rec->meniscus_correction, rec->pos_meniscus);
    if (rec->has_composite)
        (void)check(&c, SG_VALUE_COMPOSITE, rec->composite_correction, rec->pos_composite);
    const bool pipette_volume_ok =
        rec->has_pipette_volume && check(&c, SG_VALUE_PIPETTE_VOLUME, rec->pipette_volume_ml, rec->pos_pipette_volume);
    if (rec->has_dispersant)
        (void)check(&c, SG_VALUE_DISPERSANT_MASS, rec->dispersant_mass_g, rec->pos_dispersant);

    if (rec->method == SG_METHOD_HYDROMETER) {
        if (rec->n_pipettes > 0)
            REPORT(&c, rec->pipettes[0].pos, "pipette row in a hydrometer test (set 'test,method,pipette' "
                                             "or remove the row)");
        if (rec->n_readings == 0 && !(refused & SG_PART_READING))
            REPORT(&c, top, "hydrometer test has no 'reading' rows (add 'reading,<elapsed_min>,<reading>,"
                            "<temp_c>' rows)");
        if (rec->scale == SG_SCALE_NONE && !(refused & SG_PART_SCALE))
            REPORT(&c, top, "required key 'reading_scale' is missing (add 'test,reading_scale,g_per_l' or "
                            "'test,reading_scale,density')");
        if (rec->hydrometer[0] == '\0' && !rec->has_depth_line &&
            !(refused & (SG_PART_HYDROMETER | SG_PART_DEPTH_LINE)))
            REPORT(&c, top, "no effective-depth calibration (name a registered hydrometer with "
                            "'test,hydrometer,<id>' or give 'test,depth_line_mm,<depth at 0>,<change per "
                            "unit>')");
        double last = (double)NAN;
        for (size_t i = 0; i < rec->n_readings; i++) {
            const struct sg_reading_row *r = &rec->readings[i];
            check_time(&c, r->elapsed_min, r->pos, &last);
            (void)check(&c, SG_VALUE_READING, r->reading, r->pos);
            (void)check(&c, SG_VALUE_TEMP, r->temp_c,
                        (struct sg_srcpos){r->pos.line, r->temp_col ? r->temp_col : r->pos.col});
            if (r->has_blank)
                (void)check(&c, SG_VALUE_BLANK, r->blank_reading, r->pos);
        }
    } else if (rec->method == SG_METHOD_PIPETTE) {
        if (rec->n_readings > 0)
            REPORT(&c, rec->readings[0].pos, "hydrometer reading row in a pipette test (set "
                                             "'test,method,hydrometer' or remove the row)");
        if (rec->n_pipettes == 0 && !(refused & SG_PART_PIPETTE))
            REPORT(&c, top, "pipette test has no 'pipette' rows (add 'pipette,<elapsed_min>,<temp_c>,"
                            "<depth_mm>,<solids_g>' rows)");
        if (rec->pipette_id[0] == '\0' && !rec->has_pipette_volume &&
            !(refused & (SG_PART_PIPETTE_ID | SG_PART_PIPETTE_VOLUME)))
            REPORT(&c, top, "no pipette volume (name a registered pipette with 'test,pipette_id,<id>' or "
                            "give 'test,pipette_volume_ml,<mL>')");
        if (pipette_volume_ok && volume_ok && rec->pipette_volume_ml >= rec->suspension_volume_ml)
            REPORT(&c, rec->pos_pipette_volume,
                   "pipette volume %g mL is not less than the suspension volume %g mL (the pipette samples "
                   "the suspension: check both volumes and their units)",
                   rec->pipette_volume_ml, rec->suspension_volume_ml);
        double last = (double)NAN;
        for (size_t i = 0; i < rec->n_pipettes; i++) {
            const struct sg_pipette_row *p = &rec->pipettes[i];
            check_time(&c, p->elapsed_min, p->pos, &last);
            (void)check(&c, SG_VALUE_TEMP, p->temp_c, p->pos);
            (void)check(&c, SG_VALUE_SAMPLING_DEPTH, p->depth_mm, p->pos);
            (void)check(&c, SG_VALUE_SOLIDS, p->solids_g, p->pos);
        }
    }

    return c.count ? SG_EINVAL : SG_OK;
}

const char *sg_method_name(enum sg_method m)
{
    switch (m) {
    case SG_METHOD_HYDROMETER: return "hydrometer";
    case SG_METHOD_PIPETTE: return "pipette";
    case SG_METHOD_NONE: break;
    }
    return "";
}

const char *sg_scale_name(enum sg_scale s)
{
    switch (s) {
    case SG_SCALE_G_PER_L: return "g_per_l";
    case SG_SCALE_DENSITY: return "density";
    case SG_SCALE_NONE: break;
    }
    return "";
}

const char *sg_standard_name(enum sg_standard s)
{
    switch (s) {
    case SG_STANDARD_ASTM_D7928: return "astm-d7928";
    case SG_STANDARD_BS1377_2: return "bs1377-2";
    case SG_STANDARD_ISO17892_4: return "iso17892-4";
    case SG_STANDARD_NONE: break;
    }
    return "";
}
