/* error.c - the error record and the message list. */
#include "hypsolev/error.h"

#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void hyp_error_clear(hyp_error *err)
{
    if (err) {
        err->status = HYP_OK;
        err->message[0] = '\0';
    }
}

hyp_status hyp_error_set(hyp_error *err, hyp_status status, const char *fmt, ...)
{
    if (err) {
        va_list ap;
        va_start(ap, fmt);
        vsnprintf(err->message, sizeof err->message, fmt, ap);
        va_end(ap);
        err->status = status;
    }
    return status;
}

void hyp_msgs_init(hyp_msgs *m)
{
    memset(m, 0, sizeof *m);
}

void hyp_msgs_free(hyp_msgs *m)
{
    if (!m)
        return;
    for (size_t i = 0; i < m->count; i++) {
        free(m->items[i].text);
        free(m->items[i].file);
    }
    free(m->items);
    hyp_msgs_init(m);
}

static void msgs_vadd(hyp_msgs *m, hyp_level level, const char *code, const char *file, unsigned line,
                      const char *fmt, va_list ap)
{
    if (!m)
        return;
    size_t cap = m->cap_count ? m->cap_count : 200;
    if (m->count >= cap) {
        m->dropped++;
        return;
    }
    if (m->count == m->alloc) {
        size_t n = m->alloc ? 2 * m->alloc : 16;
        hyp_msg *p = realloc(m->items, n * sizeof *p);
        if (!p) {
            m->dropped++;
            return;
        }
        m->items = p;
        m->alloc = n;
    }
    char buf[1024];
    vsnprintf(buf, sizeof buf, fmt, ap);
    char *text = strdup(buf);
    char *f = file ? strdup(file) : NULL;
    if (!text || (file && !f)) {
        free(text);
        free(f);
        m->dropped++;
        return;
    }
    hyp_msg *it = &m->items[m->count++];
    it->level = level;
    it->code = code ? code : "";
    it->file = f;
    it->line = line;
    it->text = text;
}

void hyp_msgs_add(hyp_msgs *m, hyp_level level, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    msgs_vadd(m, level, "", NULL, 0, fmt, ap);
    va_end(ap);
}

void hyp_msgs_add_at(hyp_msgs *m, hyp_level level, const char *code, const char *file, unsigned line,
                     const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    msgs_vadd(m, level, code, file, line, fmt, ap);
    va_end(ap);
}

const char *hyp_status_name(hyp_status s)
{
    switch (s) {
    case HYP_OK: return "ok";
    case HYP_ERR_IO: return "input/output error";
    case HYP_ERR_FORMAT: return "format error";
    case HYP_ERR_VALUE: return "bad value";
    case HYP_ERR_UNIT: return "unit error";
    case HYP_ERR_NODATA: return "no usable data";
    case HYP_ERR_USAGE: return "usage error";
    case HYP_ERR_NOMEM: return "out of memory";
    case HYP_ERR_INTERNAL: return "internal error";
    }
    return "unknown error";
}
