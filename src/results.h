/* results.h: everything an analysis run produces (private), in model terms.
 *
 * Arrays are at model nodes and members, never at generated nodes. Units are the
 * model's. The text report, the HDF5 file and the pictures are all written from this
 * one structure, so they never disagree.
 */
#ifndef EF_RESULTS_H
#define EF_RESULTS_H

#include "model.h"

/* Results of one load (case or combination), first or second order. */
typedef struct {
    ef_index load;            /* shared load index */
    double *disp;             /* [n_nodes][6] ux uy uz rx ry rz, global */
    double *react;            /* [n_nodes][6] Fx Fy Fz Mx My Mz on the structure, 0 where free */
    double *end_forces;       /* [n_members][2][6] N Vy Vz T My Mz, local, on the member */
    double *stations;         /* rows of 7 (x, N Vy Vz T My Mz); member k: rows st_first[k].. */
    double applied[6];        /* resultant of the applied load about the origin */
    double reaction_sum[6];   /* resultant of the reactions about the origin */
    double eq_residual;       /* |applied + reactions| / scale, forces and moments apart */
    double solve_residual;    /* ||K u - f|| / (||K|| ||u|| + ||f||) */
    /* second order only */
    double *amplification;    /* [n_members][2][6] |S_II|/|S_I|, NaN where S_I negligible */
    int iterations;
    bool converged;
    double tolerance;
    double residual;          /* last relative change */
    bool chord_only;
} ef_load_result;

typedef struct {
    int n_modes;
    double *omega2;           /* [k] (rad/s)^2 */
    double *freq;             /* [k] Hz */
    double *shapes;           /* [k][n_nodes][6], mass-normalised */
    double *participation;    /* [k][6] */
    double *eff_mass;         /* [k][6] */
    double *eff_ratio;        /* [k][6] */
    double *unitmax_mass;     /* [k] modal mass with the largest translation scaled to 1 */
    double *residual;         /* [k] ||K phi - w^2 M phi|| / ||K phi|| */
    double total_mass[6];     /* r_d^T M r_d (participating, free DOFs) */
    double model_mass;        /* all mass in the model, held DOFs included */
    double ref_point[3];
    char mass_source[256];
    bool lumped;
    int ncv;                  /* Lanczos basis size used */
    double tol;
    ef_index n_op;            /* operator applications */
    double shift;             /* sigma [(rad/s)^2] */
    int n_rigid;              /* modes reported as 0 Hz (rigid-body) */
} ef_modal_result;

typedef struct {
    ef_index load;
    int n_pos, n_neg;
    double *factors;          /* [n_pos] ascending */
    double *neg_factors;      /* [n_neg] (as negative numbers, ascending |.|) */
    double *shapes;           /* [n_pos][n_nodes][6], largest translation 1 */
    double *residual;         /* [n_pos] */
    double *member_share;     /* [n_pos][n_members] share of |phi^T K_G,k phi| */
    int *kind;                /* [n_pos] 0 global (sway), 1 member flexural, 2 member torsional */
    ef_index *dominant;       /* [n_pos] member with the largest share */
    double *axial0;           /* [n_members] axial force N0 of the load (tension +), start */
    ef_index n_op;
    bool found_none;          /* no positive factor among those computed */
} ef_buckling_result;

