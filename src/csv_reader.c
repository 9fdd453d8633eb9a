/* csv_reader.c - CSV logs of base stations and rovers into a hyp_series. */
#include "reader_common.h"
#include "csv_lex.h"

#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>

#define MAX_COLUMNS 4096

/* C_DATE: a date column whose text goes before the time column's (joined
 * by a blank), for exports that write date and time apart. */
enum col { C_TIME, C_PRES, C_TEMP, C_RH, C_LAT, C_LON, C_ELE, C_DATE, C_N };
static const char *col_label[C_N] = {"time", "pressure", "temperature", "humidity", "lat", "lon", "ele", "date"};
static const hyp__field col_field[C_N] = {HYP__F_COUNT, HYP__F_PRESSURE, HYP__F_TEMPERATURE, HYP__F_HUMIDITY,
                                          HYP__F_POSITION, HYP__F_POSITION, HYP__F_ELE, HYP__F_COUNT};

static int name_matches(const char *name, int col, const hyp_read_opts *o)
{
    static const char *alias[C_N][4] = {
        {"time", "timestamp", "datetime", NULL},
        {"pressure", "pres", NULL, NULL},
        {"temperature", "temp", NULL, NULL},
        {"humidity", "rh", NULL, NULL},
        {"lat", "latitude", NULL, NULL},
        {"lon", "longitude", "lng", NULL},
        {"ele", "elevation", "altitude", NULL},
        {"date", NULL, NULL, NULL},
    };
    const char *custom = col == C_PRES ? o->pressure_field
                       : col == C_TEMP ? o->temperature_field
                       : col == C_RH ? o->humidity_field : NULL;
    if (custom)
        return strcasecmp(name, custom) == 0;
    for (int i = 0; i < 4 && alias[col][i]; i++)
        if (strcasecmp(name, alias[col][i]) == 0)
            return 1;
    return 0;
}

typedef struct csv_state {
    const char *path;
    const hyp_read_opts *opts;
    char delim;
    int decimal_comma;
    int idx[C_N];
    hyp_unit file_unit[C_N];
    int ncols;
    hyp__csv_field *fields;
    hyp__clock clock;
    hyp__screen screen;
} csv_state;

static hyp_status parse_header(csv_state *cs, hyp__csv_lines *lr, hyp_error *err)
{
    cs->delim = hyp__csv_detect_delimiter(lr->buf);
    cs->decimal_comma = cs->delim != ',';
    int n = hyp__csv_split(lr->buf, cs->delim, cs->fields, MAX_COLUMNS);
    if (n == -2)
        return hyp_error_set(err, HYP_ERR_FORMAT, "%s:%u: header has more than %d columns", cs->path, lr->lineno, MAX_COLUMNS);
    if (n < 0)
        return hyp_error_set(err, HYP_ERR_FORMAT, "%s:%u: header has an unterminated quote", cs->path, lr->lineno);
    cs->ncols = n;
    char found[256] = "";
    for (int c = 0; c < C_N; c++)
        cs->idx[c] = -1;
    for (int i = 0; i < n; i++) {
        char name[128], unit[32];
        hyp__csv_header_name(&cs->fields[i], name, sizeof name, unit, sizeof unit);
        size_t fl = strlen(found);
        if (fl < 200)
            snprintf(found + fl, sizeof found - fl, "%s\"%s\"", fl ? ", " : "", name);
        for (int c = 0; c < C_N; c++) {
            if (cs->idx[c] >= 0 || !name_matches(name, c, cs->opts))
                continue;
            cs->idx[c] = i;
            if (unit[0] && (c == C_PRES || c == C_TEMP || c == C_RH)) {
                hyp_quantity q = c == C_PRES ? HYP_Q_PRESSURE : c == C_TEMP ? HYP_Q_TEMPERATURE : HYP_Q_HUMIDITY;
                cs->file_unit[c] = hyp_unit_parse(q, unit);
                if (!cs->file_unit[c])
                    return hyp_error_set(err, HYP_ERR_UNIT, "%s:%u: column \"%s\": unknown unit \"%s\"; expected one of %s",
                                         cs->path, lr->lineno, name, unit, hyp_unit_choices(q));
            }
        }
    }
    const char *pname = cs->opts->pressure_field ? cs->opts->pressure_field : "pressure";
    if (cs->idx[C_TIME] < 0 || cs->idx[C_PRES] < 0) {
        int looks_numeric = n > 0 && (isdigit((unsigned char)cs->fields[0].s[0]) || cs->fields[0].s[0] == '-');
        return hyp_error_set(err, HYP_ERR_FORMAT, "%s:%u: %s: no \"%s\" column in the header (found %s)%s",
                             cs->path, lr->lineno, "header", cs->idx[C_TIME] < 0 ? "time" : pname, found,
                             looks_numeric ? "; the first line looks like data: a header row is needed" : "");
    }
    if (cs->opts->need_position && (cs->idx[C_LAT] < 0 || cs->idx[C_LON] < 0))
        return hyp_error_set(err, HYP_ERR_FORMAT, "%s:%u: header: a rover log needs \"lat\" and \"lon\" columns (found %s)",
                             cs->path, lr->lineno, found);
    return HYP_OK;
}

