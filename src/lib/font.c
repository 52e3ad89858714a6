/* font.c — trope's own stroke font.
 *
 * Each glyph is a tiny path program in font units (baseline 0, capitals 10 tall,
 * x-height 7, descenders to -3, y up):
 *   M x y          start a new stroke at (x,y)
 *   L x y          line to (x,y)
 *   A cx cy rx ry a0 a1
 *                  elliptic arc from angle a0 to a1 (degrees, counter-clockwise when
 *                  a1 > a0); it continues the current stroke when it starts where the
 *                  stroke ends, and starts a new stroke otherwise.
 * The letter shapes are plain geometric forms (circles, half-ellipses and straight
 * strokes) drawn for this project.
 */
#include "trope/raster.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    uint32_t cp;
    double width;
    const char *path;
} glyph;

static const glyph glyphs[] = {
    {'0', 6, "A 3 5 3 5 0 360 M 4.6 8 L 1.4 2"},
    {'1', 6, "M 1.2 8 L 3.5 10 L 3.5 0 M 1.2 0 L 5.8 0"},
    {'2', 6, "A 3 7 3 3 160 -35 L 0 0 L 6 0"},
    {'3', 6, "A 3 7.5 2.8 2.5 150 -90 A 3 2.5 3 2.5 90 -150"},
    {'4', 6, "M 4.6 0 L 4.6 10 L 0 3 L 6.2 3"},
    {'5', 6, "M 5.6 10 L 1 10 L 0.7 5.5 A 3 3.2 3 3.2 128 -150"},
    {'6', 6, "A 3 3.2 3 3.2 0 360 M 0 3.2 L 0 5 A 3.5 5 3.5 5 180 70"},
    {'7', 6, "M 0 10 L 6 10 L 2 0"},
    {'8', 6, "A 3 7.6 2.6 2.4 0 360 A 3 2.6 3 2.6 0 360"},
    {'9', 6, "A 3 6.8 3 3.2 0 360 M 6 6.8 L 6 5 A 2.5 5 3.5 5 0 -110"},
    {'A', 6.4, "M 0 0 L 3.2 10 L 6.4 0 M 1.1 3.4 L 5.3 3.4"},
    {'B', 6, "M 0 0 L 0 10 L 3.5 10 A 3.5 7.5 2.4 2.5 90 -90 L 0 5 "
             "M 3.5 5 L 3.7 5 A 3.7 2.5 2.4 2.5 90 -90 L 0 0"},
    {'C', 6.4, "A 3.4 5 3.4 5 45 315"},
    {'D', 6.4, "M 0 0 L 0 10 L 2 10 A 2 5 4.4 5 90 -90 L 0 0"},
    {'E', 5.6, "M 5.6 10 L 0 10 L 0 0 L 5.6 0 M 0 5 L 4.4 5"},
    {'F', 5.6, "M 5.6 10 L 0 10 L 0 0 M 0 5 L 4.4 5"},
    {'G', 6.4, "A 3.3 5 3.3 5 45 340 L 6.4 4.5 L 3.6 4.5"},
    {'H', 6, "M 0 0 L 0 10 M 6 0 L 6 10 M 0 5 L 6 5"},
    {'I', 4, "M 2 0 L 2 10 M 0 10 L 4 10 M 0 0 L 4 0"},
    {'J', 5.4, "M 5.4 10 L 5.4 3 A 2.7 3 2.7 3 0 -180"},
    {'K', 6, "M 0 0 L 0 10 M 6 10 L 0 3.5 M 2.2 5.8 L 6 0"},
    {'L', 5.4, "M 0 10 L 0 0 L 5.4 0"},
    {'M', 7.4, "M 0 0 L 0 10 L 3.7 3 L 7.4 10 L 7.4 0"},
    {'N', 6, "M 0 0 L 0 10 L 6 0 L 6 10"},
    {'O', 7, "A 3.5 5 3.5 5 0 360"},
    {'P', 6, "M 0 0 L 0 10 L 3.5 10 A 3.5 7.3 2.5 2.7 90 -90 L 0 4.6"},
    {'Q', 7, "A 3.5 5 3.5 5 0 360 M 4.2 2.6 L 7 -0.6"},
    {'R', 6, "M 0 0 L 0 10 L 3.5 10 A 3.5 7.3 2.5 2.7 90 -90 L 0 4.6 M 3 4.6 L 6 0"},
    {'S', 6, "A 3 7.5 2.8 2.5 30 270 A 3 2.5 3 2.5 90 -150"},
    {'T', 6.4, "M 0 10 L 6.4 10 M 3.2 10 L 3.2 0"},
    {'U', 6, "M 0 10 L 0 3 A 3 3 3 3 180 360 L 6 10"},
    {'V', 6.4, "M 0 10 L 3.2 0 L 6.4 10"},
    {'W', 8.4, "M 0 10 L 2.1 0 L 4.2 7 L 6.3 0 L 8.4 10"},
    {'X', 6, "M 0 0 L 6 10 M 0 10 L 6 0"},
    {'Y', 6.4, "M 0 10 L 3.2 5 L 6.4 10 M 3.2 5 L 3.2 0"},
    {'Z', 6, "M 0 10 L 6 10 L 0 0 L 6 0"},
    {'a', 5.6, "A 2.8 3.5 2.8 3.5 0 360 M 5.6 7 L 5.6 0"},
    {'b', 5.6, "M 0 10 L 0 0 A 2.8 3.5 2.8 3.5 0 360"},
    {'c', 5.4, "A 3 3.5 3 3.5 40 320"},
    {'d', 5.6, "A 2.8 3.5 2.8 3.5 0 360 M 5.6 10 L 5.6 0"},
    {'e', 5.8, "M 0.1 3.5 L 5.8 3.5 A 2.95 3.5 2.9 3.5 0 310"},
    {'f', 4.4, "M 4.4 9.6 A 3.5 8 1.5 2 60 180 L 2 0 M 0 7 L 4 7"},
    {'g', 5.6, "A 2.8 3.5 2.8 3.5 0 360 M 5.6 7 L 5.6 -0.5 A 2.8 -0.5 2.8 2.5 0 -160"},
    {'h', 5.6, "M 0 10 L 0 0 M 0 4.5 A 2.8 4.5 2.8 2.5 180 0 L 5.6 0"},
    {'i', 2, "M 1 7 L 1 0 M 1 9.2 L 1 9.6"},
    {'j', 3, "M 3 7 L 3 -1 A 1.5 -1 1.5 2 0 -150 M 3 9.2 L 3 9.6"},
    {'k', 5.2, "M 0 10 L 0 0 M 5 7 L 0 2.5 M 1.8 3.8 L 5.2 0"},
    {'l', 2, "M 1 10 L 1 0"},
    {'m', 8, "M 0 7 L 0 0 M 0 4.5 A 2 4.5 2 2.5 180 0 L 4 0 M 4 4.5 A 6 4.5 2 2.5 180 0 L 8 0"},
    {'n', 5.6, "M 0 7 L 0 0 M 0 4.5 A 2.8 4.5 2.8 2.5 180 0 L 5.6 0"},
    {'o', 6, "A 3 3.5 3 3.5 0 360"},
    {'p', 5.6, "M 0 7 L 0 -3 A 2.8 3.5 2.8 3.5 0 360"},
    {'q', 5.6, "A 2.8 3.5 2.8 3.5 0 360 M 5.6 7 L 5.6 -3"},
    {'r', 4.5, "M 0 7 L 0 0 M 0 4 A 3 4 3 3 180 60"},
    {'s', 5.2, "A 2.6 5.2 2.4 1.8 20 270 A 2.6 1.7 2.6 1.7 90 -160"},
    {'t', 4.5, "M 2 9.5 L 2 1 A 3.5 1 1.5 1 180 300 M 0 7 L 4.5 7"},
    {'u', 5.6, "M 0 7 L 0 2.5 A 2.8 2.5 2.8 2.5 180 360 M 5.6 7 L 5.6 0"},
    {'v', 6, "M 0 7 L 3 0 L 6 7"},
    {'w', 8, "M 0 7 L 2 0 L 4 5 L 6 0 L 8 7"},
    {'x', 5.5, "M 0 0 L 5.5 7 M 0 7 L 5.5 0"},
    {'y', 6, "M 0 7 L 3 0 M 6 7 L 1.8 -3"},
    {'z', 5.5, "M 0 7 L 5.5 7 L 0 0 L 5.5 0"},
    {' ', 2.5, ""},
    {'-', 4.5, "M 0.5 4 L 4.5 4"},
    {0x2212, 6, "M 0.5 4 L 5.5 4"},
    {'+', 6, "M 0.5 4 L 5.5 4 M 3 1.5 L 3 6.5"},
    {'=', 6, "M 0.5 5.5 L 5.5 5.5 M 0.5 2.5 L 5.5 2.5"},
    {'/', 4.5, "M 0 -1 L 4.5 10.5"},
    {'(', 3.4, "A 4 4 3 6.5 110 250"},
    {')', 3.4, "A -0.6 4 3 6.5 70 -70"},
    {'[', 3, "M 3 10.5 L 0.5 10.5 L 0.5 -2 L 3 -2"},
    {']', 3, "M 0 10.5 L 2.5 10.5 L 2.5 -2 L 0 -2"},
    {'<', 5.5, "M 5.5 8 L 0.5 4 L 5.5 0"},
    {'>', 5.5, "M 0 8 L 5 4 L 0 0"},
    {'.', 2, "M 1 0 L 1 0.3"},
    {',', 2, "M 1.3 0.5 L 0.5 -1.8"},
    {':', 2, "M 1 0 L 1 0.3 M 1 5 L 1 5.3"},
    {'*', 6, "M 3 8 L 3 2 M 0.4 6.5 L 5.6 3.5 M 0.4 3.5 L 5.6 6.5"},
    {'^', 6, "M 0.5 7 L 3 10 L 5.5 7"},
    {'_', 6, "M 0 -1.5 L 6 -1.5"},
    {'\'', 2, "M 1 10 L 1 7.5"},
    {'|', 2, "M 1 -2 L 1 10.5"},
    {0x00D7, 6, "M 0.8 1.2 L 5.2 5.8 M 0.8 5.8 L 5.2 1.2"},
};

