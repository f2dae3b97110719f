/* test_vibration.c: floor vibration under walking and harmonic machinery (vibration.c).
 *
 * Sources of the check values:
 * - dynamics-and-stability-methods.md §6 (the project's method note): §6.6 walking
 *   coefficients and build-up factor, §6.7 single-mass regression values, §6.8 weighting
 *   filter values, §6.9 harmonic single-mass checks. The §6.7 numbers were derived
 *   ([D]) from the SCI P354 formulas as the note quotes them (from memory); §6.8 matches
 *   ISO 2631-1:1997 Table 3 (from memory for the table, derived for the filter).
 * - Closed forms for beams: simply supported Euler-Bernoulli beam f1 = (pi/2)
 *   sqrt(EI/(m L^4)), mode sin(pi x/L), modal mass m L/2 (Blevins, Formulas for Natural
 *   Frequency and Mode Shape, Table 8-1; Chopra, Dynamics of Structures); midspan
 *   deflection P L^3/(48 EI) and 5 w L^4/(384 EI) (Roark, Table 8.1 cases 1a and 2e, from
 *   memory for the case numbers).
 * - Harmonic response of a damped single-DOF system (Chopra, Dynamics of Structures,
 *   chapter 3): at resonance |a| = F0/(2 zeta m); acceleration peak 1/(2 zeta sqrt(1 -
 *   zeta^2)) at beta = 1/sqrt(1 - 2 zeta^2).
 */
#include "support.h"

#include "mass.h"
#include "modal.h"
#include "vibration.h"
#include "write_text.h"

#include <stdlib.h>
#include <string.h>

#define PI 3.141592653589793
#define TWO_PI 6.283185307179586

/* ---- helpers --------------------------------------------------------------------------- */

typedef struct {
    ef_ctx *ctx;
    ef_model *m;
    ef_system *sys;
    ef_results *r;
} vib_run;

static void print_diags(const ef_ctx *ctx)
{
    for (ef_index i = 0; i < ef_ctx_diag_count(ctx); i++) print_message("%s\n", ef_ctx_diag_text(ctx, i));
}

/* Load YAML text, build the system, run the modal analysis the model asks for. */
static vib_run vib_load(const char *yaml)
{
    vib_run v = {NULL, NULL, NULL, NULL};
    assert_int_equal(ef_ctx_create(&v.ctx), EF_OK);
    ef_status st = ef_model_load_yaml_string(yaml, strlen(yaml), "test.yaml", &v.m, v.ctx);
    if (st != EF_OK) print_diags(v.ctx);
    assert_int_equal(st, EF_OK);
    assert_int_equal(ef_system_create(v.m, &v.sys, v.ctx), EF_OK);
    assert_int_equal(ef_results_create(v.m, &v.r), EF_OK);
    st = ef_modal_run(v.sys, v.m->analyses.modal_modes, v.m->analyses.modal_above_hz, v.r, v.ctx);
    if (st != EF_OK) print_diags(v.ctx);
    assert_int_equal(st, EF_OK);
    return v;
}

static ef_status vib_walk(vib_run *v)
{
    ef_status st = ef_walking_run(v->sys, &v->m->analyses, v->r, v->ctx);
    if (st != EF_OK) print_diags(v->ctx);
    return st;
}

static void vib_free(vib_run *v)
{
    ef_results_free(&v->r);
    ef_system_free(&v->sys, v->ctx);
    ef_model_free(&v->m);
    ef_ctx_free(&v->ctx);
}

static bool diag_has(const ef_ctx *ctx, const char *text)
{
    for (ef_index i = 0; i < ef_ctx_diag_count(ctx); i++)
        if (strstr(ef_ctx_diag_text(ctx, i), text)) return true;
    return false;
}

static char *dup_text(const char *s)
{
    char *d = malloc(strlen(s) + 1);
    if (d) memcpy(d, s, strlen(s) + 1);
    return d;
}

static ef_index node(const vib_run *v, const char *name)
{
    ef_index i = ef_model_find_node(v->m, name);
    assert_true(i >= 0);
    return i;
}

/* A single mass `mass_t` (tonnes) on the tip of a massless 1 m cantilever along X, only
 * uz and ry free, so one vertical mode at f Hz: k = 3 E Iy / L^3 = m (2 pi f)^2 (the cubic
 * element is exact for a tip load). Units: force F, length Ln; the numbers below are
 * converted from kN, m, t with fs = kN in F and ls = m in Ln. `extra`: more analyses. */
