"""psik: unsaturated-soil hydraulic functions (ctypes binding of libpsik).

    >>> import psik
    >>> m = psik.Model("vgm", theta_r=0.078, theta_s=0.43, alpha=0.036, n=1.56, ks=24.96)
    >>> m.theta(-100.0)            # a float gives a float
    >>> m.k([-1.0, -10.0])         # a sequence gives a list
    >>> m.capacity(numpy_array)    # an array gives an array (batch call, no copy
    ...                            # when it is C-contiguous float64)
    >>> r = psik.fit("vgm", h, theta)   # weighted least squares (psik_fit)
    >>> r.params, r.std_err, r.model.theta(-330.0)

Keywords are the parameter names of the kind (psik.param_names(kind)); l
defaults to 0.5 (Mualem 1976) where the kind has l. Invalid parameters raise
ValueError with the library's message. Units are the caller's, as in C.
NumPy is optional. The library is found through PSIK_LIBRARY, then the
source tree's build/lib, then the system loader (see psik._lib).
"""
import ctypes
from collections import namedtuple

from . import _lib
from ._lib import ABI_VERSION, MAX_PARAMS, MODEL_SIZE, STATE_SIZE, PsikModel, PsikState

try:  # NumPy is optional
    import numpy as _np
except ImportError:  # pragma: no cover - exercised by the no-NumPy test run
    _np = None

__all__ = ["Model", "State", "Table", "FitResult", "fit", "rank", "t_quantile", "preset",
           "preset_names", "kinds", "kind_title", "param_names", "param_range",
           "version", "strerror", "library_path", "OK", "EINVAL", "EDOMAIN", "ENOCONV",
           "EDATA", "ENOMEM", "EABI"]

_lib.check_layout()
_c = _lib.load()

# Status codes (psik_status).
OK, EINVAL, EDOMAIN, ENOCONV, EDATA, ENOMEM, EABI = range(7)

#: All properties at one head, as psik_eval gives them.
State = namedtuple("State", "se theta kr k capacity dk_dh")

_MSG_CAP = 512


def _s(b):
    return None if b is None else b.decode("utf-8", "replace")


def version():
    """The library's version string."""
    return _s(_c.psik_version())


def library_path():
    """The file or name the shared library was loaded from."""
    return _c.psik_path


def strerror(status):
    """The library's sentence for a status code."""
    return _s(_c.psik_strerror(int(status)))


def _all_kinds():
    out = {}
    k = 1
    while k < 64:
        name = _c.psik_kind_name(k)
        if name is not None:
            out[_s(name)] = k
        k += 1
    return out


_KINDS = _all_kinds()
for _name, _k in _KINDS.items():   # VGM = 1, BCM = 5, ... (the C names without PSIK_)
    globals()[_name.upper()] = _k
    __all__.append(_name.upper())


def kinds():
    """Short names of every kind the library has, in kind order."""
    return sorted(_KINDS, key=_KINDS.get)


def _kind(kind):
    if isinstance(kind, str):
        k = _c.psik_kind_from_name(kind.encode())
        if k == 0:
            raise ValueError("unknown model kind %r; the kinds are: %s" % (kind, " ".join(kinds())))
        return k
    k = int(kind)
    if _c.psik_kind_name(k) is None:
        raise ValueError("unknown model kind %d; the kinds are: %s" % (k, " ".join(kinds())))
    return k


def kind_title(kind):
    """One line naming the model and its published reference."""
    return _s(_c.psik_kind_title(_kind(kind)))


def param_names(kind):
    """Parameter names of a kind, in the order of the C parameter vector."""
    k = _kind(kind)
    return [_s(_c.psik_param_name(k, i)) for i in range(_c.psik_param_count(k))]


def param_range(kind, param):
    """(lo, hi): the plausible range of a parameter (name or index)."""
    k = _kind(kind)
    i = param if isinstance(param, int) else _c.psik_param_index(k, str(param).encode())
    lo, hi = ctypes.c_double(), ctypes.c_double()
    if _c.psik_param_range(k, i, ctypes.byref(lo), ctypes.byref(hi)) != OK:
        raise ValueError("%s has no parameter %r" % (_s(_c.psik_kind_name(k)), param))
    return lo.value, hi.value


