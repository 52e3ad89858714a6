/* hull_internal.h — the engines behind tp_hull_lower (not installed).
 *
 * Every engine fills H->lower, H->sides and H->on_hull for the non-dup points of P;
 * tp_hull_lower has already filled H->n, H->npoints, H->dim, H->lin and H->lin_pivot
 * (tp_hull_span) before calling an engine, and sorts/reduces the result afterwards
 * (tp_hull_finish), so an engine may produce facets in any order, with w and u not
 * yet reduced modulo the lineality space and u not yet primitive.
 */
#ifndef TROPE_HULL_INTERNAL_H
#define TROPE_HULL_INTERNAL_H

#include "trope/hull.h"

/* cddlib (GMP exact), every dimension. Thread-safe (one process-wide lock). */
tp_status tp_hull_lower_cdd(tp_hull *H, const tp_points *P, tp_error *err);

/* The fast exact engine. Sets *handled = false (and returns TP_OK) when it does not
 * cover this input (dimension, size, degenerate span); the caller then uses cddlib. */
tp_status tp_hull_lower_fast(tp_hull *H, const tp_points *P, bool *handled, tp_error *err);

/* Whether the fast engine takes P, given H's span (tp_hull_span done): a Newton
 * polytope of dimension 1..3 (in any number of variables), exponent ranges below 2^28
 * in the coordinates it works in, at most 2^26 points. */
bool tp_hull_fast_accepts(const tp_hull *H, const tp_points *P);

/* Sort facets and sides, reduce u modulo L, make u primitive (w is reduced when
 * pushed), trim the facet array: nothing is pushed after it. */
tp_status tp_hull_finish(tp_hull *H, tp_error *err);

/* Append a lower facet / side (the arrays are copied into 32-bit lists, sorted; w, u
 * have H->n entries). A lower facet's w is reduced modulo L (H->lin must be set) and
 * stored read-only. TP_ELIMIT for a point index above UINT32_MAX. */
tp_status tp_hull_push_lower(tp_hull *H, const size_t *pts, size_t npts, mpq_t *w,
                             tp_error *err);
tp_status tp_hull_push_side(tp_hull *H, const size_t *pts, size_t npts, mpz_t *u,
                            tp_error *err);

#endif
