/* test_report.c - the one-page A4 PDF report: one page of A4 whatever the
 * length of the tables, the identification, method, results, tables,
 * calibrations, QC and cautions present as extractable text (pdftotext),
 * reproducible metadata and bytes, nothing left behind on failure.
 * Input: the demo lab's records (invented, demo/records) reduced with the
 * demo register (calibration/). */
#include <criterion/criterion.h>
#include <dirent.h>
#include <gsl/gsl_errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "sedgrade/axis.h"
#include "sedgrade/calibio.h"
#include "sedgrade/mc.h"
#include "sedgrade/plot.h"
#include "sedgrade/recordio.h"
#include "sedgrade/reduce.h"
#include "sedgrade/report.h"

#define DEMO SG_SOURCE_DIR "/demo/records/"
#define REGISTER SG_SOURCE_DIR "/calibration"

static char dir[64];
static struct sg_record rec;
static struct sg_result res;
static struct sg_constants consts; /* the loaded record's, from the register */

/* Loads and reduces one demo record with the demo register. */
static void load(const char *name)
{
    struct sg_error e;
    char path[512];
    (void)snprintf(path, sizeof path, "%s%s", DEMO, name);
    sg_record_release(&rec);
    cr_assert_eq(sg_recordio_load(path, &rec, NULL, &e), SG_OK, "%s: %s", name, e.msg);
    sg_constants_from_record(&rec, &consts);
    cr_assert_eq(sg_calibio_resolve(REGISTER, &rec, &consts, &e), SG_OK, "%s: %s", name, e.msg);
    cr_assert_eq(sg_reduce(&rec, &consts, NULL, &res, &e), SG_OK, "%s: %s", name, e.msg);
}

static void setup(void)
{
    gsl_set_error_handler_off();
    (void)snprintf(dir, sizeof dir, "/tmp/sg-test-report-XXXXXX");
    cr_assert_not_null(mkdtemp(dir));
    sg_record_init(&rec);
    sg_result_init(&res);
    load("KV-BH03-D2.csv");
}

static void teardown(void)
{
    sg_result_release(&res);
    sg_record_release(&rec);
    char cmd[128];
    (void)snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    (void)system(cmd);
    sg_plot_cleanup();
}

TestSuite(report, .init = setup, .fini = teardown);

static bool have(const char *tool)
{
    char cmd[128];
    (void)snprintf(cmd, sizeof cmd, "command -v %s >/dev/null 2>&1", tool);
    return system(cmd) == 0;
}

static char *run(const char *cmd)
{
    FILE *p = popen(cmd, "r");
    cr_assert_not_null(p, "cannot run %s", cmd);
    size_t cap = 4096, n = 0, k;
    char *out = malloc(cap);
    cr_assert_not_null(out);
    while ((k = fread(out + n, 1, cap - n - 1, p)) > 0) {
        n += k;
        if (cap - n < 2) {
            cap *= 2;
            out = realloc(out, cap);
            cr_assert_not_null(out);
        }
    }
    out[n] = '\0';
    (void)pclose(p);
    return out;
}

static size_t entries(const char *d)
{
    DIR *dp = opendir(d);
    cr_assert_not_null(dp);
    size_t n = 0;
    struct dirent *de;
    while ((de = readdir(dp)) != NULL)
        if (strcmp(de->d_name, ".") != 0 && strcmp(de->d_name, "..") != 0)
            n++;
    closedir(dp);
    return n;
}

/* Writes the report of res to dir/name and returns its text (pdftotext,
 * reading order, no layout) after checking it is one A4 page. */
static char *write_and_read(const char *name)
{
    char p[128], cmd[256];
    (void)snprintf(p, sizeof p, "%s/%s", dir, name);
    struct sg_error e;
    cr_assert_eq(sg_report_write(&res, &rec, p, &e), SG_OK, "%s", e.msg);
    (void)snprintf(cmd, sizeof cmd, "pdfinfo '%s'", p);
    char *info = run(cmd);
    cr_assert(strstr(info, "Pages:           1\n") != NULL, "one page: %s", info);
    /* ISO 216 A4, 210 x 297 mm = 595.276 x 841.89 pt */
    cr_assert(strstr(info, "595.276 x 841.89 pts (A4)") != NULL, "%s", info);
    free(info);
    (void)snprintf(cmd, sizeof cmd, "pdftotext '%s' -", p);
    return run(cmd);
}

