#!/usr/bin/python3
"""High-precision reference tables for psik.

Writes tests/data/ref_<kind>.txt for the kinds vgm, vgm_ae, vg_free_m, vgb,
bcm, bcb, kosugi, durner2, durner3 and gardner.

    python3 gen_reference.py                 # every kind
    python3 gen_reference.py vgm kosugi      # some kinds
    python3 gen_reference.py --jobs 2        # two worker processes (one per kind)
    python3 gen_reference.py --sets 3 --out /tmp/x vgm   # quick look: first 3 sets

Method
------
Every value is evaluated with the textbook closed forms of MODELS.md (the
formulas as published, no rewriting for stability), with mpmath at
mp.dps = 600 and again at mp.dps = 1200.  A row is written only when every
number in it agrees between the two precisions to 1e-20 relative; otherwise
the script stops with an error.  At these precisions the cancellations of the
textbook forms (1 - (1 - Se^(1/m))^m at both ends of the curve, Se = 1 - tiny
at the wet end) cost about 300 of the 600 digits on the suction grid, and
about 500 on the subnormal head h = -5e-324 of the vgm_ae set with h_e = 0;
the two-precision comparison shows what is left in every table header.

First derivatives (capacity C = d theta/dh and dK/dh) come from hand-derived
closed forms (chain rule, written out per model).  Second derivatives, needed
only for the condition numbers, come from an exact second-order forward-mode
chain rule ("jets": value, d/ds, d2/ds2 carried through every operation) on
the same closed forms; the jets also give first derivatives, which every row
compares with the hand-derived ones.  No table value uses numerical
differentiation.  Separate checks (printed, and written into each header):

  * analytic first and second derivatives against mpmath.diff (dps 60);
  * each closed-form Kr against the pore-model integral it comes from
    (Mualem 1976 or Burdine 1953), by mpmath.quad at dps 40 in the variable
    u = ln(suction);
  * vg_free_m with m = 1 - 1/n (exact) against vgm;
  * Campbell (1974) K = ks (theta/theta_s)^(2b+3), b = 1/lambda, against bcb
    for theta_r = 0;
  * Brooks-Corey against the other pore model (Burdine integral of the
    Brooks-Corey curve = Mualem closed form with L = 1).

Parameters and heads are Python floats; they enter the computation as
mpf(float), i.e. exactly the doubles written in the table.  Constants derived
from them (m = 1 - 1/n, w2 = 1 - w1, ...) are computed exactly from those
doubles, not rounded to double first.

Output: one line per row, fields separated by single spaces, every number
written as repr(float) (shortest round-trip form, an exact double):
    <kind> <parameters...> <h> se theta kr k capacity dk_dh diffusivity
    c_se c_theta c_kr c_k c_capacity c_dk_dh c_head c_head_se c_k_theta
    c_diffusivity
Comment lines start with '#'; each table's header lists the columns, the
parameter sets, the conventions for saturated rows and the check results.

Speed: mpmath uses gmpy2 when it is installed (Debian: python3-gmpy2); that
only changes the speed (about 5x), not the numbers.
"""

import argparse
import math
import os
import random
import sys
import time
import zlib

import mpmath
from mpmath import mp, mpf

DPS_LO = 600
DPS_HI = 1200
AGREE = 20               # digits two precisions must share
DIFF_DPS = 60            # mpmath.diff check
DIFF_AGREE = 30
QUAD_DPS = 40            # pore-model integral check
QUAD_AGREE = 25
QUAD_MIN_N = 1.0         # integral check only for sets with every n >= this
QUAD_MIN_N_VGB = 2.0     # ... and for vgb, n >= this
QUAD_SE_MIN = 0          # ... and rows with QUAD_SE_MIN < Se < 1 - QUAD_SE_GAP
QUAD_SE_GAP = 0
QUAD_POINTS = 24         # points per kind
SEED = 19761980
COND_DIGITS = 4          # condition numbers are rounded up to this many digits
COND_CAP = 1.797e308     # larger condition numbers are written as this
DBL_MAX = sys.float_info.max

KINDS = ["vgm", "vgm_ae", "vg_free_m", "vgb", "bcm", "bcb", "kosugi",
         "durner2", "durner3", "gardner"]

PARAM_NAMES = {
    "vgm": "theta_r theta_s alpha n ks l",
    "vgm_ae": "theta_r theta_s alpha n ks l h_e",
    "vg_free_m": "theta_r theta_s alpha n m ks l",
    "vgb": "theta_r theta_s alpha n ks",
    "bcm": "theta_r theta_s h_b lambda ks l",
    "bcb": "theta_r theta_s h_b lambda ks",
    "kosugi": "theta_r theta_s h_m sigma ks l",
    "durner2": "theta_r theta_s w1 alpha1 n1 alpha2 n2 ks l",
    "durner3": "theta_r theta_s w1 alpha1 n1 w2 alpha2 n2 alpha3 n3 ks l",
    "gardner": "theta_r theta_s alpha ks",
}

TITLES = {
    "vgm": "van Genuchten (1980) retention, Mualem (1976) conductivity, m = 1 - 1/n",
    "vgm_ae": "van Genuchten-Mualem with air-entry head h_e (Vogel, van Genuchten & "
              "Cislerova 2001; Ippisch, Vogel & Bastian 2006)",
    "vg_free_m": "van Genuchten (1980) retention with free m, Mualem conductivity "
                 "(regularized incomplete beta)",
    "vgb": "van Genuchten (1980) retention, Burdine (1953) conductivity, m = 1 - 2/n",
    "bcm": "Brooks & Corey (1964) retention, Mualem conductivity",
    "bcb": "Brooks & Corey (1964) retention, Burdine conductivity",
    "kosugi": "Kosugi (1996) lognormal retention, Mualem conductivity",
    "durner2": "Durner (1994) bimodal van Genuchten, Mualem conductivity "
               "(Priesack & Durner 2006)",
    "durner3": "Durner (1994) trimodal van Genuchten, Mualem conductivity "
               "(Priesack & Durner 2006)",
    "gardner": "Gardner (1958) exponential conductivity with Se = exp(alpha h)",
}

VALUE_COLS = ["se", "theta", "kr", "k", "capacity", "dk_dh", "diffusivity"]
COND_COLS = ["c_se", "c_theta", "c_kr", "c_k", "c_capacity", "c_dk_dh",
             "c_head", "c_head_se", "c_k_theta", "c_diffusivity"]


# ---------------------------------------------------------------------------
# Second-order jets: (f, df/ds, d2f/ds2), s = suction.  Exact chain rule.
# ---------------------------------------------------------------------------

class J(object):
    __slots__ = ("v", "d", "e")

    def __init__(self, v, d=0, e=0):
        self.v = v
        self.d = d
        self.e = e

    def __add__(a, b):
        if isinstance(b, J):
            return J(a.v + b.v, a.d + b.d, a.e + b.e)
        return J(a.v + b, a.d, a.e)

    __radd__ = __add__

    def __sub__(a, b):
        if isinstance(b, J):
            return J(a.v - b.v, a.d - b.d, a.e - b.e)
        return J(a.v - b, a.d, a.e)

    def __rsub__(a, b):
        return J(b - a.v, -a.d, -a.e)

    def __neg__(a):
        return J(-a.v, -a.d, -a.e)

    def __mul__(a, b):
        if isinstance(b, J):
            return J(a.v * b.v, a.d * b.v + a.v * b.d,
                     a.e * b.v + 2 * a.d * b.d + a.v * b.e)
        return J(a.v * b, a.d * b, a.e * b)

    __rmul__ = __mul__

    def inv(a):
        r = 1 / a.v
        return J(r, -a.d * r * r, (2 * a.d * a.d * r - a.e) * r * r)

    def __truediv__(a, b):
        if isinstance(b, J):
            return a * b.inv()
        return J(a.v / b, a.d / b, a.e / b)

    def __rtruediv__(a, b):
        return a.inv() * b


