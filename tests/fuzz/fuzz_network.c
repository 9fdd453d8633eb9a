/* fuzz_network.c - libFuzzer harness for the network adjustment's own
 * inputs: the stations file and the field book. The input is split at its
 * first line "----": before it the stations (hyp_stations_read), after it
 * the field book (hyp_fieldbook_read against those stations, stamps
 * without a zone read as +01:00). When both read and are small, the
 * network is run on them with two tiny synthetic rovers written once to a
 * scratch folder: "ra" (06:30-08:30 UTC on 2026-09-15, a base covers it
 * until 07:30) and "rb" (09:00-10:00, no base: read raw, a loop), both
 * standing at 46.95 N 10.40 E, so that the engine sees fuzzed stations and
 * occupations (book rover names "ra", "rb" or empty). */
#include "fuzz_common.h"
#include "hypsolev/hypsolev.h"

#include <ctype.h>
#include <dirent.h>
#include <errno.h>
#include <signal.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>

static char dir[64];
static const uint8_t *in_data;   /* the current input, for has_nan_inf */
static size_t in_size;

/* Whether text holds "nan" or "inf" as a word (a computed NaN or infinity
 * printed). */
static int word_in(const char *t, size_t n, const char *w)
{
    size_t k = strlen(w);
    for (size_t i = 0; i + k <= n; i++)
        if (strncasecmp(t + i, w, k) == 0 && (i == 0 || !isalnum((unsigned char)t[i - 1])) &&
            (i + k == n || !isalpha((unsigned char)t[i + k])))
            return 1;
    return 0;
}

/* Whether the input holds w anywhere, any case (a message may quote a
 * field cut short, so that "inff" shows as a word "inf"). */
static int has_sub(const uint8_t *d, size_t n, const char *w)
{
    size_t k = strlen(w);
    for (size_t i = 0; i + k <= n; i++)
        if (strncasecmp((const char *)d + i, w, k) == 0)
            return 1;
    return 0;
}

static void check_text(const char *t)
{
    if (!t)
        return;
    static const char *const w[2] = {"nan", "inf"};
    for (int k = 0; k < 2; k++)
        if (word_in(t, strlen(t), w[k]) && !has_sub(in_data, in_size, w[k])) {
            fprintf(stderr, "fuzz_network: \"%s\" shown to a user:\n%s\n", w[k], t);
            abort();
        }
}

static void check_msgs(const hyp_msgs *m)
{
    for (size_t i = 0; i < m->count; i++)
        check_text(m->items[i].text);
}
static char path_ra[128], path_rb[128], path_base[128];

/* A rover or base CSV at a constant position, every 60 s from t0 to t1
 * (s after 2026-09-15T00:00:00Z), pressure near 930 hPa with a slow wave. */
static int write_log(const char *path, int t0, int t1, double hpa)
{
    FILE *f = fopen(path, "w");
    if (!f)
        return -1;
    fputs("time,pressure [hPa],temperature [degC],humidity [%],lat,lon\n", f);
    for (int t = t0; t <= t1; t += 60)
        fprintf(f, "2026-09-15T%02d:%02d:%02dZ,%.3f,12.0,60,46.9500000,10.4000000\n", t / 3600, t / 60 % 60, t % 60,
                hpa + 0.05 * ((t / 60) % 7));
    return fclose(f);
}

/* Removes the scratch folder of process pid (its three logs). */
static void remove_dir(long pid)
{
    static const char *const f[3] = {"ra.csv", "rb.csv", "base.csv"};
    char p[128];
    for (int k = 0; k < 3; k++) {
        snprintf(p, sizeof p, "/tmp/fuzz-network-%ld/%s", pid, f[k]);
        unlink(p);
    }
    snprintf(p, sizeof p, "/tmp/fuzz-network-%ld", pid);
    rmdir(p);
}

static void remove_own_dir(void)
{
    remove_dir((long)getpid());
}

/* The scratch folder is /tmp/fuzz-network-PID, removed at exit; those of
 * processes gone without exiting (killed, crashed) are removed here. */