static const char *sdof_model(double f, double mass_t, const char *F, const char *Ln, double fs,
                              double ls, const char *extra)
{
    static char buf[4096];
    const double E = 210e6, L = 1.0;
    double k = mass_t * pow(TWO_PI * f, 2);                        /* kN/m */
    double Iy = k * L * L * L / (3.0 * E);                         /* m^4 */
    double Es = E * fs / (ls * ls), Is = Iy * pow(ls, 4), Ls = L * ls;
    double ms = mass_t * fs / ls;                                  /* t -> F s^2 / Ln */
    snprintf(buf, sizeof buf,
             "eigenframe: 1\n"
             "units: {force: %s, length: %s}\n"
             "restrain_all: [ux, uy, rx, rz]\n"
             "materials: {light: {E: %.17g, G: %.17g}}\n"
             "sections: {s: {A: %.17g, Iy: %.17g, Iz: %.17g, J: %.17g}}\n"
             "nodes: {A: [0, 0, 0], B: [%.17g, 0, 0]}\n"
             "members: {M: {nodes: [A, B], section: s, material: light}}\n"
             "supports: {A: fixed}\n"
             "masses: {B: %.17g}\n"
             "analyses:\n"
             "  static: []\n"
             "  modal: {modes: 2}\n"
             "%s",
             F, Ln, Es, 0.4 * Es, 0.01 * ls * ls, Is, Is, 1e-4 * pow(ls, 4), Ls, ms, extra);
    return buf;
}

/* Simply supported steel beam along X (kN, m, t) with extra floor mass, supports at A
 * and B, intermediate model nodes at the given fractions (names N1, N2, ...). */
static const char *ss_beam_model(double L, double I, double extra_mass, int div,
                                 const double *at, int n_at, const char *analyses)
{
    static char buf[8192];
    char nodes[2048], members[2048];
    int pn = snprintf(nodes, sizeof nodes, "A: [0, 0, 0], B: [%.17g, 0, 0]", L);
    int pm = 0;
    const char *prev = "A";
    char name[16], prevbuf[16];
    for (int i = 0; i <= n_at; i++) {
        if (i < n_at) {
            snprintf(name, sizeof name, "N%d", i + 1);
            pn += snprintf(nodes + pn, sizeof nodes - (size_t)pn, ", %s: [%.17g, 0, 0]", name, at[i] * L);
        } else {
            snprintf(name, sizeof name, "B");
        }
        pm += snprintf(members + pm, sizeof members - (size_t)pm,
                       "%sM%d: {nodes: [%s, %s], section: s, material: steel}", i ? ", " : "", i + 1,
                       prev, name);
        snprintf(prevbuf, sizeof prevbuf, "%s", name);
        prev = prevbuf;
    }
    snprintf(buf, sizeof buf,
             "eigenframe: 1\n"
             "units: {force: kN, length: m}\n"
             "mesh: {divisions: %d}\n"
             "restrain_all: [uy, rx, rz]\n"
             "materials: {steel: {E: 210e6, G: 81e6, density: 7.85}}\n"
             "sections: {s: {A: 0.01, Iy: %.17g, Iz: %.17g, J: 1e-5, extra_mass: %.17g}}\n"
             "nodes: {%s}\n"
             "members: {%s}\n"
             "supports: {A: [ux, uz], B: [uz]}\n"
             "%s",
             div, I, I, extra_mass, nodes, members, analyses);
    return buf;
}

/* Independent re-statement of the resonant formulas of the method note §2(ii)-(iii) for
 * one mode: a_w,rms = rho / sqrt2 * sqrt(sum_h (W_b(h fp) alpha_h Q c |H(h fp / f)|)^2). */
static double ref_wb(double f)
{
    return f < 2.0 ? 0.4 : f < 5.0 ? f / 5.0 : f <= 16.0 ? 1.0 : 16.0 / f;
}

static double ref_one_mode_awrms(double f, double c, double Q, double fp, double zeta, double rho)
{
    const double alpha[4] = {0.436 * (fp - 0.95), 0.006 * (2 * fp + 12.3), 0.007 * (3 * fp + 5.2),
                             0.007 * (4 * fp + 2.0)};
    double s = 0.0;
    for (int h = 1; h <= 4; h++) {
        double b = h * fp / f;
        double H = b * b / sqrt(pow(1 - b * b, 2) + pow(2 * zeta * b, 2));
        double a = ref_wb(h * fp) * alpha[h - 1] * Q * fabs(c) * H;
        s += a * a;
    }
    return rho * sqrt(s / 2.0);
}

/* ---- kernels --------------------------------------------------------------------------- */

/* Method note §6.6: alpha_1..4 at fp = 2.0 Hz = 0.4578, 0.0978, 0.0784, 0.0700 (SCI P354
 * Table 3.1 form, from memory). */
static void test_vibration_walking_coefficients_at_two_hz(void **state)
{
    (void)state;
    double a[4];
    ef_vibration_walk_coeffs(2.0, a);
    assert_rel_close(a[0], 0.4578, 1e-12);
    assert_rel_close(a[1], 0.0978, 1e-12);
    assert_rel_close(a[2], 0.0784, 1e-12);
    assert_rel_close(a[3], 0.0700, 1e-12);
}

/* Method note §6.6 [D]: fp = 2 Hz, zeta = 0.03, L = 10 m: v = 1.52 m/s, rho = 0.9163;
 * no path length: rho = 1; a longer path builds up more. */
