/* raster.c — anti-aliased drawing into an RGBA buffer; PNG output through libpng's
 * simplified write API (the only file of libtrope that includes png.h).
 *
 * Each primitive first accumulates its coverage in R->mask over its bounding rows and
 * columns, then is composited once ("source over", premultiplied floats) and the touched
 * part of the mask is reset. Coverage models:
 *   strokes  union of capsules: coverage = clamp(r + 1/2 - distance to the segment),
 *            the maximum over the segments (so joins and caps are round);
 *   polygons exact horizontal span coverage on 4 sub-rows per pixel row (even-odd);
 *   discs    clamp(r + 1/2 - distance to the centre).
 */
#include "trope/raster.h"

#include <math.h>
#include <png.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    long x0, y0, x1, y1;   /* touched region [x0,x1) x [y0,y1), empty if x0 >= x1 */
} region;

static void region_reset(region *g)
{
    g->x0 = g->y0 = 0x7fffffffL;
    g->x1 = g->y1 = -1;
}

static void region_add(region *g, long x0, long y0, long x1, long y1)
{
    if (x0 < g->x0) g->x0 = x0;
    if (y0 < g->y0) g->y0 = y0;
    if (x1 > g->x1) g->x1 = x1;
    if (y1 > g->y1) g->y1 = y1;
}

static long clampl(long v, long lo, long hi)
{
    return v < lo ? lo : v > hi ? hi : v;
}

tp_status tp_raster_init(tp_raster *R, size_t w, size_t h, tp_rgba bg, tp_error *err)
{
    memset(R, 0, sizeof *R);
    if (w == 0 || h == 0 || w > 16384 || h > 16384)
        return tp_error_set(err, TP_EDOMAIN, 0, 0,
                            "image size %zux%zu: expected 1..16384 pixels on each side", w, h);
    R->px = malloc(w * h * 4 * sizeof(float));
    R->mask = calloc(w * h, sizeof(float));
    if (!R->px || !R->mask) {
        tp_raster_clear(R);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory for a %zux%zu image", w, h);
    }
    R->w = w;
    R->h = h;
    float a = bg.a / 255.0f;
    float c[4] = {bg.r / 255.0f * a, bg.g / 255.0f * a, bg.b / 255.0f * a, a};
    for (size_t i = 0; i < w * h; i++)
        memcpy(R->px + 4 * i, c, sizeof c);
    return TP_OK;
}

void tp_raster_clear(tp_raster *R)
{
    free(R->px);
    free(R->mask);
    memset(R, 0, sizeof *R);
}

/* Composite colour c through the mask over region g, then zero the mask there. */
static void flush(tp_raster *R, const region *g, tp_rgba c)
{
    long x0 = clampl(g->x0, 0, (long)R->w), x1 = clampl(g->x1, 0, (long)R->w);
    long y0 = clampl(g->y0, 0, (long)R->h), y1 = clampl(g->y1, 0, (long)R->h);
    float a = c.a / 255.0f;
    float cr = c.r / 255.0f, cg = c.g / 255.0f, cb = c.b / 255.0f;
    for (long y = y0; y < y1; y++) {
        for (long x = x0; x < x1; x++) {
            size_t i = (size_t)y * R->w + (size_t)x;
            float m = R->mask[i];
            if (m <= 0.0f)
                continue;
            if (m > 1.0f)
                m = 1.0f;
            R->mask[i] = 0.0f;
            float sa = a * m;
            float *p = R->px + 4 * i;
            float k = 1.0f - sa;
            p[0] = cr * sa + p[0] * k;
            p[1] = cg * sa + p[1] * k;
            p[2] = cb * sa + p[2] * k;
            p[3] = sa + p[3] * k;
        }
    }
}

static double seg_dist(double px, double py, double ax, double ay, double bx, double by)
{
    double dx = bx - ax, dy = by - ay;
    double l2 = dx * dx + dy * dy;
    double t = l2 > 0 ? ((px - ax) * dx + (py - ay) * dy) / l2 : 0;
    if (t < 0) t = 0;
    if (t > 1) t = 1;
    double ex = ax + t * dx - px, ey = ay + t * dy - py;
    return sqrt(ex * ex + ey * ey);
}

