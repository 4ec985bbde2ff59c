/* test_record.c - record lifecycle, row arrays and validation (every problem listed, located). */
#include <criterion/criterion.h>
#include <math.h>
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
    rec->depth_line_mm[0] = 163.2; /* a 152H-type line, invented */
    rec->depth_line_mm[1] = -1.64;
    const struct sg_reading_row r1 = {1.0, 30.5, 21.2, false, 0, at(10), 0};
    const struct sg_reading_row r2 = {2.0, 28.0, 21.3, false, 0, at(11), 0};
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
    const struct sg_reading_row r3 = {4.0, 26.0, 21.3, false, 0, at(12), 0};
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

/* Whether some diagnostic contains frag (and, if line != 0, is on that line). */
static bool has_msg(const struct sg_diag_list *d, unsigned line, const char *frag)
{
    for (size_t i = 0; i < d->n; i++)
        if ((line == 0 || d->items[i].line == line) && strstr(d->items[i].msg, frag) != NULL)
            return true;
    return false;
}

/* Guards the accepted ranges (record.h SG_RECORD_*): values a lab could
 * write pass; values that only a unit slip or an overflow gives are refused
 * with the value, the limit and what to do. Values are invented. */
Test(record, check_value_ranges)
{
    static const struct {
        enum sg_record_value which;
        double v;
        const char *frag; /* NULL: accepted */
    } cases[] = {
        {SG_VALUE_SPECIMEN_MASS, 50.12, NULL},
        {SG_VALUE_SPECIMEN_MASS, 0.0011, NULL},
        {SG_VALUE_SPECIMEN_MASS, 1e-300, "specimen_dry_mass_g 1e-300 g is below 0.001 g, the smallest accepted (give"},
        {SG_VALUE_SPECIMEN_MASS, 0.0, "specimen_dry_mass_g 0 g must be a positive number (give the oven-dry mass"},
        {SG_VALUE_SAMPLE_MASS, 999999.5, NULL},
        {SG_VALUE_SAMPLE_MASS, 1e308, "sample_dry_mass_g 1e+308 g is above 1e+06 g, the largest accepted (give"},
        {SG_VALUE_SAMPLE_MASS, -3.7, "sample_dry_mass_g -3.7 g must be a positive number (give the oven-dry mass"},
        {SG_VALUE_SPLIT_APERTURE, 0.0, "split_aperture_mm 0 mm must be a positive number (give the aperture"},
        {SG_VALUE_SPLIT_APERTURE, 2000.0, "is above 1000 mm"},
        {SG_VALUE_SUSPENSION_VOLUME, 0.0, "suspension volume 0 mL must be positive (give the volume"},
        {SG_VALUE_SUSPENSION_VOLUME, 1e7, "is above 100000 mL"},
        {SG_VALUE_PARTICLE_DENSITY, 2670.0, "particle density 2670 Mg/m3 is outside 1.5-5 Mg/m3 (give it in Mg/m3"},
        {SG_VALUE_PIPETTE_VOLUME, 25.0, NULL},
        {SG_VALUE_PIPETTE_VOLUME, -25.0, "pipette volume -25 mL must be positive (give the pipette's volume"},
        {SG_VALUE_DISPERSANT_MASS, 0.0, NULL},
        {SG_VALUE_DISPERSANT_MASS, -0.5, "dispersant mass -0.5 g must not be negative (give the total mass"},
        {SG_VALUE_DEPTH_AT_ZERO, 0.0, "effective depth at reading 0 of 0 mm must be positive (depth_line_mm is"},
        {SG_VALUE_DEPTH_PER_UNIT, -1.64, NULL},
        {SG_VALUE_DEPTH_PER_UNIT, -164.0, "is below -100 mm, the smallest accepted"},
        /* a depth line that rises with the reading, or is flat, cannot be
         * a hydrometer's (readings rise down the stem; the register refuses
         * such a fit too) */
        {SG_VALUE_DEPTH_PER_UNIT, 1.64, "must be negative"},
        {SG_VALUE_DEPTH_PER_UNIT, 0.0, "must be negative"},
        {SG_VALUE_MENISCUS, 0.5, NULL},
        {SG_VALUE_COMPOSITE, -5.5, NULL},
        {SG_VALUE_SIEVE_APERTURE, -2.0, "sieve aperture -2 mm must be positive (write 'pan' for the pan)"},
        {SG_VALUE_SIEVE_APERTURE, 2000.0, "sieve aperture 2000 mm is above 1000 mm, the largest accepted (give the "
                                          "aperture in millimetres"},
        {SG_VALUE_RETAINED_MASS, 0.0, NULL},
        {SG_VALUE_RETAINED_MASS, -45.2, "retained mass -45.2 g must not be negative (give the dry mass retained"},
        {SG_VALUE_ELAPSED, 0.0, "elapsed time 0 min must be positive (give the minutes since the start"},
        {SG_VALUE_ELAPSED, 1440.0, NULL},
        {SG_VALUE_ELAPSED, 1e6, "is above 100000 min"},
        {SG_VALUE_READING, -3.5, NULL},
        {SG_VALUE_READING, 1025.0, "hydrometer reading 1025 reading units is outside -1000 to 1000"},
        {SG_VALUE_TEMP, 68.9, "temperature 68.9 C is outside 0-40 C (give it in degrees Celsius)"},
        {SG_VALUE_BLANK, 5.5, NULL},
        {SG_VALUE_SAMPLING_DEPTH, -100.0, "sampling depth -100 mm must be positive (give the depth below"},
        {SG_VALUE_SAMPLING_DEPTH, 0.2, "sampling depth 0.2 mm is below 1 mm"},
        {SG_VALUE_SOLIDS, -0.0125, "pipette solids -0.0125 g must not be negative (give the dry mass of solids"},
        {SG_VALUE_SOLIDS, NAN, "must not be negative"},
        {SG_VALUE_SPECIMEN_MASS, INFINITY, "must be a positive number"},
    };
    const struct sg_srcpos pos = {12, 26};
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        struct sg_error e;
        sg_error_clear(&e);
        const enum sg_status st = sg_record_check_value(cases[i].which, cases[i].v, pos, &e);
        if (cases[i].frag == NULL) {
            cr_assert_eq(st, SG_OK, "case %zu (%g): %s", i, cases[i].v, e.msg);
            continue;
        }
        cr_assert_eq(st, SG_EINVAL, "case %zu (%g) accepted", i, cases[i].v);
        cr_assert(strstr(e.msg, cases[i].frag) != NULL, "case %zu: '%s' lacks '%s'", i, e.msg, cases[i].frag);
        cr_assert(e.line == 12 && e.col == 26, "case %zu located at %u:%u", i, e.line, e.col);
        cr_assert(strchr(e.msg, '(') != NULL, "case %zu: no advice in '%s'", i, e.msg);
    }
    cr_assert_eq(sg_record_check_value(SG_VALUE_COUNT, 1.0, pos, NULL), SG_EINVAL);
}

