/* fit_api.c - from laboratory data to a solver table with the C API.
 *
 * The drainage data of sample OF7-B2 (examples/data/, invented scenario)
 * are fitted with every kind of the table; the fits are ranked by AICc and
 * the best one is tabulated for a solver. Build: make demo (or
 *   cc -Iinclude examples/fit_api.c build/lib/libpsik.a -lm).
 */
#include <stdio.h>
#include "psik.h"

int main(void)
{
    /* pressure head (cm) and water content of the drainage experiment */
    static const double h[] = {0, -1, -3, -6, -10, -20, -33, -50, -100, -200,
                               -330, -500, -1000, -3000, -15000};
    static const double theta[] = {0.4520, 0.4522, 0.4437, 0.4288, 0.4178, 0.3950,
                                   0.3790, 0.3619, 0.3076, 0.2560, 0.2266, 0.2013,
                                   0.1662, 0.1239, 0.0953};
    /* conductivity (cm/d): permeameter at h = 0, tension disc and evaporation below */
    static const double hk[] = {0, -5, -15, -40, -100};
    static const double k[] = {19.5, 3.2, 0.8166, 0.164, 0.02579};
    psik_fit_data data = {0};
    psik_fit_result fits[32];
    size_t order[32], nfit = 0, i;
    double weight[32];
    int kind, j;

    data.n_theta = sizeof h / sizeof h[0];
    data.h_theta = h;
    data.theta = theta;
    data.n_k = sizeof hk / sizeof hk[0];
    data.h_k = hk;
    data.k = k;
    data.k_weight = 1.0;          /* log10 K residuals weigh like theta residuals */

    for (kind = 1; kind < 64 && nfit < 32; kind++) {
        char msg[256];
        if (psik_kind_name((psik_kind)kind) == NULL)
            continue;              /* not a kind of this library */
        if (psik_fit((psik_kind)kind, &data, NULL, &fits[nfit], msg, sizeof msg) != PSIK_OK) {
            printf("%-10s not fitted: %s\n", psik_kind_name((psik_kind)kind), msg);
            continue;
        }
        nfit++;
    }
    if (nfit == 0 || psik_fit_rank(fits, nfit, order, weight) != PSIK_OK)
        return 1;
    printf("%-10s %12s %10s %8s\n", "model", "SSE", "AICc", "weight");
    for (i = 0; i < nfit; i++) {
        const psik_fit_result *r = &fits[order[i]];
        printf("%-10s %12.5g %10.3f %8.4f\n", psik_kind_name((psik_kind)r->kind), r->sse,
               r->aicc, weight[order[i]]);
    }
    {
        const psik_fit_result *best = &fits[order[0]];
        psik_model m;
        double hs[6] = {-1, -10, -100, -1000, -10000, -100000}, th[6], kk[6], c[6], dk[6];
        printf("\nbest: %s\n", psik_kind_name((psik_kind)best->kind));
        for (j = 0; j < best->npar; j++)
            printf("  %-8s %12.6g  95%% [%.6g, %.6g]\n", psik_param_name((psik_kind)best->kind, j),
                   best->par[j], best->ci_lo[j], best->ci_hi[j]);
        if (psik_init(&m, (psik_kind)best->kind, best->par) != PSIK_OK)
            return 1;
        psik_eval_batch(&m, 6, hs, th, kk, c, dk);
        printf("\n%10s %10s %12s %12s %12s\n", "h", "theta", "K", "C", "dK/dh");
        for (j = 0; j < 6; j++)
            printf("%10g %10.5f %12.5g %12.5g %12.5g\n", hs[j], th[j], kk[j], c[j], dk[j]);
    }
    return 0;
}
