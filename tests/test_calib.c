/* test_calib.c - the calibration register's core: fits against METHODS.md
 * check values and hand calculations, acceptance decisions, validation,
 * entries in force and status on a date. */
#include <criterion/criterion.h>
#include <gsl/gsl_errno.h>
#include <math.h>
#include <string.h>

#include "sedgrade/calib.h"
#include "sedgrade/water.h"

static void setup(void)
{
    gsl_set_error_handler_off();
}

TestSuite(calib, .init = setup);

/* ---- helpers: instruments built in memory ---------------------------------- */

static struct sg_date D(int y, int m, int d)
{
    struct sg_date x = {y, m, d};
    return x;
}

static void ins_new(struct sg_cal_instrument *ins, const char *id, enum sg_cal_kind kind)
{
    sg_cal_instrument_init(ins);
    (void)snprintf(ins->id, sizeof ins->id, "%s", id);
    ins->kind = kind;
    ins->line = 1;
}

/* Starts an event; observations and limits are added to *ev, then ev_push. */
static void ev_new(struct sg_cal_event *ev, struct sg_date date, enum sg_cal_event_type type, struct sg_date due)
{
    sg_cal_event_init(ev);
    ev->date = date;
    ev->type = type;
    ev->line = 10;
    (void)snprintf(ev->by, sizeof ev->by, "tester");
    if (sg_cal_event_is_entry(type)) {
        (void)snprintf(ev->method, sizeof ev->method, "test method");
        ev->has_due = true;
        ev->due = due;
    }
}

static void obs(struct sg_cal_event *ev, enum sg_cal_obs_kind kind, double x, double y)
{
    struct sg_cal_obs o = {.kind = kind, .x = x, .y = y, .pos = {20, 1}};
    cr_assert_eq(sg_cal_event_add_obs(ev, o, NULL), SG_OK);
}

static void limit(struct sg_cal_event *ev, const char *name, double value)
{
    struct sg_cal_limit *l = &ev->limits[ev->n_limits++];
    memset(l, 0, sizeof *l);
    (void)snprintf(l->name, sizeof l->name, "%s", name);
    l->value = value;
    l->pos.line = 30;
    l->pos.col = 7;
}

static void ev_push(struct sg_cal_instrument *ins, struct sg_cal_event *ev)
{
    cr_assert_eq(sg_cal_instrument_add_event(ins, ev, NULL), SG_OK);
}

/* The ASTM 152H geometry (METHODS.md 3.3, 13.3 #29-#33): V_B = 67 cm3, L2 =
 * 14.0 cm, L1 = 10.5 cm at R = 0 and 2.3 cm at R = 50 (D422 Table 2, from
 * memory); the R = 25 point linearly interpolated (6.4 cm, derived). */
static void depth_event_152h(struct sg_cal_event *ev, struct sg_date date, struct sg_date due)
{
    ev_new(ev, date, SG_CAL_EV_CALIBRATION, due);
    (void)snprintf(ev->cylinder, sizeof ev->cylinder, "CY");
    obs(ev, SG_CAL_OBS_BULB_VOLUME, 67.0, 0.0);
    obs(ev, SG_CAL_OBS_BULB_LENGTH, 140.0, 0.0);
    obs(ev, SG_CAL_OBS_NECK, 0.0, 105.0);
    obs(ev, SG_CAL_OBS_NECK, 25.0, 64.0);
    obs(ev, SG_CAL_OBS_NECK, 50.0, 23.0);
    obs(ev, SG_CAL_OBS_MENISCUS, 0.0, 1.0);
    limit(ev, "depth_residual_mm", 0.5);
    limit(ev, "meniscus_spread", 1.0);
}

static void hydrometer_152h(struct sg_cal_instrument *ins)
{
    ins_new(ins, "H152", SG_CAL_HYDROMETER);
    ins->scale = SG_SCALE_G_PER_L;
    ins->has_division = true;
    ins->division = 1.0;
    struct sg_cal_event ev;
    depth_event_152h(&ev, D(2020, 1, 12), D(2030, 1, 12));
    ev_push(ins, &ev);
}

/* ---- elementary fits ----------------------------------------------------- */

Test(calib, line_fit_hand_calculation)
{
    /* Hand calculation: x = 16, 20, 24, 28; y = 3.0, 2.5, 1.5, 0.5.
     * xbar = 22, ybar = 1.875, Sxx = 80, Sxy = -17 -> c1 = -0.2125,
     * c0 = 6.55; residuals -0.15, +0.20, +0.05, -0.10; SSR = 0.075,
     * s^2 = 0.0375; var(c1) = s^2/Sxx = 4.6875e-4; var(c0) = s^2 (1/n +
     * xbar^2/Sxx) = 0.23625; cov = -xbar s^2/Sxx = -0.0103125. */
    const double x[] = {16.0, 20.0, 24.0, 28.0}, y[] = {3.0, 2.5, 1.5, 0.5};
    struct sg_cal_line l;
    double res[4];
    cr_assert_eq(sg_cal_fit_line(x, y, 4, &l, res, NULL), SG_OK);
    cr_assert_float_eq(l.c1, -0.2125, 1e-12);
    cr_assert_float_eq(l.c0, 6.55, 1e-12);
    cr_assert_float_eq(res[0], -0.15, 1e-12);
    cr_assert_float_eq(res[1], 0.20, 1e-12);
    cr_assert_float_eq(res[2], 0.05, 1e-12);
    cr_assert_float_eq(res[3], -0.10, 1e-12);
    cr_assert_float_eq(l.sumsq, 0.075, 1e-12);
    cr_assert_float_eq(l.s, sqrt(0.0375), 1e-12);
    cr_assert_float_eq(l.cov11, 4.6875e-4, 1e-12);
    cr_assert_float_eq(l.cov00, 0.23625, 1e-12);
    cr_assert_float_eq(l.cov01, -0.0103125, 1e-12);
    cr_assert_float_eq(sg_cal_line_eval(&l, 22.0), 1.875, 1e-12);
    /* u at xbar = s/sqrt(n) (hand: sqrt(0.0375/4) = 0.0968246). */
    cr_assert_float_eq(sg_cal_line_u(&l, 22.0), sqrt(0.0375 / 4.0), 1e-9);
}

