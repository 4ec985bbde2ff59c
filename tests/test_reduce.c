/* test_reduce.c - the whole pipeline through sg_reduce on records built in
 * code: V2 vectors scaled through the split sieve, blanks, errors. */
#include <criterion/criterion.h>
#include <gsl/gsl_errno.h>
#include <math.h>
#include <string.h>

#include "sedgrade/calibio.h"
#include "sedgrade/reduce.h"
#include "sedgrade/recordio.h"

static void setup(void)
{
    gsl_set_error_handler_off();
}

TestSuite(reduce, .init = setup);

static struct sg_srcpos at(unsigned line)
{
    struct sg_srcpos p = {line, 1};
    return p;
}

/* METHODS.md 13.10 V2-B record (BS-style density hydrometer) with a whole-sample sieve set whose split
 * sieve passes 80 % (hand calculation: 1000 g sample, 200 g retained on 2 mm and coarser). */
static void v2b_record(struct sg_record *rec)
{
    static const double t[] = {0.5, 1, 2, 4, 8, 30, 120, 480, 1440};
    static const double r[] = {30.0, 28.5, 26.5, 24.0, 21.5, 17.0, 12.5, 9.0, 7.0};
    sg_record_init(rec);
    strcpy(rec->id, "v2b");
    rec->pos_id = at(1);
    rec->method = SG_METHOD_HYDROMETER;
    rec->standard = SG_STANDARD_BS1377_2;
    rec->scale = SG_SCALE_DENSITY;
    rec->particle_density_mg_m3 = 2.65;
    rec->pos_particle_density = at(2);
    rec->specimen_dry_mass_g = 50.0;
    rec->pos_specimen_mass = at(3);
    rec->sample_dry_mass_g = 1000.0;
    rec->pos_sample_mass = at(4);
    rec->split_aperture_mm = 2.0;
    rec->pos_split_aperture = at(5);
    rec->has_depth_line = true;
    rec->depth_line_mm[0] = 175.0;
    rec->depth_line_mm[1] = -2.30;
    rec->has_meniscus = true;
    rec->meniscus_correction = 0.5;
    rec->has_composite = true;
    rec->composite_correction = 3.0;
    const struct sg_sieve_row s[] = {{20.0, 0.0, at(10)}, {6.3, 80.0, at(11)}, {2.0, 120.0, at(12)}};
    for (int i = 0; i < 3; i++)
        cr_assert_eq(sg_record_add_sieve(rec, s[i]), SG_OK);
    for (int i = 0; i < 9; i++) {
        const struct sg_reading_row row = {t[i], r[i], 25.0, false, 0.0, at(20u + (unsigned)i), 0};
        cr_assert_eq(sg_record_add_reading(rec, row), SG_OK);
    }
}

Test(reduce, v2b_scaled_to_whole_sample)
{
    /* V2-B finer % (METHODS.md 13.10) times the split-sieve passing 80 % (D7928/D422 scaling, METHODS 6.1) */
    static const double d[] = {0.05882, 0.04227, 0.03052, 0.02212, 0.01602, 0.00861, 0.00447, 0.00229, 0.00134};
    static const double p[] = {86.73, 81.91, 75.48, 67.45, 59.42, 44.97, 30.52, 19.27, 12.85};
    struct sg_record rec;
    struct sg_result res;
    struct sg_error err;
    v2b_record(&rec);
    sg_result_init(&res);
    cr_assert_eq(sg_reduce(&rec, NULL, NULL, &res, &err), SG_OK, "%s", err.msg);
    cr_assert(fabs(res.pp_split - 80.0) < 1e-12);
    size_t k = 0;
    for (size_t i = 0; i < res.n_points; i++) {
        const struct sg_point *pt = &res.points[i];
        if (pt->source != SG_SOURCE_HYDROMETER)
            continue;
        cr_assert(fabs(pt->diameter_mm - d[k]) < 1e-5, "D %.6f", pt->diameter_mm);
        cr_assert(fabs(pt->percent_specimen - p[k]) < 0.01);
        cr_assert(fabs(pt->percent_finer - p[k] * 0.8) < 0.01);
        cr_assert(fabs(pt->blank_reading - 3.0) < 1e-12);
        cr_assert_eq(pt->line, 20u + (unsigned)k);
        k++;
    }
    cr_assert_eq(k, 9);
    /* sieve points: 20 mm 100 %, 6.3 mm 92 %, 2 mm 80 % (METHODS 5.2 hand calculation) */
    cr_assert(fabs(res.points[0].percent_finer - 100.0) < 1e-12);
    cr_assert(fabs(res.points[1].percent_finer - 92.0) < 1e-12);
    cr_assert(fabs(res.points[2].percent_finer - 80.0) < 1e-12);
    cr_assert_str_eq(res.calibration_used, "inline");
    sg_result_release(&res);
    sg_record_release(&rec);
}

