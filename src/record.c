/* record.c - the parsed test record: lifecycle, row arrays and validation. */
#include "sedgrade/record.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* Limits on record values (validation). */
#define PARTICLE_DENSITY_MIN_MG_M3 1.5 /* organic soils (common practice) */
#define PARTICLE_DENSITY_MAX_MG_M3 5.0 /* heavy minerals (common practice) */
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

static bool positive(double x)
{
    return isfinite(x) && x > 0.0;
}

static void check_required_positive(struct checker *c, double v, struct sg_srcpos pos, const char *key,
                                    const char *unit, struct sg_srcpos fallback)
{
    if (pos.line == 0)
        REPORT(c, fallback, "required key '%s' is missing (add a row 'test,%s,<value in %s>')", key, key,
               unit);
    else if (!positive(v))
        REPORT(c, pos, "%s %g %s must be a positive number", key, v, unit);
}

static void check_times(struct checker *c, const double *t, const struct sg_srcpos *pos, size_t n,
                        size_t stride_t, size_t stride_pos)
{
    for (size_t i = 0; i < n; i++) {
        const double ti = *(const double *)((const char *)t + i * stride_t);
        const struct sg_srcpos pi = *(const struct sg_srcpos *)((const char *)pos + i * stride_pos);
        if (!positive(ti)) {
            REPORT(c, pi, "elapsed time %g min must be positive", ti);
            continue;
        }
        if (i > 0) {
            const double tp = *(const double *)((const char *)t + (i - 1) * stride_t);
            if (ti == tp)
                REPORT(c, pi, "elapsed time %g min repeats the previous row's (each row needs its own time)",
                       ti);
            else if (ti < tp)
                REPORT(c, pi, "elapsed time %g min is earlier than the previous row's %g min (rows must be "
                              "in time order)",
                       ti, tp);
        }
    }
}

enum sg_status sg_record_validate(const struct sg_record *rec, struct sg_diag_list *diags,
                                  struct sg_error *err)
{
    struct checker c = {diags, err, 0};
    const struct sg_srcpos top = {1, 1};

    if (rec->pos_id.line == 0 || rec->id[0] == '\0')
        REPORT(&c, top, "required key 'id' is missing (add a row 'test,id,<test identifier>')");
    if (rec->method == SG_METHOD_NONE)
        REPORT(&c, top, "required key 'method' is missing (add 'test,method,hydrometer' or "
                        "'test,method,pipette')");

    if (rec->pos_particle_density.line == 0)
        REPORT(&c, top, "required key 'particle_density_mg_m3' is missing (add a row "
                        "'test,particle_density_mg_m3,<value>', e.g. 2.65 if assumed)");
    else if (!isfinite(rec->particle_density_mg_m3) ||
             rec->particle_density_mg_m3 < PARTICLE_DENSITY_MIN_MG_M3 ||
             rec->particle_density_mg_m3 > PARTICLE_DENSITY_MAX_MG_M3)
        REPORT(&c, rec->pos_particle_density,
               "particle density %g Mg/m3 is outside %g-%g Mg/m3 (give it in Mg/m3, e.g. 2.65)",
               rec->particle_density_mg_m3, PARTICLE_DENSITY_MIN_MG_M3, PARTICLE_DENSITY_MAX_MG_M3);

    check_required_positive(&c, rec->specimen_dry_mass_g, rec->pos_specimen_mass, "specimen_dry_mass_g", "g",
                            top);
    if (!positive(rec->suspension_volume_ml))
        REPORT(&c, rec->pos_volume, "suspension volume %g mL must be positive", rec->suspension_volume_ml);

    if (rec->n_sieve > 0) {
        check_required_positive(&c, rec->sample_dry_mass_g, rec->pos_sample_mass, "sample_dry_mass_g", "g",
                                rec->sieve[0].pos);
        check_required_positive(&c, rec->split_aperture_mm, rec->pos_split_aperture, "split_aperture_mm", "mm",
                                rec->sieve[0].pos);
    }
    if (rec->n_fine_sieve > 0 && rec->pos_split_aperture.line != 0 && positive(rec->split_aperture_mm)) {
        for (size_t i = 0; i < rec->n_fine_sieve; i++)
            if (rec->fine_sieve[i].aperture_mm > rec->split_aperture_mm)
                REPORT(&c, rec->fine_sieve[i].pos,
                       "fine sieve %g mm is coarser than the split aperture %g mm (the specimen passed "
                       "the split sieve; list this sieve as 'sieve')",
                       rec->fine_sieve[i].aperture_mm, rec->split_aperture_mm);
    }

