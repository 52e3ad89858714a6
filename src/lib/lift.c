/* lift.c — Kapranov witnesses (see trope/lift.h). */
#include "trope/write.h"
#include "trope/lift.h"
#include "roots_internal.h"

#include <inttypes.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#define MAX_SPAN 100000
#define MAX_TRIES 240

void tp_lift_init(tp_lift *L)
{
    memset(L, 0, sizeof *L);
    tp_field_init(&L->field);
    mpq_init(L->trop_value);
    mpq_init(L->residual_valuation);
    mpq_init(L->margin);
    tp_roots_init(&L->uni);
}

void tp_lift_clear(tp_lift *L)
{
    for (size_t i = 0; i < L->nvars; i++) {
        if (L->vars)
            free(L->vars[i]);
        if (L->w)
            mpq_clear(L->w[i]);
        if (L->fixed)
            mpq_clear(L->fixed[i]);
    }
    free(L->vars);
    free(L->w);
    free(L->fixed);
    free(L->poly_text);
    free(L->initial_form);
    free(L->univariate_text);
    mpq_clear(L->trop_value);
    mpq_clear(L->residual_valuation);
    mpq_clear(L->margin);
    tp_roots_clear(&L->uni);
    tp_field_clear(&L->field);
    memset(L, 0, sizeof *L);
}

/* r = a^e for a nonzero rational a and any integer e */
static void q_pow(mpq_t r, const mpq_t a, int64_t e)
{
    uint64_t m = e < 0 ? (uint64_t)(-(e + 1)) + 1 : (uint64_t)e;
    mpz_pow_ui(mpq_numref(r), mpq_numref(a), (unsigned long)m);
    mpz_pow_ui(mpq_denref(r), mpq_denref(a), (unsigned long)m);
    mpq_canonicalize(r);
    if (e < 0)
        mpq_inv(r, r);
}

/* the small nonzero coefficients tried for the fixed coordinates */
static long trial_value(size_t attempt, size_t var)
{
    static const long L[] = {1, 2, -1, 3, -2, 5, -3, 7, 4, -5, 11, -7, 6, 13, -4};
    if (attempt == 0)
        return 1;
    uint64_t z = (uint64_t)attempt * 0x9e3779b97f4a7c15ull + (uint64_t)var * 0xbf58476d1ce4e5b9ull;
    z ^= z >> 29;
    z *= 0x94d049bb133111ebull;
    z ^= z >> 32;
    size_t span = 2 + attempt / 8;
    if (span > sizeof L / sizeof L[0])
        span = sizeof L / sizeof L[0];
    return L[z % span];
}

static char *term_text(const tp_poly *f, size_t k, const tp_field *F, char *const *vars)
{
    char *c = tp_coeff_to_str(&f->coeffs[k], F);
    char *m = tp_monomial_to_str(&f->exps[k * f->nvars], f->nvars, vars);
    char *s = NULL;
    if (c && m) {
        size_t n = strlen(c) + strlen(m) + 8;
        s = malloc(n);
        if (s) {
            bool par = strchr(c, '+') || strchr(c + 1, '-') || strchr(c, '/');
            if (strcmp(m, "1") == 0)
                snprintf(s, n, "%s", c);
            else if (strcmp(c, "1") == 0)
                snprintf(s, n, "%s", m);
            else
                snprintf(s, n, par ? "(%s)*%s" : "%s*%s", c, m);
        }
    }
    free(c);
    free(m);
    return s;
}

/* choice of the solved variable and the residue coefficients */
typedef struct {
    bool found;
    bool rational;          /* y0 rational (t-adic) */
    size_t j;
    mpq_t *c;               /* nvars */
    mpq_t y0;               /* rational root, or p-adic residue */
    mpc_t y0c;              /* numeric root (t-adic, not rational) */
} choice;

