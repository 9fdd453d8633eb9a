/* network.c - the simulator's station surveys: several days, several roving
 * barometers that walk loops from a base mark through stations (as a
 * gravity crew does), a base logger running each day, a few control marks,
 * the crew's field book and the truth. The pressures come from hypsim.c's
 * model atmosphere (RK4 through the hydrostatic equation) and the sensors
 * get the same kinds of error as the single-day scenarios: offsets, drift,
 * white noise, quantisation, body warming, correlated GNSS error. Nothing is
 * shared with the library. Everything (place, marks, crew) is invented.
 *
 *   hypsim network      OUTDIR [--seed N] [--days D] [--rovers R] [--stations S]
 *                       [--dt S] [--mislabel] [--open-tracks]
 *                                                   2 days, 2 rovers, 9 + 3 stations
 *   hypsim network-hard OUTDIR [same options]       4 days, 3 rovers, 30 + 4 stations,
 *                       a stronger turning pressure gradient, a front on day 2,
 *                       larger drifts and day-to-day jumps, more body warming,
 *                       open tracks
 *
 * --stations counts the stations to be determined; the control marks come on
 * top (3, or 4 in network-hard; the first is the base mark). --dt is the
 * rovers' sampling interval (s, default 10). --open-tracks: every third
 * track (day + rover index = 2 mod 3) does not come back to the base: it
 * ends on its last station, a control mark or a station occupied again
 * elsewhere (the crew is picked up there), so only the network ties its
 * drift. Deterministic for a seed.
 *
 * Files written to OUTDIR (CSV with a header line; times ISO 8601 UTC, "Z"):
 *   stations.csv   name,lat,lon,height,sigma: degrees (WGS84), height in m
 *                  above the EGM96 geoid, sigma in m (1 sigma); height and
 *                  sigma only for control marks, empty otherwise
 *   truth.csv      name,height: the true height (m, EGM96) of every station
 *   RR-dayN.gpx    rover RR (ra, rb, ...) on day N (1, 2, ...): GPX 1.1, a
 *                  track point every --dt seconds with the GNSS position and
 *                  height (ele, m) and the logger's pressure and temperature
 *                  in extensions, as rover.gpx of the other scenarios; a
 *                  <wpt> (name = station, time = middle of the true window,
 *                  position = the GNSS fix then) for about half of the
 *                  station occupations, as a crew pressing "mark" would
 *   base-dayN.csv  the base logger on the base mark, day N (as base.csv)
 *   bases.csv      file,height,lat,lon,clock_offset,kind: the --base-dir index
 *   fieldbook.csv  station,rover,start,end: every occupation as booked
 *                  (rover = track file name without .gpx; whole minutes at
 *                  least 15 s inside the true window), including the
 *                  co-locations on the base mark at the start and (unless
 *                  open) the end of each track, ordered by day, rover, time
 *   occupations-truth.csv  station,rover,start,end: the same occupations,
 *                  line for line, with their true windows (to the second)
 *   truth-mislabel.txt     (--mislabel only) which fieldbook line names the
 *                  wrong station; --mislabel changes nothing else
 *   scenario.txt   the parameters, "key value" lines
 *
 * The sensors stand at the mark's height during an occupation (a few metres
 * aside horizontally). A rover reads true pressure + offset + drift x hours
 * since its track's first point + white noise, quantised to 1 Pa. */
#define _DEFAULT_SOURCE
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "sim.h"
#include "sim_write.h"

#define MAX_STATIONS 420
#define MAX_VISITS 64          /* stations a rover occupies in a day, with the two co-locations */
#define MAX_DAYS 30
#define MAX_ROVERS 26
#define PER_LOOP 20            /* most stations to be determined per rover and day */
#define DAY_S 86400.0
#define T0_DAY1 1789453800.0   /* 2026-09-15T06:30:00Z */

typedef struct variant {
    const char *name;
    int days, rovers, stations, controls;
    double radius_km;          /* stations lie within this distance of the base mark */
    double relief;             /* scale of the terrain's height differences */
    double grad_sd_hpa_km;     /* sd of each component of the day's pressure gradient */
    double grad_rot_sd_deg_h;  /* sd of the rate at which the gradient turns */
    double drift_sd_pa_h;      /* sd of a rover's drift rate, new each day */
    double jump_sd_pa;         /* sd of a rover's offset change between days */
    double warming_k;          /* rover thermometer warming while walking */
    int front_day;             /* a pressure front passes on this day (0: none) */
    double front_pa;
    int open_tracks;           /* every third track ends at its last station */
} variant;

