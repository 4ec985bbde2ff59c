/* test_plot.c - grading charts and calibration charts: each output opens and
 * has the shape plot.h documents (PNG size read back with cairo, SVG parsed
 * as XML, PDF page count, metadata and text read back with poppler-utils),
 * the font resolves to DejaVu Sans, failed writes leave nothing behind.
 * Input: the demo lab's record KV-BH03-D5 (invented, demo/records) reduced
 * with its inline constants. */
#include <cairo.h>
#include <criterion/criterion.h>
#include <dirent.h>
#include <gsl/gsl_errno.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "sedgrade/axis.h"
#include "sedgrade/mc.h"
#include "sedgrade/plot.h"
#include "sedgrade/recordio.h"
#include "sedgrade/reduce.h"

#define DEMO_RECORD SG_SOURCE_DIR "/demo/records/KV-BH03-D5.csv"

static char dir[64];
static struct sg_record rec;
static struct sg_result res;

static void setup(void)
{
    gsl_set_error_handler_off();
    (void)snprintf(dir, sizeof dir, "/tmp/sg-test-plot-XXXXXX");
    cr_assert_not_null(mkdtemp(dir));
    sg_record_init(&rec);
    sg_result_init(&res);
    struct sg_error e;
    cr_assert_eq(sg_recordio_load(DEMO_RECORD, &rec, NULL, &e), SG_OK, "%s", e.msg);
    cr_assert_eq(sg_reduce(&rec, NULL, NULL, &res, &e), SG_OK, "%s", e.msg);
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

TestSuite(plot, .init = setup, .fini = teardown);

static void path_in(char *buf, size_t size, const char *name)
{
    (void)snprintf(buf, size, "%s/%s", dir, name);
}

static bool have(const char *tool)
{
    char cmd[128];
    (void)snprintf(cmd, sizeof cmd, "command -v %s >/dev/null 2>&1", tool);
    return system(cmd) == 0;
}

/* Runs cmd and returns its standard output (caller frees). */
static char *run(const char *cmd)
{
    FILE *p = popen(cmd, "r");
    cr_assert_not_null(p, "cannot run %s", cmd);
    size_t cap = 4096, n = 0;
    char *out = malloc(cap);
    cr_assert_not_null(out);
    size_t k;
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

/* Number of entries in dir other than . and .. */
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

/* Counts pixels within tol (0-255 per channel) of rgb in a PNG. */
static size_t count_colour(const char *png, int r, int g, int b, int tol)
{
    cairo_surface_t *s = cairo_image_surface_create_from_png(png);
    cr_assert_eq(cairo_surface_status(s), CAIRO_STATUS_SUCCESS, "%s", png);
    cairo_surface_flush(s);
    const int w = cairo_image_surface_get_width(s), h = cairo_image_surface_get_height(s);
    const int stride = cairo_image_surface_get_stride(s);
    const unsigned char *data = cairo_image_surface_get_data(s);
    size_t n = 0;
    for (int y = 0; y < h; y++) {
        const uint32_t *row = (const uint32_t *)(const void *)(data + (size_t)y * (size_t)stride);
        for (int x = 0; x < w; x++) {
            const int pr = (int)((row[x] >> 16) & 0xff), pg = (int)((row[x] >> 8) & 0xff), pb = (int)(row[x] & 0xff);
            if (abs(pr - r) <= tol && abs(pg - g) <= tol && abs(pb - b) <= tol)
                n++;
        }
    }
    cairo_surface_destroy(s);
    return n;
}

static bool same_bytes(const char *a, const char *b)
{
    FILE *fa = fopen(a, "rb"), *fb = fopen(b, "rb");
    cr_assert(fa != NULL && fb != NULL);
    int ca, cb;
    bool same = true;
    do {
        ca = fgetc(fa);
        cb = fgetc(fb);
        if (ca != cb)
            same = false;
    } while (same && ca != EOF);
    fclose(fa);
    fclose(fb);
    return same;
}

Test(plot, font_resolves_to_dejavu_sans)
{
    char family[128];
    struct sg_error e;
    /* plot.h: the install step names fonts-dejavu-core; cairo would otherwise fall back silently */
    cr_assert_eq(sg_plot_font_check(family, sizeof family, &e), SG_OK, "%s", e.msg);
    cr_assert_str_eq(family, "DejaVu Sans");
}

Test(plot, format_names)
{
    enum sg_plot_format f;
    cr_assert_str_eq(sg_plot_extension(SG_PLOT_PNG), "png");
    cr_assert_str_eq(sg_plot_extension(SG_PLOT_SVG), "svg");
    cr_assert_str_eq(sg_plot_extension(SG_PLOT_PDF), "pdf");
    cr_assert_str_eq(sg_plot_extension((enum sg_plot_format)9), "");
    cr_assert_eq(sg_plot_format_parse("svg", &f, NULL), SG_OK);
    cr_assert_eq(f, SG_PLOT_SVG);
    cr_assert_eq(sg_plot_format_parse("pdf", &f, NULL), SG_OK);
    cr_assert_eq(f, SG_PLOT_PDF);
    struct sg_error e;
    cr_assert_eq(sg_plot_format_parse("jpeg", &f, &e), SG_EINVAL);
    cr_assert(strstr(e.msg, "'jpeg'") != NULL);
    cr_assert_eq(sg_plot_format_parse(NULL, &f, NULL), SG_EINVAL);
}

Test(plot, png_has_the_documented_size)
{
    char p[128];
    path_in(p, sizeof p, "c.png");
    struct sg_error e;
    cr_assert_eq(sg_plot_write(&res, &rec, SG_PLOT_PNG, p, &e), SG_OK, "%s", e.msg);
    cairo_surface_t *s = cairo_image_surface_create_from_png(p);
    cr_assert_eq(cairo_surface_status(s), CAIRO_STATUS_SUCCESS);
    /* plot.h: 720 x 450 pt at 2 px per pt */
    cr_assert_eq(cairo_image_surface_get_width(s), (int)(SG_PLOT_WIDTH_PT * SG_PLOT_PNG_PX_PER_PT));
    cr_assert_eq(cairo_image_surface_get_width(s), 1440);
    cr_assert_eq(cairo_image_surface_get_height(s), 900);
    cairo_surface_destroy(s);
    cr_assert_eq(entries(dir), 1); /* no temporary file left beside it */
}

Test(plot, png_shows_curve_sieve_and_sedimentation_points)
{
    char p[128];
    path_in(p, sizeof p, "c.png");
    cr_assert_eq(sg_plot_write(&res, &rec, SG_PLOT_PNG, p, NULL), SG_OK);
    /* draw.c palette: curve and sieve markers (0.08, 0.22, 0.50), sedimentation markers (0.60, 0.18, 0.06) */
    cr_assert_gt(count_colour(p, 20, 56, 128, 6), 2000);
    cr_assert_gt(count_colour(p, 153, 46, 15, 6), 300);
}

Test(plot, band95_drawn_when_points_carry_u)
{
    char p0[128], p1[128];
    path_in(p0, sizeof p0, "noband.png");
    path_in(p1, sizeof p1, "band.png");
    cr_assert_eq(sg_plot_write(&res, &rec, SG_PLOT_PNG, p0, NULL), SG_OK);
    for (size_t i = 0; i < res.n_points; i++)
        res.points[i].percent_finer_u = 1.2;
    cr_assert_eq(sg_plot_write(&res, &rec, SG_PLOT_PNG, p1, NULL), SG_OK);
    /* band colour (0.62, 0.72, 0.90) at 55 % over white: 1 - 0.55 (1 - c) -> (202, 216, 241) */
    cr_assert_eq(count_colour(p0, 202, 216, 241, 4), 0);
    cr_assert_gt(count_colour(p1, 202, 216, 241, 4), 3000);
}

Test(plot, svg_is_well_formed_xml)
{
    char p[128], cmd[256];
    path_in(p, sizeof p, "c.svg");
    cr_assert_eq(sg_plot_write(&res, &rec, SG_PLOT_SVG, p, NULL), SG_OK);
    if (have("xmllint")) {
        (void)snprintf(cmd, sizeof cmd, "xmllint --noout '%s' 2>&1", p);
        char *out = run(cmd);
        cr_assert_str_eq(out, "", "xmllint: %s", out);
        free(out);
    }
    (void)snprintf(cmd, sizeof cmd, "cat '%s'", p);
    char *svg = run(cmd);
    cr_assert(strncmp(svg, "<?xml", 5) == 0);
    cr_assert(strstr(svg, "<svg") != NULL);
    cr_assert(strstr(svg, "width=\"720") != NULL, "SVG width 720 pt");
    cr_assert(strstr(svg, "</svg>") != NULL);
    free(svg);
}

Test(plot, pdf_chart_is_one_page_with_searchable_text)
{
    if (!have("pdftotext") || !have("pdfinfo"))
        cr_skip_test("poppler-utils not installed");
    char p[128], cmd[256];
    path_in(p, sizeof p, "c.pdf");
    cr_assert_eq(sg_plot_write(&res, &rec, SG_PLOT_PDF, p, NULL), SG_OK);
    (void)snprintf(cmd, sizeof cmd, "pdfinfo -isodates '%s'", p);
    char *info = run(cmd);
    cr_assert(strstr(info, "Pages:           1") != NULL, "%s", info);
    cr_assert(strstr(info, "Creator:         sedgrade") != NULL, "%s", info);
    /* the record's date (demo/records/KV-BH03-D5.csv: 2026-10-16) is the creation date */
    cr_assert(strstr(info, "CreationDate:    2026-10-16T00:00:00") != NULL, "%s", info);
    cr_assert(strstr(info, "720 x 450 pts") != NULL, "%s", info);
    free(info);
    (void)snprintf(cmd, sizeof cmd, "pdftotext '%s' -", p);
    char *text = run(cmd);
    cr_assert(strstr(text, "KV-BH03-D5") != NULL, "%s", text);
    const struct sg_quantity *d60 = sg_result_quantity(&res, "d60_mm");
    cr_assert(d60 != NULL && d60->determined);
    char want[64], num[32];
    sg_axis_format_sig(d60->value, 4, num, sizeof num);
    (void)snprintf(want, sizeof want, "D60 = %s mm", num);
    cr_assert(strstr(text, want) != NULL, "'%s' not in %s", want, text);
    cr_assert(strstr(text, "Percent finer by mass") != NULL);
    cr_assert(strstr(text, "0.001") != NULL && strstr(text, "100") != NULL);
    cr_assert(strstr(text, "Silt") != NULL && strstr(text, "Gravel") != NULL, "ISO 14688-1 bands");
    free(text);
}

/* After a Monte Carlo run the panel's USDA texture carries its class's
 * probability, as in the report. */
Test(plot, texture_shows_its_monte_carlo_probability)
{
    if (!have("pdftotext"))
        cr_skip_test("poppler-utils not installed");
    struct sg_error e;
    const struct sg_mc_options o = {.draws = 2000, .seed = 5, .threads = 2};
    cr_assert_eq(sg_mc_run(&rec, NULL, NULL, &o, &res, &e), SG_OK, "%s", e.msg);
    const struct sg_quantity *tex = sg_result_quantity(&res, "usda_texture");
    cr_assert(tex != NULL && tex->determined);
    double pct = -1.0;
    cr_assert(sg_mc_class_probability(&res, "usda_texture", tex->text, &pct));
    char p[128], cmd[256], want[SG_QTEXT_MAX + 16];
    path_in(p, sizeof p, "mc.pdf");
    cr_assert_eq(sg_plot_write(&res, &rec, SG_PLOT_PDF, p, NULL), SG_OK);
    (void)snprintf(cmd, sizeof cmd, "pdftotext '%s' -", p);
    char *text = run(cmd);
    if (pct >= 0.5 && pct < 99.5)
        (void)snprintf(want, sizeof want, "%s (p = %.0f %%)", tex->text, pct);
    else
        (void)snprintf(want, sizeof want, "%s (p = ", tex->text);
    cr_assert(strstr(text, want) != NULL, "'%s' not in %s", want, text);
    free(text);
}

/* No two words of a chart PDF overlap (pdftotext -bbox word boxes; more
 * than 0.5 pt across and 1 pt down counts). */
Test(plot, pdf_chart_text_does_not_overlap)
{
    if (!have("pdftotext"))
        cr_skip_test("poppler-utils not installed");
    char p[128], cmd[256];
    path_in(p, sizeof p, "c.pdf");
    cr_assert_eq(sg_plot_write(&res, &rec, SG_PLOT_PDF, p, NULL), SG_OK);
    (void)snprintf(cmd, sizeof cmd, "pdftotext -bbox '%s' -", p);
    char *html = run(cmd);
    double b[512][4];
    size_t n = 0;
    for (const char *q = strstr(html, "<word "); q != NULL && n < 512; q = strstr(q + 1, "<word ")) {
        cr_assert_eq(sscanf(q, "<word xMin=\"%lf\" yMin=\"%lf\" xMax=\"%lf\" yMax=\"%lf\"", &b[n][0], &b[n][1],
                            &b[n][2], &b[n][3]),
                     4);
        n++;
    }
    free(html);
    cr_assert_gt(n, 60);
    for (size_t i = 0; i < n; i++) {
        cr_assert(b[i][0] >= 0.0 && b[i][2] <= SG_PLOT_WIDTH_PT && b[i][1] >= 0.0 && b[i][3] <= SG_PLOT_HEIGHT_PT);
        for (size_t j = i + 1; j < n; j++) {
            const double ix = fmin(b[i][2], b[j][2]) - fmax(b[i][0], b[j][0]);
            const double iy = fmin(b[i][3], b[j][3]) - fmax(b[i][1], b[j][1]);
            cr_assert(!(ix > 0.5 && iy > 1.0), "words at (%g, %g) and (%g, %g) overlap", b[i][0], b[i][1], b[j][0],
                      b[j][1]);
        }
    }
}

Test(plot, same_input_same_bytes)
{
    const enum sg_plot_format fmts[] = {SG_PLOT_PNG, SG_PLOT_SVG, SG_PLOT_PDF};
    for (size_t i = 0; i < 3; i++) {
        char a[128], b[128], na[16], nb[16];
        (void)snprintf(na, sizeof na, "a.%s", sg_plot_extension(fmts[i]));
        (void)snprintf(nb, sizeof nb, "b.%s", sg_plot_extension(fmts[i]));
        path_in(a, sizeof a, na);
        path_in(b, sizeof b, nb);
        cr_assert_eq(sg_plot_write(&res, &rec, fmts[i], a, NULL), SG_OK);
        cr_assert_eq(sg_plot_write(&res, &rec, fmts[i], b, NULL), SG_OK);
        cr_assert(same_bytes(a, b), "%s differs between runs", sg_plot_extension(fmts[i]));
    }
}

Test(plot, options_mirror_and_bands)
{
    char a[128], b[128];
    path_in(a, sizeof a, "fine-left.png");
    path_in(b, sizeof b, "coarse-left.png");
    struct sg_plot_options o = sg_plot_options_default();
    cr_assert_eq(o.coarse_left, false);
    cr_assert_eq(o.auto_bands, true);
    cr_assert_eq(sg_plot_write_opts(&res, &rec, &o, SG_PLOT_PNG, a, NULL), SG_OK);
    o.coarse_left = true;
    o.auto_bands = false;
    o.bands = SG_BANDS_USCS;
    cr_assert_eq(sg_plot_write_opts(&res, &rec, &o, SG_PLOT_PNG, b, NULL), SG_OK);
    cr_assert(!same_bytes(a, b));
    cairo_surface_t *s = cairo_image_surface_create_from_png(b);
    cr_assert_eq(cairo_surface_status(s), CAIRO_STATUS_SUCCESS);
    cr_assert_eq(cairo_image_surface_get_width(s), 1440);
    cairo_surface_destroy(s);
}

Test(plot, degenerate_results_still_draw)
{
    /* no record, one point, no curve, a hollow (off-curve) point, odd values */
    struct sg_result r;
    sg_result_init(&r);
    (void)snprintf(r.id, sizeof r.id, "one-point");
    struct sg_point p = sg_point_blank(SG_SOURCE_HYDROMETER, 3);
    p.diameter_mm = 0.0123;
    p.percent_finer = 41.5;
    p.on_curve = false;
    cr_assert_eq(sg_result_add_point(&r, &p), SG_OK);
    p.diameter_mm = -1.0; /* cannot be placed: skipped */
    cr_assert_eq(sg_result_add_point(&r, &p), SG_OK);
    p.diameter_mm = 0.00004; /* widens the axis to 1e-5 mm */
    p.percent_finer = 104.0;
    p.flags = SG_PF_BROWNIAN | SG_PF_OVER_100; /* ringed */
    cr_assert_eq(sg_result_add_point(&r, &p), SG_OK);
    char a[128], b[128];
    path_in(a, sizeof a, "one.png");
    path_in(b, sizeof b, "one.pdf");
    struct sg_error e;
    cr_assert_eq(sg_plot_write(&r, NULL, SG_PLOT_PNG, a, &e), SG_OK, "%s", e.msg);
    cr_assert_eq(sg_plot_write(&r, NULL, SG_PLOT_PDF, b, &e), SG_OK, "%s", e.msg);
    cairo_surface_t *s = cairo_image_surface_create_from_png(a);
    cr_assert_eq(cairo_surface_status(s), CAIRO_STATUS_SUCCESS);
    cairo_surface_destroy(s);
    if (have("pdftotext")) {
        char cmd[256];
        (void)snprintf(cmd, sizeof cmd, "pdftotext '%s' -", b);
        char *text = run(cmd);
        cr_assert(strstr(text, "0.00001") != NULL, "axis widened to 1e-5 mm: %s", text);
        cr_assert(strstr(text, "hollow") != NULL, "legend explains hollow markers");
        cr_assert(strstr(text, "ringed") != NULL, "legend explains ringed markers");
        free(text);
    }
    sg_result_release(&r);
}

Test(plot, bad_arguments)
{
    char p[128];
    path_in(p, sizeof p, "x.png");
    struct sg_error e;
    cr_assert_eq(sg_plot_write(NULL, &rec, SG_PLOT_PNG, p, &e), SG_EINVAL);
    cr_assert_eq(sg_plot_write(&res, &rec, SG_PLOT_PNG, NULL, &e), SG_EINVAL);
    cr_assert_eq(sg_plot_write(&res, &rec, (enum sg_plot_format)7, p, &e), SG_EINVAL);
    cr_assert(strstr(e.msg, "png, svg or pdf") != NULL);
    cr_assert_eq(entries(dir), 0);
}

Test(plot, unwritable_places_leave_nothing)
{
    char p[160];
    struct sg_error e;
    /* a folder that does not exist */
    path_in(p, sizeof p, "no/such/folder/c.png");
    cr_assert_eq(sg_plot_write(&res, &rec, SG_PLOT_PNG, p, &e), SG_EIO);
    cr_assert(strstr(e.msg, "c.png") != NULL, "%s", e.msg);
    /* a folder standing where the file should go: the rename fails after drawing */
    path_in(p, sizeof p, "taken.pdf");
    cr_assert_eq(mkdir(p, 0755), 0);
    char inner[200];
    (void)snprintf(inner, sizeof inner, "%s/keep", p);
    FILE *fp = fopen(inner, "w");
    cr_assert_not_null(fp);
    fclose(fp);
    cr_assert_eq(sg_plot_write(&res, &rec, SG_PLOT_PDF, p, &e), SG_EIO);
    cr_assert_eq(entries(dir), 1, "only the folder; no temporary file left");
}

/* Effective depth against reading of a 152H-type hydrometer: the published
 * one-decimal ASTM D422-63 Table 2 values at R = 0, 10, ..., 50 g/L (METHODS.md
 * 3.3, from memory: 16.3, 14.7, 13.0, 11.4, 9.7, 8.1 cm), in mm. */
static const double depth_r[] = {0.0, 10.0, 20.0, 30.0, 40.0, 50.0};
static const double depth_mm[] = {163.0, 147.0, 130.0, 114.0, 97.0, 81.0};

Test(plot, calibration_fit_chart_in_every_format)
{
    struct sg_plot_fit f = {
        .title = "152H-type hydrometer, effective depth",
        .note = "ASTM D422-63 Table 2 depths; line by least squares",
        .x_label = "reading (g/L)",
        .y_label = "effective depth H (mm)",
        .residual_label = "residual (mm)",
        .xs = depth_r,
        .ys = depth_mm,
        .n = 6,
        .c0 = 163.14285714285714, /* least squares through the six points (derived, python3) */
        .c1 = -1.6457142857142857,
        .residuals = true,
        .create_date = "2026-09-30",
    };
    char p[128];
    struct sg_error e;
    path_in(p, sizeof p, "fit.png");
    cr_assert_eq(sg_plot_fit_write(&f, SG_PLOT_PNG, p, &e), SG_OK, "%s", e.msg);
    cairo_surface_t *s = cairo_image_surface_create_from_png(p);
    cr_assert_eq(cairo_surface_status(s), CAIRO_STATUS_SUCCESS);
    /* plot.h: 600 x 450 pt at 2 px per pt */
    cr_assert_eq(cairo_image_surface_get_width(s), 1200);
    cr_assert_eq(cairo_image_surface_get_height(s), 900);
    cairo_surface_destroy(s);
    path_in(p, sizeof p, "fit.svg");
    cr_assert_eq(sg_plot_fit_write(&f, SG_PLOT_SVG, p, &e), SG_OK, "%s", e.msg);
    path_in(p, sizeof p, "fit.pdf");
    f.residuals = false;
    cr_assert_eq(sg_plot_fit_write(&f, SG_PLOT_PDF, p, &e), SG_OK, "%s", e.msg);
    if (have("pdftotext")) {
        char cmd[256];
        (void)snprintf(cmd, sizeof cmd, "pdftotext '%s' -", p);
        char *text = run(cmd);
        cr_assert(strstr(text, "effective depth") != NULL, "%s", text);
        /* the equation with 5 significant digits */
        cr_assert(strstr(text, "fit: y = 163.14") != NULL, "%s", text);
        cr_assert(strstr(text, "1.6457 x") != NULL, "%s", text);
        free(text);
    }
    cr_assert_eq(entries(dir), 3);
}

Test(plot, calibration_fit_chart_rejects_bad_data)
{
    const double xs[] = {18.0, 22.0, 26.0};
    const double ys[] = {5.5, (double)NAN, 4.5};
    struct sg_plot_fit f = {.title = "blank", .x_label = "T (C)", .y_label = "blank", .xs = xs, .ys = ys, .n = 3};
    char p[128];
    path_in(p, sizeof p, "bad.png");
    struct sg_error e;
    cr_assert_eq(sg_plot_fit_write(&f, SG_PLOT_PNG, p, &e), SG_EINVAL);
    cr_assert(strstr(e.msg, "observation 2") != NULL, "%s", e.msg);
    f.ys = xs;
    f.n = 0;
    cr_assert_eq(sg_plot_fit_write(&f, SG_PLOT_PNG, p, &e), SG_EINVAL);
    f.n = 3;
    f.c1 = (double)INFINITY;
    cr_assert_eq(sg_plot_fit_write(&f, SG_PLOT_PNG, p, &e), SG_EINVAL);
    cr_assert_eq(sg_plot_fit_write(NULL, SG_PLOT_PNG, p, &e), SG_EINVAL);
    f.c1 = 0.0;
    f.n = 1; /* a single observation still draws */
    cr_assert_eq(sg_plot_fit_write(&f, SG_PLOT_PNG, p, &e), SG_OK, "%s", e.msg);
    cr_assert_eq(entries(dir), 1);
}

Test(plot, calibration_chart_line_caption)
{
    if (!have("pdftotext"))
        cr_skip_test("poppler-utils not installed");
    /* meniscus corrections (bottom - top) of three observations, charted against their mean */
    const double top[] = {0.0, -0.5, 0.0};
    const double corr[] = {1.0, 1.5, 1.0};
    struct sg_plot_fit f = {.title = "meniscus", .x_label = "reading at the top", .y_label = "correction",
                            .xs = top, .ys = corr, .n = 3, .c0 = 7.0 / 6.0, .c1 = 0.0, .residuals = true,
                            .line_label = "mean = 1.1667"};
    char p[128], cmd[256];
    path_in(p, sizeof p, "m.pdf");
    cr_assert_eq(sg_plot_fit_write(&f, SG_PLOT_PDF, p, NULL), SG_OK);
    (void)snprintf(cmd, sizeof cmd, "pdftotext '%s' -", p);
    char *text = run(cmd);
    cr_assert(strstr(text, "mean = 1.1667") != NULL, "%s", text);
    cr_assert(strstr(text, "fit: y") == NULL, "%s", text);
    free(text);
}
