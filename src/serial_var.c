/* serial_var.c - the variance of a mean of serially correlated errors
 * (white noise plus a first-order autoregressive part, fitted to the
 * series' own autocovariances) and Student's t quantile for intervals
 * from few independent values. */
#include "serial_var.h"

#include <math.h>

#define MAX_BINS 1024
#define N_TAU 60

/* Means of q consecutive values: m bins (the remainder is dropped). */
static size_t bin_means(const double *r, size_t n, double *y, size_t *q_out)
{
    size_t q = (n + MAX_BINS - 1) / MAX_BINS, m = n / q;
    for (size_t j = 0; j < m; j++) {
        double s = 0.0;
        for (size_t k = 0; k < q; k++)
            s += r[j * q + k];
        y[j] = s / (double)q;
    }
    *q_out = q;
    return m;
}

/* Sample autocovariances c[0..K] of y about its mean, each over its own
 * count of products (m - k). */
static void autocov(const double *y, size_t m, double *c, size_t K)
{
    double mean = 0.0;
    for (size_t j = 0; j < m; j++)
        mean += y[j];
    mean /= (double)m;
    for (size_t k = 0; k <= K; k++) {
        double s = 0.0;
        for (size_t j = k; j < m; j++)
            s += (y[j] - mean) * (y[j - k] - mean);
        c[k] = s / (double)(m - k);
    }
}

/* Variance of the mean of m values of a unit-variance AR(1) series with
 * lag-one correlation phi: (1/m) [1 + 2 sum_k (1 - k/m) phi^k], the
 * variance of a mean of a stationary series written out for the
 * autoregressive autocorrelation phi^k (Bayley and Hammersley, J. R. Stat.
 * Soc. Suppl. 8, 1946; from memory). */
static double ar1_mean_var(double phi, size_t m)
{
    double s = 0.0, pk = 1.0;
    for (size_t k = 1; k < m; k++) {
        pk *= phi;
        s += (1.0 - (double)k / (double)m) * pk;
        if (pk < 1e-12)
            break;
    }
    return (1.0 + 2.0 * s) / (double)m;
}

/* Least squares of c_k on a u_k + b v_k with a, b >= 0; the residual sum
 * of squares. */
static double fit2(const double *c, const double *u, const double *v, size_t K1, double *a, double *b)
{
    double uu = 0, uv = 0, vv = 0, uc = 0, vc = 0;
    for (size_t k = 0; k < K1; k++) {
        uu += u[k] * u[k], uv += u[k] * v[k], vv += v[k] * v[k];
        uc += u[k] * c[k], vc += v[k] * c[k];
    }
    double det = uu * vv - uv * uv;
    *a = det > 0 ? (uc * vv - vc * uv) / det : 0.0;
    *b = det > 0 ? (vc * uu - uc * uv) / det : 0.0;
    if (!(*a >= 0.0)) {
        *a = 0.0;
        *b = vv > 0 ? vc / vv : 0.0;
    }
    if (!(*b >= 0.0)) {
        *b = 0.0;
        *a = uu > 0 ? fmax(0.0, uc / uu) : 0.0;
    }
    double ss = 0.0;
    for (size_t k = 0; k < K1; k++) {
        double e = c[k] - *a * u[k] - *b * v[k];
        ss += e * e;
    }
    return ss;
}

/* The sample autocovariance of a series about its own mean is biased low
 * by the variance of that mean V (E c_k = gamma_k - V, to first order in
 * 1/m: expand the products about the true mean; Priestley, Spectral
 * Analysis and Time Series, 1981, chapter 5, from memory), so
 * the model fitted is, per lag k of the bin means,
 *   c_k = a (phi^k - B(phi)) + b (delta_k0 - 1/m),
 * a the autoregressive part's variance, b the white part's, B the
 * autoregressive variance of the mean per unit a; the mean's variance is
 * then a B + b / m. The correlation time comes from a grid (0.3 bins to
 * the series' length, geometric), the one with the least residual: a
 * correlation longer than the series is a bias of it that no series can
 * show, and the grid does not pretend to. */
