/* vibration.c: floor and platform vibration serviceability: footfall (walking) and
 * harmonic machinery, by modal superposition (dynamics-and-stability-methods.md §2;
 * docs/vibration.md gives every coefficient with its source).
 *
 * Invariants: shapes come from r->modal, mass-normalised (φᵀMφ = 1) at model nodes, so a
 * product φ_m(e)φ_m(r) is in 1/mass and force times it is an acceleration, in the model's
 * units. The published coefficients are in N, m, s and are converted here through the
 * SI size of the model's force and length units; nothing else leaves the model's units.
 * "[M]" marks a coefficient quoted from memory of the source (not re-read): check before
 * relying on it. The program never decides pass or fail.
 */
#include "vibration.h"
#include "vec3.h"

#include "loads.h"
#include "modal.h"

#include <complex.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#undef I   /* <complex.h>: not used; keeps the name free */

#define PI 3.141592653589793
#define TWO_PI 6.283185307179586
/* Frequency bounds of the method choice (our choice, method note §2(iv)): below
 * EF_VIB_TRANSIENT_FROM only the resonant method, above EF_VIB_RESONANT_TO only the
 * transient one, in between both and the larger governs. */
#define EF_VIB_TRANSIENT_FROM 8.0
#define EF_VIB_RESONANT_TO 12.0
/* Above this frequency a machine's R is judged on velocity (base curve 1e-4 m/s). */
#define EF_VIB_VELOCITY_FROM 8.0
/* Relative tolerance on the edges of the pace-harmonic bands h*[fp_min, fp_max], so that
 * a mode computed a rounding error away from an edge (or a one-point range) counts. */
#define EF_VIB_BAND_RTOL 1e-9
/* Most frequencies one scan may hold (a guard against a tiny damping ratio asking for
 * millions of points); the step is widened to fit, with a note. */
#define EF_VIB_MAX_SCAN 100000
/* Machine sweeps: at least this many grid points over the range (our choice). */
#define EF_VIB_MIN_SWEEP 201
/* Machine sweeps warn above this fraction of the highest computed mode (method note
 * §2(vi), our threshold) when the static correction is not available. */
#define EF_VIB_TRUNCATION_RATIO 0.8

/* ---- weighting ----------------------------------------------------------------------- */

double ef_vibration_weight(int w, double f)
{
    if (!(f > 0.0)) return 0.0;
    switch (w) {
    case EF_WEIGHT_WG:
        /* Wg, BS 6472:1992, asymptotic as used in SCI P354 [M]: 0.5 sqrt(f) for 1-4 Hz,
         * 1 for 4-8 Hz, 8/f above. Below 1 Hz the 1 Hz value is held (our choice: the
         * standard curve falls there, so this is conservative). */
        if (f < 1.0) return 0.5;
        if (f < 4.0) return 0.5 * sqrt(f);
        if (f <= 8.0) return 1.0;
        return 8.0 / f;
    case EF_WEIGHT_WD:
        /* Wd (horizontal), asymptotic [M]: 1 for 1-2 Hz, 2/f above; held below 1 Hz */
        if (f <= 2.0) return 1.0;
        return 2.0 / f;
    default:
        /* Wb, BS 6841:1987 / BS 6472-1:2008, asymptotic as used in SCI P354 [M]: 0.4 for
         * 1-2 Hz, f/5 for 2-5 Hz, 1 for 5-16 Hz, 16/f above; held at 0.4 below 1 Hz */
        if (f < 2.0) return 0.4;
        if (f < 5.0) return f / 5.0;
        if (f <= 16.0) return 1.0;
        return 16.0 / f;
    }
}

/* ISO 2631-1:1997 Annex A: |W| = K |H_h H_l H_t H_s| at s = i 2 pi f, with
 *   H_h = s^2 / (s^2 + sqrt2 w1 s + w1^2)          high pass, f1 = 0.4 Hz
 *   H_l = w2^2 / (s^2 + sqrt2 w2 s + w2^2)         low pass, f2 = 100 Hz
 *   H_t = (1 + s/w3) / (1 + s/(Q4 w4) + s^2/w4^2)  acceleration-velocity transition
 *   H_s = (s^2 + s w5/Q5 + w5^2) / (s^2 + s w6/Q6 + w6^2)   upward step
 * Parameters (Hz): Wk f3 = f4 = 12.5, Q4 0.63, f5 2.37, Q5 0.91, f6 3.35, Q6 0.91, K 1;
 * Wd f3 = f4 = 2, Q4 0.63, no H_s, K 1 (ISO 2631-1 Table A.1 [M]);
 * Wb (BS 6841:1987 [M]) f3 = f4 = 16, Q4 0.55, f5 2.5, Q5 0.9, f6 4, Q6 0.95,
 * K = 0.4 (4/2.5)^2 = 1.024. They reproduce the ISO 2631-1 Table 3 values checked in
 * the tests (method note §6.8). */
double ef_vibration_filter(ef_vib_filter w, double f)
{
    static const struct {
        double f3, f4, Q4, f5, Q5, f6, Q6, K;
    } p[3] = {
        {12.5, 12.5, 0.63, 2.37, 0.91, 3.35, 0.91, 1.0},     /* Wk */
        {16.0, 16.0, 0.55, 2.5, 0.9, 4.0, 0.95, 1.024},      /* Wb */
        {2.0, 2.0, 0.63, 0.0, 0.0, 0.0, 0.0, 1.0},           /* Wd: no H_s */
    };
    if ((unsigned)w > 2u || !(f > 0.0)) return 0.0;
    const double w1 = TWO_PI * 0.4, w2 = TWO_PI * 100.0;
    const double w3 = TWO_PI * p[w].f3, w4 = TWO_PI * p[w].f4;
    const double complex s = CMPLX(0.0, TWO_PI * f), s2 = s * s;
    double complex H = s2 / (s2 + sqrt(2.0) * w1 * s + w1 * w1);          /* H_h */
    H *= w2 * w2 / (s2 + sqrt(2.0) * w2 * s + w2 * w2);                   /* H_l */
    H *= (1.0 + s / w3) / (1.0 + s / (p[w].Q4 * w4) + s2 / (w4 * w4));   /* H_t */
    if (p[w].f5 > 0.0) {
        const double w5 = TWO_PI * p[w].f5, w6 = TWO_PI * p[w].f6;
        H *= (s2 + s * w5 / p[w].Q5 + w5 * w5) / (s2 + s * w6 / p[w].Q6 + w6 * w6);  /* H_s */
    }
    return p[w].K * cabs(H);
}

/* ---- walking force -------------------------------------------------------------------- */

/* SCI P354 Table 3.1 [M]: alpha_h as a function of x = h fp [Hz]:
 * 0.436 (x - 0.95), 0.006 (x + 12.3), 0.007 (x + 5.2), 0.007 (x + 2.0).
 * (CCIP-016 has its own regressions; the two sets are never mixed.) */
