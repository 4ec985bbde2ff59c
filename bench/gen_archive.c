/* gen_archive.c - writes a laboratory archive of N invented test records for
 * `make bench`: 12 sedimentation readings and 8 sieves each, physically
 * consistent (readings computed from a grading curve through Stokes' law
 * and the effective-depth line), varied parameters, deterministic from a seed.
 * Usage: gen_archive DIR N [SEED [REGISTER_DIR]]. Records go to
 * DIR/<year>/<id>.csv. With REGISTER_DIR (the demo lab's calibration/), half
 * of the hydrometer records name its instruments instead of carrying inline
 * constants, and their readings follow that register's depth line, meniscus,
 * blank line and thermometer correction on the record's date.
 * About 1 in 200 records carries a deliberate fault (a refused test), as a
 * real archive does. Invented data: no real site, laboratory or test. */
#include <errno.h>
#include <gsl/gsl_cdf.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "sedgrade/calibio.h"
#include "sedgrade/date.h"
#include "sedgrade/hydrometer.h"
#include "sedgrade/stokes.h"
#include "sedgrade/water.h"

#define N_SIEVES 8
#define N_READINGS 12
#define YEAR_FIRST 2018
#define N_YEARS 9 /* 2018-2026 */
#define FAULT_EVERY 200           /* one record in 200 is refused */
#define PIPETTE_EVERY 10          /* one record in 10 is a pipette test */
#define FIXED_POINT_ITERATIONS 30 /* reading <-> depth converge to < 1e-9 g/L well before this */
#define HYDROMETER_READ_STEP 0.5  /* a 152H-type stem is read to 0.5 g/L */

/* Sieve set of the invented laboratory (ISO 3310 / BS 410 apertures), mm. */
static const double sieves_mm[N_SIEVES] = {37.5, 20.0, 10.0, 6.3, 2.0, 0.6, 0.212, 0.063};
/* Hydrometer reading times, min: the BS 1377-2 series (METHODS.md 3.5, from
 * memory) with 15, 60 and 240 min added to make 12. */
static const double hyd_times_min[N_READINGS] = {0.5, 1, 2, 4, 8, 15, 30, 60, 120, 240, 480, 1440};
/* Pipette target sizes, mm: twelve samples from coarse silt to clay. */
static const double pip_sizes_mm[N_READINGS] = {0.05, 0.04,  0.03,  0.02,   0.015, 0.01,
                                                0.006, 0.004, 0.003, 0.002, 0.0015, 0.001};
#define PIPETTE_DEPTH_MM 100.0   /* BS 1377-2 sampling depth (METHODS.md 4.1) */
#define PIPETTE_VOLUME_ML 10.0   /* METHODS.md 4.1, from memory */
#define PIPETTE_SUSPENSION_ML 500.0

/* The sample's grading: percent finer than d_mm by a log-normal curve
 * truncated at the 37.5 mm sieve (nothing retained on it). */
struct grading {
    double log_d50, spread;
};

static double grading_pct(const struct grading *g, double d_mm)
{
    const double top = gsl_cdf_ugaussian_P((log10(sieves_mm[0]) - g->log_d50) / g->spread);
    const double p = gsl_cdf_ugaussian_P((log10(d_mm) - g->log_d50) / g->spread);
    return fmin(100.0, 100.0 * p / top);
}

static double uniform(gsl_rng *r, double lo, double hi)
{
    return lo + (hi - lo) * gsl_rng_uniform(r);
}

/* Sieve rows: retained = mass between neighbouring apertures. */
static void write_sieves(FILE *f, const struct grading *g, double sample_g)
{
    double above = 100.0;
    for (size_t i = 0; i < N_SIEVES; i++) {
        const double p = grading_pct(g, sieves_mm[i]);
        fprintf(f, "sieve,%g,%.1f\n", sieves_mm[i], sample_g * (above - p) / 100.0);
        above = p;
    }
}

static int make_dir(const char *path)
{
    if (mkdir(path, 0777) != 0 && errno != EEXIST) {
        fprintf(stderr, "gen_archive: cannot create '%s': %s\n", path, strerror(errno));
        return -1;
    }
    return 0;
}

