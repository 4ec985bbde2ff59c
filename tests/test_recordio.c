/* test_recordio.c - the test-record reader: valid records in both separator
 * styles, every class of input fault with its line, column and message, the
 * malformed corpus (tests/data/malformed/cases.tsv) and file reading limits.
 *
 * Check values are the values written in the invented records under
 * tests/data/records/ and in the strings below (the parser must return what
 * the file says); line and column numbers are counted by hand from the text. */
#include <criterion/criterion.h>
#include <criterion/parameterized.h>
#include <dirent.h>
#include <fcntl.h>
#include <gsl/gsl_errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "sedgrade/recordio.h"
#include "sedgrade/sieve.h"

#if defined(__SANITIZE_ADDRESS__)
#include <sanitizer/lsan_interface.h>
#endif

#define RECORDS SG_SOURCE_DIR "/tests/data/records/"
#define MALFORMED SG_SOURCE_DIR "/tests/data/malformed/"
#define TOL 1e-12

static void suite_init(void)
{
    gsl_set_error_handler_off();
}

TestSuite(recordio, .init = suite_init);

/* Ends every test: under ASan a leak fails the test (LeakSanitizer's report
 * alone does not, nor does an assertion in .fini; TOOLCHAIN.md). */
static void no_leaks(void)
{
#if defined(__SANITIZE_ADDRESS__)
    cr_assert_eq(__lsan_do_recoverable_leak_check(), 0, "memory leaked (see the LeakSanitizer report)");
#endif
}

/* One parse of an in-memory text: record, diagnostics, first error, status. */
struct run {
    struct sg_record rec;
    struct sg_diag_list diags;
    struct sg_error err;
    enum sg_status st;
};

static void parse_text(struct run *r, const char *text, size_t len)
{
    sg_record_init(&r->rec);
    r->diags = (struct sg_diag_list){0};
    r->st = sg_recordio_parse(text, len, &r->rec, &r->diags, &r->err);
}

static void parse(struct run *r, const char *text)
{
    parse_text(r, text, strlen(text));
}

static void release(struct run *r)
{
    sg_record_release(&r->rec);
    sg_diag_release(&r->diags);
}

/* The first diagnostic must be at line:col and contain frag; err must hold it too. */
static void expect_first(const struct run *r, enum sg_status st, unsigned line, unsigned col, const char *frag)
{
    cr_assert_eq(r->st, st, "status %d, expected %d (%s)", r->st, st, r->err.msg);
    cr_assert_geq(r->diags.n, 1u);
    const struct sg_error *e = &r->diags.items[0];
    cr_assert_eq(e->line, line, "line %u, expected %u: %s", e->line, line, e->msg);
    cr_assert_eq(e->col, col, "column %u, expected %u: %s", e->col, col, e->msg);
    cr_assert_not_null(strstr(e->msg, frag), "message '%s' lacks '%s'", e->msg, frag);
    cr_assert_eq(r->err.line, line);
    cr_assert_eq(r->err.col, col);
    cr_assert_str_eq(r->err.msg, e->msg);
}

/* Whether some diagnostic at line (0: any line) contains frag. */
static bool has_diag(const struct run *r, unsigned line, const char *frag)
{
    for (size_t i = 0; i < r->diags.n; i++)
        if ((line == 0 || r->diags.items[i].line == line) && strstr(r->diags.items[i].msg, frag) != NULL)
            return true;
    return false;
}

/* A complete hydrometer record (',' separator) that later tests mutate. */
#define HEAD                                                                                       \
    "test,id,T1\n"                                                                                 \
    "test,method,hydrometer\n"                                                                     \
    "test,particle_density_mg_m3,2.67\n"                                                           \
    "test,specimen_dry_mass_g,49.86\n"                                                             \
    "test,reading_scale,g_per_l\n"                                                                 \
    "test,depth_line_mm,163.2,-1.64\n"
/* HEAD takes lines 1-6; the next line is 7. */

/* ---- valid records ----------------------------------------------------------------- */

Test(recordio, comma_record_with_comments_blank_lines_and_pan)
{
    struct sg_record rec;
    struct sg_diag_list d = {0};
    struct sg_error err;
    sg_record_init(&rec);
    cr_assert_eq(sg_recordio_load(RECORDS "hydrometer_comma.csv", &rec, &d, &err), SG_OK, "%s", err.msg);
    cr_assert_eq(d.n, 0u);
    cr_assert_str_eq(rec.id, "TB07-3.20");
    cr_assert_eq(rec.pos_id.line, 4u);
    cr_assert_eq(rec.pos_id.col, 9u);
    cr_assert_eq(rec.method, SG_METHOD_HYDROMETER);
    cr_assert_eq(rec.date.year, 2026);
    cr_assert_eq(rec.date.month, 3);
    cr_assert_eq(rec.date.day, 14);
    cr_assert_eq(rec.standard, SG_STANDARD_ASTM_D7928);
    cr_assert_float_eq(rec.particle_density_mg_m3, 2.68, TOL);
    cr_assert_float_eq(rec.sample_dry_mass_g, 1843.6, TOL);
    cr_assert_float_eq(rec.split_aperture_mm, 2.0, TOL);
    cr_assert_float_eq(rec.specimen_dry_mass_g, 50.07, TOL);
    cr_assert_float_eq(rec.suspension_volume_ml, 1000.0, TOL);
    cr_assert_str_eq(rec.hydrometer, "HY-152-04");
    cr_assert_str_eq(rec.cylinder, "CY-11");
    cr_assert_str_eq(rec.thermometer, "TH-3");
    cr_assert_eq(rec.scale, SG_SCALE_G_PER_L);
    cr_assert(rec.has_meniscus);
    cr_assert_float_eq(rec.meniscus_correction, 1.0, TOL);
    cr_assert(rec.has_composite);
    cr_assert_float_eq(rec.composite_correction, 5.5, TOL);
    cr_assert(rec.has_liquid_limit && rec.has_plastic_limit && rec.has_natural_moisture);
    cr_assert_float_eq(rec.liquid_limit_pct, 41.0, TOL);
    cr_assert_float_eq(rec.plastic_limit_pct, 22.0, TOL);
    cr_assert_float_eq(rec.natural_moisture_pct, 19.4, TOL);
    cr_assert(!rec.has_depth_line);
    cr_assert(!rec.has_pipette_volume);

    cr_assert_eq(rec.n_sieve, 5u);
    cr_assert_float_eq(rec.sieve[1].aperture_mm, 10.0, TOL);
    cr_assert_float_eq(rec.sieve[1].retained_g, 35.2, TOL);
    cr_assert_float_eq(rec.sieve[4].aperture_mm, SG_SIEVE_PAN_MM, TOL); /* "pan" */
    cr_assert_float_eq(rec.sieve[4].retained_g, 1678.5, TOL);
    cr_assert_eq(rec.sieve[0].pos.line, 24u); /* after an indented comment line */
    cr_assert_eq(rec.n_fine_sieve, 4u);
    cr_assert_float_eq(rec.fine_sieve[3].aperture_mm, SG_SIEVE_PAN_MM, TOL); /* "PAN" */
    cr_assert_float_eq(rec.fine_sieve[2].aperture_mm, 0.063, TOL);

    cr_assert_eq(rec.n_readings, 11u);
    cr_assert_float_eq(rec.readings[0].elapsed_min, 0.5, TOL);
    cr_assert_float_eq(rec.readings[0].reading, 46.5, TOL);
    cr_assert_float_eq(rec.readings[0].temp_c, 21.2, TOL);
    cr_assert(!rec.readings[0].has_blank);
    cr_assert(rec.readings[2].has_blank);
    cr_assert_float_eq(rec.readings[2].blank_reading, 5.5, TOL);
    cr_assert_float_eq(rec.readings[10].elapsed_min, 1440.0, TOL);
    cr_assert_eq(rec.readings[10].pos.line, 45u);
    cr_assert_eq(rec.readings[10].pos.col, 9u); /* the elapsed-time field */
    sg_record_release(&rec);
    sg_diag_release(&d);
    no_leaks();
}

