/* Helpers shared by the harnesses (fuzz.h). */
#define _GNU_SOURCE /* memfd_create */
#include "fuzz.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/mman.h>
#include <unistd.h>

char *fuzz_text(const uint8_t *data, size_t size)
{
    char *text = malloc(size + 1);
    if (text) {
        if (size)
            memcpy(text, data, size);
        text[size] = '\0';
    }
    return text;
}

int fuzz_memory_file(const uint8_t *data, size_t size, char *path, size_t path_size)
{
    int fd = memfd_create("slowscan-fuzz", MFD_CLOEXEC);
    if (fd < 0)
        return -1;
    for (size_t done = 0; done < size;) {
        ssize_t w = write(fd, data + done, size - done);
        if (w <= 0) {
            close(fd);
            return -1;
        }
        done += (size_t)w;
    }
    snprintf(path, path_size, "/proc/self/fd/%d", fd);
    return fd;
}