void ef_vibration_walk_coeffs(double fp, double alpha[4])
{
    alpha[0] = 0.436 * (1.0 * fp - 0.95);
    alpha[1] = 0.006 * (2.0 * fp + 12.3);
    alpha[2] = 0.007 * (3.0 * fp + 5.2);
    alpha[3] = 0.007 * (4.0 * fp + 2.0);
}

/* v = 1.67 fp^2 - 4.83 fp + 4.50 m/s, stated for 1.7 <= fp <= 2.4 Hz (SCI P354, after
 * Bachmann & Ammann [M]). Positive for every fp (negative discriminant). */
double ef_vibration_walk_speed(double fp)
{
    return 1.67 * fp * fp - 4.83 * fp + 4.50;
}

/* rho = 1 - exp(-2 pi zeta L fp / v) (SCI P354 [M]): the share of steady-state resonance
 * built up while one walks a path of length L. */
double ef_vibration_buildup(double zeta, double path_m, double fp)
{
    if (!(path_m > 0.0)) return 1.0;
    return 1.0 - exp(-TWO_PI * zeta * path_m * fp / ef_vibration_walk_speed(fp));
}

/* I_eff = 60 fp^1.43 / fm^1.30 * Q/700 [N s] (SCI P354 [M]; CCIP-016 has the same form,
 * its coefficient unchecked [M]). */
double ef_vibration_impulse(double fp, double fm, double Q_N)
{
    return 60.0 * pow(fp, 1.43) / pow(fm, 1.30) * (Q_N / 700.0);
}

/* Steady-state acceleration of a mode per unit modal force, as a fraction of the force
 * over the modal mass: beta^2 / (1 - beta^2 + 2 i zeta beta) (Chopra, Dynamics of
 * Structures, harmonic response of an SDOF system, in acceleration form). */
double complex ef_vibration_frf(double beta, double zeta)
{
    return beta * beta / CMPLX(1.0 - beta * beta, 2.0 * zeta * beta);
}

void ef_vibration_frf_table(int n, const double *f, double zeta, double fp, double complex *H)
{
    for (int h = 0; h < 4; h++)
        for (int m = 0; m < n; m++)
            H[h * n + m] = ef_vibration_frf((h + 1) * fp / f[m], zeta);
}

/* A_h = alpha_h Q sum_m c_m H_m (complex: the modes add with their phase). The harmonics
 * have different frequencies, so the rms of their sum is the root-sum-square of the
 * harmonic rms values, and the phase angles theta_h do not enter (method note §2(ii)). */
void ef_vibration_resonant(int n, const double complex *H, const double *c,
                           const double alpha[4], const double W[4], double Q, double rho,
                           ef_vib_resonant *out)
{
    double sum2 = 0.0, best = -1.0;
    out->harmonic = 1;
    out->mode = 0;
    for (int h = 0; h < 4; h++) {
        const double complex *Hh = H + (size_t)h * (size_t)n;
        double complex s = 0.0;
        for (int m = 0; m < n; m++) s += c[m] * Hh[m];
        double A = fabs(alpha[h] * Q) * cabs(s);
        double wa = W[h] * A;
        out->A[h] = A;
        sum2 += wa * wa;
        if (wa > best) {
            best = wa;
            out->harmonic = h + 1;
            double big = -1.0;
            for (int m = 0; m < n; m++) {
                double t = fabs(c[m]) * cabs(Hh[m]);
                if (t > big) {
                    big = t;
                    out->mode = m;
                }
            }
        }
    }
    out->a_w_rms = rho * sqrt(0.5 * sum2);     /* rms = peak / sqrt 2 per harmonic */
}

/* integral_0^T exp(-b t) cos(c t) dt, b >= 0. Closed form
 * [b + exp(-bT)(c sin cT - b cos cT)] / (b^2 + c^2); for (b^2 + c^2) T^2 tiny the Taylor
 * series T - b T^2/2 + (b^2 - c^2) T^3/6, which avoids the cancellation. */
static double damped_cos_integral(double b, double c, double T)
{
    double x2 = b * b + c * c;
    if (x2 * T * T < 1e-8) return T - b * T * T / 2.0 + (b * b - c * c) * T * T * T / 6.0;
    return (b + exp(-b * T) * (c * sin(c * T) - b * cos(c * T))) / x2;
}

/* v(t) = sum_m a_m exp(-b_m t) sin(w_m t), b_m = 2 pi zeta f_m, w_m = 2 pi f_m sqrt(1 -
 * zeta^2) (SCI P354 transient response [M]). v^2 is a double sum of products
 * sin(w_m t) sin(w_n t) = [cos((w_m - w_n) t) - cos((w_m + w_n) t)] / 2 under exp(-(b_m +
 * b_n) t), each integrated exactly over one pace period T = 1/fp: no time step, so the
 * method note's step <= 1/(20 f_max) is met in the limit. */
double ef_vibration_transient_rms(int n, const double *amp, const double *f, double zeta,
                                  double fp)
{
    const double T = 1.0 / fp, wd = sqrt(fmax(1.0 - zeta * zeta, 0.0));
    double s = 0.0;
    for (int i = 0; i < n; i++) {
        if (amp[i] == 0.0) continue;
        double bi = TWO_PI * zeta * f[i], wi = TWO_PI * f[i] * wd;
        for (int j = i; j < n; j++) {
            if (amp[j] == 0.0) continue;
            double bj = TWO_PI * zeta * f[j], wj = TWO_PI * f[j] * wd;
            double t = 0.5 * (damped_cos_integral(bi + bj, wi - wj, T) -
                              damped_cos_integral(bi + bj, wi + wj, T));
            s += (i == j ? 1.0 : 2.0) * amp[i] * amp[j] * t;
        }
    }
    return sqrt(fmax(s, 0.0) * fp);
}

/* ---- result allocation ------------------------------------------------------------------ */

ef_status ef_vibration_walking_alloc(ef_index nr, int nk, ef_walking_result **out)
{
    *out = NULL;
    ef_walking_result *wr = calloc(1, sizeof *wr);
    if (!wr) return EF_ENOMEM;
    size_t r = (size_t)EF_MAX(nr, 1), k = (size_t)EF_MAX(nk, 1);
    wr->n_receivers = nr;
    wr->n_modes = nk;
    wr->receivers = calloc(r, sizeof *wr->receivers);
    wr->walker = calloc(r, sizeof *wr->walker);
    wr->response_rms = calloc(r, sizeof *wr->response_rms);
    wr->method = calloc(r, sizeof *wr->method);
    wr->pace_hz = calloc(r, sizeof *wr->pace_hz);
    wr->mode = calloc(r, sizeof *wr->mode);
    wr->R = calloc(5 * r + 2 * k, sizeof *wr->R);                 /* the double block */
    wr->harmonic = calloc(r + 2 * k, sizeof *wr->harmonic);       /* the int block */
    if (!wr->receivers || !wr->walker || !wr->response_rms || !wr->method || !wr->pace_hz ||
        !wr->mode || !wr->R || !wr->harmonic) {
        ef_walking_result_free(&wr);
        return EF_ENOMEM;
    }
    wr->R_resonant = wr->R + r;
    wr->R_transient = wr->R + 2 * r;
    wr->rms_resonant = wr->R + 3 * r;
    wr->rms_transient = wr->R + 4 * r;
    wr->vertical_share = wr->R + 5 * r;
    wr->floor_motion = wr->R + 5 * r + k;
    wr->is_vertical = wr->harmonic + r;
    wr->pace_flags = wr->harmonic + r + k;
    for (size_t i = 0; i < r; i++)
        wr->R_resonant[i] = wr->R_transient[i] = wr->rms_resonant[i] = wr->rms_transient[i] = NAN;
    wr->f1_vertical = wr->f_selfweight = wr->delta_selfweight = NAN;
    *out = wr;
    return EF_OK;
}

