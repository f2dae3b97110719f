/* cmd_vibration.c: the `walking` and `machine` commands. Options, messages to stderr,
 * exit codes; the numerics are in the library (modal.c, vibration.c).
 *
 * Both commands grow the number of modes until the highest computed frequency passes
 * the cut-off the analysis needs (ef_vibration_modal_run: walking 15 Hz, or 2 f1 for a
 * floor with f1 >= 8 Hz; machine twice the top of the sweep), doubling from the model's
 * (or --modes) count up to EF_VIB_MAX_MODES, or until the model has no more modes.
 */
#include "cli_util.h"
#include "commands_vibration.h"

#include "vibration.h"
#include "write_text.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>


#define EF_CLI_VIB_DEFAULT_MODES 12

static const char *const usage_walking =
    "usage: eigenframe walking MODEL [options]\n"
    "\n"
    "Footfall response of a floor or platform: screening (fundamental vertical frequency,\n"
    "self-weight deflection estimate, pace harmonics), then the response factor R at each\n"
    "receiver by the resonant and/or transient method. Options override the model's\n"
    "analyses.walking; without that block, --receivers and --damping are required.\n"
    "\n"
    "options:\n"
    "  --damping Z            ratio of critical damping (no default), e.g. 0.03\n"
    "  --receivers A,B,..     nodes where the response is judged\n"
    "  --walkers C,D,..       nodes where a person walks (default: the receivers)\n"
    "  --pace-min HZ          lowest pace frequency scanned (default 1.8)\n"
    "  --pace-max HZ          highest pace frequency scanned (default 2.2)\n"
    "  --path-length L        walking path, model length units (resonance build-up)\n"
    "  --weighting Wb|Wg      frequency weighting (default Wb)\n"
    "  --limit-R R            the acceptance you chose; only compared, never decided\n"
    "  --modes N              modes to start from (more are computed until the cut-off\n"
    "                         of 15 Hz, or 2 f1 for a high-frequency floor, is passed)\n"
    "\n"
    "Exit status: 0 success, 1 analysis failure, 2 bad input or usage.\n"
    "Method and sources: docs/vibration.md.\n";

static const char *const usage_machine =
    "usage: eigenframe machine MODEL NAME [options]\n"
    "\n"
    "Steady-state response to the harmonic machine NAME of the model's analyses.machines:\n"
    "peak displacement, velocity and acceleration at its receivers over the frequency\n"
    "sweep, and the response factor R, by modal superposition with a static correction\n"
    "for the modes not computed.\n"
    "\n"
    "options:\n"
    "  --hz F                 running frequency, Hz (overrides the model)\n"
    "  --damping Z            ratio of critical damping (overrides the model)\n"
    "  --sweep S              +- fraction of the frequency scanned (overrides the model)\n"
    "  --modes N              modes to start from (more are computed until twice the top\n"
    "                         of the sweep is passed)\n"
    "\n"
    "Exit status: 0 success, 1 analysis failure, 2 bad input or usage.\n"
    "Method and sources: docs/vibration.md.\n";

/* A whole argument as a finite number. */
static bool parse_number(const char *opt, const char *s, double *out)
{
    char *end = NULL;
    double v = strtod(s, &end);
    if (end == s || *end != '\0' || !isfinite(v)) {
        fprintf(stderr, "eigenframe: %s: '%s' is not a number\n", opt, s);
        return false;
    }
    *out = v;
    return true;
}

/* "A,B,C" into model node indices (malloc'd; the caller owns them). */
static bool parse_nodes(const char *opt, const char *s, const ef_model *m, ef_index **out,
                        ef_index *n)
{
    size_t len = strlen(s), cap = 1;
    for (size_t i = 0; i < len; i++) cap += s[i] == ',';
    ef_index *v = malloc(cap * sizeof *v);
    char *buf = malloc(len + 1);
    if (!v || !buf) {
        free(v);
        free(buf);
        fprintf(stderr, "eigenframe: out of memory\n");
        return false;
    }
    memcpy(buf, s, len + 1);
    ef_index k = 0;
    bool ok = true;
    char *p = buf;
    for (;;) {
        char *comma = strchr(p, ',');
        if (comma) *comma = '\0';
        if (*p == '\0') {
            fprintf(stderr, "eigenframe: %s: empty node name in '%s'\n", opt, s);
            ok = false;
        } else {
            ef_index i = ef_model_find_node(m, p);
            if (i == EF_NONE) {
                fprintf(stderr, "eigenframe: %s: node '%s' is not in the model\n", opt, p);
                ok = false;
            }
            v[k++] = i;
        }
        if (!comma) break;
        p = comma + 1;
    }
    free(buf);
    if (!ok) {
        free(v);
        return false;
    }
    *out = v;
    *n = k;
    return true;
}