def _is_array(x):
    return _np is not None and isinstance(x, _np.ndarray)


def _as_c_array(x):
    """A C-contiguous float64 view of x (no copy when it already is one)."""
    if x.dtype == _np.float64 and x.flags["C_CONTIGUOUS"]:
        return x
    return _np.ascontiguousarray(x, dtype=_np.float64)


def _ptr(a):
    return a.ctypes.data_as(_lib.c_double_p)


def preset_names():
    """Texture classes psik.preset() knows, in the library's order."""
    out = []
    if hasattr(_c, "psik_preset_name"):
        i = 0
        while True:
            name = _c.psik_preset_name(i)
            if name is None:
                break
            out.append(_s(name))
            i += 1
    return out


def preset(texture):
    """The class-average van Genuchten-Mualem model of a USDA texture class
    (psik_preset: Carsel & Parrish 1988 means, cm and cm/day)."""
    if not hasattr(_c, "psik_preset"):
        raise RuntimeError("psik: the library at %s has no presets" % library_path())
    m = Model.__new__(Model)
    m._m = PsikModel()
    st = _c.psik_preset(ctypes.byref(m._m), str(texture).encode())
    if st != OK:
        raise ValueError("unknown texture class %r; the classes are: %s"
                         % (texture, ", ".join(preset_names())))
    m._kind = m._m.kind
    m._names = param_names(m._kind)
    return m


# The outputs psik_eval_batch computes, by position after h.
_BATCH = {"theta": 0, "k": 1, "capacity": 2, "dk_dh": 3}


