/* batch.c - running many rovers: a pool of worker threads, progress on
 * stderr, and SIGINT/SIGTERM turned into an orderly stop (no output is
 * renamed into place after the signal; partial files are removed). */
#define _POSIX_C_SOURCE 200809L
#include "batch.h"

#include <errno.h>
#include <pthread.h>
#include <signal.h>
#include <stdatomic.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

static atomic_int cancelled;      /* the program's, not the library's */
static pthread_mutex_t out_lock = PTHREAD_MUTEX_INITIALIZER;

int cli_cancelled(void)
{
    return atomic_load(&cancelled);
}

typedef struct pool {
    pthread_t main;    /* woken (SIGUSR2) as each job ends */
    int n, next, done;
    long long points_done;
    cli_job_fn fn;
    void *ctx;
    cli_job_result *results;
    pthread_mutex_t lock;
    int progress_shown;
} pool;

static pool *the_pool;

void cli_emit(const char *text, size_t len)
{
    pthread_mutex_lock(&out_lock);
    if (the_pool && the_pool->progress_shown) {
        fputs("\r\033[K", stderr);
        the_pool->progress_shown = 0;
    }
    fwrite(text, 1, len, stderr);
    fflush(stderr);
    pthread_mutex_unlock(&out_lock);
}

static void *worker(void *arg)
{
    pool *p = arg;
    for (;;) {
        pthread_mutex_lock(&p->lock);
        int i = p->next < p->n && !cli_cancelled() ? p->next++ : -1;
        pthread_mutex_unlock(&p->lock);
        if (i < 0)
            break;
        p->fn(p->ctx, i, &p->results[i]);
        pthread_mutex_lock(&p->lock);
        p->done++;
        p->points_done += (long long)p->results[i].points;
        pthread_mutex_unlock(&p->lock);
        pthread_kill(p->main, SIGUSR2);   /* the end may be now: no waiting for the next tick */
    }
    return NULL;
}

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static void show_progress(pool *p, double t0)
{
    pthread_mutex_lock(&p->lock);
    int done = p->done, n = p->n;
    long long pts = p->points_done;
    pthread_mutex_unlock(&p->lock);
    double el = now_s() - t0;
    pthread_mutex_lock(&out_lock);
    fprintf(stderr, "\r\033[Khypsolev: %d/%d files, %.0f points/s", done, n, el > 0 ? (double)pts / el : 0.0);
    if (done > 0 && done < n)
        fprintf(stderr, ", about %.0f s left", el / done * (n - done));
    fflush(stderr);
    p->progress_shown = 1;
    pthread_mutex_unlock(&out_lock);
}

static volatile sig_atomic_t caught;

static void on_signal(int sig)
{
    caught = sig;
    atomic_store(&cancelled, 1);
}

/* One worker: run in this thread (no thread-local set-up in the libraries),
 * with a handler that only raises the flag. */
static int run_inline(int n, cli_job_fn fn, void *ctx, cli_job_result *results)
{
    struct sigaction sa, oi, ot;
    memset(&sa, 0, sizeof sa);
    sa.sa_handler = on_signal;
    sigemptyset(&sa.sa_mask);
    sigaction(SIGINT, &sa, &oi);
    sigaction(SIGTERM, &sa, &ot);
    for (int i = 0; i < n && !cli_cancelled(); i++)
        fn(ctx, i, &results[i]);
    sigaction(SIGINT, &oi, NULL);
    sigaction(SIGTERM, &ot, NULL);
    if (caught)
        cli_emit("hypsolev: interrupted: nothing more written\n", 44);
    return caught;
}

int cli_run_jobs(int n, int jobs, int progress, cli_job_fn fn, void *ctx, cli_job_result *results)
{
    if (jobs <= 1 || n == 1)
        return run_inline(n, fn, ctx, results);
    pool p = {.main = pthread_self(), .n = n, .fn = fn, .ctx = ctx, .results = results};
    pthread_mutex_init(&p.lock, NULL);
    the_pool = &p;
    if (jobs < 1)
        jobs = 1;
    if (jobs > n)
        jobs = n;
    /* Signals go to this thread alone, which waits for them between
     * progress updates; the workers never see them. */
    sigset_t set, old;
    sigemptyset(&set);
    sigaddset(&set, SIGINT);
    sigaddset(&set, SIGTERM);
    sigaddset(&set, SIGUSR2);
    pthread_sigmask(SIG_BLOCK, &set, &old);
    pthread_t *th = calloc((size_t)jobs, sizeof *th);
    int started = 0;
    for (int k = 0; th && k < jobs; k++)
        if (pthread_create(&th[k], NULL, worker, &p) == 0)
            started++;
    if (!started)
        worker(&p);   /* no threads to be had: do it here */
    double t0 = now_s();
    int sig = 0;
    while (started) {
        pthread_mutex_lock(&p.lock);
        int finished = p.done == p.n || (cli_cancelled() && p.done + (p.n - p.next) == p.n);
        pthread_mutex_unlock(&p.lock);
        if (finished)
            break;
        struct timespec to = {0, 500 * 1000 * 1000};
        int s = sigtimedwait(&set, NULL, &to);
        if (s == SIGINT || s == SIGTERM) {
            sig = s;
            atomic_store(&cancelled, 1);
            cli_emit("\nhypsolev: interrupted: finishing the files under way without writing them\n", 74);
        } else if (progress && s != SIGUSR2)
            show_progress(&p, t0);
        /* all workers idle and nothing left: done */
        pthread_mutex_lock(&p.lock);
        int idle = p.next >= p.n && p.done >= p.next;
        pthread_mutex_unlock(&p.lock);
        if (idle)
            break;
    }
    for (int k = 0; k < started; k++)
        pthread_join(th[k], NULL);
    /* a wake-up sent after the loop ended is still pending: take it, or it
     * would end the program once unblocked */
    sigset_t wake;
    sigemptyset(&wake);
    sigaddset(&wake, SIGUSR2);
    struct timespec zero = {0, 0};
    while (sigtimedwait(&wake, NULL, &zero) == SIGUSR2)
        ;
    if (progress && !sig)
        show_progress(&p, t0), cli_emit("\n", 1);
    free(th);
    pthread_sigmask(SIG_SETMASK, &old, NULL);
    the_pool = NULL;
    pthread_mutex_destroy(&p.lock);
    return sig;
}
