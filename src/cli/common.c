/* common.c — shared plumbing for the trope subcommands: options, input, atomic output,
 * error reporting. See common.h. Nothing mathematical lives here.
 */
#include "common.h"

#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <signal.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "trope/field.h"

/* ---------------------------------------------------------------- options */

void cli_opts_init(cli_opts *o)
{
    memset(o, 0, sizeof *o);
    o->engine = TP_ENGINE_AUTO;
}

/* Split "--name=value" or take the next argument as the value. Returns the value or
 * NULL after printing a usage error. *consumed tells whether argv[*i+1] was used. */
static const char *option_value(const char *cmd, const char *name, int argc, char **argv,
                                int *i)
{
    const char *arg = argv[*i];
    size_t nlen = strlen(name);
    if (arg[nlen] == '=')
        return arg + nlen + 1;
    if (*i + 1 >= argc) {
        cli_usage_error(cmd, "%s: expected a value after it", name);
        return NULL;
    }
    (*i)++;
    return argv[*i];
}

/* Does arg name option `name` (exactly, or as "name=value")? */
static bool is_option(const char *arg, const char *name)
{
    size_t nlen = strlen(name);
    return strncmp(arg, name, nlen) == 0 && (arg[nlen] == '\0' || arg[nlen] == '=');
}

static int parse_count(const char *cmd, const char *name, const char *v, size_t *out)
{
    const char *s = v;
    if (*s == '\0')
        return cli_usage_error(cmd, "%s: expected a positive integer, found ''", name),
               -1;
    uintmax_t x = 0;
    for (; *s; s++) {
        if (*s < '0' || *s > '9' || x > (SIZE_MAX - 9) / 10) {
            cli_usage_error(cmd, "%s: expected a positive integer, found '%s'", name, v);
            return -1;
        }
        x = x * 10 + (uintmax_t)(*s - '0');
    }
    if (x == 0) {
        cli_usage_error(cmd, "%s: expected a positive integer, found '%s'", name, v);
        return -1;
    }
    *out = (size_t)x;
    return 1;
}

int cli_common_option(cli_opts *o, int argc, char **argv, int *i)
{
    const char *cmd = argv[0];
    const char *arg = argv[*i];
    const char *v;

    if (is_option(arg, "--over")) {
        if (!(v = option_value(cmd, "--over", argc, argv, i)))
            return -1;
        tp_field F;
        tp_error e;
        tp_field_init(&F);
        tp_error_init(&e, NULL);
        tp_status st = tp_field_parse(&F, v, &e);
        tp_field_clear(&F);
        if (st != TP_OK) {
            cli_usage_error(cmd, "--over: expected p=PRIME, Q, C or a parameter name, "
                                 "found '%s' (%s)", v, e.msg);
            return -1;
        }
        o->over = v;
        o->limits.over = v;
        return 1;
    }
    if (is_option(arg, "--vars")) {
        if (!(v = option_value(cmd, "--vars", argc, argv, i)))
            return -1;
        if (*v == '\0') {
            cli_usage_error(cmd, "--vars: expected variable names like x,y,z, found ''");
            return -1;
        }
        o->vars = v;
        o->limits.vars = v;
        return 1;
    }
    if (strcmp(arg, "--max") == 0) {
        o->max = true;
        return 1;
    }
    if (strcmp(arg, "--min") == 0) {
        o->max = false;
        return 1;
    }
    if (is_option(arg, "--format")) {
        if (!(v = option_value(cmd, "--format", argc, argv, i)))
            return -1;
        o->format = v;
        return 1;
    }
    if (strcmp(arg, "-o") == 0 || is_option(arg, "--output")) {
        if (strcmp(arg, "-o") == 0) {
            if (*i + 1 >= argc) {
                cli_usage_error(cmd, "-o: expected an output file name after it");
                return -1;
            }
            v = argv[++(*i)];
        } else if (!(v = option_value(cmd, "--output", argc, argv, i))) {
            return -1;
        }
        if (*v == '\0') {
            cli_usage_error(cmd, "-o: expected an output file name, found ''");
            return -1;
        }
        o->output = v;
        return 1;
    }
    if (is_option(arg, "--points")) {
        if (!(v = option_value(cmd, "--points", argc, argv, i)))
            return -1;
        o->points = v;
        return 1;
    }
    if (is_option(arg, "--engine")) {
        if (!(v = option_value(cmd, "--engine", argc, argv, i)))
            return -1;
        if (strcmp(v, "auto") == 0)
            o->engine = TP_ENGINE_AUTO;
        else if (strcmp(v, "cdd") == 0)
            o->engine = TP_ENGINE_CDD;
        else if (strcmp(v, "fast") == 0)
            o->engine = TP_ENGINE_FAST;
        else {
            cli_usage_error(cmd, "--engine: expected auto, cdd or fast, found '%s'", v);
            return -1;
        }
        return 1;
    }
    if (strcmp(arg, "--timings") == 0) {
        o->timings = true;
        return 1;
    }
    if (is_option(arg, "--max-terms")) {
        if (!(v = option_value(cmd, "--max-terms", argc, argv, i)))
            return -1;
        return parse_count(cmd, "--max-terms", v, &o->limits.max_terms);
    }
    if (is_option(arg, "--max-depth")) {
        if (!(v = option_value(cmd, "--max-depth", argc, argv, i)))
            return -1;
        return parse_count(cmd, "--max-depth", v, &o->limits.max_depth);
    }
    if (is_option(arg, "--max-cells")) {
        if (!(v = option_value(cmd, "--max-cells", argc, argv, i)))
            return -1;
        return parse_count(cmd, "--max-cells", v, &o->max_cells);
    }
    if (is_option(arg, "--max-cdd-points")) {
        if (!(v = option_value(cmd, "--max-cdd-points", argc, argv, i)))
            return -1;
        return parse_count(cmd, "--max-cdd-points", v, &o->max_cdd_points);
    }
    if (is_option(arg, "--max-polys")) {
        if (!(v = option_value(cmd, "--max-polys", argc, argv, i)))
            return -1;
        return parse_count(cmd, "--max-polys", v, &o->limits.max_polys);
    }
    if (is_option(arg, "--max-digits")) {
        if (!(v = option_value(cmd, "--max-digits", argc, argv, i)))
            return -1;
        return parse_count(cmd, "--max-digits", v, &o->limits.max_digits);
    }
    return 0;
}

