/* test_calibio.c - register files on disk: parsing with located errors,
 * appending atomically under a lock (earlier bytes never change, a bad event
 * changes nothing, concurrent appends lose nothing), and resolving a test
 * record's instrument constants for its date. */
#include <criterion/criterion.h>
#include <criterion/parameterized.h>
#include <dirent.h>
#include <gsl/gsl_errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include "sedgrade/calibio.h"

#define DEMO_REGISTER SG_SOURCE_DIR "/calibration"
#define GEOMETRY SG_SOURCE_DIR "/tests/data/register/geometry"
#define BROKEN SG_SOURCE_DIR "/tests/data/register/broken"
#define EVENTS SG_SOURCE_DIR "/tests/data/register/events"

static void setup(void)
{
    gsl_set_error_handler_off();
}

TestSuite(calibio, .init = setup);

/* ---- helpers ------------------------------------------------------------------ */

static char *slurp(const char *path, size_t *len)
{
    FILE *f = fopen(path, "rb");
    cr_assert_not_null(f, "cannot open %s", path);
    cr_assert_eq(fseek(f, 0, SEEK_END), 0);
    const long n = ftell(f);
    cr_assert(n >= 0);
    rewind(f);
    char *p = malloc((size_t)n + 1);
    cr_assert_not_null(p);
    cr_assert_eq(fread(p, 1, (size_t)n, f), (size_t)n);
    p[n] = '\0';
    fclose(f);
    *len = (size_t)n;
    return p;
}

static void spit(const char *path, const char *text)
{
    FILE *f = fopen(path, "wb");
    cr_assert_not_null(f, "cannot write %s", path);
    cr_assert_eq(fwrite(text, 1, strlen(text), f), strlen(text));
    cr_assert_eq(fclose(f), 0);
}

/* A fresh copy of the geometry test register in a temporary folder. */
static void copy_register(char *dir, size_t size)
{
    (void)snprintf(dir, size, "/tmp/sg-calibio-XXXXXX");
    cr_assert_not_null(mkdtemp(dir));
    static const char *const files[] = {"T-CY-A.csv", "T-H152.csv", "T-TH.csv", "T-PP.csv"};
    for (size_t i = 0; i < sizeof files / sizeof files[0]; i++) {
        char src[512], dst[512];
        size_t len;
        (void)snprintf(src, sizeof src, "%s/%s", GEOMETRY, files[i]);
        (void)snprintf(dst, sizeof dst, "%s/%s", dir, files[i]);
        char *text = slurp(src, &len);
        spit(dst, text);
        free(text);
    }
}

static void remove_register(const char *dir)
{
    DIR *d = opendir(dir);
    if (d == NULL)
        return;
    const struct dirent *de;
    while ((de = readdir(d)) != NULL) {
        if (strcmp(de->d_name, ".") == 0 || strcmp(de->d_name, "..") == 0)
            continue;
        char p[512];
        (void)snprintf(p, sizeof p, "%s/%s", dir, de->d_name);
        (void)unlink(p);
    }
    closedir(d);
    (void)rmdir(dir);
}

/* Number of entries in dir other than . and .. */
static size_t count_entries(const char *dir)
{
    DIR *d = opendir(dir);
    cr_assert_not_null(d);
    size_t n = 0;
    const struct dirent *de;
    while ((de = readdir(d)) != NULL)
        if (strcmp(de->d_name, ".") != 0 && strcmp(de->d_name, "..") != 0)
            n++;
    closedir(d);
    return n;
}

static enum sg_status parse(const char *text, enum sg_calibio_mode mode, struct sg_cal_instrument *ins,
                            struct sg_error *err)
{
    return sg_calibio_parse(text, strlen(text), mode, ins, err);
}

static enum sg_status append_file(const char *dir, const char *id, const char *event_path, struct sg_error *err)
{
    size_t len;
    char *text = slurp(event_path, &len);
    const enum sg_status st = sg_calibio_append(dir, id, text, len, err);
    free(text);
    return st;
}

static void record_for(struct sg_record *rec, const char *hydrometer, const char *cylinder, const char *thermometer,
                       const char *pipette, int y, int m, int d)
{
    sg_record_init(rec);
    (void)snprintf(rec->id, sizeof rec->id, "T1");
    (void)snprintf(rec->hydrometer, sizeof rec->hydrometer, "%s", hydrometer);
    (void)snprintf(rec->cylinder, sizeof rec->cylinder, "%s", cylinder);
    (void)snprintf(rec->thermometer, sizeof rec->thermometer, "%s", thermometer);
    (void)snprintf(rec->pipette_id, sizeof rec->pipette_id, "%s", pipette);
    rec->date.year = y;
    rec->date.month = m;
    rec->date.day = d;
    rec->pos_hydrometer.line = 7;
    rec->pos_hydrometer.col = 12;
    rec->pos_thermometer.line = 9;
    rec->pos_thermometer.col = 13;
    rec->pos_pipette_id.line = 10;
    rec->pos_pipette_id.col = 12;
    rec->pos_cylinder.line = 8;
    rec->pos_cylinder.col = 10;
}

