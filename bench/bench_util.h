/* bench_util.h - what the C benchmarks (match_bench.c, adjust_bench.c)
 * share: the process's CPU time and a deterministic random stream. Header
 * only (each benchmark is one program built by hand); not a test. */
#ifndef HYP_BENCH_UTIL_H
#define HYP_BENCH_UTIL_H

#include <stdint.h>
#include <time.h>

/* CPU time of the process, s: on a shared machine wall time says more
 * about the other jobs than about this one. */
static inline double bench_now_s(void)
{
    struct timespec t;
    clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

static uint64_t bench_rng_state = 12345;

/* The next 53 random bits of splitmix64 (Steele, Lea and Flood, "Fast
 * splittable pseudorandom number generators", OOPSLA 2014), as an integer
 * in [0, 2^53). */
static inline uint64_t bench_bits53(void)
{
    uint64_t z = (bench_rng_state += 0x9e3779b97f4a7c15ULL);
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
    return (z ^ (z >> 31)) >> 11;
}

#define BENCH_TWO_POW_53 9007199254740992.0

#endif