Test(calib, line_fit_two_points_has_no_scatter)
{
    const double x[] = {0.0, 50.0}, y[] = {105.0, 23.0};
    struct sg_cal_line l;
    cr_assert_eq(sg_cal_fit_line(x, y, 2, &l, NULL, NULL), SG_OK);
    cr_assert_float_eq(l.c1, -1.64, 1e-12); /* (23 - 105)/50, hand */
    cr_assert_float_eq(l.s, 0.0, 0.0);
    cr_assert_float_eq(l.cov00, 0.0, 0.0);
}

Test(calib, line_fit_errors)
{
    const double x[] = {1.0, 1.0, 1.0}, y[] = {1.0, 2.0, 3.0}, bad[] = {1.0, (double)NAN, 3.0};
    struct sg_cal_line l;
    struct sg_error err;
    cr_assert_eq(sg_cal_fit_line(x, y, 1, &l, NULL, &err), SG_EINVAL);
    cr_assert_eq(sg_cal_fit_line(x, y, 3, &l, NULL, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "two different") != NULL, "%s", err.msg);
    cr_assert_eq(sg_cal_fit_line(y, bad, 3, &l, NULL, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "finite") != NULL, "%s", err.msg);
}

Test(calib, depth_rise_term)
{
    /* METHODS.md 3.3: V_B/A = 67/27.8 = 2.41 cm; 0.5 (14.0 - 2.41) = 5.795 cm (derived). */
    cr_assert_float_eq(sg_cal_depth_rise_term_mm(67.0, 140.0, 2780.0), 0.5 * (140.0 - 67000.0 / 2780.0), 1e-12);
    cr_assert_float_eq(sg_cal_depth_rise_term_mm(67.0, 140.0, 2780.0), 57.95, 0.01);
    cr_assert(isnan(sg_cal_depth_rise_term_mm(0.0, 140.0, 2780.0)));
    cr_assert(isnan(sg_cal_depth_rise_term_mm(67.0, 140.0, (double)NAN)));
}

/* ---- depth (METHODS.md 3.3 / 10.1 / 13.3) ----------------------------------- */

Test(calib, depth_152h_line_methods_13_3)
{
    struct sg_cal_instrument ins;
    hydrometer_152h(&ins);
    struct sg_cal_result r;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_DEPTH, 2780.0, &r, NULL), SG_OK);
    cr_assert(r.has_intercept);
    /* METHODS.md 13.3 #31: L = 16.295 - 0.164 R cm, tolerance 1e-3 cm. */
    cr_assert_float_eq(r.line.c0 / 10.0, 16.295, 1e-3);
    cr_assert_float_eq(r.line.c1 / 10.0, -0.164, 1e-6);
    /* #31: L(50) = 8.095 cm. */
    cr_assert_float_eq(sg_cal_line_eval(&r.line, 50.0) / 10.0, 8.095, 1e-3);
    /* #29: R = 0 -> 16.3 cm (Murthy eq. 3.29, read 36), tolerance 0.05 cm. */
    cr_assert_float_eq(sg_cal_line_eval(&r.line, 0.0) / 10.0, 16.3, 0.05);
    /* #30: R = 25 -> 12.2 cm (152H table copy, read), tolerance 0.05 cm. */
    cr_assert_float_eq(sg_cal_line_eval(&r.line, 25.0) / 10.0, 12.2, 0.05);
    /* #33: the 152H table of METHODS.md 3.3 for R = 0..60 (derived), 1e-3 cm. */
    for (int R = 0; R <= 60; R++)
        cr_assert_float_eq(sg_cal_line_eval(&r.line, R) / 10.0, 16.295 - 0.164 * R, 1e-3, "R = %d", R);
    cr_assert(r.accepted);
    cr_assert(strncmp(r.decision, "accepted", 8) == 0, "%s", r.decision);
    cr_assert_float_eq(r.worst, 0.0, 1e-9);
    sg_cal_instrument_release(&ins);
}

Test(calib, depth_151h_line_methods_3_3)
{
    /* 151H: L1 = 10.5 cm at r = 1.000 and 2.3 cm at r = 1.031 (D422 Table 2,
     * from memory), r in reading units (r - 1) 1000 -> L = 16.295 - 264.52 (r - 1)
     * cm (METHODS.md 3.3, derived). */
    struct sg_cal_instrument ins;
    ins_new(&ins, "H151", SG_CAL_HYDROMETER);
    ins.scale = SG_SCALE_DENSITY;
    struct sg_cal_event ev;
    ev_new(&ev, D(2020, 1, 12), SG_CAL_EV_CALIBRATION, D(2030, 1, 12));
    (void)snprintf(ev.cylinder, sizeof ev.cylinder, "CY");
    obs(&ev, SG_CAL_OBS_BULB_VOLUME, 67.0, 0.0);
    obs(&ev, SG_CAL_OBS_BULB_LENGTH, 140.0, 0.0);
    obs(&ev, SG_CAL_OBS_NECK, 0.0, 105.0);
    obs(&ev, SG_CAL_OBS_NECK, 15.5, 64.0);
    obs(&ev, SG_CAL_OBS_NECK, 31.0, 23.0);
    limit(&ev, "depth_residual_mm", 0.5);
    ev_push(&ins, &ev);
    struct sg_cal_result r;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_DEPTH, 2780.0, &r, NULL), SG_OK);
    cr_assert_float_eq(r.line.c1 / 10.0 * 1000.0, -264.52, 0.01);
    /* METHODS.md 3.3 151H table (derived), 1e-3 cm: 1.010 -> 13.650, 1.020 -> 11.005, 1.038 -> 6.243. */
    cr_assert_float_eq(sg_cal_line_eval(&r.line, 10.0) / 10.0, 13.650, 1e-3);
    cr_assert_float_eq(sg_cal_line_eval(&r.line, 20.0) / 10.0, 11.005, 1e-3);
    cr_assert_float_eq(sg_cal_line_eval(&r.line, 38.0) / 10.0, 6.243, 1e-3);
    sg_cal_instrument_release(&ins);
}

