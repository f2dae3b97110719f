/* write_text.c: the plain-text report: title block, model summary, static results.
 * Column names are our own; every header carries its unit.
 */
#include "write_text.h"

#include "buckling.h"
#include "loads.h"

#include <math.h>
#include <string.h>

const char *ef_text_force(const ef_model *m) { return ef_units_force_name(m->units.force); }
const char *ef_text_length(const ef_model *m) { return ef_units_length_name(m->units.length); }

void ef_write_text_caution(FILE *out)
{
    fputs("Caution: elastic, small-strain, linear-material analysis only; no imperfections\n"
          "unless modelled; no warping DOF (lateral-torsional buckling of open sections is\n"
          "underestimated); no code check is made. These results support, and do not\n"
          "replace, the local design codes and the judgement of the engineer of record.\n",
          out);
}

static double structural_mass(const ef_model *m)
{
    double g = ef_units_g(&m->units), mass = 0.0;
    for (ef_index k = 0; k < m->n_members; k++)
        mass += ef_loads_member_weight(m, k) / g * m->members[k].length;
    return mass;
}

void ef_write_text_header(FILE *out, const ef_model *m, const ef_run_facts *facts)
{
    char mu[32];
    fprintf(out, "eigenframe %s  --  3D frame analysis report\n", EF_VERSION);
    fprintf(out, "model      %s\n", m->file ? m->file : "(memory)");
    if (m->title) fprintf(out, "title      %s\n", m->title);
    fprintf(out, "units      force %s, length %s, mass %s, time s, angles in results rad\n",
            ef_text_force(m), ef_text_length(m), ef_units_mass_name(&m->units, mu, sizeof mu));
    fprintf(out, "mesh       %lld nodes (%lld in the model), %lld elements, %lld equations",
            (long long)facts->n_mesh_nodes, (long long)m->n_nodes, (long long)facts->n_elems,
            (long long)facts->n_eq);
    if (facts->n_dropped) fprintf(out, ", %lld unresisted rotations dropped", (long long)facts->n_dropped);
    fprintf(out, "\n           elements per member: %d by default (mesh.divisions); axial-only members 1\n",
            m->divisions);
    ef_write_text_caution(out);
    fputc('\n', out);
}

void ef_write_text_summary(FILE *out, const ef_model *m, const ef_run_facts *facts)
{
    char mu[32];
    double g = ef_units_g(&m->units);
    double ms = structural_mass(m), mx = 0.0;
    for (ef_index i = 0; i < m->n_masses; i++) mx += m->masses[i].m;
    fprintf(out, "Model summary\n");
    fprintf(out, "  nodes %lld, members %lld, sections %lld, materials %lld, supports %lld\n",
            (long long)m->n_nodes, (long long)m->n_members, (long long)m->n_sections,
            (long long)m->n_materials, (long long)m->n_supports);
    fprintf(out, "  load cases %lld, combinations %lld\n", (long long)m->n_cases, (long long)m->n_combos);
    fprintf(out, "  units: force %s, length %s, mass %s, g = %.6g %s/s^2\n", ef_text_force(m),
            ef_text_length(m), ef_units_mass_name(&m->units, mu, sizeof mu), g, ef_text_length(m));
    fprintf(out, "  structural mass %.6g %s (weight %.6g %s); extra node masses %.6g %s\n", ms, mu,
            ms * g, ef_text_force(m), mx, mu);
    if (facts)
        fprintf(out, "  mesh: %lld elements, %lld nodes, %lld equations\n", (long long)facts->n_elems,
                (long long)facts->n_mesh_nodes, (long long)facts->n_eq);
    if (m->n_cases) {
        fprintf(out, "  applied load per case (resultant force) [%s]\n", ef_text_force(m));
        fprintf(out, "    %-20s %14s %14s %14s\n", "case", "Fx", "Fy", "Fz");
        for (ef_index c = 0; c < m->n_cases; c++) {
            ef_loadset *ls = NULL;
            double res[6];
            if (ef_loadset_build(m, c, &ls, NULL) != EF_OK) continue;
            ef_loadset_resultant(ls, m, res);
            fprintf(out, "    %-20s %14.6g %14.6g %14.6g\n", m->cases[c].name, res[0], res[1], res[2]);
            ef_loadset_free(&ls);
        }
    }
}

static void rule(FILE *out, int n)
{
    for (int i = 0; i < n; i++) fputc('-', out);
    fputc('\n', out);
}

