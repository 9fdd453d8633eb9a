/* multibase.c - corrections against several bases: comparing the bases'
 * instruments, choosing the method, the two-base proportion's inputs, and a
 * horizontal pressure field from three or more bases. */
#include "correct_int.h"
#include "hypsolev/atmosphere.h"
#include "hypsolev/geo.h"
#include "svd_solve.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Offsets of bases 1.. relative to base 0 from a window in which the
 * loggers stood side by side: mean of p_k - p_0 at base 0's sample times. */
static void compare_bases(hyp__work *w)
{
    hyp_correct_result *r = w->r;
    const hyp_window *cw = &w->o->base_colocate;
    int have_window = cw->start_s == cw->start_s && cw->end_s > cw->start_s;
    int all_known = 1;
    for (size_t k = 0; k < w->nb; k++) {
        const hyp_base *b = &w->bases[k];
        r->base_offset_pa[k] = b->offset_pa == b->offset_pa ? b->offset_pa : 0.0;
        r->base_offset_sigma_pa[k] = b->offset_pa == b->offset_pa ? b->offset_sigma_pa : NAN;
        if (k > 0 && b->offset_pa != b->offset_pa)
            all_known = 0;
    }
    r->base_offset_sigma_pa[0] = w->bases[0].offset_pa == w->bases[0].offset_pa ? w->bases[0].offset_sigma_pa : 0.0;
    if (have_window) {
        const hyp__base_view *b0 = &w->bvs[0];
        for (size_t k = 1; k < w->nb; k++) {
            if (w->bases[k].offset_pa == w->bases[k].offset_pa)
                continue;
            double s = 0, ss = 0;
            size_t n = 0;
            for (size_t i = 0; i < b0->n; i++) {
                double pk;
                if (b0->t[i] < cw->start_s || b0->t[i] > cw->end_s ||
                    hyp__base_at(&w->bvs[k], w->bvs[k].p, b0->t[i], w->o->max_gap_s, &pk))
                    continue;
                double d = pk - b0->p[i];
                s += d, ss += d * d, n++;
            }
            if (n < 3) {
                hyp_msgs_add_at(w->msgs, HYP_WARNING, "method", w->bases[k].name, 0, "fewer than 3 samples in the bases' co-location window; not compared");
                continue;
            }
            double mean = s / (double)n, sd = sqrt(fmax(0.0, (ss - s * s / (double)n) / (double)(n - 1)));
            for (size_t i = 0; i < w->bvs[k].n; i++)
                w->bvs[k].p[i] -= mean;
            r->base_offset_pa[k] = mean;
            r->base_offset_sigma_pa[k] = sd / sqrt((double)n);
        }
        all_known = 1;
        for (size_t k = 1; k < w->nb; k++)
            all_known &= r->base_offset_sigma_pa[k] == r->base_offset_sigma_pa[k];
    }
    r->bases_compared = all_known;
    if (!all_known) {
        for (size_t k = 1; k < w->nb; k++)
            if (r->base_offset_sigma_pa[k] != r->base_offset_sigma_pa[k])
                r->base_offset_sigma_pa[k] = w->o->uncal_offset_sigma_pa;
        hyp_msgs_add(w->msgs, HYP_WARNING,
                     "the bases were never compared (no --bases-colocated window and no --base-offset): with two bases the upper one's offset is estimated from what the survey observes (a note says from what), else each base's instrument offset (1-sigma %.0f Pa, common practice) goes into the heights",
                     w->o->uncal_offset_sigma_pa);
    }
    for (size_t k = 0; k < w->nb; k++)
        if (w->bases[k].kind == HYP_BASE_QNH)
            r->base_offset_sigma_pa[k] = hypot(r->base_offset_sigma_pa[k] == r->base_offset_sigma_pa[k] ? r->base_offset_sigma_pa[k] : 0.0,
                                               w->o->qnh_sigma_pa);
}

/* Fraction of rover pressures between the two bases' at the same times. */
static double bracketed_fraction(const hyp__work *w, size_t lo, size_t hi)
{
    size_t in = 0, n = 0;
    for (size_t i = 0; i < w->n; i += 1 + w->n / 2000) {
        double pl, pu, t = w->rv->time_s[i], p = w->rv->pressure_pa[i];
        if (w->rv->flag[i] || hyp__base_at(&w->bvs[lo], w->bvs[lo].p, t, 1e9, &pl) ||
            hyp__base_at(&w->bvs[hi], w->bvs[hi].p, t, 1e9, &pu))
            continue;
        n++;
        in += p <= pl + 50.0 && p >= pu - 50.0;   /* within about 4 m */
    }
    return n ? (double)in / (double)n : 0.0;
}

