/* test_tz_zdump.c - every zone of the system's tz database read by the
 * library against Debian's zdump (package libc-bin, glibc's reading of
 * the same files, footer rules included): local times around each
 * transition zdump lists for 1990-2101 and four mid-month noons a year.
 *
 * Usage: test_tz_zdump SHARD NSHARDS (1-based): the zones (sorted by
 * name) whose index is SHARD-1 modulo NSHARDS. zdump's own scan takes
 * about 40 ms a zone, so CTest runs the zones in shards side by side.
 * Exit status 77 (a skip for CTest) when zdump or the database is absent. */
#define _DEFAULT_SOURCE
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>
#include <dirent.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include "hypsolev/timeparse.h"

#define ZONEINFO "/usr/share/zoneinfo"
/* what hyp_zone_parse accepts in a zone name */
#define NAME_CHARS "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789/_+-"
#define WINDOW_S (26 * 3600)   /* offsets stay within +-26 h (RFC 8536 section 3.2) */

/* What zdump says of one zone: the offset at the start of 1990 (zdump -i)
 * and each change of offset after it (zdump -v lines, UT and gmtoff). */
typedef struct zone_ref {
    char name[64];
    int has_init;
    int32_t init_off_s;
    size_t n, cap;
    int64_t *at_s;      /* UTC instant of a change */
    int32_t *off_s;     /* offset from then on (s east) */
    int32_t last_s;     /* offset of the last line read */
} zone_ref;

typedef struct run {
    int shard, nshards;
    zone_ref *z;
    size_t nz;
    long checks, overlaps, gaps, bad;
    long odd_names;     /* TZif files whose names the library refuses */
} run;

static int is_tzif(const char *path)
{
    char magic[4] = {0};
    FILE *f = fopen(path, "rb");
    if (!f)
        return 0;
    size_t n = fread(magic, 1, 4, f);
    fclose(f);
    return n == 4 && memcmp(magic, "TZif", 4) == 0;
}

/* Names of the TZif files under dir, relative to the database root.
 * right/ (leap-second times) and posix/ (the same files again) are left
 * out, and so are symbolic links: another name for a zone listed anyway. */
static void walk(const char *root, const char *rel, char ***names, size_t *n, size_t *cap)
{
    char path[1024];
    snprintf(path, sizeof path, "%s%s%s", root, *rel ? "/" : "", rel);
    DIR *d = opendir(path);
    if (!d)
        return;
    struct dirent *e;
    while ((e = readdir(d)) != NULL) {
        if (e->d_name[0] == '.' || (!*rel && (!strcmp(e->d_name, "right") || !strcmp(e->d_name, "posix"))))
            continue;
        char sub[512], full[1536];
        snprintf(sub, sizeof sub, "%s%s%s", rel, *rel ? "/" : "", e->d_name);
        snprintf(full, sizeof full, "%s/%s", root, sub);
        struct stat st;
        if (lstat(full, &st) != 0)
            continue;
        if (S_ISDIR(st.st_mode)) {
            walk(root, sub, names, n, cap);
        } else if (S_ISREG(st.st_mode) && is_tzif(full)) {
            if (*n == *cap) {
                *cap = *cap ? 2 * *cap : 512;
                *names = realloc(*names, *cap * sizeof **names);
                assert_non_null(*names);
            }
            (*names)[(*n)++] = strdup(sub);
        }
    }
    closedir(d);
}

static int cmp_str(const void *a, const void *b)
{
    return strcmp(*(char *const *)a, *(char *const *)b);
}

static int cmp_ref(const void *a, const void *b)
{
    return strcmp(((const zone_ref *)a)->name, ((const zone_ref *)b)->name);
}

static zone_ref *find_ref(run *r, const char *name)
{
    zone_ref key;
    snprintf(key.name, sizeof key.name, "%s", name);
    return bsearch(&key, r->z, r->nz, sizeof *r->z, cmp_ref);
}

