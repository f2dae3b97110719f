/* run.h: run the analyses a model asks for (private). The command-line program edits
 * model->analyses from its options, then calls this one entry point. */
#ifndef EF_RUN_H
#define EF_RUN_H

#include "system.h"
#include "write_text.h"

/* Run, in order: static loads, modal, buckling, second order, walking, machines. Results
 * are handed over in *out (also after a failure, with what was completed; NULL only on
 * EF_ENOMEM). The caller frees them. facts (may be NULL) receives the mesh size. With
 * export_dir (may be NULL) K, M and K_G go there in Matrix Market format first. */
ef_status ef_run_analyses(const ef_model *m, const char *export_dir, ef_results **out,
                          ef_run_facts *facts, ef_ctx *ctx);

#endif /* EF_RUN_H */
