/* main.c: the eigenframe command. Options, messages to stderr, exit codes; no numerics.
 *
 * Exit status: 0 success, 1 analysis failure (mechanism, no convergence, I/O),
 * 2 bad input or bad usage.
 */
#define _POSIX_C_SOURCE 200809L
#include "eigenframe.h"
#include "commands.h"
#include "model.h"
#include "results_hdf5.h"
#include "run.h"
#include "write_text.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

enum { EXIT_OK = 0, EXIT_ANALYSIS = 1, EXIT_USAGE = 2 };

static const char *const usage_main =
    "usage: eigenframe COMMAND [options]\n"
    "\n"
    "3D frame analysis for structural engineers: linear static, natural frequencies,\n"
    "elastic critical load factors and second-order (P-delta) amplification.\n"
    "\n"
    "commands:\n"
    "  check MODEL            validate a model and print a short summary\n"
    "  run MODEL              run the analyses the model asks for; write the report\n"
    "                         and the HDF5 results file\n"
    "  show RESULTS.h5 [WHAT] print the report tables back from a results file\n"
    "  plot RESULTS.h5 ...    draw a deformed, modal or buckled shape, or a force\n"
    "                         diagram, as SVG\n"
    "\n"
    "options:\n"
    "  -h, --help             this text (COMMAND --help: that command's options)\n"
    "  --version              print the version\n"
    "\n"
    "Exit status: 0 success, 1 analysis failure, 2 bad input or usage.\n"
    "Model format: docs/model-format.md. Results file: docs/results-format.md.\n";

static const char *const usage_check =
    "usage: eigenframe check MODEL\n"
    "\n"
    "Read and validate MODEL (a format-1 YAML model). Prints every problem found as\n"
    "FILE:LINE:COL: error: ..., or a summary: counts, units, total structural mass and\n"
    "weight, applied load per load case, and the mesh size.\n";

static const char *const usage_run =
    "usage: eigenframe run MODEL [options]\n"
    "\n"
    "Run the analyses listed under `analyses:` in MODEL (every load statically when the\n"
    "list is absent). The text report goes to standard output and to the report file.\n"
    "\n"
    "options:\n"
    "  -o, --output FILE.h5   results file (default: MODEL with .h5)\n"
    "  --report FILE          report file (default: MODEL with .txt)\n"
    "  --timings              per-phase wall time and peak memory on stderr\n"
    "  -q, --quiet            no report on standard output\n";

typedef struct {
    const char *model;
    const char *output;
    const char *report;
    bool timings;
    bool quiet;
} cli_opts;

static void print_diags(const ef_ctx *ctx)
{
    for (ef_index i = 0; i < ef_ctx_diag_count(ctx); i++)
        fprintf(stderr, "%s\n", ef_ctx_diag_text(ctx, i));
}

static int exit_for(ef_status st)
{
    if (st == EF_OK || st > 0) return EXIT_OK;
    return st == EF_EINPUT ? EXIT_USAGE : EXIT_ANALYSIS;
}

static bool wants_help(int argc, char **argv)
{
    for (int i = 0; i < argc; i++)
        if (!strcmp(argv[i], "-h") || !strcmp(argv[i], "--help")) return true;
    return false;
}

/* Parse the options common to the analysis commands. Returns false on a usage error. */
static bool parse_opts(int argc, char **argv, const char *usage, cli_opts *o)
{
    memset(o, 0, sizeof *o);
    for (int i = 0; i < argc; i++) {
        const char *a = argv[i];
        if (!strcmp(a, "--report") && i + 1 < argc) {
            o->report = argv[++i];
        } else if ((!strcmp(a, "-o") || !strcmp(a, "--output")) && i + 1 < argc) {
            o->output = argv[++i];
        } else if (!strcmp(a, "--timings")) {
            o->timings = true;
        } else if (!strcmp(a, "-q") || !strcmp(a, "--quiet")) {
            o->quiet = true;
        } else if (a[0] == '-' && a[1] != '\0') {
            fprintf(stderr, "eigenframe: unknown option '%s'\n%s", a, usage);
            return false;
        } else if (!o->model) {
            o->model = a;
        } else {
            fprintf(stderr, "eigenframe: unexpected argument '%s'\n%s", a, usage);
            return false;
        }
    }
    if (!o->model) {
        fprintf(stderr, "eigenframe: no model file given\n%s", usage);
        return false;
    }
    return true;
}

static char *with_extension(const char *path, const char *ext)
{
    size_t n = strlen(path);
    const char *dot = strrchr(path, '.'), *slash = strrchr(path, '/');
    if (dot && (!slash || dot > slash)) n = (size_t)(dot - path);
    char *s = malloc(n + strlen(ext) + 1);
    if (!s) return NULL;
    memcpy(s, path, n);
    strcpy(s + n, ext);
    return s;
}

static void print_timings(const ef_ctx *ctx)
{
    fprintf(stderr, "timings: phase seconds count\n");
    for (int i = 0; i < ctx->n_phases; i++)
        fprintf(stderr, "timing %-20s %10.4f %8lld\n", ctx->phases[i].name, ctx->phases[i].seconds,
                (long long)ctx->phases[i].count);
    fprintf(stderr, "timing %-20s %10.1f MiB\n", "peak-memory", (double)ef_peak_rss() / 1048576.0);
}

static ef_status load_model(const char *path, ef_model **m, ef_ctx *ctx)
{
    double t0 = ef_clock();
    ef_status st = ef_model_load_yaml(path, m, ctx);
    ef_ctx_time_add(ctx, "read and validate", ef_clock() - t0, 1);
    return st;
}