static const struct sg_flag *find_flag(const struct sg_result *res, const char *name)
{
    for (size_t i = 0; i < res->n_flags; i++)
        if (strcmp(res->flags[i].name, name) == 0)
            return &res->flags[i];
    return NULL;
}

Test(reduce, split_sieve_not_among_the_sieves_is_flagged)
{
    /* METHODS.md 5.5: the separating sieve belongs to the coarse set, so its
     * percent passing is measured. V2-B's sieves are 20, 6.3 and 2 mm. */
    struct sg_record rec;
    struct sg_result res;
    struct sg_error err;
    v2b_record(&rec);
    sg_result_init(&res);
    /* split on the 2 mm sieve (2.000 as written to three digits): no flag */
    rec.split_aperture_mm = 2.000;
    cr_assert_eq(sg_reduce(&rec, NULL, NULL, &res, &err), SG_OK, "%s", err.msg);
    cr_assert_null(find_flag(&res, "split_sieve"));
    /* split at 4 mm, no such sieve: the 6.3 mm sieve's 92 % is used, and said */
    rec.split_aperture_mm = 4.0;
    cr_assert_eq(sg_reduce(&rec, NULL, NULL, &res, &err), SG_OK, "%s", err.msg);
    cr_assert(fabs(res.pp_split - 92.0) < 1e-12);
    const struct sg_flag *f = find_flag(&res, "split_sieve");
    cr_assert_not_null(f);
    cr_assert_eq(f->severity, SG_SEVERITY_WARNING);
    cr_assert_eq(f->line, 5u);
    cr_assert(strstr(f->message, "6.3 mm") != NULL, "%s", f->message);
    cr_assert_str_eq(sg_result_quantity(&res, "qc_status")->text, "warning");
    /* split above every sieve: 100 % assumed, and said */
    rec.split_aperture_mm = 37.5;
    cr_assert_eq(sg_reduce(&rec, NULL, NULL, &res, &err), SG_OK, "%s", err.msg);
    cr_assert(fabs(res.pp_split - 100.0) < 1e-12);
    f = find_flag(&res, "split_sieve");
    cr_assert_not_null(f);
    cr_assert(strstr(f->message, "100 %") != NULL, "%s", f->message);
    /* a split aperture with no sieve rows at all: 100 % assumed, and said */
    rec.n_sieve = 0;
    rec.split_aperture_mm = 2.0;
    cr_assert_eq(sg_reduce(&rec, NULL, NULL, &res, &err), SG_OK, "%s", err.msg);
    cr_assert(fabs(res.pp_split - 100.0) < 1e-12);
    f = find_flag(&res, "split_sieve");
    cr_assert_not_null(f);
    cr_assert(strstr(f->message, "no sieve rows") != NULL, "%s", f->message);
    sg_result_release(&res);
    sg_record_release(&rec);
}

Test(reduce, row_blank_overrides_record_blank)
{
    struct sg_record rec;
    struct sg_result res;
    v2b_record(&rec);
    rec.readings[3].has_blank = true;
    rec.readings[3].blank_reading = 4.0;
    sg_result_init(&res);
    cr_assert_eq(sg_reduce(&rec, NULL, NULL, &res, NULL), SG_OK);
    const struct sg_point *pt = &res.points[3 + 3];
    cr_assert_eq(pt->source, SG_SOURCE_HYDROMETER);
    cr_assert(fabs(pt->corrected_reading - 20.0) < 1e-12);
    sg_result_release(&res);
    sg_record_release(&rec);
}

