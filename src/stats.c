/* stats.c - robust noise estimates and summary statistics for the core. */
#include "stats.h"

#include <math.h>
#include <stdlib.h>

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

double hyp__median_inplace(double *v, size_t n)
{
    if (n == 0)
        return NAN;
    qsort(v, n, sizeof *v, cmp_double);
    return n % 2 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
}

int hyp__noise_second_diff(const double *t_s, const double *x, const unsigned char *ok,
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
        if (ok && !(ok[i - 1] && ok[i] && ok[i + 1]))
            continue;
        if (t_s[i + 1] - t_s[i - 1] > max_dt_s)
            continue;
        double v = x[i - 1] - 2.0 * x[i] + x[i + 1];
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