static const char minimal[] = "instrument,T-X\n"
                              "kind,thermometer\n"
                              "\n"
                              "event,2020-01-05,calibration\n"
                              "by,tester\n"
                              "method,ice point\n"
                              "ice_point,0.15\n"
                              "limit,correction_max_c,0.5\n"
                              "due,2030-01-05\n";

/* ---- parsing ---------------------------------------------------------------------- */

Test(calibio, parse_minimal_register)
{
    struct sg_cal_instrument ins;
    cr_assert_eq(parse(minimal, SG_CALIBIO_REGISTER, &ins, NULL), SG_OK);
    cr_assert_str_eq(ins.id, "T-X");
    cr_assert_eq(ins.kind, SG_CAL_THERMOMETER);
    cr_assert_eq(ins.n_events, 1);
    cr_assert_eq(ins.events[0].line, 4);
    cr_assert_eq(ins.events[0].n_obs, 1);
    cr_assert_float_eq(ins.events[0].obs[0].y, 0.15, 1e-12);
    cr_assert_eq(ins.events[0].obs[0].pos.line, 7);
    sg_cal_instrument_release(&ins);
}

Test(calibio, parse_bom_crlf_semicolon_decimal_comma_quotes)
{
    const char text[] = "\xEF\xBB\xBF# comment\r\n"
                        "instrument;T-X\r\n"
                        "kind;thermometer\r\n"
                        "location;\"bench 1; left\"\r\n"
                        "   \r\n"
                        "event;2020-01-05;calibration\r\n"
                        "by;\"Smith, J.\"\r\n"
                        "method;ice point\r\n"
                        "ice_point;0,15\r\n"
                        "comparison;20,02;20,14\r\n"
                        "limit;correction_max_c;0,5\r\n"
                        "due;2030-01-05\r\n";
    struct sg_cal_instrument ins;
    struct sg_error err;
    cr_assert_eq(parse(text, SG_CALIBIO_REGISTER, &ins, &err), SG_OK, "%s", err.msg);
    cr_assert_str_eq(ins.location, "bench 1; left");
    cr_assert_str_eq(ins.events[0].by, "Smith, J.");
    cr_assert_float_eq(ins.events[0].obs[0].y, 0.15, 1e-12);
    cr_assert_float_eq(ins.events[0].obs[1].x, 20.02, 1e-12);
    cr_assert_float_eq(ins.events[0].limits[0].value, 0.5, 1e-12);
    sg_cal_instrument_release(&ins);
}

/* Each case: text, expected status, line, column, a fragment of the message. */
struct bad_case {
    const char *text;
    enum sg_status st;
    unsigned line, col;
    const char *frag;
};

static const struct bad_case bad_cases[] = {
    {"instrument,T-X\nkind,thermometer\nevent,2020-01-05,calibration\nby,a\nmethod,m\nice_point,0.1O\n", SG_EPARSE,
     6, 11, "not a number"},
    {"instrument,T-X\nkind,thermometer\nevent,2020-01-05,calibration\nby,a\nmethod,m\nicepoint,0.1\n", SG_EPARSE, 6,
     1, "did you mean 'ice_point'"},
    {"instrument,T-X\nkind,thermometer\nevent,2020-01-05,calibration\nby,a\"b\n", SG_EPARSE, 4, 5, "malformed CSV"},
    {"instrument,T-X\nkind,thermometer\nevent,2020-01-05,calibration\nby,\"open\n", SG_EPARSE, 4, 8, "not closed"},
    {"instrument,T-X\nkind,thermometer\nevent,2020-02-30,calibration\n", SG_EPARSE, 3, 7, "calendar date"},
    {"instrument,T-X\nkind,thermometer\nevent,2020-01-05,calibrate\n", SG_EINVAL, 3, 18, "unknown event type"},
    {"kind,thermometer\ninstrument,T-X\n", SG_EINVAL, 1, 1, "first row"},
    {"instrument,T X\n", SG_EINVAL, 1, 12, "instrument ID"},
    {"instrument,T-X\nkind,thermometer\nby,someone\n", SG_EINVAL, 3, 1, "belongs to an event"},
    {"instrument,T-X\nkind,thermometer\nevent,2020-01-05,relocation\nby,a\nmaker,b\n", SG_EINVAL, 5, 1,
     "identity row 'maker' after an event"},
    {"instrument,T-X\nkind,balance\n", SG_EINVAL, 2, 6, "unknown kind"},
    {"instrument,T-X\nkind,hydrometer\nscale,g_per_l\nevent,2020-01-05,calibration\nby,a\nmethod,m\n"
     "bulb_volume_ml,67000\n",
     SG_EINVAL, 7, 16, "outside"},
    {"instrument,T-X\nkind,thermometer\nevent,2020-01-05,calibration\nby,a\nby,b\n", SG_EINVAL, 5, 1, "twice"},
    {"instrument,T-X\nkind,thermometer\nevent,2020-01-05,calibration\nby,a\nmethod,m\nice_point,0.1,0.2\n",
     SG_EPARSE, 6, 15, "fields"},
    {"instrument,T-X\nkind,thermometer\nrange,5,1\n", SG_EINVAL, 3, 9, "empty"},
    {"instrument,T-X\nkind,thermometer\nevent,2020-01-05,calibration\nby,a\nmethod,m\nice_point,0.1\n"
     "limit,correction_max_c,0.5\ndue,2020-01-01\n",
     SG_EINVAL, 8, 5, "not after"},
    {"instrument,T-X\nkind,pipette\nnominal_ml,10\nevent,2020-01-05,calibration\nby,a\nmethod,m\n"
     "delivery,10.0,9.0\n",
     SG_EINVAL, 7, 15, "positive"},
    {"", SG_EINVAL, 1, 1, "instrument"},
};