def jexp(a):
    v = mp.exp(a.v)
    return J(v, v * a.d, v * (a.e + a.d * a.d))


def jlog(a):
    r = 1 / a.v
    t = a.d * r
    return J(mp.log(a.v), t, a.e * r - t * t)


def jpow(a, c):
    """a^c for a constant exponent c."""
    v = a.v ** c
    r = 1 / a.v
    t = a.d * r
    return J(v, c * v * t, c * v * (a.e * r + (c - 1) * t * t))


def phi(z):
    """Standard normal density."""
    return mp.exp(-z * z / 2) / mp.sqrt(2 * mp.pi)


def qfun(z):
    """Upper normal tail Q(z) = erfc(z/sqrt 2)/2."""
    return mp.erfc(z / mp.sqrt(2)) / 2


def jq(a):
    """Q(a): Q' = -phi, Q'' = z phi."""
    p = phi(a.v)
    return J(qfun(a.v), -p * a.d, a.v * p * a.d * a.d - p * a.e)


def jbetainc(a, p, q, beta_pq):
    """Regularized incomplete beta I_a(p, q); dI/da = a^(p-1) (1-a)^(q-1) / B."""
    z = a.v
    g = z ** (p - 1) * (1 - z) ** (q - 1) / beta_pq
    gp = g * ((p - 1) / z - (q - 1) / (1 - z))
    v = mp.betainc(p, q, 0, z, regularized=True)
    return J(v, g * a.d, gp * a.d * a.d + g * a.e)


# ---------------------------------------------------------------------------
# Models.  eval(s) returns (Se jet, Kr jet, dSe/ds, dKr/ds) with the last two
# from the hand-derived closed forms.  neg_dse_ds(s) is -dSe/ds (for the
# pore-model integrals).  All constants are recomputed at the working
# precision on each call.
# ---------------------------------------------------------------------------

def P(x):
    return mpf(x)        # exact: x is a Python float


class Model(object):
    kind = None
    pore = "mualem"      # pore model of the closed form

    def __init__(self, par):
        self.par = tuple(par)
        self.mp_par = None

    def p(self):
        return [P(x) for x in self.par]

    @property
    def theta_r(self):
        return self.par[0]

    @property
    def theta_s(self):
        return self.par[1]

    def ks(self):
        raise NotImplementedError

    def entry_head(self):
        """Head at or above which the soil is saturated."""
        return 0.0

    def saturated(self, h):
        return h >= self.entry_head()


def vg_x_se(a, n, m, sj):
    """x = (alpha s)^n and Se = (1 + x)^(-m) as jets, plus log Se."""
    x = jexp(n * jlog(a * sj))
    lse = -m * jlog(1 + x)
    return x, lse, jexp(lse)


def vg_neg_dse_ds(a, n, m, s, x=None):
    """-dSe/ds = alpha m n (alpha s)^(n-1) (1 + x)^(-m-1) (van Genuchten 1980)."""
    if x is None:
        x = (a * s) ** n
    return a * m * n * (a * s) ** (n - 1) * (1 + x) ** (-m - 1)


class VGM(Model):
    kind = "vgm"

    def ks(self):
        return self.par[4]

    def consts(self):
        tr, ts, a, n, ks, l = self.p()
        return a, n, 1 - 1 / n, l

    def eval(self, s):
        a, n, m, l = self.consts()
        sj = J(s, 1)
        x, lse, se = vg_x_se(a, n, m, sj)
        se1m = jexp(lse / m)                   # Se^(1/m)
        y = 1 - se1m
        ym = jpow(y, m)                        # (1 - Se^(1/m))^m
        kr = jexp(l * lse) * (1 - ym) * (1 - ym)
        # hand-derived first derivatives
        dse = -vg_neg_dse_ds(a, n, m, s, x.v)
        F = ym.v
        dkr_dse = se.v ** (l - 1) * (1 - F) * (l * (1 - F)
                                               + 2 * y.v ** (m - 1) * se1m.v)
        return se, kr, dse, dkr_dse * dse

    def neg_dse_ds(self, s):
        a, n, m, l = self.consts()
        return vg_neg_dse_ds(a, n, m, s)

    def l_exp(self):
        return P(self.par[5])

    def centers(self):
        return [-math.log(self.par[2])]


class VGMAE(Model):
    kind = "vgm_ae"

    def ks(self):
        return self.par[4]

    def entry_head(self):
        return self.par[6]

    def consts(self):
        tr, ts, a, n, ks, l, he = self.p()
        m = 1 - 1 / n
        se_ = -he
        sc = (1 + (a * se_) ** n) ** (-m)
        fsc = (1 - sc ** (1 / m)) ** m
        return a, n, m, l, sc, fsc

    def eval(self, s):
        a, n, m, l, sc, fsc = self.consts()
        sj = J(s, 1)
        x, lsv, sv = vg_x_se(a, n, m, sj)      # vG curve [1 + (alpha s)^n]^(-m)
        se = sv / sc
        ss = se * sc                           # Se Sc, the argument of F
        ss1m = jpow(ss, 1 / m)
        y = 1 - ss1m
        F = jpow(y, m)
        R = (1 - F) / (1 - fsc)
        kr = jpow(se, l) * R * R
        dsv = -vg_neg_dse_ds(a, n, m, s, x.v)
        dse = dsv / sc
        dR = y.v ** (m - 1) * ss.v ** (1 / m - 1) * dsv / (1 - fsc)
        dkr = l * se.v ** (l - 1) * dse * R.v ** 2 + 2 * se.v ** l * R.v * dR
        return se, kr, dse, dkr

    def neg_dse_ds(self, s):
        a, n, m, l, sc, fsc = self.consts()
        return vg_neg_dse_ds(a, n, m, s) / sc

    def l_exp(self):
        return P(self.par[5])

    def centers(self):
        return [-math.log(self.par[2])]

    def u_min(self):
        he = self.par[6]
        return None if he == 0 else mp.log(-P(he))


class VGFreeM(Model):
    kind = "vg_free_m"

    def ks(self):
        return self.par[5]

    def consts(self):
        tr, ts, a, n, m, ks, l = self.p()
        return a, n, m, l

    def eval(self, s, m_override=None):
        a, n, m, l = self.consts()
        if m_override is not None:
            m = m_override
        sj = J(s, 1)
        x, lse, se = vg_x_se(a, n, m, sj)
        zeta = jexp(lse / m)                   # Se^(1/m) = 1/(1 + x)
        p = m + 1 / n
        q = 1 - 1 / n
        B = mp.beta(p, q)
        I = jbetainc(zeta, p, q, B)
        kr = jexp(l * lse) * I * I
        dse = -vg_neg_dse_ds(a, n, m, s, x.v)
        dzeta = se.v ** (1 / m - 1) * dse / m
        dI = zeta.v ** (p - 1) * (1 - zeta.v) ** (q - 1) / B * dzeta
        dkr = (l * se.v ** (l - 1) * dse * I.v ** 2
               + 2 * se.v ** l * I.v * dI)
        return se, kr, dse, dkr

    def neg_dse_ds(self, s):
        a, n, m, l = self.consts()
        return vg_neg_dse_ds(a, n, m, s)

    def l_exp(self):
        return P(self.par[6])

    def centers(self):
        return [-math.log(self.par[2])]