static const variant variants[] = {
    {"network", 2, 2, 9, 3, 3.0, 1.0, 0.01, 0.0, 4.0, 3.0, 2.5, 0, 0.0, 0},
    {"network-hard", 4, 3, 30, 4, 4.5, 1.4, 0.03, 15.0, 8.0, 6.0, 4.0, 2, -150.0, 1},
};

static const char *const control_names[] = {"BM-HOLM", "BM-TARN", "BM-RIGG", "BM-SCAR"};

typedef struct station {
    char name[16];
    double e_km, n_km, h_m, sigma_m;   /* sigma_m > 0: a control mark */
    int n_occ;
} station;

/* One standing of a rover: at a station, or beside the base (the first and
 * last of a loop). Times are whole Unix seconds. */
typedef struct visit {
    int st;
    double t_on, t_off;
    double aside_e_m, aside_n_m;   /* where the sensor stands from the mark */
    double bump_m, lateral_m;      /* shape of the walk to the next visit */
    int waypoint;
} visit;

/* One rover on one day. */
typedef struct loop {
    int day, rover, n;
    int open;                       /* no co-location at the end: the track stops at its last station */
    visit v[MAX_VISITS];
    double off_pa, drift_pa_h, noise_pa;
    double cen_e_km, cen_n_km;      /* where its own stations lie */
} loop;

typedef struct network {
    variant var;
    int dt_s, mislabel;
    uint64_t seed;
    station st[MAX_STATIONS];
    int n_st;
    loop *lp;
    int n_loops;
    scenario day[MAX_DAYS];
    int bad_loop, bad_visit, bad_station;   /* the mislabelled occupation, or -1 */
} network;

static double terrain_m(const network *nw, double e_km, double n_km)
{
    /* an invented landscape: a tilted moor with a ridge and a valley */
    return nw->var.relief * (55.0 * e_km + 30.0 * n_km + 70.0 * sin(0.9 * e_km + 0.4) * cos(0.7 * n_km - 0.3) +
                             35.0 * sin(1.7 * n_km + 1.1));
}

static double dist_km(double e1, double n1, double e2, double n2)
{
    return hypot(e1 - e2, n1 - n2);
}

static double round_mm(double h)
{
    return floor(h * 1000.0 + 0.5) / 1000.0;
}

/* --- the stations --- */

static int far_enough(const network *nw, double e, double n, double min_km)
{
    for (int k = 0; k < nw->n_st; k++)
        if (dist_km(e, n, nw->st[k].e_km, nw->st[k].n_km) < min_km)
            return 0;
    return 1;
}

static void add_station(network *nw, const char *name, double e, double n, double sigma)
{
    station *s = &nw->st[nw->n_st++];
    snprintf(s->name, sizeof s->name, "%s", name);
    s->e_km = e, s->n_km = n, s->sigma_m = sigma;
    s->h_m = nw->day[0].base_h;
    if (e != 0.0 || n != 0.0)
        s->h_m = round_mm(nw->day[0].base_h + terrain_m(nw, e, n) - terrain_m(nw, 0, 0) + 12.0 * nrand());
    s->n_occ = 0;
}

static double angle_of(const station *s)
{
    return atan2(s->n_km, s->e_km);
}

static int by_angle(const void *a, const void *b)
{
    double x = angle_of(a), y = angle_of(b);
    return (x > y) - (x < y);
}

/* Control marks first (the base mark at the origin), then the stations to
 * be determined, numbered by their bearing from the base. */
static void make_stations(network *nw)
{
    const variant *v = &nw->var;
    add_station(nw, control_names[0], 0.0, 0.0, 0.010);
    double rot = 2.0 * M_PI * urand();
    for (int c = 1; c < v->controls; c++) {
        double a = rot + 2.0 * M_PI * c / (v->controls - 1), r = v->radius_km * (0.5 + 0.4 * urand());
        add_station(nw, control_names[c], r * cos(a), r * sin(a), 0.020);
    }
    double min_km = 0.3;
    int first = nw->n_st, tries = 0;
    while (nw->n_st < first + v->stations) {
        double r = v->radius_km * sqrt(0.05 + 0.95 * urand()), a = 2.0 * M_PI * urand();
        double e = r * cos(a), n = r * sin(a);
        if (far_enough(nw, e, n, min_km)) {
            add_station(nw, "", e, n, 0.0);
            tries = 0;
        } else if (++tries > 2000) {
            min_km *= 0.8, tries = 0;   /* a crowded area: stations closer together */
        }
    }
    qsort(&nw->st[first], (size_t)v->stations, sizeof nw->st[0], by_angle);
    for (int k = first; k < nw->n_st; k++)
        snprintf(nw->st[k].name, sizeof nw->st[k].name, v->stations < 100 ? "GR%02d" : "GR%03d", k - first + 1);
}