void ef_write_text_load(FILE *out, const ef_results *r, const ef_load_result *lr, const char *kind)
{
    const ef_model *m = r->model;
    const char *F = ef_text_force(m), *L = ef_text_length(m);
    char FL[32];
    snprintf(FL, sizeof FL, "%s*%s", F, L);
    fprintf(out, "== %s: load '%s' ==\n", kind, ef_model_load_name(m, lr->load));
    fprintf(out, "Equilibrium of the whole (applied + reactions, about the origin)\n");
    fprintf(out, "  %-10s %14s %14s %14s %14s %14s %14s\n", "", "Fx", "Fy", "Fz", "Mx", "My", "Mz");
    fprintf(out, "  %-10s %14s %14s %14s %14s %14s %14s\n", "", F, F, F, FL, FL, FL);
    fprintf(out, "  %-10s", "applied");
    for (int c = 0; c < 6; c++) fprintf(out, " %14.6g", lr->applied[c]);
    fprintf(out, "\n  %-10s", "reactions");
    for (int c = 0; c < 6; c++) fprintf(out, " %14.6g", lr->reaction_sum[c]);
    fprintf(out, "\n  %-10s", "sum");
    for (int c = 0; c < 6; c++) fprintf(out, " %14.3g", lr->applied[c] + lr->reaction_sum[c]);
    fprintf(out, "\n  relative imbalance %.2g; solve residual %.2g\n\n", lr->eq_residual,
            lr->solve_residual);

    fprintf(out, "Node movements (global axes)\n");
    fprintf(out, "  %-12s %13s %13s %13s %13s %13s %13s\n", "node", "ux", "uy", "uz", "rx", "ry", "rz");
    fprintf(out, "  %-12s %13s %13s %13s %13s %13s %13s\n", "", L, L, L, "rad", "rad", "rad");
    rule(out, 98);
    for (ef_index i = 0; i < m->n_nodes; i++) {
        fprintf(out, "  %-12s", m->nodes[i].name);
        for (int c = 0; c < 6; c++) fprintf(out, " %13.5e", lr->disp[6 * i + c]);
        fputc('\n', out);
    }
    fputc('\n', out);

    fprintf(out, "Support reactions (forces on the structure, global axes)\n");
    fprintf(out, "  %-12s %13s %13s %13s %13s %13s %13s\n", "node", "Fx", "Fy", "Fz", "Mx", "My", "Mz");
    fprintf(out, "  %-12s %13s %13s %13s %13s %13s %13s\n", "", F, F, F, FL, FL, FL);
    rule(out, 98);
    for (ef_index i = 0; i < m->n_nodes; i++) {
        const double *R = lr->react + 6 * i;
        bool any = false;
        for (int c = 0; c < 6; c++) any |= R[c] != 0.0;
        bool supported = m->restrain_all != 0;
        for (ef_index s = 0; s < m->n_supports && !supported; s++) supported = m->supports[s].node == i;
        if (!supported && !any) continue;
        fprintf(out, "  %-12s", m->nodes[i].name);
        for (int c = 0; c < 6; c++) fprintf(out, " %13.5g", R[c]);
        fputc('\n', out);
    }
    fputc('\n', out);

    fprintf(out, "Member end actions (forces the nodes exert on the member, local axes)\n");
    fprintf(out, "  %-12s %-5s %12s %12s %12s %12s %12s %12s\n", "member", "end", "N", "Vy", "Vz", "T", "My", "Mz");
    fprintf(out, "  %-12s %-5s %12s %12s %12s %12s %12s %12s\n", "", "", F, F, F, FL, FL, FL);
    rule(out, 98);
    for (ef_index k = 0; k < m->n_members; k++)
        for (int e = 0; e < 2; e++) {
            fprintf(out, "  %-12s %-5s", e == 0 ? m->members[k].name : "", e == 0 ? "start" : "end");
            for (int c = 0; c < 6; c++) fprintf(out, " %12.5g", lr->end_forces[12 * k + 6 * e + c]);
            fputc('\n', out);
        }
    fputc('\n', out);

    fprintf(out, "Member force ranges along the length (internal forces at %d stations per member;\n"
                 "N > 0 is tension)\n", m->stations);
    fprintf(out, "  %-12s %-4s %12s %12s %12s %12s %12s %12s\n", "member", "", "N", "Vy", "Vz", "T", "My", "Mz");
    fprintf(out, "  %-12s %-4s %12s %12s %12s %12s %12s %12s\n", "", "", F, F, F, FL, FL, FL);
    rule(out, 98);
    for (ef_index k = 0; k < m->n_members; k++) {
        double lo[6], hi[6];
        for (int c = 0; c < 6; c++) { lo[c] = INFINITY; hi[c] = -INFINITY; }
        for (ef_index s = r->st_first[k]; s < r->st_first[k + 1]; s++)
            for (int c = 0; c < 6; c++) {
                double v = lr->stations[7 * s + 1 + c];
                lo[c] = fmin(lo[c], v);
                hi[c] = fmax(hi[c], v);
            }
        fprintf(out, "  %-12s %-4s", m->members[k].name, "max");
        for (int c = 0; c < 6; c++) fprintf(out, " %12.5g", hi[c]);
        fprintf(out, "\n  %-12s %-4s", "", "min");
        for (int c = 0; c < 6; c++) fprintf(out, " %12.5g", lo[c]);
        fputc('\n', out);
    }
    fputc('\n', out);
}