ef_status ef_vibration_machine_alloc(const char *name, int n_hz, ef_index nr, ef_machine_result *mr)
{
    memset(mr, 0, sizeof *mr);
    size_t r = (size_t)EF_MAX(nr, 1), s = (size_t)EF_MAX(n_hz, 1), len = strlen(name);
    mr->n_receivers = nr;
    mr->n_hz = n_hz;
    mr->name = malloc(len + 1);
    mr->receivers = calloc(r, sizeof *mr->receivers);
    mr->hz = calloc(s, sizeof *mr->hz);
    mr->disp = calloc(s * r * 3, sizeof *mr->disp);
    mr->vel = calloc(s * r * 3, sizeof *mr->vel);
    mr->acc = calloc(s * r * 3, sizeof *mr->acc);
    mr->R = calloc(4 * r + s * r, sizeof *mr->R);                 /* the double block */
    if (!mr->name || !mr->receivers || !mr->hz || !mr->disp || !mr->vel || !mr->acc || !mr->R) {
        ef_machine_result_clear(mr);
        return EF_ENOMEM;
    }
    memcpy(mr->name, name, len + 1);
    mr->R_hz = mr->R + r;
    mr->R_horizontal = mr->R + 2 * r;
    mr->R_horizontal_hz = mr->R + 3 * r;
    mr->R_scan = mr->R + 4 * r;
    mr->node = EF_NONE;
    return EF_OK;
}

/* ---- screening ------------------------------------------------------------------------- */

/* Vertical component of mode k at model node i. */
static double phi_v(const ef_modal_result *mr, const ef_model *m, int k, ef_index i)
{
    return ef_dot3(mr->shapes + ((size_t)k * (size_t)m->n_nodes + (size_t)i) * 6, m->gravity_dir);
}

/* Mark the floor nodes (receivers and walkers, each once); caller frees. */
static unsigned char *floor_marks(const ef_model *m, const ef_analyses *o)
{
    unsigned char *mark = calloc((size_t)EF_MAX(m->n_nodes, 1), 1);
    if (!mark) return NULL;
    for (ef_index i = 0; i < o->n_walk_receivers; i++) mark[o->walk_receivers[i]] = 1;
    for (ef_index i = 0; i < o->n_walk_walkers; i++) mark[o->walk_walkers[i]] = 1;
    return mark;
}

/* share[k] = sum_F (phi_k . g)^2 / sum_F |phi_k,t|^2 over the floor nodes F;
 * motion[k] = max_F |phi_k . g| / max over all model nodes |phi_k,t|. A mode is vertical
 * when it is not rigid, share >= EF_VIB_VERTICAL_SHARE_MIN and motion >=
 * EF_VIB_FLOOR_MOTION_MIN. *f1_mode: the lowest vertical mode (0-based), -1 if none. */
static ef_status screen_modes(const ef_results *r, const ef_analyses *o, double *share,
                              double *motion, int *vertical, int *f1_mode)
{
    const ef_model *m = r->model;
    const ef_modal_result *mr = r->modal;
    unsigned char *mark = floor_marks(m, o);
    if (!mark) return EF_ENOMEM;
    *f1_mode = -1;
    for (int k = 0; k < mr->n_modes; k++) {
        double sv = 0.0, st = 0.0, vmax = 0.0, tmax = 0.0;
        for (ef_index i = 0; i < m->n_nodes; i++) {
            const double *p = mr->shapes + ((size_t)k * (size_t)m->n_nodes + (size_t)i) * 6;
            double t2 = ef_dot3(p, p);
            tmax = fmax(tmax, sqrt(t2));
            if (!mark[i]) continue;
            double v = ef_dot3(p, m->gravity_dir);
            sv += v * v;
            st += t2;
            vmax = fmax(vmax, fabs(v));
        }
        double s = st > 0.0 ? sv / st : 0.0, mo = tmax > 0.0 ? vmax / tmax : 0.0;
        if (share) share[k] = s;
        if (motion) motion[k] = mo;
        int vert = mr->freq[k] > 0.0 && s >= EF_VIB_VERTICAL_SHARE_MIN && mo >= EF_VIB_FLOOR_MOTION_MIN;
        if (vertical) vertical[k] = vert;
        if (vert && *f1_mode < 0) *f1_mode = k;
    }
    free(mark);
    return EF_OK;
}

int ef_vibration_fundamental(const ef_results *r, const ef_analyses *opts, double *share,
                             double *motion)
{
    int f1 = -1;
    if (!r->modal || screen_modes(r, opts, share, motion, NULL, &f1) != EF_OK) return -1;
    return f1;
}

double ef_vibration_walking_cutoff(const ef_results *r, const ef_analyses *opts)
{
    int k = ef_vibration_fundamental(r, opts, NULL, NULL);
    if (k < 0) return (double)INFINITY;
    double f1 = r->modal->freq[k];
    return f1 >= EF_VIB_TRANSIENT_FROM ? fmax(EF_VIB_RESONANT_CUTOFF_HZ, 2.0 * f1)
                                       : EF_VIB_RESONANT_CUTOFF_HZ;
}

double ef_vibration_cutoff(const ef_results *r, const ef_analyses *opts)
{
    double cut = 0.0;
    if (opts->walking) cut = ef_vibration_walking_cutoff(r, opts);
    for (ef_index i = 0; i < opts->n_machines; i++)
        cut = fmax(cut, 2.0 * opts->machines[i].hz * (1.0 + opts->machines[i].sweep));
    return cut;
}

ef_status ef_vibration_modal_run(ef_system *sys, const ef_analyses *opts, int modes,
                                 ef_results *r, ef_ctx *ctx)
{
    if (modes < 0) modes = 0;
    if (modes > EF_VIB_MAX_MODES) modes = EF_VIB_MAX_MODES;
    for (;;) {
        ef_status st = ef_modal_run(sys, modes, 0.0, r, ctx);
        if (st != EF_OK) return st;
        const ef_modal_result *mr = r->modal;
        if (modes == 0 || mr->n_modes < modes || mr->n_modes == 0) return EF_OK;
        double cut = ef_vibration_cutoff(r, opts), top = mr->freq[mr->n_modes - 1];
        if (top > cut) return EF_OK;
        if (modes >= EF_VIB_MAX_MODES) {
            ef_diag_note(ctx, NULL, "vibration: the modes were limited to %d (up to %.4g Hz); "
                         "the analysis wants modes above %.4g Hz", EF_VIB_MAX_MODES, top, cut);
            return EF_OK;
        }
        modes = (int)EF_MIN(2 * (ef_index)modes, EF_VIB_MAX_MODES);
    }
}

