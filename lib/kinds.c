/* kinds.c - the table of kinds: names, parameters, ranges, validation, init.
 *
 * Adding a model family: write lib/<family>.c defining a psik_family, declare
 * it below, add it to psik__families[] at the index of its psik_kind and
 * raise PSIK__NFAMILIES (psik_internal.h). Nothing else in the library
 * switches on the kind.
 */
#include "psik_internal.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <string.h>

extern const psik_family psik__fam_vgm;
extern const psik_family psik__fam_vgm_ae;
extern const psik_family psik__fam_vg_free_m;
extern const psik_family psik__fam_vgb;
extern const psik_family psik__fam_bcm;
extern const psik_family psik__fam_bcb;
extern const psik_family psik__fam_kosugi;
extern const psik_family psik__fam_durner2;
extern const psik_family psik__fam_durner3;
extern const psik_family psik__fam_gardner;

/* Not static: eval.c looks kinds up in it directly (hidden like every
 * internal name by -fvisibility=hidden; static in the single header). */
const psik_family *const psik__families[PSIK__NFAMILIES] = {
    NULL,                  /* 0: no kind */
    &psik__fam_vgm,        /* PSIK_VGM */
    &psik__fam_vgm_ae,     /* PSIK_VGM_AE */
    &psik__fam_vg_free_m,  /* PSIK_VG_FREE_M */
    &psik__fam_vgb,        /* PSIK_VGB */
    &psik__fam_bcm,        /* PSIK_BCM */
    &psik__fam_bcb,        /* PSIK_BCB */
    &psik__fam_kosugi,     /* PSIK_KOSUGI */
    &psik__fam_durner2,    /* PSIK_DURNER2 */
    &psik__fam_durner3,    /* PSIK_DURNER3 */
    &psik__fam_gardner,    /* PSIK_GARDNER */
};

PSIK_HIDDEN const psik_family *psik__family(int kind)
{
    if (kind <= 0 || kind >= PSIK__NFAMILIES)
        return NULL;
    return psik__families[kind];
}

PSIK_HIDDEN psik_status psik__fail(char *msg, size_t cap, psik_status st,
                                   const char *fmt, ...)
{
    if (msg != NULL && cap > 0) {
        va_list ap;
        va_start(ap, fmt);
        vsnprintf(msg, cap, fmt, ap);
        va_end(ap);
    }
    return st;
}

PSIK_API const char *psik_strerror(psik_status s)
{
    switch (s) {
    case PSIK_OK:      return "success";
    case PSIK_EINVAL:  return "invalid argument (NULL pointer, unknown kind or bad count)";
    case PSIK_EDOMAIN: return "a parameter is outside the model's domain";
    case PSIK_ENOCONV: return "an iteration did not converge";
    case PSIK_EDATA:   return "the data cannot be used";
    case PSIK_ENOMEM:  return "out of memory or workspace too small";
    case PSIK_EABI:    return "the header used by the caller does not match the library";
    }
    return "unknown status code";
}

PSIK_API const char *psik_version(void)
{
    return PSIK_VERSION;
}

PSIK_API const char *psik_kind_name(psik_kind kind)
{
    const psik_family *f = psik__family((int)kind);
    return f ? f->name : NULL;
}

PSIK_API const char *psik_kind_title(psik_kind kind)
{
    const psik_family *f = psik__family((int)kind);
    return f ? f->title : NULL;
}

PSIK_API psik_kind psik_kind_from_name(const char *name)
{
    int k;
    if (name == NULL)
        return (psik_kind)0;
    for (k = 1; k < PSIK__NFAMILIES; k++)
        if (psik__families[k] != NULL && strcmp(psik__families[k]->name, name) == 0)
            return (psik_kind)k;
    return (psik_kind)0;
}

PSIK_API int psik_param_count(psik_kind kind)
{
    const psik_family *f = psik__family((int)kind);
    return f ? f->npar : -1;
}

PSIK_API const char *psik_param_name(psik_kind kind, int i)
{
    const psik_family *f = psik__family((int)kind);
    if (f == NULL || i < 0 || i >= f->npar)
        return NULL;
    return f->param[i].name;
}