class VGB(Model):
    kind = "vgb"
    pore = "burdine"

    def ks(self):
        return self.par[4]

    def consts(self):
        tr, ts, a, n, ks = self.p()
        return a, n, 1 - 2 / n

    def eval(self, s):
        a, n, m = self.consts()
        sj = J(s, 1)
        x, lse, se = vg_x_se(a, n, m, sj)
        se1m = jexp(lse / m)
        y = 1 - se1m
        ym = jpow(y, m)
        kr = se * se * (1 - ym)
        dse = -vg_neg_dse_ds(a, n, m, s, x.v)
        dkr_dse = (2 * se.v * (1 - ym.v)
                   + y.v ** (m - 1) * se.v ** (1 / m + 1))
        return se, kr, dse, dkr_dse * dse

    def neg_dse_ds(self, s):
        a, n, m = self.consts()
        return vg_neg_dse_ds(a, n, m, s)

    def centers(self):
        return [-math.log(self.par[2])]


class BC(Model):
    def entry_head(self):
        return self.par[2]

    def ks(self):
        return self.par[4]

    def exponent(self):
        raise NotImplementedError

    def eval(self, s):
        pp = self.p()
        sb, lam = -pp[2], pp[3]
        a = self.exponent()
        sj = J(s, 1)
        se = jpow(sb / sj, lam)                # (h_b / h)^lambda
        kr = jpow(se, a)
        dse = -lam * se.v / s
        dkr = a * se.v ** (a - 1) * dse
        return se, kr, dse, dkr

    def neg_dse_ds(self, s):
        pp = self.p()
        sb, lam = -pp[2], pp[3]
        return lam * (sb / s) ** lam / s

    def centers(self):
        return [math.log(-self.par[2])]

    def u_min(self):
        return mp.log(-P(self.par[2]))


class BCM(BC):
    kind = "bcm"

    def exponent(self):
        pp = self.p()
        return pp[5] + 2 + 2 / pp[3]

    def l_exp(self):
        return P(self.par[5])


class BCB(BC):
    kind = "bcb"
    pore = "burdine"

    def exponent(self):
        return 3 + 2 / P(self.par[3])


class Kosugi(Model):
    kind = "kosugi"

    def ks(self):
        return self.par[4]

    def eval(self, s):
        tr, ts, hm, sg, ks, l = self.p()
        sm = -hm
        sj = J(s, 1)
        z = jlog(sj / sm) / sg
        se = jq(z)
        q2 = jq(z + sg)
        kr = jpow(se, l) * q2 * q2
        pz = phi(z.v)
        pz2 = phi(z.v + sg)
        dse = -pz / (sg * s)
        dkr = -(l * se.v ** (l - 1) * pz * q2.v ** 2
                + 2 * se.v ** l * q2.v * pz2) / (sg * s)
        return se, kr, dse, dkr

    def neg_dse_ds(self, s):
        tr, ts, hm, sg, ks, l = self.p()
        z = mp.log(s / -hm) / sg
        return phi(z) / (sg * s)

    def l_exp(self):
        return P(self.par[5])

    def centers(self):
        c = math.log(-self.par[2])
        sg = self.par[3]
        return [c + k * sg for k in (-8, -4, -2, 0, 2, 4, 8)]


class Durner(Model):
    nmodes = None

    def modes(self):
        pp = self.p()
        if self.nmodes == 2:
            w1, a1, n1, a2, n2 = pp[2:7]
            return [(w1, a1, n1), (1 - w1, a2, n2)]
        w1, a1, n1, w2, a2, n2, a3, n3 = pp[2:10]
        return [(w1, a1, n1), (w2, a2, n2), (1 - w1 - w2, a3, n3)]

    def ks(self):
        return self.par[-2]

    def l_exp(self):
        return P(self.par[-1])

    def eval(self, s):
        l = self.l_exp()
        sj = J(s, 1)
        se = 0
        G = 0
        G1 = 0
        dse = 0
        dG = 0
        for w, a, n in self.modes():
            m = 1 - 1 / n
            x, lsi, si = vg_x_se(a, n, m, sj)
            si1m = jexp(lsi / m)
            y = 1 - si1m
            ym = jpow(y, m)
            se = se + w * si
            G = G + w * a * (1 - ym)
            G1 = G1 + w * a
            dsi = -vg_neg_dse_ds(a, n, m, s, x.v)
            dse = dse + w * dsi
            dG = dG + w * a * y.v ** (m - 1) * si.v ** (1 / m - 1) * dsi
        kr = jpow(se, l) * G * G / (G1 * G1)
        dkr = (l * se.v ** (l - 1) * dse * G.v ** 2
               + 2 * se.v ** l * G.v * dG) / G1 ** 2
        return se, kr, dse, dkr

    def neg_dse_ds(self, s):
        t = 0
        for w, a, n in self.modes():
            t += w * vg_neg_dse_ds(a, n, 1 - 1 / n, s)
        return t

    def centers(self):
        pr = self.par
        if self.nmodes == 2:
            al = [pr[3], pr[5]]
        else:
            al = [pr[3], pr[6], pr[8]]
        return [-math.log(a) for a in al]


class Durner2(Durner):
    kind = "durner2"
    nmodes = 2


class Durner3(Durner):
    kind = "durner3"
    nmodes = 3


class Gardner(Model):
    kind = "gardner"
    pore = None
    d_constant = True        # D = K/C is constant: its condition number is 0

    def ks(self):
        return self.par[3]

    def eval(self, s):
        a = P(self.par[2])
        se = jexp(-a * J(s, 1))
        dse = -a * se.v
        return se, se, dse, dse


MODEL_CLASS = {"vgm": VGM, "vgm_ae": VGMAE, "vg_free_m": VGFreeM, "vgb": VGB,
               "bcm": BCM, "bcb": BCB, "kosugi": Kosugi, "durner2": Durner2,
               "durner3": Durner3, "gardner": Gardner}


# ---------------------------------------------------------------------------
# Rows
# ---------------------------------------------------------------------------

def rel(a, b):
    if a == b:
        return mpf(0)
    return abs(a - b) / max(abs(a), abs(b))


def row_values(model, h):
    """All 17 numbers of an unsaturated row at the current precision, plus the
    relative differences between hand-derived and jet first derivatives."""
    pp = model.p()
    tr, ts = pp[0], pp[1]
    ks = P(model.ks())
    dth = ts - tr
    hm = P(h)
    s = -hm
    se, kr, dse_s, dkr_s = model.eval(s)
    Se, Kr = se.v, kr.v
    Se_h = -dse_s                 # d/dh = -d/ds
    Se_hh = se.e
    Kr_h = -dkr_s
    Kr_hh = kr.e
    theta = tr + dth * Se
    C = dth * Se_h
    C_h = dth * Se_hh
    K = ks * Kr
    K_h = ks * Kr_h
    K_hh = ks * Kr_hh
    D = K / C
    if getattr(model, "d_constant", False):
        cD = mpf(0)
    else:
        cD = abs(theta * (K_h / K - C_h / C) / C)
    vals = [Se, theta, Kr, K, C, K_h, D,
            abs(hm * Se_h / Se), abs(hm * C / theta), abs(hm * Kr_h / Kr),
            abs(hm * K_h / K), abs(hm * C_h / C), abs(hm * K_hh / K_h),
            abs(theta / (hm * C)), abs(Se / (hm * Se_h)),
            abs(theta * K_h / (C * K)), cD]
    hj = max(rel(dse_s, se.d), rel(dkr_s, kr.d))
    return vals, hj


def to_double(x):
    """Correctly rounded (nearest, ties to even) double of an mpf, subnormals
    included; None when it overflows."""
    if x == 0:
        return 0.0
    neg = x < 0
    man, exp = abs(x).man_exp
    man = int(man)
    e = exp + man.bit_length() - 1
    if e > 1023:
        return None
    q = max(e - 52, -1074)
    shift = q - exp
    if shift <= 0:
        mm = man << (-shift)
    else:
        mm = man >> shift
        rem = man - (mm << shift)
        half = 1 << (shift - 1)
        if rem > half or (rem == half and (mm & 1)):
            mm += 1
    try:
        r = math.ldexp(mm, q)
    except OverflowError:
        return None
    if math.isinf(r):
        return None
    return -r if neg else r


