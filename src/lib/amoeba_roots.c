/* amoeba_roots.c — all roots of a complex polynomial by the Aberth–Ehrlich iteration.
 *
 * Method: O. Aberth, "Iteration methods for finding all zeros of a polynomial
 * simultaneously", Math. Comp. 27 (1973) 339–344; L. W. Ehrlich, "A modified Newton
 * method for polynomials", Comm. ACM 10 (1967) 107–108. Implementation choices follow
 * D. A. Bini, "Numerical computation of polynomial zeros by means of Aberth's method",
 * Numer. Algorithms 13 (1996) 179–200 (sections and constants from memory):
 *   - starting points on circles whose radii come from the upper convex hull of the
 *     points (j, log|a_j|) (the Newton polygon of the moduli);
 *   - Gauss–Seidel updates (each new approximation is used at once);
 *   - the Newton correction is evaluated by Horner's rule in w when |w| <= 1 and in 1/w
 *     (reversed polynomial) when |w| > 1, so nothing overflows;
 *   - stopping test: an approximation is frozen once |p(w)| <= 4 d eps * sum |a_j||w|^j,
 *     i.e. w is an exact root of a polynomial whose coefficients differ from the given
 *     ones by about 4 d units in the last place (a backward-error test; Horner's own
 *     rounding error is of that size, so iterating further cannot improve w).
 *
 * Scaling: the polynomial is split at vertices of the Newton polygon where consecutive
 * root-radius estimates differ by more than GAP (in log scale); each factor is solved in
 * its own scaled variable w = e^sigma u. Dropping the other factors' terms changes each
 * root by a relative e^-GAP, far below double precision.
 */
#include "amoeba_internal.h"

#include <float.h>
#include <math.h>
#include <stdlib.h>

#define GAP 45.0

/* |z| and a/b without the overflow guards and NaN/infinity rules of the C library
 * (hypot, __divdc3), which dominate the run time otherwise; the values here are scaled
 * (moduli within about 1e+-150), so plain formulas are exact enough. */
static inline double cabs_fast(double _Complex z)
{
    double x = creal(z), y = cimag(z);
    return sqrt(x * x + y * y);
}

static inline double _Complex cdiv_fast(double _Complex a, double _Complex b)
{
    double br = creal(b), bi = cimag(b), n = br * br + bi * bi;
    double ar = creal(a), ai = cimag(a);
    return ((ar * br + ai * bi) / n) + I * ((ai * br - ar * bi) / n);
}
#define MAXIT_WARM 50
#define MAXIT_COLD 500

void tpa_work_init(tpa_work *W)
{
    W->cap = 0;
    W->c = W->u = NULL;
    W->y = W->absc = W->tmp = NULL;
    W->hull = W->idx = NULL;
    W->done = NULL;
}

void tpa_work_clear(tpa_work *W)
{
    free(W->c);
    free(W->u);
    free(W->y);
    free(W->absc);
    free(W->tmp);
    free(W->hull);
    free(W->idx);
    free(W->done);
    tpa_work_init(W);
}

bool tpa_work_reserve(tpa_work *W, size_t d)
{
    size_t n = d + 1;
    if (n <= W->cap)
        return true;
    tpa_work_clear(W);
    W->c = malloc(n * sizeof *W->c);
    W->u = malloc(n * sizeof *W->u);
    W->y = malloc(n * sizeof *W->y);
    W->absc = malloc(n * sizeof *W->absc);
    W->tmp = malloc(2 * n * sizeof *W->tmp);
    W->hull = malloc(n * sizeof *W->hull);
    W->idx = malloc(n * sizeof *W->idx);
    W->done = malloc(n * sizeof *W->done);
    if (!W->c || !W->u || !W->y || !W->absc || !W->tmp || !W->hull || !W->idx || !W->done) {
        tpa_work_clear(W);
        return false;
    }
    W->cap = n;
    return true;
}

