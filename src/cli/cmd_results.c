/* cmd_results.c: the commands that work from a results file alone: `show` prints the
 * report again (through the same text writers as `run`), `plot` draws a shape, an
 * internal-force diagram or the footfall response factor over the floor as SVG. No
 * numerics here: the file is read back into a stub model and results (results_hdf5.h)
 * and handed to the writers.
 */
#define _POSIX_C_SOURCE 200809L
#include "cli_util.h"
#include "commands.h"

#include "results_hdf5.h"
#include "write_svg.h"
#include "write_text.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>


static const char *const usage_show =
    "usage: eigenframe show RESULTS.h5 [WHAT]\n"
    "\n"
    "Print the report of a results file written by `eigenframe run`, from the file alone\n"
    "(the model file is not needed). WHAT is one of:\n"
    "  summary        what the file holds: program, date, model fingerprint, analyses\n"
    "  static         linear static loads\n"
    "  second-order   second-order (P-delta) loads\n"
    "  modal          natural frequencies and mass participation\n"
    "  buckling       critical load factors\n"
    "  vibration      floor vibration under walking, and machine response\n"
    "  all            everything (default)\n"
    "\n"
    "Exit status: 0 success, 1 the file cannot be read, 2 not a results file or bad usage.\n";

static const char *const usage_plot =
    "usage: eigenframe plot RESULTS.h5 WHAT [options] -o FILE.svg\n"
    "\n"
    "Draw a picture (SVG 1.1) from a results file written by `eigenframe run`.\n"
    "WHAT, exactly one of:\n"
    "  --static LOAD          deformed shape under a linear static load\n"
    "  --second-order LOAD    deformed shape under a second-order (P-delta) load\n"
    "  --mode K               natural vibration mode K (1 = lowest frequency)\n"
    "  --buckling LOAD K      buckling mode K of LOAD (1 = lowest factor)\n"
    "  --walking              footfall response factor R at each receiver node (the file\n"
    "                         must hold a walking analysis: analyses.walking)\n"
    "\n"
    "options:\n"
    "  --diagram C            with --static or --second-order: the internal-force diagram\n"
    "                         of component C (N, Vy, Vz, T, My, Mz) instead of the shape\n"
    "  --view V               iso, plan (looking along gravity), xz, yz; default iso, and\n"
    "                         plan with --walking\n"
    "  -o, --output FILE      the SVG file to write (required)\n"
    "\n"
    "Shapes are scaled so that the largest displacement is 8% of the model size; diagrams\n"
    "so that the largest value is 6%. The title block states the scale.\n"
    "--walking draws each receiver as a marker coloured by R on a linear scale from pale\n"
    "straw (lowest) to plum (highest), labelled with its node name and R, and a legend bar\n"
    "with the values, the smallest and largest R and the limit_R you gave; receivers above\n"
    "your limit have a heavy outline. The program makes no acceptance decision.\n"
    "Exit status: 0 success, 1 the file cannot be read or written, 2 bad input or usage.\n";

/* ---- show ------------------------------------------------------------------------- */

enum { SHOW_SUMMARY = 1, SHOW_STATIC = 2, SHOW_SECOND = 4, SHOW_MODAL = 8, SHOW_BUCKLING = 16,
       SHOW_VIBRATION = 32, SHOW_ALL = 63 };

static int parse_what(const char *s)
{
    static const struct { const char *name; int bits; } w[] = {
        {"summary", SHOW_SUMMARY}, {"static", SHOW_STATIC}, {"second-order", SHOW_SECOND},
        {"modal", SHOW_MODAL}, {"buckling", SHOW_BUCKLING}, {"vibration", SHOW_VIBRATION},
        {"all", SHOW_ALL}};
    for (size_t i = 0; i < sizeof w / sizeof w[0]; i++)
        if (!strcmp(s, w[i].name)) return w[i].bits;
    return 0;
}

