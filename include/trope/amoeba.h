/* trope/amoeba.h — amoebas of complex plane curves, their complement components,
 * the Ronkin function and the spine.
 *
 * For f(z, w) = sum c_a z^a1 w^a2 with complex coefficients (a Laurent polynomial with
 * a two-dimensional Newton polygon Delta), the amoeba is Log|V(f)| = {(log|z|, log|w|) :
 * f(z, w) = 0, z, w != 0} in R^2. Amoeba coordinates are Log|.|, which matches the max
 * convention of tropical geometry (Passare, Rullgard, "Amoebas, Monge-Ampere measures,
 * and triangulations of the Newton polytope", Duke Math. J. 121 (2004)).
 *
 * Numerics are in double precision; every quantity comes with a stated tolerance:
 *   - univariate roots: Aberth-Ehrlich iteration stopped by a backward-error test
 *     (the root is an exact root of a polynomial whose coefficients are perturbed by a
 *     few units in the last place, see amoeba_roots.c);
 *   - slices: the ends of the slice intervals are extrema over theta of continuous
 *     functions, located by sampling and Brent minimisation to theta_tol radians;
 *   - area: adaptive Gauss-Kronrod quadrature over x1 with an error estimate;
 *   - Ronkin function: Jensen's formula in w reduces the double integral to one over
 *     theta1, integrated piecewise (split where a root crosses |w| = e^x2) to a mixed
 *     absolute/relative tolerance of 1e-11, so |error| <= 1e-9 * max(1, |N|).
 * Nothing is global; every function is reentrant. Deterministic: same input, same
 * doubles.
 */
#ifndef TROPE_AMOEBA_H
#define TROPE_AMOEBA_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include "trope/error.h"
#include "trope/field.h"
#include "trope/figure.h"
#include "trope/poly.h"
#include "trope/trop.h"

/* A complex Laurent polynomial in 1 or 2 variables, coefficients as (log-modulus,
 * argument) so that no modulus overflows. Terms are those of the input, in its order. */
typedef struct {
    size_t nvars;        /* 1 or 2 */
    size_t nterms;
    int64_t *exps;       /* nterms * nvars, as in the input */
    double *logabs;      /* log|c_a| */
    double *arg;         /* arg c_a in (-pi, pi] */
    int64_t lo[2];       /* smallest exponent in each coordinate */
    int64_t deg[2];      /* largest minus smallest exponent in each coordinate */
} tp_amoeba_poly;

typedef struct {
    double theta_tol;    /* slice ends: theta located to this many radians (1e-9) */
    int theta_samples;   /* initial samples on the circle, 0: automatic (6*deg + 48) */
    double area_tol;     /* relative tolerance of the area (1e-6) */
    int sweep_columns;   /* columns of the component sweep (400) */
} tp_amoeba_options;

/* tp_amoeba_options_default: the values in parentheses above. */
void tp_amoeba_options_default(tp_amoeba_options *o);

void tp_amoeba_poly_init(tp_amoeba_poly *P);
void tp_amoeba_poly_clear(tp_amoeba_poly *P);

/* tp_amoeba_poly_from_poly: convert f (field COMPLEX or any field of rationals read as
 *   real numbers: TRIVIAL) to floating point.
 *   returns TP_OK; TP_EDOMAIN if f has other than 1 or 2 variables, a p-adic or Puiseux
 *   field, or (2 variables) a Newton polygon that is not two-dimensional, or (1 variable)
 *   fewer than 2 terms; TP_ELIMIT if a degree exceeds 100000; TP_ENOMEM. */
TP_MUST_CHECK tp_status tp_amoeba_poly_from_poly(tp_amoeba_poly *P, const tp_poly *f,
                                                 const tp_field *F, tp_error *err);

/* ---- univariate ---- */

/* tp_amoeba_roots: all d roots of sum_{j=0}^{d} (re[j] + i im[j]) w^j (re[d], im[d] not
 *   both 0; leading or trailing zero coefficients give roots at infinity / at 0), by the
 *   Aberth-Ehrlich iteration. Roots are returned as log-modulus and argument (so that
 *   extreme moduli do not overflow), sorted by log-modulus, ties by argument.
 *   iters (may be NULL) gets the number of sweeps used.
 *   returns TP_OK; TP_ENOMEM; TP_EINTERNAL if the iteration did not converge (the
 *   outputs then hold the last approximations). */