static void test_vibration_buildup_factor(void **state)
{
    (void)state;
    assert_rel_close(ef_vibration_walk_speed(2.0), 1.52, 1e-12);
    assert_abs_close(ef_vibration_buildup(0.03, 10.0, 2.0), 0.9163, 5e-5);
    assert_rel_close(ef_vibration_buildup(0.03, 0.0, 2.0), 1.0, 0.0);
    assert_true(ef_vibration_buildup(0.03, 20.0, 2.0) > ef_vibration_buildup(0.03, 10.0, 2.0));
    assert_true(ef_vibration_buildup(0.03, 20.0, 2.0) < 1.0);
}

/* Method note §6.8: exact Wk at 1/4/8/16 Hz = 0.482/0.967/1.036/0.769 and Wd at 1/2/4 Hz =
 * 1.011/0.890/0.512 (ISO 2631-1:1997 Table 3, from memory for the table). The table
 * gives three decimals, hence the tolerance. */
static void test_vibration_exact_weighting_filters_match_iso_table(void **state)
{
    (void)state;
    const double fk[4] = {1, 4, 8, 16}, wk[4] = {0.482, 0.967, 1.036, 0.769};
    for (int i = 0; i < 4; i++) assert_abs_close(ef_vibration_filter(EF_FILTER_WK, fk[i]), wk[i], 6e-4);
    const double fd[3] = {1, 2, 4}, wd[3] = {1.011, 0.890, 0.512};
    for (int i = 0; i < 3; i++) assert_abs_close(ef_vibration_filter(EF_FILTER_WD, fd[i]), wd[i], 6e-4);
    /* exact Wb: K = 0.4 (4/2.5)^2 = 1.024 puts its 5-16 Hz plateau near 1, and it falls
     * as 16/f far above 16 Hz, as the asymptotic form (method note §2(iii)) */
    assert_abs_close(ef_vibration_filter(EF_FILTER_WB, 8.0), 1.0, 0.03);
    assert_abs_close(ef_vibration_filter(EF_FILTER_WB, 1.5), 0.4, 0.02);
    assert_rel_close(ef_vibration_filter(EF_FILTER_WB, 60.0) / ef_vibration_filter(EF_FILTER_WB, 30.0),
                     0.5, 0.05);
}

/* Asymptotic Wb and Wg as the method note §2(iii) defines them (SCI P354, from memory),
 * and continuity at the corner frequencies. */
static void test_vibration_asymptotic_weightings(void **state)
{
    (void)state;
    assert_rel_close(ef_vibration_weight(EF_WEIGHT_WB, 1.5), 0.4, 1e-15);
    assert_rel_close(ef_vibration_weight(EF_WEIGHT_WB, 3.0), 0.6, 1e-15);
    assert_rel_close(ef_vibration_weight(EF_WEIGHT_WB, 10.0), 1.0, 1e-15);
    assert_rel_close(ef_vibration_weight(EF_WEIGHT_WB, 32.0), 0.5, 1e-15);
    assert_rel_close(ef_vibration_weight(EF_WEIGHT_WG, 2.0), 0.5 * sqrt(2.0), 1e-15);
    assert_rel_close(ef_vibration_weight(EF_WEIGHT_WG, 6.0), 1.0, 1e-15);
    assert_rel_close(ef_vibration_weight(EF_WEIGHT_WG, 16.0), 0.5, 1e-15);
    assert_rel_close(ef_vibration_weight(EF_WEIGHT_WD, 4.0), 0.5, 1e-15);
    const double corners[][2] = {{EF_WEIGHT_WB, 2}, {EF_WEIGHT_WB, 5}, {EF_WEIGHT_WB, 16},
                                 {EF_WEIGHT_WG, 4}, {EF_WEIGHT_WG, 8}, {EF_WEIGHT_WD, 2}};
    for (size_t i = 0; i < sizeof corners / sizeof corners[0]; i++) {
        int w = (int)corners[i][0];
        double f = corners[i][1];
        assert_rel_close(ef_vibration_weight(w, f * (1 - 1e-9)), ef_vibration_weight(w, f * (1 + 1e-9)), 1e-8);
    }
}

/* Method note §6.7 [D]: fp = 2.0 Hz, f = 12 Hz, Q = 746 N: I_eff = 6.813 N s. */
static void test_vibration_effective_impulse(void **state)
{
    (void)state;
    assert_abs_close(ef_vibration_impulse(2.0, 12.0, 746.0), 6.813, 5e-4);
    /* it rises with the pace and falls with the mode frequency */
    assert_true(ef_vibration_impulse(2.2, 12.0, 746.0) > ef_vibration_impulse(2.0, 12.0, 746.0));
    assert_true(ef_vibration_impulse(2.0, 14.0, 746.0) < ef_vibration_impulse(2.0, 12.0, 746.0));
}

/* The closed-form rms of a sum of decaying sinusoids against composite Simpson
 * quadrature with 20000 steps, for three modes (two of them close, where the difference
 * term of the double sum matters). Then the method note §6.7 value: amplitude 6.813e-4
 * m/s at 12 Hz, zeta 0.03, fp 2 Hz: v_rms = 3.031e-4 m/s [D]. */