Test(calib, depth_without_area_has_slope_and_decision_only)
{
    struct sg_cal_instrument ins;
    hydrometer_152h(&ins);
    struct sg_cal_result r;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_DEPTH, (double)NAN, &r, NULL), SG_OK);
    cr_assert(!r.has_intercept);
    cr_assert(isnan(r.line.c0));
    cr_assert_float_eq(r.neck_c0_mm, 105.0, 1e-9);
    cr_assert_float_eq(r.line.c1, -1.64, 1e-9);
    cr_assert(r.accepted);
    sg_cal_instrument_release(&ins);
}

Test(calib, depth_residual_above_limit_is_rejected)
{
    struct sg_cal_instrument ins;
    ins_new(&ins, "H", SG_CAL_HYDROMETER);
    ins.scale = SG_SCALE_G_PER_L;
    struct sg_cal_event ev;
    ev_new(&ev, D(2020, 1, 12), SG_CAL_EV_CALIBRATION, D(2030, 1, 12));
    (void)snprintf(ev.cylinder, sizeof ev.cylinder, "CY");
    obs(&ev, SG_CAL_OBS_BULB_VOLUME, 67.0, 0.0);
    obs(&ev, SG_CAL_OBS_BULB_LENGTH, 140.0, 0.0);
    /* Hand: points (0,105), (25,65.2), (50,23): the middle is 1.2 mm off the
     * end-point line; LS residuals -0.4, +0.8, -0.4 mm. */
    obs(&ev, SG_CAL_OBS_NECK, 0.0, 105.0);
    obs(&ev, SG_CAL_OBS_NECK, 25.0, 65.2);
    obs(&ev, SG_CAL_OBS_NECK, 50.0, 23.0);
    limit(&ev, "depth_residual_mm", 0.5);
    ev_push(&ins, &ev);
    struct sg_cal_result r;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_DEPTH, 2780.0, &r, NULL), SG_OK);
    cr_assert_float_eq(r.residual[1], 0.8, 1e-9);
    cr_assert_float_eq(r.worst, 0.8, 1e-9);
    cr_assert(!r.accepted);
    cr_assert(strncmp(r.decision, "rejected", 8) == 0, "%s", r.decision);
    sg_cal_instrument_release(&ins);
}

Test(calib, depth_errors)
{
    struct sg_cal_instrument ins;
    ins_new(&ins, "H", SG_CAL_HYDROMETER);
    ins.scale = SG_SCALE_G_PER_L;
    struct sg_cal_event ev;
    ev_new(&ev, D(2020, 1, 12), SG_CAL_EV_CALIBRATION, D(2030, 1, 12));
    obs(&ev, SG_CAL_OBS_BULB_VOLUME, 67.0, 0.0);
    obs(&ev, SG_CAL_OBS_BULB_LENGTH, 140.0, 0.0);
    obs(&ev, SG_CAL_OBS_NECK, 0.0, 105.0);
    obs(&ev, SG_CAL_OBS_NECK, 50.0, 23.0);
    ev_push(&ins, &ev);
    struct sg_cal_result r;
    struct sg_error err;
    /* no limit named */
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_DEPTH, 2780.0, &r, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "depth_residual_mm") != NULL, "%s", err.msg);
    cr_assert_eq(err.line, 10);
    limit(&ins.events[0], "depth_residual_mm", 0.5);
    /* two graduations only */
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_DEPTH, 2780.0, &r, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "at least 3 'neck_mm'") != NULL, "%s", err.msg);
    /* columns swapped: the distance rises with the reading */
    obs(&ins.events[0], SG_CAL_OBS_NECK, 25.0, 64.0);
    ins.events[0].obs[2].y = 23.0;
    ins.events[0].obs[3].y = 105.0;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_DEPTH, 2780.0, &r, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "must fall") != NULL, "%s", err.msg);
    /* a part the event does not carry */
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_BLANK, (double)NAN, &r, &err), SG_ENOTFOUND);
    sg_cal_instrument_release(&ins);
}

/* ---- meniscus, blank, scale ------------------------------------------------------- */

Test(calib, meniscus_hand_calculation)
{
    /* Pairs (top, bottom): (-0.5, 0.5), (0, 1), (-0.5, 1): corrections 1, 1,
     * 1.5 (METHODS.md 10.2: Cm = bottom - top); mean 7/6, s = 0.288675,
     * u = sqrt(s^2/3 + 1/12) = 1/3 with a division of 1 (GUM rectangular). */
    struct sg_cal_instrument ins;
    ins_new(&ins, "H", SG_CAL_HYDROMETER);
    ins.scale = SG_SCALE_G_PER_L;
    ins.has_division = true;
    ins.division = 1.0;
    struct sg_cal_event ev;
    ev_new(&ev, D(2020, 1, 12), SG_CAL_EV_CALIBRATION, D(2030, 1, 12));
    obs(&ev, SG_CAL_OBS_MENISCUS, -0.5, 0.5);
    obs(&ev, SG_CAL_OBS_MENISCUS, 0.0, 1.0);
    obs(&ev, SG_CAL_OBS_MENISCUS, -0.5, 1.0);
    limit(&ev, "meniscus_spread", 0.4);
    ev_push(&ins, &ev);
    struct sg_cal_result r;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_MENISCUS, (double)NAN, &r, NULL), SG_OK);
    cr_assert_float_eq(r.value, 7.0 / 6.0, 1e-12);
    cr_assert_float_eq(r.sd, 0.288675134594813, 1e-12);
    cr_assert_float_eq(r.u, 1.0 / 3.0, 1e-12);
    cr_assert_float_eq(r.worst, 0.5, 1e-12);
    cr_assert(!r.accepted, "spread 0.5 > 0.4: %s", r.decision);
    ins.events[0].limits[0].value = 0.5;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_MENISCUS, (double)NAN, &r, NULL), SG_OK);
    cr_assert(r.accepted, "%s", r.decision);
    /* bottom read above top: refused */
    ins.events[0].obs[0].y = -2.0;
    ins.events[0].obs[1].y = -2.0;
    ins.events[0].obs[2].y = -2.0;
    struct sg_error err;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_MENISCUS, (double)NAN, &r, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "negative") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);
}

