/* distrib.c - incomplete gamma, chi-square distribution and quantile,
 * standard normal quantile: the kernels behind the variance-factor test and
 * Baarda's w-test of the adjustment engine. Pure functions; the method and
 * its source are cited at each one. */
#include "distrib.h"

#include <float.h>
#include <math.h>

#define SQRT2 1.41421356237309504880
#define SQRT_2PI 2.50662827463100050242
#define GAMMA_MAX_ITER 100000   /* the expansions need O(sqrt(a)) terms */
#define GAMMA_EPS (DBL_EPSILON / 2)
#define TINY 1e-300             /* Lentz's guard against a zero divisor */

/* ln Gamma(a) for a > 0. lgamma_r rather than lgamma: lgamma writes the
 * global `signgam`, a data race when several threads adjust at once. */
static double log_gamma(double a)
{
    int sign;
    return lgamma_r(a, &sign);
}

/* The common factor x^a e^-x / Gamma(a) of both expansions, formed in
 * logarithms so that it neither overflows nor underflows early. */
static double gamma_prefactor(double a, double x)
{
    return exp(a * log(x) - x - log_gamma(a));
}

/* P(a, x) by its series, for x < a + 1: P = x^a e^-x / Gamma(a) *
 * sum_n x^n / (a (a+1) ... (a+n)) (Abramowitz & Stegun 6.5.29; Press et
 * al., Numerical Recipes, 3rd ed., section 6.2, routine gser). */
static double gamma_p_series(double a, double x)
{
    double ap = a, del = 1.0 / a, sum = del;
    for (int n = 0; n < GAMMA_MAX_ITER; n++) {
        ap += 1.0;
        del *= x / ap;
        sum += del;
        if (fabs(del) < fabs(sum) * GAMMA_EPS)
            return sum * gamma_prefactor(a, x);
    }
    return NAN;
}

/* Q(a, x) by its continued fraction, for x >= a + 1, evaluated by the
 * modified Lentz method (Abramowitz & Stegun 6.5.31; Numerical Recipes,
 * 3rd ed., section 6.2, routine gcf, and section 5.2 for Lentz). */
static double gamma_q_fraction(double a, double x)
{
    double b = x + 1.0 - a, c = 1.0 / TINY, d = 1.0 / b, h = d;
    for (int i = 1; i < GAMMA_MAX_ITER; i++) {
        double an = -i * (i - a);
        b += 2.0;
        d = an * d + b;
        if (fabs(d) < TINY)
            d = TINY;
        c = b + an / c;
        if (fabs(c) < TINY)
            c = TINY;
        d = 1.0 / d;
        double del = d * c;
        h *= del;
        if (fabs(del - 1.0) < GAMMA_EPS)
            return h * gamma_prefactor(a, x);
    }
    return NAN;
}

static int gamma_domain_ok(double a, double x)
{
    return a > 0 && isfinite(a) && x >= 0 && isfinite(x);
}

double hyp__gamma_p(double a, double x)
{
    if (!gamma_domain_ok(a, x))
        return NAN;
    if (x == 0)
        return 0.0;
    return x < a + 1.0 ? gamma_p_series(a, x) : 1.0 - gamma_q_fraction(a, x);
}

double hyp__gamma_q(double a, double x)
{
    if (!gamma_domain_ok(a, x))
        return NAN;
    if (x == 0)
        return 1.0;
    return x < a + 1.0 ? 1.0 - gamma_p_series(a, x) : gamma_q_fraction(a, x);
}

/* The chi-square distribution with v degrees of freedom is the gamma
 * distribution of shape v/2 and scale 2: P(X <= x) = P(v/2, x/2)
 * (Abramowitz & Stegun 26.4.19). */
double hyp__chi2_cdf(double x, double dof)
{
    return dof > 0 ? hyp__gamma_p(dof / 2, x / 2) : NAN;
}

double hyp__chi2_sf(double x, double dof)
{
    return dof > 0 ? hyp__gamma_q(dof / 2, x / 2) : NAN;
}

/* Density of the chi-square distribution (Abramowitz & Stegun 26.4.1). */
static double chi2_pdf(double x, double dof)
{
    double a = dof / 2;
    return 0.5 * exp((a - 1.0) * log(x / 2) - x / 2 - log_gamma(a));
}

/* The first guess of a quantile: Wilson and Hilferty's cube-root normal
 * approximation (Abramowitz & Stegun 26.4.17); where that is not positive
 * (few degrees of freedom, small p), the leading term of the series,
 * P(a, y) ~ y^a / Gamma(a + 1), inverted (Numerical Recipes, 3rd ed.,
 * section 6.2.1, invgammp). */
