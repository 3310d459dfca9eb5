/* fast_vg.h - the fused van Genuchten point (lib/point_vg.c) and batch
 * kernels (lib/batch_vg.c), called from the rows in lib/vg.c. Not
 * installed. */
#ifndef PSIK_FAST_VG_H
#define PSIK_FAST_VG_H

#include "psik_internal.h"

/* The constants the batch kernels need, in the notation of vg.c. */
typedef struct psik_vgc {
    double alpha, n, m, k;   /* k = m n (exact: n - 1 or n - 2) */
    double l;                /* pore connectivity (Mualem) */
    double sc, ge, xe;       /* vgm_ae: Se, g and x of the plain curve at h_e
                                (sc = ge = 1, xe = 0 for the other kinds) */
    int model;               /* PSIK_VGC_MUALEM, _BURDINE or _MUALEM_AE */
} psik_vgc;

enum { PSIK_VGC_MUALEM = 1, PSIK_VGC_BURDINE, PSIK_VGC_MUALEM_AE };

/* Kr and dKr/dh from Se, Se^l, g (with its derivative dg) and dlnSe/dh:
 * Burdine Se^2 g, Mualem Se^l g^2, as the batch kernel and the one-point
 * code both assemble them (small enough to be inlined into the vector
 * loop). */
static inline void psik__vg_kr_from(int model, double l, double se, double seL, double g,
                                    double dg, double dls, double *kr, double *dkr)
{
    if (model == PSIK_VGC_BURDINE) {
        double se2 = se * se;
        *kr = se2 * g;
        *dkr = se2 * (2.0 * g * dls + dg);
    } else {
        *kr = seL * g * g;
        *dkr = seL * g * (l * g * dls + 2.0 * dg);
    }
}

/* Slots of psik_model.aux that the one-point code reads (lib/vg.c fills
 * them and names them A_*). */
enum { PSIK_VGA_ALPHA = 0, PSIK_VGA_N = 1, PSIK_VGA_M = 2, PSIK_VGA_K = 3,
       PSIK_VGA_L = 8, PSIK_VGA_SC = 10, PSIK_VGA_GE = 11, PSIK_VGA_XE = 13 };

/* The point at suction s through lib/point_vg.c, the code built for one
 * point at a time, from the model's aux slots (model: PSIK_VGC_*): the
 * batch kernel's method (two logs, three exps for l = 1/2). Returns 0,
 * writing nothing, outside the core's range (suction not positive and
 * finite, or |n log(alpha s)| > 700): the caller then uses its own path.
 * Where it returns 1 the values keep the accuracy goal
 * (tests/unit/test_accuracy.c) and agree with the batch kernel's to a few
 * ulp, not bit for bit. psik_eval and the other one-point functions use
 * this. */
PSIK_HIDDEN int psik__vg_point_scalar(const double *aux, int model, double s, psik_point *out);

/* Se = (1 + x)^-m alone through the same code, for aux slots whose k = m n
 * is exact in a double (vgm, vgb, vgm_ae's unrestricted curve): 1 and *se,
 * or 0 where the point returns 0. The same bits as the point's Se for vgm
 * and vgb (the same exponent and the same exp). */
PSIK_HIDDEN int psik__vg_se_scalar(const double *aux, double s, double *se);

/* psik_family.eval of vgm, vgm_ae and vgb: that point, clamped and
 * assembled into *out as eval.c does (same bits), or 0 where the point
 * returns 0. */
typedef int psik_eval_fn(const psik_model *m, double s, psik_state *out);
PSIK_HIDDEN psik_eval_fn psik__vgm_eval_scalar, psik__vgm_ae_eval_scalar, psik__vgb_eval_scalar;

/* psik_eval_batch for a van Genuchten row (see psik_family.batch). */
PSIK_HIDDEN void psik__vg_batch(const psik_model *m, const psik_vgc *c, size_t count,
                                const double *h, double *theta, double *k,
                                double *capacity, double *dk_dh);

#endif
