/* layout.c - print "struct field offset size" for every public struct of
 * include/psik.h, and "struct - sizeof" lines. The Python binding's tests
 * compare their ctypes mirrors with this output field by field
 * (tests/suites/python.sh passes it in PSIK_LAYOUT_FILE). */
#include <stddef.h>
#include <stdio.h>
#include "psik.h"

#define F(s, f) printf("%s %s %u %u\n", #s, #f, (unsigned)offsetof(s, f), \
                       (unsigned)sizeof(((s *)0)->f))
#define S(s) printf("%s - %u %u\n", #s, (unsigned)sizeof(s), 0u)

int main(void)
{
    S(psik_model);
    F(psik_model, kind); F(psik_model, npar); F(psik_model, abi_size);
    F(psik_model, abi_version); F(psik_model, par); F(psik_model, theta_r);
    F(psik_model, theta_s); F(psik_model, ks); F(psik_model, h_sat); F(psik_model, aux);
    S(psik_state);
    F(psik_state, se); F(psik_state, theta); F(psik_state, kr); F(psik_state, k);
    F(psik_state, capacity); F(psik_state, dk_dh);
    S(psik_fit_data);
    F(psik_fit_data, n_theta); F(psik_fit_data, h_theta); F(psik_fit_data, theta);
    F(psik_fit_data, w_theta); F(psik_fit_data, n_k); F(psik_fit_data, h_k);
    F(psik_fit_data, k); F(psik_fit_data, w_k); F(psik_fit_data, k_weight);
    S(psik_fit_options);
    F(psik_fit_options, fixed); F(psik_fit_options, value); F(psik_fit_options, lo);
    F(psik_fit_options, hi); F(psik_fit_options, starts); F(psik_fit_options, samples);
    F(psik_fit_options, max_iter); F(psik_fit_options, tol); F(psik_fit_options, confidence);
    S(psik_fit_result);
    F(psik_fit_result, kind); F(psik_fit_result, npar); F(psik_fit_result, par);
    F(psik_fit_result, std_err); F(psik_fit_result, ci_lo); F(psik_fit_result, ci_hi);
    F(psik_fit_result, flag); F(psik_fit_result, corr); F(psik_fit_result, sse);
    F(psik_fit_result, sse_theta); F(psik_fit_result, sse_logk); F(psik_fit_result, rmse);
    F(psik_fit_result, r2); F(psik_fit_result, r2_logk); F(psik_fit_result, aic);
    F(psik_fit_result, aicc); F(psik_fit_result, bic); F(psik_fit_result, t_value);
    F(psik_fit_result, confidence); F(psik_fit_result, n_obs); F(psik_fit_result, n_theta);
    F(psik_fit_result, n_k); F(psik_fit_result, n_free); F(psik_fit_result, dof);
    F(psik_fit_result, iterations); F(psik_fit_result, starts);
    F(psik_fit_result, evaluations); F(psik_fit_result, stop); F(psik_fit_result, note);
    S(psik_table_error);
    F(psik_table_error, theta_rel); F(psik_table_error, k_rel);
    return 0;
}
