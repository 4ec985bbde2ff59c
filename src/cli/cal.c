/* cal.c - `sedgrade cal`: the instrument calibration register (show, fit,
 * add, status, impact). The computations are calib.h's; files calibio.h's. */
#include <dirent.h>
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>

#include "cli/calplot.h"
#include "cli/cli.h"
#include "sedgrade/calib.h"
#include "sedgrade/calibio.h"
#include "sedgrade/date.h"
#include "sedgrade/recordio.h"
#include "sedgrade/reduce.h"
#include "sedgrade/result.h"

#define CAL_DEFAULT_REGISTER "calibration"
#define CAL_DEFAULT_WITHIN_DAYS 30 /* "due soon" window, common practice */
#define CAL_WITHIN_MAX_DAYS 3660

static const char cal_help[] =
    "usage: sedgrade cal COMMAND [OPTIONS]\n"
    "\n"
    "The instrument calibration register: one CSV file per instrument (<ID>.csv)\n"
    "in a folder, holding its identity and its append-only dated history with the\n"
    "raw observations. sedgrade computes every result (fits with standard errors\n"
    "and residuals, acceptance against the limits each event names) from them.\n"
    "Format: doc/register.md.\n"
    "\n"
    "commands:\n"
    "  show ID [--date D]        identity, history, and the entries in force on D\n"
    "                            (default today) with fits, residuals, decisions, due dates\n"
    "  fit FILE [--area-mm2 A]   compute the results of a standalone observations file\n"
    "                            (register rows, identity optional); nothing is stored.\n"
    "                            A depth calibration takes the cross-section of its named\n"
    "                            cylinder from the register, or A (mm2)\n"
    "  add ID --event FILE       check the event(s) in FILE against ID's history and\n"
    "                            append them (under a lock; earlier lines never change)\n"
    "  status [--date D] [--within N] [--csv]\n"
    "                            every instrument on D (default today): in_service,\n"
    "                            due_soon (within N days, default 30), overdue,\n"
    "                            out_of_service or retired\n"
    "  impact ID --folder DIR --from ENTRY --to ENTRY\n"
    "                            the test records in DIR reduced with ID's entry ENTRY\n"
    "                            (YYYY-MM-DD or YYYY-MM-DD#n) and how d10, d30, d60, clay\n"
    "                            and fines change when reduced with the other; CSV\n"
    "\n"
    "options:\n"
    "      --calibration DIR     (every command) the register folder (default\n"
    "                            ./calibration), as for 'sedgrade reduce';\n"
    "                            --register DIR is the same\n"
    "      --plot FORMAT         (show, fit) also chart each part: svg, png or pdf, written\n"
    "                            to the current folder as ID_DATE.PART.FORMAT\n"
    "  -h, --help                this help\n"
    "\n"
    "exit status: 0 ok; 2 bad input or usage; 3 I/O failure.\n";

enum { OPT_CALIBRATION = 256, OPT_DATE, OPT_WITHIN, OPT_CSV, OPT_EVENT, OPT_FOLDER, OPT_FROM, OPT_TO, OPT_AREA, OPT_PLOT };

struct cal_opts {
    const char *register_dir;
    const char *date_text;
    const char *event_file;
    const char *folder;
    const char *from, *to;
    bool csv;
    size_t within_days;
    bool has_area;
    double area_mm2;
    bool has_plot;
    enum sg_plot_format plot_fmt;
    const char *args[2];
    size_t n_args;
};

static struct sg_date today(void)
{
    const time_t now = time(NULL);
    struct tm tm;
    struct sg_date d = {1970, 1, 1};
    if (localtime_r(&now, &tm) != NULL) {
        d.year = tm.tm_year + 1900;
        d.month = tm.tm_mon + 1;
        d.day = tm.tm_mday;
    }
    return d;
}

static bool parse_date_opt(const struct cal_opts *o, struct sg_date *d)
{
    if (o->date_text == NULL) {
        *d = today();
        return true;
    }
    struct sg_error err;
    if (sg_date_parse(o->date_text, d, &err) != SG_OK) {
        sg_cli_errorf("option --date: %s", err.msg);
        return false;
    }
    return true;
}

