/* csv_lex.h - CSV tokeniser shared by the log, benchmark and tie readers
 * (private). */
#ifndef HYP_CSV_LEX_H
#define HYP_CSV_LEX_H

#include <stddef.h>
#include <stdio.h>

#define HYP_CSV_LINE_MAX (1u << 20)   /* a longer line is not a log line */

typedef struct hyp__csv_lines {
    FILE *f;
    char *buf;
    size_t len, alloc;
    unsigned lineno;
    int ended_with_newline;
} hyp__csv_lines;

typedef struct hyp__csv_field { const char *s; size_t len; } hyp__csv_field;

/* One line without its end-of-line: 1, or 0 at the end, -1 too long (or out
 * of memory), -2 NUL byte, -3 read error. */
int hyp__csv_read_line(hyp__csv_lines *r);
/* Splits in place; quotes removed, "" unescaped. Field count, -1 for an
 * unterminated quote, -2 for more than max fields. */
int hyp__csv_split(char *line, char delim, hyp__csv_field *out, int max);
/* ',', ';' or '\t': the most frequent outside quotes. */
char hyp__csv_detect_delimiter(const char *line);
/* "Pressure [hPa]" -> "Pressure", "hPa". */
void hyp__csv_header_name(const hyp__csv_field *f, char *name, size_t nn, char *unit, size_t nu);

#endif
