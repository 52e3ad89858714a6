/* cmd_batch.c — `trope batch FILE.jsonl`: one job a line, one result line per job, in
 * input order, on N worker threads; --shard K/N keeps every N-th job for job arrays.
 */
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <pthread.h>
#include <time.h>
#include <unistd.h>

#include "common.h"
#include "trope/batch.h"

static const char help_text[] =
    "usage: trope batch FILE.jsonl [options]\n"
    "\n"
    "Run one tropicalization job per line of FILE.jsonl (- for standard input) and write\n"
    "one JSON result per line, in the order of the jobs. A job is an object such as\n"
    "  {\"poly\": \"x^2 + 5*x*y + 25\", \"over\": \"p=5\", \"vars\": \"x y\", \"max\": false}\n"
    "  {\"points\": [[0, 0, \"1/2\"], [1, 0, 3], [0, 1, 0.25]]}\n"
    "(\"over\", \"vars\", \"max\" optional; heights are integers, decimals or strings\n"
    "holding an integer, a fraction p/q or a decimal). A result is the trope.complex/1\n"
    "object on one line, or {\"error\": {\"line\": L, \"col\": C, \"kind\": K, \"message\": M}}\n"
    "for a job that cannot be run; the other jobs go on. Blank lines are not jobs.\n"
    "\n"
    "options:\n"
    "  --jobs N          run N jobs at a time on N threads (default 1)\n"
    "  --shard K/N       take only the jobs on lines i (counted from 0) with\n"
    "                    i mod N = K-1, for K = 1..N (one shard per machine or array task)\n"
    "  -o OUT            write to OUT (atomically) instead of standard output\n"
    "  --over F          field for jobs without \"over\" (default Q)\n"
    "  --max             max convention for jobs without \"max\"\n"
    "  --engine E        hull engine: auto (default), cdd or fast\n"
    "\n"
    "Progress goes to standard error when it is a terminal.\n"
    "exit status: 0 every job ran, 2 some job lines gave errors (their error objects are\n"
    "in the output) or bad usage, 1 other failures (I/O, memory)\n";

typedef struct {
    const char *line;
    size_t len;
    long lineno;
    char *out;           /* result line, set by a worker */
    size_t outlen;
    bool ok, done;
    tp_status st;
} bjob;

typedef struct {
    bjob *jobs;
    size_t njobs;
    size_t next;         /* next job to hand out */
    tp_batch_options opt;
    pthread_mutex_t lock;
    pthread_cond_t ready; /* a job finished */
} pool;

/* Run job k (taken by the caller) and publish its result. */
static void run_job(pool *P, size_t k)
{
    bjob *j = &P->jobs[k];
    char *out = NULL;
    size_t outlen = 0;
    bool ok = false;
    tp_status st = tp_batch_run_line(j->line, j->len, j->lineno, &P->opt, &out, &outlen, &ok);
    pthread_mutex_lock(&P->lock);
    j->out = out;
    j->outlen = outlen;
    j->ok = ok;
    j->st = st;
    j->done = true;
    pthread_cond_broadcast(&P->ready);
    pthread_mutex_unlock(&P->lock);
}

static void *worker(void *arg)
{
    pool *P = arg;
    for (;;) {
        pthread_mutex_lock(&P->lock);
        size_t k = P->next < P->njobs ? P->next++ : P->njobs;
        pthread_mutex_unlock(&P->lock);
        if (k >= P->njobs)
            return NULL;
        run_job(P, k);
    }
}

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + (double)ts.tv_nsec * 1e-9;
}

static bool parse_count(const char *s, long *v)
{
    char *end;
    errno = 0;
    long x = strtol(s, &end, 10);
    if (errno || end == s || *end || x < 1 || x > 100000)
        return false;
    *v = x;
    return true;
}

