/* fmtnum.c - see fmtnum.h. */
#include "fmtnum.h"

#include <math.h>
#include <stdint.h>
#include <stdio.h>

int hyp__fmt_fixed(char *buf, size_t n, double v, int prec)
{
    static const double p10[10] = {1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9};
    if (prec < 0 || prec > 9 || n < 32)
        return snprintf(buf, n, "%.*f", prec < 0 ? 0 : prec, v);
    /* x carries one rounding of at most half an ulp, under 2^-19 below
     * 2^35 (which holds 180 degrees with 8 decimals): a fraction 4e-6 away
     * from a half rounds the same way as the exact product would */
    double x = fabs(v) * p10[prec];
    if (!(x < 34359738368.0))
        return snprintf(buf, n, "%.*f", prec, v);   /* also NaN and infinities */
    double fl = floor(x), fr = x - fl;
    if (fabs(fr - 0.5) < 4e-6)
        return snprintf(buf, n, "%.*f", prec, v);
    uint64_t u = (uint64_t)fl + (fr > 0.5);
    char tmp[32];
    int k = 0;
    do {   /* digits from the right, the point after prec of them */
        tmp[k++] = (char)('0' + u % 10);
        u /= 10;
        if (k == prec)
            tmp[k++] = '.';
    } while (u || k <= prec + (prec > 0));
    int len = 0;
    if (signbit(v))   /* printf keeps the sign of a negative that rounds to 0 */
        buf[len++] = '-';
    while (k)
        buf[len++] = tmp[--k];
    buf[len] = '\0';
    return len;
}