Test(calib, blank_line_over_observed_range)
{
    /* The hand-calculated line of line_fit_hand_calculation, as blank readings. */
    struct sg_cal_instrument ins;
    ins_new(&ins, "H", SG_CAL_HYDROMETER);
    ins.scale = SG_SCALE_DENSITY;
    struct sg_cal_event ev;
    ev_new(&ev, D(2020, 1, 12), SG_CAL_EV_CALIBRATION, D(2030, 1, 12));
    obs(&ev, SG_CAL_OBS_BLANK, 16.0, 3.0);
    obs(&ev, SG_CAL_OBS_BLANK, 20.0, 2.5);
    obs(&ev, SG_CAL_OBS_BLANK, 24.0, 1.5);
    obs(&ev, SG_CAL_OBS_BLANK, 28.0, 0.5);
    limit(&ev, "blank_residual", 0.25);
    ev_push(&ins, &ev);
    struct sg_cal_result r;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_BLANK, (double)NAN, &r, NULL), SG_OK);
    cr_assert_float_eq(r.line.c0, 6.55, 1e-12);
    cr_assert_float_eq(r.line.c1, -0.2125, 1e-12);
    cr_assert_float_eq(r.xmin, 16.0, 0.0);
    cr_assert_float_eq(r.xmax, 28.0, 0.0);
    cr_assert_float_eq(r.u, sqrt(0.0375), 1e-12); /* no division given: s only */
    cr_assert_float_eq(r.worst, 0.2, 1e-12);
    cr_assert(r.accepted);
    ins.events[0].limits[0].value = 0.19;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_BLANK, (double)NAN, &r, NULL), SG_OK);
    cr_assert(!r.accepted);
    sg_cal_instrument_release(&ins);
}

Test(calib, scale_reference_of_a_liquid)
{
    /* density scale: (rho - 1) 1000 (SPEC reading_scale). */
    cr_assert_float_eq(sg_cal_scale_reference(SG_SCALE_DENSITY, 1.0374), 37.4, 1e-9);
    /* METHODS.md 3.1 / 13.3 #36: a 152H reads 60 g/L where a 151H reads
     * 1.0374 (specific gravity 20/20), R = 1606.06 (r - 1), tolerance 0.1. */
    const double rho20 = sg_water_density_kg_m3(20.0) / 1000.0;
    cr_assert_float_eq(sg_cal_scale_reference(SG_SCALE_G_PER_L, 1.0374 * rho20), 60.0, 0.1);
    cr_assert_float_eq(sg_cal_scale_reference(SG_SCALE_G_PER_L, 1.0374 * rho20), 1606.06 * 0.0374, 1e-3);
    cr_assert(isnan(sg_cal_scale_reference(SG_SCALE_NONE, 1.0)));
    cr_assert(isnan(sg_cal_scale_reference(SG_SCALE_DENSITY, -1.0)));
}

Test(calib, scale_verification_errors_and_decision)
{
    struct sg_cal_instrument ins;
    ins_new(&ins, "H", SG_CAL_HYDROMETER);
    ins.scale = SG_SCALE_DENSITY;
    struct sg_cal_event ev;
    ev_new(&ev, D(2020, 1, 12), SG_CAL_EV_VERIFICATION, D(2021, 1, 12));
    /* liquids of known density: 0.99821 -> -1.79, 1.01035 -> 10.35, 1.02480 -> 24.80 (density scale, hand) */
    obs(&ev, SG_CAL_OBS_SCALE_LIQUID, 0.99821, -2.0);
    obs(&ev, SG_CAL_OBS_SCALE_LIQUID, 1.01035, 10.5);
    obs(&ev, SG_CAL_OBS_SCALE_REF, 24.80, 25.0);
    limit(&ev, "scale_error_max", 0.5);
    ev_push(&ins, &ev);
    struct sg_cal_result r;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_SCALE, (double)NAN, &r, NULL), SG_OK);
    cr_assert_float_eq(r.x[0], -1.79, 1e-9);
    cr_assert_float_eq(r.residual[0], -0.21, 1e-9);
    cr_assert_float_eq(r.residual[1], 0.15, 1e-9);
    cr_assert_float_eq(r.residual[2], 0.20, 1e-9);
    cr_assert_float_eq(r.worst, 0.21, 1e-9);
    cr_assert(r.accepted);
    ins.events[0].limits[0].value = 0.2;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_SCALE, (double)NAN, &r, NULL), SG_OK);
    cr_assert(!r.accepted);
    /* fewer than three points */
    ins.events[0].n_obs = 2;
    struct sg_error err;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_SCALE, (double)NAN, &r, &err), SG_EINVAL);
    /* a liquid on a hydrometer with no scale */
    ins.events[0].n_obs = 3;
    ins.scale = SG_SCALE_NONE;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_SCALE, (double)NAN, &r, &err), SG_EINVAL);
    cr_assert_eq(err.line, 20);
    sg_cal_instrument_release(&ins);
}

/* ---- cylinder, pipette, thermometer --------------------------------------------------- */