/* --- which rover occupies which station on which day --- */

static int in_loop(const loop *l, int st)
{
    for (int k = 0; k < l->n; k++)
        if (l->v[k].st == st)
            return 1;
    return 0;
}

static void loop_add(loop *l, network *nw, int st)
{
    memset(&l->v[l->n], 0, sizeof l->v[0]);
    l->v[l->n++].st = st;
    nw->st[st].n_occ++;
}

/* The cost of adding station st to loop l: another day and another rover
 * than its other occupations first, then a loop nearby and not yet long. */
static double add_cost(const network *nw, int l, int st)
{
    const loop *a = &nw->lp[l];
    const station *s = &nw->st[st];
    double c = 10.0 * dist_km(s->e_km, s->n_km, a->cen_e_km, a->cen_n_km) + 10.0 * a->n;
    for (int k = 0; k < nw->n_loops; k++) {
        if (k == l || !in_loop(&nw->lp[k], st))
            continue;
        c += nw->lp[k].day == a->day ? 100.0 : 0.0;
        c += nw->lp[k].rover == a->rover ? 50.0 : 0.0;
    }
    return c;
}

static void add_occupation(network *nw, int st)
{
    int best = -1;
    double best_c = 0;
    for (int l = 0; l < nw->n_loops; l++) {
        if (in_loop(&nw->lp[l], st) || nw->lp[l].n >= MAX_VISITS - 2)
            continue;
        double c = add_cost(nw, l, st);
        if (best < 0 || c < best_c)
            best = l, best_c = c;
    }
    if (best >= 0)
        loop_add(&nw->lp[best], nw, st);
}

static void centroids(network *nw)
{
    for (int l = 0; l < nw->n_loops; l++) {
        loop *a = &nw->lp[l];
        double e = 0, n = 0;
        for (int k = 0; k < a->n; k++)
            e += nw->st[a->v[k].st].e_km, n += nw->st[a->v[k].st].n_km;
        a->cen_e_km = a->n ? e / a->n : 0.0;
        a->cen_n_km = a->n ? n / a->n : 0.0;
    }
}

/* Each loop gets a sector of stations (by bearing); then about 40 % of the
 * stations get a second occupation and a third of those a third, each by
 * another rover on another day where the survey has them; the control
 * marks other than the base are visited by several loops. */
static void assign(network *nw)
{
    const variant *v = &nw->var;
    int first = v->controls, L = nw->n_loops;
    for (int k = 0; k < v->stations; k++)
        loop_add(&nw->lp[(int)((long)k * L / v->stations)], nw, first + k);
    centroids(nw);
    int order[MAX_STATIONS];
    for (int k = 0; k < v->stations; k++)
        order[k] = first + k;
    for (int k = v->stations - 1; k > 0; k--) {   /* Fisher-Yates */
        int j = (int)(urand() * (k + 1)), t = order[k];
        order[k] = order[j], order[j] = t;
    }
    int n_rep = L > 1 ? (int)floor(0.4 * v->stations + 0.5) : 0;
    for (int k = 0; k < n_rep; k++)
        add_occupation(nw, order[k]);
    for (int k = 0; k < n_rep / 3; k++)
        add_occupation(nw, order[k]);
    for (int c = 1; c < v->controls; c++) {
        int visits = c == 1 ? (L + 1) / 2 : (L + 2) / 3;
        for (int k = 0; k < (visits < 1 ? 1 : visits); k++)
            add_occupation(nw, c);
    }
    for (int l = 0; l < L; l++)   /* a loop still empty visits a control mark */
        if (nw->lp[l].n == 0 && v->controls > 1)
            loop_add(&nw->lp[l], nw, 1 + l % (v->controls - 1));
}

/* An open track ends on a control mark or a station occupied again
 * elsewhere (the last in walking order), so its drift stays tied. */
static void end_on_tied_station(const network *nw, loop *l)
{
    for (int k = l->n - 1; k >= 0; k--) {
        const station *s = &nw->st[l->v[k].st];
        if (s->sigma_m > 0 || s->n_occ >= 2) {
            visit t = l->v[k];
            memmove(&l->v[k], &l->v[k + 1], (size_t)(l->n - 1 - k) * sizeof l->v[0]);
            l->v[l->n - 1] = t;
            return;
        }
    }
}

