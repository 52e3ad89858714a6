/* trope/complex.h — the tropical hypersurface as an exact polyhedral complex.
 *
 * Each subdivision cell sigma of dimension k >= 1 gives a cell C_sigma of dimension
 * n - k: the closure of {w : the minimum of h_i + <a_i, w> is attained exactly on
 * sigma's points}. Its vertices are the normals w of the lower facets containing sigma,
 * its rays the inner normals of the Newton polytope facets containing sigma, and every
 * cell contains the lineality space L (vectors reduced modulo L, see hull.h).
 *
 * Convention: min (trop f(w) = min val(c_a) + <a, w>). With max set, every vertex,
 * ray, interior point and normal is negated (w -> -w) and lists are re-sorted.
 *
 * Invariants: vertices sorted lexicographically (as rationals); rays sorted
 * lexicographically (as integers), primitive; cells sorted by (dim ascending, vertex
 * list, ray list); weight is set on top cells (dim n-1) only, 0 elsewhere.
 */
#ifndef TROPE_COMPLEX_H
#define TROPE_COMPLEX_H

#include <stdbool.h>
#include <stdint.h>
#include "trope/subdiv.h"

typedef struct {
    int dim;
    uint32_t nverts;     /* counts and dual are 32-bit (the subdivision refuses more
                            than 2^32 - 1 faces or facets): a cell takes 48 bytes */
    uint32_t nrays;
    uint32_t dual;       /* index into the subdivision's cells */
    uint32_t *verts;     /* indices into vertices, ascending (in C->idx_pool), then
                            nrays indices into rays, ascending: tp_complex_cell_rays */
    mpz_t weight;        /* top cells: lattice length of the dual edge; else 0 (the
                            multiplicity of a vertex cell: tp_complex_mult) */
    char *initial_form;  /* sum over dual points of residue * monomial; NULL if the
                            points carry no residues */
} tp_complex_cell;

/* The rays of cell c: nrays indices into the complex's rays, ascending. */
static inline uint32_t *tp_complex_cell_rays(const tp_complex_cell *c)
{
    return c->verts + c->nverts;
}

typedef struct {
    mpz_t *dir;          /* n coordinates, primitive */
    mpz_t weight;        /* total weight of the unbounded 1-cells in this direction */
} tp_complex_raydeg;

typedef struct {
    size_t n;            /* ambient dimension */
    int dim;             /* n - 1, or -1 for the empty complex (a monomial) */
    bool max;            /* max convention (negated) */
    size_t nlin;
    mpz_t *lin;          /* copy of the lineality basis, nlin * n (negation-invariant) */
    size_t nverts;
    mpq_t *verts;        /* nverts * n, read-only values (limbs in `limbs`) */
    mpz_t *vmult;        /* nverts multiplicities (read-only values) for plane curves
                            (n - nlin == 2) and n == 1, else NULL: see tp_complex_mult */
    size_t nrays;
    mpz_t *rays;         /* nrays * n */
    size_t ncells;
    tp_complex_cell *cells;
    uint32_t *idx_pool;  /* storage behind every cell's verts and rays lists */

    /* invariants */
    size_t *f_vector;    /* n + 1 entries: f_vector[k] = number of cells of dimension k */
    bool balanced;       /* every codimension-2 cell checked */
    size_t nunbalanced;  /* number of codimension-2 cells failing the check */
    bool is_curve;       /* Newton polytope of dimension 2 (a plane curve, possibly
                            homogeneous in 3 variables) */
    long genus;          /* curves: first Betti number of the curve, else -1 */
    int smooth;          /* curves: 1 if the subdivision is a unimodular triangulation
                            using every lattice point... see complex.c; -1 if not a curve */
    size_t nbounded;     /* curves: bounded 1-cells */
    size_t nunbounded;   /* curves: unbounded 1-cells */
    size_t nraydeg;
    tp_complex_raydeg *raydeg;  /* curves: rays by direction with total weight */
    tp_arena limbs;      /* the limbs behind verts (read-only values, see arena.h) */
} tp_complex;

void tp_complex_init(tp_complex *C);
void tp_complex_clear(tp_complex *C);

/* tp_complex_build: the dual complex of S (built from P).
 *   vars (may be NULL) name the variables in initial forms.
 *   returns TP_OK; TP_ENOMEM. */
TP_MUST_CHECK tp_status tp_complex_build(tp_complex *C, const tp_subdiv *S,
                                         const tp_points *P, char *const *vars,
                                         bool max, tp_error *err);

/* tp_complex_build_move: the same, but the vertex coordinates are moved out of S's
 *   lower facet normals instead of copied (the pipeline's way: it saves a copy of
 *   every normal). Afterwards every S->hull.lower[i].w is NULL: the normal of lower
 *   facet i is the only vertex of the complex cell dual to the maximal subdivision
 *   cell on that facet (negated under max). S is otherwise unchanged. A Newton
 *   polytope of dimension 0 (a monomial, no vertices) leaves S untouched. */
TP_MUST_CHECK tp_status tp_complex_build_move(tp_complex *C, tp_subdiv *S,
                                              const tp_points *P, char *const *vars,
                                              bool max, tp_error *err);

/* tp_complex_interior: a relative interior point of cell i (the centroid of its
 * vertices plus the sum of its rays), exact, into out[0..n-1] (initialised mpq_t).
 * Computed on demand: the complex stores no interior points. */
void tp_complex_interior(const tp_complex *C, size_t i, mpq_t *out);

/* tp_complex_mult: the multiplicity of cell i. For plane curves (n - nlin == 2) and
 * n == 1, a cell of dimension nlin (dual to a maximal subdivision cell, one vertex, no
 * rays) has the normalized area of its dual polygon (the weight of its dual edge for
 * n == 1); every other cell, and every cell of other complexes, 0. The value is
 * read-only and lives as long as C. */
mpz_srcptr tp_complex_mult(const tp_complex *C, size_t i);

/* tp_complex_check: dimensions, sortedness, primitive rays, weights > 0 on top cells,
 * and the balancing of every codimension-2 cell. returns TP_OK or TP_EINTERNAL. */
TP_MUST_CHECK tp_status tp_complex_check(const tp_complex *C, tp_error *err);

#endif