static const char box_path[] = "M 0 0 L 5 0 L 5 10 L 0 10 L 0 0";

uint32_t tp_utf8_next(const char **s)
{
    const unsigned char *p = (const unsigned char *)*s;
    uint32_t c = p[0];
    int n = 0;
    if (c < 0x80) {
        *s += 1;
        return c;
    }
    if ((c & 0xE0) == 0xC0) {
        n = 1;
        c &= 0x1F;
    } else if ((c & 0xF0) == 0xE0) {
        n = 2;
        c &= 0x0F;
    } else if ((c & 0xF8) == 0xF0) {
        n = 3;
        c &= 0x07;
    } else {
        *s += 1;
        return 0xFFFD;
    }
    for (int i = 1; i <= n; i++) {
        if ((p[i] & 0xC0) != 0x80) {
            *s += i;
            return 0xFFFD;
        }
        c = (c << 6) | (p[i] & 0x3F);
    }
    *s += n + 1;
    return c;
}

static const glyph *find_glyph(uint32_t cp)
{
    for (size_t i = 0; i < sizeof glyphs / sizeof glyphs[0]; i++)
        if (glyphs[i].cp == cp)
            return &glyphs[i];
    return NULL;
}

static double number(const char **p)
{
    char *end;
    double v = strtod(*p, &end);
    *p = end;
    return v;
}

