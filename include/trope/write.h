/* trope/write.h — writers. Each reads a tp_trop and writes to a FILE; none computes
 * geometry. Output is deterministic: the same tp_trop gives the same bytes.
 */
#ifndef TROPE_WRITE_H
#define TROPE_WRITE_H

#include <stdio.h>
#include "trope/trop.h"

/* Human-readable report: aligned tables, exact rationals. returns TP_OK or TP_EIO. */
TP_MUST_CHECK tp_status tp_write_text(FILE *out, const tp_trop *T, tp_error *err);

/* JSON following data/schema/trope.complex-1.schema.json ("format":"trope.complex/1").
 * One object per call, newline-terminated. returns TP_OK or TP_EIO. */
TP_MUST_CHECK tp_status tp_write_json(FILE *out, const tp_trop *T, tp_error *err);

/* tp_json_put_string: s as a JSON string literal (quotes, backslashes and control
 * characters escaped; UTF-8 passed through). */
void tp_json_put_string(FILE *out, const char *s);

#endif