/* ---------------------------------------------------------------- input */

tp_status cli_read_all(const char *path, char **buf, size_t *len, size_t limit,
                       tp_error *err)
{
    bool is_stdin = strcmp(path, "-") == 0;
    const char *name = is_stdin ? "<stdin>" : path;
    if (limit == 0)
        limit = (size_t)1 << 30;
    *buf = NULL;
    *len = 0;
    if (err && err->file[0] == '\0')
        snprintf(err->file, sizeof err->file, "%s", name);

    FILE *f = is_stdin ? stdin : fopen(path, "rb");
    if (!f)
        return tp_error_set(err, TP_EDOMAIN, 0, 0, "cannot open: %s", strerror(errno));
    if (!is_stdin) {
        struct stat sb;
        if (fstat(fileno(f), &sb) == 0 && S_ISDIR(sb.st_mode)) {
            fclose(f);
            return tp_error_set(err, TP_EDOMAIN, 0, 0, "expected a file, found a directory");
        }
    }
    size_t cap = 65536, n = 0;
    char *b = malloc(cap);
    if (!b) {
        if (!is_stdin)
            fclose(f);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory reading the input");
    }
    for (;;) {
        if (cap - n < 2) {
            if (cap > limit) {
                free(b);
                if (!is_stdin)
                    fclose(f);
                return tp_error_set(err, TP_ELIMIT, 0, 0,
                                    "input larger than %zu bytes", limit);
            }
            size_t ncap = cap * 2;
            char *nb = realloc(b, ncap);
            if (!nb) {
                free(b);
                if (!is_stdin)
                    fclose(f);
                return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory reading the input");
            }
            b = nb;
            cap = ncap;
        }
        size_t got = fread(b + n, 1, cap - n - 1, f);
        n += got;
        if (n > limit) {
            free(b);
            if (!is_stdin)
                fclose(f);
            return tp_error_set(err, TP_ELIMIT, 0, 0, "input larger than %zu bytes", limit);
        }
        if (got == 0)
            break;
    }
    bool bad = ferror(f) != 0;
    int saved = errno;
    if (!is_stdin)
        fclose(f);
    if (bad) {
        free(b);
        return tp_error_set(err, TP_EIO, 0, 0, "cannot read: %s", strerror(saved));
    }
    b[n] = '\0';
    *buf = b;
    *len = n;
    return TP_OK;
}

