/* main.c: the eigenframe command. Options, messages to stderr, exit codes; no numerics.
 *
 * Every analysis command loads the model, sets model->analyses from its options (one
 * general mechanism: `run` takes them from the file as they are), runs, then writes the
 * report (and the results file). Exit status: 0 success, 1 analysis failure (mechanism,
 * no convergence, I/O), 2 bad input or bad usage.
 */
#define _POSIX_C_SOURCE 200809L
#include "eigenframe.h"
#include "cli_util.h"
#include "commands.h"
#include "commands_vibration.h"
#include "model.h"
#include "results_hdf5.h"
#include "run.h"
#include "write_text.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

static const char *const usage_main =
    "usage: eigenframe COMMAND [options]\n"
    "\n"
    "3D frame analysis for structural engineers: linear static, natural frequencies,\n"
    "elastic critical load factors and second-order (P-delta) amplification.\n"
    "\n"
    "commands:\n"
    "  check MODEL              validate a model and print a short summary\n"
    "  run MODEL                run the analyses the model asks for; write the report\n"
    "                           and the HDF5 results file\n"
    "  modal MODEL              natural frequencies and mode shapes\n"
    "  buckling MODEL --load L  elastic critical load factors of a load\n"
    "  second-order MODEL --load L\n"
    "                           P-delta analysis of a load and the amplification\n"
    "  walking MODEL            footfall response of a floor or platform (response factor R)\n"
    "  machine MODEL NAME       steady-state response to a harmonic machine\n"
    "  show RESULTS.h5 [WHAT]   print the report tables back from a results file\n"
    "  plot RESULTS.h5 ...      draw a deformed, modal or buckled shape, or a force\n"
    "                           diagram, as SVG\n"
    "\n"
    "options:\n"
    "  -h, --help               this text (COMMAND --help: that command's options)\n"
    "  --version                print the version\n"
    "\n"
    "Exit status: 0 success, 1 analysis failure, 2 bad input or usage.\n"
    "Model format: docs/model-format.md. Results file: docs/results-format.md.\n";

static const char *const usage_check =
    "usage: eigenframe check MODEL\n"
    "\n"
    "Read and validate MODEL (a format-1 YAML model). Prints every problem found as\n"
    "FILE:LINE:COL: error: ..., or a summary: counts, units, total structural mass and\n"
    "weight, applied load per load case, and the mesh size.\n";

#define COMMON_OPTIONS                                                                     \
    "  -o, --output FILE.h5     results file\n"                                           \
    "  --report FILE            report file\n"                                            \
    "  --timings                per-phase wall time, sizes and peak memory on stderr\n"   \
    "  -q, --quiet              no report on standard output, no progress line\n"         \
    "  --export-matrices DIR    write K, M (and K_G of the buckling load) of the free DOFs\n" \
    "                           in Matrix Market format, with dofmap.csv, into DIR\n"

static const char *const usage_run =
    "usage: eigenframe run MODEL [options]\n"
    "\n"
    "Run the analyses listed under `analyses:` in MODEL (every load statically when the\n"
    "list is absent). The report goes to standard output and to MODEL.txt, the results to\n"
    "MODEL.h5 (unless named otherwise).\n"
    "\n"
    "options:\n" COMMON_OPTIONS;

static const char *const usage_modal =
    "usage: eigenframe modal MODEL [--modes N|all] [--above HZ] [options]\n"
    "\n"
    "Natural frequencies, periods, mass-normalised mode shapes, participation factors and\n"
    "effective modal masses. Options override `analyses.modal` of the model (default 12\n"
    "modes above 0 Hz). The report goes to standard output; files only when named.\n"
    "\n"
    "options:\n"
    "  --modes N|all            how many of the lowest modes (all: dense, small models)\n"
    "  --above HZ               only modes above this frequency\n" COMMON_OPTIONS;

static const char *const usage_buckling =
    "usage: eigenframe buckling MODEL --load NAME [--modes N] [--negative] [options]\n"
    "\n"
    "Elastic critical load factors of a load case or combination, their modes, the\n"
    "members that carry each mode, and what alpha_cr means for the choice of analysis\n"
    "(EN 1993-1-1 5.2.1). The report goes to standard output; files only when named.\n"
    "\n"
    "options:\n"
    "  --load NAME              the load (default: `analyses.buckling.load`)\n"
    "  --modes N                how many of the lowest positive factors (default 4)\n"
    "  --negative               also the factors of the reversed load\n" COMMON_OPTIONS;

