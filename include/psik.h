/**
 * @file psik.h
 * @brief psik: unsaturated-soil hydraulic functions (the only public header).
 *
 * psik evaluates published water-retention and conductivity models
 * (van Genuchten, Brooks-Corey, Kosugi, Durner, Gardner, with the Mualem or
 * Burdine pore-space conductivity models) and their derivatives and
 * inverses, with the care that flow solvers need at the wet and dry ends.
 *
 * @par Sign and unit conventions
 * - @c h is the pressure head: negative in unsaturated soil; @c h >= 0 is
 *   saturated. Entry and median heads (h_e, h_b, h_m) are pressure heads
 *   too, so they are negative numbers.
 * - Units are the caller's: @c alpha is in 1/(unit of h); @c K has the unit
 *   of @c ks. Water contents are volumetric (m^3/m^3).
 * - Effective saturation Se = (theta - theta_r)/(theta_s - theta_r).
 *
 * @par Semantics common to every evaluator
 * - h at or above the saturation head (0, or h_e / h_b where a model has
 *   an entry head) gives Se = 1, theta = theta_s, K = ks, C = 0, dK/dh = 0.
 * - NaN in gives NaN out. A NULL or uninitialised model gives NaN.
 * - Every finite h gives finite values with theta_r <= theta <= theta_s,
 *   0 <= Kr <= 1, C >= 0 and dK/dh >= 0. Where the true value exceeds the
 *   largest double (dK/dh of van Genuchten-Mualem with n < 2 as h -> 0-,
 *   which grows like (alpha|h|)^(n-2)) the result is DBL_MAX, never inf
 *   or NaN.
 * - h = -infinity is the dry limit: Se = 0, K = 0, C = 0, dK/dh = 0.
 *
 * @par Accuracy
 * The goal for every function is a relative error of at most
 * 4 ulp x max(1, kappa), where kappa = |x f'(x) / f(x)| is the condition
 * number of the function in its argument. The tests measure this against
 * tables computed with mpmath at 600 and 1200 digits; README.md lists the
 * figures measured per function and per kind.
 *
 * @par Thread safety
 * No function writes global state (the one global, which instruction set
 * the kernels use, is set once when the library is loaded), allocates
 * memory in an evaluation path, or prints. A model is plain data: many threads may
 * evaluate one shared model at once.
 */
#ifndef PSIK_H
#define PSIK_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

/** @cond PSIK_INTERNAL */
#ifndef PSIK_API
#  if defined(PSIK_STATIC)
#    define PSIK_API static
#  elif defined(__GNUC__) && defined(PSIK_BUILDING)
#    define PSIK_API __attribute__((visibility("default")))
#  else
#    define PSIK_API
#  endif
#endif
/** @endcond */

/** Version of this header, "major.minor.patch". */
#define PSIK_VERSION "0.1.0"
/** Version of the binary interface; changes whenever a struct layout changes. */
#define PSIK_ABI_VERSION 1
/** Largest number of parameters of any kind. */
#define PSIK_MAX_PARAMS 16

/** Status codes. psik_strerror() gives each one as text. */
typedef enum {
    PSIK_OK = 0,   /**< success */
    PSIK_EINVAL,   /**< invalid argument: NULL pointer, unknown kind, bad count */
    PSIK_EDOMAIN,  /**< a parameter is outside the model's domain */
    PSIK_ENOCONV,  /**< an iteration did not converge */
    PSIK_EDATA,    /**< unusable data (too few points, NaN, out of range) */
    PSIK_ENOMEM,   /**< out of memory or workspace too small */
    PSIK_EABI      /**< the caller's header does not match the library */
} psik_status;

