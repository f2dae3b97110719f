/* eigenframe.h: the public API of the eigenframe library.
 *
 * eigenframe conventions
 * ----------------------
 * - Public names: ef_ + noun + verb (ef_model_load_yaml); types ef_x; macros EF_.
 *   The noun names the source file (ef_model_* lives in src/model*.c).
 * - Objects come in pairs ef_x_create / ef_x_free(&x): free takes a handle, accepts
 *   NULL and leaves NULL. A function that fails frees what it half built.
 * - Every function returns ef_status: EF_OK (0), negative on failure, positive for a
 *   warning. The library never prints and never exits: messages for people are
 *   collected in the context (ef_ctx) and the program decides what to print.
 * - The context is the last argument.
 * - One index type, ef_index (64-bit, matches cholmod_l_*). EF_NONE marks "no index".
 * - Units are the model's own consistent system (force, length, seconds); mass is
 *   force*s^2/length. Angles in the model file are degrees; radians inside.
 */
#ifndef EIGENFRAME_H
#define EIGENFRAME_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#define EF_VERSION "0.1.0"

typedef int64_t ef_index;
#define EF_NONE ((ef_index)-1)

typedef enum {
    EF_OK = 0,
    EF_ENOMEM = -1,      /* out of memory */
    EF_EINPUT = -2,      /* bad model or bad request: messages are in the context */
    EF_EUNSTABLE = -3,   /* the structure is a mechanism, or a load is beyond critical */
    EF_ENOCONV = -4,     /* an iteration (ARPACK, P-delta) did not converge */
    EF_EIO = -5,         /* a file could not be read or written */
    EF_EINTERNAL = -6,   /* a library call failed in a way that should not happen */
    EF_WARN_ILLCOND = 1  /* a solve succeeded but its residual is larger than expected */
} ef_status;

/* Severity of a collected message. */
typedef enum { EF_DIAG_NOTE = 0, EF_DIAG_WARNING = 1, EF_DIAG_ERROR = 2 } ef_diag_level;

typedef struct ef_ctx ef_ctx;
typedef struct ef_model ef_model;

/* ---- context ---------------------------------------------------------- */

/* Create a context (holds the CHOLMOD common, messages, timings). Free with ef_ctx_free. */
ef_status ef_ctx_create(ef_ctx **out);
void ef_ctx_free(ef_ctx **ctx);
/* Messages collected so far, formatted "file:line:col: error: text" (or without the
 * position when none is known). Pointers stay valid until the next ef_ctx_* call that
 * adds or clears messages. */
ef_index ef_ctx_diag_count(const ef_ctx *ctx);
const char *ef_ctx_diag_text(const ef_ctx *ctx, ef_index i);
ef_diag_level ef_ctx_diag_level(const ef_ctx *ctx, ef_index i);
ef_index ef_ctx_error_count(const ef_ctx *ctx);
void ef_ctx_diag_clear(ef_ctx *ctx);
/* A short English name for a status ("out of memory", ...). */
const char *ef_status_text(ef_status st);

/* ---- model -------------------------------------------------------------- */

/* Read and validate a model file (format 1, see docs/model-format.md). On EF_EINPUT
 * every problem found is in ctx; *out stays NULL. The caller frees the model. */
ef_status ef_model_load_yaml(const char *path, ef_model **out, ef_ctx *ctx);
/* The same from a string in memory; `name` is used in messages as the file name. */
ef_status ef_model_load_yaml_string(const char *text, size_t len, const char *name,
                                    ef_model **out, ef_ctx *ctx);
void ef_model_free(ef_model **m);

#endif /* EIGENFRAME_H */
