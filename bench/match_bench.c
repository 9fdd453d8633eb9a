/* match_bench.c - benchmark (not a test) of matching benchmarks to a track
 * (issue 15: 10 000 benchmarks took 31 s). One run times, on the same
 * track and benchmarks, the former way (a geodesic per benchmark and
 * sample: hyp__near_exhaustive, which is what calib.c did) and the index
 * (near_index.c: build once, one query per benchmark), checks they found
 * the same samples, and prints CPU times (single thread). The track is
 * gentrack's shape (a loop of about 2 km at 1 s); the benchmarks are
 * scattered over a 5 km square around it, one in ten on a track point.
 * Build and run from the top of the tree (bench/match.sh does both):
 *   cc -O2 -D_DEFAULT_SOURCE -Iinclude -Isrc -o /tmp/match_bench bench/match_bench.c \
 *      src/near_index.c src/geo.c src/error.c -lproj -lm && /tmp/match_bench [POINTS [BENCHMARKS]] */
#include "near_index.h"
#include "hypsolev/samples.h"
#include "bench_util.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

static double uniform(void)   /* in [0, 1) */
{
    return (double)bench_bits53() / BENCH_TWO_POW_53;
}

/* Room for n indices in *p (capacity *cap); 0 or -1 out of memory. */
static int grow(size_t **p, size_t *cap, size_t n)
{
    if (n <= *cap)
        return 0;
    size_t nc = *cap ? *cap : 1024;
    while (nc < n)
        nc *= 2;
    size_t *q = realloc(*p, nc * sizeof *q);
    if (!q)
        return -1;
    *p = q;
    *cap = nc;
    return 0;
}

/* One benchmark's samples idx[0..got-1] kept flat: appended to *flat
 * (capacity *cap) after the *hits kept before; off[k + 1] becomes the new
 * count. 0, or -1 out of memory. */
static int keep_hits(size_t **flat, size_t *cap, size_t *off, size_t k, size_t *hits, const size_t *idx, size_t got)
{
    *hits += got;
    off[k + 1] = *hits;
    if (grow(flat, cap, *hits))
        return -1;
    memcpy(*flat + off[k], idx, got * sizeof *idx);
    return 0;
}

int main(int argc, char **argv)
{
    size_t n = argc > 1 ? (size_t)atol(argv[1]) : 3600, m = argc > 2 ? (size_t)atol(argv[2]) : 10000;
    const double radius_m = 30.0;   /* the default --tie-radius */
    int32_t *la = malloc(n * sizeof *la), *lo = malloc(n * sizeof *lo);
    double *bla = malloc(m * sizeof *bla), *blo = malloc(m * sizeof *blo);
    if (!la || !lo || !bla || !blo || !n)
        return 1;
    for (size_t i = 0; i < n; i++) {   /* bench/gentrack.c's loop */
        double ph = 2 * 3.14159265358979323846 * (double)i / 7200.0;
        la[i] = (int32_t)lround((46.8 + 0.01 * sin(ph)) * 1e7);
        lo[i] = (int32_t)lround((9.9 + 0.01 * (1 - cos(ph))) * 1e7);
    }
    for (size_t k = 0; k < m; k++) {
        if (k % 10 == 0) {
            size_t i = (size_t)(uniform() * (double)n) % n;
            bla[k] = la[i] * 1e-7;
            blo[k] = lo[i] * 1e-7;
        } else {
            bla[k] = 46.78 + 0.045 * uniform();
            blo[k] = 9.88 + 0.065 * uniform();
        }
    }
    /* each way's samples, benchmark after benchmark, kept flat (a few
     * per benchmark) and compared after the timing */
    size_t *a2 = NULL, *b2 = NULL, c1 = 0, c2 = 0;
    size_t *a = NULL, *b = NULL, na, nb, ca = 0, cb = 0, hits_old = 0, hits_new = 0, differ = 0;
    size_t *oa = calloc(m + 1, sizeof *oa), *ob = calloc(m + 1, sizeof *ob);
    if (!oa || !ob)
        return 1;
    double t0 = bench_now_s();
    for (size_t k = 0; k < m; k++) {
        size_t got;
        if (hyp__near_exhaustive(la, lo, n, bla[k], blo[k], radius_m, &b, &got, &cb) ||
            keep_hits(&b2, &c2, ob, k, &hits_old, b, got))
            return 1;
    }
    double t1 = bench_now_s();
    hyp__near_index ix;
    if (hyp__near_index_build(&ix, la, lo, n, radius_m))
        return 1;
    double t2 = bench_now_s();
    for (size_t k = 0; k < m; k++) {
        size_t got;
        if (hyp__near_index_query(&ix, bla[k], blo[k], radius_m, &a, &got, &ca) ||
            keep_hits(&a2, &c1, oa, k, &hits_new, a, got))
            return 1;
    }
    double t3 = bench_now_s();
    for (size_t k = 0; k < m; k++) {
        na = oa[k + 1] - oa[k];
        nb = ob[k + 1] - ob[k];
        differ += na != nb || (na && memcmp(a2 + oa[k], b2 + ob[k], na * sizeof *a) != 0);
    }
    printf("track: %zu points, %zu benchmarks, tie radius %.0f m\n", n, m, radius_m);
    printf("geodesic per benchmark and sample (before): %.2f s CPU, %zu samples within the radius\n", t1 - t0,
           hits_old);
    printf("index (after): %.3f s CPU (build %.3f s, %zu queries %.3f s), %zu samples within the radius\n", t3 - t1,
           t2 - t1, m, t3 - t2, hits_new);
    printf("speed-up %.0f; benchmarks whose samples differ: %zu (must be 0)\n", (t1 - t0) / (t3 - t1), differ);
    hyp__near_index_free(&ix);
    free(a);
    free(b);
    free(a2);
    free(b2);
    free(oa);
    free(ob);
    free(la);
    free(lo);
    free(bla);
    free(blo);
    return differ != 0;
}
