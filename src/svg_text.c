/* svg_text.c - numbers without locale and text made safe for XML, for the
 * SVG drawing layer (see svg.h). */
#include "svg.h"
#include "text_safe.h"

#include <math.h>
#include <stdint.h>
#include <string.h>

double hyp__svg_pow10(int e)
{
    /* exact powers of ten up to 1e22 (the largest a double holds exactly) */
    static const double p[23] = {1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,  1e8,  1e9,  1e10, 1e11,
                                 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};
    if (e >= 0 && e <= 22)
        return p[e];
    return pow(10.0, e);
}

/* The digits of u, with a point before the last `decimals` of them. */
static size_t put_fixed(char *out, int negative, uint64_t u, int decimals)
{
    char tmp[HYP__SVG_NUM_MAX];
    int k = 0;
    do {
        tmp[k++] = (char)('0' + u % 10);
        u /= 10;
        if (k == decimals)
            tmp[k++] = '.';
    } while (u || k <= decimals + (decimals > 0));
    size_t len = 0;
    if (negative)
        out[len++] = '-';
    while (k)
        out[len++] = tmp[--k];
    out[len] = '\0';
    return len;
}

static size_t trim_zeros(char *out, size_t len)
{
    if (!memchr(out, '.', len))
        return len;
    while (out[len - 1] == '0')
        len--;
    if (out[len - 1] == '.')
        len--;
    out[len] = '\0';
    return len;
}

size_t hyp__svg_fmt(char out[HYP__SVG_NUM_MAX], double v, int decimals, int trim)
{
    out[0] = '\0';
    if (!isfinite(v))
        return 0;
    decimals = decimals < 0 ? 0 : decimals > 15 ? 15 : decimals;
    double x = fabs(v) * hyp__svg_pow10(decimals);
    if (!(x < 9007199254740992.0))   /* 2^53: past it the integers are not all doubles */
        return hyp__svg_fmt_sci(out, v, 5);
    uint64_t u = (uint64_t)floor(x + 0.5);
    size_t len = put_fixed(out, v < 0 && u != 0, u, decimals);
    return trim ? trim_zeros(out, len) : len;
}

size_t hyp__svg_fmt_sci(char out[HYP__SVG_NUM_MAX], double v, int mant_decimals)
{
    out[0] = '\0';
    if (!isfinite(v))
        return 0;
    int md = mant_decimals < 0 ? 0 : mant_decimals > 15 ? 15 : mant_decimals;
    double a = fabs(v);
    if (a == 0.0)
        return put_fixed(out, 0, 0, 0);
    int e = (int)floor(log10(a));
    /* two steps for subnormals, whose 10^e is below the smallest double */
    double m = e < -300 ? a * 1e300 / hyp__svg_pow10(e + 300) : a / hyp__svg_pow10(e);
    if (m >= 10.0)
        m /= 10.0, e++;
    else if (m < 1.0)
        m *= 10.0, e--;
    uint64_t u = (uint64_t)floor(m * hyp__svg_pow10(md) + 0.5);
    if (u >= (uint64_t)hyp__svg_pow10(md + 1))   /* 9.99.. rounded up to 10 */
        u /= 10, e++;
    size_t len = put_fixed(out, v < 0, u, md);
    out[len++] = 'e';
    if (e < 0)
        out[len++] = '-', e = -e;
    char tmp[8];
    int k = 0;
    do {
        tmp[k++] = (char)('0' + e % 10);
        e /= 10;
    } while (e);
    while (k)
        out[len++] = tmp[--k];
    out[len] = '\0';
    return len;
}

int hyp__svg_escape(hyp__buf *b, const char *s)
{
    return hyp__xml_escape(b, s);
}

size_t hyp__svg_text_chars(const char *s)
{
    size_t count = 0;
    const unsigned char *p = (const unsigned char *)(s ? s : "");
    while (*p) {
        long cp;
        p += hyp__utf8_next(p, &cp);
        count++;
    }
    return count;
}