def cond_double(c):
    """Condition number rounded up to COND_DIGITS significant digits."""
    if c == 0:
        return 0.0
    if c > COND_CAP:
        return COND_CAP
    e = int(mp.floor(mp.log10(c))) - (COND_DIGITS - 1)
    mant = int(mp.ceil(c / mpf(10) ** e))
    r = float("%de%d" % (mant, e))
    if r > COND_CAP:
        return COND_CAP
    return r


def compute_row(model, h, stats):
    """Returns the list of output strings for (model, h) or None (skipped)."""
    if model.saturated(h):
        vals = [1.0, model.theta_s, 1.0, model.ks(), 0.0, 0.0, 0.0]
        return vals + [0.0] * len(COND_COLS)
    with mp.workdps(DPS_LO):
        lo, hj_lo = row_values(model, h)
    with mp.workdps(DPS_HI):
        hi, hj_hi = row_values(model, h)
        worst = mpf(0)
        for i, (a, b) in enumerate(zip(lo, hi)):
            r = rel(a, b)
            if r > mpf(10) ** (-AGREE) or not mp.isfinite(b):
                raise RuntimeError(
                    "%s %r h=%r: column %d differs between dps %d and %d "
                    "(rel %s)" % (model.kind, model.par, h, i, DPS_LO, DPS_HI,
                                  mp.nstr(r, 5)))
            worst = max(worst, r)
        stats["prec_max"] = max(stats["prec_max"], worst)
        stats["prec_n"] += 1
        stats["hand_jet_max"] = max(stats["hand_jet_max"], hj_lo, hj_hi)
        if hi[5] < 0:
            stats["neg_dk"] += 1
        if hi[2] > 1:
            stats["kr_gt1"] += 1
        out = []
        for v in hi[:7]:
            d = to_double(v)
            if d is None:
                stats["skipped"] += 1
                return None
            out.append(d)
        for c in hi[7:]:
            if c > COND_CAP:
                stats["clamped"] += 1
            out.append(cond_double(c))
    return out


# ---------------------------------------------------------------------------
# Parameter sets and heads
# ---------------------------------------------------------------------------

def r6(x):
    return float("%.6g" % x)


def logu(rng, lo, hi):
    return r6(math.exp(rng.uniform(math.log(lo), math.log(hi))))


def uni(rng, lo, hi):
    return r6(rng.uniform(lo, hi))


def rand_l(rng):
    return 0.5 if rng.random() < 0.7 else uni(rng, -1.0, 2.0)


def rand_n(rng, lo, hi):
    """n log-uniform in [lo, hi], half the time log-uniform in n - 1 instead
    (extra weight near 1)."""
    if rng.random() < 0.5:
        return r6(1 + math.exp(rng.uniform(math.log(lo - 1), math.log(hi - 1))))
    return logu(rng, lo, hi)


def rand_thetas(rng):
    return uni(rng, 0.0, 0.2), uni(rng, 0.3, 0.6)


GRID = [r6(10.0 ** (-6 + 13 * k / 56.0)) for k in range(57)]

CARSEL_PARRISH = [
    ("sand", 0.045, 0.43, 0.145, 2.68, 712.8),
    ("loamy sand", 0.057, 0.41, 0.124, 2.28, 350.2),
    ("sandy loam", 0.065, 0.41, 0.075, 1.89, 106.1),
    ("loam", 0.078, 0.43, 0.036, 1.56, 24.96),
    ("silt", 0.034, 0.46, 0.016, 1.37, 6.00),
    ("silt loam", 0.067, 0.45, 0.020, 1.41, 10.80),
    ("sandy clay loam", 0.100, 0.39, 0.059, 1.48, 31.44),
    ("clay loam", 0.095, 0.41, 0.019, 1.31, 6.24),
    ("silty clay loam", 0.089, 0.43, 0.010, 1.23, 1.68),
    ("sandy clay", 0.100, 0.38, 0.027, 1.23, 2.88),
    ("silty clay", 0.070, 0.36, 0.005, 1.09, 0.48),
    ("clay", 0.068, 0.38, 0.008, 1.09, 4.80),
]

VG1980 = [
    ("sandstone", 0.153, 0.250, 0.0079, 10.4),
    ("silt loam", 0.131, 0.396, 0.00423, 2.06),
    ("clay", 0.0, 0.446, 0.00152, 1.17),
]

SRC_CP = ("Carsel & Parrish (1988) texture-class means, vG-Mualem, alpha 1/cm, "
          "ks cm/day, l = 0.5 (values from memory, as in MODELS.md)")
SRC_CP_AE = ("Carsel & Parrish (1988) texture-class means (values from memory, as "
             "in MODELS.md) with chosen air-entry heads")
SRC_VG = ("van Genuchten (1980) fitted sets (sandstone, silt loam, clay; values "
          "from memory, as in MODELS.md), ks = 1.0, l = 0.5")


def sets_vgm(rng):
    out = []
    for name, tr, ts, a, n, ks in CARSEL_PARRISH:
        out.append(((tr, ts, a, n, ks, 0.5), "Carsel & Parrish 1988: " + name))
    for name, tr, ts, a, n in VG1980:
        out.append(((tr, ts, a, n, 1.0, 0.5), "van Genuchten 1980: " + name))
    for n in [1.001, 1.01, 1.05, 1.1, 1.5, 2.0, 3.0, 10.0, 30.0]:
        tr, ts = rand_thetas(rng)
        out.append(((tr, ts, logu(rng, 1e-4, 1e2), n, logu(rng, 1e-3, 1e3),
                     rand_l(rng)), "random, fixed n"))
    for a, n in [(1e-4, 1.001), (1e-4, 30.0), (1e2, 1.001), (1e2, 30.0),
                 (1e-4, 1.5), (1e2, 1.5)]:
        tr, ts = rand_thetas(rng)
        out.append(((tr, ts, a, n, logu(rng, 1e-3, 1e3), rand_l(rng)),
                    "corner of the alpha-n box"))
    for i in range(25):
        tr, ts = rand_thetas(rng)
        out.append(((tr, ts, logu(rng, 1e-4, 1e2), rand_n(rng, 1.001, 30.0),
                     logu(rng, 1e-3, 1e3), rand_l(rng)), "random"))
    return out


def sets_vgm_ae(rng):
    out = [((0.078, 0.43, 0.036, 1.56, 24.96, 0.5, 0.0),
            "Carsel & Parrish 1988 loam, h_e = 0 (original model)"),
           ((0.078, 0.43, 0.036, 1.56, 24.96, 0.5, -2.0),
            "Carsel & Parrish 1988 loam, h_e = -2 (Vogel et al. 2001 practice)"),
           ((0.095, 0.41, 0.019, 1.31, 6.24, 0.5, -2.0),
            "Carsel & Parrish 1988 clay loam, h_e = -2"),
           ((0.068, 0.38, 0.008, 1.09, 4.80, 0.5, -0.5),
            "Carsel & Parrish 1988 clay, h_e = -0.5"),
           ((0.045, 0.43, 0.145, 2.68, 712.8, 0.5, -10.0),
            "Carsel & Parrish 1988 sand, h_e = -10")]
    fixed = [(1.001, -2.0), (1.01, -0.5), (1.05, -10.0), (1.1, -2.0),
             (1.5, -0.5), (2.0, -10.0), (3.0, -2.0), (10.0, -0.5), (30.0, -10.0)]
    for n, he in fixed:
        tr, ts = rand_thetas(rng)
        out.append(((tr, ts, logu(rng, 1e-4, 1e2), n, logu(rng, 1e-3, 1e3),
                     rand_l(rng), he), "random, fixed n and h_e"))
    for i in range(26):
        tr, ts = rand_thetas(rng)
        out.append(((tr, ts, logu(rng, 1e-4, 1e2), rand_n(rng, 1.001, 30.0),
                     logu(rng, 1e-3, 1e3), rand_l(rng), -logu(rng, 0.01, 50.0)),
                    "random"))
    return out


