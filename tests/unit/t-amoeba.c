/* t-amoeba.c — unit tests of the amoeba module (sources beside each check). */
#include <complex.h>
#undef complex
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "testlib.h"
#include "trope/amoeba.h"

#define PI 3.14159265358979323846

static double urand(tp_rng *r)
{
    return (double)(tp_rng_next(r) >> 11) * (1.0 / 9007199254740992.0);
}

/* Build an amoeba polynomial directly from (exponent, complex coefficient) lists. */
static void make_poly(tp_amoeba_poly *P, size_t n, const int64_t *e, const double *re,
                      const double *im)
{
    tp_amoeba_poly_init(P);
    P->nvars = 2;
    P->nterms = n;
    P->exps = malloc(2 * n * sizeof *P->exps);
    P->logabs = malloc(n * sizeof *P->logabs);
    P->arg = malloc(n * sizeof *P->arg);
    if (!P->exps || !P->logabs || !P->arg)
        abort();
    memcpy(P->exps, e, 2 * n * sizeof *e);
    for (int v = 0; v < 2; v++) {
        int64_t lo = e[v], hi = e[v];
        for (size_t t = 0; t < n; t++) {
            lo = e[2 * t + v] < lo ? e[2 * t + v] : lo;
            hi = e[2 * t + v] > hi ? e[2 * t + v] : hi;
        }
        P->lo[v] = lo;
        P->deg[v] = hi - lo;
    }
    for (size_t t = 0; t < n; t++) {
        P->logabs[t] = log(hypot(re[t], im[t]));
        P->arg[t] = atan2(im[t], re[t]);
    }
}

/* Roots of a polynomial expanded from known roots come back (common practice, no
 * source: the polynomial is built from its roots, so they are the ground truth). */
static void test_roots(void)
{
    tp_rng rng;
    tp_rng_seed(&rng, tp_test_seed());
    double worst = 0;
    for (long it = 0; it < 200 * tp_test_multiplier(); it++) {
        size_t d = 1 + (size_t)tp_rng_range(&rng, 0, 30);
        double _Complex r[32], c[33];
        for (size_t k = 0; k < d; k++) {
            double rad = exp(2.0 * (urand(&rng) - 0.5)), ang = 2 * PI * urand(&rng);
            r[k] = rad * cexp(I * ang);
        }
        c[0] = 1;
        for (size_t k = 1; k <= d; k++)
            c[k] = 0;
        for (size_t k = 0; k < d; k++) {      /* multiply by (w - r_k) */
            for (size_t j = k + 1; j > 0; j--)
                c[j] = c[j - 1] - r[k] * c[j];
            c[0] = -r[k] * c[0];
        }
        double re[33], im[33], lm[32], ar[32];
        for (size_t j = 0; j <= d; j++) {
            re[j] = creal(c[j]);
            im[j] = cimag(c[j]);
        }
        tp_error err;
        tp_error_init(&err, NULL);
        tp_check(tp_amoeba_roots(d, re, im, lm, ar, NULL, &err) == TP_OK, "it %ld: %s", it,
                 err.msg);
        /* match each true root with the nearest computed one; allow the forward error a
         * backward-stable method makes: condition number kappa = sum|c_j||r|^j /
         * (|r| |p'(r)|) times 100 d eps (common practice, no source) */
        for (size_t k = 0; k < d; k++) {
            double best = INFINITY;
            for (size_t m = 0; m < d; m++) {
                double _Complex z = exp(lm[m]) * cexp(I * ar[m]);
                best = fmin(best, cabs(z - r[k]) / cabs(r[k]));
            }
            double _Complex dp = 0;
            double s = 0, ar_ = cabs(r[k]);
            for (size_t j = d + 1; j-- > 0;) {
                s = s * ar_ + cabs(c[j]);
                if (j > 0)
                    dp = dp * r[k] + (double)j * c[j];
            }
            double kappa = s / (ar_ * cabs(dp));
            worst = fmax(worst, best / (100.0 * (double)d * 2.2e-16 * kappa));
        }
    }
    tp_check(worst <= 1.0, "worst root error %g times the backward-stable bound", worst);

    /* extreme moduli: roots 1e-200, 1 and 1e200 (coefficients of the expanded product) */
    double re[4] = {-1.0, 1e200 + 1.0, -(1e200 + 1.0), 1.0}, im[4] = {0, 0, 0, 0};
    double lm[3], ar[3];
    tp_error err;
    tp_error_init(&err, NULL);
    tp_check(tp_amoeba_roots(3, re, im, lm, ar, NULL, &err) == TP_OK, "%s", err.msg);
    tp_check(fabs(lm[0] + 200 * log(10.0)) < 1e-12 * 461 && fabs(lm[1]) < 1e-12 &&
                 fabs(lm[2] - 200 * log(10.0)) < 1e-12 * 461,
             "extreme roots %.17g %.17g %.17g", lm[0], lm[1], lm[2]);
}

