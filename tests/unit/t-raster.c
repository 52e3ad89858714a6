/* t-raster.c — the anti-aliased rasteriser, the stroke font and PNG encoding.
 *
 * References (common practice, no source): the area of a disc is pi r^2; the area of a
 * simple polygon is given by the shoelace formula; with exact coverage anti-aliasing the
 * summed coverage of a shape equals its area up to the boundary sampling error; a round
 * cap extends a stroke by half its width beyond its end point, a butt cap would not;
 * "source over" compositing of colour c with alpha a over white gives a*c + (1-a)*255.
 * PNG files begin with the 8-byte signature 89 50 4E 47 0D 0A 1A 0A followed by an
 * IHDR chunk holding the width and height as big-endian 32-bit integers (PNG
 * specification, ISO/IEC 15948:2004, §5.2 and §11.2.2).
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "testlib.h"
#include "trope/raster.h"

static const tp_rgba WHITE = {255, 255, 255, 255};
static const tp_rgba BLACK = {0, 0, 0, 255};

/* ink in [0,1]: 1 - red/255 for black on white */
static double ink(const tp_raster *R, size_t x, size_t y)
{
    uint8_t p[4];
    tp_raster_get(R, x, y, p);
    return 1.0 - p[0] / 255.0;
}

static double total_ink(const tp_raster *R)
{
    double s = 0;
    for (size_t y = 0; y < R->h; y++)
        for (size_t x = 0; x < R->w; x++)
            s += ink(R, x, y);
    return s;
}

static void test_init(void)
{
    tp_raster R;
    tp_error err;
    tp_error_init(&err, NULL);
    tp_check(tp_raster_init(&R, 0, 10, WHITE, &err) == TP_EDOMAIN, "0 width refused");
    tp_check(tp_raster_init(&R, 20000, 10, WHITE, &err) == TP_EDOMAIN, "huge width refused");
    tp_check(tp_raster_init(&R, 8, 4, (tp_rgba){0, 0, 0, 0}, &err) == TP_OK, "init");
    uint8_t p[4];
    tp_raster_get(&R, 3, 2, p);
    tp_check(p[3] == 0, "transparent background has alpha 0, got %u", p[3]);
    tp_raster_clear(&R);
    tp_raster_clear(&R);   /* twice is fine */
}

static void test_stroke(void)
{
    tp_raster R;
    tp_error err;
    tp_error_init(&err, NULL);
    tp_check(tp_raster_init(&R, 64, 32, WHITE, &err) == TP_OK, "init");
    double xy[4] = {10, 16, 50, 16};
    tp_raster_stroke(&R, xy, 2, false, 4, BLACK);
    tp_check(ink(&R, 30, 15) > 0.99 && ink(&R, 30, 16) > 0.99, "centre of the stroke is ink");
    tp_check(ink(&R, 30, 5) == 0 && ink(&R, 30, 26) == 0, "far pixels are background");
    /* the stroke covers y in [14,18]: rows 14..17 fully, rows 13 and 18 not at all */
    tp_check(ink(&R, 30, 13) < 0.01 && ink(&R, 30, 18) < 0.01, "crisp horizontal edge");
    /* round cap: the pixel centre 1.5 beyond the end on the axis is inside the cap */
    tp_check(ink(&R, 8, 15) > 0.5, "round cap reaches beyond the end point");
    /* ... but a corner of a square cap (distance > 2.5) is not */
    tp_check(ink(&R, 7, 13) < 0.05, "the cap is round, not square");
    /* area: a capsule of length 40 and radius 2 has area 160 + 4 pi */
    double area = 40 * 4 + M_PI * 4;
    double got = total_ink(&R);
    tp_check(fabs(got - area) < 0.02 * area, "stroke area %.2f, expected %.2f", got, area);
    tp_raster_clear(&R);

    /* anti-aliasing of a diagonal: partial coverage exists */
    tp_check(tp_raster_init(&R, 64, 64, WHITE, &err) == TP_OK, "init");
    double d[4] = {5, 5, 58, 40};
    tp_raster_stroke(&R, d, 2, false, 3, BLACK);
    size_t partial = 0;
    for (size_t y = 0; y < 64; y++)
        for (size_t x = 0; x < 64; x++) {
            double k = ink(&R, x, y);
            partial += k > 0.05 && k < 0.95;
        }
    tp_check(partial > 40, "a diagonal stroke has anti-aliased pixels (%zu)", partial);
    tp_raster_clear(&R);

    /* a translucent polyline that turns back on itself is composited once */
    tp_check(tp_raster_init(&R, 64, 64, WHITE, &err) == TP_OK, "init");
    double zz[6] = {10, 32, 50, 32, 10, 33};
    tp_raster_stroke(&R, zz, 3, false, 6, (tp_rgba){0, 0, 0, 128});
    double a = ink(&R, 30, 32);
    tp_check(fabs(a - 128.0 / 255.0) < 0.01, "overlap not darkened: %.3f", a);
    tp_raster_clear(&R);
}

