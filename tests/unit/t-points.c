/* t-points.c — lifted point sets: heights from valuations, the CSV reader, dup marks.
 * Valuations are worked by hand (v_5(25) = 2, v_5(1/5) = -1: the definition of v_p,
 * common practice, no source).
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "testlib.h"
#include "trope/points.h"
#include "ptsbuild.h"

static void from_poly(void)
{
    tp_input in;
    tp_input_init(&in);
    tp_error err;
    tp_error_init(&err, "in");
    tp_parse_options o;
    memset(&o, 0, sizeof o);
    const char *text = "over: p=5\n25*x^2 + 3*x*y - 1/5 + 10*y";
    tp_check(tp_input_parse(&in, text, strlen(text), &o, &err) == TP_OK, "parse: %s", err.msg);
    tp_points P;
    tp_points_init(&P);
    tp_check(tp_points_from_poly(&P, &in.polys[0], &in.field, &err) == TP_OK, "from_poly");
    /* sorted terms: x^2 (25), x*y (3), y (10), 1 (-1/5) */
    long want[4] = {2, 0, 1, -1};
    const char *res[4] = {"1", "3", "2", "4"}; /* 25/25, 3, 10/5, -1 mod 5 */
    tp_check(P.count == 4 && P.n == 2, "4 points in Z^2");
    for (size_t k = 0; k < P.count && k < 4; k++) {
        tp_check(mpq_cmp_si(P.heights[k], want[k], 1) == 0, "height %zu", k);
        tp_check(P.residue[k] && strcmp(P.residue[k], res[k]) == 0, "residue %zu: %s", k,
                 P.residue[k] ? P.residue[k] : "(null)");
        tp_check(!P.dup[k], "no dup");
    }
    tp_points_clear(&P);
    tp_input_clear(&in);
}

static void csv_ok(void)
{
    const char *text = "# lifted points\ni, j, height\n0,0, 1/2\n\n1, 0, 0.25 # comment\n0,1,-3\r\n1,0,-1\n";
    tp_points P;
    tp_error err;
    tp_error_init(&err, "pts.csv");
    tp_status st = tp_points_read_csv(&P, text, strlen(text), &err);
    tp_check(st == TP_OK, "csv: %s", err.msg);
    if (st != TP_OK)
        return;
    tp_check(P.n == 2 && P.count == 4 && P.nnames == 2 && strcmp(P.names[0], "i") == 0 &&
                 strcmp(P.names[1], "j") == 0, "shape and names");
    tp_check(mpq_cmp_si(P.heights[0], 1, 2) == 0 && mpq_cmp_si(P.heights[1], 1, 4) == 0 &&
                 mpq_cmp_si(P.heights[2], -3, 1) == 0, "exact heights");
    /* (1,0) appears twice: the lower height (-1, row 3) wins */
    tp_check(P.dup[1] && !P.dup[3] && !P.dup[0] && !P.dup[2], "dup marks");
    tp_points_negate_heights(&P);
    tp_check(!P.dup[1] && P.dup[3] && mpq_cmp_si(P.heights[2], 3, 1) == 0, "negate and re-mark");
    tp_points_clear(&P);
}

struct bad { const char *text; tp_status code; int line, col; const char *msg; };

static void csv_bad(void)
{
    static const struct bad cat[] = {
        {"0,0,1\n1,0,2\n0,1,3\n1,1,4\n2,0,1,5\n", TP_ESYNTAX, 5, 7, "expected 3 fields as on line 1, found 4"},
        {"0,0,1\n1,0\n", TP_ESYNTAX, 2, 4, "expected 3 fields as on line 1, found 2"},
        {"0,0,1\n1,x,2\n", TP_ESYNTAX, 2, 3, "expected an integer exponent"},
        {"0,0,1\n99999999999999999999,0,2\n", TP_EOVERFLOW, 2, 1, "64 bits"},
        {"0,0,1\n1,0,2/0\n", TP_EDOMAIN, 2, 5, "division by zero"},
        {"0,0,1\n1,0,abc\n", TP_ESYNTAX, 2, 5, "expected a height"},
        {"# nothing\n\n", TP_EDOMAIN, 1, 1, "empty point file"},
        {"5\n", TP_ESYNTAX, 1, 2, "at least 2 fields"},
        {"0,0,1\n1,0,\x01\n", TP_ESYNTAX, 2, 5, "expected a height"},
    };
    for (size_t k = 0; k < sizeof cat / sizeof cat[0]; k++) {
        tp_points P;
        tp_error err;
        tp_error_init(&err, "pts.csv");
        tp_status st = tp_points_read_csv(&P, cat[k].text, strlen(cat[k].text), &err);
        tp_check(st == cat[k].code && err.line == cat[k].line && err.col == cat[k].col &&
                     strstr(err.msg, cat[k].msg), "csv bad #%zu: %s %d:%d %s", k,
                 tp_status_name(st), err.line, err.col, err.msg);
        tp_check(P.count == 0, "cleared after error");
        tp_points_clear(&P);
    }
}

/* Dup marks against their definition, checked pair by pair: a point is a duplicate when
 * another point has the same exponents and a smaller height, ties to the smaller index
 * (the minimum of a monomial's coefficients' valuations wins: common practice, no
 * source). Small exponent ranges and few heights make duplicates and ties frequent;
 * grids in increasing order take the shortcut. */
static void dup_marks(void)
{
    tp_rng r;
    tp_rng_seed(&r, 0x647570);
    for (int it = 0; it < 400; it++) {
        size_t n = (size_t)tp_rng_range(&r, 0, 3);
        size_t count = (size_t)tp_rng_range(&r, 1, it % 10 == 0 ? 3000 : 60);
        tp_points P;
        pts_random(&P, &r, n, count, tp_rng_range(&r, 0, it % 3 == 0 ? 40 : 3),
                   tp_rng_range(&r, 0, 4));
        size_t bad = 0;
        for (size_t a = 0; a < count && (count <= 60 || a < 60); a++) {
            bool want = false;
            for (size_t b = 0; b < count && !want; b++) {
                if (b == a)
                    continue;
                bool same = true;
                for (size_t j = 0; j < n && same; j++)
                    same = P.exps[a * n + j] == P.exps[b * n + j];
                int c = mpq_cmp(P.heights[b], P.heights[a]);
                want = same && (c < 0 || (c == 0 && b < a));
            }
            bad += want != P.dup[a];
        }
        tp_check(bad == 0, "dup marks, case %d (n %zu, %zu points): %zu wrong", it, n, count,
                 bad);
        tp_points_clear(&P);
    }
    /* an increasing grid has no duplicates */
    long e[2 * 30], h[30];
    for (int i = 0; i < 30; i++) {
        e[2 * i] = i / 6;
        e[2 * i + 1] = i % 6;
        h[i] = 1;
    }
    tp_points G;
    pts_make(&G, 2, 30, e, h, NULL);
    size_t ndup = 0;
    for (size_t i = 0; i < 30; i++)
        ndup += G.dup[i];
    tp_check(ndup == 0, "grid: %zu dup marks", ndup);
    tp_points_clear(&G);
}

int main(void)
{
    dup_marks();
    from_poly();
    csv_ok();
    csv_bad();
    return tp_test_finish("t-points");
}
