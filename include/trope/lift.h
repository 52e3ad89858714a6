/* trope/lift.h — Kapranov witnesses: a zero z of f with val(z) = w for a point w on the
 * tropical hypersurface of f.
 *
 * Method: trop(f)(w) = min_a val(c_a) + <a, w> must be attained at least twice (else
 * TP_EDOMAIN naming the unique minimizing term). The variable x_j to solve for is one in
 * which the initial form in_w(f) is not a monomial (it takes two different exponents of
 * x_j on the minimizing terms); the other coordinates are fixed to z_i = c_i t^{w_i}
 * (p-adic: c_i p^{w_i}) with small nonzero residue-field coefficients c_i chosen so that
 * in_w(f)(c, y) has a simple nonzero root y0 (a rational one preferred over Q; one in
 * F_p over Q_p); z_j is the root of g(x_j) = f(z_1, ..., x_j, ..., z_n) with leading term
 * y0 t^{w_j}, to K terms (trope/roots.h). Then val f(z) is computed for the truncated z:
 * exactly (p-adic, and t-adic while the coefficients are rational) or numerically with
 * the 512-bit coefficients (terms below 2^-400 of the largest summand count as zero).
 *
 * Source of the statement that such z exists: Einsiedler, Kapranov, Lind, J. reine
 * angew. Math. 601 (2006), Thm 2.1.1 (number from memory).
 */
#ifndef TROPE_LIFT_H
#define TROPE_LIFT_H

#include <stdbool.h>
#include <stdio.h>
#include <gmp.h>
#include "trope/error.h"
#include "trope/field.h"
#include "trope/poly.h"
#include "trope/roots.h"

typedef struct {
    tp_field field;
    size_t nvars;
    char **vars;            /* owned copies */
    char *poly_text;
    mpq_t *w;               /* the point, nvars entries */
    mpq_t trop_value;       /* trop(f)(w) */
    size_t nmin;            /* terms attaining the minimum */
    char *initial_form;     /* in_w(f): sum of residue * monomial over those terms */
    size_t solved;          /* index of the variable solved for */
    mpq_t *fixed;           /* nvars entries: residue coefficients c_i (i != solved) */
    char *univariate_text;  /* g(x_solved) */
    tp_roots uni;           /* its roots (to K terms) */
    size_t root;            /* index into uni.roots of the witness coordinate */
    size_t terms;           /* K */
    bool residual_zero;     /* f(z) == 0 exactly (the root terminates) */
    mpq_t residual_valuation; /* val f(z) for the truncated z (if !residual_zero) */
    mpq_t margin;           /* residual_valuation - trop_value */
} tp_lift;

typedef struct {
    size_t terms;           /* K (>= 1) */
} tp_lift_options;

void tp_lift_init(tp_lift *L);
void tp_lift_clear(tp_lift *L);

/* tp_lift_compute: a witness for the point w (nvars rationals) on trop(f).
 *   F must be PUISEUX or PADIC (p-adic: w integral). returns TP_OK; TP_EDOMAIN with f's
 *   line:col if w is off the hypersurface (message names the unique minimizing term),
 *   if the field is unsupported, w has the wrong length, or no simple residual root
 *   was found; TP_ENOMEM; TP_EINTERNAL if the chosen root is missing. */
TP_MUST_CHECK tp_status tp_lift_compute(tp_lift *L, const tp_poly *f, const tp_field *F,
                                        char *const *vars, const mpq_t *w, size_t nw,
                                        const tp_lift_options *opt, tp_error *err);

/* Writers: text, and JSON ("format": "trope.lift/1"). returns TP_OK or TP_EIO. */
TP_MUST_CHECK tp_status tp_lift_write_text(FILE *out, const tp_lift *L, tp_error *err);
TP_MUST_CHECK tp_status tp_lift_write_json(FILE *out, const tp_lift *L, tp_error *err);

#endif
