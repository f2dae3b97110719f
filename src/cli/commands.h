/* commands.h: command-line subcommands implemented outside main.c (private).
 *
 * Each takes the arguments after the command word (argv[0] is the first of them), prints
 * results to stdout and messages to stderr, and returns the exit status: 0 success,
 * 1 failure (I/O, analysis), 2 bad input or usage.
 */
#ifndef EF_CLI_COMMANDS_H
#define EF_CLI_COMMANDS_H

#include "ctx.h"

/* eigenframe show RESULTS.h5 [summary|static|second-order|modal|buckling|all] */
int ef_cli_show(int argc, char **argv, ef_ctx *ctx);
/* eigenframe plot RESULTS.h5 (--mode K | --buckling LOAD K | --static LOAD |
 *                 --second-order LOAD | --walking) [--diagram C] [--view V] -o FILE.svg */
int ef_cli_plot(int argc, char **argv, ef_ctx *ctx);

#endif /* EF_CLI_COMMANDS_H */
