/* slowscan — the export macro of the shared libraries.
 *
 * The libraries are compiled with -fvisibility=hidden, so only what is marked SLOWSCAN_API
 * is exported from libslowscan.so (and libslowscan-report.so). The rule: a function is public
 * when it is declared in a header under include/slowscan/ with SLOWSCAN_API in front; helpers
 * shared between a module's files are declared in its own *_internal.h (or another header
 * outside include/) without the macro and stay hidden. Harmless in a static build. */
#ifndef SLOWSCAN_EXPORT_H
#define SLOWSCAN_EXPORT_H

#if defined(__GNUC__) || defined(__clang__)
#define SLOWSCAN_API __attribute__((visibility("default")))
#else
#define SLOWSCAN_API
#endif

#endif
