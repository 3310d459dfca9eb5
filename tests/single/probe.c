/* probe.c - built from the single header of a lib/ copy that holds
 * collide.c: each file keeps its own meaning of the shared names. */
#define PSIK_IMPLEMENTATION
#include "psik_single.h"
#include <stdio.h>

int main(void)
{
    psik_model m;
    double p = psik__collide_probe(1.0);   /* collide.c: 1 + 7 + 1 */
    double t;
    if (psik_vgm(&m, 0.078, 0.43, 0.036, 1.56, 24.96) != PSIK_OK)
        return 1;
    t = psik_theta(&m, 1e300);              /* eval.c's clamp01/fam: saturated */
    printf("probe=%.17g theta_sat=%.17g theta_nan=%.17g\n", p, t, psik_theta(NULL, -1.0));
    return (p == 9.0 && t == 0.43 && psik_theta(NULL, -1.0) != psik_theta(NULL, -1.0)) ? 0 : 1;
}
