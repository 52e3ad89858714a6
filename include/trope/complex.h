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
#include "trope/subdiv.h"

typedef struct {
    int dim;
    size_t nverts;
    size_t *verts;       /* indices into vertices, ascending (in C->idx_pool) */
    size_t nrays;
    size_t *rays;        /* indices into rays, ascending (in C->idx_pool) */
    size_t dual;         /* index into the subdivision's cells */
    mpz_t weight;        /* top cells: lattice length of the dual edge; else 0 */
    mpz_t mult;          /* dim-0 cells of plane curves (n - nlin == 2) and n == 1:
                            multiplicity (normalized area of the dual polygon, or the
                            weight for n == 1); else 0 */
    char *initial_form;  /* sum over dual points of residue * monomial; NULL if the
                            points carry no residues */
} tp_complex_cell;

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
    mpq_t *verts;        /* nverts * n */
    size_t nrays;
    mpz_t *rays;         /* nrays * n */
    size_t ncells;
    tp_complex_cell *cells;
    size_t *idx_pool;    /* storage behind every cell's verts and rays lists */

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
} tp_complex;

void tp_complex_init(tp_complex *C);
void tp_complex_clear(tp_complex *C);

/* tp_complex_build: the dual complex of S (built from P).
 *   vars (may be NULL) name the variables in initial forms.
 *   returns TP_OK; TP_ENOMEM. */
TP_MUST_CHECK tp_status tp_complex_build(tp_complex *C, const tp_subdiv *S,
                                         const tp_points *P, char *const *vars,
                                         bool max, tp_error *err);

/* tp_complex_interior: a relative interior point of cell i (the centroid of its
 * vertices plus the sum of its rays), exact, into out[0..n-1] (initialised mpq_t).
 * Computed on demand: the complex stores no interior points. */
void tp_complex_interior(const tp_complex *C, size_t i, mpq_t *out);

/* tp_complex_check: dimensions, sortedness, primitive rays, weights > 0 on top cells,
 * and the balancing of every codimension-2 cell. returns TP_OK or TP_EINTERNAL. */
TP_MUST_CHECK tp_status tp_complex_check(const tp_complex *C, tp_error *err);

#endif