static const char *time_problem(hyp_time_result r)
{
    switch (r) {
    case HYP_TIME_SYNTAX: return "is not a time; expected ISO 8601 (2026-06-14T09:30:00Z), Unix epoch seconds or "
                                 "a numeric date and time (18.06.2026 09:30), or give the format with --time-format "
                                 "(rover) or --base-time-format (base)";
    case HYP_TIME_RANGE: return "is out of range (a date that does not exist, or before 1900 or after 2200)";
    case HYP_TIME_NOZONE: return "has no time zone; add Z or an offset, or give the zone with --time-zone or --rover-time-zone (rover) or --base-time-zone";
    case HYP_TIME_OK: break;
    }
    return "";
}

/* Whether a field starts as a clock time ("06:30", " 6:30 PM"), not as a
 * stamp with its date (ISO, a numeric date, epoch seconds). */
static int clock_only(const hyp__csv_field *t)
{
    size_t k = 0;
    while (k < t->len && (t->s[k] == ' ' || t->s[k] == '\t'))
        k++;
    size_t d = k;
    while (k < t->len && t->s[k] >= '0' && t->s[k] <= '9')
        k++;
    return k > d && k - d <= 2 && k < t->len && t->s[k] == ':';
}

/* The time of a row as text into tb (n bytes): the time field, after the
 * date field and a blank where the file has a date column and the time
 * field holds a clock time only. */
static size_t time_text(const csv_state *cs, const hyp__csv_field *fields, char *tb, size_t n)
{
    size_t l = 0;
    const hyp__csv_field *t = &fields[cs->idx[C_TIME]];
    if (cs->idx[C_DATE] >= 0 && clock_only(t)) {
        const hyp__csv_field *d = &fields[cs->idx[C_DATE]];
        l = d->len < n / 2 ? d->len : n / 2;
        memcpy(tb, d->s, l);
        tb[l++] = ' ';
    }
    size_t k = t->len < n - 1 - l ? t->len : n - 1 - l;
    memcpy(tb + l, t->s, k);
    tb[l + k] = '\0';
    return l + k;
}

static hyp_status decide_order(csv_state *cs, const char *first, unsigned first_line, hyp_error *err);

/* The time of a row: NaN when blank. */
static hyp_status parse_time(csv_state *cs, hyp__csv_lines *lr, double *t, hyp_error *err)
{
    char tb[160];
    size_t l = time_text(cs, cs->fields, tb, sizeof tb);
    *t = NAN;
    if (l == 0 || strspn(tb, " \t") == l)
        return HYP_OK;
    int a, b;
    if (!cs->opts->time_format && !cs->clock.date_order && hyp_time_numeric_date(tb, &a, &b)) {
        hyp_status st = decide_order(cs, tb, lr->lineno, err);
        if (st)
            return st;
    }
    hyp_time_result r = hyp__clock_read(&cs->clock, tb, lr->lineno, t);
    if (!r)
        return HYP_OK;
    char q[200];
    hyp__quote(q, sizeof q, tb, l);
    if (cs->opts->time_format && r == HYP_TIME_SYNTAX)
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: time \"%s\" does not match the time format \"%s\" "
                             "(--time-format for a rover, --base-time-format for a base)", cs->path, lr->lineno, q,
                             cs->opts->time_format);
    return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: time \"%s\" %s", cs->path, lr->lineno, q, time_problem(r));
}