static void test_vibration_transient_rms_closed_form(void **state)
{
    (void)state;
    const double amp[3] = {1.0e-3, -0.6e-3, 0.4e-3}, f[3] = {10.0, 10.3, 17.0};
    const double zeta = 0.02, fp = 1.9, T = 1.0 / fp;
    const int n = 20000;
    double s = 0.0, h = T / n, wd = sqrt(1 - zeta * zeta);
    for (int i = 0; i <= n; i++) {
        double t = i * h, v = 0.0;
        for (int k = 0; k < 3; k++) v += amp[k] * exp(-TWO_PI * zeta * f[k] * t) * sin(TWO_PI * f[k] * wd * t);
        s += (i == 0 || i == n ? 1.0 : i % 2 ? 4.0 : 2.0) * v * v;
    }
    double quad = sqrt(fp * s * h / 3.0);
    assert_rel_close(ef_vibration_transient_rms(3, amp, f, zeta, fp), quad, 1e-9);
    const double a1 = 6.813e-4, f1 = 12.0;
    assert_abs_close(ef_vibration_transient_rms(1, &a1, &f1, 0.03, 2.0), 3.031e-4, 5e-8);
}

/* Method note §6.7 [D], the resonant kernel alone: 10 t mass (phi^2 = 1/10000 kg^-1),
 * f = 4 Hz, zeta = 0.03, fp = 2.0 Hz, Q = 746 N, asymptotic Wb, rho = 1:
 * |A_2| = 0.1216 m/s^2, a_w,rms = 0.06944 m/s^2, the second harmonic governs. */
static void test_vibration_resonant_kernel_single_mass(void **state)
{
    (void)state;
    const double f = 4.0, c = 1.0 / 10000.0, fp = 2.0;
    double _Complex H[4];
    double alpha[4], W[4];
    ef_vibration_frf_table(1, &f, 0.03, fp, H);
    ef_vibration_walk_coeffs(fp, alpha);
    for (int h = 0; h < 4; h++) W[h] = ef_vibration_weight(EF_WEIGHT_WB, (h + 1) * fp);
    ef_vib_resonant out;
    ef_vibration_resonant(1, H, &c, alpha, W, 746.0, 1.0, &out);
    assert_abs_close(out.A[1], 0.1216, 5e-5);
    assert_abs_close(out.a_w_rms, 0.06944, 5e-6);
    assert_int_equal(out.harmonic, 2);
    assert_int_equal(out.mode, 0);
    /* at exact resonance H = 1/(2 i zeta) (Chopra): |A_2| = alpha_2 Q c / (2 zeta) */
    assert_rel_close(out.A[1], alpha[1] * 746.0 * c / 0.06, 1e-12);
}

/* ---- walking on models ------------------------------------------------------------------ */

/* Method note §6.7 through the whole chain (model in kN, m, t): R = 13.89 with h = 2,
 * f1 = 4 Hz; the self-weight deflection of a single mass is g / w^2 exactly. */
static void test_walking_single_mass_floor_resonant(void **state)
{
    (void)state;
    vib_run v = vib_load(sdof_model(4.0, 10.0, "kN", "m", 1, 1,
        "  walking: {receivers: [B], damping: 0.03, pace_hz: [2.0, 2.0]}\n"));
    assert_int_equal(vib_walk(&v), EF_OK);
    const ef_walking_result *w = v.r->walking;
    assert_non_null(w);
    assert_rel_close(w->f1_vertical, 4.0, 1e-9);
    assert_int_equal(w->f1_mode, 1);
    assert_int_equal(w->method[0], 0);
    assert_int_equal(w->methods, 1);
    assert_abs_close(w->response_rms[0], 0.06944, 5e-6);
    assert_abs_close(w->R[0], 13.89, 5e-3);
    assert_int_equal(w->harmonic[0], 2);
    assert_int_equal(w->mode[0], 1);
    assert_int_equal(w->walker[0], node(&v, "B"));
    assert_rel_close(w->pace_hz[0], 2.0, 0.0);
    assert_true(isnan(w->R_transient[0]));
    /* delta = m g / k = g / w^2 (SDOF); f = 18/sqrt(delta_mm) (the note's screening rule) */
    double delta = 9.80665 / pow(TWO_PI * 4.0, 2);
    assert_rel_close(w->delta_selfweight, delta, 1e-9);
    assert_rel_close(w->f_selfweight, 18.0 / sqrt(delta * 1000.0), 1e-9);
    /* the mode lies in 2 x [2.0, 2.0] only */
    assert_int_equal(w->pace_flags[0], 2);
    vib_free(&v);
}

/* The same floor in N, mm (mass in N s^2/mm = t): the response is the same physical
 * quantity in mm/s^2, R is unchanged; with a 10 m (10000 mm) walking path the resonant
 * response is scaled by rho = 0.9163 (method note §6.6 [D]). */