/** The models. Parameter vectors are listed with psik_param_name(). */
typedef enum {
    PSIK_VGM = 1,     /**< van Genuchten (1980) retention, Mualem K, m = 1 - 1/n:
                           theta_r theta_s alpha n ks l */
    PSIK_VGM_AE,      /**< van Genuchten-Mualem with air-entry head h_e
                           (Vogel et al. 2001; Ippisch et al. 2006):
                           theta_r theta_s alpha n ks l h_e */
    PSIK_VG_FREE_M,   /**< van Genuchten with free m, Mualem K through the
                           incomplete beta function: theta_r theta_s alpha n m ks l */
    PSIK_VGB,         /**< van Genuchten, Burdine K, m = 1 - 2/n (n > 2):
                           theta_r theta_s alpha n ks */
    PSIK_BCM,         /**< Brooks & Corey (1964), Mualem K: theta_r theta_s h_b lambda ks l.
                           Se = (h_b/h)^lambda below h_b < 0, saturated at and above
                           h_b (C jumps there); Kr = Se^(l + 2 + 2/lambda);
                           l > -(2 + 2/lambda) so that dK/dh > 0 */
    PSIK_BCB,         /**< Brooks & Corey (1964), Burdine K: theta_r theta_s h_b lambda ks.
                           Kr = Se^(3 + 2/lambda); theta_r = 0 gives Campbell (1974)
                           with b = 1/lambda */
    PSIK_KOSUGI,      /**< Kosugi (1996) lognormal, Mualem K: theta_r theta_s h_m sigma ks l.
                           Se = Q(z), z = ln(h/h_m)/sigma, Q the normal upper tail;
                           Kr = Se^l Q(z + sigma)^2; h_m < 0, sigma > 0, l >= -2 */
    PSIK_DURNER2,     /**< Durner (1994) bimodal van Genuchten, Mualem K
                           (Priesack & Durner 2006):
                           theta_r theta_s w1 alpha1 n1 alpha2 n2 ks l; weights w1 and
                           1 - w1, 0 < w1 < 1, n_i > 1, l >= -2. No closed-form
                           inverse: psik_head() iterates (bracketed Newton in ln|h|,
                           at most 200 steps, accurate to its condition number) */
    PSIK_DURNER3,     /**< Durner (1994) trimodal, as PSIK_DURNER2:
                           theta_r theta_s w1 alpha1 n1 w2 alpha2 n2 alpha3 n3 ks l;
                           the third weight is 1 - w1 - w2 > 0 */
    PSIK_GARDNER      /**< Gardner (1958) exponential, Se = Kr = exp(alpha h):
                           theta_r theta_s alpha ks */
} psik_kind;

/**
 * A model: plain data of fixed size, copyable with memcpy, no pointers.
 * Fill it only with psik_init() or psik_vgm(); the fields are documented
 * so that bindings can mirror the layout, not to be written by hand.
 */
typedef struct psik_model {
    int kind;                    /**< psik_kind; 0 when not initialised */
    int npar;                    /**< number of parameters of the kind */
    unsigned int abi_size;       /**< sizeof(psik_model) seen by the library */
    unsigned int abi_version;    /**< PSIK_ABI_VERSION of the library */
    double par[PSIK_MAX_PARAMS]; /**< the parameters as given, in kind order */
    double theta_r;              /**< residual water content */
    double theta_s;              /**< saturated water content */
    double ks;                   /**< saturated conductivity */
    double h_sat;                /**< saturated at and above this head (0, h_e or h_b) */
    double aux[PSIK_MAX_PARAMS]; /**< constants derived by psik_init, kind-specific */
} psik_model;

/** All hydraulic properties at one head, as psik_eval() returns them. */
typedef struct psik_state {
    double se;        /**< effective saturation, [0, 1] */
    double theta;     /**< water content, [theta_r, theta_s] */
    double kr;        /**< relative conductivity, [0, 1] */
    double k;         /**< conductivity K = ks Kr */
    double capacity;  /**< water capacity C = d theta / d h >= 0 */
    double dk_dh;     /**< d K / d h >= 0 */
} psik_state;

/** @name Library information */
/**@{*/
/** A constant English sentence describing @p s; never NULL. */
PSIK_API const char *psik_strerror(psik_status s);
/** The library's version string, e.g. "0.1.0". */
PSIK_API const char *psik_version(void);
/**@}*/

/** @name The kinds table */
/**@{*/
/** Short name of a kind ("vgm", "vgm_ae", "vg_free_m", "vgb", "bcm", "bcb",
 *  "kosugi", "durner2", "durner3", "gardner"); NULL when unknown. */
