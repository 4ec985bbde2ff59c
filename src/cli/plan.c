/* plan.c - `sedgrade plan`: when to sample with the pipette or read the
 * hydrometer at a temperature, particle density and depth, printed as CSV. */
#include <getopt.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli/cli.h"
#include "sedgrade/date.h"
#include "sedgrade/plan.h"
#include "sedgrade/qc.h"
#include "sedgrade/record.h"
#include "sedgrade/reduce.h"
#if defined(__has_include)
#if __has_include("sedgrade/calibio.h")
#include "sedgrade/calibio.h"
#define SG_PLAN_HAVE_CALIBIO 1
#endif
#endif

#define PLAN_MAX_SIZES 64
/* Sizes sampled by default: 20, 6 and 2 um, the medium-silt / fine-silt /
 * clay boundaries of the BS 1377-2 pipette (METHODS.md 4.1, from memory). */
static const double default_sizes_mm[] = {0.02, 0.006, 0.002};
/* BS 1377-2 pipette sampling depth, mm (METHODS.md 4.1, derived from the
 * sheet's 0.05221 constant). */
#define PLAN_DEFAULT_DEPTH_MM 100.0

/* Option ranges: generous physical bounds, the core checks the rest. */
#define PLAN_TEMP_MIN_C 0.0
#define PLAN_TEMP_MAX_C 40.0
#define PLAN_GS_MIN 1.5
#define PLAN_GS_MAX 5.0
#define PLAN_DEPTH_MIN_MM 1.0
#define PLAN_DEPTH_MAX_MM 1000.0
#define PLAN_SIZE_MIN_MM 1e-6
#define PLAN_SIZE_MAX_MM 2.0 /* sedimentation sizes lie well below the 2 mm sand/gravel boundary */
#define PLAN_SLOPE_MAX_MM 100.0
#define PLAN_SCALE_LIMIT 2000.0

static const char plan_help[] =
    "usage: sedgrade plan --method hydrometer|pipette --temp-c T --gs G [OPTIONS]\n"
    "\n"
    "When to sample (pipette) or read (hydrometer) so that target Stokes diameters\n"
    "are caught, at suspension temperature T (C) and particle density G (Mg/m3).\n"
    "Prints CSV to stdout.\n"
    "\n"
    "  --method M               pipette or hydrometer (required)\n"
    "  --temp-c T               suspension temperature, C, 0-40 (required)\n"
    "  --gs G                   particle density, Mg/m3, 1.5-5 (required)\n"
    "  --sizes-mm D1,D2,...     target diameters, mm (default 0.02,0.006,0.002)\n"
    "  --start HH:MM            start of sedimentation: adds clock times (hh:mm:ss,\n"
    "                           '+1d' when the next day)\n"
    "  --standard NAME          astm-d7928, bs1377-2 or iso17892-4: that standard's\n"
    "                           liquid density term (default: exact physics,\n"
    "                           rho_s - rho_w(T)); also picks the reading series\n"
    "pipette:\n"
    "  --depth-mm H             sampling depth, mm (default 100)\n"
    "hydrometer:\n"
    "  --series NAME            reading times: astm-d7928 (default), astm-d422 or\n"
    "                           bs1377-2 (default for --standard bs1377-2)\n"
    "  --list-series            print the built-in reading series and exit\n"
    "  --depth-line A,B         effective depth A mm at reading 0, B mm per reading unit\n"
    "  --meniscus C             meniscus correction, reading units (default 0)\n"
    "  --hydrometer ID --date YYYY-MM-DD [--cylinder ID] [--calibration DIR]\n"
    "                           take the depth line, meniscus correction and scale\n"
    "                           from the register entry in force on that date\n"
    "  --scale-min R --scale-max R   readings at the ends of the stem\n"
    "  -h, --help               this help\n"
    "\n"
    "pipette columns: diameter_mm, elapsed_min, elapsed_hms, [clock,] depth_mm,\n"
    "  reynolds, note.\n"
    "hydrometer columns: row (reading: a time of the series; target: a diameter),\n"
    "  diameter_mm, elapsed_min, elapsed_hms, [clock,] depth_mm (at mid-scale),\n"
    "  diameter_small_mm and diameter_large_mm (what the reading can represent from\n"
    "  the top to the bottom of the scale), elapsed_early_min and elapsed_late_min\n"
    "  (when the target reaches the shallowest and deepest effective depth),\n"
    "  [clock_early, clock_late,] reynolds, note.\n"
    "The reading series are recalled, not copied from the standards: check them\n"
    "against your copy. Stokes' law holds for particle Reynolds numbers below about\n"
    "0.2 and sizes above about 0.2 um; the note column says when a row is outside.\n"
    "\n"
    "exit status: 0 ok; 2 bad input or usage; 3 I/O failure.\n";

