/* svg.h - the drawing layer of the HTML report (private): nice axis ticks,
 * decimation of long series for the screen, text made safe for XML, colours,
 * and figures written as one self-contained <svg> element into a hyp__buf.
 *
 * Nothing here knows barometry: the report builds its figures from these
 * parts. Output is inline SVG for embedding in an HTML page: inline
 * attributes only, no scripts, no external references, no fonts loaded
 * (the generic family sans-serif), no locale-dependent numbers, and never a
 * `nan` or `inf` (a non-finite value is skipped, never written). */
#ifndef HYP_SVG_H
#define HYP_SVG_H

#include <stddef.h>

#include "buf.h"
#include "hypsolev/error.h"

/* ---- numbers and text (svg_text.c) ---------------------------------- */

#define HYP__SVG_NUM_MAX 40   /* bytes for any number hyp__svg_fmt writes */

/* v with `decimals` (clamped to 0..15) decimals, always '.' as the
 * separator, never "-0"; with `trim`, trailing zeros and a bare '.' are
 * dropped. Values whose scaled magnitude reaches 2^53 are written in
 * scientific notation (6 significant digits). Returns the length; 0, with
 * "" in out, when v is not finite. */
size_t hyp__svg_fmt(char out[HYP__SVG_NUM_MAX], double v, int decimals, int trim);

/* v as d.ddd...e±x with `mant_decimals` (0..15) decimals; 0 and "" when v
 * is not finite. */
size_t hyp__svg_fmt_sci(char out[HYP__SVG_NUM_MAX], double v, int mant_decimals);

/* Appends s (NUL-terminated, NULL = "") as XML text or attribute content:
 * & < > " ' escaped; invalid UTF-8 (RFC 3629), characters XML 1.0 forbids,
 * control characters (C0, DEL, C1) and bidirectional format controls become
 * U+FFFD; tab, CR and LF become a space. 0, or -1 when b refused. */
int hyp__svg_escape(hyp__buf *b, const char *s);

/* 10^e, exact for 0 <= e <= 22. */
double hyp__svg_pow10(int e);

/* Characters (not bytes) s would show, for width estimates. */
size_t hyp__svg_text_chars(const char *s);

/* ---- colours (svg_colour.c) ----------------------------------------- */

#define HYP__SVG_PALETTE_N 8
#define HYP__SVG_DASH_N 6

/* "#rrggbb" of series colour k (any k >= 0, taken modulo the palette). */
const char *hyp__svg_colour(int k);
/* SVG stroke-dasharray of dash pattern k ("none", solid, for k = 0). */
const char *hyp__svg_dash(int k);
/* "#rrggbb" of the sequential (viridis) scale at t in [0, 1] (clamped;
 * NaN gives the neutral grey "#999999"). */
void hyp__svg_seq_colour(double t, char out[8]);

/* ---- axis ticks (svg_ticks.c) ---------------------------------------- */

typedef struct hyp__ticks {
    double step;     /* between ticks: mant x 10^exp10, or seconds on a time axis */
    int mant;        /* 1, 2 or 5 (0 on a time axis) */
    int exp10;
    double k_first;  /* the first tick is k_first x step (an integer) */
    int count;       /* ticks k_first .. k_first + count - 1 */
    int decimals;    /* label decimals (fixed notation) */
    int sci;         /* labels in scientific notation (tiny steps, huge values) */
    int time_utc;    /* values are Unix seconds, labelled in UTC */
} hyp__ticks;

/* Ticks for a data range [lo, hi] and a target count (2..12): a step of 1,
 * 2 or 5 x 10^k, the first tick at or below lo, the last at or above hi
 * (within a millionth of a step). A zero or vanishing span is widened
 * first. HYP_ERR_VALUE for a non-finite bound, HYP_ERR_USAGE for lo > hi
 * or a target out of range. */
hyp_status hyp__ticks_nice(double lo, double hi, int target, hyp__ticks *t, hyp_error *err);

/* Ticks for a time range [t0_s, t1_s] in Unix seconds (years 1..9999) on
 * round times: 1, 2, 5, 10, 15, 30 s or min, 1, 2, 3, 6, 12 h, days. */
hyp_status hyp__ticks_time(double t0_s, double t1_s, int target, hyp__ticks *t, hyp_error *err);

/* Value of tick i (0 .. count-1), computed from its integer index so that
 * it is the double nearest the decimal value the label shows. */
double hyp__ticks_value(const hyp__ticks *t, int i);

/* Re-places the ticks, same step, on the multiples of the step inside
 * [lo, hi] (an axis widened for equal aspect, a colour bar). */
void hyp__ticks_inside(hyp__ticks *t, double lo, double hi);

/* Label of tick i: the number, or on a time axis HH:MM (HH:MM:SS below a
 * minute's step, YYYY-MM-DD from a day's step) in UTC. `date` gets
 * "YYYY-MM-DD" on a time axis with steps below a day for the first tick
 * and each tick whose UTC day differs from the tick before, else "". */
void hyp__ticks_label(const hyp__ticks *t, int i, char label[HYP__SVG_NUM_MAX], char date[16]);