/* The demo register's instruments named by register-backed records, and the
 * span of dates on which all three have a calibration in force
 * (calibration/RML-*.csv). */
#define REG_HYDROMETER "RML-H152-01"
#define REG_CYLINDER "RML-CY-11"
#define REG_THERMOMETER "RML-TH-05"
#define REG_FIRST_DATE "2025-06-10"
#define REG_LAST_DATE "2026-11-30"

/* Instrument constants used to synthesise the readings of one record. */
struct instruments {
    bool from_register;
    double depth0_mm, depth_per_unit_mm, meniscus;
    double blank_c0, blank_c1; /* blank reading = c0 + c1 T (true temperature) */
    double thermometer_offset_c; /* added to a temperature as read */
};

static enum sg_standard standard_of(const char *name)
{
    if (strcmp(name, "astm-d7928") == 0)
        return SG_STANDARD_ASTM_D7928;
    if (strcmp(name, "bs1377-2") == 0)
        return SG_STANDARD_BS1377_2;
    return SG_STANDARD_NONE;
}

/* Resolves the register's constants for a record dated d; false if the
 * register cannot give a depth line and a blank line. */
static bool register_constants(const char *register_dir, struct sg_date d, struct instruments *ins)
{
    struct sg_record rec;
    struct sg_constants k;
    sg_record_init(&rec);
    rec.method = SG_METHOD_HYDROMETER;
    rec.scale = SG_SCALE_G_PER_L;
    rec.date = d;
    snprintf(rec.hydrometer, sizeof rec.hydrometer, "%s", REG_HYDROMETER);
    snprintf(rec.cylinder, sizeof rec.cylinder, "%s", REG_CYLINDER);
    snprintf(rec.thermometer, sizeof rec.thermometer, "%s", REG_THERMOMETER);
    struct sg_error err;
    const enum sg_status st = sg_calibio_resolve(register_dir, &rec, &k, &err);
    sg_record_release(&rec);
    if (st != SG_OK) {
        fprintf(stderr, "gen_archive: register: %s\n", err.msg);
        return false;
    }
    if (!k.has_depth_line || !(k.has_blank_line || k.has_blank_const))
        return false;
    ins->from_register = true;
    ins->depth0_mm = k.depth_at_zero_mm;
    ins->depth_per_unit_mm = k.depth_per_unit_mm;
    ins->meniscus = k.meniscus_correction;
    ins->blank_c0 = k.has_blank_line ? k.blank_c0 : k.blank_const;
    ins->blank_c1 = k.has_blank_line ? k.blank_c1 : 0.0;
    ins->thermometer_offset_c = k.thermometer_offset_c;
    return true;
}

/* Writes one record; returns 0 or -1 on an I/O error. register_dir may be
 * NULL (every record then carries its own constants). */
