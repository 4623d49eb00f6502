/* Library-wide pieces: the version query and GSL's error handler.
 *
 * GSL's default error handler calls abort(), which a library must never let happen to its
 * caller (DESIGN §2: the core returns status codes). Every GSL routine the core calls also
 * returns its error code, and the core checks them, so the handler only has to be off.
 *
 * Why a constructor rather than switching the handler off around each call: the handler is one
 * process-wide pointer, and the core runs in several threads at once (the batch driver, the
 * surrogate workers). Save-off-restore around each entry point races — a thread restoring the
 * caller's aborting handler while another is still inside GSL — and no lock would make that
 * safe for callers that use GSL themselves. Setting it off once, when the library is loaded
 * (before main, before any thread), is thread-safe and costs nothing per call.
 * The price, said in the README and DEVELOPERS.md: a program that loads libslowscan.so gets
 * GSL's handler off for its own GSL calls too, and must check their return codes (as GSL's
 * manual recommends anyway). A program may install its own handler after start-up; the core
 * then goes through it, and an aborting handler is that program's choice.
 * A static link pulls this object in only when slowscan_version() is referenced: slowscan.pc
 * passes -Wl,-u,slowscan_version to `pkg-config --static` links for that. */
#include "slowscan/version.h"

#include <gsl/gsl_errno.h>

__attribute__((constructor)) static void slowscan_gsl_handler_off(void)
{
    gsl_set_error_handler_off();
}

const char *slowscan_version(void)
{
    return SLOWSCAN_VERSION_STRING;
}