/* "+09", "-0330", "+054500": zdump -i's offsets. */
static int parse_i_offset(const char *s, int32_t *off_s)
{
    int sign = *s == '-' ? -1 : 1, v[3] = {0, 0, 0}, k = 0;
    if (*s != '+' && *s != '-')
        return 0;
    for (s++; k < 3 && s[0] >= '0' && s[0] <= '9' && s[1] >= '0' && s[1] <= '9'; s += 2, k++)
        v[k] = (s[0] - '0') * 10 + (s[1] - '0');
    *off_s = sign * (v[0] * 3600 + v[1] * 60 + v[2]);
    return k > 0;
}

/* One line of zdump -v: "NAME  Sun Mar 25 01:00:00 1990 UT = ... gmtoff=7200". */
static int parse_v_line(const char *line, char *name, int64_t *ut_s, int32_t *off_s)
{
    static const char months[] = "JanFebMarAprMayJunJulAugSepOctNovDec";
    char mon[4];
    struct tm tm;
    memset(&tm, 0, sizeof tm);
    const char *g = strstr(line, " gmtoff=");
    if (!strstr(line, " UT = ") || !g ||
        sscanf(line, "%63s %*3s %3s %d %d:%d:%d %d UT", name, mon, &tm.tm_mday, &tm.tm_hour, &tm.tm_min,
               &tm.tm_sec, &tm.tm_year) != 7)
        return 0;
    const char *m = strstr(months, mon);
    if (!m || (m - months) % 3)
        return 0;
    tm.tm_mon = (int)(m - months) / 3;
    tm.tm_year -= 1900;
    *ut_s = (int64_t)timegm(&tm);   /* glibc, not the library's calendar */
    *off_s = (int32_t)atol(g + 8);
    return 1;
}

static void add_change(zone_ref *z, int64_t at_s, int32_t off_s)
{
    if (z->n == z->cap) {
        z->cap = z->cap ? 2 * z->cap : 64;
        z->at_s = realloc(z->at_s, z->cap * sizeof *z->at_s);
        z->off_s = realloc(z->off_s, z->cap * sizeof *z->off_s);
        assert_true(z->at_s && z->off_s);
    }
    z->at_s[z->n] = at_s;
    z->off_s[z->n++] = off_s;
}

/* Runs zdump (`args` then every zone name of the shard) and hands each
 * output line to `line`. */
static void zdump_each(run *r, const char *args, void (*line)(run *, const char *, zone_ref **))
{
    size_t len = strlen(HYP_ZDUMP) + strlen(args) + 16;
    for (size_t i = 0; i < r->nz; i++)
        len += strlen(r->z[i].name) + 3;
    char *cmd = malloc(len);
    assert_non_null(cmd);
    size_t at = (size_t)snprintf(cmd, len, "'%s' %s", HYP_ZDUMP, args);
    for (size_t i = 0; i < r->nz; i++)   /* names hold only NAME_CHARS */
        at += (size_t)snprintf(cmd + at, len - at, " '%s'", r->z[i].name);
    FILE *p = popen(cmd, "r");
    assert_non_null(p);
    char buf[512];
    zone_ref *cur = NULL;
    while (fgets(buf, sizeof buf, p))
        line(r, buf, &cur);
    assert_int_equal(pclose(p), 0);
    free(cmd);
}

/* zdump -i: a line TZ="NAME", then "-<TAB>-<TAB>OFFSET..." for the start. */
static void on_i_line(run *r, const char *buf, zone_ref **cur)
{
    if (strncmp(buf, "TZ=\"", 4) == 0) {
        char name[64];
        const char *q = strchr(buf + 4, '"');
        size_t n = q ? (size_t)(q - buf - 4) : 0;
        snprintf(name, sizeof name, "%.*s", (int)(n < 63 ? n : 63), buf + 4);
        *cur = find_ref(r, name);
    } else if (*cur && strncmp(buf, "-\t-\t", 4) == 0) {
        (*cur)->has_init = parse_i_offset(buf + 4, &(*cur)->init_off_s);
        (*cur)->last_s = (*cur)->init_off_s;
    }
}

