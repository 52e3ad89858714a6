/* common.h — shared plumbing for the trope subcommands (src/cli/cmd_*.c).
 *
 * Every subcommand is `int cmd_NAME(int argc, char **argv)` (argv[0] is the command
 * name), registered in main.c's table. Exit codes: 0 success, 2 bad input or bad
 * usage (one line on stderr: "file:line:col: what was expected"), 1 other failures
 * (I/O, internal). Nothing mathematical lives in src/cli.
 */
#ifndef TROPE_CLI_COMMON_H
#define TROPE_CLI_COMMON_H

#include <stdbool.h>
#include <stdio.h>
#include "trope/error.h"
#include "trope/poly.h"
#include "trope/hull.h"

/* Options understood by every command that reads a polynomial. */
typedef struct {
    const char *input;       /* FILE or "-" (stdin); NULL if none given */
    const char *points;      /* --points FILE.csv */
    const char *over;        /* --over */
    const char *vars;        /* --vars */
    const char *output;      /* -o OUT ("-" = stdout); NULL = stdout */
    const char *format;      /* --format */
    bool max;                /* --max */
    tp_engine engine;        /* --engine auto|cdd|fast */
    bool timings;            /* --timings */
    tp_parse_options limits; /* --max-terms, --max-depth, --max-digits, --max-polys */
    size_t max_cdd_points;   /* --max-cdd-points (0: the library's default) */
    size_t max_cells;        /* --max-cells (0: the library's default) */
} cli_opts;

/* cli_common_option: if argv[*i] is one of the common options above, consume it (and
 * its value, advancing *i) into o and return 1; return 0 if it is not a common option;
 * return -1 after printing a usage error (missing or bad value). */
int cli_common_option(cli_opts *o, int argc, char **argv, int *i);
void cli_opts_init(cli_opts *o);

/* cli_tune_heap: the program's allocator policy for large runs (heap.c); call first. */
void cli_tune_heap(void);

/* cli_read_all: read a whole file ("-" = stdin) into a malloc'ed, NUL-terminated buffer.
 *   returns TP_OK or TP_EIO (message names the file and the system error);
 *   TP_ELIMIT beyond `limit` bytes (0 = 1 GiB). */
tp_status cli_read_all(const char *path, char **buf, size_t *len, size_t limit,
                       tp_error *err);

/* cli_parse_input: read o->input and parse it with o->over, o->vars and the limits. */
tp_status cli_parse_input(const cli_opts *o, tp_input *in, tp_error *err);

/* Atomic output: data goes to a temporary file in the destination's folder and is
 * renamed over `path` only by cli_out_commit; cli_out_abort (and a SIGINT/SIGTERM
 * handler installed by cli_out_open) removes the temporary file. path NULL or "-" is
 * stdout. Refuses (TP_EIO) to write over any path registered with cli_protect_input. */
typedef struct {
    FILE *f;
    char *path;      /* final path, NULL for stdout */
    char *tmp;       /* temporary path */
} cli_out;
tp_status cli_out_open(cli_out *o, const char *path, bool binary, tp_error *err);
tp_status cli_out_commit(cli_out *o, tp_error *err);
void cli_out_abort(cli_out *o);
void cli_protect_input(const char *path);

/* cli_report: print "file:line:col: message" (tp_error_format) on stderr and return the
 * exit code for err->code (2 for input errors, 1 otherwise). */
int cli_report(const tp_error *err);
/* cli_usage_error: print "trope CMD: message" and return 2. */
int cli_usage_error(const char *cmd, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

/* The extension of path ("png", "svg", ...) or "" ; used to pick output formats. */
const char *cli_extension(const char *path);

#endif
