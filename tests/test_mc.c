/* test_mc.c - Monte Carlo uncertainty (JCGM 101:2008): coverage-interval
 * indices, the input budget, agreement with the GUM law of propagation for a
 * single point, reproducibility (seed, thread count), zero input
 * uncertainty, class probabilities and every error status. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "sedgrade/constants.h"
#include "sedgrade/hydrometer.h"
#include "sedgrade/mc.h"
#include "sedgrade/record.h"
#include "sedgrade/reduce.h"
#include "sedgrade/result.h"
#include "sedgrade/water.h"

static void setup(void) { gsl_set_error_handler_off(); }

TestSuite(coverage, .init = setup);
TestSuite(budget, .init = setup);
TestSuite(gum, .init = setup, .timeout = 300);
TestSuite(run, .init = setup, .timeout = 300);

/* ---- records (test inputs built in code) --------------------------------- */

/* Constants of the single-point check: a 152H-type g/L reading. */
#define GS 2.70          /* particle density, Mg/m3 */
#define MASS_G 50.0      /* specimen dry mass */
#define VOLUME_ML 1000.0 /* suspension volume */
#define BLANK 5.0        /* composite correction, g/L */
#define MENISCUS 1.0     /* meniscus correction, g/L */
#define C0_MM 162.95     /* 152H-type depth line, METHODS.md 13.10 V2-A */
#define C1_MM (-1.64)
#define READING 40.0
#define ELAPSED_MIN 30.0
#define TEMP_C 20.0

static void base_record(struct sg_record *rec)
{
    sg_record_init(rec);
    (void)snprintf(rec->id, sizeof rec->id, "mc-check");
    rec->pos_id = (struct sg_srcpos){1, 1};
    rec->method = SG_METHOD_HYDROMETER;
    rec->scale = SG_SCALE_G_PER_L;
    rec->particle_density_mg_m3 = GS;
    rec->pos_particle_density = (struct sg_srcpos){2, 1};
    rec->specimen_dry_mass_g = MASS_G;
    rec->pos_specimen_mass = (struct sg_srcpos){3, 1};
    rec->suspension_volume_ml = VOLUME_ML;
    rec->has_depth_line = true;
    rec->depth_line_mm[0] = C0_MM;
    rec->depth_line_mm[1] = C1_MM;
    rec->pos_depth_line = (struct sg_srcpos){4, 1};
    rec->has_meniscus = true;
    rec->meniscus_correction = MENISCUS;
    rec->has_composite = true;
    rec->composite_correction = BLANK;
}

static void add_reading(struct sg_record *rec, double t_min, double r, double temp_c, unsigned line)
{
    const struct sg_reading_row row = {t_min, r, temp_c, false, 0.0, {line, 1}, 0};
    cr_assert_eq(sg_record_add_reading(rec, row), SG_OK);
}

static void single_point(struct sg_record *rec)
{
    base_record(rec);
    add_reading(rec, ELAPSED_MIN, READING, TEMP_C, 10);
}

/* Twelve readings and a 2 mm splice: a full curve (shape of a silty clay). */
static void full_record(struct sg_record *rec)
{
    base_record(rec);
    static const double sieve[][2] = {{37.5, 0.0},  {20.0, 41.3}, {10.0, 77.9}, {6.3, 58.2},
                                      {2.0, 104.6}, {1.18, 55.0}, {0.6, 66.8},  {0.425, 35.1},
                                      {0.212, 90.2}, {0.063, 118.7}};
    static const double rows[][3] = {{0.5, 44.0, 20.8}, {1, 41.5, 20.8},   {2, 38.5, 20.9},
                                     {4, 35.5, 20.9},   {8, 33.0, 21.0},   {15, 30.5, 21.1},
                                     {30, 28.0, 21.2},  {60, 25.5, 21.4},  {120, 23.0, 21.6},
                                     {250, 20.5, 21.8}, {480, 18.5, 21.9}, {1440, 15.5, 21.5}};
    rec->sample_dry_mass_g = 1712.5;
    rec->pos_sample_mass = (struct sg_srcpos){5, 1};
    rec->split_aperture_mm = 2.0;
    rec->pos_split_aperture = (struct sg_srcpos){6, 1};
    rec->has_liquid_limit = rec->has_plastic_limit = true;
    rec->liquid_limit_pct = 41.0;
    rec->plastic_limit_pct = 21.0;
    unsigned line = 10;
    for (size_t i = 0; i < sizeof sieve / sizeof sieve[0]; i++) {
        const struct sg_sieve_row s = {sieve[i][0], sieve[i][1], {line++, 1}};
        cr_assert_eq(sg_record_add_sieve(rec, s), SG_OK);
    }
    for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++)
        add_reading(rec, rows[i][0], rows[i][1], rows[i][2], line++);
}

static void zero_u(struct sg_record *rec)
{
    rec->u = (struct sg_record_u){0, 0, 0, 0, 0, 0, 0, 0, 0, 0};
}

static void reduce(const struct sg_record *rec, struct sg_result *res)
{
    struct sg_error e;
    sg_result_init(res);
    cr_assert_eq(sg_reduce(rec, NULL, NULL, res, &e), SG_OK, "%s", e.msg);
}

static void mc(const struct sg_record *rec, struct sg_result *res, struct sg_mc_detail *d, size_t draws,
               unsigned long seed, unsigned threads)
{
    struct sg_error e;
    const struct sg_mc_options o = {.draws = draws, .seed = seed, .threads = threads};
    cr_assert_eq(sg_mc_run_ex(rec, NULL, NULL, &o, res, d, &e), SG_OK, "%s", e.msg);
}