/* Guards: validation of a record built in code refuses out-of-range masses
 * too (the reader is not the only way in), located at the key. */
Test(record, validate_refuses_extreme_masses)
{
    struct sg_record rec;
    minimal_hydrometer(&rec);
    rec.specimen_dry_mass_g = 1e-300;
    struct sg_error err;
    cr_assert_eq(sg_record_validate(&rec, NULL, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "is below 0.001 g") != NULL, "%s", err.msg);
    cr_assert_eq(err.line, 3u);
    sg_record_release(&rec);
}

/* Guards: a specimen heavier than the whole sample it came from is refused
 * beyond the weighing slack of 1 % (record.h); equal masses pass. */
Test(record, specimen_not_heavier_than_sample)
{
    struct sg_record rec;
    minimal_hydrometer(&rec);
    rec.sample_dry_mass_g = 40.0;
    rec.pos_sample_mass = at(4);
    struct sg_diag_list d = {0};
    cr_assert_eq(sg_record_validate(&rec, &d, NULL), SG_EINVAL); /* 50.3 g > 40 g */
    cr_assert(has_msg(&d, 3, "specimen_dry_mass_g 50.3 g is more than sample_dry_mass_g 40 g on line 4"));
    sg_diag_release(&d);
    rec.sample_dry_mass_g = 50.3; /* the whole sample was the specimen */
    cr_assert_eq(sg_record_validate(&rec, NULL, NULL), SG_OK);
    rec.sample_dry_mass_g = 49.9; /* 0.8 % lighter: weighing error, let through */
    cr_assert_eq(sg_record_validate(&rec, NULL, NULL), SG_OK);
    rec.sample_dry_mass_g = 49.7; /* 1.2 % lighter */
    cr_assert_eq(sg_record_validate(&rec, NULL, NULL), SG_EINVAL);
    sg_record_release(&rec);
}

/* Guards: ids that would name hidden files or folders (".", "..", ".x") or
 * leave the output folder are refused in records built in code as well. */