/* Visits in walking order: nearest station next, from the base. */
static void order_loop(network *nw, loop *l)
{
    double e = 0, n = 0;
    for (int k = 0; k < l->n; k++) {
        int best = k;
        for (int j = k + 1; j < l->n; j++)
            if (dist_km(e, n, nw->st[l->v[j].st].e_km, nw->st[l->v[j].st].n_km) <
                dist_km(e, n, nw->st[l->v[best].st].e_km, nw->st[l->v[best].st].n_km))
                best = j;
        visit t = l->v[k];
        l->v[k] = l->v[best], l->v[best] = t;
        e = nw->st[l->v[k].st].e_km, n = nw->st[l->v[k].st].n_km;
    }
    if (l->open)
        end_on_tied_station(nw, l);
    /* the co-locations beside the base open (and unless open, close) the day */
    memmove(&l->v[1], &l->v[0], (size_t)l->n * sizeof l->v[0]);
    memset(&l->v[0], 0, sizeof l->v[0]);
    l->n++;
    if (!l->open)
        memset(&l->v[l->n++], 0, sizeof l->v[0]);
}

static int is_coloc(const loop *l, int k)
{
    return k == 0 || (k == l->n - 1 && !l->open);
}

/* --- the timetable --- */

static double walk_s(const network *nw, const visit *a, const visit *b)
{
    const station *s = &nw->st[a->st], *t = &nw->st[b->st];
    double d_m = 1000.0 * dist_km(s->e_km, s->n_km, t->e_km, t->n_km), climb = t->h_m - s->h_m;
    /* 1.2 m/s on a path 15 % longer than the straight line, 4 s per metre
     * climbed, 30 s to pack up (common practice, no source) */
    return floor(d_m * 1.15 / 1.2 + (climb > 0 ? 4.0 * climb : 0.0) + 30.0 + 0.5);
}

static void timetable(network *nw, loop *l)
{
    double t = T0_DAY1 + DAY_S * l->day + 300.0 * l->rover;
    for (int k = 0; k < l->n; k++) {
        visit *v = &l->v[k];
        int coloc = is_coloc(l, k);
        if (k > 0)
            t += walk_s(nw, &l->v[k - 1], v);
        v->t_on = t;
        t += floor((coloc ? 720.0 + 180.0 * urand() : 300.0 + 300.0 * urand()) + 0.5);
        v->t_off = t;
        double a = 2.0 * M_PI * urand(), r = coloc ? 1.5 + 0.5 * urand() : 0.5 + 1.5 * urand();
        v->aside_e_m = r * cos(a), v->aside_n_m = r * sin(a);
        v->bump_m = 15.0 * nrand();
        v->lateral_m = 40.0 * nrand();
        v->waypoint = !coloc && urand() < 0.5;
    }
    /* the track ends on a whole sampling interval after its start */
    visit *last = &l->v[l->n - 1];
    double span = last->t_off - l->v[0].t_on;
    last->t_off = l->v[0].t_on + ceil(span / nw->dt_s) * nw->dt_s;
}

static void instruments(network *nw)
{
    const variant *v = &nw->var;
    for (int r = 0; r < v->rovers; r++) {
        double off = 40.0 * nrand(), noise = 2.0 + urand();
        for (int d = 0; d < v->days; d++) {
            loop *l = &nw->lp[d * v->rovers + r];
            if (d > 0)
                off += v->jump_sd_pa * nrand();
            l->off_pa = floor(off * 100.0 + 0.5) / 100.0;
            l->drift_pa_h = floor(v->drift_sd_pa_h * nrand() * 100.0 + 0.5) / 100.0;
            l->noise_pa = floor(noise * 100.0 + 0.5) / 100.0;
        }
    }
}

/* Each day its own weather in the single-day scenarios' model atmosphere. */
static void weather(network *nw)
{
    const variant *v = &nw->var;
    for (int d = 0; d < v->days; d++) {
        scenario *w = &nw->day[d];
        w->name = v->name;
        w->lat0 = 46.95, w->lon0 = 10.40, w->base_h = 640.0;
        w->t0 = T0_DAY1 + DAY_S * d;
        w->rover_dt = nw->dt_s, w->base_dt = 30.0;
        w->slp_pa = floor(101300.0 + 400.0 * nrand() + 0.5);
        w->trend_pa_h = floor(40.0 * nrand() + 0.5) / 100.0;   /* hPa/h, as the scenarios hold it */
        w->grad_pa_km_e = floor(v->grad_sd_hpa_km * nrand() * 1e4 + 0.5) / 1e4;   /* hPa/km */
        w->grad_pa_km_n = floor(v->grad_sd_hpa_km * nrand() * 1e4 + 0.5) / 1e4;
        w->grad_rot_deg_h = floor(v->grad_rot_sd_deg_h * nrand() * 10.0 + 0.5) / 10.0;
        w->t_sl_k = floor((290.0 + 2.0 * nrand()) * 10.0 + 0.5) / 10.0;
        w->lapse_k_km = floor((-6.3 + 0.5 * nrand()) * 10.0 + 0.5) / 10.0;
        w->diurnal_k = 3.0;
        w->rh_sl = floor(60.0 + 15.0 * urand() + 0.5), w->rh_lapse_km = -8.0;
        w->base_noise_pa = 1.2, w->base_q_pa = 1.0, w->rover_q_pa = 1.0;
        w->body_warming_k = v->warming_k;
        w->gnss_sd_m = 4.0, w->gnss_tau_s = 400.0;
        if (v->front_day == d + 1) {
            w->front_pa = v->front_pa, w->front_kmh = 25.0, w->front_dir_deg = floor(360.0 * urand());
            w->front_t_s = 3.0 * 3600.0, w->front_km = 8.0;
        }
    }
}

