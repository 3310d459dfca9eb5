/* isa.h - one kernel source, compiled once per instruction set (not
 * installed).
 *
 * The Makefile compiles every lib/batch_*.c once as the ordinary object and,
 * on x86-64, again per variant with PSIK_ISA_NAME set and that variant's
 * flags (sse42: -msse4.2; avx2: -mavx2 -mfma; avx512: -mavx512f -mavx512dq
 * -mavx512vl -mavx512bw -mfma, 512-bit vectors; BW for the byte flags
 * beside the doubles, without which GCC keeps 256-bit vectors), and
 * defines PSIK_ISA_VARIANTS for the
 * ordinary objects so that they know the variants exist. A kernel source
 * names its per-variant functions PSIK_ISA_FN(name) (name_base, name_avx2,
 * ...) and keeps its dispatcher inside #if PSIK_ISA_BASE. Builds that
 * compile every lib source in one command (sanitizers, the single header, other
 * architectures) have only the base variant.
 *
 * Choosing at run time: psik__isa() is the widest variant that is compiled
 * in and that the processor and the operating system support
 * (__builtin_cpu_supports checks both: the OS must save the wide
 * registers), so calling a variant is safe on every x86-64.
 */
#ifndef PSIK_ISA_H
#define PSIK_ISA_H

#include "psik_internal.h"

#ifndef PSIK_ISA_NAME
#  define PSIK_ISA_NAME base
#  define PSIK_ISA_BASE 1
#else
#  define PSIK_ISA_BASE 0
#endif

#define PSIK__ISA_CAT2(a, b) a##_##b
#define PSIK__ISA_CAT(a, b) PSIK__ISA_CAT2(a, b)
#define PSIK_ISA_FN(name) PSIK__ISA_CAT(name, PSIK_ISA_NAME)

#if defined(PSIK_ISA_VARIANTS) && defined(__x86_64__) && defined(__GNUC__)
#  define PSIK_ISA_HAVE 1
#else
#  define PSIK_ISA_HAVE 0
#endif

enum { PSIK_ISA_ID_BASE = 0, PSIK_ISA_ID_SSE42, PSIK_ISA_ID_AVX2, PSIK_ISA_ID_AVX512 };

/* The variant to use: the widest compiled in and supported, at most the
 * limit psik__isa_limit() set (tests run every variant that way). */
PSIK_HIDDEN int psik__isa(void);

#if PSIK_ISA_HAVE
/* psik__isa()'s answer once the library's load-time probe has run, else
 * -1 (read inline by the pickers, which then skip the call). Only builds
 * with the variants have it (not the single header). */
PSIK_HIDDEN extern int psik__isa_now;
#endif

/* Caps psik__isa() at id (for tests; not thread-safe: call it while no
 * other thread evaluates). Returns the previous cap. */
PSIK_HIDDEN int psik__isa_limit(int id);

/* Inside #if PSIK_ISA_BASE: declares name_base, name_sse42, name_avx2 and
 * name_avx512 (function type T, defined by the variants of this file) and
 * defines name_pick(), the one psik__isa() chooses. */
#if PSIK_ISA_HAVE
#  define PSIK_ISA_SELECT(T, name)                                          \
    PSIK_HIDDEN T name##_base, name##_sse42, name##_avx2, name##_avx512;    \
    static T *name##_pick(void)                                             \
    {                                                                       \
        switch (psik__isa_now >= 0 ? psik__isa_now : psik__isa()) {         \
        case PSIK_ISA_ID_AVX512: return name##_avx512;                      \
        case PSIK_ISA_ID_AVX2: return name##_avx2;                          \
        case PSIK_ISA_ID_SSE42: return name##_sse42;                        \
        default: return name##_base;                                        \
        }                                                                   \
    }
#else
#  define PSIK_ISA_SELECT(T, name)                                          \
    PSIK_HIDDEN T name##_base;                                              \
    static T *name##_pick(void) { return name##_base; }
#endif

#endif
