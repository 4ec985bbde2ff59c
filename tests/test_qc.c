/* test_qc.c - the quality-control rules of qc.h: each rule provoked at its
 * threshold (not flagged) and just past it (flagged), with the source of each
 * default beside it; the run status and flag list in the summary; and one
 * end-to-end run through sg_reduce() on the METHODS.md 13.10 V2-A vector. */
#include <criterion/criterion.h>
#include <gsl/gsl_errno.h>
#include <math.h>
#include <string.h>

#include "sedgrade/qc.h"
#include "sedgrade/record.h"
#include "sedgrade/reduce.h"
#include "sedgrade/result.h"
#include "sedgrade/stokes.h"
#include "sedgrade/water.h"

static void setup(void)
{
    gsl_set_error_handler_off();
}

TestSuite(qc, .init = setup);

/* ---- helpers ---------------------------------------------------------- */

/* A hydrometer point on the curve; fields a rule does not read stay NaN. */
static struct sg_point hyd(unsigned line, double elapsed_min, double diameter_mm, double percent, double temp_c)
{
    struct sg_point p = sg_point_blank(SG_SOURCE_HYDROMETER, line);
    p.elapsed_min = elapsed_min;
    p.diameter_mm = diameter_mm;
    p.percent_finer = percent;
    p.percent_specimen = percent;
    p.temp_c = temp_c;
    p.reading = 20.0;
    p.concentration_g_l = 20.0;
    p.reynolds = 0.01;
    p.on_curve = true;
    return p;
}

static struct sg_point sieve_pt(unsigned line, enum sg_source src, double aperture_mm, double percent)
{
    struct sg_point p = sg_point_blank(src, line);
    p.diameter_mm = aperture_mm;
    p.percent_finer = percent;
    p.percent_specimen = percent;
    p.on_curve = true;
    return p;
}

static void add(struct sg_result *r, struct sg_point p)
{
    cr_assert_eq(sg_result_add_point(r, &p), SG_OK);
}

static void evaluate_with(struct sg_result *r, const struct sg_record *rec, const struct sg_constants *k,
                          const struct sg_qc_limits *lim)
{
    struct sg_error err;
    sg_error_clear(&err);
    cr_assert_eq(sg_qc_evaluate(rec, k, lim, r, &err), SG_OK, "%s", err.msg);
}

static void evaluate(struct sg_result *r)
{
    const struct sg_qc_limits lim = sg_qc_limits_default();
    evaluate_with(r, NULL, NULL, &lim);
}

static const struct sg_flag *find_flag(const struct sg_result *r, const char *name)
{
    const struct sg_flag *found = NULL;
    size_t n = 0;
    for (size_t i = 0; i < r->n_flags; i++)
        if (strcmp(r->flags[i].name, name) == 0) {
            found = &r->flags[i];
            n++;
        }
    cr_assert(n <= 1, "rule '%s' flagged %zu times (one flag per rule and run)", name, n);
    return found;
}

static const char *text_of(const struct sg_result *r, const char *name)
{
    const struct sg_quantity *q = sg_result_quantity(r, name);
    cr_assert_not_null(q, "quantity '%s' missing", name);
    cr_assert(q->is_text);
    return q->text;
}

/* Two-point hydrometer run: a first point and a second one at the values given. */
static void two_readings(struct sg_result *r, struct sg_point first, struct sg_point second)
{
    sg_result_init(r);
    add(r, first);
    add(r, second);
    evaluate(r);
}

/* ---- defaults, rule table, names --------------------------------------- */

Test(qc, defaults_match_documented_sources)
{
    const struct sg_qc_limits l = sg_qc_limits_default();
    cr_assert_float_eq(l.reynolds_max, 0.2, 1e-12);           /* METHODS.md 2.6: IS 5282 summary */
    cr_assert_float_eq(l.diameter_min_mm, 0.0002, 1e-15);     /* METHODS.md 2.6: ASTM D7928 scope, 0.2 um */
    cr_assert_float_eq(l.concentration_max_g_l, 50.0, 1e-12); /* METHODS.md 2.6/3.7 #7, from memory */
    cr_assert_float_eq(l.temp_min_c, 15.0, 1e-12);            /* common practice */
    cr_assert_float_eq(l.temp_max_c, 30.0, 1e-12);            /* common practice */
    cr_assert_float_eq(l.temp_drift_max_c, 1.0, 1e-12);       /* METHODS.md 3.7 #2, from memory */
    cr_assert_float_eq(l.percent_tolerance, 1.0, 1e-12);      /* common practice */
    cr_assert_float_eq(l.monotone_tolerance_pct, 1.0, 1e-12); /* common practice */
    cr_assert_float_eq(l.junction_gap_max_pct, 5.0, 1e-12);   /* METHODS.md 6.3 #2, practice */
    cr_assert_float_eq(l.mass_balance_max_pct, 1.0, 1e-12);   /* METHODS.md 5.3, EN 933-1 from memory */
    cr_assert_not(l.strict);
}

Test(qc, rule_table_is_complete_and_consistent)
{
    static const char *const expected[] = {"reynolds",     "brownian",          "coarser_than_sieve",
                                           "concentration", "not_falling",      "temperature_range",
                                           "temperature_drift", "off_scale",    "over_100",
                                           "negative",     "non_monotone",      "junction_gap",
                                           "mass_balance"};
    cr_assert_eq(sg_qc_rule_count(), sizeof expected / sizeof expected[0]);
    for (size_t i = 0; i < sg_qc_rule_count(); i++) {
        const struct sg_qc_rule *r = sg_qc_rule_at(i);
        cr_assert_not_null(r);
        cr_assert_str_eq(r->name, expected[i]);
        cr_assert(r->source != NULL && r->source[0] != '\0', "rule %s has no source", r->name);
        cr_assert(r->threshold != NULL && r->threshold[0] != '\0');
        cr_assert_eq(sg_qc_rule_find(r->name), r);
        if (r->point_bit != 0)
            cr_assert_str_eq(sg_qc_point_flag_name((enum sg_point_flag)r->point_bit), r->name);
    }
    cr_assert_null(sg_qc_rule_at(sg_qc_rule_count()));
    cr_assert_null(sg_qc_rule_find("reynold"));
    cr_assert_null(sg_qc_rule_find(NULL));
    /* Severities as documented in qc.h. */
    cr_assert_eq(sg_qc_rule_find("reynolds")->severity, SG_SEVERITY_WARNING);
    cr_assert_eq(sg_qc_rule_find("coarser_than_sieve")->severity, SG_SEVERITY_INFO);
    cr_assert_eq(sg_qc_rule_find("not_falling")->severity, SG_SEVERITY_FAILURE);
    cr_assert_eq(sg_qc_rule_find("off_scale")->severity, SG_SEVERITY_FAILURE);
    cr_assert_eq(sg_qc_rule_find("non_monotone")->severity, SG_SEVERITY_FAILURE);
    cr_assert_eq(sg_qc_rule_find("mass_balance")->severity, SG_SEVERITY_WARNING);
}