tp_status cli_parse_input(const cli_opts *o, tp_input *in, tp_error *err)
{
    const char *path = o->input ? o->input : "-";
    tp_error_init(err, strcmp(path, "-") == 0 ? "<stdin>" : path);
    char *text;
    size_t len;
    tp_status st = cli_read_all(path, &text, &len, 0, err);
    if (st != TP_OK)
        return st;
    tp_parse_options popt = o->limits;
    popt.over = o->over;
    popt.vars = o->vars;
    st = tp_input_parse(in, text, len, &popt, err);
    free(text);
    return st;
}

/* ---------------------------------------------------------------- atomic output */

/* The CLI (not the library) keeps the list of protected inputs and the temporary file
 * being written, so the signal handler can remove it. */
#define MAX_PROTECTED 64
static struct {
    dev_t dev;
    ino_t ino;
} protected_inputs[MAX_PROTECTED];
static size_t nprotected;

static char pending_tmp[PATH_MAX + 64];
static volatile sig_atomic_t pending_active;

static void on_signal(int sig)
{
    if (pending_active)
        unlink(pending_tmp);
    signal(sig, SIG_DFL);
    raise(sig);
}

void cli_protect_input(const char *path)
{
    struct stat sb;
    if (!path || strcmp(path, "-") == 0 || nprotected >= MAX_PROTECTED)
        return;
    if (stat(path, &sb) != 0)
        return;
    protected_inputs[nprotected].dev = sb.st_dev;
    protected_inputs[nprotected].ino = sb.st_ino;
    nprotected++;
}

static bool is_protected(const char *path)
{
    struct stat sb;
    if (stat(path, &sb) != 0)
        return false;
    for (size_t k = 0; k < nprotected; k++)
        if (protected_inputs[k].dev == sb.st_dev && protected_inputs[k].ino == sb.st_ino)
            return true;
    return false;
}

tp_status cli_out_open(cli_out *o, const char *path, bool binary, tp_error *err)
{
    (void)binary; /* POSIX streams make no text/binary distinction */
    memset(o, 0, sizeof *o);
    if (!path || strcmp(path, "-") == 0) {
        o->f = stdout;
        return TP_OK;
    }
    tp_error_init(err, path);
    if (is_protected(path))
        return tp_error_set(err, TP_EDOMAIN, 0, 0,
                            "refusing to write over an input file (choose another -o)");
    struct stat sb;
    if (stat(path, &sb) == 0 && S_ISDIR(sb.st_mode))
        return tp_error_set(err, TP_EIO, 0, 0, "expected a file name, found a directory");
    if (stat(path, &sb) == 0 && !S_ISREG(sb.st_mode)) {
        /* A device or pipe (-o /dev/null, a FIFO): write to it directly; renaming a
         * temporary file over it would replace the device itself. */
        o->path = strdup(path);
        if (!o->path)
            return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
        o->f = fopen(path, "w");
        if (!o->f) {
            int saved = errno;
            free(o->path);
            o->path = NULL;
            return tp_error_set(err, TP_EIO, 0, 0, "cannot write: %s", strerror(saved));
        }
        return TP_OK;
    }

    size_t plen = strlen(path);
    if (plen + 32 > sizeof pending_tmp)
        return tp_error_set(err, TP_EIO, 0, 0, "output path too long");
    o->path = strdup(path);
    o->tmp = malloc(plen + 32);
    if (!o->path || !o->tmp) {
        free(o->path);
        free(o->tmp);
        memset(o, 0, sizeof *o);
        return tp_error_set(err, TP_ENOMEM, 0, 0, "out of memory");
    }
    /* The temporary lives in the destination's folder, so rename is atomic. */
    const char *slash = strrchr(path, '/');
    size_t dirlen = slash ? (size_t)(slash - path) + 1 : 0;
    snprintf(o->tmp, plen + 32, "%.*s.%s.tmpXXXXXX", (int)dirlen, path,
             path + dirlen);

    sigset_t block, old;
    sigemptyset(&block);
    sigaddset(&block, SIGINT);
    sigaddset(&block, SIGTERM);
    sigprocmask(SIG_BLOCK, &block, &old);
    int fd = mkstemp(o->tmp);
    int saved = errno;
    if (fd >= 0) {
        snprintf(pending_tmp, sizeof pending_tmp, "%s", o->tmp);
        pending_active = 1;
        struct sigaction sa;
        memset(&sa, 0, sizeof sa);
        sa.sa_handler = on_signal;
        sigemptyset(&sa.sa_mask);
        sigaction(SIGINT, &sa, NULL);
        sigaction(SIGTERM, &sa, NULL);
    }
    sigprocmask(SIG_SETMASK, &old, NULL);
    if (fd < 0) {
        free(o->path);
        free(o->tmp);
        memset(o, 0, sizeof *o);
        return tp_error_set(err, TP_EIO, 0, 0, "cannot create a file next to it: %s",
                            strerror(saved));
    }
    /* mkstemp gives 0600; use the usual mode for new files. */
    mode_t mask = umask(0);
    umask(mask);
    if (fchmod(fd, 0666 & ~mask) != 0) {
        /* not fatal: the file is still ours and readable by us */
    }
    o->f = fdopen(fd, "w");
    if (!o->f) {
        saved = errno;
        close(fd);
        cli_out_abort(o);
        return tp_error_set(err, TP_EIO, 0, 0, "cannot write: %s", strerror(saved));
    }
    return TP_OK;
}

