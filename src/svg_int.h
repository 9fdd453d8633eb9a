/* svg_int.h - what the figure frame (svg.c), the data marks
 * (svg_marks.c) and the legend (svg_legend.c) share (private to the
 * drawing layer). */
#ifndef HYP_SVG_INT_H
#define HYP_SVG_INT_H

#include "svg.h"

enum { HYP__KEY_LINE, HYP__KEY_BAND, HYP__KEY_MARKER, HYP__KEY_BAR };

/* Pixel position of a data value (finite in, finite out: clamped to
 * +-1e9 px, where the visible part of a line to it no longer moves). */
double hyp__svg_px_x(const hyp__svg *f, double x);
double hyp__svg_px_y(const hyp__svg *f, double y);

/* Appends fmt with its directives replaced: %p a double as a coordinate
 * (2 decimals, trimmed), %s a trusted string as is, %t a string escaped
 * for XML, %d an int, %% a '%'. A non-finite %p is a library fault: the
 * figure fails with HYP_ERR_INTERNAL rather than write it. */
void hyp__svg_out(hyp__svg *f, const char *fmt, ...);

/* The figure's status after writing: a refused append becomes
 * HYP_ERR_NOMEM with its message. */
hyp_status hyp__svg_settle(hyp__svg *f);
hyp_status hyp__svg_fail(hyp__svg *f, hyp_status st);

void hyp__svg_clip_enter(hyp__svg *f);
void hyp__svg_clip_leave(hyp__svg *f);

void hyp__svg_add_key(hyp__svg *f, int kind, int colour, int dash, int marker, int hatch, double width_px,
                      const char *text);

/* One marker of size s px centred on (px, py): filled with colour (a
 * white rim apart from its neighbours), or hollow, outlined in it. */
void hyp__svg_marker_at(hyp__svg *f, hyp__svg_marker m, double px, double py, double s, const char *colour,
                        int hollow);
/* A rect filled with colour and, for hatch 1..3, white hatching over it. */
void hyp__svg_hatched_rect(hyp__svg *f, double x, double y, double w, double h, int colour, int hatch);

/* Marks the plot area's cells under a point, a straight stroke or a
 * rectangle (pixels) as drawn in, for the legend's placement. */
void hyp__svg_occupy(hyp__svg *f, double px, double py);
void hyp__svg_occupy_seg(hyp__svg *f, double x0, double y0, double x1, double y1);
void hyp__svg_occupy_rect(hyp__svg *f, double x, double y, double w, double h);

/* Copies at most HYP__SVG_TEXT_MAX - 1 bytes of s, never ending inside a
 * UTF-8 character. */
void hyp__svg_copy_text(char dst[HYP__SVG_TEXT_MAX], const char *s);

#endif
