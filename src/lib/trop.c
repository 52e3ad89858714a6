/* trop.c — the tropicalize pipeline: points -> hull -> subdivision -> complex. */
#include "trope/trop.h"
#include "hull_internal.h"

#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

void tp_trop_init(tp_trop *T)
{
    memset(T, 0, sizeof *T);
    tp_field_init(&T->field);
    tp_poly_init(&T->poly, 0);
    tp_points_init(&T->points);
    tp_subdiv_init(&T->subdiv);
    tp_complex_init(&T->complex);
}

void tp_trop_clear(tp_trop *T)
{
    tp_field_clear(&T->field);
    for (size_t i = 0; i < T->nvars; i++)
        free(T->vars[i]);
    free(T->vars);
    tp_poly_clear(&T->poly);
    tp_points_clear(&T->points);
    tp_subdiv_clear(&T->subdiv);
    tp_complex_clear(&T->complex);
    memset(T, 0, sizeof *T);
    tp_field_init(&T->field);
    tp_poly_init(&T->poly, 0);
    tp_points_init(&T->points);
    tp_subdiv_init(&T->subdiv);
    tp_complex_init(&T->complex);
}

/* Inputs that only cddlib can take (a Newton polytope of dimension above 3, huge
 * exponent ranges, or --engine cdd) cost it time roughly quadratic in the number of
 * points: about 5e-6 s * N^2 measured here for 4 variables. Refuse large ones up
 * front, with an estimate, rather than run for an hour. */
static tp_status check_cdd_work(const tp_points *P, const tp_trop_options *opt,
                                tp_error *err)
{
    size_t limit = opt->max_cdd_points ? opt->max_cdd_points : TP_TROP_MAX_CDD_POINTS;
    size_t m = 0;
    for (size_t i = 0; i < P->count; i++)
        m += !P->dup[i];
    if (m <= limit)
        return TP_OK;
    bool cdd = opt->engine == TP_ENGINE_CDD;
    const char *why = "--engine cdd";
    if (!cdd) {
        tp_hull H;
        tp_hull_init(&H);
        tp_status st = tp_hull_span(&H, P, err);
#ifdef TP_HAVE_FAST_ENGINE
        if (st == TP_OK && H.dim > 0 && !tp_hull_fast_accepts(&H, P)) {
            cdd = true;
            why = H.dim > 3 ? "a Newton polytope of dimension above 3"
                            : "an exponent range of 2^28 or more";
        }
#else
        cdd = st == TP_OK && H.dim > 0;
        why = "no fast engine in this build";
#endif
        tp_hull_clear(&H);
        if (st != TP_OK)
            return st;
    }
    if (!cdd)
        return TP_OK;
    double secs = 5e-6 * (double)m * (double)m;
    char est[64];
    if (secs < 120)
        snprintf(est, sizeof est, "%.0f seconds", secs);
    else if (secs < 7200)
        snprintf(est, sizeof est, "%.0f minutes", secs / 60);
    else
        snprintf(est, sizeof est, "%.0f hours", secs / 3600);
    return tp_error_set(err, TP_ELIMIT, 0, 0,
                        "%zu distinct points need the exact cddlib engine (%s), which would "
                        "take roughly %s; the limit is %zu points (raise it with "
                        "--max-cdd-points N)",
                        m, why, est, limit);
}

static tp_status run(tp_trop *T, const tp_trop_options *opt, tp_error *err)
{
    tp_status cst = check_cdd_work(&T->points, opt, err);
    if (cst != TP_OK)
        return cst;
    struct timespec t0, t1, t2;
    clock_gettime(CLOCK_THREAD_CPUTIME_ID, &t0);
    tp_status st = tp_subdiv_build_limited(&T->subdiv, &T->points, opt->engine,
                                           opt->max_cells, err);
    clock_gettime(CLOCK_THREAD_CPUTIME_ID, &t1);
    T->ms_hull = T->subdiv.hull_ms;
    T->ms_subdiv = (double)(t1.tv_sec - t0.tv_sec) * 1e3 +
                   (double)(t1.tv_nsec - t0.tv_nsec) * 1e-6 - T->ms_hull;
    if (st != TP_OK)
        return st;
    st = tp_complex_build_move(&T->complex, &T->subdiv, &T->points, T->vars, opt->max,
                               err);
    clock_gettime(CLOCK_THREAD_CPUTIME_ID, &t2);
    T->ms_complex = (double)(t2.tv_sec - t1.tv_sec) * 1e3 + (double)(t2.tv_nsec - t1.tv_nsec) * 1e-6;
    return st;
}

