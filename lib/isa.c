/* isa.c - which compiled variant of the batch kernels to use (isa.h). */
#include "isa.h"

static int isa_cap = PSIK_ISA_ID_AVX512;
#if PSIK_ISA_HAVE
PSIK_HIDDEN int psik__isa_now = -1;
#endif

static int isa_best(void)
{
#if PSIK_ISA_HAVE
    if (__builtin_cpu_supports("avx512f") && __builtin_cpu_supports("avx512dq") &&
        __builtin_cpu_supports("avx512vl") && __builtin_cpu_supports("avx512bw") &&
        __builtin_cpu_supports("fma"))
        return PSIK_ISA_ID_AVX512;
    if (__builtin_cpu_supports("avx2") && __builtin_cpu_supports("fma"))
        return PSIK_ISA_ID_AVX2;
    if (__builtin_cpu_supports("sse4.2"))
        return PSIK_ISA_ID_SSE42;
#endif
    return PSIK_ISA_ID_BASE;
}

#if PSIK_ISA_HAVE
/* The processor does not change while the program runs: ask it once, when
 * the library is loaded (before any thread of the program's can call in),
 * rather than per point. */
static int isa_found = -1;
__attribute__((constructor)) static void isa_probe(void)
{
    isa_found = isa_best();
    psik__isa_now = isa_found < isa_cap ? isa_found : isa_cap;
}
#endif

PSIK_HIDDEN int psik__isa(void)
{
#if PSIK_ISA_HAVE
    int b = isa_found >= 0 ? isa_found : isa_best();
#else
    int b = isa_best();
#endif
    return b < isa_cap ? b : isa_cap;
}

PSIK_HIDDEN int psik__isa_limit(int id)
{
    int old = isa_cap;
    isa_cap = id;
#if PSIK_ISA_HAVE
    if (isa_found >= 0)
        psik__isa_now = isa_found < isa_cap ? isa_found : isa_cap;
#endif
    return old;
}
