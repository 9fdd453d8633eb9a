/* adjust_engine.h - weighted least-squares adjustment of a linear network
 * (station heights, instrument offsets and drifts, ties): normal equations
 * by Cholesky, the variance factor and its global test, redundancy numbers,
 * Baarda's w-test and data snooping, and a datum check that names the
 * unknowns the observations do not determine (private).
 *
 * The model is l_i + e_i = a_i . x with e_i ~ N(0, sigma_i^2): every
 * observation is a sparse row a_i (a few (unknown, coefficient) pairs), an
 * observed value l_i and an a-priori standard deviation sigma_i in the unit
 * of l_i (metres for heights). A control mark is an observation of one
 * unknown with the mark's sigma. Residuals are v = A x - l. The a-priori
 * variance factor is 1: sigmas are taken as given, and the a-posteriori
 * variance factor s0^2 = v^T P v / dof tells whether they were right. */
#ifndef HYP_ADJUST_ENGINE_H
#define HYP_ADJUST_ENGINE_H

#include <stddef.h>

#include "hypsolev/error.h"

/* One coefficient of an observation's row. */
typedef struct hyp__adj_term {
    size_t unknown;       /* index of the unknown, < n_unknowns */
    double coef;          /* its coefficient (1 and -1 for a height difference) */
} hyp__adj_term;

/* One observation. The arrays it points to are the caller's and must
 * outlive the call. */
typedef struct hyp__adj_obs {
    const hyp__adj_term *terms;
    size_t n_terms;       /* >= 1; an unknown may appear twice (coefficients add) */
    double value;         /* observed value l, finite, unit of the unknowns */
    double sigma;         /* a-priori standard deviation, finite, > 0, same unit */
    const char *label;    /* names it in messages ("run 3 B->C"); may be NULL */
    int active;           /* nonzero: used; 0: left out of the adjustment */
} hyp__adj_obs;

typedef struct hyp__adj_problem {
    size_t n_unknowns;
    const char *const *names;  /* n_unknowns names for messages; may be NULL */
    size_t n_obs;
    const hyp__adj_obs *obs;
} hyp__adj_problem;

typedef struct hyp__adj_opts {
    double alpha_global;  /* significance of the two-sided variance-factor test (0.05) */
    double alpha_w;       /* significance of the two-sided w-test (0.001: critical 3.29) */
    int snoop;            /* nonzero: data snooping (reject, re-adjust, repeat) */
    size_t max_reject;    /* at most this many rejections; 0: no limit but the dof */
    double r_min;         /* redundancy number below which an observation is
                           * uncontrolled and has no w (1e-6) */
    double min_rcond;     /* refuse normal equations whose reciprocal condition
                           * number after scaling is below this (1e-13) */
    size_t max_work_bytes; /* cap on the work space, mainly the n^2 normal
                            * matrix (512 MiB: 8000 unknowns) */
    const unsigned char *keep; /* NULL, or one flag per observation: nonzero,
                            * data snooping never rejects it (a prior or a
                            * pseudo-observation of a model); its w is
                            * still computed and flagged (NULL) */
    int stop_at_kept;     /* nonzero: snooping stops (HYP_ADJ_SNOOP_MODEL) when
                           * the largest |w| beyond the critical value is a
                           * kept one: the model, not a measurement, is then
                           * the likeliest error (0) */
    double rho_inseparable; /* > 0: snooping stops (HYP_ADJ_SNOOP_INSEPARABLE)
                           * rather than reject an observation whose w-test
                           * correlates with another's beyond this in
                           * absolute value: the data cannot tell which of
                           * the two is wrong (0: off) */
} hyp__adj_opts;

/* Bits of hyp__adj_result.flag, per observation. */
enum {
    HYP_ADJ_USED = 1,          /* in the final adjustment */
    HYP_ADJ_UNCONTROLLED = 2,  /* used, redundancy ~ 0: no check by the others, no w */
    HYP_ADJ_REJECTED = 4,      /* taken out by data snooping */
    HYP_ADJ_OUTLIER = 8        /* used and |w| > critical (snooping off, or it stopped) */
};

typedef enum hyp__adj_global {
    HYP_ADJ_GLOBAL_NONE = 0,   /* dof 0: no test */
    HYP_ADJ_GLOBAL_PASS,
    HYP_ADJ_GLOBAL_LOW,        /* v^T P v below the lower bound: sigmas too pessimistic */
    HYP_ADJ_GLOBAL_HIGH        /* above the upper bound: sigmas too small, or a blunder */
} hyp__adj_global;