static tp_status try_choice(choice *out, const tp_poly *f, const tp_field *F, const bool *inS,
                            const mpq_t *res, size_t j, const mpq_t *c, int64_t lo, size_t span,
                            bool *ok_rational, bool *ok_any)
{
    *ok_rational = *ok_any = false;
    size_t n = f->nvars;
    qpoly P;
    if (!qp_init(&P, span + 1))
        return TP_ENOMEM;
    mpq_t t, u;
    mpq_init(t);
    mpq_init(u);
    for (size_t k = 0; k < f->nterms; k++) {
        if (!inS[k])
            continue;
        mpq_set(t, res[k]);
        for (size_t i = 0; i < n; i++) {
            if (i == j || f->exps[k * n + i] == 0)
                continue;
            q_pow(u, c[i], f->exps[k * n + i]);
            mpq_mul(t, t, u);
        }
        size_t e = (size_t)(f->exps[k * n + j] - lo);
        mpq_add(P.c[e], P.c[e], t);
    }
    tp_status st = TP_OK;
    if (F->kind == TP_FIELD_PADIC) {
        mpz_t *zc = malloc(P.n * sizeof *zc);
        mpz_t lc;
        mpz_init(lc);
        if (!zc)
            st = TP_ENOMEM;
        for (size_t i = 0; zc && i < P.n; i++) {
            mpz_init(zc[i]);
            /* residues are p-adic units or 0; reduce num * den^-1 mod p */
            if (mpq_sgn(P.c[i]) != 0) {
                mpz_t inv;
                mpz_init(inv);
                if (mpz_invert(inv, mpq_denref(P.c[i]), F->p)) {
                    mpz_mul(zc[i], mpq_numref(P.c[i]), inv);
                    mpz_mod(zc[i], zc[i], F->p);
                }
                mpz_clear(inv);
            }
        }
        /* strip the factor x^k */
        size_t low = 0;
        while (zc && low < P.n && mpz_sgn(zc[low]) == 0)
            low++;
        fp_factor *fac = NULL;
        size_t nf = 0;
        if (zc && low + 1 < P.n) {
            if (!fp_factor_poly((const mpz_t *)zc + low, P.n - low, F->p, lc, &fac, &nf))
                st = TP_ENOMEM;
            for (size_t k = 0; st == TP_OK && k < nf; k++)
                if (fac[k].f.n == 2 && fac[k].mult == 1) {
                    mpz_neg(mpq_numref(out->y0), fac[k].f.c[0]);
                    mpz_mod(mpq_numref(out->y0), mpq_numref(out->y0), F->p);
                    mpz_set_ui(mpq_denref(out->y0), 1);
                    if (mpz_sgn(mpq_numref(out->y0)) != 0) {
                        *ok_rational = *ok_any = true;
                        break;
                    }
                }
            fp_factors_free(fac, nf);
        }
        if (zc)
            for (size_t i = 0; i < P.n; i++)
                mpz_clear(zc[i]);
        free(zc);
        mpz_clear(lc);
    } else {
        size_t low = 0;
        while (low < P.n && mpq_sgn(P.c[low]) == 0)
            low++;
        size_t hi = P.n;
        while (hi > low && mpq_sgn(P.c[hi - 1]) == 0)
            hi--;
        if (hi > low + 1) {
            qpoly Q;
            qpoly *parts = NULL;
            size_t np = 0;
            if (!qp_init(&Q, hi - low))
                st = TP_ENOMEM;
            else {
                for (size_t i = low; i < hi; i++)
                    mpq_set(Q.c[i - low], P.c[i]);
                if (!qp_squarefree(&Q, &parts, &np))
                    st = TP_ENOMEM;
                if (st == TP_OK && np >= 1 && parts[0].n >= 2) {
                    *ok_any = true;
                    mpq_t *rq = NULL;
                    size_t nq = 0;
                    qpoly rest;
                    if (!qp_rational_roots(&parts[0], &rq, &nq, &rest))
                        st = TP_ENOMEM;
                    else {
                        /* prefer the rational root of smallest size, then positive */
                        size_t best = (size_t)-1;
                        mpq_t a, b;
                        mpq_init(a);
                        mpq_init(b);
                        for (size_t i = 0; i < nq; i++) {
                            if (best == (size_t)-1) {
                                best = i;
                                continue;
                            }
                            mpq_abs(a, rq[i]);
                            mpq_abs(b, rq[best]);
                            int cmp = mpq_cmp(a, b);
                            if (cmp < 0 || (cmp == 0 && mpq_sgn(rq[i]) > 0))
                                best = i;
                        }
                        mpq_clear(a);
                        mpq_clear(b);
                        if (best != (size_t)-1) {
                            *ok_rational = true;
                            mpq_set(out->y0, rq[best]);
                        } else {
                            /* numeric: the root of the rest with the smallest |Im|, then Re */
                            mpc_t *cc = malloc(rest.n * sizeof *cc);
                            mpc_t *zs = malloc(rest.n * sizeof *zs);
                            size_t *mu = malloc(rest.n * sizeof *mu);
                            if (!cc || !zs || !mu)
                                st = TP_ENOMEM;
                            else {
                                for (size_t i = 0; i < rest.n; i++) {
                                    mpc_init2(cc[i], RN_PREC);
                                    mpc_init2(zs[i], RN_PREC);
                                    mpc_set_q(cc[i], rest.c[i], MPC_RNDNN);
                                }
                                size_t nz = cx_roots((const mpc_t *)cc, rest.n, zs, mu);
                                if (nz == (size_t)-1 || nz == 0)
                                    st = nz ? TP_ENOMEM : TP_EINTERNAL;
                                else {
                                    size_t bi = 0;
                                    for (size_t i = 1; i < nz; i++) {
                                        double ai = fabs(mpfr_get_d(mpc_imagref(zs[i]), MPFR_RNDN));
                                        double ab = fabs(mpfr_get_d(mpc_imagref(zs[bi]), MPFR_RNDN));
                                        double ri = mpfr_get_d(mpc_realref(zs[i]), MPFR_RNDN);
                                        double rb = mpfr_get_d(mpc_realref(zs[bi]), MPFR_RNDN);
                                        if (ai < ab - 1e-12 || (fabs(ai - ab) <= 1e-12 && ri > rb))
                                            bi = i;
                                    }
                                    mpc_set(out->y0c, zs[bi], MPC_RNDNN);
                                }
                                for (size_t i = 0; i < rest.n; i++) {
                                    mpc_clear(cc[i]);
                                    mpc_clear(zs[i]);
                                }
                            }
                            free(cc);
                            free(zs);
                            free(mu);
                        }
                        for (size_t i = 0; i < nq; i++)
                            mpq_clear(rq[i]);
                        free(rq);
                        qp_clear(&rest);
                    }
                }
                for (size_t k = 0; k < np; k++)
                    qp_clear(&parts[k]);
                free(parts);
                qp_clear(&Q);
            }
        }
    }
    mpq_clear(t);
    mpq_clear(u);
    qp_clear(&P);
    return st;
}

