/* rare_values.h - the side tables of rare values kept beside compact per-sample
 * arrays: entries sorted by a leading `size_t index` (private). */
#ifndef HYP_RARE_VALUES_H
#define HYP_RARE_VALUES_H

#include <stddef.h>
#include <string.h>

/* The position of the last of n (> 0) entries of `stride` bytes, each
 * starting with its size_t index, whose index is at most i: a binary
 * search. */
static inline size_t hyp__sparse_find(const void *table, size_t n, size_t stride, size_t i)
{
    const unsigned char *t = table;
    size_t lo = 0, hi = n;
    while (hi - lo > 1) {
        size_t mid = lo + (hi - lo) / 2, at;
        memcpy(&at, t + mid * stride, sizeof at);
        if (at <= i)
            lo = mid;
        else
            hi = mid;
    }
    return lo;
}

#endif