static const struct sg_quantity *qty(const struct sg_result *res, const char *name)
{
    const struct sg_quantity *q = sg_result_quantity(res, name);
    cr_assert_not_null(q, "%s missing", name);
    return q;
}

/* ---- coverage indices ---------------------------------------------------- */

Test(coverage, jcgm101_order_statistics)
{
    size_t r = 0, q = 0;
    /* METHODS.md 13.9 #81 (JCGM 101 7.7, derived): M = 10^6, p = 0.95 ->
     * q = 950 000, r = 25 000: interval [y_(25 000), y_(975 000)]. */
    cr_assert(sg_mc_coverage_indices(1000000, 0.95, &r, &q));
    cr_assert_eq(q, 950000);
    cr_assert_eq(r, 25000);
    /* M = 10^4: q = 9500, r = 250 (derived by the same rule). */
    cr_assert(sg_mc_coverage_indices(10000, 0.95, &r, &q));
    cr_assert_eq(q, 9500);
    cr_assert_eq(r, 250);
    /* M = 1001: pM = 950.95 -> q = 951; M - q = 50 even -> r = 25 (derived). */
    cr_assert(sg_mc_coverage_indices(1001, 0.95, &r, &q));
    cr_assert_eq(q, 951);
    cr_assert_eq(r, 25);
    /* M = 1002: pM = 951.9 -> q = 952; M - q = 50 -> r = 25; M = 1003: q = 953
     * (952.85), M - q = 50; M = 1004: q = 954 (953.8), r = 25 (derived). */
    cr_assert(sg_mc_coverage_indices(1020, 0.95, &r, &q)); /* q = 969, M - q = 51 odd -> r = 26 */
    cr_assert_eq(q, 969);
    cr_assert_eq(r, 26);
    /* tiny M: indices stay inside 1..M */
    cr_assert(sg_mc_coverage_indices(2, 0.95, &r, &q));
    cr_assert(r >= 1 && r + q <= 2);
    cr_assert(!sg_mc_coverage_indices(1, 0.95, &r, &q));
    cr_assert(!sg_mc_coverage_indices(100, 1.0, &r, &q));
    cr_assert(!sg_mc_coverage_indices(100, 0.0, &r, &q));
}

/* ---- budget --------------------------------------------------------------- */

Test(budget, defaults_record_and_register)
{
    struct sg_record rec;
    single_point(&rec);
    struct sg_mc_budget b;
    sg_mc_budget_resolve(&rec, NULL, &b);
    /* documented defaults (mc.h): GUM Type B half-width 0.5 division
     * (METHODS.md 11.1), the rest common practice or as cited there */
    cr_assert_float_eq(b.reading_half_width, 0.5, 1e-15);
    cr_assert_float_eq(b.reading.u, 0.25, 1e-15);
    cr_assert_float_eq(b.temp_c.u, 0.2, 1e-15);
    cr_assert_float_eq(b.elapsed_min.u, 0.05, 1e-15);
    cr_assert_float_eq(b.mass_g.u, 0.01, 1e-15);
    cr_assert_float_eq(b.particle_density_mg_m3.u, 0.02, 1e-15);
    cr_assert_float_eq(b.blank_test.u, 0.5, 1e-15);
    cr_assert_float_eq(b.meniscus.u, 0.25, 1e-15);
    cr_assert_float_eq(b.depth_c0_mm.u, 1.0, 1e-15);
    cr_assert_float_eq(b.pipette_volume_ml.u, 0.02, 1e-15);
    cr_assert_float_eq(b.solids_g.u, 0.0005, 1e-15);
    cr_assert_eq(b.temp_c.origin, SG_MC_FROM_DEFAULT);
    cr_assert_str_eq(sg_mc_origin_name(b.temp_c.origin), "default");

    /* the record's u_* win over the register, the register over defaults */
    struct sg_constants k;
    sg_constants_from_record(&rec, &k);
    k.meniscus_u = 0.1;
    k.blank_u = 0.3;
    k.depth_cov[0] = 4.0;   /* mm^2 */
    k.depth_cov[1] = -0.05; /* mm^2 per unit */
    k.depth_cov[2] = 0.001;
    rec.u.reading = 0.4;
    rec.u.meniscus_correction = 0.2;
    sg_mc_budget_resolve(&rec, &k, &b);
    cr_assert_float_eq(b.reading_half_width, 0.0, 1e-15);
    cr_assert_float_eq(b.reading.u, 0.4, 1e-15);
    cr_assert_eq(b.reading.origin, SG_MC_FROM_RECORD);
    cr_assert_float_eq(b.meniscus.u, 0.2, 1e-15);
    cr_assert_eq(b.meniscus.origin, SG_MC_FROM_RECORD);
    cr_assert_float_eq(b.blank_test.u, 0.3, 1e-15);
    cr_assert_eq(b.blank_test.origin, SG_MC_FROM_REGISTER);
    cr_assert_eq(b.depth_c0_mm.origin, SG_MC_FROM_REGISTER);
    cr_assert_float_eq(b.depth_c0_mm.u, 2.0, 1e-15);
    cr_assert_float_eq(b.depth_cov[1], -0.05, 1e-15);
    rec.u.depth_mm = 0.5;
    sg_mc_budget_resolve(&rec, &k, &b);
    cr_assert_eq(b.depth_c0_mm.origin, SG_MC_FROM_RECORD);
    cr_assert_float_eq(b.depth_c0_mm.u, 0.5, 1e-15);
    sg_record_release(&rec);
}