Test(recordio, semicolon_record_with_decimal_commas)
{
    struct sg_record rec;
    struct sg_error err;
    sg_record_init(&rec);
    cr_assert_eq(sg_recordio_load(RECORDS "pipette_semicolon.csv", &rec, NULL, &err), SG_OK, "%s", err.msg);
    cr_assert_str_eq(rec.id, "TB09-1.50");
    cr_assert_eq(rec.method, SG_METHOD_PIPETTE);
    cr_assert_eq(rec.standard, SG_STANDARD_BS1377_2);
    cr_assert_float_eq(rec.particle_density_mg_m3, 2.71, TOL);
    cr_assert_float_eq(rec.specimen_dry_mass_g, 20.014, TOL);
    cr_assert_float_eq(rec.suspension_volume_ml, 500.0, TOL);
    cr_assert(rec.has_pipette_volume && rec.has_dispersant);
    cr_assert_float_eq(rec.pipette_volume_ml, 25.0, TOL);
    cr_assert_float_eq(rec.dispersant_mass_g, 0.75, TOL);
    cr_assert_eq(rec.n_fine_sieve, 2u);
    cr_assert_float_eq(rec.fine_sieve[0].aperture_mm, 0.063, TOL);
    cr_assert_float_eq(rec.fine_sieve[0].retained_g, 3.112, TOL);
    cr_assert_eq(rec.n_pipettes, 4u);
    cr_assert_float_eq(rec.pipettes[1].elapsed_min, 4.5, TOL);
    cr_assert_float_eq(rec.pipettes[1].temp_c, 20.6, TOL);
    cr_assert_float_eq(rec.pipettes[1].depth_mm, 100.0, TOL);
    cr_assert_float_eq(rec.pipettes[1].solids_g, 0.4822, TOL);
    cr_assert_eq(rec.pipettes[3].pos.line, 16u);
    sg_record_release(&rec);
    no_leaks();
}

Test(recordio, bom_and_crlf)
{
    struct sg_record rec;
    struct sg_error err;
    sg_record_init(&rec);
    cr_assert_eq(sg_recordio_load(RECORDS "bom_crlf.csv", &rec, NULL, &err), SG_OK, "%s", err.msg);
    cr_assert_str_eq(rec.id, "TB02-0.80"); /* no BOM bytes, no CR */
    cr_assert_eq(rec.scale, SG_SCALE_DENSITY);
    cr_assert(rec.has_depth_line);
    cr_assert_float_eq(rec.depth_line_mm[0], 163.5, TOL);
    cr_assert_float_eq(rec.depth_line_mm[1], -1.62, TOL);
    cr_assert_eq(rec.n_readings, 3u);
    cr_assert_eq(rec.readings[0].pos.line, 9u);
    cr_assert_float_eq(rec.readings[2].temp_c, 20.3, TOL);
    cr_assert_float_eq(rec.readings[2].blank_reading, 1.5, TOL);
    sg_record_release(&rec);
    no_leaks();
}

Test(recordio, every_key_and_uncertainty_override)
{
    struct sg_record rec;
    struct sg_error err;
    sg_record_init(&rec);
    cr_assert_eq(sg_recordio_load(RECORDS "uncertainty_keys.csv", &rec, NULL, &err), SG_OK, "%s", err.msg);
    cr_assert_str_eq(rec.id, "TB11-5.00"); /* the row is quoted field by field */
    cr_assert_str_eq(rec.pipette_id, "PP-25-2");
    cr_assert_eq(rec.standard, SG_STANDARD_ISO17892_4);
    cr_assert_float_eq(rec.u.reading, 0.25, TOL);
    cr_assert_float_eq(rec.u.temp_c, 0.2, TOL);
    cr_assert_float_eq(rec.u.elapsed_min, 0.05, TOL);
    cr_assert_float_eq(rec.u.mass_g, 0.002, TOL);
    cr_assert_float_eq(rec.u.particle_density_mg_m3, 0.02, TOL);
    cr_assert_float_eq(rec.u.blank_reading, 0.3, TOL);
    cr_assert_float_eq(rec.u.meniscus_correction, 0.1, TOL);
    cr_assert_float_eq(rec.u.pipette_volume_ml, 0.03, TOL);
    cr_assert_float_eq(rec.u.solids_g, 0.0003, TOL);
    cr_assert_float_eq(rec.u.depth_mm, 1.5, TOL);
    cr_assert_eq(rec.n_sieve, 3u);
    cr_assert_eq(rec.n_pipettes, 3u);
    sg_record_release(&rec);
    no_leaks();
}

Test(recordio, uncertainties_left_unset_stay_negative)
{
    struct run r;
    parse(&r, HEAD "reading,1,40,20\n");
    cr_assert_eq(r.st, SG_OK, "%s", r.err.msg);
    cr_assert_lt(r.rec.u.reading, 0.0); /* record.h: negative = not given */
    cr_assert_lt(r.rec.u.depth_mm, 0.0);
    release(&r);
    no_leaks();
}

Test(recordio, spreadsheet_padding_quotes_case_and_lone_cr)
{
    /* Trailing empty fields and rows of separators (a spreadsheet's export),
     * quoted fields with blanks, keys and kinds in capitals, old Mac line ends. */
    struct run r;
    parse(&r, "\"TEST\" , \"ID\" , \" T2 \",,,\r"
              ",,,,\r"
              "Test,Method,Hydrometer,,\r"
              "test,particle_density_mg_m3,2.65\r"
              "test,specimen_dry_mass_g,40\r"
              "test,reading_scale,Density\r"
              "test,depth_line_mm,150,-1.5,\r"
              "  # a comment, \"with quotes\"\r"
              "\"# a comment a spreadsheet quoted, with a comma\",,\r"
              "READING,1,20,20,,\r"
              "reading,2,18,20");
    cr_assert_eq(r.st, SG_OK, "%s", r.err.msg);
    cr_assert_str_eq(r.rec.id, "T2");
    cr_assert_eq(r.rec.scale, SG_SCALE_DENSITY);
    cr_assert_eq(r.rec.n_readings, 2u);
    cr_assert(!r.rec.readings[0].has_blank);
    cr_assert_eq(r.rec.readings[1].pos.line, 11u);
    release(&r);
    no_leaks();
}

Test(recordio, semicolon_with_decimal_points_and_negative_numbers)
{
    struct run r;
    parse(&r, "test;id;T3\ntest;method;hydrometer\ntest;particle_density_mg_m3;2.65\n"
              "test;specimen_dry_mass_g;+4.0E1\ntest;reading_scale;density\n"
              "test;depth_line_mm;150;-1,5\ntest;meniscus_correction;-.5\nreading;1;20;20;-1,25\n");
    cr_assert_eq(r.st, SG_OK, "%s", r.err.msg);
    cr_assert_float_eq(r.rec.specimen_dry_mass_g, 40.0, TOL);
    cr_assert_float_eq(r.rec.depth_line_mm[1], -1.5, TOL);
    cr_assert_float_eq(r.rec.meniscus_correction, -0.5, TOL);
    cr_assert_float_eq(r.rec.readings[0].blank_reading, -1.25, TOL);
    release(&r);
    no_leaks();
}