#define NEED_POPPLER()                                                                                         \
    do {                                                                                                       \
        if (!have("pdftotext") || !have("pdfinfo"))                                                            \
            cr_skip_test("poppler-utils not installed");                                                       \
    } while (0)

static void contains(const char *text, const char *want)
{
    cr_assert(strstr(text, want) != NULL, "'%s' not found in the report text:\n%s", want, text);
}

static void contains_quantity(const char *text, const char *name, int sig, int dec)
{
    const struct sg_quantity *q = sg_result_quantity(&res, name);
    cr_assert(q != NULL && q->determined, "%s determined", name);
    char num[40];
    if (sig > 0)
        sg_axis_format_sig(q->value, sig, num, sizeof num);
    else
        sg_axis_format_fixed(q->value, dec, num, sizeof num);
    contains(text, num);
}

Test(report, identification_method_results_and_cautions)
{
    NEED_POPPLER();
    char *t = write_and_read("r.pdf");
    contains(t, "Particle size distribution");
    contains(t, "Report KV-BH03-D2");
    contains(t, "2026-10-12");                       /* demo record's test date */
    contains(t, "ASTM D7928-17");                    /* test,standard,astm-d7928 */
    contains(t, "RML-H152-01");                      /* hydrometer named in the record */
    contains(t, "1850.40 g");                        /* sample_dry_mass_g 1850.4 */
    contains(t, "50.12 g");                          /* specimen_dry_mass_g */
    contains(t, "D60");
    contains_quantity(t, "d60_mm", 4, 0);            /* diameters with 4 significant digits */
    contains_quantity(t, "d30_mm", 4, 0);
    contains_quantity(t, "fines_pct", 0, 1);         /* percents with 1 decimal */
    contains_quantity(t, "uscs_gravel_pct", 0, 1);   /* USCS first for an ASTM record */
    contains(t, "USDA");
    const struct sg_quantity *tex = sg_result_quantity(&res, "usda_texture");
    cr_assert(tex != NULL && tex->determined);
    contains(t, tex->text);
    /* METHODS.md 12.1 cautions, in the laboratory's own words */
    contains(t, "relate only to the specimen tested");
    contains(t, "Stokes' law");
    contains(t, "not design");
    contains(t, "licensed professional");
    contains(t, "local codes");
    contains(t, "reproduced except in full");
    /* sign-off and a clear end (ISO/IEC 17025 7.8.2.1, METHODS.md 12.2) */
    contains(t, "Approved for issue by");
    contains(t, "page 1 of 1");
    contains(t, "end of report");
    free(t);
}

Test(report, tables_carry_every_correction)
{
    NEED_POPPLER();
    char *t = write_and_read("r.pdf");
    contains(t, "Sieve analysis");
    contains(t, "Hydrometer readings");
    contains(t, "R\xe2\x88\x92" "blank");
    contains(t, "R+Cm");
    contains(t, "thermometer correction");
    /* every reading of the record fits: the last one (1440 min) is there, with its diameter */
    contains(t, "1440");
    const struct sg_point *last = NULL;
    for (size_t i = 0; i < res.n_points; i++)
        if (res.points[i].source == SG_SOURCE_HYDROMETER)
            last = &res.points[i];
    cr_assert_not_null(last);
    char d[40];
    sg_axis_format_sig(last->diameter_mm, 4, d, sizeof d);
    contains(t, d);
    sg_axis_format_fixed(last->effective_depth_mm, 1, d, sizeof d);
    contains(t, d);
    cr_assert(strstr(t, "more rows") == NULL, "the demo record's tables fit without cutting");
    free(t);
}

Test(report, calibrations_with_their_dates)
{
    NEED_POPPLER();
    char *t = write_and_read("r.pdf");
    contains(t, "Calibrations used");
    /* each "instrument@date" of calibration_used */
    const char *p = res.calibration_used;
    cr_assert(strchr(p, '@') != NULL, "the demo record uses the register: %s", p);
    while (*p) {
        char item[128];
        const size_t len = strcspn(p, ";");
        (void)snprintf(item, sizeof item, "%.*s", (int)len, p);
        char *at = strchr(item, '@');
        cr_assert_not_null(at);
        *at = '\0';
        contains(t, item);
        char when[64];
        (void)snprintf(when, sizeof when, "calibration of %s", at + 1);
        contains(t, when);
        p += len;
        if (*p == ';')
            p++;
    }
    free(t);
}