/* The defaults in divisions follow the hydrometer's division from the
 * register (the demo lab's density hydrometer is read to 0.5 unit): the
 * resolution half-width is half a division (GUM 4.3.7), the repeatability,
 * blank and meniscus defaults the documented fractions of it (mc.h). */
Test(budget, defaults_scale_with_the_division)
{
    struct sg_record rec;
    single_point(&rec);
    struct sg_constants k;
    sg_constants_from_record(&rec, &k);
    k.scale_division = 0.5;
    struct sg_mc_budget b;
    sg_mc_budget_resolve(&rec, &k, &b);
    cr_assert_float_eq(b.reading_half_width, 0.25, 1e-15);
    cr_assert_float_eq(b.reading.u, 0.125, 1e-15);
    cr_assert_float_eq(b.blank_row.u, 0.25, 1e-15);
    cr_assert_float_eq(b.blank_test.u, 0.25, 1e-15);
    cr_assert_float_eq(b.meniscus.u, 0.125, 1e-15);
    cr_assert_float_eq(b.temp_c.u, 0.2, 1e-15); /* not a reading-scale input */
    k.scale_division = 0.0; /* unknown: one reading unit */
    sg_mc_budget_resolve(&rec, &k, &b);
    cr_assert_float_eq(b.reading_half_width, 0.5, 1e-15);
    cr_assert_float_eq(b.meniscus.u, 0.25, 1e-15);
    sg_record_release(&rec);
}

/* ---- GUM cross-check -------------------------------------------------------
 * JCGM 100 5.1.2: u_c^2(y) = sum (df/dx_i)^2 u^2(x_i) for independent
 * inputs; JCGM 101 7.6: u(y) is the standard deviation of the M draws. For a
 * model this close to linear the two agree to the Monte Carlo sampling
 * error, about 1/sqrt(2M) = 0.16 % at M = 200 000 (derived); tolerance 2 %. */

#define GUM_TOL 0.02
/* Under valgrind (about 50 times slower) M = 20 000: sampling error about
 * 0.5 %, still a quarter of the tolerance. */
#if defined(__has_include)
#if __has_include(<valgrind/valgrind.h>)
#include <valgrind/valgrind.h>
#endif
#endif
#ifdef RUNNING_ON_VALGRIND
#define GUM_DRAWS (RUNNING_ON_VALGRIND ? 20000 : 200000)
#else
#define GUM_DRAWS 200000
#endif

Test(gum, percent_finer_single_point)
{
    struct sg_record rec;
    single_point(&rec);
    struct sg_result res;
    reduce(&rec, &res);
    struct sg_mc_detail d;
    sg_mc_detail_init(&d);
    mc(&rec, &res, &d, GUM_DRAWS, 7, 2);

    /* P = 100 a (R - B) (V/1000) / m, a = 1.65 Gs / (2.65 (Gs - 1))
     * (SPEC; ASTM D422 Table 1 formula), no splice (percent of specimen) */
    const double a = 1.65 * GS / (2.65 * (GS - 1.0));
    const double p = 100.0 * a * (READING - BLANK) * (VOLUME_ML / 1000.0) / MASS_G;
    cr_assert_float_eq(res.points[0].percent_finer, p, 1e-9 * p);
    const double dp_dr = 100.0 * a * (VOLUME_ML / 1000.0) / MASS_G; /* = -dP/dB */
    const double dp_dm = -p / MASS_G;
    const double dp_dgs = p * (1.0 / GS - 1.0 / (GS - 1.0)); /* d ln a / dGs = -1/(Gs (Gs - 1)) */
    /* input standard uncertainties (mc.h defaults): reading = rectangular
     * half-width 0.5 (u = 0.5/sqrt 3, METHODS.md 11.1) and 0.25 normal;
     * blank 0.5; mass 0.01 g; Gs 0.02 */
    const double u_r2 = 0.25 / 3.0 + 0.25 * 0.25;
    const double uc = sqrt(dp_dr * dp_dr * u_r2 + dp_dr * dp_dr * 0.25 + dp_dm * dp_dm * 1e-4 +
                           dp_dgs * dp_dgs * 4e-4);
    const double u_mc = res.points[0].percent_finer_u;
    cr_assert(fabs(u_mc / uc - 1.0) < GUM_TOL, "MC u %.5f vs GUM %.5f (%.2f %%)", u_mc, uc,
              100.0 * (u_mc / uc - 1.0));
    cr_assert_float_eq(d.points[0].percent_finer_u, u_mc, 1e-15);
    /* the mean agrees with the nominal within 4 standard errors */
    cr_assert(fabs(d.points[0].percent_finer_mean - p) < 4.0 * uc / sqrt((double)GUM_DRAWS) + 0.001 * uc,
              "mean %.5f vs %.5f", d.points[0].percent_finer_mean, p);
    cr_assert_eq(d.n_points, 1);
    cr_assert_eq(d.draws, (size_t)GUM_DRAWS);
    cr_assert_eq(d.failed, 0);
    sg_mc_detail_release(&d);
    sg_result_release(&res);
    sg_record_release(&rec);
}

/* D = sqrt(18 eta(T) H / ((rho_s - rho_w(T)) g t)) (METHODS.md 2.1), H from
 * the depth line at R + meniscus; exact physics (no standard). */
