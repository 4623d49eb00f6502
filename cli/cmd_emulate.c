#include "modes_cli.h"
int cmd_emulate(const cli_options *opts) { (void)opts; return EXIT_BAD_INPUT; }