/* zdump -v: each line whose gmtoff differs from the one before is a change. */
static void on_v_line(run *r, const char *buf, zone_ref **cur)
{
    char name[64];
    int64_t ut_s;
    int32_t off_s;
    (void)cur;
    if (!parse_v_line(buf, name, &ut_s, &off_s))
        return;
    zone_ref *z = find_ref(r, name);
    assert_non_null(z);
    if (off_s != z->last_s)
        add_change(z, ut_s, off_s);
    z->last_s = off_s;
}

/* How many of zdump's changes are at or before UTC instant u. */
static size_t changes_upto(const zone_ref *z, int64_t u)
{
    size_t lo = 0, hi = z->n;
    while (lo < hi) {
        size_t mid = lo + (hi - lo) / 2;
        if (z->at_s[mid] <= u)
            lo = mid + 1;
        else
            hi = mid;
    }
    return lo;
}

/* zdump's offset at UTC instant u. */
static int32_t ref_at(const zone_ref *z, int64_t u)
{
    size_t k = changes_upto(z, u);
    return k ? z->off_s[k - 1] : z->init_off_s;
}

/* The UTC instant the library should give for local time L by zdump's
 * table and the documented choice (timeparse.h): of the offsets in force
 * within 26 h of L, those that map back to L are valid, and the largest
 * (the earliest instant) is taken; with none valid L is in a gap and is
 * read with the offset in force before it. kind: 0 one reading, 1 an
 * overlap, 2 a gap. */
static int64_t expected_utc(const zone_ref *z, int64_t L, int *kind)
{
    size_t k0 = changes_upto(z, L - WINDOW_S), k1 = changes_upto(z, L + WINDOW_S);
    int nvalid = 0;
    int32_t best = 0;
    *kind = 0;
    for (size_t k = k0; k <= k1; k++) {   /* k0: the offset before the window */
        int32_t o = k ? z->off_s[k - 1] : z->init_off_s;
        if (ref_at(z, L - o) == o) {
            if (nvalid && o != best)
                *kind = 1;
            if (!nvalid || o > best)
                best = o;
            nvalid = 1;
        }
    }
    if (nvalid)
        return L - best;
    *kind = 2;
    for (size_t k = k0; k < k1; k++) {
        int32_t before = k ? z->off_s[k - 1] : z->init_off_s;
        if (z->at_s[k] + before <= L && L < z->at_s[k] + z->off_s[k])
            return L - before;
    }
    fail_msg("%s: local %lld neither valid nor in a gap by zdump", z->name, (long long)L);
    return 0;
}

static void check_local(run *r, const zone_ref *z, const hyp_zone *hz, int64_t L)
{
    /* only local times whose candidates all lie inside zdump's window */
    if (L < 631152000 + 2 * WINDOW_S || L > 4133980800 - 2 * WINDOW_S)   /* 1990-01-01, 2101-01-01 */
        return;
    int kind;
    int64_t want = expected_utc(z, L, &kind);
    time_t lt = (time_t)L;
    struct tm tm;
    char stamp[40], got_s[40], want_s[40];
    gmtime_r(&lt, &tm);   /* glibc's calendar for the wall-clock text */
    strftime(stamp, sizeof stamp, "%Y-%m-%dT%H:%M:%S", &tm);
    double t = 0.0;
    hyp_time_result res = hyp_time_parse(stamp, hz, &t);
    r->checks++;
    r->overlaps += kind == 1;
    r->gaps += kind == 2;
    if (res == HYP_TIME_OK && t == (double)want)
        return;
    if (r->bad++ < 25) {
        hyp_time_format(t, got_s, sizeof got_s);
        hyp_time_format((double)want, want_s, sizeof want_s);
        print_message("%s: local %s read as %s (status %d); zdump: %s (%s, offset %+d s)\n", z->name, stamp,
                      got_s, (int)res, want_s, kind == 1 ? "overlap" : kind == 2 ? "gap" : "unambiguous",
                      (int)(L - want));
    }
}

