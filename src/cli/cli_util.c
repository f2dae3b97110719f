/* cli_util.c: helpers shared by the commands. */
#include "cli_util.h"

#include <errno.h>
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void ef_cli_print_diags(const ef_ctx *ctx)
{
    for (ef_index i = 0; i < ef_ctx_diag_count(ctx); i++)
        fprintf(stderr, "%s\n", ef_ctx_diag_text(ctx, i));
}

int ef_cli_exit_for(ef_status st)
{
    if (st >= EF_OK) return EF_EXIT_OK;
    return st == EF_EINPUT ? EF_EXIT_USAGE : EF_EXIT_FAIL;
}

bool ef_cli_wants_help(int argc, char **argv)
{
    for (int i = 0; i < argc; i++)
        if (!strcmp(argv[i], "-h") || !strcmp(argv[i], "--help")) return true;
    return false;
}

bool ef_cli_parse_double(const char *option, const char *s, double *out)
{
    char *end = NULL;
    errno = 0;
    double v = strtod(s, &end);
    if (errno != 0 || end == s || *end != '\0' || !isfinite(v)) {
        fprintf(stderr, "eigenframe: %s needs a number, not '%s'\n", option, s);
        return false;
    }
    *out = v;
    return true;
}

bool ef_cli_parse_int(const char *option, const char *s, int *out)
{
    char *end = NULL;
    errno = 0;
    long v = strtol(s, &end, 10);
    if (errno != 0 || end == s || *end != '\0' || v < INT_MIN || v > INT_MAX) {
        fprintf(stderr, "eigenframe: %s needs a whole number, not '%s'\n", option, s);
        return false;
    }
    *out = (int)v;
    return true;
}

ef_status ef_cli_load_model(const char *path, ef_model **m, ef_ctx *ctx)
{
    double t0 = ef_clock();
    ef_status st = ef_model_load_yaml(path, m, ctx);
    ef_ctx_time_add(ctx, "read and validate", ef_clock() - t0, 1);
    return st == EF_EIO ? EF_EINPUT : st;
}
