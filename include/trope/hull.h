/* trope/hull.h — lower hull engines behind one function.
 *
 * tp_hull_lower computes the lower faces of conv{(a_i, h_i)} + R>=0 e_{n+1} that are
 * facets (the maximal cells of the regular subdivision), the facets of the Newton
 * polytope (the vertical facets), the affine dimension of the Newton polytope and its
 * lineality space L (the orthogonal complement of the span of exponent differences).
 *
 * Canonical representatives modulo L: L has a basis in reduced echelon form with pivots
 * taken from the last coordinate backwards; a vector is reduced by clearing its pivot
 * coordinates. So a homogeneous polynomial in x,y,z (L = R(1,1,1)) gets vectors whose
 * z-coordinate is 0: the chart where the last coordinate is 0.
 *
 * Invariants: point lists are ascending and exclude dup points; lower facets sorted by
 * point list; sides sorted by point list; lineality vectors primitive integer.
 *
 * Storage: lower facets' point lists and normals live in arenas (trope/arena.h), not in
 * one allocation each; the normals w are read-only GMP values (see tp_arena_qview).
 * tp_complex_build_move takes the normals over: afterwards every w is NULL.
 */
#ifndef TROPE_HULL_H
#define TROPE_HULL_H

#include <stdbool.h>
#include <stdint.h>
#include <gmp.h>
#include "trope/arena.h"
#include "trope/error.h"
#include "trope/points.h"

typedef struct {
    size_t npts;
    uint32_t *pts; /* points on the facet, ascending (32-bit: tp_hull_lower refuses
                      point indices of 2^32 or more, TP_ELIMIT) */
    mpq_t *w;      /* n coordinates: h_i + <a_i, w> = c on pts, > c at every other point;
                      reduced modulo L. Read-only values in w_limbs; NULL once the
                      complex has taken them (tp_complex_build_move) */
} tp_hull_facet;

typedef struct {
    size_t npts;
    uint32_t *pts; /* points on this facet of the Newton polytope, ascending */
    mpz_t *u;      /* n coordinates: primitive inner normal, reduced modulo L then made
                      primitive: <a_i, u> = min on pts, larger at points off the facet */
} tp_hull_side;

typedef enum { TP_ENGINE_AUTO = 0, TP_ENGINE_CDD, TP_ENGINE_FAST } tp_engine;

typedef struct {
    size_t n;            /* ambient dimension of exponents */
    size_t npoints;
    int dim;             /* affine dimension of the Newton polytope, 0..n (-1 if empty) */
    size_t nlin;         /* n - dim */
    mpz_t *lin;          /* nlin * n: the canonical basis of L (see above) */
    size_t *lin_pivot;   /* nlin pivot coordinates */
    size_t nlower;
    tp_hull_facet *lower;
    size_t nsides;
    tp_hull_side *sides;
    bool *on_hull;       /* npoints: lies on some lower facet */
    tp_arena pts_mem;    /* lower facets' pts */
    tp_arena w_mem;      /* lower facets' w (the mpq_t structs) */
    tp_arena w_limbs;    /* the limbs behind every w */
} tp_hull;

void tp_hull_init(tp_hull *H);
void tp_hull_clear(tp_hull *H);

/* tp_hull_lower: fill H from P (H is cleared first).
 *   returns TP_OK; TP_EHULL with a message if the engine fails; TP_EDOMAIN if P has no
 *   point; TP_ELIMIT for a facet on a point of index 2^32 or more (point lists are
 *   32-bit); TP_ENOMEM.
 *   notes: engine AUTO picks the fastest exact engine available; CDD uses cddlib's GMP
 *   build (serialised behind one process-wide lock, so this function is thread-safe). */
TP_MUST_CHECK tp_status tp_hull_lower(tp_hull *H, const tp_points *P, tp_engine engine,
                                      tp_error *err);

/* Lineality helpers (exact). tp_hull_span computes dim, lin, lin_pivot of H from P's
 * non-dup exponents; tp_hull_reduce_q / _z reduce a vector modulo L in place (the _z
 * version then divides by the gcd of its entries). */
TP_MUST_CHECK tp_status tp_hull_span(tp_hull *H, const tp_points *P, tp_error *err);
void tp_hull_reduce_q(const tp_hull *H, mpq_t *v);
void tp_hull_reduce_z(const tp_hull *H, mpz_t *v);

#endif
