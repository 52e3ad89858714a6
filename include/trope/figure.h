/* trope/figure.h — figures of tropical hypersurfaces: one drawing description, four
 * writers (PNG, SVG, TikZ from the description; OBJ meshes of surfaces).
 *
 * A tp_figure is a display list in figure coordinates: pixels, x to the right, y
 * downwards, (0,0) the top-left corner, width x height in total. tp_figure_build does all
 * the layout (box, scale, clipping, label placement); the writers only translate items,
 * so the three formats show the same picture:
 *   PNG  raster.c at one pixel per unit, text in trope's stroke font;
 *   SVG  1.1, viewBox = the figure, items in order, class = role, data-id = id;
 *   TikZ a tikzpicture whose x unit is one pixel (scaled to a fixed picture width) and
 *        whose y unit points down, so coordinates are the same numbers as in the SVG.
 *
 * Views (the world -> figure maps) are recorded in the figure so that tests and other
 * tools can project exact coordinates themselves:
 *   plane panels:  X = ox + scale * x,  Y = oy - scale * y   (equal scale on both axes)
 *   surfaces:      X = ox + scale * <p, ex>,  Y = oy - scale * <p, ey>
 *
 * Roles (item->role, static strings): "background", "grid", "tick", "frame", "edge"
 * (bounded 1-cell), "ray" (unbounded 1-cell, clipped to the box), "line" (a cell that is
 * a whole line: lineality), "arrow" (the continuation mark at a ray's clipped end),
 * "vertex", "weight" (a weight label), "axis", "root", "mult" (multiplicity label),
 * "value" (root valuation label), "newton" (the Newton polygon), "cell-edge"
 * (subdivision edge), "point-vertex", "point-unused", "point-lattice", "height",
 * "face" (a clipped 2-cell of a surface), "box" (surface bounding box), "label".
 * item->id is the index of the complex cell (edge, ray, line, arrow, weight, face, root,
 * mult, value), the complex vertex (vertex), the subdivision cell (cell-edge) or the
 * point (point-*, height); -1 otherwise.
 *
 * Invariants: deterministic; every item's coordinates are finite.
 */
#ifndef TROPE_FIGURE_H
#define TROPE_FIGURE_H

#include <stdbool.h>
#include <stdio.h>
#include "trope/raster.h"
#include "trope/trop.h"

typedef enum { TP_FIG_PATH, TP_FIG_CIRCLE, TP_FIG_TEXT } tp_fig_kind;

typedef struct {
    tp_fig_kind kind;
    const char *role;    /* static string, see above */
    long id;
    size_t npts;
    double *xy;          /* PATH: npts points; CIRCLE, TEXT: 1 point (centre / anchor) */
    bool closed;         /* PATH */
    double width;        /* stroke width in pixels, 0 = no stroke */
    tp_rgba stroke;
    tp_rgba fill;        /* fill.a == 0: not filled */
    double r;            /* CIRCLE radius */
    char *text;          /* TEXT, UTF-8 */
    double size;         /* TEXT em size in pixels */
    int halign, valign;  /* TEXT: see tp_raster_text */
    double halo;         /* TEXT: white halo width in pixels, 0 = none */
} tp_fig_item;

typedef enum { TP_FIGURE_CURVE = 1, TP_FIGURE_LINE, TP_FIGURE_SURFACE } tp_figure_kind;

typedef struct {
    bool valid;
    double scale, ox, oy;
    double box[4];       /* world box shown: xmin, xmax, ymin, ymax */
    double rect[4];      /* its rectangle in the figure: left, top, right, bottom */
    int axes[2];         /* plane panels: the coordinates drawn (chart of a homogeneous
                            curve: the two non-pivot coordinates) */
    double ex[3], ey[3]; /* surfaces: screen directions */
} tp_fig_view;

typedef struct {
    double width, height;
    tp_rgba background;  /* a == 0: transparent */
    tp_figure_kind kind;
    tp_fig_view view;    /* the hypersurface */
    tp_fig_view sub;     /* the subdivision panel (valid with with_subdivision) */
    double box3[6];      /* surfaces: the clipping box */
    size_t n, cap;
    tp_fig_item *items;
} tp_figure;

typedef struct {
    bool with_subdivision;
    bool heights;        /* label subdivision points with their heights */
    bool grid;           /* lattice grid and tick labels */
    bool transparent;
    size_t nbox;         /* 0 (automatic), 2 (univariate), 4 (curves) or 6 (surfaces) */
    double box[6];
    size_t width, height;/* 0 = automatic */
} tp_figure_options;