struct plan_cfg {
    enum sg_method method;
    bool has_temp, has_gs, has_depth, has_start, has_depth_line, has_meniscus;
    bool has_scale_min, has_scale_max;
    double temp_c, gs, depth_mm;
    double sizes_mm[PLAN_MAX_SIZES];
    size_t n_sizes;
    int start_minute;
    enum sg_standard standard;
    const char *series_name;
    double depth_line[2];
    double meniscus;
    double scale_min, scale_max;
    const char *hydrometer, *cylinder, *date_text, *register_dir;
    bool list_series;
};

static bool parse_list(const char *opt, const char *text, double min, double max, double *out,
                       size_t cap, size_t *n_out)
{
    char buf[1024];
    if (snprintf(buf, sizeof buf, "%s", text) >= (int)sizeof buf) {
        sg_cli_errorf("option %s: list too long", opt);
        return false;
    }
    if (text[0] == '\0' || text[0] == ',' || text[strlen(text) - 1] == ',' || strstr(text, ",,") != NULL) {
        sg_cli_errorf("option %s: '%s' is not a comma-separated list of numbers", opt, text);
        return false;
    }
    size_t n = 0;
    for (char *save = NULL, *tok = strtok_r(buf, ",", &save); tok; tok = strtok_r(NULL, ",", &save)) {
        if (n == cap) {
            sg_cli_errorf("option %s: at most %zu values", opt, cap);
            return false;
        }
        if (!sg_cli_parse_double(opt, tok, min, max, &out[n]))
            return false;
        n++;
    }
    *n_out = n;
    return true;
}

static bool parse_standard(const char *text, enum sg_standard *out)
{
    const enum sg_standard all[] = {SG_STANDARD_ASTM_D7928, SG_STANDARD_BS1377_2, SG_STANDARD_ISO17892_4};
    if (strcmp(text, "none") == 0) {
        *out = SG_STANDARD_NONE;
        return true;
    }
    for (size_t i = 0; i < sizeof all / sizeof all[0]; i++)
        if (strcmp(text, sg_standard_name(all[i])) == 0) {
            *out = all[i];
            return true;
        }
    sg_cli_errorf("option --standard: '%s' is not astm-d7928, bs1377-2, iso17892-4 or none", text);
    return false;
}

enum plan_opt {
    OPT_METHOD = 256, OPT_TEMP, OPT_GS, OPT_DEPTH, OPT_SIZES, OPT_START, OPT_SERIES, OPT_LIST_SERIES,
    OPT_STANDARD, OPT_HYDROMETER, OPT_CYLINDER, OPT_DATE, OPT_CAL, OPT_DEPTH_LINE, OPT_MENISCUS,
    OPT_SCALE_MIN, OPT_SCALE_MAX
};

