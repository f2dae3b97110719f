/* write_text_vibration.c: the plain-text report of the vibration serviceability results
 * (footfall and machines). Formats what results.h holds and never recomputes; the only
 * arithmetic is unit conversion for display and the reference values it prints.
 * Column names are our own; every header carries its unit.
 */
#include "write_text.h"

#include "vibration.h"

#include <math.h>
#include <string.h>

static void rule(FILE *out, int n)
{
    for (int i = 0; i < n; i++) fputc('-', out);
    fputc('\n', out);
}

static const char *weighting_name(int w)
{
    return w == EF_WEIGHT_WG ? "Wg (BS 6472:1992, asymptotic)" : "Wb (BS 6841 / BS 6472-1:2008, asymptotic)";
}

static const char *node_name(const ef_model *m, ef_index i)
{
    return i >= 0 && i < m->n_nodes ? m->nodes[i].name : "-";
}

/* The §5 cautions for vibration results, then the general one. */
static void vibration_caution(FILE *out)
{
    fputs("Caution: the response depends on the mass, damping, support and partition conditions\n"
          "assumed in the model; the people on the floor are ignored (no human-structure\n"
          "interaction); the weightings and coefficients are those named above. The program\n"
          "makes no acceptance decision: the engineer chooses the limit and decides.\n", out);
    ef_write_text_caution(out);
}

/* Typical multiplying factors on the base curve (method note §2(v)), for reference. */
static void reference_factors(FILE *out)
{
    fputs("Reference only (the program never applies these): typical multiplying factors on the\n"
          "base curve, i.e. limits on R, quoted from memory of SCI P354 (2009), CCIP-016 (2006)\n"
          "and BS 6472:1992 Table 5 -- check the current documents before use:\n", out);
    static const char *const rows[][2] = {
        {"operating theatres, precision laboratories", "1"},
        {"residential, day", "4 (BS 6472:1992 Table 5 gives 2-4)"},
        {"residential, night", "1.4"},
        {"general offices", "8 (SCI P354, CCIP-016, footfall; BS 6472: 4 continuous)"},
        {"premium offices", "4"},
        {"shopping malls", "4"},
        {"workshops", "8"},
        {"stairs, light use / heavy use", "32 / 24 (SCI P354)"},
    };
    for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++)
        fprintf(out, "  %-46s %s\n", rows[i][0], rows[i][1]);
    fputs("  AISC Design Guide 11 (2nd ed.) alternative, peak a/g [from memory]: offices and\n"
          "  residences 0.5 %, shopping malls and indoor footbridges 1.5 %, outdoor footbridges 5 %.\n",
          out);
}

static void frequency_advice(FILE *out)
{
    fputs("Minimum-frequency advice (reference only, not a check; from memory):\n"
          "  SCI P354: floor fundamental frequency at least 3 Hz;\n"
          "  EN 1995-1-1 7.3.3: residential timber floors above 8 Hz;\n"
          "  EN 1990 Annex A2 A2.4.3.2: footbridges need a comfort check below 5 Hz vertical or\n"
          "  2.5 Hz lateral/torsional (limits 0.7 m/s^2 vertical, 0.2 lateral, 0.4 in crowds);\n"
          "  HiVoSS critical ranges: vertical 1.25-2.3 Hz (2.5-4.6 Hz by the 2nd harmonic),\n"
          "  lateral 0.5-1.2 Hz.\n", out);
}