static double chi2_first_guess(double p, double dof)
{
    double k = 2.0 / (9.0 * dof);
    double t = 1.0 - k + hyp__normal_quantile(p) * sqrt(k);
    double x = dof * t * t * t;
    if (x > 0 && isfinite(x))
        return x;
    double a = dof / 2;
    return 2.0 * exp((log(p) + log_gamma(a + 1.0)) / a);
}

/* f(x), increasing in x, whose root is the quantile: P - p below the
 * median, (1 - p) - Q above it, so that each tail keeps its relative
 * accuracy. */
static double chi2_gap(double x, double dof, double p, int upper)
{
    return upper ? (1.0 - p) - hyp__chi2_sf(x, dof) : hyp__chi2_cdf(x, dof) - p;
}

/* Newton's method on chi2_gap, safeguarded by bisection of a bracket that
 * always holds the root (Numerical Recipes, 3rd ed., section 9.4, rtsafe). */
double hyp__chi2_quantile(double p, double dof)
{
    if (!(p > 0 && p < 1) || !(dof > 0) || !isfinite(dof))
        return NAN;
    int upper = p > 0.5;
    double lo = 0.0, hi = chi2_first_guess(p, dof), f = chi2_gap(hi, dof, p, upper);
    for (int k = 0; f < 0; k++) {             /* widen until f(hi) >= 0 */
        if (k > 2000 || !isfinite(hi))
            return NAN;
        lo = hi;
        hi *= 2.0;
        f = chi2_gap(hi, dof, p, upper);
    }
    if (f != f)
        return NAN;
    double x = hi;
    for (int it = 0; it < 300; it++) {
        double d = chi2_pdf(x, dof);
        double xn = d > 0 ? x - f / d : NAN;
        if (!(xn > lo && xn < hi))
            xn = 0.5 * (lo + hi);
        if (fabs(xn - x) <= 1e-14 * xn || hi - lo <= 1e-15 * hi)
            return xn;
        x = xn;
        f = chi2_gap(x, dof, p, upper);
        if (f != f)
            return NAN;
        if (f < 0)
            lo = x;
        else
            hi = x;
    }
    return NAN;
}

/* Acklam's rational approximations of the normal quantile (relative error
 * below 1.15e-9) in a central region and two tails split at p = 0.02425,
 * followed by one step of Halley's method on Phi(z) - p with
 * Phi(z) = erfc(-z / sqrt 2) / 2, which brings the result to full double
 * accuracy. P. J. Acklam, "An algorithm for computing the inverse normal
 * cumulative distribution function" (2003), coefficients and refinement
 * step as published there. */
static const double ack_a[6] = {-3.969683028665376e+01, 2.209460984245205e+02,
                                -2.759285104469687e+02, 1.383577518672690e+02,
                                -3.066479806614716e+01, 2.506628277459239e+00};
static const double ack_b[5] = {-5.447609879822406e+01, 1.615858368580409e+02,
                                -1.556989798598866e+02, 6.680131188771972e+01,
                                -1.328068155288572e+01};
static const double ack_c[6] = {-7.784894002430293e-03, -3.223964580411365e-01,
                                -2.400758277161838e+00, -2.549732539343734e+00,
                                4.374664141464968e+00, 2.938163982698783e+00};
static const double ack_d[4] = {7.784695709041462e-03, 3.224671290700398e-01,
                                2.445134137142996e+00, 3.754408661907416e+00};
#define ACK_P_LOW 0.02425

/* The lower tail rational function of Acklam's algorithm (p <= 0.02425). */
static double acklam_tail(double p)
{
    double q = sqrt(-2.0 * log(p));
    return (((((ack_c[0] * q + ack_c[1]) * q + ack_c[2]) * q + ack_c[3]) * q + ack_c[4]) * q + ack_c[5]) /
           ((((ack_d[0] * q + ack_d[1]) * q + ack_d[2]) * q + ack_d[3]) * q + 1.0);
}

double hyp__normal_quantile(double p)
{
    if (!(p > 0 && p < 1))
        return NAN;
    double z;
    if (p < ACK_P_LOW) {
        z = acklam_tail(p);
    } else if (p > 1.0 - ACK_P_LOW) {
        z = -acklam_tail(1.0 - p);
    } else {
        double q = p - 0.5, r = q * q;
        z = (((((ack_a[0] * r + ack_a[1]) * r + ack_a[2]) * r + ack_a[3]) * r + ack_a[4]) * r + ack_a[5]) * q /
            (((((ack_b[0] * r + ack_b[1]) * r + ack_b[2]) * r + ack_b[3]) * r + ack_b[4]) * r + 1.0);
    }
    double e = 0.5 * erfc(-z / SQRT2) - p;
    double u = e * SQRT_2PI * exp(z * z / 2);
    return z - u / (1.0 + z * u / 2);
}
