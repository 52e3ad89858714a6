/* amoeba_figure.c — the amoeba drawn under its spine.
 *
 * The spine is laid out by tp_figure_build (box, scale, frame, ticks, edges, rays); this
 * file adds the amoeba as filled bands (one per root index k: the region between
 * min_theta rho_k and max_theta rho_k over each pixel column, a simple polygon since
 * lo_k <= hi_k), inserted under the curve, then the Archimedean tropical curve (optional)
 * and the order labels on top.
 */
#include "trope/amoeba.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static const tp_rgba C_AMOEBA = {0xb4, 0xd2, 0xe6, 0xff};
static const tp_rgba C_ARCH = {0xe0, 0x7b, 0x1a, 0xff};
static const tp_rgba C_LABEL = {0x1d, 0x3b, 0x5a, 0xff};
static const tp_rgba C_NONE = {0, 0, 0, 0};

/* Liang-Barsky: clip the segment p + t (q - p), t in [t0, t1], to the box. */
static bool clip(const double box[4], const double p[2], const double dir[2], double t0,
                 double t1, double out[4])
{
    double pp[4] = {-dir[0], dir[0], -dir[1], dir[1]};
    double qq[4] = {p[0] - box[0], box[1] - p[0], p[1] - box[2], box[3] - p[1]};
    for (int k = 0; k < 4; k++) {
        if (pp[k] == 0) {
            if (qq[k] < 0)
                return false;
            continue;
        }
        double r = qq[k] / pp[k];
        if (pp[k] < 0) {
            if (r > t1)
                return false;
            if (r > t0)
                t0 = r;
        } else {
            if (r < t0)
                return false;
            if (r < t1)
                t1 = r;
        }
    }
    out[0] = p[0] + t0 * dir[0];
    out[1] = p[1] + t0 * dir[1];
    out[2] = p[0] + t1 * dir[0];
    out[3] = p[1] + t1 * dir[1];
    return t1 > t0;
}

static tp_status add_archimedean(tp_figure *F, const tp_trop *A, tp_error *err)
{
    const tp_complex *C = &A->complex;
    const tp_fig_view *v = &F->view;
    if (C->n != 2)
        return TP_OK;
    double width = fmax(1.2, F->width / 500.0);
    for (size_t c = 0; c < C->ncells; c++) {
        const tp_complex_cell *cell = &C->cells[c];
        if (cell->dim != 1)
            continue;
        double p[2], dir[2], t1;
        if (cell->nverts == 2) {
            size_t a = cell->verts[0], b = cell->verts[1];
            p[0] = mpq_get_d(C->verts[2 * a]);
            p[1] = mpq_get_d(C->verts[2 * a + 1]);
            dir[0] = mpq_get_d(C->verts[2 * b]) - p[0];
            dir[1] = mpq_get_d(C->verts[2 * b + 1]) - p[1];
            t1 = 1;
        } else if (cell->nverts == 1 && cell->nrays == 1) {
            size_t a = cell->verts[0], r = tp_complex_cell_rays(cell)[0];
            p[0] = mpq_get_d(C->verts[2 * a]);
            p[1] = mpq_get_d(C->verts[2 * a + 1]);
            dir[0] = mpz_get_d(C->rays[2 * r]);
            dir[1] = mpz_get_d(C->rays[2 * r + 1]);
            t1 = 1e9;
        } else {
            continue;
        }
        double seg[4];
        if (!clip(v->box, p, dir, 0, t1, seg))
            continue;
        double X0 = v->ox + v->scale * seg[0], Y0 = v->oy - v->scale * seg[1];
        double X1 = v->ox + v->scale * seg[2], Y1 = v->oy - v->scale * seg[3];
        /* dashed: dashes of 5 widths, gaps of 3.5 widths (the spine shows through) */
        double len = hypot(X1 - X0, Y1 - Y0), dash = 5 * width, gap = 3.5 * width;
        for (double s0 = 0; s0 < len; s0 += dash + gap) {
            double s1 = fmin(len, s0 + dash);
            double xy[4] = {X0 + (X1 - X0) * s0 / len, Y0 + (Y1 - Y0) * s0 / len,
                            X0 + (X1 - X0) * s1 / len, Y0 + (Y1 - Y0) * s1 / len};
            tp_status st = tp_figure_path(F, "archimedean", (long)c, xy, 2, false, width,
                                          C_ARCH, C_NONE);
            if (st)
                return tp_error_set(err, st, 0, 0, "out of memory while drawing");
        }
    }
    return TP_OK;
}

