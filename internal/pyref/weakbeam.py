# Independent reference for the weak-beam image of a straight dislocation
# lying parallel to the foil surfaces: the column equations integrated with
# numpy, written from the textbook equations, not from Faultline's code.
#
# Equations (Howie & Whelan 1961, Proc. R. Soc. A 263, 217; Hirsch, Howie,
# Nicholson, Pashley & Whelan 1965, Electron Microscopy of Thin Crystals,
# ch. 10 and 12), for the beams n·g, n = -N..N, in the form in which the
# strain enters as a local excitation error:
#
#   dphi_n/dz = 2 pi i (s_n + n beta(z)) phi_n
#               + sum_{m != n} pi i (1/xi_{n-m} + i/xi'_{n-m}) phi_m
#               - (pi/xi'_0) phi_n,
#   beta = d(g.R)/dz,   s_n = n s_1 + n (1 - n) lambda g^2 / 2,
#
# phi_0 = 1, phi_n = 0 at the entrance face z = 0. With N = 1 and the
# -g beam dropped ("two_beam": true) it is the two-beam Howie-Whelan pair.
# Integration: Strang splitting (Strang 1968, SIAM J. Numer. Anal. 5, 506).
# The diagonal part is integrated exactly, through
#   P_n(z) = exp(2 pi i (s_n z + n g.R(z))),
# which stays exact however fast g.R turns near the core; the constant
# coupling matrix C is exponentiated once (numpy.linalg.eig). One step:
#   phi <- P(z+h) P(z+h/2)^-1 . e^{hC} . P(z+h/2) P(z)^-1 phi
# (carried as psi = P^-1 phi, which has the same intensities).
# "kinematical": true instead evaluates the first-order amplitude
#   phi_g = (pi i / xi_g) int_0^t exp(2 pi i (s z + g.R)) dz
# (Hirsch et al. 1965, ch. 7) by the composite Simpson rule.
#
# Isotropic displacement fields of a straight dislocation parallel to the
# surfaces at depth z0 (Hirth & Lothe 1982, Theory of Dislocations, ch. 3),
# column at distance x from the core measured in the foil plane, zeta = z - z0:
#   screw: g.R = (g.b / 2 pi) atan2(zeta, x), x normal to the line;
#   edge, b and g along x, glide plane parallel to the surfaces:
#          g.R = (g.b / 2 pi) (theta + x zeta / (2 (1 - nu) r^2)),
#          theta = atan2(zeta, x), r^2 = x^2 + zeta^2.
# No surface relaxation (infinite-medium fields). "cores": [{"x", "gb"}]
# instead sums the fields of parallel dislocations of the same kind at the
# same depth, offset by x (the partials of a dissociated dislocation whose
# glide plane is parallel to the surfaces).
#
# Input (JSON on stdin): a list of cases, each with kind "screw"|"edge",
# gb, nu, s1, lambda_nm, g_nm, N, two_beam, kinematical, xi {"h": nm} for
# h = 1..2N (a reflection absent: no coupling), xi_abs {"h": nm} (absent:
# no absorption), xi0_abs (nm,
# absent: none), thickness_nm (a list: the intensity is averaged over the
# foils, each with the dislocation at its middle, a wedge), x_nm (the
# columns), h_nm (the largest step).
# Output (JSON): for each case the g-beam intensity per column (averaged),
# the perfect-crystal background, the peak (parabolic interpolation
# through the largest sample and its neighbours), FWHM above the
# background (half-maximum crossings interpolated linearly; null when the
# profile does not fall to half within the columns), all from the
# Richardson extrapolation of runs at h and h/2, and the peak and FWHM of
# the h/2 run alone with its error estimate (see one()).
import json
import sys

import numpy as np


def gR(kind, gb, nu, x, zeta):
    th = np.arctan2(zeta, x)
    if kind == "screw":
        return gb / (2 * np.pi) * th
    if kind == "edge":
        r2 = x * x + zeta * zeta + 1e-30
        return gb / (2 * np.pi) * (th + x * zeta / (2 * (1 - nu) * r2))
    raise ValueError("kind: " + kind)


def beams(d):
    n = d["N"]
    if d.get("two_beam"):
        return np.array([0, 1])
    return np.arange(-n, n + 1)


def coupling(d, ns):
    nb = len(ns)
    C = np.zeros((nb, nb), complex)
    xi0a = d.get("xi0_abs")
    for a in range(nb):
        if xi0a:
            C[a, a] = -np.pi / xi0a
        for b in range(nb):
            h = abs(int(ns[a] - ns[b]))
            if h == 0:
                continue
            # a reflection without xi (or xi_abs) does not couple
            q = 1 / d["xi"][str(h)] if str(h) in d["xi"] else 0
            if d.get("xi_abs") and str(h) in d["xi_abs"]:
                q += 1j / d["xi_abs"][str(h)]
            C[a, b] = np.pi * 1j * q
    return C


def expm(C, h):
    lam, V = np.linalg.eig(C)
    return V @ np.diag(np.exp(h * lam)) @ np.linalg.inv(V)