/* Parses the options after "cal COMMAND"; positional arguments go to o->args. */
static int parse_opts(int argc, char **argv, struct cal_opts *o)
{
    static const struct option longopts[] = {
        {"calibration", required_argument, NULL, OPT_CALIBRATION},
        {"register", required_argument, NULL, OPT_CALIBRATION}, /* the same: the name the cal command first had */
        {"date", required_argument, NULL, OPT_DATE},
        {"within", required_argument, NULL, OPT_WITHIN},     {"csv", no_argument, NULL, OPT_CSV},
        {"event", required_argument, NULL, OPT_EVENT},       {"folder", required_argument, NULL, OPT_FOLDER},
        {"from", required_argument, NULL, OPT_FROM},         {"to", required_argument, NULL, OPT_TO},
        {"area-mm2", required_argument, NULL, OPT_AREA},     {"help", no_argument, NULL, 'h'},
        {"plot", required_argument, NULL, OPT_PLOT},
        {NULL, 0, NULL, 0}};
    memset(o, 0, sizeof *o);
    o->register_dir = CAL_DEFAULT_REGISTER;
    o->within_days = CAL_DEFAULT_WITHIN_DAYS;
    optind = 1;
    opterr = 0;
    int c;
    while ((c = getopt_long(argc, argv, ":h", longopts, NULL)) != -1) {
        switch (c) {
        case OPT_CALIBRATION: o->register_dir = optarg; break;
        case OPT_DATE: o->date_text = optarg; break;
        case OPT_WITHIN:
            if (!sg_cli_parse_size("--within", optarg, 0, CAL_WITHIN_MAX_DAYS, &o->within_days))
                return SG_EXIT_INPUT;
            break;
        case OPT_CSV: o->csv = true; break;
        case OPT_EVENT: o->event_file = optarg; break;
        case OPT_FOLDER: o->folder = optarg; break;
        case OPT_FROM: o->from = optarg; break;
        case OPT_TO: o->to = optarg; break;
        case OPT_AREA:
            if (!sg_cli_parse_double("--area-mm2", optarg, 1.0, 1e6, &o->area_mm2))
                return SG_EXIT_INPUT;
            o->has_area = true;
            break;
        case OPT_PLOT: {
            struct sg_error perr;
            if (sg_plot_format_parse(optarg, &o->plot_fmt, &perr) != SG_OK) {
                sg_cli_errorf("option --plot: %s", perr.msg);
                return SG_EXIT_INPUT;
            }
            o->has_plot = true;
            break;
        }
        case 'h': fputs(cal_help, stdout); return -1;
        case ':':
            sg_cli_errorf("option %s needs a value (see 'sedgrade cal --help')", argv[optind - 1]);
            return SG_EXIT_INPUT;
        default:
            sg_cli_errorf("unknown option '%s' (see 'sedgrade cal --help')", argv[optind - 1]);
            return SG_EXIT_INPUT;
        }
    }
    for (int i = optind; i < argc; i++) {
        if (o->n_args >= sizeof o->args / sizeof o->args[0]) {
            sg_cli_errorf("unexpected argument '%s' (see 'sedgrade cal --help')", argv[i]);
            return SG_EXIT_INPUT;
        }
        o->args[o->n_args++] = argv[i];
    }
    return SG_EXIT_OK;
}

/* ---- printing results ---------------------------------------------------------- */

static void print_line_stats(const struct sg_cal_line *l, const char *unit)
{
    printf("    u(c0) = %.4g %s, u(c1) = %.4g %s per unit, cov(c0,c1) = %.4g, s = %.4g %s, n = %zu\n",
           sqrt(l->cov00), unit, sqrt(l->cov11), unit, l->cov01 + 0.0, l->s, unit, l->n);
}