/* The weight of the vibrating mass as a load set: the mass that ef_mass_assemble puts in
 * M (mass.c, model-format.md "Mass for dynamics"), times g along gravity: each member's
 * mass per length (structural if mass_source.self, plus section extra_mass), the
 * downward gravity components of the mass_source load cases (moments, upward and
 * horizontal parts dropped, as mass.c does), and the extra node masses. As a load set
 * its consistent nodal loads are the full M r_g, the rows of held DOFs' columns
 * included, which M on the free equations alone would miss. Caller frees. */
static ef_status mass_weight_loads(const ef_system *sys, ef_loadset **out, ef_ctx *ctx)
{
    const ef_model *m = sys->m;
    const double *gd = m->gravity_dir;
    double g = ef_units_g(&m->units);
    ef_loadset *src = NULL, *ls = NULL;
    double *f = calloc((size_t)EF_MAX(m->n_cases, 1), sizeof *f);
    if (!f) return EF_ENOMEM;
    for (ef_index i = 0; i < m->mass_source.n_cases; i++)
        f[m->mass_source.cases[i]] += m->mass_source.factors[i];
    ef_status st = ef_loadset_build_factors(m, f, false, &src, ctx);
    free(f);
    if (st != EF_OK) return st;
    st = EF_ENOMEM;
    ls = calloc(1, sizeof *ls);
    if (!ls) goto done;
    ls->name = "vibrating mass x g";
    ls->n_members = m->n_members;
    ls->first = calloc((size_t)m->n_members + 1, sizeof *ls->first);
    ls->node_f = calloc((size_t)EF_MAX(m->n_nodes, 1) * 6, sizeof *ls->node_f);
    ls->bl = calloc((size_t)(src->first[m->n_members] + m->n_members + 1), sizeof *ls->bl);
    if (!ls->first || !ls->node_f || !ls->bl) goto done;
    ef_index n = 0;
    for (ef_index k = 0; k < m->n_members; k++) {
        const ef_member *b = &m->members[k];
        const double (*ax)[3] = (const double (*)[3])b->axes;
        ls->first[k] = n;
        double w = sys->mesh->props[k].mass * g;                 /* [force/length] */
        if (w > 0.0) {
            ef_bload *r = &ls->bl[n++];
            r->kind = EF_BLOAD_DIST;
            r->a = 0.0;
            r->b = b->length;
            for (int i = 0; i < 3; i++) r->q[0][i] = r->q[1][i] = w * ef_dot3(ax[i], gd);
        }
        for (ef_index t = src->first[k]; t < src->first[k + 1]; t++) {
            const ef_bload *sb = &src->bl[t];
            if (sb->kind == EF_BLOAD_MOMENT) continue;
            ef_bload *r = &ls->bl[n];
            *r = *sb;
            double any = 0.0;
            for (int e = 0; e < 2; e++) {
                double v[3];                                      /* global = axes^T q */
                for (int c = 0; c < 3; c++)
                    v[c] = ax[0][c] * sb->q[e][0] + ax[1][c] * sb->q[e][1] + ax[2][c] * sb->q[e][2];
                double down = fmax(ef_dot3(v, gd), 0.0);
                if (sb->kind == EF_BLOAD_POINT && e == 1) down = 0.0;
                for (int i = 0; i < 3; i++) r->q[e][i] = down * ef_dot3(ax[i], gd);
                any += down;
            }
            if (any > 0.0) n++;
        }
    }
    ls->first[m->n_members] = n;
    for (ef_index i = 0; i < m->n_nodes; i++) {
        if (sys->dofs->eq_of_dof[6 * i] == EF_DOF_IDLE) continue;   /* attached to nothing */
        double down = fmax(ef_dot3(src->node_f + 6 * i, gd), 0.0);
        for (ef_index k = 0; k < m->n_masses; k++)
            if (m->masses[k].node == i) down += m->masses[k].m * g;
        for (int c = 0; c < 3; c++) ls->node_f[6 * i + c] = down * gd[c];
    }
    *out = ls;
    ls = NULL;
    st = EF_OK;
done:
    ef_loadset_free(&src);
    ef_loadset_free(&ls);
    return st;
}

/* The largest deflection along gravity of any mesh node under the vibrating mass times
 * g (K u = M r_g, see mass_weight_loads). Used for the screening estimate
 * f ~ 18 / sqrt(delta_mm) (SCI P354 §7 [M]; AISC DG11 2nd ed. Eq. 3-3,
 * f = 0.18 sqrt(g/Delta) [M]). */
static ef_status selfweight_deflection(ef_system *sys, double *delta, char *where, size_t nw,
                                       ef_ctx *ctx)
{
    const ef_model *m = sys->m;
    const ef_dofmap *dm = sys->dofs;
    ef_index n = dm->n_eq;
    ef_loadset *ls = NULL;
    double *u = malloc((size_t)EF_MAX(n, 1) * sizeof *u);
    ef_status st = EF_ENOMEM;
    if (!u) goto done;
    if ((st = mass_weight_loads(sys, &ls, ctx)) != EF_OK) goto done;
    if ((st = ef_system_load_vector(sys, ls, u, ctx)) != EF_OK) goto done;
    if ((st = ef_system_factor_k(sys, ctx)) != EF_OK) goto done;
    if ((st = ef_chol_solve(sys->L, 1, u, u, ctx)) != EF_OK) goto done;   /* u = K^-1 F */
    double best = 0.0;
    ef_index at = EF_NONE;
    for (ef_index i = 0; i < sys->mesh->n_nodes; i++) {
        double d = 0.0;
        for (int c = 0; c < 3; c++) {
            ef_index eq = dm->eq_of_dof[6 * i + c];
            if (eq >= 0) d += u[eq] * m->gravity_dir[c];
        }
        if (fabs(d) > best) {
            best = fabs(d);
            at = i;
        }
    }
    *delta = best;
    if (at != EF_NONE) ef_mesh_node_text(sys->mesh, m, at, where, nw);
    else if (nw) where[0] = '\0';
done:
    ef_loadset_free(&ls);
    free(u);
    return st;
}

/* ---- frequency lists ---------------------------------------------------------------------- */

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* Sorted list of the grid lo..hi with a step no coarser than `step` (capped at
 * EF_VIB_MAX_SCAN points) plus the extra points inside [lo, hi]; near-duplicates merged.
 * *capped tells when the cap widened the step. */