static void test_walking_units_and_path_length(void **state)
{
    (void)state;
    vib_run v = vib_load(sdof_model(4.0, 10.0, "N", "mm", 1000.0, 1000.0,
        "  walking: {receivers: [B], damping: 0.03, pace_hz: [2.0, 2.0], path_length: 10000}\n"));
    assert_int_equal(vib_walk(&v), EF_OK);
    const ef_walking_result *w = v.r->walking;
    assert_rel_close(v.m->analyses.walk_weight, 746.0, 1e-12);     /* default, in N */
    double rho = ef_vibration_buildup(0.03, 10.0, 2.0);
    assert_abs_close(rho, 0.9163, 5e-5);
    assert_rel_close(w->R[0], 13.89 * rho, 5e-4);
    assert_rel_close(w->response_rms[0], 69.44 * rho, 5e-4);      /* mm/s^2 */
    vib_free(&v);
}

/* Method note §6.7 [D], the high-frequency floor: 10 t at 12 Hz, fp = 2.0 Hz: v_rms =
 * 3.031e-4 m/s, R = 3.03 by the transient method. f1 = 12 Hz lies in 8-12 Hz, so the
 * resonant method is computed too and must come out smaller. In N, mm the velocity is
 * in mm/s. */
static void test_walking_single_mass_floor_transient(void **state)
{
    (void)state;
    const char *units[2][2] = {{"kN", "m"}, {"N", "mm"}};
    const double fs[2] = {1.0, 1000.0}, ls[2] = {1.0, 1000.0};
    for (int u = 0; u < 2; u++) {
        vib_run v = vib_load(sdof_model(12.0, 10.0, units[u][0], units[u][1], fs[u], ls[u],
            "  walking: {receivers: [B], damping: 0.03, pace_hz: [2.0, 2.0]}\n"));
        assert_int_equal(vib_walk(&v), EF_OK);
        const ef_walking_result *w = v.r->walking;
        assert_rel_close(w->f1_vertical, 12.0, 1e-9);
        assert_int_equal(w->methods, 3);
        assert_int_equal(w->method[0], 1);
        assert_abs_close(w->R[0], 3.03, 5e-3);
        assert_abs_close(w->response_rms[0] / ls[u], 3.031e-4, 5e-8);
        assert_true(w->R_resonant[0] < w->R_transient[0]);
        assert_int_equal(w->harmonic[0], 0);
        assert_int_equal(w->mode[0], 1);
        assert_rel_close(w->cutoff_transient, 24.0, 1e-9);
        vib_free(&v);
    }
}

/* Simply supported floor beam, L = 8 m, I = 2.2e-4 m^4, mass m = 7.85 * 0.01 + 1.5 t/m:
 * f1 = (pi/2) sqrt(EI/(m L^4)) = 4.23 Hz (Blevins Table 8-1); the second mode (4 f1 =
 * 16.9 Hz) lies above 15 Hz, so only mode 1 is summed, with phi(mid)^2 = 2/(m L) (modal
 * mass m L/2 of the shape sin). The pace is set to f1/2: the second harmonic resonates.
 * Reference: the one-mode formula re-stated above (method note §2(ii)). Also the
 * screening rule's ratio for this beam: f1 sqrt(delta_mm) = (pi/2) sqrt(5 g/384) in mm
 * = 17.75 (method note §6.1 [D]). */
static void test_walking_simply_supported_beam_resonant(void **state)
{
    (void)state;
    const double L = 8.0, I = 2.2e-4, E = 210e6, mass = 7.85 * 0.01 + 1.5, zeta = 0.03;
    const double f1 = PI / 2.0 * sqrt(E * I / (mass * pow(L, 4)));
    const double at[1] = {0.5};
    char an[512];
    snprintf(an, sizeof an,
             "analyses:\n  static: []\n  modal: {modes: 4}\n"
             "  walking: {receivers: [N1], damping: %.17g, pace_hz: [%.17g, %.17g]}\n",
             zeta, f1 / 2, f1 / 2);
    vib_run v = vib_load(ss_beam_model(L, I, 1.5, 8, at, 1, an));
    assert_int_equal(vib_walk(&v), EF_OK);
    const ef_walking_result *w = v.r->walking;
    assert_rel_close(w->f1_vertical, f1, 1e-5);
    assert_int_equal(w->modes_resonant, 1);
    double ref = ref_one_mode_awrms(f1, 2.0 / (mass * L), 0.746, f1 / 2, zeta, 1.0);
    assert_rel_close(w->response_rms[0], ref, 1e-4);
    assert_rel_close(w->R[0], ref / 0.005, 1e-4);
    assert_int_equal(w->harmonic[0], 2);
    double dmm = w->delta_selfweight * 1000.0;
    assert_rel_close(w->f1_vertical * sqrt(dmm), PI / 2.0 * sqrt(5.0 * 9806.65 / 384.0), 1e-4);
    assert_abs_close(PI / 2.0 * sqrt(5.0 * 9806.65 / 384.0), 17.75, 5e-3);
    vib_free(&v);
}

/* Symmetry: receivers at the quarter points of a simply supported beam, walkers at both
 * (default: the receivers), modes 1 and 2 below 15 Hz: both receivers get the same R
 * over the default pace range. */
