/* eval.c - psik_se ... psik_eval_batch: the special cases common to every
 * kind, then dispatch through the kinds table.
 *
 * Special cases, in order: NULL or uninitialised model -> NaN; NaN -> NaN;
 * h >= h_sat -> saturated values; otherwise the family computes at suction
 * s = -h > 0. Results are clamped into their physical ranges (which only
 * matters for values that overflow: dK/dh near saturation for n < 2).
 */
#include "psik_internal.h"

#include <float.h>
#include <math.h>

/* psik__family(m->kind) without the call into kinds.c (1.3 ns of a 36 ns
 * vgm psik_eval). */
extern const psik_family *const psik__families[PSIK__NFAMILIES];

static const psik_family *fam(const psik_model *m)
{
    if (m == NULL || m->kind <= 0 || m->kind >= PSIK__NFAMILIES)
        return NULL;
    return psik__families[m->kind];
}

/* Unsaturated point with clamping; s > 0. Inlined: psik_eval's own cost
 * beside the point's is a few instructions. */
#if defined(__GNUC__)
__attribute__((always_inline))
#endif
static inline void point_at(const psik_family *f, const psik_model *m, double s, psik_point *p)
{
    f->point(m, s, p);
    p->se = psik__clamp01(p->se);
    p->kr = psik__clamp01(p->kr);
    p->dse = psik__clamp_pos(p->dse);
    p->dkr = psik__clamp_pos(p->dkr);
}

PSIK_API double psik_se(const psik_model *m, double h)
{
    const psik_family *f = fam(m);
    if (f == NULL || isnan(h))
        return NAN;
    if (h >= m->h_sat)
        return 1.0;
    return psik__clamp01(f->se(m, -h));
}

PSIK_API double psik_theta(const psik_model *m, double h)
{
    const psik_family *f = fam(m);
    if (f == NULL || isnan(h))
        return NAN;
    if (h >= m->h_sat)
        return m->theta_s;
    return psik__theta_of(m, psik__clamp01(f->se(m, -h)));
}

PSIK_API double psik_kr(const psik_model *m, double h)
{
    const psik_family *f = fam(m);
    if (f == NULL || isnan(h))
        return NAN;
    if (h >= m->h_sat)
        return 1.0;
    return psik__clamp01(f->kr(m, -h));
}

PSIK_API double psik_k(const psik_model *m, double h)
{
    const psik_family *f = fam(m);
    if (f == NULL || isnan(h))
        return NAN;
    if (h >= m->h_sat)
        return m->ks;
    return m->ks * psik__clamp01(f->kr(m, -h));
}

PSIK_API double psik_capacity(const psik_model *m, double h)
{
    const psik_family *f = fam(m);
    psik_point p;
    if (f == NULL || isnan(h))
        return NAN;
    if (h >= m->h_sat)
        return 0.0;
    point_at(f, m, -h, &p);
    return psik__clamp_pos((m->theta_s - m->theta_r) * p.dse);
}

PSIK_API double psik_dk_dh(const psik_model *m, double h)
{
    const psik_family *f = fam(m);
    psik_point p;
    if (f == NULL || isnan(h))
        return NAN;
    if (h >= m->h_sat)
        return 0.0;
    point_at(f, m, -h, &p);
    return psik__clamp_pos(m->ks * p.dkr);
}

PSIK_API void psik_eval(const psik_model *m, double h, psik_state *out)
{
    const psik_family *f = fam(m);
    psik_point p;
    if (out == NULL)
        return;
    if (f == NULL || isnan(h)) {
        out->se = out->theta = out->kr = out->k = NAN;
        out->capacity = out->dk_dh = NAN;
        return;
    }
    if (h >= m->h_sat) {
        out->se = 1.0;
        out->theta = m->theta_s;
        out->kr = 1.0;
        out->k = m->ks;
        out->capacity = 0.0;
        out->dk_dh = 0.0;
        return;
    }
    if (f->eval != NULL && f->eval(m, -h, out))
        return;
    point_at(f, m, -h, &p);
    psik__state_of(m, p.se, p.kr, p.dse, p.dkr, out);
}