static void check_zone(run *r, const zone_ref *z)
{
    hyp_zone hz;
    hyp_error err;
    hyp_zone_init(&hz);
    if (hyp_zone_parse(&hz, z->name, ZONEINFO, &err) != HYP_OK || !z->has_init) {
        r->bad++;
        print_message("%s: %s\n", z->name, z->has_init ? err.message : "no initial offset from zdump -i");
        hyp_zone_free(&hz);
        return;
    }
    /* around each change: just before, at, inside and just after the
     * stretch of local time it skips or repeats */
    for (size_t k = 0; k < z->n; k++) {
        int32_t a = k ? z->off_s[k - 1] : z->init_off_s, b = z->off_s[k];
        int64_t lo = z->at_s[k] + (a < b ? a : b), hi = z->at_s[k] + (a < b ? b : a);
        const int64_t pts[5] = {lo - 1, lo, lo + (hi - lo) / 2, hi - 1, hi};
        for (int i = 0; i < 5; i++)
            check_local(r, z, &hz, pts[i]);
    }
    /* noon on the 15th of January, April, July and October, 1990-2100 */
    for (int y = 1990; y <= 2100; y++)
        for (int mon = 0; mon < 12; mon += 3) {
            struct tm tm = {.tm_year = y - 1900, .tm_mon = mon, .tm_mday = 15, .tm_hour = 12};
            check_local(r, z, &hz, (int64_t)timegm(&tm));
        }
    hyp_zone_free(&hz);
}

static void test_zones_match_zdump(void **state)
{
    run *r = *state;
    zdump_each(r, "-i -c 1990,1991", on_i_line);
    zdump_each(r, "-v -c 1990,2101", on_v_line);
    for (size_t i = 0; i < r->nz; i++)
        check_zone(r, &r->z[i]);
    print_message("shard %d/%d: %zu zones, %ld local times (%ld in overlaps, %ld in gaps), %ld disagree\n",
                  r->shard, r->nshards, r->nz, r->checks, r->overlaps, r->gaps, r->bad);
    assert_true(r->checks > 0);
    assert_int_equal(r->bad, 0);
    assert_int_equal(r->odd_names, 0);
}

int main(int argc, char **argv)
{
    run r = {.shard = 1, .nshards = 1};
    if (argc == 3) {
        r.shard = atoi(argv[1]);
        r.nshards = atoi(argv[2]);
    }
    if (r.nshards < 1 || r.shard < 1 || r.shard > r.nshards) {
        fprintf(stderr, "usage: test_tz_zdump [SHARD NSHARDS]\n");
        return 2;
    }
    if (access(HYP_ZDUMP, X_OK) != 0) {
        printf("skipped: zdump not found (\"%s\"; Debian package libc-bin)\n", HYP_ZDUMP);
        return 77;
    }
    char **names = NULL;
    size_t n = 0, cap = 0;
    walk(ZONEINFO, "", &names, &n, &cap);
    if (n == 0) {
        printf("skipped: no TZif files under " ZONEINFO " (Debian package tzdata)\n");
        return 77;
    }
    qsort(names, n, sizeof *names, cmp_str);
    r.z = calloc(n, sizeof *r.z);
    for (size_t i = 0; i < n; i++) {
        if ((int)(i % (size_t)r.nshards) != r.shard - 1) {
        } else if (strlen(names[i]) > 60 || strspn(names[i], NAME_CHARS) != strlen(names[i])) {
            printf("%s: a name the library refuses (over 60 characters, or not of %s)\n", names[i], NAME_CHARS);
            r.odd_names++;
        } else {
            snprintf(r.z[r.nz++].name, sizeof r.z->name, "%s", names[i]);
        }
        free(names[i]);
    }
    free(names);
    const struct CMUnitTest tests[] = {
        cmocka_unit_test_prestate(test_zones_match_zdump, &r),
    };
    int rc = cmocka_run_group_tests(tests, NULL, NULL);
    for (size_t i = 0; i < r.nz; i++) {
        free(r.z[i].at_s);
        free(r.z[i].off_s);
    }
    free(r.z);
    return rc;
}