Test(qc, status_names)
{
    cr_assert_str_eq(sg_qc_status_name(SG_SEVERITY_INFO, false), "ok");
    cr_assert_str_eq(sg_qc_status_name(SG_SEVERITY_INFO, true), "ok");
    cr_assert_str_eq(sg_qc_status_name(SG_SEVERITY_WARNING, false), "warning");
    cr_assert_str_eq(sg_qc_status_name(SG_SEVERITY_WARNING, true), "failed");
    cr_assert_str_eq(sg_qc_status_name(SG_SEVERITY_FAILURE, false), "failed");
}

Test(qc, point_flags_format)
{
    char buf[256];
    sg_qc_point_flags_format(0, buf, sizeof buf);
    cr_assert_str_eq(buf, "");
    sg_qc_point_flags_format(SG_PF_REYNOLDS | SG_PF_NOT_FALLING | SG_PF_TEMP_DRIFT, buf, sizeof buf);
    cr_assert_str_eq(buf, "reynolds|not_falling|temperature_drift");
    /* Truncation keeps whole names only. */
    char small[16];
    sg_qc_point_flags_format(SG_PF_REYNOLDS | SG_PF_BROWNIAN | SG_PF_TEMP_DRIFT, small, sizeof small);
    cr_assert_str_eq(small, "reynolds");
    /* Unknown bits are skipped. */
    sg_qc_point_flags_format(SG_PF_OVER_100 | (1u << 30), buf, sizeof buf);
    cr_assert_str_eq(buf, "over_100");
    char none[1] = {'x'};
    sg_qc_point_flags_format(SG_PF_REYNOLDS, none, 0); /* size 0: untouched */
    cr_assert_eq(none[0], 'x');
}

/* ---- Stokes range ------------------------------------------------------- */

/* METHODS.md 2.6 [derived]: quartz spheres (2650 kg/m3) in water at 20 C:
 * D = 0.05 mm settles at 2.25 mm/s with Re = 0.11; 0.063 mm at 3.57 mm/s
 * with Re = 0.22. With the 0.2 default the first is inside Stokes' range, the
 * second outside. */
Test(qc, reynolds_of_quartz_spheres_against_the_limit)
{
    const double rho_w = sg_water_density_kg_m3(20.0), eta = sg_water_viscosity_pa_s(20.0);
    const double d1_m = 0.05e-3, d2_m = 0.063e-3;
    const double v1 = sg_stokes_velocity_m_s(eta, 2650.0 - rho_w, d1_m);
    const double v2 = sg_stokes_velocity_m_s(eta, 2650.0 - rho_w, d2_m);
    const double re1 = sg_stokes_reynolds(rho_w, v1, d1_m, eta), re2 = sg_stokes_reynolds(rho_w, v2, d2_m, eta);
    cr_assert_float_eq(re1, 0.11, 0.005); /* METHODS.md 2.6, derived */
    cr_assert_float_eq(re2, 0.22, 0.005); /* METHODS.md 2.6, derived */

    struct sg_result r;
    sg_result_init(&r);
    struct sg_point a = hyd(20, 0.5, 0.063, 80.0, 20.0), b = hyd(21, 1.0, 0.05, 75.0, 20.0);
    a.reynolds = re2;
    b.reynolds = re1;
    add(&r, a);
    add(&r, b);
    evaluate(&r);
    cr_assert(r.points[0].flags & SG_PF_REYNOLDS);
    cr_assert_not(r.points[1].flags & SG_PF_REYNOLDS);
    const struct sg_flag *f = find_flag(&r, "reynolds");
    cr_assert_not_null(f);
    cr_assert_eq(f->severity, SG_SEVERITY_WARNING);
    cr_assert_eq(f->line, 20u);
    cr_assert_str_eq(text_of(&r, "qc_status"), "warning");
    sg_result_release(&r);
}

Test(qc, reynolds_at_and_past_the_limit)
{
    struct sg_result r;
    struct sg_point a = hyd(10, 0.5, 0.0607, 80.0, 20.0), b = hyd(11, 1.0, 0.05, 70.0, 20.0);
    a.reynolds = 0.2; /* at the default (METHODS.md 2.6: 60.7 um at 20 C, derived) */
    two_readings(&r, a, b);
    cr_assert_not(r.points[0].flags & SG_PF_REYNOLDS);
    cr_assert_null(find_flag(&r, "reynolds"));
    sg_result_release(&r);

    a.reynolds = 0.201; /* just past */
    two_readings(&r, a, b);
    cr_assert(r.points[0].flags & SG_PF_REYNOLDS);
    cr_assert_not_null(find_flag(&r, "reynolds"));
    sg_result_release(&r);
}

/* A point already kept off the curve (coarser than the finest sieve) keeps
 * the bit but raises no warning: the sieve data hold there. */