void ef_write_text_walking(FILE *out, const ef_results *r)
{
    const ef_walking_result *w = r->walking;
    if (!w) return;
    const ef_model *m = r->model;
    const char *L = ef_text_length(m), *F = ef_text_force(m);
    double Lsi = ef_units_length_si(m->units.length), Fsi = ef_units_force_si(m->units.force);
    char acc[32], vel[32];
    snprintf(acc, sizeof acc, "%s/s^2", L);
    snprintf(vel, sizeof vel, "%s/s", L);

    fprintf(out, "== floor vibration: walking (footfall) response ==\n");
    fprintf(out, "Assumed: damping ratio %.4g of critical; walker weight %.6g %s (%.0f N); pace "
            "frequency %.4g-%.4g Hz;\n", w->damping, w->walker_weight, F, w->walker_weight * Fsi,
            w->pace[0], w->pace[1]);
    fprintf(out, "  weighting %s;\n", weighting_name(w->weighting));
    if (w->path_length > 0.0)
        fprintf(out, "  walking path %.6g %s: resonance build-up rho = 1 - exp(-2 pi zeta L fp / v), "
                "v = 1.67 fp^2 - 4.83 fp + 4.50 m/s (SCI P354 after Bachmann & Ammann [M]);\n",
                w->path_length, L);
    else
        fprintf(out, "  no walking path length given: full steady-state resonance (rho = 1, "
                "conservative);\n");
    fprintf(out, "  base curve (ISO 10137:2007 Annex C / BS 6472:1992 [M]): %.4g %s rms acceleration, "
            "%.4g %s rms velocity above 8 Hz;\n", EF_VIB_BASE_ACC_SI / Lsi, acc, EF_VIB_BASE_VEL_SI / Lsi, vel);
    fprintf(out, "  mode shapes mass-normalised; vertical = the gravity direction (%g, %g, %g).\n",
            m->gravity_dir[0], m->gravity_dir[1], m->gravity_dir[2]);
    if (r->modal) fprintf(out, "  Mass source: %s\n", r->modal->mass_source);
    fputc('\n', out);

    fprintf(out, "Screening\n");
    if (w->f1_mode > 0)
        fprintf(out, "  fundamental vertical frequency f1 = %.4g Hz (mode %d)\n", w->f1_vertical, w->f1_mode);
    else
        fprintf(out, "  no computed mode (up to %.4g Hz) passes the vertical-mode test below\n", w->highest_hz);
    if (isfinite(w->delta_selfweight)) {
        fprintf(out, "  deflection under the vibrating mass x g: %.4g %s (%.4g mm) at %s\n",
                w->delta_selfweight, L, w->delta_selfweight * Lsi * 1000.0,
                w->delta_where[0] ? w->delta_where : "-");
        if (isfinite(w->f_selfweight))
            fprintf(out, "  estimate f = 18 / sqrt(delta_mm) = %.4g Hz (SCI P354 sec. 7 [M]; AISC DG11 "
                    "Eq. 3-3 [M])%s\n", w->f_selfweight,
                    w->f1_mode > 0 ? "; a large gap from f1 points to a mass or mode mix-up" : "");
    } else {
        fprintf(out, "  self-weight deflection estimate not available\n");
    }
    fprintf(out, "  Vertical-mode test (our thresholds): at the receivers and walkers the vertical part\n"
                 "  carries >= %.0f %% of the squared translation, and moves >= %.0f %% of the mode's\n"
                 "  largest translation anywhere in the model.\n",
            100.0 * EF_VIB_VERTICAL_SHARE_MIN, 100.0 * EF_VIB_FLOOR_MOTION_MIN);
    fprintf(out, "  %4s %10s %10s %10s %9s  %s\n", "mode", "f", "vertical", "motion", "vertical",
            "within h x pace range (h = 1..4)");
    fprintf(out, "  %4s %10s %10s %10s %9s\n", "", "Hz", "share %", "%", "mode");
    rule(out, 80);
    for (int k = 0; k < w->n_modes && r->modal && k < r->modal->n_modes; k++) {
        fprintf(out, "  %4d %10.4g %10.1f %10.1f %9s  ", k + 1, r->modal->freq[k],
                100.0 * w->vertical_share[k], 100.0 * w->floor_motion[k],
                w->is_vertical[k] ? "yes" : "no");
        if (w->pace_flags[k] == 0) fputs("-", out);
        for (int h = 1; h <= 4; h++)
            if (w->pace_flags[k] & (1 << (h - 1))) fprintf(out, " h=%d", h);
        fputc('\n', out);
    }
    frequency_advice(out);
    fputc('\n', out);

    fprintf(out, "Method\n");
    if (w->methods & 1)
        fprintf(out, "  resonant (SCI P354 [M]): Fourier coefficients of SCI P354 Table 3.1, modes up to "
                "%.4g Hz (%d summed with phase), %d pace frequencies scanned incl. every exact "
                "resonance fp = f_m/h\n", w->cutoff_resonant, w->modes_resonant, w->n_pace);
    if (w->methods & 2)
        fprintf(out, "  transient (SCI P354 [M]): effective impulse 60 fp^1.43 / f_m^1.30 x Q/700 N s "
                "at fp = %.4g Hz, modes up to 2 f1 = %.4g Hz (%d), rms over one pace period\n",
                w->pace_transient, w->cutoff_transient, w->modes_transient);
    if ((w->methods & 3) == 3)
        fprintf(out, "  f1 lies in 8-12 Hz: both methods were computed; the larger R governs.\n");
    fputc('\n', out);

    fprintf(out, "Response per receiver (R = weighted rms / base-curve value)\n");
    fprintf(out, "  %-12s %9s %-9s %12s %12s %8s %4s %5s %-12s %9s %9s\n", "receiver", "R", "method",
            "a_w,rms", "v_w,rms", "pace", "harm", "mode", "walker", "R reson.", "R trans.");
    fprintf(out, "  %-12s %9s %-9s %12s %12s %8s %4s %5s %-12s %9s %9s\n", "", "", "", acc, vel, "Hz",
            "", "", "", "", "");
    rule(out, 118);
    int above = 0;
    double Rmax = 0.0;
    ef_index at = EF_NONE;
    for (ef_index i = 0; i < w->n_receivers; i++) {
        bool tr = w->method[i] == 1;
        char a_s[16] = "-", v_s[16] = "-", h_s[8] = "-", rr[16] = "-", rt[16] = "-";
        if (tr) snprintf(v_s, sizeof v_s, "%.4g", w->response_rms[i]);
        else snprintf(a_s, sizeof a_s, "%.4g", w->response_rms[i]);
        if (!tr) snprintf(h_s, sizeof h_s, "%d", w->harmonic[i]);
        if (isfinite(w->R_resonant[i])) snprintf(rr, sizeof rr, "%.4g", w->R_resonant[i]);
        if (isfinite(w->R_transient[i])) snprintf(rt, sizeof rt, "%.4g", w->R_transient[i]);
        fprintf(out, "  %-12s %9.4g %-9s %12s %12s %8.4g %4s %5d %-12s %9s %9s\n",
                node_name(m, w->receivers[i]), w->R[i], tr ? "transient" : "resonant", a_s, v_s,
                w->pace_hz[i], h_s, w->mode[i], node_name(m, w->walker[i]), rr, rt);
        if (w->limit_R > 0.0 && w->R[i] > w->limit_R) above++;
        if (at == EF_NONE || w->R[i] > Rmax) {
            Rmax = w->R[i];
            at = i;
        }
    }
    if (at != EF_NONE)
        fprintf(out, "Largest R = %.4g at receiver '%s'.\n", Rmax, node_name(m, w->receivers[at]));
    if (w->limit_R > 0.0)
        fprintf(out, "Limit you gave: R = %.4g; %d of %lld receivers have a larger R.\n", w->limit_R,
                above, (long long)w->n_receivers);
    else
        fprintf(out, "No limit on R was given (analyses.walking.limit_R or --limit-R).\n");
    fputc('\n', out);
    reference_factors(out);
    vibration_caution(out);
    fputc('\n', out);
}

