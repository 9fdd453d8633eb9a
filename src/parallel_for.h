/* parallel_for.h - a parallel loop over index ranges for the per-point passes
 * (private). */
#ifndef HYP_PARALLEL_FOR_H
#define HYP_PARALLEL_FOR_H

#include <stddef.h>

#define HYP__MAX_PARTS 16

/* Calls fn(ctx, lo, hi, part) on `parts` contiguous ranges covering
 * [0, n), part 0 in the calling thread and the others in threads of their
 * own; returns the number of parts used (1 when threads cannot be made or
 * are not asked for: then fn ran once over everything). fn must write only
 * to indices of its own range and to its own part's slot. */
int hyp__parallel(size_t n, int parts, void (*fn)(void *ctx, size_t lo, size_t hi, int part), void *ctx);

#endif
