/* leapfrog.c - the simulator's surveys without a base logger: a leapfrog
 * traverse with two barometers between two known marks, and a loop with one
 * barometer that comes back to stations already occupied. The pressures come
 * from hypsim.c's model atmosphere (RK4 through the hydrostatic equation)
 * with a weather change that is not linear in time; the sensors get offsets,
 * drifts, white noise, quantisation and body warming as in network.c.
 * Nothing is shared with the library. Everything (place, marks, crew) is
 * invented.
 *
 *   hypsim leapfrog OUTDIR [--seed N] [--index-error PA]
 *       ten stations LF01..LF10 on a traverse between the known marks
 *       BM-QUARN and BM-TOLVE; instruments ra and rb start side by side on
 *       BM-QUARN, then advance in turn (ra to LF01 while rb waits on
 *       BM-QUARN, rb to LF02 while ra waits on LF01, ra to LF03, ...) and
 *       both read for some minutes after each arrival; they end side by
 *       side on BM-TOLVE. --index-error adds PA (Pa) to rb's offset and
 *       changes nothing else (the same random numbers are drawn).
 *   hypsim loop OUTDIR [--seed N] [--singular]
 *       one instrument ra walks BM-MIRKAL, LP01, LP02, LP01, LP03, LP02,
 *       BM-DENHOW, LP03, LP04, LP05, LP04, LP06, LP05, LP06, BM-MIRKAL: six
 *       stations, each occupied twice with other stations in between, and
 *       two known marks, one of them at both ends. --singular writes
 *       stations.csv with no height at all (no known mark: a design that
 *       cannot fix any height) and changes nothing else.
 *
 * Files written to OUTDIR (CSV with a header line; times ISO 8601 UTC, "Z"),
 * as hypsim network writes them, with no base log:
 *   stations.csv   name,lat,lon,height,sigma (degrees WGS84; height m above
 *                  the EGM96 geoid and sigma m, control marks only)
 *   truth.csv      name,height: the true height (m) of every station
 *   ra.gpx, rb.gpx the instruments' tracks: GPX 1.1, a point every 10 s
 *                  with the GNSS position and height and the logger's
 *                  pressure (hPa) and temperature (degC) in extensions
 *   fieldbook.csv  station,rover,start,end: every occupation as booked
 *                  (whole minutes at least 15 s inside the true window),
 *                  by rover, then time
 *   occupations-truth.csv  the same occupations, line for line, with their
 *                  true windows (to the second)
 *   weather-truth.csv  time,pressure_hpa,temperature_degc: the true air
 *                  pressure and temperature on the first known mark every
 *                  60 s (for checking the simulator; no instrument reads it)
 *   scenario.txt   the parameters, "key value" lines
 *
 * A sensor reads true pressure + offset + drift x hours since its track's
 * first point + white noise, quantised to 1 Pa. */
#define _DEFAULT_SOURCE
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "sim.h"
#include "sim_write.h"

#define LF_MAX_ST 16
#define LF_MAX_OCC 16
#define LF_T0 1791270000.0        /* 2026-10-06T07:00:00Z (GNU date -u -d @1791270000) */
#define LF_DT_S 10.0              /* sampling interval of the tracks, s */
#define WALK_STEP_S 60.0          /* grid of the weather's random walk, s */
#define WALK_N 1200               /* 20 h of it */

typedef struct lf_station {
    char name[16];
    double e_km, n_km, h_m;
    int control;
} lf_station;

/* One standing of an instrument; times are whole Unix seconds. */
typedef struct lf_occ {
    int st;
    double t_on, t_off;
    double aside_e_m, aside_n_m;   /* where the sensor stands from the mark */
    double bump_m, lateral_m;      /* shape of the walk to the next standing */
} lf_occ;

typedef struct lf_inst {
    char name[8];
    double off_pa, drift_pa_h, noise_pa;
    lf_occ oc[LF_MAX_OCC];
    int n;
} lf_inst;