static int cmd_check(int argc, char **argv, ef_ctx *ctx)
{
    cli_opts o;
    if (wants_help(argc, argv)) { fputs(usage_check, stdout); return EXIT_OK; }
    if (!parse_opts(argc, argv, usage_check, &o)) return EXIT_USAGE;
    ef_model *m = NULL;
    ef_status st = load_model(o.model, &m, ctx);
    print_diags(ctx);
    if (st != EF_OK) return exit_for(st);
    ef_ctx_diag_clear(ctx);
    /* the mesh size needs the discrete system; a mechanism is not a model error here */
    ef_results *r = NULL;
    ef_run_facts facts = {0, 0, 0, 0};
    ef_system *sys = NULL;
    ef_status s2 = ef_system_create(m, &sys, ctx);
    if (s2 == EF_OK) {
        facts.n_mesh_nodes = sys->mesh->n_nodes;
        facts.n_elems = sys->mesh->n_elems;
        facts.n_eq = sys->dofs->n_eq;
        facts.n_dropped = sys->dofs->n_dropped;
    }
    print_diags(ctx);
    printf("%s: model is valid\n", o.model);
    ef_write_text_summary(stdout, m, s2 == EF_OK ? &facts : NULL);
    ef_system_free(&sys, ctx);
    ef_results_free(&r);
    ef_model_free(&m);
    return s2 == EF_EINPUT ? EXIT_USAGE : EXIT_OK;
}

static int cmd_run(int argc, char **argv, ef_ctx *ctx)
{
    cli_opts o;
    if (wants_help(argc, argv)) { fputs(usage_run, stdout); return EXIT_OK; }
    if (!parse_opts(argc, argv, usage_run, &o)) return EXIT_USAGE;
    ef_model *m = NULL;
    ef_results *r = NULL;
    ef_run_facts facts = {0, 0, 0, 0};
    ef_status st = load_model(o.model, &m, ctx);
    if (st != EF_OK) {
        print_diags(ctx);
        return exit_for(st);
    }
    st = ef_run_analyses(m, &r, &facts, ctx);
    print_diags(ctx);
    if (!r || st == EF_EINPUT || st == EF_ENOMEM || (r->n_statics == 0 && st < 0)) {
        ef_results_free(&r);
        ef_model_free(&m);
        if (o.timings) print_timings(ctx);
        return exit_for(st);
    }
    char *report_path = o.report ? NULL : with_extension(o.model, ".txt");
    const char *rp = o.report ? o.report : report_path;
    FILE *rf = rp ? fopen(rp, "w") : NULL;
    if (!rf) fprintf(stderr, "eigenframe: cannot write the report '%s': %s\n", rp ? rp : "",
                     strerror(errno));
    for (int pass = 0; pass < 2; pass++) {
        FILE *out = pass == 0 ? (o.quiet ? NULL : stdout) : rf;
        if (!out) continue;
        ef_write_text_header(out, m, &facts);
        ef_write_text_sections(out, r);
    }
    int code = rf ? exit_for(st) : EXIT_ANALYSIS;
    if (rf) {
        if (fclose(rf) != 0) code = EXIT_ANALYSIS;
        else if (st < 0) fprintf(stderr, "eigenframe: report (of what completed) written to %s\n", rp);
        else fprintf(stderr, "eigenframe: report written to %s\n", rp);
    }
    char *h5_path = o.output ? NULL : with_extension(o.model, ".h5");
    const char *hp = o.output ? o.output : h5_path;
    ef_ctx_diag_clear(ctx);
    double t0 = ef_clock();
    ef_status ws = hp ? ef_results_write_hdf5(r, hp, ctx) : EF_ENOMEM;
    ef_ctx_time_add(ctx, "write", ef_clock() - t0, 1);
    print_diags(ctx);
    if (ws == EF_OK) fprintf(stderr, "eigenframe: results written to %s\n", hp);
    else if (code == EXIT_OK) code = exit_for(ws);
    free(h5_path);
    free(report_path);
    if (o.timings) print_timings(ctx);
    ef_results_free(&r);
    ef_model_free(&m);
    return code;
}

int main(int argc, char **argv)
{
    if (argc < 2) {
        fputs(usage_main, stderr);
        return EXIT_USAGE;
    }
    const char *cmd = argv[1];
    if (!strcmp(cmd, "-h") || !strcmp(cmd, "--help") || !strcmp(cmd, "help")) {
        fputs(usage_main, stdout);
        return EXIT_OK;
    }
    if (!strcmp(cmd, "--version")) {
        printf("eigenframe %s\n", EF_VERSION);
        return EXIT_OK;
    }
    ef_ctx *ctx = NULL;
    if (ef_ctx_create(&ctx) != EF_OK) {
        fprintf(stderr, "eigenframe: out of memory\n");
        return EXIT_ANALYSIS;
    }
    ctx->progress = isatty(2);
    int code;
    if (!strcmp(cmd, "check")) code = cmd_check(argc - 2, argv + 2, ctx);
    else if (!strcmp(cmd, "run")) code = cmd_run(argc - 2, argv + 2, ctx);
    else if (!strcmp(cmd, "show")) code = ef_cli_show(argc - 2, argv + 2, ctx);
    else if (!strcmp(cmd, "plot")) code = ef_cli_plot(argc - 2, argv + 2, ctx);
    else {
        fprintf(stderr, "eigenframe: unknown command '%s'\n%s", cmd, usage_main);
        code = EXIT_USAGE;
    }
    ef_ctx_free(&ctx);
    return code;
}