/* Parses the options; returns -1 to go on, else an exit status. */
static int parse_options(int argc, char **argv, struct plan_cfg *cfg)
{
    static const struct option longopts[] = {
        {"method", required_argument, NULL, OPT_METHOD},
        {"temp-c", required_argument, NULL, OPT_TEMP},
        {"gs", required_argument, NULL, OPT_GS},
        {"depth-mm", required_argument, NULL, OPT_DEPTH},
        {"sizes-mm", required_argument, NULL, OPT_SIZES},
        {"start", required_argument, NULL, OPT_START},
        {"series", required_argument, NULL, OPT_SERIES},
        {"list-series", no_argument, NULL, OPT_LIST_SERIES},
        {"standard", required_argument, NULL, OPT_STANDARD},
        {"hydrometer", required_argument, NULL, OPT_HYDROMETER},
        {"cylinder", required_argument, NULL, OPT_CYLINDER},
        {"date", required_argument, NULL, OPT_DATE},
        {"calibration", required_argument, NULL, OPT_CAL},
        {"depth-line", required_argument, NULL, OPT_DEPTH_LINE},
        {"meniscus", required_argument, NULL, OPT_MENISCUS},
        {"scale-min", required_argument, NULL, OPT_SCALE_MIN},
        {"scale-max", required_argument, NULL, OPT_SCALE_MAX},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0}};
    cfg->register_dir = "calibration";
    optind = 1;
    opterr = 0;
    int c;
    size_t n = 0;
    struct sg_error err;
    while ((c = getopt_long(argc, argv, ":h", longopts, NULL)) != -1) {
        switch (c) {
        case OPT_METHOD:
            if (strcmp(optarg, "pipette") == 0)
                cfg->method = SG_METHOD_PIPETTE;
            else if (strcmp(optarg, "hydrometer") == 0)
                cfg->method = SG_METHOD_HYDROMETER;
            else {
                sg_cli_errorf("option --method: '%s' is not hydrometer or pipette", optarg);
                return SG_EXIT_INPUT;
            }
            break;
        case OPT_TEMP:
            if (!sg_cli_parse_double("--temp-c", optarg, PLAN_TEMP_MIN_C, PLAN_TEMP_MAX_C, &cfg->temp_c))
                return SG_EXIT_INPUT;
            cfg->has_temp = true;
            break;
        case OPT_GS:
            if (!sg_cli_parse_double("--gs", optarg, PLAN_GS_MIN, PLAN_GS_MAX, &cfg->gs))
                return SG_EXIT_INPUT;
            cfg->has_gs = true;
            break;
        case OPT_DEPTH:
            if (!sg_cli_parse_double("--depth-mm", optarg, PLAN_DEPTH_MIN_MM, PLAN_DEPTH_MAX_MM, &cfg->depth_mm))
                return SG_EXIT_INPUT;
            cfg->has_depth = true;
            break;
        case OPT_SIZES:
            if (!parse_list("--sizes-mm", optarg, PLAN_SIZE_MIN_MM, PLAN_SIZE_MAX_MM, cfg->sizes_mm,
                            PLAN_MAX_SIZES, &cfg->n_sizes))
                return SG_EXIT_INPUT;
            break;
        case OPT_START:
            if (sg_plan_clock_parse(optarg, &cfg->start_minute, &err) != SG_OK) {
                sg_cli_errorf("option --start: %s", err.msg);
                return SG_EXIT_INPUT;
            }
            cfg->has_start = true;
            break;
        case OPT_SERIES: cfg->series_name = optarg; break;
        case OPT_LIST_SERIES: cfg->list_series = true; break;
        case OPT_STANDARD:
            if (!parse_standard(optarg, &cfg->standard))
                return SG_EXIT_INPUT;
            break;
        case OPT_HYDROMETER: cfg->hydrometer = optarg; break;
        case OPT_CYLINDER: cfg->cylinder = optarg; break;
        case OPT_DATE: cfg->date_text = optarg; break;
        case OPT_CAL: cfg->register_dir = optarg; break;
        case OPT_DEPTH_LINE:
            if (!parse_list("--depth-line", optarg, -PLAN_DEPTH_MAX_MM, PLAN_DEPTH_MAX_MM, cfg->depth_line, 2, &n))
                return SG_EXIT_INPUT;
            if (n != 2) {
                sg_cli_errorf("option --depth-line: '%s' must be two numbers A,B (depth at reading 0, mm; "
                              "change per reading unit, mm)",
                              optarg);
                return SG_EXIT_INPUT;
            }
            if (!(cfg->depth_line[0] > 0.0) || cfg->depth_line[1] < -PLAN_SLOPE_MAX_MM ||
                !(cfg->depth_line[1] < 0.0)) {
                sg_cli_errorf("option --depth-line: depth %g mm must be positive and the change %g mm per "
                              "unit negative, down to -%g mm (readings rise down the stem, so the effective "
                              "depth falls as the reading rises, e.g. 163,-1.64)",
                              cfg->depth_line[0], cfg->depth_line[1], PLAN_SLOPE_MAX_MM);
                return SG_EXIT_INPUT;
            }
            cfg->has_depth_line = true;
            break;
        case OPT_MENISCUS:
            if (!sg_cli_parse_double("--meniscus", optarg, -PLAN_SCALE_LIMIT, PLAN_SCALE_LIMIT, &cfg->meniscus))
                return SG_EXIT_INPUT;
            cfg->has_meniscus = true;
            break;
        case OPT_SCALE_MIN:
            if (!sg_cli_parse_double("--scale-min", optarg, -PLAN_SCALE_LIMIT, PLAN_SCALE_LIMIT, &cfg->scale_min))
                return SG_EXIT_INPUT;
            cfg->has_scale_min = true;
            break;
        case OPT_SCALE_MAX:
            if (!sg_cli_parse_double("--scale-max", optarg, -PLAN_SCALE_LIMIT, PLAN_SCALE_LIMIT, &cfg->scale_max))
                return SG_EXIT_INPUT;
            cfg->has_scale_max = true;
            break;
        case 'h': fputs(plan_help, stdout); return SG_EXIT_OK;
        case ':':
            sg_cli_errorf("option %s needs a value (see 'sedgrade plan --help')", argv[optind - 1]);
            return SG_EXIT_INPUT;
        default:
            sg_cli_errorf("unknown option '%s' (see 'sedgrade plan --help')", argv[optind - 1]);
            return SG_EXIT_INPUT;
        }
    }
    if (optind < argc) {
        sg_cli_errorf("unexpected argument '%s' (plan takes options only; see 'sedgrade plan --help')",
                      argv[optind]);
        return SG_EXIT_INPUT;
    }
    if (cfg->list_series)
        return -1;
    if (cfg->method == SG_METHOD_NONE || !cfg->has_temp || !cfg->has_gs) {
        sg_cli_errorf("plan needs --method, --temp-c and --gs (e.g. sedgrade plan --method pipette "
                      "--temp-c 25 --gs 2.65)");
        return SG_EXIT_INPUT;
    }
    if (cfg->n_sizes == 0) {
        memcpy(cfg->sizes_mm, default_sizes_mm, sizeof default_sizes_mm);
        cfg->n_sizes = sizeof default_sizes_mm / sizeof default_sizes_mm[0];
    }
    const bool hydrometer_only = cfg->series_name != NULL || cfg->has_depth_line || cfg->has_meniscus ||
                                 cfg->hydrometer != NULL || cfg->has_scale_min || cfg->has_scale_max ||
                                 cfg->cylinder != NULL || cfg->date_text != NULL;
    if (cfg->method == SG_METHOD_PIPETTE && hydrometer_only) {
        sg_cli_errorf("--series, --depth-line, --meniscus, --hydrometer, --cylinder, --date and --scale-min/max "
                      "apply to --method hydrometer (for the pipette give --depth-mm)");
        return SG_EXIT_INPUT;
    }
    if (cfg->method == SG_METHOD_HYDROMETER) {
        if (cfg->has_depth) {
            sg_cli_errorf("--depth-mm applies to the pipette: a hydrometer's effective depth depends on the "
                          "reading (give --depth-line A,B or --hydrometer ID --date D)");
            return SG_EXIT_INPUT;
        }
        if (cfg->has_depth_line == (cfg->hydrometer != NULL)) {
            sg_cli_errorf("the hydrometer needs its depth line: give either --depth-line A,B or "
                          "--hydrometer ID --date YYYY-MM-DD (not both)");
            return SG_EXIT_INPUT;
        }
        if (cfg->hydrometer != NULL && cfg->date_text == NULL) {
            sg_cli_errorf("--hydrometer needs --date YYYY-MM-DD (the register entry in force on that date)");
            return SG_EXIT_INPUT;
        }
        if (cfg->hydrometer == NULL && (cfg->date_text != NULL || cfg->cylinder != NULL)) {
            sg_cli_errorf("--date and --cylinder select a register entry: give them with --hydrometer ID");
            return SG_EXIT_INPUT;
        }
    }
    if (!cfg->has_depth)
        cfg->depth_mm = PLAN_DEFAULT_DEPTH_MM;
    return -1;
}

