/* svg_text.c - numbers without locale and text made safe for XML, for the
 * SVG drawing layer (see svg.h). */
#include "svg.h"

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

/* One character of well-formed UTF-8 at s (RFC 3629, section 4: no
 * overlong forms, no surrogates, nothing past U+10FFFF). Returns its
 * length with *cp set, or the length of the longest ill-formed prefix (at
 * least 1) with *cp = -1, which one U+FFFD replaces (the Unicode Standard's
 * "maximal subpart" practice, chapter 3, U+FFFD substitution). */
static size_t utf8_next(const unsigned char *s, long *cp)
{
    unsigned c = s[0];
    size_t need;
    unsigned lo = 0x80, hi = 0xBF;
    if (c < 0x80) {
        *cp = (long)c;
        return 1;
    }
    if (c >= 0xC2 && c <= 0xDF)
        need = 1;
    else if (c >= 0xE0 && c <= 0xEF) {
        need = 2;
        lo = c == 0xE0 ? 0xA0 : 0x80;
        hi = c == 0xED ? 0x9F : 0xBF;
    } else if (c >= 0xF0 && c <= 0xF4) {
        need = 3;
        lo = c == 0xF0 ? 0x90 : 0x80;
        hi = c == 0xF4 ? 0x8F : 0xBF;
    } else {
        *cp = -1;
        return 1;
    }
    long v = (long)(c & (0x3Fu >> need));
    for (size_t k = 1; k <= need; k++) {
        unsigned b = s[k];   /* the NUL ends it: not a continuation byte */
        if (b < lo || b > hi) {
            *cp = -1;
            return k;
        }
        lo = 0x80, hi = 0xBF;
        v = (v << 6) | (long)(b & 0x3F);
    }
    *cp = v;
    return need + 1;
}

/* Characters replaced: those XML 1.0 (section 2.2, Char) forbids, the
 * other controls (DEL, C1), and the bidirectional embedding, override and
 * isolate controls (U+202A-202E, U+2066-2069), which could make a label
 * display in an order other than its bytes. */
static int unsafe_char(long cp)
{
    return cp < 0 || cp < 0x20 || (cp >= 0x7F && cp <= 0x9F) || (cp >= 0x202A && cp <= 0x202E) ||
           (cp >= 0x2066 && cp <= 0x2069) || cp == 0xFFFE || cp == 0xFFFF;
}

static const char *entity(unsigned char c)
{
    switch (c) {
    case '&': return "&amp;";
    case '<': return "&lt;";
    case '>': return "&gt;";
    case '"': return "&quot;";
    case '\'': return "&#39;";
    default: return NULL;
    }
}

int hyp__svg_escape(hyp__buf *b, const char *s)
{
    const unsigned char *p = (const unsigned char *)(s ? s : "");
    while (*p) {
        long cp;
        size_t n = utf8_next(p, &cp);
        const char *ent = n == 1 ? entity(*p) : NULL;
        int rc;
        if (ent)
            rc = hyp__buf_adds(b, ent);
        else if (cp == '\t' || cp == '\n' || cp == '\r')
            rc = hyp__buf_addc(b, ' ');
        else if (unsafe_char(cp))
            rc = hyp__buf_adds(b, "\xEF\xBF\xBD");
        else
            rc = hyp__buf_add(b, (const char *)p, n);
        if (rc)
            return -1;
        p += n;
    }
    return 0;
}

size_t hyp__svg_text_chars(const char *s)
{
    size_t count = 0;
    const unsigned char *p = (const unsigned char *)(s ? s : "");
    while (*p) {
        long cp;
        p += utf8_next(p, &cp);
        count++;
    }
    return count;
}
