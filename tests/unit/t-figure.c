/* t-figure.c — layout of figures (figure.c) and the surface mesh, checked against the
 * exact complex and against published counts.
 *
 * References: a generic plane curve of degree d (heights i^2 + ij + j^2 plus small
 * noise give a unimodular triangulation) has d^2 vertices, 3d(d-1)/2 bounded edges and 3d
 * rays of weight 1 (Mikhalkin, "Enumerative tropical algebraic geometry in R^2", J. AMS
 * 18 (2005), §2, from memory). With the trivial valuation and full support of degree d
 * the curve is one vertex with rays (1,0), (0,1), (-1,-1) of weight d (common practice,
 * no source). A root of a univariate polynomial over Q_p has valuation -s for a Newton
 * polygon segment of slope s, as many roots as the segment's length (Koblitz, p-adic
 * Numbers, p-adic Analysis, and Zeta-Functions, GTM 58, ch. IV §3). The hyperplane
 * x + y + z + 1 over Q is a tropical plane: the fan with cones spanned by pairs of
 * e1, e2, e3, -(e1+e2+e3) (common practice, no source). A convex polygon's vertices are
 * coplanar and its signed area is positive in counter-clockwise order (common practice).
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "testlib.h"
#include "trope/figure.h"

static bool make(tp_trop *T, const char *text, const char *over)
{
    tp_input in;
    tp_error err;
    tp_input_init(&in);
    tp_trop_init(T);
    tp_error_init(&err, "test");
    tp_parse_options po;
    memset(&po, 0, sizeof po);
    po.over = over;
    bool ok = tp_input_parse(&in, text, strlen(text), &po, &err) == TP_OK;
    tp_trop_options to = {.max = false, .engine = TP_ENGINE_AUTO};
    if (ok)
        ok = tp_trop_from_poly(T, &in, 0, &to, &err) == TP_OK;
    tp_check(ok, "pipeline on '%s': %s", text, err.msg);
    tp_input_clear(&in);
    return ok;
}

static size_t count_role(const tp_figure *F, const char *role)
{
    size_t c = 0;
    for (size_t i = 0; i < F->n; i++)
        c += strcmp(F->items[i].role, role) == 0;
    return c;
}

static double X(const tp_fig_view *v, double x) { return v->ox + v->scale * x; }
static double Y(const tp_fig_view *v, double y) { return v->oy - v->scale * y; }

/* Every edge item starts and ends at the projection of its cell's exact vertices; every
 * ray starts at its vertex and points along its exact direction. */
static void check_edges_match(const tp_figure *F, const tp_trop *T, const char *what)
{
    const tp_complex *C = &T->complex;
    size_t n = C->n;
    int a0 = F->view.axes[0], a1 = F->view.axes[1];
    for (size_t i = 0; i < F->n; i++) {
        const tp_fig_item *it = &F->items[i];
        bool edge = strcmp(it->role, "edge") == 0, ray = strcmp(it->role, "ray") == 0;
        if (!edge && !ray)
            continue;
        const tp_complex_cell *cl = &C->cells[it->id];
        mpq_t *p = C->verts + cl->verts[0] * n;
        double px = X(&F->view, mpq_get_d(p[a0])), py = Y(&F->view, mpq_get_d(p[a1]));
        tp_check(fabs(it->xy[0] - px) < 1e-6 && fabs(it->xy[1] - py) < 1e-6,
                 "%s: cell %ld starts at its vertex", what, it->id);
        if (edge) {
            mpq_t *q = C->verts + cl->verts[1] * n;
            double qx = X(&F->view, mpq_get_d(q[a0])), qy = Y(&F->view, mpq_get_d(q[a1]));
            tp_check(fabs(it->xy[2] - qx) < 1e-6 && fabs(it->xy[3] - qy) < 1e-6,
                     "%s: edge %ld ends at its vertex", what, it->id);
        } else {
            mpz_t *r = C->rays + tp_complex_cell_rays(cl)[0] * n;
            double dx = mpz_get_d(r[a0]), dy = -mpz_get_d(r[a1]);
            double ex = it->xy[2] - it->xy[0], ey = it->xy[3] - it->xy[1];
            double crs = dx * ey - dy * ex, dt = dx * ex + dy * ey;
            tp_check(fabs(crs) < 1e-6 * hypot(ex, ey) * hypot(dx, dy) && dt > 0,
                     "%s: ray %ld points along its direction", what, it->id);
        }
        /* inside the figure's box */
        for (size_t k = 0; k < it->npts; k++)
            tp_check(it->xy[2 * k] >= F->view.rect[0] - 1e-6 &&
                         it->xy[2 * k] <= F->view.rect[2] + 1e-6 &&
                         it->xy[2 * k + 1] >= F->view.rect[1] - 1e-6 &&
                         it->xy[2 * k + 1] <= F->view.rect[3] + 1e-6,
                     "%s: item inside the plot rectangle", what);
    }
}

