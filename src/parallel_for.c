/* parallel_for.c - the parallel loop of parallel_for.h with POSIX threads. */
#include "parallel_for.h"

#include <pthread.h>

typedef struct job {
    void (*fn)(void *, size_t, size_t, int);
    void *ctx;
    size_t lo, hi;
    int part;
} job;

static void *run(void *arg)
{
    job *j = arg;
    j->fn(j->ctx, j->lo, j->hi, j->part);
    return NULL;
}

int hyp__parallel(size_t n, int parts, void (*fn)(void *ctx, size_t lo, size_t hi, int part), void *ctx)
{
    if (parts > HYP__MAX_PARTS)
        parts = HYP__MAX_PARTS;
    if (parts < 2 || n < 1024 * (size_t)parts) {   /* not worth a thread */
        fn(ctx, 0, n, 0);
        return 1;
    }
    job jobs[HYP__MAX_PARTS];
    pthread_t tid[HYP__MAX_PARTS];
    int started = 1;
    for (int k = 0; k < parts; k++)
        jobs[k] = (job){fn, ctx, n * (size_t)k / (size_t)parts, n * (size_t)(k + 1) / (size_t)parts, k};
    for (int k = 1; k < parts; k++) {
        if (pthread_create(&tid[k], NULL, run, &jobs[k]) != 0)
            break;
        started++;
    }
    if (started < parts) {
        /* fewer threads than asked: the calling thread does the rest,
         * still as separate parts so that each part's slot is filled */
        for (int k = started; k < parts; k++)
            run(&jobs[k]);
    }
    run(&jobs[0]);
    for (int k = 1; k < started; k++)
        pthread_join(tid[k], NULL);
    return parts;
}