static ef_status scan_list(double lo, double hi, double step, const double *extra, int n_extra,
                           int min_points, double **out, int *count, bool *capped)
{
    int ng = 1;
    *capped = false;
    if (hi > lo) {
        double want = ceil((hi - lo) / step) + 1.0;
        if (want < min_points) want = min_points;
        if (want > EF_VIB_MAX_SCAN) {
            want = EF_VIB_MAX_SCAN;
            *capped = true;
        }
        ng = (int)want;
    }
    double *v = malloc((size_t)(ng + n_extra) * sizeof *v);
    if (!v) return EF_ENOMEM;
    int k = 0;
    for (int i = 0; i < ng; i++) v[k++] = ng == 1 ? lo : lo + (hi - lo) * i / (ng - 1);
    for (int i = 0; i < n_extra; i++)
        if (extra[i] >= lo && extra[i] <= hi) v[k++] = extra[i];
    qsort(v, (size_t)k, sizeof *v, cmp_double);
    int u = 0;
    for (int i = 0; i < k; i++)
        if (u == 0 || v[i] - v[u - 1] > 1e-12 * fmax(1.0, fabs(v[i]))) v[u++] = v[i];
    *out = v;
    *count = u;
    return EF_OK;
}

/* ---- walking ------------------------------------------------------------------------------- */

static ef_status check_walking(const ef_model *m, const ef_analyses *o, ef_ctx *ctx)
{
    bool ok = true;
    if (o->n_walk_receivers <= 0) {
        ef_diag_error(ctx, NULL, "walking: no receivers: name the nodes where the response is judged");
        ok = false;
    }
    if (!(o->walk_damping > 0.0 && o->walk_damping < 1.0)) {
        ef_diag_error(ctx, NULL, "walking: the damping ratio must lie between 0 and 1 (exclusive), "
                      "not %g; there is no default", o->walk_damping);
        ok = false;
    }
    if (!(o->walk_pace_hz[0] > 0.0 && o->walk_pace_hz[0] <= o->walk_pace_hz[1])) {
        ef_diag_error(ctx, NULL, "walking: the pace range must be 0 < lowest <= highest, not "
                      "[%g, %g] Hz", o->walk_pace_hz[0], o->walk_pace_hz[1]);
        ok = false;
    }
    if (!(o->walk_weight > 0.0)) {
        ef_diag_error(ctx, NULL, "walking: the walker weight must be positive, not %g",
                      o->walk_weight);
        ok = false;
    }
    if (o->walk_weighting != EF_WEIGHT_WB && o->walk_weighting != EF_WEIGHT_WG) {
        ef_diag_error(ctx, NULL, "walking: unknown weighting %d (Wb or Wg)", o->walk_weighting);
        ok = false;
    }
    for (ef_index i = 0; i < o->n_walk_receivers; i++)
        if (o->walk_receivers[i] < 0 || o->walk_receivers[i] >= m->n_nodes) {
            ef_diag_error(ctx, NULL, "walking: receiver %lld is not a model node",
                          (long long)i + 1);
            ok = false;
        }
    for (ef_index i = 0; i < o->n_walk_walkers; i++)
        if (o->walk_walkers[i] < 0 || o->walk_walkers[i] >= m->n_nodes) {
            ef_diag_error(ctx, NULL, "walking: walker %lld is not a model node", (long long)i + 1);
            ok = false;
        }
    return ok ? EF_OK : EF_EINPUT;
}

/* Modes with 0 < f <= cut: their indices into idx, their frequencies into f. */
static int modes_up_to(const ef_modal_result *mr, double cut, int *idx, double *f)
{
    int n = 0;
    for (int k = 0; k < mr->n_modes; k++)
        if (mr->freq[k] > 0.0 && mr->freq[k] <= cut) {
            idx[n] = k;
            f[n] = mr->freq[k];
            n++;
        }
    return n;
}

typedef struct {
    const ef_model *m;
    const ef_analyses *o;
    const ef_modal_result *mr;
    ef_walking_result *wr;
    ef_index nr, nw;
    const ef_index *walkers;
    double *vr, *ve;          /* [nr][nk], [nw][nk] vertical mode components */
} walk_job;

/* Resonant method (method note §2(ii)): the pace scan, every walker with every receiver. */
static ef_status walk_resonant(walk_job *j, ef_ctx *ctx)
{
    const ef_modal_result *mr = j->mr;
    const ef_analyses *o = j->o;
    ef_walking_result *wr = j->wr;
    int nk = mr->n_modes;
    double zeta = o->walk_damping, lo = o->walk_pace_hz[0], hi = o->walk_pace_hz[1];
    double len_si = ef_units_length_si(j->m->units.length);
    double base = EF_VIB_BASE_ACC_SI / len_si;                    /* [length/s^2] */
    int *idx = malloc((size_t)EF_MAX(nk, 1) * sizeof *idx);
    double *f = malloc((size_t)EF_MAX(nk, 1) * sizeof *f);
    double *res = malloc((size_t)EF_MAX(4 * nk, 1) * sizeof *res);
    double *c = malloc((size_t)EF_MAX(nk, 1) * sizeof *c);
    double complex *H = malloc((size_t)EF_MAX(4 * nk, 1) * sizeof *H);
    double *fps = NULL;
    int nfp = 0;
    ef_status st = EF_ENOMEM;
    if (!idx || !f || !res || !c || !H) goto done;
    int n = modes_up_to(mr, EF_VIB_RESONANT_CUTOFF_HZ, idx, f);
    wr->modes_resonant = n;
    /* grid step: no coarser than 0.01 Hz nor zeta f_m / (2h), a quarter of the half-power
     * width 2 zeta f_m / h of each harmonic resonance; plus every exact fp = f_m / h */
    double step = 0.01;
    int nres = 0;
    for (int t = 0; t < n; t++)
        for (int h = 1; h <= 4; h++) {
            step = fmin(step, zeta * f[t] / (2.0 * h));
            res[nres++] = f[t] / h;
        }
    bool capped;
    if ((st = scan_list(lo, hi, step, res, nres, 1, &fps, &nfp, &capped)) != EF_OK) goto done;
    if (capped)
        ef_diag_note(ctx, NULL, "walking: the pace scan was limited to %d frequencies (a step of "
                     "%.3g Hz instead of %.3g Hz)", EF_VIB_MAX_SCAN, (hi - lo) / (nfp - 1), step);
    wr->n_pace = nfp;
    double Q = o->walk_weight;
    for (ef_index r = 0; r < j->nr; r++) wr->rms_resonant[r] = 0.0;
    for (int p = 0; p < nfp; p++) {
        double fp = fps[p], alpha[4], W[4];
        ef_vibration_walk_coeffs(fp, alpha);
        for (int h = 0; h < 4; h++) W[h] = ef_vibration_weight(o->walk_weighting, (h + 1) * fp);
        double rho = ef_vibration_buildup(zeta, o->walk_path_length * len_si, fp);
        ef_vibration_frf_table(n, f, zeta, fp, H);
        for (ef_index e = 0; e < j->nw; e++) {
            const double *ve = j->ve + (size_t)e * (size_t)nk;
            for (ef_index r = 0; r < j->nr; r++) {
                const double *vr = j->vr + (size_t)r * (size_t)nk;
                for (int t = 0; t < n; t++) c[t] = ve[idx[t]] * vr[idx[t]];
                ef_vib_resonant out;
                ef_vibration_resonant(n, H, c, alpha, W, Q, rho, &out);
                if (out.a_w_rms > wr->rms_resonant[r] || (p == 0 && e == 0)) {
                    wr->rms_resonant[r] = out.a_w_rms;
                    wr->R_resonant[r] = out.a_w_rms / base;
                    wr->pace_hz[r] = fp;
                    wr->harmonic[r] = out.harmonic;
                    wr->mode[r] = n > 0 ? idx[out.mode] + 1 : 0;
                    wr->walker[r] = j->walkers[e];
                }
            }
        }
    }
    wr->methods |= 1;
    st = EF_OK;
done:
    free(idx);
    free(f);
    free(res);
    free(c);
    free(H);
    free(fps);
    return st;
}