static double stokes_mm(double temp_c, double t_min, double reading, double c0, double c1, double gs)
{
    const double h_m = (c0 + c1 * (reading + MENISCUS)) / 1000.0;
    const double eta = sg_water_viscosity_pa_s(temp_c);
    const double drho = gs * 1000.0 - sg_water_density_kg_m3(temp_c);
    return 1000.0 * sqrt(18.0 * eta * h_m / (drho * SG_GRAVITY_M_S2 * t_min * 60.0));
}

Test(gum, diameter_through_temperature)
{
    struct sg_record rec;
    single_point(&rec);
    zero_u(&rec);
    rec.u.temp_c = 0.2;
    struct sg_result res;
    reduce(&rec, &res);
    cr_assert_float_eq(res.points[0].diameter_mm,
                       stokes_mm(TEMP_C, ELAPSED_MIN, READING, C0_MM, C1_MM, GS), 1e-9);
    struct sg_mc_detail d;
    sg_mc_detail_init(&d);
    mc(&rec, &res, &d, GUM_DRAWS, 11, 2);
    /* dD/dT by central difference (h = 0.01 C) */
    const double h = 0.01;
    const double dd_dt = (stokes_mm(TEMP_C + h, ELAPSED_MIN, READING, C0_MM, C1_MM, GS) -
                          stokes_mm(TEMP_C - h, ELAPSED_MIN, READING, C0_MM, C1_MM, GS)) /
                         (2.0 * h);
    const double uc = fabs(dd_dt) * 0.2;
    cr_assert(fabs(d.points[0].diameter_u_mm / uc - 1.0) < GUM_TOL, "MC u(D) %.4g vs GUM %.4g mm",
              d.points[0].diameter_u_mm, uc);
    /* about 1.2 %/K on D (METHODS.md 11.3, derived): 0.2 K -> about 0.24 % */
    cr_assert(uc / res.points[0].diameter_mm > 0.0020 && uc / res.points[0].diameter_mm < 0.0028);
    /* temperature does not enter P on the g/L scale: exactly zero */
    cr_assert_float_eq(res.points[0].percent_finer_u, 0.0, 1e-300);
    sg_mc_detail_release(&d);
    sg_result_release(&res);
    sg_record_release(&rec);
}

Test(gum, diameter_full_budget)
{
    struct sg_record rec;
    single_point(&rec);
    struct sg_result res;
    reduce(&rec, &res);
    struct sg_mc_detail d;
    sg_mc_detail_init(&d);
    mc(&rec, &res, &d, GUM_DRAWS, 13, 2);
    /* every input that enters D, partial derivatives by central differences:
     * temperature 0.2 C, time 0.05 min, depth c0 1 mm, reading (half-width
     * 0.5 rectangular + 0.25) and meniscus 0.25 through H, Gs 0.02 */
    const double x0[6] = {TEMP_C, ELAPSED_MIN, READING, C0_MM, GS, 0.0};
    const double u_reading = sqrt(0.25 / 3.0 + 0.0625);
    const double u[6] = {0.2, 0.05, u_reading, 1.0, 0.02, 0.25};
    double sum = 0.0;
    for (int i = 0; i < 6; i++) {
        double xp[6], xm[6];
        memcpy(xp, x0, sizeof xp);
        memcpy(xm, x0, sizeof xm);
        const double h = 1e-4 * (fabs(x0[i]) > 1.0 ? fabs(x0[i]) : 1.0);
        xp[i] += h;
        xm[i] -= h;
        /* the meniscus error (index 5) adds to the reading in the depth line only */
        const double dp = stokes_mm(xp[0], xp[1], xp[2] + xp[5], xp[3], C1_MM, xp[4]);
        const double dm = stokes_mm(xm[0], xm[1], xm[2] + xm[5], xm[3], C1_MM, xm[4]);
        const double c = (dp - dm) / (2.0 * h);
        sum += c * c * u[i] * u[i];
    }
    const double uc = sqrt(sum);
    cr_assert(fabs(d.points[0].diameter_u_mm / uc - 1.0) < GUM_TOL, "MC u(D) %.5g vs GUM %.5g mm",
              d.points[0].diameter_u_mm, uc);
    sg_mc_detail_release(&d);
    sg_result_release(&res);
    sg_record_release(&rec);
}

/* ---- runs on a full record ------------------------------------------------- */

static void same_numbers(const struct sg_result *a, const struct sg_result *b)
{
    /* reproducibility is exact: the same draws in the same block order give
     * bit-identical statistics, so == is the right comparison here */
    cr_assert_eq(a->n_quantities, b->n_quantities);
    cr_assert_eq(a->n_points, b->n_points);
    for (size_t i = 0; i < a->n_quantities; i++) {
        const struct sg_quantity *x = &a->quantities[i], *y = &b->quantities[i];
        cr_assert_str_eq(x->name, y->name);
        cr_assert_eq(x->has_u, y->has_u, "%s", x->name);
        if (x->has_u) {
            cr_assert(memcmp(&x->u, &y->u, sizeof x->u) == 0, "%s u %.17g vs %.17g", x->name, x->u, y->u);
            cr_assert(memcmp(&x->low95, &y->low95, sizeof x->low95) == 0, "%s low95", x->name);
            cr_assert(memcmp(&x->high95, &y->high95, sizeof x->high95) == 0, "%s high95", x->name);
        }
        if (!x->is_text && x->determined)
            cr_assert(memcmp(&x->value, &y->value, sizeof x->value) == 0, "%s", x->name);
        cr_assert_str_eq(x->note, y->note, "%s", x->name);
    }
    for (size_t i = 0; i < a->n_points; i++)
        cr_assert(memcmp(&a->points[i].percent_finer_u, &b->points[i].percent_finer_u, sizeof(double)) == 0,
                  "point %zu", i);
}