static void test_fill(void)
{
    tp_raster R;
    tp_error err;
    tp_error_init(&err, NULL);
    tp_rng rng;
    tp_rng_seed(&rng, tp_test_seed());
    for (long it = 0; it < 40 * tp_test_multiplier(); it++) {
        tp_check(tp_raster_init(&R, 80, 80, WHITE, &err) == TP_OK, "init");
        double xy[6];
        for (int k = 0; k < 6; k++)
            xy[k] = 5 + (double)tp_rng_range(&rng, 0, 7000) / 100.0;
        double area = 0.5 * fabs((xy[2] - xy[0]) * (xy[5] - xy[1]) -
                                 (xy[4] - xy[0]) * (xy[3] - xy[1]));
        tp_check(tp_raster_fill(&R, xy, 3, BLACK, &err) == TP_OK, "fill");
        double got = total_ink(&R);
        /* 4 sub-rows: the error is at most about a quarter pixel per unit of height */
        double tol = 0.5 + 0.02 * area + 0.26 * 70;
        tp_check(fabs(got - area) < tol, "seed=%llu it=%ld: triangle area %.2f, ink %.2f",
                 (unsigned long long)tp_test_seed(), it, area, got);
        tp_raster_clear(&R);
    }
    /* half-covered boundary pixels, alpha blending over white */
    tp_check(tp_raster_init(&R, 32, 32, WHITE, &err) == TP_OK, "init");
    double sq[8] = {10.5, 10, 20, 10, 20, 20, 10.5, 20};
    tp_check(tp_raster_fill(&R, sq, 4, BLACK, &err) == TP_OK, "fill");
    tp_check(fabs(ink(&R, 10, 15) - 0.5) < 0.01, "half pixel coverage: %.3f", ink(&R, 10, 15));
    tp_check(ink(&R, 15, 15) > 0.99 && ink(&R, 25, 15) == 0, "inside ink, outside none");
    tp_check(tp_raster_fill(&R, sq, 2, BLACK, &err) == TP_OK, "2 points: nothing to do");
    tp_raster_clear(&R);
    tp_check(tp_raster_init(&R, 32, 32, WHITE, &err) == TP_OK, "init");
    double full[8] = {0, 0, 32, 0, 32, 32, 0, 32};
    tp_check(tp_raster_fill(&R, full, 4, (tp_rgba){0, 0, 255, 64}, &err) == TP_OK, "fill");
    uint8_t p[4];
    tp_raster_get(&R, 16, 16, p);
    /* 64/255 of blue over white: red = (1 - 64/255) * 255 = 191 */
    tp_check(p[0] == 191 && p[2] == 255 && p[3] == 255, "alpha over white: %u %u %u %u", p[0],
             p[1], p[2], p[3]);
    tp_raster_clear(&R);
}

static void test_disc(void)
{
    tp_raster R;
    tp_error err;
    tp_error_init(&err, NULL);
    tp_check(tp_raster_init(&R, 64, 64, WHITE, &err) == TP_OK, "init");
    tp_raster_disc(&R, 31.3, 30.8, 12, BLACK);
    double got = total_ink(&R), area = M_PI * 144;
    tp_check(fabs(got - area) < 0.01 * area, "disc area %.2f vs pi r^2 = %.2f", got, area);
    tp_raster_clear(&R);
    tp_check(tp_raster_init(&R, 64, 64, WHITE, &err) == TP_OK, "init");
    tp_raster_ring(&R, 32, 32, 12, 2, BLACK);
    got = total_ink(&R);
    area = M_PI * (13 * 13 - 11 * 11);
    tp_check(fabs(got - area) < 0.03 * area, "ring area %.2f vs %.2f", got, area);
    tp_check(ink(&R, 32, 32) == 0, "a ring is hollow");
    tp_raster_clear(&R);
}