class Model(object):
    """A hydraulic model: one kind and its parameters (a copy of C psik_model).

    Model(kind, params=None, **keywords): kind is a short name ("vgm") or a
    kind number; parameters come as keywords named like psik.param_names(kind),
    or as a sequence in that order, or as a dict. l defaults to 0.5.
    """

    __slots__ = ("_m", "_kind", "_names")

    def __init__(self, kind, params=None, **keywords):
        k = _kind(kind)
        names = param_names(k)
        kname = _s(_c.psik_kind_name(k))
        given = {}
        if params is not None:
            if isinstance(params, dict):
                given.update(params)
            else:
                vals = list(params)
                if len(vals) != len(names):
                    raise ValueError("%s takes %d parameters (%s), got %d"
                                     % (kname, len(names), " ".join(names), len(vals)))
                given.update(zip(names, vals))
        for key, val in keywords.items():
            if key in given:
                raise ValueError("parameter %s given twice" % key)
            given[key] = val
        unknown = [key for key in given if key not in names]
        if unknown:
            raise ValueError("%s has no parameter %s; its parameters are: %s"
                             % (kname, ", ".join(sorted(unknown)), " ".join(names)))
        if "l" in names and "l" not in given:
            given["l"] = 0.5
        missing = [nm for nm in names if nm not in given]
        if missing:
            raise ValueError("%s needs %s (its parameters are: %s)"
                             % (kname, ", ".join(missing), " ".join(names)))
        par = (ctypes.c_double * MAX_PARAMS)()
        for i, nm in enumerate(names):
            try:
                par[i] = float(given[nm])
            except (TypeError, ValueError):
                raise ValueError("%s must be a number (got %r)" % (nm, given[nm]))
        msg = ctypes.create_string_buffer(_MSG_CAP)
        st = _c.psik_check(k, par, msg, _MSG_CAP)
        if st != OK:
            raise ValueError(_s(msg.value) or strerror(st))
        self._m = PsikModel()
        st = _c.psik_init_abi(ctypes.byref(self._m), k, par, ABI_VERSION,
                              ctypes.sizeof(PsikModel))
        if st == EABI:
            raise RuntimeError("psik: %s (library %s)" % (strerror(st), library_path()))
        if st != OK:
            raise ValueError(strerror(st))
        self._kind = k
        self._names = names

    # -- description
    @property
    def kind(self):
        """The kind number (psik_kind)."""
        return self._kind

    @property
    def kind_name(self):
        """The kind's short name, e.g. "vgm"."""
        return _s(_c.psik_kind_name(self._kind))

    @property
    def params(self):
        """The parameters as a dict (name to value), in kind order."""
        return dict((nm, self._m.par[i]) for i, nm in enumerate(self._names))

    @property
    def c_model(self):
        """The underlying ctypes psik_model (for passing to other C code)."""
        return self._m

    def __repr__(self):
        return "psik.Model(%r, %s)" % (self.kind_name, ", ".join(
            "%s=%r" % (nm, self._m.par[i]) for i, nm in enumerate(self._names)))

    def __reduce__(self):
        return (Model, (self.kind_name, self.params))

    def __eq__(self, other):
        return isinstance(other, Model) and self._kind == other._kind and \
            self.params == other.params

    def __ne__(self, other):
        return not self == other

    __hash__ = None

    # -- evaluation
    def _call(self, cname, x):
        f = getattr(_c, cname)
        m = ctypes.byref(self._m)
        if _is_array(x):
            a = _as_c_array(x)
            out = _np.empty(a.shape, dtype=_np.float64)
            pos = _BATCH.get(cname[5:])
            if pos is not None:
                outs = [None, None, None, None]
                outs[pos] = _ptr(out)
                _c.psik_eval_batch(m, a.size, _ptr(a), *outs)
            else:
                flat_in, flat_out = a.reshape(-1), out.reshape(-1)
                for i in range(a.size):
                    flat_out[i] = f(m, flat_in[i])
            return out
        if isinstance(x, (str, bytes)):
            raise TypeError("psik: expected a number, a sequence of numbers or an array, got %r"
                            % (x,))
        try:
            v = float(x)
        except TypeError:
            return self._call_list(cname, f, m, x)
        return f(m, v)

    def _call_list(self, cname, f, m, seq):
        vals = [float(v) for v in seq]
        n = len(vals)
        pos = _BATCH.get(cname[5:])
        if pos is not None and n > 0:
            h = (ctypes.c_double * n)(*vals)
            out = (ctypes.c_double * n)()
            outs = [None, None, None, None]
            outs[pos] = out
            _c.psik_eval_batch(m, n, h, *outs)
            return list(out)
        return [f(m, v) for v in vals]

    def se(self, h):
        """Effective saturation Se(h) in [0, 1]."""
        return self._call("psik_se", h)

    def theta(self, h):
        """Water content theta(h)."""
        return self._call("psik_theta", h)

    def head(self, theta):
        """Pressure head at water content theta (inverse of theta())."""
        return self._call("psik_head", theta)

    def head_se(self, se):
        """Pressure head at effective saturation se (inverse of se())."""
        return self._call("psik_head_se", se)

    def kr(self, h):
        """Relative conductivity Kr(h) in [0, 1]."""
        return self._call("psik_kr", h)

    def k(self, h):
        """Conductivity K(h) = ks Kr(h)."""
        return self._call("psik_k", h)

    def k_theta(self, theta):
        """Conductivity at water content theta."""
        return self._call("psik_k_theta", theta)

    def capacity(self, h):
        """Water capacity C(h) = d theta / d h."""
        return self._call("psik_capacity", h)

    def dk_dh(self, h):
        """d K / d h."""
        return self._call("psik_dk_dh", h)

    def diffusivity(self, theta):
        """Diffusivity D(theta) = K / C."""
        return self._call("psik_diffusivity", theta)

    def eval(self, h):
        """All properties at once: a State for a float, a list of States for a
        sequence, a State of arrays for an array."""
        m = ctypes.byref(self._m)
        st = PsikState()
        if _is_array(h):
            a = _as_c_array(h)
            outs = [_np.empty(a.shape, dtype=_np.float64) for _ in range(6)]
            flat = [o.reshape(-1) for o in outs]
            fa = a.reshape(-1)
            for i in range(a.size):
                _c.psik_eval(m, fa[i], ctypes.byref(st))
                flat[0][i], flat[1][i], flat[2][i] = st.se, st.theta, st.kr
                flat[3][i], flat[4][i], flat[5][i] = st.k, st.capacity, st.dk_dh
            return State(*outs)
        try:
            v = float(h)
        except TypeError:
            res = []
            for x in h:
                _c.psik_eval(m, float(x), ctypes.byref(st))
                res.append(State(st.se, st.theta, st.kr, st.k, st.capacity, st.dk_dh))
            return res
        _c.psik_eval(m, v, ctypes.byref(st))
        return State(st.se, st.theta, st.kr, st.k, st.capacity, st.dk_dh)


