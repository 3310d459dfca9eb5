/* test_abi.c - the binary interface: struct layouts and the header/library
 * version check behind the psik_init macro.
 *
 * Source of the expected numbers: the layout of psik_model and psik_state
 * as released with PSIK_ABI_VERSION 1 (include/psik.h). They are the ABI:
 * the Fortran module (bindings/fortran/psik.f90) and the Python binding
 * (bindings/python/psik/_lib.py) mirror them, and their own tests check the
 * same numbers (tests/suites/fortran.sh, bindings/python/tests). Changing
 * any of them means a new PSIK_ABI_VERSION and SONAME.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "psik.h"

/* ABI 1 layout (both LP64 and ILP32: four 4-byte ints, then doubles). */
#define MODEL_SIZE 304
#define STATE_SIZE 48

static void layout_model(void **state)
{
    (void)state;
    printf("# sizeof(psik_model) = %u, sizeof(psik_state) = %u\n",
           (unsigned)sizeof(psik_model), (unsigned)sizeof(psik_state));
    assert_int_equal(sizeof(psik_model), MODEL_SIZE);
    assert_int_equal(offsetof(psik_model, kind), 0);
    assert_int_equal(offsetof(psik_model, npar), 4);
    assert_int_equal(offsetof(psik_model, abi_size), 8);
    assert_int_equal(offsetof(psik_model, abi_version), 12);
    assert_int_equal(offsetof(psik_model, par), 16);
    assert_int_equal(sizeof(((psik_model *)0)->par), 16 * sizeof(double));
    assert_int_equal(offsetof(psik_model, theta_r), 144);
    assert_int_equal(offsetof(psik_model, theta_s), 152);
    assert_int_equal(offsetof(psik_model, ks), 160);
    assert_int_equal(offsetof(psik_model, h_sat), 168);
    assert_int_equal(offsetof(psik_model, aux), 176);
    assert_int_equal(sizeof(((psik_model *)0)->aux), 16 * sizeof(double));
    assert_int_equal(PSIK_MAX_PARAMS, 16);
    assert_int_equal(sizeof(int), 4);
}

static void layout_state(void **state)
{
    (void)state;
    assert_int_equal(sizeof(psik_state), STATE_SIZE);
    assert_int_equal(offsetof(psik_state, se), 0);
    assert_int_equal(offsetof(psik_state, theta), 8);
    assert_int_equal(offsetof(psik_state, kr), 16);
    assert_int_equal(offsetof(psik_state, k), 24);
    assert_int_equal(offsetof(psik_state, capacity), 32);
    assert_int_equal(offsetof(psik_state, dk_dh), 40);
}

/* Enum values are part of the ABI too (DESIGN.md API contract). */
static void enum_values(void **state)
{
    (void)state;
    assert_int_equal(PSIK_OK, 0);
    assert_int_equal(PSIK_EINVAL, 1);
    assert_int_equal(PSIK_EDOMAIN, 2);
    assert_int_equal(PSIK_ENOCONV, 3);
    assert_int_equal(PSIK_EDATA, 4);
    assert_int_equal(PSIK_ENOMEM, 5);
    assert_int_equal(PSIK_EABI, 6);
    assert_int_equal(PSIK_VGM, 1);
    assert_int_equal(PSIK_VGM_AE, 2);
    assert_int_equal(PSIK_VG_FREE_M, 3);
    assert_int_equal(PSIK_VGB, 4);
    assert_int_equal(PSIK_BCM, 5);
    assert_int_equal(PSIK_BCB, 6);
    assert_int_equal(PSIK_KOSUGI, 7);
    assert_int_equal(PSIK_DURNER2, 8);
    assert_int_equal(PSIK_DURNER3, 9);
    assert_int_equal(PSIK_GARDNER, 10);
    assert_int_equal(sizeof(psik_kind), sizeof(int));
    assert_int_equal(sizeof(psik_status), sizeof(int));
}

/* loam, van Genuchten-Mualem (Carsel & Parrish 1988 class mean, from memory). */
static const double loam[6] = { 0.078, 0.43, 0.036, 1.56, 24.96, 0.5 };