/* Coverage of a capsule of radius r around segment ab, max-combined into the mask. */
static void mask_capsule(tp_raster *R, region *g, double ax, double ay, double bx, double by,
                         double r)
{
    if (!isfinite(ax) || !isfinite(ay) || !isfinite(bx) || !isfinite(by) || !(r > 0))
        return;
    double reach = r + 1.0;
    double cmax = r >= 0.5 ? 1.0 : 2.0 * r;
    long ylo = clampl((long)floor(fmin(ay, by) - reach), 0, (long)R->h);
    long yhi = clampl((long)ceil(fmax(ay, by) + reach), 0, (long)R->h);
    double dy = by - ay;
    for (long y = ylo; y < yhi; y++) {
        double yc = y + 0.5;
        /* parameter range where the segment is within `reach` of this row */
        double t0 = 0, t1 = 1;
        if (fabs(dy) > 1e-12) {
            double ta = (yc - reach - ay) / dy, tb = (yc + reach - ay) / dy;
            if (ta > tb) {
                double s = ta;
                ta = tb;
                tb = s;
            }
            t0 = fmax(0, ta);
            t1 = fmin(1, tb);
            if (t0 > t1)
                continue;
        } else if (fabs(yc - ay) > reach) {
            continue;
        }
        double xa = ax + t0 * (bx - ax), xb = ax + t1 * (bx - ax);
        long xlo = clampl((long)floor(fmin(xa, xb) - reach), 0, (long)R->w);
        long xhi = clampl((long)ceil(fmax(xa, xb) + reach), 0, (long)R->w);
        if (xlo >= xhi)
            continue;
        region_add(g, xlo, y, xhi, y + 1);
        float *row = R->mask + (size_t)y * R->w;
        for (long x = xlo; x < xhi; x++) {
            double d = seg_dist(x + 0.5, yc, ax, ay, bx, by);
            double c = r + 0.5 - d;
            if (c <= 0)
                continue;
            if (c > cmax)
                c = cmax;
            if ((float)c > row[x])
                row[x] = (float)c;
        }
    }
}

static void mask_polyline(tp_raster *R, region *g, const double *xy, size_t n, bool closed,
                          double width)
{
    double r = width / 2;
    if (n == 1) {
        mask_capsule(R, g, xy[0], xy[1], xy[0], xy[1], r);
        return;
    }
    for (size_t k = 0; k + 1 < n; k++)
        mask_capsule(R, g, xy[2 * k], xy[2 * k + 1], xy[2 * k + 2], xy[2 * k + 3], r);
    if (closed && n > 2)
        mask_capsule(R, g, xy[2 * n - 2], xy[2 * n - 1], xy[0], xy[1], r);
}