/* The tests run in another process image: the strings go to Criterion's shared heap. */
static char *shared_strdup(const char *s)
{
    const size_t n = strlen(s) + 1;
    char *p = cr_malloc(n);
    if (p != NULL)
        memcpy(p, s, n);
    return p;
}

static void free_cases(struct criterion_test_params *crp)
{
    struct bad_case *cases = crp->params;
    for (size_t i = 0; i < crp->length; i++) {
        cr_free((void *)cases[i].text);
        cr_free((void *)cases[i].frag);
    }
    cr_free(cases);
}

ParameterizedTestParameters(calibio, parse_errors_are_located)
{
    const size_t n = sizeof bad_cases / sizeof bad_cases[0];
    struct bad_case *cases = cr_malloc(n * sizeof *cases);
    for (size_t i = 0; cases != NULL && i < n; i++) {
        cases[i] = bad_cases[i];
        cases[i].text = shared_strdup(bad_cases[i].text);
        cases[i].frag = shared_strdup(bad_cases[i].frag);
    }
    return cr_make_param_array(struct bad_case, cases, n, free_cases);
}

ParameterizedTest(const struct bad_case *c, calibio, parse_errors_are_located)
{
    struct sg_cal_instrument ins;
    struct sg_error err;
    const enum sg_status st = parse(c->text, SG_CALIBIO_REGISTER, &ins, &err);
    cr_assert_eq(st, c->st, "case '%s': status %d, message %s", c->text, st, err.msg);
    cr_assert_eq(err.line, c->line, "case '%s': line %u (%s)", c->text, err.line, err.msg);
    cr_assert_eq(err.col, c->col, "case '%s': col %u (%s)", c->text, err.col, err.msg);
    cr_assert(strstr(err.msg, c->frag) != NULL, "case '%s': message '%s' lacks '%s'", c->text, err.msg, c->frag);
    sg_cal_instrument_release(&ins);
}

Test(calibio, parse_nul_byte_and_stray_cr)
{
    const char text[] = "instrument,T-X\nkind,ther\0mometer\n";
    struct sg_cal_instrument ins;
    struct sg_error err;
    cr_assert_eq(sg_calibio_parse(text, sizeof text - 1, SG_CALIBIO_REGISTER, &ins, &err), SG_EPARSE);
    cr_assert_eq(err.line, 2);
    cr_assert_eq(err.col, 10);
    sg_cal_instrument_release(&ins);
    cr_assert_eq(parse("instrument,T-X\rkind,thermometer\n", SG_CALIBIO_REGISTER, &ins, &err), SG_EPARSE);
    cr_assert(strstr(err.msg, "carriage return") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);
}

Test(calibio, parse_modes)
{
    struct sg_cal_instrument ins;
    struct sg_error err;
    /* an event file may not carry identity rows, and must carry an event */
    cr_assert_eq(parse(minimal, SG_CALIBIO_EVENTS, &ins, &err), SG_EINVAL);
    cr_assert_eq(err.line, 1);
    sg_cal_instrument_release(&ins);
    cr_assert_eq(parse("# nothing\n", SG_CALIBIO_EVENTS, &ins, &err), SG_EINVAL);
    sg_cal_instrument_release(&ins);
    /* events only: not validated as a history (no limit here) */
    cr_assert_eq(parse("event,2020-01-05,calibration\nice_point,0.1\n", SG_CALIBIO_EVENTS, &ins, &err), SG_OK);
    cr_assert_eq(ins.n_events, 1);
    sg_cal_instrument_release(&ins);
    /* standalone: the kind comes from the observations */
    cr_assert_eq(parse(minimal + strlen("instrument,T-X\nkind,thermometer\n"), SG_CALIBIO_STANDALONE, &ins, &err),
                 SG_OK, "%s", err.msg);
    cr_assert_eq(ins.kind, SG_CAL_THERMOMETER);
    sg_cal_instrument_release(&ins);
    /* standalone: a hydrometer's depth needs no scale, a liquid's reference does */
    const char depth[] = "event,2026-01-01,calibration\nby,a\nmethod,m\ncylinder,CY\nbulb_volume_ml,67\n"
                         "bulb_length_mm,140\nneck_mm,0,105\nneck_mm,25,64\nneck_mm,50,23\nmeniscus,0,1\n"
                         "limit,depth_residual_mm,0.5\nlimit,meniscus_spread,1\ndue,2027-01-01\n";
    cr_assert_eq(parse(depth, SG_CALIBIO_STANDALONE, &ins, &err), SG_OK, "%s", err.msg);
    cr_assert_eq(ins.kind, SG_CAL_HYDROMETER);
    sg_cal_instrument_release(&ins);
    cr_assert_eq(parse(depth, SG_CALIBIO_REGISTER, &ins, &err), SG_EINVAL);
    sg_cal_instrument_release(&ins);
    const char liquid[] = "event,2026-01-01,verification\nby,a\nmethod,m\nscale_liquid,1.000,0\n"
                          "scale_liquid,1.010,10\nscale_liquid,1.020,20\nlimit,scale_error_max,0.5\n"
                          "due,2027-01-01\n";
    cr_assert_eq(parse(liquid, SG_CALIBIO_STANDALONE, &ins, &err), SG_EINVAL);
    cr_assert_eq(err.line, 4);
    cr_assert(strstr(err.msg, "scale,") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);
}