PSIK_API const char *psik_kind_name(psik_kind kind);
/** One-line description with the published reference; NULL when unknown. */
PSIK_API const char *psik_kind_title(psik_kind kind);
/** The kind with short name @p name (exact, case-sensitive); 0 when unknown or NULL. */
PSIK_API psik_kind psik_kind_from_name(const char *name);
/** Number of parameters of @p kind; -1 when unknown. */
PSIK_API int psik_param_count(psik_kind kind);
/** Name of parameter @p i (0-based) of @p kind, e.g. "theta_r"; NULL when out of range. */
PSIK_API const char *psik_param_name(psik_kind kind, int i);
/** Index of the parameter named @p name in @p kind; -1 when there is none. */
PSIK_API int psik_param_index(psik_kind kind, const char *name);
/**
 * A plausible range for parameter @p i of @p kind (used as default fitting
 * bounds; wider values may still be valid). Writes *lo and *hi.
 * @return PSIK_OK, or PSIK_EINVAL for an unknown kind, index or NULL pointer.
 */
PSIK_API psik_status psik_param_range(psik_kind kind, int i, double *lo, double *hi);
/**@}*/

/** @name Building a model */
/**@{*/
/**
 * Validate a parameter vector without building a model.
 * @param kind  the model
 * @param par   psik_param_count(kind) parameters in kind order
 * @param msg   buffer for a sentence naming the offending parameter and the
 *              rule, e.g. "n must be greater than 1 (got 0.9)"; may be NULL
 * @param cap   size of @p msg in bytes (the text is always NUL-terminated
 *              when cap > 0)
 * @return PSIK_OK; PSIK_EINVAL for an unknown kind or NULL @p par;
 *         PSIK_EDOMAIN for a parameter outside its domain.
 */
PSIK_API psik_status psik_check(psik_kind kind, const double *par, char *msg, size_t cap);

/**
 * Build a model from a parameter vector (copied; @p par is not kept).
 * On failure *m is left with kind = 0, so every evaluator returns NaN.
 * Prefer calling it through the macro of the same name, which also passes
 * the header's idea of the struct layout.
 * @return PSIK_OK, PSIK_EINVAL (NULL pointer, unknown kind),
 *         PSIK_EDOMAIN (invalid parameter: psik_check() says which).
 */
PSIK_API psik_status psik_init(psik_model *m, psik_kind kind, const double *par);

/**
 * psik_init() with a layout check: @p abi_version and @p size are the
 * caller's PSIK_ABI_VERSION and sizeof(psik_model). A mismatch returns
 * PSIK_EABI and writes nothing.
 */
PSIK_API psik_status psik_init_abi(psik_model *m, psik_kind kind, const double *par,
                                   int abi_version, size_t size);

/** van Genuchten-Mualem with l = 0.5 (the common default, Mualem 1976). */
PSIK_API psik_status psik_vgm(psik_model *m, double theta_r, double theta_s,
                              double alpha, double n, double ks);

/** Number of parameters of an initialised model (0 for NULL or uninitialised),
 *  and a copy of them in @p par when it is not NULL. */
PSIK_API int psik_model_params(const psik_model *m, double *par);

/** psik_init() through the layout check (zlib style). Call as psik_init(m, kind, par). */
#define psik_init(m, kind, par) \
    psik_init_abi((m), (kind), (par), PSIK_ABI_VERSION, sizeof(psik_model))
/**@}*/

/**
 * @name Evaluators
 * All take the pressure head @p h (or a water content / saturation for the
 * inverses). Errors stated are relative, in units of the last place (ulp),
 * times max(1, kappa) with kappa the condition number; see README.md for
 * the figures measured per kind.
 */
/**@{*/
/** Effective saturation Se(h) in [0, 1]. */
PSIK_API double psik_se(const psik_model *m, double h);
/** Water content theta(h) = theta_r + (theta_s - theta_r) Se(h). */
PSIK_API double psik_theta(const psik_model *m, double h);
/** Pressure head at water content @p theta (inverse of psik_theta):
 *  0 for theta >= theta_s, -INFINITY for theta <= theta_r, NaN for NaN. */
PSIK_API double psik_head(const psik_model *m, double theta);
/** Pressure head at effective saturation @p se (inverse of psik_se):
 *  0 for se >= 1, -INFINITY for se <= 0, NaN for NaN. */