/* 1 + z + w: over x1 the slice is {log|1 + z| : |z| = e^x1} = [log|1 - e^x1|,
 * log(1 + e^x1)] (triangle inequality; common practice). */
static void test_slice_line(void)
{
    int64_t e[6] = {0, 0, 1, 0, 0, 1};
    double re[3] = {1, 1, 1}, im[3] = {0, 0, 0};
    tp_amoeba_poly P;
    make_poly(&P, 3, e, re, im);
    tp_amoeba_options o;
    tp_amoeba_options_default(&o);
    double xs[] = {-3.0, -0.5, 0.3, 2.0, 7.0};
    for (size_t i = 0; i < sizeof xs / sizeof *xs; i++) {
        double lo, hi;
        tp_error err;
        tp_error_init(&err, NULL);
        tp_check(tp_amoeba_slice(&P, xs[i], &o, &lo, &hi, &err) == TP_OK, "%s", err.msg);
        double elo = log(fabs(1 - exp(xs[i]))), ehi = log(1 + exp(xs[i]));
        tp_check(fabs(lo - elo) < 1e-9 && fabs(hi - ehi) < 1e-9, "x1 %g: [%.15g, %.15g] vs "
                 "[%.15g, %.15g]", xs[i], lo, hi, elo, ehi);
    }
    tp_amoeba_poly_clear(&P);
}

/* A linear polynomial in w, A(z) + B(z) w: the slice is the range of log|A/B| on the
 * circle (exact reduction, CHECKS.md). Random A, B of degree 3, compared against dense
 * sampling of log|A/B| (which can only underestimate the range). */
static void test_slice_linear(void)
{
    tp_rng rng;
    tp_rng_seed(&rng, tp_test_seed() + 1);
    for (long it = 0; it < 20 * tp_test_multiplier(); it++) {
        int64_t e[8 * 2];
        double re[8], im[8];
        size_t n = 0;
        for (int j = 0; j < 2; j++)
            for (int i = 0; i < 4; i++) {
                e[2 * n] = i;
                e[2 * n + 1] = j;
                re[n] = 2 * urand(&rng) - 1;
                im[n] = 2 * urand(&rng) - 1;
                n++;
            }
        tp_amoeba_poly P;
        make_poly(&P, n, e, re, im);
        double x1 = 2 * urand(&rng) - 1, lo, hi;
        tp_error err;
        tp_error_init(&err, NULL);
        tp_check(tp_amoeba_slice(&P, x1, NULL, &lo, &hi, &err) == TP_OK, "%s", err.msg);
        double smin = INFINITY, smax = -INFINITY;
        for (int m = 0; m < 200000; m++) {
            double _Complex z = exp(x1) * cexp(I * 2 * PI * m / 200000.0), A = 0, B = 0;
            for (int i = 3; i >= 0; i--) {
                A = A * z + (re[i] + I * im[i]);
                B = B * z + (re[4 + i] + I * im[4 + i]);
            }
            double v = log(cabs(A / B));
            smin = fmin(smin, v);
            smax = fmax(smax, v);
        }
        /* sampling step 3e-5 rad: a corner extremum moves by at most slope * 1.6e-5 */
        tp_check(lo <= smin + 1e-12 && hi >= smax - 1e-12, "it %ld: slice wider than sampled",
                 it);
        tp_check(smin - lo < 1e-3 && hi - smax < 1e-3, "it %ld: [%g, %g] vs sampled [%g, %g]",
                 it, lo, hi, smin, smax);
        tp_amoeba_poly_clear(&P);
    }
}

/* Area of the amoeba of 1 + z + w is pi^2/2 (Mikhalkin, Rullgard, "Amoebas of maximal
 * area", IMRN 2001: pi^2 Area(Delta) for simple Harnack curves, any line). */