def sets_vg_free_m(rng):
    out = []
    for n in [1.1, 1.5, 2.0, 5.0]:        # m = 1 - 1/n as a double
        tr, ts = rand_thetas(rng)
        out.append(((tr, ts, logu(rng, 1e-3, 1.0), n, 1.0 - 1.0 / n,
                     logu(rng, 1e-3, 1e3), 0.5), "random, m = 1 - 1/n (double)"))
    for n, m in [(1.05, 0.05), (1.05, 3.0), (15.0, 0.05), (15.0, 3.0),
                 (1.56, 0.5), (2.0, 1.0)]:
        tr, ts = rand_thetas(rng)
        out.append(((tr, ts, logu(rng, 1e-4, 1e2), n, m, logu(rng, 1e-3, 1e3),
                     rand_l(rng)), "corner of the n-m box"))
    for i in range(25):
        tr, ts = rand_thetas(rng)
        out.append(((tr, ts, logu(rng, 1e-4, 1e2), logu(rng, 1.05, 15.0),
                     logu(rng, 0.05, 3.0), logu(rng, 1e-3, 1e3), rand_l(rng)),
                    "random"))
    return out


def sets_vgb(rng):
    out = []
    for n in [2.001, 2.1, 2.5, 3.0, 5.0, 10.0, 30.0]:
        tr, ts = rand_thetas(rng)
        out.append(((tr, ts, logu(rng, 1e-4, 1e2), n, logu(rng, 1e-3, 1e3)),
                    "random, fixed n"))
    for a, n in [(1e-4, 2.001), (1e-4, 30.0), (1e2, 2.001), (1e2, 30.0)]:
        tr, ts = rand_thetas(rng)
        out.append(((tr, ts, a, n, logu(rng, 1e-3, 1e3)), "corner"))
    for i in range(29):
        tr, ts = rand_thetas(rng)
        if rng.random() < 0.5:
            n = r6(2 + math.exp(rng.uniform(math.log(1e-3), math.log(28.0))))
        else:
            n = logu(rng, 2.001, 30.0)
        out.append(((tr, ts, logu(rng, 1e-4, 1e2), n, logu(rng, 1e-3, 1e3)),
                    "random"))
    return out


def sets_bc(rng, with_l):
    out = []
    corners = [(-0.1, 0.05), (-0.1, 10.0), (-200.0, 0.05), (-200.0, 10.0),
               (-10.0, 1.0)]
    for i, (hb, lam) in enumerate(corners):
        tr, ts = rand_thetas(rng)
        if not with_l and i < 2:
            tr = 0.0
        par = (tr, ts, hb, lam, logu(rng, 1e-3, 1e3))
        out.append((par + ((rand_l(rng),) if with_l else ()),
                    "corner of the h_b-lambda box"))
    for i in range(35):
        tr, ts = rand_thetas(rng)
        if not with_l and i < 3:
            tr = 0.0
        par = (tr, ts, -logu(rng, 0.1, 200.0), logu(rng, 0.05, 10.0),
               logu(rng, 1e-3, 1e3))
        out.append((par + ((rand_l(rng),) if with_l else ()), "random"))
    return out


def sets_kosugi(rng):
    out = []
    for hm, sg in [(-1.0, 0.1), (-1.0, 4.0), (-1e5, 0.1), (-1e5, 4.0),
                   (-100.0, 1.0)]:
        tr, ts = rand_thetas(rng)
        out.append(((tr, ts, hm, sg, logu(rng, 1e-3, 1e3), rand_l(rng)),
                    "corner of the h_m-sigma box"))
    for i in range(37):
        tr, ts = rand_thetas(rng)
        out.append(((tr, ts, -logu(rng, 1.0, 1e5), uni(rng, 0.1, 4.0),
                     logu(rng, 1e-3, 1e3), rand_l(rng)), "random"))
    return out


def rand_alpha_pair(rng, separated):
    """Two alphas in [1e-4, 1]: at least two decades apart, or within a
    factor e of each other."""
    la1 = rng.uniform(-4.0, 0.0)
    if separated:
        while True:
            la2 = rng.uniform(-4.0, 0.0)
            if abs(la2 - la1) >= 2.0:
                break
    else:
        la2 = min(0.0, max(-4.0, la1 + rng.uniform(-1.0, 1.0) / math.log(10.0)))
    return r6(10.0 ** la1), r6(10.0 ** la2)


def sets_durner2(rng):
    out = [((0.05, 0.45, 0.5, 0.5, 6.0, 1e-4, 3.0, 10.0, 0.5),
            "nearly flat between the modes")]
    for i in range(39):
        tr, ts = rand_thetas(rng)
        k1 = rng.randint(52, 972)
        sep = i % 2 == 0
        a1, a2 = rand_alpha_pair(rng, sep)
        out.append(((tr, ts, k1 / 1024.0, a1, logu(rng, 1.05, 8.0), a2,
                     logu(rng, 1.05, 8.0), logu(rng, 1e-3, 1e3), rand_l(rng)),
                    "random, modes " + ("well separated" if sep else "overlapping")))
    return out


def sets_durner3(rng):
    out = [((0.05, 0.45, 0.25, 0.5, 6.0, 0.5, 1e-2, 4.0, 1e-4, 3.0, 10.0, 0.5),
            "nearly flat between the modes")]
    for i in range(35):
        tr, ts = rand_thetas(rng)
        while True:
            k1 = rng.randint(52, 920)
            k2 = rng.randint(52, 920)
            if 1024 - k1 - k2 >= 52:
                break
        sep = i % 2 == 0
        if sep:
            la = [-4.0 + rng.uniform(0.0, 0.3), -2.0 + rng.uniform(-0.3, 0.3),
                  rng.uniform(-0.3, 0.0)]
            rng.shuffle(la)
            als = [r6(10.0 ** x) for x in la]
        else:
            c = rng.uniform(-3.5, -0.5)
            als = [r6(10.0 ** (c + rng.uniform(-0.5, 0.5))) for _ in range(3)]
        ns = [logu(rng, 1.05, 8.0) for _ in range(3)]
        out.append(((tr, ts, k1 / 1024.0, als[0], ns[0], k2 / 1024.0, als[1],
                     ns[1], als[2], ns[2], logu(rng, 1e-3, 1e3), rand_l(rng)),
                    "random, modes " + ("well separated" if sep else "overlapping")))
    return out


def sets_gardner(rng):
    out = []
    for a in (1e-4, 1.0, 0.01):
        tr, ts = rand_thetas(rng)
        out.append(((tr, ts, a, logu(rng, 1e-3, 1e3)), "corner"))
    for i in range(35):
        tr, ts = rand_thetas(rng)
        out.append(((tr, ts, logu(rng, 1e-4, 1.0), logu(rng, 1e-3, 1e3)),
                    "random"))
    return out


SET_MAKERS = {
    "vgm": sets_vgm, "vgm_ae": sets_vgm_ae, "vg_free_m": sets_vg_free_m,
    "vgb": sets_vgb, "bcm": lambda r: sets_bc(r, True),
    "bcb": lambda r: sets_bc(r, False), "kosugi": sets_kosugi,
    "durner2": sets_durner2, "durner3": sets_durner3, "gardner": sets_gardner,
}