static int start_modes(const ef_model *m, int opt)
{
    if (opt > 0) return opt;
    if (m->analyses.modal) return m->analyses.modal_modes;   /* 0 = all */
    return EF_CLI_VIB_DEFAULT_MODES;
}

/* Build the system and results, grow the modes (ef_vibration_modal_run); the caller
 * frees *sys and *r in every case. */
static ef_status prepare(ef_model *m, int modes, ef_system **sys, ef_results **r,
                         ef_run_facts *facts, ef_ctx *ctx)
{
    ef_status st = ef_results_create(m, r);
    if (st != EF_OK) return st;
    if ((st = ef_system_create(m, sys, ctx)) != EF_OK) return st;
    facts->n_mesh_nodes = (*r)->n_mesh_nodes = (*sys)->mesh->n_nodes;
    facts->n_elems = (*r)->n_elems = (*sys)->mesh->n_elems;
    facts->n_eq = (*r)->n_eq = (*sys)->dofs->n_eq;
    facts->n_dropped = (*r)->n_dropped = (*sys)->dofs->n_dropped;
    return ef_vibration_modal_run(*sys, &m->analyses, modes, *r, ctx);
}

int ef_cli_walking(int argc, char **argv, ef_ctx *ctx)
{
    if (ef_cli_wants_help(argc, argv)) {
        fputs(usage_walking, stdout);
        return EF_EXIT_OK;
    }
    const char *path = NULL;
    for (int i = 0; i < argc; i++) {
        if (argv[i][0] == '-' && argv[i][1] != '\0') {
            i++;                                       /* every option takes a value */
            continue;
        }
        if (path) {
            fprintf(stderr, "eigenframe: unexpected argument '%s'\n%s", argv[i], usage_walking);
            return EF_EXIT_USAGE;
        }
        path = argv[i];
    }
    if (!path) {
        fprintf(stderr, "eigenframe: no model file given\n%s", usage_walking);
        return EF_EXIT_USAGE;
    }
    ef_model *m = NULL;
    ef_status st = ef_cli_load_model(path, &m, ctx);
    if (st != EF_OK) {
        ef_cli_print_diags(ctx);
        return ef_cli_exit_for(st);
    }
    ef_analyses *a = &m->analyses;
    int code = EF_EXIT_USAGE, modes_opt = 0;
    bool walkers_given = false, receivers_given = false;
    /* walkers the same as the receivers in the model (its default): they follow new ones */
    bool walkers_follow = a->n_walk_walkers == a->n_walk_receivers &&
        (a->n_walk_receivers == 0 ||
         !memcmp(a->walk_walkers, a->walk_receivers, (size_t)a->n_walk_receivers * sizeof *a->walk_receivers));
    for (int i = 0; i < argc; i++) {
        const char *o = argv[i];
        if (!(o[0] == '-' && o[1] != '\0')) continue;
        if (i + 1 >= argc) {
            fprintf(stderr, "eigenframe: %s needs a value\n%s", o, usage_walking);
            goto done;
        }
        const char *v = argv[++i];
        double x;
        if (!strcmp(o, "--damping")) {
            if (!parse_number(o, v, &x)) goto done;
            a->walk_damping = x;
        } else if (!strcmp(o, "--receivers") || !strcmp(o, "--walkers")) {
            bool rec = o[2] == 'r';
            ef_index *list, n;
            if (!parse_nodes(o, v, m, &list, &n)) goto done;
            if (rec) {
                free(a->walk_receivers);
                a->walk_receivers = list;
                a->n_walk_receivers = n;
                receivers_given = true;
            } else {
                free(a->walk_walkers);
                a->walk_walkers = list;
                a->n_walk_walkers = n;
                walkers_given = true;
            }
        } else if (!strcmp(o, "--pace-min") || !strcmp(o, "--pace-max")) {
            if (!parse_number(o, v, &x)) goto done;
            a->walk_pace_hz[strcmp(o, "--pace-max") == 0 ? 1 : 0] = x;
        } else if (!strcmp(o, "--path-length")) {
            if (!parse_number(o, v, &x)) goto done;
            if (x < 0.0) {
                fprintf(stderr, "eigenframe: --path-length must not be negative\n");
                goto done;
            }
            a->walk_path_length = x;
        } else if (!strcmp(o, "--weighting")) {
            if (!strcmp(v, "Wb")) a->walk_weighting = EF_WEIGHT_WB;
            else if (!strcmp(v, "Wg")) a->walk_weighting = EF_WEIGHT_WG;
            else {
                fprintf(stderr, "eigenframe: --weighting: '%s' is not Wb or Wg\n", v);
                goto done;
            }
        } else if (!strcmp(o, "--limit-R")) {
            if (!parse_number(o, v, &x)) goto done;
            if (!(x > 0.0)) {
                fprintf(stderr, "eigenframe: --limit-R must be positive\n");
                goto done;
            }
            a->walk_limit_R = x;
        } else if (!strcmp(o, "--modes")) {
            if (!parse_number(o, v, &x)) goto done;
            if (!(x >= 1.0 && x <= 1e6 && x == floor(x))) {
                fprintf(stderr, "eigenframe: --modes must be a whole number of at least 1\n");
                goto done;
            }
            modes_opt = (int)x;
        } else {
            fprintf(stderr, "eigenframe: unknown option '%s'\n%s", o, usage_walking);
            goto done;
        }
    }
    /* receivers given on the command line, walkers not: the walkers follow them unless
     * the model names walkers of its own */
    if (a->n_walk_receivers > 0 &&
        (a->n_walk_walkers == 0 || (receivers_given && !walkers_given && walkers_follow))) {
        ef_index *w = malloc((size_t)a->n_walk_receivers * sizeof *w);
        if (!w) {
            code = EF_EXIT_FAIL;
            goto done;
        }
        memcpy(w, a->walk_receivers, (size_t)a->n_walk_receivers * sizeof *w);
        free(a->walk_walkers);
        a->walk_walkers = w;
        a->n_walk_walkers = a->n_walk_receivers;
    }
    if (a->n_walk_receivers == 0) {
        fprintf(stderr, "eigenframe: %s: no receivers: give --receivers or analyses.walking\n", path);
        goto done;
    }
    if (!(a->walk_damping > 0.0 && a->walk_damping < 1.0)) {
        fprintf(stderr, "eigenframe: %s: give the damping ratio (0 < Z < 1) with --damping or "
                "analyses.walking.damping; there is no default\n", path);
        goto done;
    }
    if (!(a->walk_pace_hz[0] > 0.0 && a->walk_pace_hz[0] <= a->walk_pace_hz[1])) {
        fprintf(stderr, "eigenframe: the pace range must be 0 < --pace-min <= --pace-max, not "
                "[%g, %g] Hz\n", a->walk_pace_hz[0], a->walk_pace_hz[1]);
        goto done;
    }
    a->walking = true;
    {
        ef_system *sys = NULL;
        ef_results *r = NULL;
        ef_run_facts facts = {0, 0, 0, 0};
        ef_machine *machines = a->machines;          /* walking alone: no machine cut-off */
        ef_index n_machines = a->n_machines;
        a->machines = NULL;
        a->n_machines = 0;
        st = prepare(m, start_modes(m, modes_opt), &sys, &r, &facts, ctx);
        a->machines = machines;
        a->n_machines = n_machines;
        if (st == EF_OK) st = ef_walking_run(sys, a, r, ctx);
        ef_cli_print_diags(ctx);
        if (st >= EF_OK) {
            ef_write_text_header(stdout, m, &facts);
            ef_write_text_modal(stdout, r);
            ef_write_text_walking(stdout, r);
        }
        code = ef_cli_exit_for(st);
        ef_system_free(&sys, ctx);
        ef_results_free(&r);
    }
done:
    ef_model_free(&m);
    return code;
}