/* Parses one data row; returns HYP_OK, or an error for a malformed row.
 * *partial is set when the row has too few fields (a cut-off last line). */
static hyp_status parse_row(csv_state *cs, hyp__csv_lines *lr, hyp_series *out,
                            int *partial, hyp_error *err)
{
    int n = hyp__csv_split(lr->buf, cs->delim, cs->fields, MAX_COLUMNS);
    *partial = 0;
    if (n == -1) {
        *partial = !lr->ended_with_newline;
        if (*partial)
            return HYP_OK;
        return hyp_error_set(err, HYP_ERR_FORMAT, "%s:%u: unterminated quote", cs->path, lr->lineno);
    }
    if (n == -2)
        return hyp_error_set(err, HYP_ERR_FORMAT, "%s:%u: more than %d fields", cs->path, lr->lineno, MAX_COLUMNS);
    if (cs->idx[C_DATE] >= n) {
        if (!lr->ended_with_newline) {
            *partial = 1;
            return HYP_OK;
        }
        return hyp_error_set(err, HYP_ERR_FORMAT, "%s:%u: date: the row has %d fields, the header %d",
                             cs->path, lr->lineno, n, cs->ncols);
    }
    double v[C_N];
    int refused = 0;   /* bit c: the value of column c was refused */
    for (int c = 0; c < C_N; c++) {
        v[c] = NAN;
        int i = cs->idx[c];
        if (i < 0 || c == C_DATE)
            continue;
        if (i >= n) {
            if (!lr->ended_with_newline) {
                *partial = 1;
                return HYP_OK;
            }
            if (c == C_TIME || c == C_PRES)
                return hyp_error_set(err, HYP_ERR_FORMAT, "%s:%u: %s: the row has %d fields, the header %d",
                                     cs->path, lr->lineno, col_label[c], n, cs->ncols);
            continue;
        }
        const hyp__csv_field *f = &cs->fields[i];
        if (c == C_TIME) {
            hyp_status st = parse_time(cs, lr, &v[c], err);
            if (st)
                return st;
            continue;
        }
        int r = hyp__parse_number(f->s, f->len, cs->decimal_comma, &v[c]);
        if (!r) {
            char q[64];
            hyp__quote(q, sizeof q, f->s, f->len);
            return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: %s \"%s\" is not a number",
                                 cs->path, lr->lineno, col_label[c], q);
        }
        if (hyp__value_ok(col_field[c], r, v[c]))
            continue;
        v[c] = hyp__screen_refuse(&cs->screen, col_field[c], col_label[c], lr->lineno, r, f->s, f->len);
        if (r != 2)
            refused |= 1 << c;
    }
    if (refused & (1 << C_LAT | 1 << C_LON))
        v[C_LAT] = v[C_LON] = NAN;   /* half a position is none (the warning is given) */
    int bad_pressure = (refused >> C_PRES) & 1;
    hyp_sample_flag flag = v[C_TIME] != v[C_TIME] ? HYP_SAMPLE_NO_TIME
                         : bad_pressure ? HYP_SAMPLE_BAD_VALUE
                         : v[C_PRES] != v[C_PRES] ? HYP_SAMPLE_NO_PRESSURE : HYP_SAMPLE_OK;
    if (hyp_series_push(out, v[C_TIME], v[C_PRES], v[C_TEMP], v[C_RH], v[C_LAT], v[C_LON],
                        v[C_ELE], lr->lineno, flag))
        return hyp_error_set(err, HYP_ERR_NOMEM, "%s:%u: out of memory (or more samples than a log may hold)", cs->path, lr->lineno);
    return HYP_OK;
}