PSIK_API double psik_head_se(const psik_model *m, double se);
/** Relative conductivity Kr(h) in [0, 1]. */
PSIK_API double psik_kr(const psik_model *m, double h);
/** Conductivity K(h) = ks Kr(h). */
PSIK_API double psik_k(const psik_model *m, double h);
/** Conductivity as a function of water content (computed from Se directly,
 *  not through a rounded head): ks for theta >= theta_s, 0 for theta <= theta_r. */
PSIK_API double psik_k_theta(const psik_model *m, double theta);
/** Water capacity C(h) = d theta / d h >= 0 (0 when saturated). */
PSIK_API double psik_capacity(const psik_model *m, double h);
/** d K / d h >= 0 (0 when saturated). */
PSIK_API double psik_dk_dh(const psik_model *m, double h);
/** Diffusivity D(theta) = K / C at the head where the water content is
 *  @p theta. For theta >= theta_s it is the limit from below (+INFINITY for
 *  models whose capacity vanishes at saturation); 0 for theta <= theta_r. */
PSIK_API double psik_diffusivity(const psik_model *m, double theta);
/** All of Se, theta, Kr, K, C and dK/dh at once, sharing the expensive
 *  terms. Kr, K, C and dK/dh equal the single functions bit for bit; Se and
 *  theta agree with psik_se() and psik_theta() within 4 ulp (those take a
 *  cheaper path of their own). NULL @p out is ignored. */
PSIK_API void psik_eval(const psik_model *m, double h, psik_state *out);
/**
 * psik_eval over @p count heads. Any output pointer may be NULL: that output
 * is skipped. Outputs may not overlap @p h. NULL @p m or @p h with count > 0
 * writes NaN to the outputs given.
 *
 * Vectorised: on x86-64 the kernels are compiled for several instruction
 * sets (SSE4.2, AVX2 with FMA, AVX-512 with FMA) and the widest the
 * processor supports is chosen when the library is loaded. On one machine
 * the values equal psik_eval()'s bit for bit, except for the van Genuchten
 * kinds (vgm, vgm_ae, vgb) and Gardner, whose psik_eval() has one-point
 * code of its own and agrees to 1e-14 relative (measured: 9e-16); between
 * machines that choose different instruction sets the values agree to
 * 1e-14 relative (each within the accuracy goal), so bit-for-bit
 * regression files are per machine type.
 */
PSIK_API void psik_eval_batch(const psik_model *m, size_t count, const double *h,
                              double *theta, double *k, double *capacity, double *dk_dh);
/**@}*/

/**
 * @name Texture-class presets
 * Class-average van Genuchten-Mualem parameters (PSIK_VGM, l = 0.5) for the
 * twelve USDA soil texture classes: the means of Carsel & Parrish (1988),
 * in cm (alpha in 1/cm, heads in cm) and cm/day (ks). They describe a
 * typical soil of the class, not a particular one: use them when no
 * measured retention or conductivity data exist for the site (first
 * estimates, sensitivity studies, teaching), and prefer parameters fitted
 * to the site's own data (psik_fit()) whenever there are any.
 */
/**@{*/
/**
 * Build the PSIK_VGM model of a USDA texture class.
 * @param m        the model to fill (on failure it is left with kind = 0)
 * @param texture  class name as psik_preset_name() lists it, e.g.
 *                 "silty clay loam"; letter case is ignored and '_' or '-'
 *                 may stand for a space ("Silty_Clay_Loam")
 * @return PSIK_OK; PSIK_EINVAL for NULL pointers or an unknown class name.
 */
PSIK_API psik_status psik_preset(psik_model *m, const char *texture);
/**
 * Name of preset @p i (0-based), from "sand" to "clay" in order of
 * decreasing sand content as in the USDA texture triangle legend;
 * NULL when @p i is out of range, so a loop can stop at the first NULL.
 */
PSIK_API const char *psik_preset_name(int i);
/**@}*/

