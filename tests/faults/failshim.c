/* failshim.c - an LD_PRELOAD shim that makes the program fail on purpose:
 *   HYP_FAIL_MALLOC_AT=N     the N-th malloc/calloc/realloc returns NULL
 *   HYP_FAIL_FWRITE_AFTER=B  fwrite, fputs (and their _unlocked forms) fail
 *                            once B bytes have been written
 *   HYP_FAIL_FSYNC=1         fsync and syncfs fail with EIO
 *   HYP_FAIL_COUNT=1         print the number of allocations counted at exit
 * so that tests can check the error paths: a message, exit status 1, the
 * previous output intact, no temporary file left. */
#define _GNU_SOURCE
#include <dlfcn.h>
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

static void *(*real_malloc)(size_t);
static void *(*real_calloc)(size_t, size_t);
static void *(*real_realloc)(void *, size_t);
static size_t (*real_fwrite)(const void *, size_t, size_t, FILE *);
static size_t (*real_fwrite_unlocked)(const void *, size_t, size_t, FILE *);
static int (*real_fputs)(const char *, FILE *);
static int (*real_fputs_unlocked)(const char *, FILE *);
static int (*real_fsync)(int);
static int (*real_syncfs)(int);
static long fail_at = -1, count = 0;
static long long write_after = -1, written = 0;
static int fail_fsync = 0, ready = 0, armed = 0;

/* dlsym itself may call calloc: serve it from a static pool */
static char pool[4096];
static size_t pool_used;

static void report(void)
{
    fprintf(stderr, "allocations: %ld\n", count);
}

static void init(void)
{
    if (ready)
        return;
    ready = -1;
    real_malloc = (void *(*)(size_t))dlsym(RTLD_NEXT, "malloc");
    real_calloc = (void *(*)(size_t, size_t))dlsym(RTLD_NEXT, "calloc");
    real_realloc = (void *(*)(void *, size_t))dlsym(RTLD_NEXT, "realloc");
    real_fwrite = (size_t (*)(const void *, size_t, size_t, FILE *))dlsym(RTLD_NEXT, "fwrite");
    real_fwrite_unlocked = (size_t (*)(const void *, size_t, size_t, FILE *))dlsym(RTLD_NEXT, "fwrite_unlocked");
    real_fputs = (int (*)(const char *, FILE *))dlsym(RTLD_NEXT, "fputs");
    real_fputs_unlocked = (int (*)(const char *, FILE *))dlsym(RTLD_NEXT, "fputs_unlocked");
    real_fsync = (int (*)(int))dlsym(RTLD_NEXT, "fsync");
    real_syncfs = (int (*)(int))dlsym(RTLD_NEXT, "syncfs");
    const char *e = getenv("HYP_FAIL_MALLOC_AT");
    fail_at = e ? atol(e) : -1;
    e = getenv("HYP_FAIL_FWRITE_AFTER");
    write_after = e ? atoll(e) : -1;
    e = getenv("HYP_FAIL_FSYNC");
    fail_fsync = e && *e == '1';
    e = getenv("HYP_FAIL_COUNT");
    if (e && *e == '1')
        atexit(report);
    ready = 1;
}

static int should_fail(void)
{
    if (ready != 1 || !armed)
        return 0;
    ++count;
    return fail_at > 0 && count == fail_at;
}

void *malloc(size_t n)
{
    if (!ready)
        init();
    if (!real_malloc)
        return NULL;
    if (should_fail()) {
        errno = ENOMEM;
        return NULL;
    }
    return real_malloc(n);
}

void *calloc(size_t a, size_t b)
{
    if (ready == -1 || !real_calloc) {   /* during dlsym */
        size_t n = (a * b + 15) & ~(size_t)15;
        if (pool_used + n > sizeof pool)
            return NULL;
        void *p = pool + pool_used;
        pool_used += n;
        memset(p, 0, n);
        return p;
    }
    if (should_fail()) {
        errno = ENOMEM;
        return NULL;
    }
    return real_calloc(a, b);
}

void *realloc(void *p, size_t n)
{
    if (!ready)
        init();
    if (should_fail()) {
        errno = ENOMEM;
        return NULL;
    }
    return real_realloc(p, n);
}

void free(void *p)
{
    static void (*real_free)(void *);
    if ((char *)p >= pool && (char *)p < pool + sizeof pool)
        return;
    if (!real_free)
        real_free = (void (*)(void *))dlsym(RTLD_NEXT, "free");
    real_free(p);
}

/* glibc may define these as macros when optimising */
#undef fwrite_unlocked
#undef fputs_unlocked

/* 1 when a write of n bytes to f is to fail (ENOSPC), counting the rest */
static int write_fails(size_t n, FILE *f)
{
    if (!ready)
        init();
    if (write_after >= 0 && f != stdout && f != stderr) {
        if (written + (long long)n > write_after) {
            errno = ENOSPC;
            return 1;
        }
        written += (long long)n;
    }
    return 0;
}

size_t fwrite(const void *buf, size_t size, size_t n, FILE *f)
{
    return write_fails(size * n, f) ? 0 : real_fwrite(buf, size, n, f);
}

size_t fwrite_unlocked(const void *buf, size_t size, size_t n, FILE *f)
{
    return write_fails(size * n, f) ? 0 : real_fwrite_unlocked(buf, size, n, f);
}

int fputs(const char *str, FILE *f)
{
    return write_fails(strlen(str), f) ? EOF : real_fputs(str, f);
}

int fputs_unlocked(const char *str, FILE *f)
{
    return write_fails(strlen(str), f) ? EOF : real_fputs_unlocked(str, f);
}

int fsync(int fd)
{
    if (!ready)
        init();
    if (fail_fsync) {
        errno = EIO;
        return -1;
    }
    return real_fsync(fd);
}

/* a batch's group commit syncs the file system once (output_set.c) */
int syncfs(int fd)
{
    if (!ready)
        init();
    if (fail_fsync) {
        errno = EIO;
        return -1;
    }
    return real_syncfs(fd);
}

/* Allocations count only from the program's option parsing on, so that
 * failures land in the program and the libraries it calls, not in the
 * start-up of the C library and its dependencies. */
#include <getopt.h>
int getopt_long(int argc, char *const argv[], const char *optstring, const struct option *longopts, int *longindex)
{
    static int (*real)(int, char *const[], const char *, const struct option *, int *);
    if (!real)
        real = (int (*)(int, char *const[], const char *, const struct option *, int *))dlsym(RTLD_NEXT, "getopt_long");
    if (!ready)
        init();
    armed = 1;
    return real(argc, argv, optstring, longopts, longindex);
}
