/* `rockwire plot`: pictures of answers with cairo (PNG, SVG, PDF). */
#ifndef RW_CLI_PLOT_H
#define RW_CLI_PLOT_H

#include <stdio.h>

#include "cli.h"

/* `rockwire plot KIND INPUT -o OUT.png|svg|pdf [options]`; argv holds the
 * subcommand's arguments. Returns a CLI_EXIT_* code. */
int cli_cmd_plot(const cli_opts *o, int argc, char **argv);
/* Full help of `rockwire plot`. */
void cli_usage_plot(FILE *f);

#endif
