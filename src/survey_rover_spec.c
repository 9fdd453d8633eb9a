/* survey_rover_spec.c - each rover's own reading options (units, fields,
 * zone, clock offset), looked up by the rover's path when it is read; the
 * survey's reading options stay the default (issue 15: they applied to
 * the rover and every base at once). */
#define _GNU_SOURCE
#include "survey_int.h"

#include <stdio.h>
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
    if (!(o->path = strdup(r->path)) || (r->display_name && !(o->display = strdup(r->display_name)))) {
        free(o->path);
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
        free(sv->rover_own[k].display);
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

/* s with every `from` replaced by `to`, allocated; NULL when from is not
 * in it or memory is short (the text then stays as it was). */
static char *replaced(const char *s, const char *from, const char *to)
{
    size_t nf = strlen(from), nt = strlen(to), n = 0;
    for (const char *p = s; nf && (p = strstr(p, from)); p += nf)
        n++;
    char *out = n ? malloc(strlen(s) + n * nt + 1) : NULL, *q = out;
    for (const char *p = s, *hit; out && (hit = strstr(p, from)); p = hit + nf) {
        memcpy(q, p, (size_t)(hit - p));
        q += hit - p;
        memcpy(q, to, nt);
        q += nt;
        if (!strstr(hit + nf, from))
            strcpy(q, hit + nf);
    }
    return out;
}

static void rename_in(char **text, const char *from, const char *to)
{
    char *t = *text ? replaced(*text, from, to) : NULL;
    if (t) {
        free(*text);
        *text = t;
    }
}

void hyp__rover_display_apply(const hyp_survey *sv, hyp_rover_run *r)
{
    const hyp__rover_own *own = hyp__rover_own_find(sv, r->path);
    if (!own || !own->display)
        return;
    char *e = replaced(r->error.message, own->path, own->display);
    if (e)
        snprintf(r->error.message, sizeof r->error.message, "%s", e);
    free(e);
    for (size_t k = 0; k < r->msgs.count; k++) {
        rename_in(&r->msgs.items[k].file, own->path, own->display);
        rename_in(&r->msgs.items[k].text, own->path, own->display);
    }
    r->path = own->display;
}