static void list_series(void)
{
    fputs("series,times_min,description\n", stdout);
    for (size_t i = 0; i < sg_plan_series_count(); i++) {
        const struct sg_plan_series *s = sg_plan_series_at(i);
        printf("%s,", s->name);
        for (size_t k = 0; k < s->n_times; k++)
            printf("%s%g", k ? " " : "", s->times_min[k]);
        printf(",\"%s\"\n", s->description);
    }
}

/* A note on the Stokes range of one row ("" when inside). */
static void range_note(const struct sg_qc_limits *lim, double reynolds, double diameter_mm, char *buf,
                       size_t size)
{
    buf[0] = '\0';
    if (reynolds > lim->reynolds_max)
        snprintf(buf, size, "particle Reynolds number %.2g above %g: outside Stokes' law", reynolds,
                 lim->reynolds_max);
    else if (diameter_mm < lim->diameter_min_mm)
        snprintf(buf, size, "%.2g mm below %g mm: Brownian motion disturbs settling", diameter_mm,
                 lim->diameter_min_mm);
}

/* Writes ",hms[,clock]" for a time. */
static void print_times(const struct plan_cfg *cfg, double elapsed_min)
{
    char hms[32], clock[32];
    (void)sg_plan_duration_format(elapsed_min, hms, sizeof hms, NULL);
    printf(",%s", hms);
    if (cfg->has_start) {
        (void)sg_plan_clock_format(cfg->start_minute, elapsed_min, clock, sizeof clock, NULL);
        printf(",%s", clock);
    }
}