static void test_generic(void)
{
    tp_rng rng;
    tp_rng_seed(&rng, tp_test_seed() + 11);
    for (long d = 1; d <= 4; d++) {
        /* heights i^2 + ij + j^2 plus noise below 1/100 */
        char *buf = malloc(8192);
        size_t len = 0;
        for (long i = 0; i <= d; i++)
            for (long j = 0; i + j <= d; j++) {
                long h = 1000 * (i * i + i * j + j * j) + tp_rng_range(&rng, 0, 9);
                len += (size_t)snprintf(buf + len, 8192 - len, "%st^(%ld/1000)*x^%ld*y^%ld",
                                        len ? " + " : "", h, i, j);
            }
        tp_trop T;
        if (!make(&T, buf, "t")) {
            free(buf);
            tp_trop_clear(&T);
            continue;
        }
        tp_figure F;
        tp_figure_options o;
        tp_figure_init(&F);
        tp_figure_options_init(&o);
        tp_error err;
        tp_error_init(&err, NULL);
        tp_check(tp_figure_build(&F, &T, &o, &err) == TP_OK, "figure: %s", err.msg);
        tp_check(count_role(&F, "vertex") == (size_t)(d * d), "d=%ld: %zu vertex dots", d,
                 count_role(&F, "vertex"));
        tp_check(count_role(&F, "edge") == (size_t)(3 * d * (d - 1) / 2), "d=%ld: %zu edges", d,
                 count_role(&F, "edge"));
        tp_check(count_role(&F, "ray") == (size_t)(3 * d), "d=%ld: rays", d);
        tp_check(count_role(&F, "arrow") == (size_t)(3 * d), "d=%ld: every ray has an arrow", d);
        tp_check(count_role(&F, "weight") == 0, "d=%ld: no weight labels", d);
        tp_check(F.width == 720 || F.height == 720, "automatic size: 720 on the long side");
        check_edges_match(&F, &T, "generic");
        /* the box holds every vertex with a margin */
        for (size_t i = 0; i < T.complex.nverts; i++) {
            double x = mpq_get_d(T.complex.verts[2 * i]), y = mpq_get_d(T.complex.verts[2 * i + 1]);
            double m = 0.05 * (F.view.box[1] - F.view.box[0]);
            tp_check(x > F.view.box[0] + m && x < F.view.box[1] - m && y > F.view.box[2] + m &&
                         y < F.view.box[3] - m,
                     "d=%ld: vertex %zu well inside the box", d, i);
        }
        /* with the subdivision: one point per term, one edge per subdivision edge */
        o.with_subdivision = true;
        o.heights = true;
        tp_check(tp_figure_build(&F, &T, &o, &err) == TP_OK, "figure with subdivision");
        size_t nedges = 0;
        for (size_t c = 0; c < T.subdiv.ncells; c++)
            nedges += T.subdiv.cells[c].dim == 1;
        tp_check(count_role(&F, "cell-edge") == nedges, "d=%ld: subdivision edges", d);
        tp_check(count_role(&F, "point-vertex") == (size_t)((d + 1) * (d + 2) / 2),
                 "d=%ld: unimodular: every lattice point is a vertex", d);
        tp_check(count_role(&F, "height") == (size_t)((d + 1) * (d + 2) / 2), "heights");
        tp_check(F.sub.valid && F.sub.rect[0] >= F.view.rect[2], "the panel is beside");
        /* determinism: the same input gives the same display list */
        tp_figure G;
        tp_figure_init(&G);
        tp_check(tp_figure_build(&G, &T, &o, &err) == TP_OK, "again");
        bool same = G.n == F.n;
        for (size_t i = 0; same && i < F.n; i++)
            same = F.items[i].npts == G.items[i].npts &&
                   memcmp(F.items[i].xy, G.items[i].xy, 2 * F.items[i].npts * sizeof(double)) == 0;
        tp_check(same, "deterministic display list");
        tp_figure_clear(&G);
        tp_figure_clear(&F);
        tp_trop_clear(&T);
        free(buf);
    }
}