Test(recordio, null_diags_and_err_are_accepted)
{
    struct sg_record rec;
    sg_record_init(&rec);
    cr_assert_eq(sg_recordio_parse("readng,1\n", 9, &rec, NULL, NULL), SG_EPARSE);
    sg_record_release(&rec);
    sg_record_init(&rec);
    cr_assert_eq(sg_recordio_parse(HEAD "reading,1,40,20\n", strlen(HEAD "reading,1,40,20\n"), &rec, NULL, NULL),
                 SG_OK);
    sg_record_release(&rec);
    no_leaks();
}

Test(recordio, text_need_not_be_nul_terminated)
{
    static const char text[] = HEAD "reading,1,40,20\nreading,2,35,20\n";
    char *copy = malloc(sizeof text - 1); /* exactly the bytes: ASan sees any overread */
    cr_assert_not_null(copy);
    memcpy(copy, text, sizeof text - 1);
    struct run r;
    parse_text(&r, copy, sizeof text - 1 - 1); /* the last '\n' left out */
    cr_assert_eq(r.st, SG_OK, "%s", r.err.msg);
    cr_assert_eq(r.rec.n_readings, 2u);
    release(&r);
    free(copy);
    no_leaks();
}

/* ---- numbers ----------------------------------------------------------------------- */

Test(recordio, elapsed_time_not_a_number)
{
    struct run r;
    parse(&r, HEAD "reading,abc,40,20\n");
    expect_first(&r, SG_EPARSE, 7, 9,
                 "elapsed time 'abc' is not a number (write minutes as a decimal number, e.g. 2.5)");
    cr_assert_eq(r.diags.n, 1u); /* the refused row is not reported again as missing */
    release(&r);
    no_leaks();
}

Test(recordio, nan_inf_and_hex_are_refused)
{
    struct run r;
    parse(&r, HEAD "reading,1,NaN,20\nreading,2,40,+Infinity\nreading,3,0x1p4,20\n");
    cr_assert_eq(r.st, SG_EPARSE);
    cr_assert_eq(r.diags.n, 3u);
    cr_assert_eq(r.diags.items[0].line, 7u);
    cr_assert_eq(r.diags.items[0].col, 11u);
    cr_assert_not_null(strstr(r.diags.items[0].msg, "hydrometer reading 'NaN' is not a number"));
    cr_assert_eq(r.diags.items[1].col, 14u);
    cr_assert_not_null(strstr(r.diags.items[1].msg, "temperature '+Infinity' is not a number"));
    cr_assert_not_null(strstr(r.diags.items[2].msg, "hexadecimal"));
    release(&r);
    no_leaks();
}

Test(recordio, empty_field_in_the_middle)
{
    struct run r;
    parse(&r, HEAD "reading,1,,20\n");
    expect_first(&r, SG_EPARSE, 7, 11, "hydrometer reading is empty");
    release(&r);
    no_leaks();
}