typedef struct lf_survey {
    const char *kind;              /* "leapfrog" or "loop" */
    uint64_t seed;
    double index_error_pa;         /* leapfrog: added to rb's offset */
    int singular;                  /* loop: no known mark in stations.csv */
    scenario w;
    double tide_pa, walk_pa_sqrt_h;
    double walk[WALK_N];           /* the weather's random walk, Pa, from w.t0 - 1 h */
    lf_station st[LF_MAX_ST];
    int n_st;
    lf_inst in[2];
    int n_in;
} lf_survey;

static double round_to(double v, double q)
{
    return floor(v / q + 0.5) * q;
}

/* --- the weather --- */

/* What the area's sea-level pressure does besides the scenario's linear
 * trend and gradient: the solar semidiurnal tide, amplitude about
 * 1.16 cos^3(latitude) hPa with maxima near 10 and 22 h local solar time
 * (Haurwitz 1956, as given by Chapman & Lindzen, "Atmospheric Tides", 1970;
 * from memory), and a random walk (WALK_STEP_S steps, linear between). */
static double weather_extra_pa(const lf_survey *s, double t)
{
    double solar_h = fmod(t / 3600.0 + s->w.lon0 / 15.0, 24.0);
    double tide = s->tide_pa * cos(2.0 * M_PI * (solar_h - 10.0) / 12.0);
    double x = (t - (s->w.t0 - 3600.0)) / WALK_STEP_S;
    int i = (int)floor(x);
    if (i < 0)
        i = 0, x = 0;
    if (i >= WALK_N - 1)
        i = WALK_N - 2, x = WALK_N - 1;
    return tide + s->walk[i] + (x - i) * (s->walk[i + 1] - s->walk[i]);
}

static double pressure_at(const lf_survey *s, double e_km, double n_km, double z, double t)
{
    scenario w = s->w;
    w.slp_pa += weather_extra_pa(s, t);
    double lat, lon;
    latlon(&w, e_km, n_km, &lat, &lon);
    return true_pressure(&w, lat, e_km, n_km, z, t);
}

static void weather(lf_survey *s)
{
    scenario *w = &s->w;
    memset(w, 0, sizeof *w);
    w->name = s->kind;
    w->lat0 = 47.21, w->lon0 = 11.37;
    w->t0 = LF_T0;
    w->rover_dt = LF_DT_S, w->base_dt = 30.0;
    w->slp_pa = round_to(101300.0 + 400.0 * nrand(), 1.0);
    w->trend_pa_h = round_to(0.5 * nrand(), 0.01);   /* hPa/h, as the scenarios hold it */
    /* a horizontal gradient of 2 to 4 hPa/100 km, any direction */
    double g = 0.02 + 0.02 * urand(), a = 2.0 * M_PI * urand();
    w->grad_pa_km_e = round_to(g * sin(a), 1e-4), w->grad_pa_km_n = round_to(g * cos(a), 1e-4);   /* hPa/km */
    w->t_sl_k = round_to(288.0 + 2.0 * nrand(), 0.1);
    w->lapse_k_km = round_to(-6.3 + 0.5 * nrand(), 0.1);
    w->diurnal_k = 3.0;
    w->rh_sl = floor(60.0 + 15.0 * urand() + 0.5), w->rh_lapse_km = -8.0;
    w->rover_q_pa = 1.0;
    w->body_warming_k = 2.0;
    w->gnss_sd_m = 4.0, w->gnss_tau_s = 400.0;
    s->tide_pa = round_to(116.0 * pow(cos(w->lat0 * M_PI / 180.0), 3.0), 0.1);
    /* 0.15 hPa per square-root hour: a quiet day's irregular pressure
     * change (common practice, no source) */
    s->walk_pa_sqrt_h = 15.0;
    double sd = s->walk_pa_sqrt_h * sqrt(WALK_STEP_S / 3600.0), x = 0.0;
    for (int i = 0; i < WALK_N; i++) {
        s->walk[i] = x;
        x += sd * nrand();
    }
}