/* Newton correction p(w)/p'(w) of sum_{j<=m} c_j w^j and the convergence flag. */
static double _Complex newton(size_t m, const double _Complex *c, const double *absc,
                             double _Complex w, bool *conv)
{
    double r = cabs_fast(w);
    double tol = 4.0 * (double)m * DBL_EPSILON;
    if (r <= 1.0) {
        double _Complex p = c[m], dp = 0;
        double s = absc[m];
        for (size_t j = m; j-- > 0;) {
            dp = dp * w + p;
            p = p * w + c[j];
            s = s * r + absc[j];
        }
        *conv = cabs_fast(p) <= tol * s;
        if (dp == 0)
            return 0;
        return cdiv_fast(p, dp);
    }
    /* R(v) = sum c_j v^(m-j), v = 1/w: p(w) = w^m R(v), p'(w) = w^(m-1) (m R - v R'). */
    double _Complex v = cdiv_fast(1.0, w);
    double rv = 1.0 / r;
    double _Complex R = c[0], dR = 0;
    double s = absc[0];
    for (size_t j = 1; j <= m; j++) {
        dR = dR * v + R;
        R = R * v + c[j];
        s = s * rv + absc[j];
    }
    *conv = cabs_fast(R) <= tol * s;
    double _Complex den = (double)m * R - v * dR;
    if (den == 0)
        return 0;
    return cdiv_fast(w * R, den);
}

/* Starting points on circles from the upper hull of (j, y[j]) for j in [a, b] (indices
 * relative to the group), radii in the scaled variable. */
static void initial_points(size_t m, const double *y, size_t *hull, double _Complex *u)
{
    size_t h = 0;
    for (size_t j = 0; j <= m; j++) {
        if (!isfinite(y[j]))
            continue;
        while (h >= 2) {
            size_t p = hull[h - 2], q = hull[h - 1];
            /* q is below or on the segment p..j: drop it */
            double cross = (y[q] - y[p]) * (double)(j - p) - (y[j] - y[p]) * (double)(q - p);
            if (cross <= 0)
                h--;
            else
                break;
        }
        hull[h++] = j;
    }
    const double twopi = 6.283185307179586;
    for (size_t e = 0; e + 1 < h; e++) {
        size_t p = hull[e], q = hull[e + 1];
        size_t n = q - p;
        double logr = (y[p] - y[q]) / (double)n;
        double rad = exp(logr);
        for (size_t i = 0; i < n; i++) {
            double ang = twopi * (double)i / (double)n + twopi * (double)p / (double)m + 0.4;
            u[p + i] = rad * (cos(ang) + I * sin(ang));
        }
    }
}

/* Aberth iteration on the group polynomial c[0..m] (c[0], c[m] != 0), roots in u.
 * Returns the number of sweeps, or -1 if not converged within maxit. */
static int aberth(size_t m, const double _Complex *c, const double *absc, double _Complex *u,
                  bool *done, int maxit)
{
    for (size_t k = 0; k < m; k++)
        done[k] = false;
    if (m == 1) {
        u[0] = -cdiv_fast(c[0], c[1]);
        return 1;
    }
    for (int it = 1; it <= maxit; it++) {
        size_t left = 0;
        for (size_t k = 0; k < m; k++) {
            if (done[k])
                continue;
            bool conv;
            double _Complex N = newton(m, c, absc, u[k], &conv);
            if (conv || !isfinite(creal(N)) || !isfinite(cimag(N))) {
                done[k] = conv;
                if (!conv) {
                    /* a degenerate point: nudge it and go on */
                    u[k] = u[k] * (1.0 + 1e-3 * I) + 1e-3;
                    left++;
                }
                continue;
            }
            double _Complex S = 0;
            for (size_t j = 0; j < m; j++) {
                if (j == k)
                    continue;
                double _Complex dz = u[k] - u[j];
                if (dz == 0)
                    dz = DBL_EPSILON * (1.0 + cabs_fast(u[k]));
                S += cdiv_fast(1.0, dz);
            }
            double _Complex den = 1.0 - N * S;
            double _Complex step = den == 0 ? N : cdiv_fast(N, den);
            u[k] -= step;
            left++;
        }
        if (left == 0)
            return it;
    }
    return -1;
}

static int cmp_root(const void *a, const void *b)
{
    const double *x = a, *y = b;
    if (x[0] < y[0]) return -1;
    if (x[0] > y[0]) return 1;
    if (x[1] < y[1]) return -1;
    if (x[1] > y[1]) return 1;
    return 0;
}

