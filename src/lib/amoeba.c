/* amoeba.c — amoebas of complex plane curves: slices, area, complement components,
 * Ronkin function, lopsidedness.
 *
 * Slices (Passare, Rullgard, Duke Math. J. 121 (2004) for the objects): for fixed x1 the
 * w-roots of f(e^(x1 + i theta), w) have log-moduli rho_0(theta) <= ... <= rho_{d-1}
 * (theta), each continuous on the circle (the k-th smallest of continuously moving
 * roots), so the amoeba over x1 is the union of the intervals [min rho_k, max rho_k].
 * Extrema are found by sampling theta and refining each candidate by Brent's
 * minimisation without derivatives (R. P. Brent, "Algorithms for Minimization without
 * Derivatives", Prentice-Hall 1973, ch. 5).
 *
 * Area: adaptive Gauss-Kronrod (7/15 points) over x1, split at the x1 of the vertical
 * tentacles (where the slice is unbounded, a logarithmic singularity of the slice
 * length), with exponentially decaying tails cut 60 units beyond the box that holds the
 * Archimedean tropical curve (there the slice length is below e^-60 times its size at
 * the box edge).
 *
 * Ronkin function: Jensen's formula in w gives
 *   (2 pi)^-1 int log|f(z, e^(x2 + i psi))| d psi = log|b_d(z)| + sum_k max(rho_k, x2),
 * with b_d the leading coefficient in w, so N_f(x) = (2 pi)^-1 int of that over theta1.
 * The integrand is analytic except where a root crosses |w| = e^x2; those points are
 * located by bisection and each piece is integrated by adaptive Gauss-Kronrod. With no
 * crossing the periodic trapezoid rule converges geometrically and is used instead.
 */
#include "trope/amoeba.h"

#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <pthread.h>
#include <unistd.h>

#include "amoeba_internal.h"

#define TWO_PI 6.283185307179586476925286766559
#define MAX_DEGREE 100000

void tp_amoeba_options_default(tp_amoeba_options *o)
{
    o->theta_tol = 1e-9;
    o->theta_samples = 0;
    o->area_tol = 1e-6;
    o->sweep_columns = 400;
}

void tp_amoeba_poly_init(tp_amoeba_poly *P)
{
    memset(P, 0, sizeof *P);
}

void tp_amoeba_poly_clear(tp_amoeba_poly *P)
{
    free(P->exps);
    free(P->logabs);
    free(P->arg);
    tp_amoeba_poly_init(P);
}

/* |q| = m * 2^e with m in [0.25, 4), for q != 0 */
static void q_to_d2exp(const mpq_t q, double *m, long *e)
{
    long en, ed;
    double mn = mpz_get_d_2exp(&en, mpq_numref(q));
    double md = mpz_get_d_2exp(&ed, mpq_denref(q));
    *m = fabs(mn / md);
    *e = en - ed;
}

tp_status tp_amoeba_poly_from_poly(tp_amoeba_poly *P, const tp_poly *f, const tp_field *F,
                                   tp_error *err)
{
    tp_amoeba_poly_clear(P);
    if (F->kind != TP_FIELD_COMPLEX && F->kind != TP_FIELD_TRIVIAL)
        return tp_error_set(err, TP_EDOMAIN, f->line, f->col,
                            "amoeba needs complex (or rational) coefficients: use --over C");
    if (f->nvars != 1 && f->nvars != 2)
        return tp_error_set(err, TP_EDOMAIN, f->line, f->col,
                            "amoeba needs a polynomial in 1 or 2 variables, got %zu",
                            f->nvars);
    size_t n = f->nvars, N = f->nterms;
    P->nvars = n;
    P->exps = malloc(N * n * sizeof *P->exps);
    P->logabs = malloc(N * sizeof *P->logabs);
    P->arg = malloc(N * sizeof *P->arg);
    if (!P->exps || !P->logabs || !P->arg) {
        tp_amoeba_poly_clear(P);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    P->nterms = N;
    memcpy(P->exps, f->exps, N * n * sizeof *P->exps);
    for (size_t t = 0; t < N; t++) {
        const tp_coeff *c = &f->coeffs[t];
        bool hasre = mpq_sgn(c->q) != 0;
        bool hasim = F->kind == TP_FIELD_COMPLEX && mpq_sgn(c->im) != 0;
        double mr = 0, mi = 0;
        long er = LONG_MIN / 2, ei = LONG_MIN / 2;
        if (hasre)
            q_to_d2exp(c->q, &mr, &er);
        if (hasim)
            q_to_d2exp(c->im, &mi, &ei);
        long emax = er > ei ? er : ei;
        double xr = hasre ? ldexp(mr, (int)(er - emax > -2000 ? er - emax : -2000)) : 0;
        double xi = hasim ? ldexp(mi, (int)(ei - emax > -2000 ? ei - emax : -2000)) : 0;
        if (mpq_sgn(c->q) < 0)
            xr = -xr;
        if (hasim && mpq_sgn(c->im) < 0)
            xi = -xi;
        P->logabs[t] = log(hypot(xr, xi)) + (double)emax * M_LN2;
        P->arg[t] = atan2(xi, xr);
    }
    for (size_t v = 0; v < n; v++) {
        int64_t lo = INT64_MAX, hi = INT64_MIN;
        for (size_t t = 0; t < N; t++) {
            int64_t a = P->exps[t * n + v];
            if (a < lo) lo = a;
            if (a > hi) hi = a;
        }
        if ((hi > 0 && lo < hi - INT64_MAX) || hi - lo > MAX_DEGREE) {
            tp_amoeba_poly_clear(P);
            return tp_error_set(err, TP_ELIMIT, f->line, f->col,
                                "amoeba: degree in variable %zu is above %d", v + 1,
                                MAX_DEGREE);
        }
        P->lo[v] = lo;
        P->deg[v] = hi - lo;
    }
    if (n == 1 && P->deg[0] < 1) {
        tp_amoeba_poly_clear(P);
        return tp_error_set(err, TP_EDOMAIN, f->line, f->col,
                            "amoeba of a monomial is empty: expected at least 2 terms");
    }
    if (n == 2) {
        /* two-dimensional Newton polygon: some term off the line through the first two */
        bool full = false;
        if (N >= 3) {
            const int64_t *a = P->exps, *b = NULL;
            for (size_t t = 1; t < N && !b; t++)
                if (P->exps[2 * t] != a[0] || P->exps[2 * t + 1] != a[1])
                    b = P->exps + 2 * t;
            for (size_t t = 1; t < N && b && !full; t++) {
                const int64_t *c = P->exps + 2 * t;
                /* exponents are within MAX_DEGREE of each other: no overflow */
                int64_t det = (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]);
                full = det != 0;
            }
        }
        if (!full) {
            tp_amoeba_poly_clear(P);
            return tp_error_set(err, TP_EDOMAIN, f->line, f->col,
                                "amoeba: expected a Newton polygon of dimension 2 (the "
                                "terms' exponents lie on a line)");
        }
    }
    return TP_OK;
}

/* ------------------------------------------------------------------------------------
 * univariate */