void tp_raster_stroke(tp_raster *R, const double *xy, size_t n, bool closed, double width,
                      tp_rgba c)
{
    if (n == 0)
        return;
    region g;
    region_reset(&g);
    mask_polyline(R, &g, xy, n, closed, width);
    flush(R, &g, c);
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

tp_status tp_raster_fill(tp_raster *R, const double *xy, size_t n, tp_rgba c, tp_error *err)
{
    if (n < 3)
        return TP_OK;
    double ymin = xy[1], ymax = xy[1];
    for (size_t k = 0; k < n; k++) {
        if (!isfinite(xy[2 * k]) || !isfinite(xy[2 * k + 1]))
            return TP_OK;
        ymin = fmin(ymin, xy[2 * k + 1]);
        ymax = fmax(ymax, xy[2 * k + 1]);
    }
    double *cross = malloc(n * sizeof(double));
    if (!cross)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory while filling a polygon");
    region g;
    region_reset(&g);
    const int sub = 4;
    long ylo = clampl((long)floor(ymin), 0, (long)R->h);
    long yhi = clampl((long)ceil(ymax) + 1, 0, (long)R->h);
    for (long y = ylo; y < yhi; y++) {
        float *row = R->mask + (size_t)y * R->w;
        for (int s = 0; s < sub; s++) {
            double yc = y + (s + 0.5) / sub;
            size_t nc = 0;
            for (size_t k = 0; k < n; k++) {
                size_t l = (k + 1) % n;
                double y0 = xy[2 * k + 1], y1 = xy[2 * l + 1];
                if ((y0 <= yc) == (y1 <= yc))
                    continue;
                double x0 = xy[2 * k], x1 = xy[2 * l];
                cross[nc++] = x0 + (yc - y0) / (y1 - y0) * (x1 - x0);
            }
            qsort(cross, nc, sizeof(double), cmp_double);
            for (size_t k = 0; k + 1 < nc; k += 2) {
                double xa = fmax(cross[k], 0), xb = fmin(cross[k + 1], (double)R->w);
                if (xa >= xb)
                    continue;
                long ia = (long)floor(xa), ib = (long)floor(xb);
                if (ib >= (long)R->w)
                    ib = (long)R->w - 1;
                region_add(&g, ia, y, ib + 1, y + 1);
                for (long x = ia; x <= ib; x++) {
                    double lo = fmax(xa, (double)x), hi = fmin(xb, (double)x + 1);
                    if (hi > lo)
                        row[x] += (float)((hi - lo) / sub);
                }
            }
        }
    }
    free(cross);
    flush(R, &g, c);
    return TP_OK;
}

static void mask_disc(tp_raster *R, region *g, double cx, double cy, double r, double ringw)
{
    double reach = (ringw > 0 ? r + ringw / 2 : r) + 1.0;
    long xlo = clampl((long)floor(cx - reach), 0, (long)R->w);
    long xhi = clampl((long)ceil(cx + reach), 0, (long)R->w);
    long ylo = clampl((long)floor(cy - reach), 0, (long)R->h);
    long yhi = clampl((long)ceil(cy + reach), 0, (long)R->h);
    if (xlo >= xhi || ylo >= yhi)
        return;
    region_add(g, xlo, ylo, xhi, yhi);
    for (long y = ylo; y < yhi; y++) {
        for (long x = xlo; x < xhi; x++) {
            double d = hypot(x + 0.5 - cx, y + 0.5 - cy);
            double c = ringw > 0 ? ringw / 2 + 0.5 - fabs(d - r) : r + 0.5 - d;
            if (c <= 0)
                continue;
            if (c > 1)
                c = 1;
            float *m = R->mask + (size_t)y * R->w + (size_t)x;
            if ((float)c > *m)
                *m = (float)c;
        }
    }
}

void tp_raster_disc(tp_raster *R, double cx, double cy, double r, tp_rgba c)
{
    if (!isfinite(cx) || !isfinite(cy) || !(r > 0))
        return;
    region g;
    region_reset(&g);
    mask_disc(R, &g, cx, cy, r, 0);
    flush(R, &g, c);
}

void tp_raster_ring(tp_raster *R, double cx, double cy, double r, double width, tp_rgba c)
{
    if (!isfinite(cx) || !isfinite(cy) || !(r > 0) || !(width > 0))
        return;
    region g;
    region_reset(&g);
    mask_disc(R, &g, cx, cy, r, width);
    flush(R, &g, c);
}

static void mask_text(tp_raster *R, region *g, const char *s, double x, double y, double size,
                      int halign, int valign, double width)
{
    double scale = 0.07 * size;
    double w = tp_font_width(s, size);
    double pen = halign < 0 ? x : halign == 0 ? x - w / 2 : x - w;
    double base = valign > 0 ? y : valign == 0 ? y + 5 * scale : y + 10 * scale;
    double pts[2 * 128];
    size_t lens[16];
    double xy[2 * 128];
    while (*s) {
        uint32_t cp = tp_utf8_next(&s);
        double adv;
        size_t ns = tp_font_glyph(cp, pts, 128, lens, 16, &adv);
        size_t off = 0;
        for (size_t k = 0; k < ns; k++) {
            for (size_t j = 0; j < lens[k]; j++) {
                xy[2 * j] = pen + pts[2 * (off + j)] * scale;
                xy[2 * j + 1] = base - pts[2 * (off + j) + 1] * scale;
            }
            if (lens[k] > 0)
                mask_polyline(R, g, xy, lens[k], false, width);
            off += lens[k];
        }
        pen += adv * scale;
    }
}

void tp_raster_text(tp_raster *R, const char *utf8, double x, double y, double size,
                    int halign, int valign, tp_rgba c, double halo)
{
    double width = 0.095 * size;
    if (width < 1.0)
        width = 1.0;
    region g;
    if (halo > 0) {
        region_reset(&g);
        mask_text(R, &g, utf8, x, y, size, halign, valign, width + 2 * halo);
        tp_rgba white = {255, 255, 255, c.a};
        flush(R, &g, white);
    }
    region_reset(&g);
    mask_text(R, &g, utf8, x, y, size, halign, valign, width);
    flush(R, &g, c);
}

static uint8_t to8(float v)
{
    if (!(v > 0.0f))
        return 0;
    if (v >= 1.0f)
        return 255;
    return (uint8_t)lrintf(v * 255.0f);
}

void tp_raster_get(const tp_raster *R, size_t x, size_t y, uint8_t rgba[4])
{
    const float *p = R->px + 4 * (y * R->w + x);
    float a = p[3];
    if (a <= 0.0f) {
        rgba[0] = rgba[1] = rgba[2] = rgba[3] = 0;
        return;
    }
    rgba[0] = to8(p[0] / a);
    rgba[1] = to8(p[1] / a);
    rgba[2] = to8(p[2] / a);
    rgba[3] = to8(a);
}

static unsigned char *to_bytes(const tp_raster *R)
{
    unsigned char *b = malloc(R->w * R->h * 4);
    if (!b)
        return NULL;
    for (size_t y = 0; y < R->h; y++)
        for (size_t x = 0; x < R->w; x++)
            tp_raster_get(R, x, y, b + 4 * (y * R->w + x));
    return b;
}

static void setup_image(png_image *img, const tp_raster *R)
{
    memset(img, 0, sizeof *img);
    img->version = PNG_IMAGE_VERSION;
    img->width = (png_uint_32)R->w;
    img->height = (png_uint_32)R->h;
    img->format = PNG_FORMAT_RGBA;
}

tp_status tp_raster_write_png(const tp_raster *R, FILE *out, tp_error *err)
{
    unsigned char *b = to_bytes(R);
    if (!b)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory while encoding the PNG");
    png_image img;
    setup_image(&img, R);
    int ok = png_image_write_to_stdio(&img, out, 0, b, 0, NULL);
    free(b);
    if (!ok) {
        tp_status s = tp_error_set(err, TP_EIO, 0, 0, "PNG output failed: %s", img.message);
        png_image_free(&img);
        return s;
    }
    return TP_OK;
}

tp_status tp_raster_encode_png(const tp_raster *R, unsigned char **buf, size_t *len,
                               tp_error *err)
{
    *buf = NULL;
    *len = 0;
    unsigned char *b = to_bytes(R);
    if (!b)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory while encoding the PNG");
    png_image img;
    setup_image(&img, R);
    png_alloc_size_t size = 0;
    if (!png_image_write_to_memory(&img, NULL, &size, 0, b, 0, NULL)) {
        free(b);
        tp_status s = tp_error_set(err, TP_EIO, 0, 0, "PNG encoding failed: %s", img.message);
        png_image_free(&img);
        return s;
    }
    unsigned char *mem = malloc(size);
    if (!mem) {
        free(b);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory while encoding the PNG");
    }
    setup_image(&img, R);
    if (!png_image_write_to_memory(&img, mem, &size, 0, b, 0, NULL)) {
        free(b);
        free(mem);
        tp_status s = tp_error_set(err, TP_EIO, 0, 0, "PNG encoding failed: %s", img.message);
        png_image_free(&img);
        return s;
    }
    free(b);
    *buf = mem;
    *len = size;
    return TP_OK;
}