Test(qc, reynolds_off_the_curve_is_not_a_warning)
{
    struct sg_result r;
    sg_result_init(&r);
    add(&r, sieve_pt(5, SG_SOURCE_SIEVE, 0.063, 60.0));
    struct sg_point a = hyd(10, 0.5, 0.075, 58.0, 20.0);
    a.reynolds = 0.38; /* METHODS.md 2.6: 0.075 mm quartz at 20 C, derived */
    a.flags |= SG_PF_COARSER_THAN_SIEVE;
    a.on_curve = false;
    add(&r, a);
    add(&r, hyd(11, 2.0, 0.03, 50.0, 20.0));
    evaluate(&r);
    cr_assert(r.points[1].flags & SG_PF_REYNOLDS);
    cr_assert_null(find_flag(&r, "reynolds"));
    const struct sg_flag *f = find_flag(&r, "coarser_than_sieve");
    cr_assert_not_null(f);
    cr_assert_eq(f->severity, SG_SEVERITY_INFO);
    cr_assert_eq(f->line, 10u);
    cr_assert(strstr(f->message, "0.063 mm") != NULL, "%s", f->message);
    cr_assert_str_eq(text_of(&r, "qc_status"), "ok"); /* info does not fail a run */
    cr_assert_str_eq(text_of(&r, "qc_flags"), "coarser_than_sieve");
    cr_assert_eq(sg_result_worst(&r), SG_SEVERITY_INFO);
    sg_result_release(&r);
}

Test(qc, brownian_at_and_past_the_limit)
{
    struct sg_result r;
    /* METHODS.md 2.6: ASTM D7928 lower limit about 0.2 um = 0.0002 mm. */
    two_readings(&r, hyd(30, 60.0, 0.002, 30.0, 20.0), hyd(31, 1440.0, 0.0002, 10.0, 20.0));
    cr_assert_not(r.points[1].flags & SG_PF_BROWNIAN);
    cr_assert_null(find_flag(&r, "brownian"));
    sg_result_release(&r);

    two_readings(&r, hyd(30, 60.0, 0.002, 30.0, 20.0), hyd(31, 1440.0, 0.000199, 10.0, 20.0));
    cr_assert(r.points[1].flags & SG_PF_BROWNIAN);
    const struct sg_flag *f = find_flag(&r, "brownian");
    cr_assert_not_null(f);
    cr_assert_eq(f->severity, SG_SEVERITY_WARNING);
    cr_assert_eq(f->line, 31u);
    sg_result_release(&r);
}

/* ---- concentration ------------------------------------------------------ */

Test(qc, concentration_of_the_first_reading)
{
    struct sg_result r;
    struct sg_point a = hyd(12, 0.5, 0.04, 90.0, 20.0), b = hyd(13, 1.0, 0.03, 80.0, 20.0);
    a.concentration_g_l = 50.0; /* at the default (METHODS.md 3.7 #7, about 50 g/L, from memory) */
    b.concentration_g_l = 60.0; /* a later reading is not the criterion */
    two_readings(&r, a, b);
    cr_assert_null(find_flag(&r, "concentration"));
    cr_assert_not(r.points[1].flags & SG_PF_CONCENTRATION);
    sg_result_release(&r);

    a.concentration_g_l = 50.1;
    two_readings(&r, a, b);
    cr_assert(r.points[0].flags & SG_PF_CONCENTRATION);
    const struct sg_flag *f = find_flag(&r, "concentration");
    cr_assert_not_null(f);
    cr_assert_eq(f->severity, SG_SEVERITY_WARNING);
    cr_assert_eq(f->line, 12u);
    sg_result_release(&r);
}

/* Pipette: net solids per litre sampled. 0.5 g in a 10 mL pipette is
 * 50 g/L (arithmetic). */
Test(qc, concentration_of_the_first_pipette_sample)
{
    struct sg_constants k;
    memset(&k, 0, sizeof k);
    k.has_pipette_volume = true;
    k.pipette_volume_ml = 10.0;
    const struct sg_qc_limits lim = sg_qc_limits_default();
    for (int past = 0; past <= 1; past++) {
        struct sg_result r;
        sg_result_init(&r);
        struct sg_point p = sg_point_blank(SG_SOURCE_PIPETTE, 40);
        p.diameter_mm = 0.02;
        p.percent_finer = p.percent_specimen = 54.17;
        p.temp_c = 25.0;
        p.reynolds = 0.01;
        p.net_solids_g = past ? 0.5005 : 0.5;
        p.on_curve = true;
        add(&r, p);
        evaluate_with(&r, NULL, &k, &lim);
        cr_assert_eq(find_flag(&r, "concentration") != NULL, past == 1);
        /* Without a pipette volume the rule cannot apply. */
        sg_result_clear(&r);
        add(&r, p);
        evaluate_with(&r, NULL, NULL, &lim);
        cr_assert_null(find_flag(&r, "concentration"));
        sg_result_release(&r);
    }
}

/* ---- readings in time order ---------------------------------------------- */

Test(qc, not_falling_at_and_past_the_tolerance)
{
    struct sg_result r;
    /* A rise of exactly the tolerance (1.0 point, common practice) is noise. */
    two_readings(&r, hyd(14, 2.0, 0.03, 40.0, 20.0), hyd(15, 5.0, 0.02, 41.0, 20.0));
    cr_assert_null(find_flag(&r, "not_falling"));
    sg_result_release(&r);

    two_readings(&r, hyd(14, 2.0, 0.03, 40.0, 20.0), hyd(15, 5.0, 0.02, 41.1, 20.0));
    cr_assert(r.points[1].flags & SG_PF_NOT_FALLING);
    cr_assert_not(r.points[0].flags & SG_PF_NOT_FALLING);
    const struct sg_flag *f = find_flag(&r, "not_falling");
    cr_assert_not_null(f);
    cr_assert_eq(f->severity, SG_SEVERITY_FAILURE);
    cr_assert_eq(f->line, 15u);
    cr_assert_str_eq(text_of(&r, "qc_status"), "failed");
    sg_result_release(&r);
}