# ---------------------------------------------------------------- tables

class Table(object):
    """An interpolation table of one model over a head range (psik_table_*):
    theta and ln K as monotone cubics in ln(-h), about 1e-9 and 1e-7
    relative at the default density (bounds measured at build time are in
    theta_rel and k_rel). Methods theta, k, capacity, dk_dh and eval take a
    float, a sequence or an array like Model's."""

    __slots__ = ("_mem", "_t", "knots", "theta_rel", "k_rel", "model")

    def __init__(self, model, h_dry, h_wet, density=None, knots=None):
        if not hasattr(_c, "psik_table_build"):
            raise RuntimeError("psik: the library at %s has no tables" % library_path())
        if not isinstance(model, Model):
            raise TypeError("psik.Table needs a psik.Model")
        h_dry, h_wet = float(h_dry), float(h_wet)
        if knots is None:
            knots = _c.psik_table_knots(h_dry, h_wet, 0.0 if density is None else float(density))
            if knots == 0:
                raise ValueError("invalid table range h_dry = %g, h_wet = %g (need h_dry < h_wet < 0)"
                                 % (h_dry, h_wet))
        knots = int(knots)
        nbytes = _c.psik_table_bytes(knots)
        if nbytes == 0:
            raise ValueError("a table needs 2 to 2^27 knots (got %d)" % knots)
        self._mem = ctypes.create_string_buffer(nbytes)
        self._t = ctypes.c_void_p()
        err = _lib.PsikTableError()
        st = _c.psik_table_build(ctypes.byref(model.c_model), h_dry, h_wet, knots,
                                 ctypes.cast(self._mem, ctypes.c_void_p), nbytes,
                                 ctypes.byref(self._t), ctypes.byref(err))
        if st != OK:
            raise ValueError("psik_table_build: %s (h_dry = %g, h_wet = %g, %d knots)"
                             % (strerror(st), h_dry, h_wet, knots))
        self.knots = knots
        self.theta_rel, self.k_rel = err.theta_rel, err.k_rel
        self.model = model

    def _call(self, name, x):
        pos = _BATCH[name]
        if _is_array(x):
            a = _as_c_array(x)
            out = _np.empty(a.shape, dtype=_np.float64)
            outs = [None, None, None, None]
            outs[pos] = _ptr(out)
            _c.psik_table_eval_batch(self._t, a.size, _ptr(a), *outs)
            return out
        if isinstance(x, (str, bytes)):
            raise TypeError("psik: expected a number, a sequence of numbers or an array, got %r"
                            % (x,))
        try:
            v = float(x)
        except TypeError:
            vals = [float(t) for t in x]
            n = len(vals)
            if n == 0:
                return []
            h = (ctypes.c_double * n)(*vals)
            out = (ctypes.c_double * n)()
            outs = [None, None, None, None]
            outs[pos] = out
            _c.psik_table_eval_batch(self._t, n, h, *outs)
            return list(out)
        st = PsikState()
        _c.psik_table_eval(self._t, v, ctypes.byref(st))
        return getattr(st, name)

    def theta(self, h):
        """Water content from the table."""
        return self._call("theta", h)

    def k(self, h):
        """Conductivity from the table."""
        return self._call("k", h)

    def capacity(self, h):
        """d theta / d h of the table's interpolant."""
        return self._call("capacity", h)

    def dk_dh(self, h):
        """d K / d h of the table's interpolant."""
        return self._call("dk_dh", h)

    def eval(self, h):
        """All values at one head from the table, as a State."""
        st = PsikState()
        _c.psik_table_eval(self._t, float(h), ctypes.byref(st))
        return State(st.se, st.theta, st.kr, st.k, st.capacity, st.dk_dh)


# ---------------------------------------------------------------- fitting

#: Per-parameter flag bits of a fit (psik_fit_result.flag).
FIT_FREE, FIT_FIXED, FIT_AUTOFIXED, FIT_AT_LOWER, FIT_AT_UPPER, FIT_UNDEFINED = 0, 1, 2, 4, 8, 16
_FLAG_NAMES = ((FIT_FIXED, "fixed"), (FIT_AUTOFIXED, "autofixed"), (FIT_AT_LOWER, "at_lower"),
               (FIT_AT_UPPER, "at_upper"), (FIT_UNDEFINED, "undefined"))