static int plan_pipette(const struct plan_cfg *cfg, const struct sg_plan *p)
{
    const struct sg_qc_limits lim = sg_qc_limits_default();
    struct sg_error err;
    double t[PLAN_MAX_SIZES];
    for (size_t i = 0; i < cfg->n_sizes; i++)
        if (sg_plan_time_min(p, cfg->sizes_mm[i], cfg->depth_mm, &t[i], &err) != SG_OK) {
            sg_cli_report(NULL, &err);
            return SG_EXIT_INPUT;
        }
    printf("diameter_mm,elapsed_min,elapsed_hms%s,depth_mm,reynolds,note\n", cfg->has_start ? ",clock" : "");
    for (size_t i = 0; i < cfg->n_sizes; i++) {
        char note[160];
        const double re = sg_plan_reynolds(p, cfg->sizes_mm[i]);
        range_note(&lim, re, cfg->sizes_mm[i], note, sizeof note);
        printf("%g,%.4f", cfg->sizes_mm[i], t[i]);
        print_times(cfg, t[i]);
        printf(",%g,%.3g,%s\n", cfg->depth_mm, re, note);
    }
    return SG_EXIT_OK;
}

/* The depth line and scale from --depth-line/--meniscus/--scale-* or the register. */
static int resolve_hydrometer(const struct plan_cfg *cfg, struct sg_plan_hydrometer *h)
{
    bool has_scale = false;
    memset(h, 0, sizeof *h);
    if (cfg->has_depth_line) {
        h->depth_at_zero_mm = cfg->depth_line[0];
        h->depth_per_unit_mm = cfg->depth_line[1];
    } else {
#ifdef SG_PLAN_HAVE_CALIBIO
        struct sg_error err;
        struct sg_record rec;
        struct sg_constants k;
        sg_record_init(&rec);
        memset(&k, 0, sizeof k);
        rec.method = SG_METHOD_HYDROMETER;
        rec.standard = cfg->standard;
        snprintf(rec.hydrometer, sizeof rec.hydrometer, "%s", cfg->hydrometer);
        if (cfg->cylinder != NULL)
            snprintf(rec.cylinder, sizeof rec.cylinder, "%s", cfg->cylinder);
        enum sg_status st = sg_date_parse(cfg->date_text, &rec.date, &err);
        if (st == SG_OK)
            st = sg_calibio_resolve(cfg->register_dir, &rec, &k, &err);
        sg_record_release(&rec);
        if (st != SG_OK) {
            sg_cli_report(NULL, &err);
            return sg_cli_exit_for(st);
        }
        if (!k.has_depth_line) {
            sg_cli_errorf("the register entry of hydrometer '%s' on %s has no depth line (calibrate its "
                          "effective depth or give --depth-line A,B)",
                          cfg->hydrometer, cfg->date_text);
            return SG_EXIT_INPUT;
        }
        h->depth_at_zero_mm = k.depth_at_zero_mm;
        h->depth_per_unit_mm = k.depth_per_unit_mm;
        h->meniscus_correction = k.meniscus_correction;
        if (k.has_scale_range) {
            h->scale_min = k.scale_min;
            h->scale_max = k.scale_max;
            has_scale = true;
        }
#else
        sg_cli_errorf("the calibration register is not available in this build (give --depth-line A,B)");
        return SG_EXIT_INPUT;
#endif
    }
    if (cfg->has_meniscus)
        h->meniscus_correction = cfg->meniscus;
    if (cfg->has_scale_min)
        h->scale_min = cfg->scale_min;
    if (cfg->has_scale_max)
        h->scale_max = cfg->scale_max;
    if (!has_scale && !(cfg->has_scale_min && cfg->has_scale_max)) {
        sg_cli_errorf("the hydrometer's scale is not known: give --scale-min R --scale-max R (the readings "
                      "at the ends of the stem, e.g. -5 and 60 on a g/L scale)");
        return SG_EXIT_INPUT;
    }
    return -1;
}

