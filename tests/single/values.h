/* values.h - print psik values for every kind the library has, so that two
 * builds (the library, the single header) can be compared byte for byte.
 * Included by check.c and main.cpp after the psik header of their build. */
#include <math.h>
#include <stdio.h>

static int psik_values_print(FILE *out)
{
    static const double heads[] = { -1e-6, -0.01, -0.5, -3.0, -10.0, -33.0, -100.0,
                                    -330.0, -1e3, -1.5e4, -1e6, -1e12, 0.0, 2.0 };
    const int nh = (int)(sizeof heads / sizeof heads[0]);
    int kind, i, j, lines = 0;
    for (kind = 1; kind < 64; kind++) {
        const char *name = psik_kind_name((psik_kind)kind);
        double par[PSIK_MAX_PARAMS];
        char msg[256];
        psik_model m;
        int np;
        if (name == NULL)
            continue;
        np = psik_param_count((psik_kind)kind);
        /* a point inside each parameter's plausible range: a quarter of the
         * way from lo to hi (common practice for a smoke point) */
        for (j = 0; j < np; j++) {
            double lo, hi;
            psik_param_range((psik_kind)kind, j, &lo, &hi);
            par[j] = lo + 0.25 * (hi - lo);
        }
        if (psik_check((psik_kind)kind, par, msg, sizeof msg) != PSIK_OK
            || psik_init(&m, (psik_kind)kind, par) != PSIK_OK) {
            fprintf(out, "%s: refused: %s\n", name, msg);
            lines++;
            continue;
        }
        for (i = 0; i < nh; i++) {
            double h = heads[i], th = psik_theta(&m, h);
            psik_state st;
            psik_eval(&m, h, &st);
            fprintf(out, "%s h=%.17g se=%.17g theta=%.17g kr=%.17g k=%.17g c=%.17g dk=%.17g"
                    " head=%.17g kth=%.17g d=%.17g eval=%.17g,%.17g,%.17g\n",
                    name, h, psik_se(&m, h), th, psik_kr(&m, h), psik_k(&m, h),
                    psik_capacity(&m, h), psik_dk_dh(&m, h), psik_head(&m, th),
                    psik_k_theta(&m, th), psik_diffusivity(&m, th),
                    st.theta, st.k, st.dk_dh);
            lines++;
        }
    }
    return lines;
}
