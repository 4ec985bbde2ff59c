/* stubs.c - TEMPORARY weak fallbacks so the program links while subcommands
 * are being written; each real definition overrides its stub. Removed once
 * every subcommand exists. */
#include "cli/cli.h"

#define STUB(fn, name)                                                                         \
    __attribute__((weak)) int fn(int argc, char **argv)                                        \
    {                                                                                          \
        (void)argc;                                                                            \
        (void)argv;                                                                            \
        sg_cli_errorf("'%s' is not available in this build", name);                            \
        return SG_EXIT_INPUT;                                                                  \
    }

STUB(sg_cli_reduce, "reduce")
STUB(sg_cli_check, "check")
STUB(sg_cli_plan, "plan")
STUB(sg_cli_cal, "cal")