static void test_weights_and_degenerate(void)
{
    tp_error err;
    tp_error_init(&err, NULL);
    tp_figure_options o;
    tp_figure_options_init(&o);
    tp_figure F;
    tp_figure_init(&F);
    tp_trop T;
    /* full support, trivial valuation, degree 3: one vertex, three rays of weight 3 */
    if (make(&T, "1 + x + y + x^2 + x*y + y^2 + x^3 + x^2*y + x*y^2 + y^3", "Q")) {
        tp_check(tp_figure_build(&F, &T, &o, &err) == TP_OK, "fan: %s", err.msg);
        tp_check(count_role(&F, "ray") == 3 && count_role(&F, "vertex") == 1, "fan shape");
        tp_check(count_role(&F, "weight") == 3, "three weight labels");
        tp_check(count_role(&F, "grid") > 0, "a lone vertex gets a grid automatically");
        for (size_t i = 0; i < F.n; i++) {
            const tp_fig_item *it = &F.items[i];
            if (strcmp(it->role, "weight"))
                continue;
            tp_check(strcmp(it->text, "3") == 0, "weight text '%s'", it->text);
            /* the label's box stays clear of every stroke of the curve */
            double hw = tp_font_width(it->text, it->size) / 2, hh = 0.35 * it->size;
            for (size_t j = 0; j < F.n; j++) {
                const tp_fig_item *e = &F.items[j];
                if (strcmp(e->role, "ray"))
                    continue;
                for (double t = 0; t <= 1; t += 0.01) {
                    double px = e->xy[0] + t * (e->xy[2] - e->xy[0]);
                    double py = e->xy[1] + t * (e->xy[3] - e->xy[1]);
                    bool inside = fabs(px - it->xy[0]) < hw + e->width / 2 &&
                                  fabs(py - it->xy[1]) < hh + e->width / 2;
                    if (inside) {
                        tp_check(false, "weight label %zu overlaps ray %ld", i, e->id);
                        break;
                    }
                }
            }
        }
        check_edges_match(&F, &T, "fan");
        /* a user box and size */
        o.nbox = 4;
        o.box[0] = -5; o.box[1] = 5; o.box[2] = -1; o.box[3] = 1;
        o.width = 400;
        o.height = 300;
        tp_check(tp_figure_build(&F, &T, &o, &err) == TP_OK, "user box");
        tp_check(F.width == 400 && F.height == 300, "user size");
        tp_check(F.view.box[0] <= -5 && F.view.box[1] >= 5 && F.view.box[2] <= -1 &&
                     F.view.box[3] >= 1, "the shown box contains the asked one");
        double sx = (F.view.rect[2] - F.view.rect[0]) / (F.view.box[1] - F.view.box[0]);
        double sy = (F.view.rect[3] - F.view.rect[1]) / (F.view.box[3] - F.view.box[2]);
        tp_check(fabs(sx - sy) < 1e-9 * sx && fabs(sx - F.view.scale) < 1e-9 * sx,
                 "equal scale on both axes");
        o.nbox = 6;
        tp_check(tp_figure_build(&F, &T, &o, &err) == TP_EDOMAIN, "6 numbers for a curve");
        tp_figure_options_init(&o);
    }
    tp_trop_clear(&T);
    /* parallel lines (Newton polytope a segment): whole lines with arrows at both ends */
    if (make(&T, "x*y + 1 + t*x^2*y^2", "t")) {
        tp_check(tp_figure_build(&F, &T, &o, &err) == TP_OK, "lines: %s", err.msg);
        tp_check(count_role(&F, "line") == 2 && count_role(&F, "arrow") == 4,
                 "two lines, four arrows (%zu, %zu)", count_role(&F, "line"),
                 count_role(&F, "arrow"));
        tp_check(count_role(&F, "vertex") == 0, "no vertex dots on lines");
    }
    tp_trop_clear(&T);
    /* a monomial has nothing to draw */
    if (make(&T, "3*x^2*y", "Q"))
        tp_check(tp_figure_build(&F, &T, &o, &err) == TP_EDOMAIN, "monomial refused");
    tp_trop_clear(&T);
    /* a homogeneous cubic is drawn in the chart z = 0 */
    if (make(&T, "x^3 + y^3 + z^3 + t*x*y*z", "t")) {
        tp_check(tp_figure_build(&F, &T, &o, &err) == TP_OK, "chart: %s", err.msg);
        tp_check(F.view.axes[0] == 0 && F.view.axes[1] == 1, "chart axes x, y");
        tp_check(count_role(&F, "ray") == 3 && count_role(&F, "vertex") == 1,
                 "x^3+y^3+z^3+t xyz: three rays of weight 3 from one vertex");
        check_edges_match(&F, &T, "chart");
    }
    tp_trop_clear(&T);
    tp_figure_clear(&F);
}