double hyp__mean_var_factor(const double *r, size_t n, double *tau_samples)
{
    if (tau_samples)
        *tau_samples = 0.0;
    if (n < 12)
        return NAN;
    double y[MAX_BINS], c[MAX_BINS / 3 + 1], u[MAX_BINS / 3 + 1], v[MAX_BINS / 3 + 1];
    size_t q, m = bin_means(r, n, y, &q), K = m / 3;
    autocov(y, m, c, K);
    double best = INFINITY, var_mean = c[0] / (double)m, tau_best = 0.0;
    for (int g = 0; g < N_TAU; g++) {
        double lam = 0.3 * pow((double)m / 0.3, (double)g / (N_TAU - 1));
        double phi = exp(-1.0 / lam), B = ar1_mean_var(phi, m), pk = 1.0;
        for (size_t k = 0; k <= K; k++, pk *= phi) {
            u[k] = pk - B;
            v[k] = (k == 0) - 1.0 / (double)m;
        }
        double a, b, ss = fit2(c, u, v, K + 1, &a, &b);
        /* an autoregressive part whose lag-one autocovariance the sample
         * cannot tell from zero (under three standard errors of a white
         * series' sample autocorrelation, 1 / sqrt(m): Bartlett 1946, as
         * in Box and Jenkins, Time Series Analysis, section 6.2, from
         * memory) is not taken: fitted to the noise of the autocovariances
         * it would pass for a correlation longer than the data */
        if (a * (phi - B) < 3.0 * c[0] / sqrt((double)m))
            a = 0.0, b = c[0] * (double)m / (double)(m - 1), ss = INFINITY;
        if (ss < best) {
            best = ss;
            var_mean = a * B + b / (double)m;
            tau_best = a > 0 ? lam * (double)q : 0.0;
        }
    }
    /* the samples' own variance, for the ratio */
    double mean = 0.0, s2 = 0.0;
    size_t N = m * q;
    for (size_t i = 0; i < N; i++)
        mean += r[i];
    mean /= (double)N;
    for (size_t i = 0; i < N; i++)
        s2 += (r[i] - mean) * (r[i] - mean);
    s2 /= (double)(N - 1);
    if (tau_samples)
        *tau_samples = tau_best;
    double f = s2 > 0 ? var_mean / (s2 / (double)N) : 1.0;
    return f > 1.0 ? f : 1.0;
}

/* Cornish-Fisher expansion of the t quantile in terms of the normal one,
 * z = 1.959964 for 97.5 % (Abramowitz and Stegun, Handbook of
 * Mathematical Functions, 26.7.5). */
static double t975_cf(double nu)
{
    const double z = 1.959963984540054, z2 = z * z;
    double z3 = z2 * z, z5 = z3 * z2, z7 = z5 * z2, z9 = z7 * z2;
    double g1 = (z3 + z) / 4.0;
    double g2 = (5 * z5 + 16 * z3 + 3 * z) / 96.0;
    double g3 = (3 * z7 + 19 * z5 + 17 * z3 - 15 * z) / 384.0;
    double g4 = (79 * z9 + 776 * z7 + 1482 * z5 - 1920 * z3 - 945 * z) / 92160.0;
    double g5 = (27 * z9 * z2 + 339 * z9 + 930 * z7 - 1782 * z5 - 765 * z3 + 17955 * z) / 368640.0;
    double x = 1.0 / nu;
    return z + x * (g1 + x * (g2 + x * (g3 + x * (g4 + x * g5))));
}

double hyp__t975(double nu)
{
    if (nu != nu)
        return NAN;
    /* exact: nu = 1, t = tan(pi (p - 1/2)); nu = 2, t = (2p - 1) / sqrt(2 p (1 - p)) */
    const double t1 = 12.706204736174705, t2 = 0.95 / sqrt(2.0 * 0.975 * 0.025);
    if (nu <= 1.0)
        return t1;
    if (nu >= 3.0)
        return t975_cf(nu);
    double t3 = t975_cf(3.0), x = 1.0 / nu;
    if (nu <= 2.0)
        return t2 + (t1 - t2) * (x - 0.5) / 0.5;
    return t3 + (t2 - t3) * (x - 1.0 / 3.0) / (0.5 - 1.0 / 3.0);
}
