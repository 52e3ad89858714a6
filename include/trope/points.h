/* trope/points.h — the lifted point set: exponents in Z^n with exact heights.
 *
 * Invariants: heights are canonical mpq; exps has count*n entries. A point whose
 * exponent repeats an earlier one is kept (so indices match the input rows) but marked
 * `dup` unless it has the smallest height of its exponent (the first such wins); hull
 * engines skip dup points and they are reported as unused.
 */
#ifndef TROPE_POINTS_H
#define TROPE_POINTS_H

#include <stdbool.h>
#include <stdint.h>
#include <gmp.h>
#include "trope/arena.h"
#include "trope/error.h"
#include "trope/field.h"
#include "trope/poly.h"

typedef struct {
    size_t n;            /* number of exponent coordinates (variables) */
    size_t count;        /* number of points */
    int64_t *exps;       /* count * n */
    mpq_t *heights;      /* count; read-only values with their limbs in hmem when
                            heights_view (the readers build them so: 48 bytes a height
                            instead of about 96): change them only through
                            tp_points_negate_heights */
    bool *dup;           /* count: excluded duplicate exponent */
    char **residue;      /* count residue strings for initial forms, or NULL (CSV input) */
    size_t nnames;       /* column names from a CSV header (n of them), or 0 */
    char **names;
    bool heights_view;
    tp_arena hmem;
} tp_points;

void tp_points_init(tp_points *P);
void tp_points_clear(tp_points *P);

/* tp_points_from_poly: heights = val(coefficient); residue strings filled.
 *   returns TP_OK or TP_ENOMEM. */
TP_MUST_CHECK tp_status tp_points_from_poly(tp_points *P, const tp_poly *f,
                                            const tp_field *F, tp_error *err);

/* tp_points_read_csv: one point a line "a1,...,an,h"; integers then a height (integer,
 *   fraction p/q or exact decimal); spaces around fields allowed; `#` comments and blank
 *   lines skipped; an optional first header line of names (non-numeric fields).
 *   Every row must have the same number of fields (at least 2).
 *   returns TP_OK; TP_ESYNTAX/TP_EOVERFLOW/TP_EDOMAIN with line:col; TP_ENOMEM. */
TP_MUST_CHECK tp_status tp_points_read_csv(tp_points *P, const char *text, size_t len,
                                           tp_error *err);

/* tp_points_negate_heights: h -> -h for every point (max convention data), then
 *   recompute dup marks. */
void tp_points_negate_heights(tp_points *P);

/* tp_points_mark_dups: recompute the dup marks (called by the constructors). */
void tp_points_mark_dups(tp_points *P);

#endif
