/* survey_rover_spec.c - each rover's own reading options (units, fields,
 * zone, clock offset), looked up by the rover's path when it is read; the
 * survey's reading options stay the default (issue 15: they applied to
 * the rover and every base at once). */
#define _GNU_SOURCE
#include "survey_int.h"

#include <stdlib.h>
#include <string.h>

void hyp_rover_spec_init(hyp_rover_spec *r, const char *path)
{
    memset(r, 0, sizeof *r);
    r->path = path;
}

hyp_status hyp_survey_add_rover_spec(hyp_survey *sv, const hyp_rover_spec *r, hyp_error *err)
{
    if (!r->path || !r->path[0])
        return hyp_error_set(err, HYP_ERR_USAGE, "a rover has no file name");
    if (hyp__rover_own_find(sv, r->path))
        return hyp_error_set(err, HYP_ERR_USAGE, "--rover %s is given twice", r->path);
    hyp__rover_own *p = realloc(sv->rover_own, (sv->n_rover_own + 1) * sizeof *p);
    if (!p)
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    sv->rover_own = p;
    hyp__rover_own *o = &p[sv->n_rover_own];
    memset(o, 0, sizeof *o);
    o->spec = *r;
    hyp_zone_init(&o->zone);
    if (r->time_zone) {
        hyp_error e;
        if (hyp_zone_parse(&o->zone, r->time_zone, NULL, &e)) {
            hyp_zone_free(&o->zone);
            return hyp_error_set(err, HYP_ERR_USAGE, "--rover-time-zone (of --rover %s): %s", r->path, e.message);
        }
    }
    if (!(o->path = strdup(r->path))) {
        hyp_zone_free(&o->zone);
        return hyp_error_set(err, HYP_ERR_NOMEM, "out of memory");
    }
    o->spec.path = o->path;
    sv->n_rover_own++;
    return HYP_OK;
}

const hyp__rover_own *hyp__rover_own_find(const hyp_survey *sv, const char *rover)
{
    for (size_t k = 0; rover && k < sv->n_rover_own; k++)
        if (!strcmp(sv->rover_own[k].path, rover))
            return &sv->rover_own[k];
    return NULL;
}

void hyp__rover_own_free(hyp_survey *sv)
{
    for (size_t k = 0; k < sv->n_rover_own; k++) {
        free(sv->rover_own[k].path);
        hyp_zone_free(&sv->rover_own[k].zone);
    }
    free(sv->rover_own);
    sv->rover_own = NULL;
    sv->n_rover_own = 0;
}

void hyp__rover_clock_apply(const hyp__rover_own *own, hyp__log *l)
{
    double c = own ? own->spec.clock_offset_s : 0.0;
    if (c == 0.0)
        return;
    /* true time = logged time - offset, as for a base (base_view.c) */
    hyp_series *s = l->is_gpx ? &l->doc.pts : &l->csv;
    for (size_t i = 0; i < s->count; i++)
        s->time_s[i] -= c;   /* NaN stays NaN */
    for (size_t k = 0; k < s->n_time_back && k < HYP_TIME_BACK_KEEP; k++)
        s->time_back[k].time_s -= c;
    for (size_t k = 0; l->is_gpx && k < l->doc.wpts.count; k++)
        l->doc.wpts.time_s[k] -= c;
}
