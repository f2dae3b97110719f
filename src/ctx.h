/* ctx.h: the library context (private). It owns the CHOLMOD common, the collected
 * messages, and the phase timings. Only ctx.c and solve_chol.c look inside `chol`.
 */
#ifndef EF_CTX_H
#define EF_CTX_H

#include "eigenframe.h"

#include <stdarg.h>

/* A position in an input file; line and col count from 1, 0 = unknown. */
typedef struct {
    int line;
    int col;
} ef_where;

typedef struct {
    ef_diag_level level;
    char *text;          /* fully formatted, owned */
} ef_diag;

/* One timed phase ("read", "factorize", ...); seconds of wall time, summed. */
typedef struct {
    const char *name;    /* static string */
    double seconds;
    ef_index count;      /* how many times it ran (or operator applications) */
} ef_phase;

#define EF_MAX_PHASES 24

struct ef_ctx {
    const char *file;    /* file name used in messages (not owned) */
    ef_diag *diags;
    ef_index n_diags, cap_diags, n_errors;
    void *chol;          /* cholmod_common *, created lazily by solve_chol.c */
    void (*chol_free)(void *chol);  /* set with `chol`; ctx.c knows nothing of CHOLMOD */
    ef_phase phases[EF_MAX_PHASES];
    int n_phases;
    /* progress hook: the library never prints; a program that wants progress lines
     * sets this and is called with the phase and a count (iterations, operator
     * applications) as work goes on */
    void (*progress)(void *data, const char *phase, ef_index count);
    void *progress_data;
    /* sizes of the last system, for timings and benchmarks */
    ef_index info_n_eq;      /* equations */
    ef_index info_nnz_k;     /* stored entries of K (upper triangle) */
    double info_nnz_l;       /* entries of the Cholesky factor */
    const char *info_ordering;  /* fill-reducing ordering chosen ("AMD", "METIS", ...) */
};

/* Tell the progress hook (if any) about `phase` and `count`. */
void ef_ctx_progress(ef_ctx *ctx, const char *phase, ef_index count);

/* Add a message. `w` may be NULL (no position). Formats "file:line:col: level: text". */
void ef_diag_add(ef_ctx *ctx, ef_diag_level level, const ef_where *w, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));
#define ef_diag_error(ctx, w, ...) ef_diag_add((ctx), EF_DIAG_ERROR, (w), __VA_ARGS__)
#define ef_diag_warning(ctx, w, ...) ef_diag_add((ctx), EF_DIAG_WARNING, (w), __VA_ARGS__)
#define ef_diag_note(ctx, w, ...) ef_diag_add((ctx), EF_DIAG_NOTE, (w), __VA_ARGS__)

/* Wall clock in seconds (monotonic). */
double ef_clock(void);
/* Add `seconds` (and `count`) to the phase called `name` (a static string). */
void ef_ctx_time_add(ef_ctx *ctx, const char *name, double seconds, ef_index count);
/* Peak resident memory of this process in bytes (0 when unknown). */
size_t ef_peak_rss(void);

#define EF_MIN(a, b) ((a) < (b) ? (a) : (b))
#define EF_MAX(a, b) ((a) > (b) ? (a) : (b))

#endif /* EF_CTX_H */
