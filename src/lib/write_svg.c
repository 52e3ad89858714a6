/* write_svg.c — a tp_figure as SVG 1.1.
 *
 * The root element carries the views so that coordinates can be checked against exact
 * values: data-view="scale ox oy" (X = ox + scale*x, Y = oy - scale*y) and, for plane
 * curves, data-axes="i j" (the coordinates drawn); surfaces add data-ex and data-ey.
 * Every element has class = the item's role and data-id = its id when there is one.
 */
#include "trope/figure.h"

#include <math.h>
#include <string.h>

static void color_attr(FILE *f, const char *name, tp_rgba c)
{
    if (c.a == 0) {
        fprintf(f, " %s=\"none\"", name);
        return;
    }
    fprintf(f, " %s=\"#%02x%02x%02x\"", name, c.r, c.g, c.b);
    if (c.a < 255)
        fprintf(f, " %s-opacity=\"%.3f\"", name, c.a / 255.0);
}

static void num(FILE *f, double v)
{
    char b[64];
    snprintf(b, sizeof b, "%.2f", v);
    if (strcmp(b, "-0.00") == 0)
        snprintf(b, sizeof b, "0.00");
    fputs(b, f);
}

static void escape(FILE *f, const char *s)
{
    for (; *s; s++) {
        switch (*s) {
        case '<': fputs("&lt;", f); break;
        case '>': fputs("&gt;", f); break;
        case '&': fputs("&amp;", f); break;
        case '"': fputs("&quot;", f); break;
        default: fputc(*s, f);
        }
    }
}

static void head(FILE *f, const tp_fig_item *it)
{
    fprintf(f, " class=\"%s\"", it->role);
    if (it->id >= 0)
        fprintf(f, " data-id=\"%ld\"", it->id);
}

static void text_el(FILE *f, const tp_fig_item *it, bool halo)
{
    /* baseline from the vertical anchor: capitals are 0.7 em tall (as in the stroke font) */
    double y = it->xy[1];
    if (it->valign < 0)
        y += 0.7 * it->size;
    else if (it->valign == 0)
        y += 0.35 * it->size;
    const char *anchor = it->halign < 0 ? "start" : it->halign == 0 ? "middle" : "end";
    fputs("<text", f);
    head(f, it);
    fputs(" x=\"", f);
    num(f, it->xy[0]);
    fputs("\" y=\"", f);
    num(f, y);
    fprintf(f, "\" font-family=\"DejaVu Sans, Helvetica, Arial, sans-serif\" font-size=\"%.2f\""
               " text-anchor=\"%s\"", it->size, anchor);
    if (halo) {
        fputs(" fill=\"#ffffff\" stroke=\"#ffffff\" stroke-linejoin=\"round\" stroke-width=\"", f);
        num(f, 2 * it->halo);
        fputs("\"", f);
    } else {
        color_attr(f, "fill", it->fill);
    }
    fputs(">", f);
    escape(f, it->text);
    fputs("</text>\n", f);
}

tp_status tp_write_svg(FILE *f, const tp_figure *F, tp_error *err)
{
    fprintf(f, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n");
    fprintf(f, "<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\" width=\"%.0f\" "
               "height=\"%.0f\" viewBox=\"0 0 %.0f %.0f\"",
            F->width, F->height, F->width, F->height);
    const char *kind = F->kind == TP_FIGURE_CURVE ? "curve"
                       : F->kind == TP_FIGURE_LINE ? "line" : "surface";
    fprintf(f, " data-kind=\"%s\"", kind);
    if (F->view.valid) {
        fprintf(f, " data-view=\"%.12g %.12g %.12g\"", F->view.scale, F->view.ox, F->view.oy);
        if (F->kind == TP_FIGURE_SURFACE)
            fprintf(f, " data-ex=\"%.12g %.12g %.12g\" data-ey=\"%.12g %.12g %.12g\"",
                    F->view.ex[0], F->view.ex[1], F->view.ex[2], F->view.ey[0], F->view.ey[1],
                    F->view.ey[2]);
        else
            fprintf(f, " data-axes=\"%d %d\" data-box=\"%.12g %.12g %.12g %.12g\"",
                    F->view.axes[0], F->view.axes[1], F->view.box[0], F->view.box[1],
                    F->view.box[2], F->view.box[3]);
    }
    if (F->sub.valid)
        fprintf(f, " data-subdivision-view=\"%.12g %.12g %.12g\"", F->sub.scale, F->sub.ox,
                F->sub.oy);
    fprintf(f, ">\n");
    if (F->background.a > 0) {
        fprintf(f, "<rect class=\"background\" x=\"0\" y=\"0\" width=\"%.0f\" height=\"%.0f\"",
                F->width, F->height);
        color_attr(f, "fill", F->background);
        fputs("/>\n", f);
    }
    for (size_t i = 0; i < F->n; i++) {
        const tp_fig_item *it = &F->items[i];
        switch (it->kind) {
        case TP_FIG_PATH:
            fputs("<path", f);
            head(f, it);
            fputs(" d=\"", f);
            for (size_t k = 0; k < it->npts; k++) {
                fputs(k ? " L " : "M ", f);
                num(f, it->xy[2 * k]);
                fputc(' ', f);
                num(f, it->xy[2 * k + 1]);
            }
            if (it->closed)
                fputs(" Z", f);
            fputc('"', f);
            color_attr(f, "fill", it->fill);
            if (it->width > 0 && it->stroke.a > 0) {
                color_attr(f, "stroke", it->stroke);
                fputs(" stroke-width=\"", f);
                num(f, it->width);
                fputs("\" stroke-linecap=\"round\" stroke-linejoin=\"round\"", f);
            }
            fputs("/>\n", f);
            break;
        case TP_FIG_CIRCLE:
            fputs("<circle", f);
            head(f, it);
            fputs(" cx=\"", f);
            num(f, it->xy[0]);
            fputs("\" cy=\"", f);
            num(f, it->xy[1]);
            fputs("\" r=\"", f);
            num(f, it->r);
            fputc('"', f);
            color_attr(f, "fill", it->fill);
            if (it->width > 0 && it->stroke.a > 0) {
                color_attr(f, "stroke", it->stroke);
                fputs(" stroke-width=\"", f);
                num(f, it->width);
                fputc('"', f);
            }
            fputs("/>\n", f);
            break;
        case TP_FIG_TEXT:
            if (it->halo > 0)
                text_el(f, it, true);
            text_el(f, it, false);
            break;
        }
    }
    fputs("</svg>\n", f);
    if (ferror(f))
        return tp_error_set(err, TP_EIO, 0, 0, "write error while writing the SVG");
    return TP_OK;
}
