/* vibration.h: floor and platform vibration serviceability (private): footfall (walking)
 * response and steady-state response to harmonic machines, from the natural modes
 * (dynamics-and-stability-methods.md §2; docs/vibration.md).
 *
 * Conventions. Mode shapes are the mass-normalised shapes of r->modal (φᵀMφ = 1) at
 * model nodes; "vertical" is the gravity direction of the model, and the vertical
 * component of a shape is φ·g_dir. Everything is computed in the model's own units;
 * only the published coefficients (which are in N, m, s) are converted, through
 * ef_units_force_si and ef_units_length_si. The library never judges pass or fail: a
 * user limit on R is only compared and reported.
 * Complex numbers are written `double _Complex` so that this header does not bring in
 * <complex.h> (whose macro `I` would clash with ordinary names).
 */
#ifndef EF_VIBRATION_H
#define EF_VIBRATION_H

#include "system.h"

/* ---- published constants (sources in vibration.c and docs/vibration.md) ------------ */

#define EF_VIB_BASE_ACC_SI 0.005      /* vertical base curve, rms acceleration [m/s^2] */
#define EF_VIB_BASE_ACC_H_SI 0.0036   /* horizontal base curve at 1-2 Hz [m/s^2] */
#define EF_VIB_BASE_VEL_SI 1.0e-4     /* vertical base curve above 8 Hz, rms velocity [m/s] */
#define EF_VIB_RESONANT_CUTOFF_HZ 15.0  /* modes summed in the resonant method */

/* Frequency weightings. The asymptotic forms (the walking and machine methods use
 * these): EF_WEIGHT_WB and EF_WEIGHT_WG are the values of ef_analyses.walk_weighting. */
enum { EF_WEIGHT_WB = 0, EF_WEIGHT_WG = 1, EF_WEIGHT_WD = 2 };

/* Exact ISO 2631-1 band-limited weighting filters (Annex A form). */
typedef enum { EF_FILTER_WK = 0, EF_FILTER_WB = 1, EF_FILTER_WD = 2 } ef_vib_filter;

/* ---- pure kernels (no allocation, no context) --------------------------------------- */

/* Asymptotic weighting factor of curve `w` (EF_WEIGHT_*) at f [Hz] (f > 0). */
double ef_vibration_weight(int w, double f);
/* Exact weighting |W(i 2 pi f)| = K |H_h H_l H_t H_s| of ISO 2631-1 Annex A. */
double ef_vibration_filter(ef_vib_filter w, double f);
/* Walking Fourier coefficients alpha_1..alpha_4 at pace frequency fp [Hz]
 * (SCI P354 Table 3.1, from memory). */
void ef_vibration_walk_coeffs(double fp, double alpha[4]);
/* Walking speed v [m/s] at pace fp (SCI P354 after Bachmann & Ammann, from memory). */
double ef_vibration_walk_speed(double fp);
/* Resonance build-up factor rho = 1 - exp(-2 pi zeta L fp / v) for a walk of path_m
 * metres; 1 when path_m <= 0 (no path length given: conservative). */
double ef_vibration_buildup(double zeta, double path_m, double fp);
/* Effective impulse of one footfall on mode frequency fm [N*s]:
 * 60 fp^1.43 / fm^1.30 * (Q_N / 700) (SCI P354, from memory). */
double ef_vibration_impulse(double fp, double fm, double Q_N);
/* Acceleration per unit modal force of one mode, H(beta) = beta^2 / (1 - beta^2 + 2 i zeta beta). */
double _Complex ef_vibration_frf(double beta, double zeta);
/* The table H[h*n + m] = ef_vibration_frf((h+1) fp / f[m], zeta), h = 0..3, m = 0..n-1. */
void ef_vibration_frf_table(int n, const double *f, double zeta, double fp, double _Complex *H);

/* Resonant footfall response at one pace frequency, one walker e, one receiver r. */
typedef struct {
    double a_w_rms;          /* rho (1/sqrt 2) sqrt(sum_h (W_h |A_h|)^2)  [acceleration] */
    double A[4];             /* |A_h|, unweighted peak amplitude per harmonic [acceleration] */
    int harmonic;            /* 1..4: the harmonic with the largest W_h |A_h| */
    int mode;                /* 0-based: the largest |c_m H_m| term in that harmonic */
} ef_vib_resonant;
/* A_h = alpha_h Q sum_m c[m] H[h*n + m] with c[m] = phi_m(e) phi_m(r) (vertical
 * components, [1/mass]); W[h] = weighting at (h+1) fp; Q [force] gives accelerations
 * in the model's units. */
void ef_vibration_resonant(int n, const double _Complex *H, const double *c,
                           const double alpha[4], const double W[4], double Q, double rho,
                           ef_vib_resonant *out);
