/* main.c - the sedgrade program: dispatches to a subcommand. */
#include <errno.h>
#include <gsl/gsl_errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

#include "cli/cli.h"
#include "sedgrade/plot.h"

#ifndef SG_VERSION
#define SG_VERSION "0.0.0"
#endif

static const char usage[] =
    "usage: sedgrade COMMAND [OPTIONS] [FILE...]\n"
    "\n"
    "Reduces sedimentation (hydrometer or pipette) and sieve tests of soils into\n"
    "grading curves, D-values, size fractions and classes.\n"
    "\n"
    "commands:\n"
    "  reduce FILE|DIR...   reduce test records into grading results (default output ./out)\n"
    "  check FILE|DIR...    validate test records: every problem listed, nothing written\n"
    "  plan ...             reading or pipette sampling schedule for target diameters\n"
    "  cal ...              the instrument calibration register (show, fit, add, status, impact)\n"
    "\n"
    "  sedgrade COMMAND --help   options of a command\n"
    "  sedgrade --version        version\n"
    "\n"
    "exit status: 0 all good; 1 results written but a test failed a QC rule;\n"
    "2 bad input or usage; 3 I/O failure.\n";

void sg_cli_report(const char *file, const struct sg_error *err)
{
    if (file != NULL && err->line > 0)
        fprintf(stderr, "sedgrade: %s:%u:%u: %s\n", file, err->line, err->col ? err->col : 1, err->msg);
    else if (file != NULL)
        fprintf(stderr, "sedgrade: %s: %s\n", file, err->msg);
    else
        fprintf(stderr, "sedgrade: %s\n", err->msg);
}

void sg_cli_errorf(const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    fputs("sedgrade: ", stderr);
    vfprintf(stderr, fmt, ap);
    fputc('\n', stderr);
    va_end(ap);
}

bool sg_cli_is_record_name(const char *name)
{
    const size_t n = strlen(name);
    return n > 4 && strcasecmp(name + n - 4, ".csv") == 0;
}

int sg_cli_exit_for(enum sg_status st)
{
    switch (st) {
    case SG_OK: return SG_EXIT_OK;
    case SG_EIO: return SG_EXIT_IO;
    default: return SG_EXIT_INPUT;
    }
}

bool sg_cli_parse_double(const char *opt, const char *text, double min, double max, double *out)
{
    char *end = NULL;
    errno = 0;
    const double v = strtod(text, &end);
    if (text[0] == '\0' || end == text || *end != '\0' || errno == ERANGE || !isfinite(v)) {
        sg_cli_errorf("option %s: '%s' is not a number", opt, text);
        return false;
    }
    if (v < min || v > max) {
        sg_cli_errorf("option %s: %g is outside %g-%g", opt, v, min, max);
        return false;
    }
    *out = v;
    return true;
}

bool sg_cli_parse_size(const char *opt, const char *text, size_t min, size_t max, size_t *out)
{
    char *end = NULL;
    errno = 0;
    const unsigned long long v = strtoull(text, &end, 10);
    if (text[0] == '\0' || text[0] == '-' || end == text || *end != '\0' || errno == ERANGE) {
        sg_cli_errorf("option %s: '%s' is not a whole number", opt, text);
        return false;
    }
    if (v < min || v > max) {
        sg_cli_errorf("option %s: %llu is outside %zu-%zu", opt, v, min, max);
        return false;
    }
    *out = (size_t)v;
    return true;
}

int main(int argc, char **argv)
{
    gsl_set_error_handler_off();
    if (argc < 2) {
        fputs(usage, stderr);
        return SG_EXIT_INPUT;
    }
    const char *cmd = argv[1];
    if (strcmp(cmd, "--help") == 0 || strcmp(cmd, "-h") == 0 || strcmp(cmd, "help") == 0) {
        fputs(usage, stdout);
        return SG_EXIT_OK;
    }
    if (strcmp(cmd, "--version") == 0 || strcmp(cmd, "-V") == 0) {
        printf("sedgrade %s\n", SG_VERSION);
        return SG_EXIT_OK;
    }
    if (strcmp(cmd, "reduce") == 0) {
        const int rc = sg_cli_reduce(argc - 1, argv + 1);
        sg_plot_cleanup(); /* cairo's and fontconfig's caches: leak checkers stay quiet */
        return rc;
    }
    if (strcmp(cmd, "check") == 0)
        return sg_cli_check(argc - 1, argv + 1);
    if (strcmp(cmd, "plan") == 0)
        return sg_cli_plan(argc - 1, argv + 1);
    if (strcmp(cmd, "cal") == 0) {
        const int rc = sg_cli_cal(argc - 1, argv + 1);
        sg_plot_cleanup();
        return rc;
    }
    sg_cli_errorf("'%s' is not a command (see 'sedgrade --help')", cmd);
    return SG_EXIT_INPUT;
}