Test(recordio, units_glued_on)
{
    static const char *const cases[][3] = {
        /* value, message fragment */
        {"reading,1,40,25C\n", "14", "temperature '25C' is not a number (remove the unit"},
        {"reading,1,40,25 \xc2\xb0" "C\n", "14", "temperature '25 \xc2\xb0" "C' is not a number (remove the unit"},
        {"reading,2.5min,40,20\n", "9", "elapsed time '2.5min' is not a number (remove the unit"},
        {"test,sample_dry_mass_g,12 g\n", "24", "sample dry mass '12 g' is not a number (remove the unit"},
        {"test,liquid_limit_pct,41%\n", "23", "liquid limit '41%' is not a number (remove the unit"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        char text[512];
        snprintf(text, sizeof text, "%s%s", HEAD, cases[i][0]);
        struct run r;
        parse(&r, text);
        expect_first(&r, SG_EPARSE, 7, (unsigned)atoi(cases[i][1]), cases[i][2]);
        release(&r);
    }
    no_leaks();
}

Test(recordio, thousands_separators)
{
    static const char *const cases[][2] = {
        {"test,sample_dry_mass_g,\"1,234.5\"\n", "remove thousands separators"},
        {"test,sample_dry_mass_g,1 234\n", "remove thousands separators"},
        {"test,sample_dry_mass_g,1'234\n", "remove thousands separators"},
        {"test,sample_dry_mass_g,1\xc2\xa0" "234\n", "remove thousands separators"},
        {"test,sample_dry_mass_g,\"1,234\"\n", "with ',' as the field separator"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        char text[512];
        snprintf(text, sizeof text, "%s%s", HEAD, cases[i][0]);
        struct run r;
        parse(&r, text);
        expect_first(&r, SG_EPARSE, 7, 24, cases[i][1]);
        release(&r);
    }
    /* With ';' the comma is the decimal mark: "1.234,5" and "1,234,5" are ambiguous. */
    struct run r;
    parse(&r, "test;id;T4\ntest;sample_dry_mass_g;1.234,5\ntest;specimen_dry_mass_g;1,234,5\n");
    cr_assert_eq(r.st, SG_EPARSE);
    cr_assert_eq(r.diags.n, 4u);
    cr_assert_eq(r.diags.items[0].line, 2u);
    cr_assert_eq(r.diags.items[0].col, 24u);
    cr_assert_not_null(strstr(r.diags.items[0].msg, "'1.234,5' is not a number (remove thousands separators"));
    cr_assert_eq(r.diags.items[1].line, 3u);
    /* then validation lists what is really missing, not the refused masses */
    cr_assert(has_diag(&r, 1, "required key 'method' is missing"));
    cr_assert(!has_diag(&r, 0, "'specimen_dry_mass_g' is missing"));
    release(&r);
    no_leaks();
}

Test(recordio, overflow_and_malformed_exponents)
{
    struct run r;
    parse(&r, HEAD "reading,1e400,40,20\nreading,2,1e,20\nreading,3,40,-\nreading,4,40,1.2.3\n");
    cr_assert_eq(r.st, SG_EPARSE);
    cr_assert_eq(r.diags.n, 4u);
    cr_assert_not_null(strstr(r.diags.items[0].msg, "elapsed time '1e400' is out of range"));
    cr_assert_not_null(strstr(r.diags.items[1].msg, "hydrometer reading '1e' is not a number"));
    cr_assert_not_null(strstr(r.diags.items[2].msg, "temperature '-' is not a number"));
    cr_assert_not_null(strstr(r.diags.items[3].msg, "temperature '1.2.3' is not a number"));
    release(&r);
    no_leaks();
}

/* ---- rows and keys ----------------------------------------------------------------- */

Test(recordio, field_counts)
{
    struct run r;
    parse(&r, HEAD "reading,1,40,20,5,6\n");
    /* pointed at the first field too many (column of '6') */
    expect_first(&r, SG_EPARSE, 7, 19,
                 "row 'reading' has 6 fields, expected 4 or 5 (elapsed_min, reading, temp_c[, blank_reading])");
    release(&r);
    parse(&r, HEAD "sieve,2\n");
    expect_first(&r, SG_EPARSE, 7, 1, "row 'sieve' has 2 fields, expected 3 (aperture_mm, retained_g)");
    release(&r);
    parse(&r, HEAD "pipette,1,20,100,0.5,7\n");
    expect_first(&r, SG_EPARSE, 7, 22, "row 'pipette' has 6 fields, expected 5");
    release(&r);
    parse(&r, "test,id,T1,T2\n");
    expect_first(&r, SG_EPARSE, 1, 12, "key 'id' takes one value, 2 given");
    release(&r);
    no_leaks();
}

Test(recordio, unknown_key_names_the_nearest)
{
    struct run r;
    parse(&r, HEAD "test,suspension_volume,500\n");
    expect_first(&r, SG_EPARSE, 7, 6, "unknown key 'suspension_volume' (did you mean 'suspension_volume_ml'?)");
    release(&r);
    parse(&r, HEAD "test,u_temp,0.1\n");
    expect_first(&r, SG_EPARSE, 7, 6, "did you mean 'u_temp_c'?");
    release(&r);
    no_leaks();
}

Test(recordio, unknown_row_kind_names_the_nearest)
{
    struct run r;
    parse(&r, HEAD "fine_seive,0.063,1.2\n");
    expect_first(&r, SG_EPARSE, 7, 1, "unknown row kind 'fine_seive' (did you mean 'fine_sieve'?");
    release(&r);
    parse(&r, HEAD "pipete,1,20,100,0.5\n");
    expect_first(&r, SG_EPARSE, 7, 1, "did you mean 'pipette'?");
    release(&r);
    no_leaks();
}

Test(recordio, duplicate_key_names_the_first_line)
{
    struct run r;
    parse(&r, HEAD "reading,1,40,20\ntest,particle_density_mg_m3,2.70\n");
    expect_first(&r, SG_EPARSE, 8, 6, "key 'particle_density_mg_m3' is given twice (first on line 3; keep one)");
    cr_assert_float_eq(r.rec.particle_density_mg_m3, 2.67, TOL); /* the first stays */
    release(&r);
    no_leaks();
}

Test(recordio, ids_and_instrument_names)
{
    struct run r;
    parse(&r, "test,id,BH1/2.5\n");
    expect_first(&r, SG_EPARSE, 1, 9, "test id 'BH1/2.5' has characters other than letters, digits");
    release(&r);
    parse(&r, "test,id,\"\"\n");
    /* an empty quoted value is a trailing empty field: the row lacks its value */
    expect_first(&r, SG_EPARSE, 1, 1, "row 'test' has 2 fields");
    release(&r);
    parse(&r, "test,id,"
              "A123456789B123456789C123456789D123456789E123456789F123456789G123\n");
    expect_first(&r, SG_EPARSE, 1, 9, "is 64 characters long, at most 63");
    release(&r);
    parse(&r, HEAD "test,cylinder,C\xc3\xa9-1\n");
    expect_first(&r, SG_EPARSE, 7, 15, "cylinder ID 'C\xc3\xa9-1' has characters other than");
    release(&r);
    /* 63 characters is the longest id; '.', '_' and '-' are allowed */
    parse(&r, "reading,1,40,20\ntest,thermometer,T.h_3-x\ntest,method,hydrometer\n"
              "test,particle_density_mg_m3,2.67\ntest,specimen_dry_mass_g,49.86\n"
              "test,reading_scale,g_per_l\ntest,depth_line_mm,163.2,-1.64\ntest,id,"
              "A123456789B123456789C123456789D123456789E123456789F123456789G12\n");
    cr_assert_eq(r.st, SG_OK, "%s", r.err.msg);
    cr_assert_str_eq(r.rec.thermometer, "T.h_3-x");
    cr_assert_eq(strlen(r.rec.id), 63u);
    release(&r);
    no_leaks();
}

Test(recordio, words_and_dates)
{
    struct run r;
    parse(&r, HEAD "reading,1,40,20\ntest,date,2026-13-01\ntest,standard,ASTM-D7928\n");
    expect_first(&r, SG_EPARSE, 8, 11, "date '2026-13-01' is not a valid calendar date");
    cr_assert_eq(r.diags.n, 1u);
    cr_assert_eq(r.rec.standard, SG_STANDARD_ASTM_D7928);
    release(&r);
    parse(&r, "test,method,sedimentation\ntest,reading_scale,152H\n");
    expect_first(&r, SG_EPARSE, 1, 13, "method 'sedimentation' is not known (write hydrometer or pipette)");
    cr_assert_not_null(strstr(r.diags.items[1].msg, "reading scale '152H' is not known"));
    /* refused words are not reported missing; the keys not given are */
    cr_assert(!has_diag(&r, 0, "'method' is missing"));
    cr_assert(!has_diag(&r, 0, "'reading_scale' is missing"));
    cr_assert(has_diag(&r, 1, "required key 'id' is missing"));
    release(&r);
    no_leaks();
}

Test(recordio, negative_values_the_validator_does_not_see)
{
    struct run r;
    parse(&r, HEAD "reading,1,40,20\ntest,u_mass_g,-0.01\nsieve,-2,5\ntest,plastic_limit_pct,-3\n");
    cr_assert_eq(r.st, SG_EINVAL, "%s", r.err.msg);
    expect_first(&r, SG_EINVAL, 8, 15, "mass uncertainty -0.01 grams must not be negative");
    cr_assert_not_null(strstr(r.diags.items[1].msg, "sieve aperture -2 mm must be positive (write 'pan'"));
    cr_assert_not_null(strstr(r.diags.items[2].msg, "plastic limit -3 percent must not be negative"));
    release(&r);
    no_leaks();
}

Test(recordio, validation_problems_follow_value_problems)
{
    struct run r;
    parse(&r, "test,id,T5\ntest,method,hydrometer\ntest,u_temp_c,-1\nreading,2,40,20\nreading,1,41,20\n");
    cr_assert_eq(r.st, SG_EINVAL);
    cr_assert_eq(r.diags.items[0].line, 3u); /* the parser's own check first */
    size_t found = 0;
    for (size_t i = 0; i < r.diags.n; i++) {
        found += strstr(r.diags.items[i].msg, "required key 'particle_density_mg_m3' is missing") != NULL;
        found += strstr(r.diags.items[i].msg, "is earlier than the previous row's") != NULL &&
                 r.diags.items[i].line == 5;
    }
    cr_assert_eq(found, 2u);
    cr_assert_eq(r.err.line, 3u);
    release(&r);
    no_leaks();
}

Test(recordio, a_refused_row_is_not_reported_missing_again)
{
    /* Guards the "one problem hides the others" fix: after a row with a
     * problem the rest of the record is still validated, but the refused
     * row's part is not called missing (no "no 'reading' rows"). */
    struct run r;
    parse(&r, "test,id,T6\ntest,method,hydrometer\nreading,x,40,20\n");
    cr_assert_eq(r.st, SG_EPARSE);
    expect_first(&r, SG_EPARSE, 3, 9, "elapsed time 'x' is not a number");
    cr_assert(has_diag(&r, 1, "required key 'particle_density_mg_m3' is missing"));
    cr_assert(!has_diag(&r, 0, "no 'reading' rows"));
    release(&r);
    no_leaks();
}

Test(recordio, all_problems_collected_in_order)
{
    struct run r;
    parse(&r, HEAD "reading,1,x,20\nbogus,1\nreading,2,40,20,1,2\ntest,id,T7\n");
    cr_assert_eq(r.st, SG_EPARSE);
    cr_assert_eq(r.diags.n, 4u);
    const unsigned lines[] = {7, 8, 9, 10};
    for (size_t i = 0; i < 4; i++)
        cr_assert_eq(r.diags.items[i].line, lines[i], "diag %zu: %s", i, r.diags.items[i].msg);
    cr_assert_eq(r.err.line, 7u);
    release(&r);
    no_leaks();
}

Test(recordio, stops_after_100_problems)
{
    size_t cap = 400 * 20 + 1;
    char *text = malloc(cap);
    cr_assert_not_null(text);
    size_t n = 0;
    for (int i = 0; i < 400; i++)
        n += (size_t)snprintf(text + n, cap - n, "reading,%d,x,20\n", i + 1);
    struct run r;
    parse_text(&r, text, n);
    cr_assert_eq(r.st, SG_EPARSE);
    cr_assert_eq(r.diags.n, SG_RECORDIO_MAX_DIAGS + 1); /* the last says it stopped */
    cr_assert_eq(r.diags.items[99].line, 100u);
    cr_assert_not_null(strstr(r.diags.items[100].msg, "too many problems: stopped after 100"));
    release(&r);
    free(text);
    no_leaks();
}

/* ---- one problem does not hide the others ------------------------------------------ */

/* Guards the audit's finding: an unknown key (a structural problem of one
 * row) used to be the only problem reported; now that row is skipped and
 * every other problem of the file follows, each at the wrong field. */
Test(recordio, unknown_key_does_not_hide_value_problems)
{
    struct run r;
    parse(&r, "test,id,T20\ntest,method,hydrometer\ntest,particle_density_mg_m3,9\n"
              "test,specimen_dry_mass_g,50.12\ntest,reading_scale,g_per_l\ntest,depth_line_mm,163.2,-1.64\n"
              "test,sample_dry_mass_g,1850.4\ntest,split_aperture_mm,2\ntest,liquid_limt_pct,41\n"
              "sieve,20,-45.2\nsieve,2,112.9\nreading,2,36,20.5\nreading,1.5,33.5,20.5\n");
    cr_assert_eq(r.st, SG_EPARSE);
    cr_assert_eq(r.diags.n, 4u);
    expect_first(&r, SG_EPARSE, 9, 6, "unknown key 'liquid_limt_pct' (did you mean 'liquid_limit_pct'?)");
    const struct {
        unsigned line, col;
        const char *frag;
    } want[] = {
        {10, 10, "retained mass -45.2 g must not be negative (give"}, /* the mass's column, not the aperture's */
        {3, 29, "particle density 9 Mg/m3 is outside 1.5-5 Mg/m3"},
        {13, 9, "elapsed time 1.5 min is earlier than the previous row's 2 min"},
    };
    for (size_t i = 0; i < 3; i++) {
        const struct sg_error *e = &r.diags.items[i + 1];
        cr_assert(e->line == want[i].line && e->col == want[i].col, "diag %zu at %u:%u: %s", i + 1, e->line,
                  e->col, e->msg);
        cr_assert_not_null(strstr(e->msg, want[i].frag), "diag %zu: %s", i + 1, e->msg);
    }
    release(&r);
    no_leaks();
}

/* Guards: an unknown row kind and a row with the wrong number of fields are
 * skipped like an unknown key, and validation still runs. */
Test(recordio, bad_rows_are_skipped_and_validation_goes_on)
{
    struct run r;
    parse(&r, HEAD "readng,1,40,20\nreading,2,38\nreading,4,36,20\ntest,specimen_dry_mass_g,49.86,1\n"
                   "test,suspension_volume_ml,0\n");
    cr_assert_eq(r.st, SG_EPARSE);
    cr_assert(has_diag(&r, 7, "unknown row kind 'readng'"));
    cr_assert(has_diag(&r, 8, "row 'reading' has 3 fields"));
    cr_assert(has_diag(&r, 10, "key 'specimen_dry_mass_g' is given twice"));
    cr_assert(has_diag(&r, 11, "suspension volume 0 mL must be positive (give the volume"));
    cr_assert_eq(r.rec.n_readings, 1u);
    release(&r);
    no_leaks();
}

/* Guards: an unknown key written where 'test,id' belongs leaves the record
 * without an id, and that is reported too. */
Test(recordio, unknown_key_in_place_of_id_reports_id_missing)
{
    struct run r;
    parse(&r, "test,idd,T21\ntest,method,hydrometer\ntest,particle_density_mg_m3,2.67\n"
              "test,specimen_dry_mass_g,49.86\ntest,reading_scale,g_per_l\ntest,depth_line_mm,163.2,-1.64\n"
              "reading,1,40,20\n");
    cr_assert_eq(r.st, SG_EPARSE);
    cr_assert_eq(r.diags.n, 2u);
    expect_first(&r, SG_EPARSE, 1, 6, "unknown key 'idd' (did you mean 'id'?)");
    cr_assert_not_null(strstr(r.diags.items[1].msg, "required key 'id' is missing"));
    release(&r);
    no_leaks();
}

/* Guards: ids starting with '.' gave hidden output files ("...points.csv");
 * they are refused, naming the characters allowed. '.' inside an id stays. */
Test(recordio, ids_starting_with_a_dot_are_refused)
{
    static const char *const ids[] = {".", "..", ".KV-1"};
    for (size_t i = 0; i < sizeof ids / sizeof ids[0]; i++) {
        char text[512];
        snprintf(text, sizeof text, "test,id,%s\n", ids[i]);
        struct run r;
        parse(&r, text);
        char want[128];
        snprintf(want, sizeof want, "test id '%s' starts with '.' (it names the output files", ids[i]);
        expect_first(&r, SG_EPARSE, 1, 9, want);
        cr_assert_not_null(strstr(r.err.msg, "letters, digits, '.', '_' or '-'"));
        cr_assert(!has_diag(&r, 0, "'id' is missing"));
        release(&r);
    }
    struct run r;
    parse(&r, HEAD "reading,1,40,20\n");
    cr_assert_eq(r.st, SG_OK, "%s", r.err.msg);
    release(&r);
    parse(&r, "test,id,KV.1.\n");
    cr_assert(!has_diag(&r, 0, "test id"));
    release(&r);
    no_leaks();
}

/* Guards: numbers that a double cannot hold are refused at parse time with
 * their location, instead of becoming 0 (1e-400), a subnormal (1e-320) or
 * infinity (1e309) that surfaces later without a location. */
Test(recordio, numbers_beyond_a_double_are_out_of_range)
{
    static const char *const cases[][2] = {
        {"test,sample_dry_mass_g,1e-400\n", "sample dry mass '1e-400' is out of range: too near zero"},
        {"test,sample_dry_mass_g,1e-320\n", "sample dry mass '1e-320' is out of range: too near zero"},
        {"test,sample_dry_mass_g,-2.5e-310\n", "sample dry mass '-2.5e-310' is out of range: too near zero"},
        {"test,sample_dry_mass_g,1e309\n", "sample dry mass '1e309' is out of range: too large"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        char text[512];
        snprintf(text, sizeof text, "%s%s", HEAD, cases[i][0]);
        struct run r;
        parse(&r, text);
        expect_first(&r, SG_EPARSE, 7, 24, cases[i][1]);
        release(&r);
    }
    /* zero written with a large negative exponent is still zero */
    struct run r;
    parse(&r, HEAD "test,meniscus_correction,0.0e-400\nreading,1,40,20\n");
    cr_assert_eq(r.st, SG_OK, "%s", r.err.msg);
    cr_assert(r.rec.has_meniscus && r.rec.meniscus_correction == 0.0);
    release(&r);
    no_leaks();
}

/* Guards the accepted ranges as the reader applies them: a value out of
 * range is reported at its own field (not the row's first) and the row is
 * left out without a "no rows" message after it. */
Test(recordio, row_values_out_of_range_are_located_at_their_field)
{
    struct run r;
    parse(&r, HEAD "reading,1,40,55\nreading,2,1040,20,3000\nsieve,pan,-1\nfine_sieve,2000,1\n");
    cr_assert_eq(r.st, SG_EINVAL);
    expect_first(&r, SG_EINVAL, 7, 14, "temperature 55 C is outside 0-40 C (give it in degrees Celsius)");
    cr_assert_eq(r.diags.items[1].col, 11u, "%s", r.diags.items[1].msg);
    cr_assert_not_null(strstr(r.diags.items[1].msg, "hydrometer reading 1040 reading units is outside"));
    cr_assert_eq(r.diags.items[2].col, 19u);
    cr_assert_not_null(strstr(r.diags.items[2].msg, "blank reading 3000"));
    cr_assert(has_diag(&r, 9, "retained mass -1 g must not be negative"));
    cr_assert_eq(r.diags.items[3].col, 11u);
    cr_assert(has_diag(&r, 10, "sieve aperture 2000 mm is above 1000 mm"));
    cr_assert(!has_diag(&r, 0, "no 'reading' rows"));
    /* the refused sieve row still needs the sample's mass and split */
    cr_assert(has_diag(&r, 1, "'sample_dry_mass_g' is missing"));
    release(&r);

    parse(&r, "test,id,P3\ntest,method,pipette\ntest,particle_density_mg_m3,2.71\n"
              "test,specimen_dry_mass_g,20.01\ntest,pipette_volume_ml,25\n"
              "pipette,0,20.4,-100,-0.6481\npipette,1e6,20.4,100,0.6\n");
    cr_assert_eq(r.st, SG_EINVAL);
    expect_first(&r, SG_EINVAL, 6, 9, "elapsed time 0 min must be positive (give the minutes");
    cr_assert(r.diags.items[1].col == 16u && strstr(r.diags.items[1].msg, "sampling depth -100 mm") != NULL);
    cr_assert(r.diags.items[2].col == 21u && strstr(r.diags.items[2].msg, "pipette solids -0.6481 g") != NULL);
    cr_assert(has_diag(&r, 7, "elapsed time 1e+06 min is above 100000 min"));
    cr_assert(!has_diag(&r, 0, "no 'pipette' rows"));
    release(&r);
    no_leaks();
}

/* Guards: keys the record keeps no position for have upper limits too. */
Test(recordio, uncertainties_and_limits_have_upper_bounds)
{
    struct run r;
    parse(&r, HEAD "reading,1,40,20\ntest,u_temp_c,100\ntest,natural_moisture_pct,2500\n");
    cr_assert_eq(r.st, SG_EINVAL);
    expect_first(&r, SG_EINVAL, 8, 15, "temperature uncertainty 100 degrees Celsius is above 40 degrees Celsius");
    cr_assert(has_diag(&r, 9, "natural moisture content 2500 percent is above 2000 percent"));
    release(&r);
    no_leaks();
}

/* Guards the choice for 'fine_sieve,pan': accepted and kept (aperture 0),
 * as the whole sample's pan is, for the specimen's mass balance. */
Test(recordio, fine_sieve_pan_is_kept)
{
    struct run r;
    parse(&r, HEAD "reading,1,40,20\nfine_sieve,0.063,4.48\nfine_sieve,pan,39.36\n");
    cr_assert_eq(r.st, SG_OK, "%s", r.err.msg);
    cr_assert_eq(r.rec.n_fine_sieve, 2u);
    cr_assert_float_eq(r.rec.fine_sieve[1].aperture_mm, SG_SIEVE_PAN_MM, TOL);
    cr_assert_float_eq(r.rec.fine_sieve[1].retained_g, 39.36, TOL);
    release(&r);
    no_leaks();
}

/* ---- text, quotes and separators -------------------------------------------------- */

Test(recordio, nul_byte_is_one_message)
{
    static const char text[] = "test,id,T8\ntest,method,hyd\0rometer\nsieve\0,\0\0\n";
    struct run r;
    parse_text(&r, text, sizeof text - 1);
    expect_first(&r, SG_EPARSE, 2, 16, "not a text file (byte 0x00 at line 2, column 16)");
    cr_assert_eq(r.diags.n, 1u);
    release(&r);
    no_leaks();
}

Test(recordio, invalid_utf8_is_located)
{
    struct run r;
    /* Latin-1 degree sign after 'reading,1,40,20' */
    parse(&r, HEAD "reading,1,40,20 \xb0" "C\n");
    expect_first(&r, SG_EPARSE, 7, 17, "byte 0xB0 at line 7, column 17 is not UTF-8 text; save the file as UTF-8");
    cr_assert_eq(r.diags.n, 1u);
    release(&r);
    /* columns count characters: two 2-byte characters before the bad byte */
    parse(&r, "# \xc3\xa9\xc3\xa9 \xed\xa0\x80\n");
    expect_first(&r, SG_EPARSE, 1, 6, "is not UTF-8 text"); /* a UTF-16 surrogate */
    release(&r);
    parse(&r, "test,id,T9\n\xf0\x9f\x98"); /* cut short at the end */
    expect_first(&r, SG_EPARSE, 2, 1, "is not UTF-8 text");
    release(&r);
    parse(&r, "\xff\xfet\0e\0");
    expect_first(&r, SG_EPARSE, 1, 1, "UTF-16");
    release(&r);
    no_leaks();
}

Test(recordio, unterminated_quote_mid_file_is_located_and_parsing_goes_on)
{
    struct run r;
    parse(&r, "test,id,\"T10\ntest,method,\"hydrometer\"\nreading,1,\"40\",20\nreadng,2,40,20\n");
    cr_assert_eq(r.st, SG_EPARSE);
    expect_first(&r, SG_EPARSE, 1, 9, "quoted field is not closed on line 1");
    cr_assert_eq(r.rec.method, SG_METHOD_HYDROMETER); /* line 2 still read */
    cr_assert_eq(r.rec.n_readings, 1u);
    cr_assert_eq(r.diags.items[1].line, 4u);
    /* the broken row was a test id: not reported missing again */
    cr_assert(!has_diag(&r, 0, "'id' is missing"));
    cr_assert(has_diag(&r, 1, "required key 'specimen_dry_mass_g' is missing"));
    release(&r);
    parse(&r, "test,id,\"T10\r\ntest,method,hydrometer\r\n");
    expect_first(&r, SG_EPARSE, 1, 9, "quoted field is not closed on line 1");
    cr_assert_eq(r.rec.method, SG_METHOD_HYDROMETER);
    release(&r);
    no_leaks();
}

Test(recordio, file_ending_inside_a_quote)
{
    struct run r;
    parse(&r, HEAD "reading,1,40,  \"20");
    expect_first(&r, SG_EPARSE, 7, 16, "the file ends inside a quoted field opened at line 7, column 16");
    release(&r);
    no_leaks();
}

Test(recordio, stray_quotes)
{
    struct run r;
    parse(&r, HEAD "reading,1,4\"0,20\nreading,2,\"40\"x,20\nreading,3,\"3\"\"5\",20\n");
    cr_assert_eq(r.st, SG_EPARSE);
    cr_assert_eq(r.diags.n, 3u);
    expect_first(&r, SG_EPARSE, 7, 12, "quote character inside a field");
    cr_assert_eq(r.diags.items[1].line, 8u);
    cr_assert_eq(r.diags.items[1].col, 15u);
    cr_assert_not_null(strstr(r.diags.items[1].msg, "text after the closing quote"));
    /* a doubled quote is a literal quote: the value is then not a number */
    cr_assert_not_null(strstr(r.diags.items[2].msg, "hydrometer reading '3\"5' is not a number"));
    cr_assert_eq(r.diags.items[2].col, 11u);
    release(&r);
    no_leaks();
}

Test(recordio, mixed_separators_name_the_line_that_set_it)
{
    struct run r;
    parse(&r, "# header\n\ntest,id,T11\ntest;method;hydrometer\n");
    expect_first(&r, SG_EPARSE, 4, 1, "line 4 uses ';' as the separator but line 3 set ','");
    release(&r);
    parse(&r, "test;id;T11\nreading;1;40;20\nreading,2,40,20\n");
    expect_first(&r, SG_EPARSE, 3, 1, "line 3 uses ',' as the separator but line 1 set ';'");
    release(&r);
    /* ';' inside a ',' row, after the kind */
    parse(&r, HEAD "reading,1,40;5,20\n");
    expect_first(&r, SG_EPARSE, 7, 11, "uses ';' as the separator but line 1 set ','");
    release(&r);
    /* the first row that has content decides; rows of separators alone do not */
    parse(&r, ";;;\ntest,id,T12\n");
    cr_assert_eq(r.diags.items[0].line, 1u, "%s", r.diags.items[0].msg);
    cr_assert_not_null(strstr(r.diags.items[0].msg, "line 1 uses ';' as the separator but line 2 set ','"));
    release(&r);
    no_leaks();
}

Test(recordio, tab_separated_rows)
{
    struct run r;
    parse(&r, "# exported with tabs\ntest\tid\tT13\n");
    expect_first(&r, SG_EPARSE, 2, 1, "line 2 separates its fields with tabs (separate them with ',' or ';')");
    release(&r);
    no_leaks();
}

Test(recordio, empty_and_comment_only_texts)
{
    struct run r;
    parse(&r, "");
    expect_first(&r, SG_EPARSE, 1, 1, "no data rows");
    release(&r);
    parse(&r, "\xef\xbb\xbf \t\n# only\n   \r\n");
    expect_first(&r, SG_EPARSE, 1, 1, "no data rows");
    release(&r);
    struct sg_record rec;
    sg_record_init(&rec);
    cr_assert_eq(sg_recordio_parse(NULL, 0, &rec, NULL, NULL), SG_EPARSE);
    sg_record_release(&rec);
    no_leaks();
}

Test(recordio, very_long_lines)
{
    const size_t big = (size_t)2 * 1024 * 1024;
    char *text = malloc(2 * big + 256);
    cr_assert_not_null(text);
    /* a 2 MB comment, then a row with a 2 MB field */
    size_t n = 0;
    text[n++] = '#';
    memset(text + n, 'c', big);
    n += big;
    text[n++] = '\n';
    n += (size_t)sprintf(text + n, "test,id,");
    memset(text + n, 'x', big);
    n += big;
    text[n++] = '\n';
    struct run r;
    parse_text(&r, text, n);
    expect_first(&r, SG_EPARSE, 2, 9, "is 2097152 characters long, at most 63");
    cr_assert_lt(strlen(r.err.msg), 300u); /* the value is cut short in the message */
    release(&r);
    /* a row of many empty fields */
    n = (size_t)sprintf(text, "reading");
    memset(text + n, ',', big);
    n += big;
    parse_text(&r, text, n);
    expect_first(&r, SG_EPARSE, 1, 1, "row 'reading' has 1 field, expected 4 or 5");
    release(&r);
    /* a row of many non-empty fields */
    n = (size_t)sprintf(text, "reading");
    for (size_t i = 0; i < big / 2; i++) {
        text[n++] = ',';
        text[n++] = '1';
    }
    parse_text(&r, text, n);
    expect_first(&r, SG_EPARSE, 1, 17, "row 'reading' has 1048577 fields, expected 4 or 5");
    release(&r);
    free(text);
    no_leaks();
}

Test(recordio, row_limit)
{
    const char *row = "sieve,1,1\n";
    const size_t rows = SG_RECORDIO_MAX_ROWS + 1, n = rows * strlen(row);
    char *text = malloc(n);
    cr_assert_not_null(text);
    for (size_t i = 0; i < rows; i++)
        memcpy(text + i * strlen(row), row, strlen(row));
    struct run r;
    parse_text(&r, text, n);
    cr_assert_eq(r.st, SG_ELIMIT);
    cr_assert_eq(r.rec.n_sieve, SG_RECORDIO_MAX_ROWS);
    cr_assert_not_null(strstr(r.err.msg, "more than 100000 data rows"));
    cr_assert_eq(r.err.line, SG_RECORDIO_MAX_ROWS + 1);
    release(&r);
    free(text);
    no_leaks();
}

Test(recordio, text_over_the_size_limit)
{
    char *text = calloc(SG_RECORDIO_MAX_BYTES + 1, 1);
    cr_assert_not_null(text);
    struct run r;
    parse_text(&r, text, SG_RECORDIO_MAX_BYTES + 1);
    cr_assert_eq(r.st, SG_ELIMIT);
    cr_assert_not_null(strstr(r.err.msg, "larger than the limit of 16777216 bytes"));
    release(&r);
    free(text);
    no_leaks();
}

/* ---- files ------------------------------------------------------------------------- */

static char tmpdir[] = "/tmp/sg-recordio-XXXXXX";

static void make_tmpdir(void)
{
    cr_assert_not_null(mkdtemp(tmpdir));
}

static void remove_tmpdir(void)
{
    char cmd[128];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", tmpdir);
    (void)system(cmd);
}

Test(recordio, read_file_reads_all_bytes)
{
    char *text = NULL;
    size_t len = 0;
    struct sg_error err;
    cr_assert_eq(sg_recordio_read_file(RECORDS "bom_crlf.csv", &text, &len, &err), SG_OK, "%s", err.msg);
    struct stat sb;
    cr_assert_eq(stat(RECORDS "bom_crlf.csv", &sb), 0);
    cr_assert_eq(len, (size_t)sb.st_size);
    cr_assert_eq(text[len], '\0');
    cr_assert_eq(memcmp(text, "\xef\xbb\xbf# BOM", 6), 0);
    free(text);
    no_leaks();
}

Test(recordio, read_file_refuses_a_200_mb_file_before_reading, .init = make_tmpdir, .fini = remove_tmpdir)
{
    char path[128];
    snprintf(path, sizeof path, "%s/huge.csv", tmpdir);
    const int fd = open(path, O_WRONLY | O_CREAT | O_TRUNC, 0644);
    cr_assert_geq(fd, 0);
    cr_assert_eq(ftruncate(fd, (off_t)200 * 1024 * 1024), 0); /* sparse: nothing is written */
    close(fd);
    char *text = (char *)1;
    size_t len = 7;
    struct sg_error err;
    cr_assert_eq(sg_recordio_read_file(path, &text, &len, &err), SG_ELIMIT);
    cr_assert_null(text);
    cr_assert_eq(len, 0u);
    cr_assert_not_null(strstr(err.msg, "209715200 bytes (200.0 MiB)"), "%s", err.msg);
    cr_assert_not_null(strstr(err.msg, "16 MiB"), "%s", err.msg);

    /* one byte over the limit is refused, the limit itself is read */
    const int fd2 = open(path, O_WRONLY | O_TRUNC);
    cr_assert_geq(fd2, 0);
    cr_assert_eq(ftruncate(fd2, (off_t)SG_RECORDIO_MAX_BYTES + 1), 0);
    close(fd2);
    cr_assert_eq(sg_recordio_read_file(path, &text, &len, &err), SG_ELIMIT);
    cr_assert_eq(truncate(path, (off_t)SG_RECORDIO_MAX_BYTES), 0);
    cr_assert_eq(sg_recordio_read_file(path, &text, &len, &err), SG_OK, "%s", err.msg);
    cr_assert_eq(len, SG_RECORDIO_MAX_BYTES);
    free(text);
    no_leaks();
}

Test(recordio, read_file_io_errors)
{
    char *text = NULL;
    size_t len = 0;
    struct sg_error err;
    cr_assert_eq(sg_recordio_read_file(RECORDS "no-such-file.csv", &text, &len, &err), SG_EIO);
    cr_assert_not_null(strstr(err.msg, "No such file or directory"), "%s", err.msg);
    cr_assert_not_null(strstr(err.msg, "no-such-file.csv"));
    cr_assert_null(text);
    cr_assert_eq(sg_recordio_read_file(RECORDS, &text, &len, &err), SG_EIO);
    cr_assert_not_null(strstr(err.msg, "Is a directory"), "%s", err.msg);
    cr_assert_eq(sg_recordio_read_file(RECORDS "bom_crlf.csv/x", &text, &len, &err), SG_EIO);
    cr_assert_not_null(strstr(err.msg, "Not a directory"), "%s", err.msg);
    no_leaks();
}

Test(recordio, read_file_failing_read)
{
    /* Linux: /proc/self/mem opens, but reading at offset 0 (unmapped) fails with EIO. */
    if (access("/proc/self/mem", R_OK) != 0)
        cr_skip_test("no /proc/self/mem");
    char *text = NULL;
    size_t len = 0;
    struct sg_error err;
    cr_assert_eq(sg_recordio_read_file("/proc/self/mem", &text, &len, &err), SG_EIO);
    cr_assert_not_null(strstr(err.msg, "cannot read '/proc/self/mem'"), "%s", err.msg);
    cr_assert_null(text);
    no_leaks();
}

Test(recordio, read_file_from_a_pipe)
{
    /* not a regular file: size unknown to fstat, read until the end */
    int fds[2];
    cr_assert_eq(pipe(fds), 0);
    const char msg[] = "test,id,P1\n";
    cr_assert_eq(write(fds[1], msg, sizeof msg - 1), (ssize_t)(sizeof msg - 1));
    close(fds[1]);
    char path[64];
    snprintf(path, sizeof path, "/proc/self/fd/%d", fds[0]);
    char *text = NULL;
    size_t len = 0;
    struct sg_error err;
    cr_assert_eq(sg_recordio_read_file(path, &text, &len, &err), SG_OK, "%s", err.msg);
    cr_assert_eq(len, sizeof msg - 1);
    cr_assert_str_eq(text, msg);
    free(text);
    close(fds[0]);
    no_leaks();
}

Test(recordio, load_puts_read_failures_in_the_list)
{
    struct sg_record rec;
    struct sg_diag_list d = {0};
    struct sg_error err;
    sg_record_init(&rec);
    cr_assert_eq(sg_recordio_load(RECORDS "missing.csv", &rec, &d, &err), SG_EIO);
    cr_assert_eq(d.n, 1u);
    cr_assert_eq(d.items[0].code, SG_EIO);
    cr_assert_str_eq(d.items[0].msg, err.msg);
    sg_diag_release(&d);
    sg_record_release(&rec);
    no_leaks();
}

/* ---- the malformed corpus ---------------------------------------------------------- */

struct corpus_case {
    char file[96];
    unsigned line;
    char frag[240];
};

static void free_cases(struct criterion_test_params *crp)
{
    cr_free(crp->params);
}

/* Reads cases.tsv: file<TAB>line<TAB>fragment, '#' lines are comments. */
static size_t read_cases(struct corpus_case *out, size_t max)
{
    FILE *fp = fopen(MALFORMED "cases.tsv", "r");
    if (fp == NULL)
        return 0;
    char line[512];
    size_t n = 0;
    while (n < max && fgets(line, sizeof line, fp) != NULL) {
        if (line[0] == '#' || line[0] == '\n')
            continue;
        line[strcspn(line, "\n")] = '\0';
        char *t1 = strchr(line, '\t');
        char *t2 = t1 ? strchr(t1 + 1, '\t') : NULL;
        if (t2 == NULL)
            continue;
        *t1 = *t2 = '\0';
        struct corpus_case *c = &out[n++];
        snprintf(c->file, sizeof c->file, "%.95s", line);
        c->line = (unsigned)strtoul(t1 + 1, NULL, 10);
        snprintf(c->frag, sizeof c->frag, "%.239s", t2 + 1);
    }
    fclose(fp);
    return n;
}

#define CORPUS_MAX 256

ParameterizedTestParameters(recordio, malformed_corpus)
{
    struct corpus_case *cases = cr_malloc(CORPUS_MAX * sizeof *cases);
    const size_t n = cases ? read_cases(cases, CORPUS_MAX) : 0;
    return cr_make_param_array(struct corpus_case, cases, n, free_cases);
}

ParameterizedTest(struct corpus_case *c, recordio, malformed_corpus)
{
    char path[256];
    snprintf(path, sizeof path, "%s%s", MALFORMED, c->file);
    struct sg_record rec;
    struct sg_diag_list d = {0};
    struct sg_error err;
    sg_record_init(&rec);
    const enum sg_status st = sg_recordio_load(path, &rec, &d, &err);
    cr_assert_neq(st, SG_OK, "%s: accepted", c->file);
    cr_assert(st == SG_EPARSE || st == SG_EINVAL, "%s: status %d", c->file, st);
    cr_assert_geq(d.n, 1u, "%s: no message", c->file);
    cr_assert_str_eq(err.msg, d.items[0].msg, "%s", c->file);
    bool found = false;
    for (size_t i = 0; i < d.n && !found; i++)
        found = d.items[i].line == c->line && strstr(d.items[i].msg, c->frag) != NULL;
    cr_assert(found, "%s: no message at line %u with '%s'; first: %u:%u %s", c->file, c->line, c->frag,
              d.items[0].line, d.items[0].col, d.items[0].msg);
    sg_diag_release(&d);
    sg_record_release(&rec);
    no_leaks();
}

Test(recordio, corpus_is_complete)
{
    static struct corpus_case cases[CORPUS_MAX];
    const size_t n = read_cases(cases, CORPUS_MAX);
    cr_assert_geq(n, 40u, "cases.tsv lists %zu cases", n);
    DIR *dir = opendir(MALFORMED);
    cr_assert_not_null(dir);
    const struct dirent *e;
    size_t files = 0;
    while ((e = readdir(dir)) != NULL) {
        const size_t l = strlen(e->d_name);
        if (l < 4 || strcmp(e->d_name + l - 4, ".csv") != 0)
            continue;
        files++;
        bool listed = false;
        for (size_t i = 0; i < n && !listed; i++)
            listed = strcmp(cases[i].file, e->d_name) == 0;
        cr_assert(listed, "%s is not in cases.tsv", e->d_name);
    }
    closedir(dir);
    cr_assert_eq(files, n, "%zu files, %zu cases", files, n);
    no_leaks();
}