size_t tp_font_glyph(uint32_t cp, double *pts, size_t cap, size_t *lens, size_t maxstrokes,
                     double *advance)
{
    const glyph *g = find_glyph(cp);
    const char *p = g ? g->path : box_path;
    double width = g ? g->width : 5;
    *advance = width + 1.9;
    size_t np = 0, ns = 0;
    bool open = false;
#define PUT(X, Y)                                                                          \
    do {                                                                                   \
        if (np < cap) {                                                                    \
            pts[2 * np] = (X);                                                             \
            pts[2 * np + 1] = (Y);                                                         \
            np++;                                                                          \
            lens[ns - 1]++;                                                                \
        }                                                                                  \
    } while (0)
    while (*p) {
        char op = *p++;
        if (op == ' ')
            continue;
        if (op == 'M' || op == 'L') {
            double x = number(&p), y = number(&p);
            if (op == 'M' || !open) {
                if (ns >= maxstrokes)
                    break;
                lens[ns++] = 0;
                open = true;
            }
            PUT(x, y);
        } else if (op == 'A') {
            double cx = number(&p), cy = number(&p), rx = number(&p), ry = number(&p);
            double a0 = number(&p), a1 = number(&p);
            const double deg = 3.14159265358979323846 / 180.0;
            double sx = cx + rx * cos(a0 * deg), sy = cy + ry * sin(a0 * deg);
            bool cont = open && np > 0 && lens[ns - 1] > 0 &&
                        fabs(pts[2 * (np - 1)] - sx) < 0.05 &&
                        fabs(pts[2 * (np - 1) + 1] - sy) < 0.05;
            if (!cont) {
                if (ns >= maxstrokes)
                    break;
                lens[ns++] = 0;
                open = true;
            }
            int steps = (int)ceil(fabs(a1 - a0) / 12.0);
            if (steps < 2)
                steps = 2;
            for (int k = cont ? 1 : 0; k <= steps; k++) {
                double a = (a0 + (a1 - a0) * k / steps) * deg;
                PUT(cx + rx * cos(a), cy + ry * sin(a));
            }
        } else {
            break;   /* malformed table entry: stop (never happens for the table above) */
        }
    }
#undef PUT
    return ns;
}

double tp_font_width(const char *utf8, double size)
{
    double w = 0, last_gap = 0;
    const char *s = utf8;
    while (*s) {
        uint32_t cp = tp_utf8_next(&s);
        const glyph *g = find_glyph(cp);
        double gw = g ? g->width : 5;
        w += gw + 1.9;
        last_gap = 1.9;
    }
    w -= last_gap;
    if (w < 0)
        w = 0;
    return w * 0.07 * size;
}