static int write_record(const char *dir, size_t index, gsl_rng *r, const char *register_dir)
{
    const bool pipette = gsl_rng_uniform_int(r, PIPETTE_EVERY) == 0;
    const bool use_register = register_dir != NULL && !pipette && index % 2 == 0;
    struct sg_date date;
    if (use_register) {
        struct sg_date first, last;
        (void)sg_date_parse(REG_FIRST_DATE, &first, NULL);
        (void)sg_date_parse(REG_LAST_DATE, &last, NULL);
        const long span = sg_date_days(last) - sg_date_days(first) + 1;
        date = sg_date_from_days(sg_date_days(first) + (long)gsl_rng_uniform_int(r, (unsigned long)span));
    } else {
        date = (struct sg_date){YEAR_FIRST + (int)gsl_rng_uniform_int(r, N_YEARS),
                                1 + (int)gsl_rng_uniform_int(r, 12), 1 + (int)gsl_rng_uniform_int(r, 28)};
    }
    const int borehole = 1 + (int)gsl_rng_uniform_int(r, 40);
    const bool fault = index % FAULT_EVERY == FAULT_EVERY - 1;
    const double gs = uniform(r, 2.60, 2.75);
    struct grading g = {log10(uniform(r, 0.004, 0.25)), uniform(r, 0.6, 1.3)};
    const double sample_g = uniform(r, 500.0, 3000.0);
    const char *standard = pipette ? "bs1377-2" : (index % 3 == 0 ? "astm-d7928" : index % 3 == 1 ? "" : "bs1377-2");
    const enum sg_standard std = standard_of(standard);

    struct instruments ins = {false,
                              uniform(r, 158.0, 168.0),
                              -uniform(r, 1.60, 1.68),
                              uniform(r, 0.5, 1.0),
                              uniform(r, 3.0, 7.0),
                              0.0,
                              0.0};
    if (use_register && !register_constants(register_dir, date, &ins))
        return -1;

    char id[64], path[4096], date_text[11];
    sg_date_format(date, date_text);
    snprintf(id, sizeof id, "HW%d-BH%02d-%s%06zu", date.year, borehole, pipette ? "P" : "H", index);
    snprintf(path, sizeof path, "%s/%d/%s.csv", dir, date.year, id);
    FILE *f = fopen(path, "w");
    if (f == NULL) {
        fprintf(stderr, "gen_archive: cannot write '%s': %s\n", path, strerror(errno));
        return -1;
    }
    fprintf(f, "# Hollin Wold archive (invented benchmark data), borehole BH%02d\n", borehole);
    fprintf(f, "test,id,%s\ntest,method,%s\ntest,date,%s\n", id, pipette ? "pipette" : "hydrometer", date_text);
    if (standard[0] != '\0')
        fprintf(f, "test,standard,%s\n", standard);
    fprintf(f, "test,particle_density_mg_m3,%.2f\ntest,sample_dry_mass_g,%.1f\ntest,split_aperture_mm,2\n", gs,
            sample_g);
    /* Atterberg limits for most fine-grained soils, some others: PI from a
     * Skempton activity of 0.4-1.4 times the clay fraction (METHODS.md 9.2). */
    const double fines_pct = grading_pct(&g, 0.075), clay_pct = grading_pct(&g, 0.002);
    const double p_limits = fines_pct >= 50.0 ? 0.9 : 0.25;
    if (gsl_rng_uniform(r) < p_limits) {
        const double pl = uniform(r, 14.0, 28.0), pi = uniform(r, 0.4, 1.4) * clay_pct;
        fprintf(f, "test,liquid_limit_pct,%.0f\ntest,plastic_limit_pct,%.0f\n", pl + pi, pl);
    }

    const double p_split = grading_pct(&g, 2.0);
    const double temp0_c = uniform(r, 18.5, 24.0);

    if (!pipette) {
        const double spec_g = uniform(r, 40.0, 52.0);
        fprintf(f, "test,specimen_dry_mass_g,%s%.2f\ntest,reading_scale,g_per_l\n", fault ? "-" : "", spec_g);
        if (ins.from_register)
            fprintf(f, "test,hydrometer,%s\ntest,cylinder,%s\ntest,thermometer,%s\n", REG_HYDROMETER, REG_CYLINDER,
                    REG_THERMOMETER);
        else
            fprintf(f, "test,depth_line_mm,%.2f,%.4f\ntest,meniscus_correction,%.1f\n"
                       "test,composite_correction,%.1f\n",
                    ins.depth0_mm, ins.depth_per_unit_mm, ins.meniscus, ins.blank_c0);
        write_sieves(f, &g, sample_g);
        const double a_gs = sg_hydrometer_concentration_factor(SG_SCALE_G_PER_L, gs);
        double temp_c = temp0_c;
        for (size_t k = 0; k < N_READINGS; k++) {
            temp_c += uniform(r, -0.3, 0.3);
            const double eta = sg_water_viscosity_pa_s(temp_c);
            const double drho = sg_stokes_density_diff_kg_m3(std, gs, temp_c);
            const double blank = ins.blank_c0 + ins.blank_c1 * temp_c;
            double reading = blank + 0.5 * spec_g / a_gs;
            for (int it = 0; it < FIXED_POINT_ITERATIONS; it++) {
                const double h_mm = ins.depth0_mm + ins.depth_per_unit_mm * (reading + ins.meniscus);
                double d_m = 0.0;
                if (sg_stokes_diameter_m(eta, h_mm / 1000.0, drho, hyd_times_min[k] * 60.0, &d_m, NULL) != SG_OK)
                    break;
                const double p_spec = fmin(100.0, 100.0 * grading_pct(&g, d_m * 1000.0) / p_split);
                reading = blank + p_spec / 100.0 * spec_g / a_gs;
            }
            reading = HYDROMETER_READ_STEP * round(reading / HYDROMETER_READ_STEP);
            fprintf(f, "reading,%g,%.1f,%.1f\n", hyd_times_min[k], reading, temp_c - ins.thermometer_offset_c);
        }
    } else {
        const double spec_g = uniform(r, 12.0, 30.0);
        const double disp_g = uniform(r, 0.8, 1.2);
        fprintf(f, "test,specimen_dry_mass_g,%.2f\ntest,suspension_volume_ml,%g\ntest,pipette_volume_ml,%g\n"
                   "test,dispersant_mass_g,%.2f\n",
                spec_g, PIPETTE_SUSPENSION_ML, PIPETTE_VOLUME_ML, disp_g);
        write_sieves(f, &g, sample_g);
        double temp_c = temp0_c;
        for (size_t k = 0; k < N_READINGS; k++) {
            temp_c += uniform(r, -0.2, 0.2);
            const double eta = sg_water_viscosity_pa_s(temp_c);
            const double drho = sg_stokes_density_diff_kg_m3(std, gs, temp_c);
            double t_s = 0.0, d_m = 0.0;
            (void)sg_stokes_time_s(eta, PIPETTE_DEPTH_MM / 1000.0, drho, pip_sizes_mm[k] / 1000.0, &t_s, NULL);
            double t_min = round(t_s / 6.0) / 10.0; /* the sampling clock is read to 0.1 min */
            if (fault && k == 6)
                t_min = 1.0; /* a typing slip: times no longer increase */
            (void)sg_stokes_diameter_m(eta, PIPETTE_DEPTH_MM / 1000.0, drho, fmax(t_min, 0.1) * 60.0, &d_m, NULL);
            const double p_spec = fmin(100.0, 100.0 * grading_pct(&g, d_m * 1000.0) / p_split);
            const double solids = (p_spec / 100.0 * spec_g + disp_g) * PIPETTE_VOLUME_ML / PIPETTE_SUSPENSION_ML;
            fprintf(f, "pipette,%.1f,%.1f,%g,%.4f\n", t_min, temp_c, PIPETTE_DEPTH_MM, solids);
        }
    }
    if (ferror(f) || fclose(f) != 0) {
        fprintf(stderr, "gen_archive: cannot write '%s'\n", path);
        return -1;
    }
    return 0;
}