static const char *const dir_names[6] = {"X", "Y", "Z", "RX", "RY", "RZ"};

void ef_write_text_modal(FILE *out, const ef_results *r)
{
    const ef_modal_result *mr = r->modal;
    const ef_model *m = r->model;
    char mu[32];
    if (!mr) return;
    ef_units_mass_name(&m->units, mu, sizeof mu);
    fprintf(out, "== natural frequencies: %d modes ==\n", mr->n_modes);
    fprintf(out, "Mass taking part (effective modal mass / participating mass, %%; cumulative in [ ])\n");
    fprintf(out, "  %4s %11s %10s %11s %15s %15s %15s %15s  %s\n", "mode", "f", "T", "omega",
            "X", "Y", "Z", "RZ", "leading");
    fprintf(out, "  %4s %11s %10s %11s %15s %15s %15s %15s\n", "", "Hz", "s", "rad/s",
            "%", "%", "%", "%");
    rule(out, 112);
    double cum[6] = {0, 0, 0, 0, 0, 0};
    int reach90[6] = {0, 0, 0, 0, 0, 0};
    for (int t = 0; t < mr->n_modes; t++) {
        const double *ratio = mr->eff_ratio + 6 * t;
        int lead = 0;
        for (int d = 0; d < 6; d++) {
            cum[d] += ratio[d];
            if (!reach90[d] && cum[d] >= 0.9) reach90[d] = t + 1;
            if (ratio[d] > ratio[lead]) lead = d;
        }
        double T = mr->freq[t] > 0.0 ? 1.0 / mr->freq[t] : (double)INFINITY;
        fprintf(out, "  %4d %11.5g %10.4g %11.5g", t + 1, mr->freq[t], T, sqrt(mr->omega2[t]));
        static const int cols[4] = {0, 1, 2, 5};
        for (int c = 0; c < 4; c++)
            fprintf(out, " %6.2f [%6.2f]", 100.0 * ratio[cols[c]], 100.0 * cum[cols[c]]);
        fprintf(out, "  %s%s\n", dir_names[lead], mr->freq[t] == 0.0 ? " (rigid body, 0 Hz)" : "");
    }
    fputc('\n', out);
    fprintf(out, "Participation factors (Gamma = phi^T M r; translations in %s^0.5, rotations in %s^0.5*%s)\n",
            mu, mu, ef_text_length(m));
    fprintf(out, "  %4s %13s %13s %13s %13s %13s %13s %13s\n", "mode", "X", "Y", "Z", "RX", "RY", "RZ",
            "unit-max mass");
    fprintf(out, "  %4s %13s %13s %13s %13s %13s %13s %13s\n", "", "", "", "", "", "", "", mu);
    for (int t = 0; t < mr->n_modes; t++) {
        fprintf(out, "  %4d", t + 1);
        for (int d = 0; d < 6; d++) fprintf(out, " %13.5g", mr->participation[6 * t + d]);
        fprintf(out, " %13.5g\n", mr->unitmax_mass[t]);
    }
    fputc('\n', out);
    double worst = 0.0;
    for (int t = 0; t < mr->n_modes; t++)
        if (isfinite(mr->residual[t])) worst = fmax(worst, mr->residual[t]);
    fprintf(out, "Mass in the model: %.6g %s (all sources, held DOFs included)\n", mr->model_mass, mu);
    fprintf(out, "Participating mass (on free DOFs) [%s; rotations %s*%s^2]:\n   ", mu, mu, ef_text_length(m));
    for (int d = 0; d < 6; d++) fprintf(out, " %s %.6g", dir_names[d], mr->total_mass[d]);
    fprintf(out, "\nReference point for rotations (centre of mass): (%.6g, %.6g, %.6g) %s\n",
            mr->ref_point[0], mr->ref_point[1], mr->ref_point[2], ef_text_length(m));
    fprintf(out, "Mass source: %s\n", mr->mass_source);
    if (mr->ncv > 0)
        fprintf(out, "Eigen solver: shift-invert Lanczos (ARPACK), shift %.4g (rad/s)^2, basis %d vectors, "
                "tolerance %.1e, %lld operator applications\n", mr->shift, mr->ncv, mr->tol,
                (long long)mr->n_op);
    else
        fprintf(out, "Eigen solver: dense (LAPACK dsygvd), every finite mode\n");
    fprintf(out, "Largest eigen residual ||K phi - w^2 M phi|| / ||K phi||: %.2g\n", worst);
    for (int d = 0; d < 2; d++) {
        if (reach90[d])
            fprintf(out, "Direction %s: the first %d modes take part with at least 90%% of the mass.\n",
                    dir_names[d], reach90[d]);
        else if (mr->total_mass[d] > 0.0)
            fprintf(out, "Direction %s: the %d modes computed take part with %.1f%% of the mass; "
                    "ask for more modes to reach 90%%.\n", dir_names[d], mr->n_modes, 100.0 * cum[d]);
    }
    if (mr->n_rigid)
        fprintf(out, "%d rigid-body mode(s) (0 Hz): the structure is not fully supported.\n", mr->n_rigid);
    fputs("(Seismic sufficiency for information: EN 1998-1 4.3.3.3.1 asks for 90% of the mass per\n"
          " direction; the engineer decides what applies.)\n\n", out);
}