Test(calibio, demo_register_loads_whole)
{
    struct sg_cal_register reg;
    struct sg_diag_list diags = {0};
    struct sg_error err;
    cr_assert_eq(sg_calibio_load_register(DEMO_REGISTER, &reg, &diags, &err), SG_OK, "%s", err.msg);
    cr_assert_eq(diags.n, 0);
    cr_assert_geq(reg.n, 7);
    size_t hydrometers = 0, cylinders = 0, pipettes = 0, thermometers = 0;
    for (size_t i = 0; i < reg.n; i++) {
        switch (reg.items[i].kind) {
        case SG_CAL_HYDROMETER: hydrometers++; break;
        case SG_CAL_CYLINDER: cylinders++; break;
        case SG_CAL_PIPETTE: pipettes++; break;
        case SG_CAL_THERMOMETER: thermometers++; break;
        case SG_CAL_KIND_NONE: break;
        }
    }
    cr_assert_geq(hydrometers, 2);
    cr_assert_geq(cylinders, 2);
    cr_assert_geq(pipettes, 1);
    cr_assert_geq(thermometers, 2);
    sg_cal_register_release(&reg);
    sg_diag_release(&diags);
}

Test(calibio, broken_register_reports_each_file)
{
    struct sg_cal_register reg;
    struct sg_diag_list diags = {0};
    struct sg_error err;
    cr_assert_eq(sg_calibio_load_register(BROKEN, &reg, &diags, &err), SG_EPARSE);
    cr_assert_eq(reg.n, 1);
    cr_assert_str_eq(reg.items[0].id, "T-GOOD");
    cr_assert_eq(diags.n, 2);
    cr_assert(strstr(diags.items[0].msg, "T-BAD.csv:8:11: ") != NULL, "%s", diags.items[0].msg);
    cr_assert(strstr(diags.items[1].msg, "file name") != NULL, "%s", diags.items[1].msg);
    sg_cal_register_release(&reg);
    sg_diag_release(&diags);
    cr_assert_eq(sg_calibio_load_register("/nonexistent/register", &reg, NULL, &err), SG_ENOTFOUND);
    sg_cal_register_release(&reg);
}

Test(calibio, load_by_id)
{
    struct sg_cal_instrument ins;
    struct sg_error err;
    cr_assert_eq(sg_calibio_load(GEOMETRY, "T-H152", &ins, &err), SG_OK, "%s", err.msg);
    cr_assert_eq(ins.kind, SG_CAL_HYDROMETER);
    sg_cal_instrument_release(&ins);
    cr_assert_eq(sg_calibio_load(GEOMETRY, "T-NONE", &ins, &err), SG_ENOTFOUND);
    cr_assert(strstr(err.msg, "T-NONE") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);
    cr_assert_eq(sg_calibio_load(GEOMETRY, "../etc/passwd", &ins, &err), SG_EINVAL);
    sg_cal_instrument_release(&ins);
    cr_assert_eq(sg_calibio_load(BROKEN, "T-NAME", &ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "T-OTHER") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);
    char path[64];
    cr_assert(!sg_calibio_path("dir", "a/b", path, sizeof path));
    cr_assert(!sg_calibio_path("a-very-long-directory-name-that-does-not-fit-in-the-buffer", "X", path, 32));
}

/* ---- appending ------------------------------------------------------------------------ */