static bool is_underlay(const char *role)
{
    return strcmp(role, "background") == 0 || strcmp(role, "grid") == 0 ||
           strcmp(role, "tick") == 0;
}

tp_status tp_amoeba_figure(tp_figure *F, const tp_amoeba_poly *P, const tp_trop *spine,
                           const tp_trop *arch, const tp_amoeba_component *comp,
                           size_t ncomp, const tp_figure_options *fo, tp_error *err)
{
    if (P->nvars != 2 || fo->nbox != 4)
        return tp_error_set(err, TP_EDOMAIN, 0, 0, "amoeba figures need a plane curve and a box");
    tp_status st = tp_figure_build(F, spine, fo, err);
    if (st)
        return st;
    const tp_fig_view *v = &F->view;
    if (!v->valid)
        return tp_error_set(err, TP_EINTERNAL, 0, 0, "the figure has no plane view");
    size_t first_new = F->n;
    /* one slice per pixel column of the plot rectangle */
    double L = v->rect[0], R = v->rect[2];
    size_t cols = (size_t)ceil(R - L);
    if (cols < 2)
        cols = 2;
    size_t d = (size_t)P->deg[1];
    double *lo = malloc(cols * d * sizeof *lo), *hi = malloc(cols * d * sizeof *hi);
    double *xy = malloc((2 * cols + 4) * 2 * sizeof *xy);
    double *x1s = malloc(cols * sizeof *x1s);
    double *tlo = malloc(d * sizeof *tlo), *thi = malloc(d * sizeof *thi);
    if (!lo || !hi || !xy || !x1s || !tlo || !thi) {
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory while drawing");
        goto done;
    }
    tp_amoeba_options o;
    tp_amoeba_options_default(&o);
    /* slice ends to a twentieth of a pixel (or 1e-3 rad in theta) */
    o.theta_tol = fmin(1e-3, 0.05 / v->scale);
    for (size_t i = 0; i < cols; i++) {
        double X = L + (R - L) * ((double)i + 0.5) / (double)cols;
        x1s[i] = (X - v->ox) / v->scale;
    }
    st = tp_amoeba_slices(P, x1s, cols, &o, lo, hi, err);
    if (st)
        goto done;
    for (size_t i = 0; i < cols; i++) {
        memcpy(tlo, lo + i * d, d * sizeof *tlo);
        memcpy(thi, hi + i * d, d * sizeof *thi);
        /* intervals that touch (two roots of equal modulus) are located only to the
         * tolerance: close gaps narrower than half a pixel, and let touching bands overlap by a pixel
         * so that their anti-aliased edges do not leave a light seam */
        for (size_t k = 0; k + 1 < d; k++)
            if (tlo[k + 1] - thi[k] < 0.5 / v->scale)
                thi[k] = fmax(thi[k], fmin(tlo[k + 1] + 1.0 / v->scale, thi[k + 1]));
        for (size_t k = 0; k < d; k++) {
            lo[i * d + k] = tlo[k];
            hi[i * d + k] = thi[k];
        }
    }
    /* clamp to a little outside the plot rectangle */
    double ytop = v->box[3] + 2 / v->scale, ybot = v->box[2] - 2 / v->scale;
    for (size_t k = 0; k < d; k++) {
        size_t m = 0;
        bool any = false;
        for (size_t i = 0; i < cols; i++) {
            double a = fmin(fmax(lo[i * d + k], ybot), ytop);
            double X = i == 0 ? L : (i + 1 == cols ? R : v->ox + v->scale * x1s[i]);
            xy[2 * m] = X;
            xy[2 * m + 1] = v->oy - v->scale * a;
            m++;
            if (hi[i * d + k] >= ybot && lo[i * d + k] <= ytop)
                any = true;
        }
        for (size_t i = cols; i-- > 0;) {
            double b = fmin(fmax(hi[i * d + k], ybot), ytop);
            double X = i == 0 ? L : (i + 1 == cols ? R : v->ox + v->scale * x1s[i]);
            xy[2 * m] = X;
            xy[2 * m + 1] = v->oy - v->scale * b;
            m++;
        }
        if (!any)
            continue;
        st = tp_figure_path(F, "amoeba", (long)k, xy, m, true, 0, C_NONE, C_AMOEBA);
        if (st) {
            st = tp_error_set(err, st, 0, 0, "out of memory while drawing");
            goto done;
        }
    }
    /* move the bands under everything but the background, grid and ticks */
    size_t nnew = F->n - first_new, at = 0;
    while (at < first_new && is_underlay(F->items[at].role))
        at++;
    if (nnew > 0 && at < first_new) {
        tp_fig_item *tmp = malloc(nnew * sizeof *tmp);
        if (!tmp) {
            st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory while drawing");
            goto done;
        }
        memcpy(tmp, F->items + first_new, nnew * sizeof *tmp);
        memmove(F->items + at + nnew, F->items + at, (first_new - at) * sizeof *tmp);
        memcpy(F->items + at, tmp, nnew * sizeof *tmp);
        free(tmp);
    }
    if (arch) {
        st = add_archimedean(F, arch, err);
        if (st)
            goto done;
    }
    double fs = fmax(12.0, F->width / 45.0);
    /* labels: bounded components first (they matter most), none overlapping another or
     * leaving the plot rectangle */
    double (*placed)[4] = malloc((ncomp ? ncomp : 1) * sizeof *placed);
    size_t nplaced = 0;
    if (!placed) {
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory while drawing");
        goto done;
    }
    for (int pass = 0; pass < 2; pass++)
    for (size_t c = 0; c < ncomp; c++) {
        if (comp[c].bounded != (pass == 0))
            continue;
        double x = comp[c].point[0], y = comp[c].point[1];
        if (x < v->box[0] || x > v->box[1] || y < v->box[2] || y > v->box[3])
            continue;
        double X = v->ox + v->scale * x, Y = v->oy - v->scale * y;
        char buf[64];
        snprintf(buf, sizeof buf, "(%lld,%lld)", (long long)comp[c].order[0],
                 (long long)comp[c].order[1]);
        double w2 = 0.5 * tp_font_width(buf, fs) + 2;
        double bb[4] = {X - w2, Y - fs * 1.15, X + w2, Y + fs * 0.25};
        bool clash = bb[0] < v->rect[0] || bb[2] > v->rect[2] || bb[1] < v->rect[1] ||
                     bb[3] > v->rect[3];
        for (size_t q = 0; q < nplaced && !clash; q++)
            clash = !(bb[2] < placed[q][0] || bb[0] > placed[q][2] || bb[3] < placed[q][1] ||
                      bb[1] > placed[q][3]);
        if (clash)
            continue;
        memcpy(placed[nplaced++], bb, sizeof bb);
        st = tp_figure_circle(F, "order-point", (long)c, X, Y, fs * 0.18, 0, C_NONE, C_LABEL);
        if (st == TP_OK)
            st = tp_figure_text(F, "order", (long)c, buf, X, Y - fs * 0.35, fs, 0, 1, C_LABEL,
                                fs * 0.15);
        if (st) {
            free(placed);
            st = tp_error_set(err, st, 0, 0, "out of memory while drawing");
            goto done;
        }
    }
    free(placed);
done:
    free(lo);
    free(hi);
    free(xy);
    free(x1s);
    free(tlo);
    free(thi);
    return st;
}
