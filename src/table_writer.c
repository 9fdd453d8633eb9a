/* table_writer.c - the per-sample table (CSV) of a correction. Units of
 * every column are fixed and documented in docs/formats.md: degrees for
 * lat/lon, metres for heights and every sigma column, hPa for pressures,
 * degC for temperature. */
#define _GNU_SOURCE   /* fwrite_unlocked */
#include "hypsolev/writers.h"
#include "output_set.h"
#include "writers_int.h"
#include "fmtnum.h"

#include <math.h>
#include <stdio.h>

/* ",v" with prec decimals as printf prints it, or "," for NaN */
static void num(FILE *f, double v, int prec)
{
    char b[40];
    b[0] = ',';
    int n = v == v ? hyp__fmt_fixed(b + 1, sizeof b - 1, v, prec) : 0;
    fwrite_unlocked(b, 1, (size_t)n + 1, f);   /* the FILE is this writer's alone */
}

static const char *wpt_status_text(unsigned char st)
{
    return st == HYP_WPT_CORRECTED ? "ok" : st == HYP_WPT_NO_TIME ? "no time, left as it is"
                                                               : "outside the corrected span, left as it is";
}

/* The waypoints' rows: time, position, ele_in, height and sigma; the
 * columns that describe a sample of the track empty. */
static void waypoint_rows(FILE *f, const hyp_gpx_doc *doc, const hyp_waypoint_heights *wh, int extra)
{
    for (size_t k = 0; k < wh->count && k < doc->wpts.count; k++) {
        char t[40] = "";
        if (doc->wpts.time_s[k] == doc->wpts.time_s[k])
            hyp_time_format(doc->wpts.time_s[k], t, sizeof t);
        fputs(t, f);
        num(f, doc->wpts.lat_deg[k], 8);
        num(f, doc->wpts.lon_deg[k], 8);
        num(f, doc->wpt_ele_m[k], 3);
        num(f, wh->height_m[k], 3);
        num(f, wh->sigma_m[k], 3);
        for (int c = 0; c < 4 + HYP_B_COUNT + extra; c++)
            fputc_unlocked(',', f);
        fprintf(f, ",%s,waypoint\n", wpt_status_text(wh->status[k]));
    }
}

hyp_status hyp__table_to(const hyp_series *s, const hyp_correct_result *res, const hyp_output_info *info,
                         const hyp_gpx_doc *doc, const hyp_waypoint_heights *wh, hyp__outfile *o, hyp_error *err)
{
    int wpts = doc && wh && wh->count && doc->wpts.count;
    hyp_output_info none = {0};
    if (!info)
        info = &none;
    FILE *f = o->f;
    fputs("time,lat,lon,ele_in,height,sigma,p_rover_hpa,p_base_hpa,offset_hpa,tcol_c", f);
    for (int k = 0; k < HYP_B_COUNT; k++)
        fprintf(f, ",sigma_%s", hyp_budget_term_name((hyp_budget_term)k));
    if (info->gnss_m)
        fputs(",gnss_minus_height", f);
    if (info->easting_m)
        fputs(",easting,northing", f);
    fputs(wpts ? ",status,kind\n" : ",status\n", f);
    for (size_t i = 0; i < s->count; i++) {
        char t[40] = "";
        if (s->time_s[i] == s->time_s[i])
            hyp_time_format(s->time_s[i], t, sizeof t);
        fputs(t, f);
        num(f, hyp_series_lat(s, i), 8);
        num(f, hyp_series_lon(s, i), 8);
        num(f, s->ele_m[i], 3);
        num(f, res->height_m[i], 3);
        num(f, res->sigma_m[i], 3);
        num(f, s->pressure_pa[i] / 100.0, 3);
        /* the rest of a corrected point is recomputed, not stored */
        hyp_point_detail d;
        if (hyp_correct_point(res, i, &d) != HYP_OK) {
            d.base_p_pa = d.offset_pa = d.tcol_k = NAN;
            for (int k = 0; k < HYP_B_COUNT; k++)
                d.budget_m[k] = NAN;
        }
        num(f, d.base_p_pa / 100.0, 3);
        num(f, d.offset_pa / 100.0, 3);
        num(f, d.tcol_k - 273.15, 2);
        for (int k = 0; k < HYP_B_COUNT; k++)
            num(f, d.budget_m[k], 3);
        if (info->gnss_m)
            num(f, info->gnss_m[i] - res->height_m[i], 3);
        if (info->easting_m) {
            num(f, info->easting_m[i], 3);
            num(f, info->northing_m[i], 3);
        }
        const char *why = res->status[i] == HYP_PT_REFUSED ? hyp_sample_flag_text((hyp_sample_flag)s->flag[i])
                          : res->extrapolated && res->extrapolated[i] ? "ok, extrapolated outside the bases' heights"
                                                                      : hyp_point_status_text((hyp_point_status)res->status[i]);
        fputc_unlocked(',', f);
        fputs_unlocked(why, f);
        if (wpts)
            fputs_unlocked(",track", f);
        fputc_unlocked('\n', f);
    }
    if (wpts)
        waypoint_rows(f, doc, wh, (info->gnss_m ? 1 : 0) + (info->easting_m ? 2 : 0));
    (void)err;   /* write errors are found when the set is committed */
    return HYP_OK;
}

hyp_status hyp_table_write(const hyp_series *s, const hyp_correct_result *res, const hyp_output_info *info,
                           const char *out_path, hyp_error *err)
{
    hyp__outfile o;
    hyp__stale_remove(out_path);
    hyp_status st = hyp__out_open(&o, out_path, err);
    if (!st)
        st = hyp__table_to(s, res, info, NULL, NULL, &o, err);
    if (!st)
        return hyp__out_commit(&o, err);
    hyp__out_abort(&o);
    return st;
}
