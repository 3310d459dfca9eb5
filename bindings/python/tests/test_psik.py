"""Tests of the psik Python binding (unittest; run by tests/suites/python.sh
once with NumPy and once with NumPy hidden).

Sources of expected values:
  * layout numbers: include/psik.h ABI 1 (the same as tests/unit/test_abi.c);
  * van Genuchten-Mualem closed forms evaluated with mpmath at 50 digits
    (Debian python3-mpmath), derivatives by mpmath.diff;
  * messages: the C library's psik_check, called directly through ctypes;
  * float, list and array paths: the list and array paths of theta, k,
    capacity and dk_dh must equal a direct psik_eval_batch call bit for bit
    (the batch fast path is the library's; its own tests bound it), and the
    scalar functions within BATCH_REL (measured and printed); the others
    must equal the scalar functions exactly.
"""
import ctypes
import math
import os
import pickle
import subprocess
import sys
import unittest

import psik
from psik import _lib

try:
    import numpy as np
except ImportError:
    np = None

try:
    import mpmath
except ImportError:
    mpmath = None

NO_NUMPY = os.environ.get("PSIK_TEST_NO_NUMPY") == "1"

# loam, Carsel & Parrish (1988) class mean (from memory), cm and cm/day
LOAM = dict(theta_r=0.078, theta_s=0.43, alpha=0.036, n=1.56, ks=24.96)
HEADS = [-1e-4, -0.1, -1.0, -10.0, -33.0, -100.0, -1000.0, -15000.0, -1e6]
WORST = {}


def note(what, err):
    WORST[what] = max(WORST.get(what, 0.0), err)


def rel(a, b):
    if a == b:
        return 0.0
    return abs(a - b) / abs(b)


BATCH_REL = 1e-14   # batch fast path vs scalar functions, relative


def c_batch(m, name, hs):
    """psik_eval_batch called directly through ctypes: one output."""
    n = len(hs)
    h = (ctypes.c_double * max(n, 1))(*hs)
    out = (ctypes.c_double * max(n, 1))()
    outs = [None, None, None, None]
    outs[psik._BATCH[name]] = out
    psik._c.psik_eval_batch(ctypes.byref(m.c_model), n, h, *outs)
    return list(out)[:n]


def expected(tc, m, name, hs):
    """What the list/array path must give: the batch call for batch outputs
    (checked to be within BATCH_REL of the scalar function), else the scalars."""
    f = getattr(m, name)
    scalars = [f(h) for h in hs]
    if name not in psik._BATCH:
        return scalars
    b = c_batch(m, name, hs)
    for x, y in zip(b, scalars):
        e = rel(x, y) if y != 0 else abs(x)
        note("batch vs scalar " + name, e)
        tc.assertLessEqual(e, BATCH_REL, (name, x, y))
    return b


def quarter_point(kind):
    """A parameter dict a quarter of the way through each plausible range."""
    out = {}
    for name in psik.param_names(kind):
        lo, hi = psik.param_range(kind, name)
        out[name] = lo + 0.25 * (hi - lo)
    return out