TP_MUST_CHECK tp_status tp_amoeba_roots(size_t d, const double *re, const double *im,
                                        double *logmod, double *arg, int *iters,
                                        tp_error *err);

/* tp_amoeba_poly_roots: the roots of a univariate P (nvars 1) as above, d = deg[0]
 *   (roots at 0 of the Laurent part are not counted: P is divided by its lowest power). */
TP_MUST_CHECK tp_status tp_amoeba_poly_roots(const tp_amoeba_poly *P, double *logmod,
                                             double *arg, tp_error *err);

/* ---- bivariate ---- */

/* tp_amoeba_slice: the amoeba over x1: for k = 0..deg[1]-1, lo[k] = min over theta and
 *   hi[k] = max over theta of the k-th smallest log|w| with f(e^(x1+i theta), w) = 0.
 *   The slice is the union of the intervals [lo[k], hi[k]] (lo, hi nondecreasing in k).
 *   Values are +-INFINITY only when x1 is the log-modulus of a root of an edge
 *   polynomial (a vertical tentacle).
 *   returns TP_OK; TP_ENOMEM; TP_EINTERNAL if a root iteration failed. */
TP_MUST_CHECK tp_status tp_amoeba_slice(const tp_amoeba_poly *P, double x1,
                                        const tp_amoeba_options *o, double *lo, double *hi,
                                        tp_error *err);

/* tp_amoeba_slices: the slices at xs[0..n-1] into lo, hi (n * deg[1] each, row i for
 *   xs[i]), computed on up to 4 threads (same results for any number of threads).
 *   returns TP_OK; TP_ENOMEM; TP_EINTERNAL. */
TP_MUST_CHECK tp_status tp_amoeba_slices(const tp_amoeba_poly *P, const double *xs, size_t n,
                                         const tp_amoeba_options *o, double *lo, double *hi,
                                         tp_error *err);

/* tp_amoeba_slice_length: the length of the union of the slice intervals. */
double tp_amoeba_slice_length(size_t k, const double *lo, const double *hi);

/* tp_amoeba_area: the area of the amoeba, with an error estimate (quadrature error
 *   estimate plus the slice-end tolerance integrated over x1).
 *   returns TP_OK; TP_ENOMEM; TP_EINTERNAL. */
TP_MUST_CHECK tp_status tp_amoeba_area(const tp_amoeba_poly *P, const tp_amoeba_options *o,
                                       double *area, double *error, tp_error *err);

/* tp_amoeba_order_at: the order of the complement component containing x (the numbers
 *   of roots inside the circles, i.e. the gradient of the Ronkin function), exponents of
 *   the input (not shifted). Returns false when x lies on the amoeba (some fibre root has
 *   modulus within 1e-12 relative of the circle), with order left unset. */
bool tp_amoeba_order_at(const tp_amoeba_poly *P, double x1, double x2, int64_t order[2]);

/* tp_amoeba_ronkin: N_f(x) = (2 pi)^-2 int log|f(e^(x + i theta))| d theta, to
 *   |error| <= 1e-9 * max(1, |N|) (estimate in *error, may be NULL).
 *   returns TP_OK; TP_ENOMEM; TP_EINTERNAL. */
TP_MUST_CHECK tp_status tp_amoeba_ronkin(const tp_amoeba_poly *P, double x1, double x2,
                                         double *value, double *error, tp_error *err);

typedef struct {
    int64_t order[2];    /* in Delta, exponents of the input */
    double point[2];     /* a point of the component, deep inside where possible */
    bool bounded;        /* order in the interior of Delta (Forsberg-Passare-Tsikh) */
    bool vertex;         /* order is a vertex of Delta */
    double ronkin;       /* c_alpha = N_f(point) - <order, point> */
    double ronkin_error;
} tp_amoeba_component;

