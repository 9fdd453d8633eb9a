/* svg_ticks.c - axis ticks for the SVG drawing layer: nice numbers for
 * value axes, round times in UTC for time axes (see svg.h). */
#include "svg.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "hypsolev/timeparse.h"

/* A value within a millionth of a step of a tick counts as on it, so that
 * rounding in v / step (about 1e-7 of a step for indices near 1e9) never
 * adds a tick for data that ends on one (common practice, no source). */
#define EPS_INDEX 1e-6
/* Spans below this fraction of the values' magnitude are widened to it:
 * labels then need at most about 10 significant digits, which doubles
 * carry with room to spare (common practice, no source). */
#define MIN_REL_SPAN 1e-8
/* First and last second of the years 1 and 9999 (proleptic Gregorian). */
#define TIME_MIN_S (-62135596800.0)
#define TIME_MAX_S 253402300799.0

static double step_of(int mant, int e)
{
    return e < 0 ? mant / hyp__svg_pow10(-e) : mant * hyp__svg_pow10(e);
}

/* v / (mant 10^e), with one rounding for the power where it is exact */
static double index_of(const hyp__ticks *t, double v)
{
    if (t->time_utc)
        return v / t->step;
    return t->exp10 < 0 ? v * hyp__svg_pow10(-t->exp10) / t->mant : v / (t->mant * hyp__svg_pow10(t->exp10));
}

/* First tick at or below lo, last at or above hi. */
static void place_loose(hyp__ticks *t, double lo, double hi)
{
    double k_lo = floor(index_of(t, lo) + EPS_INDEX), k_hi = ceil(index_of(t, hi) - EPS_INDEX);
    if (k_hi < k_lo)
        k_hi = k_lo;
    t->k_first = k_lo;
    double c = k_hi - k_lo + 1;
    t->count = c > 1e6 ? 1000000 : (int)c;
}

void hyp__ticks_inside(hyp__ticks *t, double lo, double hi)
{
    double k_lo = ceil(index_of(t, lo) - EPS_INDEX), k_hi = floor(index_of(t, hi) + EPS_INDEX);
    t->k_first = k_lo;
    double c = k_hi - k_lo + 1;
    t->count = c < 0 ? 0 : c > 1e6 ? 1000000 : (int)c;
}

/* P. S. Heckbert, "Nice numbers for graph labels", Graphics Gems, 1990:
 * the number 1, 2, 5 or 10 x 10^k near x, either rounded (cuts at 1.5, 3
 * and 7) or the smallest not below x. */
static void nice_num(double x, int round, int *mant, int *exp10)
{
    int e = (int)floor(log10(x));
    double f = e < 0 ? x * hyp__svg_pow10(-e) : x / hyp__svg_pow10(e);
    if (f >= 10.0)   /* log10 of a power of ten may come out just below it */
        f /= 10.0, e++;
    else if (f < 1.0)
        f *= 10.0, e--;
    int nf;
    if (round)
        nf = f < 1.5 ? 1 : f < 3.0 ? 2 : f < 7.0 ? 5 : 10;
    else
        nf = f <= 1.0 ? 1 : f <= 2.0 ? 2 : f <= 5.0 ? 5 : 10;
    if (nf == 10)
        nf = 1, e++;
    *mant = nf;
    *exp10 = e;
}

/* The next nice step up (1 -> 2 -> 5 -> 10) or down. */
static void ladder(int *mant, int *e, int up)
{
    if (up && *mant == 5) {
        *mant = 1;
        ++*e;
    } else if (up) {
        *mant = *mant == 1 ? 2 : 5;
    } else if (*mant == 1) {
        *mant = 5;
        --*e;
    } else {
        *mant = *mant == 5 ? 2 : 1;
    }
}

static void set_step(hyp__ticks *t, int mant, int e, double lo, double hi)
{
    t->mant = mant;
    t->exp10 = e;
    t->step = step_of(mant, e);
    place_loose(t, lo, hi);
}

/* With steps a factor 2 to 2.5 apart, Heckbert's count strays past
 * target +- 2 for some spans once the target passes 6 (a simulation over
 * random spans showed 4..12 ticks for a target of 8): then the step of the
 * five around it whose count is nearest the target is taken, the coarser
 * on a tie. */
static void nearest_count(hyp__ticks *t, double lo, double hi, int target)
{
    int m = t->mant, e = t->exp10;
    ladder(&m, &e, 0);
    ladder(&m, &e, 0);
    hyp__ticks best = *t, cand = *t;
    for (int k = 0; k < 5; k++, ladder(&m, &e, 1)) {
        set_step(&cand, m, e, lo, hi);
        if (abs(cand.count - target) <= abs(best.count - target))
            best = cand;
    }
    *t = best;
}

/* A zero span is opened to +-1 % of the value's order of magnitude (+-1
 * around 0); a vanishing one to MIN_REL_SPAN of the magnitude (common
 * practice, no source). */
static void widen(double *lo, double *hi)
{
    double mag = fmax(fabs(*lo), fabs(*hi)), span = *hi - *lo;
    if (span > 0 && span >= mag * MIN_REL_SPAN)
        return;
    double c = *lo / 2 + *hi / 2, half;
    if (span > 0)
        half = mag * MIN_REL_SPAN / 2;
    else
        half = c == 0 ? 1.0 : hyp__svg_pow10((int)floor(log10(fabs(c))) - 2);
    *lo = c - half;
    *hi = c + half;
}