class Layout(unittest.TestCase):
    def test_sizes_and_offsets(self):
        M, S = _lib.PsikModel, _lib.PsikState
        self.assertEqual(ctypes.sizeof(M), 304)
        self.assertEqual(ctypes.sizeof(S), 48)
        want = dict(kind=0, npar=4, abi_size=8, abi_version=12, par=16, theta_r=144,
                    theta_s=152, ks=160, h_sat=168, aux=176)
        for f, off in want.items():
            self.assertEqual(getattr(M, f).offset, off, f)
        for i, f in enumerate("se theta kr k capacity dk_dh".split()):
            self.assertEqual(getattr(S, f).offset, 8 * i, f)
        self.assertEqual(psik.MAX_PARAMS, 16)

    def test_library_records_layout(self):
        m = psik.Model("vgm", **LOAM)
        self.assertEqual(m.c_model.abi_size, 304)
        self.assertEqual(m.c_model.abi_version, psik.ABI_VERSION)

    def test_abi_mismatch(self):
        m = _lib.PsikModel()
        ctypes.memset(ctypes.byref(m), 0xA5, ctypes.sizeof(m))
        par = (ctypes.c_double * 16)(0.078, 0.43, 0.036, 1.56, 24.96, 0.5)
        st = psik._c.psik_init_abi(ctypes.byref(m), psik.VGM, par, 1, 296)
        self.assertEqual(st, psik.EABI)
        self.assertEqual(bytes(m), b"\xa5" * 304)


    @unittest.skipIf(not os.environ.get("PSIK_LAYOUT_FILE"), "PSIK_LAYOUT_FILE not set "
                     "(tests/suites/python.sh writes it with tests/abi/layout.c)")
    def test_every_struct_matches_c(self):
        """Field offsets and sizes of every ctypes mirror = C's offsetof/sizeof."""
        seen = 0
        with open(os.environ["PSIK_LAYOUT_FILE"]) as fh:
            for line in fh:
                struct, field, off, size = line.split()
                cls = _lib.STRUCTS[struct]
                if field == "-":
                    self.assertEqual(ctypes.sizeof(cls), int(off), struct)
                else:
                    self.assertEqual(getattr(cls, field).offset, int(off), (struct, field))
                    self.assertEqual(getattr(cls, field).size, int(size), (struct, field))
                seen += 1
        print("\n# %d struct/field layouts equal C's (%s)" % (seen, ", ".join(sorted(_lib.STRUCTS))))
        self.assertGreater(seen, 60)


class Construction(unittest.TestCase):
    def test_keywords_and_default_l(self):
        m = psik.Model("vgm", **LOAM)
        self.assertEqual(m.kind, psik.VGM)
        self.assertEqual(m.kind_name, "vgm")
        self.assertEqual(m.params["l"], 0.5)
        self.assertEqual(list(m.params), psik.param_names("vgm"))
        m2 = psik.Model("vgm", [0.078, 0.43, 0.036, 1.56, 24.96, 0.5])
        self.assertEqual(m, m2)
        m3 = psik.Model(psik.VGM, dict(LOAM, l=0.5))
        self.assertEqual(m, m3)
        self.assertEqual(eval(repr(m), {"psik": psik}), m)
        self.assertEqual(pickle.loads(pickle.dumps(m)), m)

    def test_kinds_are_the_library_table(self):
        names = psik.kinds()
        self.assertIn("vgm", names)
        for k in names:
            kind = getattr(psik, k.upper())
            self.assertEqual(psik._s(psik._c.psik_kind_name(kind)), k)
            self.assertEqual(len(psik.param_names(k)), psik._c.psik_param_count(kind))
            self.assertTrue(psik.kind_title(k))

    def test_invalid_parameter_carries_check_message(self):
        bad = dict(LOAM, n=0.9)
        par = (ctypes.c_double * 16)(0.078, 0.43, 0.036, 0.9, 24.96, 0.5)
        buf = ctypes.create_string_buffer(512)
        self.assertEqual(psik._c.psik_check(psik.VGM, par, buf, 512), psik.EDOMAIN)
        with self.assertRaises(ValueError) as cm:
            psik.Model("vgm", **bad)
        self.assertEqual(str(cm.exception), buf.value.decode())
        self.assertIn("n must be greater than 1", str(cm.exception))
        with self.assertRaises(ValueError) as cm:
            psik.Model("vgm", **dict(LOAM, theta_r=0.5))
        self.assertIn("theta_r must be less than theta_s", str(cm.exception))

    def test_call_errors(self):
        with self.assertRaisesRegex(ValueError, "unknown model kind 'vgx'"):
            psik.Model("vgx", **LOAM)
        with self.assertRaisesRegex(ValueError, "needs alpha"):
            psik.Model("vgm", theta_r=0.078, theta_s=0.43, n=1.56, ks=24.96)
        with self.assertRaisesRegex(ValueError, "has no parameter alfa"):
            psik.Model("vgm", alfa=0.036, **dict((k, v) for k, v in LOAM.items() if k != "alpha"))
        with self.assertRaisesRegex(ValueError, "takes 6 parameters"):
            psik.Model("vgm", [0.078, 0.43, 0.036, 1.56, 24.96])
        with self.assertRaisesRegex(ValueError, "ks must be a number"):
            psik.Model("vgm", **dict(LOAM, ks="fast"))
        with self.assertRaisesRegex(ValueError, "finite"):
            psik.Model("vgm", **dict(LOAM, alpha=float("nan")))
        with self.assertRaises(TypeError):
            psik.Model("vgm", **LOAM).theta("wet")


