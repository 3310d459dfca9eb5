// psik.hpp - a small C++ wrapper over the psik C API (header only, C++11).
//
// psik::Model is a value type holding a psik_model (plain data, so copying is
// memcpy and there is nothing to release); construction validates the
// parameters and throws psik::Error with psik_check()'s sentence. Evaluation
// calls the C functions directly: the values are the library's, bit for bit.
//
//   psik::Model loam("vgm", {0.078, 0.43, 0.036, 1.56, 24.96, 0.5});
//   double th = loam.theta(-100.0);
//   std::vector<double> k = loam.k(heads);      // one psik_eval_batch call
#ifndef PSIK_HPP
#define PSIK_HPP

#ifdef PSIK_HPP_SINGLE_HEADER   /* use build/include/psik_single.h instead */
#  include "psik_single.h"
#else
#  include "psik.h"
#endif

#include <stdexcept>
#include <string>
#include <vector>

namespace psik {

/// A refused parameter vector or an unknown kind; status() is the psik_status.
class Error : public std::runtime_error {
public:
    Error(psik_status st, const std::string &what) : std::runtime_error(what), st_(st) {}
    psik_status status() const { return st_; }
private:
    psik_status st_;
};

class Model {
public:
    /// kind by number; par holds psik_param_count(kind) values in kind order.
    Model(psik_kind kind, const std::vector<double> &par) { init(kind, par); }
    /// kind by short name ("vgm", "bcm", ...).
    Model(const std::string &kind, const std::vector<double> &par)
    {
        psik_kind k = psik_kind_from_name(kind.c_str());
        if (k == 0)
            throw Error(PSIK_EINVAL, "unknown model kind \"" + kind + "\"");
        init(k, par);
    }

    psik_kind kind() const { return static_cast<psik_kind>(m_.kind); }
    std::string kind_name() const { return psik_kind_name(kind()); }
    std::vector<double> params() const
    {
        std::vector<double> p(static_cast<size_t>(m_.npar));
        psik_model_params(&m_, p.data());
        return p;
    }
    const psik_model &c_model() const { return m_; }

    double se(double h) const { return psik_se(&m_, h); }
    double theta(double h) const { return psik_theta(&m_, h); }
    double head(double theta) const { return psik_head(&m_, theta); }
    double kr(double h) const { return psik_kr(&m_, h); }
    double k(double h) const { return psik_k(&m_, h); }
    double k_theta(double theta) const { return psik_k_theta(&m_, theta); }
    double capacity(double h) const { return psik_capacity(&m_, h); }
    double dk_dh(double h) const { return psik_dk_dh(&m_, h); }
    double diffusivity(double theta) const { return psik_diffusivity(&m_, theta); }
    psik_state eval(double h) const { psik_state s; psik_eval(&m_, h, &s); return s; }

    std::vector<double> theta(const std::vector<double> &h) const { return batch(h, 0); }
    std::vector<double> k(const std::vector<double> &h) const { return batch(h, 1); }
    std::vector<double> capacity(const std::vector<double> &h) const { return batch(h, 2); }
    std::vector<double> dk_dh(const std::vector<double> &h) const { return batch(h, 3); }

private:
    void init(psik_kind kind, const std::vector<double> &par)
    {
        int n = psik_param_count(kind);
        if (n < 0)
            throw Error(PSIK_EINVAL, "unknown model kind " + std::to_string(static_cast<int>(kind)));
        if (par.size() != static_cast<size_t>(n))
            throw Error(PSIK_EINVAL, std::string(psik_kind_name(kind)) + " takes " +
                        std::to_string(n) + " parameters, got " + std::to_string(par.size()));
        char msg[256];
        psik_status st = psik_check(kind, par.data(), msg, sizeof msg);
        if (st != PSIK_OK)
            throw Error(st, msg);
        st = psik_init(&m_, kind, par.data());
        if (st != PSIK_OK)
            throw Error(st, psik_strerror(st));
    }
    std::vector<double> batch(const std::vector<double> &h, int which) const
    {
        std::vector<double> out(h.size());
        double *o[4] = { 0, 0, 0, 0 };
        o[which] = out.data();
        psik_eval_batch(&m_, h.size(), h.data(), o[0], o[1], o[2], o[3]);
        return out;
    }
    psik_model m_;
};

} // namespace psik

#endif
