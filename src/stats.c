/* stats.c - robust noise estimates and summary statistics for the core. */
#include "stats.h"

#include <math.h>
#include <stdlib.h>

/* k-th smallest of v[0..n) by quickselect (Hoare's FIND, CACM 4, 1961),
 * reordering v; expected linear time where a sort is n log n. */
double hyp__select_kth(double *v, size_t n, size_t k)
{
    size_t lo = 0, hi = n - 1;
    while (lo < hi) {
        double pivot = v[lo + (hi - lo) / 2];
        size_t i = lo, j = hi;
        while (i <= j) {
            while (v[i] < pivot)
                i++;
            while (v[j] > pivot)
                j--;
            if (i <= j) {
                double t = v[i];
                v[i] = v[j];
                v[j] = t;
                i++;
                if (j == 0)
                    break;
                j--;
            }
        }
        if (k <= j)
            hi = j;
        else if (k >= i)
            lo = i;
        else
            return v[k];
    }
    return v[k];
}

double hyp__median_inplace(double *v, size_t n)
{
    if (n == 0)
        return NAN;
    double hi = hyp__select_kth(v, n, n / 2);
    if (n % 2)
        return hi;
    /* the lower middle is the largest of the lower part */
    double lo = v[0];
    for (size_t i = 1; i < n / 2; i++)
        if (v[i] > lo)
            lo = v[i];
    return 0.5 * (lo + hi);
}

int hyp__noise_second_diff(const double *t_s, const double *x, const float *xf, const unsigned char *bad,
                           size_t n, double max_dt_s, double *sigma)
{
    *sigma = NAN;
    if (n < 3)
        return 0;
    double *d = malloc((n - 2) * sizeof *d);
    if (!d)
        return -1;
    size_t m = 0;
    for (size_t i = 1; i + 1 < n; i++) {
        if (bad && (bad[i - 1] || bad[i] || bad[i + 1]))
            continue;
        if (t_s[i + 1] - t_s[i - 1] > max_dt_s)
            continue;
        double v = x ? x[i - 1] - 2.0 * x[i] + x[i + 1]
                     : (double)xf[i - 1] - 2.0 * (double)xf[i] + (double)xf[i + 1];
        if (v == v)
            d[m++] = v;
    }
    double s = NAN;
    if (m >= 10) {
        double med = hyp__median_inplace(d, m);
        for (size_t i = 0; i < m; i++)
            d[i] = fabs(d[i] - med);
        s = 1.4826 * hyp__median_inplace(d, m) / sqrt(6.0);
    }
    free(d);
    *sigma = s;
    return 0;
}

void hyp__mean_sd_neff(const double *x, size_t n, double *mean, double *sd, double *neff)
{
    double m = 0.0;
    for (size_t i = 0; i < n; i++)
        m += x[i];
    m = n ? m / (double)n : NAN;
    double ss = 0.0, c1 = 0.0;
    for (size_t i = 0; i < n; i++) {
        ss += (x[i] - m) * (x[i] - m);
        if (i)
            c1 += (x[i] - m) * (x[i - 1] - m);
    }
    double r1 = ss > 0.0 ? c1 / ss : 0.0;
    if (r1 < 0.0)
        r1 = 0.0;
    if (r1 > 0.99)
        r1 = 0.99;
    *mean = m;
    *sd = n > 1 ? sqrt(ss / (double)(n - 1)) : NAN;
    *neff = (double)n * (1.0 - r1) / (1.0 + r1);
    if (*neff < 1.0)
        *neff = 1.0;
}
