/* baro_altitude.c - a track that stored barometric altitudes instead of
 * pressures: the altitudes' quantisation, and the recorder's re-settings
 * found, sized and joined (docs/methods.md, "Barometric-altitude tracks"). */
#include "baro_altitude.h"
#include "hypsolev/atmosphere.h"
#include "hypsolev/timeparse.h"

#include <math.h>
#include <stdlib.h>

/* The lowest and highest sea-level pressures recorded: 870 hPa (typhoon
 * Tip, 1979) and 1083.8 hPa (Agata, Siberia, 1968), WMO World Weather and
 * Climate Extremes Archive, from memory. A recorder's reference set from
 * a real sea-level pressure lies between them. */
#define REF_LO_PA 87000.0
#define REF_HI_PA 108380.0

#define FIT_N 5   /* samples on each side of a step for its size */

/* A step the GNSS heights make too, within this, is motion (a cable car),
 * not a re-setting: twice a GNSS height's error of about 10 m between two
 * fixes (common practice, no source). */
#define GNSS_STEP_M 20.0

static double alt_of(const hyp_series *s, size_t i)
{
    return hyp_baro_altitude_from_pressure_m(s->pressure_pa[i], HYP_P0_PA);
}

/* The coarsest step q (m) all altitudes are multiples of, within 2 mm (the
 * float pressure carries about 1 mm); 0 when none of the usual steps. */
static double find_quant(const hyp_series *s)
{
    static const double q[] = {10.0, 5.0, 2.0, 1.0, 0.5, 0.2, 0.1, 0.05, 0.02, 0.01};
    for (size_t k = 0; k < sizeof q / sizeof q[0]; k++) {
        size_t n = 0, bad = 0;
        for (size_t i = 0; i < s->count; i++)
            if (!s->flag[i]) {
                double a = alt_of(s, i) / q[k];
                n++;
                if (fabs(a - nearbyint(a)) * q[k] > 0.002) {
                    bad = 1;
                    break;
                }
            }
        if (n >= 10 && bad == 0)
            return q[k];
    }
    return 0.0;
}

/* Pa per metre of altitude at altitude a_m (the standard atmosphere's
 * density times g0: the derivative of the altimeter law). */
static double pa_per_m(double a_m)
{
    return hyp_baro_altitude_to_pressure_pa(a_m - 0.5, HYP_P0_PA) - hyp_baro_altitude_to_pressure_pa(a_m + 0.5, HYP_P0_PA);
}

/* Least-squares line through the usable samples idx[0..n-1] (altitudes
 * against time), evaluated at t: value and its 1-sigma, the scatter
 * floored by the quantisation. One sample: its value, and the motion a
 * walker may make over dt_s unseen (0.5 m/s, common practice, no source). */
static double side_at(const hyp_series *s, const size_t *idx, size_t n, double t, double q, double dt_s, double *sig)
{
    double st = 0, sa = 0;
    for (size_t k = 0; k < n; k++)
        st += s->time_s[idx[k]], sa += alt_of(s, idx[k]);
    st /= (double)n, sa /= (double)n;
    double stt = 0, sta = 0;
    for (size_t k = 0; k < n; k++) {
        double dt = s->time_s[idx[k]] - st;
        stt += dt * dt, sta += dt * (alt_of(s, idx[k]) - sa);
    }
    double slope = n >= 3 && stt > 0 ? sta / stt : 0.0, ss = 0;
    for (size_t k = 0; k < n; k++) {
        double e = alt_of(s, idx[k]) - (sa + slope * (s->time_s[idx[k]] - st));
        ss += e * e;
    }
    double var = n >= 3 ? ss / (double)(n - 2) : 0.0;
    var = fmax(var, q * q / 12.0);
    /* the line's variance at t (Draper and Smith, Applied Regression
     * Analysis, 3rd ed., eq. 1.4.5): s^2 (1/n + (t - mean)^2 / Sxx) */
    double v = var * (1.0 / (double)n + (n >= 3 && stt > 0 ? (t - st) * (t - st) / stt : 0.0));
    if (n < 3)
        v += 0.25 * (0.5 * dt_s) * (0.5 * dt_s);
    *sig = sqrt(v);
    return sa + slope * (t - st);
}

/* Usable samples from i going in direction dir (+1, -1), at most FIT_N,
 * not past `stop` (a neighbouring step's sample, or SIZE_MAX). */