/* --- stations and instruments --- */

static void add_station(lf_survey *s, const char *name, double e, double n, double h, int control)
{
    lf_station *p = &s->st[s->n_st++];
    snprintf(p->name, sizeof p->name, "%s", name);
    p->e_km = e, p->n_km = n, p->h_m = round_to(h, 0.001), p->control = control;
}

static void instrument(lf_inst *in, const char *name, double off_mean, double drift_mean)
{
    snprintf(in->name, sizeof in->name, "%s", name);
    in->off_pa = round_to(off_mean + 10.0 * nrand(), 0.01);
    in->drift_pa_h = round_to(drift_mean + 1.0 * nrand(), 0.01);
    in->noise_pa = round_to(2.0 + urand(), 0.01);
    in->n = 0;
}

/* --- the timetable --- */

static double walk_s(const lf_survey *s, int from, int to)
{
    const lf_station *a = &s->st[from], *b = &s->st[to];
    double d_m = 1000.0 * hypot(a->e_km - b->e_km, a->n_km - b->n_km), climb = b->h_m - a->h_m;
    /* 1.2 m/s on a path 15 % longer than the straight line, 4 s per metre
     * climbed, 30 s to pack up (as network.c; common practice, no source) */
    return floor(d_m * 1.15 / 1.2 + (climb > 0 ? 4.0 * climb : 0.0) + 30.0 + 0.5);
}

/* Starts a standing of in at station st at time t (its end set later). */
static lf_occ *stand(lf_inst *in, int st, double t, int side_by_side)
{
    lf_occ *o = &in->oc[in->n++];
    memset(o, 0, sizeof *o);
    o->st = st, o->t_on = t, o->t_off = t;
    double a = 2.0 * M_PI * urand(), r = side_by_side ? 1.5 + 0.5 * urand() : 0.5 + 1.0 * urand();
    o->aside_e_m = r * cos(a), o->aside_n_m = r * sin(a);
    o->bump_m = 15.0 * nrand();
    o->lateral_m = 40.0 * nrand();
    return o;
}

/* Minutes both read after an arrival: 6 to 10 (common practice, no source). */
static double read_s(void)
{
    return floor(360.0 + 240.0 * urand() + 0.5);
}

/* Both on the first mark for 15 to 18 minutes; then each move: the mover
 * packs up and walks to its next station, both read; the other is the next
 * mover. The last two moves bring ra, then rb, to the far mark, where they
 * read side by side for 15 to 18 minutes. */
static void plan_leapfrog(lf_survey *s)
{
    double dir = (50.0 + 20.0 * urand()) * M_PI / 180.0, along = 0.0, phase = 2.0 * M_PI * urand();
    for (int k = 0; k < 12; k++) {
        if (k > 0)
            along += 0.55 + 0.3 * urand();
        double side = k == 0 || k == 11 ? 0.0 : 0.25 * nrand();
        double e = along * sin(dir) + side * cos(dir), n = along * cos(dir) - side * sin(dir);
        double h = 540.0 + 50.0 * along + 150.0 * sin(0.8 * along + phase) + 20.0 * nrand();
        char name[16];
        snprintf(name, sizeof name, "LF%02d", k);
        add_station(s, k == 0 ? "BM-QUARN" : k == 11 ? "BM-TOLVE" : name, e, n, h, k == 0 || k == 11);
    }
    s->n_in = 2;
    instrument(&s->in[0], "ra", 35.0, 4.0);
    instrument(&s->in[1], "rb", -25.0, -3.0);
    double t = s->w.t0;
    lf_occ *cur[2];
    cur[0] = stand(&s->in[0], 0, t, 1);
    cur[1] = stand(&s->in[1], 0, t, 1);
    t += floor(900.0 + 180.0 * urand() + 0.5);
    int at[2] = {0, 0};
    for (int m = 1; m <= 12; m++) {
        int mover = m <= 10 ? (m - 1) % 2 : m - 11, target = m <= 10 ? m : 11;
        cur[mover]->t_off = t;
        t += walk_s(s, at[mover], target);
        cur[mover] = stand(&s->in[mover], target, t, target == 11);
        at[mover] = target;
        t += m == 12 ? floor(900.0 + 180.0 * urand() + 0.5) : read_s();
    }
    cur[0]->t_off = cur[1]->t_off = t;
}