int cmd_batch(int argc, char **argv)
{
    cli_opts o;
    cli_opts_init(&o);
    long nthreads = 1, shard_k = 1, shard_n = 1;
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i];
        if (strcmp(a, "--help") == 0 || strcmp(a, "-h") == 0) {
            fputs(help_text, stdout);
            return 0;
        }
        if (strcmp(a, "--jobs") == 0 || strncmp(a, "--jobs=", 7) == 0) {
            const char *v = a[6] == '=' ? a + 7 : (i + 1 < argc ? argv[++i] : NULL);
            if (!v || !parse_count(v, &nthreads))
                return cli_usage_error(argv[0], "--jobs: expected a number of threads from "
                                                "1 to 100000, found '%s'", v ? v : "");
            continue;
        }
        if (strcmp(a, "--shard") == 0 || strncmp(a, "--shard=", 8) == 0) {
            const char *v = a[7] == '=' ? a + 8 : (i + 1 < argc ? argv[++i] : NULL);
            char kbuf[32] = "", nbuf[32] = "";
            const char *slash = v ? strchr(v, '/') : NULL;
            if (slash && (size_t)(slash - v) < sizeof kbuf && strlen(slash + 1) < sizeof nbuf) {
                memcpy(kbuf, v, (size_t)(slash - v));
                kbuf[slash - v] = '\0';
                strcpy(nbuf, slash + 1);
            }
            if (!slash || !parse_count(kbuf, &shard_k) || !parse_count(nbuf, &shard_n) ||
                shard_k > shard_n)
                return cli_usage_error(argv[0], "--shard: expected K/N with 1 <= K <= N, "
                                                "found '%s'", v ? v : "");
            continue;
        }
        int r = cli_common_option(&o, argc, argv, &i);
        if (r < 0)
            return 2;
        if (r > 0) {
            if (o.points || o.vars || o.format || o.timings)
                return cli_usage_error(argv[0], "%s does not apply to batch (each job line "
                                                "says what it needs)", a);
            continue;
        }
        if (a[0] == '-' && a[1] != '\0')
            return cli_usage_error(argv[0], "unknown option '%s' (see trope batch --help)", a);
        if (o.input)
            return cli_usage_error(argv[0], "expected one batch file, found '%s' after '%s'",
                                   a, o.input);
        o.input = a;
    }
    if (!o.input)
        return cli_usage_error(argv[0], "expected a batch file FILE.jsonl (or - for "
                                        "standard input)");
    cli_protect_input(o.input);

    tp_error err;
    tp_error_init(&err, strcmp(o.input, "-") == 0 ? "<stdin>" : o.input);
    char *text = NULL;
    size_t len = 0;
    tp_status st = cli_read_all(o.input, &text, &len, 0, &err);
    if (st != TP_OK)
        return cli_report(&err);

    /* Split into lines; keep the shard's non-blank ones. */
    size_t cap = 1024, njobs = 0;
    bjob *jobs = malloc(cap * sizeof *jobs);
    if (!jobs) {
        free(text);
        tp_error_set(&err, TP_ENOMEM, 0, 0, "out of memory (batch)");
        return cli_report(&err);
    }
    long index = 0;
    for (size_t p = 0; p < len; index++) {
        size_t q = p;
        while (q < len && text[q] != '\n')
            q++;
        if (index % shard_n == shard_k - 1 && !tp_batch_line_is_blank(text + p, q - p)) {
            if (njobs == cap) {
                bjob *t = realloc(jobs, 2 * cap * sizeof *t);
                if (!t) {
                    free(jobs);
                    free(text);
                    tp_error_set(&err, TP_ENOMEM, 0, 0, "out of memory (batch)");
                    return cli_report(&err);
                }
                jobs = t;
                cap *= 2;
            }
            memset(&jobs[njobs], 0, sizeof jobs[njobs]);
            jobs[njobs].line = text + p;
            jobs[njobs].len = q - p;
            jobs[njobs].lineno = index + 1;
            njobs++;
        }
        p = q + 1;
    }

    cli_out out;
    st = cli_out_open(&out, o.output, false, &err);
    if (st != TP_OK) {
        free(jobs);
        free(text);
        return cli_report(&err);
    }
    pool P = {.jobs = jobs, .njobs = njobs, .next = 0,
              .opt = {.over = o.over, .max = o.max, .engine = o.engine}};
    if (pthread_mutex_init(&P.lock, NULL) != 0 || pthread_cond_init(&P.ready, NULL) != 0) {
        cli_out_abort(&out);
        free(jobs);
        free(text);
        tp_error_set(&err, TP_EINTERNAL, 0, 0, "cannot create a lock");
        return cli_report(&err);
    }
    if ((size_t)nthreads > njobs)
        nthreads = njobs ? (long)njobs : 1;
    /* nthreads - 1 helper threads; this thread runs jobs too whenever the next result
     * to write is not ready (with --jobs 1 it runs them all, without any handover) */
    pthread_t *th = calloc((size_t)nthreads, sizeof *th);
    long started = 0;
    for (long t = 0; th && t + 1 < nthreads; t++) {
        if (pthread_create(&th[t], NULL, worker, &P) != 0)
            break;
        started++;
    }

    bool tty = isatty(fileno(stderr));
    double last = 0;
    size_t nbad = 0;
    tp_status fatal = TP_OK;
    for (size_t k = 0; k < njobs; k++) {
        pthread_mutex_lock(&P.lock);
        while (!jobs[k].done) {
            if (P.next < P.njobs) {
                size_t mine = P.next++;
                pthread_mutex_unlock(&P.lock);
                run_job(&P, mine);
                pthread_mutex_lock(&P.lock);
            } else {
                pthread_cond_wait(&P.ready, &P.lock);
            }
        }
        pthread_mutex_unlock(&P.lock);
        if (jobs[k].st != TP_OK) {
            if (fatal == TP_OK)
                fatal = tp_error_set(&err, jobs[k].st, 0, 0, "out of memory running the job "
                                     "on line %ld", jobs[k].lineno);
        } else {
            if (!jobs[k].ok)
                nbad++;
            if (fatal == TP_OK && fwrite(jobs[k].out, 1, jobs[k].outlen, out.f) !=
                                      jobs[k].outlen)
                fatal = tp_error_set(&err, TP_EIO, 0, 0, "cannot write the results: %s",
                                     strerror(errno));
        }
        free(jobs[k].out);
        jobs[k].out = NULL;
        if (tty) {
            double t = now_s();
            if (t - last > 0.2 || k + 1 == njobs) {
                fprintf(stderr, "\rtrope batch: %zu/%zu jobs done, %zu with errors", k + 1,
                        njobs, nbad);
                last = t;
            }
        }
    }
    if (tty && njobs > 0)
        fputc('\n', stderr);
    for (long t = 0; t < started; t++)
        pthread_join(th[t], NULL);
    free(th);
    pthread_cond_destroy(&P.ready);
    pthread_mutex_destroy(&P.lock);
    free(jobs);
    free(text);
    if (fatal != TP_OK) {
        cli_out_abort(&out);
        return cli_report(&err);
    }
    st = cli_out_commit(&out, &err);
    if (st != TP_OK)
        return cli_report(&err);
    if (nbad > 0) {
        fprintf(stderr, "trope batch: %zu of %zu jobs gave errors (see the error objects in "
                        "the output)\n", nbad, njobs);
        return 2;
    }
    return 0;
}