Test(run, same_seed_same_output_any_thread_count)
{
    struct sg_record rec;
    full_record(&rec);
    struct sg_result r1, r2, r3;
    reduce(&rec, &r1);
    reduce(&rec, &r2);
    reduce(&rec, &r3);
    mc(&rec, &r1, NULL, 5000, 42, 1);
    mc(&rec, &r2, NULL, 5000, 42, 1);
    mc(&rec, &r3, NULL, 5000, 42, 3);
    same_numbers(&r1, &r2);
    same_numbers(&r1, &r3);
    /* another seed gives other draws */
    struct sg_result r4;
    reduce(&rec, &r4);
    mc(&rec, &r4, NULL, 5000, 43, 2);
    const struct sg_quantity *a = qty(&r1, "d50_mm"), *b = qty(&r4, "d50_mm");
    cr_assert(a->has_u && b->has_u);
    cr_assert(a->u != b->u, "seeds 42 and 43 gave the same u");
    cr_assert(fabs(a->u / b->u - 1.0) < 0.15, "u(D50) %.4g vs %.4g", a->u, b->u);
    sg_result_release(&r1);
    sg_result_release(&r2);
    sg_result_release(&r3);
    sg_result_release(&r4);
    sg_record_release(&rec);
}

Test(run, zero_input_uncertainty_gives_zero_u)
{
    struct sg_record rec;
    full_record(&rec);
    zero_u(&rec);
    struct sg_result res;
    reduce(&rec, &res);
    mc(&rec, &res, NULL, 300, 5, 2);
    size_t with_u = 0;
    for (size_t i = 0; i < res.n_quantities; i++) {
        const struct sg_quantity *q = &res.quantities[i];
        if (!q->has_u)
            continue;
        with_u++;
        cr_assert_float_eq(q->u, 0.0, 1e-300, "%s u %g", q->name, q->u);
        cr_assert_float_eq(q->low95, q->value, 1e-12 * fabs(q->value) + 1e-300, "%s", q->name);
        cr_assert_float_eq(q->high95, q->value, 1e-12 * fabs(q->value) + 1e-300, "%s", q->name);
    }
    cr_assert(with_u > 20, "only %zu quantities with u", with_u);
    for (size_t i = 0; i < res.n_points; i++)
        cr_assert_float_eq(res.points[i].percent_finer_u, 0.0, 1e-300);
    cr_assert(strstr(qty(&res, "usda_texture")->note, " 100.0 %") != NULL, "%s", qty(&res, "usda_texture")->note);
    sg_result_release(&res);
    sg_record_release(&rec);
}

Test(run, outputs_on_a_full_record)
{
    struct sg_record rec;
    full_record(&rec);
    struct sg_result res;
    reduce(&rec, &res);
    const size_t nq = res.n_quantities;
    mc(&rec, &res, NULL, 20000, 2026, 2);
    /* every point has u; every determined numeric quantity has u and an
     * interval that contains the value */
    for (size_t i = 0; i < res.n_points; i++)
        cr_assert(isfinite(res.points[i].percent_finer_u), "point %zu", i);
    for (size_t i = 0; i < nq; i++) {
        const struct sg_quantity *q = &res.quantities[i];
        if (q->is_text || !q->determined || strncmp(q->name, "qc_", 3) == 0)
            continue;
        cr_assert(q->has_u, "%s has no u", q->name);
        cr_assert(q->low95 <= q->high95, "%s", q->name);
    }
    const struct sg_quantity *d50 = qty(&res, "d50_mm");
    cr_assert(d50->low95 < d50->value && d50->value < d50->high95);
    /* near-normal output: the 95 % interval spans about 2 x 1.96 u (JCGM 101
     * 7.7; loose bound, the model is not linear) */
    const double ratio = (d50->high95 - d50->low95) / (2.0 * 1.96 * d50->u);
    cr_assert(ratio > 0.85 && ratio < 1.15, "interval / 3.92 u = %.3f", ratio);
    /* class probabilities: note on the categorical rows, p-rows sum to 100 */
    const struct sg_quantity *tex = qty(&res, "usda_texture");
    cr_assert(strstr(tex->note, "Monte Carlo class probabilities:") != NULL, "%s", tex->note);
    double sum = 0.0;
    size_t rows = 0;
    for (size_t i = 0; i < res.n_quantities; i++)
        if (strncmp(res.quantities[i].name, "usda_texture_p_", 15) == 0) {
            sum += res.quantities[i].value;
            rows++;
        }
    cr_assert(rows >= 1);
    cr_assert_float_eq(sum, 100.0, 1e-9);
    cr_assert(strstr(qty(&res, "activity_class")->note, "Monte Carlo class probabilities:") != NULL);
    cr_assert(qty(&res, "activity")->has_u);
    const struct sg_quantity *m = qty(&res, "mc_draws");
    cr_assert_float_eq(m->value, 20000.0, 1e-9);
    cr_assert(strstr(m->note, "seed 2026") != NULL, "%s", m->note);
    cr_assert(strstr(m->note, "rough") == NULL, "%s", m->note); /* 20 000 draws: enough (mc.h) */
    cr_assert(!qty(&res, "calibration_used")->has_u);
    sg_result_release(&res);
    sg_record_release(&rec);
}