def run(d, h, x, foil):
    """g-beam intensity at the exit face, one row per (column, foil): x[r]
    the column (NaN: perfect crystal), foil[r] the index into
    d["thickness_nm"], in increasing order; every foil is cut into the
    same number of steps of its own length, at most h."""
    ns = beams(d)
    c = d["lambda_nm"] * d["g_nm"] ** 2 / 2
    s = ns * d["s1"] + ns * (1 - ns) * c
    ig = int(np.where(ns == 1)[0][0])
    ts = np.asarray(d["thickness_nm"], float)
    t = ts[foil]
    z0 = t / 2
    perfect = np.isnan(x)
    # a dissociated dislocation: parallel lines at the same depth (x offsets, g.b each)
    cores = [(c["x"], c["gb"]) for c in d["cores"]] if d.get("cores") else [(0.0, d["gb"])]
    xx = np.where(perfect, 1.0, x)

    def defect(z):
        """exp(2 pi i n g.R(z)) for every beam n, by powers of one exponential."""
        r = sum(gR(d["kind"], gb, d["nu"], xx - c, z - z0) for c, gb in cores)
        r = np.where(perfect, 0.0, r)
        e = np.exp(2j * np.pi * r)
        pw = {0: np.ones_like(e)}
        for m in range(1, int(np.abs(ns).max()) + 1):
            pw[m] = pw[m - 1] * e
            pw[-m] = np.conj(pw[m])
        return np.stack([pw[int(n)] for n in ns], axis=1)

    def phase(z):
        return np.exp(2j * np.pi * s[None, :] * z[:, None]) * defect(z)

    k = int(np.ceil(ts.max() / h))
    if d.get("kinematical"):
        k += k % 2
        hr = t / k
        w = np.ones(k + 1)
        w[1:-1:2], w[2:-1:2] = 4, 2
        acc = np.zeros(len(x), complex)
        for i in range(k + 1):
            acc += w[i] * phase(i * hr)[:, ig]
        amp = np.pi * 1j / d["xi"]["1"] * acc * hr / 3
        return np.abs(amp) ** 2
    hr = t / k
    C = coupling(d, ns)
    E = [expm(C, tk / k).T for tk in ts]  # phi rows times E^T
    # rows of one foil are contiguous (see profile): slices, not copies
    rows = [slice(int(np.searchsorted(foil, f)), int(np.searchsorted(foil, f, side="right"))) for f in range(len(ts))]
    phi = np.zeros((len(x), len(ns)), complex)
    phi[:, int(np.where(ns == 0)[0][0])] = 1
    # P = exp(2 pi i s_n z) exp(2 pi i n g.R), |P| = 1. Carried in the
    # interaction picture psi = conj(P) phi, one step is
    #   psi <- conj(P(z+h/2)) e^{hC} P(z+h/2) psi,
    # and |psi_n| = |phi_n| at the exit face. The first factor of P is
    # advanced by a constant factor per step.
    step = np.exp(2j * np.pi * s[None, :] * hr[:, None])
    sz = np.exp(2j * np.pi * s[None, :] * (hr / 2)[:, None])
    for i in range(k):
        pm = sz * defect((i + 0.5) * hr)
        q = phi * pm
        for f, rf in enumerate(rows):
            q[rf] = q[rf] @ E[f]
        phi = q * np.conj(pm)
        sz = sz * step
    return np.abs(phi[:, ig]) ** 2


def profile(d, h):
    """The g-beam intensity over the columns averaged over the foils, and
    the perfect crystal's, likewise averaged."""
    x = np.asarray(d["x_nm"], float)
    nf = len(d["thickness_nm"])
    # foil by foil: its columns, then a perfect-crystal column (NaN)
    xs = np.tile(np.append(x, np.nan), nf)
    foil = np.repeat(np.arange(nf), len(x) + 1)
    v = run(d, h, xs, foil).reshape(nf, len(x) + 1)
    return x, v[:, :-1].mean(axis=0), float(v[:, -1].mean())


def peak(x, df, bg):
    i = int(np.argmax(df))
    p = x[i]
    if 0 < i < len(df) - 1:
        a, b, c = df[i - 1], df[i], df[i + 1]
        p += (x[i + 1] - x[i]) * (a - c) / (2 * (a - 2 * b + c))
    half = bg + (df[i] - bg) / 2
    lo, hi = i, i
    while lo > 0 and df[lo] > half:
        lo -= 1
    while hi < len(df) - 1 and df[hi] > half:
        hi += 1
    # the half-maximum crossings, linearly interpolated
    def cross(j, k):
        return x[j] + (half - df[j]) * (x[k] - x[j]) / (df[k] - df[j])
    # None (JSON null) when the profile does not fall to half within the columns
    fw = float(cross(hi - 1, hi) - cross(lo, lo + 1)) if df[lo] <= half and df[hi] <= half else None
    return float(p), fw, float(df[i])


def one(d):
    """Runs at step h and h/2; Strang splitting is symmetric, its error
    even in h, so (4 I(h/2) - I(h))/3 (Richardson extrapolation) removes
    the h^2 term; the profile reported is that, with |I(h/2) - I(h)|/3,
    the error estimate of I(h/2), as the convergence."""
    h = d["h_nm"]
    x, df1, bg1 = profile(d, h)
    _, df2, bg2 = profile(d, h / 2)
    df = (4 * df2 - df1) / 3
    bg = (4 * bg2 - bg1) / 3
    p, fw, top = peak(x, df, bg)
    p2, fw2, _ = peak(x, df2, bg2)
    return {"df": df.tolist(), "background": bg, "peak_nm": p, "fwhm_nm": fw, "peak_df": top,
            "peak_half_step_nm": p2, "fwhm_half_step_nm": fw2,
            "max_change_half_step": float(np.max(np.abs(df2 - df1)) / 3)}


def main():
    json.dump([one(d) for d in json.load(sys.stdin)], sys.stdout)


if __name__ == "__main__":
    main()
