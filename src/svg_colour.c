/* svg_colour.c - series colours, dash patterns and the sequential scale of
 * the SVG drawing layer (see svg.h). */
#include "svg.h"

#include <math.h>

/* The Okabe-Ito palette (M. Okabe and K. Ito, "Color Universal Design
 * (CUD): how to make figures and presentations that are friendly to
 * colorblind people", 2002; RGB values from memory, the same as the hex
 * codes in common use, e.g. R's palette.colors("Okabe-Ito")): eight colours
 * chosen to stay distinct under protanopia, deuteranopia and tritanopia.
 * Ordered here for white paper: the dark, well-separated colours first,
 * black late (it is also the axes' colour) and yellow last (too light on
 * white). In greyscale several of them print alike, which is why series
 * also differ in dash pattern and marker (hyp__svg_style_nth). */
static const char *const palette[HYP__SVG_PALETTE_N] = {
    "#0072B2",   /* blue */
    "#D55E00",   /* vermillion */
    "#009E73",   /* bluish green */
    "#CC79A7",   /* reddish purple */
    "#E69F00",   /* orange */
    "#56B4E9",   /* sky blue */
    "#000000",   /* black */
    "#F0E442",   /* yellow */
};

/* Dash patterns in px (common practice, no source): each differs from its
 * neighbours in rhythm, not only length, so they stay apart when printed. */
static const char *const dashes[HYP__SVG_DASH_N] = {"none", "7 3", "2 2", "9 3 2 3", "1 3", "12 4 2 4 2 4"};

const char *hyp__svg_colour(int k)
{
    return palette[(k < 0 ? -k : k) % HYP__SVG_PALETTE_N];
}

const char *hyp__svg_dash(int k)
{
    return dashes[(k < 0 ? -k : k) % HYP__SVG_DASH_N];
}

/* viridis (S. van der Walt and N. Smith, the default colour map of
 * matplotlib 2.0, 2015): perceptually uniform, lightness rising from dark
 * blue-violet to yellow, so it reads in greyscale and for the common colour
 * vision deficiencies. The ten colours at i/9 as R's viridisLite::viridis(10)
 * prints them (from memory; other published copies differ by at most
 * 2/255 a channel), joined linearly in sRGB. */
static const unsigned char viridis[10][3] = {
    {0x44, 0x01, 0x54}, {0x48, 0x28, 0x78}, {0x3E, 0x4A, 0x89}, {0x31, 0x68, 0x8E}, {0x26, 0x82, 0x8E},
    {0x1F, 0x9E, 0x89}, {0x35, 0xB7, 0x79}, {0x6D, 0xCD, 0x59}, {0xB4, 0xDE, 0x2C}, {0xFD, 0xE7, 0x25},
};

static void hex_colour(char out[8], const double rgb[3])
{
    static const char hex[] = "0123456789ABCDEF";
    out[0] = '#';
    for (int c = 0; c < 3; c++) {
        long v = lround(rgb[c]);
        v = v < 0 ? 0 : v > 255 ? 255 : v;
        out[1 + 2 * c] = hex[v >> 4];
        out[2 + 2 * c] = hex[v & 15];
    }
    out[7] = '\0';
}

void hyp__svg_seq_colour(double t, char out[8])
{
    if (isnan(t)) {
        const double grey[3] = {153, 153, 153};
        hex_colour(out, grey);
        return;
    }
    t = t < 0 ? 0 : t > 1 ? 1 : t;
    double u = t * 9.0;
    int i = (int)floor(u);
    if (i > 8)
        i = 8;
    double w = u - i, rgb[3];
    for (int c = 0; c < 3; c++)
        rgb[c] = (1 - w) * viridis[i][c] + w * viridis[i + 1][c];
    hex_colour(out, rgb);
}
