/* signals.c - SIGINT, SIGTERM and SIGHUP turned into an orderly stop (the
 * library polls the flag and renames nothing into place after it), and
 * the progress line on stderr. */
#define _POSIX_C_SOURCE 200809L
#include "cli.h"

#include <signal.h>
#include <string.h>
#include <time.h>

static volatile sig_atomic_t caught;
static int progress_shown, told;
static double t0_s;

static void on_signal(int sig)
{
    caught = sig;
}

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static void catch_with(int flags)
{
    struct sigaction sa;
    memset(&sa, 0, sizeof sa);
    sa.sa_handler = on_signal;
    sa.sa_flags = flags;
    sigemptyset(&sa.sa_mask);
    sigaction(SIGINT, &sa, NULL);
    sigaction(SIGTERM, &sa, NULL);
    sigaction(SIGHUP, &sa, NULL);
    t0_s = now_s();
}

void cli_signals_catch(void)
{
    catch_with(SA_RESTART);   /* reads and writes under way go on */
}

void cli_signals_catch_reads(void)
{
    catch_with(0);
}

int cli_signal(void)
{
    return caught;
}

int cli_cancelled_cb(void *ctx)
{
    (void)ctx;
    return caught != 0;
}

/* Called from one thread at a time by the library (its done and progress
 * callbacks never overlap the emit of a rover). */
void cli_emit(const char *text, size_t len)
{
    if (progress_shown) {
        fputs("\r\033[K", stderr);
        progress_shown = 0;
    }
    fwrite(text, 1, len, stderr);
    fflush(stderr);
}

void cli_progress_quiet(void *ctx, size_t done, size_t n, double points)
{
    (void)ctx, (void)done, (void)n, (void)points;
    if (caught && !told) {
        told = 1;
        fputs("hypsolev: interrupted: finishing the files under way without writing them\n", stderr);
    }
}

void cli_progress(void *ctx, size_t done, size_t n, double points)
{
    cli_progress_quiet(ctx, done, n, points);
    if (caught)
        return;
    double el = now_s() - t0_s;
    fprintf(stderr, "\r\033[Khypsolev: %zu/%zu files, %.0f points/s", done, n, el > 0 ? points / el : 0.0);
    if (done > 0 && done < n)
        fprintf(stderr, ", about %.0f s left", el / (double)done * (double)(n - done));
    if (done == n)
        fputc('\n', stderr);
    fflush(stderr);
    progress_shown = done < n;
}
