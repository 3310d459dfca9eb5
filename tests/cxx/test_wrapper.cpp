// test_wrapper.cpp - examples/cxx/psik.hpp against the C API it wraps.
// Source of expected values: the C functions themselves (the wrapper must
// add nothing: exact equality) and psik_check's message for refused input.
#include "psik.hpp"

#include <cmath>
#include <cstdio>
#include <cstring>
#include <string>
#include <vector>

static int npass = 0, nfail = 0;
static psik_state ceval(const psik_model *m, double h)
{
    psik_state s;
    psik_eval(m, h, &s);
    return s;
}
static void check(bool ok, const char *what)
{
    if (ok) npass++; else nfail++;
    std::printf("%s %s\n", ok ? "ok  " : "FAIL", what);
}

int main()
{
    // loam (Carsel & Parrish 1988 class mean, from memory), cm and cm/day
    const std::vector<double> loam = {0.078, 0.43, 0.036, 1.56, 24.96, 0.5};
    const std::vector<double> heads = {-1e-4, -0.1, -1.0, -10.0, -100.0, -1e3, -1.5e4, -1e6, 0.0};
    psik::Model m("vgm", loam);
    psik_model c;
    psik_init(&c, PSIK_VGM, loam.data());

    int same = 0, total = 0;
    for (double h : heads) {
        double th = psik_theta(&c, h);
        const double pairs[][2] = {
            {m.se(h), psik_se(&c, h)}, {m.theta(h), th}, {m.kr(h), psik_kr(&c, h)},
            {m.k(h), psik_k(&c, h)}, {m.capacity(h), psik_capacity(&c, h)},
            {m.dk_dh(h), psik_dk_dh(&c, h)}, {m.head(th), psik_head(&c, th)},
            {m.k_theta(th), psik_k_theta(&c, th)}, {m.diffusivity(th), psik_diffusivity(&c, th)},
            {m.eval(h).capacity, ceval(&c, h).capacity}, {m.eval(h).theta, ceval(&c, h).theta}};
        for (const auto &p : pairs) {
            total++;
            same += std::memcmp(&p[0], &p[1], sizeof(double)) == 0;
        }
    }
    std::printf("# %d of %d wrapper values equal the C API's bit for bit\n", same, total);
    check(same == total, "scalar methods = C functions");

    // vector overloads = one psik_eval_batch call (bit for bit), and within
    // 1e-14 relative of the scalar functions (the batch path's own bound is
    // tested by the library's batch tests)
    std::vector<double> th = m.theta(heads), k = m.k(heads), cp = m.capacity(heads),
                        dk = m.dk_dh(heads);
    std::vector<double> bt(heads.size()), bk(heads.size()), bc(heads.size()), bd(heads.size());
    psik_eval_batch(&c, heads.size(), heads.data(), bt.data(), bk.data(), bc.data(), bd.data());
    check(th == bt && k == bk && cp == bc && dk == bd, "vector overloads = psik_eval_batch");
    double worst = 0;
    for (size_t i = 0; i < heads.size(); i++) {
        const double pr[][2] = {{th[i], m.theta(heads[i])}, {k[i], m.k(heads[i])},
                                {cp[i], m.capacity(heads[i])}, {dk[i], m.dk_dh(heads[i])}};
        for (const auto &p : pr) {
            double e = p[1] != 0 ? std::fabs(p[0] - p[1]) / std::fabs(p[1]) : std::fabs(p[0]);
            worst = e > worst ? e : worst;
        }
    }
    std::printf("# largest relative difference batch vs scalar: %.3g\n", worst);
    check(worst <= 1e-14, "batch values within 1e-14 of the scalar functions");

    psik::Model copy = m;
    check(copy.theta(-33.0) == m.theta(-33.0) && copy.params() == loam &&
          copy.kind() == PSIK_VGM && copy.kind_name() == "vgm", "copies are plain values");

    std::vector<double> bad = loam;
    bad[1] = 1.2;
    char msg[256];
    psik_check(PSIK_VGM, bad.data(), msg, sizeof msg);
    try {
        psik::Model x("vgm", bad);
        check(false, "theta_s = 1.2 refused");
    } catch (const psik::Error &e) {
        std::printf("# refused with: %s\n", e.what());
        check(e.status() == PSIK_EDOMAIN && std::string(e.what()) == msg,
              "refusal carries psik_check's sentence and PSIK_EDOMAIN");
    }
    try {
        psik::Model x("vgx", loam);
        check(false, "unknown kind refused");
    } catch (const psik::Error &e) {
        check(e.status() == PSIK_EINVAL && std::strstr(e.what(), "vgx") != 0, "unknown kind named");
    }
    try {
        psik::Model x(PSIK_VGM, std::vector<double>(5, 0.1));
        check(false, "short vector refused");
    } catch (const psik::Error &e) {
        check(std::strstr(e.what(), "takes 6 parameters, got 5") != 0, "wrong count named");
    }

    int kinds = 0, kinds_ok = 0;
    for (int kind = 1; kind < 64; kind++) {
        int n = psik_param_count(static_cast<psik_kind>(kind));
        if (n < 0) continue;
        std::vector<double> p(static_cast<size_t>(n));
        for (int j = 0; j < n; j++) {
            double lo, hi;
            psik_param_range(static_cast<psik_kind>(kind), j, &lo, &hi);
            p[static_cast<size_t>(j)] = lo + 0.25 * (hi - lo);
        }
        kinds++;
        try {
            psik::Model x(static_cast<psik_kind>(kind), p);
            double t = x.theta(-50.0);
            kinds_ok += t >= p[0] && t <= p[1] && x.params() == p;
        } catch (const psik::Error &e) {
            std::printf("# kind %d: %s\n", kind, e.what());
        }
    }
    std::printf("# %d kinds built through the wrapper\n", kinds);
    check(kinds > 0 && kinds_ok == kinds, "every kind of the table builds and evaluates");

    std::printf("cxx-wrapper: %d passed, %d failed\n", npass, nfail);
    return nfail != 0;
}
