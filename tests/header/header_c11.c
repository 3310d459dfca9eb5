/* The public header compiles as C11 (and the library links). */
#include "psik.h"
#include <stdio.h>

_Static_assert(sizeof(psik_state) == 6 * sizeof(double), "psik_state is six doubles");

int main(void)
{
    psik_model m;
    int ok = psik_vgm(&m, 0.078, 0.43, 0.036, 1.56, 24.96) == PSIK_OK
             && psik_theta(&m, 0.0) == 0.43;
    printf("c11_header: %d passed, %d failed\n", ok, !ok);
    return ok ? 0 : 1;
}