/**
 * @name Fitting parameters to laboratory data
 *
 * psik_fit() estimates the parameters of any kind from a retention data
 * set (pressure head, water content, weight) and an optional conductivity
 * data set (pressure head, K, weight) by weighted nonlinear least squares.
 *
 * @par Objective
 * SSE = sum_i w_i (theta(h_i) - theta_i)^2
 *     + k_weight * sum_j v_j (log10 K(h_j) - log10 K_j)^2,
 * with w_i, v_j the point weights (1 when not given) and k_weight the
 * relative weight of the conductivity set (1 when not given).
 *
 * @par Method
 * - Starts: a quasi-random (Halton) sample of the shape parameters over
 *   their bounds, narrowed to the heads seen in the data for parameters
 *   that are heads (names starting with "h_") or inverse heads ("alpha"),
 *   with theta_r, theta_s and log10 ks solved exactly for each sample by
 *   linear least squares (variable projection). The best distinct samples
 *   start a Levenberg-Marquardt run each (psik_fit_options.starts).
 * - Levenberg-Marquardt with Nielsen's damping update, in internal
 *   variables that are logarithms for positive parameters whose bounds
 *   span three decades or more (alpha, ks); bounds are handled by
 *   projection with an active set (a variable at a bound whose gradient
 *   points outward is held for that step). Each step solves the damped
 *   problem through a one-sided Jacobi SVD of the column-scaled Jacobian
 *   (no normal equations are formed).
 * - Jacobian: analytic in theta_r, theta_s and ks for every kind, analytic
 *   in every parameter for PSIK_VGM; other parameters by central
 *   differences with one Richardson extrapolation (truncation O(step^4),
 *   relative step 1e-3): about 1e-10 relative, measured against the
 *   analytic PSIK_VGM Jacobian by tests/unit/test_fit.c.
 * - Uncertainty: covariance s^2 (J^T J)^+ with s^2 = SSE / (N - p), from
 *   the SVD of the Jacobian in the original parameters (singular values
 *   below 1e-12 of the largest are dropped and the affected parameters
 *   get NaN errors); intervals estimate +- t(1 - (1-c)/2, N - p) x error.
 * - Parameters the data cannot determine are held ("auto-fixed", see
 *   PSIK_FIT_AUTOFIXED): every parameter that does not change theta when
 *   there is no conductivity data; every such parameter except ks when
 *   the conductivity data has no unsaturated point. Held values: the
 *   caller's psik_fit_options.value when finite, else 0.5 for l (Mualem
 *   1976) and the middle of the range (geometric for log variables) for
 *   the others. psik_fit_result.note says which and why.
 *
 * @par Data rules (psik_fit() returns PSIK_EDATA with a message naming
 * the set and the point, e.g. "retention point 4 (h = -30): theta is NaN")
 * - NaN or infinite h, theta, K or weight; theta < 0 or theta > 1;
 *   K <= 0; weight < 0; fewer points than free parameters + 1; retention
 *   heads that are all saturated or fewer distinct heads than the free
 *   parameters that shape theta: refused.
 * - Heads need not be sorted; repeated heads are replicates and are
 *   welcome. Heads h >= 0 are saturated points (theta = theta_s there).
 *   A weight of 0 drops the point: it is not counted in N.
 *
 * @par Memory and threads
 * psik_fit() makes one allocation (malloc) of about (9 + 3 p) N + 18 S
 * doubles for N points, p parameters and S start samples (S <= 4000), and
 * frees it before returning (PSIK_ENOMEM when it fails); psik_fit_jacobian()
 * likewise allocates 6 N doubles. No global state.
 */
/**@{*/

/** One data set for psik_fit(): retention points, optionally conductivity. */
typedef struct psik_fit_data {
    size_t n_theta;        /**< number of retention points */
    const double *h_theta; /**< pressure heads of the retention points */
    const double *theta;   /**< water contents, in [0, 1] */
    const double *w_theta; /**< weights >= 0, or NULL for 1 */
    size_t n_k;            /**< number of conductivity points (0: none) */
    const double *h_k;     /**< pressure heads of the conductivity points */
    const double *k;       /**< conductivities > 0 (the unit of ks) */
    const double *w_k;     /**< weights >= 0, or NULL for 1 */
    double k_weight;       /**< relative weight of the log10 K residuals;
                                0 or NaN means 1 */
} psik_fit_data;

/** Per-parameter flags in psik_fit_result.flag (bits). */
enum {
    PSIK_FIT_FREE      = 0,  /**< estimated */
    PSIK_FIT_FIXED     = 1,  /**< held at the caller's value */
    PSIK_FIT_AUTOFIXED = 2,  /**< held because the data cannot determine it */
    PSIK_FIT_AT_LOWER  = 4,  /**< estimated, ended on its lower bound */
    PSIK_FIT_AT_UPPER  = 8,  /**< estimated, ended on its upper bound */
    PSIK_FIT_UNDEFINED = 16  /**< estimated, but its error is undefined
                                  (no degrees of freedom or a flat direction) */
};