static size_t gather(const hyp_series *s, size_t i, int dir, size_t stop, size_t *idx)
{
    size_t n = 0;
    for (size_t j = i; n < FIT_N && j < s->count && j != stop; j = dir > 0 ? j + 1 : j - 1) {
        if (!s->flag[j])
            idx[n++] = j;
        if (j == 0 && dir < 0)
            break;
    }
    return n;
}

static hyp_status refuse(const hyp_series *s, const char *path, size_t i, double a0, double a1, const char *why,
                         hyp_error *err)
{
    char t[32];
    hyp_time_format(s->time_s[i], t, sizeof t);
    return hyp_error_set(err, HYP_ERR_VALUE,
                         "%s:%u: barometric altitude steps from %.1f m to %.1f m at %s: %s", path,
                         (unsigned)hyp_series_line(s, i), a0, a1, t, why);
}

/* Finds the steps: sample i (usable) whose altitude differs from the
 * usable sample before by more than the vertical speed bound allows over
 * their interval, beyond twice the quantisation and 1 m, unless both
 * samples have GNSS heights that moved as much (GNSS_STEP_M). */
static hyp_status find_steps(const hyp_series *s, const char *path, hyp__baro *b, size_t *at, hyp_error *err)
{
    size_t prev = SIZE_MAX;
    for (size_t i = 0; i < s->count; i++) {
        if (s->flag[i])
            continue;
        if (prev != SIZE_MAX) {
            double dt = s->time_s[i] - s->time_s[prev];
            double a0 = alt_of(s, prev), a1 = alt_of(s, i);
            double g0 = s->ele_m[prev], g1 = s->ele_m[i];   /* GNSS heights (NaN: none) */
            int moved = g0 == g0 && g1 == g1 && fabs((a1 - a0) - (g1 - g0)) <= GNSS_STEP_M + 2.0 * b->quant_m;
            if (fabs(a1 - a0) > HYP__BARO_VMAX_M_S * dt + 2.0 * b->quant_m + 1.0 && !moved) {
                if (b->n_steps == HYP__BARO_MAX_STEPS)
                    return refuse(s, path, i, a0, a1,
                                  "more than 64 re-settings (steps faster than 5 m/s); expected a barometric altitude track "
                                  "re-set now and then (is --baro-altitude the right field?)", err);
                at[b->n_steps] = i;
                b->steps[b->n_steps].prev_time_s = s->time_s[prev];
                b->steps[b->n_steps++].time_s = s->time_s[i];
            }
        }
        prev = i;
    }
    return HYP_OK;
}

/* The altitudes' step and its noise in Pa, said in a note. */
static void set_quant(const hyp_series *s, hyp__baro *b, const char *path, hyp_msgs *msgs)
{
    b->quant_m = find_quant(s);
    double amean = 0.0;
    size_t nu = 0;
    for (size_t i = 0; i < s->count; i++)
        if (!s->flag[i])
            amean += alt_of(s, i), nu++;
    amean = nu ? amean / (double)nu : 0.0;
    /* uniform quantisation noise q / sqrt(12) (Widrow and Kollar,
     * Quantization Noise, Cambridge UP 2008, ch. 4), in Pa at the mean
     * altitude */
    b->quant_pa = b->quant_m / sqrt(12.0) * pa_per_m(amean);
    if (b->quant_m > 0)
        hyp_msgs_add_at(msgs, HYP_NOTE, "sample", path, 0,
                        "barometric altitudes come in steps of %g m: quantisation noise %.2f m (%.2f Pa) enters the noise budget",
                        b->quant_m, b->quant_m / sqrt(12.0), b->quant_pa);
}

/* Step k (at sample at[k]): its size from lines fitted on each side, at
 * the middle of the interval, and the ratio of references that joins
 * them (p = isa(a) ref / P0 is continuous across it). */
static void size_step(const hyp_series *s, hyp__baro *b, const size_t *at, size_t k, double *a0, double *a1)
{
    hyp_baro_step *p = &b->steps[k];
    size_t ib[FIT_N], ia[FIT_N];
    size_t prev = at[k] - 1;
    while (s->flag[prev])
        prev--;
    size_t nb = gather(s, prev, -1, k ? at[k - 1] - 1 : SIZE_MAX, ib);
    size_t na = gather(s, at[k], +1, k + 1 < b->n_steps ? at[k + 1] : SIZE_MAX, ia);
    double tm = 0.5 * (p->time_s + p->prev_time_s), dt = p->time_s - p->prev_time_s, sb, sa;
    *a0 = side_at(s, ib, nb, tm, b->quant_m, dt, &sb);
    *a1 = side_at(s, ia, na, tm, b->quant_m, dt, &sa);
    p->size_m = *a1 - *a0;
    p->sigma_m = hypot(sb, sa);
    p->line = hyp_series_line(s, at[k]);
    double p0 = hyp_baro_altitude_to_pressure_pa(*a0, HYP_P0_PA), p1 = hyp_baro_altitude_to_pressure_pa(*a1, HYP_P0_PA);
    p->ratio = p0 / p1;
    p->sigma_rel = p->sigma_m * pa_per_m(*a1) / p1;
}