int main(int argc, char **argv)
{
    gsl_set_error_handler_off();
    if (argc < 3 || argc > 5) {
        fprintf(stderr, "usage: gen_archive DIR N [SEED [REGISTER_DIR]]\n");
        return 2;
    }
    char *end = NULL;
    const unsigned long n = strtoul(argv[2], &end, 10);
    if (end == argv[2] || *end != '\0' || n < 1 || n > 10000000) {
        fprintf(stderr, "gen_archive: N must be 1-10000000, got '%s'\n", argv[2]);
        return 2;
    }
    unsigned long seed = 20260101;
    const char *register_dir = argc == 5 ? argv[4] : NULL;
    if (argc >= 4) {
        seed = strtoul(argv[3], &end, 10);
        if (end == argv[3] || *end != '\0') {
            fprintf(stderr, "gen_archive: SEED must be a whole number, got '%s'\n", argv[3]);
            return 2;
        }
    }
    if (make_dir(argv[1]) != 0)
        return 3;
    char sub[4096];
    for (int y = 0; y < N_YEARS; y++) {
        snprintf(sub, sizeof sub, "%s/%d", argv[1], YEAR_FIRST + y);
        if (make_dir(sub) != 0)
            return 3;
    }
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    if (r == NULL) {
        fprintf(stderr, "gen_archive: out of memory\n");
        return 3;
    }
    gsl_rng_set(r, seed);
    int rc = 0;
    for (size_t i = 0; i < n && rc == 0; i++)
        if (write_record(argv[1], i, r, register_dir) != 0)
            rc = 3;
    gsl_rng_free(r);
    return rc;
}
