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

/* true when msg is printable UTF-8 text: no control character, no byte outside a valid sequence. */
static bool printable_utf8(const char *msg)
{
    const unsigned char *s = (const unsigned char *)msg;
    for (size_t i = 0; s[i] != '\0';) {
        size_t len = 0;
        if (s[i] >= 0x20 && s[i] < 0x7F)
            len = 1;
        else if (s[i] >= 0xC2 && s[i] <= 0xDF)
            len = 2;
        else if (s[i] >= 0xE0 && s[i] <= 0xEF)
            len = 3;
        else if (s[i] >= 0xF0 && s[i] <= 0xF4)
            len = 4;
        if (len == 0 || (len == 2 && s[i] == 0xC2 && s[i + 1] < 0xA0))
            return false;
        for (size_t j = 1; j < len; j++)
            if (s[i + j] < 0x80 || s[i + j] > 0xBF)
                return false;
        i += len;
    }
    return true;
}

/* Guards the register reader's messages against bytes that are not UTF-8 text: such a byte is
 * refused where it stands (line, column of the byte) and named by its value, never copied into
 * the message (it used to be echoed raw, e.g. "unknown row 'm<0xE9>thod'"). */
static const struct bad_case non_utf8_cases[] = {
    /* Latin-1 e-acute in a row name, in a number, in a text */
    {"instrument,T-X\nkind,thermometer\nm\xE9thod,x\n", SG_EPARSE, 3, 2, "byte 0xE9 is not UTF-8 text"},
    {"instrument,T-X\nkind,thermometer\nevent,2020-01-05,calibration\nice_point,0.\xFF\n", SG_EPARSE, 4, 13,
     "byte 0xFF is not UTF-8 text (save the file as UTF-8"},
    {"instrument,T-X\nkind,thermometer\nmaker,M\xFCller\n", SG_EPARSE, 3, 8, "byte 0xFC"},
    /* a continuation byte alone, an overlong form, a surrogate, a sequence cut by the line end */
    {"instrument,T-X\x80\n", SG_EPARSE, 1, 15, "byte 0x80"},
    {"instrument,T-X\nkind,\xC0\xAF\n", SG_EPARSE, 2, 6, "byte 0xC0"},
    {"instrument,T-X\nnote,\xED\xA0\x80\n", SG_EPARSE, 2, 6, "byte 0xED"},
    {"instrument,T-X\nnote,ab\xE2\x82\n", SG_EPARSE, 2, 8, "byte 0xE2"},
    /* a control character (a terminal escape) */
    {"instrument,T-X\nnote,\x1B[31mred\n", SG_EPARSE, 2, 6, "control character 0x1B"},
    /* UTF-16 */
    {"\xFF\xFEi\0n\0", SG_EPARSE, 1, 1, "UTF-16"},
};

ParameterizedTestParameters(calibio, non_utf8_bytes_are_located_not_echoed)
{
    const size_t n = sizeof non_utf8_cases / sizeof non_utf8_cases[0];
    struct bad_case *cases = cr_malloc(n * sizeof *cases);
    for (size_t i = 0; cases != NULL && i < n; i++) {
        cases[i] = non_utf8_cases[i];
        cases[i].text = shared_strdup(non_utf8_cases[i].text);
        cases[i].frag = shared_strdup(non_utf8_cases[i].frag);
    }
    return cr_make_param_array(struct bad_case, cases, n, free_cases);
}

ParameterizedTest(const struct bad_case *c, calibio, non_utf8_bytes_are_located_not_echoed)
{
    struct sg_cal_instrument ins;
    struct sg_error err;
    const enum sg_status st = parse(c->text, SG_CALIBIO_REGISTER, &ins, &err);
    cr_assert_eq(st, c->st, "status %d, message %s", st, err.msg);
    cr_assert_eq(err.line, c->line, "line %u (%s)", err.line, err.msg);
    cr_assert_eq(err.col, c->col, "col %u (%s)", err.col, err.msg);
    cr_assert(strstr(err.msg, c->frag) != NULL, "message '%s' lacks '%s'", err.msg, c->frag);
    cr_assert(printable_utf8(err.msg), "message holds a raw byte: %s", err.msg);
    sg_cal_instrument_release(&ins);
}

/* Guards the same for text that reaches a message some other way: an instrument ID or folder
 * given on the command line, and a UTF-8 character cut by a message's length limit, are shown
 * with \xNN escapes; valid UTF-8 text is accepted and kept. */