/* Transient method (method note §2(iv)) at the highest pace of the range: I_eff rises
 * with fp and the rms window 1/fp shortens, so that is the worst case. Per receiver the
 * governing mode (largest |v_m| amplitude) and walker go to t_mode (1-based), t_walker. */
static ef_status walk_transient(walk_job *j, double f1, int *t_mode, ef_index *t_walker)
{
    const ef_modal_result *mr = j->mr;
    const ef_analyses *o = j->o;
    ef_walking_result *wr = j->wr;
    int nk = mr->n_modes;
    double zeta = o->walk_damping, fp = o->walk_pace_hz[1];
    double len_si = ef_units_length_si(j->m->units.length);
    double F_si = ef_units_force_si(j->m->units.force);
    double base = EF_VIB_BASE_VEL_SI / len_si;                    /* [length/s] */
    int *idx = malloc((size_t)EF_MAX(nk, 1) * sizeof *idx);
    double *f = malloc((size_t)EF_MAX(nk, 1) * sizeof *f);
    double *Iw = malloc((size_t)EF_MAX(nk, 1) * sizeof *Iw);
    double *amp = malloc((size_t)EF_MAX(nk, 1) * sizeof *amp);
    ef_status st = EF_ENOMEM;
    if (!idx || !f || !Iw || !amp) goto done;
    double cut = 2.0 * f1;                                        /* modes up to 2 f1 [M] */
    int n = modes_up_to(mr, cut, idx, f);
    wr->cutoff_transient = cut;
    wr->modes_transient = n;
    wr->pace_transient = fp;
    double Q_N = o->walk_weight * F_si;
    for (int t = 0; t < n; t++)   /* W(f_m) I_eff,m, in model force * s */
        Iw[t] = ef_vibration_weight(o->walk_weighting, f[t]) * ef_vibration_impulse(fp, f[t], Q_N) / F_si;
    for (ef_index r = 0; r < j->nr; r++) {
        const double *vr = j->vr + (size_t)r * (size_t)nk;
        for (ef_index e = 0; e < j->nw; e++) {
            const double *ve = j->ve + (size_t)e * (size_t)nk;
            int lead = 0;
            for (int t = 0; t < n; t++) {
                amp[t] = ve[idx[t]] * vr[idx[t]] * Iw[t];         /* v_m amplitude [length/s] */
                if (fabs(amp[t]) > fabs(amp[lead])) lead = t;
            }
            double v = ef_vibration_transient_rms(n, amp, f, zeta, fp);
            if (e == 0 || v > wr->rms_transient[r]) {
                wr->rms_transient[r] = v;
                wr->R_transient[r] = v / base;
                t_mode[r] = n > 0 ? idx[lead] + 1 : 0;
                t_walker[r] = j->walkers[e];
            }
        }
    }
    wr->methods |= 2;
    st = EF_OK;
done:
    free(idx);
    free(f);
    free(Iw);
    free(amp);
    return st;
}

