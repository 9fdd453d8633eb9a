/* network_obs.c - the network's observations as they are found: a
 * growing list, with each one's sensitivity and time beside it for the
 * observation equations (network_adjust.c). */
#include "network_int.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

void hyp__net_track_span(hyp_network_track *t, const hyp_series *s)
{
    t->t0_s = t->t1_s = NAN;
    for (size_t i = 0; i < s->count; i++)
        if (!s->flag[i]) {
            if (t->t0_s != t->t0_s)
                t->t0_s = s->time_s[i];
            t->t1_s = s->time_s[i];
        }
}

/* *p grown to na doubles: 1, or 0 out of memory (*p as it was). */
static int grow_doubles(double **p, size_t na)
{
    double *q = realloc(*p, na * sizeof *q);
    if (q)
        *p = q;
    return q != NULL;
}

hyp_network_obs *hyp__net_push(hyp__net *N, hyp_obs_kind kind, double c, double dt_h)
{
    hyp_network_result *r = N->r;
    if (r->n_obs == N->obs_alloc) {
        size_t na = N->obs_alloc ? 2 * N->obs_alloc : 256;
        hyp_network_obs *o = realloc(r->obs, na * sizeof *o);
        if (o)
            r->obs = o;
        int ok = o && grow_doubles(&N->coef, na) && grow_doubles(&N->dt_h, na) && grow_doubles(&N->coef2, na) &&
                 grow_doubles(&N->dt2_h, na);
        size_t *nd = ok ? realloc(N->node, na * sizeof *nd) : NULL;
        if (nd)
            N->node = nd;
        if (!nd)
            return NULL;
        N->obs_alloc = na;
    }
    hyp_network_obs *o = &r->obs[r->n_obs];
    memset(o, 0, sizeof *o);
    o->kind = kind;
    o->w = o->redundancy = NAN;
    o->station2 = SIZE_MAX;
    N->coef[r->n_obs] = c;
    N->dt_h[r->n_obs] = dt_h;
    N->coef2[r->n_obs] = 0.0;
    N->dt2_h[r->n_obs] = 0.0;
    N->node[r->n_obs] = SIZE_MAX;
    r->n_obs++;
    return o;
}