/* The wrong booking for --mislabel, chosen in every run so the other files
 * do not depend on the option: an occupation of a station occupied more
 * than once (so it keeps an observation), with no waypoint (nothing in the
 * track contradicts the book), booked to a station more than 30 m higher
 * or lower that is a control mark or occupied twice or more (so the wrong
 * observation is outvoted). */
static void choose_mislabel(network *nw)
{
    int cand[4096][2], n = 0;
    nw->bad_loop = nw->bad_visit = nw->bad_station = -1;
    for (int l = 0; l < nw->n_loops; l++)
        for (int k = 1; k < nw->lp[l].n && n < 4096; k++) {
            if (is_coloc(&nw->lp[l], k))
                continue;
            const visit *v = &nw->lp[l].v[k];
            if (nw->st[v->st].sigma_m == 0.0 && nw->st[v->st].n_occ >= 2)
                cand[n][0] = l, cand[n][1] = k, n++;
        }
    double u1 = urand(), u2 = urand();
    if (n == 0)
        return;
    int pick = (int)(u1 * n), l = cand[pick][0], k = cand[pick][1];
    const station *truth = &nw->st[nw->lp[l].v[k].st];
    int wrong[MAX_STATIONS], m = 0;
    for (int s = 1; s < nw->n_st; s++)
        if (fabs(nw->st[s].h_m - truth->h_m) > 30.0 && (nw->st[s].sigma_m > 0 || nw->st[s].n_occ >= 2))
            wrong[m++] = s;
    if (m == 0)
        return;
    nw->bad_loop = l, nw->bad_visit = k, nw->bad_station = wrong[(int)(u2 * m)];
    nw->lp[l].v[k].waypoint = 0;
}

static int plan(network *nw)
{
    const variant *v = &nw->var;
    weather(nw);
    make_stations(nw);
    nw->n_loops = v->days * v->rovers;
    nw->lp = calloc((size_t)nw->n_loops, sizeof *nw->lp);
    if (!nw->lp) {
        fprintf(stderr, "hypsim: out of memory\n");
        return 1;
    }
    for (int l = 0; l < nw->n_loops; l++) {
        nw->lp[l].day = l / v->rovers, nw->lp[l].rover = l % v->rovers;
        nw->lp[l].open = v->open_tracks && (nw->lp[l].day + nw->lp[l].rover) % 3 == 2;
    }
    assign(nw);
    for (int l = 0; l < nw->n_loops; l++) {
        order_loop(nw, &nw->lp[l]);
        timetable(nw, &nw->lp[l]);
        double len_h = (nw->lp[l].v[nw->lp[l].n - 1].t_off - nw->lp[l].v[0].t_on) / 3600.0;
        if (len_h > 14.0) {
            fprintf(stderr, "hypsim: a rover's day would last %.1f h: use more days or rovers\n", len_h);
            return 1;
        }
    }
    instruments(nw);
    choose_mislabel(nw);
    if (nw->mislabel && nw->bad_station < 0) {
        fprintf(stderr, "hypsim: --mislabel: no occupation of this survey can be mislabelled (too few stations)\n");
        return 1;
    }
    return 0;
}

/* --- where a rover is --- */

/* Standing k of rover loop ctx (a rover_ctx). */
typedef struct rover_ctx { const network *nw; const loop *l; } rover_ctx;

static sim_standing rover_standing(const void *ctx, int k)
{
    const rover_ctx *r = ctx;
    const visit *v = &r->l->v[k];
    const station *s = &r->nw->st[v->st];
    sim_standing a = {s->e_km + v->aside_e_m / 1000.0, s->n_km + v->aside_n_m / 1000.0, s->h_m, v->t_on, v->t_off,
                      v->bump_m, v->lateral_m};
    return a;
}

