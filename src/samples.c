/* samples.c - the growable struct-of-arrays sample series. */
#include "hypsolev/samples.h"
#include "rare_values.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* A cap on one series: 50 million samples is about 580 days at 1 s, far
 * beyond any field log; past it the reader refuses instead of eating the
 * machine. */
#define SERIES_MAX_COUNT ((size_t)50000000)

void hyp_series_init(hyp_series *s)
{
    memset(s, 0, sizeof *s);
}

void hyp_series_free(hyp_series *s)
{
    free(s->time_s);
    free(s->pressure_pa);
    free(s->temp_k);
    free(s->rh_pct);
    free(s->lat_e7);
    free(s->lon_e7);
    free(s->ele_m);
    free(s->line_step);
    free(s->line_block);
    free(s->line_far);
    free(s->flag);
    hyp_series_init(s);
}

static int grow(void **p, size_t n, size_t size)
{
    void *q = realloc(*p, n * size);
    if (!q)
        return -1;
    *p = q;
    return 0;
}

static hyp_status series_reserve(hyp_series *s, size_t n)
{
    if (n <= s->alloc)
        return HYP_OK;
    if (n > SERIES_MAX_COUNT)
        return HYP_ERR_NOMEM;
    size_t a = s->alloc ? s->alloc : 1024;
    while (a < n)
        a *= 2;
    if (a > SERIES_MAX_COUNT)
        a = SERIES_MAX_COUNT;
    if (grow((void **)&s->time_s, a, sizeof(double)) ||
        grow((void **)&s->pressure_pa, a, sizeof(float)) ||
        grow((void **)&s->temp_k, a, sizeof(float)) ||
        grow((void **)&s->rh_pct, a, sizeof(float)) ||
        grow((void **)&s->lat_e7, a, sizeof(int32_t)) ||
        grow((void **)&s->lon_e7, a, sizeof(int32_t)) ||
        grow((void **)&s->ele_m, a, sizeof(float)) ||
        grow((void **)&s->line_step, a, 1) ||
        grow((void **)&s->line_block, a / 64 + 1, sizeof(uint32_t)) ||
        grow((void **)&s->flag, a, sizeof(uint8_t)))
        return HYP_ERR_NOMEM;
    s->alloc = a;
    return HYP_OK;
}

/* Records the line of sample i, which follows sample i - 1's. */
static inline int put_line(hyp_series *s, size_t i, uint32_t line)
{
    if (i % 64 == 0) {
        s->line_block[i / 64] = line;
        s->line_step[i] = 0;
    } else if (line >= s->last_line && line - s->last_line < 255) {
        s->line_step[i] = (uint8_t)(line - s->last_line);
    } else {
        if (s->n_line_far == s->line_far_alloc) {
            size_t a = s->line_far_alloc ? 2 * s->line_far_alloc : 64;
            void *p = realloc(s->line_far, a * sizeof *s->line_far);
            if (!p)
                return -1;
            s->line_far = p;
            s->line_far_alloc = a;
        }
        s->line_far[s->n_line_far++] = (struct hyp_line_far){i, line};
        s->line_step[i] = 255;
    }
    s->last_line = line;
    return 0;
}

hyp_status hyp_series_push(hyp_series *s, double time_s, double pressure_pa,
                           double temp_k, double rh_pct, double lat_deg,
                           double lon_deg, double ele_m, uint32_t line,
                           hyp_sample_flag flag)
{
    hyp_status st = series_reserve(s, s->count + 1);
    if (st)
        return st;
    size_t i = s->count++;
    s->time_s[i] = time_s;
    s->pressure_pa[i] = (float)pressure_pa;
    s->temp_k[i] = (float)temp_k;
    s->rh_pct[i] = (float)rh_pct;
    s->lat_e7[i] = hyp_deg_e7(lat_deg);
    s->lon_e7[i] = hyp_deg_e7(lon_deg);
    s->ele_m[i] = (float)ele_m;
    if (put_line(s, i, line)) {
        s->count--;
        return HYP_ERR_NOMEM;
    }
    s->flag[i] = (uint8_t)flag;
    if (temp_k == temp_k)
        s->has_temp = 1;
    if (rh_pct == rh_pct)
        s->has_rh = 1;
    if (s->lat_e7[i] > HYP_BAD_POSITION && s->lon_e7[i] > HYP_BAD_POSITION)
        s->has_position = 1;
    return HYP_OK;
}

int32_t hyp_deg_e7(double deg)
{
    if (deg != deg)
        return HYP_NO_POSITION;
    if (!(fabs(deg) <= 214.0))
        return HYP_BAD_POSITION;
    return (int32_t)lround(deg * 1e7);
}

_Static_assert(offsetof(struct hyp_line_far, index) == 0, "hyp__sparse_find reads the index first");