hyp_status hyp__baro_join(hyp_series *s, const char *path, hyp__baro *b, hyp_msgs *msgs, hyp_error *err)
{
    b->n_steps = 0;
    b->ref_pa = NAN;
    set_quant(s, b, path, msgs);
    size_t at[HYP__BARO_MAX_STEPS];
    hyp_status st = find_steps(s, path, b, at, err);
    if (st)
        return st;
    double cum = 1.0, lo = 1.0, hi = 1.0;
    for (size_t k = 0; k < b->n_steps; k++) {
        double a0, a1;
        size_step(s, b, at, k, &a0, &a1);
        const hyp_baro_step *p = &b->steps[k];
        if (!(p->ratio == p->ratio))
            return refuse(s, path, at[k], a0, a1, "expected altitudes of -500..9000 m on both sides", err);
        cum *= p->ratio;
        lo = fmin(lo, cum), hi = fmax(hi, cum);
        if (hi / lo > REF_HI_PA / REF_LO_PA)
            return refuse(s, path, at[k], a0, a1,
                          "a re-setting that large needs references further apart than the lowest and highest sea-level "
                          "pressures recorded (870 and 1083.8 hPa); expected a step a re-setting can make, or a track "
                          "whose altitudes are continuous", err);
        char t[32];
        hyp_time_format(p->time_s, t, sizeof t);
        hyp_msgs_add_at(msgs, HYP_NOTE, "sample", path, p->line,
                        "barometric altitude re-set at %s: a step of %+.1f m (+-%.2f m) not matched by the motion; "
                        "the later altitudes are joined to the earlier ones",
                        t, p->size_m, p->sigma_m);
    }
    /* rescale each segment by the product of the ratios before it */
    cum = 1.0;
    for (size_t i = 0, k = 0; i < s->count; i++) {
        while (k < b->n_steps && i == at[k])
            cum *= b->steps[k++].ratio;
        if (cum != 1.0 && s->pressure_pa[i] == s->pressure_pa[i])
            s->pressure_pa[i] = (float)(s->pressure_pa[i] * cum);
    }
    return HYP_OK;
}

double hyp__baro_join_var(const hyp_baro_step *st, size_t n, double t_s, double ref_s)
{
    double lo = fmin(t_s, ref_s), hi = fmax(t_s, ref_s), v = 0.0;
    for (size_t k = 0; k < n; k++)
        if (st[k].time_s > lo && st[k].time_s <= hi)
            v += st[k].sigma_rel * st[k].sigma_rel;
    return v;
}

void hyp__baro_rescale(hyp_series *s, const hyp_correct_result *res, hyp__baro *b, const char *path, hyp_msgs *msgs)
{
    double sum = 0.0;
    size_t n = 0;
    hyp_point_detail d;
    /* at most about 4000 points: the offset model is smooth, and each
     * point's details are recomputed with its whole budget */
    size_t stride = s->count / 4000 + 1;
    for (size_t i = 0; i < s->count; i += stride)
        if (res->status[i] == HYP_PT_OK && hyp_correct_point(res, i, &d) == HYP_OK && d.offset_pa == d.offset_pa) {
            sum += d.offset_pa / s->pressure_pa[i];
            n++;
        }
    if (!n)
        return;
    double f = 1.0 - sum / (double)n;
    if (!(f > 0.5 && f < 1.5))
        return;
    for (size_t i = 0; i < s->count; i++)
        if (s->pressure_pa[i] == s->pressure_pa[i])
            s->pressure_pa[i] = (float)(s->pressure_pa[i] * f);
    b->ref_pa = HYP_P0_PA * f;
    hyp_msgs_add_at(msgs, HYP_NOTE, "sample", path, 0,
                    "barometric altitudes: the recorder's reference%s was %.2f hPa (from the calibrated offset); "
                    "the pressures are rescaled by it before the correction",
                    b->n_steps ? " before its first re-setting" : "", b->ref_pa / 100.0);
}