Test(qc, pipette_advice_names_what_a_pipette_test_weighs)
{
    /* a pipette test has no blank reading: its not_falling and negative
     * messages point to the solids weighings instead (common practice) */
    struct sg_result r;
    struct sg_point a = hyd(14, 2.0, 0.03, 40.0, 20.0), b = hyd(15, 5.0, 0.02, 43.0, 20.0);
    struct sg_point c = hyd(16, 30.0, 0.005, -3.0, 20.0);
    a.source = b.source = c.source = SG_SOURCE_PIPETTE;
    sg_result_init(&r);
    add(&r, a);
    add(&r, b);
    add(&r, c);
    evaluate(&r);
    const struct sg_flag *f = find_flag(&r, "not_falling"), *n = find_flag(&r, "negative");
    cr_assert_not_null(f);
    cr_assert_not_null(n);
    cr_assert(strstr(f->message, "solids") != NULL && strstr(f->message, "blank") == NULL, "%s", f->message);
    cr_assert(strstr(n->message, "solids") != NULL && strstr(n->message, "blank") == NULL, "%s", n->message);
    sg_result_release(&r);
    /* the same points from a hydrometer keep the blank advice */
    a.source = b.source = c.source = SG_SOURCE_HYDROMETER;
    sg_result_init(&r);
    add(&r, a);
    add(&r, b);
    add(&r, c);
    evaluate(&r);
    cr_assert(strstr(find_flag(&r, "negative")->message, "blank") != NULL);
    sg_result_release(&r);
}

/* Several small rises that each stay inside the tolerance but add up beyond
 * it: compared with the lowest earlier reading, the third one is flagged. */
Test(qc, not_falling_creep)
{
    struct sg_result r;
    sg_result_init(&r);
    add(&r, hyd(20, 2.0, 0.03, 40.0, 20.0));
    add(&r, hyd(21, 5.0, 0.02, 40.75, 20.0));
    add(&r, hyd(22, 15.0, 0.012, 41.5, 20.0));
    evaluate(&r);
    cr_assert_not(r.points[1].flags & SG_PF_NOT_FALLING);
    cr_assert(r.points[2].flags & SG_PF_NOT_FALLING);
    cr_assert_eq(find_flag(&r, "not_falling")->line, 22u);
    sg_result_release(&r);
}

/* The specimen percent is what falls; the whole-sample percent below a split
 * sieve is the same series scaled, so the rule uses the specimen's. */
Test(qc, not_falling_uses_the_specimen_percent)
{
    struct sg_result r;
    struct sg_point a = hyd(14, 2.0, 0.03, 40.0, 20.0), b = hyd(15, 5.0, 0.02, 40.8, 20.0);
    a.percent_specimen = 50.0;
    b.percent_specimen = 51.0; /* 40 / 0.8 = 50, 40.8 / 0.8 = 51: a rise of 1.0 point of the specimen */
    two_readings(&r, a, b);
    cr_assert_null(find_flag(&r, "not_falling"));
    sg_result_release(&r);
}

Test(qc, temperature_range_at_and_past_the_limits)
{
    struct sg_result r;
    /* 15 and 30 C: the lab range's ends (common practice) are inside. */
    two_readings(&r, hyd(16, 2.0, 0.03, 40.0, 15.0), hyd(17, 5.0, 0.02, 35.0, 15.0));
    cr_assert_null(find_flag(&r, "temperature_range"));
    sg_result_release(&r);
    two_readings(&r, hyd(16, 2.0, 0.03, 40.0, 30.0), hyd(17, 5.0, 0.02, 35.0, 30.0));
    cr_assert_null(find_flag(&r, "temperature_range"));
    sg_result_release(&r);

    two_readings(&r, hyd(16, 2.0, 0.03, 40.0, 14.9), hyd(17, 5.0, 0.02, 35.0, 15.0));
    cr_assert(r.points[0].flags & SG_PF_TEMP_RANGE);
    cr_assert_not(r.points[1].flags & SG_PF_TEMP_RANGE);
    cr_assert_eq(find_flag(&r, "temperature_range")->severity, SG_SEVERITY_WARNING);
    sg_result_release(&r);
    two_readings(&r, hyd(16, 2.0, 0.03, 40.0, 30.0), hyd(17, 5.0, 0.02, 35.0, 30.1));
    cr_assert(r.points[1].flags & SG_PF_TEMP_RANGE);
    cr_assert_eq(find_flag(&r, "temperature_range")->line, 17u);
    sg_result_release(&r);
}

Test(qc, temperature_drift_at_and_past_the_limit)
{
    struct sg_result r;
    /* 1.0 C between readings (METHODS.md 3.7 #2, from memory) is allowed. */
    two_readings(&r, hyd(16, 2.0, 0.03, 40.0, 20.0), hyd(17, 5.0, 0.02, 35.0, 21.0));
    cr_assert_null(find_flag(&r, "temperature_drift"));
    sg_result_release(&r);

    two_readings(&r, hyd(16, 2.0, 0.03, 40.0, 20.0), hyd(17, 5.0, 0.02, 35.0, 21.25));
    cr_assert(r.points[1].flags & SG_PF_TEMP_DRIFT);
    const struct sg_flag *f = find_flag(&r, "temperature_drift");
    cr_assert_not_null(f);
    cr_assert_eq(f->severity, SG_SEVERITY_WARNING);
    cr_assert_eq(f->line, 17u);
    cr_assert(strstr(f->message, "+1.25 C") != NULL, "%s", f->message);
    sg_result_release(&r);

    /* A fall counts as much as a rise. */
    two_readings(&r, hyd(16, 2.0, 0.03, 40.0, 21.25), hyd(17, 5.0, 0.02, 35.0, 20.0));
    cr_assert(r.points[1].flags & SG_PF_TEMP_DRIFT);
    sg_result_release(&r);
}

/* ASTM E100 152H: graduated -5 to 60 g/L (from memory). */
Test(qc, off_scale_only_with_a_registered_scale)
{
    struct sg_constants k;
    memset(&k, 0, sizeof k);
    k.has_scale_range = true;
    k.scale_min = -5.0;
    k.scale_max = 60.0;
    const struct sg_qc_limits lim = sg_qc_limits_default();
    struct sg_result r;
    sg_result_init(&r);
    struct sg_point a = hyd(18, 0.5, 0.04, 95.0, 20.0), b = hyd(19, 1.0, 0.03, 90.0, 20.0);
    a.reading = 60.0; /* at the top of the scale */
    b.reading = -5.0; /* at the bottom */
    add(&r, a);
    add(&r, b);
    evaluate_with(&r, NULL, &k, &lim);
    cr_assert_null(find_flag(&r, "off_scale"));
    sg_result_clear(&r);

    a.reading = 60.5;
    add(&r, a);
    add(&r, b);
    evaluate_with(&r, NULL, &k, &lim);
    cr_assert(r.points[0].flags & SG_PF_OFF_SCALE);
    const struct sg_flag *f = find_flag(&r, "off_scale");
    cr_assert_not_null(f);
    cr_assert_eq(f->severity, SG_SEVERITY_FAILURE);
    cr_assert_eq(f->line, 18u);
    sg_result_clear(&r);

    b.reading = -5.5;
    add(&r, b);
    evaluate_with(&r, NULL, &k, &lim);
    cr_assert(r.points[0].flags & SG_PF_OFF_SCALE);
    sg_result_clear(&r);

    /* No scale in the register: nothing to compare with. */
    k.has_scale_range = false;
    a.reading = 75.0;
    add(&r, a);
    evaluate_with(&r, NULL, &k, &lim);
    cr_assert_null(find_flag(&r, "off_scale"));
    sg_result_clear(&r);
    add(&r, a);
    evaluate_with(&r, NULL, NULL, &lim);
    cr_assert_null(find_flag(&r, "off_scale"));
    sg_result_release(&r);
}

