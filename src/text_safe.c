/* text_safe.c - text from inputs made safe for what we write: UTF-8
 * checked character by character, and XML character data escaped with
 * every character XML cannot hold (or a reader could be misled by)
 * replaced. Used by the SVG figures, the GPX writer and the JSON summary. */
#include "text_safe.h"

#include <string.h>

/* One character of well-formed UTF-8 at s (RFC 3629, section 4: no
 * overlong forms, no surrogates, nothing past U+10FFFF). Returns its
 * length with *cp set, or the length of the longest ill-formed prefix (at
 * least 1) with *cp = -1, which one U+FFFD replaces (the Unicode Standard's
 * "maximal subpart" practice, chapter 3, U+FFFD substitution). */
size_t hyp__utf8_next(const unsigned char *s, long *cp)
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

int hyp__xml_escape(hyp__buf *b, const char *s)
{
    const unsigned char *p = (const unsigned char *)(s ? s : "");
    while (*p) {
        long cp;
        size_t n = hyp__utf8_next(p, &cp);
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