/* The loop's route (station indices; 0 and 1 are the known marks). */
static const int loop_route[] = {0, 2, 3, 2, 4, 3, 1, 4, 5, 6, 5, 7, 6, 7, 0};

static void plan_loop(lf_survey *s)
{
    static const double pos[8][2] = {{0.0, 0.0}, {2.1, 1.9}, {0.8, 0.2}, {1.6, -0.1}, {2.3, 0.9},
                                     {1.3, 2.2}, {0.5, 1.7}, {-0.3, 0.9}};
    static const char *const names[8] = {"BM-MIRKAL", "BM-DENHOW", "LP01", "LP02", "LP03", "LP04", "LP05", "LP06"};
    double phase = 2.0 * M_PI * urand();
    for (int k = 0; k < 8; k++) {
        double e = pos[k][0] + 0.1 * nrand(), n = pos[k][1] + 0.1 * nrand();
        double h = 610.0 + 70.0 * e + 45.0 * n + 60.0 * sin(1.3 * e + phase) + 15.0 * nrand();
        add_station(s, names[k], e, n, h, k < 2);
    }
    s->n_in = 1;
    instrument(&s->in[0], "ra", 30.0, 3.0);
    double t = s->w.t0;
    int n = (int)(sizeof loop_route / sizeof loop_route[0]);
    for (int k = 0; k < n; k++) {
        if (k > 0)
            t += walk_s(s, loop_route[k - 1], loop_route[k]);
        lf_occ *o = stand(&s->in[0], loop_route[k], t, 0);
        t += k == 0 || k == n - 1 ? floor(600.0 + 120.0 * urand() + 0.5) : read_s();
        o->t_off = t;
    }
}

/* --- where an instrument is --- */

/* Standing k of instrument ctx (an lf_at). */
typedef struct lf_at { const lf_survey *s; const lf_inst *in; } lf_at;

static sim_standing inst_standing(const void *ctx, int k)
{
    const lf_at *a = ctx;
    const lf_occ *v = &a->in->oc[k];
    const lf_station *p = &a->s->st[v->st];
    sim_standing r = {p->e_km + v->aside_e_m / 1000.0, p->n_km + v->aside_n_m / 1000.0, p->h_m, v->t_on, v->t_off,
                      v->bump_m, v->lateral_m};
    return r;
}

static sim_where inst_at(const void *ctx, double t)
{
    const lf_at *a = ctx;
    return sim_where_at(inst_standing, a, a->in->n, t);
}

static double inst_pressure(const void *ctx, sim_where at, double t)
{
    const lf_at *a = ctx;
    return pressure_at(a->s, at.e_km, at.n_km, at.z_m, t);
}

/* --- writing --- */

/* The track's samples (sim_sample_track: GNSS errors as network.c) every
 * LF_DT_S. The offset drawn for the instrument is used with index_error
 * added, so --index-error draws the same random numbers. */
static sim_fix *sample_track(const lf_survey *s, const lf_inst *in, double extra_off_pa, size_t *count)
{
    lf_at a = {s, in};
    sim_track_src src = {&s->w, in->oc[0].t_on, in->oc[in->n - 1].t_off, LF_DT_S, in->off_pa, extra_off_pa,
                         in->drift_pa_h, in->noise_pa, inst_at, inst_pressure, &a};
    return sim_sample_track(&src, count);
}

