/* amoeba_internal.h — the univariate solver shared by amoeba.c and amoeba_roots.c
 * (not installed).
 *
 * A polynomial sum_{j=0}^{d} e^{L[j]} beta[j] w^j is given with its moduli split into a
 * log part L[j] (may be -INFINITY) and a complex part beta[j] (may be 0), so that
 * coefficients of wildly different sizes are represented without overflow. Roots come
 * back as rho = log|w| and phi = arg w, sorted by rho.
 */
#ifndef TROPE_AMOEBA_INTERNAL_H
#define TROPE_AMOEBA_INTERNAL_H

#include <complex.h>
#undef complex   /* tp_trop has a member named complex; write double _Complex */
#include <stdbool.h>
#include <stddef.h>

typedef struct {
    size_t cap;
    double _Complex *c;    /* scaled group coefficients */
    double _Complex *u;    /* group roots */
    double *y;            /* log-moduli of the coefficients */
    double *absc;         /* |c| */
    size_t *hull;         /* upper hull vertices */
    bool *done;
    double *tmp;          /* 2*cap scratch for sorting */
    size_t *idx;
} tpa_work;

void tpa_work_init(tpa_work *W);
void tpa_work_clear(tpa_work *W);
/* tpa_work_reserve: room for degree d. returns false on out of memory. */
bool tpa_work_reserve(tpa_work *W, size_t d);

/* tpa_solve: the d roots (rho, phi). With warm, rho/phi hold a previous solution of a
 *   nearby polynomial (sorted) used as the starting point. *iters (may be NULL) gets the
 *   largest number of sweeps used by a group. returns 0, or -1 if some group did not
 *   converge even after a cold restart (outputs hold the last approximations). */
int tpa_solve(size_t d, const double *L, const double _Complex *beta, double *rho,
              double *phi, bool warm, tpa_work *W, int *iters);

#endif