/** Why the best Levenberg-Marquardt run stopped (psik_fit_result.stop). */
typedef enum {
    PSIK_FIT_STOP_STEP = 1,      /**< relative step below the tolerance */
    PSIK_FIT_STOP_REDUCTION,     /**< relative SSE reduction below the tolerance */
    PSIK_FIT_STOP_GRADIENT,      /**< projected gradient below the tolerance */
    PSIK_FIT_STOP_EXACT,         /**< SSE reached 0 */
    PSIK_FIT_STOP_MAXITER,       /**< iteration limit reached */
    PSIK_FIT_STOP_STALLED        /**< no damping gave a decrease */
} psik_fit_stop;

/** Options of psik_fit(). Fill with psik_fit_defaults() first. */
typedef struct psik_fit_options {
    int fixed[PSIK_MAX_PARAMS];    /**< nonzero: hold parameter i at value[i] */
    double value[PSIK_MAX_PARAMS]; /**< held values; for free parameters a
                                        start value when finite (NaN: none) */
    double lo[PSIK_MAX_PARAMS];    /**< lower bounds; NaN: psik_param_range() */
    double hi[PSIK_MAX_PARAMS];    /**< upper bounds; NaN: psik_param_range() */
    int starts;                    /**< Levenberg-Marquardt runs (default 8) */
    int samples;                   /**< candidate samples (default 150 per
                                        sampled parameter, at most 4000) */
    int max_iter;                  /**< iterations per run (default 400) */
    double tol;                    /**< relative tolerance (default 1e-14) */
    double confidence;             /**< interval level in (0, 1) (default 0.95) */
} psik_fit_options;

/** The outcome of psik_fit(): plain data. */
typedef struct psik_fit_result {
    int kind;                          /**< the psik_kind fitted */
    int npar;                          /**< its number of parameters */
    double par[PSIK_MAX_PARAMS];       /**< estimates (held values for held ones) */
    double std_err[PSIK_MAX_PARAMS];   /**< standard errors; 0 for held, NaN undefined */
    double ci_lo[PSIK_MAX_PARAMS];     /**< lower end of the confidence interval */
    double ci_hi[PSIK_MAX_PARAMS];     /**< upper end of the confidence interval */
    int flag[PSIK_MAX_PARAMS];         /**< PSIK_FIT_* bits per parameter */
    double corr[PSIK_MAX_PARAMS][PSIK_MAX_PARAMS]; /**< correlation matrix (0 rows
                                                        and columns for held ones) */
    double sse;        /**< weighted sum of squares (the objective) */
    double sse_theta;  /**< its retention part */
    double sse_logk;   /**< its conductivity part (with k_weight) */
    double rmse;       /**< sqrt(SSE / N) */
    double r2;         /**< weighted R^2 of the retention set */
    double r2_logk;    /**< weighted R^2 of log10 K (NaN without K data) */
    double aic;        /**< N ln(SSE/N) + 2 (p + 1): Gaussian errors, the
                            error variance counted as a parameter */
    double aicc;       /**< AIC + 2 (p+1)(p+2) / (N - p - 2) (inf when N <= p + 2) */
    double bic;        /**< N ln(SSE/N) + (p + 1) ln N */
    double t_value;    /**< Student t quantile used for the intervals */
    double confidence; /**< interval level used */
    int n_obs;         /**< N: retention points + conductivity points */
    int n_theta;       /**< retention points */
    int n_k;           /**< conductivity points */
    int n_free;        /**< p: estimated parameters */
    int dof;           /**< N - p */
    int iterations;    /**< Levenberg-Marquardt iterations, all runs */
    int starts;        /**< Levenberg-Marquardt runs made */
    int evaluations;   /**< residual vector evaluations, all runs */
    int stop;          /**< psik_fit_stop of the best run */
    char note[512];    /**< sentences on held parameters and bounds hit */
} psik_fit_result;

/** Fill @p o with the defaults (all free, kind bounds, 8 starts, 0.95). */
PSIK_API void psik_fit_defaults(psik_fit_options *o);