/* Each class named in a usda_texture_p_ row (its note quotes the class). */
static size_t texture_classes(const struct sg_result *res, char cls[][64], size_t max)
{
    size_t n = 0;
    for (size_t i = 0; i < res->n_quantities && n < max; i++) {
        const struct sg_quantity *q = &res->quantities[i];
        const char *a = strchr(q->note, '\''), *b = a ? strchr(a + 1, '\'') : NULL;
        if (strncmp(q->name, "usda_texture_p_", 15) == 0 && b != NULL)
            (void)snprintf(cls[n++], 64, "%.*s", (int)(b - a - 1), a + 1);
    }
    return n;
}

/* A categorical row's Monte Carlo note is never cut inside a word or a
 * number (the demo's long texture and frost-screen notes once ended in
 * "frost s" and "clay loam 27.6 %, "): it lists every class, or ends after
 * a whole class with "...". */
Test(run, class_notes_are_whole_or_cut_after_a_class)
{
    struct sg_record rec;
    full_record(&rec);
    /* its texture is near class boundaries: three classes occur */
    struct sg_result res;
    reduce(&rec, &res);
    mc(&rec, &res, NULL, 4000, 11, 2);
    char cls[8][64];
    const size_t n = texture_classes(&res, cls, 8);
    const char *note = qty(&res, "usda_texture")->note;
    cr_assert(n >= 2, "%zu classes: the test needs a split texture", n);
    for (size_t i = 0; i < n; i++)
        cr_assert(strstr(note, cls[i]) != NULL, "class '%s' missing from: %s", cls[i], note);
    for (size_t i = 0; i < res.n_quantities; i++) {
        const char *t = res.quantities[i].note, *mcp = strstr(t, "Monte Carlo class probabilities");
        if (mcp != NULL)
            cr_assert(t[strlen(t) - 1] == '%', "%s: %s", res.quantities[i].name, t);
    }
    sg_result_release(&res);

    /* a nominal note that leaves room for about one class: the list is cut
     * after a whole class, or left out when not even one fits */
    for (size_t room = 20; room <= 120; room += 10) {
        reduce(&rec, &res);
        struct sg_quantity *tex = (struct sg_quantity *)qty(&res, "usda_texture");
        const size_t fill = SG_QNOTE_MAX - 1 - 2 - room;
        memset(tex->note, 'x', fill);
        tex->note[fill] = '\0';
        mc(&rec, &res, NULL, 4000, 11, 2);
        tex = (struct sg_quantity *)qty(&res, "usda_texture");
        const size_t len = strlen(tex->note);
        cr_assert(len < SG_QNOTE_MAX);
        if (len > fill) {
            cr_assert(strncmp(tex->note + fill, "; Monte Carlo class probabilities:", 34) == 0, "%s",
                      tex->note + fill);
            const bool whole = tex->note[len - 1] == '%';
            const bool cut = strcmp(tex->note + len - 6, "%, ...") == 0;
            cr_assert(whole || cut, "room %zu: %s", room, tex->note + fill);
        } else {
            cr_assert_eq(len, fill, "room %zu: a note shorter than the nominal one", room);
        }
        sg_result_release(&res);
    }
    sg_record_release(&rec);
}

Test(run, not_determined_in_some_draws)
{
    /* three readings whose finest point is near 10 % finer: D10 is reached
     * in some draws and not in others */
    struct sg_record rec;
    base_record(&rec);
    add_reading(&rec, 2.0, 30.0, 20.0, 10);
    add_reading(&rec, 60.0, 15.0, 20.0, 11);
    add_reading(&rec, 1440.0, 9.85, 20.0, 12); /* P = 100 a 4.85 / 50 = 9.59 %, u about 1.3 % */
    struct sg_result res;
    reduce(&rec, &res);
    const struct sg_quantity *d10 = qty(&res, "d10_mm");
    cr_assert(d10->determined, "%s", d10->note);
    mc(&rec, &res, NULL, 4000, 3, 2);
    d10 = qty(&res, "d10_mm");
    /* D10 is beyond the finest point in a large share of the draws, all on
     * one side: no u and no interval from the biased rest (mc.h
     * SG_MC_UNDETERMINED_MAX_SHARE; JCGM 101 7.7 defines the interval on
     * the whole output distribution) */
    cr_assert(!d10->has_u, "u %g [%g, %g]", d10->u, d10->low95, d10->high95);
    cr_assert(strstr(d10->note, "no u or 95 % interval") != NULL, "%s", d10->note);
    /* 4 000 draws: fewer than advised (JCGM 101 7.2), and the note says so */
    cr_assert(strstr(qty(&res, "mc_draws")->note, "fewer than 10000 draws: u and the intervals are rough") != NULL,
              "%s", qty(&res, "mc_draws")->note);
    sg_result_release(&res);
    sg_record_release(&rec);

    /* the finest point near 6.7 % finer: D10 is missed in a few draws (0.5 %
     * with this seed), fewer than the 2.5 % tail: u and interval from the
     * others */
    base_record(&rec);
    add_reading(&rec, 2.0, 30.0, 20.0, 10);
    add_reading(&rec, 60.0, 15.0, 20.0, 11);
    add_reading(&rec, 1440.0, 8.4, 20.0, 12);
    reduce(&rec, &res);
    mc(&rec, &res, NULL, 4000, 3, 2);
    d10 = qty(&res, "d10_mm");
    const char *share = strstr(d10->note, "not determined in ");
    cr_assert(share != NULL, "%s", d10->note);
    const double pct = strtod(share + strlen("not determined in "), NULL);
    cr_assert(pct > 0.0 && pct <= 2.5, "%s", d10->note);
    cr_assert(d10->has_u);
    cr_assert(d10->low95 <= d10->value && d10->value <= d10->high95);
    sg_result_release(&res);
    sg_record_release(&rec);
}

