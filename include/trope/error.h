/* trope/error.h — status codes and the one error type of libtrope.
 *
 * Invariants: the library never prints and never exits. Every fallible function
 * returns a tp_status and, on failure, fills a caller-provided tp_error with the
 * code, the position in the user's input (1-based line and column, 0 when there is
 * none) and a one-line message saying what was expected.
 */
#ifndef TROPE_ERROR_H
#define TROPE_ERROR_H

#include <stddef.h>

#define TP_MUST_CHECK __attribute__((warn_unused_result))

typedef enum {
    TP_OK = 0,
    TP_ESYNTAX,    /* malformed input text */
    TP_EDOMAIN,    /* well-formed but meaningless: zero polynomial, p not prime, 1/0 */
    TP_EOVERFLOW,  /* an exponent or count left int64 */
    TP_ELIMIT,     /* input larger than a configured limit (message names the option) */
    TP_ENOMEM,
    TP_EIO,
    TP_EHULL,      /* the hull engine failed */
    TP_EINTERNAL   /* a self-check failed: a bug in trope */
} tp_status;

typedef struct {
    tp_status code;
    char file[256];  /* input name, "" if none, "-" or "<stdin>" for standard input */
    int line, col;   /* 1-based position in the input, 0 if none */
    char msg[512];
} tp_error;

/* tp_error_set: fill e (may be NULL) with code c, position line:col and a printf-style
 *   message; keeps e->file. returns: c. */
tp_status tp_error_set(tp_error *e, tp_status c, int line, int col, const char *fmt, ...)
    __attribute__((format(printf, 5, 6)));

/* tp_error_init: clear e and set its file name (NULL means none). */
void tp_error_init(tp_error *e, const char *file);

/* tp_error_format: "file:line:col: msg" (position parts left out when unknown) into buf. */
void tp_error_format(const tp_error *e, char *buf, size_t size);

/* tp_status_name: a short constant name for a status, e.g. "syntax". */
const char *tp_status_name(tp_status s);

#endif
