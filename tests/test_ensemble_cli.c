/* screen --ensemble, --members and --member-anomalies through the binary. */
#include "ensemble_check.h"

void ensemble_cli_tests(void)
{
}