Test(calib, cylinder_area_from_graduations)
{
    /* Hand: heights 50, 194, 374 mm at 100, 500, 1000 mL: slope 0.36 mm/mL,
     * A = 1000/0.36 = 2777.78 mm2. */
    struct sg_cal_instrument ins;
    ins_new(&ins, "CY", SG_CAL_CYLINDER);
    struct sg_cal_event ev;
    ev_new(&ev, D(2020, 1, 12), SG_CAL_EV_CALIBRATION, D(2030, 1, 12));
    obs(&ev, SG_CAL_OBS_GRADUATION, 100.0, 50.0);
    obs(&ev, SG_CAL_OBS_GRADUATION, 500.0, 194.0);
    obs(&ev, SG_CAL_OBS_GRADUATION, 1000.0, 374.0);
    limit(&ev, "graduation_residual_mm", 0.5);
    ev_push(&ins, &ev);
    struct sg_cal_result r;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_AREA, (double)NAN, &r, NULL), SG_OK);
    cr_assert_float_eq(r.value, 1000.0 / 0.36, 1e-6);
    cr_assert_float_eq(r.u, 0.0, 1e-6);
    cr_assert(r.accepted);
    /* heights falling with volume: refused */
    ins.events[0].obs[2].y = 10.0;
    struct sg_error err;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_AREA, (double)NAN, &r, &err), SG_EINVAL);
    sg_cal_instrument_release(&ins);
}

Test(calib, pipette_z_factor_methods_13_8)
{
    /* METHODS.md 10.6 / 13.8 #73: Z(20 C) = 1.002852 mL/g, Z(25 C) = 1.004020
     * mL/g with rho_A = 0.0012, rho_B = 8.0 (derived; published table 1.0029,
     * read 41b). */
    cr_assert_float_eq(sg_cal_pipette_z_ml_g(20.0, 0.0012, 8.0), 1.002852, 1e-6);
    cr_assert_float_eq(sg_cal_pipette_z_ml_g(20.0, 0.0012, 8.0), 1.0029, 5e-5);
    cr_assert_float_eq(sg_cal_pipette_z_ml_g(25.0, 0.0012, 8.0), 1.004020, 1e-6);
    /* #73: 9.9712 g at 20 C -> 9.9996 mL. */
    cr_assert_float_eq(sg_cal_pipette_volume_ml(9.9712, 20.0, 0.0012, 8.0, 9.9e-6), 9.9996, 1e-4);
    /* glass expansion: at 25 C the factor is 1 - 9.9e-6 * 5 (METHODS.md 10.6 formula). */
    cr_assert_float_eq(sg_cal_pipette_volume_ml(10.0, 25.0, 0.0012, 8.0, 9.9e-6),
                       10.0 * sg_cal_pipette_z_ml_g(25.0, 0.0012, 8.0) * (1.0 - 9.9e-6 * 5.0), 1e-12);
    cr_assert(isnan(sg_cal_pipette_z_ml_g(45.0, 0.0012, 8.0)));
    cr_assert(isnan(sg_cal_pipette_volume_ml(-1.0, 20.0, 0.0012, 8.0, 9.9e-6)));
}

static void pipette(struct sg_cal_instrument *ins, const double *mass, size_t n)
{
    ins_new(ins, "PP", SG_CAL_PIPETTE);
    ins->has_nominal = true;
    ins->nominal_ml = 10.0;
    struct sg_cal_event ev;
    ev_new(&ev, D(2020, 1, 12), SG_CAL_EV_CALIBRATION, D(2021, 1, 12));
    ev.water_temp_c = 20.0;
    for (size_t i = 0; i < n; i++)
        obs(&ev, SG_CAL_OBS_DELIVERY, mass[i], 0.0);
    /* Class A 10 mL one-mark pipette +-0.020 mL (METHODS.md 13.8 #74). */
    limit(&ev, "volume_error_ml", 0.020);
    ev_push(ins, &ev);
}

Test(calib, pipette_volume_and_class_a_acceptance)
{
    const double m[] = {9.9712, 9.9712, 9.9712};
    struct sg_cal_instrument ins;
    pipette(&ins, m, 3);
    struct sg_cal_result r;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_VOLUME, (double)NAN, &r, NULL), SG_OK);
    cr_assert_float_eq(r.value, 9.9996, 1e-4); /* METHODS.md 13.8 #73 */
    cr_assert_float_eq(r.sd, 0.0, 1e-12);
    cr_assert_float_eq(r.z_ml_g, 1.002852, 1e-6);
    cr_assert(r.accepted, "%s", r.decision);
    sg_cal_instrument_release(&ins);
    /* 9.9450 g -> 9.9733 mL: 0.027 mL short, outside Class A (+-0.020) (hand, Z(20) above). */
    const double m2[] = {9.9450, 9.9440, 9.9460};
    pipette(&ins, m2, 3);
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_VOLUME, (double)NAN, &r, NULL), SG_OK);
    cr_assert_float_eq(r.value, 9.9450 * 1.002852, 1e-5);
    cr_assert_float_eq(r.sd, 0.001 * 1.002852, 1e-6);
    cr_assert_float_eq(r.u, 0.001 * 1.002852 / sqrt(3.0), 1e-6);
    cr_assert(!r.accepted, "%s", r.decision);
    sg_cal_instrument_release(&ins);
}

Test(calib, pipette_errors)
{
    const double m[] = {9.9712, 9.9712};
    struct sg_cal_instrument ins;
    struct sg_cal_result r;
    struct sg_error err;
    pipette(&ins, m, 2);
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_VOLUME, (double)NAN, &r, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "'delivery'") != NULL, "%s", err.msg);
    obs(&ins.events[0], SG_CAL_OBS_DELIVERY, 9.9712, 0.0);
    ins.events[0].water_temp_c = (double)NAN;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_VOLUME, (double)NAN, &r, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "water_temp_c") != NULL, "%s", err.msg);
    ins.events[0].water_temp_c = 20.0;
    ins.has_nominal = false;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_VOLUME, (double)NAN, &r, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "nominal_ml") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);
}