Test(calibio, messages_escape_bytes_that_are_not_text)
{
    struct sg_cal_instrument ins;
    struct sg_error err;
    cr_assert_eq(sg_calibio_load(GEOMETRY, "T-\xE9\x1B", &ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "'T-\\xE9\\x1B' is not an instrument ID") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);
    cr_assert_eq(sg_calibio_load("/nonexistent/caf\xE9", "T-TH", &ins, &err), SG_ENOTFOUND);
    cr_assert(strstr(err.msg, "'/nonexistent/caf\\xE9' does not exist") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);
    /* 39 letters then a two-byte character: the message's 40-byte excerpt ends inside it */
    cr_assert_eq(parse("instrument,T-X\nkind,thermometer\naaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaa\xC3\xA9,1\n",
                       SG_CALIBIO_REGISTER, &ins, &err),
                 SG_EPARSE);
    cr_assert(strstr(err.msg, "aaa\\xC3' (did you mean") != NULL, "%s", err.msg);
    cr_assert(printable_utf8(err.msg), "%s", err.msg);
    sg_cal_instrument_release(&ins);
    /* UTF-8 text is fine, in a name and in a message */
    cr_assert_eq(parse("instrument,T-X\nkind,thermometer\nmaker,M\xC3\xBCller \xE2\x80\x94 \xCE\xBC\n",
                       SG_CALIBIO_REGISTER, &ins, &err),
                 SG_OK, "%s", err.msg);
    cr_assert_str_eq(ins.maker, "M\xC3\xBCller \xE2\x80\x94 \xCE\xBC");
    sg_cal_instrument_release(&ins);
    cr_assert_eq(parse("instrument,T-X\nkind,\xCE\xBCmeter\n", SG_CALIBIO_REGISTER, &ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "unknown kind '\xCE\xBCmeter'") != NULL, "%s", err.msg);
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

/* Guards the exit status of 'cal fit FILE' and 'cal add --event FILE': a file named on the command
 * line that is missing (or is a folder) is an I/O failure, SG_EIO, as a test record is for reduce
 * (cal fit used to report SG_ENOTFOUND, exit 2, while cal add gave 3). */
Test(calibio, read_input_missing_file_is_an_io_failure)
{
    char *text = (char *)1;
    size_t len = 7;
    struct sg_error err;
    cr_assert_eq(sg_calibio_read_input(EVENTS "/no-such-file.csv", &text, &len, &err), SG_EIO);
    cr_assert_null(text);
    cr_assert_eq(len, 0);
    cr_assert_eq(err.line, 0);
    cr_assert(strstr(err.msg, "no-such-file.csv': No such file or directory (check the path") != NULL, "%s",
              err.msg);
    cr_assert_eq(sg_calibio_read_input(EVENTS, &text, &len, &err), SG_EIO);
    cr_assert(strstr(err.msg, "it is a folder") != NULL, "%s", err.msg);
    cr_assert_eq(sg_calibio_read_input(EVENTS "/th-ok.csv", &text, &len, &err), SG_OK, "%s", err.msg);
    cr_assert_not_null(text);
    cr_assert_eq(strlen(text), len);
    cr_assert(strncmp(text, "# a verification", 16) == 0, "%s", text);
    free(text);
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

/* A register file its user may not write is refused, not replaced: the
 * append renames a new file into place, which the folder's permissions
 * would allow. As root (who may write anything) the append runs in a child
 * process that first becomes the unprivileged user 65534 ("nobody"). */
Test(calibio, append_refuses_a_read_only_register_file)
{
    char dir[64], path[128];
    copy_register(dir, sizeof dir);
    (void)snprintf(path, sizeof path, "%s/T-TH.csv", dir);
    size_t before_len, after_len;
    char *before = slurp(path, &before_len);
    cr_assert_eq(chmod(dir, 0777), 0);
    cr_assert_eq(chmod(path, 0444), 0);
    size_t len;
    char *text = slurp(EVENTS "/th-ok.csv", &len);
    const pid_t pid = fork();
    cr_assert_neq(pid, -1);
    if (pid == 0) {
        /* the child frees what it inherited before it exits: under
         * valgrind (which follows children) it is checked for leaks too */
        free(before);
        int code = 0;
        if (geteuid() == 0 && (setgid(65534) != 0 || setuid(65534) != 0)) {
            code = 10;
        } else {
            struct sg_error err;
            if (sg_calibio_append(dir, "T-TH", text, len, &err) != SG_EIO)
                code = 11;
            else if (strstr(err.msg, "is not writable for you") == NULL)
                code = 12;
        }
        free(text);
        _exit(code);
    }
    int status = 0;
    cr_assert_eq(waitpid(pid, &status, 0), pid);
    cr_assert(WIFEXITED(status) && WEXITSTATUS(status) == 0, "child status %d", status);
    char *after = slurp(path, &after_len);
    cr_assert(after_len == before_len && memcmp(before, after, before_len) == 0, "the file changed");
    struct stat sb;
    cr_assert_eq(stat(path, &sb), 0);
    cr_assert_eq(sb.st_mode & 0777, 0444);
    free(text);
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
    const char nolimit[] = "event,2021-01-01,calibration\nby,a\nmethod,m\nice_point,0.1\ndue,2022-01-01\n";
    cr_assert_eq(sg_calibio_append(dir, "T-TH", nolimit, strlen(nolimit), &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "correction_max_c") != NULL, "%s", err.msg);
    /* observations of another kind */
    const char wrong[] = "event,2021-01-01,calibration\nby,a\nmethod,m\nmeniscus,0,1\n"
                         "limit,meniscus_spread,1\ndue,2022-01-01\n";
    cr_assert_eq(sg_calibio_append(dir, "T-TH", wrong, strlen(wrong), &err), SG_EINVAL);
    cr_assert_eq(err.line, 4);
    /* a depth calibration naming a cylinder that is not one */
    const char notcyl[] = "event,2021-01-01,calibration\nby,a\nmethod,m\ncylinder,T-TH\nbulb_volume_ml,67\n"
                          "bulb_length_mm,140\nneck_mm,0,105\nneck_mm,25,64\nneck_mm,50,23\nmeniscus,0,1\n"
                          "limit,depth_residual_mm,0.5\nlimit,meniscus_spread,1\ndue,2022-01-01\n";
    cr_assert_eq(sg_calibio_append(dir, "T-H152", notcyl, strlen(notcyl), &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "not a cylinder") != NULL, "%s", err.msg);
    cr_assert_eq(err.line, 4);
    /* observations read with a thermometer the register does not hold, or
     * with an instrument that is not a thermometer */
    const char nothermo[] = "event,2021-01-01,verification\nby,a\nmethod,m\nthermometer,T-TH9\nice_point,0.1\n"
                            "limit,correction_max_c,0.5\ndue,2022-01-01\n";
    cr_assert_eq(sg_calibio_append(dir, "T-TH", nothermo, strlen(nothermo), &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "'T-TH9' is not a thermometer") != NULL, "%s", err.msg);
    cr_assert_eq(err.line, 4);
    cr_assert_eq(err.col, 13);
    const char cylthermo[] = "event,2021-01-01,verification\nby,a\nmethod,m\nthermometer,T-CY-A\nice_point,0.1\n"
                             "limit,correction_max_c,0.5\ndue,2022-01-01\n";
    cr_assert_eq(sg_calibio_append(dir, "T-TH", cylthermo, strlen(cylthermo), &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "'T-CY-A' is not a thermometer") != NULL, "%s", err.msg);
    /* an event dated years ahead (a mistyped year) would block every later
     * event, dates never decreasing: refused */
    const char future[] = "event,2999-01-01,relocation\nby,a\nlocation,store\n";
    cr_assert_eq(sg_calibio_append(dir, "T-TH", future, strlen(future), &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "event date 2999-01-01 is after today") != NULL, "%s", err.msg);
    cr_assert_eq(err.line, 1);
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
    const char retire[] = "event,2021-01-01,retirement\nby,quality manager\nnote,broken stem\n";
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

/* Guards against the same event being appended twice (a 'cal add' run again): an event with the
 * date, type and observations of one already recorded, and no note of its own, is refused with
 * SG_EINVAL at its event row and the file is left as it was; a note saying why records a genuine
 * repeat; a different location or observation is a different event. */
Test(calibio, append_refuses_a_repeated_event)
{
    char dir[64], path[128];
    copy_register(dir, sizeof dir);
    (void)snprintf(path, sizeof path, "%s/T-TH.csv", dir);
    struct sg_error err;
    cr_assert_eq(append_file(dir, "T-TH", EVENTS "/th-ok.csv", &err), SG_OK, "%s", err.msg);
    size_t before_len, after_len;
    char *before = slurp(path, &before_len);
    cr_assert_eq(append_file(dir, "T-TH", EVENTS "/th-ok.csv", &err), SG_EINVAL);
    cr_assert_eq(err.line, 2); /* th-ok.csv opens with a comment line */
    cr_assert_eq(err.col, 1);
    cr_assert(strstr(err.msg, "this verification of 2021-02-01 is already in the register") != NULL, "%s",
              err.msg);
    cr_assert(strstr(err.msg, "T-TH.csv line ") != NULL, "%s", err.msg);
    cr_assert(strstr(err.msg, "note row") != NULL, "%s", err.msg);
    char *after = slurp(path, &after_len);
    cr_assert_eq(after_len, before_len);
    cr_assert_eq(memcmp(before, after, before_len), 0);
    free(after);
    free(before);

    /* the same observations in another order, or one value changed: another event */
    const char other[] = "event,2021-02-01,verification\nby,tester\nmethod,ice point\nice_point,0.15\n"
                         "ice_point,0.10\nice_point,0.10\nlimit,correction_max_c,0.5\ndue,2022-02-01\n";
    cr_assert_eq(sg_calibio_append(dir, "T-TH", other, strlen(other), &err), SG_OK, "%s", err.msg);
    /* the same, differing only in who did it: still a repeat (the observations decide) */
    const char by[] = "event,2021-02-01,verification\nby,someone else\nmethod,ice point\nice_point,0.15\n"
                      "ice_point,0.10\nice_point,0.10\nlimit,correction_max_c,0.5\ndue,2022-02-01\n";
    cr_assert_eq(sg_calibio_append(dir, "T-TH", by, strlen(by), &err), SG_EINVAL);
    /* a genuine repeat says why in a note, and is then recorded; once */
    const char again[] = "event,2021-02-01,verification\nby,tester\nmethod,ice point\nice_point,0.15\n"
                         "ice_point,0.10\nice_point,0.10\nlimit,correction_max_c,0.5\ndue,2022-02-01\n"
                         "note,repeated after refilling the ice bath\n";
    cr_assert_eq(sg_calibio_append(dir, "T-TH", again, strlen(again), &err), SG_OK, "%s", err.msg);
    cr_assert_eq(sg_calibio_append(dir, "T-TH", again, strlen(again), &err), SG_EINVAL);
    /* events without observations: a relocation to another place is another event */
    const char move1[] = "event,2021-03-01,relocation\nby,tester\nlocation,bench 2\n";
    const char move2[] = "event,2021-03-01,relocation\nby,tester\nlocation,bench 3\n";
    cr_assert_eq(sg_calibio_append(dir, "T-TH", move1, strlen(move1), &err), SG_OK, "%s", err.msg);
    cr_assert_eq(sg_calibio_append(dir, "T-TH", move2, strlen(move2), &err), SG_OK, "%s", err.msg);
    cr_assert_eq(sg_calibio_append(dir, "T-TH", move1, strlen(move1), &err), SG_EINVAL);
    /* twice in one event file: refused at the second, nothing of the file is added */
    const char twice[] = "event,2021-04-01,relocation\nby,tester\nlocation,store\n"
                         "event,2021-04-01,relocation\nby,tester\nlocation,store\n";
    cr_assert_eq(sg_calibio_append(dir, "T-TH", twice, strlen(twice), &err), SG_EINVAL);
    cr_assert_eq(err.line, 4);
    cr_assert(strstr(err.msg, "(this file line 1:") != NULL, "%s", err.msg);
    struct sg_cal_instrument ins;
    cr_assert_eq(sg_calibio_load(dir, "T-TH", &ins, &err), SG_OK, "%s", err.msg);
    cr_assert_eq(ins.n_events, 6);
    sg_cal_instrument_release(&ins);
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
            for (int i = 0; i < EACH; i++) {
                /* each append its own note: an identical event would be refused as a repeat */
                char text[1024];
                const int n = snprintf(text, sizeof text, "%snote,writer %d append %d\n", ev, w, i);
                if (n < 0 || (size_t)n >= sizeof text || sg_calibio_append(dir, "T-TH", text, (size_t)n, NULL) != SG_OK)
                    failures++;
            }
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

/* A row's own blank comes first (README, "Reduction"): when every reading
 * carries one, the register's blank line is not applied and its entry
 * (RML-HD-02@2026-09-21 in the demo register) is not named among the
 * calibrations used; one reading without a blank brings it back. */
Test(calibio, blank_entry_named_only_when_a_reading_needs_it)
{
    struct sg_record rec;
    struct sg_constants k;
    struct sg_error err;
    record_for(&rec, "RML-HD-02", "RML-CY-12", "RML-TH-06", "", 2026, 10, 14);
    rec.scale = SG_SCALE_DENSITY;
    const struct sg_reading_row with_blank = {.elapsed_min = 1.0, .reading = 20.0, .temp_c = 20.0,
                                              .has_blank = true, .blank_reading = 2.5, .pos = {20, 9}};
    cr_assert_eq(sg_record_add_reading(&rec, with_blank), SG_OK);
    cr_assert_eq(sg_record_add_reading(&rec, with_blank), SG_OK);
    cr_assert_eq(sg_calibio_resolve(DEMO_REGISTER, &rec, &k, &err), SG_OK, "%s", err.msg);
    cr_assert_str_eq(k.calibration_used, "RML-HD-02@2025-06-16;RML-CY-12@2025-06-12;RML-TH-06@2025-10-06");
    cr_assert(!k.has_blank_line);
    cr_assert_float_eq(k.scale_division, 0.5, 0.0); /* calibration/RML-HD-02.csv: division,0.5 */
    struct sg_reading_row without = with_blank;
    without.has_blank = false;
    cr_assert_eq(sg_record_add_reading(&rec, without), SG_OK);
    cr_assert_eq(sg_calibio_resolve(DEMO_REGISTER, &rec, &k, &err), SG_OK, "%s", err.msg);
    cr_assert_str_eq(k.calibration_used,
                     "RML-HD-02@2025-06-16;RML-HD-02@2026-09-21;RML-CY-12@2025-06-12;RML-TH-06@2025-10-06");
    cr_assert(k.has_blank_line);
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

/* Guards the message for a register path that names a regular file: every entry point says it is
 * a file, not a folder (SG_EINVAL: a usage mistake), where it used to say the folder "does not
 * exist" (resolve) or fail as an I/O error on "<file>/<ID>.csv" (load, load_register, append). A
 * missing folder is still SG_ENOTFOUND, "does not exist". */
Test(calibio, register_path_that_is_a_file)
{
    const char *file = GEOMETRY "/T-TH.csv";
    const char *frag = "T-TH.csv' is a file, not a folder (give --calibration DIR";
    struct sg_cal_instrument ins;
    struct sg_cal_register reg;
    struct sg_error err;
    cr_assert_eq(sg_calibio_load(file, "T-TH", &ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, frag) != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);
    cr_assert_eq(sg_calibio_load_register(file, &reg, NULL, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, frag) != NULL, "%s", err.msg);
    cr_assert_eq(reg.n, 0);
    sg_cal_register_release(&reg);
    const char ev[] = "event,2021-02-01,relocation\nby,tester\nlocation,store room\n";
    cr_assert_eq(sg_calibio_append(file, "T-TH", ev, strlen(ev), &err), SG_EINVAL);
    cr_assert(strstr(err.msg, frag) != NULL, "%s", err.msg);
    struct sg_record rec;
    struct sg_constants k;
    record_for(&rec, "", "", "T-TH", "", 2021, 1, 1);
    cr_assert_eq(sg_calibio_resolve(file, &rec, &k, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "T-TH.csv' is a file, not a folder, and the record names") != NULL, "%s", err.msg);
    cr_assert(strstr(err.msg, "does not exist") == NULL, "%s", err.msg);
    cr_assert_eq(err.line, 9);
    cr_assert_eq(err.col, 13);
    /* a path through a file cannot be a folder: it does not exist */
    cr_assert_eq(sg_calibio_resolve(GEOMETRY "/T-TH.csv/sub", &rec, &k, &err), SG_ENOTFOUND);
    cr_assert(strstr(err.msg, "does not exist") != NULL, "%s", err.msg);
    sg_record_release(&rec);
    cr_assert_eq(sg_calibio_load("/nonexistent/register", "T-TH", &ins, &err), SG_ENOTFOUND);
    cr_assert(strstr(err.msg, "folder '/nonexistent/register' does not exist") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);
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
    /* a rejected entry is applied as asked (the impact of an "as found"
     * result: calibration/RML-PP-03.csv, 2025-08-04, deliveries of 9.9102-
     * 9.9125 g at 21.3 C, about 9.942 mL, 0.058 mL under the nominal 10 mL
     * and beyond its 0.040 mL limit), with a warning note */
    record_for(&rec, "", "", "", "RML-PP-03", 2026, 10, 15);
    cr_assert_eq(sg_calibio_resolve_with(DEMO_REGISTER, &rec, "RML-PP-03", "2025-08-04", &then, &err), SG_OK,
                 "%s", err.msg);
    cr_assert_eq(then.n_notes, 1);
    cr_assert_str_eq(then.notes[0].name, "entry_rejected");
    cr_assert(strstr(then.notes[0].message, "rejected") != NULL, "%s", then.notes[0].message);
    cr_assert_float_eq(then.pipette_volume_ml, 9.942, 0.001);
    cr_assert_eq(sg_calibio_resolve_with(DEMO_REGISTER, &rec, "RML-PP-03", "2025-08-05", &then, &err),
                 SG_ENOTFOUND);
    sg_record_release(&rec);
}

/* ---- the register cache: the same results as resolving afresh ------------------------------- */

/* An invented thermometer whose history passes through every state: the
 * ice-point readings give corrections 0 - reading (METHODS.md 10.5):
 * -0.15 C from 2020-01-05 (due 2021-01-05), -0.05 C from 2021-06-01 (due
 * 2022-06-01), withdrawn 2022-03-01, +0.10 C from 2022-04-01 (due
 * 2023-04-01), retired 2023-09-01. */
static const char history_th[] = "instrument,T-TH2\n"
                                 "kind,thermometer\n"
                                 "\n"
                                 "event,2020-01-05,calibration\n"
                                 "by,tester\n"
                                 "method,ice point\n"
                                 "ice_point,0.15\n"
                                 "limit,correction_max_c,0.5\n"
                                 "due,2021-01-05\n"
                                 "\n"
                                 "event,2021-06-01,calibration\n"
                                 "by,tester\n"
                                 "method,ice point\n"
                                 "ice_point,0.05\n"
                                 "limit,correction_max_c,0.5\n"
                                 "due,2022-06-01\n"
                                 "\n"
                                 "event,2022-03-01,out_of_service\n"
                                 "by,tester\n"
                                 "note,dropped on the bench\n"
                                 "\n"
                                 "event,2022-04-01,calibration\n"
                                 "by,tester\n"
                                 "method,ice point\n"
                                 "ice_point,-0.10\n"
                                 "limit,correction_max_c,0.5\n"
                                 "due,2023-04-01\n"
                                 "\n"
                                 "event,2023-09-01,retirement\n"
                                 "by,tester\n";

/* The history above, by test date: the correction in force (NAN when none)
 * and whether it is overdue. */
static void history_th_on(struct sg_date d, double *offset_c, bool *overdue, bool *refused)
{
    const long day = sg_date_days(d);
    const struct {
        int y, m, dd;
        double offset_c;   /* METHODS.md 10.5: correction = 0 - ice-point reading */
        int due_y, due_m, due_d;
    } span[] = {{2020, 1, 5, -0.15, 2021, 1, 5}, {2021, 6, 1, -0.05, 2022, 6, 1},
                {2022, 3, 1, (double)NAN, 0, 0, 0}, {2022, 4, 1, 0.10, 2023, 4, 1},
                {2023, 9, 1, (double)NAN, 0, 0, 0}};
    *offset_c = (double)NAN;
    *overdue = false;
    for (size_t i = 0; i < sizeof span / sizeof span[0]; i++) {
        const struct sg_date from = {span[i].y, span[i].m, span[i].dd};
        if (day < sg_date_days(from))
            break;
        *offset_c = span[i].offset_c;
        if (!isnan(span[i].offset_c)) {
            const struct sg_date due = {span[i].due_y, span[i].due_m, span[i].due_d};
            *overdue = sg_date_days(due) < day;
        } else {
            *overdue = false;
        }
    }
    *refused = isnan(*offset_c);
}

static bool same_double(double a, double b)
{
    return memcmp(&a, &b, sizeof a) == 0;
}

/* Two resolutions agree: status, message and location, and every constant bit for bit. */
static void assert_same_resolution(enum sg_status sa, const struct sg_error *ea, const struct sg_constants *a,
                                   enum sg_status sb, const struct sg_error *eb, const struct sg_constants *b)
{
    cr_assert_eq(sa, sb, "status %d vs %d (%s | %s)", sa, sb, ea->msg, eb->msg);
    cr_assert_eq(ea->code, eb->code);
    cr_assert_eq(ea->line, eb->line);
    cr_assert_eq(ea->col, eb->col);
    cr_assert_str_eq(ea->msg, eb->msg);
    if (sa != SG_OK)
        return;
    cr_assert_eq(a->has_depth_line, b->has_depth_line);
    cr_assert(same_double(a->depth_at_zero_mm, b->depth_at_zero_mm));
    cr_assert(same_double(a->depth_per_unit_mm, b->depth_per_unit_mm));
    for (size_t i = 0; i < 3; i++)
        cr_assert(same_double(a->depth_cov[i], b->depth_cov[i]));
    cr_assert(same_double(a->meniscus_correction, b->meniscus_correction));
    cr_assert(same_double(a->meniscus_u, b->meniscus_u));
    cr_assert_eq(a->has_blank_line, b->has_blank_line);
    cr_assert(same_double(a->blank_c0, b->blank_c0));
    cr_assert(same_double(a->blank_c1, b->blank_c1));
    cr_assert(same_double(a->blank_tmin_c, b->blank_tmin_c));
    cr_assert(same_double(a->blank_tmax_c, b->blank_tmax_c));
    cr_assert(same_double(a->blank_u, b->blank_u));
    cr_assert_eq(a->has_blank_const, b->has_blank_const);
    cr_assert(same_double(a->blank_const, b->blank_const));
    cr_assert_eq(a->has_pipette_volume, b->has_pipette_volume);
    cr_assert(same_double(a->pipette_volume_ml, b->pipette_volume_ml));
    cr_assert(same_double(a->pipette_volume_u_ml, b->pipette_volume_u_ml));
    cr_assert(same_double(a->thermometer_offset_c, b->thermometer_offset_c));
    cr_assert_eq(a->has_scale_range, b->has_scale_range);
    cr_assert(same_double(a->scale_min, b->scale_min));
    cr_assert(same_double(a->scale_max, b->scale_max));
    cr_assert_str_eq(a->calibration_used, b->calibration_used);
    cr_assert_eq(a->n_notes, b->n_notes);
    for (size_t i = 0; i < a->n_notes; i++) {
        cr_assert_str_eq(a->notes[i].name, b->notes[i].name);
        cr_assert_eq(a->notes[i].severity, b->notes[i].severity);
        cr_assert_str_eq(a->notes[i].message, b->notes[i].message);
    }
}

/* Resolves rec through the cache and afresh (sg_calibio_resolve_with), checks
 * they agree and returns the cached outcome. */
static enum sg_status resolve_both(struct sg_calibio_cache *cache, const char *dir, const struct sg_record *rec,
                                   const char *ov_id, const char *ov_entry, struct sg_constants *k,
                                   struct sg_error *err)
{
    struct sg_constants fresh;
    struct sg_error fresh_err;
    const enum sg_status st = sg_calibio_resolve_with_cached(cache, rec, ov_id, ov_entry, k, err);
    const enum sg_status fst = sg_calibio_resolve_with(dir, rec, ov_id, ov_entry, &fresh, &fresh_err);
    assert_same_resolution(st, err, k, fst, &fresh_err, &fresh);
    if (ov_id == NULL) {
        struct sg_constants plain;
        struct sg_error plain_err;
        const enum sg_status pst = sg_calibio_resolve_cached(cache, rec, &plain, &plain_err);
        assert_same_resolution(st, err, k, pst, &plain_err, &plain);
    }
    return st;
}

Test(calibio, cache_gives_the_same_results_and_messages)
{
    char dir[64];
    copy_register(dir, sizeof dir);
    char path[128];
    (void)snprintf(path, sizeof path, "%s/T-TH2.csv", dir);
    spit(path, history_th);
    struct sg_calibio_cache cache;
    sg_calibio_cache_init(&cache, dir);
    struct sg_record rec;
    struct sg_constants k;
    struct sg_error err;
    /* every case twice: the second answer comes from what the cache kept */
    for (int pass = 0; pass < 2; pass++) {
        /* found: METHODS.md 3.3 / 13.3 #31 (L = 16.295 - 0.164 R cm), METHODS.md 10.5 (-0.15 C) */
        record_for(&rec, "T-H152", "T-CY-A", "T-TH", "", 2021, 1, 1);
        cr_assert_eq(resolve_both(&cache, dir, &rec, NULL, NULL, &k, &err), SG_OK, "%s", err.msg);
        cr_assert_float_eq(k.depth_at_zero_mm, 162.95, 0.01);
        cr_assert_float_eq(k.depth_per_unit_mm, -1.64, 1e-9);
        cr_assert_float_eq(k.thermometer_offset_c, -0.15, 1e-12);
        cr_assert_str_eq(k.calibration_used, "T-H152@2020-01-12;T-CY-A@2020-01-10;T-TH@2020-01-05");
        sg_record_release(&rec);
        /* the cylinder through the hydrometer's calibration */
        record_for(&rec, "T-H152", "", "", "", 2021, 1, 1);
        cr_assert_eq(resolve_both(&cache, dir, &rec, NULL, NULL, &k, &err), SG_OK, "%s", err.msg);
        cr_assert_float_eq(k.depth_at_zero_mm, 162.95, 0.01);
        sg_record_release(&rec);
        /* pipette: METHODS.md 13.8 #73 */
        record_for(&rec, "", "", "", "T-PP", 2021, 1, 1);
        cr_assert_eq(resolve_both(&cache, dir, &rec, NULL, NULL, &k, &err), SG_OK, "%s", err.msg);
        cr_assert_float_eq(k.pipette_volume_ml, 9.9996, 1e-4);
        sg_record_release(&rec);
        /* not found, as hydrometer and as thermometer */
        record_for(&rec, "T-NOPE", "", "", "", 2021, 1, 1);
        cr_assert_eq(resolve_both(&cache, dir, &rec, NULL, NULL, &k, &err), SG_ENOTFOUND);
        cr_assert(strstr(err.msg, "T-NOPE") != NULL, "%s", err.msg);
        cr_assert_eq(err.line, 7);
        sg_record_release(&rec);
        record_for(&rec, "", "", "T-NOPE", "", 2021, 1, 1);
        cr_assert_eq(resolve_both(&cache, dir, &rec, NULL, NULL, &k, &err), SG_ENOTFOUND);
        cr_assert_eq(err.line, 9);
        cr_assert_eq(err.col, 13);
        sg_record_release(&rec);
        /* not an instrument ID */
        record_for(&rec, "", "", ".T-TH", "", 2021, 1, 1);
        cr_assert_eq(resolve_both(&cache, dir, &rec, NULL, NULL, &k, &err), SG_EINVAL);
        cr_assert(strstr(err.msg, "not an instrument ID") != NULL, "%s", err.msg);
        sg_record_release(&rec);
        /* of another kind than the record says */
        record_for(&rec, "T-TH", "", "", "", 2021, 1, 1);
        cr_assert_eq(resolve_both(&cache, dir, &rec, NULL, NULL, &k, &err), SG_EINVAL);
        cr_assert(strstr(err.msg, "not a hydrometer") != NULL, "%s", err.msg);
        sg_record_release(&rec);
        /* another scale */
        record_for(&rec, "T-H152", "", "", "", 2021, 1, 1);
        rec.scale = SG_SCALE_DENSITY;
        cr_assert_eq(resolve_both(&cache, dir, &rec, NULL, NULL, &k, &err), SG_EINVAL);
        cr_assert(strstr(err.msg, "reading_scale") != NULL, "%s", err.msg);
        sg_record_release(&rec);
        /* no date */
        record_for(&rec, "", "", "T-TH2", "", 0, 0, 0);
        cr_assert_eq(resolve_both(&cache, dir, &rec, NULL, NULL, &k, &err), SG_EINVAL);
        cr_assert(strstr(err.msg, "test,date") != NULL, "%s", err.msg);
        sg_record_release(&rec);
        /* never calibrated on the date, withdrawn, retired */
        record_for(&rec, "", "", "T-TH2", "", 2019, 12, 31);
        cr_assert_eq(resolve_both(&cache, dir, &rec, NULL, NULL, &k, &err), SG_EINVAL);
        cr_assert(strstr(err.msg, "no calibration on or before 2019-12-31") != NULL, "%s", err.msg);
        sg_record_release(&rec);
        record_for(&rec, "", "", "T-TH2", "", 2022, 3, 15);
        cr_assert_eq(resolve_both(&cache, dir, &rec, NULL, NULL, &k, &err), SG_EINVAL);
        cr_assert(strstr(err.msg, "out_of_service on 2022-03-01") != NULL, "%s", err.msg);
        cr_assert(strstr(err.msg, "(calibrate it, or use an instrument in service)") != NULL, "%s", err.msg);
        sg_record_release(&rec);
        record_for(&rec, "", "", "T-TH2", "", 2023, 9, 2);
        cr_assert_eq(resolve_both(&cache, dir, &rec, NULL, NULL, &k, &err), SG_EINVAL);
        cr_assert(strstr(err.msg, "retired on 2023-09-01") != NULL, "%s", err.msg);
        /* a retired instrument is not calibrated again */
        cr_assert(strstr(err.msg, "(it is retired: name an instrument in service)") != NULL, "%s", err.msg);
        sg_record_release(&rec);
        /* overdue: a warning note, the constants still applied (METHODS.md 10.5: -0.15 C) */
        record_for(&rec, "", "", "T-TH2", "", 2021, 2, 1);
        cr_assert_eq(resolve_both(&cache, dir, &rec, NULL, NULL, &k, &err), SG_OK, "%s", err.msg);
        cr_assert_float_eq(k.thermometer_offset_c, -0.15, 1e-12);
        cr_assert_eq(k.n_notes, 1);
        cr_assert_str_eq(k.notes[0].name, "calibration_overdue");
        cr_assert(strstr(k.notes[0].message, "due 2021-01-05") != NULL, "%s", k.notes[0].message);
        sg_record_release(&rec);
        /* another entry applied in its place, and a rejected one refused (demo register below) */
        record_for(&rec, "", "", "T-TH2", "", 2021, 7, 1);
        cr_assert_eq(resolve_both(&cache, dir, &rec, "T-TH2", "2020-01-05", &k, &err), SG_OK, "%s", err.msg);
        cr_assert_float_eq(k.thermometer_offset_c, -0.15, 1e-12);
        cr_assert_str_eq(k.calibration_used, "T-TH2@2020-01-05");
        cr_assert_eq(resolve_both(&cache, dir, &rec, "T-TH2", "2020-02-05", &k, &err), SG_ENOTFOUND);
        sg_record_release(&rec);
    }
    sg_calibio_cache_release(&cache);

    /* a register file with a bad row: named with its line and column, each time */
    sg_calibio_cache_init(&cache, BROKEN);
    for (int pass = 0; pass < 2; pass++) {
        record_for(&rec, "", "", "T-BAD", "", 2021, 1, 1);
        cr_assert_eq(resolve_both(&cache, BROKEN, &rec, NULL, NULL, &k, &err), SG_EPARSE);
        cr_assert(strstr(err.msg, "T-BAD.csv:8:11") != NULL, "%s", err.msg);
        cr_assert_eq(err.line, 9);
        sg_record_release(&rec);
    }
    sg_calibio_cache_release(&cache);

    /* the demo pipette: a rejected verification in force, and as an override */
    sg_calibio_cache_init(&cache, DEMO_REGISTER);
    for (int pass = 0; pass < 2; pass++) {
        record_for(&rec, "", "", "", "RML-PP-03", 2025, 8, 5);
        cr_assert_eq(resolve_both(&cache, DEMO_REGISTER, &rec, NULL, NULL, &k, &err), SG_EINVAL);
        cr_assert(strstr(err.msg, "rejected") != NULL, "%s", err.msg);
        sg_record_release(&rec);
        record_for(&rec, "", "", "", "RML-PP-03", 2026, 10, 15);
        cr_assert_eq(resolve_both(&cache, DEMO_REGISTER, &rec, "RML-PP-03", "2025-08-04", &k, &err), SG_OK);
        cr_assert(k.n_notes == 1 && strstr(k.notes[0].message, "rejected") != NULL);
        sg_record_release(&rec);
    }
    sg_calibio_cache_release(&cache);

    /* no register folder, or none given */
    sg_calibio_cache_init(&cache, "/nonexistent/register");
    record_for(&rec, "T-H152", "", "", "", 2021, 1, 1);
    for (int pass = 0; pass < 2; pass++) {
        cr_assert_eq(resolve_both(&cache, "/nonexistent/register", &rec, NULL, NULL, &k, &err), SG_ENOTFOUND);
        cr_assert(strstr(err.msg, "/nonexistent/register") != NULL, "%s", err.msg);
    }
    sg_calibio_cache_release(&cache);
    sg_calibio_cache_init(&cache, NULL);
    cr_assert_eq(resolve_both(&cache, NULL, &rec, NULL, NULL, &k, &err), SG_ENOTFOUND);
    sg_record_release(&rec);
    sg_calibio_cache_release(&cache);
    sg_calibio_cache_release(NULL);
    remove_register(dir);
}

Test(calibio, cache_reused_over_a_hundred_records)
{
    char dir[64];
    copy_register(dir, sizeof dir);
    char path[128];
    (void)snprintf(path, sizeof path, "%s/T-TH2.csv", dir);
    spit(path, history_th);
    struct sg_calibio_cache cache;
    sg_calibio_cache_init(&cache, dir);
    /* 100 test dates 13 days apart from 2019-11-20 to 2023-06-27, visited forwards and then
     * backwards (the second visit of each date answered from the cache), alternating between
     * a hydrometer set and a thermometer alone so that the cache serves several instruments */
    const long first = sg_date_days((struct sg_date){2019, 11, 20});
    size_t refused = 0, overdue = 0;
    for (int pass = 0; pass < 2; pass++)
        for (int i = 0; i < 100; i++) {
            const int n = pass == 0 ? i : 99 - i;
            const struct sg_date d = sg_date_from_days(first + 13L * n);
            struct sg_record rec;
            if (n % 2 == 0)
                record_for(&rec, "T-H152", "T-CY-A", "T-TH2", "", d.year, d.month, d.day);
            else
                record_for(&rec, "", "", "T-TH2", "", d.year, d.month, d.day);
            struct sg_constants k;
            struct sg_error err;
            const enum sg_status st = resolve_both(&cache, dir, &rec, NULL, NULL, &k, &err);
            double offset_c;
            bool late, out;
            history_th_on(d, &offset_c, &late, &out);
            const bool before_h152 = sg_date_days(d) < sg_date_days((struct sg_date){2020, 1, 12});
            if (out || (n % 2 == 0 && before_h152)) {
                cr_assert_eq(st, SG_EINVAL, "n %d: %s", n, err.msg);
                refused++;
            } else {
                cr_assert_eq(st, SG_OK, "n %d: %s", n, err.msg);
                cr_assert_float_eq(k.thermometer_offset_c, offset_c, 1e-12); /* METHODS.md 10.5 */
                cr_assert_eq(k.n_notes, late ? 1u : 0u, "n %d", n);
                if (n % 2 == 0)
                    cr_assert_float_eq(k.depth_at_zero_mm, 162.95, 0.01); /* METHODS.md 13.3 #31 */
                overdue += late;
            }
            sg_record_release(&rec);
        }
    /* the history's spans (dates 13 days apart): each state is met */
    cr_assert_gt(refused, 0);
    cr_assert_gt(overdue, 0);
    cr_assert_lt(refused + overdue, 200);
    sg_calibio_cache_release(&cache);
    remove_register(dir);
}

/* An evaluator that calls sg_cal_evaluate, as sg_cal_status does. */
static enum sg_status plain_eval(void *ctx, size_t event, enum sg_cal_part part, const struct sg_cal_result **res,
                                 struct sg_error *err)
{
    const struct sg_cal_instrument *ins = ctx;
    static struct sg_cal_result r; /* one test thread */
    *res = &r;
    return sg_cal_evaluate(ins, &ins->events[event], part, (double)NAN, &r, err);
}

Test(calibio, status_with_an_evaluator_is_sg_cal_status)
{
    static const char *const ids[] = {"RML-CY-11", "RML-H152-01", "RML-HD-02", "RML-PP-03", "RML-TH-05", "RML-TH-06"};
    for (size_t i = 0; i < sizeof ids / sizeof ids[0]; i++) {
        struct sg_cal_instrument ins;
        struct sg_error err;
        cr_assert_eq(sg_calibio_load(DEMO_REGISTER, ids[i], &ins, &err), SG_OK, "%s", err.msg);
        for (long day = sg_date_days((struct sg_date){2023, 1, 1}); day < sg_date_days((struct sg_date){2028, 1, 1});
             day += 17) {
            struct sg_cal_status a, b;
            const struct sg_date d = sg_date_from_days(day);
            cr_assert_eq(sg_cal_status(&ins, d, 30, &a, NULL), SG_OK);
            cr_assert_eq(sg_cal_status_with(&ins, d, 30, plain_eval, &ins, &b, NULL), SG_OK);
            cr_assert_eq(a.state, b.state);
            for (size_t p = 0; p < SG_CAL_PART_COUNT; p++)
                cr_assert_eq(a.entry[p], b.entry[p]);
            cr_assert_eq(a.has_due, b.has_due);
            cr_assert_eq(sg_date_days(a.due), sg_date_days(b.due));
            cr_assert_eq(a.days_to_due, b.days_to_due);
            cr_assert_eq(a.last_event, b.last_event);
            cr_assert_str_eq(a.location, b.location);
            cr_assert_str_eq(a.reason, b.reason);
        }
        sg_cal_instrument_release(&ins);
    }
}
