/* write_png.c — render a tp_figure into a raster and save it as PNG. */
#include "trope/figure.h"

#include <math.h>
#include <stdlib.h>

tp_status tp_figure_render(const tp_figure *F, tp_raster *R, tp_error *err)
{
    for (size_t i = 0; i < F->n; i++) {
        const tp_fig_item *it = &F->items[i];
        switch (it->kind) {
        case TP_FIG_PATH:
            if (it->fill.a > 0 && it->npts >= 3) {
                tp_status s = tp_raster_fill(R, it->xy, it->npts, it->fill, err);
                if (s != TP_OK)
                    return s;
            }
            if (it->width > 0 && it->stroke.a > 0)
                tp_raster_stroke(R, it->xy, it->npts, it->closed, it->width, it->stroke);
            break;
        case TP_FIG_CIRCLE:
            if (it->fill.a > 0)
                tp_raster_disc(R, it->xy[0], it->xy[1], it->r + (it->width > 0 ? it->width / 2 : 0),
                               it->fill);
            if (it->width > 0 && it->stroke.a > 0)
                tp_raster_ring(R, it->xy[0], it->xy[1], it->r, it->width, it->stroke);
            break;
        case TP_FIG_TEXT:
            tp_raster_text(R, it->text, it->xy[0], it->xy[1], it->size, it->halign, it->valign,
                           it->fill, it->halo);
            break;
        }
    }
    return TP_OK;
}

tp_status tp_write_png(FILE *out, const tp_figure *F, tp_error *err)
{
    tp_raster R;
    size_t w = (size_t)lround(F->width), h = (size_t)lround(F->height);
    tp_status s = tp_raster_init(&R, w, h, F->background, err);
    if (s != TP_OK)
        return s;
    s = tp_figure_render(F, &R, err);
    if (s == TP_OK)
        s = tp_raster_write_png(&R, out, err);
    tp_raster_clear(&R);
    return s;
}
