/* adjust_bench.c - benchmark (not a test) of the adjustment engine on a
 * season-sized levelling network: N unknowns, M observations (default 2000
 * and 20000), a control mark at every 50th station, random pairs of nearby
 * stations. Prints the time of each phase of one adjustment (it includes
 * the engine's source to reach its static phases), of a whole solve, of a
 * solve with data snooping that rejects one planted blunder (CPU times,
 * single thread), and the peak memory. Build and run from the top of the tree:
 *   cc -O2 -D_DEFAULT_SOURCE -Iinclude -Isrc -o /tmp/adjust_bench bench/adjust_bench.c \
 *      src/distrib.c src/error.c -llapacke -lm && /tmp/adjust_bench [N M] */
#include "../src/adjust_engine.c"

#include "bench_util.h"

#include <sys/resource.h>
#include <time.h>

static double uniform(void)   /* in (0, 1): never 0, for log() */
{
    return ((double)bench_bits53() + 0.5) / BENCH_TWO_POW_53;
}

static double normal(void)
{
    return sqrt(-2.0 * log(uniform())) * cos(6.283185307179586 * uniform());
}

/* Fills m observations over n stations (terms: 2 per observation). */
static void make_network(size_t n, size_t m, hyp__adj_term *terms, hyp__adj_obs *obs)
{
    size_t n_ctl = n / 50 + 1, reach = 10;
    for (size_t i = 0; i < m; i++) {
        hyp__adj_term *t = &terms[2 * i];
        obs[i].terms = t;
        obs[i].active = 1;
        obs[i].sigma = 0.001 + 0.004 * uniform();
        if (i < n_ctl) {
            t[0] = (hyp__adj_term){(i * 50) % n, 1.0};
            obs[i].n_terms = 1;
        } else {
            size_t k = i - n_ctl;
            size_t a = k < n - 1 ? k : (size_t)(uniform() * (double)(n - reach));
            size_t b = k < n - 1 ? k + 1 : a + 1 + (size_t)(uniform() * (double)reach);
            t[0] = (hyp__adj_term){a, -1.0};
            t[1] = (hyp__adj_term){b, 1.0};
            obs[i].n_terms = 2;
        }
        obs[i].value = obs[i].sigma * normal();   /* true heights all 0 */
    }
}

static void phases(const hyp__adj_problem *pb)
{
    hyp__adj_opts o;
    hyp__adj_opts_default(&o);
    hyp__adj_result res;
    hyp__adj_result_init(&res);
    hyp_error err;
    work ws;
    if (work_alloc(&ws, pb->n_unknowns, o.max_work_bytes, &err) ||
        result_alloc(&res, pb->n_unknowns, pb->n_obs)) {
        fprintf(stderr, "out of memory\n");
        exit(1);
    }
    for (size_t i = 0; i < pb->n_obs; i++)
        res.flag[i] = HYP_ADJ_USED;
    double t0 = bench_now_s();
    check_datum(pb, res.flag, &ws, &err);
    double t1 = bench_now_s();
    build_normal(pb, res.flag, &ws);
    double t2 = bench_now_s();
    if (factor_solve(pb, &o, &ws, &res, &err)) {
        fprintf(stderr, "%s\n", err.message);
        exit(1);
    }
    double t3 = bench_now_s();
    invert(&ws, &err);
    double t4 = bench_now_s();
    obs_stats(pb, &o, &ws, &res);
    double t5 = bench_now_s();
    printf("phases: datum check %.3f s, normal matrix %.3f s, scale + dpotrf + dpocon + dpotrs %.3f s, "
           "dpotri %.3f s, residuals/redundancy/w %.3f s\n", t1 - t0, t2 - t1, t3 - t2, t4 - t3, t5 - t4);
    work_free(&ws);
    hyp__adj_result_free(&res);
}

static double timed_solve(const hyp__adj_problem *pb, int snoop_on, hyp__adj_result *res)
{
    hyp__adj_opts o;
    hyp__adj_opts_default(&o);
    o.snoop = snoop_on;
    hyp_error err;
    double t0 = bench_now_s();
    if (hyp__adj_solve(pb, &o, res, &err)) {
        fprintf(stderr, "%s\n", err.message);
        exit(1);
    }
    return bench_now_s() - t0;
}

int main(int argc, char **argv)
{
    size_t n = argc > 2 ? strtoul(argv[1], NULL, 10) : 2000, m = argc > 2 ? strtoul(argv[2], NULL, 10) : 20000;
    hyp__adj_term *terms = malloc(2 * m * sizeof *terms);
    hyp__adj_obs *obs = calloc(m, sizeof *obs);
    if (!terms || !obs || n < 60 || m < 2 * n)
        return 1;
    make_network(n, m, terms, obs);
    hyp__adj_problem pb = {n, NULL, m, obs};
    printf("network: %zu unknowns, %zu observations; normal matrix %.1f MiB\n", n, m,
           (double)n * (double)n * 8.0 / 1048576.0);
    phases(&pb);
    hyp__adj_result res;
    hyp__adj_result_init(&res);
    double t_one = timed_solve(&pb, 0, &res);
    printf("one adjustment: %.3f s (s0^2 %.3f, dof %zu, rcond %.1e)\n", t_one, res.s0_sq, res.dof, res.rcond);
    obs[m / 2].value += 20.0 * obs[m / 2].sigma;    /* one 20-sigma blunder */
    double t_snoop = timed_solve(&pb, 1, &res);
    printf("with snooping: %.3f s, %zu adjustments, %zu rejected (observation %zu; planted at %zu)\n", t_snoop,
           res.n_adjustments, res.n_rejections, res.n_rejections ? res.rejections[0].obs : 0, m / 2);
    struct rusage ru;
    getrusage(RUSAGE_SELF, &ru);
    printf("peak RSS: %.1f MiB\n", (double)ru.ru_maxrss / 1024.0);
    hyp__adj_result_free(&res);
    free(terms);
    free(obs);
    return 0;
}
