/* fmtnum.c - see fmtnum.h. */
#include "fmtnum.h"

#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

/* "00" "01" ... "99": two digits per step */
static const char D2[201] =
    "0001020304050607080910111213141516171819"
    "2021222324252627282930313233343536373839"
    "4041424344454647484950515253545556575859"
    "6061626364656667686970717273747576777879"
    "8081828384858687888990919293949596979899";

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
    /* integer part, then exactly prec decimals, two digits at a time */
    static const uint64_t p10i[10] = {1, 10, 100, 1000, 10000, 100000, 1000000, 10000000, 100000000, 1000000000};
    uint64_t ip;
    switch (prec) {   /* a constant divisor is a multiply; a variable one a slow div */
    case 0: ip = u; break;
    case 1: ip = u / 10u; break;
    case 2: ip = u / 100u; break;
    case 3: ip = u / 1000u; break;
    case 4: ip = u / 10000u; break;
    case 5: ip = u / 100000u; break;
    case 6: ip = u / 1000000u; break;
    case 7: ip = u / 10000000u; break;
    case 8: ip = u / 100000000u; break;
    default: ip = u / 1000000000u; break;
    }
    uint32_t fp = (uint32_t)(u - ip * p10i[prec]);
    int len = 0;
    if (signbit(v))   /* printf keeps the sign of a negative that rounds to 0 */
        buf[len++] = '-';
    char t[24];
    int k = 24;
    while (ip >= 100) {
        unsigned r = (unsigned)(ip % 100);
        ip /= 100;
        k -= 2;
        memcpy(t + k, D2 + 2 * r, 2);
    }
    if (ip >= 10) {
        k -= 2;
        memcpy(t + k, D2 + 2 * ip, 2);
    } else
        t[--k] = (char)('0' + ip);
    while (k < 24)   /* a few bytes: a loop, not a call */
        buf[len++] = t[k++];
    if (prec) {
        buf[len++] = '.';
        for (int j = prec; j >= 2;) {
            unsigned r = fp % 100;
            fp /= 100;
            j -= 2;
            memcpy(buf + len + j, D2 + 2 * r, 2);
        }
        if (prec & 1)
            buf[len] = (char)('0' + fp % 10);
        len += prec;
    }
    buf[len] = '\0';
    return len;
}
