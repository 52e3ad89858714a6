/* write_tikz.c — a tp_figure as a TikZ picture (optionally a whole LaTeX document).
 *
 * The picture's x unit is one figure pixel scaled so the picture is 12 cm wide, and its y
 * unit points down, so every coordinate is the same number as in the SVG (checked by
 * tests/check/check_tikz.py against the exact vertices). Each drawing command ends with a
 * comment "% role id". The first lines record the view as in the SVG.
 */
#include "trope/figure.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#define PICTURE_CM 12.0
#define PT_PER_CM 28.452756

typedef struct {
    tp_rgba *c;
    size_t n;
} palette;

static void col_name(char *buf, size_t size, tp_rgba c)
{
    snprintf(buf, size, "tp%02X%02X%02X", c.r, c.g, c.b);
}

static tp_status pal_add(palette *P, tp_rgba c)
{
    if (c.a == 0)
        return TP_OK;
    for (size_t i = 0; i < P->n; i++)
        if (P->c[i].r == c.r && P->c[i].g == c.g && P->c[i].b == c.b)
            return TP_OK;
    tp_rgba *n = realloc(P->c, (P->n + 1) * sizeof *n);
    if (!n)
        return TP_ENOMEM;
    P->c = n;
    P->c[P->n++] = c;
    return TP_OK;
}

static void num(FILE *f, double v)
{
    char b[64];
    snprintf(b, sizeof b, "%.2f", v);
    if (strcmp(b, "-0.00") == 0)
        snprintf(b, sizeof b, "0.00");
    fputs(b, f);
}

static void pt(FILE *f, double x, double y)
{
    fputc('(', f);
    num(f, x);
    fputc(',', f);
    num(f, y);
    fputc(')', f);
}

static void tex_text(FILE *f, const char *s)
{
    while (*s) {
        uint32_t c = tp_utf8_next(&s);
        switch (c) {
        case '-': case 0x2212: fputs("$-$", f); break;
        case 0x00D7: fputs("$\\times$", f); break;
        case '<': fputs("$<$", f); break;
        case '>': fputs("$>$", f); break;
        case '|': fputs("$|$", f); break;
        case '_': fputs("\\_", f); break;
        case '&': fputs("\\&", f); break;
        case '%': fputs("\\%", f); break;
        case '$': fputs("\\$", f); break;
        case '#': fputs("\\#", f); break;
        case '{': fputs("\\{", f); break;
        case '}': fputs("\\}", f); break;
        case '^': fputs("\\^{}", f); break;
        case '~': fputs("\\textasciitilde{}", f); break;
        case '\\': fputs("\\textbackslash{}", f); break;
        default:
            if (c >= 0x20 && c < 0x7f)
                fputc((int)c, f);
            else
                fputc('?', f);   /* no other characters reach figures */
        }
    }
}

static void opacity(FILE *f, const char *what, tp_rgba c)
{
    if (c.a > 0 && c.a < 255)
        fprintf(f, ", %s opacity=%.3f", what, c.a / 255.0);
}