ef_status ef_walking_run(ef_system *sys, const ef_analyses *o, ef_results *r, ef_ctx *ctx)
{
    const ef_model *m = sys->m;
    const ef_modal_result *mr = r->modal;
    ef_walking_result *wr = NULL;
    walk_job j;
    memset(&j, 0, sizeof j);
    ef_status st;
    if (!mr) {
        ef_diag_error(ctx, NULL, "walking: the natural modes are needed first: run the modal "
                      "analysis (analyses: modal) before the walking response");
        return EF_EINPUT;
    }
    if (mr->n_modes <= 0) {
        ef_diag_error(ctx, NULL, "walking: the modal analysis found no modes");
        return EF_EINPUT;
    }
    if ((st = check_walking(m, o, ctx)) != EF_OK) return st;
    int nk = mr->n_modes;
    ef_index nr = o->n_walk_receivers;
    j.m = m;
    j.o = o;
    j.mr = mr;
    j.nr = nr;
    j.walkers = o->n_walk_walkers > 0 ? o->walk_walkers : o->walk_receivers;
    j.nw = o->n_walk_walkers > 0 ? o->n_walk_walkers : nr;
    if ((st = ef_vibration_walking_alloc(nr, nk, &wr)) != EF_OK) return st;
    j.wr = wr;
    int *t_mode = calloc((size_t)EF_MAX(nr, 1), sizeof *t_mode);
    ef_index *t_walker = calloc((size_t)EF_MAX(nr, 1), sizeof *t_walker);
    j.vr = malloc((size_t)EF_MAX(nr, 1) * (size_t)nk * sizeof *j.vr);
    j.ve = malloc((size_t)EF_MAX(j.nw, 1) * (size_t)nk * sizeof *j.ve);
    if (!t_mode || !t_walker || !j.vr || !j.ve) { st = EF_ENOMEM; goto done; }
    memcpy(wr->receivers, o->walk_receivers, (size_t)nr * sizeof *wr->receivers);
    wr->damping = o->walk_damping;
    wr->walker_weight = o->walk_weight;
    wr->pace[0] = o->walk_pace_hz[0];
    wr->pace[1] = o->walk_pace_hz[1];
    wr->path_length = o->walk_path_length;
    wr->limit_R = o->walk_limit_R;
    wr->weighting = o->walk_weighting;
    wr->cutoff_resonant = EF_VIB_RESONANT_CUTOFF_HZ;
    wr->highest_hz = mr->freq[nk - 1];
    for (ef_index i = 0; i < nr; i++)
        for (int k = 0; k < nk; k++) j.vr[(size_t)i * (size_t)nk + (size_t)k] = phi_v(mr, m, k, o->walk_receivers[i]);
    for (ef_index i = 0; i < j.nw; i++)
        for (int k = 0; k < nk; k++) j.ve[(size_t)i * (size_t)nk + (size_t)k] = phi_v(mr, m, k, j.walkers[i]);

    /* screening: vertical modes, f1, pace-harmonic flags */
    int f1k;
    if ((st = screen_modes(r, o, wr->vertical_share, wr->floor_motion, wr->is_vertical, &f1k)) != EF_OK)
        goto done;
    wr->f1_mode = f1k + 1;
    double f1 = f1k >= 0 ? mr->freq[f1k] : (double)NAN;
    wr->f1_vertical = f1;
    for (int k = 0; k < nk; k++) {
        wr->pace_flags[k] = 0;
        if (!wr->is_vertical[k]) continue;
        for (int h = 1; h <= 4; h++)
            if (mr->freq[k] >= h * wr->pace[0] * (1.0 - EF_VIB_BAND_RTOL) &&
                mr->freq[k] <= h * wr->pace[1] * (1.0 + EF_VIB_BAND_RTOL))
                wr->pace_flags[k] |= 1 << (h - 1);
    }
    /* the self-weight deflection estimate (needs K positive definite) */
    if (mr->n_rigid == 0) {
        double delta = 0.0;
        if ((st = selfweight_deflection(sys, &delta, wr->delta_where, sizeof wr->delta_where, ctx)) != EF_OK)
            goto done;
        wr->delta_selfweight = delta;
        double mm = delta * ef_units_length_si(m->units.length) * 1000.0;
        wr->f_selfweight = mm > 0.0 ? 18.0 / sqrt(mm) : (double)NAN;
    } else {
        ef_diag_note(ctx, NULL, "walking: the structure has rigid-body modes, so the self-weight "
                     "deflection estimate is not available");
    }

    /* method choice (method note §2(iv), our bounds) */
    bool resonant = !(f1 > EF_VIB_RESONANT_TO), transient = f1 >= EF_VIB_TRANSIENT_FROM;
    if (f1k < 0)
        ef_diag_warning(ctx, NULL, "walking: no computed mode moves the receivers and walkers "
                        "mainly vertically (modes up to %.4g Hz): the resonant method was used "
                        "with every mode up to %g Hz; ask for more modes if the floor's "
                        "fundamental lies higher", wr->highest_hz, EF_VIB_RESONANT_CUTOFF_HZ);
    double need = transient ? fmax(resonant ? EF_VIB_RESONANT_CUTOFF_HZ : 0.0, 2.0 * f1)
                            : EF_VIB_RESONANT_CUTOFF_HZ;
    if (wr->highest_hz < need)
        ef_diag_warning(ctx, NULL, "walking: the modes computed reach %.4g Hz only, and the "
                        "method sums modes up to %.4g Hz: ask for more modes unless the model "
                        "has no more", wr->highest_hz, need);
    if (resonant && (st = walk_resonant(&j, ctx)) != EF_OK) goto done;
    if (transient && (st = walk_transient(&j, f1, t_mode, t_walker)) != EF_OK) goto done;
    if (wr->path_length > 0.0 && resonant && (wr->pace[0] < 1.7 || wr->pace[1] > 2.4))
        ef_diag_note(ctx, NULL, "walking: the walking-speed formula of the build-up factor is "
                     "stated for paces of 1.7-2.4 Hz; the range [%g, %g] Hz goes beyond it",
                     wr->pace[0], wr->pace[1]);
    /* per receiver: the larger R governs */
    for (ef_index i = 0; i < nr; i++) {
        bool tr = transient && (!resonant || wr->R_transient[i] > wr->R_resonant[i]);
        wr->method[i] = tr ? 1 : 0;
        wr->R[i] = tr ? wr->R_transient[i] : wr->R_resonant[i];
        wr->response_rms[i] = tr ? wr->rms_transient[i] : wr->rms_resonant[i];
        if (tr) {
            wr->pace_hz[i] = wr->pace_transient;
            wr->harmonic[i] = 0;
            wr->mode[i] = t_mode[i];
            wr->walker[i] = t_walker[i];
        }
    }
    wr->modes_used = EF_MAX(wr->modes_resonant, wr->modes_transient);
    ef_walking_result_free(&r->walking);
    r->walking = wr;
    wr = NULL;
done:
    ef_walking_result_free(&wr);
    free(t_mode);
    free(t_walker);
    free(j.vr);
    free(j.ve);
    return st;
}

/* ---- machines --------------------------------------------------------------------------- */