Test(reduce, register_blank_line_and_thermometer_offset)
{
    struct sg_record rec;
    struct sg_result res;
    struct sg_constants k;
    struct sg_error err;
    v2b_record(&rec);
    sg_constants_from_record(&rec, &k);
    k.has_blank_const = false;
    k.has_blank_line = true;
    k.blank_c0 = 0.5;
    k.blank_c1 = 0.1; /* blank 3.0 at 25 C */
    k.blank_tmin_c = 18.0;
    k.blank_tmax_c = 26.0;
    k.thermometer_offset_c = -0.5; /* reads 25.5 when the bath is at 25.0 */
    for (size_t i = 0; i < rec.n_readings; i++)
        rec.readings[i].temp_c = 25.5;
    snprintf(k.calibration_used, sizeof k.calibration_used, "H-1@2026-01-02");
    sg_result_init(&res);
    cr_assert_eq(sg_reduce(&rec, &k, NULL, &res, &err), SG_OK, "%s", err.msg);
    cr_assert(fabs(res.points[3].blank_reading - 3.0) < 1e-12);
    cr_assert(fabs(res.points[3].temp_c - 25.0) < 1e-12);
    cr_assert(fabs(res.points[3].diameter_mm - 0.05882) < 1e-5);
    cr_assert_str_eq(res.calibration_used, "H-1@2026-01-02");
    /* outside the calibrated temperature range: refused, located at the row */
    rec.readings[4].temp_c = 30.0;
    cr_assert_eq(sg_reduce(&rec, &k, NULL, &res, &err), SG_EDOM);
    cr_assert_eq(err.line, 24u);
    cr_assert(strstr(err.msg, "outside") != NULL, "%s", err.msg);
    sg_result_release(&res);
    sg_record_release(&rec);
}

Test(reduce, missing_blank_is_zero_with_a_warning)
{
    struct sg_record rec;
    struct sg_result res;
    struct sg_error err;
    v2b_record(&rec);
    rec.has_composite = false;
    sg_result_init(&res);
    cr_assert_eq(sg_reduce(&rec, NULL, NULL, &res, &err), SG_OK, "%s", err.msg);
    cr_assert(fabs(res.points[3].corrected_reading - 30.0) < 1e-12);
    bool flagged = false;
    for (size_t i = 0; i < res.n_flags; i++)
        flagged |= strcmp(res.flags[i].name, "no_blank") == 0 && res.flags[i].severity == SG_SEVERITY_WARNING &&
                   res.flags[i].line == 20u;
    cr_assert(flagged);
    sg_result_release(&res);
    sg_record_release(&rec);
}

Test(reduce, validation_errors_are_located)
{
    struct sg_record rec;
    struct sg_result res;
    struct sg_error err;
    v2b_record(&rec);
    rec.readings[5].elapsed_min = rec.readings[4].elapsed_min;
    sg_result_init(&res);
    cr_assert_eq(sg_reduce(&rec, NULL, NULL, &res, &err), SG_EINVAL);
    cr_assert_eq(err.line, 25u);
    cr_assert(strstr(err.msg, "repeats") != NULL, "%s", err.msg);
    rec.readings[5].elapsed_min = 30.0;
    rec.particle_density_mg_m3 = 26.5;
    cr_assert_eq(sg_reduce(&rec, NULL, NULL, &res, &err), SG_EINVAL);
    cr_assert_eq(err.line, 2u);
    cr_assert(strstr(err.msg, "1.5-5") != NULL, "%s", err.msg);
    sg_result_release(&res);
    sg_record_release(&rec);
}

/* METHODS.md 13.10 V2-C pipette vectors, through the pipeline without sieves (percent of the whole =
 * percent of the specimen). */