static void print_summary(FILE *out, const char *path, const ef_results_file_info *info,
                          const ef_model *m, const ef_results *r)
{
    fprintf(out, "Results file %s\n", path);
    fprintf(out, "  format %d, written by eigenframe %s on %s\n", info->format_version,
            info->program_version, info->created_utc);
    fprintf(out, "  model file %s\n  model SHA-256 %s\n", info->model_file, info->model_sha256);
    fprintf(out, "  %lld nodes, %lld members, %lld supports; %lld load cases, %lld combinations\n",
            (long long)m->n_nodes, (long long)m->n_members, (long long)m->n_supports,
            (long long)m->n_cases, (long long)m->n_combos);
    fprintf(out, "  analyses held:\n");
    if (r->n_statics) {
        fprintf(out, "    linear static:");
        for (ef_index i = 0; i < r->n_statics; i++)
            fprintf(out, " %s", ef_model_load_name(m, r->statics[i].load));
        fputc('\n', out);
    }
    if (r->n_second) {
        fprintf(out, "    second order:");
        for (ef_index i = 0; i < r->n_second; i++)
            fprintf(out, " %s%s", ef_model_load_name(m, r->second[i].load),
                    r->second[i].converged ? "" : " (not converged)");
        fputc('\n', out);
    }
    if (r->modal) {
        fprintf(out, "    natural frequencies: %d modes", r->modal->n_modes);
        if (r->modal->n_modes > 0)
            fprintf(out, ", %.5g to %.5g Hz", r->modal->freq[0], r->modal->freq[r->modal->n_modes - 1]);
        fputc('\n', out);
    }
    if (r->buckling) {
        fprintf(out, "    critical load factors: load %s, %d positive", ef_model_load_name(m, r->buckling->load),
                r->buckling->n_pos);
        if (r->buckling->n_pos > 0) fprintf(out, ", lowest %.6g", r->buckling->factors[0]);
        fputc('\n', out);
    }
    if (r->walking)
        fprintf(out, "    walking response: %lld receivers\n", (long long)r->walking->n_receivers);
    if (r->n_machines) {
        fprintf(out, "    machines:");
        for (ef_index t = 0; t < r->n_machines; t++) fprintf(out, " %s", r->machines[t].name);
        fputc('\n', out);
    }
    if (!r->n_statics && !r->n_second && !r->modal && !r->buckling && !r->walking &&
        !r->n_machines)
        fprintf(out, "    none\n");
    fputc('\n', out);
}

int ef_cli_show(int argc, char **argv, ef_ctx *ctx)
{
    if (ef_cli_wants_help(argc, argv)) {
        fputs(usage_show, stdout);
        return EF_EXIT_OK;
    }
    const char *path = NULL, *part = NULL;
    int what = SHOW_ALL;
    for (int i = 0; i < argc; i++) {
        if (argv[i][0] == '-' && argv[i][1] != '\0') {
            fprintf(stderr, "eigenframe show: unknown option '%s'\n%s", argv[i], usage_show);
            return EF_EXIT_USAGE;
        } else if (!path) {
            path = argv[i];
        } else if (!part) {
            part = argv[i];
        } else {
            fprintf(stderr, "eigenframe show: unexpected argument '%s'\n%s", argv[i], usage_show);
            return EF_EXIT_USAGE;
        }
    }
    if (!path) {
        fprintf(stderr, "eigenframe show: no results file given\n%s", usage_show);
        return EF_EXIT_USAGE;
    }
    if (part && (what = parse_what(part)) == 0) {
        fprintf(stderr, "eigenframe show: unknown part '%s' (summary, static, second-order, "
                "modal, buckling, vibration, all)\n", part);
        return EF_EXIT_USAGE;
    }

    ef_model *m = NULL;
    ef_results *r = NULL;
    ef_results_file_info info;
    ef_status st = ef_results_read_hdf5_info(path, &info, ctx);
    if (st == EF_OK) st = ef_results_read_hdf5(path, &m, &r, ctx);
    ef_cli_print_diags(ctx);
    if (st != EF_OK) return ef_cli_exit_for(st);

    ef_run_facts facts = {r->n_mesh_nodes, r->n_elems, r->n_eq, r->n_dropped};
    FILE *out = stdout;
    if (what == SHOW_ALL) {
        ef_write_text_header(out, m, &facts);
        print_summary(out, path, &info, m, r);
        ef_write_text_sections(out, r);
    } else {
        if (what != SHOW_SUMMARY) ef_write_text_header(out, m, &facts);
        if (what & SHOW_SUMMARY) print_summary(out, path, &info, m, r);
        if (what & SHOW_STATIC) {
            if (!r->n_statics) fprintf(out, "(no linear static results in this file)\n");
            for (ef_index i = 0; i < r->n_statics; i++)
                ef_write_text_load(out, r, &r->statics[i], "linear static");
        }
        if (what & SHOW_MODAL) {
            if (!r->modal) fprintf(out, "(no natural frequencies in this file)\n");
            ef_write_text_modal(out, r);
        }
        if (what & SHOW_BUCKLING) {
            if (!r->buckling) fprintf(out, "(no critical load factors in this file)\n");
            ef_write_text_buckling(out, r);
        }
        if (what & SHOW_SECOND) {
            if (!r->n_second) fprintf(out, "(no second-order results in this file)\n");
            ef_write_text_second_order(out, r);
        }
        if (what & SHOW_VIBRATION) {
            if (!r->walking && !r->n_machines) fprintf(out, "(no vibration results in this file)\n");
            ef_write_text_walking(out, r);
            ef_write_text_machines(out, r);
        }
    }
    int code = EF_EXIT_OK;
    if (fflush(out) != 0 || ferror(out)) {
        fprintf(stderr, "eigenframe show: cannot write the report: %s\n", strerror(errno));
        code = EF_EXIT_FAIL;
    }
    ef_results_free(&r);
    ef_model_free(&m);
    return code;
}

/* ---- plot ------------------------------------------------------------------------- */