/* ---- percent range and curve shape -------------------------------------- */

Test(qc, over_100_at_and_past_the_tolerance)
{
    struct sg_result r;
    /* 100 + 1.0 (percent_tolerance, common practice) is allowed. */
    two_readings(&r, hyd(21, 0.5, 0.04, 101.0, 20.0), hyd(22, 1.0, 0.03, 90.0, 20.0));
    cr_assert_null(find_flag(&r, "over_100"));
    sg_result_release(&r);

    two_readings(&r, hyd(21, 0.5, 0.04, 101.5, 20.0), hyd(22, 1.0, 0.03, 90.0, 20.0));
    cr_assert(r.points[0].flags & SG_PF_OVER_100);
    const struct sg_flag *f = find_flag(&r, "over_100");
    cr_assert_not_null(f);
    cr_assert_eq(f->severity, SG_SEVERITY_FAILURE);
    cr_assert_eq(f->line, 21u);
    cr_assert(strstr(f->message, "sample") != NULL, "%s", f->message);
    sg_result_release(&r);
}

/* METHODS.md 3.7 #4: the first reading must not exceed 100 % of the
 * specimen, even where the whole-sample percent (scaled by the split
 * sieve's passing) stays below 100. */
Test(qc, over_100_of_the_specimen)
{
    struct sg_result r;
    struct sg_point a = hyd(21, 0.5, 0.04, 85.0, 20.0);
    a.percent_specimen = 103.0; /* 85 = 103 x 0.825 */
    two_readings(&r, a, hyd(22, 1.0, 0.03, 80.0, 20.0));
    cr_assert(r.points[0].flags & SG_PF_OVER_100);
    cr_assert(strstr(find_flag(&r, "over_100")->message, "specimen") != NULL);
    sg_result_release(&r);
}

Test(qc, negative_at_and_past_the_tolerance)
{
    struct sg_result r;
    two_readings(&r, hyd(23, 60.0, 0.004, 5.0, 20.0), hyd(24, 1440.0, 0.001, -1.0, 20.0));
    cr_assert_null(find_flag(&r, "negative"));
    sg_result_release(&r);

    two_readings(&r, hyd(23, 60.0, 0.004, 5.0, 20.0), hyd(24, 1440.0, 0.001, -1.5, 20.0));
    cr_assert(r.points[1].flags & SG_PF_NEGATIVE);
    const struct sg_flag *f = find_flag(&r, "negative");
    cr_assert_not_null(f);
    cr_assert_eq(f->severity, SG_SEVERITY_FAILURE);
    cr_assert_eq(f->line, 24u);
    sg_result_release(&r);
}

/* METHODS.md 6.3 #1: a sedimentation point above the percent passing the
 * finest sieve is a red flag. */
Test(qc, non_monotone_at_and_past_the_tolerance)
{
    for (int past = 0; past <= 1; past++) {
        struct sg_result r;
        sg_result_init(&r);
        add(&r, sieve_pt(3, SG_SOURCE_SIEVE, 2.0, 100.0));
        add(&r, sieve_pt(4, SG_SOURCE_SIEVE, 0.063, 40.0));
        add(&r, hyd(25, 1.0, 0.05, past ? 41.2 : 41.0, 20.0));
        add(&r, hyd(26, 5.0, 0.02, 30.0, 20.0));
        evaluate(&r);
        const struct sg_flag *f = find_flag(&r, "non_monotone");
        if (!past) {
            cr_assert_null(f);
        } else {
            cr_assert_not_null(f);
            cr_assert_eq(f->severity, SG_SEVERITY_FAILURE);
            cr_assert_eq(f->line, 25u);
            cr_assert(r.points[2].flags & SG_PF_NON_MONOTONE);
            cr_assert_not(r.points[1].flags & SG_PF_NON_MONOTONE);
            cr_assert_not(r.points[3].flags & SG_PF_NON_MONOTONE);
        }
        sg_result_release(&r);
    }
}

/* Points are compared by diameter, not by the order they were added; points
 * off the curve and points at one aperture from two stages are not compared. */
Test(qc, non_monotone_ignores_order_ties_and_points_off_the_curve)
{
    struct sg_result r;
    sg_result_init(&r);
    add(&r, hyd(30, 5.0, 0.02, 30.0, 20.0));
    add(&r, sieve_pt(3, SG_SOURCE_SIEVE, 0.063, 40.0));
    add(&r, sieve_pt(9, SG_SOURCE_FINE_SIEVE, 0.063, 43.0)); /* same aperture: a junction matter */
    add(&r, sieve_pt(2, SG_SOURCE_SIEVE, 2.0, 100.0));
    struct sg_point off = hyd(29, 0.5, 0.07, 60.0, 20.0);
    off.on_curve = false;
    off.flags |= SG_PF_COARSER_THAN_SIEVE;
    add(&r, off);
    evaluate(&r);
    cr_assert_null(find_flag(&r, "non_monotone"));
    sg_result_release(&r);
}

/* A long run (more curve points than fit the rule's stack buffer), added
 * coarse to fine as readings come: one point rises 1.5 points above its
 * coarser neighbour. */
