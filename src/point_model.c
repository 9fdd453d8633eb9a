/* point_model.c - one rover sample's height: its inputs from the bases
 * (interpolated base pressure, temperature, humidity, tendency; the upper
 * base or the pressure field for those methods), the hypsometric height
 * above the base, its sensitivity to pressure, and the corrected point
 * with its error budget. */
#include "correct_int.h"
#include "base_view.h"
#include "hypsolev/atmosphere.h"

#include <math.h>

static double pick(double a, double b, double c)
{
    return a == a ? a : b == b ? b : c;
}

/* Centred moving average of the rover pressure over smooth_s around sample
 * i: the valid samples within smooth_s / 2 either side, both ends
 * inclusive (white noise falls as 1/sqrt(samples averaged); a height
 * change faster than the window is smoothed with it). */
static double rover_pressure(const hyp__work *w, size_t i, double *navg)
{
    const hyp_series *rv = w->rv;
    double half = 0.5 * w->o->smooth_s, p = rv->pressure_pa[i];
    *navg = 1.0;
    if (half <= 0)
        return p;
    double t = rv->time_s[i], sum = p;
    size_t cnt = 1;
    for (size_t j = i; j-- > 0;) {
        if (rv->flag[j])
            continue;
        if (rv->time_s[j] < t - half)
            break;
        sum += rv->pressure_pa[j], cnt++;
    }
    for (size_t j = i + 1; j < w->n; j++) {
        if (rv->flag[j])
            continue;
        if (rv->time_s[j] > t + half)
            break;
        sum += rv->pressure_pa[j], cnt++;
    }
    *navg = (double)cnt;
    return sum / (double)cnt;
}

hyp_point_status hyp__inputs_chi2(const hyp__work *w, size_t i, hyp__in *in, double *chi2)
{
    const hyp_series *rv = w->rv;
    if (rv->flag[i])
        return HYP_PT_REFUSED;
    size_t k = in->hint;
    double f;
    const hyp__base_view *b = &w->bv;
    hyp_point_status st = hyp__base_bracket(b, rv->time_s[i], w->o->max_gap_s, &k, &f);
    if (st)
        return st;
    in->hint = k;
    in->pb = b->p[k] + f * (b->p[k + 1] - b->p[k]);
    in->rate = b->rate[k] + f * (b->rate[k + 1] - b->rate[k]);
    in->dt_base = b->t[k + 1] - b->t[k];
    double rhb = hyp__base_lerp(b->rh, k, f);
    in->tb = hyp__base_lerp(b->temp, k, f);
    in->rhr = pick(rv->rh_pct[i], rhb, w->o->default_rh_pct);
    in->rhb = pick(rhb, rv->rh_pct[i], w->o->default_rh_pct);
    in->pr = rover_pressure(w, i, &in->navg);
    in->pu = in->xfrac = NAN;
    if (w->method == HYP_METHOD_FIELD)
        return hyp__field_inputs(w, i, in, chi2);
    if (w->method == HYP_METHOD_TWO_BASE) {
        /* the upper base's pressure, the rover's place in the bracket, and
         * the extrapolation limit */
        const hyp__base_view *u = &w->bvs[w->upper];
        if ((st = hyp__base_at(u, u->p, rv->time_s[i], w->o->max_gap_s, &in->pu)))
            return st;
        double dh = w->bases[w->upper].height_m - w->bases[w->ref].height_m;
        double lim = fmax(w->o->extrapolate_min_m, w->o->extrapolate_frac * dh) / dh;
        in->xfrac = log(in->pb / in->pr) / log(in->pb / in->pu);
        if (in->xfrac < -lim || in->xfrac > 1.0 + lim)
            return HYP_PT_EXTRAPOLATION;
    }
    return HYP_PT_OK;
}

hyp_point_status hyp__inputs(const hyp__work *w, size_t i, hyp__in *in)
{
    return hyp__inputs_chi2(w, i, in, NULL);
}

double hyp__lat(const hyp__work *w, size_t i)
{
    return pick(hyp_series_lat(w->rv, i), w->base->lat_deg, 45.0);
}

/* The rover-end temperature depends on the height (base + lapse), so
 * fixed-point steps; each changes dz by about lapse * dz / T (< 3 %), and
 * they stop when a step moves dz by less than 10 micrometres (at most 12;
 * typically three to five). The pressure ratio's logarithm and the
 * latitude's gravity are the same in every step, so evaluated once. */