Test(calib, thermometer_ice_point_correction)
{
    /* METHODS.md 10.5 (read 40): correction = 0 - observed. Readings 0.10,
     * 0.15, 0.10 at the ice point and 20.14 against a reference 20.02:
     * corrections -0.10, -0.15, -0.10, -0.12, mean -0.1175 (hand). */
    struct sg_cal_instrument ins;
    ins_new(&ins, "TH", SG_CAL_THERMOMETER);
    ins.has_division = true;
    ins.division = 0.1;
    struct sg_cal_event ev;
    ev_new(&ev, D(2020, 1, 12), SG_CAL_EV_CALIBRATION, D(2021, 1, 12));
    obs(&ev, SG_CAL_OBS_ICE_POINT, 0.0, 0.10);
    obs(&ev, SG_CAL_OBS_ICE_POINT, 0.0, 0.15);
    obs(&ev, SG_CAL_OBS_ICE_POINT, 0.0, 0.10);
    obs(&ev, SG_CAL_OBS_COMPARISON, 20.02, 20.14);
    limit(&ev, "correction_max_c", 0.5);
    limit(&ev, "residual_max_c", 0.03);
    ev_push(&ins, &ev);
    struct sg_cal_result r;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_OFFSET, (double)NAN, &r, NULL), SG_OK);
    cr_assert_float_eq(r.value, -0.1175, 1e-12);
    cr_assert_float_eq(r.residual[1], -0.0325, 1e-12);
    cr_assert(!r.accepted, "max residual 0.0325 > 0.03: %s", r.decision);
    ins.events[0].limits[1].value = 0.05;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_OFFSET, (double)NAN, &r, NULL), SG_OK);
    cr_assert(r.accepted, "%s", r.decision);
    /* single ice point: correction = -observed exactly; u from the division alone (0.1/sqrt(12)). */
    ins.events[0].n_obs = 1;
    cr_assert_eq(sg_cal_evaluate(&ins, &ins.events[0], SG_CAL_PART_OFFSET, (double)NAN, &r, NULL), SG_OK);
    cr_assert_float_eq(r.value, -0.10, 1e-12);
    cr_assert_float_eq(r.u, 0.1 / sqrt(12.0), 1e-12);
    sg_cal_instrument_release(&ins);
}

/* ---- validation --------------------------------------------------------------------- */

Test(calib, validate_accepts_a_sound_history)
{
    struct sg_cal_instrument ins;
    hydrometer_152h(&ins);
    cr_assert_eq(sg_cal_validate(&ins, NULL), SG_OK);
    sg_cal_instrument_release(&ins);
}

Test(calib, validate_refusals)
{
    struct sg_cal_instrument ins;
    struct sg_cal_event ev;
    struct sg_error err;

    /* hydrometer without a scale */
    hydrometer_152h(&ins);
    ins.scale = SG_SCALE_NONE;
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "scale") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);

    /* event earlier than the previous one */
    hydrometer_152h(&ins);
    ev_new(&ev, D(2019, 5, 1), SG_CAL_EV_REPAIR, D(2019, 5, 1));
    ev_push(&ins, &ev);
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "date order") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);

    /* anything after a retirement */
    hydrometer_152h(&ins);
    ev_new(&ev, D(2021, 5, 1), SG_CAL_EV_RETIREMENT, D(2021, 5, 1));
    ev_push(&ins, &ev);
    ev_new(&ev, D(2021, 6, 1), SG_CAL_EV_RELOCATION, D(2021, 6, 1));
    (void)snprintf(ev.location, sizeof ev.location, "store");
    ev_push(&ins, &ev);
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "retire") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);

    /* due date not after the event date */
    hydrometer_152h(&ins);
    ins.events[0].due = ins.events[0].date;
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "not after") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);

    /* calibration without who, method or due */
    hydrometer_152h(&ins);
    ins.events[0].by[0] = '\0';
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "by,") != NULL, "%s", err.msg);
    ins.events[0].by[0] = 'x';
    ins.events[0].method[0] = '\0';
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "method") != NULL, "%s", err.msg);
    ins.events[0].method[0] = 'x';
    ins.events[0].has_due = false;
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "due") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);

    /* depth calibration that names no cylinder */
    hydrometer_152h(&ins);
    ins.events[0].cylinder[0] = '\0';
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "cylinder") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);

    /* an unknown limit, a duplicate limit, a limit for a part not observed */
    hydrometer_152h(&ins);
    limit(&ins.events[0], "depth_residual", 0.5);
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "unknown limit") != NULL, "%s", err.msg);
    cr_assert_eq(err.line, 30);
    cr_assert_eq(err.col, 7);
    (void)snprintf(ins.events[0].limits[2].name, sizeof ins.events[0].limits[2].name, "depth_residual_mm");
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "twice") != NULL, "%s", err.msg);
    (void)snprintf(ins.events[0].limits[2].name, sizeof ins.events[0].limits[2].name, "blank_residual");
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "has none") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);

    /* an observation of another kind of instrument */
    hydrometer_152h(&ins);
    obs(&ins.events[0], SG_CAL_OBS_ICE_POINT, 0.0, 0.1);
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "thermometer observation") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);

    /* observations in a repair; a relocation without a location */
    hydrometer_152h(&ins);
    ev_new(&ev, D(2021, 5, 1), SG_CAL_EV_REPAIR, D(2021, 5, 1));
    obs(&ev, SG_CAL_OBS_MENISCUS, 0.0, 1.0);
    ev_push(&ins, &ev);
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "not to a repair") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);
    hydrometer_152h(&ins);
    ev_new(&ev, D(2021, 5, 1), SG_CAL_EV_RELOCATION, D(2021, 5, 1));
    ev_push(&ins, &ev);
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "location") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);

    /* no ID, no kind, pipette without a nominal volume */
    ins_new(&ins, "", SG_CAL_THERMOMETER);
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    sg_cal_instrument_release(&ins);
    ins_new(&ins, "X", SG_CAL_KIND_NONE);
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    sg_cal_instrument_release(&ins);
    ins_new(&ins, "X", SG_CAL_PIPETTE);
    cr_assert_eq(sg_cal_validate(&ins, &err), SG_EINVAL);
    cr_assert(strstr(err.msg, "nominal") != NULL, "%s", err.msg);
    sg_cal_instrument_release(&ins);
}

/* ---- status and entries in force --------------------------------------------------------- */