Test(reduce, v2c_pipette)
{
    static const double t[] = {4.125, 45.838, 412.538};
    static const double mr[] = {0.1500, 0.1100, 0.0800};
    static const double p[] = {54.17, 37.50, 25.00};
    static const double d[] = {0.020, 0.006, 0.002};
    struct sg_record rec;
    struct sg_result res;
    struct sg_error err;
    sg_record_init(&rec);
    strcpy(rec.id, "v2c");
    rec.pos_id = at(1);
    rec.method = SG_METHOD_PIPETTE;
    rec.standard = SG_STANDARD_BS1377_2;
    rec.particle_density_mg_m3 = 2.65;
    rec.pos_particle_density = at(2);
    rec.specimen_dry_mass_g = 12.0;
    rec.pos_specimen_mass = at(3);
    rec.suspension_volume_ml = 500.0;
    rec.has_pipette_volume = true;
    rec.pipette_volume_ml = 10.0;
    rec.has_dispersant = true;
    rec.dispersant_mass_g = 1.0;
    for (int i = 0; i < 3; i++) {
        const struct sg_pipette_row row = {t[i], 25.0, 100.0, mr[i], at(10u + (unsigned)i)};
        cr_assert_eq(sg_record_add_pipette(&rec, row), SG_OK);
    }
    sg_result_init(&res);
    cr_assert_eq(sg_reduce(&rec, NULL, NULL, &res, &err), SG_OK, "%s", err.msg);
    cr_assert_eq(res.n_points, 3);
    for (int i = 0; i < 3; i++) {
        cr_assert(fabs(res.points[i].percent_finer - p[i]) < 0.01);
        cr_assert(fabs(res.points[i].diameter_mm - d[i]) < 1e-5);
    }
    /* no pipette volume anywhere: refused */
    rec.has_pipette_volume = false;
    cr_assert_eq(sg_reduce(&rec, NULL, NULL, &res, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "pipette") != NULL, "%s", err.msg);
    sg_result_release(&res);
    sg_record_release(&rec);
}

Test(reduce, sedimentation_coarser_than_finest_sieve_kept_off_curve)
{
    struct sg_record rec;
    struct sg_result res;
    v2b_record(&rec);
    const struct sg_sieve_row fine = {0.063, 10.0, at(13)};
    cr_assert_eq(sg_record_add_fine_sieve(&rec, fine), SG_OK);
    sg_result_init(&res);
    cr_assert_eq(sg_reduce(&rec, NULL, NULL, &res, NULL), SG_OK);
    /* fine sieve of the specimen: 80 % passing 2 mm x (50 - 10)/50 = 64 % of the whole (METHODS 6.1) */
    const struct sg_point *fs = &res.points[3];
    cr_assert_eq(fs->source, SG_SOURCE_FINE_SIEVE);
    cr_assert(fabs(fs->percent_finer - 64.0) < 1e-12);
    /* the first hydrometer point (0.0588 mm) is finer than 0.063 mm: on the curve; none is coarser */
    cr_assert(res.points[4].on_curve);
    cr_assert_eq(res.points[4].flags & SG_PF_COARSER_THAN_SIEVE, 0u);
    sg_result_release(&res);
    sg_record_release(&rec);
    v2b_record(&rec);
    const struct sg_sieve_row finer = {0.05, 10.0, at(13)};
    cr_assert_eq(sg_record_add_fine_sieve(&rec, finer), SG_OK);
    sg_result_init(&res);
    cr_assert_eq(sg_reduce(&rec, NULL, NULL, &res, NULL), SG_OK);
    cr_assert(!res.points[4].on_curve);
    cr_assert(res.points[4].flags & SG_PF_COARSER_THAN_SIEVE);
    sg_result_release(&res);
    sg_record_release(&rec);
}

/* The Monte Carlo draws reduce with values_only and batch runs without notes with skip_notes; both must
 * give the very rows and values of a full reduction (common practice: a fast path is checked against the
 * full one), on the demo records (with the demo register) and a record built in code. */