Test(report, qc_flags_listed)
{
    NEED_POPPLER();
    sg_result_release(&res);
    sg_result_init(&res);
    load("KV-BH07-U4.csv"); /* the demo record with a Reynolds-limit finding */
    bool found = false;
    for (size_t i = 0; i < res.n_flags; i++)
        found = found || strcmp(res.flags[i].name, "reynolds") == 0;
    cr_assert(found, "KV-BH07-U4 carries a reynolds flag");
    char *t = write_and_read("u4.pdf");
    contains(t, "Quality control");
    contains(t, "reynolds");
    contains(t, "BS 1377-2:1990");
    contains(t, "specimen"); /* fine-sieve rows of the specimen */
    contains_quantity(t, "silt_pct", 0, 1); /* ISO 14688-1 first for a BS record */
    free(t);
}

Test(report, pipette_record)
{
    NEED_POPPLER();
    sg_result_release(&res);
    sg_result_init(&res);
    load("KV-TP12-B1.csv");
    char *t = write_and_read("tp12.pdf");
    contains(t, "Pipette samples");
    contains(t, "Net solids");
    contains(t, "9.4 pipette");
    contains(t, "KV-TP12-B1");
    free(t);
}

Test(report, long_tables_are_cut_to_one_page)
{
    NEED_POPPLER();
    /* 60 more sedimentation points and 30 more sieve points than any page holds */
    const struct sg_point hyd = res.points[res.n_points - 1];
    struct sg_point sv = sg_point_blank(SG_SOURCE_SIEVE, 20);
    for (size_t i = 0; i < res.n_points; i++)
        if (res.points[i].source == SG_SOURCE_SIEVE)
            sv = res.points[i];
    for (int i = 0; i < 60; i++)
        cr_assert_eq(sg_result_add_point(&res, &hyd), SG_OK);
    for (int i = 0; i < 30; i++)
        cr_assert_eq(sg_result_add_point(&res, &sv), SG_OK);
    for (int i = 0; i < 40; i++)
        cr_assert_eq(sg_result_add_flag(&res, "test_flag", SG_SEVERITY_WARNING, (unsigned)(100 + i),
                                        "finding number %d with a message long enough to wrap onto a second "
                                        "line in the quality-control column of the report",
                                        i),
                     SG_OK);
    char *t = write_and_read("long.pdf");
    contains(t, "more rows (see KV-BH03-D2.points.csv)");
    contains(t, "more findings");
    contains(t, "end of report"); /* the foot is still on the page */
    contains(t, "licensed professional");
    free(t);
}

Test(report, monte_carlo_intervals_shown)
{
    NEED_POPPLER();
    struct sg_quantity *q = sg_result_quantity(&res, "d60_mm");
    cr_assert(q != NULL && q->determined);
    q->has_u = true;
    q->u = 0.0021;
    q->low95 = q->value * 0.93;
    q->high95 = q->value * 1.06;
    char *t = write_and_read("mc.pdf");
    contains(t, "Monte Carlo");
    char lo[40], hi[40], want[100];
    sg_axis_format_sig(q->low95, 4, lo, sizeof lo);
    sg_axis_format_sig(q->high95, 4, hi, sizeof hi);
    (void)snprintf(want, sizeof want, "[%s\xe2\x80\x93%s]", lo, hi);
    contains(t, want);
    free(t);
}

static void check_layout(const char *pdf);

/* With a Monte Carlo run the categorical results carry the probability of
 * the class given, the USCS group is the symbol the Atterberg limits give
 * (KV-BH07-U4 gives LL and PL, and is fine-grained), Skempton's activity is
 * shown with its interval, and nothing overlaps. */
