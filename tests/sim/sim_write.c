/* sim_write.c - the simulator's sensors between standings, their track
 * samples and the files network.c and leapfrog.c both write (sim_write.h).
 * Nothing is shared with the library. */
#define _DEFAULT_SOURCE
#include "sim_write.h"

#include <math.h>
#include <stdlib.h>

sim_where sim_where_at(sim_standing_fn get, const void *ctx, int n, double t)
{
    sim_where w = {0, 0, 0, 0};
    for (int k = 0; k < n; k++) {
        sim_standing a = get(ctx, k);
        if (t <= a.t_off || k == n - 1) {
            w.e_km = a.e_km, w.n_km = a.n_km, w.z_m = a.h_m;
            return w;
        }
        sim_standing b = get(ctx, k + 1);
        if (t < b.t_on) {
            double f = (t - a.t_off) / (b.t_on - a.t_off), d = hypot(a.e_km - b.e_km, a.n_km - b.n_km);
            double side = d > 0 ? a.lateral_m / 1000.0 * sin(M_PI * f) / d : 0.0;
            w.e_km = a.e_km + (b.e_km - a.e_km) * f - (b.n_km - a.n_km) * side;
            w.n_km = a.n_km + (b.n_km - a.n_km) * f + (b.e_km - a.e_km) * side;
            w.z_m = a.h_m + (b.h_m - a.h_m) * f + a.bump_m * sin(M_PI * f);
            w.walking = 1;
            return w;
        }
    }
    return w;
}

/* The GNSS errors are first-order Gauss-Markov processes (exponential
 * correlation, stationary variance kept by the sqrt(1 - a^2) factor);
 * the sizes are the simulator's choice, common practice, no source. */
sim_fix *sim_sample_track(const sim_track_src *src, size_t *count)
{
    const scenario *w = src->w;
    double t0 = src->t0, dt = src->dt_s;
    size_t n = (size_t)((src->t1 - t0) / dt) + 1;
    sim_fix *f = malloc(n * sizeof *f);
    if (!f)
        return NULL;
    double ah = exp(-dt / 120.0), av = exp(-dt / w->gnss_tau_s);
    double ge = 2.0 * nrand(), gn = 2.0 * nrand(), gv = w->gnss_sd_m * nrand();
    for (size_t i = 0; i < n; i++) {
        double t = t0 + (double)i * dt;
        sim_where at = src->where(src->ctx, t);
        double p = src->pressure(src->ctx, at, t), hours = (t - t0) / 3600.0;
        f[i].time = t;
        f[i].p_pa = quant(p + src->off_pa + src->extra_off_pa + src->drift_pa_h * hours + src->noise_pa * nrand(),
                          w->rover_q_pa);
        f[i].t_c = air_temp(w, at.z_m, t) + w->body_warming_k * (at.walking ? 1.0 : 0.4) + 0.3 * nrand() - 273.15;
        ge = ah * ge + sqrt(1 - ah * ah) * 2.0 * nrand();
        gn = ah * gn + sqrt(1 - ah * ah) * 2.0 * nrand();
        gv = av * gv + sqrt(1 - av * av) * w->gnss_sd_m * nrand();
        latlon(w, at.e_km + (ge + 0.7 * nrand()) / 1000.0, at.n_km + (gn + 0.7 * nrand()) / 1000.0, &f[i].lat,
               &f[i].lon);
        f[i].ele = at.z_m + gv + 1.0 * nrand();
    }
    *count = n;
    return f;
}

FILE *sim_gpx_open(const char *dir, const char *file, const char *title)
{
    FILE *g = open_out(dir, file);
    if (g)
        fprintf(g, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
                   "<gpx version=\"1.1\" creator=\"hypsim\" xmlns=\"http://www.topografix.com/GPX/1/1\"\n"
                   "     xmlns:lg=\"urn:example:field-logger:1\">\n"
                   "  <metadata><name>%s</name></metadata>\n",
                title);
    return g;
}

int sim_gpx_finish(FILE *g, const char *trk_name, const sim_fix *f, size_t n)
{
    char ts[40];
    fprintf(g, "  <trk>\n    <name>%s</name>\n    <trkseg>\n", trk_name);
    for (size_t i = 0; i < n; i++) {
        iso(f[i].time, ts, sizeof ts);
        fprintf(g, "      <trkpt lat=\"%.7f\" lon=\"%.7f\"><ele>%.1f</ele><time>%s</time>"
                   "<extensions><lg:sensor><lg:pressure unit=\"hPa\">%.2f</lg:pressure>"
                   "<lg:temperature unit=\"degC\">%.1f</lg:temperature></lg:sensor></extensions></trkpt>\n",
                f[i].lat, f[i].lon, f[i].ele, ts, f[i].p_pa / 100.0, f[i].t_c);
    }
    fputs("    </trkseg>\n  </trk>\n</gpx>\n", g);
    return fclose(g) != 0;
}

int sim_write_stations(const char *dir, const sim_mark *m, int n)
{
    FILE *f = open_out(dir, "stations.csv"), *t = open_out(dir, "truth.csv");
    int bad = !f || !t;
    if (!bad) {
        fprintf(f, "name,lat,lon,height,sigma\n");
        fprintf(t, "name,height\n");
        for (int k = 0; k < n; k++) {
            if (m[k].sigma_m > 0)
                fprintf(f, "%s,%.7f,%.7f,%.3f,%.3f\n", m[k].name, m[k].lat, m[k].lon, m[k].h_m, m[k].sigma_m);
            else
                fprintf(f, "%s,%.7f,%.7f,,\n", m[k].name, m[k].lat, m[k].lon);
            fprintf(t, "%s,%.3f\n", m[k].name, m[k].h_m);
        }
    }
    bad |= sim_close(f);
    bad |= sim_close(t);
    return bad;
}

int sim_occupations_open(const char *dir, FILE **fb, FILE **tr)
{
    *fb = open_out(dir, "fieldbook.csv");
    *tr = open_out(dir, "occupations-truth.csv");
    if (!*fb || !*tr)
        return 1;
    fprintf(*fb, "station,rover,start,end\n");
    fprintf(*tr, "station,rover,start,end\n");
    return 0;
}

void sim_booked(double t_on, double t_off, double *start, double *end)
{
    *start = ceil((t_on + 15.0) / 60.0) * 60.0;
    *end = floor((t_off - 15.0) / 60.0) * 60.0;
}

void sim_occupation_row(FILE *fb, FILE *tr, const char *booked_st, const char *true_st, const char *rover,
                        double t_on, double t_off)
{
    char a[40], b[40], c[40], d[40];
    double s, e;
    sim_booked(t_on, t_off, &s, &e);
    iso(s, a, sizeof a), iso(e, b, sizeof b), iso(t_on, c, sizeof c), iso(t_off, d, sizeof d);
    fprintf(fb, "%s,%s,%s,%s\n", booked_st, rover, a, b);
    fprintf(tr, "%s,%s,%s,%s\n", true_st, rover, c, d);
}

void sim_sensor_params(FILE *f, const char *name, double off_pa, double drift_pa_h, double noise_pa, double t_on,
                       double t_off)
{
    char a[40], b[40];
    iso(t_on, a, sizeof a), iso(t_off, b, sizeof b);
    fprintf(f, "%s_offset_pa %.2f\n%s_drift_pa_per_h %.2f\n%s_noise_pa %.2f\n%s_start %s\n%s_end %s\n", name, off_pa,
            name, drift_pa_h, name, noise_pa, name, a, name, b);
}

int sim_close(FILE *f)
{
    return f && fclose(f) != 0;
}
