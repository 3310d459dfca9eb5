/* blocks.c - the block drivers of the batch kernels (fast_block.h). */
#include "fast_block.h"

static void redo(const psik_model *m, double h, double *th, double *kk, double *cc, double *dk)
{
    psik_state st;
    psik_eval(m, h, &st);
    *th = st.theta;
    *kk = st.k;
    *cc = st.capacity;
    *dk = st.dk_dh;
}

/* Is flag i set, in flags of the width the kernel writes? */
static int flag_at(const void *bad, const double *th, size_t flag_bytes, int i)
{
    if (flag_bytes == 0)
        return th[i] != th[i];
    return flag_bytes == 1 ? ((const unsigned char *)bad)[i] != 0
                           : ((const uint64_t *)bad)[i] != 0;
}

PSIK_HIDDEN void psik__blocks_run(const psik_model *m, const void *coef, psik_block_fn fn,
                                  size_t flag_bytes, size_t count, const double *h,
                                  double *theta, double *k, double *capacity,
                                  double *dk_dh)
{
    double s_th[PSIK_BLK], s_k[PSIK_BLK], s_c[PSIK_BLK], s_dk[PSIK_BLK];
    union { unsigned char c[PSIK_BLK]; uint64_t u[PSIK_BLK]; } bad;
    size_t i0;
    if (fn == NULL) {
        for (i0 = 0; i0 < count; i0++) {
            double a, b, c, d;
            redo(m, h[i0], &a, &b, &c, &d);
            if (theta) theta[i0] = a;
            if (k) k[i0] = b;
            if (capacity) capacity[i0] = c;
            if (dk_dh) dk_dh[i0] = d;
        }
        return;
    }
    for (i0 = 0; i0 < count; i0 += PSIK_BLK) {
        int cnt = count - i0 < PSIK_BLK ? (int)(count - i0) : PSIK_BLK, i;
        double *th = theta ? theta + i0 : s_th;
        double *kk = k ? k + i0 : s_k;
        double *cc = capacity ? capacity + i0 : s_c;
        double *dk = dk_dh ? dk_dh + i0 : s_dk;
        uint64_t any = 0;
        void *flags = flag_bytes == 1 ? (void *)bad.c : (void *)bad.u;
        fn(m, coef, cnt, h + i0, th, kk, cc, dk, flags);
        if (flag_bytes == 0)   /* reductions the compiler vectorises */
            for (i = 0; i < cnt; i++)
                any |= th[i] != th[i];
        else if (flag_bytes == 1)
            for (i = 0; i < cnt; i++)
                any |= bad.c[i];
        else
            for (i = 0; i < cnt; i++)
                any |= bad.u[i];
        if (any)
            for (i = 0; i < cnt; i++)
                if (flag_at(flags, th, flag_bytes, i))
                    redo(m, h[i0 + i], th + i, kk + i, cc + i, dk + i);
    }
}

PSIK_HIDDEN void psik__blocks_run_range(const psik_model *m, const void *coef,
                                        psik_block_range_t *fn, double h_lo, double h_hi,
                                        size_t count, const double *h, double *theta,
                                        double *k, double *capacity, double *dk_dh)
{
    double s_th[PSIK_BLK], s_k[PSIK_BLK], s_c[PSIK_BLK], s_dk[PSIK_BLK];
    size_t i0;
    for (i0 = 0; i0 < count; i0 += PSIK_BLK) {
        int cnt = count - i0 < PSIK_BLK ? (int)(count - i0) : PSIK_BLK, i;
        const double *hb = h + i0;
        double *th = theta ? theta + i0 : s_th;
        double *kk = k ? k + i0 : s_k;
        double *cc = capacity ? capacity + i0 : s_c;
        double *dk = dk_dh ? dk_dh + i0 : s_dk;
        if (fn(m, coef, h_lo, h_hi, cnt, hb, th, kk, cc, dk))
            for (i = 0; i < cnt; i++)
                if (!(hb[i] > h_lo && hb[i] < h_hi))
                    redo(m, hb[i], th + i, kk + i, cc + i, dk + i);
    }
}