static const char *kind_text(int kind)
{
    switch (kind) {
    case EF_BUCKLE_MEMBER_FLEXURAL: return "member, flexural";
    case EF_BUCKLE_MEMBER_TORSIONAL: return "member, torsional";
    default: return "global (sway)";
    }
}

/* EN 1993-1-1:2005 5.2.1(3) and 5.2.2: what alpha_cr means for the choice of analysis. */
static void alpha_band(FILE *out, double a)
{
    if (!(a > 0.0)) return;
    if (a >= 15.0)
        fprintf(out, "alpha_cr = %.4g >= 15: first-order analysis may be used, also with plastic "
                "global analysis (EN 1993-1-1 5.2.1(3), Eq. 5.1).\n", a);
    else if (a >= 10.0)
        fprintf(out, "alpha_cr = %.4g >= 10: first-order elastic analysis may be used (EN 1993-1-1 "
                "5.2.1(3), Eq. 5.1); for plastic analysis 15 is needed.\n", a);
    else if (a >= 3.0)
        fprintf(out, "alpha_cr = %.4g: 3 <= alpha_cr < 10: second-order effects must be considered; "
                "sway effects may be amplified by k = 1/(1 - 1/alpha_cr) = %.4g (EN 1993-1-1 5.2.2(5)B, "
                "Eq. 5.4, valid for alpha_cr >= 3), or use a second-order analysis.\n", a, 1.0 / (1.0 - 1.0 / a));
    else if (a > 1.0)
        fprintf(out, "alpha_cr = %.4g < 3: a second-order analysis is required (EN 1993-1-1 5.2.2(6)B).\n", a);
    else
        fprintf(out, "alpha_cr = %.4g <= 1: the load exceeds the elastic critical load: the frame "
                "is unstable under it.\n", a);
}

void ef_write_text_buckling(FILE *out, const ef_results *r)
{
    const ef_buckling_result *br = r->buckling;
    const ef_model *m = r->model;
    if (!br) return;
    fprintf(out, "== critical load factors: load '%s' ==\n", ef_model_load_name(m, br->load));
    fprintf(out, "  %4s %14s %-20s %-14s %9s %12s\n", "mode", "factor", "kind", "leading member",
            "share %", "residual");
    rule(out, 80);
    for (int t = 0; t < br->n_pos; t++) {
        ef_index k = br->dominant[t];
        bool known = k >= 0 && k < m->n_members;
        fprintf(out, "  %4d %14.6g %-20s %-14s %9.1f %12.2g\n", t + 1, br->factors[t],
                kind_text(br->kind[t]), known ? m->members[k].name : "-",
                known ? 100.0 * br->member_share[(size_t)t * (size_t)m->n_members + (size_t)k] : 0.0,
                br->residual[t]);
    }
    if (br->n_neg > 0) {
        fprintf(out, "Reversed-load factors (buckling only if the load pattern is reversed):");
        for (int t = 0; t < br->n_neg; t++) fprintf(out, " %.6g", br->neg_factors[t]);
        fputc('\n', out);
    }
    if (br->n_pos == 0) {
        fprintf(out, "No positive critical load factor was found: this load does not make the "
                "structure unstable among the modes computed.\n\n");
        return;
    }
    bool global;
    double a = ef_buckling_alpha_cr(br, &global);
    if (global) {
        if (br->kind[0] != EF_BUCKLE_GLOBAL)
            fprintf(out, "Warning: member modes come below the lowest global mode; check those members "
                    "for member buckling (EN 1993-1-1 6.3 / AISC 360 Ch. E). A member torsional mode of "
                    "an open section omits warping stiffness and is conservative.\n");
        fprintf(out, "Lowest global (sway) mode: alpha_cr = %.6g\n", a);
    } else {
        fprintf(out, "Every mode found is member-dominated; the lowest factor %.6g is used below. Ask "
                "for more modes to reach a global mode.\n", a);
    }
    alpha_band(out, a);
    fprintf(out, "Geometric stiffness from the first-order forces of the load (consistent 3D beam-\n"
                 "column matrix, torsional and end-moment terms); %d elements per member by default.\n",
            m->divisions);
    ef_write_text_caution(out);
    fputc('\n', out);
}