@unittest.skipIf(mpmath is None, "mpmath missing")
class AgainstMpmath(unittest.TestCase):
    """van Genuchten (1980) / Mualem (1976) closed forms at 50 digits."""

    @classmethod
    def setUpClass(cls):
        mp = mpmath.mp
        mp.dps = 50
        tr, ts, a, n, ks = (mpmath.mpf(repr(LOAM[k])) for k in
                            ("theta_r", "theta_s", "alpha", "n", "ks"))
        mm = 1 - 1 / n

        def se(h):
            return (1 + (a * -h) ** n) ** -mm

        def kk(h):
            s = se(h)
            return ks * mpmath.sqrt(s) * (1 - (1 - s ** (1 / mm)) ** mm) ** 2

        cls.f = dict(se=se, theta=lambda h: tr + (ts - tr) * se(h), k=kk,
                     kr=lambda h: kk(h) / ks,
                     capacity=lambda h: mpmath.diff(lambda x: tr + (ts - tr) * se(x), h),
                     dk_dh=lambda h: mpmath.diff(kk, h))

    def test_values(self):
        m = psik.Model("vgm", **LOAM)
        worst = 0.0
        for name, ref in self.f.items():
            for h in HEADS:
                want = float(ref(mpmath.mpf(h)))
                got = getattr(m, name)(h)
                e = rel(got, want)
                note("mpmath " + name, e)
                worst = max(worst, e)
                self.assertLess(e, 1e-12, "%s(%g): %r vs %r" % (name, h, got, want))
        print("\n# largest relative error vs mpmath (vgm loam, 6 functions x %d heads): %.3g"
              % (len(HEADS), worst))

    def test_inverse_round_trip(self):
        m = psik.Model("vgm", **LOAM)
        for h in HEADS:
            e = rel(m.head(m.theta(h)), h)
            note("head(theta(h))", e)
            # condition of the inverse grows near saturation (common practice:
            # compare in h only where theta is not within rounding of theta_s)
            if h <= -0.1:
                self.assertLess(e, 1e-9, h)


class Semantics(unittest.TestCase):
    def test_saturated_and_nan(self):
        m = psik.Model("vgm", **LOAM)
        self.assertEqual(m.theta(0.0), 0.43)
        self.assertEqual(m.k(5.0), 24.96)
        self.assertEqual(m.capacity(0.0), 0.0)
        self.assertEqual(m.dk_dh(0.0), 0.0)
        self.assertEqual(m.head(0.43), 0.0)
        self.assertEqual(m.head(0.078), -math.inf)
        self.assertTrue(math.isnan(m.theta(float("nan"))))
        self.assertEqual(m.eval(1.0), psik.State(1.0, 0.43, 1.0, 24.96, 0.0, 0.0))

    def test_float_gives_float_sequence_gives_list(self):
        m = psik.Model("vgm", **LOAM)
        for name in ("se", "theta", "kr", "k", "capacity", "dk_dh"):
            f = getattr(m, name)
            self.assertIsInstance(f(-10.0), float)
            self.assertIsInstance(f(-10), float)
            lst = f(HEADS)
            self.assertIsInstance(lst, list)
            self.assertEqual(lst, expected(self, m, name, HEADS), name)
            self.assertEqual(f(tuple(HEADS)), lst)
            self.assertEqual(f([]), [])
        thetas = m.theta(HEADS)
        for name in ("head", "k_theta", "diffusivity"):
            f = getattr(m, name)
            self.assertEqual(f(thetas), expected(self, m, name, thetas))
        states = m.eval(HEADS)
        self.assertEqual(len(states), len(HEADS))
        for h, s in zip(HEADS, states):
            self.assertEqual(s, m.eval(h))
            c = psik.PsikState()
            psik._c.psik_eval(ctypes.byref(m.c_model), h, ctypes.byref(c))
            self.assertEqual(tuple(s), (c.se, c.theta, c.kr, c.k, c.capacity, c.dk_dh))
            # psik_eval shares terms between outputs: within BATCH_REL of the singles
            for name in s._fields:
                want = getattr(m, name)(h)
                e = rel(getattr(s, name), want) if want != 0 else abs(getattr(s, name))
                note("eval vs scalar " + name, e)
                self.assertLessEqual(e, BATCH_REL, (name, h))

    def test_every_kind(self):
        for kind in psik.kinds():
            p = quarter_point(kind)
            m = psik.Model(kind, **p)
            tr, ts = p["theta_r"], p["theta_s"]
            for h in HEADS:
                t = m.theta(h)
                self.assertTrue(tr <= t <= ts, (kind, h, t))
                self.assertTrue(0.0 <= m.kr(h) <= 1.0)
                self.assertGreaterEqual(m.capacity(h), 0.0)
            self.assertEqual(m.k(HEADS), expected(self, m, "k", HEADS), kind)

    def test_without_numpy(self):
        if NO_NUMPY:
            self.assertIsNone(psik._np, "NumPy should be hidden in this run")
            with self.assertRaises(ImportError):
                import numpy  # noqa: F401
        m = psik.Model("vgm", **LOAM)
        self.assertEqual(m.theta(HEADS), expected(self, m, "theta", HEADS))


