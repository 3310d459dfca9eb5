/* check.c - values from one build of psik, to compare with another.
 * Built by tests/suites/single.sh with -DUSE_SINGLE (the generated
 * psik_single.h, with or without PSIK_STATIC) and without (include/psik.h
 * and the library). With -DSPLIT the implementation is in another file. */
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

int main(void)
{
    int n = psik_values_print(stdout);
#ifdef WITH_OTHER
    if (!other_theta_ok()) {
        printf("second translation unit disagrees\n");
        return 1;
    }
#endif
    fprintf(stderr, "%d lines\n", n);
    return n > 0 ? 0 : 1;
}