static void print_result(const struct sg_cal_instrument *ins, const struct sg_cal_result *r)
{
    switch (r->part) {
    case SG_CAL_PART_DEPTH:
        if (r->has_intercept) {
            printf("    H = %.3f %c %.4f R mm   (0.5 (h - V/A) = %.3f mm with V = %.3f mL, h = %.3f mm, A = %.1f "
                   "mm2)\n",
                   r->line.c0, r->line.c1 < 0.0 ? '-' : '+', fabs(r->line.c1), r->rise_term_mm, r->bulb_volume_ml, r->bulb_length_mm, r->area_mm2);
        } else {
            printf("    neck distance = %.3f %c %.4f R mm; no cylinder cross-section, so no intercept (V = %.3f "
                   "mL, h = %.3f mm)\n",
                   r->neck_c0_mm, r->line.c1 < 0.0 ? '-' : '+', fabs(r->line.c1), r->bulb_volume_ml, r->bulb_length_mm);
        }
        print_line_stats(&r->line, "mm");
        printf("    %10s %10s %10s %10s %12s\n", "reading", "neck_mm", "H_mm", "fit_mm", "residual_mm");
        for (size_t i = 0; i < r->n; i++) {
            const double neck = r->has_intercept ? r->y[i] - r->rise_term_mm : r->y[i];
            if (r->has_intercept)
                printf("    %10g %10.2f %10.3f %10.3f %+12.3f\n", r->x[i], neck, r->y[i], r->y[i] - r->residual[i],
                       r->residual[i]);
            else
                printf("    %10g %10.2f %10s %10.3f %+12.3f\n", r->x[i], neck, "-", neck - r->residual[i],
                       r->residual[i]);
        }
        break;
    case SG_CAL_PART_MENISCUS:
        printf("    Cm = %.3f reading units (bottom - top), u = %.3f, s = %.3f, n = %zu\n", r->value, r->u, r->sd,
               r->n);
        printf("    %10s %10s %12s %10s\n", "top", "bottom", "correction", "residual");
        for (size_t i = 0; i < r->n; i++)
            printf("    %10g %10g %12.3f %+10.3f\n", r->x[i], r->x[i] + r->y[i], r->y[i], r->residual[i]);
        break;
    case SG_CAL_PART_BLANK:
        printf("    blank = %.4f %c %.5f T (T in C, valid %.1f-%.1f C, no extrapolation), u = %.3f reading units\n",
               r->line.c0, r->line.c1 < 0.0 ? '-' : '+', fabs(r->line.c1), r->xmin, r->xmax, r->u);
        print_line_stats(&r->line, "units");
        printf("    %10s %10s %10s %10s\n", "temp_c", "reading", "fit", "residual");
        for (size_t i = 0; i < r->n; i++)
            printf("    %10g %10g %10.3f %+10.3f\n", r->x[i], r->y[i], r->y[i] - r->residual[i], r->residual[i]);
        break;
    case SG_CAL_PART_SCALE:
        printf("    reading = %.4f + %.5f x reference; mean error %+.3f reading units, n = %zu\n", r->line.c0,
               r->line.c1, r->value, r->n);
        printf("    %10s %10s %10s\n", "reference", "reading", "error");
        for (size_t i = 0; i < r->n; i++)
            printf("    %10.3f %10g %+10.3f\n", r->x[i], r->y[i], r->residual[i]);
        break;
    case SG_CAL_PART_AREA:
        printf("    A = %.1f mm2 (%.3f cm2), u = %.1f mm2; height = %.3f + %.5f V mm (V in mL)\n", r->value,
               r->value / 100.0, r->u, r->line.c0, r->line.c1);
        print_line_stats(&r->line, "mm");
        printf("    %10s %10s %10s %12s\n", "volume_ml", "height_mm", "fit_mm", "residual_mm");
        for (size_t i = 0; i < r->n; i++)
            printf("    %10g %10g %10.3f %+12.3f\n", r->x[i], r->y[i], r->y[i] - r->residual[i], r->residual[i]);
        break;
    case SG_CAL_PART_VOLUME:
        printf("    V20 = %.4f mL (nominal %g mL), s = %.4f mL, u = %.4f mL, n = %zu; Z = %.6f mL/g at %.2f C\n",
               r->value, ins->nominal_ml, r->sd, r->u, r->n, r->z_ml_g, r->water_temp_c);
        printf("    %10s %12s %12s\n", "mass_g", "volume_ml", "residual_ml");
        for (size_t i = 0; i < r->n; i++)
            printf("    %10.4f %12.4f %+12.4f\n", r->x[i], r->y[i], r->residual[i]);
        break;
    case SG_CAL_PART_OFFSET:
        printf("    correction = %+.3f C (added to every reading), s = %.3f C, u = %.3f C, n = %zu\n", r->value, r->sd,
               r->u, r->n);
        printf("    %12s %10s %12s %10s\n", "reference_c", "reading_c", "correction_c", "residual");
        for (size_t i = 0; i < r->n; i++)
            printf("    %12.2f %10.2f %+12.3f %+10.3f\n", r->x[i], r->x[i] - r->y[i], r->y[i], r->residual[i]);
        break;
    case SG_CAL_PART_COUNT: break;
    }
    printf("    %s\n", r->decision);
}

static void print_identity(const struct sg_cal_instrument *ins)
{
    printf("%s: %s\n", ins->id, sg_cal_kind_name(ins->kind));
    if (ins->maker[0] || ins->model[0] || ins->serial[0])
        printf("  maker %s; model %s; serial %s\n", ins->maker[0] ? ins->maker : "-", ins->model[0] ? ins->model : "-",
               ins->serial[0] ? ins->serial : "-");
    if (ins->kind == SG_CAL_HYDROMETER)
        printf("  scale %s\n", sg_scale_name(ins->scale));
    if (ins->has_range)
        printf("  range %g to %g\n", ins->range_min, ins->range_max);
    if (ins->has_division)
        printf("  division %g\n", ins->division);
    if (ins->has_nominal)
        printf("  nominal %g mL\n", ins->nominal_ml);
    if (ins->note[0])
        printf("  note %s\n", ins->note);
}

