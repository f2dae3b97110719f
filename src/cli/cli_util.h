/* cli_util.h: what every eigenframe command shares (private to the program):
 * exit codes, printing the collected messages, help detection, number parsing.
 */
#ifndef EF_CLI_UTIL_H
#define EF_CLI_UTIL_H

#include "model.h"

/* Exit status of every command. */
enum { EF_EXIT_OK = 0, EF_EXIT_FAIL = 1, EF_EXIT_USAGE = 2 };

/* Print every collected message to stderr, in order. */
void ef_cli_print_diags(const ef_ctx *ctx);
/* 0 for success or a warning, 2 for bad input, 1 for any other failure. */
int ef_cli_exit_for(ef_status st);
/* True when -h or --help is among the arguments. */
bool ef_cli_wants_help(int argc, char **argv);
/* Parse a whole-string number; false (and a message naming `option`) otherwise. */
bool ef_cli_parse_double(const char *option, const char *s, double *out);
bool ef_cli_parse_int(const char *option, const char *s, int *out);

/* Read and validate a model, timed as "read and validate". A file that cannot be read is
 * bad input like a file with errors: EF_EINPUT either way (exit status 2). */
ef_status ef_cli_load_model(const char *path, ef_model **m, ef_ctx *ctx);

#endif /* EF_CLI_UTIL_H */
