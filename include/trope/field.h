/* trope/field.h — the valued fields and their coefficients.
 *
 * Fields:
 *   TP_FIELD_TRIVIAL  Q with the trivial valuation (val = 0 on every nonzero element);
 *                     residue field Q.
 *   TP_FIELD_PADIC    Q with the p-adic valuation v_p; residue field F_p. p is prime.
 *   TP_FIELD_PUISEUX  rational functions in Puiseux polynomials of a parameter (default
 *                     name "t"): num/den, each a finite sum c_k t^{e_k} with rational e_k
 *                     and rational c_k; val = order in t; residue field Q (the leading,
 *                     i.e. lowest-order, coefficient).
 *   TP_FIELD_COMPLEX  Q(i) coefficients, carried exactly (real and imaginary parts are
 *                     rationals) for the amoeba work; tropicalize uses the trivial
 *                     valuation on them.
 *
 * Invariants of tp_coeff (hold after every call):
 *   - rational parts are canonical (mpq);
 *   - a tp_ppoly has strictly increasing exponents and no zero coefficient;
 *   - a PUISEUX value has den != 0, and den's lowest term is 1*t^0 (num/den is scaled);
 *   - zero is num.len == 0 (PUISEUX), q == 0 (TRIVIAL, PADIC), q == im == 0 (COMPLEX).
 * All arithmetic functions allow the output to alias any input.
 */
#ifndef TROPE_FIELD_H
#define TROPE_FIELD_H

#include <stdbool.h>
#include <stdint.h>
#include <gmp.h>
#include "trope/error.h"

typedef enum {
    TP_FIELD_TRIVIAL = 0,
    TP_FIELD_PADIC,
    TP_FIELD_PUISEUX,
    TP_FIELD_COMPLEX
} tp_field_kind;

typedef struct {
    tp_field_kind kind;
    mpz_t p;          /* PADIC: the prime; 0 otherwise */
    char param[64];   /* PUISEUX: name of the parameter ("t"); "" otherwise */
} tp_field;

/* Puiseux polynomial sum_k coef[k] * t^exp[k], exponents strictly increasing. */
typedef struct {
    size_t len, cap;
    mpq_t *exp;
    mpq_t *coef;
} tp_ppoly;

typedef struct {
    mpq_t q;          /* TRIVIAL, PADIC: the value. COMPLEX: real part. */
    mpq_t im;         /* COMPLEX: imaginary part; 0 otherwise */
    tp_ppoly num;     /* PUISEUX: numerator */
    tp_ppoly den;     /* PUISEUX: denominator (lowest term 1*t^0) */
} tp_coeff;

/* Fields. tp_field_init sets the trivial field Q. */
void tp_field_init(tp_field *F);
void tp_field_clear(tp_field *F);
void tp_field_set(tp_field *dst, const tp_field *src);
/* tp_field_parse: read "p=7", "Q", "C", "t" or any other identifier (a parameter name).
 *   returns TP_OK; TP_ESYNTAX for an unreadable spec, TP_EDOMAIN if p is not prime.
 *   err->col is set to the 1-based column inside spec; err->line is left 0. */
TP_MUST_CHECK tp_status tp_field_parse(tp_field *F, const char *spec, tp_error *err);
/* tp_field_describe: "Q_7 (7-adic)", "Puiseux series in t", "Q (trivial valuation)",
 *   "C (complex)". Into buf. */
void tp_field_describe(const tp_field *F, char *buf, size_t size);

/* Coefficients. A coefficient must be used with one field throughout. */
void tp_coeff_init(tp_coeff *c);
void tp_coeff_clear(tp_coeff *c);
void tp_coeff_set(tp_coeff *r, const tp_coeff *a);
/* r = a (a rational number), in field F. */
void tp_coeff_set_q(tp_coeff *r, const mpq_t a, const tp_field *F);
void tp_coeff_set_si(tp_coeff *r, long a, const tp_field *F);
/* r = a*i (COMPLEX only). */
void tp_coeff_set_imag_q(tp_coeff *r, const mpq_t a, const tp_field *F);
/* r = t^e (PUISEUX only). */
void tp_coeff_set_param_pow(tp_coeff *r, const mpq_t e, const tp_field *F);

bool tp_coeff_is_zero(const tp_coeff *a, const tp_field *F);
bool tp_coeff_is_one(const tp_coeff *a, const tp_field *F);
/* Equality of values (for PUISEUX: num_a*den_b == num_b*den_a). */
bool tp_coeff_equal(const tp_coeff *a, const tp_coeff *b, const tp_field *F);

void tp_coeff_neg(tp_coeff *r, const tp_coeff *a, const tp_field *F);
void tp_coeff_add(tp_coeff *r, const tp_coeff *a, const tp_coeff *b, const tp_field *F);
void tp_coeff_sub(tp_coeff *r, const tp_coeff *a, const tp_coeff *b, const tp_field *F);
void tp_coeff_mul(tp_coeff *r, const tp_coeff *a, const tp_coeff *b, const tp_field *F);
/* r = 1/a. returns TP_EDOMAIN (message "division by zero") if a == 0. */
TP_MUST_CHECK tp_status tp_coeff_inv(tp_coeff *r, const tp_coeff *a, const tp_field *F,
                                     tp_error *err);
/* r = a^e, e any integer (negative needs a != 0: TP_EDOMAIN). */
TP_MUST_CHECK tp_status tp_coeff_pow_si(tp_coeff *r, const tp_coeff *a, long e,
                                        const tp_field *F, tp_error *err);
/* If a is c*t^e with c == 1 (a pure power of the parameter), set e and return true. */
bool tp_coeff_is_param_pow(const tp_coeff *a, mpq_t e, const tp_field *F);

/* v = val(a); a must be nonzero. TRIVIAL and COMPLEX give 0. */
void tp_coeff_val(mpq_t v, const tp_coeff *a, const tp_field *F);
/* Residue of the leading part, as text for initial forms: F_p element in 1..p-1
 * ("3"), a rational for PUISEUX ("-7/4"), the value itself for TRIVIAL ("5/2") and
 * COMPLEX ("2-3i"). Returns a malloc'ed string (NULL on out of memory). */
char *tp_coeff_residue_str(const tp_coeff *a, const tp_field *F);
/* Residue as a rational (PADIC: the representative in 1..p-1; PUISEUX: the leading
 * coefficient; TRIVIAL: the value; COMPLEX: the real part). */
void tp_coeff_residue_q(mpq_t r, const tp_coeff *a, const tp_field *F);
/* The value as text: "49/3", "-0.5" is printed "-1/2", "(1+t)/(t^2-t^3)" printed as
 * "(t + 1)/(-t^3 + t^2)"-like canonical text, "2-3i". malloc'ed, NULL on no memory. */
char *tp_coeff_to_str(const tp_coeff *a, const tp_field *F);

/* Puiseux polynomials (exposed for roots/lift). */
void tp_ppoly_init(tp_ppoly *p);
void tp_ppoly_clear(tp_ppoly *p);
void tp_ppoly_set(tp_ppoly *r, const tp_ppoly *a);

#endif