Test(calibio, append_keeps_earlier_bytes)
{
    char dir[64], path[128];
    copy_register(dir, sizeof dir);
    (void)snprintf(path, sizeof path, "%s/T-TH.csv", dir);
    size_t before_len, after_len;
    char *before = slurp(path, &before_len);
    struct sg_error err;
    cr_assert_eq(append_file(dir, "T-TH", EVENTS "/th-ok.csv", &err), SG_OK, "%s", err.msg);
    char *after = slurp(path, &after_len);
    cr_assert_gt(after_len, before_len);
    cr_assert_eq(memcmp(before, after, before_len), 0, "earlier bytes changed");
    struct sg_cal_instrument ins;
    cr_assert_eq(sg_calibio_load(dir, "T-TH", &ins, &err), SG_OK, "%s", err.msg);
    cr_assert_eq(ins.n_events, 2);
    cr_assert_eq(ins.events[1].type, SG_CAL_EV_VERIFICATION);
    cr_assert_eq(ins.events[1].n_obs, 3);
    sg_cal_instrument_release(&ins);
    /* a second append keeps the first one's bytes too */
    free(before);
    before = after;
    before_len = after_len;
    cr_assert_eq(append_file(dir, "T-TH", EVENTS "/th-semicolon.csv", &err), SG_OK, "%s", err.msg);
    after = slurp(path, &after_len);
    cr_assert_eq(memcmp(before, after, before_len), 0, "earlier bytes changed");
    /* written with the register's separator and a decimal point */
    cr_assert(strstr(after + before_len, "ice_point,0.10\n") != NULL, "%s", after + before_len);
    cr_assert(strstr(after + before_len, "comparison,20.00,20.12\n") != NULL, "%s", after + before_len);
    cr_assert(strstr(after + before_len, "by,\"tester; second shift\"\n") != NULL, "%s", after + before_len);
    /* no temporary file is left behind: 4 instruments and the lock file */
    cr_assert_eq(count_entries(dir), 5);
    free(before);
    free(after);
    remove_register(dir);
}

Test(calibio, append_refuses_a_bad_row_and_changes_nothing)
{
    char dir[64], path[128];
    copy_register(dir, sizeof dir);
    (void)snprintf(path, sizeof path, "%s/T-TH.csv", dir);
    size_t before_len, after_len;
    char *before = slurp(path, &before_len);
    struct sg_error err;
    cr_assert_eq(append_file(dir, "T-TH", EVENTS "/th-badrow.csv", &err), SG_EPARSE);
    cr_assert_eq(err.line, 5);
    cr_assert_eq(err.col, 11);
    cr_assert(strstr(err.msg, "'zero' is not a number") != NULL, "%s", err.msg);
    char *after = slurp(path, &after_len);
    cr_assert_eq(after_len, before_len);
    cr_assert_eq(memcmp(before, after, before_len), 0);
    free(after);

    /* dated before the last event: refused as a whole, nothing changes */
    const char early[] = "event,2019-12-31,verification\nby,a\nmethod,m\nice_point,0.1\n"
                         "limit,correction_max_c,0.5\ndue,2021-01-01\n";
    cr_assert_eq(sg_calibio_append(dir, "T-TH", early, strlen(early), &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "date order") != NULL, "%s", err.msg);
    cr_assert_eq(err.line, 1);
    /* a calibration with no limit */
    const char nolimit[] = "event,2031-01-01,calibration\nby,a\nmethod,m\nice_point,0.1\ndue,2032-01-01\n";
    cr_assert_eq(sg_calibio_append(dir, "T-TH", nolimit, strlen(nolimit), &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "correction_max_c") != NULL, "%s", err.msg);
    /* observations of another kind */
    const char wrong[] = "event,2031-01-01,calibration\nby,a\nmethod,m\nmeniscus,0,1\n"
                         "limit,meniscus_spread,1\ndue,2032-01-01\n";
    cr_assert_eq(sg_calibio_append(dir, "T-TH", wrong, strlen(wrong), &err), SG_EINVAL);
    cr_assert_eq(err.line, 4);
    /* a depth calibration naming a cylinder that is not one */
    const char notcyl[] = "event,2031-01-01,calibration\nby,a\nmethod,m\ncylinder,T-TH\nbulb_volume_ml,67\n"
                          "bulb_length_mm,140\nneck_mm,0,105\nneck_mm,25,64\nneck_mm,50,23\nmeniscus,0,1\n"
                          "limit,depth_residual_mm,0.5\nlimit,meniscus_spread,1\ndue,2032-01-01\n";
    cr_assert_eq(sg_calibio_append(dir, "T-H152", notcyl, strlen(notcyl), &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "not a cylinder") != NULL, "%s", err.msg);
    cr_assert_eq(err.line, 4);
    /* unknown instrument, bad ID, missing folder */
    cr_assert_eq(append_file(dir, "T-NONE", EVENTS "/th-ok.csv", &err), SG_ENOTFOUND);
    cr_assert_eq(append_file(dir, "../T-TH", EVENTS "/th-ok.csv", &err), SG_EINVAL);
    cr_assert_eq(append_file("/nonexistent/register", "T-TH", EVENTS "/th-ok.csv", &err), SG_ENOTFOUND);

    after = slurp(path, &after_len);
    cr_assert_eq(after_len, before_len);
    cr_assert_eq(memcmp(before, after, before_len), 0);
    cr_assert_eq(count_entries(dir), 5);
    free(before);
    free(after);
    remove_register(dir);
}

Test(calibio, append_after_retirement_is_refused)
{
    char dir[64];
    copy_register(dir, sizeof dir);
    const char retire[] = "event,2031-01-01,retirement\nby,quality manager\nnote,broken stem\n";
    struct sg_error err;
    cr_assert_eq(sg_calibio_append(dir, "T-TH", retire, strlen(retire), &err), SG_OK, "%s", err.msg);
    cr_assert_eq(append_file(dir, "T-TH", EVENTS "/th-ok.csv", &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "retire") != NULL, "%s", err.msg);
    remove_register(dir);
}