static sim_where rover_at(const void *ctx, double t)
{
    const rover_ctx *r = ctx;
    return sim_where_at(rover_standing, r, r->l->n, t);
}

static double rover_pressure(const void *ctx, sim_where at, double t)
{
    const rover_ctx *r = ctx;
    const scenario *w = &r->nw->day[r->l->day];
    double lat, lon;
    latlon(w, at.e_km, at.n_km, &lat, &lon);
    return true_pressure(w, lat, at.e_km, at.n_km, at.z_m, t);
}

/* --- writing --- */

static void rover_name(const loop *l, char *buf, size_t n)
{
    snprintf(buf, n, "r%c-day%d", 'a' + l->rover, l->day + 1);
}

/* The track's samples (sim_sample_track) every --dt seconds. */
static sim_fix *sample_track(const network *nw, const loop *l, size_t *count)
{
    rover_ctx r = {nw, l};
    sim_track_src src = {&nw->day[l->day], l->v[0].t_on, l->v[l->n - 1].t_off, nw->dt_s, l->off_pa, 0.0,
                         l->drift_pa_h, l->noise_pa, rover_at, rover_pressure, &r};
    return sim_sample_track(&src, count);
}

static int write_track(const network *nw, const loop *l, const char *dir)
{
    char name[64], file[80], title[160], ts[40];
    rover_name(l, name, sizeof name);
    snprintf(file, sizeof file, "%s.gpx", name);
    snprintf(title, sizeof title, "simulated station survey (%s), rover %c, day %d", nw->var.name, 'a' + l->rover,
             l->day + 1);
    size_t n;
    sim_fix *f = sample_track(nw, l, &n);
    FILE *g = f ? sim_gpx_open(dir, file, title) : NULL;
    if (!g) {
        free(f);
        return 1;
    }
    for (int k = 1; k < l->n; k++) {
        const visit *v = &l->v[k];
        if (!v->waypoint || is_coloc(l, k))
            continue;
        double mid = floor(0.5 * (v->t_on + v->t_off));
        size_t i = (size_t)floor((mid - f[0].time) / nw->dt_s + 0.5);
        iso(mid, ts, sizeof ts);
        fprintf(g, "  <wpt lat=\"%.7f\" lon=\"%.7f\"><time>%s</time><name>%s</name></wpt>\n", f[i].lat, f[i].lon, ts,
                nw->st[v->st].name);
    }
    int bad = sim_gpx_finish(g, name, f, n);
    free(f);
    return bad;
}

/* The base logger on the base mark (sensor at the mark's height), from half
 * an hour before the first rover starts to half an hour after the last
 * ends; no offset, 1.2 Pa noise, 1 Pa steps, its clock right. */
static int write_base_day(const network *nw, int d, const char *dir)
{
    const scenario *w = &nw->day[d];
    double t_end = 0;
    for (int l = 0; l < nw->n_loops; l++)
        if (nw->lp[l].day == d && nw->lp[l].v[nw->lp[l].n - 1].t_off > t_end)
            t_end = nw->lp[l].v[nw->lp[l].n - 1].t_off;
    char file[32], ts[40];
    snprintf(file, sizeof file, "base-day%d.csv", d + 1);
    FILE *f = open_out(dir, file);
    if (!f)
        return 1;
    fprintf(f, "# base logger on %s, day %d (simulated, %s)\n", nw->st[0].name, d + 1, nw->var.name);
    fprintf(f, "time,pressure [hPa],temperature [degC],humidity [%%]\n");
    for (double t = w->t0 - 1800.0; t <= t_end + 1800.0; t += w->base_dt) {
        double p = true_pressure(w, w->lat0, 0, 0, w->base_h, t);
        double pm = quant(p + w->base_noise_pa * nrand(), w->base_q_pa);
        double tk = air_temp(w, w->base_h, t) + 0.2 * nrand();
        iso(t, ts, sizeof ts);
        fprintf(f, "%s,%.2f,%.2f,%.1f\n", ts, pm / 100.0, tk - 273.15, air_rh(w, w->base_h));
    }
    return fclose(f) != 0;
}