/**
 * Fit the parameters of @p kind to @p data (method, rules and memory
 * under "Fitting parameters to laboratory data").
 * @param kind  any kind of the table
 * @param data  the data; only read
 * @param opt   options, or NULL for psik_fit_defaults()
 * @param res   the result (written on PSIK_OK; zeroed otherwise)
 * @param msg   a sentence on what is wrong (or empty), may be NULL
 * @param cap   size of @p msg
 * @return PSIK_OK; PSIK_EINVAL for NULL pointers, unknown kind, bad
 *         options (bounds outside the domain, lo > hi, a held value
 *         outside the domain); PSIK_EDATA for unusable data;
 *         PSIK_ENOMEM; PSIK_ENOCONV when no start gave a finite SSE.
 */
PSIK_API psik_status psik_fit(psik_kind kind, const psik_fit_data *data,
                              const psik_fit_options *opt, psik_fit_result *res,
                              char *msg, size_t cap);

/**
 * The Jacobian of the weighted residual vector of @p data at @p par:
 * retention rows first, then conductivity rows, one column per parameter
 * (row-major, @p jac holds (n_theta + n_k) x psik_param_count(kind)
 * doubles). @p numeric nonzero forces the Richardson-extrapolated central
 * differences for every column that is not analytic for all kinds (for
 * testing the analytic columns); 0 uses the psik_fit() choice.
 * Residuals are sqrt(w)(theta(h) - theta) and sqrt(k_weight v)(log10 K(h) - log10 K).
 * @return PSIK_OK, PSIK_EINVAL (NULL, unknown kind), PSIK_EDOMAIN (invalid
 *         @p par or a difference step leaves the domain on both sides).
 */
PSIK_API psik_status psik_fit_jacobian(psik_kind kind, const psik_fit_data *data,
                                       const double *par, int numeric, double *jac);

/** Name of a psik_fit_stop, e.g. "relative step below tolerance"; never NULL. */
PSIK_API const char *psik_fit_stop_name(int stop);

/**
 * Quantile of Student's t distribution: the t with P(T <= t) = @p p for
 * @p dof degrees of freedom (dof > 0, not necessarily an integer).
 * Method: closed forms for dof = 1 and 2; otherwise Newton's method on the
 * distribution function written through the regularized incomplete beta
 * function, from a Cornish-Fisher start, safeguarded by bisection.
 * Accuracy (tests/unit/test_fit.c, 1e-10 <= p <= 1 - 1e-6,
 * 1 <= dof <= 1e6): within 4e-12 relative of mpmath at 50 digits, and
 * within 3e-9 of scipy.stats.t.ppf, whose own inversion stops that far
 * from the mpmath value at some points.
 * @return the quantile; -inf for p = 0, +inf for p = 1, NaN for p outside
 *         [0, 1], NaN p or dof <= 0.
 */
PSIK_API double psik_t_quantile(double p, double dof);

/**
 * Rank fits of several kinds to the same data by AICc (smallest first).
 * @param fits    @p count results from psik_fit() on the same data
 * @param count   number of results
 * @param order   out: indices into @p fits, best first
 * @param weight  out (may be NULL): Akaike weights exp(-dAICc/2), normalized
 *                to sum 1, in the order of @p fits
 * @return PSIK_OK, PSIK_EINVAL (NULL, count 0, or fits with different
 *         numbers of points, which cannot be compared).
 */
PSIK_API psik_status psik_fit_rank(const psik_fit_result *fits, size_t count,
                                   size_t *order, double *weight);
/**@}*/

/**
 * @name Tabulated fast path
 * A table holds ln Se and ln K of one model as monotone piecewise cubics
 * over suction (cubic Hermite with the model's exact slopes at the knots,
 * limited by Fritsch & Carlson 1980 so that every piece is monotone), on
 * knots 2^e (1 + i/N), N = 2^k per octave of suction, built once into
 * memory the caller provides. The capacity and dK/dh it returns are the
 * exact derivatives of those interpolants, so a scheme that integrates C
 * stays consistent with theta. An evaluation finds its interval from the
 * bits of h and costs two cubics and two exps; heads outside the table's
 * range, NaN and saturated heads give psik_eval()'s values. A table is
 * plain data
 * (no pointers; it may be copied to another buffer of the same alignment
 * modulo 64 and read by many threads at once).
 *
 * Use it when one model is evaluated very many times over a known head
 * range (a Richards solver's inner loop) and relative errors of about
 * 1e-9 in theta and 1e-7 in K are acceptable; use psik_eval_batch() when
 * you need the model's full accuracy.
 */