/* ---- decimation (svg_decimate.c) ------------------------------------- */

/* The points of a series worth drawing in `columns` pixel columns. */
typedef struct hyp__decim {
    size_t *idx;      /* kept input indices, increasing */
    size_t n_idx;
    size_t *seg_end;  /* segment s is idx[s ? seg_end[s-1] : 0 .. seg_end[s]) */
    size_t n_seg;
    size_t alloc_idx, alloc_seg;
} hyp__decim;

void hyp__decim_init(hyp__decim *d);
void hyp__decim_free(hyp__decim *d);

/* Splits x/y (x non-decreasing where finite) into segments at every point
 * with a non-finite x or y (or `also`, which may be NULL: the other edge of
 * a band), and keeps per segment and pixel column the first, lowest,
 * highest and last point: at most 4 a column, every extreme kept exactly.
 * A point's column is floor((x - x_lo) / (x_hi - x_lo) x columns), clamped
 * to 0 .. columns-1. HYP_ERR_USAGE when x decreases, HYP_ERR_NOMEM. */
hyp_status hyp__decimate(const double *x, const double *y, const double *also, size_t n,
                         double x_lo, double x_hi, int columns, hyp__decim *d, hyp_error *err);

/* ---- streaming thinning (svg_thin.c) -------------------------------- */

/* hyp__decimate for series that are not held as arrays of double (a float
 * array, a value computed per point, a distance summed along a track):
 * points are fed in order, one index at a time with its x and one y per
 * series, and the thinner keeps every index hyp__decimate would keep of
 * any of the series (with its x), and for each segment that ends the point
 * that ended it (so the gap survives). Drawing the kept points (gathered
 * into arrays) with hyp__svg_line or hyp__svg_band over the same range and
 * columns then keeps exactly the points the whole series would: at most a
 * few per pixel column and series, whatever the length. The two edges of
 * a band must be non-finite together. */
#define HYP__THIN_SERIES 4

typedef struct hyp__thin_pt {
    size_t i;         /* index of the point */
    double x;         /* its x as given (so a caller need not recompute it) */
} hyp__thin_pt;

typedef struct hyp__thin_col {
    hyp__thin_pt first, low, high, last;
    double y_low, y_high;
    long col;
    int open;
} hyp__thin_col;

typedef struct hyp__thin {
    size_t n_series;
    double x_lo, scale, x_prev;
    int columns;
    hyp__thin_col c[HYP__THIN_SERIES];
    hyp__thin_pt *pts;   /* kept points; after hyp__thin_end by increasing index, unique */
    size_t n, alloc;
    int oom;
} hyp__thin;

/* Range and columns as the figure's (hyp__svg_columns). HYP_ERR_USAGE for
 * 0 or more than HYP__THIN_SERIES series, or a range as hyp__decimate
 * refuses. */
hyp_status hyp__thin_begin(hyp__thin *t, size_t n_series, double x_lo, double x_hi, int columns, hyp_error *err);
/* Point i (increasing from call to call) at x with y[0 .. n_series-1]; a
 * non-finite x ends every series' segment, a non-finite y its own.
 * HYP_ERR_USAGE when a finite x is below the one before. */
hyp_status hyp__thin_add(hyp__thin *t, size_t i, double x, const double *y, hyp_error *err);
/* Closes the open columns; sorts the kept points by index. HYP_ERR_NOMEM when an
 * allocation failed on the way. */
hyp_status hyp__thin_end(hyp__thin *t, hyp_error *err);
void hyp__thin_free(hyp__thin *t);

/* ---- figures (svg.c, svg_marks.c, svg_legend.c) ---------------------- */

typedef enum hyp__svg_marker {
    HYP__SVG_CIRCLE = 0,
    HYP__SVG_SQUARE,
    HYP__SVG_TRIANGLE,
    HYP__SVG_CROSS,
    HYP__SVG_MARKER_N
} hyp__svg_marker;

typedef struct hyp__svg_axis {
    const char *title;  /* with its unit: "height [m]", "time [UTC]" */
    double lo, hi;      /* data range to show (finite, lo <= hi) */
    int time_utc;       /* Unix seconds: ticks on round times in UTC */
    int ticks;          /* target tick count 2..12; 0 means 6 */
} hyp__svg_axis;

typedef struct hyp__svg_spec {
    const char *id;           /* prefix of the ids inside (clip path, hatches),
                                 unique in the page: [A-Za-z][A-Za-z0-9_-]{0,30} */
    const char *title;        /* NULL: none */
    double width_px, height_px;  /* 0: 720 x 400 */
    hyp__svg_axis x, y;
    int equal_aspect;         /* one data unit the same length on both axes (plans) */
    const char *colour_title; /* non-NULL: room for the colour bar of
                                 hyp__svg_points_coloured, with this title */
} hyp__svg_spec;

typedef struct hyp__svg_style {
    int colour;               /* palette index */
    int dash;                 /* dash pattern index, 0 solid */
    hyp__svg_marker marker;   /* the shape hyp__svg_markers draws (lines draw none) */
    double width_px;          /* line width (marker size 4 x width + 1); 0: 1.5 */
    const char *label;        /* legend text; NULL: no legend entry */
} hyp__svg_style;

