/* svd_solve.h - small weighted linear least squares by singular value
 * decomposition, with the condition number and the covariance (private). */
#ifndef HYP_SVD_SOLVE_H
#define HYP_SVD_SOLVE_H

#include <stddef.h>
#include "hypsolev/error.h"

#define HYP_LSQ_MAXP 18

typedef struct hyp__lsq {
    size_t m, p;
    double x[HYP_LSQ_MAXP];
    double cov[HYP_LSQ_MAXP * HYP_LSQ_MAXP];  /* row-major p x p */
    double chi2;      /* sum of squared weighted residuals */
    double cond;      /* condition number of the column-scaled design */
} hyp__lsq;

/* Solves min |A x - b| for A (m x p, row-major) and b already divided by
 * each observation's sigma, so that cov = (A^T A)^-1 is the parameters'
 * covariance. Columns are scaled to unit norm before the SVD so that the
 * condition number measures collinearity, not units. HYP_ERR_VALUE when
 * m < p, p > HYP_LSQ_MAXP or a column is zero. */
hyp_status hyp__lsq_solve(const double *a, const double *b, size_t m, size_t p, hyp__lsq *out);

#endif