Test(report, class_probabilities_group_symbol_and_activity_shown)
{
    NEED_POPPLER();
    sg_result_release(&res);
    sg_result_init(&res);
    load("KV-BH07-U4.csv");
    struct sg_error e;
    const struct sg_mc_options o = {.draws = 2000, .seed = 3, .threads = 2};
    cr_assert_eq(sg_mc_run(&rec, &consts, NULL, &o, &res, &e), SG_OK, "%s", e.msg);
    const struct sg_quantity *tex = sg_result_quantity(&res, "usda_texture");
    const struct sg_quantity *sym = sg_result_quantity(&res, "uscs_symbol");
    cr_assert(tex != NULL && tex->determined && sym != NULL && sym->determined);
    double p_tex = -1.0, p_sym = -1.0;
    cr_assert(sg_mc_class_probability(&res, "usda_texture", tex->text, &p_tex));
    cr_assert(sg_mc_class_probability(&res, "uscs_symbol", sym->text, &p_sym));
    cr_assert(p_tex > 0.0 && p_tex <= 100.0 && p_sym > 0.0 && p_sym <= 100.0);
    cr_assert(!sg_mc_class_probability(&res, "usda_texture", "no such class", &p_tex));
    char *t = write_and_read("classes.pdf");
    char want[SG_QTEXT_MAX + 32];
    if (p_tex >= 0.5 && p_tex < 99.5) {
        (void)snprintf(want, sizeof want, "%s (p = %.0f %%)", tex->text, p_tex);
        contains(t, want);
    }
    (void)snprintf(want, sizeof want, "%s (p = ", sym->text);
    contains(t, want);
    contains(t, "class probabilities as p");
    contains(t, "Activity");
    char lo[40], hi[40];
    const struct sg_quantity *a = sg_result_quantity(&res, "activity");
    cr_assert(a != NULL && a->has_u);
    sg_axis_format_sig(a->low95, 2, lo, sizeof lo);
    sg_axis_format_sig(a->high95, 2, hi, sizeof hi);
    (void)snprintf(want, sizeof want, "[%s\xe2\x80\x93%s]", lo, hi);
    contains(t, want);
    free(t);
    char p[160];
    (void)snprintf(p, sizeof p, "%s/classes.pdf", dir);
    check_layout(p);
}

Test(report, metadata_and_bytes_are_reproducible)
{
    NEED_POPPLER();
    char a[128], b[128], cmd[300];
    (void)snprintf(a, sizeof a, "%s/a.pdf", dir);
    (void)snprintf(b, sizeof b, "%s/b.pdf", dir);
    cr_assert_eq(sg_report_write(&res, &rec, a, NULL), SG_OK);
    cr_assert_eq(sg_report_write(&res, &rec, b, NULL), SG_OK);
    (void)snprintf(cmd, sizeof cmd, "cmp '%s' '%s' && echo same", a, b);
    char *out = run(cmd);
    cr_assert_str_eq(out, "same\n");
    free(out);
    (void)snprintf(cmd, sizeof cmd, "pdfinfo -isodates '%s'", a);
    char *info = run(cmd);
    contains(info, "Title:           Particle size distribution - KV-BH03-D2");
    contains(info, "Creator:         sedgrade");
    contains(info, "CreationDate:    2026-10-12T00:00:00"); /* the test date */
    free(info);
}

Test(report, bad_arguments_and_unwritable_places)
{
    char p[160];
    struct sg_error e;
    (void)snprintf(p, sizeof p, "%s/r.pdf", dir);
    cr_assert_eq(sg_report_write(NULL, &rec, p, &e), SG_EINVAL);
    cr_assert_eq(sg_report_write(&res, NULL, p, &e), SG_EINVAL);
    cr_assert_eq(sg_report_write(&res, &rec, NULL, &e), SG_EINVAL);
    (void)snprintf(p, sizeof p, "%s/missing/r.pdf", dir);
    cr_assert_eq(sg_report_write(&res, &rec, p, &e), SG_EIO);
    cr_assert(strstr(e.msg, "r.pdf") != NULL, "%s", e.msg);
    /* a folder in the way: drawn, then the rename fails; the temporary file goes */
    (void)snprintf(p, sizeof p, "%s/taken.report.pdf", dir);
    cr_assert_eq(mkdir(p, 0755), 0);
    char inner[200];
    (void)snprintf(inner, sizeof inner, "%s/keep", p);
    FILE *fp = fopen(inner, "w");
    cr_assert_not_null(fp);
    fclose(fp);
    cr_assert_eq(sg_report_write(&res, &rec, p, &e), SG_EIO);
    cr_assert_eq(entries(dir), 1);
}

