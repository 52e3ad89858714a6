/* main.c — `trope COMMAND ...`: dispatch to the subcommands in the table below.
 *
 * To add a subcommand: write src/cli/cmd_NAME.c with `int cmd_NAME(int argc, char
 * **argv)` (argv[0] is "NAME"; it must answer `--help` on stdout with exit 0), declare it
 * here and add one line to `commands` (see DEVELOPERS.md).
 */
#include <stdio.h>
#include <string.h>

#include "common.h"

#ifndef TROPE_VERSION
#define TROPE_VERSION "0.1.0"
#endif

int cmd_tropicalize(int argc, char **argv);
int cmd_roots(int argc, char **argv);
int cmd_lift(int argc, char **argv);
int cmd_draw(int argc, char **argv);
int cmd_amoeba(int argc, char **argv);
int cmd_batch(int argc, char **argv);

typedef struct {
    const char *name;
    int (*run)(int argc, char **argv);
    const char *help;   /* one line */
} command;

static const command commands[] = {
    {"tropicalize", cmd_tropicalize,
     "tropical hypersurface, regular subdivision and invariants of polynomials"},
    {"roots", cmd_roots, "Newton polygon, residual polynomials and Puiseux or p-adic roots"},
    {"lift", cmd_lift, "a zero of the polynomial over a point of its tropical hypersurface"},
    {"draw", cmd_draw, "figures of tropical curves, root valuations and surfaces (PNG, SVG, TikZ)"},
    {"amoeba", cmd_amoeba, "amoeba of a complex plane curve: area, complement orders, Ronkin function, spine"},
    {"batch", cmd_batch, "many jobs from a JSON Lines file, one result line each, on several threads"},
};

#define NCOMMANDS (sizeof commands / sizeof commands[0])

static void usage(FILE *out)
{
    fprintf(out,
            "usage: trope COMMAND [ARGS...]\n"
            "\n"
            "Exact tropical hypersurfaces of polynomials over valued fields.\n"
            "\n"
            "commands:\n");
    for (size_t k = 0; k < NCOMMANDS; k++)
        fprintf(out, "  %-12s %s\n", commands[k].name, commands[k].help);
    fprintf(out,
            "\n"
            "  trope help COMMAND    options of one command\n"
            "  trope --version       the version\n");
}

static const command *find(const char *name)
{
    for (size_t k = 0; k < NCOMMANDS; k++)
        if (strcmp(commands[k].name, name) == 0)
            return &commands[k];
    return NULL;
}

static int unknown(const char *name)
{
    fprintf(stderr, "trope: unknown command '%s' (expected one of:", name);
    for (size_t k = 0; k < NCOMMANDS; k++)
        fprintf(stderr, " %s", commands[k].name);
    fprintf(stderr, "; see trope --help)\n");
    return 2;
}

int main(int argc, char **argv)
{
    cli_tune_heap();
    if (argc < 2) {
        usage(stderr);
        return 2;
    }
    const char *name = argv[1];
    if (strcmp(name, "--help") == 0 || strcmp(name, "-h") == 0) {
        usage(stdout);
        return fflush(stdout) == 0 ? 0 : 1;
    }
    if (strcmp(name, "--version") == 0) {
        printf("trope %s\n", TROPE_VERSION);
        return fflush(stdout) == 0 ? 0 : 1;
    }
    if (strcmp(name, "help") == 0) {
        if (argc < 3) {
            usage(stdout);
            return fflush(stdout) == 0 ? 0 : 1;
        }
        const command *c = find(argv[2]);
        if (!c)
            return unknown(argv[2]);
        char *args[] = {(char *)c->name, (char *)"--help", NULL};
        return c->run(2, args);
    }
    if (name[0] == '-') {
        fprintf(stderr, "trope: expected a command before '%s' (see trope --help)\n", name);
        return 2;
    }
    const command *c = find(name);
    if (!c)
        return unknown(name);
    return c->run(argc - 1, argv + 1);
}
