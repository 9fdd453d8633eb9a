/* waypoint_heights.h - a GPX rover's waypoints given the corrected track's
 * height at their times (private). */
#ifndef HYP_WAYPOINT_HEIGHTS_H
#define HYP_WAYPOINT_HEIGHTS_H

#include "hypsolev/correct.h"
#include "hypsolev/marks.h"
#include "hypsolev/samples.h"

/* Longest gap (s) between two corrected samples that a waypoint's height
 * is interpolated across: a design choice (common practice, no source):
 * five minutes of walking can climb tens of metres, which a straight line
 * between the two ends would not show. */
#define HYP__WPT_MAX_GAP_S 300.0

/* Fills *out (count = w->count) from the corrected track s/res: linear
 * interpolation in time between the corrected samples either side of each
 * waypoint's time, sigma the larger of theirs. HYP_ERR_NOMEM only. */
hyp_status hyp__waypoint_heights(const hyp_waypoints *w, const hyp_series *s, const hyp_correct_result *res,
                                 hyp_waypoint_heights *out, hyp_error *err);
void hyp__waypoint_heights_free(hyp_waypoint_heights *h);

#endif