Test(record, validate_refuses_ids_starting_with_a_dot)
{
    static const char *const bad[] = {".", "..", ".hidden", "a/b", ""};
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        struct sg_record rec;
        minimal_hydrometer(&rec);
        strcpy(rec.id, bad[i]);
        struct sg_error err;
        cr_assert_eq(sg_record_validate(&rec, NULL, &err), SG_EINVAL, "id '%s' accepted", bad[i]);
        cr_assert(strstr(err.msg, bad[i][0] ? "is not accepted (it names the output files" : "'id' is missing") !=
                      NULL,
                  "%s", err.msg);
        sg_record_release(&rec);
    }
    struct sg_record rec;
    minimal_hydrometer(&rec);
    strcpy(rec.id, "BH1-2.5_a");
    cr_assert_eq(sg_record_validate(&rec, NULL, NULL), SG_OK);
    /* "X.report": its PDF plot X.report.pdf would overwrite test X's report */
    strcpy(rec.id, "B1.report");
    struct sg_error err;
    cr_assert_eq(sg_record_validate(&rec, NULL, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "'B1.report.pdf' would take the name of the report of a test 'B1'") != NULL, "%s",
              err.msg);
    strcpy(rec.id, "B1.reports");
    cr_assert_eq(sg_record_validate(&rec, NULL, NULL), SG_OK);
    strcpy(rec.id, ".report");
    cr_assert_eq(sg_record_validate(&rec, NULL, NULL), SG_EINVAL); /* hidden */
    sg_record_release(&rec);
}

/* Guards: a part the reader refused (its problem already reported) is not
 * reported again as missing; the parts not given still are. */
Test(record, refused_parts_are_not_reported_missing)
{
    struct sg_record rec;
    sg_record_init(&rec);
    rec.method = SG_METHOD_HYDROMETER;
    rec.refused = SG_PART_ID | SG_PART_SPECIMEN_MASS | SG_PART_READING | SG_PART_SCALE | SG_PART_DEPTH_LINE;
    struct sg_diag_list d = {0};
    cr_assert_eq(sg_record_validate(&rec, &d, NULL), SG_EINVAL);
    cr_assert_eq(d.n, 1u, "%s", d.n ? d.items[0].msg : "");
    cr_assert(has_msg(&d, 1, "'particle_density_mg_m3' is missing"));
    sg_diag_release(&d);

    /* a refused sieve row still means the sample was sieved: its mass is needed */
    sg_record_release(&rec);
    minimal_hydrometer(&rec);
    rec.refused = SG_PART_SIEVE;
    cr_assert_eq(sg_record_validate(&rec, &d, NULL), SG_EINVAL);
    cr_assert(has_msg(&d, 0, "'sample_dry_mass_g' is missing"));
    cr_assert(has_msg(&d, 0, "'split_aperture_mm' is missing"));
    sg_diag_release(&d);
    sg_record_release(&rec);
}

/* Guards the choice for 'fine_sieve,pan': accepted like the whole sample's
 * pan (aperture 0 in either list), never called an aperture of 0 mm. */
Test(record, fine_sieve_pan_is_accepted)
{
    struct sg_record rec;
    minimal_hydrometer(&rec);
    const struct sg_sieve_row fine = {0.063, 4.48, at(20)}, pan = {0.0, 39.36, at(21)};
    cr_assert_eq(sg_record_add_fine_sieve(&rec, fine), SG_OK);
    cr_assert_eq(sg_record_add_fine_sieve(&rec, pan), SG_OK);
    struct sg_error err;
    cr_assert_eq(sg_record_validate(&rec, NULL, &err), SG_OK, "%s", err.msg);
    sg_record_release(&rec);
}

/* Guards: a pipette that would draw more than the suspension holds is
 * refused before reduction, at the pipette volume. */
Test(record, pipette_volume_below_suspension_volume)
{
    struct sg_record rec;
    sg_record_init(&rec);
    strcpy(rec.id, "P-2");
    rec.pos_id = at(1);
    rec.method = SG_METHOD_PIPETTE;
    rec.particle_density_mg_m3 = 2.71;
    rec.pos_particle_density = at(2);
    rec.specimen_dry_mass_g = 20.01;
    rec.pos_specimen_mass = at(3);
    rec.suspension_volume_ml = 500.0;
    rec.pos_volume = at(4);
    rec.has_pipette_volume = true;
    rec.pipette_volume_ml = 500.0;
    rec.pos_pipette_volume = at(5);
    const struct sg_pipette_row p = {4.5, 20.6, 100.0, 0.4822, at(10)};
    cr_assert_eq(sg_record_add_pipette(&rec, p), SG_OK);
    struct sg_error err;
    cr_assert_eq(sg_record_validate(&rec, NULL, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "pipette volume 500 mL is not less than the suspension volume 500 mL") != NULL, "%s",
              err.msg);
    cr_assert_eq(err.line, 5u);
    rec.pipette_volume_ml = 25.0;
    cr_assert_eq(sg_record_validate(&rec, NULL, &err), SG_OK, "%s", err.msg);
    sg_record_release(&rec);
}