def heads_for(model):
    hs = [-s for s in GRID] + [0.0, 1.0]
    he = model.entry_head()
    if model.kind in ("vgm_ae", "bcm", "bcb"):
        if he == 0.0:
            extra = [math.nextafter(0.0, -math.inf), -1e-300, -1e-200, -1e-100,
                     -1e-20, -1e-10]
        else:
            extra = [he, math.nextafter(he, -math.inf), he * (1 + 1e-12),
                     he * (1 + 1e-9), he * (1 + 1e-6), he * (1 + 1e-3), he * 1.1]
        hs += extra
    seen = set()
    out = []
    for h in hs:
        if h not in seen:
            seen.add(h)
            out.append(h)
    return out


def make_sets(kind):
    rng = random.Random(SEED + zlib.crc32(kind.encode()))
    sets = SET_MAKERS[kind](rng)
    for par, src in sets:
        assert len(par) == len(PARAM_NAMES[kind].split()), (kind, par)
        assert all(isinstance(x, float) for x in par), (kind, par)
    return sets


# ---------------------------------------------------------------------------
# Checks
# ---------------------------------------------------------------------------

def pick(rows, k):
    """k items spread evenly over a list (deterministic)."""
    if len(rows) <= k:
        return list(rows)
    step = len(rows) / float(k)
    return [rows[int(i * step)] for i in range(k)]


def check_diff(kind, models, heads_of, k=20):
    """Analytic first and second derivatives of Se and Kr against mpmath.diff
    of the value functions, at dps DIFF_DPS, on well-conditioned rows."""
    cand = []
    for mdl in models:
        for h in heads_of[id(mdl)]:
            if mdl.saturated(h) or h > -1e-4 or h < -1e6:
                continue
            cand.append((mdl, h))
    good = []
    with mp.workdps(DPS_LO):            # choose the rows at full precision
        for mdl, h in pick(cand, 6 * k):
            se, kr, dse, dkr = mdl.eval(-P(h))
            if not (mpf(10) ** -12 < se.v < 1 - mpf(10) ** -6
                    and kr.v > mpf(10) ** -200):
                continue
            good.append((mdl, h))
    with mp.workdps(DIFF_DPS):
        worst1 = worst2 = mpf(0)
        n = 0
        for mdl, h in pick(good, k):
            with mp.workdps(DPS_LO):        # analytic values as in the table
                se, kr, dse, dkr = mdl.eval(-P(h))
            fse = lambda hh, m=mdl: m.eval(-hh)[0].v
            fkr = lambda hh, m=mdl: m.eval(-hh)[1].v
            hp = P(h)
            step = abs(hp) * mpf(2) ** (-mp.prec - 10)   # relative step
            d1s = mp.diff(fse, hp, 1, h=step)
            d2s = mp.diff(fse, hp, 2, h=step)
            d1k = mp.diff(fkr, hp, 1, h=step)
            d2k = mp.diff(fkr, hp, 2, h=step)
            worst1 = max(worst1, rel(d1s, -dse), rel(d1k, -dkr))
            worst2 = max(worst2, rel(d2s, se.e), rel(d2k, kr.e))
            n += 1
    ok = n > 0 and max(worst1, worst2) < mpf(10) ** (-DIFF_AGREE)
    return {"n": n, "d1": float(worst1), "d2": float(worst2), "ok": ok}


def pore_integral(mdl, s, which):
    """Integral of the pore model from suction s (None: from the entry
    suction, or from s = 0) to infinity, in u = ln s:
    Mualem  I = int -dSe/ds du        (= int_0^Se dS/s),
    Burdine J = int -dSe/ds e^-u du   (= int_0^Se dS/s^2).
    mpmath.quad stops on an absolute error estimate, so every piece is
    scaled to O(1) before it is integrated."""
    if which == "mualem":
        g = lambda u: mdl.neg_dse_ds(mp.exp(u))
    else:
        g = lambda u: mdl.neg_dse_ds(mp.exp(u)) * mp.exp(-u)
    lo = mp.log(s) if s is not None else None
    umin = getattr(mdl, "u_min", lambda: None)()
    if lo is None:
        lo = umin if umin is not None else -mp.inf
    pts = set()
    for c in mdl.centers():
        for d in (-60, -30, -15, -8, -4, -2, -1, 0, 1, 2, 4, 8, 15, 30, 60):
            pts.add(mpf(c + d))
    if lo != -mp.inf:
        for d in (0.25, 0.5, 1, 2, 4, 8, 16, 32, 64):
            pts.add(lo + d)
    pts = sorted(p for p in pts if lo == -mp.inf or p > lo)
    allpts = [lo] + pts + [mp.inf]
    total = mpf(0)
    for a, b in zip(allpts[:-1], allpts[1:]):
        ends = [x for x in (a, b) if mp.isfinite(x)]
        if mp.isfinite(a) and mp.isfinite(b):
            ends.append((a + b) / 2)
        scale = max(abs(g(x)) for x in ends)
        if scale == 0:
            continue
        total += scale * mp.quad(lambda u: g(u) / scale, [a, b])
    return total


def check_integrals(kind, models, heads_of, k=QUAD_POINTS):
    """Closed-form Kr against the Mualem or Burdine integral, at dps QUAD_DPS.
    Returns a list of (label, result dict)."""
    res = []
    base = MODEL_CLASS[kind].pore
    if base is None:
        return res
    plans = [(base, None)]
    if kind == "bcm":
        plans.append(("burdine", "bc_other"))
    if kind == "bcb":
        plans.append(("mualem", "bc_other"))
    cand = []
    for mdl in models:
        if kind in ("vgm", "vgm_ae", "durner2", "durner3"):
            ns = [x for i, x in enumerate(mdl.par)
                  if PARAM_NAMES[kind].split()[i].startswith("n")]
            if min(ns) < QUAD_MIN_N:
                continue
        if kind == "vg_free_m" and mdl.par[3] < QUAD_MIN_N:
            continue
        if kind == "vgb" and mdl.par[3] < QUAD_MIN_N_VGB:
            continue
        for h in heads_of[id(mdl)]:
            if mdl.saturated(h) or h > -1e-4:
                continue
            cand.append((mdl, h))
    good = []
    with mp.workdps(DPS_LO):            # choose the rows at full precision
        for mdl, h in pick(cand, 8 * k):
            se = mdl.eval(-P(h))[0].v
            if QUAD_SE_MIN < se < 1 - QUAD_SE_GAP:
                good.append((mdl, h))
    chosen = pick(good, k)
    with mp.workdps(QUAD_DPS):
        for which, label in plans:
            worst = mpf(0)
            n = 0
            tot_cache = {}
            se_lo = se_hi = None
            for mdl, h in chosen:
                s = -P(h)
                with mp.workdps(DPS_LO):   # closed form as in the table
                    se, kr = [t.v for t in mdl.eval(s)[:2]]
                    if se_hi is None or se > se_hi:
                        se_hi = se
                if id(mdl) not in tot_cache:
                    tot_cache[id(mdl)] = pore_integral(mdl, None, which)
                tot = tot_cache[id(mdl)]
                part = pore_integral(mdl, s, which)
                if label == "bc_other":
                    # Brooks-Corey: Burdine integral = Mualem form with L = 1,
                    # both = Se^(3 + 2/lambda)
                    closed = se ** (3 + 2 / P(mdl.par[3]))
                    if which == "burdine":
                        kri = se ** 2 * part / tot
                    else:
                        kri = se * (part / tot) ** 2
                elif which == "mualem":
                    closed = kr
                    kri = se ** mdl.l_exp() * (part / tot) ** 2
                else:
                    closed = kr
                    kri = se ** 2 * part / tot
                worst = max(worst, rel(closed, kri))
                n += 1
                se_lo = se if se_lo is None else min(se_lo, se)
            res.append((label or which, {"n": n, "max": float(worst),
                                         "se_lo": float(se_lo), "gap": mp.nstr(1 - se_hi, 3),
                                         "nsets": len(tot_cache),
                                         "ok": worst < mpf(10) ** (-QUAD_AGREE)}))
    return res