Test(run, determined_only_in_some_draws)
{
    /* the finest point at 10.38 % finer: D10 is not determined nominally,
     * but is in the draws where that point falls below 10 % */
    struct sg_record rec;
    base_record(&rec);
    add_reading(&rec, 2.0, 30.0, 20.0, 10);
    add_reading(&rec, 60.0, 15.0, 20.0, 11);
    add_reading(&rec, 1440.0, 10.25, 20.0, 12); /* P = 100 a 5.25 / 50 = 10.38 % */
    struct sg_result res;
    reduce(&rec, &res);
    cr_assert(!qty(&res, "d10_mm")->determined);
    mc(&rec, &res, NULL, 4000, 3, 2);
    const struct sg_quantity *d10 = qty(&res, "d10_mm");
    cr_assert(!d10->has_u);
    cr_assert(strstr(d10->note, "Monte Carlo: determined in ") != NULL, "%s", d10->note);
    sg_result_release(&res);
    sg_record_release(&rec);
}

Test(run, refused_draws_are_counted)
{
    /* 39.7 C with u 0.5 C: draws above 40 C are refused (water properties
     * are defined to 40 C), about 27 % of them */
    struct sg_record rec;
    single_point(&rec);
    rec.readings[0].temp_c = 39.7;
    rec.u.temp_c = 0.5;
    struct sg_result res;
    reduce(&rec, &res);
    struct sg_mc_detail d;
    sg_mc_detail_init(&d);
    mc(&rec, &res, &d, 2000, 9, 2);
    cr_assert(d.failed > 300 && d.failed < 800, "%zu refused", d.failed);
    cr_assert(strstr(d.first_failure, "40") != NULL, "%s", d.first_failure);
    cr_assert(strstr(qty(&res, "mc_draws")->note, "refused") != NULL);
    /* a quarter of the draws refused: the others are a biased sample, so
     * the flag is a failure (over SG_MC_REFUSED_FAILURE_PCT, common
     * practice) and qc_status, set before the draws, now says so */
    bool flagged = false;
    for (size_t i = 0; i < res.n_flags; i++)
        flagged |= strcmp(res.flags[i].name, "mc_refused_draws") == 0 && res.flags[i].severity == SG_SEVERITY_FAILURE;
    cr_assert(flagged);
    cr_assert_str_eq(qty(&res, "qc_status")->text, "failed");
    cr_assert(strstr(qty(&res, "qc_flags")->text, "mc_refused_draws") != NULL, "%s", qty(&res, "qc_flags")->text);
    cr_assert(isfinite(res.points[0].percent_finer_u));
    sg_mc_detail_release(&d);
    sg_result_release(&res);
    sg_record_release(&rec);
}

Test(run, few_refused_draws_are_a_warning)
{
    /* 39.0 C with u 0.5 C: about 2.3 % of the draws exceed 40 C (normal
     * tail beyond 2 standard deviations): between the warning and failure
     * limits of mc.h */
    struct sg_record rec;
    single_point(&rec);
    rec.readings[0].temp_c = 39.0;
    rec.u.temp_c = 0.5;
    struct sg_result res;
    reduce(&rec, &res);
    struct sg_mc_detail d;
    sg_mc_detail_init(&d);
    mc(&rec, &res, &d, 4000, 11, 2);
    cr_assert(d.failed > 40 && d.failed < 160, "%zu refused", d.failed);
    enum sg_severity sev = SG_SEVERITY_INFO;
    bool found = false;
    for (size_t i = 0; i < res.n_flags; i++)
        if (strcmp(res.flags[i].name, "mc_refused_draws") == 0) {
            found = true;
            sev = res.flags[i].severity;
            cr_assert(strstr(res.flags[i].message, "of 4000") != NULL, "%s", res.flags[i].message);
        }
    cr_assert(found);
    cr_assert_eq(sev, SG_SEVERITY_WARNING);
    cr_assert_str_eq(qty(&res, "qc_status")->text, "warning");
    sg_mc_detail_release(&d);
    sg_result_release(&res);
    sg_record_release(&rec);
}

Test(run, errors)
{
    struct sg_record rec;
    single_point(&rec);
    struct sg_result res;
    reduce(&rec, &res);
    struct sg_error e;
    struct sg_mc_options o = {.draws = 1, .seed = 1, .threads = 1};
    cr_assert_eq(sg_mc_run(&rec, NULL, NULL, &o, &res, &e), SG_EINVAL);
    cr_assert(strstr(e.msg, "at least 2 draws") != NULL, "%s", e.msg);
    o.draws = (size_t)SG_MC_DRAWS_MAX + 1;
    cr_assert_eq(sg_mc_run(&rec, NULL, NULL, &o, &res, &e), SG_ELIMIT);
    cr_assert_eq(sg_mc_run(&rec, NULL, NULL, NULL, &res, &e), SG_EINVAL);
    struct sg_result empty;
    sg_result_init(&empty);
    o.draws = 10;
    cr_assert_eq(sg_mc_run(&rec, NULL, NULL, &o, &empty, &e), SG_EINVAL);
    sg_result_release(&empty);
    /* every draw refused: a particle density with u = 10^6 Mg/m3 lands
     * outside 1.5-5 Mg/m3 in all but about 1 draw in 700 000 */
    rec.u.particle_density_mg_m3 = 1e6;
    const size_t before = res.n_quantities;
    cr_assert_eq(sg_mc_run(&rec, NULL, NULL, &o, &res, &e), SG_EDOM);
    cr_assert(strstr(e.msg, "refused every") != NULL, "%s", e.msg);
    cr_assert_eq(res.n_quantities, before);
    cr_assert(isnan(res.points[0].percent_finer_u));
    sg_result_release(&res);
    sg_record_release(&rec);
}

