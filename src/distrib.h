/* distrib.h - distribution functions the adjustment tests need: the
 * regularized incomplete gamma function, the chi-square distribution and
 * its quantiles, the standard normal quantile (private). Pure kernels: no
 * allocation, no state, NaN outside the domain. */
#ifndef HYP_DISTRIB_H
#define HYP_DISTRIB_H

/* Regularized lower incomplete gamma function P(a, x) = gamma(a, x) / Gamma(a)
 * and its complement Q(a, x) = 1 - P(a, x), each computed directly (not as
 * 1 - the other) so that a tail probability keeps its relative accuracy.
 * a > 0, x >= 0 (both finite); NaN otherwise or when the expansion fails to
 * converge. */
double hyp__gamma_p(double a, double x);
double hyp__gamma_q(double a, double x);

/* Chi-square distribution with dof > 0 degrees of freedom (need not be an
 * integer): P(X <= x) and P(X > x) for x >= 0. NaN outside the domain. */
double hyp__chi2_cdf(double x, double dof);
double hyp__chi2_sf(double x, double dof);

/* The chi-square quantile: the x with P(X <= x) = p, for 0 < p < 1 and
 * dof > 0; relative accuracy about 1e-12. NaN outside the domain. */
double hyp__chi2_quantile(double p, double dof);

/* The standard normal quantile: the z with Phi(z) = p, 0 < p < 1; full
 * double accuracy. NaN outside the domain. */
double hyp__normal_quantile(double p);

#endif