static hyp_status choose(hyp__work *w, hyp_error *err)
{
    hyp_correct_result *r = w->r;
    hyp_method m = w->o->method;
    size_t lo = 0, hi = 0;
    for (size_t k = 0; k < w->nb; k++) {
        if (w->bases[k].height_m < w->bases[lo].height_m) lo = k;
        if (w->bases[k].height_m > w->bases[hi].height_m) hi = k;
    }
    double span = w->bases[hi].height_m - w->bases[lo].height_m;
    if (m == HYP_METHOD_AUTO) {
        if (w->nb >= 3) {
            m = HYP_METHOD_FIELD;
            snprintf(r->method_why, sizeof r->method_why, "%zu bases: a pressure field interpolated to the rover", w->nb);
        } else if (span >= 50.0 && bracketed_fraction(w, lo, hi) >= 0.5) {
            m = HYP_METHOD_TWO_BASE;
            snprintf(r->method_why, sizeof r->method_why,
                     "two bases %.0f m apart bracketing most of the track: two-base proportion", span);
        } else {
            m = HYP_METHOD_SINGLE;
            snprintf(r->method_why, sizeof r->method_why,
                     "two bases that do not bracket the track (%.0f m apart): single base on %s", span, w->bases[0].name);
        }
    } else
        snprintf(r->method_why, sizeof r->method_why, "%s (--method)", hyp_method_name(m));
    if (m == HYP_METHOD_TWO_BASE && (w->nb != 2 || span < 10.0))
        return hyp_error_set(err, HYP_ERR_USAGE, "the two-base method needs exactly two bases at different heights (%zu given, %.0f m apart)",
                             w->nb, span);
    if (m == HYP_METHOD_FIELD && w->nb < 2)
        return hyp_error_set(err, HYP_ERR_USAGE, "the field method needs two or more bases");
    w->method = m;
    if (m == HYP_METHOD_TWO_BASE) {
        w->ref = lo;
        w->upper = hi;
    }
    return HYP_OK;
}

static hyp_status setup_field(hyp__work *w, hyp_error *err)
{
    double h = 0, la = 0, lo = 0;
    for (size_t k = 0; k < w->nb; k++) {
        const hyp_base *b = &w->bases[k];
        if (b->lat_deg != b->lat_deg)
            return hyp_error_set(err, HYP_ERR_USAGE, "%s: the field method needs every base's position (--base-at)", b->name);
        h += b->height_m, la += b->lat_deg, lo += b->lon_deg;
    }
    hyp_base_init(&w->virt, w->bases[0].log, "field", h / (double)w->nb);
    w->virt.lat_deg = la / (double)w->nb;
    w->virt.lon_deg = lo / (double)w->nb;
    /* alignment (temperature, tendency, sampling) from the base nearest the
     * centroid; the pressure is replaced by the field's */
    size_t best = 0;
    double bd = INFINITY;
    for (size_t k = 0; k < w->nb; k++) {
        double d = hyp_geo_distance_m(w->virt.lat_deg, w->virt.lon_deg, w->bases[k].lat_deg, w->bases[k].lon_deg);
        if (d < bd)
            bd = d, best = k;
    }
    w->ref = best;
    w->base = &w->virt;
    return HYP_OK;
}

hyp_status hyp__multibase(hyp__work *w, hyp_error *err)
{
    compare_bases(w);
    hyp_status st = choose(w, err);
    if (st)
        return st;
    if (w->method == HYP_METHOD_FIELD && (st = setup_field(w, err)))
        return st;
    if (w->method == HYP_METHOD_TWO_BASE)
        w->base = &w->bases[w->ref];
    if (w->method == HYP_METHOD_SINGLE)
        w->ref = 0, w->base = &w->bases[0];
    w->bv = w->bvs[w->ref];
    return HYP_OK;
}

void hyp__two_base_columns(const hyp__work *w, double *implied_k, double *thermo_k)
{
    const hyp__base_view *u = &w->bvs[w->upper];
    double dh = w->bases[w->upper].height_m - w->bases[w->ref].height_m;
    double tsum = 0, thermo = 0;
    size_t tn = 0, thn = 0;
    hyp__in in = {0};   /* kept across samples: its hint */
    for (size_t i = 0; i < w->n; i++) {
        if (w->r->status[i] != HYP_PT_OK || hyp__inputs(w, i, &in))
            continue;
        double pl = in.pb;
        double g = hyp_gravity_at_height_m_s2(hyp__lat(w, i), w->bases[w->ref].height_m + 0.5 * dh);
        tsum += g * dh / (HYP_RD_J_KG_K * log(pl / in.pu));
        tn++;
        double tu;
        hyp__base_at(u, u->temp, w->rv->time_s[i], w->o->max_gap_s, &tu);
        if (in.tb == in.tb && tu == tu) {
            double tvl = hyp_virtual_temperature_k(in.tb, in.rhb, pl);
            double tvu = hyp_virtual_temperature_k(tu, in.rhb, in.pu);
            thermo += hyp_layer_mean_temperature_k(tvl, tvu);
            thn++;
        }
    }
    *implied_k = tn ? tsum / (double)tn : NAN;
    *thermo_k = thn ? thermo / (double)thn : NAN;
}