static const char *const usage_second =
    "usage: eigenframe second-order MODEL --load NAME [--tolerance T] [--max-iterations N]\n"
    "                               [--chord] [options]\n"
    "\n"
    "Iterative second-order (P-delta) analysis of one load case or combination (analysed\n"
    "whole: second-order results do not superpose), the amplification of every member end\n"
    "force, and beside it 1/(1 - 1/alpha_cr) from the buckling analysis of the same load.\n"
    "The report goes to standard output; files only when named.\n"
    "\n"
    "options:\n"
    "  --load NAME              the load (default: the first of `analyses.second_order`)\n"
    "  --tolerance T            relative change that ends the iteration (default 1e-6)\n"
    "  --max-iterations N       (default 50)\n"
    "  --chord                  chord (P-Delta) terms only; default: consistent (P-Delta\n"
    "                           and P-delta)\n" COMMON_OPTIONS;

typedef enum { CMD_RUN, CMD_MODAL, CMD_BUCKLING, CMD_SECOND } cmd_kind;

typedef struct {
    cmd_kind kind;
    const char *model;
    const char *output;
    const char *report;
    const char *export_dir;
    bool timings;
    bool quiet;
    /* analysis overrides */
    const char *load;
    const char *modes;       /* number or "all" */
    double above;
    bool above_given;
    bool negative;
    double tolerance;
    int max_iterations;
    bool chord;
} cli_opts;

static bool needs_value(int i, int argc, const char *a)
{
    if (i + 1 < argc) return true;
    fprintf(stderr, "eigenframe: option '%s' needs a value\n", a);
    return false;
}