static int write_stations(const network *nw, const char *dir)
{
    static sim_mark m[MAX_STATIONS];
    for (int k = 0; k < nw->n_st; k++) {
        const station *s = &nw->st[k];
        m[k].name = s->name, m[k].h_m = s->h_m, m[k].sigma_m = s->sigma_m;
        latlon(&nw->day[0], s->e_km, s->n_km, &m[k].lat, &m[k].lon);
    }
    int bad = sim_write_stations(dir, m, nw->n_st);
    FILE *b = bad ? NULL : open_out(dir, "bases.csv");
    if (!b)
        return 1;
    fprintf(b, "file,height,lat,lon,clock_offset,kind\n");
    for (int d = 0; d < nw->var.days; d++)
        fprintf(b, "base-day%d.csv,%.3f,%.7f,%.7f,0,station\n", d + 1, nw->st[0].h_m, nw->day[0].lat0,
                nw->day[0].lon0);
    return fclose(b) != 0;
}

static int write_occupations(const network *nw, const char *dir)
{
    FILE *fb, *tr;
    int bad = sim_occupations_open(dir, &fb, &tr), line = 1;
    FILE *ml = nw->mislabel ? open_out(dir, "truth-mislabel.txt") : NULL;
    bad |= nw->mislabel && !ml;
    if (!bad)
        for (int l = 0; l < nw->n_loops; l++)
            for (int k = 0; k < nw->lp[l].n; k++) {
                const visit *v = &nw->lp[l].v[k];
                char name[64];
                rover_name(&nw->lp[l], name, sizeof name);
                int wrong = nw->mislabel && l == nw->bad_loop && k == nw->bad_visit;
                const station *bk = &nw->st[wrong ? nw->bad_station : v->st], *st = &nw->st[v->st];
                line++;
                sim_occupation_row(fb, tr, bk->name, st->name, name, v->t_on, v->t_off);
                if (wrong) {
                    char a[40], b[40];
                    double s, e;
                    sim_booked(v->t_on, v->t_off, &s, &e);
                    iso(s, a, sizeof a), iso(e, b, sizeof b);
                    fprintf(ml, "fieldbook_line %d\nbooked_station %s\ntrue_station %s\nrover %s\nstart %s\nend %s\n"
                                "height_difference_m %.3f\n",
                            line, bk->name, st->name, name, a, b, bk->h_m - st->h_m);
                }
            }
    bad |= sim_close(fb);
    bad |= sim_close(tr);
    bad |= sim_close(ml);
    return bad;
}

static void write_day_params(const network *nw, FILE *f, int d)
{
    const scenario *w = &nw->day[d];
    char ts[40];
    iso(w->t0, ts, sizeof ts);
    fprintf(f, "day%d_start %s\nday%d_sea_level_pressure_pa %.1f\nday%d_trend_pa_per_h %.1f\n"
               "day%d_gradient_east_pa_per_km %.2f\nday%d_gradient_north_pa_per_km %.2f\n"
               "day%d_gradient_turn_deg_per_h %.1f\nday%d_sea_level_temp_k %.1f\nday%d_lapse_k_per_km %.1f\n"
               "day%d_diurnal_k %.1f\nday%d_rh_sea_level_pct %.0f\nday%d_front_pa %.1f\n",
            d + 1, ts, d + 1, w->slp_pa, d + 1, w->trend_pa_h * 100.0, d + 1, w->grad_pa_km_e * 100.0, d + 1,
            w->grad_pa_km_n * 100.0, d + 1, w->grad_rot_deg_h, d + 1, w->t_sl_k, d + 1, w->lapse_k_km, d + 1,
            w->diurnal_k, d + 1, w->rh_sl, d + 1, w->front_pa);
}

static int write_params(const network *nw, const char *dir)
{
    FILE *f = open_out(dir, "scenario.txt");
    if (!f)
        return 1;
    const scenario *w = &nw->day[0];
    int n_occ = 0, n_rep = 0;
    for (int l = 0; l < nw->n_loops; l++)
        n_occ += nw->lp[l].n;
    for (int k = nw->var.controls; k < nw->n_st; k++)
        n_rep += nw->st[k].n_occ >= 2;
    fprintf(f, "scenario %s\nseed %llu\ndays %d\nrovers %d\nstations %d\ncontrol_marks %d\nbase_mark %s\n"
               "base_height_m %.3f\nbase_lat %.6f\nbase_lon %.6f\nbase_offset_pa 0.00\nbase_noise_pa %.2f\n"
               "base_quantum_pa %.2f\nbase_dt_s %.0f\nbase_clock_s 0.0\nrover_dt_s %d\nrover_quantum_pa %.2f\n"
               "rover_body_warming_k %.1f\ngnss_horizontal_sd_m 2.0\ngnss_horizontal_tau_s 120\n"
               "gnss_height_sd_m %.1f\ngnss_height_tau_s %.0f\noccupations %d\nrepeated_stations %d\n",
            nw->var.name, (unsigned long long)nw->seed, nw->var.days, nw->var.rovers, nw->n_st, nw->var.controls,
            nw->st[0].name, nw->st[0].h_m, w->lat0, w->lon0, w->base_noise_pa, w->base_q_pa, w->base_dt, nw->dt_s,
            w->rover_q_pa, w->body_warming_k, w->gnss_sd_m, w->gnss_tau_s, n_occ, n_rep);
    for (int d = 0; d < nw->var.days; d++)
        write_day_params(nw, f, d);
    for (int l = 0; l < nw->n_loops; l++) {
        const loop *a = &nw->lp[l];
        char name[64];
        rover_name(a, name, sizeof name);
        sim_sensor_params(f, name, a->off_pa, a->drift_pa_h, a->noise_pa, a->v[0].t_on, a->v[a->n - 1].t_off);
        fprintf(f, "%s_ends_beside_base %d\n", name, !a->open);
    }
    return fclose(f) != 0;
}

