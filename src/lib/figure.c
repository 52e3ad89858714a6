/* figure.c — layout: from a tp_trop to a display list (see figure.h).
 *
 * Everything geometric about figures happens here: the automatic box, the equal-scale
 * fit, clipping rays to the box, continuation arrows, label placement, the dual
 * subdivision panel, the univariate line, and surfaces (clipping 2-cells to a box,
 * an oblique projection and a depth order). Floats are used only here, for pictures;
 * the exact values come from the complex.
 */
#include "trope/figure.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* ---------------------------------------------------------------- palette ----
 * Our own palette, chosen so that each role differs in lightness as well as hue (it
 * reads in greyscale) and never relies on a red/green contrast. */
static const tp_rgba C_EDGE = {0x1d, 0x4e, 0x89, 255};      /* deep blue, dark */
static const tp_rgba C_VFILL = {0xf2, 0xb1, 0x34, 255};     /* amber, light */
static const tp_rgba C_INK = {0x1a, 0x1a, 0x1a, 255};       /* near black */
static const tp_rgba C_WEIGHT = {0xa8, 0x3c, 0x12, 255};    /* rust, mid-dark */
static const tp_rgba C_GRID = {0xe4, 0xe4, 0xe4, 255};
static const tp_rgba C_FRAME = {0xa0, 0xa0, 0xa0, 255};
static const tp_rgba C_TICK = {0x55, 0x55, 0x55, 255};
static const tp_rgba C_NEWTON = {0xf0, 0xeb, 0xf5, 255};    /* pale lavender */
static const tp_rgba C_SUB = {0x6d, 0x3f, 0x8c, 255};       /* plum */
static const tp_rgba C_LATTICE = {0xb4, 0xb4, 0xb4, 255};
static const tp_rgba C_WHITE = {255, 255, 255, 255};
static const tp_rgba C_NONE = {0, 0, 0, 0};
static const tp_rgba C_BOX = {0xc8, 0xc8, 0xc8, 255};
static const tp_rgba C_FACE_EDGE = {0x22, 0x2a, 0x33, 255};
static const tp_rgba FACE_COLORS[] = {
    {0x5b, 0x8c, 0xc4, 255}, /* cornflower */
    {0xe6, 0xa1, 0x4f, 255}, /* apricot */
    {0x6f, 0xb8, 0xae, 255}, /* sea green-blue */
    {0xb4, 0x85, 0xa8, 255}, /* heather */
    {0xd4, 0xc2, 0x6a, 255}, /* straw */
    {0x8d, 0x99, 0xa6, 255}, /* slate */
};

/* ---------------------------------------------------------------- items ---- */

void tp_figure_options_init(tp_figure_options *o)
{
    memset(o, 0, sizeof *o);
}

void tp_figure_init(tp_figure *F)
{
    memset(F, 0, sizeof *F);
}

void tp_figure_clear(tp_figure *F)
{
    for (size_t i = 0; i < F->n; i++) {
        free(F->items[i].xy);
        free(F->items[i].text);
    }
    free(F->items);
    memset(F, 0, sizeof *F);
}

static tp_fig_item *new_item(tp_figure *F)
{
    if (F->n == F->cap) {
        size_t cap = F->cap ? 2 * F->cap : 64;
        tp_fig_item *it = realloc(F->items, cap * sizeof *it);
        if (!it)
            return NULL;
        F->items = it;
        F->cap = cap;
    }
    tp_fig_item *it = &F->items[F->n];
    memset(it, 0, sizeof *it);
    it->id = -1;
    return it;
}

static bool finite_pts(const double *xy, size_t n)
{
    for (size_t i = 0; i < 2 * n; i++)
        if (!isfinite(xy[i]))
            return false;
    return true;
}

tp_status tp_figure_path(tp_figure *F, const char *role, long id, const double *xy, size_t n,
                         bool closed, double width, tp_rgba stroke, tp_rgba fill)
{
    if (n == 0 || !finite_pts(xy, n))
        return TP_OK;
    tp_fig_item *it = new_item(F);
    double *c = malloc(2 * n * sizeof *c);
    if (!it || !c) {
        free(c);
        return TP_ENOMEM;
    }
    memcpy(c, xy, 2 * n * sizeof *c);
    it->kind = TP_FIG_PATH;
    it->role = role;
    it->id = id;
    it->npts = n;
    it->xy = c;
    it->closed = closed;
    it->width = width;
    it->stroke = stroke;
    it->fill = fill;
    F->n++;
    return TP_OK;
}

tp_status tp_figure_circle(tp_figure *F, const char *role, long id, double cx, double cy,
                           double r, double width, tp_rgba stroke, tp_rgba fill)
{
    double p[2] = {cx, cy};
    if (!finite_pts(p, 1) || !isfinite(r))
        return TP_OK;
    tp_fig_item *it = new_item(F);
    double *c = malloc(2 * sizeof *c);
    if (!it || !c) {
        free(c);
        return TP_ENOMEM;
    }
    memcpy(c, p, sizeof p);
    it->kind = TP_FIG_CIRCLE;
    it->role = role;
    it->id = id;
    it->npts = 1;
    it->xy = c;
    it->r = r;
    it->width = width;
    it->stroke = stroke;
    it->fill = fill;
    F->n++;
    return TP_OK;
}

tp_status tp_figure_text(tp_figure *F, const char *role, long id, const char *text, double x,
                         double y, double size, int halign, int valign, tp_rgba color,
                         double halo)
{
    double p[2] = {x, y};
    if (!finite_pts(p, 1))
        return TP_OK;
    tp_fig_item *it = new_item(F);
    double *c = malloc(2 * sizeof *c);
    char *t = strdup(text);
    if (!it || !c || !t) {
        free(c);
        free(t);
        return TP_ENOMEM;
    }
    memcpy(c, p, sizeof p);
    it->kind = TP_FIG_TEXT;
    it->role = role;
    it->id = id;
    it->npts = 1;
    it->xy = c;
    it->text = t;
    it->size = size;
    it->halign = halign;
    it->valign = valign;
    it->stroke = color;
    it->fill = color;
    it->halo = halo;
    F->n++;
    return TP_OK;
}

#define TRY(e)                                                                             \
    do {                                                                                   \
        tp_status s_ = (e);                                                                \
        if (s_ != TP_OK) {                                                                 \
            st = s_;                                                                       \
            goto done;                                                                     \
        }                                                                                  \
    } while (0)

/* ---------------------------------------------------------------- geometry ---- */

/* Liang-Barsky: the part t in [*t0, *t1] of p + t d inside the box (xmin,xmax,ymin,ymax).
 * returns false if empty. *t1 may be INFINITY on entry. */
static bool clip_param(const double p[2], const double d[2], const double box[4], double *t0,
                       double *t1)
{
    for (int k = 0; k < 2; k++) {
        double lo = box[2 * k], hi = box[2 * k + 1];
        if (fabs(d[k]) < 1e-300) {
            if (p[k] < lo || p[k] > hi)
                return false;
            continue;
        }
        double a = (lo - p[k]) / d[k], b = (hi - p[k]) / d[k];
        if (a > b) {
            double s = a;
            a = b;
            b = s;
        }
        if (a > *t0)
            *t0 = a;
        if (b < *t1)
            *t1 = b;
    }
    return *t0 <= *t1;
}

typedef struct {
    double x0, y0, x1, y1, r;   /* a drawn segment (figure coords) and its half width */
} obstacle;

typedef struct {
    obstacle *o;
    size_t n, cap;
} obstacles;

static tp_status obst_add(obstacles *S, double x0, double y0, double x1, double y1, double r)
{
    if (S->n == S->cap) {
        size_t cap = S->cap ? 2 * S->cap : 64;
        obstacle *o = realloc(S->o, cap * sizeof *o);
        if (!o)
            return TP_ENOMEM;
        S->o = o;
        S->cap = cap;
    }
    S->o[S->n++] = (obstacle){x0, y0, x1, y1, r};
    return TP_OK;
}

static double pt_seg(double px, double py, double ax, double ay, double bx, double by)
{
    double dx = bx - ax, dy = by - ay, l2 = dx * dx + dy * dy;
    double t = l2 > 0 ? ((px - ax) * dx + (py - ay) * dy) / l2 : 0;
    t = t < 0 ? 0 : t > 1 ? 1 : t;
    return hypot(ax + t * dx - px, ay + t * dy - py);
}

static double orient(double ax, double ay, double bx, double by, double cx, double cy)
{
    return (bx - ax) * (cy - ay) - (by - ay) * (cx - ax);
}

static bool seg_cross(double ax, double ay, double bx, double by, double cx, double cy,
                      double dx, double dy)
{
    double o1 = orient(ax, ay, bx, by, cx, cy), o2 = orient(ax, ay, bx, by, dx, dy);
    double o3 = orient(cx, cy, dx, dy, ax, ay), o4 = orient(cx, cy, dx, dy, bx, by);
    return ((o1 > 0) != (o2 > 0)) && ((o3 > 0) != (o4 > 0));
}

/* Distance between segment ab and the rectangle [x0,x1] x [y0,y1] (0 if they meet). */
static double rect_seg(const double rc[4], double ax, double ay, double bx, double by)
{
    double x0 = rc[0], y0 = rc[1], x1 = rc[2], y1 = rc[3];
    if ((ax >= x0 && ax <= x1 && ay >= y0 && ay <= y1) ||
        (bx >= x0 && bx <= x1 && by >= y0 && by <= y1))
        return 0;
    double cx[4] = {x0, x1, x1, x0}, cy[4] = {y0, y0, y1, y1};
    double best = INFINITY;
    for (int k = 0; k < 4; k++) {
        int l = (k + 1) % 4;
        if (seg_cross(ax, ay, bx, by, cx[k], cy[k], cx[l], cy[l]))
            return 0;
        best = fmin(best, pt_seg(cx[k], cy[k], ax, ay, bx, by));
        best = fmin(best, pt_seg(ax, ay, cx[k], cy[k], cx[l], cy[l]));
        best = fmin(best, pt_seg(bx, by, cx[k], cy[k], cx[l], cy[l]));
    }
    return best;
}

static double rect_rect(const double a[4], const double b[4])
{
    double dx = fmax(0, fmax(a[0] - b[2], b[0] - a[2]));
    double dy = fmax(0, fmax(a[1] - b[3], b[1] - a[3]));
    return hypot(dx, dy);
}