/* Cross-section for a depth part: --area-mm2, else the named cylinder in force on d. */
static double area_for(const char *register_dir, const struct sg_cal_event *ev, struct sg_date d, bool has_area,
                       double area_mm2, char *label, size_t size)
{
    label[0] = '\0';
    if (has_area) {
        (void)snprintf(label, size, "given --area-mm2");
        return area_mm2;
    }
    struct sg_cal_instrument cyl;
    struct sg_error err;
    double a = (double)NAN;
    if (ev->cylinder[0] == '\0') {
        (void)snprintf(label, size, "no cylinder named");
        return (double)NAN;
    }
    if (sg_calibio_load(register_dir, ev->cylinder, &cyl, &err) != SG_OK) {
        (void)snprintf(label, size, "cylinder %s: %.200s", ev->cylinder, err.msg);
    } else {
        struct sg_cal_status st;
        if (sg_cal_status(&cyl, d, 0, &st, &err) == SG_OK && st.entry[SG_CAL_PART_AREA] >= 0) {
            struct sg_cal_result *res = malloc(sizeof *res);
            if (res != NULL &&
                sg_cal_evaluate(&cyl, &cyl.events[st.entry[SG_CAL_PART_AREA]], SG_CAL_PART_AREA, (double)NAN, res, &err) ==
                    SG_OK) {
                char entry[96];
                sg_cal_entry_label(&cyl, (size_t)st.entry[SG_CAL_PART_AREA], entry, sizeof entry);
                a = res->value;
                (void)snprintf(label, size, "cylinder %s%s", entry,
                               st.state == SG_CAL_IN_SERVICE || st.state == SG_CAL_DUE_SOON ? "" : ", not in service");
            }
            free(res);
        } else {
            char dt[11];
            sg_date_format(d, dt);
            (void)snprintf(label, size, "cylinder %s has no area entry on %s", ev->cylinder, dt);
        }
    }
    sg_cal_instrument_release(&cyl);
    return a;
}

/* Prints every part of event i. Returns the exit status: SG_EXIT_INPUT
 * if an evaluation failed, the chart's status if one could not be written
 * (the larger), else SG_EXIT_OK. */
static int print_event_parts(const struct sg_cal_instrument *ins, size_t i, const struct cal_opts *o,
                              struct sg_date d, unsigned only_parts)
{
    const struct sg_cal_event *ev = &ins->events[i];
    const unsigned parts = sg_cal_event_parts(ev) & only_parts;
    struct sg_cal_result *res = malloc(sizeof *res);
    if (res == NULL) {
        sg_cli_errorf("out of memory evaluating a calibration entry");
        return SG_EXIT_IO;
    }
    int rc = SG_EXIT_OK; /* the largest status met */
    char label[96];
    sg_cal_entry_label(ins, i, label, sizeof label);
    for (unsigned p = 0; p < SG_CAL_PART_COUNT; p++) {
        if (!(parts & (1u << p)))
            continue;
        double area = (double)NAN;
        char why[300] = "";
        if (p == SG_CAL_PART_DEPTH)
            area = area_for(o->register_dir, ev, d, o->has_area, o->area_mm2, why, sizeof why);
        struct sg_error err;
        if (sg_cal_evaluate(ins, ev, (enum sg_cal_part)p, area, res, &err) != SG_OK) {
            sg_cli_errorf("%s: %s part: %s", label, sg_cal_part_name((enum sg_cal_part)p), err.msg);
            rc = rc > SG_EXIT_INPUT ? rc : SG_EXIT_INPUT;
            continue;
        }
        char due[11] = "-";
        if (ev->has_due)
            sg_date_format(ev->due, due);
        printf("%s: %s (%s, due %s)%s%s%s\n", sg_cal_part_name((enum sg_cal_part)p), label,
               sg_cal_event_type_name(ev->type), due, why[0] ? " [" : "", why, why[0] ? "]" : "");
        print_result(ins, res);
        if (o->has_plot) {
            const int pr = sg_cli_cal_plot(ins, i, res, o->plot_fmt, ".");
            if (pr > rc)
                rc = pr;
        }
    }
    free(res);
    return rc;
}

/* ---- show ------------------------------------------------------------------------ */

static const char *event_decision(const struct sg_cal_instrument *ins, const struct sg_cal_event *ev)
{
    if (!sg_cal_event_is_entry(ev->type))
        return "-";
    struct sg_cal_result *res = malloc(sizeof *res);
    if (res == NULL)
        return "?";
    const char *d = "accepted";
    const unsigned parts = sg_cal_event_parts(ev);
    for (unsigned p = 0; p < SG_CAL_PART_COUNT; p++) {
        struct sg_error err;
        if (!(parts & (1u << p)))
            continue;
        if (sg_cal_evaluate(ins, ev, (enum sg_cal_part)p, (double)NAN, res, &err) != SG_OK)
            d = "error";
        else if (!res->accepted)
            d = "rejected";
    }
    free(res);
    return d;
}

static void print_status_line(const struct sg_cal_status *st, struct sg_date d)
{
    char dt[11], due[11] = "-";
    sg_date_format(d, dt);
    if (st->has_due)
        sg_date_format(st->due, due);
    printf("  status on %s: %s", dt, sg_cal_state_name(st->state));
    if (st->has_due && st->state != SG_CAL_OUT_OF_SERVICE && st->state != SG_CAL_RETIRED)
        printf(", due %s (%ld days)", due, st->days_to_due);
    if (st->reason[0])
        printf(": %s", st->reason);
    printf("\n  location %s\n", st->location[0] ? st->location : "-");
}