PSIK_API int psik_param_index(psik_kind kind, const char *name)
{
    const psik_family *f = psik__family((int)kind);
    int i;
    if (f == NULL || name == NULL)
        return -1;
    for (i = 0; i < f->npar; i++)
        if (strcmp(f->param[i].name, name) == 0)
            return i;
    return -1;
}

PSIK_API psik_status psik_param_range(psik_kind kind, int i, double *lo, double *hi)
{
    const psik_family *f = psik__family((int)kind);
    if (f == NULL || i < 0 || i >= f->npar || lo == NULL || hi == NULL)
        return PSIK_EINVAL;
    *lo = f->param[i].lo;
    *hi = f->param[i].hi;
    return PSIK_OK;
}

PSIK_API psik_status psik_check(psik_kind kind, const double *par, char *msg, size_t cap)
{
    const psik_family *f = psik__family((int)kind);
    int i;
    if (msg != NULL && cap > 0)
        msg[0] = '\0';
    if (f == NULL)
        return psik__fail(msg, cap, PSIK_EINVAL,
                          "unknown model kind %d", (int)kind);
    if (par == NULL)
        return psik__fail(msg, cap, PSIK_EINVAL,
                          "the parameter vector is NULL (%s needs %d parameters)",
                          f->name, f->npar);
    for (i = 0; i < f->npar; i++)
        if (!isfinite(par[i]))
            return psik__fail(msg, cap, PSIK_EDOMAIN,
                              "%s must be a finite number (got %g)",
                              f->param[i].name, par[i]);
    /* Every kind starts with theta_r, theta_s. */
    if (par[0] < 0.0)
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "theta_r must be at least 0 (got %g)", par[0]);
    if (par[1] > 1.0)
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "theta_s must be at most 1: it is a volume fraction (got %g)",
                          par[1]);
    if (!(par[0] < par[1]))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "theta_r must be less than theta_s (got theta_r = %g, theta_s = %g)",
                          par[0], par[1]);
    if (!(par[f->ks_index] > 0.0))
        return psik__fail(msg, cap, PSIK_EDOMAIN,
                          "ks must be greater than 0 (got %g)", par[f->ks_index]);
    return f->check(par, msg, cap);
}

static psik_status init_model(psik_model *m, psik_kind kind, const double *par)
{
    const psik_family *f;
    psik_status st;
    int i;
    if (m == NULL)
        return PSIK_EINVAL;
    st = psik_check(kind, par, NULL, 0);
    if (st != PSIK_OK) {
        memset(m, 0, sizeof *m);
        return st;
    }
    f = psik__family((int)kind);
    memset(m, 0, sizeof *m);
    m->kind = (int)kind;
    m->npar = f->npar;
    m->abi_size = (unsigned int)sizeof(psik_model);
    m->abi_version = PSIK_ABI_VERSION;
    for (i = 0; i < f->npar; i++)
        m->par[i] = par[i];
    m->theta_r = par[0];
    m->theta_s = par[1];
    m->ks = par[f->ks_index];
    m->h_sat = 0.0;
    f->prepare(m);
    return PSIK_OK;
}

/* The real symbol behind the psik_init macro (for bindings and for callers
 * who take its address). */
PSIK_API psik_status (psik_init)(psik_model *m, psik_kind kind, const double *par)
{
    return init_model(m, kind, par);
}

PSIK_API psik_status psik_init_abi(psik_model *m, psik_kind kind, const double *par,
                                   int abi_version, size_t size)
{
    if (abi_version != PSIK_ABI_VERSION || size != sizeof(psik_model))
        return PSIK_EABI;
    return init_model(m, kind, par);
}

PSIK_API psik_status psik_vgm(psik_model *m, double theta_r, double theta_s,
                              double alpha, double n, double ks)
{
    double par[6];
    par[0] = theta_r;
    par[1] = theta_s;
    par[2] = alpha;
    par[3] = n;
    par[4] = ks;
    par[5] = 0.5;
    return init_model(m, PSIK_VGM, par);
}

PSIK_API int psik_model_params(const psik_model *m, double *par)
{
    int i;
    if (m == NULL || psik__family(m->kind) == NULL)
        return 0;
    if (par != NULL)
        for (i = 0; i < m->npar; i++)
            par[i] = m->par[i];
    return m->npar;
}
