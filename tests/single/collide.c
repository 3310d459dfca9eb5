/* collide.c - added to a copy of lib/ by tests/suites/single.sh: file-static
 * names, a typedef and a macro that other files in lib/ also use, with other
 * meanings. The generator must keep each file's own. */
#include "psik_internal.h"

#define A_ALPHA 7
typedef struct vg_pt { int a; } vg_pt;
static double clamp01(double v) { return v + A_ALPHA; }
static const psik_family *fam(int k) { return psik__family(k); }

PSIK_HIDDEN double psik__collide_probe(double x);
PSIK_HIDDEN double psik__collide_probe(double x)
{
    vg_pt q;
    q.a = fam(PSIK_VGM) != NULL;
    return clamp01(x) + q.a;    /* x + 7 + 1 */
}
