/* stats.h - small robust statistics the core shares (private). */
#ifndef HYP_STATS_H
#define HYP_STATS_H

#include <stddef.h>

/* Median of v[0..n) (reorders v). NaN for n == 0. */
/* The k-th smallest (from 0) of v[0..n), n > 0, reordering v. */
double hyp__select_kth(double *v, size_t n, size_t k);
double hyp__median_inplace(double *v, size_t n);

/* White-noise level (1 sigma) of a slowly varying series from its second
 * differences: for white noise of sigma s, x[i-1] - 2 x[i] + x[i+1] has
 * standard deviation s sqrt(6); the spread is taken robustly as 1.4826 times
 * the median absolute deviation (Huber, Robust Statistics, 1981). Triplets
 * spanning more than max_dt_s are skipped; samples with bad[i] != 0 too
 * (bad may be NULL). The series is x, or xf when x is NULL. *sigma is NaN when fewer than 10 triplets. Returns -1
 * when out of memory, else 0. */
int hyp__noise_second_diff(const double *t_s, const double *x, const float *xf, const unsigned char *bad,
                           size_t n, double max_dt_s, double *sigma);

/* Mean, sample standard deviation and the effective number of independent
 * samples of x[0..n) under an AR(1) model, n (1 - r1) / (1 + r1) with r1 the
 * lag-1 autocorrelation clamped to [0, 0.99] (Wilks, Statistical Methods in
 * the Atmospheric Sciences, 3rd ed., eq. 5.12). */
void hyp__mean_sd_neff(const double *x, size_t n, double *mean, double *sd, double *neff);

#endif
