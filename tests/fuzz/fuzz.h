/* slowscan fuzzing harnesses (tests/fuzz/): one per reader of outside input.
 *
 * Each harness_*.c defines one entry point, FUZZ_ENTRY(NAME)(data, size). Built for
 * libFuzzer (`make fuzz`, clang -fsanitize=fuzzer) it is LLVMFuzzerTestOneInput; built with
 * -DFUZZ_REPLAY (any C11 compiler, `make check`) it is fuzz_NAME_one, called by replay.c on
 * every committed corpus and regression file, so each crash found stays a test.
 *
 * A harness returns 0 and never keeps state between inputs that changes what the next one
 * does (caches of constant set-up aside). It aborts only on a broken invariant the reader
 * promises (a round trip that does not hold): that is a finding, like a sanitizer report. */
#ifndef SLOWSCAN_FUZZ_H
#define SLOWSCAN_FUZZ_H

#include <stddef.h>
#include <stdint.h>

#ifdef FUZZ_REPLAY
#define FUZZ_ENTRY(name) fuzz_##name##_one
#else
#define FUZZ_ENTRY(name) LLVMFuzzerTestOneInput
#endif

int fuzz_csv_one(const uint8_t *data, size_t size);
int fuzz_dates_one(const uint8_t *data, size_t size);
int fuzz_netcdf_one(const uint8_t *data, size_t size);
int fuzz_options_one(const uint8_t *data, size_t size);
int fuzz_lengths_one(const uint8_t *data, size_t size);
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

/* The input as a NUL-terminated string (malloc'd; NULL when out of memory). An embedded NUL
 * ends it early, as it would end a C string read from a file or the command line. */
char *fuzz_text(const uint8_t *data, size_t size);

/* The input as a file the readers can open by name: an anonymous memory file (memfd) whose
 * /proc/self/fd path is written to path[size]. Returns its descriptor (close it when done),
 * or -1. Nothing is left on disk, whatever happens to the process. */
int fuzz_memory_file(const uint8_t *data, size_t size, char *path, size_t path_size);

#endif