uint32_t hyp_series_line_next(const hyp_series *s, size_t i, uint32_t prev)
{
    if (i % 64 == 0)
        return s->line_block[i / 64];
    if (s->line_step[i] < 255)
        return prev + s->line_step[i];
    return s->line_far[hyp__sparse_find(s->line_far, s->n_line_far, sizeof *s->line_far, i)].line;
}

uint32_t hyp_series_line(const hyp_series *s, size_t i)
{
    size_t j = i - i % 64;
    uint32_t line = s->line_block[j / 64];
    for (j++; j <= i; j++)
        line = hyp_series_line_next(s, j, line);
    return line;
}

size_t hyp_series_count_flag(const hyp_series *s, hyp_sample_flag f)
{
    size_t n = 0;
    for (size_t i = 0; i < s->count; i++)
        n += s->flag[i] == f;
    return n;
}

const char *hyp_sample_flag_text(hyp_sample_flag f)
{
    switch (f) {
    case HYP_SAMPLE_OK: return "ok";
    case HYP_SAMPLE_NO_TIME: return "no time stamp";
    case HYP_SAMPLE_NO_PRESSURE: return "no pressure";
    case HYP_SAMPLE_PRESSURE_RANGE: return "pressure outside 300-1100 hPa";
    case HYP_SAMPLE_TIME_OUTLIER: return "time far out of line with the samples around it";
    case HYP_SAMPLE_BAD_VALUE: return "pressure not a finite number in any unit's range";
    case HYP_SAMPLE_TIME_DUPLICATE: return "time the same as another sample's";
    case HYP_SAMPLE_FLAG_COUNT: break;
    }
    return "unknown";
}

static void shrink(void **p, size_t n, size_t size)
{
    void *q = realloc(*p, (n ? n : 1) * size);
    if (q)
        *p = q;   /* on failure the larger block stays: still valid */
}

void hyp_series_shrink(hyp_series *s)
{
    if (s->alloc == s->count || !s->time_s)
        return;
    shrink((void **)&s->time_s, s->count, sizeof(double));
    shrink((void **)&s->pressure_pa, s->count, sizeof(float));
    shrink((void **)&s->temp_k, s->count, sizeof(float));
    shrink((void **)&s->rh_pct, s->count, sizeof(float));
    shrink((void **)&s->lat_e7, s->count, sizeof(int32_t));
    shrink((void **)&s->lon_e7, s->count, sizeof(int32_t));
    shrink((void **)&s->ele_m, s->count, sizeof(float));
    shrink((void **)&s->line_step, s->count, 1);
    shrink((void **)&s->line_block, s->count / 64 + 1, sizeof(uint32_t));
    shrink((void **)&s->flag, s->count, sizeof(uint8_t));
    s->alloc = s->count;
}

/* Gathers one array of `size`-byte elements through order: a new array,
 * then the old one freed. */
static int gather(void **p, const uint32_t *order, size_t n, size_t size)
{
    unsigned char *q = malloc(n ? n * size : 1), *old = *p;
    if (!q)
        return -1;
    for (size_t i = 0; i < n; i++)
        memcpy(q + i * size, old + (size_t)order[i] * size, size);
    free(old);
    *p = q;
    return 0;
}

/* The lines are re-encoded in the new order: a sample whose line is not
 * just after its predecessor's takes a line_far entry. */
static hyp_status permute_lines(hyp_series *s, const uint32_t *order)
{
    uint32_t *line = malloc((s->count ? s->count : 1) * sizeof *line);
    if (!line)
        return HYP_ERR_NOMEM;
    uint32_t l = 0;
    for (size_t i = 0; i < s->count; i++)
        line[i] = l = hyp_series_line_next(s, i, l);
    s->n_line_far = 0;
    s->last_line = 0;
    hyp_status st = HYP_OK;
    for (size_t i = 0; i < s->count && !st; i++)
        if (put_line(s, i, line[order[i]]))
            st = HYP_ERR_NOMEM;
    free(line);
    return st;
}

hyp_status hyp_series_permute(hyp_series *s, const uint32_t *order)
{
    size_t n = s->count;
    if (permute_lines(s, order))
        return HYP_ERR_NOMEM;
    if (gather((void **)&s->time_s, order, n, sizeof(double)) ||
        gather((void **)&s->pressure_pa, order, n, sizeof(float)) ||
        gather((void **)&s->temp_k, order, n, sizeof(float)) ||
        gather((void **)&s->rh_pct, order, n, sizeof(float)) ||
        gather((void **)&s->lat_e7, order, n, sizeof(int32_t)) ||
        gather((void **)&s->lon_e7, order, n, sizeof(int32_t)) ||
        gather((void **)&s->ele_m, order, n, sizeof(float)) ||
        gather((void **)&s->flag, order, n, sizeof(uint8_t)))
        return HYP_ERR_NOMEM;
    s->alloc = n;
    return HYP_OK;
}