static double extra_offset(const lf_survey *s, int k)
{
    return k == 1 ? s->index_error_pa : 0.0;
}

static int write_track(const lf_survey *s, int k, const char *dir)
{
    const lf_inst *in = &s->in[k];
    char file[32], title[128];
    snprintf(file, sizeof file, "%s.gpx", in->name);
    snprintf(title, sizeof title, "simulated %s survey without a base, instrument %s", s->kind, in->name);
    size_t n;
    sim_fix *f = sample_track(s, in, extra_offset(s, k), &n);
    FILE *g = f ? sim_gpx_open(dir, file, title) : NULL;
    int bad = !g || sim_gpx_finish(g, in->name, f, n);
    free(f);
    return bad;
}

static int write_stations(const lf_survey *s, const char *dir)
{
    sim_mark m[LF_MAX_ST];
    for (int k = 0; k < s->n_st; k++) {
        const lf_station *p = &s->st[k];
        m[k].name = p->name, m[k].h_m = p->h_m;
        m[k].sigma_m = p->control && !s->singular ? 0.010 : 0.0;   /* a control mark's sigma, m: the simulator's choice */
        latlon(&s->w, p->e_km, p->n_km, &m[k].lat, &m[k].lon);
    }
    return sim_write_stations(dir, m, s->n_st);
}

static int write_occupations(const lf_survey *s, const char *dir)
{
    FILE *fb, *tr;
    int bad = sim_occupations_open(dir, &fb, &tr);
    if (!bad)
        for (int i = 0; i < s->n_in; i++)
            for (int k = 0; k < s->in[i].n; k++) {
                const lf_occ *v = &s->in[i].oc[k];
                const char *st = s->st[v->st].name;
                sim_occupation_row(fb, tr, st, st, s->in[i].name, v->t_on, v->t_off);
            }
    bad |= sim_close(fb);
    bad |= sim_close(tr);
    return bad;
}

/* The true air on the first known mark every 60 s over the survey. */
static int write_weather(const lf_survey *s, const char *dir)
{
    FILE *f = open_out(dir, "weather-truth.csv");
    if (!f)
        return 1;
    double t_end = 0;
    for (int i = 0; i < s->n_in; i++)
        if (s->in[i].oc[s->in[i].n - 1].t_off > t_end)
            t_end = s->in[i].oc[s->in[i].n - 1].t_off;
    const lf_station *m = &s->st[0];
    char ts[40];
    fprintf(f, "time,pressure_hpa,temperature_degc\n");
    for (double t = s->w.t0; t <= t_end; t += 60.0) {
        iso(t, ts, sizeof ts);
        fprintf(f, "%s,%.3f,%.2f\n", ts, pressure_at(s, m->e_km, m->n_km, m->h_m, t) / 100.0,
                air_temp(&s->w, m->h_m, t) - 273.15);
    }
    return fclose(f) != 0;
}