/**@{*/
/** Default knot density of a table, in knots per decade of suction (64
 *  knots per octave): with it the tests measure theta within 1e-9 and K
 *  within 1e-7 (relative; at worst 7.4e-10 and 1.0e-8) for the van
 *  Genuchten-Mualem class-mean soils with n up to 2.7 and one model of
 *  every other kind (tests/unit/test_table.c). */
#define PSIK_TABLE_DENSITY 200.0

/** An interpolation table (opaque; lives in caller-provided memory). */
typedef struct psik_table psik_table;

/** Error bounds reported by psik_table_build(). */
typedef struct psik_table_error {
    double theta_rel;  /**< bound on |theta_table - theta| / theta over the range */
    double k_rel;      /**< bound on |K_table - K| / K where K > 1e-280 ks */
} psik_table_error;

/**
 * Number of knots for a table over [@p h_dry, @p h_wet] (both negative,
 * h_dry < h_wet) at @p density knots per decade of suction or more (0 or
 * less: the default PSIK_TABLE_DENSITY): the octaves of suction the range
 * touches times the power of two at or above density log10(2), plus one.
 * 0 when the range is invalid or too large.
 */
PSIK_API size_t psik_table_knots(double h_dry, double h_wet, double density);

/** Bytes of memory a table of @p knots knots needs (any alignment; the
 *  builder aligns inside it). 0 for fewer than 2 or more than 2^27 knots. */
PSIK_API size_t psik_table_bytes(size_t knots);

/**
 * Build a table of model @p m over heads [@p h_dry, @p h_wet] with @p knots
 * knots, in @p mem (@p bytes >= psik_table_bytes(knots)). @p knots must be
 * what psik_table_knots() gives for the same range (it fixes the knots per
 * octave, a power of two).
 * A range reaching into the saturated heads is cut at the saturation head.
 * Method and cost: psik_eval() at every knot and at 7 points inside every
 * interval, where the interpolants are compared with the model: the largest
 * relative errors seen, times 1.25 for peaks between the samples, are
 * written to @p err (may be NULL). The model is copied: @p m need not
 * outlive the table.
 * @param m      the model (any kind)
 * @param h_dry  driest head of the range (most negative)
 * @param h_wet  wettest head of the range, h_dry < h_wet < 0
 * @param knots  number of knots, at least 2 (psik_table_knots() gives the
 *               number for a density)
 * @param mem    caller memory the table is built in
 * @param bytes  size of @p mem
 * @param table  out: the table, inside @p mem (NULL on failure)
 * @param err    out (may be NULL): the error bounds
 * @return PSIK_OK; PSIK_EINVAL (NULL pointer, invalid model, knots not
 *         from psik_table_knots() for this range);
 *         PSIK_EDOMAIN (not h_dry < h_wet < 0, or infinite h_dry);
 *         PSIK_ENOMEM (@p bytes too small).
 */
PSIK_API psik_status psik_table_build(const psik_model *m, double h_dry, double h_wet,
                                      size_t knots, void *mem, size_t bytes,
                                      psik_table **table, psik_table_error *err);

/**
 * All values at head @p h from table @p t: theta, K and their derivatives
 * from the interpolants (se = (theta - theta_r)/(theta_s - theta_r) and
 * kr = K/ks from them). Accuracy: the bounds psik_table_build() reported.
 * NULL or unbuilt @p t gives NaN; NULL @p out is ignored.
 */
PSIK_API void psik_table_eval(const psik_table *t, double h, psik_state *out);

/**
 * psik_table_eval() over @p count heads, vectorised; output pointers may be
 * NULL (skipped) and may not overlap @p h. The same values as
 * psik_table_eval() bit for bit.
 */
PSIK_API void psik_table_eval_batch(const psik_table *t, size_t count, const double *h,
                                    double *theta, double *k, double *capacity,
                                    double *dk_dh);
/**@}*/

#ifdef __cplusplus
}
#endif

#endif /* PSIK_H */