static hyp_status open_checked(const char *path, FILE **f, hyp_error *err)
{
    struct stat st;
    if (stat(path, &st) != 0)
        return hyp_error_set(err, HYP_ERR_IO, "%s: cannot open: %s", path, strerror(errno));
    if (S_ISDIR(st.st_mode))
        return hyp_error_set(err, HYP_ERR_IO, "%s: is a directory, expected a log file", path);
    if (!S_ISREG(st.st_mode))   /* a pipe or device could block forever */
        return hyp_error_set(err, HYP_ERR_IO, "%s: not a regular file (a pipe or a device?), expected a log file", path);
    *f = fopen(path, "rb");
    if (!*f)
        return hyp_error_set(err, HYP_ERR_IO, "%s: cannot open: %s", path, strerror(errno));
    return HYP_OK;
}

static hyp_status read_rows(csv_state *cs, hyp__csv_lines *lr, hyp_series *out,
                            hyp_msgs *msgs, hyp_error *err)
{
    int have_header = 0, r;
    while ((r = hyp__csv_read_line(lr)) == 1) {
        char *s = lr->buf;
        if (lr->lineno == 1 && (unsigned char)s[0] == 0xEF && (unsigned char)s[1] == 0xBB &&
            (unsigned char)s[2] == 0xBF)
            memmove(s, s + 3, lr->len - 2), lr->len -= 3;
        size_t lead = strspn(s, " \t");
        if (s[lead] == '\0' || s[lead] == '#')
            continue;
        if (!have_header) {
            hyp_status st = parse_header(cs, lr, err);
            if (st)
                return st;
            have_header = 1;
            continue;
        }
        int partial;
        hyp_status st = parse_row(cs, lr, out, &partial, err);
        if (st)
            return st;
        if (partial)
            hyp_msgs_add_at(msgs, HYP_WARNING, "sample", cs->path, lr->lineno, "the last line is cut off (no end of line, too few fields); ignored");
    }
    if (r == -1)
        return hyp_error_set(err, HYP_ERR_FORMAT, "%s:%u: line longer than %u bytes; not a log", cs->path, lr->lineno + 1, HYP_CSV_LINE_MAX);
    if (r == -2)
        return hyp_error_set(err, HYP_ERR_FORMAT, "%s:%u: NUL byte; not a text file", cs->path, lr->lineno + 1);
    if (r == -3)
        return hyp_error_set(err, HYP_ERR_IO, "%s: read error", cs->path);
    if (!have_header)
        return hyp_error_set(err, HYP_ERR_NODATA, "%s: empty file: no header row and no data", cs->path);
    return HYP_OK;
}

/* The first row whose numeric date can only be read one way. */
typedef struct order_sign { unsigned line; char value[80]; } order_sign;

/* Reads the file's dates once more to find rows that tell the order. */
static hyp_status scan_dates(csv_state *cs, order_sign *day, order_sign *month, hyp_error *err)
{
    FILE *f = fopen(cs->path, "rb");
    hyp__csv_field *fl = malloc(MAX_COLUMNS * sizeof *fl);
    hyp__csv_lines lr = {.f = f};
    hyp_status st = HYP_OK;
    if (!f || !fl) {
        st = f ? hyp_error_set(err, HYP_ERR_NOMEM, "%s: out of memory", cs->path)
               : hyp_error_set(err, HYP_ERR_IO, "%s: cannot open again: %s", cs->path, strerror(errno));
        goto out;
    }
    int header = 0;
    while (hyp__csv_read_line(&lr) == 1 && !(day->line && month->line)) {
        size_t lead = strspn(lr.buf, " \t");
        if (lr.buf[lead] == '\0' || lr.buf[lead] == '#' || !header++)
            continue;
        int n = hyp__csv_split(lr.buf, cs->delim, fl, MAX_COLUMNS), a, b;
        if (n <= cs->idx[C_TIME] || n <= cs->idx[C_DATE])
            continue;
        char tb[160];
        time_text(cs, fl, tb, sizeof tb);
        if (hyp_time_numeric_date(tb, &a, &b) != 1)
            continue;
        order_sign *o = a > 12 && !day->line ? day : b > 12 && !month->line ? month : NULL;
        if (o) {
            o->line = lr.lineno;
            hyp__quote(o->value, sizeof o->value, tb, strlen(tb));
        }
    }
out:
    free(fl);
    free(lr.buf);
    if (f)
        fclose(f);
    return st;
}