Test(calibio, append_refuses_when_the_register_file_is_invalid)
{
    char dir[64], path[128];
    copy_register(dir, sizeof dir);
    (void)snprintf(path, sizeof path, "%s/T-TH.csv", dir);
    spit(path, "instrument,T-TH\nkind,thermometer\nevent,2020-01-05,calibration\nby,a\n");
    struct sg_error err;
    cr_assert_eq(append_file(dir, "T-TH", EVENTS "/th-ok.csv", &err), SG_EINVAL);
    cr_assert_eq(err.line, 0);
    cr_assert(strstr(err.msg, "T-TH.csv:3:1: ") != NULL, "%s", err.msg);
    cr_assert(strstr(err.msg, "must be valid") != NULL, "%s", err.msg);
    remove_register(dir);
}

#define WRITERS 4
#define EACH 8

Test(calibio, concurrent_appends_lose_nothing)
{
    char dir[64], path[128];
    copy_register(dir, sizeof dir);
    (void)snprintf(path, sizeof path, "%s/T-TH.csv", dir);
    size_t before_len;
    char *before = slurp(path, &before_len);
    size_t ev_len;
    char *ev = slurp(EVENTS "/th-ok.csv", &ev_len);
    pid_t pids[WRITERS];
    for (int w = 0; w < WRITERS; w++) {
        pids[w] = fork();
        cr_assert_geq(pids[w], 0);
        if (pids[w] == 0) {
            int failures = 0;
            for (int i = 0; i < EACH; i++)
                if (sg_calibio_append(dir, "T-TH", ev, ev_len, NULL) != SG_OK)
                    failures++;
            _exit(failures);
        }
    }
    for (int w = 0; w < WRITERS; w++) {
        int status = 0;
        cr_assert_eq(waitpid(pids[w], &status, 0), pids[w]);
        cr_assert(WIFEXITED(status) && WEXITSTATUS(status) == 0, "writer %d failed %d appends", w,
                  WEXITSTATUS(status));
    }
    struct sg_cal_instrument ins;
    struct sg_error err;
    cr_assert_eq(sg_calibio_load(dir, "T-TH", &ins, &err), SG_OK, "%s", err.msg);
    cr_assert_eq(ins.n_events, 1 + WRITERS * EACH);
    sg_cal_instrument_release(&ins);
    size_t after_len;
    char *after = slurp(path, &after_len);
    cr_assert_eq(memcmp(before, after, before_len), 0);
    cr_assert_eq(count_entries(dir), 5);
    free(before);
    free(after);
    free(ev);
    remove_register(dir);
}

/* ---- resolving a record's constants ------------------------------------------------------ */

Test(calibio, resolve_reproduces_the_152h_geometry)
{
    struct sg_record rec;
    record_for(&rec, "T-H152", "T-CY-A", "T-TH", "", 2021, 1, 1);
    struct sg_constants k;
    struct sg_error err;
    cr_assert_eq(sg_calibio_resolve(GEOMETRY, &rec, &k, &err), SG_OK, "%s", err.msg);
    /* METHODS.md 3.3 / 13.3 #31: L = 16.295 - 0.164 R cm with V = 67 cm3, A = 27.8 cm2. */
    cr_assert(k.has_depth_line);
    cr_assert_float_eq(k.depth_at_zero_mm, 162.95, 0.01);
    cr_assert_float_eq(k.depth_per_unit_mm, -1.64, 1e-9);
    cr_assert_float_eq(k.depth_cov[0], 0.0, 1e-12); /* three collinear points */
    cr_assert_float_eq(k.meniscus_correction, 1.0, 1e-12);
    /* METHODS.md 10.5: 0.15 C at the ice point -> correction -0.15 C. */
    cr_assert_float_eq(k.thermometer_offset_c, -0.15, 1e-12);
    cr_assert(k.has_scale_range);
    cr_assert_float_eq(k.scale_min, -5.0, 0.0);
    cr_assert_float_eq(k.scale_max, 60.0, 0.0);
    cr_assert(!k.has_blank_line);
    cr_assert_str_eq(k.calibration_used, "T-H152@2020-01-12;T-CY-A@2020-01-10;T-TH@2020-01-05");
    cr_assert_eq(k.n_notes, 0);
    sg_record_release(&rec);

    /* the cylinder is found through the hydrometer's calibration when the record names none */
    record_for(&rec, "T-H152", "", "", "", 2021, 1, 1);
    cr_assert_eq(sg_calibio_resolve(GEOMETRY, &rec, &k, &err), SG_OK, "%s", err.msg);
    cr_assert_float_eq(k.depth_at_zero_mm, 162.95, 0.01);
    cr_assert_str_eq(k.calibration_used, "T-H152@2020-01-12;T-CY-A@2020-01-10");
    sg_record_release(&rec);
}

