/* trope/raster.h — anti-aliased drawing into an RGBA buffer, saved as PNG.
 *
 * Coordinates are pixels: x to the right, y downwards, (0,0) the top-left corner of the
 * top-left pixel; pixel (i,j) covers [i,i+1) x [j,j+1) and is sampled at its centre.
 * Colours are 8-bit sRGB with straight (non-premultiplied) alpha; the buffer keeps
 * premultiplied floats and composites every primitive once with "source over", so a
 * translucent stroke that crosses itself is not darkened at its joins.
 *
 * Strokes have round caps and round joins (a stroke is the union of capsules around its
 * segments). Coverage is computed analytically (distance to the segment, exact horizontal
 * span coverage on 4 sub-rows for polygons), so edges are anti-aliased.
 *
 * Invariants: deterministic (same calls, same bytes); libpng is used only in raster.c.
 * The stroke font (font.c) is declared here too: it draws text as strokes, so PNGs carry
 * the same labels as the vector formats.
 */
#ifndef TROPE_RASTER_H
#define TROPE_RASTER_H

#include <stdbool.h>
#include <stdint.h>
#include <stdio.h>
#include "trope/error.h"

typedef struct {
    uint8_t r, g, b, a;   /* straight alpha */
} tp_rgba;

typedef struct {
    size_t w, h;
    float *px;            /* w*h*4 premultiplied RGBA in [0,1] */
    float *mask;          /* w*h coverage scratch (one primitive at a time) */
} tp_raster;

/* tp_raster_init: a w x h canvas filled with bg (bg.a = 0 gives a transparent canvas).
 *   returns TP_OK; TP_EDOMAIN if w or h is 0 or above 16384; TP_ENOMEM. */
TP_MUST_CHECK tp_status tp_raster_init(tp_raster *R, size_t w, size_t h, tp_rgba bg,
                                       tp_error *err);
void tp_raster_clear(tp_raster *R);   /* frees; safe on a zeroed or cleared raster */

/* tp_raster_stroke: a polyline of n points (xy[2k], xy[2k+1]) of the given width, with
 *   round caps and joins; closed adds the segment back to the first point. n = 1 draws a
 *   dot of diameter width. */
void tp_raster_stroke(tp_raster *R, const double *xy, size_t n, bool closed, double width,
                      tp_rgba c);
/* tp_raster_fill: a simple polygon (even-odd rule) of n >= 3 points (fewer: nothing).
 *   returns TP_OK; TP_ENOMEM. */
TP_MUST_CHECK tp_status tp_raster_fill(tp_raster *R, const double *xy, size_t n, tp_rgba c,
                                       tp_error *err);
/* tp_raster_disc: a filled disc. tp_raster_ring: a circle outline of the given width. */
void tp_raster_disc(tp_raster *R, double cx, double cy, double r, tp_rgba c);
void tp_raster_ring(tp_raster *R, double cx, double cy, double r, double width, tp_rgba c);

/* tp_raster_text: UTF-8 text in the stroke font. size is the em size in pixels (capital
 *   letters are 0.7*size tall). halign -1/0/1 puts x at the left end / centre / right end;
 *   valign -1/0/1 puts y at the cap top / middle of the capitals / baseline. A halo > 0
 *   first draws the text in white (same alpha) widened by halo pixels. */
void tp_raster_text(tp_raster *R, const char *utf8, double x, double y, double size,
                    int halign, int valign, tp_rgba c, double halo);

/* tp_raster_get: the 8-bit straight-alpha RGBA value of pixel (x,y). */
void tp_raster_get(const tp_raster *R, size_t x, size_t y, uint8_t rgba[4]);

/* tp_raster_write_png: write R to an open stream (8-bit RGBA PNG).
 *   returns TP_OK; TP_EIO with libpng's message. */
TP_MUST_CHECK tp_status tp_raster_write_png(const tp_raster *R, FILE *out, tp_error *err);
/* tp_raster_encode_png: the PNG bytes in a malloc'ed buffer (*len bytes).
 *   returns TP_OK; TP_EIO; TP_ENOMEM. */
TP_MUST_CHECK tp_status tp_raster_encode_png(const tp_raster *R, unsigned char **buf,
                                             size_t *len, tp_error *err);

/* ---- the stroke font (font.c) ----
 * Glyphs are polylines in font units: baseline y = 0, capitals 10 tall, x-height 7,
 * descenders to -3, y upwards. Covered: 0-9, A-Z, a-z, space and + - = / ( ) . , : * ^
 * _ ' | < > [ ], U+00D7 (multiplication sign) and U+2212 (minus); anything else is drawn
 * as an outlined box. */

/* tp_font_glyph: the strokes of code point cp. Writes at most cap points into pts
 *   (x,y pairs) and the length of each stroke into lens (at most maxstrokes); returns
 *   the number of strokes (0 for space) and sets *advance to the pen advance. */
size_t tp_font_glyph(uint32_t cp, double *pts, size_t cap, size_t *lens, size_t maxstrokes,
                     double *advance);
/* tp_font_width: width in pixels of utf8 at em size `size` (without trailing spacing). */
double tp_font_width(const char *utf8, double size);
/* tp_utf8_next: decode one code point at *s and advance *s (invalid bytes give U+FFFD). */
uint32_t tp_utf8_next(const char **s);

#endif