/* Transient footfall response: v(t) = sum_m amp[m] exp(-2 pi zeta f_m t)
 * sin(2 pi f_m sqrt(1 - zeta^2) t); returns sqrt(fp * integral_0^{1/fp} v^2 dt),
 * the rms over one pace period, integrated in closed form (exact). */
double ef_vibration_transient_rms(int n, const double *amp, const double *f, double zeta,
                                  double fp);

/* ---- analyses ------------------------------------------------------------------------ */

/* Thresholds of the "vertical mode" test (our choice, docs/vibration.md): at the
 * receiver and walker nodes the vertical component carries at least this share of the
 * squared translation ... */
#define EF_VIB_VERTICAL_SHARE_MIN 0.5
/* ... and the largest vertical movement there is at least this fraction of the mode's
 * largest translation at any model node. */
#define EF_VIB_FLOOR_MOTION_MIN 0.1

/* Allocate a walking result for n_receivers receivers and n_modes screened modes, every
 * array zeroed (NaN for R_resonant, R_transient and their rms). Layout: every double
 * array lives in the block owned by `R`, every int array in the block owned by
 * `harmonic`, so ef_walking_result_free (results.c) releases all of it. */
ef_status ef_vibration_walking_alloc(ef_index n_receivers, int n_modes, ef_walking_result **out);
/* Allocate the arrays of a machine result for n_hz frequencies and n_receivers
 * receivers (zeroed); the added double arrays live in the block owned by `R`, so
 * ef_machine_result_clear releases them. `name` is copied. */
ef_status ef_vibration_machine_alloc(const char *name, int n_hz, ef_index n_receivers,
                                     ef_machine_result *mr);

/* Vertical-mode screening of the modes in r->modal for the floor of `opts` (receivers
 * and walkers): writes share[k] and motion[k] (may be NULL) and returns the 0-based index
 * of the lowest vertical mode, or -1 when no computed mode is vertical. */
int ef_vibration_fundamental(const ef_results *r, const ef_analyses *opts, double *share,
                             double *motion);
/* Highest mode frequency the walking analysis of `opts` needs, given the modes computed
 * so far: 15 Hz, or 2 f1 when the fundamental vertical f1 >= 8 Hz (the transient method
 * is then used); INFINITY when no computed mode is vertical yet. */
double ef_vibration_walking_cutoff(const ef_results *r, const ef_analyses *opts);

/* Most modes ef_vibration_modal_run asks for while growing towards the cut-off. */
#define EF_VIB_MAX_MODES 400

/* Highest mode frequency the vibration analyses of `opts` need given the modes in r->modal:
 * the walking cut-off when opts->walking, and twice the top of each machine's sweep
 * (our choice: modes above that respond quasi-statically and the static correction
 * covers them); 0 when neither analysis is asked for. */
double ef_vibration_cutoff(const ef_results *r, const ef_analyses *opts);

/* The modal analysis with enough modes for the vibration analyses of `opts`: starting
 * from `modes` (0 = every mode, densely, in one solve), the count is doubled until the
 * highest computed frequency exceeds ef_vibration_cutoff, the model has no more modes,
 * or EF_VIB_MAX_MODES is reached (then a note says so). Every mode from 0 Hz is kept
 * (above_hz is not used: the floor response needs the lowest modes). Replaces r->modal. */
ef_status ef_vibration_modal_run(ef_system *sys, const ef_analyses *opts, int modes,
                                 ef_results *r, ef_ctx *ctx);

/* Footfall response of the floor described by opts (walk_* fields) into r->walking,
 * from the modes in r->modal (which must be there: EF_EINPUT otherwise). Screening
 * (fundamental vertical frequency, the self-weight deflection estimate 18/sqrt(delta_mm),
 * which needs one static solve with the factor of K, pace-harmonic flags), then the
 * resonant method (f1 <= 12 Hz), the transient method (f1 >= 8 Hz), and per receiver the
 * larger. Warnings (modes short of the cut-off, no vertical mode) go to ctx. The result
 * is freed with r (ef_results_free). */
ef_status ef_walking_run(ef_system *sys, const ef_analyses *opts, ef_results *r, ef_ctx *ctx);

/* Steady-state response to every machine of m->analyses.machines into r->machines
 * (replacing what was there), from the modes in r->modal plus the static correction of
 * the modes not computed (one solve with the factor of K per machine). Each machine's
 * frequency is swept over hz (1 +- sweep) with the exact resonances included. */
ef_status ef_machines_run(ef_system *sys, const ef_model *m, ef_results *r, ef_ctx *ctx);

#endif /* EF_VIBRATION_H */