def check_free_m_reduction(k=40):
    """vg_free_m with m = 1 - 1/n (computed exactly) equals vgm."""
    rng = random.Random(SEED + 7)
    worst = mpf(0)
    n = 0
    with mp.workdps(DIFF_DPS):
        for i in range(k):
            nn = [1.05, 1.1, 1.5, 2.0, 3.0, 8.0][i % 6]
            a = logu(rng, 1e-4, 1.0)
            l = rand_l(rng)
            tr, ts = rand_thetas(rng)
            f = VGFreeM((tr, ts, a, nn, 0.5, 1.0, l))
            g = VGM((tr, ts, a, nn, 1.0, l))
            h = -logu(rng, 1e-3, 1e5)
            s = -P(h)
            mex = 1 - 1 / P(nn)
            r1 = f.eval(s, m_override=mex)
            r2 = g.eval(s)
            for a1, a2 in ((r1[0].v, r2[0].v), (r1[1].v, r2[1].v),
                           (r1[1].d, r2[1].d), (r1[1].e, r2[1].e),
                           (r1[3], r2[3])):
                worst = max(worst, rel(a1, a2))
            n += 1
    return {"n": n, "max": float(worst), "ok": worst < mpf(10) ** -30}


def compare_free_m_double(models, heads_of):
    """Table sets of vg_free_m whose m is the double nearest 1 - 1/n, against
    vgm (exact m = 1 - 1/n) with the same other parameters: documents how much
    the rounding of m alone moves Se and Kr."""
    worst = mpf(0)
    n = 0
    nsets = 0
    with mp.workdps(DPS_LO):
        for mdl in models:
            tr, ts, a, nn, m, ks, l = mdl.par
            if m != 1.0 - 1.0 / nn:
                continue
            nsets += 1
            g = VGM((tr, ts, a, nn, ks, l))
            for h in heads_of[id(mdl)]:
                if mdl.saturated(h):
                    continue
                r1 = mdl.eval(-P(h))
                r2 = g.eval(-P(h))
                worst = max(worst, rel(r1[0].v, r2[0].v), rel(r1[1].v, r2[1].v))
                n += 1
    return {"n": n, "nsets": nsets, "max": float(worst)}


def check_campbell(models, heads_of):
    """Campbell (1974) K = ks (theta/theta_s)^(2b+3), b = 1/lambda, equals bcb
    for theta_r = 0."""
    worst = mpf(0)
    n = 0
    with mp.workdps(DPS_LO):
        for mdl in models:
            if mdl.par[0] != 0.0:
                continue
            ts = P(mdl.par[1])
            b = 1 / P(mdl.par[3])
            for h in heads_of[id(mdl)]:
                if mdl.saturated(h):
                    continue
                se, kr = [t.v for t in mdl.eval(-P(h))[:2]]
                theta = ts * se
                kc = P(mdl.ks()) * (theta / ts) ** (2 * b + 3)
                worst = max(worst, rel(kc, P(mdl.ks()) * kr))
                n += 1
    return {"n": n, "max": float(worst), "ok": n > 0 and worst < mpf(10) ** -100}


# ---------------------------------------------------------------------------
# Driver
# ---------------------------------------------------------------------------

def fmt(x):
    return repr(float(x))


def generate(kind, outdir, max_sets=None, log=sys.stderr):
    t0 = time.time()
    sets = make_sets(kind)
    if max_sets:
        sets = sets[:max_sets]
    models = [MODEL_CLASS[kind](par) for par, src in sets]
    heads_of = {id(m): heads_for(m) for m in models}
    stats = {"prec_max": mpf(0), "prec_n": 0, "hand_jet_max": mpf(0),
             "skipped": 0, "clamped": 0, "neg_dk": 0, "kr_gt1": 0}
    lines = []
    nsat = 0
    for i, mdl in enumerate(models):
        for h in heads_of[id(mdl)]:
            out = compute_row(mdl, h, stats)
            if out is None:
                continue
            if mdl.saturated(h):
                nsat += 1
            lines.append(" ".join([kind] + [fmt(x) for x in mdl.par] + [fmt(h)]
                                  + [fmt(x) for x in out]))
        log.write("  %s: set %d/%d done (%.0f s)\n" % (kind, i + 1, len(models),
                                                        time.time() - t0))
        log.flush()
    t_rows = time.time() - t0
    checks = []
    dres = check_diff(kind, models, heads_of)
    checks.append("analytic derivatives (dps %d) vs mpmath.diff (dps %d, relative "
                  "step 2^-(prec+10)): "
                  "%d rows, largest rel. difference first derivatives (dSe/dh, "
                  "dKr/dh) %.3g, second derivatives (d2Se/dh2, d2Kr/dh2) %.3g "
                  "[required < 1e-%d: %s]"
                  % (DPS_LO, DIFF_DPS, dres["n"], dres["d1"], dres["d2"], DIFF_AGREE,
                     "ok" if dres["ok"] else "FAILED"))
    allok = dres["ok"]
    for label, r in check_integrals(kind, models, heads_of):
        if label == "mualem":
            what = "closed-form Kr vs Mualem (1976) integral Se^l [I(Se)/I(1)]^2"
        elif label == "burdine":
            what = "closed-form Kr vs Burdine (1953) integral Se^2 J(Se)/J(1)"
        else:
            what = ("Brooks-Corey relation: %s integral of the retention curve vs "
                    "Se^(3+2/lambda) (Burdine form = Mualem form with L = 1)"
                    % ("Burdine" if kind == "bcm" else "Mualem (L = 1)"))
        checks.append("%s by mpmath.quad (dps %d, variable u = ln s; closed form "
                      "at dps %d): %d points from %d sets, Se from %.3g to 1 - %s, "
                      "largest rel. difference %.3g [required < 1e-%d: %s]"
                      % (what, QUAD_DPS, DPS_LO, r["n"], r["nsets"], r["se_lo"],
                         r["gap"], r["max"], QUAD_AGREE,
                         "ok" if r["ok"] else "FAILED"))
        allok = allok and r["ok"]
    if kind == "gardner":
        checks.append("no pore-model integral: Gardner's Kr = Se is an empirical "
                      "pairing, not derived from Mualem or Burdine")
    if kind == "vg_free_m":
        r = check_free_m_reduction()
        checks.append("reduction: free-m form with m = 1 - 1/n (exact) vs vgm "
                      "closed form (Se, Kr, dKr/ds, d2Kr/ds2; dps %d): %d points, "
                      "largest rel. difference %.3g [required < 1e-30: %s]"
                      % (DIFF_DPS, r["n"], r["max"], "ok" if r["ok"] else "FAILED"))
        allok = allok and r["ok"]
        r = compare_free_m_double(models, heads_of)
        checks.append("information: the %d table sets with m = double nearest "
                      "1 - 1/n vs vgm (exact m) with the same other parameters: "
                      "%d rows, largest rel. difference of Se or Kr %.3g (the "
                      "rounding of m alone; grows like ln(x) at the dry end)"
                      % (r["nsets"], r["n"], r["max"]))
    if kind == "bcb":
        r = check_campbell(models, heads_of)
        checks.append("Campbell (1974) K = ks (theta/theta_s)^(2b+3), b = 1/lambda, "
                      "vs bcb K for theta_r = 0 (dps %d): %d rows, largest rel. "
                      "difference %.3g [%s]"
                      % (DPS_LO, r["n"], r["max"], "ok" if r["ok"] else "FAILED"))
        allok = allok and r["ok"]
    t_all = time.time() - t0
    checks.insert(0, "precision: %d unsaturated rows evaluated at dps %d and %d; "
                     "largest rel. difference over all 17 numbers of a row %s "
                     "[required < 1e-%d: ok]"
                  % (stats["prec_n"], DPS_LO, DPS_HI,
                     mp.nstr(stats["prec_max"], 3), AGREE))
    checks.insert(1, "hand-derived first derivatives vs exact jet derivatives, "
                     "every unsaturated row at both precisions: largest rel. "
                     "difference %s" % mp.nstr(stats["hand_jet_max"], 3))
    notes = []
    if stats["neg_dk"]:
        notes.append("%d rows have dK/dh < 0 (negative l)" % stats["neg_dk"])
    if stats["kr_gt1"]:
        notes.append("%d rows have Kr > 1 (negative l)" % stats["kr_gt1"])
    header = make_header(kind, sets, models, heads_of, stats, checks, notes,
                         len(lines), nsat, t_all)
    path = os.path.join(outdir, "ref_%s.txt" % kind)
    tmp = path + ".tmp"
    with open(tmp, "w") as f:
        for hl in header:
            f.write("# " + hl + "\n" if hl else "#\n")
        for ln in lines:
            f.write(ln + "\n")
    os.replace(tmp, path)
    summary = ["%s: %d rows (%d saturated), %d skipped, %.0f s (rows %.0f s)"
               % (kind, len(lines), nsat, stats["skipped"], t_all, t_rows)]
    summary += ["  " + c for c in checks] + ["  note: " + n for n in notes]
    if not allok:
        summary.append("  CHECK FAILED")
    return "\n".join(summary), allok


