/* base_clock.h - a base logger's clock offset estimated from the rover's
 * co-locations with it (private). */
#ifndef HYP_BASE_CLOCK_H
#define HYP_BASE_CLOCK_H

#include "hypsolev/correct.h"

/* The base clock offset (s the base clock is ahead of true time) that
 * best lines up the rover's and the base's pressure changes in the base
 * co-locations of `res` (a correction of the same rover and base): the lag
 * minimising the scatter of rover - base pressure about each window's mean,
 * searched over +-max_lag_s around base->clock_offset_s, refined by a
 * parabola; its 1-sigma from the curvature of that scatter (least-squares
 * theory, e.g. Bevington and Robinson, Data Reduction and Error Analysis,
 * 3rd ed., section 8.1), inflated for autocorrelated residuals. The base is
 * interpolated as everywhere (base_view.h), bridging gaps up to max_gap_s.
 * HYP_ERR_NODATA when no co-location holds enough samples or the minimum is
 * not determined. */
hyp_status hyp__estimate_base_clock(const hyp_series *rover, const hyp_base *base, const hyp_correct_result *res,
                                    double max_lag_s, double max_gap_s, double *offset_s, double *sigma_s,
                                    hyp_error *err);

/* Whether the base's clock is off from the rover's by whole or half hours
 * (a log kept in local or summer time and marked as UTC, the classic
 * logger blunder): the rover's samples standing near the base's position
 * (within o->coloc_radius_m for o->coloc_min_s) fall outside the base log
 * as its clock is given, but inside it when the log is shifted by a
 * multiple of 30 min (up to 14 h). Then *lag_s gets the shift that lines
 * them up best (s the base clock is ahead, beyond its given offset) and
 * others (n_others bytes) the other shifts that would cover them, as text;
 * else *lag_s is 0. Nothing is decided without the base's position or 8
 * such samples. */
hyp_status hyp__base_clock_hours(const hyp_series *rover, const hyp_base *base, const hyp_correct_opts *o,
                                 double *lag_s, char *others, size_t n_others, hyp_error *err);

#endif