/* Footfall response of a floor (dynamics-and-stability-methods.md §2). */
typedef struct {
    ef_index n_receivers;
    ef_index *receivers;      /* [r] model node indices */
    double *R;                /* [r] response factor: weighted rms / base-curve value */
    double *response_rms;     /* [r] weighted rms acceleration [length/s^2] (resonant) or
                                 velocity [length/s] (transient) */
    int *method;              /* [r] 0 resonant, 1 transient */
    double *pace_hz;          /* [r] governing pace frequency [Hz] */
    int *harmonic;            /* [r] governing harmonic (1..4; 0 for transient) */
    int *mode;                /* [r] governing (largest contributing) mode, 1-based */
    ef_index *walker;         /* [r] model node index of the governing walker */
    double f1_vertical;       /* fundamental vertical frequency [Hz] */
    double f_selfweight;      /* 18/sqrt(delta_mm) screening estimate [Hz] */
    double delta_selfweight;  /* largest deflection under the vibrating mass x g [length] */
    int modes_used;
    /* inputs, as used */
    double damping, walker_weight, pace[2], path_length, limit_R;
    int weighting;            /* 0 Wb, 1 Wg */
    /* Added by vibration.c (allocate with ef_vibration_walking_alloc): every double array
     * below lives in the block owned by R, every int array in the block owned by
     * harmonic, so ef_walking_result_free releases them with those two. */
    double *R_resonant;       /* [r] R of the resonant method, NaN where not computed */
    double *R_transient;      /* [r] R of the transient method, NaN where not computed */
    double *rms_resonant;     /* [r] a_w,rms [length/s^2], NaN where not computed */
    double *rms_transient;    /* [r] v_w,rms [length/s], NaN where not computed */
    int n_modes;              /* modes of r->modal screened */
    double *vertical_share;   /* [n_modes] vertical share of the squared translation at the
                                 receiver and walker nodes */
    double *floor_motion;     /* [n_modes] largest vertical movement there over the mode's
                                 largest translation at any model node */
    int *is_vertical;         /* [n_modes] 1: the mode passes the vertical-mode test */
    int *pace_flags;          /* [n_modes] bit h-1 set: a vertical mode with f in h*pace */
    int f1_mode;              /* 1-based mode of f1_vertical; 0 = none found (f1 NaN) */
    int methods;              /* bit 0: resonant computed; bit 1: transient computed */
    double cutoff_resonant;   /* [Hz] modes summed by the resonant method (15) */
    double cutoff_transient;  /* [Hz] modes summed by the transient method (2 f1), 0 unused */
    int modes_resonant, modes_transient;   /* how many modes each method summed */
    double highest_hz;        /* highest computed mode [Hz] */
    int n_pace;               /* pace frequencies scanned (resonant method) */
    double pace_transient;    /* pace frequency of the transient method [Hz] */
    char delta_where[160];    /* where delta_selfweight occurs, in words; "" = not computed */
} ef_walking_result;

/* Steady-state response to one harmonic machine (dynamics-and-stability-methods.md §2(vi)). */
typedef struct {
    char *name;
    ef_index n_receivers;
    ef_index *receivers;      /* [r] model node indices */
    int n_hz;
    double *hz;               /* [s] excitation frequencies scanned */
    double *disp, *vel, *acc; /* [s][r][3] peak amplitudes, global translations */
    double *R;                /* [r] largest response factor over the scan */
    /* Added by vibration.c (allocate with ef_vibration_machine_alloc): the double arrays
     * below live in the block owned by R, so ef_machine_result_clear releases them. */
    double *R_hz;             /* [r] frequency of the largest R [Hz] */
    double *R_scan;           /* [s][r] vertical R at each frequency */
    double *R_horizontal;     /* [r] largest horizontal R, Wd a_h,rms / 0.0036 m/s^2 */
    double *R_horizontal_hz;  /* [r] frequency of that [Hz] */
    ef_index node;            /* model node of the machine */
    double force[3];          /* force amplitude, global [force] */
    double hz_nominal;        /* running frequency [Hz] */
    double sweep, damping;
    int weighting;            /* 0 Wb, 1 Wg (as analyses.walking) */
    int modes_used;           /* modes summed */
    double highest_hz;        /* highest computed mode [Hz] */
    bool corrected;           /* static correction of the modes not computed applied */
    bool beyond_modes;        /* some frequency above 0.8 of the highest mode, uncorrected */
} ef_machine_result;

typedef struct {
    const ef_model *model;    /* not owned */
    ef_index n_mesh_nodes, n_elems, n_eq, n_dropped;
    ef_index *st_first;       /* [n_members + 1] station rows per member */
    ef_load_result *statics;
    ef_index n_statics;
    ef_modal_result *modal;   /* NULL when not run */
    ef_buckling_result *buckling;
    ef_load_result *second;
    ef_index n_second;
    ef_walking_result *walking;
    ef_machine_result *machines;
    ef_index n_machines;
} ef_results;

ef_status ef_results_create(const ef_model *m, ef_results **out);
void ef_results_free(ef_results **r);
/* Allocate the arrays of one load result (amplification only when second_order). */
ef_status ef_load_result_alloc(const ef_results *r, ef_load_result *lr, bool second_order);
void ef_load_result_clear(ef_load_result *lr);
void ef_modal_result_free(ef_modal_result **mr);
void ef_buckling_result_free(ef_buckling_result **br);
void ef_walking_result_free(ef_walking_result **wr);
void ef_machine_result_clear(ef_machine_result *mr);

#endif /* EF_RESULTS_H */