static void test_area_line(void)
{
    int64_t e[6] = {0, 0, 1, 0, 0, 1};
    double re[3] = {1, 2, -3}, im[3] = {0, 1, 0.5};
    tp_amoeba_poly P;
    make_poly(&P, 3, e, re, im);
    tp_amoeba_options o;
    tp_amoeba_options_default(&o);
    o.area_tol = 1e-7;
    double a, ae;
    tp_error err;
    tp_error_init(&err, NULL);
    tp_check(tp_amoeba_area(&P, &o, &a, &ae, &err) == TP_OK, "%s", err.msg);
    double want = PI * PI / 2;
    tp_check(fabs(a - want) < 1e-5 && fabs(a - want) <= ae + 1e-12,
             "area %.12g +- %.2g, want %.12g", a, ae, want);
    printf("line area %.12f (error estimate %.2g, true error %.2g)\n", a, ae, fabs(a - want));
    tp_amoeba_poly_clear(&P);
}

/* 1 + 2z + 3w: N_f = 0 at (-4,-4), log 2 + x1 at (4,-4), log 3 + x2 at (-4,4)
 * (Passare, Rullgard, Duke 2004, sections 2-3 from memory; Jensen's formula). */
static void test_ronkin_components(void)
{
    int64_t e[6] = {0, 0, 1, 0, 0, 1};
    double re[3] = {1, 2, 3}, im[3] = {0, 0, 0};
    tp_amoeba_poly P;
    make_poly(&P, 3, e, re, im);
    double pts[3][3] = {{-4, -4, 0}, {4, -4, log(2.0) + 4}, {-4, 4, log(3.0) + 4}};
    for (int k = 0; k < 3; k++) {
        double N, Ne;
        tp_error err;
        tp_error_init(&err, NULL);
        tp_check(tp_amoeba_ronkin(&P, pts[k][0], pts[k][1], &N, &Ne, &err) == TP_OK, "%s",
                 err.msg);
        tp_check(fabs(N - pts[k][2]) <= 1e-9 * fmax(1, fabs(pts[k][2])),
                 "Ronkin at (%g,%g) = %.17g, want %.17g", pts[k][0], pts[k][1], N, pts[k][2]);
    }
    tp_amoeba_component *C;
    size_t n;
    tp_error err;
    tp_error_init(&err, NULL);
    tp_check(tp_amoeba_components(&P, NULL, NULL, &C, &n, &err) == TP_OK, "%s", err.msg);
    /* Forsberg, Passare, Tsikh, Adv. Math. 151 (2000): orders are exactly (0,0), (1,0),
     * (0,1) for a line; c_alpha = log|c_alpha| at vertices (Passare-Rullgard 2004). */
    tp_check(n == 3, "%zu components", n);
    if (n == 3) {
        int64_t want[3][2] = {{0, 0}, {0, 1}, {1, 0}};
        double cw[3] = {0, log(3.0), log(2.0)};
        for (int k = 0; k < 3; k++) {
            tp_check(C[k].order[0] == want[k][0] && C[k].order[1] == want[k][1],
                     "order %d = (%lld,%lld)", k, (long long)C[k].order[0],
                     (long long)C[k].order[1]);
            tp_check(fabs(C[k].ronkin - cw[k]) < 1e-9, "c_alpha %d = %.17g", k, C[k].ronkin);
            tp_check(!C[k].bounded && C[k].vertex, "component %d kind", k);
            int64_t ord[2];
            tp_check(tp_amoeba_order_at(&P, C[k].point[0], C[k].point[1], ord) &&
                         ord[0] == want[k][0] && ord[1] == want[k][1],
                     "order at the component's point");
        }
    }
    free(C);
    tp_amoeba_poly_clear(&P);
}

/* Lopsidedness (Purbhoo, Duke Math. J. 141 (2008), from memory; triangle inequality):
 * a lopsided point is never on a slice of the amoeba. Random polynomials, random
 * points. */
