/* network_obs.c - the network's observations as they are found: a
 * growing list, with each one's sensitivity and time beside it for the
 * observation equations (network_adjust.c). */
#include "network_int.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

hyp_network_obs *hyp__net_push(hyp__net *N, hyp_obs_kind kind, double c, double dt_h)
{
    hyp_network_result *r = N->r;
    if (r->n_obs == N->obs_alloc) {
        size_t na = N->obs_alloc ? 2 * N->obs_alloc : 256;
        hyp_network_obs *o = realloc(r->obs, na * sizeof *o);
        double *cc = realloc(N->coef, na * sizeof *cc);
        if (cc)
            N->coef = cc;
        double *dd = cc ? realloc(N->dt_h, na * sizeof *dd) : NULL;
        if (dd)
            N->dt_h = dd;
        double *c2 = dd ? realloc(N->coef2, na * sizeof *c2) : NULL;
        if (c2)
            N->coef2 = c2;
        double *d2 = c2 ? realloc(N->dt2_h, na * sizeof *d2) : NULL;
        if (d2)
            N->dt2_h = d2;
        size_t *nd = d2 ? realloc(N->node, na * sizeof *nd) : NULL;
        if (nd)
            N->node = nd;
        if (o)
            r->obs = o;
        if (!o || !nd)
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