@unittest.skipIf(np is None, "NumPy hidden or missing")
class Arrays(unittest.TestCase):
    def test_array_gives_array(self):
        m = psik.Model("vgm", **LOAM)
        a = np.array(HEADS)
        for name in ("se", "theta", "kr", "k", "capacity", "dk_dh"):
            f = getattr(m, name)
            out = f(a)
            self.assertIsInstance(out, np.ndarray)
            self.assertEqual(out.dtype, np.float64)
            self.assertEqual(out.tolist(), expected(self, m, name, HEADS), name)
        t = m.theta(a)
        for name in ("head", "k_theta", "diffusivity"):
            f = getattr(m, name)
            self.assertEqual(f(t).tolist(), expected(self, m, name, t.tolist()), name)

    def test_shapes_strides_dtypes(self):
        m = psik.Model("vgm", **LOAM)
        a2 = np.array(HEADS[:8]).reshape(2, 4)
        out = m.k(a2)
        self.assertEqual(out.shape, (2, 4))
        self.assertEqual(out.ravel().tolist(), expected(self, m, "k", HEADS[:8]))
        strided = np.array(HEADS)[::2]
        self.assertFalse(strided.flags["C_CONTIGUOUS"])
        self.assertEqual(m.capacity(strided).tolist(), expected(self, m, "capacity", HEADS[::2]))
        ints = np.array([-1, -10, -100])
        self.assertEqual(m.theta(ints).tolist(), expected(self, m, "theta", [-1.0, -10.0, -100.0]))
        self.assertEqual(m.theta(np.float64(-10.0)), m.theta(-10.0))
        self.assertEqual(m.theta(np.empty(0)).shape, (0,))

    def test_no_copy_for_contiguous_float64(self):
        a = np.array(HEADS)
        self.assertIs(psik._as_c_array(a), a)
        self.assertIsNot(psik._as_c_array(a[::2]), a)
        self.assertIsNot(psik._as_c_array(a.astype(np.float32)), a)

    def test_eval_of_array(self):
        m = psik.Model("vgm", **LOAM)
        a = np.array(HEADS)
        st = m.eval(a)
        self.assertIsInstance(st, psik.State)
        for i, h in enumerate(HEADS):
            self.assertEqual(tuple(float(x[i]) for x in st), tuple(m.eval(h)))