/* Clearance of a label rectangle: distance to every obstacle and placed label, and a
 * large penalty for leaving the allowed rectangle `area`. */
static double clearance(const double rc[4], const obstacles *S, const double *labels,
                        size_t nlabels, const double area[4])
{
    double c = INFINITY;
    for (size_t i = 0; i < S->n; i++) {
        const obstacle *o = &S->o[i];
        c = fmin(c, rect_seg(rc, o->x0, o->y0, o->x1, o->y1) - o->r);
    }
    for (size_t i = 0; i < nlabels; i++)
        c = fmin(c, rect_rect(rc, labels + 4 * i));
    if (rc[0] < area[0] || rc[1] < area[1] || rc[2] > area[2] || rc[3] > area[3])
        c -= 1e6;
    return c;
}

static void fmt_num(char *buf, size_t size, double v, int decimals)
{
    snprintf(buf, size, "%.*f", decimals, v);
    if (strspn(buf, "-0.") == strlen(buf) && buf[0] == '-')   /* "-0", "-0.00" */
        memmove(buf, buf + 1, strlen(buf));
}

static double nice_step(double range, int target)
{
    if (!(range > 0))
        return 1;
    double raw = range / target;
    double p = pow(10, floor(log10(raw)));
    double m = raw / p;
    double s = m <= 1 ? 1 : m <= 2 ? 2 : m <= 5 ? 5 : 10;
    return s * p;
}

static int step_decimals(double step)
{
    if (step >= 1)
        return 0;
    int d = (int)ceil(-log10(step) - 1e-9);
    /* 0.25 needs 2, 0.5 needs 1 */
    double r = step * pow(10, d);
    if (fabs(r - round(r)) > 1e-6)
        d++;
    return d;
}

/* ---------------------------------------------------------------- panels ---- */

typedef struct {
    double u;         /* the style unit in pixels */
    double font;      /* label em size */
    double small;     /* tick and height label em size */
    double edge_w;
} style;

static style make_style(double w, double h)
{
    style s;
    double m = fmin(w, h);
    s.u = fmax(2.2, m / 200.0);
    s.font = 5.6 * s.u;
    s.small = 4.6 * s.u;
    s.edge_w = 1.25 * s.u;
    return s;
}

/* Fit world box b (xmin,xmax,ymin,ymax) into rect r with equal scale, centred; the box
 * grows to fill the rectangle exactly. */
static void fit_view(tp_fig_view *v, const double b[4], const double r[4])
{
    double bw = b[1] - b[0], bh = b[3] - b[2];
    double rw = r[2] - r[0], rh = r[3] - r[1];
    double s = fmin(rw / bw, rh / bh);
    double cx = (b[0] + b[1]) / 2, cy = (b[2] + b[3]) / 2;
    v->valid = true;
    v->scale = s;
    v->box[0] = cx - rw / (2 * s);
    v->box[1] = cx + rw / (2 * s);
    v->box[2] = cy - rh / (2 * s);
    v->box[3] = cy + rh / (2 * s);
    memcpy(v->rect, r, sizeof v->rect);
    v->ox = r[0] - s * v->box[0];
    v->oy = r[1] + s * v->box[3];
}

static double VX(const tp_fig_view *v, double x) { return v->ox + v->scale * x; }
static double VY(const tp_fig_view *v, double y) { return v->oy - v->scale * y; }

/* Grid lines and tick labels for a plane view. */
static tp_status draw_grid(tp_figure *F, const tp_fig_view *v, const style *S, bool xticks,
                           bool yticks)
{
    tp_status st = TP_OK;
    double step = nice_step(fmax(v->box[1] - v->box[0], v->box[3] - v->box[2]), 10);
    if (step < 1 && fmax(v->box[1] - v->box[0], v->box[3] - v->box[2]) >= 2)
        step = 1;
    int dec = step_decimals(step);
    char buf[64];
    for (int axis = 0; axis < 2; axis++) {
        double lo = v->box[2 * axis], hi = v->box[2 * axis + 1];
        double k0 = ceil(lo / step - 1e-9), k1 = floor(hi / step + 1e-9);
        for (double k = k0; k <= k1 && k - k0 < 1000; k++) {
            double w = k * step;
            double xy[4];
            if (axis == 0) {
                xy[0] = xy[2] = VX(v, w);
                xy[1] = v->rect[1];
                xy[3] = v->rect[3];
            } else {
                xy[1] = xy[3] = VY(v, w);
                xy[0] = v->rect[0];
                xy[2] = v->rect[2];
            }
            bool zero = fabs(w) < step * 1e-6;
            TRY(tp_figure_path(F, "grid", -1, xy, 2, false, zero ? 0.6 * S->u : 0.35 * S->u,
                               zero ? C_FRAME : C_GRID, C_NONE));
            fmt_num(buf, sizeof buf, w, dec);
            if (axis == 0 && xticks)
                TRY(tp_figure_text(F, "tick", -1, buf, xy[0], v->rect[3] + 2.2 * S->u,
                                   S->small, 0, -1, C_TICK, 0));
            if (axis == 1 && yticks)
                TRY(tp_figure_text(F, "tick", -1, buf, v->rect[0] - 2.2 * S->u, xy[1],
                                   S->small, 1, 0, C_TICK, 0));
        }
    }
    double fr[8] = {v->rect[0], v->rect[1], v->rect[2], v->rect[1],
                    v->rect[2], v->rect[3], v->rect[0], v->rect[3]};
    TRY(tp_figure_path(F, "frame", -1, fr, 4, true, 0.5 * S->u, C_FRAME, C_NONE));
done:
    return st;
}

/* Widest y tick label of a box, for the left padding. */
static double tick_label_width(const double b[4], const style *S)
{
    double step = nice_step(fmax(b[1] - b[0], b[3] - b[2]), 10);
    if (step < 1 && fmax(b[1] - b[0], b[3] - b[2]) >= 2)
        step = 1;
    int dec = step_decimals(step);
    char buf[64];
    double w = 0;
    /* the final box may grow by up to a factor 2 around its centre */
    double c = (b[2] + b[3]) / 2, h = (b[3] - b[2]) * 1.5 + 2 * step;
    double lo = fmin(c - h, b[0] - step), hi = fmax(c + h, b[1] + step);
    for (double k = ceil(lo / step); k <= floor(hi / step) && k - ceil(lo / step) < 2000; k++) {
        fmt_num(buf, sizeof buf, k * step, dec);
        w = fmax(w, tp_font_width(buf, S->small));
    }
    return w;
}

/* ---------------------------------------------------------------- curves ---- */

typedef struct {
    int type;         /* 0 segment, 1 ray, 2 line */
    size_t cell;
    double p[2], q[2];/* segment ends / ray or line base point */
    double d[2];      /* ray or line direction */
    char *weight;     /* decimal */
    bool heavy;       /* weight > 1 */
} cedge;

static double qd(const mpq_t q)
{
    return mpq_get_d(q);
}

typedef struct {
    size_t nv;
    double *v;        /* nv * 2 */
    size_t ne;
    cedge *e;
    bool dots;        /* draw vertices as dots (false for representatives of lines) */
    int axes[2];
} curve_data;

static void curve_data_clear(curve_data *D)
{
    for (size_t i = 0; i < D->ne; i++)
        free(D->e[i].weight);
    free(D->e);
    free(D->v);
    memset(D, 0, sizeof *D);
}

static tp_status curve_data_make(curve_data *D, const tp_trop *T, tp_error *err)
{
    const tp_complex *C = &T->complex;
    size_t n = C->n;
    memset(D, 0, sizeof *D);
    D->axes[0] = 0;
    D->axes[1] = 1;
    if (n == 3) {
        size_t piv = T->subdiv.hull.nlin == 1 && T->subdiv.hull.lin_pivot
                         ? T->subdiv.hull.lin_pivot[0] : 2;
        int k = 0;
        for (size_t j = 0; j < 3; j++)
            if (j != piv)
                D->axes[k++] = (int)j;
    }
    D->dots = !(n == 2 && C->nlin == 1);
    D->v = malloc((C->nverts ? C->nverts : 1) * 2 * sizeof *D->v);
    D->e = calloc(C->ncells ? C->ncells : 1, sizeof *D->e);
    if (!D->v || !D->e)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory while drawing");
    D->nv = C->nverts;
    for (size_t i = 0; i < C->nverts; i++)
        for (int k = 0; k < 2; k++)
            D->v[2 * i + k] = qd(C->verts[i * n + (size_t)D->axes[k]]);
    for (size_t c = 0; c < C->ncells; c++) {
        const tp_complex_cell *cl = &C->cells[c];
        if (cl->dim != C->dim)
            continue;
        cedge e;
        memset(&e, 0, sizeof e);
        e.cell = c;
        if (cl->nverts == 2 && cl->nrays == 0) {
            e.type = 0;
            memcpy(e.p, D->v + 2 * (size_t)cl->verts[0], sizeof e.p);
            memcpy(e.q, D->v + 2 * (size_t)cl->verts[1], sizeof e.q);
        } else if (cl->nverts == 1 && cl->nrays == 1) {
            e.type = 1;
            memcpy(e.p, D->v + 2 * (size_t)cl->verts[0], sizeof e.p);
            for (int k = 0; k < 2; k++)
                e.d[k] = mpz_get_d(
                    C->rays[tp_complex_cell_rays(cl)[0] * n + (size_t)D->axes[k]]);
        } else if (cl->nverts == 1 && cl->nrays == 0 && n == 2 && C->nlin == 1) {
            e.type = 2;
            memcpy(e.p, D->v + 2 * (size_t)cl->verts[0], sizeof e.p);
            for (int k = 0; k < 2; k++)
                e.d[k] = mpz_get_d(C->lin[k]);
        } else {
            return tp_error_set(err, TP_EINTERNAL, 0, 0,
                                "cell %zu of the curve has %zu vertices and %zu rays", c,
                                (size_t)cl->nverts, (size_t)cl->nrays);
        }
        e.weight = mpz_get_str(NULL, 10, cl->weight);
        if (!e.weight)
            return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory while drawing");
        e.heavy = mpz_cmp_ui(cl->weight, 1) > 0;
        D->e[D->ne++] = e;
    }
    return TP_OK;
}

/* The automatic world box of a set of points: bounding box plus a margin of 30% of its
 * larger side (1 when all points coincide). */
