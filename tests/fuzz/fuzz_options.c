/* Fuzzing the option parser: cli_parse (cli/options.c and every option's setter in
 * option_values.c, time_options.c, screen_tail.c, forced_inputs.c, feedback_options.c,
 * modes_options.c), the whole path of `slowscan COMMAND ARGS...` up to the point where a
 * command opens its first file.
 *
 * Input: the arguments, one per line (or separated by NUL bytes); the first is the command.
 * Arguments asking for help are dropped (help is printed, not parsed). Messages go to
 * /dev/null. */
#include "fuzz.h"

#include "../../cli/cli.h"
#include "../../cli/share.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

enum { MAX_ARGS = 96 };

int FUZZ_ENTRY(options)(const uint8_t *data, size_t size)
{
    static FILE *nowhere;
    if (!nowhere && (nowhere = fopen("/dev/null", "w")))
        cli_messages_to(nowhere);
    char *text = malloc(size + 1);
    if (!text)
        return 0;
    if (size)
        memcpy(text, data, size);
    text[size] = '\0';
    char *argv[MAX_ARGS + 1];
    int argc = 0;
    argv[argc++] = "slowscan";
    for (size_t at = 0; at <= size && argc < MAX_ARGS;) {
        size_t end = at;
        while (end < size && text[end] != '\n' && text[end] != '\0')
            end++;
        text[end] = '\0';
        if (strcmp(text + at, "--help") != 0 && strcmp(text + at, "-h") != 0)
            argv[argc++] = text + at;
        at = end + 1;
    }
    argv[argc] = NULL;
    if (argc >= 2) {
        cli_options opts;
        cli_parse(argv[1], argc, argv, 2, &opts);
        cli_options_free(&opts);
    }
    free(text);
    return 0;
}