static int cal_show(const struct cal_opts *o)
{
    if (o->n_args != 1) {
        sg_cli_errorf("'cal show' needs one instrument ID (see 'sedgrade cal --help')");
        return SG_EXIT_INPUT;
    }
    struct sg_date d;
    if (!parse_date_opt(o, &d))
        return SG_EXIT_INPUT;
    struct sg_cal_instrument ins;
    struct sg_error err;
    char path[4096];
    enum sg_status st = sg_calibio_load(o->register_dir, o->args[0], &ins, &err);
    if (st != SG_OK) {
        const bool located = err.line > 0 && sg_calibio_path(o->register_dir, o->args[0], path, sizeof path);
        sg_cli_report(located ? path : NULL, &err);
        sg_cal_instrument_release(&ins);
        return sg_cli_exit_for(st);
    }
    struct sg_cal_status stat;
    if ((st = sg_cal_status(&ins, d, (long)o->within_days, &stat, &err)) != SG_OK) {
        sg_cli_report(NULL, &err);
        sg_cal_instrument_release(&ins);
        return sg_cli_exit_for(st);
    }
    print_identity(&ins);
    print_status_line(&stat, d);
    printf("\nhistory\n");
    printf("  %-10s  %-14s %-22s %-26s %-9s %s\n", "date", "event", "by", "parts", "decision", "due");
    for (size_t i = 0; i < ins.n_events; i++) {
        const struct sg_cal_event *ev = &ins.events[i];
        char date[11], due[11] = "-", parts[64] = "";
        sg_date_format(ev->date, date);
        if (ev->has_due)
            sg_date_format(ev->due, due);
        const unsigned bits = sg_cal_event_parts(ev);
        for (unsigned p = 0; p < SG_CAL_PART_COUNT; p++)
            if (bits & (1u << p)) {
                const size_t len = strlen(parts);
                (void)snprintf(parts + len, sizeof parts - len, "%s%s", len ? " " : "",
                               sg_cal_part_name((enum sg_cal_part)p));
            }
        printf("  %-10s  %-14s %-22s %-26s %-9s %s\n", date, sg_cal_event_type_name(ev->type), ev->by,
               parts[0] ? parts : "-", event_decision(&ins, ev), due);
        if (ev->method[0])
            printf("      method: %s\n", ev->method);
        if (ev->reviewed_by[0])
            printf("      reviewed by: %s\n", ev->reviewed_by);
        if (ev->cylinder[0])
            printf("      cylinder: %s\n", ev->cylinder);
        if (ev->thermometer[0])
            printf("      thermometer: %s\n", ev->thermometer);
        if (ev->dispersant[0])
            printf("      dispersant: %s\n", ev->dispersant);
        if (ev->location[0])
            printf("      location: %s\n", ev->location);
        for (size_t j = 0; j < ev->n_refs; j++)
            printf("      reference: %s\n", ev->refs[j]);
        for (size_t j = 0; j < ev->n_notes; j++)
            printf("      note: %s\n", ev->notes[j]);
    }
    char dt[11];
    sg_date_format(d, dt);
    printf("\nin force on %s\n", dt);
    bool any = false;
    int rc = SG_EXIT_OK;
    for (unsigned p = 0; p < SG_CAL_PART_COUNT; p++) {
        if (stat.entry[p] < 0)
            continue;
        /* Print each event once, with the parts for which it is in force. */
        bool first = true;
        for (unsigned q = 0; q < p; q++)
            if (stat.entry[q] == stat.entry[p])
                first = false;
        if (!first)
            continue;
        unsigned parts = 0;
        for (unsigned q = p; q < SG_CAL_PART_COUNT; q++)
            if (stat.entry[q] == stat.entry[p])
                parts |= 1u << q;
        const int pr = print_event_parts(&ins, (size_t)stat.entry[p], o, d, parts);
        if (pr > rc)
            rc = pr;
        any = true;
    }
    if (!any)
        printf("  nothing in force\n");
    sg_cal_instrument_release(&ins);
    return rc;
}

/* ---- fit ----------------------------------------------------------------------------- */