class PresetsAndTables(unittest.TestCase):
    def test_presets(self):
        names = psik.preset_names()
        self.assertEqual(len(names), 12)             # USDA texture classes
        self.assertEqual(names[0], "sand")
        loam = psik.preset("loam")
        # Carsel & Parrish (1988) loam class mean (from memory), as in C psik_preset
        want = dict(LOAM, l=0.5)
        for k, v in want.items():
            self.assertAlmostEqual(loam.params[k], v, places=12, msg=k)
        c = _lib.PsikModel()
        self.assertEqual(psik._c.psik_preset(ctypes.byref(c), b"Silty_Clay_Loam"), psik.OK)
        self.assertEqual(bytes(psik.preset("silty clay loam").c_model), bytes(c))
        with self.assertRaisesRegex(ValueError, "unknown texture class 'peat'"):
            psik.preset("peat")

    def test_table_within_its_bounds(self):
        m = psik.Model("vgm", **LOAM)
        t = psik.Table(m, -1e5, -0.01)
        worst_t = worst_k = 0.0
        # between the knots (uniform in ln suction, 200 per decade): offset 0.37 of a step
        hs = [-0.01 * 10 ** ((i + 0.37) / 50.0) for i in range(0, 350)]
        for h in hs:
            worst_t = max(worst_t, rel(t.theta(h), m.theta(h)))
            worst_k = max(worst_k, rel(t.k(h), m.k(h)))
        print("\n# table (%d knots) vs model over %d heads: theta %.3g (bound %.3g), K %.3g (bound %.3g)"
              % (t.knots, len(hs), worst_t, t.theta_rel, worst_k, t.k_rel))
        self.assertLessEqual(worst_t, t.theta_rel)
        self.assertLessEqual(worst_k, t.k_rel)
        self.assertLess(t.theta_rel, 1e-9)
        self.assertLess(t.k_rel, 1e-7)
        self.assertEqual(t.k(hs[:20]), [t.k(h) for h in hs[:20]])   # batch = single, bit for bit
        self.assertEqual(t.eval(-50.0).capacity, t.capacity(-50.0))
        self.assertEqual(t.theta(1.0), 0.43)                          # saturated: psik_eval's values
        if np is not None:
            self.assertEqual(t.dk_dh(np.array(hs[:20])).tolist(), [t.dk_dh(h) for h in hs[:20]])
        with self.assertRaisesRegex(ValueError, "invalid table range"):
            psik.Table(m, -0.01, -1e5)


FIT_HEADS = [-1.0, -3.0, -10.0, -20.0, -33.0, -60.0, -100.0, -200.0, -330.0, -1000.0,
             -3000.0, -15000.0]


