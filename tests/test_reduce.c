/* test_reduce.c - the whole pipeline through sg_reduce on records built in
 * code: V2 vectors scaled through the split sieve, blanks, errors. */
#include <criterion/criterion.h>
#include <gsl/gsl_errno.h>
#include <math.h>
#include <string.h>

#include "sedgrade/reduce.h"

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
        const struct sg_reading_row row = {t[i], r[i], 25.0, false, 0.0, at(20u + (unsigned)i)};
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