static void test_lopsided(void)
{
    tp_rng rng;
    tp_rng_seed(&rng, tp_test_seed() + 2);
    long checked = 0;
    for (long it = 0; it < 10 * tp_test_multiplier(); it++) {
        int64_t e[2 * 10];
        double re[10], im[10];
        size_t n = 0;
        for (int i = 0; i <= 3; i++)
            for (int j = 0; i + j <= 3; j++) {
                e[2 * n] = i;
                e[2 * n + 1] = j;
                double s = exp(4 * (urand(&rng) - 0.5));
                re[n] = s * (2 * urand(&rng) - 1);
                im[n] = s * (2 * urand(&rng) - 1);
                n++;
            }
        tp_amoeba_poly P;
        make_poly(&P, n, e, re, im);
        double lo[3], hi[3];
        for (int m = 0; m < 20; m++) {
            double x1 = 8 * urand(&rng) - 4, x2 = 8 * urand(&rng) - 4;
            size_t dom;
            double slack;
            if (!tp_amoeba_lopsided(&P, x1, x2, &dom, &slack))
                continue;
            tp_error err;
            tp_error_init(&err, NULL);
            tp_check(tp_amoeba_slice(&P, x1, NULL, lo, hi, &err) == TP_OK, "%s", err.msg);
            for (int k = 0; k < 3; k++)
                tp_check(!(x2 >= lo[k] && x2 <= hi[k]), "lopsided point on the amoeba");
            int64_t ord[2];
            tp_check(tp_amoeba_order_at(&P, x1, x2, ord) && ord[0] == P.exps[2 * dom] &&
                         ord[1] == P.exps[2 * dom + 1],
                     "the order at a lopsided point is the dominant exponent");
            checked++;
        }
        tp_amoeba_poly_clear(&P);
    }
    tp_check(checked > 20, "only %ld lopsided points", checked);
}

/* Slices computed in parallel are the same doubles as one at a time (the output must
 * not depend on the number of threads; common practice, no source), and the Newton
 * polygon area is Pick-exact (here the triangle of degree 3: 9/2). */
static void test_batch_determinism(void)
{
    tp_rng rng;
    tp_rng_seed(&rng, tp_test_seed() + 3);
    int64_t e[2 * 10];
    double re[10], im[10];
    size_t n = 0;
    for (int i = 0; i <= 3; i++)
        for (int j = 0; i + j <= 3; j++) {
            e[2 * n] = i;
            e[2 * n + 1] = j;
            re[n] = 2 * urand(&rng) - 1;
            im[n] = 2 * urand(&rng) - 1;
            n++;
        }
    tp_amoeba_poly P;
    make_poly(&P, n, e, re, im);
    tp_check(tp_amoeba_delta_area(&P) == 4.5, "delta area %g", tp_amoeba_delta_area(&P));
    double xs[17], lo[17 * 3], hi[17 * 3];
    for (int i = 0; i < 17; i++)
        xs[i] = -4 + 0.5 * i;
    tp_error err;
    tp_error_init(&err, NULL);
    tp_check(tp_amoeba_slices(&P, xs, 17, NULL, lo, hi, &err) == TP_OK, "%s", err.msg);
    for (int i = 0; i < 17; i++) {
        double l1[3], h1[3];
        tp_check(tp_amoeba_slice(&P, xs[i], NULL, l1, h1, &err) == TP_OK, "%s", err.msg);
        tp_check(memcmp(l1, lo + 3 * i, sizeof l1) == 0 && memcmp(h1, hi + 3 * i, sizeof h1) == 0,
                 "slice %d differs between batch and single", i);
    }
    tp_amoeba_poly_clear(&P);
}

/* The coverage mask of 1 + z + w on [-3,3]^2 adds up to the area of the amoeba inside
 * the box, computed from the exact slices [log|1 - e^x|, log(1 + e^x)] (triangle
 * inequality; common practice) by the midpoint rule on the same columns. */
static void test_mask(void)
{
    int64_t e[6] = {0, 0, 1, 0, 0, 1};
    double re[3] = {1, 1, 1}, im[3] = {0, 0, 0};
    tp_amoeba_poly P;
    make_poly(&P, 3, e, re, im);
    double box[4] = {-3, 3, -3, 3};
    size_t w = 300, h = 300;
    float *cov = malloc(w * h * sizeof *cov);
    if (!cov)
        abort();
    tp_error err;
    tp_error_init(&err, NULL);
    tp_check(tp_amoeba_mask(&P, box, w, h, cov, &err) == TP_OK, "%s", err.msg);
    double got = 0, want = 0, px = 6.0 / 300;
    for (size_t i = 0; i < w; i++) {
        for (size_t j = 0; j < h; j++)
            got += cov[j * w + i] * px * px;
        double x = -3 + (i + 0.5) * px;
        double a = fmax(-3, log(fabs(1 - exp(x)))), b = fmin(3, log(1 + exp(x)));
        if (b > a)
            want += (b - a) * px;
    }
    tp_check(fabs(got - want) < 1e-4 * want, "mask area %.9g, slices %.9g", got, want);
    free(cov);
    tp_amoeba_poly_clear(&P);
}

int main(void)
{
    test_mask();
    test_batch_determinism();
    test_roots();
    test_slice_line();
    test_slice_linear();
    test_area_line();
    test_ronkin_components();
    test_lopsided();
    return tp_test_finish("amoeba");
}