Test(calibio, resolve_pipette_volume)
{
    struct sg_record rec;
    record_for(&rec, "", "", "", "T-PP", 2021, 1, 1);
    struct sg_constants k;
    struct sg_error err;
    cr_assert_eq(sg_calibio_resolve(GEOMETRY, &rec, &k, &err), SG_OK, "%s", err.msg);
    cr_assert(k.has_pipette_volume);
    cr_assert_float_eq(k.pipette_volume_ml, 9.9996, 1e-4); /* METHODS.md 13.8 #73 */
    cr_assert_float_eq(k.pipette_volume_u_ml, 0.0, 1e-12);
    cr_assert_str_eq(k.calibration_used, "T-PP@2020-01-06");
    sg_record_release(&rec);
}

Test(calibio, register_values_replace_inline_ones)
{
    struct sg_record rec;
    record_for(&rec, "T-H152", "T-CY-A", "", "", 2021, 1, 1);
    rec.has_depth_line = true;
    rec.depth_line_mm[0] = 170.0;
    rec.depth_line_mm[1] = -2.0;
    rec.has_meniscus = true;
    rec.meniscus_correction = 0.3;
    struct sg_constants k;
    cr_assert_eq(sg_calibio_resolve(GEOMETRY, &rec, &k, NULL), SG_OK);
    cr_assert_float_eq(k.depth_at_zero_mm, 162.95, 0.01);
    cr_assert_float_eq(k.meniscus_correction, 1.0, 1e-12);
    sg_record_release(&rec);

    /* no instrument named: inline, whatever the register */
    record_for(&rec, "", "", "", "", 0, 0, 0);
    rec.has_depth_line = true;
    rec.depth_line_mm[0] = 170.0;
    rec.depth_line_mm[1] = -2.0;
    cr_assert_eq(sg_calibio_resolve("/nonexistent/register", &rec, &k, NULL), SG_OK);
    cr_assert_float_eq(k.depth_at_zero_mm, 170.0, 0.0);
    cr_assert_str_eq(k.calibration_used, "inline");
    sg_record_release(&rec);
}

Test(calibio, resolve_demo_records)
{
    struct sg_record rec;
    struct sg_constants k;
    struct sg_error err;
    /* the g_per_l hydrometer set of the demo lab, test of 2026-10-12 */
    record_for(&rec, "RML-H152-01", "RML-CY-11", "RML-TH-05", "", 2026, 10, 12);
    rec.scale = SG_SCALE_G_PER_L;
    cr_assert_eq(sg_calibio_resolve(DEMO_REGISTER, &rec, &k, &err), SG_OK, "%s", err.msg);
    cr_assert_str_eq(k.calibration_used, "RML-H152-01@2026-03-02;RML-CY-11@2025-11-20;RML-TH-05@2026-06-11");
    cr_assert_eq(k.n_notes, 0);
    cr_assert(k.has_blank_line);
    cr_assert_lt(k.blank_tmin_c, 17.0);
    cr_assert_gt(k.blank_tmax_c, 27.0);
    /* a 152H-type bulb: about 163 - 1.64 R mm (METHODS.md 3.3 for the type) */
    cr_assert_float_eq(k.depth_at_zero_mm, 163.0, 1.0);
    cr_assert_float_eq(k.depth_per_unit_mm, -1.64, 0.02);
    cr_assert_gt(k.depth_cov[0], 0.0);
    cr_assert_gt(k.meniscus_u, 0.0);
    sg_record_release(&rec);

    /* the density hydrometer set: its thermometer is overdue on 2026-10-14 */
    record_for(&rec, "RML-HD-02", "RML-CY-12", "RML-TH-06", "", 2026, 10, 14);
    rec.scale = SG_SCALE_DENSITY;
    cr_assert_eq(sg_calibio_resolve(DEMO_REGISTER, &rec, &k, &err), SG_OK, "%s", err.msg);
    cr_assert_eq(k.n_notes, 1);
    cr_assert_str_eq(k.notes[0].name, "calibration_overdue");
    cr_assert_eq(k.notes[0].severity, SG_SEVERITY_WARNING);
    cr_assert(strstr(k.notes[0].message, "RML-TH-06") != NULL, "%s", k.notes[0].message);
    cr_assert(strstr(k.notes[0].message, "2026-10-06") != NULL, "%s", k.notes[0].message);
    cr_assert(strstr(k.notes[0].message, "2026-10-14") != NULL, "%s", k.notes[0].message);
    cr_assert(strstr(k.calibration_used, "RML-TH-06@2025-10-06") != NULL, "%s", k.calibration_used);
    sg_record_release(&rec);

    /* the pipette with its thermometer */
    record_for(&rec, "", "", "RML-TH-05", "RML-PP-03", 2026, 10, 15);
    cr_assert_eq(sg_calibio_resolve(DEMO_REGISTER, &rec, &k, &err), SG_OK, "%s", err.msg);
    cr_assert(k.has_pipette_volume);
    cr_assert_float_eq(k.pipette_volume_ml, 10.0, 0.04);
    cr_assert_str_eq(k.calibration_used, "RML-TH-05@2026-06-11;RML-PP-03@2026-08-11");
    sg_record_release(&rec);
}

