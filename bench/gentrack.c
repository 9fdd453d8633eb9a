/* gentrack.c - a large invented track for the benchmark: N points at 1 s
 * (a slow climb and descent with pressure and temperature extensions) and
 * a base log every 30 s over the same span. Pressures follow a simple
 * isothermal barometric law: realism is not the point, size is.
 *   gentrack N TRACK.gpx BASE.csv */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

static void iso(double t, char *buf, size_t n)
{
    time_t s = (time_t)t;
    struct tm tm;
    gmtime_r(&s, &tm);
    strftime(buf, n, "%Y-%m-%dT%H:%M:%SZ", &tm);
}

int main(int argc, char **argv)
{
    if (argc != 4) {
        fprintf(stderr, "usage: gentrack N TRACK.gpx BASE.csv\n");
        return 2;
    }
    long n = atol(argv[1]);
    double t0 = 1781766000.0;
    FILE *g = fopen(argv[2], "w"), *b = fopen(argv[3], "w");
    if (!g || !b)
        return 1;
    fprintf(g, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<gpx version=\"1.1\" creator=\"gentrack\" "
               "xmlns=\"http://www.topografix.com/GPX/1/1\" xmlns:lg=\"urn:example:field-logger:1\">\n"
               " <trk><name>bench</name><trkseg>\n");
    unsigned long long x = 1;
    for (long i = 0; i < n; i++) {
        double t = t0 + (double)i, ph = 2 * M_PI * (double)i / 7200.0;
        double z = 800.0 + 600.0 * (1 - cos(ph)), p = 92000.0 * exp(-(z - 800.0) / 8300.0);
        x = x * 6364136223846793005ULL + 1442695040888963407ULL;
        double noise = ((double)(x >> 33) / 2147483648.0 - 0.5) * 6.0;
        char ts[32];
        iso(t, ts, sizeof ts);
        fprintf(g, "  <trkpt lat=\"%.7f\" lon=\"%.7f\"><ele>%.1f</ele><time>%s</time><extensions><lg:sensor>"
                   "<lg:pressure unit=\"hPa\">%.2f</lg:pressure><lg:temperature unit=\"degC\">%.1f</lg:temperature>"
                   "</lg:sensor></extensions></trkpt>\n",
                46.8 + 0.01 * sin(ph), 9.9 + 0.01 * (1 - cos(ph)), z, ts, (p + noise) / 100.0, 15.0 - 0.0065 * (z - 800));
    }
    fputs(" </trkseg></trk>\n</gpx>\n", g);
    fprintf(b, "time,pressure [hPa],temperature [degC]\n");
    for (double t = t0 - 600; t <= t0 + (double)n + 600; t += 30) {
        char ts[32];
        iso(t, ts, sizeof ts);
        x = x * 6364136223846793005ULL + 1442695040888963407ULL;
        double noise = ((double)(x >> 33) / 2147483648.0 - 0.5) * 3.0;
        fprintf(b, "%s,%.2f,15.0\n", ts, (92000.0 - 0.01 * (t - t0) + noise) / 100.0);
    }
    return (fclose(g) | fclose(b)) != 0;
}
