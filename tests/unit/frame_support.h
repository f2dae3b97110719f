/* frame_support.h: build a model from YAML text and run it, for the analysis tests. */
#ifndef EF_FRAME_SUPPORT_H
#define EF_FRAME_SUPPORT_H

#include "support.h"

#include "model.h"
#include "run.h"

#include <stdlib.h>
#include <string.h>

typedef struct {
    ef_ctx *ctx;
    ef_model *m;
    ef_results *r;
    ef_status st;
} frame_run;

static inline void frame_print_diags(const ef_ctx *ctx)
{
    for (ef_index i = 0; i < ef_ctx_diag_count(ctx); i++)
        print_message("%s\n", ef_ctx_diag_text(ctx, i));
}

/* Load YAML text and run the analyses it asks for. The model must be valid. */
static inline frame_run frame_solve(const char *yaml)
{
    frame_run f = {NULL, NULL, NULL, EF_OK};
    assert_int_equal(ef_ctx_create(&f.ctx), EF_OK);
    ef_status st = ef_model_load_yaml_string(yaml, strlen(yaml), "test.yaml", &f.m, f.ctx);
    if (st != EF_OK) frame_print_diags(f.ctx);
    assert_int_equal(st, EF_OK);
    f.st = ef_run_analyses(f.m, NULL, &f.r, NULL, f.ctx);
    return f;
}

static inline void frame_free(frame_run *f)
{
    ef_results_free(&f->r);
    ef_model_free(&f->m);
    ef_ctx_free(&f->ctx);
}

/* Displacement component c (0..5) of a node in a static result. */
static inline double frame_disp(const frame_run *f, ef_index load_result, const char *node, int c)
{
    ef_index i = ef_model_find_node(f->m, node);
    assert_true(i >= 0);
    return f->r->statics[load_result].disp[6 * i + c];
}

static inline double frame_react(const frame_run *f, ef_index load_result, const char *node, int c)
{
    ef_index i = ef_model_find_node(f->m, node);
    assert_true(i >= 0);
    return f->r->statics[load_result].react[6 * i + c];
}

/* End force component c (0..5: N Vy Vz T My Mz) at end e (0 start, 1 end) of a member. */
static inline double frame_end(const frame_run *f, ef_index load_result, const char *member,
                               int e, int c)
{
    ef_index k = ef_model_find_member(f->m, member);
    assert_true(k >= 0);
    return f->r->statics[load_result].end_forces[12 * k + 6 * e + c];
}

/* Internal force component c (0..5) at station s of a member; also its x in *x. */
static inline double frame_station(const frame_run *f, ef_index load_result, const char *member,
                                   int s, int c, double *x)
{
    ef_index k = ef_model_find_member(f->m, member);
    assert_true(k >= 0);
    const double *row = f->r->statics[load_result].stations + 7 * (f->r->st_first[k] + s);
    if (x) *x = row[0];
    return row[1 + c];
}

/* True when some collected message contains `text`. */
static inline bool frame_diag_has(const frame_run *f, const char *text)
{
    for (ef_index i = 0; i < ef_ctx_diag_count(f->ctx); i++)
        if (strstr(ef_ctx_diag_text(f->ctx, i), text)) return true;
    return false;
}

#endif /* EF_FRAME_SUPPORT_H */