/* Series k's style: colour k, dash k and marker k, so that series differ in
 * more than colour. */
hyp__svg_style hyp__svg_style_nth(int k, const char *label);

#define HYP__SVG_LEGEND_MAX 16
#define HYP__SVG_OCC_ROWS 12
#define HYP__SVG_OCC_COLS 24
#define HYP__SVG_TEXT_MAX 160   /* bytes kept of a legend or colour bar text */

typedef struct hyp__svg_key {
    int kind;                 /* line, band, marker, bar part */
    int colour, dash, marker, hatch;
    double width_px;
    char text[HYP__SVG_TEXT_MAX];
} hyp__svg_key;

/* A figure being written. Every call after a failure does nothing and
 * returns the first failure; hyp__svg_end then takes the partial figure
 * back out of the buffer. */
typedef struct hyp__svg {
    hyp__buf *out;
    size_t start;             /* out->len at hyp__svg_begin */
    hyp__buf_fail start_fail; /* out->fail then */
    hyp_status status;
    hyp_error *err;
    char id[32];
    double w_px, h_px;
    double left_px, right_px, top_px, bottom_px;   /* the plot area */
    double x_lo, x_hi, y_lo, y_hi;                 /* its data range */
    hyp__ticks xt, yt;
    int in_clip;              /* inside the group clipped to the plot area */
    int hatches;              /* bar hatch patterns defined */
    hyp__svg_key keys[HYP__SVG_LEGEND_MAX];
    int n_keys;
    unsigned char occ[HYP__SVG_OCC_ROWS][HYP__SVG_OCC_COLS];   /* plot area cells
                                 something was drawn in: the legend goes to
                                 the corner that covers fewest of them */
    int has_cbar;             /* colour bar room and title */
    int cbar_set;             /* its range known */
    double cbar_lo, cbar_hi;
    char cbar_title[HYP__SVG_TEXT_MAX];
} hyp__svg;

/* Opens the figure: <svg> with viewBox, title, grid, ticks, tick labels,
 * axis titles. Ranges are widened to whole ticks. */
hyp_status hyp__svg_begin(hyp__svg *f, hyp__buf *out, const hyp__svg_spec *spec, hyp_error *err);

/* A polyline (decimated to the plot's pixel columns; a non-finite value
 * breaks it; a point alone between gaps is drawn as a dot). x sorted. */
hyp_status hyp__svg_line(hyp__svg *f, const double *x, const double *y, size_t n, const hyp__svg_style *st);

/* The area between y_lo and y_hi (e.g. +-2 sigma), decimated alike. */
hyp_status hyp__svg_band(hyp__svg *f, const double *x, const double *y_lo, const double *y_hi, size_t n,
                         int colour, const char *label);

/* Markers, with vertical error bars y +- y_err where y_err (may be NULL)
 * is finite and positive. Not decimated: meant for tens to thousands. */
hyp_status hyp__svg_markers(hyp__svg *f, const double *x, const double *y, const double *y_err, size_t n,
                            const hyp__svg_style *st);

/* Markers filled by the sequential scale of v over [v_lo, v_hi] (a plan
 * coloured by sigma); a non-finite v gives a hollow grey marker. The colour
 * bar is drawn by hyp__svg_end when the spec asked for one. Every call in
 * a figure must give the same range (one colour bar). */
hyp_status hyp__svg_points_coloured(hyp__svg *f, const double *x, const double *y, const double *v, size_t n,
                                    double v_lo, double v_hi, hyp__svg_marker m);

/* Stacked bars: bar b at x[b] (bar_width data units wide) stacks
 * v[b * n_parts + p] for p = 0 .. n_parts-1 upwards from 0; part p is
 * colour p and, from the second part on, hatched. A non-finite part is
 * left out; a negative one is an error. part_labels may be NULL. */
hyp_status hyp__svg_bars(hyp__svg *f, const double *x, size_t n_bars, const double *v, size_t n_parts,
                         double bar_width, const char *const *part_labels);

/* Text at a data position; anchor -1 start, 0 middle, 1 end. Not clipped. */
hyp_status hyp__svg_text(hyp__svg *f, double x, double y, const char *text, int anchor);

/* The pixel columns the figure's lines and bands are decimated to. */
int hyp__svg_columns(const hyp__svg *f);

/* Closes the figure: frame, legend (two entries or more, in the corner
 * of the plot area that hides the fewest drawn marks: top right, top left,
 * bottom right, bottom left on a tie), colour bar.
 * On any failure the buffer is cut back to where hyp__svg_begin found it. */
hyp_status hyp__svg_end(hyp__svg *f);

/* Drops the figure (the caller's own failure): the buffer is cut back. */
void hyp__svg_discard(hyp__svg *f);

/* Finite minimum and maximum of v[0..n) (both NaN when none is finite). */
void hyp__svg_range(const double *v, size_t n, double *lo, double *hi);

#endif
