/* ref_values.c - values from C for tests/fortran/test_binding.f90: for every
 * kind the library has, a parameter vector a quarter of the way through each
 * plausible range, then psik_* at a set of heads (%.17e round-trips doubles):
 * the single functions, psik_eval and psik_eval_batch (theta, k, C, dK/dh).
 * First line: psik_check's message for an invalid vgm vector; then the
 * "silt loam" preset's parameters and a table of it (knots, bounds, values). */
#include <stdio.h>
#include "psik.h"

int main(void)
{
    static const double heads[] = { -1e-4, -0.1, -1.0, -10.0, -33.0, -100.0, -1000.0,
                                    -15000.0, -1e6, 0.0 };
    const int nh = (int)(sizeof heads / sizeof heads[0]);
    const double bad[6] = { 0.078, 0.43, 0.036, 0.9, 24.96, 0.5 };
    double bt[sizeof heads / sizeof heads[0]], bk[sizeof heads / sizeof heads[0]];
    double bc[sizeof heads / sizeof heads[0]], bd[sizeof heads / sizeof heads[0]];
    char msg[512];
    int kind, i, j;
    psik_check(PSIK_VGM, bad, msg, sizeof msg);
    printf("%s\n", msg);
    {   /* the "silt loam" preset, then a table of it over [-1e5, -0.01] */
        static const double th[5] = { -0.0317, -1.7, -42.0, -777.0, -31000.0 };
        static unsigned char mem[1 << 17];
        double par[PSIK_MAX_PARAMS], o[4][5];
        psik_model m;
        psik_table *t;
        psik_table_error err;
        size_t kn = psik_table_knots(-1e5, -0.01, 0.0);
        int np;
        if (psik_preset(&m, "silt loam") != PSIK_OK || psik_table_bytes(kn) > sizeof mem
            || psik_table_build(&m, -1e5, -0.01, kn, mem, sizeof mem, &t, &err) != PSIK_OK)
            return 1;
        np = psik_model_params(&m, par);
        printf("%d\n", np);
        for (j = 0; j < np; j++)
            printf("%.17e\n", par[j]);
        printf("%u %.17e %.17e\n", (unsigned)kn, err.theta_rel, err.k_rel);
        psik_table_eval_batch(t, 5, th, o[0], o[1], o[2], o[3]);
        for (i = 0; i < 5; i++)
            printf("%.17e %.17e %.17e %.17e %.17e\n", th[i], o[0][i], o[1][i], o[2][i], o[3][i]);
    }
    printf("%u %u %u %u\n", (unsigned)sizeof(psik_fit_data), (unsigned)sizeof(psik_fit_options),
           (unsigned)sizeof(psik_fit_result), (unsigned)sizeof(psik_table_error));
    {   /* a retention fit of loam data made by the library (12 heads) */
        static const double fh[12] = { -1, -3, -10, -20, -33, -60, -100, -200, -330, -1000,
                                       -3000, -15000 };
        const double loam[6] = { 0.078, 0.43, 0.036, 1.56, 24.96, 0.5 };
        double ft[12];
        psik_model m;
        psik_fit_data d = { 0, 0, 0, 0, 0, 0, 0, 0, 0.0 };
        static psik_fit_result r;
        if (psik_init(&m, PSIK_VGM, loam) != PSIK_OK)
            return 1;
        for (i = 0; i < 12; i++)
            ft[i] = psik_theta(&m, fh[i]);
        d.n_theta = 12;
        d.h_theta = fh;
        d.theta = ft;
        if (psik_fit(PSIK_VGM, &d, NULL, &r, msg, sizeof msg) != PSIK_OK)
            return 1;
        printf("%.17e %d %d\n", r.sse, r.n_free, r.flag[4]);
        for (j = 0; j < 6; j++)
            printf("%.17e %.17e\n", r.par[j], r.std_err[j]);
    }
    for (kind = 1; kind < 64; kind++) {
        double par[PSIK_MAX_PARAMS];
        psik_model m;
        int np = psik_param_count((psik_kind)kind);
        if (np < 0)
            continue;
        for (j = 0; j < np; j++) {
            double lo, hi;
            psik_param_range((psik_kind)kind, j, &lo, &hi);
            par[j] = lo + 0.25 * (hi - lo);
        }
        if (psik_init(&m, (psik_kind)kind, par) != PSIK_OK)
            continue;
        printf("%d %d\n", kind, np);
        for (j = 0; j < np; j++)
            printf("%.17e\n", par[j]);
        printf("%d\n", nh);
        psik_eval_batch(&m, (size_t)nh, heads, bt, bk, bc, bd);
        for (i = 0; i < nh; i++) {
            double h = heads[i], th = psik_theta(&m, h);
            psik_state st;
            psik_eval(&m, h, &st);
            printf("%.17e %.17e %.17e %.17e %.17e %.17e %.17e %.17e %.17e %.17e", h,
                   psik_se(&m, h), th, psik_kr(&m, h), psik_k(&m, h), psik_capacity(&m, h),
                   psik_dk_dh(&m, h), psik_head(&m, th), psik_k_theta(&m, th),
                   psik_diffusivity(&m, th));
            printf(" %.17e %.17e %.17e %.17e %.17e %.17e", st.se, st.theta, st.kr, st.k,
                   st.capacity, st.dk_dh);
            printf(" %.17e %.17e %.17e %.17e\n", bt[i], bk[i], bc[i], bd[i]);
        }
    }
    return 0;
}
