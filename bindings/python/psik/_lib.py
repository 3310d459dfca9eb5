"""Loading libpsik and describing its C interface with ctypes.

The shared library is found, in this order, through
  1. the PSIK_LIBRARY environment variable (a path to the library file),
  2. the build/lib directory of the source tree this package sits in,
  3. the system loader (libpsik.so.1, then ctypes.util.find_library).

The structures below mirror include/psik.h for ABI version 1; their sizes
and offsets are checked at import (and by the tests).
"""
import ctypes
import ctypes.util
import os

ABI_VERSION = 1
MAX_PARAMS = 16
MODEL_SIZE = 304   # sizeof(psik_model), ABI 1
STATE_SIZE = 48    # sizeof(psik_state), ABI 1

c_double_p = ctypes.POINTER(ctypes.c_double)


class PsikModel(ctypes.Structure):
    """struct psik_model (plain data, no pointers)."""
    _fields_ = [
        ("kind", ctypes.c_int),
        ("npar", ctypes.c_int),
        ("abi_size", ctypes.c_uint),
        ("abi_version", ctypes.c_uint),
        ("par", ctypes.c_double * MAX_PARAMS),
        ("theta_r", ctypes.c_double),
        ("theta_s", ctypes.c_double),
        ("ks", ctypes.c_double),
        ("h_sat", ctypes.c_double),
        ("aux", ctypes.c_double * MAX_PARAMS),
    ]


class PsikState(ctypes.Structure):
    """struct psik_state: all properties at one head."""
    _fields_ = [
        ("se", ctypes.c_double),
        ("theta", ctypes.c_double),
        ("kr", ctypes.c_double),
        ("k", ctypes.c_double),
        ("capacity", ctypes.c_double),
        ("dk_dh", ctypes.c_double),
    ]


class PsikFitData(ctypes.Structure):
    """struct psik_fit_data."""
    _fields_ = [
        ("n_theta", ctypes.c_size_t),
        ("h_theta", c_double_p),
        ("theta", c_double_p),
        ("w_theta", c_double_p),
        ("n_k", ctypes.c_size_t),
        ("h_k", c_double_p),
        ("k", c_double_p),
        ("w_k", c_double_p),
        ("k_weight", ctypes.c_double),
    ]


class PsikFitOptions(ctypes.Structure):
    """struct psik_fit_options (fill with psik_fit_defaults)."""
    _fields_ = [
        ("fixed", ctypes.c_int * MAX_PARAMS),
        ("value", ctypes.c_double * MAX_PARAMS),
        ("lo", ctypes.c_double * MAX_PARAMS),
        ("hi", ctypes.c_double * MAX_PARAMS),
        ("starts", ctypes.c_int),
        ("samples", ctypes.c_int),
        ("max_iter", ctypes.c_int),
        ("tol", ctypes.c_double),
        ("confidence", ctypes.c_double),
    ]


class PsikFitResult(ctypes.Structure):
    """struct psik_fit_result (plain data)."""
    _fields_ = [
        ("kind", ctypes.c_int),
        ("npar", ctypes.c_int),
        ("par", ctypes.c_double * MAX_PARAMS),
        ("std_err", ctypes.c_double * MAX_PARAMS),
        ("ci_lo", ctypes.c_double * MAX_PARAMS),
        ("ci_hi", ctypes.c_double * MAX_PARAMS),
        ("flag", ctypes.c_int * MAX_PARAMS),
        ("corr", (ctypes.c_double * MAX_PARAMS) * MAX_PARAMS),
        ("sse", ctypes.c_double),
        ("sse_theta", ctypes.c_double),
        ("sse_logk", ctypes.c_double),
        ("rmse", ctypes.c_double),
        ("r2", ctypes.c_double),
        ("r2_logk", ctypes.c_double),
        ("aic", ctypes.c_double),
        ("aicc", ctypes.c_double),
        ("bic", ctypes.c_double),
        ("t_value", ctypes.c_double),
        ("confidence", ctypes.c_double),
        ("n_obs", ctypes.c_int),
        ("n_theta", ctypes.c_int),
        ("n_k", ctypes.c_int),
        ("n_free", ctypes.c_int),
        ("dof", ctypes.c_int),
        ("iterations", ctypes.c_int),
        ("starts", ctypes.c_int),
        ("evaluations", ctypes.c_int),
        ("stop", ctypes.c_int),
        ("note", ctypes.c_char * 512),
    ]


class PsikTableError(ctypes.Structure):
    """struct psik_table_error: bounds reported by psik_table_build."""
    _fields_ = [("theta_rel", ctypes.c_double), ("k_rel", ctypes.c_double)]


#: ctypes mirror of each public struct, by C name (checked by the tests
#: field by field against tests/abi/layout.c).
STRUCTS = {"psik_model": PsikModel, "psik_state": PsikState, "psik_fit_data": PsikFitData,
           "psik_fit_options": PsikFitOptions, "psik_fit_result": PsikFitResult,
           "psik_table_error": PsikTableError}