static void same_values(const struct sg_record *rec, const struct sg_constants *k, bool steffen, double extra_dx)
{
    struct sg_reduce_options full = sg_reduce_options_default();
    if (steffen)
        full.interp = SG_INTERP_MONOTONE;
    const double dx[1] = {extra_dx};
    if (extra_dx > 0.0) {
        full.extra_dx = dx;
        full.n_extra_dx = 1;
    }
    struct sg_reduce_options quiet = full, notes = full;
    quiet.values_only = true;
    notes.skip_notes = true;
    struct sg_result a, b, c;
    struct sg_error err;
    sg_result_init(&a);
    sg_result_init(&b);
    sg_result_init(&c);
    cr_assert_eq(sg_reduce(rec, k, &full, &a, &err), SG_OK, "%s", err.msg);
    cr_assert_eq(sg_reduce(rec, k, &quiet, &b, &err), SG_OK, "%s", err.msg);
    cr_assert_eq(sg_reduce(rec, k, &notes, &c, &err), SG_OK, "%s", err.msg);
    const struct sg_result *other[2] = {&b, &c};
    for (int o = 0; o < 2; o++) {
        const struct sg_result *r = other[o];
        /* values_only leaves out the QC and bookkeeping rows that follow the values */
        if (o == 0) {
            cr_assert(r->n_quantities <= a.n_quantities, "%s", rec->id);
            for (size_t i = r->n_quantities; i < a.n_quantities; i++) {
                const char *n = a.quantities[i].name;
                cr_assert(strcmp(n, "calibration_used") == 0 || strcmp(n, "sieve_loss_pct") == 0 ||
                              strcmp(n, "qc_status") == 0 || strcmp(n, "qc_flags") == 0,
                          "%s: %s missing from the values-only rows", rec->id, n);
            }
        } else
            cr_assert_eq(r->n_quantities, a.n_quantities, "%s", rec->id);
        for (size_t i = 0; i < r->n_quantities; i++) {
            const struct sg_quantity *x = &a.quantities[i], *y = &r->quantities[i];
            cr_assert_str_eq(y->name, x->name, "%s row %zu", rec->id, i);
            cr_assert_eq(y->determined, x->determined, "%s %s", rec->id, x->name);
            cr_assert_eq(y->is_text, x->is_text, "%s %s", rec->id, x->name);
            if (!x->determined)
                continue;
            if (x->is_text)
                cr_assert_str_eq(y->text, x->text, "%s %s", rec->id, x->name);
            else
                cr_assert(memcmp(&y->value, &x->value, sizeof x->value) == 0, "%s %s: %.17g vs %.17g", rec->id,
                          x->name, y->value, x->value);
        }
        cr_assert_eq(r->n_points, a.n_points);
        for (size_t i = 0; i < a.n_points; i++) {
            cr_assert(memcmp(&r->points[i].percent_finer, &a.points[i].percent_finer, sizeof(double)) == 0);
            cr_assert(memcmp(&r->points[i].diameter_mm, &a.points[i].diameter_mm, sizeof(double)) == 0);
            /* the other fields a draw fills (reduce.h, values_only) */
            cr_assert_eq(r->points[i].source, a.points[i].source);
            cr_assert_eq(r->points[i].line, a.points[i].line);
            cr_assert_eq(r->points[i].on_curve, a.points[i].on_curve);
            cr_assert_eq(r->points[i].flags & SG_PF_COARSER_THAN_SIEVE, a.points[i].flags & SG_PF_COARSER_THAN_SIEVE);
        }
    }
    sg_result_release(&a);
    sg_result_release(&b);
    sg_result_release(&c);
}

Test(reduce, values_only_and_skip_notes_give_the_full_values)
{
    struct sg_record rec;
    v2b_record(&rec);
    struct sg_constants k;
    sg_constants_from_record(&rec, &k);
    same_values(&rec, &k, false, 0.0);
    same_values(&rec, &k, true, 5.0);
    sg_record_release(&rec);

    static const char *const demo[] = {"KV-BH03-D2", "KV-BH03-D5", "KV-BH07-U4", "KV-BH11-D3", "KV-TP12-B1"};
    for (size_t i = 0; i < sizeof demo / sizeof demo[0]; i++) {
        char path[512];
        snprintf(path, sizeof path, "%s/demo/records/%s.csv", SG_SOURCE_DIR, demo[i]);
        struct sg_error err;
        cr_assert_eq(sg_recordio_load(path, &rec, NULL, &err), SG_OK, "%s: %s", path, err.msg);
        char reg[512];
        snprintf(reg, sizeof reg, "%s/calibration", SG_SOURCE_DIR);
        cr_assert_eq(sg_calibio_resolve(reg, &rec, &k, &err), SG_OK, "%s: %s", path, err.msg);
        same_values(&rec, &k, false, 0.0);
        same_values(&rec, &k, true, 2.5);
        sg_record_release(&rec);
    }
}