static int cal_fit(const struct cal_opts *o)
{
    if (o->n_args != 1) {
        sg_cli_errorf("'cal fit' needs one observations file (see 'sedgrade cal --help')");
        return SG_EXIT_INPUT;
    }
    /* Read as 'reduce' reads a test record: a missing file is an I/O failure (exit 3). */
    char *text = NULL;
    size_t len = 0;
    struct sg_error err;
    enum sg_status st = sg_calibio_read_input(o->args[0], &text, &len, &err);
    if (st != SG_OK) {
        sg_cli_report(o->args[0], &err);
        return sg_cli_exit_for(st);
    }
    struct sg_cal_instrument ins;
    st = sg_calibio_parse(text, len, SG_CALIBIO_STANDALONE, &ins, &err);
    free(text);
    if (st != SG_OK) {
        sg_cli_report(o->args[0], &err);
        sg_cal_instrument_release(&ins);
        return sg_cli_exit_for(st);
    }
    printf("%s (%s), not stored\n", o->args[0], sg_cal_kind_name(ins.kind));
    int rc = SG_EXIT_OK;
    for (size_t i = 0; i < ins.n_events; i++) {
        if (!sg_cal_event_is_entry(ins.events[i].type))
            continue;
        const int pr = print_event_parts(&ins, i, o, ins.events[i].date, ~0u);
        if (pr > rc)
            rc = pr;
    }
    sg_cal_instrument_release(&ins);
    return rc;
}

/* ---- add ---------------------------------------------------------------------------- */

static int cal_add(const struct cal_opts *o)
{
    if (o->n_args != 1 || o->event_file == NULL) {
        sg_cli_errorf("'cal add' needs an instrument ID and --event FILE (see 'sedgrade cal --help')");
        return SG_EXIT_INPUT;
    }
    char *text = NULL;
    size_t len = 0;
    struct sg_error err;
    enum sg_status st = sg_calibio_read_input(o->event_file, &text, &len, &err);
    if (st != SG_OK) {
        sg_cli_report(o->event_file, &err);
        return sg_cli_exit_for(st);
    }
    st = sg_calibio_append(o->register_dir, o->args[0], text, len, &err);
    free(text);
    if (st != SG_OK) {
        sg_cli_report(err.line > 0 ? o->event_file : NULL, &err);
        return sg_cli_exit_for(st);
    }
    char path[4096];
    (void)sg_calibio_path(o->register_dir, o->args[0], path, sizeof path);
    fprintf(stderr, "sedgrade: added the events of %s to %s\n", o->event_file, path);
    return SG_EXIT_OK;
}

/* ---- status -------------------------------------------------------------------------- */

/* Writes a CSV field, quoted when needed. */
static void csv_field(const char *s, bool last)
{
    const bool q = strpbrk(s, ",\"\n\r;") != NULL;
    if (q) {
        putchar('"');
        for (const char *p = s; *p; p++) {
            if (*p == '"')
                putchar('"');
            putchar(*p);
        }
        putchar('"');
    } else {
        fputs(s, stdout);
    }
    putchar(last ? '\n' : ',');
}

static int cal_status(const struct cal_opts *o)
{
    if (o->n_args != 0) {
        sg_cli_errorf("'cal status' takes no arguments (see 'sedgrade cal --help')");
        return SG_EXIT_INPUT;
    }
    struct sg_date d;
    if (!parse_date_opt(o, &d))
        return SG_EXIT_INPUT;
    struct sg_cal_register reg;
    struct sg_diag_list diags = {0};
    struct sg_error err;
    enum sg_status st = sg_calibio_load_register(o->register_dir, &reg, &diags, &err);
    /* A failure with no file reported is the folder's own (missing, a file, unreadable) or memory. */
    if (st != SG_OK && diags.n == 0) {
        sg_cli_report(NULL, &err);
        sg_cal_register_release(&reg);
        sg_diag_release(&diags);
        return sg_cli_exit_for(st);
    }
    for (size_t i = 0; i < diags.n; i++)
        sg_cli_report(NULL, &diags.items[i]);
    char dt[11];
    sg_date_format(d, dt);
    if (o->csv)
        printf("instrument,kind,status,due_date,days_to_due,last_event_date,last_event,location,reason\n");
    else
        printf("register %s on %s (due soon = within %zu days)\n%-13s %-12s %-15s %-11s %6s  %s\n", o->register_dir,
               dt, o->within_days, "instrument", "kind", "status", "due", "days", "reason / location");
    int rc = diags.n > 0 ? SG_EXIT_INPUT : SG_EXIT_OK;
    for (size_t i = 0; i < reg.n; i++) {
        const struct sg_cal_instrument *ins = &reg.items[i];
        struct sg_cal_status s;
        if (sg_cal_status(ins, d, (long)o->within_days, &s, &err) != SG_OK) {
            sg_cli_errorf("%s: %s", ins->id, err.msg);
            rc = SG_EXIT_INPUT;
            continue;
        }
        char due[11] = "", days[24] = "", last[11] = "";
        if (s.has_due) {
            sg_date_format(s.due, due);
            (void)snprintf(days, sizeof days, "%ld", s.days_to_due);
        }
        if (s.last_event >= 0)
            sg_date_format(ins->events[s.last_event].date, last);
        if (o->csv) {
            csv_field(ins->id, false);
            csv_field(sg_cal_kind_name(ins->kind), false);
            csv_field(sg_cal_state_name(s.state), false);
            csv_field(due, false);
            csv_field(days, false);
            csv_field(last, false);
            csv_field(s.last_event >= 0 ? sg_cal_event_type_name(ins->events[s.last_event].type) : "", false);
            csv_field(s.location, false);
            csv_field(s.reason, true);
        } else {
            printf("%-13s %-12s %-15s %-11s %6s  %s\n", ins->id, sg_cal_kind_name(ins->kind),
                   sg_cal_state_name(s.state), due[0] ? due : "-", days[0] ? days : "-",
                   s.reason[0] ? s.reason : s.location);
        }
    }
    sg_cal_register_release(&reg);
    sg_diag_release(&diags);
    return rc;
}