Test(qc, non_monotone_on_a_long_run)
{
    struct sg_result r;
    sg_result_init(&r);
    const size_t n = 150;
    for (size_t k = 0; k < n; k++) {
        const size_t i = n - 1 - k; /* size rank, 0 = finest */
        const double d_mm = 0.001 * pow(10.0, 1.5 * (double)i / (double)(n - 1)); /* 0.001-0.0316 mm */
        const double pct = 20.0 + 0.4 * (double)i + (i == 70 ? 1.9 : 0.0);
        add(&r, hyd((unsigned)(100 + k), 0.5 * (double)(k + 1), d_mm, pct, 20.0));
    }
    evaluate(&r);
    const struct sg_flag *f = find_flag(&r, "non_monotone");
    cr_assert_not_null(f);
    cr_assert_eq(f->line, 179u); /* rank 70 (k 79): 49.9 % against 48.4 % at the coarser rank 71 */
    cr_assert_eq(find_flag(&r, "not_falling")->line, 179u);
    size_t flagged = 0;
    for (size_t i = 0; i < n; i++)
        flagged += (r.points[i].flags & SG_PF_NON_MONOTONE) != 0;
    cr_assert_eq(flagged, 1u);
    sg_result_release(&r);
}

Test(qc, junction_gap_at_and_past_the_limit)
{
    struct sg_result r;
    sg_result_init(&r);
    /* No junction quantity: nothing to check. */
    evaluate(&r);
    cr_assert_null(find_flag(&r, "junction_gap"));
    sg_result_clear(&r);

    /* 5 points (METHODS.md 6.3 #2, practice) is allowed, either sign. */
    cr_assert_eq(sg_result_add_value(&r, "junction_gap_pct", "%", -5.0, ""), SG_OK);
    evaluate(&r);
    cr_assert_null(find_flag(&r, "junction_gap"));
    sg_result_clear(&r);

    cr_assert_eq(sg_result_add_value(&r, "junction_gap_pct", "%", 5.5, ""), SG_OK);
    evaluate(&r);
    const struct sg_flag *f = find_flag(&r, "junction_gap");
    cr_assert_not_null(f);
    cr_assert_eq(f->severity, SG_SEVERITY_WARNING);
    sg_result_clear(&r);

    cr_assert_eq(sg_result_add_value(&r, "junction_gap_pct", "%", -5.5, ""), SG_OK);
    evaluate(&r);
    cr_assert_not_null(find_flag(&r, "junction_gap"));
    sg_result_clear(&r);

    cr_assert_eq(sg_result_add_undetermined(&r, "junction_gap_pct", "%", "no sieve"), SG_OK);
    evaluate(&r);
    cr_assert_null(find_flag(&r, "junction_gap"));
    sg_result_release(&r);
}

/* ---- sieve mass balance (METHODS.md 5.3) ---------------------------------- */

static void sieve_record(struct sg_record *rec, double pan_g, bool with_pan)
{
    sg_record_init(rec);
    rec->sample_dry_mass_g = 500.0;
    rec->pos_sample_mass.line = 7;
    const struct sg_sieve_row rows[] = {
        {20.0, 0.0, {12, 1}}, {6.3, 120.0, {13, 1}}, {2.0, 150.0, {14, 1}}, {0.063, 140.0, {15, 1}}};
    for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++)
        cr_assert_eq(sg_record_add_sieve(rec, rows[i]), SG_OK);
    if (with_pan)
        cr_assert_eq(sg_record_add_sieve(rec, (struct sg_sieve_row){0.0, pan_g, {16, 1}}), SG_OK);
}

static double loss_for(double pan_g, bool with_pan, bool *flagged)
{
    struct sg_record rec;
    sieve_record(&rec, pan_g, with_pan);
    struct sg_result r;
    sg_result_init(&r);
    const struct sg_qc_limits lim = sg_qc_limits_default();
    evaluate_with(&r, &rec, NULL, &lim);
    const struct sg_flag *f = find_flag(&r, "mass_balance");
    *flagged = f != NULL;
    if (f != NULL) {
        cr_assert_eq(f->severity, SG_SEVERITY_WARNING);
        cr_assert_eq(f->line, 7u);
    }
    const struct sg_quantity *q = sg_result_quantity(&r, "sieve_loss_pct");
    cr_assert_not_null(q);
    const double loss = q->determined ? q->value : (double)NAN;
    sg_result_release(&r);
    sg_record_release(&rec);
    return loss;
}

Test(qc, mass_balance_at_and_past_the_limit)
{
    bool flagged = false;
    /* 120 + 150 + 140 + 85 = 495 g of 500 g: loss 1.0 % (arithmetic), at the
     * 1 % default (METHODS.md 5.3, EN 933-1 from memory). */
    cr_assert_float_eq(loss_for(85.0, true, &flagged), 1.0, 1e-9);
    cr_assert_not(flagged);
    /* 494.5 g: loss 1.1 %. */
    cr_assert_float_eq(loss_for(84.5, true, &flagged), 1.1, 1e-9);
    cr_assert(flagged);
    /* 505.5 g: a gain of 1.1 % is a weighing error too. */
    cr_assert_float_eq(loss_for(95.5, true, &flagged), -1.1, 1e-9);
    cr_assert(flagged);
    /* 505 g: a gain of exactly 1 %. */
    cr_assert_float_eq(loss_for(95.0, true, &flagged), -1.0, 1e-9);
    cr_assert_not(flagged);
}

Test(qc, exact_mass_balance_is_zero)
{
    /* 120.1 + 150.1 + 140.1 + 90.0 g = 500.3 g exactly, but the sum in
     * binary floating point is 500.29999999999995: the loss is 0, not
     * 1.1e-14 % of round-off */
    struct sg_record rec;
    sg_record_init(&rec);
    rec.sample_dry_mass_g = 500.3;
    rec.pos_sample_mass.line = 7;
    const struct sg_sieve_row rows[] = {
        {20.0, 0.0, {12, 1}}, {6.3, 120.1, {13, 1}}, {2.0, 150.1, {14, 1}}, {0.063, 140.1, {15, 1}}, {0.0, 90.0, {16, 1}}};
    for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++)
        cr_assert_eq(sg_record_add_sieve(&rec, rows[i]), SG_OK);
    struct sg_result r;
    sg_result_init(&r);
    const struct sg_qc_limits lim = sg_qc_limits_default();
    evaluate_with(&r, &rec, NULL, &lim);
    const struct sg_quantity *q = sg_result_quantity(&r, "sieve_loss_pct");
    cr_assert(q != NULL && q->determined);
    cr_assert(q->value == 0.0, "%.17g", q->value);
    sg_result_release(&r);
    sg_record_release(&rec);
}