    if (rec->method == SG_METHOD_HYDROMETER) {
        if (rec->n_pipettes > 0)
            REPORT(&c, rec->pipettes[0].pos, "pipette row in a hydrometer test (set 'test,method,pipette' "
                                             "or remove the row)");
        if (rec->n_readings == 0)
            REPORT(&c, top, "hydrometer test has no 'reading' rows (add 'reading,<elapsed_min>,<reading>,"
                            "<temp_c>' rows)");
        if (rec->scale == SG_SCALE_NONE)
            REPORT(&c, top, "required key 'reading_scale' is missing (add 'test,reading_scale,g_per_l' or "
                            "'test,reading_scale,density')");
        if (rec->hydrometer[0] == '\0' && !rec->has_depth_line)
            REPORT(&c, top, "no effective-depth calibration (name a registered hydrometer with "
                            "'test,hydrometer,<id>' or give 'test,depth_line_mm,<depth at 0>,<change per "
                            "unit>')");
        if (rec->n_readings > 0)
            check_times(&c, &rec->readings[0].elapsed_min, &rec->readings[0].pos, rec->n_readings,
                        sizeof *rec->readings, sizeof *rec->readings);
        for (size_t i = 0; i < rec->n_readings; i++) {
            const struct sg_reading_row *r = &rec->readings[i];
            if (!isfinite(r->reading))
                REPORT(&c, r->pos, "hydrometer reading must be a finite number");
            if (!isfinite(r->temp_c) || r->temp_c < 0.0 || r->temp_c > 40.0)
                REPORT(&c, r->pos, "temperature %g C is outside 0-40 C (give it in degrees Celsius)", r->temp_c);
            if (r->has_blank && !isfinite(r->blank_reading))
                REPORT(&c, r->pos, "blank reading must be a finite number");
        }
    } else if (rec->method == SG_METHOD_PIPETTE) {
        if (rec->n_readings > 0)
            REPORT(&c, rec->readings[0].pos, "hydrometer reading row in a pipette test (set "
                                             "'test,method,hydrometer' or remove the row)");
        if (rec->n_pipettes == 0)
            REPORT(&c, top, "pipette test has no 'pipette' rows (add 'pipette,<elapsed_min>,<temp_c>,"
                            "<depth_mm>,<solids_g>' rows)");
        if (rec->pipette_id[0] == '\0' && !rec->has_pipette_volume)
            REPORT(&c, top, "no pipette volume (name a registered pipette with 'test,pipette_id,<id>' or "
                            "give 'test,pipette_volume_ml,<mL>')");
        if (rec->has_pipette_volume && !positive(rec->pipette_volume_ml))
            REPORT(&c, rec->pos_pipette_volume, "pipette volume %g mL must be positive", rec->pipette_volume_ml);
        if (rec->has_dispersant && (!isfinite(rec->dispersant_mass_g) || rec->dispersant_mass_g < 0.0))
            REPORT(&c, rec->pos_dispersant, "dispersant mass %g g must not be negative", rec->dispersant_mass_g);
        if (rec->n_pipettes > 0)
            check_times(&c, &rec->pipettes[0].elapsed_min, &rec->pipettes[0].pos, rec->n_pipettes,
                        sizeof *rec->pipettes, sizeof *rec->pipettes);
        for (size_t i = 0; i < rec->n_pipettes; i++) {
            const struct sg_pipette_row *p = &rec->pipettes[i];
            if (!isfinite(p->temp_c) || p->temp_c < 0.0 || p->temp_c > 40.0)
                REPORT(&c, p->pos, "temperature %g C is outside 0-40 C (give it in degrees Celsius)", p->temp_c);
            if (!positive(p->depth_mm))
                REPORT(&c, p->pos, "sampling depth %g mm must be positive", p->depth_mm);
            if (!isfinite(p->solids_g) || p->solids_g < 0.0)
                REPORT(&c, p->pos, "pipette solids %g g must not be negative", p->solids_g);
        }
    }
    for (size_t i = 0; i < rec->n_sieve; i++)
        if (!isfinite(rec->sieve[i].retained_g) || rec->sieve[i].retained_g < 0.0)
            REPORT(&c, rec->sieve[i].pos, "retained mass %g g must not be negative", rec->sieve[i].retained_g);
    for (size_t i = 0; i < rec->n_fine_sieve; i++)
        if (!isfinite(rec->fine_sieve[i].retained_g) || rec->fine_sieve[i].retained_g < 0.0)
            REPORT(&c, rec->fine_sieve[i].pos, "retained mass %g g must not be negative",
                   rec->fine_sieve[i].retained_g);

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