/* ---- impact ---------------------------------------------------------------------------- */

struct file_list {
    char **items;
    size_t n, cap;
};

static void file_list_release(struct file_list *l)
{
    for (size_t i = 0; i < l->n; i++)
        free(l->items[i]);
    free(l->items);
}

static bool file_list_add(struct file_list *l, const char *path)
{
    if (l->n == l->cap) {
        const size_t cap = l->cap ? 2 * l->cap : 64;
        char **p = realloc(l->items, cap * sizeof *p);
        if (p == NULL)
            return false;
        l->items = p;
        l->cap = cap;
    }
    const size_t len = strlen(path);
    l->items[l->n] = malloc(len + 1);
    if (l->items[l->n] == NULL)
        return false;
    memcpy(l->items[l->n], path, len + 1);
    l->n++;
    return true;
}

/* Collects *.csv under dir (hidden entries skipped), depth-limited. */
static bool walk(const char *dir, struct file_list *out, int depth)
{
    DIR *d = opendir(dir);
    if (d == NULL)
        return false;
    const struct dirent *de;
    bool ok = true;
    while (ok && (de = readdir(d)) != NULL) {
        if (de->d_name[0] == '.')
            continue;
        char path[4096];
        const int n = snprintf(path, sizeof path, "%s/%s", dir, de->d_name);
        if (n < 0 || (size_t)n >= sizeof path)
            continue;
        struct stat sb;
        if (stat(path, &sb) != 0)
            continue;
        if (S_ISDIR(sb.st_mode)) {
            if (depth < 16)
                (void)walk(path, out, depth + 1);
        } else if (sg_cli_is_record_name(de->d_name)) {
            ok = file_list_add(out, path);
        }
    }
    (void)closedir(d);
    return ok;
}

static int cmp_path(const void *a, const void *b)
{
    return strcmp(*(char *const *)a, *(char *const *)b);
}

static bool uses_entry(const char *used, const char *label)
{
    const size_t n = strlen(label);
    for (const char *p = used; (p = strstr(p, label)) != NULL; p += n)
        if ((p == used || p[-1] == ';') && (p[n] == '\0' || p[n] == ';'))
            return true;
    return false;
}

static void print_change(const char *file, const struct sg_record *rec, const struct sg_result *a,
                         const struct sg_result *b)
{
    static const char *const names[] = {"d10_mm", "d30_mm", "d60_mm", "clay_pct", "fines_pct"};
    char date[11];
    sg_date_format(rec->date, date);
    for (size_t i = 0; i < sizeof names / sizeof names[0]; i++) {
        const struct sg_quantity *qa = sg_result_quantity(a, names[i]);
        const struct sg_quantity *qb = sg_result_quantity(b, names[i]);
        csv_field(file, false);
        csv_field(rec->id, false);
        csv_field(date, false);
        csv_field(names[i], false);
        const bool da = qa != NULL && qa->determined && !qa->is_text;
        const bool db = qb != NULL && qb->determined && !qb->is_text;
        if (da)
            printf("%.6g,", qa->value);
        else
            printf(",");
        if (db)
            printf("%.6g,", qb->value);
        else
            printf(",");
        if (da && db) {
            printf("%.4g,", qb->value - qa->value);
            if (qa->value != 0.0)
                printf("%.3g\n", 100.0 * (qb->value - qa->value) / qa->value);
            else
                printf("\n");
        } else {
            printf(",\n");
        }
    }
}

