/* other.c - a second translation unit with its own PSIK_STATIC copy of psik:
 * links beside check.c without duplicate symbols and gives the same values. */
#ifndef PSIK_STATIC
#define PSIK_STATIC
#endif
#include "psik_single.h"

int other_theta_ok(void)
{
    psik_model m;
    /* loam (Carsel & Parrish 1988 class mean, from memory), cm */
    if (psik_vgm(&m, 0.078, 0.43, 0.036, 1.56, 24.96) != PSIK_OK)
        return 0;
    return psik_theta(&m, 0.0) == 0.43 && psik_theta(&m, -100.0) < 0.43;
}
