/* commands_vibration.h: the vibration serviceability commands (private; cmd_vibration.c).
 *
 * Each takes the arguments after the command word (argv[0] is the first of them), prints
 * the report to stdout and messages to stderr, and returns the exit status: 0 success,
 * 1 analysis failure, 2 bad input or usage.
 */
#ifndef EF_CLI_COMMANDS_VIBRATION_H
#define EF_CLI_COMMANDS_VIBRATION_H

#include "ctx.h"

/* eigenframe walking MODEL [--damping Z] [--receivers A,B] [--walkers C,D]
 *                   [--pace-min HZ] [--pace-max HZ] [--path-length L] [--weighting Wb|Wg]
 *                   [--limit-R R] [--modes N]
 * Options override the model's analyses.walking. Runs the modal analysis with enough
 * modes to reach the walking cut-off (15 Hz, or 2 f1 for a high-frequency floor), then
 * the footfall response, and prints the report. */
int ef_cli_walking(int argc, char **argv, ef_ctx *ctx);

/* eigenframe machine MODEL NAME [--hz F] [--damping Z] [--sweep S] [--modes N]
 * Steady-state response to the machine NAME of the model's analyses.machines, with the
 * options overriding its running frequency, damping ratio and sweep. */
int ef_cli_machine(int argc, char **argv, ef_ctx *ctx);

#endif /* EF_CLI_COMMANDS_VIBRATION_H */