static void test_font(void)
{
    /* every glyph stays inside the font's box: x in [-0.5, 9], y in [-3.5, 11] */
    const char *all = "0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz"
                      "+-=/().,:*^_'|<>[]\xc3\x97\xe2\x88\x92";
    const char *s = all;
    double pts[256];
    size_t lens[16];
    while (*s) {
        uint32_t cp = tp_utf8_next(&s);
        double adv;
        size_t ns = tp_font_glyph(cp, pts, 128, lens, 16, &adv);
        size_t np = 0;
        for (size_t k = 0; k < ns; k++)
            np += lens[k];
        tp_check(ns >= 1 && np >= 2, "glyph U+%04X has strokes", (unsigned)cp);
        for (size_t i = 0; i < np; i++)
            tp_check(pts[2 * i] >= -0.7 && pts[2 * i] <= 9 && pts[2 * i + 1] >= -3.5 &&
                         pts[2 * i + 1] <= 11,
                     "glyph U+%04X point (%g,%g) inside the box", (unsigned)cp, pts[2 * i],
                     pts[2 * i + 1]);
        tp_check(adv > 2 && adv < 11, "advance of U+%04X", (unsigned)cp);
    }
    double adv;
    tp_check(tp_font_glyph(' ', pts, 128, lens, 16, &adv) == 0 && adv > 1, "space");
    tp_check(tp_font_glyph(0x4E00, pts, 128, lens, 16, &adv) == 1, "unknown glyph: a box");
    const char *bad = "\xff";
    tp_check(tp_utf8_next(&bad) == 0xFFFD, "invalid UTF-8");
    tp_check(tp_font_width("", 20) == 0, "empty width");
    tp_check(fabs(tp_font_width("11", 20) - 2 * tp_font_width("1", 20) - 1.9 * 1.4) < 1e-9,
             "widths add up with the spacing");

    /* text is drawn where it is anchored */
    tp_raster R;
    tp_error err;
    tp_error_init(&err, NULL);
    tp_check(tp_raster_init(&R, 200, 60, WHITE, &err) == TP_OK, "init");
    double size = 30, w = tp_font_width("2/3", size);
    tp_raster_text(&R, "2/3", 100, 40, size, 0, 1, BLACK, 0);
    double inside = 0, outside = 0;
    for (size_t y = 0; y < 60; y++)
        for (size_t x = 0; x < 200; x++) {
            bool in = x + 1 >= 100 - w / 2 - 3 && x <= 100 + w / 2 + 3 && y + 1 >= 40 - 0.75 * size - 3 &&
                      y <= 40 + 0.1 * size + 3;
            *(in ? &inside : &outside) += ink(&R, x, y);
        }
    tp_check(inside > 50 && outside == 0, "text ink inside its box (%.1f), none outside (%.1f)",
             inside, outside);
    tp_raster_clear(&R);
}

static void test_png(void)
{
    tp_raster R;
    tp_error err;
    tp_error_init(&err, NULL);
    tp_check(tp_raster_init(&R, 300, 17, WHITE, &err) == TP_OK, "init");
    double xy[4] = {3, 3, 290, 12};
    tp_raster_stroke(&R, xy, 2, false, 3, BLACK);
    unsigned char *a = NULL, *b = NULL;
    size_t la = 0, lb = 0;
    tp_check(tp_raster_encode_png(&R, &a, &la, &err) == TP_OK, "encode: %s", err.msg);
    tp_check(tp_raster_encode_png(&R, &b, &lb, &err) == TP_OK, "encode again");
    static const unsigned char sig[8] = {0x89, 'P', 'N', 'G', 0x0D, 0x0A, 0x1A, 0x0A};
    tp_check(la > 33 && memcmp(a, sig, 8) == 0, "PNG signature");
    tp_check(la > 33 && memcmp(a + 12, "IHDR", 4) == 0, "IHDR first");
    if (la > 33) {
        unsigned long w = ((unsigned long)a[16] << 24) | ((unsigned long)a[17] << 16) |
                          ((unsigned long)a[18] << 8) | a[19];
        unsigned long h = ((unsigned long)a[20] << 24) | ((unsigned long)a[21] << 16) |
                          ((unsigned long)a[22] << 8) | a[23];
        tp_check(w == 300 && h == 17, "IHDR size %lux%lu", w, h);
    }
    tp_check(la == lb && memcmp(a, b, la) == 0, "encoding is deterministic");
    free(a);
    free(b);
    FILE *ro = tmpfile();
    if (ro) {
        tp_check(tp_raster_write_png(&R, ro, &err) == TP_OK, "write to a stream");
        tp_check((size_t)ftell(ro) == la, "stream and memory give the same bytes");
        fclose(ro);
    }
    tp_raster_clear(&R);
}

int main(void)
{
    test_init();
    test_stroke();
    test_fill();
    test_disc();
    test_font();
    test_png();
    return tp_test_finish("raster");
}