/* NaN into every output given (batch calls without usable input). */
PSIK_HIDDEN void psik__fill_nan(size_t count, double *theta, double *k, double *capacity,
                                double *dk_dh)
{
    size_t i;
    for (i = 0; i < count; i++) {
        if (theta) theta[i] = NAN;
        if (k) k[i] = NAN;
        if (capacity) capacity[i] = NAN;
        if (dk_dh) dk_dh[i] = NAN;
    }
}

PSIK_API void psik_eval_batch(const psik_model *m, size_t count, const double *h,
                              double *theta, double *k, double *capacity, double *dk_dh)
{
    size_t i;
    psik_state st;
    const psik_family *f = fam(m);
    if (f != NULL && h != NULL && f->batch != NULL) {
        f->batch(m, count, h, theta, k, capacity, dk_dh);
        return;
    }
    if (h == NULL) {
        psik__fill_nan(count, theta, k, capacity, dk_dh);
        return;
    }
    for (i = 0; i < count; i++) {
        psik_eval(m, h[i], &st);
        if (theta) theta[i] = st.theta;
        if (k) k[i] = st.k;
        if (capacity) capacity[i] = st.capacity;
        if (dk_dh) dk_dh[i] = st.dk_dh;
    }
}

/* Effective saturation from water content theta_r < theta < theta_s:
 * exact subtraction near theta_r and theta_s (Sterbenz), one rounding in
 * the division, kept strictly inside (0, 1) so that a water content just
 * below theta_s is not taken for saturation. */
static double se_of_theta(const psik_model *m, double theta)
{
    double se = (theta - m->theta_r) / (m->theta_s - m->theta_r);
    if (se >= 1.0)
        se = 1.0 - DBL_EPSILON / 2.0;
    if (se <= 0.0)
        se = DBL_MIN;
    return se;
}

PSIK_API double psik_head_se(const psik_model *m, double se)
{
    const psik_family *f = fam(m);
    double s;
    if (f == NULL || isnan(se))
        return NAN;
    if (se >= 1.0)
        return 0.0;
    if (se <= 0.0)
        return -INFINITY;
    s = f->suction(m, se);
    if (!(s > -m->h_sat))       /* never report a head inside the saturated range */
        s = -m->h_sat;
    return -s;
}

PSIK_API double psik_head(const psik_model *m, double theta)
{
    if (fam(m) == NULL || isnan(theta))
        return NAN;
    if (theta >= m->theta_s)
        return 0.0;
    if (theta <= m->theta_r)
        return -INFINITY;
    return psik_head_se(m, se_of_theta(m, theta));
}

/* Point at saturation se in (0,1): the family's direct form when it has
 * one, otherwise through the suction. */
static void point_of_se(const psik_family *f, const psik_model *m, double se, psik_point *p)
{
    if (f->point_se != NULL) {
        f->point_se(m, se, p);
        p->se = se;
        p->kr = psik__clamp01(p->kr);
        p->dse = psik__clamp_pos(p->dse);
        p->dkr = psik__clamp_pos(p->dkr);
    } else {
        point_at(f, m, f->suction(m, se), p);
    }
}

PSIK_API double psik_k_theta(const psik_model *m, double theta)
{
    const psik_family *f = fam(m);
    psik_point p;
    double se;
    if (f == NULL || isnan(theta))
        return NAN;
    if (theta >= m->theta_s)
        return m->ks;
    if (theta <= m->theta_r)
        return 0.0;
    se = se_of_theta(m, theta);
    point_of_se(f, m, se, &p);
    return m->ks * p.kr;
}

PSIK_API double psik_diffusivity(const psik_model *m, double theta)
{
    const psik_family *f = fam(m);
    psik_point p;
    double se, c;
    if (f == NULL || isnan(theta))
        return NAN;
    if (theta <= m->theta_r)
        return 0.0;
    if (theta >= m->theta_s) {
        /* limit from below: capacity just below the saturation head */
        point_at(f, m, -m->h_sat, &p);
        c = (m->theta_s - m->theta_r) * p.dse;
        return c > 0.0 ? m->ks / c : INFINITY;
    }
    se = se_of_theta(m, theta);
    point_of_se(f, m, se, &p);
    c = (m->theta_s - m->theta_r) * p.dse;
    if (!(c > 0.0))
        return INFINITY;
    return m->ks * p.kr / c;
}