static void test_walking_symmetric_receivers_same_response(void **state)
{
    (void)state;
    const double at[3] = {0.25, 0.5, 0.75};
    vib_run v = vib_load(ss_beam_model(10.0, 1.0e-4, 1.2, 4, at, 3,
        "analyses:\n  static: []\n  modal: {modes: 6}\n"
        "  walking: {receivers: [N1, N3], damping: 0.025}\n"));
    assert_int_equal(vib_walk(&v), EF_OK);
    const ef_walking_result *w = v.r->walking;
    assert_true(w->modes_resonant >= 2);
    assert_true(v.r->modal->freq[1] < 15.0);
    assert_rel_close(w->R[0], w->R[1], 1e-7);
    assert_rel_close(w->pace_hz[0], w->pace_hz[1], 1e-9);
    assert_true(w->R[0] > 0.0);
    /* the scan went at least as fine as 0.01 Hz over 1.8-2.2 Hz */
    assert_true(w->n_pace >= 41);
    vib_free(&v);
}

/* A sway (horizontal) mode below the vertical one is not taken as f1, and is not
 * flagged against the pace harmonics. Mass on a massless cantilever free to move in y
 * and z, Iz < Iy so the horizontal mode is lower. */
static void test_walking_horizontal_mode_is_not_the_fundamental(void **state)
{
    (void)state;
    static char buf[2048];
    const double E = 210e6, m = 10.0, k = m * pow(TWO_PI * 4.0, 2), Iy = k / (3 * E);
    snprintf(buf, sizeof buf,
             "eigenframe: 1\n"
             "units: {force: kN, length: m}\n"
             "restrain_all: [ux, rx]\n"
             "materials: {light: {E: 210e6, G: 81e6}}\n"
             "sections: {s: {A: 0.01, Iy: %.17g, Iz: %.17g, J: 1e-4}}\n"
             "nodes: {A: [0, 0, 0], B: [1, 0, 0]}\n"
             "members: {M: {nodes: [A, B], section: s, material: light}}\n"
             "supports: {A: fixed}\n"
             "masses: {B: 10}\n"
             "analyses:\n  static: []\n  modal: {modes: 2}\n"
             "  walking: {receivers: [B], damping: 0.03, pace_hz: [1.0, 1.5]}\n",
             Iy, Iy / 4);
    vib_run v = vib_load(buf);
    assert_int_equal(vib_walk(&v), EF_OK);
    const ef_walking_result *w = v.r->walking;
    assert_int_equal(v.r->modal->n_modes, 2);
    assert_rel_close(v.r->modal->freq[0], 2.0, 1e-9);              /* sqrt(1/4) x 4 Hz */
    assert_int_equal(w->is_vertical[0], 0);
    assert_int_equal(w->is_vertical[1], 1);
    assert_int_equal(w->f1_mode, 2);
    assert_rel_close(w->f1_vertical, 4.0, 1e-9);
    assert_int_equal(w->pace_flags[0], 0);           /* 2 Hz is in 2 x [1, 1.5] but horizontal */
    assert_int_equal(w->pace_flags[1], 1 << 2 | 1 << 3);   /* 4 Hz: 3 x and 4 x the range */
    vib_free(&v);
}

/* Starting from one mode, the vibration modal run keeps asking for more until the highest
 * computed frequency passes the walking cut-off of 15 Hz (method note §2(ii)), and for a
 * machine until twice the top of its sweep. The beam of the symmetry test has modes at
 * n^2 x 2.01 Hz (Blevins Table 8-1), so 15 Hz needs 3 modes. */
static void test_vibration_modal_run_reaches_the_cutoff(void **state)
{
    (void)state;
    const double at[3] = {0.25, 0.5, 0.75};
    vib_run v = vib_load(ss_beam_model(10.0, 1.0e-4, 1.2, 8, at, 3,
        "analyses:\n  static: []\n  modal: {modes: 1}\n"
        "  walking: {receivers: [N1, N3], damping: 0.025}\n"
        "  machines: {m1: {node: N2, force: [0, 0, 1.0], hz: 30.0, damping: 0.02, sweep: 0.1}}\n"));
    assert_int_equal(v.r->modal->n_modes, 1);
    ef_analyses a = v.m->analyses;
    a.n_machines = 0;
    assert_int_equal(ef_vibration_modal_run(v.sys, &a, 1, v.r, v.ctx), EF_OK);
    int n = v.r->modal->n_modes;
    assert_true(v.r->modal->freq[n - 1] > 15.0);
    assert_true(n == 1 || v.r->modal->freq[n / 2 - 1] <= 15.0);   /* doubled only as needed */
    assert_rel_close(ef_vibration_cutoff(v.r, &a), 15.0, 0.0);
    assert_int_equal(ef_vibration_modal_run(v.sys, &v.m->analyses, 1, v.r, v.ctx), EF_OK);
    n = v.r->modal->n_modes;
    assert_rel_close(ef_vibration_cutoff(v.r, &v.m->analyses), 66.0, 1e-12);
    assert_true(v.r->modal->freq[n - 1] > 66.0);
    vib_free(&v);
}