__all__ += ["FIT_FREE", "FIT_FIXED", "FIT_AUTOFIXED", "FIT_AT_LOWER", "FIT_AT_UPPER",
            "FIT_UNDEFINED"]


def _need_fit():
    if not hasattr(_c, "psik_fit"):
        raise RuntimeError("psik: the library at %s has no fitting (psik_fit)" % library_path())


def _doubles(x, what):
    """(pointer, keep-alive, n) for a float sequence or array (no copy for a
    C-contiguous float64 array)."""
    if _is_array(x):
        a = _as_c_array(x).reshape(-1)
        return _ptr(a), a, a.size
    if isinstance(x, (str, bytes)):
        raise TypeError("psik: %s must be numbers, got %r" % (what, x))
    try:
        vals = [float(v) for v in x]
    except TypeError:
        raise TypeError("psik: %s must be a sequence of numbers or an array" % what)
    arr = (ctypes.c_double * max(len(vals), 1))(*vals)
    return ctypes.cast(arr, _lib.c_double_p), arr, len(vals)


class FitResult(object):
    """The outcome of psik.fit(): estimates, errors, intervals and statistics.

    params, std_err and flags are dicts by parameter name; ci maps a name to
    (lo, hi); corr is the correlation matrix as a list of rows in parameter
    order; the statistics (sse, sse_theta, sse_logk, rmse, r2, r2_logk, aic,
    aicc, bic, t_value, confidence, n_obs, n_theta, n_k, n_free, dof,
    iterations, starts, evaluations, stop) are attributes of the same names
    as in C psik_fit_result; stop_reason and note are text.
    """

    _STATS = ("sse", "sse_theta", "sse_logk", "rmse", "r2", "r2_logk", "aic", "aicc", "bic",
              "t_value", "confidence", "n_obs", "n_theta", "n_k", "n_free", "dof",
              "iterations", "starts", "evaluations", "stop")

    def __init__(self, res):
        self.c_result = res
        self.kind = res.kind
        self.kind_name = _s(_c.psik_kind_name(res.kind))
        self.names = param_names(res.kind)
        n = res.npar
        self.params = dict((nm, res.par[i]) for i, nm in enumerate(self.names))
        self.std_err = dict((nm, res.std_err[i]) for i, nm in enumerate(self.names))
        self.ci = dict((nm, (res.ci_lo[i], res.ci_hi[i])) for i, nm in enumerate(self.names))
        self.flags = dict((nm, res.flag[i]) for i, nm in enumerate(self.names))
        self.corr = [[res.corr[i][j] for j in range(n)] for i in range(n)]
        for a in self._STATS:
            setattr(self, a, getattr(res, a))
        self.stop_reason = _s(_c.psik_fit_stop_name(res.stop))
        self.note = res.note.decode("utf-8", "replace")

    @property
    def model(self):
        """The fitted model (a psik.Model)."""
        return Model(self.kind, [self.params[nm] for nm in self.names])

    def flag_names(self, name):
        """The flags of one parameter as words ("fixed", "at_lower", ...)."""
        f = self.flags[name]
        return [w for bit, w in _FLAG_NAMES if f & bit]

    def __repr__(self):
        return "<psik.FitResult %s sse=%.6g %s>" % (self.kind_name, self.sse, " ".join(
            "%s=%.6g" % (nm, self.params[nm]) for nm in self.names))


