/* trope/batch.h — one tropicalization job per line of JSON (JSON Lines), one result
 * line per job.
 *
 * A job is a JSON object on one line, either
 *   {"poly": "3*x^2 + 5*x*y - 1", "over": "p=5", "vars": "x y", "max": false}
 * ("over", "vars" and "max" optional; exactly one polynomial in "poly"), or
 *   {"points": [[0, 0, "1/2"], [1, 0, 3], [0, 1, "0.25"]], "max": false}
 * (exponents as integers, the last entry of each row the height: an integer, a
 * decimal read exactly, or a string holding an integer, fraction p/q or decimal).
 *
 * The result of a job is the trope.complex/1 JSON object (as written by
 * tp_write_json) on a single line, or, when the job cannot be run,
 *   {"error": {"line": L, "col": C, "kind": "syntax", "message": "..."}}
 * where L is the job's line in the batch file and C the 1-based column in that line
 * (0 when no position applies). Invariants: results are deterministic (same line,
 * same bytes) and never contain a newline except the final one.
 *
 * Reentrant: the functions here keep no state between calls and may run on several
 * threads at once (cddlib is serialised inside the hull module).
 */
#ifndef TROPE_BATCH_H
#define TROPE_BATCH_H

#include <stdbool.h>
#include <stddef.h>
#include "trope/error.h"
#include "trope/hull.h"

typedef struct {
    const char *over;    /* default field when a job has no "over" (NULL: Q) */
    bool max;            /* default convention when a job has no "max" */
    tp_engine engine;
} tp_batch_options;

/* tp_batch_run_line: run the job in line[0..len) (line number `lineno`, for messages)
 *   and store its result line, newline-terminated and NUL-terminated, in a malloc'ed
 *   *out (length *outlen). A bad job is not a failure: its result is an error object
 *   and *job_ok is set to false.
 *   returns TP_OK, or TP_ENOMEM (then *out is NULL). */
TP_MUST_CHECK tp_status tp_batch_run_line(const char *line, size_t len, long lineno,
                                          const tp_batch_options *opt, char **out,
                                          size_t *outlen, bool *job_ok);

/* tp_batch_line_is_blank: true for lines holding only white space (they are not jobs). */
bool tp_batch_line_is_blank(const char *line, size_t len);

#endif
