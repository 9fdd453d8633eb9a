/* writers_int.h - the writers into an output set's staging file (private):
 * the survey run stages all of a rover's outputs and commits them
 * together; the public writers in writers.h wrap these for one file. */
#ifndef HYP_WRITERS_INT_H
#define HYP_WRITERS_INT_H

#include "hypsolev/writers.h"
#include "output_set.h"

/* wh: the waypoints' heights (NULL: waypoints left as they are). */
hyp_status hyp__gpx_splice_to(const char *in_path, const hyp_gpx_doc *doc, const hyp_correct_result *res,
                              const hyp_waypoint_heights *wh, const hyp_output_info *info, hyp__outfile *o,
                              hyp_error *err);
hyp_status hyp__gpx_new_to(const hyp_series *s, const hyp_correct_result *res, const hyp_output_info *info,
                           const char *track_name, hyp__outfile *o, hyp_error *err);
/* doc and wh (either NULL: none): the GPX rover's waypoints, as rows after
 * the track's with a last column `kind`. */
hyp_status hyp__table_to(const hyp_series *s, const hyp_correct_result *res, const hyp_output_info *info,
                         const hyp_gpx_doc *doc, const hyp_waypoint_heights *wh, hyp__outfile *o, hyp_error *err);

#endif