static int setup(void)
{
    static int done = 0, ok = 0;
    if (done)
        return ok;
    done = 1;
    DIR *d = opendir("/tmp");
    struct dirent *e;
    while (d && (e = readdir(d))) {
        char *end;
        long pid = strncmp(e->d_name, "fuzz-network-", 13) == 0 ? strtol(e->d_name + 13, &end, 10) : 0;
        if (pid > 0 && !*end && kill((pid_t)pid, 0) != 0 && errno == ESRCH)
            remove_dir(pid);
    }
    if (d)
        closedir(d);
    snprintf(dir, sizeof dir, "/tmp/fuzz-network-%ld", (long)getpid());
    if (mkdir(dir, 0700) != 0)
        return 0;
    atexit(remove_own_dir);
    snprintf(path_ra, sizeof path_ra, "%s/ra.csv", dir);
    snprintf(path_rb, sizeof path_rb, "%s/rb.csv", dir);
    snprintf(path_base, sizeof path_base, "%s/base.csv", dir);
    ok = write_log(path_ra, 6 * 3600 + 1800, 8 * 3600 + 1800, 930.0) == 0 &&
         write_log(path_rb, 9 * 3600, 10 * 3600, 929.0) == 0 &&
         write_log(path_base, 6 * 3600, 7 * 3600 + 1800, 935.0) == 0;
    return ok;
}

static void run_network(const char *stations, const char *book)
{
    if (!setup())
        return;
    hyp_survey_opts so;
    hyp_survey_opts_init(&so);
    so.rover_time_zone = "+01:00";
    so.threads = 1;
    so.check_bases = 0;
    hyp_survey *sv = NULL;
    hyp_msgs m;
    hyp_msgs_init(&m);
    hyp_error err;
    if (hyp_survey_new(&sv, &so, &m, &err) == HYP_OK) {
        hyp_base_spec b;
        hyp_base_spec_init(&b, path_base, 640.0);
        if (hyp_survey_add_base(sv, &b, &m, &err) == HYP_OK) {
            hyp_network_opts no;
            hyp_network_opts_init(&no);
            no.stations_path = stations;
            no.fieldbook_path = book;
            const char *rovers[2] = {path_ra, path_rb};
            hyp_network_result *res = NULL;
            if (hyp_network_run(sv, &no, rovers, 2, &res, &err) != HYP_OK)
                check_text(err.message);
            if (res) {
                check_msgs(&res->msgs);
                char *buf = NULL;
                size_t len = 0;
                FILE *f = open_memstream(&buf, &len);
                if (f) {
                    hyp_network_write_text(f, res);
                    fclose(f);
                    check_text(buf);
                    free(buf);
                }
                hyp_network_result_free(res);
            }
        }
    }
    hyp_survey_free(sv);
    hyp_msgs_free(&m);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    /* the first line "----" (with or without \r) splits the input */
    size_t a_len = size, b_off = size;
    for (size_t i = 0; i + 4 <= size; i++) {
        if ((i == 0 || data[i - 1] == '\n') && memcmp(data + i, "----", 4) == 0) {
            size_t j = i + 4;
            if (j < size && data[j] == '\r')
                j++;
            if (j == size || data[j] == '\n') {
                a_len = i;
                b_off = j < size ? j + 1 : size;
                break;
            }
        }
    }
    char pa[64], pb[64];
    int fa = fuzz_file(data, a_len, pa, sizeof pa);
    if (fa < 0)
        return 0;
    int fb = fuzz_file(data + b_off, size - b_off, pb, sizeof pb);
    if (fb < 0) {
        close(fa);
        return 0;
    }
    hyp_benchmarks st;
    hyp_benchmarks_init(&st);
    hyp_msgs m;
    hyp_msgs_init(&m);
    hyp_error err;
    in_data = data;
    in_size = size;
    if (hyp_stations_read(pa, 0.02, &st, &m, &err) != HYP_OK) {
        check_text(err.message);
    } else {
        hyp_zone z;
        hyp_zone_init(&z);
        hyp_zone_parse(&z, "+01:00", NULL, &err);
        hyp_book_entry *e = NULL;
        size_t n = 0;
        hyp_status s = hyp_fieldbook_read(pb, &z, &st, &e, &n, &err);
        if (s != HYP_OK)
            check_text(err.message);
        free(e);
        hyp_zone_free(&z);
        if (s == HYP_OK && st.count <= 40 && n <= 40)
            run_network(pa, pb);
    }
    check_msgs(&m);
    hyp_benchmarks_free(&st);
    hyp_msgs_free(&m);
    close(fa);
    close(fb);
    return 0;
}