Test(report, record_without_optional_data)
{
    NEED_POPPLER();
    /* no standard, no instruments, no limits, inline constants: blanks, not garbage */
    rec.standard = SG_STANDARD_NONE;
    rec.hydrometer[0] = rec.cylinder[0] = rec.thermometer[0] = '\0';
    rec.has_liquid_limit = rec.has_plastic_limit = rec.has_natural_moisture = false;
    (void)snprintf(res.calibration_used, sizeof res.calibration_used, "inline");
    char *t = write_and_read("bare.pdf");
    contains(t, "no standard selected");
    contains(t, "exact physics");
    contains(t, "constants given in the test record");
    cr_assert(strstr(t, "nan") == NULL && strstr(t, "inf ") == NULL);
    free(t);
}

struct box {
    double x0, y0, x1, y1;
};

/* Word boxes of a PDF (pdftotext -bbox); *n receives the count. */
static struct box *word_boxes(const char *pdf, size_t *n)
{
    char cmd[256];
    (void)snprintf(cmd, sizeof cmd, "pdftotext -bbox '%s' -", pdf);
    char *html = run(cmd);
    size_t cap = 256;
    struct box *b = malloc(cap * sizeof *b);
    cr_assert_not_null(b);
    *n = 0;
    for (const char *p = strstr(html, "<word "); p != NULL; p = strstr(p + 1, "<word ")) {
        struct box w;
        cr_assert_eq(sscanf(p, "<word xMin=\"%lf\" yMin=\"%lf\" xMax=\"%lf\" yMax=\"%lf\"", &w.x0, &w.y0, &w.x1, &w.y1),
                     4);
        if (*n == cap) {
            cap *= 2;
            b = realloc(b, cap * sizeof *b);
            cr_assert_not_null(b);
        }
        b[(*n)++] = w;
    }
    free(html);
    return b;
}

/* No two words of the page overlap (more than 0.5 pt across and 1 pt down:
 * pdftotext's boxes are the font's full height, a little taller than the
 * line spacing of the tables), and every word lies on the page inside a
 * 24 pt margin. */
static void check_layout(const char *pdf)
{
    size_t n;
    struct box *b = word_boxes(pdf, &n);
    cr_assert_gt(n, 300, "%s: %zu words", pdf, n);
    for (size_t i = 0; i < n; i++) {
        cr_assert(b[i].x0 >= 24.0 && b[i].x1 <= SG_REPORT_WIDTH_PT - 24.0 && b[i].y0 >= 20.0 &&
                      b[i].y1 <= SG_REPORT_HEIGHT_PT - 12.0,
                  "%s: word %zu at (%g, %g)-(%g, %g) leaves the page's margins", pdf, i, b[i].x0, b[i].y0, b[i].x1,
                  b[i].y1);
        for (size_t j = i + 1; j < n; j++) {
            const double ix = fmin(b[i].x1, b[j].x1) - fmax(b[i].x0, b[j].x0);
            const double iy = fmin(b[i].y1, b[j].y1) - fmax(b[i].y0, b[j].y0);
            cr_assert(!(ix > 0.5 && iy > 1.0), "%s: words %zu (%g, %g) and %zu (%g, %g) overlap", pdf, i, b[i].x0,
                      b[i].y0, j, b[j].x0, b[j].y0);
        }
    }
    free(b);
}

Test(report, no_text_overlaps_for_any_demo_record_or_long_tables)
{
    NEED_POPPLER();
    static const char *const records[] = {"KV-BH03-D2.csv", "KV-BH03-D5.csv", "KV-BH07-U4.csv", "KV-TP12-B1.csv"};
    char p[160];
    for (size_t i = 0; i < sizeof records / sizeof records[0]; i++) {
        sg_result_release(&res);
        sg_result_init(&res);
        load(records[i]);
        (void)snprintf(p, sizeof p, "%s/%zu.pdf", dir, i);
        cr_assert_eq(sg_report_write(&res, &rec, p, NULL), SG_OK);
        check_layout(p);
    }
    /* the last one again with 120 readings, 50 sieve rows and 40 findings */
    const struct sg_point last = res.points[res.n_points - 1];
    struct sg_point sv = res.points[0];
    for (int i = 0; i < 120; i++)
        cr_assert_eq(sg_result_add_point(&res, &last), SG_OK);
    for (int i = 0; i < 50; i++)
        cr_assert_eq(sg_result_add_point(&res, &sv), SG_OK);
    for (int i = 0; i < 40; i++)
        cr_assert_eq(sg_result_add_flag(&res, "test_flag", i % 3 ? SG_SEVERITY_WARNING : SG_SEVERITY_FAILURE, 0,
                                        "finding %d, long enough to take two lines of the quality-control column "
                                        "beside the sieve table",
                                        i),
                     SG_OK);
    (void)snprintf(p, sizeof p, "%s/long.pdf", dir);
    cr_assert_eq(sg_report_write(&res, &rec, p, NULL), SG_OK);
    check_layout(p);
}

