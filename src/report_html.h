/* report_html.h - the HTML report of one rover's run (private): the page
 * and its tables (report_html.c), the figures along the track
 * (report_figures.c) and the plan (report_plan.c). Everything drawn comes
 * from the run's result; per-point details only through
 * hyp_correct_point(). */
#ifndef HYP_REPORT_HTML_H
#define HYP_REPORT_HTML_H

#include "report_page.h"
#include "survey_int.h"

/* Figure widths: the page's text column (report_page.c's main, 1000 px
 * less its padding). */
#define HYP__FIG_W 940.0
#define HYP__FIG_H 380.0

/* Each figure function writes one <figure> with its caption, or a note
 * saying why there is none; it fails only when memory does. */
/* Heights against time, then against distance along the track. */
/* The whole page of a rover's report into p (hyp__page_init'ed), not yet
 * written: the survey draws it in a thread of its own. */
hyp_status hyp__rover_html_build(hyp__page *p, const hyp_rover_run *r, const hyp_report_info *info, hyp_error *err);
hyp_status hyp__fig_heights(hyp__page *p, const hyp_rover_run *r, hyp_error *err);
hyp_status hyp__fig_base_pressure(hyp__page *p, const hyp_rover_run *r, hyp_error *err);
hyp_status hyp__fig_tendency(hyp__page *p, const hyp_rover_run *r, hyp_error *err);
hyp_status hyp__fig_offset(hyp__page *p, const hyp_rover_run *r, hyp_error *err);
hyp_status hyp__fig_ties(hyp__page *p, const hyp_rover_run *r, hyp_error *err);
hyp_status hyp__fig_budget(hyp__page *p, const hyp_rover_run *r, hyp_error *err);
hyp_status hyp__fig_plan(hyp__page *p, const hyp_rover_run *r, hyp_error *err);

/* Length of the step between two positions, m: the geodesic (see the
 * definition in report_figures.c); NaN when either has no position. */
double hyp__track_step_m(double lat1_deg, double lon1_deg, double lat2_deg, double lon2_deg);

/* The same along a track, with the latitude's sine, cosine and radii
 * carried from step to step (recomputed every 0.01 degree). */
typedef struct hyp__step_cache {
    double lat_deg, sin_lat, cos_lat, m_m, n_m, km, kn;
    int set;
} hyp__step_cache;
double hyp__track_step_fast(hyp__step_cache *c, double lat1_deg, double lon1_deg, double lat2_deg, double lon2_deg);

/* Time span of the rover's accepted samples (NaN, NaN when none). */
void hyp__rover_span(const hyp_series *s, double *t0_s, double *t1_s);

#endif
