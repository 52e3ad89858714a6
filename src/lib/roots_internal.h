/* roots_internal.h — the machinery shared by roots.c and lift.c (not installed).
 *
 * Numbers (rnum) are exact rationals until an irrational residual root is chosen;
 * from then on they are complex numbers carried with RN_PREC bits (MPC). Series are
 * finite Puiseux polynomials sum c_k t^{e_k} (rational e_k strictly increasing, no zero
 * coefficient). A upoly is sum_i a_i(t) x^i with series coefficients.
 *
 * Numeric zero: a complex coefficient whose modulus is below RN_ZERO_BITS bits under
 * the largest modulus in the same polynomial is dropped (rn_upoly_clean). With
 * RN_PREC = 512 and RN_ZERO_BITS = 400 that is a relative 2^-400 (about 1e-120).
 */
#ifndef TROPE_ROOTS_INTERNAL_H
#define TROPE_ROOTS_INTERNAL_H

#include <stdbool.h>
#include <stddef.h>
#include <gmp.h>
#include <mpfr.h>
#include <mpc.h>
#include "trope/error.h"
#include "trope/roots.h"

#define RN_PREC 512
#define RN_ZERO_BITS 400

typedef struct {
    bool exact;      /* true: value is q; false: value is z */
    mpq_t q;
    mpc_t z;
} rnum;

void rn_init(rnum *a);
void rn_clear(rnum *a);
void rn_set(rnum *r, const rnum *a);
void rn_set_q(rnum *r, const mpq_t q);
void rn_set_si(rnum *r, long v);
void rn_set_mpc(rnum *r, const mpc_t z);
/* r = a + b, a - b, a * b, a / b (b nonzero), -a; any aliasing allowed. */
void rn_add(rnum *r, const rnum *a, const rnum *b);
void rn_sub(rnum *r, const rnum *a, const rnum *b);
void rn_mul(rnum *r, const rnum *a, const rnum *b);
void rn_div(rnum *r, const rnum *a, const rnum *b);
void rn_neg(rnum *r, const rnum *a);
/* exact zero only (numeric values are zero only when cleaned away) */
bool rn_is_zero(const rnum *a);
/* z = a as a complex number */
void rn_get_mpc(mpc_t z, const rnum *a);
/* log2 of |a| (a nonzero), as a double */
double rn_log2abs(const rnum *a);
void rn_get_d(const rnum *a, double *re, double *im);

typedef struct tp_rseries {
    size_t len, cap;
    mpq_t *e;
    rnum *c;
} rseries;

void rs_init(rseries *s);
void rs_clear(rseries *s);
bool rs_set(rseries *r, const rseries *a);
void rs_zero(rseries *s);
/* s += c * t^e (merging, removing exact zeros). false on out of memory. */
bool rs_add_term(rseries *s, const mpq_t e, const rnum *c);
/* r += k * t^sh * a (r must not alias a). */
bool rs_addmul(rseries *r, const rseries *a, const rnum *k, const mpq_t sh);
/* r = a * b (r must not alias a or b). */
bool rs_mul(rseries *r, const rseries *a, const rseries *b);
/* shift every exponent by sh */
void rs_shift(rseries *s, const mpq_t sh);
bool rs_is_zero(const rseries *s);
/* lowest exponent (s nonzero) */
const mpq_t *rs_val(const rseries *s);
bool rs_all_exact(const rseries *s);

typedef struct {
    size_t n;        /* number of coefficients (degree + 1) */
    rseries *a;
} rupoly;

bool ru_init(rupoly *f, size_t n);
void ru_clear(rupoly *f);
bool ru_set(rupoly *r, const rupoly *a);
/* drop numerically negligible complex coefficients (see top) */
void ru_clean(rupoly *f);
/* f(x) -> t^{-mu} f(t^v (c + x)) with mu the smallest valuation of the result;
 * false on out of memory. */
bool ru_substitute(rupoly *f, const mpq_t v, const rnum *c);
/* value f(x0) where x0 is a series: out = sum a_i x0^i */
bool ru_eval_series(rseries *out, const rupoly *f, const rseries *x0);