static tp_status copy_vars(tp_trop *T, char *const *vars, size_t nvars, tp_error *err)
{
    T->vars = calloc(nvars ? nvars : 1, sizeof *T->vars);
    if (!T->vars)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    T->nvars = nvars;
    for (size_t i = 0; i < nvars; i++) {
        T->vars[i] = strdup(vars[i]);
        if (!T->vars[i])
            return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    return TP_OK;
}

tp_status tp_trop_from_poly(tp_trop *T, const tp_input *in, size_t index,
                            const tp_trop_options *opt, tp_error *err)
{
    tp_trop_clear(T);
    if (index >= in->npolys)
        return tp_error_set(err, TP_EDOMAIN, 0, 0, "no polynomial number %zu in the input",
                            index + 1);
    const tp_poly *f = &in->polys[index];
    T->max = opt->max;
    T->has_field = true;
    tp_field_set(&T->field, &in->field);
    if (err)
        snprintf(T->source, sizeof T->source, "%s", err->file);
    tp_status st = copy_vars(T, in->vars, in->nvars, err);
    if (st != TP_OK)
        return st;
    /* Own a copy of the terms for the writers. */
    tp_poly_clear(&T->poly);
    tp_poly_init(&T->poly, f->nvars);
    T->poly.exps = malloc((f->nterms * f->nvars + 1) * sizeof *T->poly.exps);
    T->poly.coeffs = malloc((f->nterms + 1) * sizeof *T->poly.coeffs);
    if (!T->poly.exps || !T->poly.coeffs)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    memcpy(T->poly.exps, f->exps, f->nterms * f->nvars * sizeof *T->poly.exps);
    for (size_t i = 0; i < f->nterms; i++) {
        tp_coeff_init(&T->poly.coeffs[i]);
        tp_coeff_set(&T->poly.coeffs[i], &f->coeffs[i]);
    }
    T->poly.nterms = T->poly.cap = f->nterms;
    T->poly.line = f->line;
    T->poly.col = f->col;
    T->has_poly = true;
    st = tp_points_from_poly(&T->points, f, &in->field, err);
    if (st != TP_OK)
        return st;
    st = run(T, opt, err);
    if (st == TP_ELIMIT && err && err->line == 0) {
        err->line = f->line; /* point at the polynomial that is too large */
        err->col = f->col;
    }
    return st;
}

tp_status tp_trop_from_points(tp_trop *T, tp_points *P, const tp_trop_options *opt,
                              tp_error *err)
{
    tp_trop_clear(T);
    T->max = opt->max;
    if (err)
        snprintf(T->source, sizeof T->source, "%s", err->file);
    T->points = *P;
    tp_points_init(P);
    if (opt->max)
        tp_points_negate_heights(&T->points);
    /* Variable names: the CSV header's, else x1..xn (x, y, z for n <= 3). */
    size_t n = T->points.n;
    T->vars = calloc(n ? n : 1, sizeof *T->vars);
    if (!T->vars)
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    T->nvars = n;
    static const char *xyz[] = {"x", "y", "z"};
    for (size_t i = 0; i < n; i++) {
        char buf[32];
        if (T->points.nnames == n && T->points.names && T->points.names[i])
            T->vars[i] = strdup(T->points.names[i]);
        else {
            if (n <= 3)
                snprintf(buf, sizeof buf, "%s", xyz[i]);
            else
                snprintf(buf, sizeof buf, "x%zu", i + 1);
            T->vars[i] = strdup(buf);
        }
        if (!T->vars[i])
            return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    return run(T, opt, err);
}
