/* trope/poly.h — Laurent polynomials over a valued field, and the input language.
 *
 * Input language (see README "Input"):
 *   3*x^2*y^-1 + (1+t)/(t^2-t^3)*x*y - 7/4 + t^(5/2)*y^3
 *   `*` and `/` between factors, `^` integer powers (rational only on the field
 *   parameter), parentheses, decimals read exactly, `i` suffix for imaginary numbers
 *   (`2-3i`, field C), `#` comments, `;` between polynomials, header lines
 *   `over: p=7` and `vars: x y z` before the first polynomial.
 *
 * Invariants of tp_poly (after every parse): terms sorted by exponent vector in
 * decreasing lexicographic order, exponents pairwise distinct, no zero coefficient.
 * nterms >= 1 for a parsed polynomial (the zero polynomial is refused with TP_EDOMAIN).
 */
#ifndef TROPE_POLY_H
#define TROPE_POLY_H

#include <stdbool.h>
#include <stdint.h>
#include "trope/error.h"
#include "trope/field.h"

typedef struct {
    size_t nvars;        /* number of variables (shared with the tp_input) */
    size_t nterms, cap;
    int64_t *exps;       /* nterms * nvars exponents, row-major */
    tp_coeff *coeffs;    /* nterms coefficients */
    int line, col;       /* where the polynomial starts in the input */
} tp_poly;

/* A parsed input: the field, the variable names and one or more polynomials. */
typedef struct {
    tp_field field;
    size_t nvars;
    char **vars;         /* nvars malloc'ed names */
    size_t npolys;
    tp_poly *polys;
} tp_input;

/* Limits against hostile input; 0 in a field means the default shown. */
typedef struct {
    const char *over;    /* --over value, wins over an `over:` header; NULL: header or Q */
    const char *vars;    /* --vars value "x,y,z" or "x y z"; wins over a `vars:` header */
    size_t max_terms;    /* terms in any intermediate polynomial (default 1000000) */
    size_t max_depth;    /* parenthesis nesting (default 200) */
    size_t max_digits;   /* digits in one number literal (default 1000000) */
    size_t max_polys;    /* polynomials per input (default 100000) */
} tp_parse_options;

/* tp_poly_init: an empty polynomial (nterms 0). tp_poly_clear frees it; coeffs[0..nterms)
 *   are the initialised coefficients. */
void tp_poly_init(tp_poly *f, size_t nvars);
void tp_poly_clear(tp_poly *f);
/* tp_poly_copy: dst (uninitialised or cleared) = a deep copy of src.
 *   returns TP_OK or TP_ENOMEM (dst left empty). */
TP_MUST_CHECK tp_status tp_poly_copy(tp_poly *dst, const tp_poly *src, tp_error *err);

void tp_input_init(tp_input *in);
void tp_input_clear(tp_input *in);

/* tp_input_parse: parse `len` bytes of `text` (need not be NUL-terminated).
 *   err->file should already hold the input's name (tp_error_init).
 *   returns TP_OK; TP_ESYNTAX, TP_EDOMAIN, TP_EOVERFLOW, TP_ELIMIT with err->line/col
 *   pointing at the offending character and a message saying what was expected;
 *   TP_ENOMEM. On failure `in` is left cleared (tp_input_clear is still safe). */
TP_MUST_CHECK tp_status tp_input_parse(tp_input *in, const char *text, size_t len,
                                       const tp_parse_options *opt, tp_error *err);

/* tp_poly_to_str: canonical text of f with the given variable names, e.g.
 *   "49/3*x^2*y + x*y^-1 - 7/4". malloc'ed; NULL on no memory. */
char *tp_poly_to_str(const tp_poly *f, const tp_field *F, char *const *vars);

/* tp_monomial_to_str: "x^2*y^-1" ("1" for the zero exponent); malloc'ed. */
char *tp_monomial_to_str(const int64_t *exp, size_t nvars, char *const *vars);

#endif