static int cal_impact(const struct cal_opts *o)
{
    if (o->n_args != 1 || o->folder == NULL || o->from == NULL || o->to == NULL) {
        sg_cli_errorf("'cal impact' needs an instrument ID, --folder DIR, --from ENTRY and --to ENTRY (see "
                      "'sedgrade cal --help')");
        return SG_EXIT_INPUT;
    }
    const char *id = o->args[0];
    struct sg_cal_instrument ins;
    struct sg_error err;
    enum sg_status st = sg_calibio_load(o->register_dir, id, &ins, &err);
    size_t from_idx = 0, to_idx = 0;
    if (st == SG_OK && (st = sg_cal_find_entry(&ins, o->from, &from_idx, &err)) == SG_OK)
        st = sg_cal_find_entry(&ins, o->to, &to_idx, &err);
    char from_label[96] = "", to_label[96] = "";
    if (st == SG_OK) {
        sg_cal_entry_label(&ins, from_idx, from_label, sizeof from_label);
        sg_cal_entry_label(&ins, to_idx, to_label, sizeof to_label);
    }
    sg_cal_instrument_release(&ins);
    if (st != SG_OK) {
        sg_cli_report(NULL, &err);
        return sg_cli_exit_for(st);
    }
    const char *to_entry = strchr(to_label, '@') + 1;
    struct file_list files = {0};
    struct stat sb;
    /* A folder that cannot be opened is an I/O failure, as a missing record is for 'reduce'. */
    if (stat(o->folder, &sb) != 0) {
        sg_cli_errorf("%s: cannot open '%s': %s (check the path and its permissions)", o->folder, o->folder,
                      strerror(errno));
        return SG_EXIT_IO;
    }
    if (!S_ISDIR(sb.st_mode)) {
        sg_cli_errorf("--folder '%s' is a file, not a folder (give --folder DIR, the folder of the test records)",
                      o->folder);
        return SG_EXIT_INPUT;
    }
    if (!walk(o->folder, &files, 0)) {
        sg_cli_errorf("cannot list '%s'", o->folder);
        file_list_release(&files);
        return SG_EXIT_IO;
    }
    qsort(files.items, files.n, sizeof *files.items, cmp_path);
    printf("file,test_id,test_date,quantity,with_%s,with_%s,change,change_pct\n", from_label, to_label);
    size_t affected = 0, skipped = 0;
    int rc = SG_EXIT_OK;
    bool said_rejected = false;
    struct sg_result ra, rb;
    sg_result_init(&ra);
    sg_result_init(&rb);
    const struct sg_reduce_options opt = sg_reduce_options_default();
    struct sg_calibio_cache cal;
    sg_calibio_cache_init(&cal, o->register_dir);
    for (size_t i = 0; i < files.n; i++) {
        struct sg_record rec;
        sg_record_init(&rec);
        struct sg_constants ka, kb;
        if (sg_recordio_load(files.items[i], &rec, NULL, &err) != SG_OK ||
            sg_calibio_resolve_cached(&cal, &rec, &ka, &err) != SG_OK) {
            skipped++;
            sg_record_release(&rec);
            continue;
        }
        if (!uses_entry(ka.calibration_used, from_label)) {
            sg_record_release(&rec);
            continue;
        }
        affected++;
        st = sg_calibio_resolve_with_cached(&cal, &rec, id, to_entry, &kb, &err);
        for (size_t j = 0; st == SG_OK && j < kb.n_notes && !said_rejected; j++)
            if (strcmp(kb.notes[j].name, "entry_rejected") == 0) {
                fprintf(stderr, "sedgrade: warning: %s\n", kb.notes[j].message);
                said_rejected = true;
            }
        if (st != SG_OK ||
            (st = sg_reduce(&rec, &ka, &opt, &ra, &err)) != SG_OK ||
            (st = sg_reduce(&rec, &kb, &opt, &rb, &err)) != SG_OK) {
            sg_cli_report(files.items[i], &err);
            rc = SG_EXIT_INPUT;
        } else {
            print_change(files.items[i], &rec, &ra, &rb);
        }
        sg_record_release(&rec);
    }
    sg_calibio_cache_release(&cal);
    sg_result_release(&ra);
    sg_result_release(&rb);
    fprintf(stderr, "sedgrade: %zu of %zu files in %s were reduced with %s", affected, files.n, o->folder,
            from_label);
    if (skipped > 0)
        fprintf(stderr, " (%zu skipped: not a test record, or its instruments cannot be resolved; see 'sedgrade "
                        "check')",
                skipped);
    fputc('\n', stderr);
    file_list_release(&files);
    return rc;
}

int sg_cli_cal(int argc, char **argv)
{
    if (argc < 2) {
        fputs(cal_help, stderr);
        return SG_EXIT_INPUT;
    }
    const char *cmd = argv[1];
    if (strcmp(cmd, "--help") == 0 || strcmp(cmd, "-h") == 0 || strcmp(cmd, "help") == 0) {
        fputs(cal_help, stdout);
        return SG_EXIT_OK;
    }
    struct cal_opts o;
    const int rc = parse_opts(argc - 1, argv + 1, &o);
    if (rc != SG_EXIT_OK)
        return rc < 0 ? SG_EXIT_OK : rc;
    if (strcmp(cmd, "show") == 0)
        return cal_show(&o);
    if (strcmp(cmd, "fit") == 0)
        return cal_fit(&o);
    if (strcmp(cmd, "add") == 0)
        return cal_add(&o);
    if (strcmp(cmd, "status") == 0)
        return cal_status(&o);
    if (strcmp(cmd, "impact") == 0)
        return cal_impact(&o);
    sg_cli_errorf("'%s' is not a cal command (show, fit, add, status, impact; see 'sedgrade cal --help')", cmd);
    return SG_EXIT_INPUT;
}