Test(calibio, resolve_refusals)
{
    struct sg_record rec;
    struct sg_constants k;
    struct sg_error err;

    record_for(&rec, "T-H152", "", "", "", 0, 0, 0); /* no date */
    cr_assert_eq(sg_calibio_resolve(GEOMETRY, &rec, &k, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "test,date") != NULL, "%s", err.msg);
    cr_assert_eq(err.line, 7);
    sg_record_release(&rec);

    record_for(&rec, "T-H152", "", "", "", 2021, 1, 1);
    cr_assert_eq(sg_calibio_resolve("/nonexistent/register", &rec, &k, &err), SG_ENOTFOUND);
    cr_assert(strstr(err.msg, "/nonexistent/register") != NULL, "%s", err.msg);
    sg_record_release(&rec);

    record_for(&rec, "", "", "T-NOPE", "", 2021, 1, 1);
    cr_assert_eq(sg_calibio_resolve(GEOMETRY, &rec, &k, &err), SG_ENOTFOUND);
    cr_assert(strstr(err.msg, "T-NOPE") != NULL, "%s", err.msg);
    cr_assert_eq(err.line, 9);
    cr_assert_eq(err.col, 13);
    sg_record_release(&rec);

    record_for(&rec, "T-TH", "", "", "", 2021, 1, 1); /* a thermometer named as hydrometer */
    cr_assert_eq(sg_calibio_resolve(GEOMETRY, &rec, &k, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "not a hydrometer") != NULL, "%s", err.msg);
    sg_record_release(&rec);

    record_for(&rec, "T-H152", "", "", "", 2021, 1, 1);
    rec.scale = SG_SCALE_DENSITY;
    cr_assert_eq(sg_calibio_resolve(GEOMETRY, &rec, &k, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "reading_scale") != NULL, "%s", err.msg);
    sg_record_release(&rec);

    /* a test before the first calibration */
    record_for(&rec, "T-H152", "", "", "", 2019, 6, 1);
    cr_assert_eq(sg_calibio_resolve(GEOMETRY, &rec, &k, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "T-H152") != NULL && strstr(err.msg, "2019-06-01") != NULL, "%s", err.msg);
    sg_record_release(&rec);

    /* the demo pipette the day after its failed verification */
    record_for(&rec, "", "", "", "RML-PP-03", 2025, 8, 5);
    cr_assert_eq(sg_calibio_resolve(DEMO_REGISTER, &rec, &k, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "RML-PP-03") != NULL && strstr(err.msg, "rejected") != NULL, "%s", err.msg);
    sg_record_release(&rec);
    /* ... and between its repair and recalibration */
    record_for(&rec, "", "", "", "RML-PP-03", 2025, 8, 12);
    cr_assert_eq(sg_calibio_resolve(DEMO_REGISTER, &rec, &k, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "repair on 2025-08-12") != NULL, "%s", err.msg);
    sg_record_release(&rec);

    /* a register file with a bad row: the message names the file, line and column */
    record_for(&rec, "", "", "T-BAD", "", 2021, 1, 1);
    cr_assert_eq(sg_calibio_resolve(BROKEN, &rec, &k, &err), SG_EPARSE);
    cr_assert(strstr(err.msg, "T-BAD.csv:8:11") != NULL, "%s", err.msg);
    cr_assert_eq(err.line, 9);
    sg_record_release(&rec);
}

Test(calibio, resolve_with_another_entry)
{
    struct sg_record rec;
    struct sg_constants now, then;
    struct sg_error err;
    record_for(&rec, "RML-H152-01", "RML-CY-11", "RML-TH-05", "", 2026, 10, 12);
    cr_assert_eq(sg_calibio_resolve(DEMO_REGISTER, &rec, &now, &err), SG_OK, "%s", err.msg);
    cr_assert_eq(sg_calibio_resolve_with(DEMO_REGISTER, &rec, "RML-H152-01", "2024-03-05", &then, &err), SG_OK,
                 "%s", err.msg);
    cr_assert(strstr(then.calibration_used, "RML-H152-01@2024-03-05") != NULL, "%s", then.calibration_used);
    cr_assert(strstr(then.calibration_used, "RML-H152-01@2026-03-02") == NULL, "%s", then.calibration_used);
    cr_assert(fabs(then.depth_at_zero_mm - now.depth_at_zero_mm) > 1e-6);
    cr_assert_float_eq(then.depth_at_zero_mm, now.depth_at_zero_mm, 1.0);
    sg_record_release(&rec);
    /* a rejected entry cannot be applied */
    record_for(&rec, "", "", "", "RML-PP-03", 2026, 10, 15);
    cr_assert_eq(sg_calibio_resolve_with(DEMO_REGISTER, &rec, "RML-PP-03", "2025-08-04", &then, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "rejected") != NULL, "%s", err.msg);
    cr_assert_eq(sg_calibio_resolve_with(DEMO_REGISTER, &rec, "RML-PP-03", "2025-08-05", &then, &err),
                 SG_ENOTFOUND);
    sg_record_release(&rec);
}