static int plan_hydrometer(const struct plan_cfg *cfg, const struct sg_plan *p)
{
    const struct sg_qc_limits lim = sg_qc_limits_default();
    struct sg_error err;
    struct sg_plan_hydrometer h;
    const int early = resolve_hydrometer(cfg, &h);
    if (early >= 0)
        return early;

    const struct sg_plan_series *series = sg_plan_series_for_standard(cfg->standard);
    if (cfg->series_name != NULL && sg_plan_series_find(cfg->series_name, &series, &err) != SG_OK) {
        sg_cli_errorf("option --series: %s", err.msg);
        return SG_EXIT_INPUT;
    }
    struct sg_plan_reading rd[PLAN_MAX_SIZES];
    struct sg_plan_window win[PLAN_MAX_SIZES];
    if (series->n_times > PLAN_MAX_SIZES) {
        sg_cli_errorf("reading series '%s' has more than %d times", series->name, PLAN_MAX_SIZES);
        return SG_EXIT_INPUT;
    }
    for (size_t i = 0; i < series->n_times; i++)
        if (sg_plan_reading_range(p, &h, series->times_min[i], &rd[i], &err) != SG_OK) {
            sg_cli_report(NULL, &err);
            return SG_EXIT_INPUT;
        }
    for (size_t i = 0; i < cfg->n_sizes; i++)
        if (sg_plan_target_window(p, &h, cfg->sizes_mm[i], &win[i], &err) != SG_OK) {
            sg_cli_report(NULL, &err);
            return SG_EXIT_INPUT;
        }

    const char *clk = cfg->has_start ? ",clock" : "";
    const char *clk2 = cfg->has_start ? ",clock_early,clock_late" : "";
    printf("row,diameter_mm,elapsed_min,elapsed_hms%s,depth_mm,diameter_small_mm,diameter_large_mm,"
           "elapsed_early_min,elapsed_late_min%s,reynolds,note\n",
           clk, clk2);
    char note[160];
    for (size_t i = 0; i < series->n_times; i++) {
        const struct sg_plan_reading *r = &rd[i];
        range_note(&lim, r->reynolds_max, r->diameter_small_mm, note, sizeof note);
        printf("reading,%.5g,%.4f", r->diameter_mid_mm, r->elapsed_min);
        print_times(cfg, r->elapsed_min);
        printf(",%.2f,%.5g,%.5g,,%s,%.3g,%s\n", r->depth_mid_mm, r->diameter_small_mm, r->diameter_large_mm,
               cfg->has_start ? ",," : "", r->reynolds_max, note);
    }
    for (size_t i = 0; i < cfg->n_sizes; i++) {
        const struct sg_plan_window *w = &win[i];
        range_note(&lim, w->reynolds, w->diameter_mm, note, sizeof note);
        printf("target,%g,%.4f", w->diameter_mm, w->mid_min);
        print_times(cfg, w->mid_min);
        printf(",%.2f,,,%.4f,%.4f", w->depth_mid_mm, w->early_min, w->late_min);
        if (cfg->has_start) {
            char a[32], b[32];
            (void)sg_plan_clock_format(cfg->start_minute, w->early_min, a, sizeof a, NULL);
            (void)sg_plan_clock_format(cfg->start_minute, w->late_min, b, sizeof b, NULL);
            printf(",%s,%s", a, b);
        }
        printf(",%.3g,%s\n", w->reynolds, note);
    }
    return SG_EXIT_OK;
}

int sg_cli_plan(int argc, char **argv)
{
    struct plan_cfg cfg;
    memset(&cfg, 0, sizeof cfg);
    int rc = parse_options(argc, argv, &cfg);
    if (rc >= 0)
        return rc;
    if (cfg.list_series) {
        list_series();
    } else {
        struct sg_plan p;
        struct sg_error err;
        const enum sg_status st = sg_plan_init(&p, cfg.standard, cfg.temp_c, cfg.gs, &err);
        if (st != SG_OK) {
            sg_cli_report(NULL, &err);
            return sg_cli_exit_for(st);
        }
        rc = cfg.method == SG_METHOD_PIPETTE ? plan_pipette(&cfg, &p) : plan_hydrometer(&cfg, &p);
        if (rc != SG_EXIT_OK)
            return rc;
    }
    if (fflush(stdout) != 0 || ferror(stdout)) {
        sg_cli_errorf("cannot write the schedule to standard output");
        return SG_EXIT_IO;
    }
    return SG_EXIT_OK;
}
