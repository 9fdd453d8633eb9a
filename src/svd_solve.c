/* svd_solve.c - weighted least squares through LAPACK's SVD (dgesvd): x = V S^-1
 * U^T b and cov = V S^-2 V^T (Golub and Van Loan, Matrix Computations,
 * 4th ed., section 5.5). */
#include "svd_solve.h"

#include <lapacke.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

hyp_status hyp__lsq_solve(const double *a, const double *b, size_t m, size_t p, hyp__lsq *out)
{
    memset(out, 0, sizeof *out);
    out->m = m;
    out->p = p;
    if (p == 0 || p > HYP_LSQ_MAXP || m < p)
        return HYP_ERR_VALUE;
    double *w = malloc(m * p * sizeof *w), *u = malloc(m * p * sizeof *u);
    double s[HYP_LSQ_MAXP], vt[HYP_LSQ_MAXP * HYP_LSQ_MAXP], superb[HYP_LSQ_MAXP], norm[HYP_LSQ_MAXP];
    hyp_status st = HYP_OK;
    if (!w || !u) {
        st = HYP_ERR_NOMEM;
        goto out;
    }
    for (size_t j = 0; j < p; j++) {
        double n2 = 0;
        for (size_t i = 0; i < m; i++)
            n2 += a[i * p + j] * a[i * p + j];
        norm[j] = sqrt(n2);
        if (!(norm[j] > 0)) {
            st = HYP_ERR_VALUE;
            goto out;
        }
        for (size_t i = 0; i < m; i++)
            w[i * p + j] = a[i * p + j] / norm[j];
    }
    lapack_int info = LAPACKE_dgesvd(LAPACK_ROW_MAJOR, 'S', 'S', (lapack_int)m, (lapack_int)p, w,
                                     (lapack_int)p, s, u, (lapack_int)p, vt, (lapack_int)p, superb);
    if (info != 0 || !(s[p - 1] > 0)) {
        out->cond = INFINITY;
        st = HYP_ERR_VALUE;
        goto out;
    }
    out->cond = s[0] / s[p - 1];
    double y[HYP_LSQ_MAXP];
    for (size_t k = 0; k < p; k++) {
        double d = 0;
        for (size_t i = 0; i < m; i++)
            d += u[i * p + k] * b[i];
        y[k] = d / s[k];
    }
    for (size_t j = 0; j < p; j++) {
        double x = 0;
        for (size_t k = 0; k < p; k++)
            x += vt[k * p + j] * y[k];
        out->x[j] = x / norm[j];
        for (size_t l = 0; l < p; l++) {
            double c = 0;
            for (size_t k = 0; k < p; k++)
                c += vt[k * p + j] * vt[k * p + l] / (s[k] * s[k]);
            out->cov[j * p + l] = c / (norm[j] * norm[l]);
        }
    }
    for (size_t i = 0; i < m; i++) {
        double r = -b[i];
        for (size_t j = 0; j < p; j++)
            r += a[i * p + j] * out->x[j];
        out->chi2 += r * r;
    }
out:
    free(w);
    free(u);
    return st;
}