void tp_figure_options_init(tp_figure_options *o);
void tp_figure_init(tp_figure *F);
void tp_figure_clear(tp_figure *F);

/* tp_figure_build: lay out a figure of T's hypersurface (F is cleared first).
 *   n = 1: root valuations on a line; n = 2 (and n = 3 with a one-dimensional lineality
 *   space, in its chart): a plane curve, with the dual subdivision beside it on request;
 *   n = 3 with no lineality: a shaded oblique view of the surface clipped to a box.
 *   returns TP_OK; TP_EDOMAIN (empty hypersurface, other dimensions, a box whose
 *   minimum is not below its maximum, a box count that does not fit the dimension);
 *   TP_ENOMEM. */
TP_MUST_CHECK tp_status tp_figure_build(tp_figure *F, const tp_trop *T,
                                        const tp_figure_options *o, tp_error *err);

/* tp_figure_parse_box: "a,b,c,d" (2, 4 or 6 comma-separated finite decimal numbers,
 *   each minimum below its maximum) into box; *n gets the count.
 *   returns TP_OK; TP_ESYNTAX (column of the offending character in err->col);
 *   TP_EDOMAIN (a minimum not below its maximum). */
TP_MUST_CHECK tp_status tp_figure_parse_box(const char *s, double box[6], size_t *n,
                                            tp_error *err);
/* tp_figure_parse_size: "WxH" (positive integers up to 16384). returns TP_OK; TP_ESYNTAX. */
TP_MUST_CHECK tp_status tp_figure_parse_size(const char *s, size_t *w, size_t *h,
                                             tp_error *err);

/* Low-level item constructors (used by tp_figure_build and the unit tests). Each copies
 * its arguments; returns TP_OK or TP_ENOMEM. */
TP_MUST_CHECK tp_status tp_figure_path(tp_figure *F, const char *role, long id,
                                       const double *xy, size_t n, bool closed,
                                       double width, tp_rgba stroke, tp_rgba fill);
TP_MUST_CHECK tp_status tp_figure_circle(tp_figure *F, const char *role, long id,
                                         double cx, double cy, double r, double width,
                                         tp_rgba stroke, tp_rgba fill);
TP_MUST_CHECK tp_status tp_figure_text(tp_figure *F, const char *role, long id,
                                       const char *text, double x, double y, double size,
                                       int halign, int valign, tp_rgba color, double halo);

/* Writers: each renders F and nothing else. returns TP_OK; TP_EIO; TP_ENOMEM. */
TP_MUST_CHECK tp_status tp_figure_render(const tp_figure *F, tp_raster *R, tp_error *err);
TP_MUST_CHECK tp_status tp_write_png(FILE *out, const tp_figure *F, tp_error *err);
TP_MUST_CHECK tp_status tp_write_svg(FILE *out, const tp_figure *F, tp_error *err);
/* standalone: a complete LaTeX document around the tikzpicture (pdflatex compiles it). */
TP_MUST_CHECK tp_status tp_write_tikz(FILE *out, const tp_figure *F, bool standalone,
                                      tp_error *err);

/* ---- surfaces: the 2-cells clipped to a box ---- */
typedef struct {
    size_t npolys;
    size_t *cell;        /* npolys: complex cell index */
    size_t *start;       /* npolys + 1: polygon k has vertices start[k] .. start[k+1]-1 */
    double *xyz;         /* 3 * start[npolys] */
    double box[6];       /* xmin, xmax, ymin, ymax, zmin, zmax */
} tp_surface_mesh;

void tp_surface_mesh_init(tp_surface_mesh *M);
void tp_surface_mesh_clear(tp_surface_mesh *M);
/* tp_surface_mesh_build: every 2-cell of T (n = 3, no lineality) intersected with the
 *   box (box == NULL: automatic, the vertices' bounding box plus a margin of 30% of its
 *   largest side, at least 1). Cells that miss the box are left out. Polygons are convex,
 *   counter-clockwise seen from their normal's side, without repeated vertices.
 *   returns TP_OK; TP_EDOMAIN (not a surface, bad box); TP_ENOMEM. */
TP_MUST_CHECK tp_status tp_surface_mesh_build(tp_surface_mesh *M, const tp_trop *T,
                                              const double *box, tp_error *err);
/* tp_write_obj: the mesh as Wavefront OBJ: one object "cell<k>_weight<w>" per polygon.
 *   returns TP_OK; TP_EDOMAIN; TP_EIO; TP_ENOMEM. */
TP_MUST_CHECK tp_status tp_write_obj(FILE *out, const tp_trop *T, const double *box,
                                     tp_error *err);

#endif