/* Index of the scanned frequency nearest to f. */
static int nearest(const ef_machine_result *mr, double f)
{
    int best = 0;
    for (int q = 1; q < mr->n_hz; q++)
        if (fabs(mr->hz[q] - f) < fabs(mr->hz[best] - f)) best = q;
    return best;
}

void ef_write_text_machines(FILE *out, const ef_results *r)
{
    const ef_model *m = r->model;
    double Lsi = ef_units_length_si(m->units.length);
    const char *L = ef_text_length(m), *F = ef_text_force(m);
    char acc[32], vel[32];
    snprintf(acc, sizeof acc, "%s/s^2", L);
    snprintf(vel, sizeof vel, "%s/s", L);
    static const char xyz[3] = {'x', 'y', 'z'};
    for (ef_index t = 0; t < r->n_machines; t++) {
        const ef_machine_result *mr = &r->machines[t];
        if (mr->n_hz <= 0) continue;
        ef_index nr = mr->n_receivers;
        fprintf(out, "== machine '%s': steady-state harmonic response ==\n", mr->name);
        fprintf(out, "Assumed: force amplitude (%.6g, %.6g, %.6g) %s at node '%s', global axes;\n",
                mr->force[0], mr->force[1], mr->force[2], F, node_name(m, mr->node));
        fprintf(out, "  running at %.5g Hz", mr->hz_nominal);
        if (mr->n_hz > 1)
            fprintf(out, ", swept over %.5g-%.5g Hz (+-%.3g %%) at %d frequencies incl. every "
                    "natural frequency in range", mr->hz[0], mr->hz[mr->n_hz - 1], 100.0 * mr->sweep,
                    mr->n_hz);
        fprintf(out, ";\n  damping ratio %.4g of critical in every mode; %d modes up to %.5g Hz;\n",
                mr->damping, mr->modes_used, mr->highest_hz);
        fprintf(out, "  modes not computed: %s.\n", mr->corrected
                ? "included by the static correction (mode-acceleration method, Chopra)"
                : "NOT included (the static correction needs a fully supported structure)");
        fprintf(out, "  R vertical: W(f) a_rms / %.4g %s up to 8 Hz, W(f) v_rms / %.4g %s above "
                "(weighted velocity, as the transient footfall method), weighting %s;\n",
                EF_VIB_BASE_ACC_SI / Lsi, acc, EF_VIB_BASE_VEL_SI / Lsi, vel,
                weighting_name(mr->weighting));
        fprintf(out, "  R horizontal: Wd(f) a_rms / %.4g %s (horizontal vector; ISO 10137 base "
                "curve [M]); rms = peak / sqrt 2.\n", EF_VIB_BASE_ACC_H_SI / Lsi, acc);
        if (mr->beyond_modes)
            fprintf(out, "Warning: frequencies above 0.8 of the highest computed mode and no static "
                    "correction: the response may be underestimated; ask for more modes.\n");
        for (int pass = 0; pass < 2; pass++) {
            int q0 = nearest(mr, mr->hz_nominal);
            if (pass == 0)
                fprintf(out, "Peak amplitudes at the running frequency %.5g Hz (global axes)\n", mr->hz[q0]);
            else if (mr->n_hz > 1)
                fprintf(out, "Largest peak amplitudes over the sweep (each at its own frequency)\n");
            else
                break;
            fprintf(out, "  %-12s %3s %12s %12s %12s %9s\n", "receiver", "dir", "u", "v", "a",
                    pass ? "a at" : "");
            fprintf(out, "  %-12s %3s %12s %12s %12s %9s\n", "", "", L, vel, acc, pass ? "Hz" : "");
            rule(out, 68);
            for (ef_index i = 0; i < nr; i++)
                for (int c = 0; c < 3; c++) {
                    double u = 0, v = 0, a = 0, fa = mr->hz[q0];
                    for (int q = pass ? 0 : q0; q < (pass ? mr->n_hz : q0 + 1); q++) {
                        size_t k = ((size_t)q * (size_t)nr + (size_t)i) * 3 + (size_t)c;
                        u = fmax(u, mr->disp[k]);
                        v = fmax(v, mr->vel[k]);
                        if (mr->acc[k] > a) {
                            a = mr->acc[k];
                            fa = mr->hz[q];
                        }
                    }
                    char fs[16] = "";
                    if (pass) snprintf(fs, sizeof fs, "%.5g", fa);
                    fprintf(out, "  %-12s %3c %12.4e %12.4e %12.4e %9s\n",
                            c == 0 ? node_name(m, mr->receivers[i]) : "", xyz[c], u, v, a, fs);
                }
        }
        fprintf(out, "Response factors (largest over the frequencies scanned)\n");
        fprintf(out, "  %-12s %11s %9s %11s %9s %11s\n", "receiver", "R vertical", "at", "R horiz.",
                "at", "R vert. f0");
        fprintf(out, "  %-12s %11s %9s %11s %9s %11s\n", "", "", "Hz", "", "Hz", "");
        rule(out, 70);
        int q0 = nearest(mr, mr->hz_nominal);
        for (ef_index i = 0; i < nr; i++)
            fprintf(out, "  %-12s %11.4g %9.5g %11.4g %9.5g %11.4g\n", node_name(m, mr->receivers[i]),
                    mr->R[i], mr->R_hz[i], mr->R_horizontal[i], mr->R_horizontal_hz[i],
                    mr->R_scan[(size_t)q0 * (size_t)nr + (size_t)i]);
        fputc('\n', out);
        reference_factors(out);
        vibration_caution(out);
        fputc('\n', out);
    }
}