static void test_univariate(void)
{
    tp_error err;
    tp_error_init(&err, NULL);
    tp_figure_options o;
    tp_figure_options_init(&o);
    tp_figure F;
    tp_figure_init(&F);
    tp_trop T;
    /* (x - 1)(x - 2)(x - 25)(x - 50) over Q_5: valuations 0, 0, 2, 2 */
    if (make(&T, "x^4 - 78*x^3 + 1527*x^2 - 3850*x + 2500", "p=5")) {
        tp_check(tp_figure_build(&F, &T, &o, &err) == TP_OK, "line: %s", err.msg);
        tp_check(count_role(&F, "root") == 2, "two distinct valuations");
        size_t ok = 0;
        for (size_t i = 0; i < F.n; i++) {
            const tp_fig_item *it = &F.items[i];
            if (strcmp(it->role, "mult") == 0)
                ok += strcmp(it->text, "\xc3\x97" "2") == 0;
            if (strcmp(it->role, "value") == 0)
                ok += strcmp(it->text, "0") == 0 || strcmp(it->text, "2") == 0;
        }
        tp_check(ok == 4, "labels x2 and valuations 0, 2 (the corners of trop f)");
    }
    tp_trop_clear(&T);
    tp_figure_clear(&F);
}

static void test_surface(void)
{
    tp_error err;
    tp_error_init(&err, NULL);
    tp_trop T;
    if (!make(&T, "x + y + z + 1", "Q")) {
        tp_trop_clear(&T);
        return;
    }
    tp_surface_mesh M;
    tp_surface_mesh_init(&M);
    double box[6] = {-2, 3, -1, 1, -4, 2};
    tp_check(tp_surface_mesh_build(&M, &T, box, &err) == TP_OK, "mesh: %s", err.msg);
    tp_check(M.npolys == 6, "a tropical plane has six 2-cells, %zu", M.npolys);
    for (size_t k = 0; k < M.npolys; k++) {
        size_t a = M.start[k], b = M.start[k + 1];
        tp_check(b - a >= 3, "polygon %zu has at least 3 vertices", k);
        /* inside the box */
        for (size_t i = a; i < b; i++)
            for (int c = 0; c < 3; c++)
                tp_check(M.xyz[3 * i + c] >= box[2 * c] - 1e-9 &&
                             M.xyz[3 * i + c] <= box[2 * c + 1] + 1e-9, "inside the box");
        /* planar: every vertex on the plane of the first three */
        double u[3], v[3], nrm[3];
        for (int c = 0; c < 3; c++) {
            u[c] = M.xyz[3 * (a + 1) + c] - M.xyz[3 * a + c];
            v[c] = M.xyz[3 * (a + 2) + c] - M.xyz[3 * a + c];
        }
        nrm[0] = u[1] * v[2] - u[2] * v[1];
        nrm[1] = u[2] * v[0] - u[0] * v[2];
        nrm[2] = u[0] * v[1] - u[1] * v[0];
        double ln = sqrt(nrm[0] * nrm[0] + nrm[1] * nrm[1] + nrm[2] * nrm[2]);
        for (size_t i = a; i < b; i++) {
            double d = 0;
            for (int c = 0; c < 3; c++)
                d += (M.xyz[3 * i + c] - M.xyz[3 * a + c]) * nrm[c] / ln;
            tp_check(fabs(d) < 1e-9, "polygon %zu is planar (%g)", k, d);
        }
        /* each cell of this fan is spanned by two of e1,e2,e3,-(1,1,1): its plane
           contains the origin */
        double d0 = 0;
        for (int c = 0; c < 3; c++)
            d0 += M.xyz[3 * a + c] * nrm[c] / ln;
        tp_check(fabs(d0) < 1e-9, "polygon %zu lies on a plane through the vertex", k);
    }
    /* the automatic box contains the vertex with margin */
    tp_check(tp_surface_mesh_build(&M, &T, NULL, &err) == TP_OK, "automatic box");
    tp_check(M.box[0] < 0 && M.box[1] > 0 && M.npolys == 6, "automatic box around 0");
    double bad[6] = {1, 0, 0, 1, 0, 1};
    tp_check(tp_surface_mesh_build(&M, &T, bad, &err) == TP_EDOMAIN, "bad box refused");
    /* the figure: one face per polygon */
    tp_figure F;
    tp_figure_options o;
    tp_figure_init(&F);
    tp_figure_options_init(&o);
    tp_check(tp_figure_build(&F, &T, &o, &err) == TP_OK, "surface figure: %s", err.msg);
    tp_check(count_role(&F, "face") == 6, "six faces drawn");
    tp_figure_clear(&F);
    tp_surface_mesh_clear(&M);
    tp_trop_clear(&T);
}

