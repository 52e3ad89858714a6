/* json_util.c — small JSON output helpers shared by the side-road writers (roots,
 * lift, amoeba). write_json.c keeps its own buffered copy for speed. */
#include "trope/write.h"

void tp_json_put_string(FILE *o, const char *s)
{
    fputc('"', o);
    for (const unsigned char *p = (const unsigned char *)s; *p; p++) {
        if (*p == '"' || *p == '\\')
            fprintf(o, "\\%c", *p);
        else if (*p < 0x20)
            fprintf(o, "\\u%04x", *p);
        else
            fputc(*p, o);
    }
    fputc('"', o);
}