tp_status tp_amoeba_roots(size_t d, const double *re, const double *im, double *logmod,
                          double *arg, int *iters, tp_error *err)
{
    if (d == 0)
        return TP_OK;
    tpa_work W;
    tpa_work_init(&W);
    double *L = malloc((d + 1) * sizeof *L);
    double _Complex *beta = malloc((d + 1) * sizeof *beta);
    if (!L || !beta || !tpa_work_reserve(&W, d)) {
        free(L);
        free(beta);
        tpa_work_clear(&W);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    for (size_t j = 0; j <= d; j++) {
        /* modulus into L, a unit complex number into beta (no overflow later) */
        double a = hypot(re[j], im[j]);
        if (a > 0 && isfinite(a)) {
            L[j] = log(a);
            beta[j] = re[j] / a + I * (im[j] / a);
        } else {
            L[j] = -INFINITY;
            beta[j] = 0;
        }
    }
    int rc = tpa_solve(d, L, beta, logmod, arg, false, &W, iters);
    free(L);
    free(beta);
    tpa_work_clear(&W);
    if (rc != 0)
        return tp_error_set(err, TP_EINTERNAL, 0, 0,
                            "root iteration did not converge (degree %zu)", d);
    return TP_OK;
}

tp_status tp_amoeba_poly_roots(const tp_amoeba_poly *P, double *logmod, double *arg,
                               tp_error *err)
{
    size_t d = (size_t)P->deg[0];
    tpa_work W;
    tpa_work_init(&W);
    double *L = malloc((d + 1) * sizeof *L);
    double _Complex *beta = calloc(d + 1, sizeof *beta);
    if (!L || !beta || !tpa_work_reserve(&W, d)) {
        free(L);
        free(beta);
        tpa_work_clear(&W);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    for (size_t j = 0; j <= d; j++)
        L[j] = -INFINITY;
    /* like terms are combined by the parser: one term per exponent */
    for (size_t t = 0; t < P->nterms; t++) {
        size_t j = (size_t)(P->exps[t] - P->lo[0]);
        L[j] = P->logabs[t];
        beta[j] = cos(P->arg[t]) + I * sin(P->arg[t]);
    }
    int rc = tpa_solve(d, L, beta, logmod, arg, false, &W, NULL);
    free(L);
    free(beta);
    tpa_work_clear(&W);
    if (rc != 0)
        return tp_error_set(err, TP_EINTERNAL, 0, 0,
                            "root iteration did not converge (degree %zu)", d);
    return TP_OK;
}

/* ------------------------------------------------------------------------------------
 * fibres: the polynomial in one variable (the "solved" one) with the other fixed on a
 * circle of log-radius x, at angle theta. */

typedef struct {
    size_t d;            /* degree in the solved variable */
    size_t nterms;
    size_t *j;           /* solved exponent (shifted) per term */
    int64_t *i;          /* fixed exponent (shifted) per term */
    double *ell;         /* log-modulus of the term at x */
    double _Complex *wt;  /* e^(ell - L_j) e^(i arg) */
    double *L;           /* d + 1 row maxima */
    double _Complex *beta;
    size_t maxi;
    double _Complex *pw;  /* powers e^(i k theta), k <= maxi, when maxi <= 512 */
    double lead_shift;   /* lo[fixed] * x + lo[solved] * (circle of the solved) handled
                            by callers */
    tpa_work W;
} fibre;

static void fibre_clear(fibre *B)
{
    free(B->j);
    free(B->i);
    free(B->ell);
    free(B->wt);
    free(B->L);
    free(B->beta);
    free(B->pw);
    tpa_work_clear(&B->W);
    memset(B, 0, sizeof *B);
}

/* axis 0: fix x1 (z on a circle), solve for w. axis 1: fix x2, solve for z. */
static bool fibre_init(fibre *B, const tp_amoeba_poly *P, int axis)
{
    memset(B, 0, sizeof *B);
    tpa_work_init(&B->W);
    int fix = axis == 0 ? 0 : 1, sol = 1 - fix;
    size_t N = P->nterms;
    B->d = (size_t)P->deg[sol];
    B->nterms = N;
    B->j = malloc(N * sizeof *B->j);
    B->i = malloc(N * sizeof *B->i);
    B->ell = malloc(N * sizeof *B->ell);
    B->wt = malloc(N * sizeof *B->wt);
    B->L = malloc((B->d + 1) * sizeof *B->L);
    B->beta = malloc((B->d + 1) * sizeof *B->beta);
    B->maxi = (size_t)P->deg[fix];
    if (B->maxi <= 512)
        B->pw = malloc((B->maxi + 1) * sizeof *B->pw);
    if (!B->j || !B->i || !B->ell || !B->wt || !B->L || !B->beta ||
        (B->maxi <= 512 && !B->pw) || !tpa_work_reserve(&B->W, B->d)) {
        fibre_clear(B);
        return false;
    }
    for (size_t t = 0; t < N; t++) {
        B->j[t] = (size_t)(P->exps[2 * t + sol] - P->lo[sol]);
        B->i[t] = P->exps[2 * t + fix] - P->lo[fix];
    }
    return true;
}

/* set the fixed coordinate's log-radius x */
static void fibre_at(fibre *B, const tp_amoeba_poly *P, double x)
{
    for (size_t j = 0; j <= B->d; j++)
        B->L[j] = -INFINITY;
    for (size_t t = 0; t < B->nterms; t++) {
        B->ell[t] = P->logabs[t] + (double)B->i[t] * x;
        if (B->ell[t] > B->L[B->j[t]])
            B->L[B->j[t]] = B->ell[t];
    }
    for (size_t t = 0; t < B->nterms; t++) {
        double s = exp(B->ell[t] - B->L[B->j[t]]);
        B->wt[t] = s * (cos(P->arg[t]) + I * sin(P->arg[t]));
    }
}

/* roots at angle theta of the fixed variable. returns 0 or -1 (no convergence). */
static int fibre_solve(fibre *B, double theta, double *rho, double *phi, bool warm)
{
    for (size_t j = 0; j <= B->d; j++)
        B->beta[j] = 0;
    if (B->pw) {
        double _Complex c = cos(theta) + I * sin(theta);
        B->pw[0] = 1;
        for (size_t k = 1; k <= B->maxi; k++)
            B->pw[k] = B->pw[k - 1] * c;
        for (size_t t = 0; t < B->nterms; t++)
            B->beta[B->j[t]] += B->wt[t] * B->pw[B->i[t]];
    } else {
        for (size_t t = 0; t < B->nterms; t++) {
            double a = fmod((double)B->i[t] * theta, TWO_PI);
            B->beta[B->j[t]] += B->wt[t] * (cos(a) + I * sin(a));
        }
    }
    return tpa_solve(B->d, B->L, B->beta, rho, phi, warm, &B->W, NULL);
}

static int auto_samples(const tp_amoeba_poly *P, const tp_amoeba_options *o, int axis)
{
    if (o && o->theta_samples > 0)
        return o->theta_samples;
    int64_t dfix = P->deg[axis == 0 ? 0 : 1];
    int64_t m = 6 * dfix + 48;
    if (m > 4096)
        m = 4096;
    return (int)m;
}

/* ------------------------------------------------------------------------------------
 * Brent's minimisation without derivatives on [a, b] (ch. 5 of Brent's book): golden
 * section steps safeguarded, parabolic steps where they are accepted. */

typedef double (*fun1)(void *ctx, double x);

static double brent_min(fun1 f, void *ctx, double a, double b, double x, double fx,
                        double tol, double *xmin)
{
    const double cgold = 0.3819660112501051;
    double v = x, w = x, fv = fx, fw = fx;
    double d = 0, e = 0;
    for (int it = 0; it < 200; it++) {
        double m = 0.5 * (a + b);
        double tol1 = tol + 1e-15 * fabs(x), tol2 = 2 * tol1;
        if (fabs(x - m) <= tol2 - 0.5 * (b - a))
            break;
        double u;
        bool golden = true;
        if (fabs(e) > tol1) {
            double r = (x - w) * (fx - fv);
            double q = (x - v) * (fx - fw);
            double p = (x - v) * q - (x - w) * r;
            q = 2 * (q - r);
            if (q > 0)
                p = -p;
            else
                q = -q;
            double etemp = e;
            e = d;
            if (fabs(p) < fabs(0.5 * q * etemp) && p > q * (a - x) && p < q * (b - x)) {
                d = p / q;
                u = x + d;
                if (u - a < tol2 || b - u < tol2)
                    d = x < m ? tol1 : -tol1;
                golden = false;
            }
        }
        if (golden) {
            e = (x < m ? b : a) - x;
            d = cgold * e;
        }
        u = fabs(d) >= tol1 ? x + d : x + (d > 0 ? tol1 : -tol1);
        double fu = f(ctx, u);
        if (fu <= fx) {
            if (u < x)
                b = x;
            else
                a = x;
            v = w; fv = fw;
            w = x; fw = fx;
            x = u; fx = fu;
        } else {
            if (u < x)
                a = u;
            else
                b = u;
            if (fu <= fw || w == x) {
                v = w; fv = fw;
                w = u; fw = fu;
            } else if (fu <= fv || v == x || v == w) {
                v = u; fv = fu;
            }
        }
    }
    *xmin = x;
    return fx;
}

/* ------------------------------------------------------------------------------------
 * slices */

typedef struct {
    fibre *B;
    size_t d;
    const double *rho0, *phi0;   /* warm start */
    double *rho, *phi;           /* scratch */
    size_t k;
    double sign;                 /* +1: minimise rho_k; -1: maximise */
    int fail;
    bool have_last;              /* rho, phi hold the previous evaluation */
} slice_ctx;

static double slice_fun(void *vctx, double theta)
{
    slice_ctx *c = vctx;
    /* warm start: the sample for the first evaluation, then the previous evaluation
     * (Brent's points close in on the extremum) */
    if (!c->have_last) {
        memcpy(c->rho, c->rho0, c->d * sizeof *c->rho);
        memcpy(c->phi, c->phi0, c->d * sizeof *c->phi);
    }
    if (fibre_solve(c->B, theta, c->rho, c->phi, true) != 0) {
        c->fail = 1;
        c->have_last = false;
    } else {
        c->have_last = true;
    }
    return c->sign * c->rho[c->k];
}

typedef struct {
    double *rho, *phi;    /* M * d samples */
    double *r1, *p1;      /* d scratch */
    int M;
} slice_work;

static void slice_work_clear(slice_work *S)
{
    free(S->rho);
    free(S->phi);
    free(S->r1);
    free(S->p1);
    memset(S, 0, sizeof *S);
}

static bool slice_work_init(slice_work *S, size_t d, int M)
{
    memset(S, 0, sizeof *S);
    S->M = M;
    size_t n = (size_t)M * (d ? d : 1);
    S->rho = malloc(n * sizeof *S->rho);
    S->phi = malloc(n * sizeof *S->phi);
    S->r1 = malloc((d ? d : 1) * sizeof *S->r1);
    S->p1 = malloc((d ? d : 1) * sizeof *S->p1);
    if (!S->rho || !S->phi || !S->r1 || !S->p1) {
        slice_work_clear(S);
        return false;
    }
    return true;
}

/* Sample all roots around the circle (warm starts along the walk). returns fails. */
static int sample_circle(fibre *B, slice_work *S)
{
    size_t d = B->d;
    int fails = 0;
    for (int m = 0; m < S->M; m++) {
        double th = TWO_PI * m / S->M;
        double *r = S->rho + (size_t)m * d, *p = S->phi + (size_t)m * d;
        bool warm = m > 0;
        if (m >= 2) {
            /* linear prediction from the two previous samples (roots sorted by modulus:
             * where two swap places the guess is poorer, and the iteration repairs it) */
            for (size_t k = 0; k < d; k++) {
                double r1 = r[k - d], r2 = r[k - 2 * d];
                double p1 = p[k - d], p2 = p[k - 2 * d];
                if (isfinite(r1) && isfinite(r2)) {
                    r[k] = 2 * r1 - r2;
                    p[k] = p1 + remainder(p1 - p2, TWO_PI);
                } else {
                    r[k] = r1;
                    p[k] = p1;
                }
            }
        } else if (warm) {
            memcpy(r, r - d, d * sizeof *r);
            memcpy(p, p - d, d * sizeof *p);
        }
        if (fibre_solve(B, th, r, p, warm) != 0)
            fails++;
    }
    return fails;
}

/* Extrema over theta of rho_k from the samples, refined by Brent. *slope gets an
 * estimate of max |d rho_k / d theta| over k (for error bounds). returns fails. */
static int slice_extrema(fibre *B, slice_work *S, double theta_tol, double *lo, double *hi,
                         double *slope)
{
    size_t d = B->d;
    int M = S->M, fails = 0;
    double h = TWO_PI / M, smax = 0;
    for (size_t k = 0; k < d; k++) {
        for (int pass = 0; pass < 2; pass++) {
            double sign = pass == 0 ? 1.0 : -1.0;
            double best = INFINITY, jump = 0;
            for (int m = 0; m < M; m++) {
                double v = sign * S->rho[(size_t)m * d + k];
                double vn = sign * S->rho[(size_t)((m + 1) % M) * d + k];
                if (v < best)
                    best = v;
                if (isfinite(v) && isfinite(vn) && fabs(vn - v) > jump)
                    jump = fabs(vn - v);
            }
            if (jump / h > smax)
                smax = jump / h;
            double result = best;
            if (isfinite(best) && theta_tol < h) {
                /* Candidates: sampled local minima. Between its neighbours a minimum can
                 * lie at most about one neighbour difference below the sample (the slope
                 * seen on either side bounds it), so a candidate whose lower bound is not
                 * below the best value found so far is skipped. Best bounds first. */
                int cand[8];
                double lb[8];
                int nc = 0;
                for (int m = 0; m < M; m++) {
                    double v = sign * S->rho[(size_t)m * d + k];
                    double vp = sign * S->rho[(size_t)((m + M - 1) % M) * d + k];
                    double vn = sign * S->rho[(size_t)((m + 1) % M) * d + k];
                    if (!(v <= vp && v <= vn))
                        continue;
                    double bound = v - fmax(vp - v, vn - v);
                    if (bound > best)
                        continue;
                    /* keep the 8 lowest bounds */
                    int at;
                    if (nc < 8) {
                        at = nc++;
                    } else {
                        if (lb[7] <= bound)
                            continue;
                        at = 7;
                    }
                    cand[at] = m;
                    lb[at] = bound;
                    for (int q = at; q > 0 && lb[q] < lb[q - 1]; q--) {
                        double tb = lb[q]; lb[q] = lb[q - 1]; lb[q - 1] = tb;
                        int tc = cand[q]; cand[q] = cand[q - 1]; cand[q - 1] = tc;
                    }
                }
                for (int q = 0; q < nc; q++) {
                    if (lb[q] >= result)
                        break;
                    int m = cand[q];
                    double v = sign * S->rho[(size_t)m * d + k];
                    slice_ctx c = {B, d, S->rho + (size_t)m * d, S->phi + (size_t)m * d,
                                   S->r1, S->p1, k, sign, 0, false};
                    double th = TWO_PI * m / M, xm;
                    double fm = brent_min(slice_fun, &c, th - h, th + h, th, v, theta_tol, &xm);
                    fails += c.fail;
                    if (fm < result)
                        result = fm;
                }
            }
            if (pass == 0)
                lo[k] = result;
            else
                hi[k] = -result;
        }
    }
    if (slope)
        *slope = smax;
    return fails;
}

double tp_amoeba_slice_length(size_t k, const double *lo, const double *hi)
{
    double total = 0, cur_lo = 0, cur_hi = 0;
    bool open = false;
    for (size_t i = 0; i < k; i++) {
        /* intervals are sorted by lo (lo nondecreasing in k) */
        if (!open) {
            cur_lo = lo[i];
            cur_hi = hi[i];
            open = true;
        } else if (lo[i] <= cur_hi) {
            if (hi[i] > cur_hi)
                cur_hi = hi[i];
        } else {
            total += cur_hi - cur_lo;
            cur_lo = lo[i];
            cur_hi = hi[i];
        }
    }
    if (open)
        total += cur_hi - cur_lo;
    return total;
}

/* a reusable slicer along x1 */
typedef struct {
    const tp_amoeba_poly *P;
    fibre B;
    slice_work S;
    double theta_tol;
    double *lo, *hi;
    double slope;        /* max |d rho_k / d theta| seen at the last slice */
    int fails;
    long evals;
} slicer;

static void slicer_clear(slicer *s)
{
    fibre_clear(&s->B);
    slice_work_clear(&s->S);
    free(s->lo);
    free(s->hi);
}

static bool slicer_init(slicer *s, const tp_amoeba_poly *P, const tp_amoeba_options *o,
                        double theta_tol)
{
    memset(s, 0, sizeof *s);
    s->P = P;
    s->theta_tol = theta_tol;
    if (!fibre_init(&s->B, P, 0))
        return false;
    size_t d = s->B.d;
    s->lo = malloc(d * sizeof *s->lo);
    s->hi = malloc(d * sizeof *s->hi);
    if (!s->lo || !s->hi || !slice_work_init(&s->S, d, auto_samples(P, o, 0))) {
        slicer_clear(s);
        return false;
    }
    return true;
}

/* slice at x1 into s->lo, s->hi; returns the slope estimate */
static double slicer_run(slicer *s, double x1)
{
    double slope = 0;
    fibre_at(&s->B, s->P, x1);
    s->fails += sample_circle(&s->B, &s->S);
    s->fails += slice_extrema(&s->B, &s->S, s->theta_tol, s->lo, s->hi, &slope);
    s->evals++;
    s->slope = slope;
    return slope;
}

/* ---- many slices at once, on up to MAX_THREADS threads. Each slice starts cold (its
 * first root solve has no warm start), so the result does not depend on which thread
 * computed it: the output is the same for any number of threads. */

#define MAX_THREADS 4

typedef struct {
    const tp_amoeba_poly *P;
    const tp_amoeba_options *o;
    double ttol;
    const double *xs;
    size_t n, d, start, stride;
    double *lo, *hi, *slope;
    int fails;
    bool nomem;
} batch_part;

static void *batch_worker(void *arg)
{
    batch_part *b = arg;
    slicer s;
    if (!slicer_init(&s, b->P, b->o, b->ttol)) {
        b->nomem = true;
        return NULL;
    }
    for (size_t i = b->start; i < b->n; i += b->stride) {
        slicer_run(&s, b->xs[i]);
        memcpy(b->lo + i * b->d, s.lo, b->d * sizeof *s.lo);
        memcpy(b->hi + i * b->d, s.hi, b->d * sizeof *s.hi);
        if (b->slope)
            b->slope[i] = s.slope;
    }
    b->fails = s.fails;
    slicer_clear(&s);
    return NULL;
}

static int nthreads(size_t n)
{
    long cpu = sysconf(_SC_NPROCESSORS_ONLN);
    long t = cpu < 1 ? 1 : (cpu > MAX_THREADS ? MAX_THREADS : cpu);
    if ((size_t)t > n)
        t = n ? (long)n : 1;
    return (int)t;
}

/* slices at xs[0..n-1] into lo, hi (n * d each) and slope (n, may be NULL). returns 0,
 * or -1 on out of memory; adds the number of failed root iterations to *fails. */
static int slice_batch(const tp_amoeba_poly *P, const tp_amoeba_options *o, double ttol,
                       const double *xs, size_t n, double *lo, double *hi, double *slope,
                       int *fails)
{
    int T = nthreads(n);
    batch_part parts[MAX_THREADS];
    pthread_t th[MAX_THREADS];
    bool started[MAX_THREADS] = {false};
    for (int t = 0; t < T; t++)
        parts[t] = (batch_part){P, o, ttol, xs, n, (size_t)P->deg[1], (size_t)t, (size_t)T,
                                lo, hi, slope, 0, false};
    for (int t = 1; t < T; t++)
        started[t] = pthread_create(&th[t], NULL, batch_worker, &parts[t]) == 0;
    batch_worker(&parts[0]);
    for (int t = 1; t < T; t++) {
        if (started[t])
            pthread_join(th[t], NULL);
        else
            batch_worker(&parts[t]);   /* no thread: do its share here */
    }
    int rc = 0;
    for (int t = 0; t < T; t++) {
        *fails += parts[t].fails;
        if (parts[t].nomem)
            rc = -1;
    }
    return rc;
}

tp_status tp_amoeba_slices(const tp_amoeba_poly *P, const double *xs, size_t n,
                           const tp_amoeba_options *o, double *lo, double *hi, tp_error *err)
{
    tp_amoeba_options def;
    if (!o) {
        tp_amoeba_options_default(&def);
        o = &def;
    }
    if (P->nvars != 2)
        return tp_error_set(err, TP_EDOMAIN, 0, 0, "amoeba slices need 2 variables");
    int fails = 0;
    if (slice_batch(P, o, o->theta_tol, xs, n, lo, hi, NULL, &fails) != 0)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    if (fails)
        return tp_error_set(err, TP_EINTERNAL, 0, 0,
                            "root iteration did not converge in a slice");
    return TP_OK;
}

tp_status tp_amoeba_slice(const tp_amoeba_poly *P, double x1, const tp_amoeba_options *o,
                          double *lo, double *hi, tp_error *err)
{
    tp_amoeba_options def;
    if (!o) {
        tp_amoeba_options_default(&def);
        o = &def;
    }
    if (P->nvars != 2)
        return tp_error_set(err, TP_EDOMAIN, 0, 0, "amoeba slices need 2 variables");
    slicer s;
    if (!slicer_init(&s, P, o, o->theta_tol))
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    slicer_run(&s, x1);
    memcpy(lo, s.lo, s.B.d * sizeof *lo);
    memcpy(hi, s.hi, s.B.d * sizeof *hi);
    int fails = s.fails;
    slicer_clear(&s);
    if (fails)
        return tp_error_set(err, TP_EINTERNAL, 0, 0,
                            "root iteration did not converge in the slice at x1 = %.17g", x1);
    return TP_OK;
}

/* ------------------------------------------------------------------------------------
 * Gauss-Kronrod 7/15 (nodes and weights: the classical values, as tabulated e.g. in
 * Piessens et al., QUADPACK, Springer 1983; checked in t-amoeba by exactness on
 * polynomials up to degree 22). */

static const double xgk[8] = {
    0.991455371120812639206854697526329, 0.949107912342758524526189684047851,
    0.864864423359769072789712788640926, 0.741531185599394439863864773280788,
    0.586087235467691130294144845693013, 0.405845151377397166906606412076961,
    0.207784955007898467600689403773245, 0.000000000000000000000000000000000};
static const double wgk[8] = {
    0.022935322010529224963732008058970, 0.063092092629978553290700663189204,
    0.104790010322250183839876322541518, 0.140653259715525918745189590510238,
    0.169004726639267902826583426598550, 0.190350578064785409913256402421014,
    0.204432940075298892414161999234649, 0.209482141084727828012999174891714};
static const double wg[4] = {
    0.129484966168869693270611432679082, 0.279705391489276667901467771423780,
    0.381830050505118944950369775488975, 0.417959183673469387755102040816327};

/* f evaluates the integrand at n points at once (so that slices can be computed in
 * parallel) into val; aux gets a second integrand (integrated with the Kronrod rule
 * only, for error terms). Returns 0, or -1 on out of memory. */
typedef int (*integrand)(void *ctx, const double *x, size_t n, double *val, double *aux);

static int gk15(integrand f, void *ctx, double a, double b, double *res, double *err,
                double *aux)
{
    double c = 0.5 * (a + b), h = 0.5 * (b - a);
    double x[15], v[15], ax[15];
    x[0] = c;
    for (int j = 0; j < 7; j++) {
        x[1 + 2 * j] = c - h * xgk[j];
        x[2 + 2 * j] = c + h * xgk[j];
    }
    if (f(ctx, x, 15, v, ax) != 0)
        return -1;
    double rk = v[0] * wgk[7], rg = v[0] * wg[3], ra = ax[0] * wgk[7];
    for (int j = 0; j < 7; j++) {
        double f1 = v[1 + 2 * j], f2 = v[2 + 2 * j];
        rk += wgk[j] * (f1 + f2);
        ra += wgk[j] * (ax[1 + 2 * j] + ax[2 + 2 * j]);
        if (j % 2 == 1)
            rg += wg[j / 2] * (f1 + f2);
    }
    *res = rk * h;
    *err = fabs((rk - rg) * h);
    *aux = fabs(ra * h);
    return 0;
}

typedef struct {
    double a, b, res, err, aux;
} gk_interval;

/* Global adaptive integration of f over the given break points (nbrk >= 2), to
 * |error| <= max(abstol, reltol * |result|). returns 0, -1 out of memory, 1 if the
 * interval budget ran out (result and error still set). */
static int adapt(integrand f, void *ctx, const double *brk, size_t nbrk, double abstol,
                 double reltol, size_t maxint, double *result, double *error, double *auxsum)
{
    size_t cap = nbrk + maxint + 1, n = 0;
    gk_interval *iv = malloc(cap * sizeof *iv);
    if (!iv)
        return -1;
    for (size_t k = 0; k + 1 < nbrk; k++) {
        if (!(brk[k + 1] > brk[k]))
            continue;
        iv[n].a = brk[k];
        iv[n].b = brk[k + 1];
        if (gk15(f, ctx, iv[n].a, iv[n].b, &iv[n].res, &iv[n].err, &iv[n].aux) != 0) {
            free(iv);
            return -1;
        }
        n++;
    }
    int rc = 0;
    for (;;) {
        double tot = 0, te = 0;
        size_t worst = 0;
        for (size_t k = 0; k < n; k++) {
            tot += iv[k].res;
            te += iv[k].err;
            if (iv[k].err > iv[worst].err)
                worst = k;
        }
        if (n == 0 || te <= fmax(abstol, reltol * fabs(tot)))
            break;
        if (n + 1 >= cap) {
            rc = 1;
            break;
        }
        double a = iv[worst].a, b = iv[worst].b, m = 0.5 * (a + b);
        if (!(m > a && m < b)) {
            rc = 1;
            break;
        }
        iv[worst].b = m;
        iv[n].a = m;
        iv[n].b = b;
        if (gk15(f, ctx, a, m, &iv[worst].res, &iv[worst].err, &iv[worst].aux) != 0 ||
            gk15(f, ctx, m, b, &iv[n].res, &iv[n].err, &iv[n].aux) != 0) {
            free(iv);
            return -1;
        }
        n++;
    }
    double tot = 0, te = 0, ta = 0;
    for (size_t k = 0; k < n; k++) {
        tot += iv[k].res;
        te += iv[k].err;
        ta += iv[k].aux;
    }
    free(iv);
    *result = tot;
    *error = te;
    if (auxsum)
        *auxsum = ta;
    return rc;
}

/* ------------------------------------------------------------------------------------
 * the box around the Archimedean tropical curve */

void tp_amoeba_box(const tp_amoeba_poly *P, const tp_trop *A, double box[4])
{
    double margin = log(P->nterms > 2 ? (double)(P->nterms - 1) : 2.0) + 2.0;
    bool have = false;
    box[0] = box[2] = INFINITY;
    box[1] = box[3] = -INFINITY;
    if (A && A->complex.n == 2) {
        for (size_t v = 0; v < A->complex.nverts; v++) {
            double x = mpq_get_d(A->complex.verts[2 * v]);
            double y = mpq_get_d(A->complex.verts[2 * v + 1]);
            box[0] = fmin(box[0], x);
            box[1] = fmax(box[1], x);
            box[2] = fmin(box[2], y);
            box[3] = fmax(box[3], y);
            have = true;
        }
    }
    if (!have) {
        /* a vertex solves a 2x2 system with integer matrix: bounded by the spread */
        double lmin = INFINITY, lmax = -INFINITY;
        for (size_t t = 0; t < P->nterms; t++) {
            lmin = fmin(lmin, P->logabs[t]);
            lmax = fmax(lmax, P->logabs[t]);
        }
        double D = (double)(P->deg[0] > P->deg[1] ? P->deg[0] : P->deg[1]);
        double R = 2.0 * D * (lmax - lmin);
        box[0] = box[2] = -R;
        box[1] = box[3] = R;
    }
    box[0] -= margin;
    box[2] -= margin;
    box[1] += margin;
    box[3] += margin;
}

static tp_status default_box(const tp_amoeba_poly *P, double box[4], tp_error *err)
{
    tp_trop A;
    tp_trop_init(&A);
    tp_error e2;
    tp_error_init(&e2, NULL);
    tp_status s = tp_amoeba_archimedean(&A, P, NULL, &e2);
    if (s == TP_ENOMEM) {
        tp_trop_clear(&A);
        return tp_error_set(err, s, 0, 0, "out of memory");
    }
    tp_amoeba_box(P, s == TP_OK ? &A : NULL, box);
    tp_trop_clear(&A);
    return TP_OK;
}

/* x1 positions of vertical tentacles: log-moduli of the roots of the z-polynomials of
 * the lowest and highest w-power. Appends to out (capacity 2*deg[0]), returns count. */
static tp_status tentacles(const tp_amoeba_poly *P, int axis, double *out, size_t *nout,
                           tp_error *err)
{
    int fix = axis, sol = 1 - axis;
    size_t d = (size_t)P->deg[fix];
    *nout = 0;
    double *L = malloc((d + 1) * sizeof *L);
    double _Complex *beta = malloc((d + 1) * sizeof *beta);
    double *rho = malloc((d ? d : 1) * sizeof *rho), *phi = malloc((d ? d : 1) * sizeof *phi);
    tpa_work W;
    tpa_work_init(&W);
    if (!L || !beta || !rho || !phi || !tpa_work_reserve(&W, d)) {
        free(L); free(beta); free(rho); free(phi);
        tpa_work_clear(&W);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    tp_status st = TP_OK;
    for (int side = 0; side < 2; side++) {
        int64_t want = side == 0 ? P->lo[sol] : P->lo[sol] + P->deg[sol];
        for (size_t j = 0; j <= d; j++) {
            L[j] = -INFINITY;
            beta[j] = 0;
        }
        for (size_t t = 0; t < P->nterms; t++) {
            if (P->exps[2 * t + sol] != want)
                continue;
            size_t j = (size_t)(P->exps[2 * t + fix] - P->lo[fix]);
            L[j] = P->logabs[t];
            beta[j] = cos(P->arg[t]) + I * sin(P->arg[t]);
        }
        if (tpa_solve(d, L, beta, rho, phi, false, &W, NULL) != 0) {
            st = tp_error_set(err, TP_EINTERNAL, 0, 0, "root iteration did not converge");
            break;
        }
        for (size_t k = 0; k < d; k++)
            if (isfinite(rho[k]))
                out[(*nout)++] = rho[k];
    }
    free(L); free(beta); free(rho); free(phi);
    tpa_work_clear(&W);
    return st;
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return x < y ? -1 : x > y ? 1 : 0;
}

/* ------------------------------------------------------------------------------------
 * area */

typedef struct {
    const tp_amoeba_poly *P;
    const tp_amoeba_options *o;
    double ttol;
    size_t d;
    double end_err_per_slope;   /* theta_tol * 2 * d */
    int fails;
} area_ctx;

/* number of connected pieces of a slice (intervals closer than gap count as touching) */
static int pieces(size_t d, const double *lo, const double *hi, double gap)
{
    int n = d > 0 ? 1 : 0;
    double top = d > 0 ? hi[0] : 0;
    for (size_t k = 1; k < d; k++) {
        if (lo[k] > top + gap + 1e-12 * (1 + fabs(top)))
            n++;
        top = fmax(top, hi[k]);
    }
    return n;
}

static int slice_pieces(const slicer *s)
{
    return pieces(s->B.d, s->lo, s->hi, 20 * s->theta_tol * s->slope);
}

static int area_fun(void *vctx, const double *x, size_t n, double *val, double *aux)
{
    area_ctx *c = vctx;
    size_t d = c->d;
    double *lo = malloc(n * d * sizeof *lo), *hi = malloc(n * d * sizeof *hi);
    double *slope = malloc(n * sizeof *slope);
    int rc = -1;
    if (lo && hi && slope &&
        slice_batch(c->P, c->o, c->ttol, x, n, lo, hi, slope, &c->fails) == 0) {
        for (size_t i = 0; i < n; i++) {
            double len = tp_amoeba_slice_length(d, lo + i * d, hi + i * d);
            val[i] = isfinite(len) ? len : 0.0;
            /* an end located to theta_tol in theta is off by at most theta_tol * slope
             * at a corner extremum, and much less at a smooth one */
            aux[i] = c->end_err_per_slope * slope[i];
        }
        rc = 0;
    }
    free(lo);
    free(hi);
    free(slope);
    return rc;
}

tp_status tp_amoeba_area(const tp_amoeba_poly *P, const tp_amoeba_options *o, double *area,
                         double *error, tp_error *err)
{
    tp_amoeba_options def;
    if (!o) {
        tp_amoeba_options_default(&def);
        o = &def;
    }
    if (P->nvars != 2)
        return tp_error_set(err, TP_EDOMAIN, 0, 0, "amoeba area needs 2 variables");
    double box[4];
    tp_status st = default_box(P, box, err);
    if (st)
        return st;
    size_t cap = 2 * (size_t)P->deg[0] + 4, nb = 0;
    double *brk = malloc(cap * sizeof *brk);
    if (!brk)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    st = tentacles(P, 0, brk, &nb, err);
    if (st) {
        free(brk);
        return st;
    }
    double a = box[0], b = box[1];
    for (size_t k = 0; k < nb; k++) {
        a = fmin(a, brk[k] - 1);
        b = fmax(b, brk[k] + 1);
    }
    brk[nb++] = a - 60;
    brk[nb++] = a;
    brk[nb++] = b;
    brk[nb++] = b + 60;
    qsort(brk, nb, sizeof *brk, cmp_double);
    size_t u = 0;
    for (size_t k = 0; k < nb; k++)
        if (u == 0 || brk[k] > brk[u - 1] + 1e-12 * (1 + fabs(brk[k])))
            brk[u++] = brk[k];
    /* the ends only need to be a little more accurate than the area */
    double ttol = fmin(1e-4, fmax(1e-10, 0.01 * o->area_tol));
    size_t d = (size_t)P->deg[1];
    area_ctx c = {P, o, ttol, d, ttol * 2.0 * (double)d, 0};
    /* Where a gap opens between two intervals of the slice (the edge of a complement
     * component), the slice length has a square-root corner that can hide from the
     * Gauss-Kronrod error estimate: find those x1 by a scan over the box and
     * bisection, and make them break points. */
    const size_t NS = 256;
    double *xs = malloc((NS + 1) * sizeof *xs), *slo = malloc((NS + 1) * d * sizeof *slo);
    double *shi = malloc((NS + 1) * d * sizeof *shi), *ssl = malloc((NS + 1) * sizeof *ssl);
    double *nbk = realloc(brk, (u + NS + 8) * sizeof *brk);
    slicer sq;
    bool sq_ok = false;
    if (nbk)
        brk = nbk;
    if (!xs || !slo || !shi || !ssl || !nbk || !(sq_ok = slicer_init(&sq, P, o, ttol)))
        goto nomem;
    for (size_t i = 0; i <= NS; i++)
        xs[i] = a + (b - a) * (double)i / (double)NS;
    if (slice_batch(P, o, ttol, xs, NS + 1, slo, shi, ssl, &c.fails) != 0)
        goto nomem;
    {
        size_t nu = u;
        for (size_t i = 1; i <= NS; i++) {
            int prev = pieces(d, slo + (i - 1) * d, shi + (i - 1) * d, 20 * ttol * ssl[i - 1]);
            int cur = pieces(d, slo + i * d, shi + i * d, 20 * ttol * ssl[i]);
            if (cur == prev)
                continue;
            double lo = xs[i - 1], hi = xs[i];
            for (int it = 0; it < 20 && hi - lo > 1e-12 * (1 + fabs(hi)); it++) {
                double m = 0.5 * (lo + hi);
                slicer_run(&sq, m);
                if (slice_pieces(&sq) == prev)
                    lo = m;
                else
                    hi = m;
            }
            if (nu < u + NS + 7)
                brk[nu++] = 0.5 * (lo + hi);
        }
        qsort(brk, nu, sizeof *brk, cmp_double);
        u = 0;
        for (size_t k = 0; k < nu; k++)
            if (u == 0 || brk[k] > brk[u - 1] + 1e-12 * (1 + fabs(brk[k])))
                brk[u++] = brk[k];
    }
    double res = 0, e = 0, ae = 0;
    int rc = adapt(area_fun, &c, brk, u, 0.0, o->area_tol, 4000, &res, &e, &ae);
    int fails = c.fails + sq.fails;
    slicer_clear(&sq);
    free(brk);
    free(xs);
    free(slo);
    free(shi);
    free(ssl);
    if (rc < 0)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    if (fails)
        return tp_error_set(err, TP_EINTERNAL, 0, 0,
                            "root iteration did not converge while computing the area");
    *area = res;
    *error = e + ae;
    return TP_OK;
nomem:
    if (sq_ok)
        slicer_clear(&sq);
    free(brk);
    free(xs);
    free(slo);
    free(shi);
    free(ssl);
    return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
}

/* ------------------------------------------------------------------------------------
 * orders */

static int count_below(const double *rho, size_t d, double x)
{
    int c = 0;
    for (size_t k = 0; k < d; k++)
        if (rho[k] < x)
            c++;
    return c;
}

/* number of z-roots with log|z| < x1 on the fibre w = e^x2 (theta2 = 0); -1 if a root
 * is within 1e-12 of the circle (x is on a tentacle), -2 if the iteration failed */
static int z_count(fibre *Bz, const tp_amoeba_poly *P, double x1, double x2, double *rho,
                   double *phi)
{
    fibre_at(Bz, P, x2);
    if (fibre_solve(Bz, 0.0, rho, phi, false) != 0)
        return -2;
    for (size_t k = 0; k < Bz->d; k++)
        if (fabs(rho[k] - x1) <= 1e-12 * (1 + fabs(x1)))
            return -1;
    return count_below(rho, Bz->d, x1);
}

bool tp_amoeba_order_at(const tp_amoeba_poly *P, double x1, double x2, int64_t order[2])
{
    if (P->nvars != 2)
        return false;
    tp_amoeba_options o;
    tp_amoeba_options_default(&o);
    slicer s;
    fibre Bz;
    if (!slicer_init(&s, P, &o, 1e-9))
        return false;
    if (!fibre_init(&Bz, P, 1)) {
        slicer_clear(&s);
        return false;
    }
    size_t dz = Bz.d;
    double *rho = malloc((dz ? dz : 1) * sizeof *rho), *phi = malloc((dz ? dz : 1) * sizeof *phi);
    bool ok = rho && phi;
    if (ok) {
        slicer_run(&s, x1);
        ok = s.fails == 0;
        size_t d = s.B.d;
        int a2 = 0;
        for (size_t k = 0; k < d && ok; k++) {
            if (x2 >= s.lo[k] && x2 <= s.hi[k])
                ok = false;
            if (s.hi[k] < x2)
                a2++;
        }
        if (ok) {
            int a1 = z_count(&Bz, P, x1, x2, rho, phi);
            ok = a1 >= 0;
            order[0] = P->lo[0] + a1;
            order[1] = P->lo[1] + a2;
        }
    }
    free(rho);
    free(phi);
    fibre_clear(&Bz);
    slicer_clear(&s);
    return ok;
}

/* ------------------------------------------------------------------------------------
 * Ronkin function */

typedef struct {
    fibre *B;
    slice_work *S;     /* samples at M points for warm starts */
    double x2;
    double *rho, *phi;
    int fails;
} ronkin_ctx;

/* log|b_d(z)| + sum_k max(rho_k, x2) at theta (shifted polynomial) */
static double ronkin_val(ronkin_ctx *c, double theta, int *count)
{
    fibre *B = c->B;
    size_t d = B->d;
    int M = c->S->M;
    double u = theta / TWO_PI * M;
    long m = lround(u);
    m = ((m % M) + M) % M;
    memcpy(c->rho, c->S->rho + (size_t)m * d, d * sizeof *c->rho);
    memcpy(c->phi, c->S->phi + (size_t)m * d, d * sizeof *c->phi);
    if (fibre_solve(B, theta, c->rho, c->phi, true) != 0)
        c->fails++;
    double v = B->L[d] + log(cabs(B->beta[d]));
    int cnt = 0;
    for (size_t k = 0; k < d; k++) {
        if (c->rho[k] > c->x2) {
            v += c->rho[k];
            cnt++;
        } else {
            v += c->x2;
        }
    }
    if (count)
        *count = cnt;
    return v;
}

static int ronkin_fun(void *vctx, const double *theta, size_t n, double *val, double *aux)
{
    for (size_t i = 0; i < n; i++) {
        aux[i] = 0;
        val[i] = ronkin_val(vctx, theta[i], NULL);
    }
    return 0;
}

typedef struct {
    ronkin_ctx *c;
    size_t k;
    double sign;
} rho_ctx;

/* sign * (rho_k(theta) - x2) */
static double rho_fun(void *vctx, double theta)
{
    rho_ctx *r = vctx;
    (void)ronkin_val(r->c, theta, NULL);
    return r->sign * (r->c->rho[r->k] - r->c->x2);
}

/* a root of rho_k - x2 in [a, b] where the signs differ, by bisection */
static double rho_cross(rho_ctx *r, double a, double b)
{
    double fa = rho_fun(r, a);
    for (int it = 0; it < 60 && b - a > 1e-15; it++) {
        double m = 0.5 * (a + b), fm = rho_fun(r, m);
        if ((fm > 0) == (fa > 0)) {
            a = m;
            fa = fm;
        } else {
            b = m;
        }
    }
    return 0.5 * (a + b);
}

tp_status tp_amoeba_ronkin(const tp_amoeba_poly *P, double x1, double x2, double *value,
                           double *error, tp_error *err)
{
    if (P->nvars != 2)
        return tp_error_set(err, TP_EDOMAIN, 0, 0, "the Ronkin function needs 2 variables");
    fibre B;
    slice_work S;
    if (!fibre_init(&B, P, 0))
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    size_t d = B.d;
    int M = auto_samples(P, NULL, 0);
    if (!slice_work_init(&S, d, M)) {
        fibre_clear(&B);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    ronkin_ctx c = {&B, &S, x2, S.r1, S.p1, 0};
    fibre_at(&B, P, x1);
    c.fails += sample_circle(&B, &S);
    /* crossings of |w| = e^x2 between samples */
    int *cnt = malloc((size_t)M * sizeof *cnt);
    double *fv = malloc((size_t)M * sizeof *fv);
    double *brk = malloc(((size_t)M + 2) * sizeof *brk);
    tp_status st = TP_OK;
    if (!cnt || !fv || !brk) {
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
        goto done;
    }
    for (int m = 0; m < M; m++)
        fv[m] = ronkin_val(&c, TWO_PI * m / M, &cnt[m]);
    size_t nb = 0;
    for (int m = 0; m < M; m++) {
        int m2 = (m + 1) % M;
        if (cnt[m] == cnt[m2])
            continue;
        double a = TWO_PI * m / M, b = TWO_PI * (m + 1) / M;
        int ca = cnt[m];
        for (int it = 0; it < 60 && b - a > 1e-15; it++) {
            double mid = 0.5 * (a + b);
            int cm;
            (void)ronkin_val(&c, mid, &cm);
            if (cm == ca)
                a = mid;
            else
                b = mid;
        }
        brk[nb++] = 0.5 * (a + b);
    }
    /* dips: rho_k may cross e^x2 twice between two samples. Every sampled local
     * extremum of rho_k that lies on one side of x2 but within the sampling jump of it
     * is refined (Brent); if it crosses, both crossings are located. */
    for (size_t k = 0; k < d; k++) {
        double jump = 0;
        for (int m = 0; m < M; m++) {
            double a = S.rho[(size_t)m * d + k], b = S.rho[(size_t)((m + 1) % M) * d + k];
            if (isfinite(a) && isfinite(b))
                jump = fmax(jump, fabs(b - a));
        }
        for (int m = 0; m < M; m++) {
            double v = S.rho[(size_t)m * d + k];
            double vp = S.rho[(size_t)((m + M - 1) % M) * d + k];
            double vn = S.rho[(size_t)((m + 1) % M) * d + k];
            double sign;
            if (v <= vp && v <= vn && v > x2)
                sign = 1;       /* a minimum above x2: might dip below */
            else if (v >= vp && v >= vn && v < x2)
                sign = -1;      /* a maximum below x2: might rise above */
            else
                continue;
            if (!isfinite(v) || fabs(v - x2) > 2 * jump)
                continue;
            if (nb + 2 > (size_t)M) {
                double *nbk = realloc(brk, (nb + 3 + (size_t)M) * sizeof *brk);
                if (!nbk) {
                    st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
                    goto done;
                }
                brk = nbk;
            }
            rho_ctx r = {&c, k, sign};
            double th = TWO_PI * m / M, h = TWO_PI / M, ts;
            double fs = brent_min(rho_fun, &r, th - h, th + h, th, sign * (v - x2), 1e-13, &ts);
            if (fs >= 0)
                continue;
            brk[nb++] = rho_cross(&r, th - h, ts);
            brk[nb++] = rho_cross(&r, ts, th + h);
        }
    }
    /* breakpoints in [0, 2 pi), sorted, without near-duplicates */
    for (size_t i = 0; i < nb; i++) {
        brk[i] = fmod(brk[i], TWO_PI);
        if (brk[i] < 0)
            brk[i] += TWO_PI;
    }
    qsort(brk, nb, sizeof *brk, cmp_double);
    {
        size_t u = 0;
        for (size_t i = 0; i < nb; i++)
            if (u == 0 || brk[i] > brk[u - 1] + 1e-14)
                brk[u++] = brk[i];
        nb = u;
    }
    double res = 0, e = 0;
    double tol = 1e-12;
    if (nb == 0) {
        /* periodic trapezoid rule, doubling until two levels agree */
        double t1 = 0;
        for (int m = 0; m < M; m++)
            t1 += fv[m];
        t1 /= M;
        long n = M;
        for (;;) {
            double s = 0;
            for (long m = 0; m < n; m++)
                s += ronkin_val(&c, TWO_PI * (m + 0.5) / n, NULL);
            double t2 = 0.5 * (t1 + s / n);
            e = fabs(t2 - t1);
            t1 = t2;
            n *= 2;
            if (e <= tol * fmax(1.0, fabs(t2)) || n > (1L << 18))
                break;
        }
        res = t1;
        /* geometric convergence: the last difference bounds the remaining error */
    } else {
        /* pieces between crossings, wrapped around the circle (brk has room for
         * M + 2 entries and nb <= M + 1 here only if reallocated above) */
        brk[nb] = brk[0] + TWO_PI;
        double r = 0, ee = 0;
        int rc = adapt(ronkin_fun, &c, brk, nb + 1, 1e-13, tol, 20000, &r, &ee, NULL);
        if (rc < 0) {
            st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
            goto done;
        }
        res = r / TWO_PI;
        e = ee / TWO_PI;
    }
    if (c.fails) {
        st = tp_error_set(err, TP_EINTERNAL, 0, 0,
                          "root iteration did not converge in the Ronkin function at "
                          "(%.17g, %.17g)", x1, x2);
        goto done;
    }
    *value = res + (double)P->lo[0] * x1 + (double)P->lo[1] * x2;
    /* the quadrature estimate, but never below the rounding floor of the sums */
    if (error)
        *error = fmax(e, 1e-14 * fmax(1.0, fabs(*value)));
done:
    free(cnt);
    free(fv);
    free(brk);
    slice_work_clear(&S);
    fibre_clear(&B);
    return st;
}

/* ------------------------------------------------------------------------------------
 * lopsidedness */

bool tp_amoeba_lopsided(const tp_amoeba_poly *P, double x1, double x2, size_t *dominant,
                        double *slack)
{
    size_t n = P->nvars, best = 0;
    double mx = -INFINITY;
    for (size_t t = 0; t < P->nterms; t++) {
        double l = P->logabs[t] + (double)P->exps[t * n] * x1 +
                   (n > 1 ? (double)P->exps[t * n + 1] * x2 : 0.0);
        if (l > mx) {
            mx = l;
            best = t;
        }
    }
    double sum = 0;
    for (size_t t = 0; t < P->nterms; t++) {
        if (t == best)
            continue;
        double l = P->logabs[t] + (double)P->exps[t * n] * x1 +
                   (n > 1 ? (double)P->exps[t * n + 1] * x2 : 0.0);
        sum += exp(l - mx);
    }
    *dominant = best;
    *slack = (1.0 - sum) / (1.0 + sum);
    return sum < 1.0;
}

/* ------------------------------------------------------------------------------------
 * complement components */

static bool newton_hull(const tp_amoeba_poly *P, int64_t **hout, size_t *nh);
static bool in_hull(const int64_t *h, size_t nh, const int64_t a[2], bool strict);

typedef struct {
    int64_t order[2];
    double x1, glo, ghi;     /* a gap of the slice at x1 */
} gap_obs;

typedef struct {
    gap_obs *v;
    size_t n, cap;
} gap_list;

static bool gap_push(gap_list *g, const gap_obs *o)
{
    if (g->n == g->cap) {
        size_t nc = g->cap ? 2 * g->cap : 256;
        gap_obs *nv = realloc(g->v, nc * sizeof *nv);
        if (!nv)
            return false;
        g->v = nv;
        g->cap = nc;
    }
    g->v[g->n++] = *o;
    return true;
}

typedef struct {
    const tp_amoeba_poly *P;
    slicer s;
    fibre Bz;
    double *zr, *zp;
    gap_list gaps;
    int64_t *hull;           /* Newton polygon vertices, counter-clockwise */
    size_t nh;
    int fails;
} sweep;

/* gaps of the slice at x1 (orders, appended to the list); sig gets a signature (hash of
 * the order sequence) so columns can be compared */
static bool sweep_gaps(sweep *W, double x1, const double *lo, const double *hi, double slope,
                       uint64_t *sig)
{
    const tp_amoeba_poly *P = W->P;
    size_t d = W->s.B.d;
    uint64_t h = 1469598103934665603u;
    /* running maximum of hi: a gap above interval k needs every earlier interval below */
    double top = -INFINITY;
    for (size_t k = 0; k <= d; k++) {
        double glo = k == 0 ? -INFINITY : top;
        double ghi = k == d ? INFINITY : lo[k];
        if (k < d)
            top = fmax(top, hi[k]);
        if (!(ghi > glo))
            continue;
        if (isnan(glo) || isnan(ghi))
            continue;
        /* an end located to theta_tol can be off by theta_tol * slope at a corner (two
         * roots of equal modulus, where intervals touch): smaller gaps are not gaps */
        if (isfinite(glo) && isfinite(ghi) &&
            ghi - glo <= 20 * W->s.theta_tol * slope + 1e-9 * (1 + fabs(ghi)))
            continue;
        double x2;
        if (isfinite(glo) && isfinite(ghi))
            x2 = 0.5 * (glo + ghi);
        else if (isfinite(ghi))
            x2 = ghi - 1.0;
        else if (isfinite(glo))
            x2 = glo + 1.0;
        else
            continue;
        int a1 = z_count(&W->Bz, P, x1, x2, W->zr, W->zp);
        if (a1 < 0) {
            /* on a tentacle (numerically on the amoeba): not a gap */
            W->fails += a1 == -2;
            continue;
        }
        gap_obs o = {{P->lo[0] + a1, P->lo[1] + (int64_t)k}, x1, glo, ghi};
        if (!in_hull(W->hull, W->nh, o.order, false)) {
            /* orders lie in the Newton polygon (Forsberg-Passare-Tsikh): this "gap" is a
             * numerical artefact of a point on the amoeba */
            continue;
        }
        if (!gap_push(&W->gaps, &o))
            return false;
        h = (h ^ (uint64_t)(o.order[0] * 1000003 + o.order[1])) * 1099511628211u;
    }
    *sig = h;
    return true;
}

static bool sweep_column(sweep *W, double x1, uint64_t *sig)
{
    slicer_run(&W->s, x1);
    return sweep_gaps(W, x1, W->s.lo, W->s.hi, W->s.slope, sig);
}

static bool sweep_bisect(sweep *W, double a, uint64_t sa, double b, uint64_t sb, int depth)
{
    if (sa == sb || depth <= 0)
        return true;
    double m = 0.5 * (a + b);
    uint64_t sm;
    if (!sweep_column(W, m, &sm))
        return false;
    return sweep_bisect(W, a, sa, m, sm, depth - 1) && sweep_bisect(W, m, sm, b, sb, depth - 1);
}

static int cmp_gap(const void *pa, const void *pb)
{
    const gap_obs *a = pa, *b = pb;
    if (a->order[0] != b->order[0]) return a->order[0] < b->order[0] ? -1 : 1;
    if (a->order[1] != b->order[1]) return a->order[1] < b->order[1] ? -1 : 1;
    if (a->x1 != b->x1) return a->x1 < b->x1 ? -1 : 1;
    return 0;
}

/* Is the lattice point (a0, a1) a vertex of the Newton polygon? Then put a direction in
 * the interior of its normal cone (max convention: <alpha - beta, u> > 0 for all other
 * exponents beta) into u. */
static bool vertex_direction(const tp_amoeba_poly *P, int64_t a0, int64_t a1, double u[2])
{
    /* try directions around the circle; a vertex has an open normal cone */
    for (int k = 0; k < 720; k++) {
        double t = TWO_PI * (k + 0.5) / 720;
        double c = cos(t), s = sin(t);
        bool ok = true;
        for (size_t q = 0; q < P->nterms && ok; q++) {
            int64_t b0 = P->exps[2 * q], b1 = P->exps[2 * q + 1];
            if (b0 == a0 && b1 == a1)
                continue;
            if ((double)(a0 - b0) * c + (double)(a1 - b1) * s <= 1e-9)
                ok = false;
        }
        if (ok) {
            u[0] = c;
            u[1] = s;
            return true;
        }
    }
    return false;
}

static int cmp_comp(const void *pa, const void *pb)
{
    const tp_amoeba_component *a = pa, *b = pb;
    if (a->order[0] != b->order[0]) return a->order[0] < b->order[0] ? -1 : 1;
    if (a->order[1] != b->order[1]) return a->order[1] < b->order[1] ? -1 : 1;
    return 0;
}

tp_status tp_amoeba_components(const tp_amoeba_poly *P, const tp_amoeba_options *o,
                               const double *box_in, tp_amoeba_component **out, size_t *nout,
                               tp_error *err)
{
    tp_amoeba_options def;
    if (!o) {
        tp_amoeba_options_default(&def);
        o = &def;
    }
    *out = NULL;
    *nout = 0;
    if (P->nvars != 2)
        return tp_error_set(err, TP_EDOMAIN, 0, 0, "amoeba components need 2 variables");
    double box[4];
    if (box_in) {
        memcpy(box, box_in, sizeof box);
    } else {
        tp_status st = default_box(P, box, err);
        if (st)
            return st;
    }
    sweep W;
    memset(&W, 0, sizeof W);
    W.P = P;
    bool ok = slicer_init(&W.s, P, o, 1e-5) && fibre_init(&W.Bz, P, 1) &&
              newton_hull(P, &W.hull, &W.nh);
    size_t dz = (size_t)P->deg[0];
    W.zr = malloc((dz ? dz : 1) * sizeof *W.zr);
    W.zp = malloc((dz ? dz : 1) * sizeof *W.zp);
    tp_amoeba_component *C = NULL;
    size_t nc = 0;
    tp_status st = TP_OK;
    if (!ok || !W.zr || !W.zp)
        goto nomem;
    int cols = o->sweep_columns > 2 ? o->sweep_columns : 3;
    {
        size_t d = (size_t)P->deg[1];
        double *xs = malloc((size_t)cols * sizeof *xs);
        double *lo = malloc((size_t)cols * d * sizeof *lo), *hi = malloc((size_t)cols * d * sizeof *hi);
        double *sl = malloc((size_t)cols * sizeof *sl);
        bool good = xs && lo && hi && sl;
        if (good) {
            for (int c = 0; c < cols; c++)
                xs[c] = box[0] + (box[1] - box[0]) * (c + 0.5) / cols;
            good = slice_batch(P, o, W.s.theta_tol, xs, (size_t)cols, lo, hi, sl, &W.fails) == 0;
        }
        uint64_t prevsig = 0;
        for (int c = 0; c < cols && good; c++) {
            uint64_t sig;
            good = sweep_gaps(&W, xs[c], lo + (size_t)c * d, hi + (size_t)c * d, sl[c], &sig);
            if (good && c > 0)
                good = sweep_bisect(&W, xs[c - 1], prevsig, xs[c], sig, 7);
            prevsig = sig;
        }
        free(xs);
        free(lo);
        free(hi);
        free(sl);
        if (!good)
            goto nomem;
    }
    /* group observations by order; pick the deepest point of each */
    qsort(W.gaps.v, W.gaps.n, sizeof *W.gaps.v, cmp_gap);
    size_t maxc = W.gaps.n + (size_t)(P->nterms) + 1;
    C = calloc(maxc, sizeof *C);
    if (!C)
        goto nomem;
    double colw = (box[1] - box[0]) / cols;
    for (size_t i = 0; i < W.gaps.n;) {
        size_t j = i;
        while (j < W.gaps.n && W.gaps.v[j].order[0] == W.gaps.v[i].order[0] &&
               W.gaps.v[j].order[1] == W.gaps.v[i].order[1])
            j++;
        /* runs of observations closer than a column width apart */
        double best = -INFINITY;
        size_t bi = i;
        size_t r0 = i;
        for (size_t k = i; k < j; k++) {
            if (k > i && W.gaps.v[k].x1 - W.gaps.v[k - 1].x1 > 1.01 * colw)
                r0 = k;
            size_t r1 = k;
            while (r1 + 1 < j && W.gaps.v[r1 + 1].x1 - W.gaps.v[r1].x1 <= 1.01 * colw)
                r1++;
            double half = 0.5 * (W.gaps.v[k].ghi - W.gaps.v[k].glo);
            double side = fmin(W.gaps.v[k].x1 - W.gaps.v[r0].x1, W.gaps.v[r1].x1 - W.gaps.v[k].x1);
            double score = fmin(half, side + 0.5 * colw);
            if (score > best) {
                best = score;
                bi = k;
            }
        }
        const gap_obs *g = &W.gaps.v[bi];
        tp_amoeba_component *E = &C[nc++];
        E->order[0] = g->order[0];
        E->order[1] = g->order[1];
        E->point[0] = g->x1;
        double depth = fmin(fmax(best, 0.5), 1.5);
        if (isfinite(g->glo) && isfinite(g->ghi))
            E->point[1] = 0.5 * (g->glo + g->ghi);
        else if (isfinite(g->ghi))
            E->point[1] = g->ghi - depth;
        else
            E->point[1] = g->glo + depth;
        i = j;
    }
    /* every vertex of the Newton polygon: look far out in its normal cone if missing */
    for (size_t t = 0; t < P->nterms; t++) {
        int64_t a0 = P->exps[2 * t], a1 = P->exps[2 * t + 1];
        bool found = false;
        for (size_t k = 0; k < nc && !found; k++)
            found = C[k].order[0] == a0 && C[k].order[1] == a1;
        double u[2];
        if (found || !vertex_direction(P, a0, a1, u))
            continue;
        double cx = 0.5 * (box[0] + box[1]), cy = 0.5 * (box[2] + box[3]);
        double R = 0.5 * fmax(box[1] - box[0], box[3] - box[2]);
        for (int it = 0; it < 60; it++, R *= 1.5) {
            size_t dom;
            double slack;
            double x = cx + R * u[0], y = cy + R * u[1];
            if (tp_amoeba_lopsided(P, x, y, &dom, &slack) && dom == t && slack > 0.5) {
                tp_amoeba_component *E = &C[nc++];
                E->order[0] = a0;
                E->order[1] = a1;
                E->point[0] = x;
                E->point[1] = y;
                break;
            }
        }
    }
    qsort(C, nc, sizeof *C, cmp_comp);
    for (size_t k = 0; k < nc; k++) {
        tp_amoeba_component *E = &C[k];
        E->bounded = in_hull(W.hull, W.nh, E->order, true);
        E->vertex = false;
        for (size_t q = 0; q < W.nh; q++)
            if (W.hull[2 * q] == E->order[0] && W.hull[2 * q + 1] == E->order[1])
                E->vertex = true;
        double N = 0, ne = 0;
        st = tp_amoeba_ronkin(P, E->point[0], E->point[1], &N, &ne, err);
        if (st)
            goto fail;
        E->ronkin = N - (double)E->order[0] * E->point[0] - (double)E->order[1] * E->point[1];
        E->ronkin_error = ne;
    }
    if (W.fails + W.s.fails) {
        st = tp_error_set(err, TP_EINTERNAL, 0, 0,
                          "root iteration did not converge during the component sweep");
        goto fail;
    }
    free(W.gaps.v);
    free(W.zr);
    free(W.zp);
    free(W.hull);
    slicer_clear(&W.s);
    fibre_clear(&W.Bz);
    *out = C;
    *nout = nc;
    return TP_OK;
nomem:
    st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
fail:
    free(C);
    free(W.gaps.v);
    free(W.zr);
    free(W.zp);
    free(W.hull);
    slicer_clear(&W.s);
    fibre_clear(&W.Bz);
    return st;
}

/* ------------------------------------------------------------------------------------
 * spine and Archimedean curve through the exact pipeline */

static tp_status trop_from_heights(tp_trop *T, size_t n, const int64_t *exps,
                                   const double *h, tp_error *err)
{
    /* the point set as CSV text "a1,a2,h" with exact rational heights */
    size_t cap = 256, len = 0;
    char *buf = malloc(cap);
    mpq_t q;
    mpq_init(q);
    tp_status st = TP_OK;
    if (!buf) {
        mpq_clear(q);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    for (size_t k = 0; k < n; k++) {
        if (!isfinite(h[k])) {
            st = tp_error_set(err, TP_EDOMAIN, 0, 0, "a height is not finite");
            goto done;
        }
        mpq_set_d(q, h[k]);
        size_t need = mpz_sizeinbase(mpq_numref(q), 10) + mpz_sizeinbase(mpq_denref(q), 10) + 64;
        if (len + need >= cap) {
            size_t nc = 2 * (len + need);
            char *nb = realloc(buf, nc);
            if (!nb) {
                st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
                goto done;
            }
            buf = nb;
            cap = nc;
        }
        len += (size_t)snprintf(buf + len, cap - len, "%lld,%lld,", (long long)exps[2 * k],
                                (long long)exps[2 * k + 1]);
        mpq_get_str(buf + len, 10, q);
        len += strlen(buf + len);
        buf[len++] = '\n';
        buf[len] = 0;
    }
    tp_points pts;
    tp_points_init(&pts);
    st = tp_points_read_csv(&pts, buf, len, err);
    if (st == TP_OK) {
        tp_trop_options to;
        memset(&to, 0, sizeof to);
        to.max = true;
        to.engine = TP_ENGINE_AUTO;
        st = tp_trop_from_points(T, &pts, &to, err);
    }
    tp_points_clear(&pts);
done:
    mpq_clear(q);
    free(buf);
    return st;
}

static tp_status set_vars(tp_trop *T, char *const *vars, tp_error *err)
{
    if (!vars || T->nvars != 2)
        return TP_OK;
    for (size_t v = 0; v < 2; v++) {
        char *c = strdup(vars[v]);
        if (!c)
            return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
        if (T->vars) {
            free(T->vars[v]);
            T->vars[v] = c;
        } else {
            free(c);
        }
    }
    return TP_OK;
}

tp_status tp_amoeba_spine(tp_trop *T, const tp_amoeba_component *comp, size_t n,
                          char *const *vars, tp_error *err)
{
    int64_t *e = malloc((n ? n : 1) * 2 * sizeof *e);
    double *h = malloc((n ? n : 1) * sizeof *h);
    if (!e || !h) {
        free(e);
        free(h);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    for (size_t k = 0; k < n; k++) {
        e[2 * k] = comp[k].order[0];
        e[2 * k + 1] = comp[k].order[1];
        h[k] = comp[k].ronkin;
    }
    tp_status st = trop_from_heights(T, n, e, h, err);
    free(e);
    free(h);
    if (st == TP_OK)
        st = set_vars(T, vars, err);
    return st;
}

tp_status tp_amoeba_archimedean(tp_trop *T, const tp_amoeba_poly *P, char *const *vars,
                                tp_error *err)
{
    if (P->nvars != 2)
        return tp_error_set(err, TP_EDOMAIN, 0, 0, "the Archimedean curve needs 2 variables");
    tp_status st = trop_from_heights(T, P->nterms, P->exps, P->logabs, err);
    if (st == TP_OK)
        st = set_vars(T, vars, err);
    return st;
}

/* The vertices of the Newton polygon, counter-clockwise (monotone chain; collinear
 * points dropped), in the input's exponents: malloc'ed into *h (2 * *nh entries).
 * Exponents are within MAX_DEGREE of each other, so int64 products are exact.
 * returns false on out of memory. */
static bool newton_hull(const tp_amoeba_poly *P, int64_t **hout, size_t *nh)
{
    size_t N = P->nterms;
    int64_t *pt = malloc(2 * N * sizeof *pt), *h = malloc((4 * N + 2) * sizeof *h);
    if (!pt || !h) {
        free(pt);
        free(h);
        return false;
    }
    memcpy(pt, P->exps, 2 * N * sizeof *pt);
    /* insertion sort by (x, y) */
    for (size_t i = 1; i < N; i++)
        for (size_t j = i; j > 0 && (pt[2 * j - 2] > pt[2 * j] ||
                                     (pt[2 * j - 2] == pt[2 * j] && pt[2 * j - 1] > pt[2 * j + 1]));
             j--) {
            int64_t a = pt[2 * j], b = pt[2 * j + 1];
            pt[2 * j] = pt[2 * j - 2];
            pt[2 * j + 1] = pt[2 * j - 1];
            pt[2 * j - 2] = a;
            pt[2 * j - 1] = b;
        }
    size_t k = 0;
    for (int pass = 0; pass < 2; pass++) {
        size_t start = k;
        for (size_t ii = 0; ii < N; ii++) {
            size_t i = pass == 0 ? ii : N - 1 - ii;
            while (k >= start + 2) {
                int64_t *a = h + 2 * (k - 2), *b = h + 2 * (k - 1), *c = pt + 2 * i;
                int64_t cr = (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]);
                if (cr <= 0)
                    k--;
                else
                    break;
            }
            h[2 * k] = pt[2 * i];
            h[2 * k + 1] = pt[2 * i + 1];
            k++;
        }
        k--;   /* the last point starts the other chain */
    }
    free(pt);
    *hout = h;
    *nh = k;
    return true;
}

/* Is a in the polygon h (counter-clockwise, nh >= 3 vertices)? strict: in its interior. */
static bool in_hull(const int64_t *h, size_t nh, const int64_t a[2], bool strict)
{
    for (size_t i = 0; i < nh; i++) {
        const int64_t *A = h + 2 * i, *B = h + 2 * ((i + 1) % nh);
        int64_t cr = (B[0] - A[0]) * (a[1] - A[1]) - (B[1] - A[1]) * (a[0] - A[0]);
        if (cr < 0 || (strict && cr == 0))
            return false;
    }
    return true;
}

double tp_amoeba_delta_area(const tp_amoeba_poly *P)
{
    if (P->nvars != 2 || P->nterms < 3)
        return 0;
    int64_t *h;
    size_t k;
    if (!newton_hull(P, &h, &k))
        return NAN;
    int64_t twice = 0;
    for (size_t i = 0; i < k; i++) {
        size_t j = (i + 1) % k;
        twice += (h[2 * i] - P->lo[0]) * (h[2 * j + 1] - P->lo[1]) -
                 (h[2 * j] - P->lo[0]) * (h[2 * i + 1] - P->lo[1]);
    }
    free(h);
    return 0.5 * (double)(twice < 0 ? -twice : twice);
}

/* ------------------------------------------------------------------------------------
 * raster mask */

tp_status tp_amoeba_mask(const tp_amoeba_poly *P, const double box[4], size_t w, size_t h,
                         float *cov, tp_error *err)
{
    if (P->nvars != 2)
        return tp_error_set(err, TP_EDOMAIN, 0, 0, "amoeba pictures need 2 variables");
    if (w == 0 || h == 0 || !(box[0] < box[1]) || !(box[2] < box[3]))
        return tp_error_set(err, TP_EDOMAIN, 0, 0, "amoeba mask: expected a nonempty grid and box");
    tp_amoeba_options o;
    tp_amoeba_options_default(&o);
    double dx = (box[1] - box[0]) / (double)w, dy = (box[3] - box[2]) / (double)h;
    /* ends to a small fraction of a pixel */
    o.theta_tol = fmin(1e-3, 0.05 * fmin(dx, dy));
    size_t d = (size_t)P->deg[1];
    double *xs = malloc(w * sizeof *xs), *lo = malloc(w * d * sizeof *lo);
    double *hi = malloc(w * d * sizeof *hi);
    tp_status st = TP_OK;
    if (!xs || !lo || !hi) {
        st = tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
        goto done;
    }
    for (size_t i = 0; i < w; i++)
        xs[i] = box[0] + ((double)i + 0.5) * dx;
    st = tp_amoeba_slices(P, xs, w, &o, lo, hi, err);
    if (st)
        goto done;
    for (size_t i = 0; i < w; i++) {
        for (size_t j = 0; j < h; j++)
            cov[j * w + i] = 0;
        /* the union of the intervals (sorted by lo), piece by piece */
        size_t k = 0;
        while (k < d) {
            double a = lo[i * d + k], b = hi[i * d + k];
            for (k++; k < d && lo[i * d + k] <= b; k++)
                b = fmax(b, hi[i * d + k]);
            /* rows overlapped by [a, b]: row j covers [top - (j+1) dy, top - j dy] */
            double ja = (box[3] - b) / dy, jb = (box[3] - a) / dy;
            if (jb < 0 || ja > (double)h || !(jb >= ja))
                continue;
            size_t j0 = ja < 0 ? 0 : (size_t)ja;
            size_t j1 = jb >= (double)h ? h - 1 : (size_t)jb;
            for (size_t j = j0; j <= j1; j++) {
                double r0 = fmax(ja, (double)j), r1 = fmin(jb, (double)j + 1);
                if (r1 > r0)
                    cov[j * w + i] = fminf(1.0f, cov[j * w + i] + (float)(r1 - r0));
            }
        }
    }
done:
    free(xs);
    free(lo);
    free(hi);
    return st;
}