def fit(kind, h, theta, weights=None, k_h=None, k=None, k_weights=None, k_weight=None,
        fixed=None, start=None, bounds=None, starts=None, samples=None, max_iter=None,
        tol=None, confidence=None):
    """Fit the parameters of a kind to retention data (and optionally
    conductivity data) with the library's psik_fit (weighted least squares,
    multi-start Levenberg-Marquardt; method and accuracy in psik.h).

    h, theta: heads and water contents (sequences or arrays of equal length);
    weights: per-point weights. k_h, k, k_weights: conductivity points;
    k_weight: relative weight of the log10 K residuals. fixed: {name: value}
    held; start: {name: start value}; bounds: {name: (lo, hi)} (None for the
    kind's default on either side). starts, samples, max_iter, tol and
    confidence override the psik_fit_defaults() values.
    Unusable data or options raise ValueError with the library's sentence.
    """
    _need_fit()
    kd = _kind(kind)
    names = param_names(kd)
    data = _lib.PsikFitData()
    keep = []
    ph, a, nh = _doubles(h, "h")
    pt, b, nt = _doubles(theta, "theta")
    keep += [a, b]
    if nh != nt:
        raise ValueError("h and theta differ in length (%d and %d)" % (nh, nt))
    data.n_theta, data.h_theta, data.theta = nh, ph, pt
    if weights is not None:
        pw, c, nw = _doubles(weights, "weights")
        keep.append(c)
        if nw != nh:
            raise ValueError("weights has %d values for %d retention points" % (nw, nh))
        data.w_theta = pw
    if (k_h is None) != (k is None):
        raise ValueError("give both k_h and k (conductivity heads and values) or neither")
    if k is not None:
        pkh, c1, nkh = _doubles(k_h, "k_h")
        pk, c2, nk = _doubles(k, "k")
        keep += [c1, c2]
        if nkh != nk:
            raise ValueError("k_h and k differ in length (%d and %d)" % (nkh, nk))
        data.n_k, data.h_k, data.k = nk, pkh, pk
        if k_weights is not None:
            pkw, c3, nkw = _doubles(k_weights, "k_weights")
            keep.append(c3)
            if nkw != nk:
                raise ValueError("k_weights has %d values for %d conductivity points" % (nkw, nk))
            data.w_k = pkw
    data.k_weight = float("nan") if k_weight is None else float(k_weight)

    opt = _lib.PsikFitOptions()
    _c.psik_fit_defaults(ctypes.byref(opt))

    def index(name, what):
        if name not in names:
            raise ValueError("%s: %s has no parameter %s; its parameters are: %s"
                             % (what, _s(_c.psik_kind_name(kd)), name, " ".join(names)))
        return names.index(name)

    for name, val in (fixed or {}).items():
        i = index(name, "fixed")
        opt.fixed[i] = 1
        opt.value[i] = float(val)
    for name, val in (start or {}).items():
        i = index(name, "start")
        if opt.fixed[i]:
            raise ValueError("%s is both fixed and given a start value" % name)
        opt.value[i] = float(val)
    for name, lohi in (bounds or {}).items():
        i = index(name, "bounds")
        lo, hi = lohi
        if lo is not None:
            opt.lo[i] = float(lo)
        if hi is not None:
            opt.hi[i] = float(hi)
    for attr, val in (("starts", starts), ("samples", samples), ("max_iter", max_iter)):
        if val is not None:
            setattr(opt, attr, int(val))
    if tol is not None:
        opt.tol = float(tol)
    if confidence is not None:
        opt.confidence = float(confidence)

    res = _lib.PsikFitResult()
    msg = ctypes.create_string_buffer(_MSG_CAP)
    st = _c.psik_fit(kd, ctypes.byref(data), ctypes.byref(opt), ctypes.byref(res), msg, _MSG_CAP)
    text = _s(msg.value) or strerror(st)
    if st == ENOMEM:
        raise MemoryError("psik_fit: " + text)
    if st == ENOCONV:
        raise RuntimeError("psik_fit: " + text)
    if st != OK:
        raise ValueError(text)
    return FitResult(res)


def rank(results):
    """Rank fits of several kinds to the same data by AICc (psik_fit_rank):
    returns (order, weights): indices into results, best first, and the
    Akaike weights in the order of results."""
    _need_fit()
    results = list(results)
    n = len(results)
    if n == 0:
        raise ValueError("rank needs at least one fit")
    arr = (_lib.PsikFitResult * n)(*[r.c_result for r in results])
    order = (ctypes.c_size_t * n)()
    w = (ctypes.c_double * n)()
    st = _c.psik_fit_rank(arr, n, order, w)
    if st != OK:
        raise ValueError("rank: %s (fits to different data cannot be compared)" % strerror(st))
    return list(order), list(w)


def t_quantile(p, dof):
    """Quantile of Student's t distribution (psik_t_quantile)."""
    _need_fit()
    return _c.psik_t_quantile(float(p), float(dof))