static int write_params(const lf_survey *s, const char *dir)
{
    FILE *f = open_out(dir, "scenario.txt");
    if (!f)
        return 1;
    const scenario *w = &s->w;
    char ts[40];
    iso(w->t0, ts, sizeof ts);
    int n_ctl = 0;
    for (int k = 0; k < s->n_st; k++)
        n_ctl += s->st[k].control && !s->singular;
    fprintf(f, "scenario %s\nseed %llu\nstations %d\ncontrol_marks %d\ninstruments %d\nindex_error_pa %.2f\n"
               "lat0 %.6f\nlon0 %.6f\nstart %s\nsea_level_pressure_pa %.1f\ntrend_pa_per_h %.1f\n"
               "gradient_east_pa_per_km %.2f\ngradient_north_pa_per_km %.2f\ntide_amplitude_pa %.1f\n"
               "weather_walk_pa_per_sqrt_h %.1f\nsea_level_temp_k %.1f\nlapse_k_per_km %.1f\ndiurnal_k %.1f\n"
               "rh_sea_level_pct %.0f\nrover_dt_s %.0f\nrover_quantum_pa %.2f\nrover_body_warming_k %.1f\n"
               "gnss_horizontal_sd_m 2.0\ngnss_horizontal_tau_s 120\ngnss_height_sd_m %.1f\ngnss_height_tau_s %.0f\n",
            s->kind, (unsigned long long)s->seed, s->n_st, n_ctl, s->n_in, s->index_error_pa, w->lat0, w->lon0, ts,
            w->slp_pa, w->trend_pa_h * 100.0, w->grad_pa_km_e * 100.0, w->grad_pa_km_n * 100.0, s->tide_pa,
            s->walk_pa_sqrt_h, w->t_sl_k, w->lapse_k_km, w->diurnal_k, w->rh_sl, LF_DT_S, w->rover_q_pa,
            w->body_warming_k, w->gnss_sd_m, w->gnss_tau_s);
    for (int i = 0; i < s->n_in; i++) {
        const lf_inst *in = &s->in[i];
        sim_sensor_params(f, in->name, in->off_pa + extra_offset(s, i), in->drift_pa_h, in->noise_pa, in->oc[0].t_on,
                          in->oc[in->n - 1].t_off);
    }
    return fclose(f) != 0;
}

/* --- options --- */

static int parse(lf_survey *s, int argc, char **argv)
{
    int leapfrog = strcmp(s->kind, "leapfrog") == 0;
    for (int k = 2; k < argc; k++) {
        const char *o = argv[k], *val = k + 1 < argc ? argv[k + 1] : NULL;
        char *end = NULL;
        if (!leapfrog && strcmp(o, "--singular") == 0) {
            s->singular = 1;
            continue;
        }
        if (strcmp(o, "--seed") != 0 && !(leapfrog && strcmp(o, "--index-error") == 0)) {
            fprintf(stderr, "hypsim: %s: unknown option %s\n", s->kind, o);
            return 1;
        }
        if (!val) {
            fprintf(stderr, "hypsim: %s needs a value\n", o);
            return 1;
        }
        if (strcmp(o, "--seed") == 0) {
            s->seed = strtoull(val, &end, 10);
            if (*val == '\0' || *val == '-' || *end != '\0') {
                fprintf(stderr, "hypsim: --seed \"%s\": expected a whole number\n", val);
                return 1;
            }
        } else {
            s->index_error_pa = strtod(val, &end);
            if (*val == '\0' || *end != '\0' || !(fabs(s->index_error_pa) <= 1000.0)) {
                fprintf(stderr, "hypsim: --index-error \"%s\": expected a number of Pa from -1000 to 1000\n", val);
                return 1;
            }
        }
        k++;
    }
    return 0;
}

int sim_leapfrog_main(int argc, char **argv)
{
    if (argc < 2) {
        fprintf(stderr, "usage: hypsim leapfrog OUTDIR [--seed N] [--index-error PA]\n"
                        "       hypsim loop OUTDIR [--seed N] [--singular]\n");
        return 2;
    }
    static lf_survey s;   /* not on the stack */
    memset(&s, 0, sizeof s);
    s.kind = strcmp(argv[0], "loop") == 0 ? "loop" : "leapfrog";
    if (parse(&s, argc, argv))
        return 2;
    sim_seed(s.seed);
    weather(&s);
    if (strcmp(s.kind, "loop") == 0)
        plan_loop(&s);
    else
        plan_leapfrog(&s);
    const char *dir = argv[1];
    mkdir(dir, 0777);   /* an existing folder is fine; open_out reports any other problem */
    int bad = 0;
    for (int i = 0; !bad && i < s.n_in; i++)
        bad = write_track(&s, i, dir);
    if (!bad)
        bad = write_stations(&s, dir) || write_occupations(&s, dir) || write_weather(&s, dir) ||
              write_params(&s, dir);
    return bad ? 1 : 0;
}