static void auto_box(const double *pts, size_t np, size_t stride, double b[4])
{
    double x0 = 0, x1 = 0, y0 = 0, y1 = 0;
    for (size_t i = 0; i < np; i++) {
        double x = pts[stride * i], y = pts[stride * i + 1];
        if (i == 0 || x < x0) x0 = x;
        if (i == 0 || x > x1) x1 = x;
        if (i == 0 || y < y0) y0 = y;
        if (i == 0 || y > y1) y1 = y;
    }
    double D = fmax(x1 - x0, y1 - y0);
    double m = D > 1e-9 ? 0.3 * D : 1.0;
    b[0] = x0 - m;
    b[1] = x1 + m;
    b[2] = y0 - m;
    b[3] = y1 + m;
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

static double clampd(double v, double lo, double hi)
{
    return v < lo ? lo : v > hi ? hi : v;
}

/* Place a label of text t next to the segment a-b (figure coords), trying positions along
 * it on both sides; records the chosen rectangle in labels. */
static tp_status place_label(tp_figure *F, const char *role, long id, const char *t,
                             double ax, double ay, double bx, double by, double tmax,
                             double size, tp_rgba color, const style *S,
                             const obstacles *O, double **labels, size_t *nlabels,
                             const double area[4])
{
    double len = hypot(bx - ax, by - ay);
    double tx = len > 0 ? (bx - ax) / len : 1, ty = len > 0 ? (by - ay) / len : 0;
    double nx = -ty, ny = tx;
    double hw = tp_font_width(t, size) / 2 + 0.6 * S->u, hh = 0.35 * size + 0.6 * S->u;
    double off = fabs(nx) * hw + fabs(ny) * hh + S->edge_w / 2 + 1.2 * S->u;
    static const double ts[] = {0.5, 0.35, 0.65, 0.2, 0.8, 0.1, 0.9};
    double best = -INFINITY, bx0 = 0, by0 = 0;
    int k = 0;
    for (size_t i = 0; i < sizeof ts / sizeof ts[0]; i++) {
        for (int side = 1; side >= -1; side -= 2, k++) {
            double tt = ts[i] * tmax;
            double cx = ax + tt * (bx - ax) + side * off * nx;
            double cy = ay + tt * (by - ay) + side * off * ny;
            double rc[4] = {cx - hw, cy - hh, cx + hw, cy + hh};
            double sc = fmin(clearance(rc, O, *labels, *nlabels, area), 2.5 * S->u) -
                        0.02 * S->u * k;
            if (sc > best) {
                best = sc;
                bx0 = cx;
                by0 = cy;
            }
        }
    }
    double *l = realloc(*labels, (*nlabels + 1) * 4 * sizeof *l);
    if (!l)
        return TP_ENOMEM;
    *labels = l;
    double *rc = l + 4 * (*nlabels)++;
    rc[0] = bx0 - hw;
    rc[1] = by0 - hh;
    rc[2] = bx0 + hw;
    rc[3] = by0 + hh;
    return tp_figure_text(F, role, id, t, bx0, by0, size, 0, 0, color, 0.8 * S->u);
}

/* ---- the subdivision panel ---- */

typedef struct {
    double x, y;
    size_t i;
} ipt;

static int cmp_ipt(const void *a, const void *b)
{
    const ipt *p = a, *q = b;
    if (p->x != q->x)
        return p->x < q->x ? -1 : 1;
    if (p->y != q->y)
        return p->y < q->y ? -1 : 1;
    return (p->i > q->i) - (p->i < q->i);
}

/* Andrew's monotone chain on sorted points; writes the hull (counter-clockwise) into h,
 * returns its size. */
static size_t hull2(const ipt *p, size_t n, ipt *h)
{
    if (n < 3) {
        for (size_t i = 0; i < n; i++)
            h[i] = p[i];
        return n;
    }
    size_t k = 0;
    for (size_t i = 0; i < n; i++) {
        while (k >= 2 && orient(h[k - 2].x, h[k - 2].y, h[k - 1].x, h[k - 1].y, p[i].x, p[i].y) <= 0)
            k--;
        h[k++] = p[i];
    }
    for (size_t i = n - 1, t = k + 1; i-- > 0;) {
        while (k >= t && orient(h[k - 2].x, h[k - 2].y, h[k - 1].x, h[k - 1].y, p[i].x, p[i].y) <= 0)
            k--;
        h[k++] = p[i];
    }
    return k - 1;
}

static tp_status draw_subdivision(tp_figure *F, const tp_trop *T, const int axes[2],
                                  const double rect[4], const style *S, bool heights,
                                  tp_error *err)
{
    tp_status st = TP_OK;
    const tp_points *P = &T->points;
    const tp_subdiv *SD = &T->subdiv;
    size_t n = P->n, np = P->count;
    ipt *pts = malloc((np ? np : 1) * sizeof *pts);
    ipt *hull = malloc((np ? np + 1 : 2) * sizeof *hull);
    double *xy = malloc(2 * (np + 1) * sizeof *xy);
    bool *isvert = calloc(np ? np : 1, sizeof *isvert);
    char *hs = NULL;
    obstacles O = {0};
    double *labels = NULL;
    size_t nlabels = 0;
    if (!pts || !hull || !xy || !isvert) {
        st = TP_ENOMEM;
        goto done;
    }
    size_t m = 0;
    for (size_t i = 0; i < np; i++) {
        if (P->dup[i])
            continue;
        pts[m].x = (double)P->exps[i * n + (size_t)axes[0]];
        pts[m].y = (double)(n > 1 ? P->exps[i * n + (size_t)axes[1]] : 0);
        pts[m].i = i;
        m++;
    }
    for (size_t c = 0; c < SD->ncells; c++)
        if (SD->cells[c].dim == 0 && SD->cells[c].npts >= 1)
            isvert[SD->cells[c].pts[0]] = true;
    double b[4];
    {
        double *tmp = calloc(2 * (m ? m : 1), sizeof *tmp);
        if (!tmp) {
            st = TP_ENOMEM;
            goto done;
        }
        for (size_t i = 0; i < m; i++) {
            tmp[2 * i] = pts[i].x;
            tmp[2 * i + 1] = pts[i].y;
        }
        double x0 = tmp[0], x1 = tmp[0], y0 = tmp[1], y1 = tmp[1];
        for (size_t i = 0; i < m; i++) {
            x0 = fmin(x0, tmp[2 * i]);
            x1 = fmax(x1, tmp[2 * i]);
            y0 = fmin(y0, tmp[2 * i + 1]);
            y1 = fmax(y1, tmp[2 * i + 1]);
        }
        free(tmp);
        double D = fmax(fmax(x1 - x0, y1 - y0), 1);
        double mg = 0.12 * D + (heights ? 0.45 : 0.25);
        b[0] = x0 - mg;
        b[1] = x1 + mg;
        b[2] = y0 - mg;
        b[3] = y1 + mg;
    }
    tp_fig_view *v = &F->sub;
    /* the bottom row of the panel holds the legend of the point markers */
    double leg_h = 0.7 * S->small + 4 * S->u;
    double prect[4] = {rect[0], rect[1], rect[2], rect[3] - leg_h};
    fit_view(v, b, prect);
    size_t first = F->n;   /* the panel's first item */
    v->axes[0] = axes[0];
    v->axes[1] = axes[1];
    /* dense subdivisions get thinner edges and smaller points (one lattice step is
       v->scale pixels) */
    double sub_w = clampd(0.1 * v->scale, 0.3 * S->u, 0.9 * S->u);
    double pt_r = clampd(0.2 * v->scale, 0.55 * S->u, 1.6 * S->u);
    qsort(pts, m, sizeof *pts, cmp_ipt);
    size_t nh = hull2(pts, m, hull);
    for (size_t i = 0; i < nh; i++) {
        xy[2 * i] = VX(v, hull[i].x);
        xy[2 * i + 1] = VY(v, hull[i].y);
    }
    if (nh >= 3)
        TRY(tp_figure_path(F, "newton", -1, xy, nh, true, 0, C_NONE, C_NEWTON));
    /* cell edges */
    for (size_t c = 0; c < SD->ncells; c++) {
        const tp_subdiv_cell *cl = &SD->cells[c];
        if (cl->dim != 1 || cl->npts < 2)
            continue;
        double lo[2] = {0, 0}, hi[2] = {0, 0};
        for (size_t k = 0; k < cl->npts; k++) {
            size_t i = cl->pts[k];
            double x = (double)P->exps[i * n + (size_t)axes[0]];
            double y = (double)(n > 1 ? P->exps[i * n + (size_t)axes[1]] : 0);
            if (k == 0 || x < lo[0] || (x == lo[0] && y < lo[1])) {
                lo[0] = x;
                lo[1] = y;
            }
            if (k == 0 || x > hi[0] || (x == hi[0] && y > hi[1])) {
                hi[0] = x;
                hi[1] = y;
            }
        }
        double e[4] = {VX(v, lo[0]), VY(v, lo[1]), VX(v, hi[0]), VY(v, hi[1])};
        TRY(tp_figure_path(F, "cell-edge", (long)c, e, 2, false, sub_w, C_SUB, C_NONE));
    }
    /* lattice points of the Newton polygon without a term */
    double area = (b[1] - b[0]) * (b[3] - b[2]);
    if (nh >= 3 && area < 250000 && v->scale >= 6) {
        for (double y = ceil(b[2]); y <= b[3]; y++) {
            for (double x = ceil(b[0]); x <= b[1]; x++) {
                bool in = true;
                for (size_t k = 0; k < nh && in; k++) {
                    const ipt *a = &hull[k], *c = &hull[(k + 1) % nh];
                    if (orient(a->x, a->y, c->x, c->y, x, y) < 0)
                        in = false;
                }
                if (!in)
                    continue;
                bool term = false;
                for (size_t i = 0; i < m && !term; i++)
                    term = pts[i].x == x && pts[i].y == y;
                if (!term)
                    TRY(tp_figure_circle(F, "point-lattice", -1, VX(v, x), VY(v, y),
                                         0.6 * pt_r, 0, C_NONE, C_LATTICE));
            }
        }
    }
    /* the points with a term */
    for (size_t k = 0; k < m; k++) {
        size_t i = pts[k].i;
        double X = VX(v, pts[k].x), Y = VY(v, pts[k].y);
        if (isvert[i])
            TRY(tp_figure_circle(F, "point-vertex", (long)i, X, Y, pt_r, 0, C_NONE,
                                 C_INK));
        else
            TRY(tp_figure_circle(F, "point-unused", (long)i, X, Y, 0.85 * pt_r, 0.35 * pt_r,
                                 C_INK, C_WHITE));
    }
    if (heights) {
        /* each height goes to the side of its point (of eight) with the most room */
        for (size_t i = first; i < F->n; i++) {
            const tp_fig_item *it = &F->items[i];
            double r = it->kind == TP_FIG_CIRCLE ? it->r : it->width / 2;
            if (it->kind == TP_FIG_CIRCLE || strcmp(it->role, "cell-edge") == 0) {
                double x1 = it->xy[it->kind == TP_FIG_CIRCLE ? 0 : 2];
                double y1 = it->xy[it->kind == TP_FIG_CIRCLE ? 1 : 3];
                if (obst_add(&O, it->xy[0], it->xy[1], x1, y1, r) != TP_OK) {
                    st = TP_ENOMEM;
                    goto done;
                }
            }
        }
        for (size_t k = 0; k < m; k++) {
            size_t i = pts[k].i;
            double X = VX(v, pts[k].x), Y = VY(v, pts[k].y);
            hs = mpq_get_str(NULL, 10, P->heights[i]);
            if (!hs) {
                st = TP_ENOMEM;
                goto done;
            }
            double hw = tp_font_width(hs, S->small) / 2 + 0.4 * S->u;
            double hh = 0.35 * S->small + 0.4 * S->u;
            static const double dir[8][2] = {{1, -1}, {-1, -1}, {1, 1}, {-1, 1},
                                             {1, 0}, {-1, 0}, {0, -1}, {0, 1}};
            double best = -INFINITY, bx = X, by = Y;
            for (int c = 0; c < 8; c++) {
                double cx = X + dir[c][0] * (hw + pt_r + 0.6 * S->u);
                double cy = Y + dir[c][1] * (hh + pt_r + 0.4 * S->u);
                double rc[4] = {cx - hw, cy - hh, cx + hw, cy + hh};
                double sc = fmin(clearance(rc, &O, labels, nlabels, F->sub.rect), 1.5 * S->u) -
                            0.02 * S->u * c;
                if (sc > best) {
                    best = sc;
                    bx = cx;
                    by = cy;
                }
            }
            double *l = realloc(labels, (nlabels + 1) * 4 * sizeof *l);
            if (!l) {
                st = TP_ENOMEM;
                goto done;
            }
            labels = l;
            double *rc = labels + 4 * nlabels++;
            rc[0] = bx - hw;
            rc[1] = by - hh;
            rc[2] = bx + hw;
            rc[3] = by + hh;
            TRY(tp_figure_text(F, "height", (long)i, hs, bx, by, S->small, 0, 0, C_SUB,
                               0.6 * S->u));
            free(hs);
            hs = NULL;
        }
    }
    {
        static const char *roles[3] = {"point-vertex", "point-unused", "point-lattice"};
        static const char *names[3] = {"subdivision vertex", "term not used",
                                       "lattice point without a term"};
        bool present[3];
        double total = 0;
        for (int c = 0; c < 3; c++) {
            present[c] = false;
            for (size_t i = first; i < F->n && !present[c]; i++)
                present[c] = strcmp(F->items[i].role, roles[c]) == 0;
            if (present[c])
                total += (total > 0 ? 7 * S->u : 0) + 2 * pt_r + 2 * S->u +
                         tp_font_width(names[c], S->small);
        }
        double x = (prect[0] + prect[2]) / 2 - total / 2 + pt_r, y = rect[3] - leg_h / 2;
        for (int c = 0; c < 3; c++) {
            if (!present[c])
                continue;
            if (c == 0)
                TRY(tp_figure_circle(F, "legend", -1, x, y, pt_r, 0, C_NONE, C_INK));
            else if (c == 1)
                TRY(tp_figure_circle(F, "legend", -1, x, y, 0.85 * pt_r, 0.35 * pt_r, C_INK,
                                     C_WHITE));
            else
                TRY(tp_figure_circle(F, "legend", -1, x, y, 0.6 * pt_r, 0, C_NONE, C_LATTICE));
            x += pt_r + 2 * S->u;
            TRY(tp_figure_text(F, "legend", -1, names[c], x, y, S->small, -1, 0, C_TICK, 0));
            x += tp_font_width(names[c], S->small) + 7 * S->u + pt_r;
        }
    }
done:
    free(O.o);
    free(labels);
    free(hs);
    free(pts);
    free(hull);
    free(xy);
    free(isvert);
    if (st == TP_ENOMEM)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory while drawing");
    return st;
}

static void panel_sizes(const tp_figure_options *o, double aspect, bool sub, double sub_aspect,
                        double *W, double *H, double *Wc)
{
    /* aspect: width / height of the curve's box, clamped so neither side gets silly */
    double A = clampd(aspect, 0.6, 1.6);
    double As = clampd(sub_aspect, 0.6, 1.6);
    const double L = 720;
    if (o->width && o->height) {
        *W = (double)o->width;
        *H = (double)o->height;
        *Wc = sub ? round(*W * A / (A + As)) : *W;
        return;
    }
    double wc = A >= 1 ? L : round(L * A), h = A >= 1 ? round(L / A) : L;
    double ws = sub ? round(h * As) : 0;
    if (o->width) {          /* only the width given: keep the proportions */
        double k = (double)o->width / (wc + ws);
        wc = round(wc * k);
        h = round(h * k);
        ws = (double)o->width - wc;
    } else if (o->height) {
        double k = (double)o->height / h;
        wc = round(wc * k);
        ws = round(ws * k);
        h = (double)o->height;
    }
    *W = wc + ws;
    *H = h;
    *Wc = wc;
}

static tp_status build_curve(tp_figure *F, const tp_trop *T, const tp_figure_options *o,
                             tp_error *err)
{
    tp_status st = TP_OK;
    curve_data D;
    obstacles O = {0};
    double *labels = NULL;
    size_t nlabels = 0;
    st = curve_data_make(&D, T, err);
    if (st != TP_OK) {
        curve_data_clear(&D);
        return st;
    }
    double b[4];
    if (o->nbox == 4) {
        memcpy(b, o->box, sizeof b);
    } else if (D.nv > 0) {
        auto_box(D.v, D.nv, 2, b);
    } else {
        b[0] = b[2] = -1;
        b[1] = b[3] = 1;
    }
    /* the subdivision's aspect */
    double sub_aspect = 1;
    if (o->with_subdivision) {
        const tp_points *P = &T->points;
        double x0 = 0, x1 = 0, y0 = 0, y1 = 0;
        bool first = true;
        for (size_t i = 0; i < P->count; i++) {
            if (P->dup[i])
                continue;
            double x = (double)P->exps[i * P->n + (size_t)D.axes[0]];
            double y = (double)P->exps[i * P->n + (size_t)D.axes[1]];
            if (first || x < x0) x0 = x;
            if (first || x > x1) x1 = x;
            if (first || y < y0) y0 = y;
            if (first || y > y1) y1 = y;
            first = false;
        }
        sub_aspect = (fmax(x1 - x0, 1) + 1) / (fmax(y1 - y0, 1) + 1);
    }
    /* one vertex or none (a fan, parallel lines): without coordinates the picture says
       nothing, so the grid is switched on */
    bool grid = o->grid || !D.dots || D.nv < 2;
    double W, H, Wc;
    panel_sizes(o, (b[1] - b[0]) / (b[3] - b[2]), o->with_subdivision, sub_aspect, &W, &H, &Wc);
    F->width = W;
    F->height = H;
    F->kind = TP_FIGURE_CURVE;
    style S = make_style(Wc, H);
    double pad = 4 * S.u;
    double rect[4] = {pad, pad, Wc - pad, H - pad};
    if (grid) {
        rect[0] = tick_label_width(b, &S) + 4.5 * S.u;
        rect[3] = H - (0.7 * S.small + 5 * S.u);
    }
    if (rect[2] - rect[0] < 10 || rect[3] - rect[1] < 10) {
        st = tp_error_set(err, TP_EDOMAIN, 0, 0, "image %gx%g is too small for a figure", W, H);
        goto done;
    }
    fit_view(&F->view, b, rect);
    F->view.axes[0] = D.axes[0];
    F->view.axes[1] = D.axes[1];
    tp_fig_view *v = &F->view;
    if (grid)
        TRY(draw_grid(F, v, &S, true, true));

    /* edges, rays and lines */
    /* dense curves get thinner strokes, smaller dots and arrowheads: the scale is the
       median projected length of the bounded edges */
    double spacing = INFINITY;
    {
        double *len = malloc((D.ne ? D.ne : 1) * sizeof *len);
        size_t nl = 0;
        if (!len) {
            st = TP_ENOMEM;
            goto done;
        }
        for (size_t i = 0; i < D.ne; i++)
            if (D.e[i].type == 0)
                len[nl++] = v->scale * hypot(D.e[i].q[0] - D.e[i].p[0], D.e[i].q[1] - D.e[i].p[1]);
        if (nl > 0) {
            qsort(len, nl, sizeof *len, cmp_double);
            spacing = len[nl / 2];
        }
        free(len);
    }
    S.edge_w = clampd(0.14 * spacing, 0.35 * S.u, 1.25 * S.u);
    double dot_r = clampd(0.22 * spacing, 0.9 * S.edge_w, 1.75 * S.u);
    double ah = clampd(1.1 * spacing, 2.2 * S.u, 4.6 * S.u), aw = 0.46 * ah;
    for (size_t i = 0; i < D.ne; i++) {
        cedge *e = &D.e[i];
        double p[2], d[2], t0, t1;
        memcpy(p, e->p, sizeof p);
        if (e->type == 0) {
            d[0] = e->q[0] - p[0];
            d[1] = e->q[1] - p[1];
            t0 = 0;
            t1 = 1;
        } else {
            memcpy(d, e->d, sizeof d);
            t0 = e->type == 2 ? -INFINITY : 0;
            t1 = INFINITY;
        }
        if (!clip_param(p, d, v->box, &t0, &t1))
            continue;
        double xy[4] = {VX(v, p[0] + t0 * d[0]), VY(v, p[1] + t0 * d[1]),
                        VX(v, p[0] + t1 * d[0]), VY(v, p[1] + t1 * d[1])};
        const char *role = e->type == 0 ? "edge" : e->type == 1 ? "ray" : "line";
        double vis = hypot(xy[2] - xy[0], xy[3] - xy[1]);
        bool arrow = e->type >= 1 && vis > 1.5 * ah;
        double label_tmax = 1;
        if (arrow) {
            /* stop the stroke under the arrowhead so its round cap does not show */
            double ux = (xy[2] - xy[0]) / vis, uy = (xy[3] - xy[1]) / vis;
            double tip[2] = {xy[2], xy[3]};
            double base[2] = {tip[0] - ah * ux, tip[1] - ah * uy};
            double sxy[4] = {xy[0], xy[1], base[0] + 0.3 * ah * ux, base[1] + 0.3 * ah * uy};
            TRY(tp_figure_path(F, role, (long)e->cell, sxy, 2, false, S.edge_w, C_EDGE,
                               C_NONE));
            double tri[6] = {tip[0], tip[1], base[0] - aw * uy, base[1] + aw * ux,
                             base[0] + aw * uy, base[1] - aw * ux};
            TRY(tp_figure_path(F, "arrow", (long)e->cell, tri, 3, true, 0.35 * S.u, C_EDGE,
                               C_EDGE));
            label_tmax = (vis - ah) / vis;
            if (e->type == 2) {   /* a whole line continues both ways */
                double tip2[2] = {xy[0], xy[1]};
                double b2[2] = {tip2[0] + ah * ux, tip2[1] + ah * uy};
                double tri2[6] = {tip2[0], tip2[1], b2[0] - aw * uy, b2[1] + aw * ux,
                                  b2[0] + aw * uy, b2[1] - aw * ux};
                TRY(tp_figure_path(F, "arrow", (long)e->cell, tri2, 3, true, 0.35 * S.u,
                                   C_EDGE, C_EDGE));
            }
        } else {
            TRY(tp_figure_path(F, role, (long)e->cell, xy, 2, false, S.edge_w, C_EDGE,
                               C_NONE));
        }
        if (obst_add(&O, xy[0], xy[1], xy[2], xy[3], S.edge_w / 2) != TP_OK) {
            st = TP_ENOMEM;
            goto done;
        }
        (void)label_tmax;
    }
    /* vertices */
    if (D.dots) {
        for (size_t i = 0; i < D.nv; i++) {
            double x = D.v[2 * i], y = D.v[2 * i + 1];
            if (x < v->box[0] || x > v->box[1] || y < v->box[2] || y > v->box[3])
                continue;
            TRY(tp_figure_circle(F, "vertex", (long)i, VX(v, x), VY(v, y), dot_r,
                                 0.3 * dot_r, C_INK, C_VFILL));
            if (obst_add(&O, VX(v, x), VY(v, y), VX(v, x), VY(v, y), 1.2 * dot_r) != TP_OK) {
                st = TP_ENOMEM;
                goto done;
            }
        }
    }
    /* weight labels, placed after every stroke is known */
    for (size_t i = 0; i < F->n; i++) {
        tp_fig_item *it = &F->items[i];
        if (it->kind != TP_FIG_PATH || (strcmp(it->role, "edge") && strcmp(it->role, "ray") &&
                                        strcmp(it->role, "line")))
            continue;
        const cedge *e = NULL;
        for (size_t j = 0; j < D.ne; j++)
            if ((long)D.e[j].cell == it->id)
                e = &D.e[j];
        if (!e || !e->heavy)
            continue;
        double ax = it->xy[0], ay = it->xy[1], bx = it->xy[2], by = it->xy[3];
        long id = it->id;   /* `it` may move when the label is appended */
        TRY(place_label(F, "weight", id, e->weight, ax, ay, bx, by, 1.0, S.font,
                        C_WEIGHT, &S, &O, &labels, &nlabels, rect));
    }
    if (o->with_subdivision) {
        double gap = 2 * S.u;
        double r2[4] = {Wc + gap, pad, W - pad, H - pad};
        if (r2[2] - r2[0] > 10) {
            /* a thin divider between the panels */
            double dv[4] = {Wc, 3 * pad, Wc, H - 3 * pad};
            TRY(tp_figure_path(F, "frame", -1, dv, 2, false, 0.4 * S.u, C_GRID, C_NONE));
            st = draw_subdivision(F, T, D.axes, r2, &S, o->heights, err);
            if (st != TP_OK)
                goto done;
        }
    }
done:
    if (st == TP_ENOMEM)
        tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory while drawing");
    free(O.o);
    free(labels);
    curve_data_clear(&D);
    return st;
}

/* ---------------------------------------------------------------- univariate ---- */

static tp_status build_line(tp_figure *F, const tp_trop *T, const tp_figure_options *o,
                            tp_error *err)
{
    tp_status st = TP_OK;
    const tp_complex *C = &T->complex;
    size_t nv = C->nverts;
    double *v = malloc((nv ? nv : 1) * 2 * sizeof *v);
    size_t cap = C->ncells ? C->ncells : 1, nr = 0;
    double *rx = malloc(cap * sizeof *rx), *rhw = malloc(cap * sizeof *rhw);
    double *rpos = malloc(cap * sizeof *rpos), *rsep = malloc(cap * sizeof *rsep);
    double *bsum = malloc(cap * sizeof *bsum);
    size_t *bcnt = malloc(cap * sizeof *bcnt), *rcell = malloc(cap * sizeof *rcell);
    char *rtext = malloc(cap * 256);
    char *s = NULL;
    if (!v || !rx || !rhw || !rpos || !rsep || !bsum || !bcnt || !rcell || !rtext) {
        st = TP_ENOMEM;
        goto done;
    }
    for (size_t i = 0; i < nv; i++) {
        v[2 * i] = qd(C->verts[i * C->n]);
        v[2 * i + 1] = 0;
    }
    double b[4];
    if (o->nbox == 2) {
        b[0] = o->box[0];
        b[1] = o->box[1];
    } else {
        auto_box(v, nv, 2, b);
    }
    double W = o->width ? (double)o->width : 720;
    double H = o->height ? (double)o->height : round(W * (o->grid ? 0.3 : 0.25));
    F->width = W;
    F->height = H;
    F->kind = TP_FIGURE_LINE;
    style S = make_style(W, fmin(W, H * 4.0));
    double pad = 5 * S.u;
    double axis_y = H * (o->grid ? 0.5 : 0.56);
    /* a plane view whose y range is tiny: only x matters; equal scale is kept */
    double rect[4] = {pad, pad, W - pad, H - pad};
    F->view.valid = true;
    F->view.scale = (rect[2] - rect[0]) / (b[1] - b[0]);
    F->view.box[0] = b[0];
    F->view.box[1] = b[1];
    F->view.box[2] = -(rect[3] - axis_y) / F->view.scale;
    F->view.box[3] = (axis_y - rect[1]) / F->view.scale;
    memcpy(F->view.rect, rect, sizeof rect);
    F->view.ox = rect[0] - F->view.scale * b[0];
    F->view.oy = axis_y;
    F->view.axes[0] = 0;
    F->view.axes[1] = 0;
    tp_fig_view *vw = &F->view;
    /* the axis, continuing both ways */
    double ah = 4.6 * S.u, aw = 2.1 * S.u;
    double ax[4] = {rect[0] + 0.5 * ah, axis_y, rect[2] - 0.5 * ah, axis_y};
    TRY(tp_figure_path(F, "axis", -1, ax, 2, false, 0.8 * S.u, C_TICK, C_NONE));
    double tr[6] = {rect[2], axis_y, rect[2] - ah, axis_y - aw, rect[2] - ah, axis_y + aw};
    double tl[6] = {rect[0], axis_y, rect[0] + ah, axis_y - aw, rect[0] + ah, axis_y + aw};
    TRY(tp_figure_path(F, "arrow", -1, tr, 3, true, 0.3 * S.u, C_TICK, C_TICK));
    TRY(tp_figure_path(F, "arrow", -1, tl, 3, true, 0.3 * S.u, C_TICK, C_TICK));
    if (o->grid) {
        double step = nice_step(b[1] - b[0], 10);
        int dec = step_decimals(step);
        char buf[64];
        for (double k = ceil(b[0] / step); k <= floor(b[1] / step); k++) {
            double X = VX(vw, k * step);
            if (X < rect[0] + ah || X > rect[2] - ah)
                continue;
            double tk[4] = {X, axis_y - 1.5 * S.u, X, axis_y + 1.5 * S.u};
            TRY(tp_figure_path(F, "tick", -1, tk, 2, false, 0.5 * S.u, C_TICK, C_NONE));
            fmt_num(buf, sizeof buf, k * step, dec);
            TRY(tp_figure_text(F, "tick", -1, buf, X, H - pad, S.small, 0, 1, C_TICK, 0));
        }
    }
    TRY(tp_figure_text(F, "label", -1, "valuations of the roots", rect[0], rect[1], S.small, -1,
                       -1, C_TICK, 0));
    /* roots: dots, multiplicity above, exact valuation below; crowded labels are spread
       sideways (the least squares shift that keeps them apart) with leader lines */
    nr = 0;
    for (size_t c = 0; c < C->ncells; c++) {
        const tp_complex_cell *cl = &C->cells[c];
        if (cl->dim != 0 || cl->nverts != 1)
            continue;
        double X = VX(vw, v[2 * (size_t)cl->verts[0]]);
        if (X < rect[0] || X > rect[2])
            continue;
        TRY(tp_figure_circle(F, "root", (long)c, X, axis_y, 2.0 * S.u, 0.55 * S.u, C_INK,
                             C_VFILL));
        rx[nr] = X;
        rcell[nr++] = c;
    }
    for (int which = 0; which < 2; which++) {
        double size = which == 0 ? S.font : S.small;
        for (size_t k = 0; k < nr; k++) {
            const tp_complex_cell *cl = &C->cells[rcell[k]];
            s = which == 0 ? mpz_get_str(NULL, 10, cl->weight)
                           : mpq_get_str(NULL, 10, C->verts[cl->verts[0] * C->n]);
            if (!s) {
                st = TP_ENOMEM;
                goto done;
            }
            if (strlen(s) < 200)
                snprintf(rtext + 256 * k, 256, "%s%s", which == 0 ? "\xc3\x97" : "", s);
            else   /* a huge exact number: its size is what a reader can use */
                snprintf(rtext + 256 * k, 256, "%s%.6g", which == 0 ? "\xc3\x97" : "",
                         which == 0 ? mpz_get_d(cl->weight)
                                    : mpq_get_d(C->verts[cl->verts[0] * C->n]));
            free(s);
            s = NULL;
            rhw[k] = tp_font_width(rtext + 256 * k, size) / 2 + 1.2 * S.u;
        }
        /* isotonic regression (pool adjacent violators) of x_k - S_k, S_k the summed
           separations, gives the closest positions with p_{k+1} - p_k >= hw_k + hw_{k+1} */
        double acc = 0;
        size_t nb = 0;
        for (size_t k = 0; k < nr; k++) {
            if (k > 0)
                acc += rhw[k - 1] + rhw[k];
            rsep[k] = acc;
            bsum[nb] = rx[k] - acc;
            bcnt[nb] = 1;
            nb++;
            while (nb > 1 && bsum[nb - 2] / bcnt[nb - 2] > bsum[nb - 1] / bcnt[nb - 1]) {
                bsum[nb - 2] += bsum[nb - 1];
                bcnt[nb - 2] += bcnt[nb - 1];
                nb--;
            }
        }
        for (size_t b = 0, k = 0; b < nb; b++)
            for (size_t j = 0; j < bcnt[b]; j++, k++)
                rpos[k] = bsum[b] / bcnt[b] + rsep[k];
        if (nr > 0) {
            double shift = fmax(0, rect[0] - (rpos[0] - rhw[0]));
            shift += fmin(0, rect[2] - (rpos[nr - 1] + rhw[nr - 1] + shift));
            for (size_t k = 0; k < nr; k++)
                rpos[k] += shift;
        }
        bool moved = false;
        for (size_t k = 0; k < nr; k++)
            moved = moved || fabs(rpos[k] - rx[k]) > 0.5;
        double gap = 3.2 * S.u + (moved ? 3.5 * S.u : 0);
        double y = which == 0 ? axis_y - gap - 0.35 * size : axis_y + gap + 0.35 * size;
        for (size_t k = 0; k < nr; k++) {
            if (fabs(rpos[k] - rx[k]) > 0.5) {
                double ld[4] = {rx[k], which == 0 ? axis_y - 2.7 * S.u : axis_y + 2.7 * S.u,
                                rpos[k], which == 0 ? y + 0.35 * size + 0.6 * S.u
                                                    : y - 0.35 * size - 0.6 * S.u};
                TRY(tp_figure_path(F, "label", (long)rcell[k], ld, 2, false, 0.3 * S.u,
                                   C_FRAME, C_NONE));
            }
            TRY(tp_figure_text(F, which == 0 ? "mult" : "value", (long)rcell[k],
                               rtext + 256 * k, rpos[k], y, size, 0, 0,
                               which == 0 ? C_WEIGHT : C_INK, 0.6 * S.u));
        }
    }
done:
    if (st == TP_ENOMEM)
        tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory while drawing");
    free(s);
    free(v);
    free(rx);
    free(rhw);
    free(rpos);
    free(rsep);
    free(bsum);
    free(bcnt);
    free(rcell);
    free(rtext);
    return st;
}

/* ---------------------------------------------------------------- surfaces ---- */

void tp_surface_mesh_init(tp_surface_mesh *M)
{
    memset(M, 0, sizeof *M);
}

void tp_surface_mesh_clear(tp_surface_mesh *M)
{
    free(M->cell);
    free(M->start);
    free(M->xyz);
    memset(M, 0, sizeof *M);
}

static double dot3(const double a[3], const double b[3])
{
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

static void cross3(const double a[3], const double b[3], double c[3])
{
    c[0] = a[1] * b[2] - a[2] * b[1];
    c[1] = a[2] * b[0] - a[0] * b[2];
    c[2] = a[0] * b[1] - a[1] * b[0];
}

/* Clip a convex polygon (n points, xyz) by coordinate k >= lo (sign +1) or <= hi (-1). */
static size_t clip_plane(const double *in, size_t n, double *out, int k, double bound, int sgn)
{
    size_t m = 0;
    for (size_t i = 0; i < n; i++) {
        const double *a = in + 3 * i, *b = in + 3 * ((i + 1) % n);
        double da = sgn * (a[k] - bound), db = sgn * (b[k] - bound);
        if (da >= 0) {
            memcpy(out + 3 * m, a, 3 * sizeof *a);
            m++;
        }
        if ((da >= 0) != (db >= 0)) {
            double t = da / (da - db);
            for (int j = 0; j < 3; j++)
                out[3 * m + j] = a[j] + t * (b[j] - a[j]);
            out[3 * m + k] = bound;   /* exactly on the face of the box */
            m++;
        }
    }
    return m;
}

tp_status tp_surface_mesh_build(tp_surface_mesh *M, const tp_trop *T, const double *box,
                                tp_error *err)
{
    tp_status st = TP_OK;
    const tp_complex *C = &T->complex;
    tp_surface_mesh_clear(M);
    if (C->n != 3 || C->nlin != 0 || C->dim != 2)
        return tp_error_set(err, TP_EDOMAIN, 0, 0,
                            "a surface mesh needs a polynomial in 3 variables whose Newton "
                            "polytope is 3-dimensional");
    double *V = malloc((C->nverts ? C->nverts : 1) * 3 * sizeof *V);
    double *poly = NULL, *tmp = NULL;
    ipt *pl = NULL, *hl = NULL;
    if (!V)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    for (size_t i = 0; i < 3 * C->nverts; i++)
        V[i] = qd(C->verts[i]);
    if (box) {
        memcpy(M->box, box, sizeof M->box);
        for (int k = 0; k < 3; k++)
            if (!(box[2 * k] < box[2 * k + 1])) {
                free(V);
                return tp_error_set(err, TP_EDOMAIN, 0, 0,
                                    "box: expected min < max on every axis");
            }
    } else {
        double lo[3] = {0, 0, 0}, hi[3] = {0, 0, 0};
        for (size_t i = 0; i < C->nverts; i++)
            for (int k = 0; k < 3; k++) {
                if (i == 0 || V[3 * i + k] < lo[k]) lo[k] = V[3 * i + k];
                if (i == 0 || V[3 * i + k] > hi[k]) hi[k] = V[3 * i + k];
            }
        double D = fmax(hi[0] - lo[0], fmax(hi[1] - lo[1], hi[2] - lo[2]));
        double m = D > 1e-9 ? 0.3 * D : 1.0;
        if (m < 1 && D > 1e-9)
            m = fmax(m, 0.5);
        for (int k = 0; k < 3; k++) {
            M->box[2 * k] = lo[k] - m;
            M->box[2 * k + 1] = hi[k] + m;
        }
    }
    double diag = 0, ctr[3];
    for (int k = 0; k < 3; k++) {
        ctr[k] = (M->box[2 * k] + M->box[2 * k + 1]) / 2;
        diag += pow(M->box[2 * k + 1] - M->box[2 * k], 2);
    }
    diag = sqrt(diag);
    double far = diag;
    for (size_t i = 0; i < C->nverts; i++)
        far = fmax(far, sqrt(pow(V[3 * i] - ctr[0], 2) + pow(V[3 * i + 1] - ctr[1], 2) +
                             pow(V[3 * i + 2] - ctr[2], 2)) + diag);
    double big = 1000 * far;

    size_t cap = 0, used = 0;
    M->start = malloc(sizeof *M->start * (C->ncells + 1));
    M->cell = malloc(sizeof *M->cell * (C->ncells ? C->ncells : 1));
    if (!M->start || !M->cell) {
        st = TP_ENOMEM;
        goto done;
    }
    M->start[0] = 0;
    for (size_t c = 0; c < C->ncells; c++) {
        const tp_complex_cell *cl = &C->cells[c];
        if (cl->dim != 2 || cl->nverts == 0)
            continue;
        size_t np = cl->nverts * (1 + cl->nrays);
        free(poly);
        free(tmp);
        free(pl);
        free(hl);
        poly = malloc((np + 8) * 2 * 3 * sizeof *poly);
        tmp = malloc((np + 8) * 2 * 3 * sizeof *tmp);
        pl = malloc(np * sizeof *pl);
        hl = malloc((np + 1) * sizeof *hl);
        if (!poly || !tmp || !pl || !hl) {
            st = TP_ENOMEM;
            goto done;
        }
        /* all generating points, in 3D (stored in tmp) */
        size_t g = 0;
        for (size_t a = 0; a < cl->nverts; a++) {
            const double *p = V + 3 * (size_t)cl->verts[a];
            memcpy(tmp + 3 * g++, p, 3 * sizeof *p);
            for (size_t r = 0; r < cl->nrays; r++) {
                double d[3], len = 0;
                for (int k = 0; k < 3; k++) {
                    d[k] = mpz_get_d(C->rays[(size_t)tp_complex_cell_rays(cl)[r] * 3 + (size_t)k]);
                    len += d[k] * d[k];
                }
                len = sqrt(len);
                for (int k = 0; k < 3; k++)
                    tmp[3 * g + (size_t)k] = p[k] + big * d[k] / len;
                g++;
            }
        }
        /* a basis of the cell's plane */
        const double *o = tmp;
        double e1[3] = {0, 0, 0}, e2[3] = {0, 0, 0}, nrm[3];
        bool have1 = false, have2 = false;
        for (size_t i = 1; i < g && !have2; i++) {
            double d[3] = {tmp[3 * i] - o[0], tmp[3 * i + 1] - o[1], tmp[3 * i + 2] - o[2]};
            double l = sqrt(dot3(d, d));
            if (l < 1e-9 * far)
                continue;
            if (!have1) {
                for (int k = 0; k < 3; k++)
                    e1[k] = d[k] / l;
                have1 = true;
                continue;
            }
            double pr = dot3(d, e1);
            for (int k = 0; k < 3; k++)
                d[k] -= pr * e1[k];
            l = sqrt(dot3(d, d));
            if (l < 1e-7 * far)
                continue;
            for (int k = 0; k < 3; k++)
                e2[k] = d[k] / l;
            have2 = true;
        }
        if (!have2)
            continue;   /* cannot happen for a 2-cell; skip rather than draw garbage */
        cross3(e1, e2, nrm);
        for (size_t i = 0; i < g; i++) {
            double d[3] = {tmp[3 * i] - o[0], tmp[3 * i + 1] - o[1], tmp[3 * i + 2] - o[2]};
            pl[i].x = dot3(d, e1);
            pl[i].y = dot3(d, e2);
            pl[i].i = i;
        }
        qsort(pl, g, sizeof *pl, cmp_ipt);
        size_t nh = hull2(pl, g, hl);
        for (size_t i = 0; i < nh; i++)
            for (int k = 0; k < 3; k++)
                poly[3 * i + (size_t)k] = o[k] + hl[i].x * e1[k] + hl[i].y * e2[k];
        size_t m = nh;
        for (int k = 0; k < 3 && m > 0; k++) {
            m = clip_plane(poly, m, tmp, k, M->box[2 * k], +1);
            m = clip_plane(tmp, m, poly, k, M->box[2 * k + 1], -1);
        }
        /* drop repeated vertices */
        size_t q = 0;
        for (size_t i = 0; i < m; i++) {
            const double *a = poly + 3 * i, *b = q ? poly + 3 * (q - 1) : NULL;
            if (b && fabs(a[0] - b[0]) + fabs(a[1] - b[1]) + fabs(a[2] - b[2]) < 1e-9 * diag)
                continue;
            memmove(poly + 3 * q, a, 3 * sizeof *a);
            q++;
        }
        while (q > 1 && fabs(poly[0] - poly[3 * q - 3]) + fabs(poly[1] - poly[3 * q - 2]) +
                                fabs(poly[2] - poly[3 * q - 1]) < 1e-9 * diag)
            q--;
        if (q < 3)
            continue;
        /* a polygon of zero area (the cell only touches the box) is left out */
        double area[3] = {0, 0, 0};
        for (size_t i = 1; i + 1 < q; i++) {
            double a[3], b[3], cr[3];
            for (int k = 0; k < 3; k++) {
                a[k] = poly[3 * i + (size_t)k] - poly[k];
                b[k] = poly[3 * (i + 1) + (size_t)k] - poly[k];
            }
            cross3(a, b, cr);
            for (int k = 0; k < 3; k++)
                area[k] += cr[k];
        }
        if (sqrt(dot3(area, area)) < 1e-12 * diag * diag)
            continue;
        if (used + q > cap) {
            size_t nc = 2 * (used + q) + 64;
            double *x = realloc(M->xyz, nc * 3 * sizeof *x);
            if (!x) {
                st = TP_ENOMEM;
                goto done;
            }
            M->xyz = x;
            cap = nc;
        }
        memcpy(M->xyz + 3 * used, poly, 3 * q * sizeof *poly);
        used += q;
        M->cell[M->npolys] = c;
        M->start[++M->npolys] = used;
    }
done:
    free(V);
    free(poly);
    free(tmp);
    free(pl);
    free(hl);
    if (st != TP_OK) {
        tp_surface_mesh_clear(M);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory while clipping the surface");
    }
    return TP_OK;
}

typedef struct {
    size_t k;          /* polygon index */
    double depth;      /* centroid depth (larger = nearer) */
    double bb[4];      /* screen bounding box */
} face_ord;

static int cmp_face(const void *a, const void *b)
{
    const face_ord *p = a, *q = b;
    if (p->depth != q->depth)
        return p->depth < q->depth ? -1 : 1;
    return (p->k > q->k) - (p->k < q->k);
}

static tp_status build_surface(tp_figure *F, const tp_trop *T, const tp_figure_options *o,
                               tp_error *err)
{
    tp_status st = TP_OK;
    tp_surface_mesh M;
    tp_surface_mesh_init(&M);
    if (o->nbox != 0 && o->nbox != 6)
        return tp_error_set(err, TP_EDOMAIN, 0, 0,
                            "--box for a surface: expected 6 numbers xmin,xmax,ymin,ymax,zmin,zmax");
    st = tp_surface_mesh_build(&M, T, o->nbox == 6 ? o->box : NULL, err);
    if (st != TP_OK)
        return st;
    face_ord *ord = NULL;
    unsigned char *before = NULL;   /* before[a*np+b]: a must be drawn before b */
    size_t *indeg = NULL, *order = NULL;
    double *xy = NULL;
    double (*normals)[3] = NULL;
    size_t np = M.npolys;
    /* the view: looking from azimuth 35 degrees, elevation 24 degrees */
    const double deg = 3.14159265358979323846 / 180;
    double az = 35 * deg, el = 24 * deg;
    double cam[3] = {cos(el) * cos(az), cos(el) * sin(az), sin(el)};
    double ex[3] = {-sin(az), cos(az), 0};
    double ey[3];
    cross3(cam, ex, ey);
    double light[3] = {0.35, -0.45, 0.82};
    {
        double l = sqrt(dot3(light, light));
        for (int k = 0; k < 3; k++)
            light[k] /= l;
    }
    double W = o->width ? (double)o->width : 760, H = o->height ? (double)o->height : 640;
    F->width = W;
    F->height = H;
    F->kind = TP_FIGURE_SURFACE;
    memcpy(F->box3, M.box, sizeof F->box3);
    style S = make_style(W, H);
    /* fit the projected box */
    double sx0 = INFINITY, sx1 = -INFINITY, sy0 = INFINITY, sy1 = -INFINITY;
    double corner[8][3];
    for (int c = 0; c < 8; c++) {
        for (int k = 0; k < 3; k++)
            corner[c][k] = M.box[2 * k + ((c >> k) & 1)];
        double X = dot3(corner[c], ex), Y = dot3(corner[c], ey);
        sx0 = fmin(sx0, X);
        sx1 = fmax(sx1, X);
        sy0 = fmin(sy0, Y);
        sy1 = fmax(sy1, Y);
    }
    double pad = 8 * S.u;
    double rect[4] = {pad, pad, W - pad, H - pad};
    double sb[4] = {sx0, sx1, sy0, sy1};
    fit_view(&F->view, sb, rect);
    tp_fig_view *v = &F->view;
    memcpy(v->ex, ex, sizeof ex);
    memcpy(v->ey, ey, sizeof ey);
#define PX(p) VX(v, dot3((p), ex))
#define PY(p) VY(v, dot3((p), ey))
    /* the box: hidden edges first (light), faces, then the visible front edges */
    static const int bedge[12][2] = {{0, 1}, {2, 3}, {4, 5}, {6, 7}, {0, 2}, {1, 3},
                                     {4, 6}, {5, 7}, {0, 4}, {1, 5}, {2, 6}, {3, 7}};
    int nearest = 0;
    for (int c = 1; c < 8; c++)
        if (dot3(corner[c], cam) > dot3(corner[nearest], cam))
            nearest = c;
    for (int pass = 0; pass < 2; pass++) {
        for (int e = 0; e < 12; e++) {
            bool front = bedge[e][0] == nearest || bedge[e][1] == nearest;
            if (front != (pass == 1))
                continue;
            double l[4] = {PX(corner[bedge[e][0]]), PY(corner[bedge[e][0]]),
                           PX(corner[bedge[e][1]]), PY(corner[bedge[e][1]])};
            if (pass == 0)
                TRY(tp_figure_path(F, "box", -1, l, 2, false, 0.45 * S.u, C_BOX, C_NONE));
        }
        if (pass == 1)
            break;
    }
    if (np > 0) {
        ord = malloc(np * sizeof *ord);
        /* pairwise order constraints need np^2 bytes: beyond 4096 faces only the depth
           sort is used */
        before = calloc(np <= 4096 ? np * np : 1, 1);
        indeg = calloc(np, sizeof *indeg);
        order = malloc(np * sizeof *order);
        normals = malloc(np * sizeof *normals);
        if (!ord || !before || !indeg || !order || !normals) {
            st = TP_ENOMEM;
            goto done;
        }
    }
    for (size_t k = 0; k < np; k++) {
        size_t a = M.start[k], b = M.start[k + 1];
        double c[3] = {0, 0, 0};
        ord[k].k = k;
        ord[k].bb[0] = ord[k].bb[1] = INFINITY;
        ord[k].bb[2] = ord[k].bb[3] = -INFINITY;
        for (size_t i = a; i < b; i++) {
            for (int j = 0; j < 3; j++)
                c[j] += M.xyz[3 * i + (size_t)j] / (double)(b - a);
            double X = PX(M.xyz + 3 * i), Y = PY(M.xyz + 3 * i);
            ord[k].bb[0] = fmin(ord[k].bb[0], X);
            ord[k].bb[1] = fmin(ord[k].bb[1], Y);
            ord[k].bb[2] = fmax(ord[k].bb[2], X);
            ord[k].bb[3] = fmax(ord[k].bb[3], Y);
        }
        ord[k].depth = dot3(c, cam);
        double nn[3] = {0, 0, 0};
        for (size_t i = a + 1; i + 1 < b; i++) {
            double p[3], q[3], cr[3];
            for (int j = 0; j < 3; j++) {
                p[j] = M.xyz[3 * i + (size_t)j] - M.xyz[3 * a + (size_t)j];
                q[j] = M.xyz[3 * (i + 1) + (size_t)j] - M.xyz[3 * a + (size_t)j];
            }
            cross3(p, q, cr);
            for (int j = 0; j < 3; j++)
                nn[j] += cr[j];
        }
        double l = sqrt(dot3(nn, nn));
        for (int j = 0; j < 3; j++)
            normals[k][j] = l > 0 ? nn[j] / l : 0;
    }
    /* depth order: for faces whose screen boxes overlap, the one lying wholly behind the
       other's plane (as seen from the viewer) goes first; the rest by centroid depth.
       Cycles (impossible for a polyhedral complex up to rounding) fall back to depth. */
    double eps = 1e-9 * (F->view.box[1] - F->view.box[0] + 1);
    for (size_t a = 0; a < np && np <= 4096; a++) {
        for (size_t b = a + 1; b < np; b++) {
            const double *A = ord[a].bb, *B = ord[b].bb;
            if (A[0] > B[2] || B[0] > A[2] || A[1] > B[3] || B[1] > A[3])
                continue;
            int rel = 0;   /* +1: a before b, -1: b before a */
            for (int pass = 0; pass < 2 && rel == 0; pass++) {
                size_t p = pass ? b : a, q = pass ? a : b;
                /* is every vertex of p on the far side of q's plane? */
                double *nq = normals[q];
                double side_cam = dot3(nq, cam);
                if (fabs(side_cam) < 1e-12)
                    continue;
                const double *q0 = M.xyz + 3 * M.start[q];
                bool behind = true, front = true;
                for (size_t i = M.start[p]; i < M.start[p + 1]; i++) {
                    double d[3] = {M.xyz[3 * i] - q0[0], M.xyz[3 * i + 1] - q0[1],
                                   M.xyz[3 * i + 2] - q0[2]};
                    double s = dot3(d, nq) * (side_cam > 0 ? 1 : -1);
                    if (s > eps)
                        behind = false;
                    if (s < -eps)
                        front = false;
                }
                if (behind && !front)
                    rel = pass ? -1 : 1;   /* p behind q: p first */
                else if (front && !behind)
                    rel = pass ? 1 : -1;
            }
            if (rel == 1 && !before[b * np + a]) {
                before[a * np + b] = 1;
                indeg[b]++;
            } else if (rel == -1 && !before[a * np + b]) {
                before[b * np + a] = 1;
                indeg[a]++;
            }
        }
    }
    qsort(ord, np, sizeof *ord, cmp_face);   /* farthest first */
    {
        bool *done_ = calloc(np ? np : 1, sizeof *done_);
        if (!done_) {
            st = TP_ENOMEM;
            goto done;
        }
        for (size_t out = 0; out < np; out++) {
            size_t pick = np;
            for (size_t r = 0; r < np; r++) {
                size_t k = ord[r].k;
                if (!done_[k] && indeg[k] == 0) {
                    pick = k;
                    break;
                }
            }
            if (pick == np)   /* a cycle: take the farthest remaining */
                for (size_t r = 0; r < np && pick == np; r++)
                    if (!done_[ord[r].k])
                        pick = ord[r].k;
            done_[pick] = true;
            order[out] = pick;
            for (size_t b = 0; b < np && np <= 4096; b++)
                if (before[pick * np + b] && indeg[b] > 0)
                    indeg[b]--;
        }
        free(done_);
    }
    /* colours by the normal's direction up to sign, a fixed map so that the same
       direction has the same colour in every figure: the coordinate directions and
       their differences (the normals of a generic surface), anything else slate */
    static const double dirs[6][3] = {{1, 0, 0}, {0, 1, 0}, {0, 0, 1},
                                      {0.70710678118654752, -0.70710678118654752, 0},
                                      {0.70710678118654752, 0, -0.70710678118654752},
                                      {0, 0.70710678118654752, -0.70710678118654752}};
    for (size_t r = 0; r < np; r++) {
        size_t k = order[r];
        size_t a = M.start[k], b = M.start[k + 1];
        free(xy);
        xy = malloc(2 * (b - a) * sizeof *xy);
        if (!xy) {
            st = TP_ENOMEM;
            goto done;
        }
        for (size_t i = a; i < b; i++) {
            xy[2 * (i - a)] = PX(M.xyz + 3 * i);
            xy[2 * (i - a) + 1] = PY(M.xyz + 3 * i);
        }
        const double *nk = normals[k];
        size_t cls = 5;
        for (size_t q = 0; q < 6; q++)
            if (fabs(fabs(dot3(dirs[q], nk)) - 1) < 1e-9)
                cls = q;
        tp_rgba base = FACE_COLORS[cls];
        double lam = 0.55 + 0.45 * fabs(dot3(nk, light));
        tp_rgba col = {(uint8_t)lrint(base.r * lam + 255 * (1 - lam) * 0.25),
                       (uint8_t)lrint(base.g * lam + 255 * (1 - lam) * 0.25),
                       (uint8_t)lrint(base.b * lam + 255 * (1 - lam) * 0.25), 255};
        TRY(tp_figure_path(F, "face", (long)M.cell[k], xy, b - a, true, 0.45 * S.u,
                           C_FACE_EDGE, col));
    }
    /* axis names beside the box edge parallel to each axis that lies farthest out on
       the screen (a silhouette edge) */
    for (int k = 0; k < 3; k++) {
        static const char *names[3] = {"x", "y", "z"};
        double cx = (rect[0] + rect[2]) / 2, cy = (rect[1] + rect[3]) / 2;
        double best = -1, lx = 0, ly = 0, dx = 0, dy = 0;
        for (int c = 0; c < 8; c++) {
            if ((c >> k) & 1)
                continue;
            const double *a = corner[c], *b = corner[c | (1 << k)];
            double mx = (PX(a) + PX(b)) / 2, my = (PY(a) + PY(b)) / 2;
            double d = hypot(mx - cx, my - cy);
            if (d > best + 1e-9) {
                best = d;
                lx = mx;
                ly = my;
                dx = (mx - cx) / (d > 0 ? d : 1);
                dy = (my - cy) / (d > 0 ? d : 1);
            }
        }
        const char *nm = T->vars && T->nvars == 3 ? T->vars[k] : names[k];
        TRY(tp_figure_text(F, "label", k, nm, lx + dx * 4 * S.u, ly + dy * 4 * S.u, S.font, 0,
                           0, C_TICK, 0));
    }
    for (int e = 0; e < 12; e++) {
        bool front = bedge[e][0] == nearest || bedge[e][1] == nearest;
        if (!front)
            continue;
        double l[4] = {PX(corner[bedge[e][0]]), PY(corner[bedge[e][0]]),
                       PX(corner[bedge[e][1]]), PY(corner[bedge[e][1]])};
        TRY(tp_figure_path(F, "box", -1, l, 2, false, 0.45 * S.u, C_BOX, C_NONE));
    }
#undef PX
#undef PY
done:
    if (st == TP_ENOMEM)
        tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory while drawing");
    free(ord);
    free(before);
    free(indeg);
    free(order);
    free(normals);
    free(xy);
    tp_surface_mesh_clear(&M);
    return st;
}

/* ---------------------------------------------------------------- options ---- */

tp_status tp_figure_parse_box(const char *s, double box[6], size_t *n, tp_error *err)
{
    const char *p = s;
    *n = 0;
    for (;;) {
        char *end;
        while (*p == ' ')
            p++;
        double v = strtod(p, &end);
        if (end == p || !isfinite(v))
            return tp_error_set(err, TP_ESYNTAX, 1, (int)(p - s) + 1,
                                "--box: expected a number (xmin,xmax,ymin,ymax[,zmin,zmax])");
        if (*n == 6)
            return tp_error_set(err, TP_ESYNTAX, 1, (int)(p - s) + 1,
                                "--box: expected at most 6 numbers");
        box[(*n)++] = v;
        p = end;
        while (*p == ' ')
            p++;
        if (*p == '\0')
            break;
        if (*p != ',')
            return tp_error_set(err, TP_ESYNTAX, 1, (int)(p - s) + 1,
                                "--box: expected ',' between numbers");
        p++;
    }
    if (*n % 2 != 0)
        return tp_error_set(err, TP_ESYNTAX, 1, (int)(p - s) + 1,
                            "--box: expected pairs min,max (2, 4 or 6 numbers), found %zu", *n);
    for (size_t k = 0; k < *n; k += 2)
        if (!(box[k] < box[k + 1]))
            return tp_error_set(err, TP_EDOMAIN, 0, 0,
                                "--box: expected each minimum below its maximum (%g >= %g)",
                                box[k], box[k + 1]);
    return TP_OK;
}

tp_status tp_figure_parse_size(const char *s, size_t *w, size_t *h, tp_error *err)
{
    const char *p = s;
    unsigned long v[2] = {0, 0};
    for (int k = 0; k < 2; k++) {
        if (*p < '0' || *p > '9')
            return tp_error_set(err, TP_ESYNTAX, 1, (int)(p - s) + 1,
                                "--size: expected WIDTHxHEIGHT in pixels, e.g. 800x600");
        while (*p >= '0' && *p <= '9') {
            v[k] = v[k] * 10 + (unsigned long)(*p - '0');
            if (v[k] > 16384)
                return tp_error_set(err, TP_ESYNTAX, 1, (int)(p - s) + 1,
                                    "--size: expected at most 16384 pixels a side");
            p++;
        }
        if (k == 0) {
            if (*p != 'x' && *p != 'X')
                return tp_error_set(err, TP_ESYNTAX, 1, (int)(p - s) + 1,
                                    "--size: expected 'x' between width and height");
            p++;
        }
    }
    if (*p != '\0')
        return tp_error_set(err, TP_ESYNTAX, 1, (int)(p - s) + 1,
                            "--size: expected WIDTHxHEIGHT, found extra characters");
    if (v[0] < 16 || v[1] < 16)
        return tp_error_set(err, TP_ESYNTAX, 1, 1, "--size: expected at least 16 pixels a side");
    *w = v[0];
    *h = v[1];
    return TP_OK;
}

/* ---------------------------------------------------------------- entry ---- */

tp_status tp_figure_build(tp_figure *F, const tp_trop *T, const tp_figure_options *o,
                          tp_error *err)
{
    tp_figure_clear(F);
    const tp_complex *C = &T->complex;
    F->background = o->transparent ? C_NONE : C_WHITE;
    for (size_t k = 0; k + 1 < o->nbox; k += 2)
        if (!(o->box[k] < o->box[k + 1]) || !isfinite(o->box[k]) || !isfinite(o->box[k + 1]))
            return tp_error_set(err, TP_EDOMAIN, 0, 0,
                                "--box: expected each minimum below its maximum");
    if ((o->width && o->width > 16384) || (o->height && o->height > 16384))
        return tp_error_set(err, TP_EDOMAIN, 0, 0, "--size: expected at most 16384 pixels a side");
    if (C->dim < 0 || C->ncells == 0)
        return tp_error_set(err, TP_EDOMAIN, 0, 0,
                            "nothing to draw: the polynomial has a single term, so its "
                            "tropical hypersurface is empty");
    tp_status st;
    bool curve = C->n == 2 || (C->n == 3 && C->nlin == 1);
    if (o->with_subdivision && !curve)
        return tp_error_set(err, TP_EDOMAIN, 0, 0,
                            "--with-subdivision: expected a plane curve (2 variables, or a "
                            "homogeneous polynomial in 3); this input has %zu variables", C->n);
    if (C->n == 1) {
        if (o->nbox != 0 && o->nbox != 2)
            return tp_error_set(err, TP_EDOMAIN, 0, 0,
                                "--box for one variable: expected xmin,xmax");
        st = build_line(F, T, o, err);
    } else if (curve) {
        if (o->nbox != 0 && o->nbox != 4)
            return tp_error_set(err, TP_EDOMAIN, 0, 0,
                                "--box for a plane curve: expected 4 numbers xmin,xmax,ymin,ymax");
        st = build_curve(F, T, o, err);
    } else if (C->n == 3 && C->nlin == 0) {
        st = build_surface(F, T, o, err);
    } else {
        return tp_error_set(err, TP_EDOMAIN, 0, 0,
                            "cannot draw a hypersurface in %zu variables with a %zu-dimensional "
                            "lineality space: draw handles 1 variable, plane curves and surfaces",
                            C->n, C->nlin);
    }
    if (st != TP_OK)
        tp_figure_clear(F);
    return st;
}