/* A test id of the longest length a record allows (63 characters). */
static void long_id(void)
{
    static const char id[] = "KV-BH03-D2-long-identifier-of-sixty-three-characters-0123456789";
    cr_assert_eq(strlen(id), SG_ID_MAX - 1);
    (void)snprintf(res.id, sizeof res.id, "%s", id);
    (void)snprintf(rec.id, sizeof rec.id, "%s", id);
}

/* Guards the "... n more rows" lines against running out of their column:
 * with a 63-character id, 60 more readings, 20 more sieve rows and 40
 * findings the sieve table is cut, and its line (which named
 * <id>.points.csv in full) overprinted the QC text in the right-hand
 * column. Every word stays clear of every other; a name too long for the
 * column gives way to the file's kind. */
Test(report, more_rows_line_fits_its_column_with_a_long_id)
{
    NEED_POPPLER();
    long_id();
    const struct sg_point hyd = res.points[res.n_points - 1];
    for (int i = 0; i < 60; i++)
        cr_assert_eq(sg_result_add_point(&res, &hyd), SG_OK);
    struct sg_point sv = res.points[0];
    for (int i = 0; i < 20; i++)
        cr_assert_eq(sg_result_add_point(&res, &sv), SG_OK);
    for (int i = 0; i < 40; i++)
        cr_assert_eq(sg_result_add_flag(&res, "test_flag", SG_SEVERITY_WARNING, (unsigned)(100 + i),
                                        "finding %d beside the sieve table", i),
                     SG_OK);
    char p[160];
    (void)snprintf(p, sizeof p, "%s/long-id.pdf", dir);
    cr_assert_eq(sg_report_write(&res, &rec, p, NULL), SG_OK);
    check_layout(p);
    char *t = write_and_read("long-id.pdf");
    contains(t, "more rows (see the points file)");                  /* the half-page sieve column */
    contains(t, "more rows (see " "KV-BH03-D2-long-identifier-of"); /* the full-width readings table */
    contains(t, "more findings (see the summary file, qc_flags)");
    free(t);
}

/* Guards the report against sending the reader to files that were not
 * written (reduce --outputs none --report named <id>.points.csv): with no
 * points file it says so, and the findings point to the file named. */
Test(report, cut_tables_name_only_files_written)
{
    NEED_POPPLER();
    const struct sg_point hyd = res.points[res.n_points - 1];
    for (int i = 0; i < 60; i++)
        cr_assert_eq(sg_result_add_point(&res, &hyd), SG_OK);
    for (int i = 0; i < 40; i++)
        cr_assert_eq(sg_result_add_flag(&res, "test_flag", SG_SEVERITY_WARNING, (unsigned)(100 + i),
                                        "finding %d beside the sieve table", i),
                     SG_OK);
    const struct sg_report_files files = {NULL, "summary.csv"};
    char p[160];
    (void)snprintf(p, sizeof p, "%s/none.pdf", dir);
    struct sg_error e;
    cr_assert_eq(sg_report_write_with(&res, &rec, &files, p, &e), SG_OK, "%s", e.msg);
    check_layout(p);
    char cmd[256];
    (void)snprintf(cmd, sizeof cmd, "pdftotext '%s' -", p);
    char *t = run(cmd);
    contains(t, "more rows (no points file was written)");
    contains(t, "more findings (see summary.csv, qc_flags)");
    cr_assert(strstr(t, "points.csv") == NULL, "no points file is named:\n%s", t);
    free(t);
}