/* A thermometer with a history: calibrated 2020-01-10 (due 2021-01-10),
 * recalibrated 2021-01-05 (due 2022-01-05), out of service 2021-06-01,
 * recalibrated 2021-06-15 but rejected, recalibrated 2021-07-01 (due
 * 2022-07-01), retired 2023-03-01. */
static void ice(struct sg_cal_instrument *ins, struct sg_date date, struct sg_date due, double reading)
{
    struct sg_cal_event ev;
    ev_new(&ev, date, SG_CAL_EV_CALIBRATION, due);
    obs(&ev, SG_CAL_OBS_ICE_POINT, 0.0, reading);
    limit(&ev, "correction_max_c", 0.5);
    ev_push(ins, &ev);
}

static void thermometer_history(struct sg_cal_instrument *ins)
{
    struct sg_cal_event ev;
    ins_new(ins, "TH", SG_CAL_THERMOMETER);
    ice(ins, D(2020, 1, 10), D(2021, 1, 10), 0.1);
    ice(ins, D(2021, 1, 5), D(2022, 1, 5), 0.2);
    ev_new(&ev, D(2021, 6, 1), SG_CAL_EV_OUT_OF_SERVICE, D(2021, 6, 1));
    ev_push(ins, &ev);
    ice(ins, D(2021, 6, 15), D(2022, 6, 15), 0.9); /* correction -0.9 > 0.5: rejected */
    ice(ins, D(2021, 7, 1), D(2022, 7, 1), -0.3);
    ev_new(&ev, D(2023, 3, 1), SG_CAL_EV_RETIREMENT, D(2023, 3, 1));
    ev_push(ins, &ev);
}

static struct sg_cal_status status_on(const struct sg_cal_instrument *ins, struct sg_date d, long within)
{
    struct sg_cal_status s;
    cr_assert_eq(sg_cal_status(ins, d, within, &s, NULL), SG_OK);
    return s;
}

Test(calib, status_through_a_history)
{
    struct sg_cal_instrument ins;
    thermometer_history(&ins);
    cr_assert_eq(sg_cal_validate(&ins, NULL), SG_OK);
    struct sg_cal_status s;

    s = status_on(&ins, D(2019, 12, 31), 30);
    cr_assert_eq(s.state, SG_CAL_OUT_OF_SERVICE);
    cr_assert(strstr(s.reason, "no calibration") != NULL, "%s", s.reason);

    s = status_on(&ins, D(2020, 1, 10), 30); /* the day of the first calibration */
    cr_assert_eq(s.state, SG_CAL_IN_SERVICE);
    cr_assert_eq(s.entry[SG_CAL_PART_OFFSET], 0);
    cr_assert_eq(s.days_to_due, 366); /* 2020 is a leap year: 2020-01-10 .. 2021-01-10 */

    s = status_on(&ins, D(2020, 12, 20), 30);
    cr_assert_eq(s.state, SG_CAL_DUE_SOON);
    cr_assert_eq(s.days_to_due, 21);

    s = status_on(&ins, D(2021, 1, 10), 0); /* due today: still in service */
    cr_assert_eq(s.state, SG_CAL_IN_SERVICE);
    cr_assert_eq(s.entry[SG_CAL_PART_OFFSET], 1);

    s = status_on(&ins, D(2021, 6, 1), 30); /* withdrawn */
    cr_assert_eq(s.state, SG_CAL_OUT_OF_SERVICE);
    cr_assert(strstr(s.reason, "out_of_service on 2021-06-01") != NULL, "%s", s.reason);

    s = status_on(&ins, D(2021, 6, 20), 30); /* recalibrated but rejected */
    cr_assert_eq(s.state, SG_CAL_OUT_OF_SERVICE);
    cr_assert(strstr(s.reason, "rejected") != NULL, "%s", s.reason);
    cr_assert_eq(s.entry[SG_CAL_PART_OFFSET], 3);

    s = status_on(&ins, D(2021, 7, 1), 30);
    cr_assert_eq(s.state, SG_CAL_IN_SERVICE);
    cr_assert_eq(s.entry[SG_CAL_PART_OFFSET], 4);

    s = status_on(&ins, D(2022, 7, 9), 30);
    cr_assert_eq(s.state, SG_CAL_OVERDUE);
    cr_assert_eq(s.days_to_due, -8);
    cr_assert(strstr(s.reason, "2022-07-01") != NULL, "%s", s.reason);

    s = status_on(&ins, D(2023, 3, 1), 30);
    cr_assert_eq(s.state, SG_CAL_RETIRED);
    sg_cal_instrument_release(&ins);
}

Test(calib, status_per_part_and_required_parts)
{
    /* A hydrometer whose blank is recalibrated later than its depth: each part
     * keeps its own entry; the earliest due date governs. */
    struct sg_cal_instrument ins;
    hydrometer_152h(&ins); /* depth + meniscus 2020-01-12, due 2030-01-12 */
    struct sg_cal_event ev;
    ev_new(&ev, D(2021, 3, 1), SG_CAL_EV_CALIBRATION, D(2021, 9, 1));
    obs(&ev, SG_CAL_OBS_BLANK, 16.0, 3.0);
    obs(&ev, SG_CAL_OBS_BLANK, 22.0, 2.0);
    obs(&ev, SG_CAL_OBS_BLANK, 28.0, 1.0);
    limit(&ev, "blank_residual", 0.5);
    ev_push(&ins, &ev);
    struct sg_cal_status s = status_on(&ins, D(2021, 5, 1), 30);
    cr_assert_eq(s.state, SG_CAL_IN_SERVICE);
    cr_assert_eq(s.entry[SG_CAL_PART_DEPTH], 0);
    cr_assert_eq(s.entry[SG_CAL_PART_MENISCUS], 0);
    cr_assert_eq(s.entry[SG_CAL_PART_BLANK], 1);
    cr_assert_eq(s.entry[SG_CAL_PART_SCALE], -1);
    cr_assert_eq(s.due.year, 2021);
    cr_assert_eq(s.due.month, 9);
    s = status_on(&ins, D(2021, 9, 2), 30);
    cr_assert_eq(s.state, SG_CAL_OVERDUE);
    sg_cal_instrument_release(&ins);

    /* After a repair only the blank is recalibrated: depth and meniscus are
     * required, so the hydrometer is out of service. */
    hydrometer_152h(&ins);
    ev_new(&ev, D(2021, 1, 1), SG_CAL_EV_REPAIR, D(2021, 1, 1));
    ev_push(&ins, &ev);
    ev_new(&ev, D(2021, 3, 1), SG_CAL_EV_CALIBRATION, D(2022, 3, 1));
    obs(&ev, SG_CAL_OBS_BLANK, 16.0, 3.0);
    obs(&ev, SG_CAL_OBS_BLANK, 22.0, 2.0);
    obs(&ev, SG_CAL_OBS_BLANK, 28.0, 1.0);
    limit(&ev, "blank_residual", 0.5);
    ev_push(&ins, &ev);
    s = status_on(&ins, D(2021, 5, 1), 30);
    cr_assert_eq(s.state, SG_CAL_OUT_OF_SERVICE);
    cr_assert(strstr(s.reason, "no depth calibration") != NULL, "%s", s.reason);
    sg_cal_instrument_release(&ins);
}