int tpa_solve(size_t d, const double *L, const double _Complex *beta, double *rho,
              double *phi, bool warm, tpa_work *W, int *iters)
{
    int status = 0, maxused = 0;
    /* y_j = log|coefficient j| */
    size_t jmin = d + 1, jmax = 0;
    for (size_t j = 0; j <= d; j++) {
        double a = cabs_fast(beta[j]);
        W->y[j] = (a > 0 && L[j] > -INFINITY) ? L[j] + log(a) : -INFINITY;
        if (isfinite(W->y[j])) {
            if (jmin > d)
                jmin = j;
            jmax = j;
        }
    }
    if (jmin > d) {
        /* the zero polynomial: report every root at 0 (callers never pass it) */
        for (size_t k = 0; k < d; k++) {
            rho[k] = -INFINITY;
            phi[k] = 0;
        }
        return -1;
    }
    /* warm start is usable only if the numbers of zero and infinite roots agree */
    if (warm) {
        for (size_t k = 0; k < d; k++) {
            bool zero = k < jmin, inf = k >= jmax;
            if (zero != (rho[k] == -INFINITY) || inf != (rho[k] == INFINITY)) {
                warm = false;
                break;
            }
        }
    }
    /* upper hull of (j, y_j) over the whole range */
    size_t *hull = W->hull, h = 0;
    for (size_t j = jmin; j <= jmax; j++) {
        if (!isfinite(W->y[j]))
            continue;
        while (h >= 2) {
            size_t p = hull[h - 2], q = hull[h - 1];
            double cross = (W->y[q] - W->y[p]) * (double)(j - p) -
                           (W->y[j] - W->y[p]) * (double)(q - p);
            if (cross <= 0)
                h--;
            else
                break;
        }
        hull[h++] = j;
    }
    for (size_t k = 0; k < jmin; k++) {
        rho[k] = -INFINITY;
        phi[k] = 0;
    }
    for (size_t k = jmax; k < d; k++) {
        rho[k] = INFINITY;
        phi[k] = 0;
    }
    /* groups: runs of hull edges whose radius estimates differ by at most GAP */
    size_t e = 0;
    size_t nh = h;
    double *hull_r = W->tmp, *ys = W->tmp + W->cap;
    for (size_t i = 0; i + 1 < nh; i++)
        hull_r[i] = (W->y[hull[i]] - W->y[hull[i + 1]]) / (double)(hull[i + 1] - hull[i]);
    while (e + 1 < nh) {
        size_t f = e + 1;   /* group covers hull edges e..f-1 */
        while (f + 1 < nh && hull_r[f] - hull_r[f - 1] <= GAP)
            f++;
        size_t ja = hull[e], jb = hull[f], m = jb - ja;
        double sigma = 0.5 * (hull_r[e] + hull_r[f - 1]);
        double M = -INFINITY;
        for (size_t j = ja; j <= jb; j++)
            if (isfinite(W->y[j]))
                M = fmax(M, W->y[j] + (double)(j - ja) * sigma);
        for (size_t j = ja; j <= jb; j++) {
            size_t i = j - ja;
            if (!isfinite(W->y[j])) {
                W->c[i] = 0;
                W->absc[i] = 0;
                ys[i] = -INFINITY;
                continue;
            }
            double sc = L[j] + (double)i * sigma - M;
            W->c[i] = exp(sc) * beta[j];
            W->absc[i] = cabs_fast(W->c[i]);
            ys[i] = W->y[j] + (double)i * sigma - M;
        }
        /* the group's roots are rho[ja .. jb-1] in sorted order */
        bool ok = false;
        if (warm) {
            for (size_t i = 0; i < m; i++)
                W->u[i] = exp(rho[ja + i] - sigma) * (cos(phi[ja + i]) + I * sin(phi[ja + i]));
            int it = aberth(m, W->c, W->absc, W->u, W->done, MAXIT_WARM);
            if (it >= 0) {
                ok = true;
                if (it > maxused)
                    maxused = it;
            }
        }
        if (!ok) {
            initial_points(m, ys, W->idx, W->u);
            int it = aberth(m, W->c, W->absc, W->u, W->done, MAXIT_COLD);
            if (it < 0) {
                status = -1;
                it = MAXIT_COLD;
            }
            if (it > maxused)
                maxused = it;
        }
        for (size_t i = 0; i < m; i++) {
            double a = cabs_fast(W->u[i]);
            rho[ja + i] = a > 0 ? sigma + log(a) : -INFINITY;
            phi[ja + i] = carg(W->u[i]);
        }
        e = f;
    }
    /* sort the finite roots */
    size_t nf = jmax - jmin;
    double *t = W->tmp;
    for (size_t k = 0; k < nf; k++) {
        t[2 * k] = rho[jmin + k];
        t[2 * k + 1] = phi[jmin + k];
    }
    qsort(t, nf, 2 * sizeof(double), cmp_root);
    for (size_t k = 0; k < nf; k++) {
        rho[jmin + k] = t[2 * k];
        phi[jmin + k] = t[2 * k + 1];
    }
    if (iters)
        *iters = maxused;
    return status;
}