/* Parse the options of the analysis commands. Returns false on a usage error. */
static bool parse_opts(int argc, char **argv, const char *usage, cli_opts *o)
{
    bool analysis = o->kind != CMD_RUN;
    for (int i = 0; i < argc; i++) {
        const char *a = argv[i];
        bool ok = true;
        if (!strcmp(a, "--report")) {
            if ((ok = needs_value(i, argc, a))) o->report = argv[++i];
        } else if (!strcmp(a, "-o") || !strcmp(a, "--output")) {
            if ((ok = needs_value(i, argc, a))) o->output = argv[++i];
        } else if (!strcmp(a, "--export-matrices")) {
            if ((ok = needs_value(i, argc, a))) o->export_dir = argv[++i];
        } else if (!strcmp(a, "--timings")) {
            o->timings = true;
        } else if (!strcmp(a, "-q") || !strcmp(a, "--quiet")) {
            o->quiet = true;
        } else if (analysis && !strcmp(a, "--modes") && o->kind != CMD_SECOND) {
            if ((ok = needs_value(i, argc, a))) o->modes = argv[++i];
        } else if (o->kind == CMD_MODAL && !strcmp(a, "--above")) {
            ok = needs_value(i, argc, a) && ef_cli_parse_double(a, argv[++i], &o->above);
            o->above_given = true;
        } else if ((o->kind == CMD_BUCKLING || o->kind == CMD_SECOND) && !strcmp(a, "--load")) {
            if ((ok = needs_value(i, argc, a))) o->load = argv[++i];
        } else if (o->kind == CMD_BUCKLING && !strcmp(a, "--negative")) {
            o->negative = true;
        } else if (o->kind == CMD_SECOND && !strcmp(a, "--tolerance")) {
            ok = needs_value(i, argc, a) && ef_cli_parse_double(a, argv[++i], &o->tolerance);
        } else if (o->kind == CMD_SECOND && !strcmp(a, "--max-iterations")) {
            ok = needs_value(i, argc, a) && ef_cli_parse_int(a, argv[++i], &o->max_iterations);
        } else if (o->kind == CMD_SECOND && !strcmp(a, "--chord")) {
            o->chord = true;
        } else if (a[0] == '-' && a[1] != '\0') {
            fprintf(stderr, "eigenframe: unknown option '%s'\n", a);
            ok = false;
        } else if (!o->model) {
            o->model = a;
        } else {
            fprintf(stderr, "eigenframe: unexpected argument '%s'\n", a);
            ok = false;
        }
        if (!ok) {
            fputs(usage, stderr);
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

/* --timings: one line per phase, "timing PHASE SECONDS COUNT", then sizes and memory.
 * The format is stable (docs/performance.md); scripts read it. */
static void print_timings(const ef_ctx *ctx)
{
    for (int i = 0; i < ctx->n_phases; i++)
        fprintf(stderr, "timing %-24s %10.4f %10lld\n", ctx->phases[i].name,
                ctx->phases[i].seconds, (long long)ctx->phases[i].count);
    fprintf(stderr, "size   %-24s %10lld\n", "equations", (long long)ctx->info_n_eq);
    fprintf(stderr, "size   %-24s %10lld\n", "nnz-K", (long long)ctx->info_nnz_k);
    fprintf(stderr, "size   %-24s %10.0f\n", "nnz-factor", ctx->info_nnz_l);
    fprintf(stderr, "size   %-24s %10s\n", "ordering", ctx->info_ordering ? ctx->info_ordering : "-");
    fprintf(stderr, "memory %-24s %10.1f MiB\n", "peak", (double)ef_peak_rss() / 1048576.0);
}

/* A progress line on a terminal: the phase and its count, rewritten in place. */
static void show_progress(void *data, const char *phase, ef_index count)
{
    (void)data;
    fprintf(stderr, "\r\033[Keigenframe: %s %lld", phase, (long long)count);
    fflush(stderr);
}

static void end_progress(ef_ctx *ctx)
{
    if (ctx->progress) fputs("\r\033[K", stderr);
    ctx->progress = NULL;
}

static int cmd_check(int argc, char **argv, ef_ctx *ctx)
{
    if (ef_cli_wants_help(argc, argv)) { fputs(usage_check, stdout); return EF_EXIT_OK; }
    if (argc != 1 || argv[0][0] == '-') {
        fputs(usage_check, stderr);
        return EF_EXIT_USAGE;
    }
    const char *path = argv[0];
    ef_model *m = NULL;
    ef_status st = ef_cli_load_model(path, &m, ctx);
    ef_cli_print_diags(ctx);
    if (st != EF_OK) return ef_cli_exit_for(st);
    ef_ctx_diag_clear(ctx);
    /* the mesh size needs the discrete system; a mechanism is not a model error here */
    ef_run_facts facts = {0, 0, 0, 0};
    ef_system *sys = NULL;
    ctx->file = m->file;
    ef_status s2 = ef_system_create(m, &sys, ctx);
    if (s2 == EF_OK) {
        facts.n_mesh_nodes = sys->mesh->n_nodes;
        facts.n_elems = sys->mesh->n_elems;
        facts.n_eq = sys->dofs->n_eq;
        facts.n_dropped = sys->dofs->n_dropped;
    }
    ef_cli_print_diags(ctx);
    if (s2 != EF_EINPUT) printf("%s: model is valid\n", path);
    ef_write_text_summary(stdout, m, s2 == EF_OK ? &facts : NULL);
    ef_system_free(&sys, ctx);
    ef_model_free(&m);
    return s2 == EF_EINPUT ? EF_EXIT_USAGE : EF_EXIT_OK;
}

static bool find_load(const ef_model *m, const char *name, const char *option, ef_index *out)
{
    ef_index k = ef_model_find_load(m, name);
    if (k == EF_NONE) {
        fprintf(stderr, "eigenframe: %s '%s': no load case or combination of that name in %s\n",
                option, name, m->file);
        return false;
    }
    *out = k;
    return true;
}

/* Make the model's analyses what the command asks for. */
static bool apply_options(const cli_opts *o, ef_model *m)
{
    ef_analyses *an = &m->analyses;
    if (o->kind == CMD_RUN) return true;
    an->static_given = true;            /* no separate static report for these commands */
    an->n_static_loads = 0;
    an->walking = false;
    ef_model_drop_machines(m);
    an->modal = o->kind == CMD_MODAL;
    if (o->kind != CMD_BUCKLING && o->kind != CMD_SECOND) an->buckling = false;
    if (o->kind != CMD_SECOND) an->n_second_order_loads = 0;
    if (o->kind == CMD_MODAL) {
        if (o->modes && !strcmp(o->modes, "all")) an->modal_modes = 0;
        else if (o->modes && (!ef_cli_parse_int("--modes", o->modes, &an->modal_modes) ||
                              an->modal_modes < 1)) {
            fprintf(stderr, "eigenframe: --modes takes a positive whole number or 'all'\n");
            return false;
        }
        if (o->above_given) {
            if (o->above < 0.0) {
                fprintf(stderr, "eigenframe: --above takes a frequency of 0 Hz or more\n");
                return false;
            }
            an->modal_above_hz = o->above;
        }
        return true;
    }
    ef_index load = EF_NONE;
    if (o->load && !find_load(m, o->load, "--load", &load)) return false;
    if (o->kind == CMD_BUCKLING) {
        if (load == EF_NONE && !an->buckling) {
            fprintf(stderr, "eigenframe: buckling needs --load NAME (the model has no "
                    "analyses.buckling)\n");
            return false;
        }
        an->buckling = true;
        if (load != EF_NONE) an->buckling_load = load;
        if (o->modes && (!ef_cli_parse_int("--modes", o->modes, &an->buckling_modes) ||
                         an->buckling_modes < 1)) {
            fprintf(stderr, "eigenframe: --modes takes a positive whole number\n");
            return false;
        }
        if (o->negative) an->buckling_negative = true;
        return true;
    }
    /* second order: one load, with its buckling analysis for alpha_cr beside the ratios */
    if (load == EF_NONE) {
        if (an->n_second_order_loads == 0) {
            fprintf(stderr, "eigenframe: second-order needs --load NAME (the model has no "
                    "analyses.second_order)\n");
            return false;
        }
        load = an->second_order_loads[0];
    }
    ef_index *one = realloc(an->second_order_loads, sizeof *one);
    if (!one) return false;
    one[0] = load;
    an->second_order_loads = one;
    an->n_second_order_loads = 1;
    an->buckling = true;
    an->buckling_load = load;
    an->buckling_negative = false;
    if (o->tolerance > 0.0) an->so_tolerance = o->tolerance;
    else if (o->tolerance < 0.0) {
        fprintf(stderr, "eigenframe: --tolerance must be positive\n");
        return false;
    }
    if (o->max_iterations > 0) an->so_max_iterations = o->max_iterations;
    else if (o->max_iterations < 0) {
        fprintf(stderr, "eigenframe: --max-iterations must be positive\n");
        return false;
    }
    if (o->chord) an->so_chord_only = true;
    return true;
}

/* Write the report to `out`; returns false when the stream failed. */
static bool write_report(FILE *out, const ef_results *r, const ef_run_facts *facts)
{
    ef_write_text_header(out, r->model, facts);
    ef_write_text_sections(out, r);
    return fflush(out) == 0 && !ferror(out);
}

/* The report file is written whole under a temporary name, then renamed. */
static bool write_report_file(const char *path, const ef_results *r, const ef_run_facts *facts)
{
    size_t n = strlen(path) + 32;
    char *tmp = malloc(n);
    if (!tmp) return false;
    snprintf(tmp, n, "%s.tmp.%ld", path, (long)getpid());
    FILE *f = fopen(tmp, "w");
    bool ok = f && write_report(f, r, facts);
    if (f && fclose(f) != 0) ok = false;
    if (ok && rename(tmp, path) != 0) ok = false;
    if (!ok) {
        fprintf(stderr, "eigenframe: cannot write the report '%s': %s\n", path, strerror(errno));
        remove(tmp);
    }
    free(tmp);
    return ok;
}

static int cmd_analysis(cmd_kind kind, const char *usage, int argc, char **argv, ef_ctx *ctx)
{
    cli_opts o;
    memset(&o, 0, sizeof o);
    o.kind = kind;
    if (ef_cli_wants_help(argc, argv)) { fputs(usage, stdout); return EF_EXIT_OK; }
    if (!parse_opts(argc, argv, usage, &o)) return EF_EXIT_USAGE;
    if (!o.quiet && isatty(2)) ctx->progress = show_progress;
    ef_model *m = NULL;
    ef_results *r = NULL;
    ef_run_facts facts = {0, 0, 0, 0};
    int code = EF_EXIT_OK;
    char *report_path = NULL, *h5_path = NULL;
    ef_status st = ef_cli_load_model(o.model, &m, ctx);
    if (st != EF_OK) {
        end_progress(ctx);
        ef_cli_print_diags(ctx);
        return ef_cli_exit_for(st);
    }
    if (!apply_options(&o, m)) {
        code = EF_EXIT_USAGE;
        goto done;
    }
    st = ef_run_analyses(m, o.export_dir, &r, &facts, ctx);
    end_progress(ctx);
    ef_cli_print_diags(ctx);
    ef_ctx_diag_clear(ctx);
    code = ef_cli_exit_for(st);
    /* nothing to report when the model or the memory failed, or nothing ran at all */
    if (!r || st == EF_EINPUT || st == EF_ENOMEM ||
        (st < 0 && !r->n_statics && !r->modal && !r->buckling && !r->n_second))
        goto done;
    if (!o.quiet && !write_report(stdout, r, &facts)) code = EF_EXIT_FAIL;
    if (kind == CMD_RUN && !o.report) report_path = with_extension(o.model, ".txt");
    if (kind == CMD_RUN && !o.output) h5_path = with_extension(o.model, ".h5");
    const char *rp = o.report ? o.report : report_path;
    const char *hp = o.output ? o.output : h5_path;
    if (rp) {
        if (write_report_file(rp, r, &facts)) fprintf(stderr, "eigenframe: report written to %s\n", rp);
        else code = EF_EXIT_FAIL;
    }
    if (hp) {
        double t0 = ef_clock();
        ef_status ws = ef_results_write_hdf5(r, hp, ctx);
        ef_ctx_time_add(ctx, "write", ef_clock() - t0, 1);
        ef_cli_print_diags(ctx);
        if (ws == EF_OK) fprintf(stderr, "eigenframe: results written to %s\n", hp);
        else if (code == EF_EXIT_OK) code = ef_cli_exit_for(ws);
    }
done:
    if (o.timings) print_timings(ctx);
    free(report_path);
    free(h5_path);
    ef_results_free(&r);
    ef_model_free(&m);
    return code;
}

int main(int argc, char **argv)
{
    if (argc < 2) {
        fputs(usage_main, stderr);
        return EF_EXIT_USAGE;
    }
    const char *cmd = argv[1];
    if (!strcmp(cmd, "-h") || !strcmp(cmd, "--help") || !strcmp(cmd, "help")) {
        fputs(usage_main, stdout);
        return EF_EXIT_OK;
    }
    if (!strcmp(cmd, "--version")) {
        printf("eigenframe %s\n", EF_VERSION);
        return EF_EXIT_OK;
    }
    ef_ctx *ctx = NULL;
    if (ef_ctx_create(&ctx) != EF_OK) {
        fprintf(stderr, "eigenframe: out of memory\n");
        return EF_EXIT_FAIL;
    }
    int code, n = argc - 2;
    char **args = argv + 2;
    if (!strcmp(cmd, "check")) code = cmd_check(n, args, ctx);
    else if (!strcmp(cmd, "run")) code = cmd_analysis(CMD_RUN, usage_run, n, args, ctx);
    else if (!strcmp(cmd, "modal")) code = cmd_analysis(CMD_MODAL, usage_modal, n, args, ctx);
    else if (!strcmp(cmd, "buckling")) code = cmd_analysis(CMD_BUCKLING, usage_buckling, n, args, ctx);
    else if (!strcmp(cmd, "second-order")) code = cmd_analysis(CMD_SECOND, usage_second, n, args, ctx);
    else if (!strcmp(cmd, "walking")) code = ef_cli_walking(n, args, ctx);
    else if (!strcmp(cmd, "machine")) code = ef_cli_machine(n, args, ctx);
    else if (!strcmp(cmd, "show")) code = ef_cli_show(n, args, ctx);
    else if (!strcmp(cmd, "plot")) code = ef_cli_plot(n, args, ctx);
    else {
        fprintf(stderr, "eigenframe: unknown command '%s'\n%s", cmd, usage_main);
        code = EF_EXIT_USAGE;
    }
    ef_ctx_free(&ctx);
    return code;
}