def _candidates():
    env = os.environ.get("PSIK_LIBRARY")
    if env:
        return [env], True
    here = os.path.dirname(os.path.abspath(__file__))
    repo_lib = os.path.normpath(os.path.join(here, "..", "..", "..", "build", "lib"))
    names = [os.path.join(repo_lib, "libpsik.so.1"), os.path.join(repo_lib, "libpsik.so"),
             "libpsik.so.1"]
    found = ctypes.util.find_library("psik")
    if found:
        names.append(found)
    return names, False


def load():
    """Open libpsik and declare the prototypes; raises OSError naming what was tried."""
    names, explicit = _candidates()
    errors = []
    for name in names:
        if os.sep in name and not os.path.exists(name):
            errors.append("%s: no such file" % name)
            if explicit:
                break
            continue
        try:
            lib = ctypes.CDLL(name)
        except OSError as e:
            errors.append(str(e))
            if explicit:
                break
            continue
        _declare(lib)
        lib.psik_path = name
        return lib
    raise OSError("psik: cannot load the shared library (set PSIK_LIBRARY to its path); tried: "
                  + "; ".join(errors))


def _fn(lib, name, restype, argtypes):
    f = getattr(lib, name)
    f.restype = restype
    f.argtypes = argtypes
    return f


def _declare(lib):
    M = ctypes.POINTER(PsikModel)
    i, d, cp = ctypes.c_int, ctypes.c_double, ctypes.c_char_p
    _fn(lib, "psik_strerror", cp, [i])
    _fn(lib, "psik_version", cp, [])
    _fn(lib, "psik_kind_name", cp, [i])
    _fn(lib, "psik_kind_title", cp, [i])
    _fn(lib, "psik_kind_from_name", i, [cp])
    _fn(lib, "psik_param_count", i, [i])
    _fn(lib, "psik_param_name", cp, [i, i])
    _fn(lib, "psik_param_index", i, [i, cp])
    _fn(lib, "psik_param_range", i, [i, i, c_double_p, c_double_p])
    _fn(lib, "psik_check", i, [i, c_double_p, ctypes.c_char_p, ctypes.c_size_t])
    _fn(lib, "psik_init_abi", i, [M, i, c_double_p, i, ctypes.c_size_t])
    _fn(lib, "psik_model_params", i, [M, c_double_p])
    for name in ("psik_se", "psik_theta", "psik_head", "psik_head_se", "psik_kr", "psik_k",
                 "psik_k_theta", "psik_capacity", "psik_dk_dh", "psik_diffusivity"):
        _fn(lib, name, d, [M, d])
    _fn(lib, "psik_eval", None, [M, d, ctypes.POINTER(PsikState)])
    _fn(lib, "psik_eval_batch", None,
        [M, ctypes.c_size_t, c_double_p, c_double_p, c_double_p, c_double_p, c_double_p])
    if hasattr(lib, "psik_preset"):
        _fn(lib, "psik_preset", i, [M, cp])
        _fn(lib, "psik_preset_name", cp, [i])
    if hasattr(lib, "psik_table_build"):
        sz, vp = ctypes.c_size_t, ctypes.c_void_p
        _fn(lib, "psik_table_knots", sz, [d, d, d])
        _fn(lib, "psik_table_bytes", sz, [sz])
        _fn(lib, "psik_table_build", i, [M, d, d, sz, vp, sz, ctypes.POINTER(vp),
                                         ctypes.POINTER(PsikTableError)])
        _fn(lib, "psik_table_eval", None, [vp, d, ctypes.POINTER(PsikState)])
        _fn(lib, "psik_table_eval_batch", None,
            [vp, sz, c_double_p, c_double_p, c_double_p, c_double_p, c_double_p])
    # fitting (present from library 0.1.0 on; absent in older builds)
    if hasattr(lib, "psik_fit"):
        _fn(lib, "psik_fit_defaults", None, [ctypes.POINTER(PsikFitOptions)])
        _fn(lib, "psik_fit", i, [i, ctypes.POINTER(PsikFitData), ctypes.POINTER(PsikFitOptions),
                                 ctypes.POINTER(PsikFitResult), ctypes.c_char_p, ctypes.c_size_t])
        _fn(lib, "psik_fit_stop_name", cp, [i])
        _fn(lib, "psik_t_quantile", d, [d, d])
        _fn(lib, "psik_fit_rank", i, [ctypes.POINTER(PsikFitResult), ctypes.c_size_t,
                                      ctypes.POINTER(ctypes.c_size_t), c_double_p])
        _fn(lib, "psik_fit_jacobian", i, [i, ctypes.POINTER(PsikFitData), c_double_p, i,
                                          c_double_p])


def check_layout():
    """The ctypes mirror has the ABI-1 layout (raises RuntimeError otherwise)."""
    if ctypes.sizeof(PsikModel) != MODEL_SIZE or ctypes.sizeof(PsikState) != STATE_SIZE:
        raise RuntimeError("psik: ctypes layout %d/%d bytes, ABI 1 needs %d/%d"
                           % (ctypes.sizeof(PsikModel), ctypes.sizeof(PsikState),
                              MODEL_SIZE, STATE_SIZE))