static void forget_pending(void)
{
    pending_active = 0;
    signal(SIGINT, SIG_DFL);
    signal(SIGTERM, SIG_DFL);
}

tp_status cli_out_commit(cli_out *o, tp_error *err)
{
    if (!o->f)
        return TP_OK;
    if (!o->path) {
        bool bad = fflush(o->f) != 0 || ferror(o->f);
        o->f = NULL;
        if (bad) {
            tp_error_init(err, "<stdout>");
            return tp_error_set(err, TP_EIO, 0, 0, "cannot write: %s", strerror(errno));
        }
        return TP_OK;
    }
    tp_error_init(err, o->path);
    bool bad = ferror(o->f) != 0;
    if (fflush(o->f) != 0)
        bad = true;
    int saved = errno;
    if (fclose(o->f) != 0) {
        bad = true;
        saved = errno;
    }
    o->f = NULL;
    if (bad) {
        cli_out_abort(o);
        return tp_error_set(err, TP_EIO, 0, 0, "cannot write: %s", strerror(saved));
    }
    if (!o->tmp) { /* written directly (a device or pipe) */
        free(o->path);
        memset(o, 0, sizeof *o);
        return TP_OK;
    }
    if (rename(o->tmp, o->path) != 0) {
        saved = errno;
        cli_out_abort(o);
        return tp_error_set(err, TP_EIO, 0, 0, "cannot rename the finished output: %s",
                            strerror(saved));
    }
    forget_pending();
    free(o->path);
    free(o->tmp);
    memset(o, 0, sizeof *o);
    return TP_OK;
}

void cli_out_abort(cli_out *o)
{
    if (o->f && o->path)
        fclose(o->f);
    else if (o->f)
        fflush(o->f);
    if (o->tmp) {
        unlink(o->tmp);
        forget_pending();
    }
    free(o->path);
    free(o->tmp);
    memset(o, 0, sizeof *o);
}

/* ---------------------------------------------------------------- errors */

int cli_report(const tp_error *err)
{
    char buf[1024];
    tp_error_format(err, buf, sizeof buf);
    fprintf(stderr, "%s\n", buf);
    switch (err->code) {
    case TP_ESYNTAX:
    case TP_EDOMAIN:
    case TP_EOVERFLOW:
    case TP_ELIMIT:
        return 2;
    default:
        return 1;
    }
}

int cli_usage_error(const char *cmd, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    if (cmd && *cmd)
        fprintf(stderr, "trope %s: ", cmd);
    else
        fprintf(stderr, "trope: ");
    vfprintf(stderr, fmt, ap);
    fputc('\n', stderr);
    va_end(ap);
    return 2;
}

const char *cli_extension(const char *path)
{
    if (!path)
        return "";
    const char *slash = strrchr(path, '/');
    const char *base = slash ? slash + 1 : path;
    const char *dot = strrchr(base, '.');
    if (!dot || dot == base)
        return "";
    return dot + 1;
}