class Fitting(unittest.TestCase):
    """psik.fit on noise-free data made by the library from known parameters
    (recovery of the generating parameters is the check: common practice)."""

    def setUp(self):
        self.m = psik.Model("vgm", **LOAM)
        self.theta = self.m.theta(FIT_HEADS)

    def test_recovers_retention_parameters(self):
        r = psik.fit("vgm", FIT_HEADS, self.theta)
        worst = max(rel(r.params[nm], LOAM[nm]) for nm in ("theta_r", "theta_s", "alpha", "n"))
        print("\n# noise-free vgm retention fit: largest parameter error %.3g, sse %.3g"
              % (worst, r.sse))
        self.assertLess(worst, 1e-7)
        self.assertLess(r.sse, 1e-20)
        self.assertEqual(r.n_theta, len(FIT_HEADS))
        self.assertEqual(r.n_k, 0)
        self.assertEqual(r.kind_name, "vgm")
        # without conductivity data ks and l are held, and the note says so
        self.assertIn("autofixed", r.flag_names("ks"))
        self.assertIn("autofixed", r.flag_names("l"))
        self.assertIn("ks", r.note)
        self.assertEqual(r.n_free, 4)
        self.assertTrue(r.stop_reason)
        m2 = r.model
        self.assertIsInstance(m2, psik.Model)
        self.assertEqual(m2.params, r.params)
        self.assertEqual(len(r.corr), 6)

    def test_with_conductivity(self):
        kh = [-1.0, -10.0, -30.0, -100.0, -300.0, -1000.0]
        r = psik.fit("vgm", FIT_HEADS, self.theta, k_h=kh, k=self.m.k(kh))
        worst = max(rel(r.params[nm], LOAM.get(nm, 0.5)) for nm in psik.param_names("vgm"))
        print("\n# noise-free vgm fit with K data: largest parameter error %.3g" % worst)
        self.assertLess(worst, 1e-6)
        self.assertEqual(r.n_k, len(kh))
        self.assertEqual(r.n_free, 6)

    def test_fixed_start_bounds(self):
        r = psik.fit("vgm", FIT_HEADS, self.theta, fixed={"theta_r": 0.05},
                     start={"n": 1.5}, bounds={"alpha": (0.001, None)}, starts=2)
        self.assertEqual(r.params["theta_r"], 0.05)
        self.assertIn("fixed", r.flag_names("theta_r"))
        self.assertEqual(r.std_err["theta_r"], 0.0)
        self.assertGreater(r.sse, 0.0)      # theta_r held off its true value
        self.assertGreaterEqual(r.params["alpha"], 0.001)
        lo, hi = r.ci["alpha"]
        self.assertTrue(lo <= r.params["alpha"] <= hi)

    def test_bad_data_messages(self):
        bad = list(self.theta)
        bad[0] = float("nan")
        with self.assertRaises(ValueError) as cm:
            psik.fit("vgm", FIT_HEADS, bad)
        self.assertIn("retention point 1", str(cm.exception))
        with self.assertRaisesRegex(ValueError, "differ in length"):
            psik.fit("vgm", FIT_HEADS, self.theta[:-1])
        with self.assertRaisesRegex(ValueError, "has no parameter alfa"):
            psik.fit("vgm", FIT_HEADS, self.theta, fixed={"alfa": 0.1})
        with self.assertRaisesRegex(ValueError, "both k_h and k"):
            psik.fit("vgm", FIT_HEADS, self.theta, k=[1.0])
        with self.assertRaisesRegex(ValueError, "weights has 2 values"):
            psik.fit("vgm", FIT_HEADS, self.theta, weights=[1.0, 1.0])

    def test_rank(self):
        r1 = psik.fit("vgm", FIT_HEADS, self.theta, starts=2)
        r2 = psik.fit("gardner" if "gardner" in psik.kinds() else "vgb", FIT_HEADS, self.theta,
                      starts=2)
        order, w = psik.rank([r2, r1])
        self.assertEqual(order[0], 1)                 # the generating kind wins
        self.assertAlmostEqual(sum(w), 1.0, places=12)
        self.assertGreater(w[1], w[0])

    @unittest.skipIf(mpmath is None, "mpmath missing")
    def test_t_quantile_vs_mpmath(self):
        worst = 0.0
        for p, d in ((0.975, 10.0), (0.995, 3.5), (0.6, 1e4), (0.05, 7.0)):
            mp = mpmath.mp
            mp.dps = 40
            pd, dd = mpmath.mpf(p), mpmath.mpf(d)

            def cdf_minus_p(t):
                tail = mpmath.betainc(dd / 2, mpmath.mpf(1) / 2, 0, dd / (dd + t * t),
                                      regularized=True) / 2
                return (1 - tail if t > 0 else tail) - pd
            want = float(mpmath.findroot(cdf_minus_p, 1.0 if p > 0.5 else -1.0))
            e = rel(psik.t_quantile(p, d), want)
            worst = max(worst, e)
            self.assertLess(e, 1e-12, (p, d))
        print("\n# t quantile vs mpmath (40 digits): largest relative error %.3g" % worst)

    @unittest.skipIf(np is None, "NumPy hidden or missing")
    def test_arrays_equal_lists(self):
        a = psik.fit("vgm", FIT_HEADS, self.theta, starts=2)
        b = psik.fit("vgm", np.array(FIT_HEADS), np.array(self.theta), starts=2)
        self.assertEqual(a.params, b.params)
        self.assertEqual(a.sse, b.sse)


class Loading(unittest.TestCase):
    def run_py(self, env_lib):
        env = dict(os.environ)
        env["PSIK_LIBRARY"] = env_lib
        pkg_parent = os.path.dirname(os.path.dirname(os.path.abspath(psik.__file__)))
        env["PYTHONPATH"] = pkg_parent + os.pathsep + env.get("PYTHONPATH", "")
        code = "import psik, sys; sys.stdout.write(psik.library_path())"
        return subprocess.run([sys.executable, "-c", code], env=env, capture_output=True,
                              text=True)

    def test_env_var_is_used(self):
        path = psik.library_path()
        r = self.run_py(os.path.abspath(path))
        self.assertEqual(r.returncode, 0, r.stderr)
        self.assertEqual(r.stdout, os.path.abspath(path))

    def test_env_var_missing_file(self):
        r = self.run_py("/nonexistent/libpsik.so.1")
        self.assertNotEqual(r.returncode, 0)
        self.assertIn("/nonexistent/libpsik.so.1", r.stderr)
        self.assertIn("PSIK_LIBRARY", r.stderr)


def tearDownModule():
    for k in sorted(WORST):
        print("# largest %s relative error: %.3g" % (k, WORST[k]))


if __name__ == "__main__":
    unittest.main()
