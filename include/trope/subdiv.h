/* trope/subdiv.h — the regular subdivision: every lower face of every dimension.
 *
 * Invariants (after tp_subdiv_build): cells are sorted by (dim descending, point list
 * ascending lexicographically); each cell's point list is ascending; `lower` and
 * `sides` list, ascending, the hull facets (H.lower / H.sides) that contain the cell.
 * Cells of dimension 0 are the used vertices of the subdivision.
 */
#ifndef TROPE_SUBDIV_H
#define TROPE_SUBDIV_H

#include <stdint.h>
#include "trope/hull.h"

typedef struct {
    int dim;             /* affine dimension of the cell's points */
    uint32_t npts;       /* counts are 32-bit: tp_subdiv_build refuses point sets and */
    uint32_t nlower;     /* hulls of 2^32 or more points or facets (TP_ELIMIT) */
    uint32_t nsides;
    uint32_t *pts;       /* points lying on the face, ascending */
    uint32_t *lower;     /* indices into hull.lower of facets containing the face, then
                            (nsides more) indices into hull.sides of the Newton facets
                            containing it: see tp_subdiv_sides */
} tp_subdiv_cell;

/* The Newton polytope facets containing c: nsides indices into hull.sides, ascending. */
static inline uint32_t *tp_subdiv_sides(const tp_subdiv_cell *c)
{
    return c->lower + c->nlower;
}

typedef struct {
    tp_hull hull;        /* owned */
    size_t ncells;
    tp_subdiv_cell *cells;
    tp_arena pool;       /* storage behind the cells' pts, lower and sides lists; lists
                            are shared where they can be (a maximal cell's pts is its
                            lower facet's, in the hull; a face whose points are a run
                            of its parent's list points into it): read-only */
    size_t nunused;
    size_t *unused;      /* points on no lower face (above the hull, or dup), ascending */
    double hull_ms;      /* CPU time of tp_hull_lower in the last build (--timings) */
} tp_subdiv;

void tp_subdiv_init(tp_subdiv *S);
void tp_subdiv_clear(tp_subdiv *S);

/* tp_subdiv_build: run the hull engine on P and enumerate all lower faces.
 *   returns TP_OK, or the hull's error; TP_ENOMEM; TP_ELIMIT for 2^32 or more points,
 *   facets or faces. Cost: output-sensitive, each face is
 *   found from its parent faces through a point -> facet index. */
TP_MUST_CHECK tp_status tp_subdiv_build(tp_subdiv *S, const tp_points *P,
                                        tp_engine engine, tp_error *err);

/* The same with a bound on the number of faces: a simplex with m vertices has 2^m - 1
 * faces, so a few dozen terms in as many variables would otherwise run for hours.
 *   returns TP_ELIMIT (message names --max-cells) once the faces found exceed
 *   max_cells units, a face counting max(1, dim^2/4) units (finding a face costs about
 *   that much rank work in dimension dim); max_cells 0 means TP_SUBDIV_MAX_CELLS.
 *   tp_subdiv_build uses the default. */
#define TP_SUBDIV_MAX_CELLS 5000000
TP_MUST_CHECK tp_status tp_subdiv_build_limited(tp_subdiv *S, const tp_points *P,
                                                tp_engine engine, size_t max_cells,
                                                tp_error *err);

/* tp_subdiv_check: every cell's points are affinely of dimension `dim`, lie on every
 * listed lower facet, and cells are sorted. returns TP_OK or TP_EINTERNAL. */
TP_MUST_CHECK tp_status tp_subdiv_check(const tp_subdiv *S, const tp_points *P,
                                        tp_error *err);

#endif
