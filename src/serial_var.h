/* serial_var.h - how much less a mean of serially correlated errors is
 * worth than a mean of independent ones, as the series itself shows it,
 * and the Student t quantile that widens an interval estimated from few
 * independent values (private; pure kernels, no allocation). */
#ifndef HYP_SERIAL_VAR_H
#define HYP_SERIAL_VAR_H

#include <stddef.h>

/* The variance of the mean of r[0..n) over s^2 / n (s^2 its sample
 * variance): 1 for independent values, n for values that all move
 * together. The series (taken as evenly spaced) is modelled as white noise
 * plus a first-order autoregressive part whose correlation time (at most
 * the series' length) is chosen from a grid by least squares on the sample autocovariances, each
 * corrected for the mean the sample removed (see serial_var.c). Never
 * below 1. *tau_samples (may be NULL) gets the correlation time in
 * samples (0 when only white noise fits). NaN for n < 12. */
double hyp__mean_var_factor(const double *r, size_t n, double *tau_samples);

/* The 97.5 % quantile of Student's t distribution with nu degrees of
 * freedom (nu >= 1; smaller nu is taken as 1): exact for nu = 1 and 2,
 * the Cornish-Fisher expansion of Abramowitz and Stegun 26.7.5 from 3 on
 * (within 0.001 of the tables), linear in 1/nu between. NaN for NaN. */
double hyp__t975(double nu);

#endif
