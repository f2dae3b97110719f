/* ctx.c: the library context: collected messages and phase timings. */
#define _POSIX_C_SOURCE 200809L
#include "ctx.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <time.h>

ef_status ef_ctx_create(ef_ctx **out)
{
    ef_ctx *ctx = calloc(1, sizeof *ctx);
    if (!ctx) return EF_ENOMEM;
    *out = ctx;
    return EF_OK;
}

void ef_ctx_free(ef_ctx **pctx)
{
    if (!pctx || !*pctx) return;
    ef_ctx *ctx = *pctx;
    if (ctx->chol && ctx->chol_free) ctx->chol_free(ctx->chol);
    ef_ctx_diag_clear(ctx);
    free(ctx->diags);
    free(ctx);
    *pctx = NULL;
}

static const char *level_word(ef_diag_level level)
{
    switch (level) {
    case EF_DIAG_ERROR: return "error";
    case EF_DIAG_WARNING: return "warning";
    default: return "note";
    }
}

void ef_diag_add(ef_ctx *ctx, ef_diag_level level, const ef_where *w, const char *fmt, ...)
{
    char body[1024];
    char text[1400];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(body, sizeof body, fmt, ap);
    va_end(ap);
    if (ctx->file && w && w->line > 0)
        snprintf(text, sizeof text, "%s:%d:%d: %s: %s", ctx->file, w->line, w->col,
                 level_word(level), body);
    else if (ctx->file)
        snprintf(text, sizeof text, "%s: %s: %s", ctx->file, level_word(level), body);
    else
        snprintf(text, sizeof text, "%s: %s", level_word(level), body);
    if (level == EF_DIAG_ERROR) ctx->n_errors++;
    if (ctx->n_diags == ctx->cap_diags) {
        ef_index cap = ctx->cap_diags ? 2 * ctx->cap_diags : 16;
        ef_diag *d = realloc(ctx->diags, (size_t)cap * sizeof *d);
        if (!d) return;                 /* the message is lost, the error count is not */
        ctx->diags = d;
        ctx->cap_diags = cap;
    }
    char *copy = strdup(text);
    if (!copy) return;
    ctx->diags[ctx->n_diags].level = level;
    ctx->diags[ctx->n_diags].text = copy;
    ctx->n_diags++;
}

ef_index ef_ctx_diag_count(const ef_ctx *ctx) { return ctx->n_diags; }
ef_index ef_ctx_error_count(const ef_ctx *ctx) { return ctx->n_errors; }

const char *ef_ctx_diag_text(const ef_ctx *ctx, ef_index i)
{
    return (i >= 0 && i < ctx->n_diags) ? ctx->diags[i].text : "";
}

ef_diag_level ef_ctx_diag_level(const ef_ctx *ctx, ef_index i)
{
    return (i >= 0 && i < ctx->n_diags) ? ctx->diags[i].level : EF_DIAG_NOTE;
}

void ef_ctx_diag_clear(ef_ctx *ctx)
{
    for (ef_index i = 0; i < ctx->n_diags; i++) free(ctx->diags[i].text);
    ctx->n_diags = 0;
    ctx->n_errors = 0;
}

const char *ef_status_text(ef_status st)
{
    switch (st) {
    case EF_OK: return "ok";
    case EF_ENOMEM: return "out of memory";
    case EF_EINPUT: return "bad input";
    case EF_EUNSTABLE: return "structure or load is unstable";
    case EF_ENOCONV: return "iteration did not converge";
    case EF_EIO: return "file input/output failed";
    case EF_EINTERNAL: return "internal library failure";
    case EF_WARN_ILLCOND: return "solution may be inaccurate (ill-conditioned)";
    }
    return "unknown status";
}

double ef_clock(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

void ef_ctx_time_add(ef_ctx *ctx, const char *name, double seconds, ef_index count)
{
    ef_ctx_progress(ctx, name, count);
    for (int i = 0; i < ctx->n_phases; i++) {
        if (strcmp(ctx->phases[i].name, name) == 0) {
            ctx->phases[i].seconds += seconds;
            ctx->phases[i].count += count;
            return;
        }
    }
    if (ctx->n_phases == EF_MAX_PHASES) return;
    ctx->phases[ctx->n_phases].name = name;
    ctx->phases[ctx->n_phases].seconds = seconds;
    ctx->phases[ctx->n_phases].count = count;
    ctx->n_phases++;
}

void ef_ctx_progress(ef_ctx *ctx, const char *phase, ef_index count)
{
    if (ctx && ctx->progress) ctx->progress(ctx->progress_data, phase, count);
}

size_t ef_peak_rss(void)
{
    struct rusage ru;
    if (getrusage(RUSAGE_SELF, &ru) != 0) return 0;
    return (size_t)ru.ru_maxrss * 1024u;   /* Linux reports kilobytes */
}