int ef_cli_machine(int argc, char **argv, ef_ctx *ctx)
{
    if (ef_cli_wants_help(argc, argv)) {
        fputs(usage_machine, stdout);
        return EF_EXIT_OK;
    }
    const char *path = NULL, *name = NULL;
    for (int i = 0; i < argc; i++) {
        if (argv[i][0] == '-' && argv[i][1] != '\0') {
            i++;
            continue;
        }
        if (!path) path = argv[i];
        else if (!name) name = argv[i];
        else {
            fprintf(stderr, "eigenframe: unexpected argument '%s'\n%s", argv[i], usage_machine);
            return EF_EXIT_USAGE;
        }
    }
    if (!path || !name) {
        fprintf(stderr, "eigenframe: give a model file and a machine name\n%s", usage_machine);
        return EF_EXIT_USAGE;
    }
    ef_model *m = NULL;
    ef_status st = ef_cli_load_model(path, &m, ctx);
    if (st != EF_OK) {
        ef_cli_print_diags(ctx);
        return ef_cli_exit_for(st);
    }
    ef_analyses *a = &m->analyses;
    int code = EF_EXIT_USAGE, modes_opt = 0;
    ef_index k = 0;
    while (k < a->n_machines && strcmp(a->machines[k].name, name) != 0) k++;
    if (k == a->n_machines) {
        fprintf(stderr, "eigenframe: %s: no machine '%s' under analyses.machines", path, name);
        for (ef_index i = 0; i < a->n_machines; i++)
            fprintf(stderr, "%s'%s'", i ? ", " : " (there are: ", a->machines[i].name);
        fprintf(stderr, "%s\n", a->n_machines ? ")" : "");
        goto done;
    }
    ef_machine *mc = &a->machines[k];
    for (int i = 0; i < argc; i++) {
        const char *o = argv[i];
        if (!(o[0] == '-' && o[1] != '\0')) continue;
        if (i + 1 >= argc) {
            fprintf(stderr, "eigenframe: %s needs a value\n%s", o, usage_machine);
            goto done;
        }
        double x;
        if (!parse_number(o, argv[++i], &x)) goto done;
        if (!strcmp(o, "--hz")) {
            if (!(x > 0.0)) {
                fprintf(stderr, "eigenframe: --hz must be positive\n");
                goto done;
            }
            mc->hz = x;
        } else if (!strcmp(o, "--damping")) {
            if (!(x > 0.0 && x < 1.0)) {
                fprintf(stderr, "eigenframe: --damping must lie between 0 and 1\n");
                goto done;
            }
            mc->damping = x;
        } else if (!strcmp(o, "--sweep")) {
            if (!(x >= 0.0 && x < 1.0)) {
                fprintf(stderr, "eigenframe: --sweep must lie in [0, 1)\n");
                goto done;
            }
            mc->sweep = x;
        } else if (!strcmp(o, "--modes")) {
            if (!(x >= 1.0 && x <= 1e6 && x == floor(x))) {
                fprintf(stderr, "eigenframe: --modes must be a whole number of at least 1\n");
                goto done;
            }
            modes_opt = (int)x;
        } else {
            fprintf(stderr, "eigenframe: unknown option '%s'\n%s", o, usage_machine);
            goto done;
        }
    }
    {
        ef_system *sys = NULL;
        ef_results *r = NULL;
        ef_run_facts facts = {0, 0, 0, 0};
        /* this machine alone, without the walking cut-off: point the list at it for the
         * calls, then restore (the model frees the full list) */
        ef_machine *all = a->machines;
        ef_index n_all = a->n_machines;
        bool walking = a->walking;
        a->machines = mc;
        a->n_machines = 1;
        a->walking = false;
        st = prepare(m, start_modes(m, modes_opt), &sys, &r, &facts, ctx);
        if (st == EF_OK) st = ef_machines_run(sys, m, r, ctx);
        a->machines = all;
        a->n_machines = n_all;
        a->walking = walking;
        ef_cli_print_diags(ctx);
        if (st >= EF_OK) {
            ef_write_text_header(stdout, m, &facts);
            ef_write_text_modal(stdout, r);
            ef_write_text_machines(stdout, r);
        }
        code = ef_cli_exit_for(st);
        ef_system_free(&sys, ctx);
        ef_results_free(&r);
    }
done:
    ef_model_free(&m);
    return code;
}