/* Polynomials with rational coefficients, c[0..n-1], trailing coefficient nonzero
 * (n == 0 is the zero polynomial). */
typedef struct {
    size_t n;
    mpq_t *c;
} qpoly;

bool qp_init(qpoly *f, size_t n);
void qp_clear(qpoly *f);
/* Square-free decomposition f = lc * prod_k g_k^k (Yun); parts[k-1] = g_k (monic,
 * possibly 1). *nparts = highest k. Caller clears parts (qp_clear each, free array). */
bool qp_squarefree(const qpoly *f, qpoly **parts, size_t *nparts);
/* The rational roots of a square-free f (deg >= 1), found by numerical approximation
 * and checked exactly; the quotient of f by them is left in rest (monic). */
bool qp_rational_roots(const qpoly *f, mpq_t **roots, size_t *nroots, qpoly *rest);
/* "x^2 - 3" with variable name var. malloc'ed. */
char *qp_to_str(const qpoly *f, const char *var);

/* Complex roots of sum c[i] x^i (c[n-1] != 0, c[0] != 0), each with its multiplicity
 * estimated by clustering (tolerance 2^-50 relative) and polished at RN_PREC bits with
 * Newton on the (m-1)-th derivative. roots[] has room for n-1 entries; returns the
 * number of distinct roots found, or (size_t)-1 on out of memory. */
size_t cx_roots(const mpc_t *c, size_t n, mpc_t *roots, size_t *mult);

/* Polynomials over F_p (coefficients 0..p-1, mpz), for residual polynomials. */
typedef struct {
    size_t n;
    mpz_t *c;
} fpoly;

typedef struct {
    fpoly f;          /* monic irreducible */
    size_t mult;
} fp_factor;

/* Factor f (nonzero, reduced mod p) into monic irreducibles over F_p: square-free
 * decomposition, distinct-degree, then equal-degree splitting (Cantor–Zassenhaus with
 * a fixed-seed generator, so results are deterministic and sorted by (degree, coeffs)).
 * lc receives the leading coefficient. */
bool fp_factor_poly(const mpz_t *coef, size_t n, const mpz_t p, mpz_t lc,
                    fp_factor **out, size_t *nout);
void fp_factors_free(fp_factor *f, size_t n);
/* *sqf = f (reduced mod p) is square-free with a nonzero derivative; false on no memory */
bool fp_is_squarefree(const mpz_t *coef, size_t n, mpz_srcptr p, bool *sqf);
char *fp_to_str(const mpz_t *c, size_t n, const char *var);

/* string helpers */
char *rn_strdup(const char *s);
typedef struct {
    char *s;
    size_t len, cap;
    bool oom;
} rbuf;
void rb_init(rbuf *b);
void rb_printf(rbuf *b, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
void rb_puts(rbuf *b, const char *s);
/* returns the string (owned by caller) or NULL if out of memory */
char *rb_take(rbuf *b);
void rb_free(rbuf *b);
/* mpq as text appended */
void rb_q(rbuf *b, const mpq_t q);
void rb_z(rbuf *b, const mpz_t z);

/* the polynomial sum c[i] x^i (c[i] NULL for a zero coefficient) over Puiseux series,
 * with denominators cleared (multiplied by the product of the distinct denominators) */
bool roots_series_poly(rupoly *out, tp_coeff *const *c, size_t n);
/* square-free decomposition over Q(t^(1/D)) of an exact f: parts[k-1] carries the roots
 * of multiplicity exactly k (each part primitive, square-free; a part with n <= 1 has
 * no roots). false if f is not exact or on out of memory. Caller clears the parts. */
bool roots_squarefree(const rupoly *f, rupoly **parts, size_t *nparts);
/* segments and roots of sum c[i] x^i (n coefficients, c[n-1] nonzero); R->field,
 * R->var are set by the caller; zero roots are counted from the low end. */
tp_status roots_core(tp_roots *R, tp_coeff *const *c, size_t n, const tp_field *F,
                     const tp_roots_options *opt, tp_error *err);

#endif