void ef_write_text_second_order(FILE *out, const ef_results *r)
{
    const ef_model *m = r->model;
    for (ef_index i = 0; i < r->n_second; i++) {
        const ef_load_result *lr = &r->second[i];
        fprintf(out, "== second order (P-delta): load '%s' ==\n", ef_model_load_name(m, lr->load));
        if (lr->converged)
            fprintf(out, "Converged in %d iterations (relative change %.2g <= tolerance %.2g on "
                    "displacements and axial forces).\n", lr->iterations, lr->residual, lr->tolerance);
        else
            fprintf(out, "NOT converged after %d iterations (relative change %.2g > tolerance %.2g): "
                    "these are not results.\n", lr->iterations, lr->residual, lr->tolerance);
        fprintf(out, "P-Delta from node displacements; P-delta (member bow) from member subdivision "
                "(%d elements per member by default)%s.\n", m->divisions,
                lr->chord_only ? "; chord terms only were requested, so P-delta is left out" : "");
        double best = 0.0;
        ef_index at = EF_NONE;
        int at_c = 0, at_e = 0;
        for (ef_index k = 0; k < m->n_members; k++)
            for (int a = 0; a < 12; a++) {
                int c = a % 6;
                double v = lr->amplification[12 * k + a];
                if ((c == 4 || c == 5) && isfinite(v) && v > best) {
                    best = v;
                    at = k;
                    at_c = c;
                    at_e = a / 6;
                }
            }
        if (at >= 0)
            fprintf(out, "Largest moment amplification: %.4f at the %s of member '%s' (%s)\n", best,
                    at_e ? "end" : "start", m->members[at].name, at_c == 4 ? "My" : "Mz");
        if (r->buckling && r->buckling->load == lr->load && r->buckling->n_pos > 0) {
            double a = ef_buckling_alpha_cr(r->buckling, NULL);
            if (a > 1.0)
                fprintf(out, "For comparison: alpha_cr = %.4g gives 1/(1 - 1/alpha_cr) = %.4f "
                        "(EN 1993-1-1 5.2.2, Eq. 5.4)\n", a, 1.0 / (1.0 - 1.0 / a));
        }
        fprintf(out, "Amplification of member end forces (second order / first order; '-' where the "
                "first-order value is negligible)\n");
        fprintf(out, "  %-12s %-5s %9s %9s %9s %9s %9s %9s\n", "member", "end", "N", "Vy", "Vz", "T", "My", "Mz");
        rule(out, 80);
        for (ef_index k = 0; k < m->n_members; k++)
            for (int e = 0; e < 2; e++) {
                fprintf(out, "  %-12s %-5s", e == 0 ? m->members[k].name : "", e == 0 ? "start" : "end");
                for (int c = 0; c < 6; c++) {
                    double v = lr->amplification[12 * k + 6 * e + c];
                    if (isfinite(v)) fprintf(out, " %9.4f", v);
                    else fprintf(out, " %9s", "-");
                }
                fputc('\n', out);
            }
        fputc('\n', out);
        ef_write_text_load(out, r, lr, "second order");
        ef_write_text_caution(out);
        fputc('\n', out);
    }
}

void ef_write_text_sections(FILE *out, const ef_results *r)
{
    for (ef_index i = 0; i < r->n_statics; i++)
        ef_write_text_load(out, r, &r->statics[i], "linear static");
    ef_write_text_modal(out, r);
    ef_write_text_buckling(out, r);
    ef_write_text_second_order(out, r);
    ef_write_text_walking(out, r);
    ef_write_text_machines(out, r);
}