/* --- options --- */

static int int_option(const char *opt, const char *text, int lo, int hi, int *out)
{
    char *end;
    long v = strtol(text, &end, 10);
    if (*text == '\0' || *end != '\0' || v < lo || v > hi) {
        fprintf(stderr, "hypsim: %s \"%s\": expected a whole number from %d to %d\n", opt, text, lo, hi);
        return 1;
    }
    *out = (int)v;
    return 0;
}

static int parse(network *nw, int argc, char **argv)
{
    for (int k = 2; k < argc; k++) {
        const char *o = argv[k], *val = k + 1 < argc ? argv[k + 1] : NULL;
        int bad = 0;
        if (strcmp(o, "--mislabel") == 0) {
            nw->mislabel = 1;
            continue;
        }
        if (strcmp(o, "--open-tracks") == 0) {
            nw->var.open_tracks = 1;
            continue;
        }
        if (!val) {
            fprintf(stderr, "hypsim: %s needs a value\n", o);
            return 1;
        }
        if (strcmp(o, "--seed") == 0) {
            char *end;
            nw->seed = strtoull(val, &end, 10);
            bad = *val == '\0' || *end != '\0';
            if (bad)
                fprintf(stderr, "hypsim: --seed \"%s\": expected a whole number\n", val);
        } else if (strcmp(o, "--days") == 0)
            bad = int_option(o, val, 1, MAX_DAYS, &nw->var.days);
        else if (strcmp(o, "--rovers") == 0)
            bad = int_option(o, val, 1, MAX_ROVERS, &nw->var.rovers);
        else if (strcmp(o, "--stations") == 0)
            bad = int_option(o, val, 1, MAX_STATIONS - 4, &nw->var.stations);
        else if (strcmp(o, "--dt") == 0)
            bad = int_option(o, val, 1, 60, &nw->dt_s);
        else {
            fprintf(stderr, "hypsim: unknown option %s\n", o);
            return 1;
        }
        if (bad)
            return 1;
        k++;
    }
    if (nw->var.stations > PER_LOOP * nw->var.days * nw->var.rovers) {
        fprintf(stderr, "hypsim: %d stations need more days or rovers (at most %d a rover and day)\n",
                nw->var.stations, PER_LOOP);
        return 1;
    }
    return 0;
}

int sim_network_main(int argc, char **argv)
{
    if (argc < 2) {
        fprintf(stderr, "usage: hypsim %s OUTDIR [--seed N] [--days D] [--rovers R] [--stations S] [--dt S] "
                        "[--mislabel] [--open-tracks]\n", argv[0]);
        return 2;
    }
    static network nw;   /* large: not on the stack */
    memset(&nw, 0, sizeof nw);
    for (size_t i = 0; i < sizeof variants / sizeof variants[0]; i++)
        if (strcmp(argv[0], variants[i].name) == 0)
            nw.var = variants[i];
    nw.dt_s = 10;
    if (parse(&nw, argc, argv))
        return 2;
    sim_seed(nw.seed);
    const char *dir = argv[1];
    mkdir(dir, 0777);   /* an existing folder is fine; open_out reports any other problem */
    int bad = plan(&nw);
    for (int d = 0; !bad && d < nw.var.days; d++) {
        bad = write_base_day(&nw, d, dir);
        for (int l = 0; !bad && l < nw.n_loops; l++)
            if (nw.lp[l].day == d)
                bad = write_track(&nw, &nw.lp[l], dir);
    }
    if (!bad)
        bad = write_stations(&nw, dir) || write_occupations(&nw, dir) || write_params(&nw, dir);
    free(nw.lp);
    return bad ? 1 : 0;
}