static ef_status machine_one(ef_system *sys, const ef_machine *mc, const ef_results *r,
                             int weighting, ef_machine_result *out, ef_ctx *ctx)
{
    const ef_model *m = sys->m;
    const ef_modal_result *mr = r->modal;
    const ef_dofmap *dm = sys->dofs;
    int nk = mr->n_modes;
    ef_index nr = mc->n_receivers, s = mc->node;
    double zeta = mc->damping;
    double len_si = ef_units_length_si(m->units.length);
    double base_a = EF_VIB_BASE_ACC_SI / len_si, base_v = EF_VIB_BASE_VEL_SI / len_si;
    double base_h = EF_VIB_BASE_ACC_H_SI / len_si;
    double *p = malloc((size_t)EF_MAX(nk, 1) * sizeof *p);
    double *fm = malloc((size_t)EF_MAX(nk, 1) * sizeof *fm);
    double *corr = calloc((size_t)EF_MAX(nr, 1) * 3, sizeof *corr);
    double *u = NULL, *hz = NULL;
    int nhz = 0;
    ef_status st = EF_ENOMEM;
    if (!p || !fm || !corr) goto done;
    if (!(zeta > 0.0 && zeta < 1.0) || !(mc->hz > 0.0) || !(mc->sweep >= 0.0 && mc->sweep < 1.0) ||
        s < 0 || s >= m->n_nodes) {
        ef_diag_error(ctx, &mc->where, "machine '%s': needs a node, 0 < damping < 1, hz > 0 and "
                      "0 <= sweep < 1", mc->name);
        st = EF_EINPUT;
        goto done;
    }
    /* modal forces p_m = phi_m(s) . F0 */
    for (int k = 0; k < nk; k++) {
        p[k] = ef_dot3(mr->shapes + ((size_t)k * (size_t)m->n_nodes + (size_t)s) * 6, mc->force);
        fm[k] = mr->freq[k];
    }
    for (int c = 0; c < 3; c++) {
        ef_index eq = dm->eq_of_dof[6 * s + c];
        if (mc->force[c] != 0.0 && eq < 0)
            ef_diag_note(ctx, &mc->where, "machine '%s': the force component F%c acts on a DOF "
                         "that is not free (%s held) and goes straight into the support",
                         mc->name, "xyz"[c], ef_dof_names[c]);
    }
    /* static correction for the modes not computed (mode-acceleration method, Chopra):
     * F0 [K^-1 e_s - sum_m phi_m phi_m(s) / w_m^2]_r; needs K positive definite */
    bool corrected = false;
    if (mr->n_rigid == 0) {
        ef_index n = dm->n_eq;
        u = calloc((size_t)EF_MAX(n, 1), sizeof *u);
        if (!u) goto done;
        for (int c = 0; c < 3; c++) {
            ef_index eq = dm->eq_of_dof[6 * s + c];
            if (eq >= 0) u[eq] = mc->force[c];
        }
        if ((st = ef_system_factor_k(sys, ctx)) != EF_OK) goto done;
        if ((st = ef_chol_solve(sys->L, 1, u, u, ctx)) != EF_OK) goto done;
        for (ef_index i = 0; i < nr; i++)
            for (int c = 0; c < 3; c++) {
                ef_index eq = dm->eq_of_dof[6 * mc->receivers[i] + c];
                double x = eq >= 0 ? u[eq] : 0.0;
                for (int k = 0; k < nk; k++)
                    x -= mr->shapes[((size_t)k * (size_t)m->n_nodes + (size_t)mc->receivers[i]) * 6 + (size_t)c] *
                         p[k] / mr->omega2[k];
                corr[3 * i + c] = x;
            }
        corrected = true;
    }
    /* frequencies: hz (1 +- sweep) on a grid no coarser than zeta f_m / 2 (a quarter of the
     * half-power width 2 zeta f_m) for the modes near the range, plus every exact f_m and
     * the running frequency itself */
    double lo = mc->hz * (1.0 - mc->sweep), hi = mc->hz * (1.0 + mc->sweep);
    double step = hi > lo ? (hi - lo) / (EF_VIB_MIN_SWEEP - 1) : 1.0;
    for (int k = 0; k < nk; k++)
        if (fm[k] > 0.0 && fm[k] >= 0.5 * lo && fm[k] <= 2.0 * hi) step = fmin(step, zeta * fm[k] / 2.0);
    double *extra = malloc((size_t)(nk + 1) * sizeof *extra);
    if (!extra) { st = EF_ENOMEM; goto done; }
    memcpy(extra, fm, (size_t)nk * sizeof *extra);
    extra[nk] = mc->hz;
    bool capped;
    st = scan_list(lo, hi, step, extra, nk + 1, hi > lo ? EF_VIB_MIN_SWEEP : 1, &hz, &nhz, &capped);
    free(extra);
    if (st != EF_OK) goto done;
    if (capped)
        ef_diag_note(ctx, &mc->where, "machine '%s': the sweep was limited to %d frequencies",
                     mc->name, EF_VIB_MAX_SCAN);
    if ((st = ef_vibration_machine_alloc(mc->name, nhz, nr, out)) != EF_OK) goto done;
    memcpy(out->hz, hz, (size_t)nhz * sizeof *hz);
    memcpy(out->receivers, mc->receivers, (size_t)nr * sizeof *out->receivers);
    out->node = s;
    memcpy(out->force, mc->force, sizeof out->force);
    out->hz_nominal = mc->hz;
    out->sweep = mc->sweep;
    out->damping = zeta;
    out->weighting = weighting;
    out->modes_used = nk;
    out->highest_hz = fm[nk - 1];
    out->corrected = corrected;
    for (ef_index i = 0; i < nr; i++) out->R[i] = out->R_horizontal[i] = -1.0;
    const double *g = m->gravity_dir;
    for (int q = 0; q < nhz; q++) {
        double f = hz[q], W = TWO_PI * f, W2 = W * W;
        if (!corrected && f > EF_VIB_TRUNCATION_RATIO * out->highest_hz) out->beyond_modes = true;
        for (ef_index i = 0; i < nr; i++) {
            ef_index rn = mc->receivers[i];
            double complex ur[3];
            for (int c = 0; c < 3; c++) ur[c] = corr[3 * i + c];
            for (int k = 0; k < nk; k++) {
                /* u_r = F0 sum_m phi_m(r) phi_m(s) / (w_m^2 - W^2 + 2 i zeta w_m W) */
                double wk = sqrt(mr->omega2[k]);
                double complex d = p[k] / CMPLX(mr->omega2[k] - W2, 2.0 * zeta * wk * W);
                const double *ph = mr->shapes + ((size_t)k * (size_t)m->n_nodes + (size_t)rn) * 6;
                for (int c = 0; c < 3; c++) ur[c] += ph[c] * d;
            }
            double complex uv = ur[0] * g[0] + ur[1] * g[1] + ur[2] * g[2];
            double uh2 = 0.0;
            for (int c = 0; c < 3; c++) {
                size_t at = ((size_t)q * (size_t)nr + (size_t)i) * 3 + (size_t)c;
                double a = cabs(ur[c]);
                out->disp[at] = a;                                /* |u| */
                out->vel[at] = W * a;                             /* |v| = W |u| */
                out->acc[at] = W2 * a;                            /* |a| = W^2 |u| */
                double complex h = ur[c] - uv * g[c];
                uh2 += creal(h) * creal(h) + cimag(h) * cimag(h);
            }
            /* vertical R: W(f) a_rms / 0.005 m/s^2, or above 8 Hz W(f) v_rms / 1e-4 m/s
             * (weighted velocity, as the transient footfall method); rms = peak / sqrt 2 */
            double wv = ef_vibration_weight(weighting, f), av = cabs(uv) / sqrt(2.0);
            double Rv = f > EF_VIB_VELOCITY_FROM ? wv * W * av / base_v : wv * W2 * av / base_a;
            /* horizontal R: Wd(f) a_h,rms / 0.0036 m/s^2 [M], a_h the horizontal vector */
            double Rh = ef_vibration_weight(EF_WEIGHT_WD, f) * W2 * sqrt(uh2 / 2.0) / base_h;
            out->R_scan[(size_t)q * (size_t)nr + (size_t)i] = Rv;
            if (Rv > out->R[i]) {
                out->R[i] = Rv;
                out->R_hz[i] = f;
            }
            if (Rh > out->R_horizontal[i]) {
                out->R_horizontal[i] = Rh;
                out->R_horizontal_hz[i] = f;
            }
        }
    }
    if (out->beyond_modes)
        ef_diag_warning(ctx, &mc->where, "machine '%s': frequencies up to %.4g Hz exceed 0.8 of "
                        "the highest computed mode (%.4g Hz) and the static correction for the "
                        "modes not computed is not available: ask for more modes",
                        mc->name, hi, out->highest_hz);
    st = EF_OK;
done:
    free(p);
    free(fm);
    free(corr);
    free(u);
    free(hz);
    return st;
}

ef_status ef_machines_run(ef_system *sys, const ef_model *m, ef_results *r, ef_ctx *ctx)
{
    const ef_analyses *a = &m->analyses;
    if (!r->modal || r->modal->n_modes <= 0) {
        ef_diag_error(ctx, NULL, "machines: the natural modes are needed first: run the modal "
                      "analysis (analyses: modal) before the machine response");
        return EF_EINPUT;
    }
    for (ef_index i = 0; i < r->n_machines; i++) ef_machine_result_clear(&r->machines[i]);
    free(r->machines);
    r->machines = NULL;
    r->n_machines = 0;
    if (a->n_machines == 0) return EF_OK;
    ef_machine_result *mrs = calloc((size_t)a->n_machines, sizeof *mrs);
    if (!mrs) return EF_ENOMEM;
    ef_status st = EF_OK;
    ef_index done = 0;
    for (; done < a->n_machines; done++) {
        st = machine_one(sys, &a->machines[done], r, a->walk_weighting, &mrs[done], ctx);
        if (st != EF_OK) break;
    }
    if (st != EF_OK) {
        for (ef_index i = 0; i <= done && i < a->n_machines; i++) ef_machine_result_clear(&mrs[i]);
        free(mrs);
        return st;
    }
    r->machines = mrs;
    r->n_machines = a->n_machines;
    return EF_OK;
}