static int all_bytes(const void *p, size_t n, unsigned char v)
{
    const unsigned char *c = (const unsigned char *)p;
    size_t i;
    for (i = 0; i < n; i++)
        if (c[i] != v)
            return 0;
    return 1;
}

/* A caller compiled against another header: wrong version or wrong size
 * gives PSIK_EABI and leaves every byte of *m as it was. */
static void mismatch_writes_nothing(void **state)
{
    /* Room for a bigger struct from a hypothetical newer header. */
    unsigned char buf[2 * MODEL_SIZE];
    psik_model *m = (psik_model *)(void *)buf;
    static const struct { int ver; size_t size; } bad[] = {
        { PSIK_ABI_VERSION + 1, sizeof(psik_model) },
        { PSIK_ABI_VERSION - 1, sizeof(psik_model) },
        { 0, sizeof(psik_model) },
        { PSIK_ABI_VERSION, sizeof(psik_model) - 8 },
        { PSIK_ABI_VERSION, sizeof(psik_model) + 8 },
        { PSIK_ABI_VERSION, 0 },
        { -1, (size_t)-1 },
    };
    size_t i;
    int checked = 0;
    (void)state;
    for (i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        memset(buf, 0xA5, sizeof buf);
        assert_int_equal(psik_init_abi(m, PSIK_VGM, loam, bad[i].ver, bad[i].size), PSIK_EABI);
        assert_true(all_bytes(buf, sizeof buf, 0xA5));
        /* also with a parameter vector that would be refused */
        assert_int_equal(psik_init_abi(m, (psik_kind)999, NULL, bad[i].ver, bad[i].size),
                         PSIK_EABI);
        assert_true(all_bytes(buf, sizeof buf, 0xA5));
        /* and with a NULL model: the version check comes first */
        assert_int_equal(psik_init_abi(NULL, PSIK_VGM, loam, bad[i].ver, bad[i].size),
                         PSIK_EABI);
        checked++;
    }
    printf("# %d mismatching (version, size) pairs refused with PSIK_EABI, 0 bytes written\n",
           checked);
    assert_string_equal(psik_strerror(PSIK_EABI),
                        "the header used by the caller does not match the library");
}

/* The macro passes this header's layout; the library agrees and records it. */
static void macro_and_symbol_agree(void **state)
{
    psik_model a, b;
    (void)state;
    memset(&a, 0xA5, sizeof a);
    memset(&b, 0x5A, sizeof b);
    assert_int_equal(psik_init(&a, PSIK_VGM, loam), PSIK_OK);          /* macro */
    assert_int_equal((psik_init)(&b, PSIK_VGM, loam), PSIK_OK);        /* real symbol */
    assert_int_equal(a.abi_size, sizeof(psik_model));
    assert_int_equal(a.abi_version, PSIK_ABI_VERSION);
    assert_int_equal(a.kind, PSIK_VGM);
    assert_int_equal(a.npar, 6);
    assert_true(a.theta_r == 0.078 && a.theta_s == 0.43 && a.ks == 24.96);
    /* init clears the whole struct first, so two inits are byte-identical */
    assert_memory_equal(&a, &b, sizeof a);
    assert_true(psik_theta(&a, -100.0) == psik_theta(&b, -100.0));
    /* the right layout with a NULL model is an ordinary EINVAL */
    assert_int_equal(psik_init_abi(NULL, PSIK_VGM, loam, PSIK_ABI_VERSION, sizeof(psik_model)),
                     PSIK_EINVAL);
}

/* A model is plain data: a memcpy'd copy evaluates identically. */
static void model_is_plain_data(void **state)
{
    psik_model a, b;
    (void)state;
    assert_int_equal(psik_init(&a, PSIK_VGM, loam), PSIK_OK);
    memcpy(&b, &a, sizeof a);
    assert_true(psik_k(&a, -50.0) == psik_k(&b, -50.0));
    assert_true(psik_capacity(&a, -50.0) == psik_capacity(&b, -50.0));
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(layout_model),
        cmocka_unit_test(layout_state),
        cmocka_unit_test(enum_values),
        cmocka_unit_test(mismatch_writes_nothing),
        cmocka_unit_test(macro_and_symbol_agree),
        cmocka_unit_test(model_is_plain_data),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