double hyp__height_above_base(const hyp__work *w, size_t i, const hyp__in *in, double pr, double *tv_out)
{
    const hyp_correct_opts *o = w->o;
    double pb = in->pb;
    if (w->method == HYP_METHOD_TWO_BASE) {
        /* h = hL + (hU - hL) ln(pL/p) / ln(pL/pU): the two-base proportion
         * in log-pressure (the hypsometric equation with the column
         * temperature the two bases imply). */
        double pu = in->pu, dh = w->bases[w->upper].height_m - w->bases[w->ref].height_m;
        double l = log(pb / pu);
        if (!(pb > 0 && pu > 0 && pr > 0) || fabs(l) < 1e-9)
            return NAN;
        double g = hyp_gravity_at_height_m_s2(hyp__lat(w, i), w->base->height_m + 0.5 * dh);
        *tv_out = g * dh / (HYP_RD_J_KG_K * l);
        return dh * log(pb / pr) / l;
    }
    double tb = in->tb, tr = w->rv->temp_k[i];
    hyp_gravity gr = hyp_gravity_at_lat(hyp__lat(w, i));
    if (!(pb > 0 && pr > 0))
        return NAN;
    double lnp = log(pb / pr);   /* hyp_hypsometric_dphi_j_kg: Rd Tv ln(p1/p2) */
    double dz = 0.0, tv = NAN;
    if (tb != tb) {
        /* No base thermometer: the rover's carried down with the lapse
         * rate, or the standard atmosphere at the base (USSA 1976). */
        double dz0 = (pb - pr) / 12.0;   /* ~12 Pa per m: first guess only */
        tb = tr == tr ? tr - o->lapse_k_per_m * dz0
                      : hyp_isa_temperature_k(hyp_geopotential_from_geometric_m(w->base->height_m));
    }
    double tvb = hyp_virtual_temperature_k(tb, in->rhb, pb);
    for (int it = 0; it < 12; it++) {
        double t_top = tb + o->lapse_k_per_m * dz;
        if (o->tcol == HYP_TCOL_ROVER && tr == tr)
            t_top = tr;
        else if (o->tcol == HYP_TCOL_BOTH && tr == tr)
            t_top = 0.5 * (t_top + tr);
        double tvr = hyp_virtual_temperature_k(t_top, in->rhr, pr);
        tv = hyp_layer_mean_temperature_k(tvb, tvr);
        double next = tv > 0 ? hyp_height_difference_g_m(HYP_RD_J_KG_K * tv * lnp, w->base->height_m, &gr) : NAN;
        if (next != next) {
            dz = NAN;
            break;
        }
        int done = it > 0 && fabs(next - dz) < 1e-5;
        dz = next;
        if (done)
            break;
    }
    *tv_out = tv;
    return dz;
}

/* dh/dp = Rd Tv / (g p) (differentiating the hypsometric equation), with
 * g at the middle of the column of height difference dz. */
static double sensitivity(const hyp__work *w, size_t i, double pr, double dz, double tv)
{
    return HYP_RD_J_KG_K * tv / (hyp_gravity_at_height_m_s2(hyp__lat(w, i), w->base->height_m + 0.5 * dz) * pr);
}

double hyp__raw_height(const hyp__work *w, size_t i, const hyp__in *in, double *sens, double *tv)
{
    double dz = hyp__height_above_base(w, i, in, in->pr, tv);
    if (dz != dz)
        return NAN;
    *sens = sensitivity(w, i, in->pr, dz, *tv);
    return w->base->height_m + dz;
}

/* The corrected point i into d; dz_out gets the height above the base
 * before GNSS levelling. The sensitivity for the budget is that of the
 * corrected column at the rover pressure used. HYP_PT_NO_CONVERGE when the
 * iteration fails. */
hyp_point_status hyp__corrected_point(const hyp__work *w, size_t i, const hyp__in *in, double *dz_out,
                                        hyp_point_detail *d)
{
    const hyp_drift *dr = &w->r->drift;
    double off = hyp__drift_offset(dr, w->rv->time_s[i], NULL), tv;
    double dz = hyp__height_above_base(w, i, in, in->pr - off, &tv);
    if (dz != dz)
        return HYP_PT_NO_CONVERGE;
    double c = sensitivity(w, i, in->pr, dz, tv);
    dz *= 1.0 + dr->scale;
    *dz_out = dz;
    if (dr->kind == HYP_DRIFT_GNSS)
        dz += dr->gnss_a_m + dr->gnss_b_m_per_s * (w->rv->time_s[i] - dr->gnss_t0_s);
    d->height_m = w->base->height_m + dz;
    d->base_p_pa = in->pb;
    d->offset_pa = off;
    d->tcol_k = tv * (1.0 + dr->scale);
    d->sens_m_per_pa = c;
    hyp__in bin = *in;
    if (w->method == HYP_METHOD_TWO_BASE)   /* the place in the bracket from the corrected height */
        bin.xfrac = *dz_out / (w->bases[w->upper].height_m - w->bases[w->ref].height_m);
    d->sigma_m = hyp__budget(w, i, &bin, dz, c, d->tcol_k, d->budget_m);
    return HYP_PT_OK;
}

