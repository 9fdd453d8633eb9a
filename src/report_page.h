/* report_page.h - the page of an HTML report (private): one self-contained
 * document, inline CSS and inline SVG, no script, no font, nothing
 * fetched, built in a capped buffer and written whole. Sections, tables,
 * figures with captions, numbers with their units, and the parts every
 * report ends with (tool, command line, cautions). Shared by the reports of
 * every command; nothing here knows barometry. */
#ifndef HYP_REPORT_PAGE_H
#define HYP_REPORT_PAGE_H

#include <stdio.h>

#include "buf.h"
#include "hypsolev/error.h"

typedef struct hyp__page {
    hyp__buf b;
    int in_section;
} hyp__page;

/* cap 0: the buffer's default (64 MiB). */
void hyp__page_init(hyp__page *p, size_t cap);
void hyp__page_free(hyp__page *p);

/* <!DOCTYPE html>, <head> with the title and the style sheet, <body>. */
void hyp__page_begin(hyp__page *p, const char *title);
/* Closes the open section and the document. */
void hyp__page_end(hyp__page *p);

/* Appends fmt with its directives replaced (no printf, so no locale):
 *   %s  a trusted string as is (markup)      %t  text, escaped for HTML
 *   %d  an int     %z  a size_t               %%  a '%'
 *   %.Nf, %+.Nf  a double with N (0..9) decimals, '+' on positives;
 *                a non-finite value shows as an em dash
 *   %T  a double, Unix seconds, as ISO 8601 UTC (em dash when not finite)
 * Text from inputs (file names, messages) must go through %t. */
void hyp__page_out(hyp__page *p, const char *fmt, ...);

/* Closes the open section, opens <section id="ID"> with an <h2>. */
void hyp__page_section(hyp__page *p, const char *id, const char *title);
/* <table> with a caption (NULL: none) and a header row of n cells. */
void hyp__page_table(hyp__page *p, const char *caption, const char *const *heads, int n);
void hyp__page_table_end(hyp__page *p);
/* A row of a two-column table: the key as a row header, the value by fmt. */
void hyp__page_kv(hyp__page *p, const char *key, const char *fmt, ...);

/* Figures: the SVG goes into p->b between these; the caption by fmt. */
void hyp__page_figure(hyp__page *p);
void hyp__page_figure_end(hyp__page *p, const char *caption_fmt, ...);

/* The report's closing section: the tool, the full command line (NULL:
 * "not given") and the cautions. */
void hyp__page_colophon(hyp__page *p, const char *tool, const char *command_line);

/* HYP_OK, or HYP_ERR_NOMEM with a message when the buffer refused. */
hyp_status hyp__page_status(const hyp__page *p, hyp_error *err);
/* Writes the page to f; HYP_ERR_IO when f refuses it. */
hyp_status hyp__page_write(const hyp__page *p, FILE *f, hyp_error *err);

#endif
