/* png_check.c - what a browser's screenshot shows, for the report's
 * browser test: decodes an 8-bit RGB or RGBA PNG (PNG specification,
 * W3C Recommendation, 2nd ed. 2003: chunks section 5, zlib stream section
 * 10, filters section 9) with zlib and prints
 *   WIDTH HEIGHT COLOURS INKED_PERMILLE LAST_INKED_ROW
 * COLOURS: distinct colours (counted up to 256), INKED: pixels not the
 * colour of the top left one (the page's background), LAST_INKED_ROW: the
 * last row holding any (-1 when none). Exit 1 when the file is not such a
 * PNG. Not part of the library. */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <zlib.h>

static uint32_t be32(const unsigned char *p)
{
    return (uint32_t)p[0] << 24 | (uint32_t)p[1] << 16 | (uint32_t)p[2] << 8 | p[3];
}

static int paeth(int a, int b, int c)
{
    int p = a + b - c, pa = abs(p - a), pb = abs(p - b), pc = abs(p - c);
    return pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
}

/* Undoes the filter of each row in place (section 9.2). */
static int unfilter(unsigned char *raw, uint32_t w, uint32_t h, int bpp)
{
    size_t stride = (size_t)w * bpp;
    for (uint32_t y = 0; y < h; y++) {
        unsigned char *row = raw + y * (stride + 1), *cur = row + 1;
        const unsigned char *prev = y ? raw + (y - 1) * (stride + 1) + 1 : NULL;
        for (size_t i = 0; i < stride; i++) {
            int a = i >= (size_t)bpp ? cur[i - bpp] : 0, b = prev ? prev[i] : 0, c = prev && i >= (size_t)bpp ? prev[i - bpp] : 0;
            switch (row[0]) {
            case 0: break;
            case 1: cur[i] = (unsigned char)(cur[i] + a); break;
            case 2: cur[i] = (unsigned char)(cur[i] + b); break;
            case 3: cur[i] = (unsigned char)(cur[i] + (a + b) / 2); break;
            case 4: cur[i] = (unsigned char)(cur[i] + paeth(a, b, c)); break;
            default: return -1;
            }
        }
    }
    return 0;
}

static unsigned char *read_all(const char *path, size_t *n)
{
    FILE *f = fopen(path, "rb");
    if (!f)
        return NULL;
    fseek(f, 0, SEEK_END);
    long len = ftell(f);
    fseek(f, 0, SEEK_SET);
    unsigned char *b = len > 0 ? malloc((size_t)len) : NULL;
    if (b && fread(b, 1, (size_t)len, f) != (size_t)len) {
        free(b);
        b = NULL;
    }
    fclose(f);
    *n = (size_t)len;
    return b;
}

/* The concatenated IDAT data; w, h and bytes per pixel from IHDR. */
static unsigned char *idat(const unsigned char *b, size_t n, uint32_t *w, uint32_t *h, int *bpp, size_t *len)
{
    static const unsigned char sig[8] = {137, 80, 78, 71, 13, 10, 26, 10};
    if (n < 8 || memcmp(b, sig, 8))
        return NULL;
    unsigned char *out = NULL;
    *len = 0;
    for (size_t p = 8; p + 12 <= n;) {
        uint32_t clen = be32(b + p);
        if (clen > n - p - 12)
            break;
        const unsigned char *type = b + p + 4, *data = b + p + 8;
        if (!memcmp(type, "IHDR", 4)) {
            *w = be32(data), *h = be32(data + 4);
            if (data[8] != 8 || (data[9] != 2 && data[9] != 6) || data[12] != 0)
                return NULL;   /* only 8-bit RGB / RGBA, not interlaced */
            *bpp = data[9] == 6 ? 4 : 3;
        } else if (!memcmp(type, "IDAT", 4)) {
            unsigned char *q = realloc(out, *len + clen);
            if (!q)
                return free(out), NULL;
            out = q;
            memcpy(out + *len, data, clen);
            *len += clen;
        }
        p += 12 + clen;
    }
    return out;
}

int main(int argc, char **argv)
{
    size_t n, zlen;
    unsigned char *file = argc == 2 ? read_all(argv[1], &n) : NULL;
    uint32_t w = 0, h = 0;
    int bpp = 0;
    unsigned char *z = file ? idat(file, n, &w, &h, &bpp, &zlen) : NULL;
    if (!z || !w || !h || w > 20000 || h > 40000) {
        fprintf(stderr, "png_check: %s: not an 8-bit RGB(A) PNG\n", argc == 2 ? argv[1] : "(no file)");
        return 1;
    }
    uLongf rlen = (uLongf)h * ((uLongf)w * (uLongf)bpp + 1);
    unsigned char *raw = malloc(rlen);
    if (!raw || uncompress(raw, &rlen, z, zlen) != Z_OK || rlen != (uLongf)h * ((uLongf)w * bpp + 1) ||
        unfilter(raw, w, h, bpp)) {
        fprintf(stderr, "png_check: %s: image data could not be decoded\n", argv[1]);
        return 1;
    }
    static uint32_t seen[256];
    size_t colours = 0, inked = 0;
    long last = -1;
    const unsigned char *bg = raw + 1;
    for (uint32_t y = 0; y < h; y++)
        for (uint32_t x = 0; x < w; x++) {
            const unsigned char *px = raw + y * ((size_t)w * bpp + 1) + 1 + (size_t)x * bpp;
            uint32_t c = (uint32_t)px[0] << 16 | (uint32_t)px[1] << 8 | px[2];
            if (memcmp(px, bg, 3)) {
                inked++;
                last = (long)y;
            }
            size_t k = 0;
            while (colours < 256 && k < colours && seen[k] != c)
                k++;
            if (k == colours && colours < 256)
                seen[colours++] = c;
        }
    printf("%u %u %zu %.0f %ld\n", w, h, colours, 1000.0 * (double)inked / ((double)w * h), last);
    free(raw), free(z), free(file);
    return 0;
}