typedef enum hyp__adj_snoop_stop {
    HYP_ADJ_SNOOP_OFF = 0,     /* snooping not asked for */
    HYP_ADJ_SNOOP_CLEAN,       /* no |w| beyond the critical value is left */
    HYP_ADJ_SNOOP_DOF,         /* the next rejection would leave dof 0: kept */
    HYP_ADJ_SNOOP_SINGULAR,    /* the next rejection would make the network singular: kept */
    HYP_ADJ_SNOOP_LIMIT,       /* max_reject reached */
    HYP_ADJ_SNOOP_MODEL,       /* the largest |w| is a kept prior's (stop_at_kept) */
    HYP_ADJ_SNOOP_INSEPARABLE  /* the next rejection's w-test correlates with another
                                * one's beyond rho_inseparable: not rejected */
} hyp__adj_snoop_stop;

typedef struct hyp__adj_rejection {
    size_t obs;           /* index of the observation */
    size_t iteration;     /* the adjustment (1, 2, ...) whose w-test rejected it */
    double w;             /* its standardized residual in that adjustment */
    double v;             /* its residual then, unit of the observation */
} hyp__adj_rejection;

/* The result; init before the first use, free after the last (a solve
 * frees what it held before). Arrays are owned by the result and sized
 * n_unknowns or n_obs. */
typedef struct hyp__adj_result {
    size_t n_unknowns, n_obs;
    double *x;            /* adjusted unknowns */
    double *sigma_x;      /* a-posteriori sigmas sqrt(s0^2 Qxx_jj) (NaN when dof 0) */
    double *sigma_x_prior;/* a-priori sigmas sqrt(Qxx_jj) (variance factor 1) */
    double *v;            /* residuals A x - l of every observation, used or not */
    double *sigma_adj;    /* a-priori sigma of the adjusted value a_i . x, every observation */
    double *r;            /* redundancy numbers (NaN when not used) */
    double *w;            /* standardized residuals (NaN when not used or uncontrolled) */
    unsigned char *flag;  /* HYP_ADJ_* bits */
    size_t n_used;        /* observations in the final adjustment */
    size_t dof;           /* n_used - n_unknowns */
    double vtpv;          /* sum of p_i v_i^2, p_i = 1 / sigma_i^2 (dimensionless) */
    double s0_sq;         /* a-posteriori variance factor vtpv / dof (NaN when dof 0) */
    double alpha_global;
    double chi2_lower, chi2_upper;   /* two-sided bounds of vtpv */
    double s0_sq_lower, s0_sq_upper; /* the same bounds divided by dof */
    hyp__adj_global global;
    double w_crit;        /* critical |w| for alpha_w */
    double w_max;         /* largest |w| of the final adjustment (NaN when none) */
    size_t w_max_obs;     /* its observation */
    double rcond;         /* reciprocal condition number (1-norm) of the scaled normal matrix */
    size_t n_adjustments; /* adjustments made (1 + rejections, more after a refused one) */
    hyp__adj_rejection *rejections;
    size_t n_rejections;
    hyp__adj_snoop_stop snoop_stop;
    double w_max_free;    /* largest |w| among the used observations snooping may
                           * reject (not opts->keep), NaN when none: what it tests */
    size_t w_max_free_obs;/* its observation */
    size_t insep_obs;     /* HYP_ADJ_SNOOP_INSEPARABLE: the observation that
                           * cannot be told apart from w_max_free_obs */
    double insep_rho;     /* the correlation of their w-tests */
} hyp__adj_result;

void hyp__adj_opts_default(hyp__adj_opts *opts);
void hyp__adj_result_init(hyp__adj_result *res);
void hyp__adj_result_free(hyp__adj_result *res);

/* Adjusts the problem (and snoops when opts->snoop). opts may be NULL for
 * the defaults. The caller's observations are not changed: rejections are
 * recorded in res. On error res holds no result and err names the cause:
 * HYP_ERR_VALUE a bad observation (label, field, value found, expected),
 * HYP_ERR_NODATA unknowns the observations do not determine (their names),
 * too few observations, or numerically singular normal equations,
 * HYP_ERR_NOMEM out of memory or above max_work_bytes, HYP_ERR_USAGE no
 * unknowns or bad options. */
hyp_status hyp__adj_solve(const hyp__adj_problem *pb, const hyp__adj_opts *opts, hyp__adj_result *res,
                          hyp_error *err);

#endif
