/* report_page.c - the page of an HTML report: document, style, sections,
 * tables, figures and the closing cautions (see report_page.h). */
#include "report_page.h"
#include "svg.h"
#include "hypsolev/timeparse.h"

#include <math.h>
#include <stdarg.h>
#include <string.h>

/* The style sheet. System fonts only (no web font is fetched); figures
 * scale to the page width and are never split across printed pages;
 * each section after the first starts a printed page (break-before, and
 * the older page-break-* names for print engines that lack it). */
static const char style[] =
    "body{margin:0;background:#fff;color:#222;font-family:sans-serif;font-size:15px;line-height:1.4}\n"
    ".main{max-width:1000px;margin:0 auto;padding:12px 24px 40px}\n"
    "h1{font-size:1.5em;margin:.4em 0}h2{font-size:1.25em;border-bottom:1px solid #bbb;padding-bottom:.15em;margin-top:1.6em}\n"
    "h3{font-size:1.05em;margin:1.2em 0 .3em}\n"
    "table{border-collapse:collapse;margin:.4em 0 1.2em;font-size:.9em}\n"
    "caption{text-align:left;font-weight:bold;padding:.2em 0}\n"
    "th,td{border:1px solid #c8c8c8;padding:.2em .55em;text-align:left;vertical-align:top}\n"
    "thead th{background:#f0f0f0}tbody th{font-weight:normal;background:#fafafa}\n"
    "td.n{text-align:right;white-space:nowrap;font-variant-numeric:tabular-nums}td.t{white-space:nowrap}\n"
    "div.figure{margin:1em 0 1.6em;break-inside:avoid;page-break-inside:avoid}\n"
    "div.figure svg{display:block;max-width:100%;height:auto}\n"
    "p.caption{font-size:.87em;color:#333;max-width:760px;margin-top:.3em}\n"
    "p.note{color:#444;font-style:italic}\n"
    ".caution{border:2px solid #D55E00;padding:.4em 1em;margin:1em 0}\n"
    ".warning{color:#8A3200}\n"
    "code,.cmd{font-family:monospace;font-size:.92em;word-break:break-all}\n"
    ".nav ol{columns:2;padding-left:1.4em}\n"
    "@media print{body{font-size:11pt}.main{max-width:none;padding:0}a{color:inherit;text-decoration:none}"
    ".section+.section{break-before:page;page-break-before:always}h2,h3{break-after:avoid;page-break-after:avoid}"
    "tr{break-inside:avoid;page-break-inside:avoid}}\n"
    "@page{margin:14mm}\n";

void hyp__page_init(hyp__page *p, size_t cap)
{
    hyp__buf_init(&p->b, cap);
    p->in_section = 0;
}

void hyp__page_free(hyp__page *p)
{
    hyp__buf_free(&p->b);
}

static void put_number(hyp__buf *b, double v, int decimals, int plus)
{
    char num[HYP__SVG_NUM_MAX];
    if (!hyp__svg_fmt(num, v, decimals, 0)) {
        hyp__buf_adds(b, "\xE2\x80\x94");   /* em dash: no value */
        return;
    }
    if (plus && num[0] != '-' && strspn(num, "0.") != strlen(num))
        hyp__buf_addc(b, '+');
    hyp__buf_adds(b, num);
}

static void put_time(hyp__buf *b, double t)
{
    char s[48];
    if (!isfinite(t)) {
        hyp__buf_adds(b, "\xE2\x80\x94");
        return;
    }
    hyp_time_format(t, s, sizeof s);
    hyp__buf_adds(b, s);
}

/* One directive at *pp (after the '%'); moves *pp to its last character. */
static void directive(hyp__buf *b, const char **pp, va_list *ap)
{
    const char *p = *pp;
    char num[HYP__SVG_NUM_MAX];
    int plus = *p == '+';
    if (plus)
        p++;
    if (*p == '.' && p[1] >= '0' && p[1] <= '9' && p[2] == 'f') {
        put_number(b, va_arg(*ap, double), p[1] - '0', plus);
        *pp = p + 2;
        return;
    }
    switch (*p) {
    case 's': hyp__buf_adds(b, va_arg(*ap, const char *)); break;
    case 't': hyp__svg_escape(b, va_arg(*ap, const char *)); break;
    case 'd': hyp__svg_fmt(num, va_arg(*ap, int), 0, 0), hyp__buf_adds(b, num); break;
    case 'z': hyp__svg_fmt(num, (double)va_arg(*ap, size_t), 0, 0), hyp__buf_adds(b, num); break;
    case 'T': put_time(b, va_arg(*ap, double)); break;
    default: hyp__buf_addc(b, '%'); break;   /* "%%", or a literal '%' */
    }
    *pp = *p ? p : p - 1;
}