static hyp_status check_range(double lo, double hi, int target, hyp_error *err)
{
    if (!isfinite(lo) || !isfinite(hi) || !isfinite(hi - lo))
        return hyp_error_set(err, HYP_ERR_VALUE, "axis range: a bound is not a finite number, or the span is too large");
    if (lo > hi)
        return hyp_error_set(err, HYP_ERR_USAGE, "axis range: the low end %.17g is above the high end %.17g", lo, hi);
    if (target < 2 || target > 12)
        return hyp_error_set(err, HYP_ERR_USAGE, "axis ticks: target count %d; expected 2 to 12", target);
    return HYP_OK;
}

hyp_status hyp__ticks_nice(double lo, double hi, int target, hyp__ticks *t, hyp_error *err)
{
    hyp_status st = check_range(lo, hi, target, err);
    if (st)
        return st;
    widen(&lo, &hi);
    memset(t, 0, sizeof *t);
    int rm, re, m, e;
    nice_num(hi - lo, 0, &rm, &re);                       /* range = nicenum(max - min, false) */
    nice_num(step_of(rm, re) / (target - 1), 1, &m, &e);  /* d = nicenum(range / (nticks - 1), true) */
    set_step(t, m, e, lo, hi);                            /* graphmin/max = floor/ceil(min/max / d) d */
    if (abs(t->count - target) > 2)
        nearest_count(t, lo, hi, target);
    t->decimals = t->exp10 < 0 ? -t->exp10 : 0;           /* nfrac = max(-floor(log10 d), 0) */
    double big = fmax(fabs(hyp__ticks_value(t, 0)), fabs(hyp__ticks_value(t, t->count - 1)));
    t->sci = t->decimals > 9 || big >= 1e15;
    return HYP_OK;
}

/* Round steps of a time axis: seconds, minutes and hours that divide the
 * next unit, then 1, 2, 5 x 10^k days. */
static double time_step_s(int k)
{
    static const double s[] = {1,    2,    5,    10,   15,   30,    60,    120,   300,
                               600,  900,  1800, 3600, 7200, 10800, 21600, 43200};
    int n = (int)(sizeof s / sizeof s[0]);
    if (k < n)
        return s[k];
    k -= n;
    static const int m[3] = {1, 2, 5};
    return 86400.0 * m[k % 3] * hyp__svg_pow10(k / 3);
}

hyp_status hyp__ticks_time(double t0_s, double t1_s, int target, hyp__ticks *t, hyp_error *err)
{
    hyp_status st = check_range(t0_s, t1_s, target, err);
    if (st)
        return st;
    if (t0_s < TIME_MIN_S || t1_s > TIME_MAX_S)
        return hyp_error_set(err, HYP_ERR_VALUE, "time axis: the range is outside the years 1 to 9999");
    if (t1_s - t0_s < 5.0) {   /* a zero or sub-second span: 5 s at least (common practice, no source) */
        double c = t0_s / 2 + t1_s / 2, half = t1_s > t0_s ? 2.5 : 300.0;
        t0_s = c - half, t1_s = c + half;
    }
    hyp__ticks best, cand;
    memset(&best, 0, sizeof best);
    for (int k = 0; k < 17 + 3 * 7; k++) {
        memset(&cand, 0, sizeof cand);
        cand.time_utc = 1;
        cand.step = time_step_s(k);
        place_loose(&cand, t0_s, t1_s);
        if (k == 0 || abs(cand.count - target) <= abs(best.count - target))
            best = cand;
    }
    *t = best;
    return HYP_OK;
}

double hyp__ticks_value(const hyp__ticks *t, int i)
{
    double k = t->k_first + i;
    if (t->time_utc)
        return k * t->step;
    double km = k * t->mant;   /* an integer, exact below 2^53 */
    return t->exp10 < 0 ? km / hyp__svg_pow10(-t->exp10) : km * hyp__svg_pow10(t->exp10);
}

static void copy_part(char *dst, size_t cap, const char *src, size_t n)
{
    n = n < cap - 1 ? n : cap - 1;
    memcpy(dst, src, n);
    dst[n] = '\0';
}

static void time_label(const hyp__ticks *t, int i, char label[HYP__SVG_NUM_MAX], char date[16])
{
    double v = hyp__ticks_value(t, i);
    char iso[48];
    hyp_time_format(v, iso, sizeof iso);   /* YYYY-MM-DDTHH:MM:SSZ */
    const char *tpos = strchr(iso, 'T');
    if (!tpos)
        return;
    size_t date_len = (size_t)(tpos - iso);
    if (t->step >= 86400.0) {
        copy_part(label, HYP__SVG_NUM_MAX, iso, date_len);
        return;
    }
    copy_part(label, HYP__SVG_NUM_MAX, tpos + 1, t->step < 60.0 ? 8 : 5);   /* HH:MM:SS or HH:MM */
    if (i == 0 || floor(v / 86400.0) != floor(hyp__ticks_value(t, i - 1) / 86400.0))
        copy_part(date, 16, iso, date_len);
}

void hyp__ticks_label(const hyp__ticks *t, int i, char label[HYP__SVG_NUM_MAX], char date[16])
{
    label[0] = '\0';
    date[0] = '\0';
    if (t->time_utc) {
        time_label(t, i, label, date);
        return;
    }
    double v = hyp__ticks_value(t, i);
    if (!t->sci) {
        hyp__svg_fmt(label, v, t->decimals, 0);
        return;
    }
    /* enough mantissa digits to resolve the step at this value's exponent */
    int ev = v == 0 ? t->exp10 : (int)floor(log10(fabs(v)));
    hyp__svg_fmt_sci(label, v, ev - t->exp10);
}
