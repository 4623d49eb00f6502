/* The plain binary: one process (slowscan-mpi has its own entry, cli/mpi_main.c). */
#include "cli.h"

int main(int argc, char **argv)
{
    return cli_main(argc, argv);
}