static void page_vout(hyp__page *pg, const char *fmt, va_list ap)
{
    va_list aq;
    va_copy(aq, ap);
    for (const char *p = fmt; *p; p++) {
        const char *pct = strchr(p, '%');
        size_t lit = pct ? (size_t)(pct - p) : strlen(p);
        hyp__buf_add(&pg->b, p, lit);
        if (!pct)
            break;
        p = pct + 1;
        directive(&pg->b, &p, &aq);
        if (!*p)
            break;
    }
    va_end(aq);
}

void hyp__page_out(hyp__page *p, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    page_vout(p, fmt, ap);
    va_end(ap);
}

void hyp__page_begin(hyp__page *p, const char *title)
{
    hyp__page_out(p, "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n"
                     "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n"
                     "<title>%t</title>\n<style>\n%s</style>\n</head>\n<body>\n<div class=\"main\">\n",
                  title, style);
}

void hyp__page_end(hyp__page *p)
{
    if (p->in_section)
        hyp__page_out(p, "</div>\n");
    p->in_section = 0;
    hyp__page_out(p, "</div>\n</body>\n</html>\n");
}

void hyp__page_section(hyp__page *p, const char *id, const char *title)
{
    if (p->in_section)
        hyp__page_out(p, "</div>\n");
    hyp__page_out(p, "<div class=\"section\" id=\"%s\">\n<h2>%t</h2>\n", id, title);
    p->in_section = 1;
}

void hyp__page_table(hyp__page *p, const char *caption, const char *const *heads, int n)
{
    hyp__page_out(p, "<table>\n");
    if (caption)
        hyp__page_out(p, "<caption>%t</caption>\n", caption);
    if (n > 0) {
        hyp__page_out(p, "<thead><tr>");
        for (int k = 0; k < n; k++)
            hyp__page_out(p, "<th scope=\"col\">%t</th>", heads[k]);
        hyp__page_out(p, "</tr></thead>\n");
    }
    hyp__page_out(p, "<tbody>\n");
}

void hyp__page_table_end(hyp__page *p)
{
    hyp__page_out(p, "</tbody>\n</table>\n");
}

void hyp__page_kv(hyp__page *p, const char *key, const char *fmt, ...)
{
    hyp__page_out(p, "<tr><th scope=\"row\">%t</th><td>", key);
    va_list ap;
    va_start(ap, fmt);
    page_vout(p, fmt, ap);
    va_end(ap);
    hyp__page_out(p, "</td></tr>\n");
}

void hyp__page_figure(hyp__page *p)
{
    hyp__page_out(p, "<div class=\"figure\">\n");
}

void hyp__page_figure_end(hyp__page *p, const char *caption_fmt, ...)
{
    hyp__page_out(p, "<p class=\"caption\">");
    va_list ap;
    va_start(ap, caption_fmt);
    page_vout(p, caption_fmt, ap);
    va_end(ap);
    hyp__page_out(p, "</p>\n</div>\n");
}

void hyp__page_colophon(hyp__page *p, const char *tool, const char *command_line)
{
    hyp__page_section(p, "about", "Tool, command and cautions");
    hyp__page_table(p, NULL, NULL, 0);
    hyp__page_kv(p, "tool", "%t", tool);
    if (command_line)
        hyp__page_kv(p, "command line", "<span class=\"cmd\">%t</span>", command_line);
    else
        hyp__page_kv(p, "command line", "not given (the report was written through the library)");
    hyp__page_table_end(p);
    hyp__page_out(p, "<p class=\"caution\"><strong>Cautions.</strong> Not for aviation or navigation. Survey deliverables "
                     "defer to local codes and licensed surveyors. Barometric heights depend on the weather between the "
                     "base and the rover; the uncertainties shown are estimates from a model of the error sources, not "
                     "guarantees.</p>\n");
}

hyp_status hyp__page_status(const hyp__page *p, hyp_error *err)
{
    if (p->b.fail == HYP__BUF_CAPPED)
        return hyp_error_set(err, HYP_ERR_NOMEM, "HTML report: the page would pass its size cap of %zu bytes", p->b.cap);
    if (p->b.fail)
        return hyp_error_set(err, HYP_ERR_NOMEM, "HTML report: out of memory");
    return HYP_OK;
}

hyp_status hyp__page_write(const hyp__page *p, FILE *f, hyp_error *err)
{
    hyp_status st = hyp__page_status(p, err);
    if (st)
        return st;
    if (p->b.len && fwrite(p->b.data, 1, p->b.len, f) != p->b.len)
        return hyp_error_set(err, HYP_ERR_IO, "HTML report: write failed");
    return HYP_OK;
}
