/* cli.h - the sedgrade program's subcommands and shared CLI helpers. The CLI
 * is the only ring that reads argv, prints to the terminal or exits. */
#ifndef SEDGRADE_CLI_H
#define SEDGRADE_CLI_H

#include <stdbool.h>
#include <stddef.h>

#include "sedgrade/error.h"

/* Exit statuses, the same for every subcommand (listed in the man page). */
enum sg_exit {
    SG_EXIT_OK = 0,       /* all good */
    SG_EXIT_QC = 1,       /* results written but at least one test failed a QC rule */
    SG_EXIT_INPUT = 2,    /* bad input or usage; nothing written for that test */
    SG_EXIT_IO = 3        /* I/O failure */
};

int sg_cli_reduce(int argc, char **argv);
int sg_cli_check(int argc, char **argv);
int sg_cli_plan(int argc, char **argv);
int sg_cli_cal(int argc, char **argv);

/* Prints "sedgrade: FILE:LINE:COL: msg" (FILE and the location only when
 * known) to stderr. file may be NULL. */
void sg_cli_report(const char *file, const struct sg_error *err);

/* printf-style message "sedgrade: ..." to stderr. */
void sg_cli_errorf(const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 1, 2)))
#endif
    ;

/* Exit status for a library status (SG_EIO -> 3, SG_OK -> 0, else 2). */
int sg_cli_exit_for(enum sg_status st);

/* Whether a file name is a test record's when folders are walked: it ends
 * in ".csv", in any case ("B1.CSV" from a system that writes upper case). */
bool sg_cli_is_record_name(const char *name);

/* Parses a whole decimal number with strtod + end pointer and a range
 * check; false with a message to stderr naming the option otherwise. */
bool sg_cli_parse_double(const char *opt, const char *text, double min, double max, double *out);
bool sg_cli_parse_size(const char *opt, const char *text, size_t min, size_t max, size_t *out);

#endif