static void test_walking_without_modes_is_an_input_error(void **state)
{
    (void)state;
    vib_run v = vib_load(sdof_model(4.0, 10.0, "kN", "m", 1, 1,
        "  walking: {receivers: [B], damping: 0.03}\n"));
    ef_modal_result_free(&v.r->modal);
    assert_int_equal(ef_walking_run(v.sys, &v.m->analyses, v.r, v.ctx), EF_EINPUT);
    assert_true(diag_has(v.ctx, "walking: the natural modes are needed first"));
    assert_null(v.r->walking);
    vib_free(&v);
}

/* The text report names its inputs, sources and cautions, and prints R. */
static void test_walking_report_text(void **state)
{
    (void)state;
    vib_run v = vib_load(sdof_model(4.0, 10.0, "kN", "m", 1, 1,
        "  walking: {receivers: [B], damping: 0.03, limit_R: 8}\n"));
    assert_int_equal(vib_walk(&v), EF_OK);
    FILE *f = tmpfile();
    assert_non_null(f);
    ef_write_text_walking(f, v.r);
    long n = ftell(f);
    rewind(f);
    char *text = calloc((size_t)n + 1, 1);
    assert_non_null(text);
    assert_int_equal(fread(text, 1, (size_t)n, f), (size_t)n);
    fclose(f);
    assert_non_null(strstr(text, "SCI P354"));
    assert_non_null(strstr(text, "human-structure"));
    assert_non_null(strstr(text, "Limit you gave: R = 8; 1 of 1 receivers have a larger R"));
    assert_non_null(strstr(text, "a_w,rms"));
    assert_non_null(strstr(text, "m/s^2"));
    free(text);
    vib_free(&v);
}

/* ---- machines ------------------------------------------------------------------------------- */

/* Method note §6.9 / Chopra: a harmonic force F0 on a single mass at Omega = omega gives
 * |a| = F0 phi_s phi_r / (2 zeta) = F0 / (2 zeta m); the vertical R below 8 Hz is
 * W_b(f) a_rms / 0.005 m/s^2 with a_rms = |a| / sqrt 2 (method note §2(vi)). */
static void test_machine_single_mass_at_resonance(void **state)
{
    (void)state;
    vib_run v = vib_load(sdof_model(4.0, 10.0, "kN", "m", 1, 1,
        "  machines: {fan: {node: B, force: [0, 0, 0.2], hz: 4.0, damping: 0.02, sweep: 0}}\n"));
    assert_int_equal(ef_machines_run(v.sys, v.m, v.r, v.ctx), EF_OK);
    assert_int_equal(v.r->n_machines, 1);
    const ef_machine_result *mr = &v.r->machines[0];
    assert_int_equal(mr->n_hz, 1);
    assert_true(mr->corrected);
    double a = 0.2 / (2 * 0.02 * 10.0);
    assert_rel_close(mr->acc[2], a, 1e-9);
    assert_rel_close(mr->vel[2], a / (TWO_PI * 4.0), 1e-9);
    assert_rel_close(mr->disp[2], a / pow(TWO_PI * 4.0, 2), 1e-9);
    assert_abs_close(mr->acc[0], 0.0, 1e-12 * a);
    assert_rel_close(mr->R[0], 0.8 * a / sqrt(2.0) / 0.005, 1e-9);
    assert_abs_close(mr->R_horizontal[0], 0.0, 1e-9);
    vib_free(&v);
}

/* A sweep of 4.1 Hz +- 10 % contains the natural frequency 4 Hz exactly; the largest
 * acceleration over the sweep lies between the value at resonance F0/(2 zeta m) and the
 * true peak F0/(2 zeta sqrt(1 - zeta^2) m) (Chopra). */
static void test_machine_sweep_includes_the_resonance(void **state)
{
    (void)state;
    vib_run v = vib_load(sdof_model(4.0, 10.0, "kN", "m", 1, 1,
        "  machines: {fan: {node: B, force: [0, 0, 0.2], hz: 4.1, damping: 0.02}}\n"));
    assert_int_equal(ef_machines_run(v.sys, v.m, v.r, v.ctx), EF_OK);
    const ef_machine_result *mr = &v.r->machines[0];
    bool has = false;
    double amax = 0.0;
    for (int q = 0; q < mr->n_hz; q++) {
        has |= fabs(mr->hz[q] - 4.0) < 1e-9;
        amax = fmax(amax, mr->acc[3 * q + 2]);
        if (q) assert_true(mr->hz[q] > mr->hz[q - 1]);
    }
    assert_true(has);
    assert_rel_close(mr->hz[0], 4.1 * 0.9, 1e-12);
    assert_rel_close(mr->hz[mr->n_hz - 1], 4.1 * 1.1, 1e-12);
    double a0 = 0.2 / (2 * 0.02 * 10.0);
    assert_true(amax >= a0 * (1 - 1e-12));
    assert_true(amax <= a0 / sqrt(1 - 0.02 * 0.02) * (1 + 1e-12));
    vib_free(&v);
}

/* Omega -> 0 with only two modes computed: the static correction recovers the static
 * midspan deflection P L^3/(48 EI) of a simply supported beam (Roark; exact with cubic
 * elements at nodes), which the truncated modal sum alone misses by about 1.5 %. */
