/* buf.c - see buf.h. */
#include "buf.h"

#include <stdlib.h>
#include <string.h>

void hyp__buf_init(hyp__buf *b, size_t cap)
{
    memset(b, 0, sizeof *b);
    b->cap = cap ? cap : HYP__BUF_CAP_DEFAULT;
}

void hyp__buf_free(hyp__buf *b)
{
    free(b->data);
    hyp__buf_init(b, b->cap);
}

static int grow(hyp__buf *b, size_t need)
{
    size_t n = b->alloc ? b->alloc : 256;
    while (n < need)
        n = n > (size_t)-1 / 2 ? need : 2 * n;
    char *p = realloc(b->data, n);
    if (!p) {
        b->fail = HYP__BUF_NOMEM;
        return -1;
    }
    b->data = p;
    b->alloc = n;
    return 0;
}

int hyp__buf_add(hyp__buf *b, const char *s, size_t n)
{
    if (b->fail)
        return -1;
    if (n > b->cap || b->len > b->cap - n) {
        b->fail = HYP__BUF_CAPPED;
        return -1;
    }
    if (b->len + n + 1 > b->alloc && grow(b, b->len + n + 1))
        return -1;
    memcpy(b->data + b->len, s, n);
    b->len += n;
    b->data[b->len] = '\0';
    return 0;
}

int hyp__buf_adds(hyp__buf *b, const char *s)
{
    return hyp__buf_add(b, s, strlen(s));
}

int hyp__buf_addc(hyp__buf *b, char c)
{
    return hyp__buf_add(b, &c, 1);
}

void hyp__buf_truncate(hyp__buf *b, size_t len)
{
    if (len < b->len)
        b->len = len;
    if (b->data)
        b->data[b->len] = '\0';
    b->fail = HYP__BUF_OK;
}
