/* write_text.h: the plain-text report (private). Every table names its units in the
 * header; every analysis section states what it assumed. Writers never recompute
 * results; they only format what results.h holds.
 */
#ifndef EF_WRITE_TEXT_H
#define EF_WRITE_TEXT_H

#include <stdio.h>

#include "results.h"

/* Facts about the run that the report states (mesh size, equations). */
typedef struct {
    ef_index n_mesh_nodes, n_elems, n_eq, n_dropped;
} ef_run_facts;

/* Title block: program, model, units, assumptions, and the caution. */
void ef_write_text_header(FILE *out, const ef_model *m, const ef_run_facts *facts);
/* Model summary (counts, mass, weight, applied load per case) as `check` prints it. */
void ef_write_text_summary(FILE *out, const ef_model *m, const ef_run_facts *facts);
/* One static (or second-order) load: equilibrium, displacements, reactions, end forces,
 * member extremes. */
void ef_write_text_load(FILE *out, const ef_results *r, const ef_load_result *lr,
                        const char *kind);
/* Natural frequencies: table of modes, mass participation, cumulative ratios, footer
 * with the mass totals and what the analysis assumed. */
void ef_write_text_modal(FILE *out, const ef_results *r);
/* Critical load factors: table of modes with their kind, the EN 1993-1-1 5.2.1 band
 * of alpha_cr and the amplification estimate. */
void ef_write_text_buckling(FILE *out, const ef_results *r);
/* Second-order loads: convergence, amplification summary, then the load's tables. */
void ef_write_text_second_order(FILE *out, const ef_results *r);
/* Floor vibration under walking (write_text_vibration.c): inputs assumed, screening
 * (fundamental vertical frequency, self-weight deflection estimate, pace-harmonic flags,
 * minimum-frequency advice), R per receiver with method and what governs, the user's
 * limit compared, reference multiplying factors and the cautions. Nothing when
 * r->walking is NULL. */
void ef_write_text_walking(FILE *out, const ef_results *r);
/* Steady-state response to each harmonic machine (write_text_vibration.c): peak
 * amplitudes at the running frequency and over the sweep, R per receiver, cautions. */
void ef_write_text_machines(FILE *out, const ef_results *r);
/* Every results section of a run after the title block, in its fixed order: linear
 * static loads, natural frequencies, critical load factors, second order, walking,
 * machines. `run` and `show` both print through this, so the two never differ. */
void ef_write_text_sections(FILE *out, const ef_results *r);
/* The caution every stability or vibration result carries. */
void ef_write_text_caution(FILE *out);

/* Helpers shared by the writers of each analysis section. */
const char *ef_text_force(const ef_model *m);     /* "kN" */
const char *ef_text_length(const ef_model *m);    /* "m" */

#endif /* EF_WRITE_TEXT_H */