def make_header(kind, sets, models, heads_of, stats, checks, notes, nrows, nsat,
                seconds):
    pn = PARAM_NAMES[kind]
    H = []
    H.append("psik reference table: %s" % kind)
    H.append("model: %s" % TITLES[kind])
    H.append("generator: tests/reference/gen_reference.py (run: python3 "
             "tests/reference/gen_reference.py %s); mpmath %s; seed %d"
             % (kind, mpmath.__version__, SEED))
    H.append("precision: every unsaturated row evaluated with the textbook closed "
             "forms at mp.dps = %d and again at mp.dps = %d; a row is written only "
             "if all its numbers agree to 1e-%d relative" % (DPS_LO, DPS_HI, AGREE))
    H.append("derivatives: capacity and dk_dh from hand-derived closed-form first "
             "derivatives; second derivatives (condition numbers only) by exact "
             "second-order forward-mode chain rule; no numerical differentiation")
    H.append("parameters and heads are exact doubles as written; constants derived "
             "from them (m = 1-1/n, m = 1-2/n, w_last = 1 - sum w, exponents) are "
             "exact functions of those doubles, not rounded to double")
    H.append("values are correctly rounded doubles (round to nearest) of the "
             "dps-%d results; 0.0 where a value underflows" % DPS_HI)
    H.append("")
    H.append("columns: kind %s h %s %s" % (pn, " ".join(VALUE_COLS),
                                           " ".join(COND_COLS)))
    H.append("  h pressure head (suction s = -h); se effective saturation; theta "
             "= theta_r + (theta_s - theta_r) se; kr relative conductivity; k = ks kr;")
    H.append("  capacity = d theta/dh; dk_dh = dK/dh; diffusivity = K/C (as a "
             "function of theta)")
    H.append("  condition numbers (error allowed: 4 ulp x max(1, c)): c_se, c_theta, "
             "c_kr, c_k, c_capacity, c_dk_dh = |h f'(h)/f(h)| of that function;")
    H.append("  c_head = |theta/(h C)| (head from theta); c_head_se = |Se/(h dSe/dh)| "
             "(head from se); c_k_theta = |theta (dK/dh)/(C K)| (K from theta);")
    H.append("  c_diffusivity = |theta D'(theta)/D| with D'(theta) = (dD/dh)/C")
    H.append("  condition numbers are rounded up to %d significant digits; those "
             "above %r are written as %r (%d such numbers in this table)"
             % (COND_DIGITS, COND_CAP, COND_CAP, stats["clamped"]))
    H.append("  saturated rows (h >= %s): se = 1, theta = theta_s, kr = 1, k = ks, "
             "capacity = 0, dk_dh = 0, diffusivity written 0.0 (K/C infinite), all "
             "condition numbers 0"
             % {"vgm_ae": "h_e", "bcm": "h_b", "bcb": "h_b"}.get(kind, "0"))
    H.append("  rows whose values overflow a double are left out (%d in this table; "
             "in practice wet-end rows where C is so small that D = K/C exceeds "
             "the largest double)" % stats["skipped"])
    H.append("")
    H.append("heads: 57 suctions log-spaced from 1e-6 to 1e7 (rounded to 6 "
             "significant digits), h = -s; plus h = 0.0 and h = 1.0"
             + ("; plus h = entry head, the next double below it and a few heads "
                "just below (for h_e = 0: -5e-324, -1e-300, -1e-200, -1e-100, "
                "-1e-20, -1e-10)" if kind in ("vgm_ae", "bcm", "bcb") else ""))
    srcs = {}
    for par, src in sets:
        if src.startswith("Carsel"):
            key = SRC_CP if kind == "vgm" else SRC_CP_AE
        elif src.startswith("van Genuchten"):
            key = SRC_VG
        elif src.startswith("random") or src.startswith("corner"):
            key = src + (" (Python random.Random, seed as above; values rounded "
                         "to 6 significant digits)")
        else:
            key = src
        srcs[key] = srcs.get(key, 0) + 1
    H.append("parameter sets (%d):" % len(sets))
    for key, cnt in srcs.items():
        H.append("  %d x %s" % (cnt, key))
    for par, src in sets:
        if not (src.startswith("random") or src.startswith("corner")):
            H.append("    %s: %s" % (src, " ".join(repr(x) for x in par)))
    if kind in ("durner2", "durner3"):
        H.append("  weights are multiples of 1/1024, so the last weight (1 minus the "
                 "others) is also exact in double")
    if kind == "vg_free_m":
        H.append("  m is a parameter here (a double); sets marked m = 1 - 1/n use "
                 "the double nearest 1 - 1/n")
    H.append("")
    H.append("checks:")
    for c in checks:
        H.append("  " + c)
    for n in notes:
        H.append("  note: " + n)
    H.append("rows: %d (%d saturated)" % (nrows, nsat))
    return H


def worker(args):
    kind, outdir, max_sets = args
    return generate(kind, outdir, max_sets)


def main():
    here = os.path.dirname(os.path.abspath(__file__))
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("kinds", nargs="*", help="kinds to regenerate (default: all)")
    ap.add_argument("--out", default=os.path.join(here, "..", "data"),
                    help="output directory (default tests/data)")
    ap.add_argument("--jobs", type=int, default=1, help="worker processes (max 2)")
    ap.add_argument("--sets", type=int, default=None,
                    help="only the first N parameter sets of each kind (quick look)")
    a = ap.parse_args()
    kinds = a.kinds or KINDS
    for k in kinds:
        if k not in KINDS:
            ap.error("unknown kind %r (known: %s)" % (k, " ".join(KINDS)))
    os.makedirs(a.out, exist_ok=True)
    t0 = time.time()
    jobs = max(1, min(2, a.jobs))
    args = [(k, a.out, a.sets) for k in kinds]
    if jobs > 1 and len(kinds) > 1:
        import multiprocessing
        with multiprocessing.Pool(jobs) as pool:
            results = pool.map(worker, args, chunksize=1)
    else:
        results = [worker(x) for x in args]
    ok = True
    print("mpmath %s (backend %s), dps %d and %d" % (mpmath.__version__,
                                                     mpmath.libmp.BACKEND,
                                                     DPS_LO, DPS_HI))
    for text, good in results:
        print(text)
        ok = ok and good
    print("total %.0f s" % (time.time() - t0))
    if not ok:
        print("some check FAILED")
        sys.exit(1)


if __name__ == "__main__":
    main()