Test(qc, mass_balance_needs_a_pan)
{
    bool flagged = true;
    /* Without a pan the washed-out fines were never weighed: 410 g of 500 g
     * says nothing about a loss. */
    cr_assert(isnan(loss_for(0.0, false, &flagged)));
    cr_assert_not(flagged);

    struct sg_result r;
    sg_result_init(&r);
    evaluate(&r); /* no record at all */
    const struct sg_quantity *q = sg_result_quantity(&r, "sieve_loss_pct");
    cr_assert_not_null(q);
    cr_assert_not(q->determined);
    sg_result_release(&r);
}

/* The specimen's fine sieves with their pan must make up the specimen's
 * mass too (the same 1 % as the sample's, METHODS.md 5.3, EN 933-1 from
 * memory): 12.5 + 19 + 9.5 + pan 8.5 = 49.5 g of 50 g is 1.0 %, at the
 * limit; a pan of 500 g is a typing error the results do not show. */
static bool fine_flagged(double pan_g, bool with_pan)
{
    struct sg_record rec;
    sg_record_init(&rec);
    rec.specimen_dry_mass_g = 50.0;
    rec.pos_specimen_mass.line = 9;
    const struct sg_sieve_row rows[] = {{1.18, 12.5, {20, 1}}, {0.425, 19.0, {21, 1}}, {0.063, 9.5, {22, 1}},
                                        {0.0, pan_g, {23, 1}}};
    for (size_t i = 0; i < (with_pan ? 4u : 3u); i++)
        cr_assert_eq(sg_record_add_fine_sieve(&rec, rows[i]), SG_OK);
    struct sg_result r;
    sg_result_init(&r);
    const struct sg_qc_limits lim = sg_qc_limits_default();
    evaluate_with(&r, &rec, NULL, &lim);
    const struct sg_flag *f = find_flag(&r, "mass_balance");
    if (f != NULL) {
        cr_assert_eq(f->line, 9);
        cr_assert(strstr(f->message, "specimen") != NULL, "%s", f->message);
    }
    sg_result_release(&r);
    sg_record_release(&rec);
    return f != NULL;
}

Test(qc, fine_sieve_mass_balance)
{
    cr_assert_not(fine_flagged(9.0, true));   /* 50.0 g: balanced */
    cr_assert_not(fine_flagged(8.5, true));   /* loss 1.0 %: at the limit */
    cr_assert(fine_flagged(8.4, true));       /* loss 1.2 % */
    cr_assert(fine_flagged(500.0, true));     /* a gain of 982 % */
    cr_assert_not(fine_flagged(500.0, false)); /* no pan: the washed fines were not weighed */
}

/* ---- the run's status and flag list ------------------------------------- */

Test(qc, status_and_flag_list_in_the_summary)
{
    struct sg_result r;
    sg_result_init(&r);
    add(&r, hyd(10, 2.0, 0.03, 40.0, 20.0));
    add(&r, hyd(11, 5.0, 0.02, 35.0, 20.0));
    evaluate(&r);
    cr_assert_str_eq(text_of(&r, "qc_status"), "ok");
    const struct sg_quantity *q = sg_result_quantity(&r, "qc_flags");
    cr_assert_not(q->determined); /* empty value: no flags */
    cr_assert_eq(r.n_flags, 0u);
    sg_result_release(&r);

    /* A register note (added by sg_reduce before QC), a warning and a failure. */
    sg_result_init(&r);
    cr_assert_eq(sg_result_add_flag(&r, "calibration_overdue", SG_SEVERITY_WARNING, 0, "due 2026-01-01"), SG_OK);
    add(&r, hyd(10, 2.0, 0.03, 40.0, 20.0));
    add(&r, hyd(11, 5.0, 0.02, 42.0, 22.0)); /* rises 2 points; 2 C warmer */
    add(&r, hyd(12, 15.0, 0.01, 43.0, 20.0)); /* rises again; 2 C cooler */
    evaluate(&r);
    cr_assert_str_eq(text_of(&r, "qc_flags"), "calibration_overdue|not_falling|temperature_drift|non_monotone");
    cr_assert_str_eq(text_of(&r, "qc_status"), "failed");
    cr_assert_eq(sg_result_worst(&r), SG_SEVERITY_FAILURE);
    const struct sg_flag *f = find_flag(&r, "not_falling");
    cr_assert(strstr(f->message, "2 readings (lines 11, 12)") != NULL, "%s", f->message);
    cr_assert_eq(f->line, 12u); /* the worst: 3 points above the first reading */
    sg_result_release(&r);
}

Test(qc, strict_turns_warnings_into_failures)
{
    struct sg_qc_limits lim = sg_qc_limits_default();
    for (int strict = 0; strict <= 1; strict++) {
        lim.strict = strict;
        struct sg_result r;
        sg_result_init(&r);
        add(&r, hyd(10, 2.0, 0.03, 40.0, 20.0));
        add(&r, hyd(11, 5.0, 0.02, 35.0, 21.5)); /* drift 1.5 C: a warning */
        evaluate_with(&r, NULL, NULL, &lim);
        cr_assert_eq(sg_result_worst(&r), SG_SEVERITY_WARNING); /* severities are not rewritten */
        cr_assert_str_eq(text_of(&r, "qc_status"), strict ? "failed" : "warning");
        sg_result_release(&r);
    }
}

/* Limits are parameters: a lab that accepts Re up to 0.25 (ISO 13317-4,
 * METHODS.md 2.6) sees no flag at 0.22; NULL limits mean the defaults. */
