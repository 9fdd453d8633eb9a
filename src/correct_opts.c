/* correct_opts.c - the correction request's defaults (each with its
 * source in correct.h) and the names of its enumerations. */
#include "hypsolev/correct.h"

#include <math.h>
#include <string.h>

void hyp_correct_opts_init(hyp_correct_opts *o)
{
    memset(o, 0, sizeof *o);
    o->offset_pa = NAN;
    o->auto_colocate = 1;
    o->coloc_radius_m = 30.0;
    o->coloc_min_s = 300.0;
    o->max_gap_s = 180.0;
    o->tcol = HYP_TCOL_BASE_LAPSE;
    o->lapse_k_per_m = -0.0065;
    o->tcol_sigma_k = 0.5;
    o->lapse_sigma_k_per_m = 0.001;
    o->default_rh_pct = 50.0;
    o->default_rh_sigma_pct = 30.0;
    o->uncal_offset_sigma_pa = 150.0;
    o->tie_radius_m = 30.0;
    o->tie_min_s = 60.0;
    o->stationary_m = 15.0;
    o->scale_min_span_m = 200.0;
    o->max_condition = 1e6;
    o->drift_rw_pa2_per_s = 4.0 / 3600.0;
    o->gradient_sigma_pa_per_m = 100.0 / 100000.0;
    o->front_speed_m_s = 20.0 / 3.6;
    o->clock_sigma_s = 2.0;
    o->rh_sigma_pct = 5.0;
    o->rapid_pa_per_s = 100.0 / 3600.0;
    o->clock_max_lag_s = 600.0;
    o->gnss_anchor = 1;
    o->gnss_bias_sigma_m = 0.0;
    o->method = HYP_METHOD_AUTO;
    o->base_colocate.start_s = o->base_colocate.end_s = NAN;
    o->extrapolate_min_m = 100.0;
    o->extrapolate_frac = 0.25;
    o->curvature_sigma_k = 1.0;
    o->qnh_sigma_pa = 100.0 / sqrt(12.0);   /* 1 hPa reporting resolution, uniform */
    o->threads = 1;
}

void hyp_base_init(hyp_base *b, const hyp_series *log, const char *name, double height_m)
{
    memset(b, 0, sizeof *b);
    b->log = log;
    b->name = name;
    b->height_m = height_m;
    b->lat_deg = b->lon_deg = NAN;
    b->kind = HYP_BASE_STATION;
    b->offset_pa = NAN;
}

const char *hyp_method_name(hyp_method m)
{
    switch (m) {
    case HYP_METHOD_AUTO: return "automatic";
    case HYP_METHOD_SINGLE: return "single base";
    case HYP_METHOD_TWO_BASE: return "two-base";
    case HYP_METHOD_FIELD: return "pressure field";
    }
    return "?";
}

const char *hyp_point_status_text(hyp_point_status s)
{
    switch (s) {
    case HYP_PT_OK: return "ok";
    case HYP_PT_REFUSED: return "sample refused by the reader";
    case HYP_PT_OUTSIDE_BASE: return "time outside the base log";
    case HYP_PT_BASE_GAP: return "gap in the base log";
    case HYP_PT_NO_CONVERGE: return "height could not be computed";
    case HYP_PT_EXTRAPOLATION: return "too far outside the two bases' heights";
    case HYP_PT_STATUS_COUNT: break;
    }
    return "unknown";
}