/* positive whole number, or -1 */
static int parse_count(const char *s)
{
    char *end;
    errno = 0;
    long v = strtol(s, &end, 10);
    if (errno || end == s || *end != '\0' || v < 1 || v > 1000000) return -1;
    return (int)v;
}

int ef_cli_plot(int argc, char **argv, ef_ctx *ctx)
{
    if (ef_cli_wants_help(argc, argv)) {
        fputs(usage_plot, stdout);
        return EF_EXIT_OK;
    }
    const char *path = NULL, *out = NULL, *load = NULL, *diagram = NULL, *view = NULL;
    int n_what = 0, mode = 0;
    ef_svg_request req = {EF_SVG_STATIC, EF_NONE, 0, -1, EF_SVG_ISO};
    for (int i = 0; i < argc; i++) {
        const char *a = argv[i];
        bool has1 = i + 1 < argc, has2 = i + 2 < argc;
        if (!strcmp(a, "--static") && has1) {
            req.what = EF_SVG_STATIC, load = argv[++i], n_what++;
        } else if (!strcmp(a, "--second-order") && has1) {
            req.what = EF_SVG_SECOND_ORDER, load = argv[++i], n_what++;
        } else if (!strcmp(a, "--mode") && has1) {
            req.what = EF_SVG_MODE, n_what++;
            if ((mode = parse_count(argv[++i])) < 0) {
                fprintf(stderr, "eigenframe plot: --mode needs a mode number 1, 2, ..., not '%s'\n", argv[i]);
                return EF_EXIT_USAGE;
            }
        } else if (!strcmp(a, "--buckling") && has2) {
            req.what = EF_SVG_BUCKLING, load = argv[++i], n_what++;
            if ((mode = parse_count(argv[++i])) < 0) {
                fprintf(stderr, "eigenframe plot: --buckling needs LOAD and a mode number 1, 2, ..., "
                        "not '%s'\n", argv[i]);
                return EF_EXIT_USAGE;
            }
        } else if (!strcmp(a, "--walking")) {
            req.what = EF_SVG_WALKING, n_what++;
        } else if (!strcmp(a, "--diagram") && has1) {
            diagram = argv[++i];
        } else if (!strcmp(a, "--view") && has1) {
            view = argv[++i];
        } else if ((!strcmp(a, "-o") || !strcmp(a, "--output")) && has1) {
            out = argv[++i];
        } else if (a[0] == '-' && a[1] != '\0') {
            fprintf(stderr, "eigenframe plot: unknown option or missing value '%s'\n%s", a, usage_plot);
            return EF_EXIT_USAGE;
        } else if (!path) {
            path = a;
        } else {
            fprintf(stderr, "eigenframe plot: unexpected argument '%s'\n%s", a, usage_plot);
            return EF_EXIT_USAGE;
        }
    }
    if (!path || !out || n_what != 1) {
        fprintf(stderr, "eigenframe plot: %s\n%s",
                !path ? "no results file given"
                : n_what != 1 ? "give exactly one of --static, --second-order, --mode, --buckling, "
                                "--walking"
                : "no output file given (-o FILE.svg)",
                usage_plot);
        return EF_EXIT_USAGE;
    }
    if (!view) view = req.what == EF_SVG_WALKING ? "plan" : "iso";
    if (!ef_svg_parse_view(view, &req.view)) {
        fprintf(stderr, "eigenframe plot: unknown view '%s' (iso, plan, xz, yz)\n", view);
        return EF_EXIT_USAGE;
    }
    if (diagram) {
        if ((req.diagram = ef_svg_parse_component(diagram)) < 0) {
            fprintf(stderr, "eigenframe plot: unknown diagram '%s' (N, Vy, Vz, T, My, Mz)\n", diagram);
            return EF_EXIT_USAGE;
        }
        if (req.what != EF_SVG_STATIC && req.what != EF_SVG_SECOND_ORDER) {
            fprintf(stderr, "eigenframe plot: --diagram goes with --static or --second-order\n");
            return EF_EXIT_USAGE;
        }
    }
    req.mode = mode - 1;

    ef_model *m = NULL;
    ef_results *r = NULL;
    ef_status st = ef_results_read_hdf5(path, &m, &r, ctx);
    if (st == EF_OK && load) {
        req.load = ef_model_find_load(m, load);
        if (req.load == EF_NONE) {
            ef_diag_error(ctx, NULL, "%s: the model has no load case or combination '%s'", path, load);
            st = EF_EINPUT;
        }
    }
    if (st == EF_OK && req.what == EF_SVG_WALKING && !r->walking) {
        ef_diag_error(ctx, NULL, "%s: the file holds no walking (footfall) results, no /walking "
                      "group: run a model whose analyses include walking", path);
        st = EF_EINPUT;
    }
    if (st == EF_OK) st = ef_svg_write(m, r, &req, out, ctx);
    ef_cli_print_diags(ctx);
    if (st == EF_OK) fprintf(stderr, "eigenframe: picture written to %s\n", out);
    ef_results_free(&r);
    ef_model_free(&m);
    return ef_cli_exit_for(st);
}