Test(calib, relocation_changes_the_location)
{
    struct sg_cal_instrument ins;
    hydrometer_152h(&ins);
    (void)snprintf(ins.location, sizeof ins.location, "bench 1");
    struct sg_cal_event ev;
    ev_new(&ev, D(2021, 1, 1), SG_CAL_EV_RELOCATION, D(2021, 1, 1));
    (void)snprintf(ev.location, sizeof ev.location, "bench 7");
    ev_push(&ins, &ev);
    cr_assert_str_eq(status_on(&ins, D(2020, 6, 1), 30).location, "bench 1");
    cr_assert_str_eq(status_on(&ins, D(2021, 1, 1), 30).location, "bench 7");
    sg_cal_instrument_release(&ins);
}

Test(calib, entry_labels_and_lookup)
{
    struct sg_cal_instrument ins;
    ins_new(&ins, "TH", SG_CAL_THERMOMETER);
    ice(&ins, D(2020, 1, 10), D(2021, 1, 10), 0.9);  /* as found: rejected */
    struct sg_cal_event ev;
    ev_new(&ev, D(2020, 1, 10), SG_CAL_EV_ADJUSTMENT, D(2020, 1, 10));
    ev_push(&ins, &ev);
    ice(&ins, D(2020, 1, 10), D(2021, 1, 10), 0.1);  /* as left */
    ice(&ins, D(2020, 6, 1), D(2021, 6, 1), 0.1);
    char buf[96];
    sg_cal_entry_label(&ins, 0, buf, sizeof buf);
    cr_assert_str_eq(buf, "TH@2020-01-10#1");
    sg_cal_entry_label(&ins, 2, buf, sizeof buf);
    cr_assert_str_eq(buf, "TH@2020-01-10#2");
    sg_cal_entry_label(&ins, 3, buf, sizeof buf);
    cr_assert_str_eq(buf, "TH@2020-06-01");
    size_t i = 99;
    cr_assert_eq(sg_cal_find_entry(&ins, "2020-01-10#1", &i, NULL), SG_OK);
    cr_assert_eq(i, 0);
    cr_assert_eq(sg_cal_find_entry(&ins, "2020-01-10", &i, NULL), SG_OK);
    cr_assert_eq(i, 2); /* a bare date picks the last entry of the day */
    struct sg_error err;
    cr_assert_eq(sg_cal_find_entry(&ins, "2020-01-11", &i, &err), SG_ENOTFOUND);
    cr_assert_eq(sg_cal_find_entry(&ins, "2020-01-10#3", &i, &err), SG_ENOTFOUND);
    cr_assert_eq(sg_cal_find_entry(&ins, "2020-01-10#x", &i, &err), SG_EPARSE);
    cr_assert_eq(sg_cal_find_entry(&ins, "10/01/2020", &i, &err), SG_EPARSE);
    /* as-left in force after the adjustment */
    struct sg_cal_status s = status_on(&ins, D(2020, 1, 10), 30);
    cr_assert_eq(s.state, SG_CAL_IN_SERVICE);
    cr_assert_eq(s.entry[SG_CAL_PART_OFFSET], 2);
    sg_cal_instrument_release(&ins);
}

Test(calib, names_round_trip)
{
    enum sg_cal_kind k;
    enum sg_cal_event_type t;
    enum sg_cal_obs_kind o;
    cr_assert(sg_cal_kind_parse("pipette", &k) && k == SG_CAL_PIPETTE);
    cr_assert(!sg_cal_kind_parse("balance", &k));
    cr_assert(sg_cal_event_type_parse("out_of_service", &t) && t == SG_CAL_EV_OUT_OF_SERVICE);
    cr_assert(!sg_cal_event_type_parse("Calibration", &t));
    cr_assert(sg_cal_obs_parse("neck_mm", &o) && o == SG_CAL_OBS_NECK);
    for (int i = 0; i < SG_CAL_OBS_COUNT; i++) {
        cr_assert(sg_cal_obs_parse(sg_cal_obs_name((enum sg_cal_obs_kind)i), &o));
        cr_assert_eq((int)o, i);
        cr_assert_eq(sg_cal_part_kind(sg_cal_obs_part(o)) != SG_CAL_KIND_NONE, 1);
    }
    cr_assert_str_eq(sg_cal_state_name(SG_CAL_OVERDUE), "overdue");
    cr_assert_str_eq(sg_cal_part_name(SG_CAL_PART_VOLUME), "volume");
    cr_assert(sg_cal_part_required(SG_CAL_PART_DEPTH));
    cr_assert(!sg_cal_part_required(SG_CAL_PART_BLANK));
    cr_assert(!sg_cal_part_required(SG_CAL_PART_SCALE));
}
