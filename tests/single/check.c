/* check.c - values from one build of psik, to compare with another.
 * Built by tests/suites/single.sh with -DUSE_SINGLE (the generated
 * psik_single.h, with or without PSIK_STATIC) and without (include/psik.h
 * and the library). With -DSPLIT the implementation is in another file.
 * With -DREF_PORTABLE (library builds only) the library runs its portable
 * kernels, the code the single header carries (lib/isa.h: the single
 * header has no per-instruction-set variants; the FMA variants round
 * differently, within 1e-14, which the suites check separately). */
#ifdef USE_SINGLE
#  if !defined(SPLIT) && !defined(PSIK_STATIC)
#    define PSIK_IMPLEMENTATION
#  endif
#  include "psik_single.h"
#else
#  include "psik.h"
#endif
#include "values.h"

#ifdef WITH_OTHER
int other_theta_ok(void);   /* other.c: a second PSIK_STATIC copy */
#endif

#ifdef REF_PORTABLE
int psik__isa_limit(int id);   /* lib/isa.h, hidden: reachable from a static link */
#endif

int main(void)
{
    int n;
#ifdef REF_PORTABLE
    psik__isa_limit(0);
#endif
    n = psik_values_print(stdout);
#ifdef WITH_OTHER
    if (!other_theta_ok()) {
        printf("second translation unit disagrees\n");
        return 1;
    }
#endif
    fprintf(stderr, "%d lines\n", n);
    return n > 0 ? 0 : 1;
}
