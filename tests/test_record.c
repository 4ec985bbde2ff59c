/* test_record.c - record lifecycle, row arrays and validation (every problem listed, located). */
#include <criterion/criterion.h>
#include <string.h>

#include "sedgrade/record.h"

static struct sg_srcpos at(unsigned line)
{
    struct sg_srcpos p = {line, 3};
    return p;
}

static void minimal_hydrometer(struct sg_record *rec)
{
    sg_record_init(rec);
    strcpy(rec->id, "R-1");
    rec->pos_id = at(1);
    rec->method = SG_METHOD_HYDROMETER;
    rec->scale = SG_SCALE_G_PER_L;
    rec->particle_density_mg_m3 = 2.67;
    rec->pos_particle_density = at(2);
    rec->specimen_dry_mass_g = 50.3;
    rec->pos_specimen_mass = at(3);
    rec->has_depth_line = true;
    const struct sg_reading_row r1 = {1.0, 30.5, 21.2, false, 0, at(10)};
    const struct sg_reading_row r2 = {2.0, 28.0, 21.3, false, 0, at(11)};
    cr_assert_eq(sg_record_add_reading(rec, r1), SG_OK);
    cr_assert_eq(sg_record_add_reading(rec, r2), SG_OK);
}

Test(record, defaults)
{
    struct sg_record rec;
    sg_record_init(&rec);
    cr_assert_eq(rec.suspension_volume_ml, 1000.0); /* SPEC default */
    cr_assert(rec.u.reading < 0 && rec.u.temp_c < 0 && rec.u.depth_mm < 0);
    sg_record_release(&rec);
    sg_record_release(NULL);
}

Test(record, valid_minimal)
{
    struct sg_record rec;
    minimal_hydrometer(&rec);
    struct sg_diag_list d = {0};
    cr_assert_eq(sg_record_validate(&rec, &d, NULL), SG_OK);
    cr_assert_eq(d.n, 0u);
    sg_record_release(&rec);
}

Test(record, copy_is_deep)
{
    struct sg_record rec, copy;
    minimal_hydrometer(&rec);
    cr_assert_eq(sg_record_copy(&copy, &rec), SG_OK);
    copy.readings[0].reading = 99.0;
    cr_assert_eq(rec.readings[0].reading, 30.5);
    const struct sg_reading_row r3 = {4.0, 26.0, 21.3, false, 0, at(12)};
    cr_assert_eq(sg_record_add_reading(&copy, r3), SG_OK);
    cr_assert_eq(rec.n_readings, 2u);
    sg_record_release(&copy);
    sg_record_release(&rec);
}

Test(record, all_problems_listed)
{
    struct sg_record rec;
    minimal_hydrometer(&rec);
    rec.particle_density_mg_m3 = 0.9;           /* outside 1.5-5 */
    rec.specimen_dry_mass_g = 0.0;              /* not positive */
    rec.readings[1].elapsed_min = 1.0;          /* repeats */
    rec.readings[0].temp_c = 55.0;              /* outside 0-40 */
    const struct sg_sieve_row s = {2.0, 10.0, at(20)};
    cr_assert_eq(sg_record_add_sieve(&rec, s), SG_OK); /* sieve rows need sample mass and split */
    struct sg_diag_list d = {0};
    struct sg_error first;
    cr_assert_eq(sg_record_validate(&rec, &d, &first), SG_EINVAL);
    cr_assert_geq(d.n, 6u);
    cr_assert_eq(first.line, 2u);
    const char *want[] = {"outside 1.5-5", "specimen_dry_mass_g", "sample_dry_mass_g", "split_aperture_mm",
                          "repeats", "outside 0-40"};
    for (size_t w = 0; w < sizeof want / sizeof want[0]; w++) {
        bool found = false;
        for (size_t i = 0; i < d.n; i++)
            found |= strstr(d.items[i].msg, want[w]) != NULL;
        cr_assert(found, "no message with '%s'", want[w]);
    }
    sg_diag_release(&d);
    sg_record_release(&rec);
}

Test(record, method_specific_rules)
{
    struct sg_record rec;
    minimal_hydrometer(&rec);
    rec.scale = SG_SCALE_NONE;
    rec.has_depth_line = false;
    const struct sg_pipette_row p = {4.0, 25.0, 100.0, 0.1, at(30)};
    cr_assert_eq(sg_record_add_pipette(&rec, p), SG_OK);
    struct sg_diag_list d = {0};
    cr_assert_eq(sg_record_validate(&rec, &d, NULL), SG_EINVAL);
    cr_assert_eq(d.n, 3u);
    sg_diag_release(&d);
    sg_record_release(&rec);

    sg_record_init(&rec);
    strcpy(rec.id, "P-1");
    rec.pos_id = at(1);
    rec.method = SG_METHOD_PIPETTE;
    rec.particle_density_mg_m3 = 2.65;
    rec.pos_particle_density = at(2);
    rec.specimen_dry_mass_g = 12.0;
    rec.pos_specimen_mass = at(3);
    struct sg_error err;
    cr_assert_eq(sg_record_validate(&rec, NULL, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "no 'pipette' rows") != NULL, "%s", err.msg);
    sg_record_release(&rec);
}

Test(record, names)
{
    cr_assert_str_eq(sg_method_name(SG_METHOD_PIPETTE), "pipette");
    cr_assert_str_eq(sg_scale_name(SG_SCALE_DENSITY), "density");
    cr_assert_str_eq(sg_standard_name(SG_STANDARD_BS1377_2), "bs1377-2");
    cr_assert_str_eq(sg_standard_name(SG_STANDARD_NONE), "");
}