static tp_status oom(tp_error *err) { return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory"); }

/* val f(z) for the t-adic witness: summands a_i z^i kept apart to judge cancellation */
static tp_status tadic_residual(tp_lift *L, tp_coeff *const *g, size_t n, const rseries *z,
                                mpq_t shift, tp_error *err)
{
    rupoly G = {0, NULL};
    if (!roots_series_poly(&G, g, n))
        return oom(err);
    rseries pw, term, sum;
    rs_init(&pw);
    rs_init(&term);
    rs_init(&sum);
    rnum one;
    rn_init(&one);
    rn_set_si(&one, 1);
    mpq_t zero;
    mpq_init(zero);
    bool ok = rs_add_term(&pw, zero, &one);
    double top = -1e300;
    for (size_t i = 0; ok && i < n; i++) {
        if (i > 0) {
            ok = rs_mul(&term, &pw, z) && rs_set(&pw, &term);
            if (!ok)
                break;
        }
        if (rs_is_zero(&G.a[i]))
            continue;
        ok = rs_mul(&term, &G.a[i], &pw);
        for (size_t k = 0; ok && k < term.len; k++) {
            double l = rn_log2abs(&term.c[k]);
            if (l > top)
                top = l;
        }
        for (size_t k = 0; ok && k < term.len; k++)
            ok = rs_add_term(&sum, term.e[k], &term.c[k]);
    }
    tp_status st = ok ? TP_OK : oom(err);
    if (st == TP_OK) {
        size_t k = 0;
        while (k < sum.len && !sum.c[k].exact && rn_log2abs(&sum.c[k]) < top - RN_ZERO_BITS)
            k++;
        if (k >= sum.len)
            L->residual_zero = true;
        else
            mpq_add(L->residual_valuation, sum.e[k], shift);
    }
    rs_clear(&pw);
    rs_clear(&term);
    rs_clear(&sum);
    rn_clear(&one);
    mpq_clear(zero);
    ru_clear(&G);
    return st;
}

tp_status tp_lift_compute(tp_lift *L, const tp_poly *f, const tp_field *F, char *const *vars,
                          const mpq_t *w, size_t nw, const tp_lift_options *opt, tp_error *err)
{
    size_t n = f->nvars;
    size_t K = opt && opt->terms ? opt->terms : 3;
    if (F->kind != TP_FIELD_PUISEUX && F->kind != TP_FIELD_PADIC)
        return tp_error_set(err, TP_EDOMAIN, f->line, f->col,
                            "lift needs a valued field: --over t (Puiseux series) or "
                            "--over p=PRIME");
    if (nw != n)
        return tp_error_set(err, TP_EDOMAIN, f->line, f->col,
                            "--at has %zu coordinate%s but the polynomial has %zu variable%s",
                            nw, nw == 1 ? "" : "s", n, n == 1 ? "" : "s");
    if (F->kind == TP_FIELD_PADIC)
        for (size_t i = 0; i < n; i++)
            if (mpz_cmp_ui(mpq_denref(w[i]), 1) != 0)
                return tp_error_set(err, TP_EDOMAIN, f->line, f->col,
                                    "over Q_p the point must be integral (a coordinate of "
                                    "valuation %s would need a ramified extension); "
                                    "found a fraction in coordinate %zu", "p/q", i + 1);
    tp_lift_clear(L);
    tp_lift_init(L);
    tp_field_set(&L->field, F);
    L->nvars = n;
    L->terms = K;
    L->vars = calloc(n ? n : 1, sizeof *L->vars);
    L->w = malloc((n ? n : 1) * sizeof *L->w);
    L->fixed = malloc((n ? n : 1) * sizeof *L->fixed);
    if (!L->vars || !L->w || !L->fixed) {
        free(L->w);
        free(L->fixed);
        L->w = L->fixed = NULL;
        L->nvars = 0;
        return oom(err);
    }
    for (size_t i = 0; i < n; i++) {
        mpq_init(L->w[i]);
        mpq_set(L->w[i], w[i]);
        mpq_init(L->fixed[i]);
        L->vars[i] = rn_strdup(vars && vars[i] ? vars[i] : "x");
        if (!L->vars[i])
            return oom(err);
    }
    L->poly_text = tp_poly_to_str(f, F, vars);
    if (!L->poly_text)
        return oom(err);

    /* trop(f)(w) and the minimizing terms */
    size_t T = f->nterms;
    mpq_t *tv = malloc((T ? T : 1) * sizeof *tv);
    mpq_t *res = malloc((T ? T : 1) * sizeof *res);
    bool *inS = calloc(T ? T : 1, sizeof *inS);
    if (!tv || !res || !inS) {
        free(tv); free(res); free(inS);
        return oom(err);
    }
    mpq_t t, u;
    mpq_init(t);
    mpq_init(u);
    for (size_t k = 0; k < T; k++) {
        mpq_init(tv[k]);
        mpq_init(res[k]);
        tp_coeff_val(tv[k], &f->coeffs[k], F);
        tp_coeff_residue_q(res[k], &f->coeffs[k], F);
        for (size_t i = 0; i < n; i++) {
            mpq_set_si(t, 1, 1);
            mpz_set_si(mpq_numref(t), 0);
            /* exponent * w_i, exactly (int64 exponent via two halves) */
            int64_t e = f->exps[k * n + i];
            if (e == 0)
                continue;
            mpz_set_si(mpq_numref(t), (long)e);
            mpq_mul(t, t, w[i]);
            mpq_add(tv[k], tv[k], t);
        }
        if (k == 0 || mpq_cmp(tv[k], L->trop_value) < 0)
            mpq_set(L->trop_value, tv[k]);
    }
    size_t last = 0;
    for (size_t k = 0; k < T; k++)
        if (mpq_equal(tv[k], L->trop_value)) {
            inS[k] = true;
            L->nmin++;
            last = k;
        }
    tp_status st = TP_OK;
    rbuf b;
    rb_init(&b);
    if (L->nmin < 2) {
        char *ts = term_text(f, last, F, vars);
        rb_puts(&b, "(");
        for (size_t i = 0; i < n; i++) {
            rb_q(&b, w[i]);
            rb_puts(&b, i + 1 < n ? ", " : ")");
        }
        char *ws = rb_take(&b);
        char *vs = mpq_get_str(NULL, 10, L->trop_value);
        st = tp_error_set(err, TP_EDOMAIN, f->line, f->col,
                          "the point %s is not on the tropical hypersurface: only the term "
                          "%s attains the minimum %s of val(c) + <a, w>; expected a point "
                          "where at least two terms attain it",
                          ws ? ws : "w", ts ? ts : "?", vs ? vs : "?");
        free(ts);
        free(ws);
        void (*fr)(void *, size_t);
        mp_get_memory_functions(NULL, NULL, &fr);
        if (vs)
            fr(vs, strlen(vs) + 1);
    }
    /* initial form text */
    for (size_t k = 0; st == TP_OK && k < T; k++) {
        if (!inS[k])
            continue;
        char *r = tp_coeff_residue_str(&f->coeffs[k], F);
        char *m = tp_monomial_to_str(&f->exps[k * n], n, vars);
        if (!r || !m)
            st = oom(err);
        else {
            bool neg = r[0] == '-';
            const char *ra = neg ? r + 1 : r;
            if (b.len)
                rb_puts(&b, neg ? " - " : " + ");
            else if (neg)
                rb_puts(&b, "-");
            if (strcmp(m, "1") == 0)
                rb_puts(&b, ra);
            else if (strcmp(ra, "1") == 0)
                rb_puts(&b, m);
            else
                rb_printf(&b, "%s*%s", ra, m);
        }
        free(r);
        free(m);
    }
    if (st == TP_OK && !(L->initial_form = rb_take(&b)))
        st = oom(err);
    rb_free(&b);

    /* choose the variable and the fixed coefficients */
    choice ch;
    memset(&ch, 0, sizeof ch);
    mpq_init(ch.y0);
    mpc_init2(ch.y0c, RN_PREC);
    ch.c = malloc((n ? n : 1) * sizeof *ch.c);
    if (!ch.c && st == TP_OK)
        st = oom(err);
    for (size_t i = 0; ch.c && i < n; i++)
        mpq_init(ch.c[i]);
    mpq_t *cur = malloc((n ? n : 1) * sizeof *cur);
    if (!cur && st == TP_OK)
        st = oom(err);
    for (size_t i = 0; cur && i < n; i++)
        mpq_init(cur[i]);
    bool any_candidate = false;
    for (size_t j = 0; st == TP_OK && j < n && !(ch.found && ch.rational); j++) {
        int64_t lo = INT64_MAX, hi = INT64_MIN;
        for (size_t k = 0; k < T; k++)
            if (inS[k]) {
                int64_t e = f->exps[k * n + j];
                lo = e < lo ? e : lo;
                hi = e > hi ? e : hi;
            }
        if (lo == hi)
            continue; /* in_w(f) does not move with x_j */
        any_candidate = true;
        if ((lo < 0 && hi > INT64_MAX + lo) || hi - lo > MAX_SPAN) {
            st = tp_error_set(err, TP_EOVERFLOW, f->line, f->col,
                              "the degree span in %s is above %d", vars[j], MAX_SPAN);
            break;
        }
        for (size_t a = 0; st == TP_OK && a < MAX_TRIES; a++) {
            bool bad = false;
            for (size_t i = 0; i < n; i++) {
                long v = i == j ? 1 : trial_value(a, i);
                if (F->kind == TP_FIELD_PADIC) {
                    mpz_set_si(mpq_numref(cur[i]), v);
                    mpz_set_ui(mpq_denref(cur[i]), 1);
                    mpz_mod(mpq_numref(cur[i]), mpq_numref(cur[i]), F->p);
                    if (mpz_sgn(mpq_numref(cur[i])) == 0)
                        bad = true;
                } else
                    mpq_set_si(cur[i], v, 1);
            }
            if (bad)
                continue;
            bool okr, oka;
            tp_status s2 = try_choice(&ch, f, F, inS, (const mpq_t *)res, j,
                                      (const mpq_t *)cur, lo, (size_t)(hi - lo), &okr, &oka);
            if (s2 != TP_OK) {
                st = s2 == TP_ENOMEM ? oom(err)
                                     : tp_error_set(err, s2, 0, 0, "residual root search failed");
                break;
            }
            if (oka && (!ch.found || (okr && !ch.rational))) {
                ch.found = true;
                ch.rational = okr;
                ch.j = j;
                for (size_t i = 0; i < n; i++)
                    mpq_set(ch.c[i], cur[i]);
            }
            if (ch.found && (ch.rational || a >= 40))
                break;
        }
    }
    /* recompute y0 for the final choice (try_choice overwrote it on later tries) */
    if (st == TP_OK && ch.found) {
        int64_t lo = INT64_MAX, hi = INT64_MIN;
        for (size_t k = 0; k < T; k++)
            if (inS[k]) {
                int64_t e = f->exps[k * n + ch.j];
                lo = e < lo ? e : lo;
                hi = e > hi ? e : hi;
            }
        bool okr, oka;
        st = try_choice(&ch, f, F, inS, (const mpq_t *)res, ch.j, (const mpq_t *)ch.c, lo,
                        (size_t)(hi - lo), &okr, &oka);
        if (st != TP_OK)
            st = oom(err);
    }
    if (st == TP_OK && !ch.found)
        st = tp_error_set(err, TP_EDOMAIN, f->line, f->col,
                          any_candidate
                              ? "no choice of the fixed coordinates gave the initial form a "
                                "simple root in the residue field%s"
                              : "the initial form is a monomial in every variable%s",
                          F->kind == TP_FIELD_PADIC ? " (try a larger prime or --over t)" : "");

    /* g(x_j) = f(c_1 t^{w_1}, ..., x_j, ...) */
    size_t j = ch.j;
    int64_t glo = INT64_MAX, ghi = INT64_MIN;
    tp_coeff *gc = NULL;
    tp_coeff **gp = NULL;
    size_t gn = 0;
    if (st == TP_OK) {
        L->solved = j;
        for (size_t i = 0; i < n; i++)
            mpq_set(L->fixed[i], ch.c[i]);
        for (size_t k = 0; k < T; k++) {
            int64_t e = f->exps[k * n + j];
            glo = e < glo ? e : glo;
            ghi = e > ghi ? e : ghi;
        }
        if ((glo < 0 && ghi > INT64_MAX + glo) || ghi - glo > MAX_SPAN)
            st = tp_error_set(err, TP_EOVERFLOW, f->line, f->col,
                              "the degree span in %s is above %d", vars[j], MAX_SPAN);
    }
    if (st == TP_OK) {
        gn = (size_t)(ghi - glo) + 1;
        gc = malloc(gn * sizeof *gc);
        gp = calloc(gn, sizeof *gp);
        if (!gc || !gp)
            st = oom(err);
        for (size_t e = 0; gc && e < gn; e++) {
            tp_coeff_init(&gc[e]);
            tp_coeff_set_si(&gc[e], 0, F);
        }
    }
    if (st == TP_OK) {
        tp_coeff m, tmp;
        tp_coeff_init(&m);
        tp_coeff_init(&tmp);
        tp_coeff_set_si(&m, 0, F);
        tp_coeff_set_si(&tmp, 0, F);
        mpq_t E, Kq;
        mpq_init(E);
        mpq_init(Kq);
        for (size_t k = 0; k < T; k++) {
            mpq_set_ui(E, 0, 1);
            mpq_set_ui(Kq, 1, 1);
            for (size_t i = 0; i < n; i++) {
                int64_t e = f->exps[k * n + i];
                if (i == j || e == 0)
                    continue;
                q_pow(u, ch.c[i], e);
                mpq_mul(Kq, Kq, u);
                mpz_set_si(mpq_numref(t), (long)e);
                mpz_set_ui(mpq_denref(t), 1);
                mpq_mul(t, t, w[i]);
                mpq_add(E, E, t);
            }
            if (F->kind == TP_FIELD_PUISEUX) {
                tp_coeff_set_param_pow(&m, E, F);
                tp_coeff_set_q(&tmp, Kq, F);
                tp_coeff_mul(&m, &m, &tmp, F);
            } else {
                long ev = mpz_get_si(mpq_numref(E));
                mpq_set_ui(u, 1, 1);
                mpz_pow_ui(mpq_numref(u), F->p, (unsigned long)labs(ev));
                if (ev < 0)
                    mpq_inv(u, u);
                mpq_mul(Kq, Kq, u);
                tp_coeff_set_q(&m, Kq, F);
            }
            tp_coeff_mul(&m, &m, &f->coeffs[k], F);
            size_t idx = (size_t)(f->exps[k * n + j] - glo);
            tp_coeff_add(&gc[idx], &gc[idx], &m, F);
        }
        mpq_clear(E);
        mpq_clear(Kq);
        tp_coeff_clear(&m);
        tp_coeff_clear(&tmp);
        for (size_t e = 0; e < gn; e++)
            gp[e] = tp_coeff_is_zero(&gc[e], F) ? NULL : &gc[e];
        /* the text of g, highest power first */
        size_t nt = 0;
        for (size_t e = 0; e < gn; e++)
            nt += gp[e] != NULL;
        tp_poly g;
        tp_poly_init(&g, 1);
        int64_t *ge = malloc((nt ? nt : 1) * sizeof *ge);
        tp_coeff *gcs = malloc((nt ? nt : 1) * sizeof *gcs);
        if (ge && gcs) {
            size_t q = 0;
            for (size_t e = gn; e-- > 0;)
                if (gp[e]) {
                    ge[q] = glo + (int64_t)e;
                    memcpy(&gcs[q], gp[e], sizeof *gcs);
                    q++;
                }
            tp_poly view = g;
            view.nterms = nt;
            view.exps = ge;
            view.coeffs = gcs;
            char *names[1] = {L->vars[j]};
            L->univariate_text = tp_poly_to_str(&view, F, names);
        }
        free(ge);
        free(gcs);
        tp_poly_clear(&g);
        if (!L->univariate_text)
            st = oom(err);
    }
    /* its roots */
    if (st == TP_OK) {
        tp_roots *U = &L->uni;
        tp_field_set(&U->field, F);
        snprintf(U->var, sizeof U->var, "%s", L->vars[j]);
        U->poly_text = rn_strdup(L->univariate_text);
        U->low = glo;
        U->degree = gn - 1;
        U->nzero = 0;
        tp_roots_options ro = {.terms = K, .max_steps = 0};
        if (!U->poly_text)
            st = oom(err);
        else
            st = roots_core(U, gp, gn, F, &ro, err);
        if (st != TP_OK && err->line == 0) {
            err->line = f->line;
            err->col = f->col;
        }
    }
    /* the root with valuation w_j and leading coefficient y0 */
    size_t pick = (size_t)-1;
    if (st == TP_OK) {
        double best = 1e300;
        for (size_t r = 0; r < L->uni.nroots; r++) {
            const tp_root *R = &L->uni.roots[r];
            if (R->zero || R->count != 1 || !mpq_equal(R->valuation, w[j]))
                continue;
            if (F->kind == TP_FIELD_PADIC) {
                if (R->in_qp && R->ndigits > 0 && mpz_cmp(R->digits[0], mpq_numref(ch.y0)) == 0)
                    pick = r;
                continue;
            }
            if (R->nterms == 0)
                continue;
            const tp_root_term *T0 = &R->terms[0];
            if (ch.rational) {
                if (T0->exact && mpq_equal(T0->q, ch.y0))
                    pick = r;
                continue;
            }
            double yr = mpfr_get_d(mpc_realref(ch.y0c), MPFR_RNDN);
            double yi = mpfr_get_d(mpc_imagref(ch.y0c), MPFR_RNDN);
            double d = hypot(T0->re - yr, T0->im - yi);
            if (!T0->exact && d < best && d < 1e-9 * (1 + hypot(yr, yi))) {
                best = d;
                pick = r;
            }
        }
        if (pick == (size_t)-1)
            st = tp_error_set(err, TP_EINTERNAL, f->line, f->col,
                              "the root of the univariate polynomial with the chosen leading "
                              "term was not found");
        else
            L->root = pick;
    }
    /* val f(z) */
    if (st == TP_OK) {
        const tp_root *R = &L->uni.roots[pick];
        mpq_t shift;
        mpq_init(shift);
        if (F->kind == TP_FIELD_PADIC) {
            /* z_j = p^{w_j} * approx; f(z) = z_j^glo * g(z_j), exact */
            mpq_t z, acc, pw;
            mpq_init(z);
            mpq_init(acc);
            mpq_init(pw);
            long v = mpz_get_si(mpq_numref(w[j]));
            mpz_pow_ui(mpq_numref(pw), F->p, (unsigned long)labs(v));
            mpz_set_ui(mpq_denref(pw), 1);
            if (v < 0)
                mpq_inv(pw, pw);
            mpq_set_z(z, R->approx);
            mpq_mul(z, z, pw);
            for (size_t e = gn; e-- > 0;) {
                mpq_mul(acc, acc, z);
                if (gp[e])
                    mpq_add(acc, acc, gp[e]->q);
            }
            if (mpq_sgn(acc) == 0)
                L->residual_zero = true;
            else {
                mpz_t tt;
                mpz_init(tt);
                long vp = (long)mpz_remove(tt, mpq_numref(acc), F->p) -
                          (long)mpz_remove(tt, mpq_denref(acc), F->p);
                mpz_clear(tt);
                mpq_set_si(L->residual_valuation, vp, 1);
                mpq_set_si(shift, (long)glo, 1);
                mpq_mul(shift, shift, w[j]);
                mpq_add(L->residual_valuation, L->residual_valuation, shift);
            }
            mpq_clear(z);
            mpq_clear(acc);
            mpq_clear(pw);
        } else {
            mpq_set_si(shift, (long)glo, 1);
            mpq_mul(shift, shift, w[j]);
            st = tadic_residual(L, gp, gn, R->series, shift, err);
        }
        mpq_clear(shift);
        if (st == TP_OK && !L->residual_zero)
            mpq_sub(L->margin, L->residual_valuation, L->trop_value);
    }

    for (size_t e = 0; gc && e < gn; e++)
        tp_coeff_clear(&gc[e]);
    free(gc);
    free(gp);
    for (size_t i = 0; cur && i < n; i++)
        mpq_clear(cur[i]);
    free(cur);
    for (size_t i = 0; ch.c && i < n; i++)
        mpq_clear(ch.c[i]);
    free(ch.c);
    mpq_clear(ch.y0);
    mpc_clear(ch.y0c);
    for (size_t k = 0; k < T; k++) {
        mpq_clear(tv[k]);
        mpq_clear(res[k]);
    }
    free(tv);
    free(res);
    free(inS);
    mpq_clear(t);
    mpq_clear(u);
    return st;
}

/* ------------------------------------------------------------ writers */

static void put_str(FILE *o, const char *s) { tp_json_put_string(o, s); }

static void put_qs(FILE *o, const mpq_t q)
{
    fputc('"', o);
    mpq_out_str(o, 10, q);
    fputc('"', o);
}

/* "c*t^(w)" or "c*p^w" text of a fixed coordinate */
static void put_fixed(FILE *o, const tp_lift *L, size_t i)
{
    if (L->field.kind == TP_FIELD_PADIC) {
        mpq_out_str(o, 10, L->fixed[i]);
        if (mpq_sgn(L->w[i]) == 0)
            return;
        fputc('*', o);
        mpz_out_str(o, 10, L->field.p);
        fputc('^', o);
        bool par = mpq_sgn(L->w[i]) < 0;
        fputs(par ? "(" : "", o);
        mpq_out_str(o, 10, L->w[i]);
        fputs(par ? ")" : "", o);
        return;
    }
    tp_root_term T;
    mpq_init(T.exponent);
    mpq_init(T.q);
    mpq_set(T.exponent, L->w[i]);
    mpq_set(T.q, L->fixed[i]);
    T.exact = true;
    T.re = mpq_get_d(T.q);
    T.im = 0;
    char *s = tp_root_term_str(&T, L->field.param);
    fputs(s ? s : "?", o);
    free(s);
    mpq_clear(T.exponent);
    mpq_clear(T.q);
}

/* "t^2", "t^(3/2)", "t" */
static void put_pow(FILE *o, const char *param, const mpq_t e)
{
    if (mpq_cmp_ui(e, 1, 1) == 0) {
        fputs(param, o);
        return;
    }
    bool par = mpz_cmp_ui(mpq_denref(e), 1) != 0 || mpq_sgn(e) < 0;
    fprintf(o, "%s^%s", param, par ? "(" : "");
    mpq_out_str(o, 10, e);
    fputs(par ? ")" : "", o);
}

tp_status tp_lift_write_text(FILE *o, const tp_lift *L, tp_error *err)
{
    char desc[128];
    tp_field_describe(&L->field, desc, sizeof desc);
    const tp_root *R = &L->uni.roots[L->root];
    fprintf(o, "lift of w = (");
    for (size_t i = 0; i < L->nvars; i++) {
        mpq_out_str(o, 10, L->w[i]);
        fputs(i + 1 < L->nvars ? ", " : "", o);
    }
    fprintf(o, ") to a zero of\n  f = %s\nover %s\n\n", L->poly_text, desc);
    fputs("trop(f)(w) = ", o);
    mpq_out_str(o, 10, L->trop_value);
    fprintf(o, ", attained by %zu terms\ninitial form in_w(f) = %s\n", L->nmin, L->initial_form);
    fprintf(o, "solved for %s; the other coordinates are fixed\n\n", L->vars[L->solved]);
    fputs("witness z (val z = w):\n", o);
    for (size_t i = 0; i < L->nvars; i++) {
        fprintf(o, "  %s = ", L->vars[i]);
        if (i != L->solved) {
            put_fixed(o, L, i);
            fputc('\n', o);
            continue;
        }
        if (L->field.kind == TP_FIELD_PADIC) {
            mpq_t x, pv;
            mpq_init(x);
            mpq_init(pv);
            long v = mpz_get_si(mpq_numref(L->w[i]));
            mpz_pow_ui(mpq_numref(pv), L->field.p, (unsigned long)labs(v));
            if (v < 0)
                mpq_inv(pv, pv);
            mpq_set_z(x, R->approx);
            mpq_mul(x, x, pv);
            mpq_out_str(o, 10, x);
            mpq_clear(x);
            mpq_clear(pv);
            fputs(" + O(", o);
            mpz_out_str(o, 10, L->field.p);
            fprintf(o, "^%ld), digits", mpz_get_si(mpq_numref(L->w[i])) + (long)R->ndigits);
            for (size_t k = 0; k < R->ndigits; k++) {
                fputc(' ', o);
                mpz_out_str(o, 10, R->digits[k]);
            }
            fputs(" (lowest first)\n", o);
            continue;
        }
        for (size_t k = 0; k < R->nterms; k++) {
            char *ts = tp_root_term_str(&R->terms[k], L->field.param);
            if (!ts)
                return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
            if (k && ts[0] == '-')
                fprintf(o, " - %s", ts + 1);
            else
                fprintf(o, "%s%s", k ? " + " : "", ts);
            free(ts);
        }
        if (R->terminates)
            fputs("   (exact)", o);
        else if (R->has_next) {
            fputs(" + O(", o);
            put_pow(o, L->field.param, R->next_exponent);
            fputs(")", o);
        }
        fputc('\n', o);
    }
    fprintf(o, "  where %s is a root of g(%s) = %s\n\n", L->vars[L->solved], L->vars[L->solved],
            L->univariate_text);
    bool exact = true;
    for (size_t k = 0; k < R->nterms; k++)
        exact = exact && R->terms[k].exact;
    if (L->residual_zero)
        fprintf(o, "f(z) = 0 %s\n", L->field.kind == TP_FIELD_PADIC || exact
                                      ? "exactly" : "to working precision (2^-400 relative)");
    else {
        fputs("val f(z) = ", o);
        mpq_out_str(o, 10, L->residual_valuation);
        fputs(" for the truncated witness: ", o);
        mpq_out_str(o, 10, L->margin);
        fputs(" above trop(f)(w)\n", o);
    }
    if (ferror(o))
        return tp_error_set(err, TP_EIO, 0, 0, "write error");
    return TP_OK;
}

tp_status tp_lift_write_json(FILE *o, const tp_lift *L, tp_error *err)
{
    const tp_root *R = &L->uni.roots[L->root];
    fputs("{\"format\": \"trope.lift/1\",\n \"over\": ", o);
    if (L->field.kind == TP_FIELD_PADIC) {
        fputs("{\"kind\": \"p-adic\", \"p\": ", o);
        mpz_out_str(o, 10, L->field.p);
        fputs("}", o);
    } else {
        fputs("{\"kind\": \"puiseux\", \"parameter\": ", o);
        put_str(o, L->field.param);
        fputs("}", o);
    }
    fputs(",\n \"polynomial\": ", o);
    put_str(o, L->poly_text);
    fputs(",\n \"variables\": [", o);
    for (size_t i = 0; i < L->nvars; i++) {
        fputs(i ? ", " : "", o);
        put_str(o, L->vars[i]);
    }
    fputs("],\n \"point\": [", o);
    for (size_t i = 0; i < L->nvars; i++) {
        fputs(i ? ", " : "", o);
        put_qs(o, L->w[i]);
    }
    fputs("],\n \"trop_value\": ", o);
    put_qs(o, L->trop_value);
    fprintf(o, ",\n \"minimizing_terms\": %zu,\n \"initial_form\": ", L->nmin);
    put_str(o, L->initial_form);
    fputs(",\n \"solved_variable\": ", o);
    put_str(o, L->vars[L->solved]);
    fputs(",\n \"univariate\": ", o);
    put_str(o, L->univariate_text);
    fprintf(o, ",\n \"terms\": %zu,\n \"witness\": [", L->terms);
    char a[40], b[40];
    for (size_t i = 0; i < L->nvars; i++) {
        fputs(i ? ",\n  " : "\n  ", o);
        fputs("{\"variable\": ", o);
        put_str(o, L->vars[i]);
        fputs(", \"valuation\": ", o);
        put_qs(o, L->w[i]);
        if (i != L->solved) {
            fputs(", \"solved\": false, \"terms\": [{\"exponent\": ", o);
            put_qs(o, L->w[i]);
            fputs(", \"coefficient\": ", o);
            put_qs(o, L->fixed[i]);
            fputs("}], \"exact\": true}", o);
            continue;
        }
        fputs(", \"solved\": true", o);
        if (L->field.kind == TP_FIELD_PADIC) {
            fputs(", \"digits\": [", o);
            for (size_t k = 0; k < R->ndigits; k++) {
                fputs(k ? ", " : "", o);
                mpz_out_str(o, 10, R->digits[k]);
            }
            fputs("], \"approximation\": \"", o);
            mpz_out_str(o, 10, R->approx);
            fputs("\"}", o);
            continue;
        }
        fputs(", \"terms\": [", o);
        for (size_t k = 0; k < R->nterms; k++) {
            const tp_root_term *T = &R->terms[k];
            fputs(k ? ", " : "", o);
            fputs("{\"exponent\": ", o);
            put_qs(o, T->exponent);
            fputs(", \"coefficient\": ", o);
            if (T->exact)
                put_qs(o, T->q);
            else {
                snprintf(a, sizeof a, "%.17g", T->re == 0 ? 0.0 : T->re);
                snprintf(b, sizeof b, "%.17g", T->im == 0 ? 0.0 : T->im);
                fprintf(o, "[%s, %s]", a, b);
                if (R->series && k < R->series->len) {
                    mpc_t z;
                    mpc_init2(z, RN_PREC);
                    rn_get_mpc(z, &R->series->c[k]);
                    mpfr_fprintf(o, ", \"coefficient_digits\": [\"%.100Rg\", \"%.100Rg\"]",
                                 mpc_realref(z), mpc_imagref(z));
                    mpc_clear(z);
                }
            }
            fputs("}", o);
        }
        fprintf(o, "], \"exact\": %s", R->terminates ? "true" : "false");
        if (R->has_next) {
            fputs(", \"next_exponent\": ", o);
            put_qs(o, R->next_exponent);
        }
        fputs("}", o);
    }
    fprintf(o, "],\n \"residual_zero\": %s", L->residual_zero ? "true" : "false");
    if (!L->residual_zero) {
        fputs(",\n \"residual_valuation\": ", o);
        put_qs(o, L->residual_valuation);
        fputs(",\n \"margin\": ", o);
        put_qs(o, L->margin);
    }
    fputs("}\n", o);
    if (ferror(o))
        return tp_error_set(err, TP_EIO, 0, 0, "write error");
    return TP_OK;
}