/* Whether numeric dates (18.06.2026) are day or month first: where a day
 * above 12 shows in the first field and none in the second, day first;
 * the other way round, month first; otherwise refused, naming the option
 * that decides. Two-digit years are refused without a format. */
static hyp_status decide_order(csv_state *cs, const char *first, unsigned first_line, hyp_error *err)
{
    static const char decides[] = "give the order with --time-format (rover) or --base-time-format (base), "
                                  "e.g. \"%d.%m.%Y %H:%M:%S\"";
    char q[200];
    int a, b;
    hyp__quote(q, sizeof q, first, strlen(first));
    if (hyp_time_numeric_date(first, &a, &b) == 2)
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: time \"%s\": a year of fewer than four digits is not read "
                             "without a format; give one with %%y in --time-format (rover) or --base-time-format (base)",
                             cs->path, first_line, q);
    order_sign day = {0}, month = {0};
    hyp_status st = scan_dates(cs, &day, &month, err);
    if (st)
        return st;
    if (day.line && month.line)
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: time \"%s\" is day first, but line %u's \"%s\" is month first; "
                             "the dates cannot be read in one order: %s", cs->path, day.line, day.value,
                             month.line, month.value, decides);
    if (!day.line && !month.line)
        return hyp_error_set(err, HYP_ERR_VALUE, "%s:%u: time \"%s\": the date may be day.month or month.day and no "
                             "date in the file tells which (none has a field above 12): %s",
                             cs->path, first_line, q, decides);
    cs->clock.date_order = day.line ? 1 : 2;
    order_sign *o = day.line ? &day : &month;
    hyp_msgs_add_at(cs->screen.msgs, HYP_NOTE, "sample", cs->path, o->line,
                    "dates read %s first, as \"%s\" can only be read so", day.line ? "day" : "month", o->value);
    return HYP_OK;
}

hyp_status hyp_csv_read(const char *path, const hyp_read_opts *opts, hyp_series *out,
                        hyp_unit *pressure_unit_found, hyp_msgs *msgs, hyp_error *err)
{
    hyp_read_opts defaults;
    if (!opts) {
        hyp_read_opts_init(&defaults);
        opts = &defaults;
    }
    hyp_series_free(out);
    csv_state cs = {.path = path, .opts = opts, .screen = {.path = path, .msgs = msgs}};
    hyp__clock_init(&cs.clock, opts->zone);
    cs.clock.format = opts->time_format;
    hyp__csv_lines lr = {0};
    FILE *f = NULL;
    hyp_status st = open_checked(path, &f, err);
    if (st)
        return st;
    lr.f = f;
    cs.fields = malloc(MAX_COLUMNS * sizeof *cs.fields);
    if (!cs.fields) {
        st = hyp_error_set(err, HYP_ERR_NOMEM, "%s: out of memory", path);
        goto out;
    }
    st = read_rows(&cs, &lr, out, msgs, err);
    if (st)
        goto out;
    hyp__screen_totals(&cs.screen);
    hyp__clock_notes(&cs.clock, path, msgs);
    if (out->count == 0) {
        st = hyp_error_set(err, HYP_ERR_NODATA, "%s: header but no data rows", path);
        goto out;
    }
    hyp_unit pu, tu;
    st = hyp__resolve_unit(path, "pressure", HYP_Q_PRESSURE, cs.file_unit[C_PRES], opts->pressure_unit,
                           out->pressure_pa, out->count, &pu, msgs, err);
    if (!st)
        st = hyp__resolve_unit(path, "temperature", HYP_Q_TEMPERATURE, cs.file_unit[C_TEMP],
                               opts->temperature_unit, out->temp_k, out->count, &tu, msgs, err);
    if (st)
        goto out;
    if (pressure_unit_found)
        *pressure_unit_found = pu;
    /* CSV outputs list the samples in the series' order, with their
     * lines: no map back to the file's order is needed */
    st = hyp__check_series(path, out, NULL, msgs, err);
    if (st)
        goto out;
    hyp_series_shrink(out);
    st = hyp__check_usable(path, out, pu, err);
out:
    free(cs.fields);
    free(lr.buf);
    fclose(f);
    if (st)
        hyp_series_free(out);
    return st;
}