tp_status tp_write_tikz(FILE *f, const tp_figure *F, bool standalone, tp_error *err)
{
    palette P = {NULL, 0};
    tp_status st = TP_OK;
    double k = PICTURE_CM / F->width;            /* cm per figure unit */
    double ptu = k * PT_PER_CM;                  /* pt per figure unit */
    st = pal_add(&P, F->background);
    for (size_t i = 0; i < F->n && st == TP_OK; i++) {
        st = pal_add(&P, F->items[i].stroke);
        if (st == TP_OK)
            st = pal_add(&P, F->items[i].fill);
    }
    if (st != TP_OK) {
        free(P.c);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory while writing TikZ");
    }
    if (standalone) {
        double wcm = PICTURE_CM + 0.4, hcm = F->height * k + 0.4;
        fprintf(f, "\\RequirePackage{fix-cm}\n\\documentclass{article}\n\\usepackage{tikz}\n"
                   "\\pagestyle{empty}\n"
                   "\\setlength{\\paperwidth}{%.3fcm}\\setlength{\\paperheight}{%.3fcm}\n"
                   "\\ifdefined\\pdfpagewidth\\setlength{\\pdfpagewidth}{\\paperwidth}"
                   "\\setlength{\\pdfpageheight}{\\paperheight}\\fi\n"
                   "\\setlength{\\textwidth}{\\paperwidth}\\setlength{\\textheight}{100cm}"
                   "\\setlength{\\topskip}{0pt}\n"
                   "\\setlength{\\oddsidemargin}{-1in}\\setlength{\\evensidemargin}{-1in}"
                   "\\setlength{\\topmargin}{-1in}\n"
                   "\\setlength{\\headheight}{0pt}\\setlength{\\headsep}{0pt}"
                   "\\setlength{\\parindent}{0pt}\n"
                   "\\begin{document}\n\\vspace*{0.2cm}\\hspace*{0.2cm}%%\n",
                wcm, hcm);
    }
    fprintf(f, "%% trope figure, %.0f x %.0f units; x unit %.6f cm, y unit downwards\n",
            F->width, F->height, k);
    if (F->view.valid) {
        fprintf(f, "%% view: %.12g %.12g %.12g", F->view.scale, F->view.ox, F->view.oy);
        if (F->kind == TP_FIGURE_SURFACE)
            fprintf(f, " ex: %.12g %.12g %.12g ey: %.12g %.12g %.12g\n", F->view.ex[0],
                    F->view.ex[1], F->view.ex[2], F->view.ey[0], F->view.ey[1], F->view.ey[2]);
        else
            fprintf(f, " axes: %d %d box: %.12g %.12g %.12g %.12g\n", F->view.axes[0],
                    F->view.axes[1], F->view.box[0], F->view.box[1], F->view.box[2],
                    F->view.box[3]);
    }
    if (F->sub.valid)
        fprintf(f, "%% subdivision view: %.12g %.12g %.12g\n", F->sub.scale, F->sub.ox,
                F->sub.oy);
    fprintf(f, "\\begin{tikzpicture}[x=%.6fcm, y=-%.6fcm, line cap=round, line join=round]\n",
            k, k);
    char name[32], name2[32];
    for (size_t i = 0; i < P.n; i++) {
        col_name(name, sizeof name, P.c[i]);
        fprintf(f, "\\definecolor{%s}{RGB}{%u,%u,%u}\n", name, P.c[i].r, P.c[i].g, P.c[i].b);
    }
    if (F->background.a > 0) {
        col_name(name, sizeof name, F->background);
        fprintf(f, "\\fill[%s", name);
        opacity(f, "fill", F->background);
        fprintf(f, "] (0,0) rectangle (%.0f,%.0f); %% background\n", F->width, F->height);
    } else {
        fprintf(f, "\\path (0,0) rectangle (%.0f,%.0f); %% bounding box\n", F->width, F->height);
    }
    for (size_t i = 0; i < F->n; i++) {
        const tp_fig_item *it = &F->items[i];
        bool stroke = it->width > 0 && it->stroke.a > 0, fill = it->fill.a > 0;
        col_name(name, sizeof name, it->stroke);
        col_name(name2, sizeof name2, it->fill);
        switch (it->kind) {
        case TP_FIG_PATH:
        case TP_FIG_CIRCLE:
            if (!stroke && !fill)
                continue;
            if (it->kind == TP_FIG_PATH && it->npts < 3)
                fill = false;
            fputs(stroke && fill ? "\\filldraw[" : stroke ? "\\draw[" : "\\fill[", f);
            if (fill) {
                fprintf(f, "fill=%s", name2);
                opacity(f, "fill", it->fill);
            }
            if (stroke) {
                fprintf(f, "%sdraw=%s, line width=%.3fpt", fill ? ", " : "", name,
                        it->width * ptu);
                opacity(f, "draw", it->stroke);
            }
            fputs("] ", f);
            if (it->kind == TP_FIG_CIRCLE) {
                pt(f, it->xy[0], it->xy[1]);
                fprintf(f, " circle[radius=%.4fcm]", it->r * k);
            } else {
                for (size_t j = 0; j < it->npts; j++) {
                    if (j)
                        fputs(" -- ", f);
                    pt(f, it->xy[2 * j], it->xy[2 * j + 1]);
                }
                if (it->closed)
                    fputs(" -- cycle", f);
            }
            break;
        case TP_FIG_TEXT: {
            double y = it->xy[1];
            if (it->valign < 0)
                y += 0.7 * it->size;
            else if (it->valign == 0)
                y += 0.35 * it->size;
            const char *anchor = it->halign < 0 ? "base west" : it->halign == 0 ? "base"
                                                                                : "base east";
            double fs = it->size * ptu;
            fprintf(f, "\\node[anchor=%s, inner sep=0pt, text=%s", anchor, name2);
            if (it->halo > 0)
                fprintf(f, ", fill=white, fill opacity=0.85, text opacity=1, "
                           "outer sep=0pt, inner sep=%.2fpt", it->halo * ptu);
            fprintf(f, ", font=\\sffamily\\fontsize{%.2f}{%.2f}\\selectfont] at ", fs, 1.2 * fs);
            pt(f, it->xy[0], y);
            fputs(" {", f);
            tex_text(f, it->text);
            fputs("}", f);
            break;
        }
        }
        fprintf(f, "; %% %s", it->role);
        if (it->id >= 0)
            fprintf(f, " %ld", it->id);
        fputc('\n', f);
    }
    fputs("\\end{tikzpicture}\n", f);
    if (standalone)
        fputs("\\end{document}\n", f);
    free(P.c);
    if (ferror(f))
        return tp_error_set(err, TP_EIO, 0, 0, "write error while writing TikZ");
    return TP_OK;
}
