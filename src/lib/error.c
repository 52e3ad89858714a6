/* error.c — tp_error helpers. */
#include "trope/error.h"

#include <stdarg.h>
#include <stdio.h>
#include <string.h>

tp_status tp_error_set(tp_error *e, tp_status c, int line, int col, const char *fmt, ...)
{
    if (!e)
        return c;
    e->code = c;
    e->line = line;
    e->col = col;
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(e->msg, sizeof e->msg, fmt, ap);
    va_end(ap);
    return c;
}

void tp_error_init(tp_error *e, const char *file)
{
    memset(e, 0, sizeof *e);
    if (file)
        snprintf(e->file, sizeof e->file, "%s", file);
}

void tp_error_format(const tp_error *e, char *buf, size_t size)
{
    const char *file = e->file[0] ? e->file : "trope";
    if (e->line > 0 && e->col > 0)
        snprintf(buf, size, "%s:%d:%d: %s", file, e->line, e->col, e->msg);
    else if (e->line > 0)
        snprintf(buf, size, "%s:%d: %s", file, e->line, e->msg);
    else
        snprintf(buf, size, "%s: %s", file, e->msg);
}

const char *tp_status_name(tp_status s)
{
    switch (s) {
    case TP_OK: return "ok";
    case TP_ESYNTAX: return "syntax";
    case TP_EDOMAIN: return "domain";
    case TP_EOVERFLOW: return "overflow";
    case TP_ELIMIT: return "limit";
    case TP_ENOMEM: return "out of memory";
    case TP_EIO: return "io";
    case TP_EHULL: return "hull";
    case TP_EINTERNAL: return "internal";
    }
    return "unknown";
}