static void test_machine_low_frequency_recovers_static_deflection(void **state)
{
    (void)state;
    const double L = 6.0, I = 1.0e-4, E = 210e6, P = 1.0;
    const double at[1] = {0.5};
    vib_run v = vib_load(ss_beam_model(L, I, 0.5, 8, at, 1,
        "analyses:\n  static: []\n  modal: {modes: 2}\n"
        "  machines: {m1: {node: N1, force: [0, 0, 1.0], hz: 0.001, damping: 0.02, sweep: 0}}\n"));
    assert_int_equal(v.r->modal->n_modes, 2);
    assert_int_equal(ef_machines_run(v.sys, v.m, v.r, v.ctx), EF_OK);
    const ef_machine_result *mr = &v.r->machines[0];
    double exact = P * pow(L, 3) / (48 * E * I);
    assert_rel_close(mr->disp[2], exact, 1e-6);
    /* the two-mode sum alone: sum phi_m(mid)^2 / w_m^2 */
    ef_index mid = node(&v, "N1");
    double trunc = 0.0;
    for (int k = 0; k < 2; k++) {
        double ph = v.r->modal->shapes[((size_t)k * (size_t)v.m->n_nodes + (size_t)mid) * 6 + 2];
        trunc += P * ph * ph / v.r->modal->omega2[k];
    }
    assert_true(fabs(trunc - exact) / exact > 5e-3);
    vib_free(&v);
}

/* Without supports the static correction is not available (rigid-body modes); a sweep
 * above 0.8 of the highest computed mode is then flagged. */
static void test_machine_truncation_warning_without_correction(void **state)
{
    (void)state;
    const double at[1] = {0.5};
    char *yaml = dup_text(ss_beam_model(6.0, 1.0e-4, 0.5, 10, at, 1,
        "analyses:\n  static: []\n  modal: {modes: 8}\n"
        "  machines: {m1: {node: N1, force: [0, 0, 1.0], hz: 500.0, damping: 0.02}}\n"));
    assert_non_null(yaml);
    char *sup = strstr(yaml, "supports:");
    assert_non_null(sup);
    memset(sup, ' ', strcspn(sup, "\n"));                   /* drop the supports */
    vib_run v = vib_load(yaml);
    free(yaml);
    assert_true(v.r->modal->n_rigid > 0);
    assert_true(v.r->modal->freq[v.r->modal->n_modes - 1] < 0.8 * 450.0);
    assert_int_equal(ef_machines_run(v.sys, v.m, v.r, v.ctx), EF_OK);
    assert_false(v.r->machines[0].corrected);
    assert_true(v.r->machines[0].beyond_modes);
    assert_true(diag_has(v.ctx, "static correction"));
    vib_free(&v);
}

static void test_machine_report_text(void **state)
{
    (void)state;
    vib_run v = vib_load(sdof_model(4.0, 10.0, "kN", "m", 1, 1,
        "  machines: {fan: {node: B, force: [0, 0, 0.2], hz: 4.1, damping: 0.02}}\n"));
    assert_int_equal(ef_machines_run(v.sys, v.m, v.r, v.ctx), EF_OK);
    FILE *f = tmpfile();
    assert_non_null(f);
    ef_write_text_machines(f, v.r);
    long n = ftell(f);
    rewind(f);
    char *text = calloc((size_t)n + 1, 1);
    assert_non_null(text);
    assert_int_equal(fread(text, 1, (size_t)n, f), (size_t)n);
    fclose(f);
    assert_non_null(strstr(text, "machine 'fan'"));
    assert_non_null(strstr(text, "static correction"));
    assert_non_null(strstr(text, "human-structure"));
    free(text);
    vib_free(&v);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_vibration_walking_coefficients_at_two_hz),
        cmocka_unit_test(test_vibration_buildup_factor),
        cmocka_unit_test(test_vibration_exact_weighting_filters_match_iso_table),
        cmocka_unit_test(test_vibration_asymptotic_weightings),
        cmocka_unit_test(test_vibration_effective_impulse),
        cmocka_unit_test(test_vibration_transient_rms_closed_form),
        cmocka_unit_test(test_vibration_resonant_kernel_single_mass),
        cmocka_unit_test(test_walking_single_mass_floor_resonant),
        cmocka_unit_test(test_walking_units_and_path_length),
        cmocka_unit_test(test_walking_single_mass_floor_transient),
        cmocka_unit_test(test_walking_simply_supported_beam_resonant),
        cmocka_unit_test(test_walking_symmetric_receivers_same_response),
        cmocka_unit_test(test_walking_horizontal_mode_is_not_the_fundamental),
        cmocka_unit_test(test_vibration_modal_run_reaches_the_cutoff),
        cmocka_unit_test(test_walking_without_modes_is_an_input_error),
        cmocka_unit_test(test_walking_report_text),
        cmocka_unit_test(test_machine_single_mass_at_resonance),
        cmocka_unit_test(test_machine_sweep_includes_the_resonance),
        cmocka_unit_test(test_machine_low_frequency_recovers_static_deflection),
        cmocka_unit_test(test_machine_truncation_warning_without_correction),
        cmocka_unit_test(test_machine_report_text),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
