/* trope/roots.h — roots of a univariate polynomial over a valued field.
 *
 * Over Puiseux series in t (TP_FIELD_PUISEUX) and over Q_p (TP_FIELD_PADIC):
 *   - the lower Newton polygon of the points (i, val(c_i)): each segment gives `count`
 *     roots (with multiplicity) of valuation -slope, and a residual polynomial
 *     sum_{i on the segment} res(c_i) x^(i - i_start) over the residue field (Q for t,
 *     F_p for p), factored where that is cheap (rational roots and a square-free split
 *     over Q; irreducible factors over F_p);
 *   - with terms K > 0, over t: the first K terms of every root by Newton–Puiseux
 *     (exact rational exponents; coefficients exact while they are rational, then
 *     complex numbers carried with 512 bits, see src/lib/roots_internal.h;
 *     multiplicities from a square-free decomposition over Q(t^(1/D))); over p: the
 *     first K p-adic digits of every root in Q_p: simple residual roots are lifted by
 *     Hensel's lemma, repeated ones refined by the Newton polygon of f(A + p^e y)
 *     (exact rationals) until they separate; for the other roots the valuation and
 *     the ramification or residue degree that forces them out of Q_p.
 *
 * Invariants of a computed tp_roots: segments are sorted by valuation descending (from
 * left to right on the polygon); the sum of segment counts plus nzero equals degree; the
 * sum over roots of count*multiplicity equals degree; roots are sorted by segment, then
 * by the order their residual roots were found (deterministic).
 *
 * Min convention: val(t) = 1, v_p(p) = 1. A root r = c t^v + ... has val(r) = v.
 */
#ifndef TROPE_ROOTS_H
#define TROPE_ROOTS_H

#include <stdbool.h>
#include <stdint.h>
#include <stdio.h>
#include <gmp.h>
#include "trope/error.h"
#include "trope/field.h"
#include "trope/poly.h"

/* One term c * t^exponent of a Puiseux series root. */
typedef struct {
    mpq_t exponent;
    bool exact;          /* the coefficient is the rational q */
    mpq_t q;
    double re, im;       /* the coefficient as a complex number (always set) */
} tp_root_term;

/* One factor of a residual polynomial. */
typedef struct {
    char *text;          /* "x - 1", "x^2 + 3*x + 1" */
    size_t degree;
    size_t multiplicity;
    bool irreducible;    /* known irreducible (always over F_p; degree 1 over Q) */
} tp_root_factor;

typedef struct {
    mpq_t valuation;     /* valuation of the roots on the segment (= -slope) */
    size_t count;        /* horizontal length: number of roots with multiplicity */
    size_t start, end;   /* exponents of x at the two ends (after the Laurent shift) */
    size_t ramification; /* denominator of the valuation */
    size_t ncoef;        /* count + 1 residual coefficients (index = power of x) */
    mpq_t *residual;     /* Q for t-adic; integers 0..p-1 for p-adic */
    char *residual_text; /* "x^2 - 3" */
    size_t nfactors;
    tp_root_factor *factors;
    char *factored_text; /* "(x - 1)^2*(x^2 - 3)", with a leading constant if not 1 */
    size_t nresroots;    /* p-adic: the roots in F_p of the residual, ascending */
    mpz_t *resroots;
    size_t *resmult;     /* their multiplicities */
} tp_root_segment;

typedef struct {
    bool zero;           /* the root x = 0 (valuation +infinity) */
    mpq_t valuation;
    size_t segment;      /* index into segments (unused for zero) */
    size_t multiplicity; /* as a root of f: exact when `multiplicity_proved`, else 1 */
    bool multiplicity_proved;
    size_t count;        /* roots this entry stands for (1, or a group not resolved) */
    /* t-adic */
    size_t nterms;
    tp_root_term *terms;
    bool terminates;     /* the series is finite: r is exactly the sum of its terms */
    bool has_next;       /* next_exponent: the error of the K-term truncation is O(t^next) */
    mpq_t next_exponent;
    bool unresolved;     /* `count` roots agreeing in every computed term */
    /* p-adic */
    bool in_qp;          /* the root lies in Q_p and its digits were computed */
    size_t ramification; /* e forced by the polygon (denominator of the valuation) */
    size_t ndigits;
    mpz_t *digits;       /* digits d_0..d_{K-1}: r = p^val * sum d_k p^k + O(p^(val+K)) */
    mpz_t approx;        /* sum d_k p^k */
    char *note;          /* why digits were not computed, or NULL */
    struct tp_rseries *series; /* internal: the terms at full precision */
} tp_root;

typedef struct {
    tp_field field;
    char var[64];
    char *poly_text;     /* the input polynomial, canonical text */
    size_t degree;       /* number of roots counted with multiplicity (Laurent span) */
    int64_t low;         /* lowest exponent of x in the input */
    size_t nzero;        /* multiplicity of the root 0 (0 for Laurent input, low < 0) */
    size_t terms;        /* K requested */
    size_t nsegs;
    tp_root_segment *segs;
    size_t nroots;
    tp_root *roots;
} tp_roots;

typedef struct {
    size_t terms;        /* K: Puiseux terms or p-adic digits; 0 = polygon only */
    size_t max_steps;    /* extra Newton–Puiseux steps to separate clusters (default 64) */
} tp_roots_options;

/* init once, clear once; tp_roots_compute may be called on an initialised R again. */
void tp_roots_init(tp_roots *R);
void tp_roots_clear(tp_roots *R);

/* tp_roots_compute: roots of polynomial `f` over field F; exactly one of the variables
 *   (names in vars, may be NULL: "x") may occur in f.
 *   F must be PUISEUX or PADIC. returns TP_OK; TP_EDOMAIN (with f's line:col) for a
 *   polynomial in several variables, a constant, or an unsupported field;
 *   TP_EOVERFLOW for a degree above 100000; TP_ENOMEM; TP_EINTERNAL if a self-check
 *   fails (root counts not adding up to the degree). */
TP_MUST_CHECK tp_status tp_roots_compute(tp_roots *R, const tp_poly *f, const tp_field *F,
                                         char *const *vars, const tp_roots_options *opt,
                                         tp_error *err);

/* Writers: human-readable text, and JSON ("format": "trope.roots/1", see
 * data/schema/trope.roots-1.schema.json). returns TP_OK or TP_EIO. */
TP_MUST_CHECK tp_status tp_roots_write_text(FILE *out, const tp_roots *R, tp_error *err);
TP_MUST_CHECK tp_status tp_roots_write_json(FILE *out, const tp_roots *R, tp_error *err);

/* tp_root_term_str: "3/2*t^(1/2)" or "(0.5+1.2i)*t^2": malloc'ed text of one term. */
char *tp_root_term_str(const tp_root_term *T, const char *param);

#endif
