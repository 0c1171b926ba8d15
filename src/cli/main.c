/* main.c - synodic command-line entry: dispatches to one subcommand. */
#include "config.h"
#include "cli.h"

#include <stdio.h>
#include <string.h>

static const cli_command commands[] = {
    {"bodies", "list the built-in bodies and those of a bodies file", cmd_bodies, usage_bodies},
    {"state", "heliocentric position and velocity of a body", cmd_state, usage_state},
    {"lambert", "solve Lambert's problem between two position vectors", cmd_lambert, usage_lambert},
    {"transfer", "launch and arrival figures of one transfer", cmd_transfer, usage_transfer},
    {"chart", "porkchop chart and data of a study file", cmd_chart, usage_chart},
    {"period", "launch-period design: minimax C3 and longest period of a study", cmd_period, usage_period},
    {"windows", "launch opportunities across years: scan, table, charts, atlas", cmd_windows, usage_windows},
};
#define NCOMMANDS (sizeof commands / sizeof commands[0])

static void usage(FILE *out)
{
    fprintf(out,
            "usage: synodic COMMAND [OPTIONS] ...\n"
            "       synodic --version | --help | help COMMAND\n\n"
            "Preliminary interplanetary launch-window analysis.\n\ncommands:\n");
    for (size_t i = 0; i < NCOMMANDS; i++)
        fprintf(out, "  %-10s %s\n", commands[i].name, commands[i].summary);
    fprintf(out,
            "\nEvery command takes --help.  Dates are TDB: YYYY-MM-DD,\n"
            "YYYY-MM-DDTHH:MM[:SS] or JD2461234.5.\n\n"
            "Figures are preliminary two-body, patched-conic, mean-element values;\n"
            "confirm them with high-fidelity ephemerides and the responsible launch\n"
            "and mission authorities.\n");
}

static const cli_command *find(const char *name)
{
    for (size_t i = 0; i < NCOMMANDS; i++)
        if (strcmp(commands[i].name, name) == 0) return &commands[i];
    return NULL;
}

int main(int argc, char **argv)
{
    cli_catch_signals();
    if (argc < 2) {
        usage(stderr);
        return CLI_EXIT_USAGE;
    }
    const char *c = argv[1];
    if (strcmp(c, "--help") == 0 || strcmp(c, "-h") == 0) {
        usage(stdout);
        return CLI_EXIT_OK;
    }
    if (strcmp(c, "--version") == 0 || strcmp(c, "-V") == 0) {
        printf("synodic %s\n", sy_version());
        return CLI_EXIT_OK;
    }
    if (strcmp(c, "help") == 0) {
        if (argc < 3) {
            usage(stdout);
            return CLI_EXIT_OK;
        }
        const cli_command *cmd = find(argv[2]);
        if (!cmd)
            return cli_error(CLI_EXIT_USAGE, "unknown command '%s'; see 'synodic --help'", argv[2]);
        cmd->usage(stdout);
        return CLI_EXIT_OK;
    }
    const cli_command *cmd = find(c);
    if (!cmd) {
        if (c[0] == '-')
            return cli_error(CLI_EXIT_USAGE, "unknown option '%s'; see 'synodic --help'", c);
        return cli_error(CLI_EXIT_USAGE, "unknown command '%s'; see 'synodic --help'", c);
    }
    return cmd->run(argc - 1, argv + 1);
}
