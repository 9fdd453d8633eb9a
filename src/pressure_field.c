/* pressure_field.c - the field method's inputs at one rover sample: every
 * base's pressure reduced to a common height and a plane fitted through
 * them in local coordinates (inverse-distance weighting where the bases'
 * geometry cannot carry a plane). */
#include "correct_int.h"
#include "base_view.h"
#include "hypsolev/atmosphere.h"
#include "hypsolev/geo.h"
#include "svd_solve.h"

#include <math.h>

/* Local east/north (km) from the field's centre: the azimuthal
 * equidistant projection, computed with the geodesic from the centre
 * (distance and azimuth; Karney 2013 through PROJ's geodesic.h). */
static void local_xy(const hyp__work *w, double lat, double lon, double *x, double *y)
{
    double s, az;
    if (hyp_geo_inverse(w->virt.lat_deg, w->virt.lon_deg, lat, lon, &s, &az)) {
        *x = *y = NAN;
        return;
    }
    double a = az * 3.14159265358979323846 / 180.0;
    *x = s * sin(a) / 1000.0;
    *y = s * cos(a) / 1000.0;
}

/* Base k's pressure reduced to the reference height with its own column
 * (hypsometric equation, base temperature and the lapse rate). */
static double reduce(const hyp__work *w, size_t k, double t, double *tk_ref, hyp_point_status *st)
{
    const hyp__base_view *b = &w->bvs[k];
    double p, tk;
    *st = hyp__base_at(b, b->p, t, w->o->max_gap_s, &p);
    if (*st)
        return NAN;
    hyp__base_at(b, b->temp, t, w->o->max_gap_s, &tk);
    if (tk != tk)
        tk = hyp_isa_temperature_k(hyp_geopotential_from_geometric_m(w->bases[k].height_m));
    double dz = w->virt.height_m - w->bases[k].height_m, lapse = w->o->lapse_k_per_m;
    double tv = hyp_virtual_temperature_k(tk + 0.5 * lapse * dz, w->o->default_rh_pct, p);
    double g = hyp_gravity_at_height_m_s2(w->bases[k].lat_deg, w->bases[k].height_m + 0.5 * dz);
    *tk_ref = tk + lapse * dz;
    return p * exp(-g * dz / (HYP_RD_J_KG_K * tv));
}

static double pick_lat(const hyp__work *w, size_t i)
{
    double v = hyp_series_lat(w->rv, i);
    return v == v ? v : w->virt.lat_deg;
}

static double pick_lon(const hyp__work *w, size_t i)
{
    double v = hyp_series_lon(w->rv, i);
    return v == v ? v : w->virt.lon_deg;
}

hyp_point_status hyp__field_inputs(const hyp__work *w, size_t i, hyp__in *in, double *chi2)
{
    double bx[HYP_MAX_BASES], by[HYP_MAX_BASES];
    for (size_t k = 0; k < w->nb; k++)
        local_xy(w, w->bases[k].lat_deg, w->bases[k].lon_deg, &bx[k], &by[k]);
    if (chi2)
        *chi2 = NAN;
    double pk[HYP_MAX_BASES], tsum = 0, a[HYP_MAX_BASES * 3], b[HYP_MAX_BASES];
    hyp_point_status st = HYP_PT_OK;
    for (size_t k = 0; k < w->nb && !st; k++) {
        double tr;
        pk[k] = reduce(w, k, w->rv->time_s[i], &tr, &st);
        tsum += tr;
        a[3 * k] = 1.0, a[3 * k + 1] = bx[k], a[3 * k + 2] = by[k];
        b[k] = pk[k];
    }
    if (st)
        return st;
    double x, y;
    local_xy(w, pick_lat(w, i), pick_lon(w, i), &x, &y);
    hyp__lsq f;
    double pf;
    if (w->nb >= 3 && hyp__lsq_solve(a, b, w->nb, 3, &f) == HYP_OK && f.cond < 1e3) {
        pf = f.x[0] + f.x[1] * x + f.x[2] * y;   /* a plane: p = a + b x + c y */
        if (w->nb > 3 && chi2)
            *chi2 = f.chi2 / (double)(w->nb - 3);
    } else {
        /* poor geometry (bases in a line, or two): inverse-distance
         * weighting with power 2 (Shepard 1968) */
        double sw = 0, sp = 0;
        for (size_t k = 0; k < w->nb; k++) {
            double d2 = (x - bx[k]) * (x - bx[k]) + (y - by[k]) * (y - by[k]) + 1e-6;
            sw += 1.0 / d2, sp += pk[k] / d2;
        }
        pf = sp / sw;
    }
    in->pb = pf;
    in->tb = tsum / (double)w->nb;
    return HYP_PT_OK;
}
