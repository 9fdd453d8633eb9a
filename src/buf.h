/* buf.h - a growable text buffer with a size cap (private): appends that
 * would pass the cap, or fail to allocate, are refused and remembered. */
#ifndef HYP_BUF_H
#define HYP_BUF_H

#include <stddef.h>

#define HYP__BUF_CAP_DEFAULT ((size_t)64 << 20)   /* 64 MiB */

typedef enum hyp__buf_fail {
    HYP__BUF_OK = 0,
    HYP__BUF_CAPPED,   /* an append would have passed `cap` */
    HYP__BUF_NOMEM     /* realloc failed */
} hyp__buf_fail;

typedef struct hyp__buf {
    char *data;          /* NUL-terminated once anything was added, else NULL */
    size_t len;          /* bytes in data, without the NUL */
    size_t alloc;        /* bytes allocated */
    size_t cap;          /* most bytes len may reach */
    hyp__buf_fail fail;  /* sticky: once set, every append is refused */
} hyp__buf;

/* cap 0 means HYP__BUF_CAP_DEFAULT. */
void hyp__buf_init(hyp__buf *b, size_t cap);
void hyp__buf_free(hyp__buf *b);
/* Appends n bytes (all or none); 0, or -1 when refused (b->fail says why). */
int hyp__buf_add(hyp__buf *b, const char *s, size_t n);
int hyp__buf_adds(hyp__buf *b, const char *s);
int hyp__buf_addc(hyp__buf *b, char c);
/* Cuts back to len bytes (len <= b->len) and clears the failure, so a
 * caller can drop what a failed writer left half-done. */
void hyp__buf_truncate(hyp__buf *b, size_t len);

#endif