Test(qc, limits_are_parameters)
{
    struct sg_qc_limits lim = sg_qc_limits_default();
    lim.reynolds_max = 0.25;
    struct sg_result r;
    sg_result_init(&r);
    struct sg_point a = hyd(10, 0.5, 0.063, 80.0, 20.0);
    a.reynolds = 0.22;
    add(&r, a);
    evaluate_with(&r, NULL, NULL, &lim);
    cr_assert_null(find_flag(&r, "reynolds"));
    sg_result_clear(&r);
    add(&r, a);
    evaluate_with(&r, NULL, NULL, NULL);
    cr_assert_not_null(find_flag(&r, "reynolds"));
    sg_result_release(&r);
}

/* A second evaluation updates the summary quantities in place. */
Test(qc, evaluating_twice_keeps_one_status_row)
{
    struct sg_result r;
    sg_result_init(&r);
    add(&r, hyd(10, 2.0, 0.03, 40.0, 20.0));
    evaluate(&r);
    const size_t nq = r.n_quantities;
    evaluate(&r);
    cr_assert_eq(r.n_quantities, nq);
    sg_result_release(&r);
}

Test(qc, empty_result)
{
    struct sg_result r;
    sg_result_init(&r);
    evaluate(&r);
    cr_assert_eq(r.n_flags, 0u);
    cr_assert_str_eq(text_of(&r, "qc_status"), "ok");
    sg_result_release(&r);
}

/* ---- end to end through sg_reduce ---------------------------------------- */

/* METHODS.md 13.10 V2-A (derived): 152H-type hydrometer, W 50.00 g,
 * Gs 2.70, meniscus 1.0, composite correction 5.0, 22 C, effective depth
 * L = 162.95 - 1.64 (R + Cm) mm (METHODS.md 3.3, D422 Table 2 derived). */
static const double v2a_t_min[] = {2, 5, 15, 30, 60, 250, 1440};
static const double v2a_r[] = {45.0, 41.0, 36.0, 32.0, 28.0, 22.0, 15.0};
static const double v2a_p[] = {79.11, 71.20, 61.31, 53.40, 45.49, 33.62, 19.78};

static void v2a_record(struct sg_record *rec, const double *reading, const double *temp_c)
{
    sg_record_init(rec);
    (void)snprintf(rec->id, sizeof rec->id, "V2A");
    rec->pos_id = (struct sg_srcpos){1, 1};
    rec->method = SG_METHOD_HYDROMETER;
    rec->pos_method = (struct sg_srcpos){2, 1};
    rec->particle_density_mg_m3 = 2.70;
    rec->pos_particle_density = (struct sg_srcpos){3, 1};
    rec->specimen_dry_mass_g = 50.00;
    rec->pos_specimen_mass = (struct sg_srcpos){4, 1};
    rec->scale = SG_SCALE_G_PER_L;
    rec->pos_scale = (struct sg_srcpos){5, 1};
    rec->has_depth_line = true;
    rec->depth_line_mm[0] = 162.95;
    rec->depth_line_mm[1] = -1.64;
    rec->pos_depth_line = (struct sg_srcpos){6, 1};
    rec->has_meniscus = true;
    rec->meniscus_correction = 1.0;
    rec->pos_meniscus = (struct sg_srcpos){7, 1};
    rec->has_composite = true;
    rec->composite_correction = 5.0;
    rec->pos_composite = (struct sg_srcpos){8, 1};
    for (size_t i = 0; i < sizeof v2a_t_min / sizeof v2a_t_min[0]; i++) {
        struct sg_reading_row row = {v2a_t_min[i], reading[i], temp_c[i], false, 0.0,
                                     {(unsigned)(10 + i), 1}, 0};
        cr_assert_eq(sg_record_add_reading(rec, row), SG_OK);
    }
}

Test(qc, clean_run_through_reduce_has_status_ok)
{
    const double temp_c[] = {22, 22, 22, 22, 22, 22, 22};
    struct sg_record rec;
    v2a_record(&rec, v2a_r, temp_c);
    struct sg_result res;
    sg_result_init(&res);
    struct sg_error err;
    cr_assert_eq(sg_reduce(&rec, NULL, NULL, &res, &err), SG_OK, "%s", err.msg);
    cr_assert_eq(res.n_points, 7u);
    for (size_t i = 0; i < res.n_points; i++) {
        cr_assert_float_eq(res.points[i].percent_finer, v2a_p[i], 0.01); /* METHODS.md 13.10 V2-A */
        cr_assert_eq(res.points[i].flags, 0u, "line %u flags %x", res.points[i].line, res.points[i].flags);
    }
    cr_assert_eq(res.n_flags, 0u, "%s: %s", res.n_flags ? res.flags[0].name : "",
                 res.n_flags ? res.flags[0].message : "");
    cr_assert_str_eq(text_of(&res, "qc_status"), "ok");
    sg_result_release(&res);
    sg_record_release(&rec);
}

/* The same run with the 60 min reading 2 units high (it rises above the
 * 30 min one) and the bath 2 C warmer at 250 min. */
Test(qc, faulty_run_through_reduce_fails)
{
    double reading[7];
    memcpy(reading, v2a_r, sizeof reading);
    reading[4] = 34.0; /* 60 min: Rc 29 -> P 57.36 %, above 53.40 % at 30 min */
    const double temp_c[] = {22, 22, 22, 22, 22, 24, 24};
    struct sg_record rec;
    v2a_record(&rec, reading, temp_c);
    struct sg_result res;
    sg_result_init(&res);
    struct sg_error err;
    cr_assert_eq(sg_reduce(&rec, NULL, NULL, &res, &err), SG_OK, "%s", err.msg);
    cr_assert(res.points[4].flags & SG_PF_NOT_FALLING);
    cr_assert(res.points[5].flags & SG_PF_TEMP_DRIFT);
    cr_assert_not(res.points[6].flags & SG_PF_TEMP_DRIFT);
    cr_assert_eq(find_flag(&res, "not_falling")->line, 14u);
    cr_assert_eq(find_flag(&res, "temperature_drift")->line, 15u);
    cr_assert_eq(sg_result_worst(&res), SG_SEVERITY_FAILURE);
    cr_assert_str_eq(text_of(&res, "qc_status"), "failed");
    const char *names = text_of(&res, "qc_flags");
    cr_assert(strstr(names, "not_falling") != NULL && strstr(names, "temperature_drift") != NULL, "%s", names);
    sg_result_release(&res);
    sg_record_release(&rec);
}