/* tp_amoeba_components: every complement component found by a sweep of
 *   o->sweep_columns slices over box[4] = {x1min, x1max, x2min, x2max} (NULL: a box
 *   around the Archimedean tropical curve, widened by log(N-1) + 2), bisecting between
 *   columns whose gap structure differs. Sorted by order. *out is malloc'ed (caller
 *   frees). The vertices of Delta always appear (each is checked separately).
 *   returns TP_OK; TP_ENOMEM; TP_EINTERNAL. */
TP_MUST_CHECK tp_status tp_amoeba_components(const tp_amoeba_poly *P,
                                             const tp_amoeba_options *o, const double *box,
                                             tp_amoeba_component **out, size_t *n,
                                             tp_error *err);

/* tp_amoeba_lopsided: at x, the term of largest modulus |c_a| e^<a,x> (index into P's
 *   terms) in *dominant, and slack = that modulus minus the sum of the others, divided by
 *   the sum of all moduli (in (-1, 1]). Returns true (x is certainly outside the amoeba,
 *   in the component of order a) when slack > 0. */
bool tp_amoeba_lopsided(const tp_amoeba_poly *P, double x1, double x2, size_t *dominant,
                        double *slack);

/* tp_amoeba_box: a box {x1min, x1max, x2min, x2max} holding every vertex of the
 *   Archimedean tropical curve, widened by log(N-1) + 2 (N terms). */
void tp_amoeba_box(const tp_amoeba_poly *P, const tp_trop *archimedean, double box[4]);

/* tp_amoeba_spine: the tropical polynomial max over components (c_alpha + <alpha, x>),
 *   heights converted exactly from the doubles (mpq_set_d), through tp_trop_from_points
 *   with max convention. T must be initialised; vars (may be NULL) name the variables.
 *   returns TP_OK or the pipeline's error. */
TP_MUST_CHECK tp_status tp_amoeba_spine(tp_trop *T, const tp_amoeba_component *comp,
                                        size_t n, char *const *vars, tp_error *err);

/* tp_amoeba_archimedean: the Archimedean tropical curve max(log|c_a| + <a, x>), the same
 *   way. returns TP_OK or the pipeline's error. */
TP_MUST_CHECK tp_status tp_amoeba_archimedean(tp_trop *T, const tp_amoeba_poly *P,
                                              char *const *vars, tp_error *err);

/* tp_amoeba_mask: coverage of the amoeba on a w x h pixel grid over box (pixel (i,j)
 *   covers x1 in box[0] + (i, i+1) * dx, x2 in box[3] - (j, j+1) * dy, rows from the
 *   top): cov[j*w + i] in [0,1], the fraction of the pixel's vertical extent covered at
 *   the pixel column's centre line. returns TP_OK; TP_ENOMEM; TP_EINTERNAL. */
TP_MUST_CHECK tp_status tp_amoeba_mask(const tp_amoeba_poly *P, const double box[4],
                                       size_t w, size_t h, float *cov, tp_error *err);

/* tp_amoeba_delta_area: the area of the Newton polygon (exact half-integer, as a double);
 *   pi^2 times it bounds the amoeba's area (Passare-Rullgard 2004). */
double tp_amoeba_delta_area(const tp_amoeba_poly *P);

/* tp_amoeba_figure: a figure (amoeba_figure.c) of the amoeba filled, the spine on top
 *   (drawn by tp_figure_build from `spine`), optionally the Archimedean tropical curve
 *   (arch, may be NULL) and the component orders as labels "(a,b)" at their points.
 *   fo->nbox must be 4 (the world box). Roles added: "amoeba" (filled bands, one per
 *   root index), "archimedean" (segments), "order" (labels), "order-point" (dots).
 *   returns TP_OK; TP_EDOMAIN; TP_ENOMEM; TP_EINTERNAL. */
TP_MUST_CHECK tp_status tp_amoeba_figure(tp_figure *F, const tp_amoeba_poly *P,
                                         const tp_trop *spine, const tp_trop *arch,
                                         const tp_amoeba_component *comp, size_t ncomp,
                                         const tp_figure_options *fo, tp_error *err);

#endif
