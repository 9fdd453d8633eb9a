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
#include <string.h>

/* A row is built in memory and handed to stdio in blocks: one fwrite a
 * number cost more than formatting it (about 20 calls a row, a fifth of
 * the table's time in a batch of small tracks, callgrind). */
typedef struct {
    FILE *f;
    size_t n;
    char b[8192];
} rowbuf;

static void rb_flush(rowbuf *r)
{
    if (r->n)
        fwrite_unlocked(r->b, 1, r->n, r->f);   /* the FILE is this writer's alone */
    r->n = 0;
}

/* room for at least want bytes, else flush */
static char *rb_room(rowbuf *r, size_t want)
{
    if (sizeof r->b - r->n < want)
        rb_flush(r);
    return r->b + r->n;
}

static void rb_str(rowbuf *r, const char *s)
{
    size_t l = strlen(s);
    if (l > sizeof r->b / 2) {
        rb_flush(r);
        fputs_unlocked(s, r->f);
        return;
    }
    memcpy(rb_room(r, l), s, l);
    r->n += l;
}

static void rb_char(rowbuf *r, char c)
{
    *rb_room(r, 1) = c;
    r->n++;
}

/* ",v" with prec decimals as printf prints it, or "," for NaN */
static void num(rowbuf *r, double v, int prec)
{
    char *p = rb_room(r, 64);
    *p++ = ',';
    r->n++;
    if (v != v)
        return;
    size_t room = sizeof r->b - r->n;
    int k = hyp__fmt_fixed(p, room, v, prec);
    if (k >= 0 && (size_t)k < room)
        r->n += (size_t)k;
    else {   /* a number longer than the room (printf's own path): print it */
        rb_flush(r);
        fprintf(r->f, "%.*f", prec, v);
    }
}

/* the time of a row, or nothing for a sample without one */
static void row_time(rowbuf *r, double time_s)
{
    if (time_s != time_s)
        return;
    char *p = rb_room(r, 40);
    hyp_time_format(time_s, p, 40);
    r->n += strlen(p);
}

static const char *wpt_status_text(unsigned char st)
{
    return st == HYP_WPT_CORRECTED ? "ok" : st == HYP_WPT_NO_TIME ? "no time, left as it is"
                                                               : "outside the corrected span, left as it is";
}

/* The waypoints' rows: time, position, ele_in, height and sigma; the
 * columns that describe a sample of the track empty. */
static void waypoint_rows(rowbuf *f, const hyp_gpx_doc *doc, const hyp_waypoint_heights *wh, int extra)
{
    for (size_t k = 0; k < wh->count && k < doc->wpts.count; k++) {
        row_time(f, doc->wpts.time_s[k]);
        num(f, doc->wpts.lat_deg[k], 8);
        num(f, doc->wpts.lon_deg[k], 8);
        num(f, doc->wpt_ele_m[k], 3);
        num(f, wh->height_m[k], 3);
        num(f, wh->sigma_m[k], 3);
        for (int c = 0; c < 4 + HYP_B_COUNT + extra; c++)
            rb_char(f, ',');
        rb_char(f, ',');
        rb_str(f, wpt_status_text(wh->status[k]));
        rb_str(f, ",waypoint\n");
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
    rowbuf row = {.f = f, .n = 0}, *rb = &row;   /* 8 KiB: threads keep the default stack */
    for (size_t i = 0; i < s->count; i++) {
        row_time(rb, s->time_s[i]);
        num(rb, hyp_series_lat(s, i), 8);
        num(rb, hyp_series_lon(s, i), 8);
        num(rb, s->ele_m[i], 3);
        num(rb, res->height_m[i], 3);
        num(rb, res->sigma_m[i], 3);
        num(rb, s->pressure_pa[i] / 100.0, 3);
        /* the rest of a corrected point is recomputed, not stored */
        hyp_point_detail d;
        if (hyp_correct_point(res, i, &d) != HYP_OK) {
            d.base_p_pa = d.offset_pa = d.tcol_k = NAN;
            for (int k = 0; k < HYP_B_COUNT; k++)
                d.budget_m[k] = NAN;
        }
        num(rb, d.base_p_pa / 100.0, 3);
        num(rb, d.offset_pa / 100.0, 3);
        num(rb, d.tcol_k - 273.15, 2);
        for (int k = 0; k < HYP_B_COUNT; k++)
            num(rb, d.budget_m[k], 3);
        if (info->gnss_m)
            num(rb, info->gnss_m[i] - res->height_m[i], 3);
        if (info->easting_m) {
            num(rb, info->easting_m[i], 3);
            num(rb, info->northing_m[i], 3);
        }
        const char *why = res->status[i] == HYP_PT_REFUSED ? hyp_sample_flag_text((hyp_sample_flag)s->flag[i])
                          : res->extrapolated && res->extrapolated[i] ? "ok, extrapolated outside the bases' heights"
                                                                      : hyp_point_status_text((hyp_point_status)res->status[i]);
        rb_char(rb, ',');
        rb_str(rb, why);
        if (wpts)
            rb_str(rb, ",track");
        rb_char(rb, '\n');
    }
    if (wpts)
        waypoint_rows(rb, doc, wh, (info->gnss_m ? 1 : 0) + (info->easting_m ? 2 : 0));
    rb_flush(rb);
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
