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

#endif
