/* csv_lex.c - the CSV tokeniser the readers share: bounded lines, quoted
 * fields, delimiter detection, "name [unit]" headers. */
#include "csv_lex.h"

#include <ctype.h>
#include <stdlib.h>
#include <string.h>


/* Reads one line (without its '\n' or '\r\n'); 1 on success, 0 at end of
 * file, -1 when the line is too long, -2 on a NUL byte, -3 on a read error. */
int hyp__csv_read_line(hyp__csv_lines *r)
{
    r->len = 0;
    int c, any = 0;
    r->ended_with_newline = 0;
    while ((c = getc_unlocked(r->f)) != EOF) {   /* each reader owns its FILE */
        any = 1;
        if (c == '\n') {
            r->ended_with_newline = 1;
            break;
        }
        if (c == '\r') {   /* CR LF, or a lone CR (old line ends) */
            int d = getc_unlocked(r->f);
            if (d != '\n' && d != EOF)
                ungetc(d, r->f);
            r->ended_with_newline = 1;
            break;
        }
        if (c == '\0')
            return -2;
        if (r->len + 2 > r->alloc) {
            if (r->alloc >= HYP_CSV_LINE_MAX)
                return -1;
            size_t n = r->alloc ? 2 * r->alloc : 256;
            char *p = realloc(r->buf, n);
            if (!p)
                return -1;
            r->buf = p;
            r->alloc = n;
        }
        r->buf[r->len++] = (char)c;
    }
    if (ferror(r->f))
        return -3;
    if (!any)
        return 0;
    r->lineno++;
    if (r->len && r->buf[r->len - 1] == '\r')
        r->len--;
    if (!r->buf) {
        r->buf = malloc(1);
        if (!r->buf)
            return -1;
        r->alloc = 1;
    }
    r->buf[r->len] = '\0';
    return 1;
}


/* Splits a line in place into fields; quoted fields lose their quotes and
 * "" becomes ". Returns the field count, -1 for an unterminated quote,
 * -2 for too many columns. */
int hyp__csv_split(char *line, char delim, hyp__csv_field *out, int max)
{
    int n = 0;
    char *p = line;
    for (;;) {
        if (n == max)
            return -2;
        while (*p == ' ')
            p++;
        if (*p == '"') {
            char *w = ++p, *start = p;
            for (;;) {
                if (*p == '\0')
                    return -1;
                if (*p == '"') {
                    if (p[1] == '"') {
                        *w++ = '"';
                        p += 2;
                        continue;
                    }
                    p++;
                    break;
                }
                *w++ = *p++;
            }
            out[n].s = start;
            out[n].len = (size_t)(w - start);
            while (*p == ' ')
                p++;
            if (*p && *p != delim)
                return -1;
        } else {
            char *start = p;
            while (*p && *p != delim)
                p++;
            out[n].s = start;
            out[n].len = (size_t)(p - start);
        }
        n++;
        if (*p != delim)
            return n;
        p++;
    }
}

char hyp__csv_detect_delimiter(const char *line)
{
    size_t nc = 0, ns = 0, nt = 0;
    int q = 0;
    for (const char *p = line; *p; p++) {
        if (*p == '"')
            q = !q;
        else if (!q && *p == ',')
            nc++;
        else if (!q && *p == ';')
            ns++;
        else if (!q && *p == '\t')
            nt++;
    }
    if (nt >= nc && nt >= ns && nt)
        return '\t';
    if (ns > nc)
        return ';';
    return ',';
}

/* "Pressure [hPa]" -> name "pressure", unit "hPa"; also "(hPa)". */
void hyp__csv_header_name(const hyp__csv_field *f, char *name, size_t nn, char *unit, size_t nu)
{
    size_t len = f->len;
    const char *s = f->s;
    while (len && isspace((unsigned char)s[len - 1]))
        len--;
    unit[0] = '\0';
    const char *open = NULL;
    if (len && (s[len - 1] == ']' || s[len - 1] == ')')) {
        char o = s[len - 1] == ']' ? '[' : '(';
        for (size_t i = len; i-- > 0;)
            if (s[i] == o) {
                open = s + i;
                break;
            }
    }
    size_t name_len = open ? (size_t)(open - s) : len;
    while (name_len && isspace((unsigned char)s[name_len - 1]))
        name_len--;
    if (name_len >= nn)
        name_len = nn - 1;
    memcpy(name, s, name_len);
    name[name_len] = '\0';
    if (open) {
        size_t ul = (size_t)(s + len - 1 - open - 1);
        const char *u = open + 1;
        while (ul && *u == ' ') {
            u++;
            ul--;
        }
        while (ul && u[ul - 1] == ' ')
            ul--;
        if (ul >= nu)
            ul = nu - 1;
        memcpy(unit, u, ul);
        unit[ul] = '\0';
    }
}