/* ---- rows followed through the draws by name --------------------------- */

SG_STATIC_QNAME(TEST_NAME, "test_row");

/* The rows written from static names keep the name's address; the others
 * keep none; and a row that keeps one holds that very name (result.h:
 * name_src), in a full reduction and in a values-only one (a draw). */
Test(run, static_names_are_kept_by_address)
{
    struct sg_result r;
    sg_result_init(&r);
    struct sg_quantity *q = sg_result_new_quantity_static(&r, &TEST_NAME, SG_QUNIT("%"), NULL);
    cr_assert_not_null(q);
    cr_assert_eq(q->name_src, &TEST_NAME);
    cr_assert_str_eq(q->name, "test_row");
    q = sg_result_new_quantity(&r, SG_QNAME("test_row"), SG_QUNIT("%"), NULL);
    cr_assert_not_null(q);
    cr_assert_null(q->name_src);
    cr_assert_eq(sg_result_add_value(&r, "test_row", "%", 1.0, NULL), SG_OK);
    cr_assert_null(r.quantities[2].name_src);
    sg_result_release(&r);

    struct sg_record rec;
    full_record(&rec);
    struct sg_reduce_options opt = sg_reduce_options_default();
    for (int values_only = 0; values_only < 2; values_only++) {
        opt.values_only = values_only;
        struct sg_error e;
        sg_result_init(&r);
        cr_assert_eq(sg_reduce(&rec, NULL, &opt, &r, &e), SG_OK, "%s", e.msg);
        size_t kept = 0;
        for (size_t i = 0; i < r.n_quantities; i++) {
            const struct sg_quantity *x = &r.quantities[i];
            if (x->name_src == NULL)
                continue;
            kept++;
            cr_assert_str_eq(x->name_src->s, x->name, "row %zu", i);
        }
        cr_assert(kept > 40, "only %zu rows with static names", kept);
        sg_result_release(&r);
    }
    sg_record_release(&rec);
}

/* A nominal result whose rows are in another order, one renamed in place
 * with a stale name_src (a caller that broke result.h's rule) and one
 * renamed to a name no draw has: every row is followed by its name. */
Test(run, rows_matched_by_name_whatever_their_order)
{
    struct sg_record rec;
    full_record(&rec);
    struct sg_result r1, r2;
    reduce(&rec, &r1);
    reduce(&rec, &r2);
    for (size_t i = 0, j = r2.n_quantities - 1; i < j; i++, j--) {
        const struct sg_quantity t = r2.quantities[i];
        r2.quantities[i] = r2.quantities[j];
        r2.quantities[j] = t;
    }
    struct sg_quantity *silt = (struct sg_quantity *)qty(&r2, "silt_pct");
    cr_assert_not_null(silt->name_src);
    memset(silt->name, 0, sizeof silt->name);
    memcpy(silt->name, "sand_pct", sizeof "sand_pct"); /* name_src still says silt_pct */
    struct sg_quantity *gone = (struct sg_quantity *)qty(&r2, "gravel_pct");
    memset(gone->name, 0, sizeof gone->name);
    memcpy(gone->name, "no_such_row", sizeof "no_such_row");
    gone->name_src = NULL;
    r2.has_keys = false;
    mc(&rec, &r1, NULL, 2000, 11, 1);
    mc(&rec, &r2, NULL, 2000, 11, 1);
    size_t compared = 0;
    for (size_t i = 0; i < r2.n_quantities; i++) {
        const struct sg_quantity *y = &r2.quantities[i];
        if (strcmp(y->name, "no_such_row") == 0) {
            cr_assert(!y->has_u, "a row no draw has got u");
            continue;
        }
        const struct sg_quantity *x = sg_result_quantity(&r1, y->name);
        if (x == NULL || !y->has_u || y == silt)
            continue;
        cr_assert(x->has_u, "%s", y->name);
        cr_assert(memcmp(&x->u, &y->u, sizeof x->u) == 0, "%s u %.17g vs %.17g", y->name, x->u, y->u);
        cr_assert(memcmp(&x->low95, &y->low95, sizeof x->low95) == 0, "%s low95", y->name);
        cr_assert(memcmp(&x->high95, &y->high95, sizeof x->high95) == 0, "%s high95", y->name);
        compared++;
    }
    cr_assert(compared > 40, "only %zu rows compared", compared);
    /* the renamed silt row was followed as sand_pct: the same draws, hence
     * the same interval; u summed about silt's nominal value, so equal to
     * rounding only */
    cr_assert(silt->has_u);
    const struct sg_quantity *sand = qty(&r1, "sand_pct");
    cr_assert(memcmp(&silt->low95, &sand->low95, sizeof silt->low95) == 0, "renamed row low95");
    cr_assert(memcmp(&silt->high95, &sand->high95, sizeof silt->high95) == 0, "renamed row high95");
    cr_assert_float_eq(silt->u, sand->u, 1e-6 * sand->u, "renamed row u %.17g, sand_pct %.17g", silt->u, sand->u);
    sg_result_release(&r1);
    sg_result_release(&r2);
    sg_record_release(&rec);
}