static void test_handmade_render(void)
{
    /* a hand-made drawing through all three writers */
    tp_figure F;
    tp_figure_init(&F);
    F.width = 120;
    F.height = 80;
    F.background = (tp_rgba){255, 255, 255, 255};
    double l[4] = {10, 40, 110, 40};
    tp_rgba ink = {0, 0, 0, 255};
    tp_check(tp_figure_path(&F, "edge", 0, l, 2, false, 4, ink, (tp_rgba){0, 0, 0, 0}) == TP_OK,
             "path");
    tp_check(tp_figure_circle(&F, "vertex", 0, 60, 40, 6, 1, ink, (tp_rgba){255, 0, 0, 255}) ==
                 TP_OK, "circle");
    tp_check(tp_figure_text(&F, "label", -1, "a<b & 1/2", 60, 70, 12, 0, 1, ink, 1) == TP_OK,
             "text");
    double bad[2] = {NAN, 1};
    tp_check(tp_figure_path(&F, "edge", 1, bad, 1, false, 1, ink, ink) == TP_OK && F.n == 3,
             "non-finite coordinates are dropped");
    tp_raster R;
    tp_error err;
    tp_error_init(&err, NULL);
    tp_check(tp_raster_init(&R, 120, 80, F.background, &err) == TP_OK, "raster");
    tp_check(tp_figure_render(&F, &R, &err) == TP_OK, "render");
    uint8_t p[4];
    tp_raster_get(&R, 20, 39, p);
    tp_check(p[0] < 10, "line pixel is ink");
    tp_raster_get(&R, 60, 40, p);
    tp_check(p[0] > 240 && p[1] < 20, "the dot is filled red");
    tp_raster_get(&R, 20, 10, p);
    tp_check(p[0] == 255 && p[1] == 255, "background elsewhere");
    tp_raster_clear(&R);
    char *buf = NULL;
    size_t len = 0;
    FILE *m = open_memstream(&buf, &len);
    if (m) {
        tp_check(tp_write_svg(m, &F, &err) == TP_OK, "svg");
        fclose(m);
        tp_check(strstr(buf, "a&lt;b &amp; 1/2") != NULL, "SVG escapes text");
        tp_check(strstr(buf, "d=\"M 10.00 40.00 L 110.00 40.00\"") != NULL, "SVG path");
        free(buf);
    }
    m = open_memstream(&buf, &len);
    if (m) {
        tp_check(tp_write_tikz(m, &F, true, &err) == TP_OK, "tikz");
        fclose(m);
        tp_check(strstr(buf, "(10.00,40.00) -- (110.00,40.00); % edge 0") != NULL, "TikZ path");
        tp_check(strstr(buf, "a$<$b \\& 1/2") != NULL, "TikZ escapes text");
        tp_check(strstr(buf, "\\documentclass") && strstr(buf, "\\end{document}"),
                 "standalone document");
        free(buf);
    }
    tp_figure_clear(&F);
}

static void test_options(void)
{
    double b[6];
    size_t n;
    tp_error err;
    tp_error_init(&err, NULL);
    tp_check(tp_figure_parse_box("-1,2.5,-3,4", b, &n, &err) == TP_OK && n == 4 && b[1] == 2.5,
             "box of 4");
    tp_check(tp_figure_parse_box("1,2,3", b, &n, &err) == TP_ESYNTAX, "odd count");
    tp_check(tp_figure_parse_box("1,x", b, &n, &err) == TP_ESYNTAX && err.col == 3, "column");
    tp_check(tp_figure_parse_box("2,1", b, &n, &err) == TP_EDOMAIN, "min above max");
    tp_check(tp_figure_parse_box("1,2,3,4,5,6,7,8", b, &n, &err) == TP_ESYNTAX, "too many");
    size_t w, h;
    tp_check(tp_figure_parse_size("800x600", &w, &h, &err) == TP_OK && w == 800 && h == 600,
             "size");
    tp_check(tp_figure_parse_size("800", &w, &h, &err) == TP_ESYNTAX, "size without x");
    tp_check(tp_figure_parse_size("99999x10", &w, &h, &err) == TP_ESYNTAX, "size too big");
    tp_check(tp_figure_parse_size("8x8", &w, &h, &err) == TP_ESYNTAX, "size too small");
}

int main(void)
{
    test_generic();
    test_weights_and_degenerate();
    test_univariate();
    test_surface();
    test_handmade_render();
    test_options();
    return tp_test_finish("figure");
}
