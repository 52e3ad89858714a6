/* trope/trop.h — the whole tropicalize pipeline in one object.
 *
 * tp_trop owns everything from the points on: points -> hull -> subdivision -> complex.
 * Writers (write.h) read a tp_trop and never compute geometry.
 */
#ifndef TROPE_TROP_H
#define TROPE_TROP_H

#include "trope/complex.h"
#include "trope/field.h"
#include "trope/points.h"
#include "trope/poly.h"
#include "trope/subdiv.h"

typedef struct {
    bool max;            /* max convention */
    tp_engine engine;
    size_t max_cdd_points; /* refuse (TP_ELIMIT) inputs that need the cddlib engine and
                              have more distinct points than this; 0 = the default,
                              TP_TROP_MAX_CDD_POINTS (--max-cdd-points) */
    size_t max_cells;      /* refuse subdivisions with more faces (--max-cells); 0 =
                              TP_SUBDIV_MAX_CELLS */
} tp_trop_options;

#define TP_TROP_MAX_CDD_POINTS 3000

typedef struct {
    bool has_field;      /* false for --points input */
    tp_field field;
    size_t nvars;
    char **vars;         /* owned copies */
    bool has_poly;
    tp_poly poly;        /* owned copy of the input polynomial (terms), if has_poly */
    tp_points points;
    tp_subdiv subdiv;
    tp_complex complex;
    bool max;
    char source[256];    /* input name */
    double ms_hull, ms_subdiv, ms_complex; /* stage CPU times, last run (--timings) */
} tp_trop;

void tp_trop_init(tp_trop *T);
void tp_trop_clear(tp_trop *T);

/* tp_trop_from_poly: run the pipeline on polynomial `index` of `in`.
 *   returns TP_OK or the first failing stage's status. */
TP_MUST_CHECK tp_status tp_trop_from_poly(tp_trop *T, const tp_input *in, size_t index,
                                          const tp_trop_options *opt, tp_error *err);

/* tp_trop_from_points: run the pipeline on a point set (moved into T: P is left
 *   empty). With opt->max the heights are read as max-convention coefficients
 *   (negated before the lower hull). */
TP_MUST_CHECK tp_status tp_trop_from_points(tp_trop *T, tp_points *P,
                                            const tp_trop_options *opt, tp_error *err);

#endif
