#!/usr/bin/env python3
"""The baseline a user would otherwise write: a straightforward vectorised
numpy RK4 of the two-beam Howie-Whelan equations (phase-factor form, with
anomalous absorption) over all columns at once, fixed step dz.

Scene: tests/testdata/bench_dislocation_inclusion.json (Cu, 200 kV,
g = 200, B = [011], s = 0, t = 150 nm, an isotropic mixed dislocation
b = 1/2[101] along [111] through (0, 0, 75) nm and an Ashby-Brown inclusion
r0 = 8 nm, misfit 0.02 at (45, 40, 70) nm). The extinction distance and the
Poisson ratio are passed in (printed by `faultline reflections` and taken
from the Cu preset), so the only shared thing is the input.

Usage: /usr/bin/python3 rk4_numpy.py XI_G_NM NU N DZ OUT.npy
Writes the bright field (N x N, rows = y) and prints the time taken.
"""
import sys
import time

import numpy as np

xi, nu, n, dz, out = float(sys.argv[1]), float(sys.argv[2]), int(sys.argv[3]), float(sys.argv[4]), sys.argv[5]
a = 0.36149
t_nm = 150.0
ratio = 0.1
s = 0.0

# Image frame: x along g = [200], z along the beam [011], y = z x x.
ex = np.array([1.0, 0, 0])
ez = np.array([0, 1.0, 1.0]) / np.sqrt(2)
ey = np.cross(ez, ex)
rot = np.array([ex, ey, ez])
g = 2 / a  # |g_200|, 1/nm
b = rot @ (a / 2 * np.array([1.0, 0, 1.0]))
u = rot @ (np.array([1.0, 1, 1]) / np.sqrt(3))
bs = np.dot(b, u) * u
be = b - bs
bem = np.linalg.norm(be)
exd = be / bem
eyd = np.cross(u, exd)
# Cut of the angle in the half-plane of the line and the beam.
c1 = np.cross([0, 0, 1.0], u)
c1 /= np.linalg.norm(c1)
c2 = np.cross(u, c1)
at = np.array([0, 0, 75.0])
inc_at = np.array([45.0, 40, 70])
r0 = 8.0
eps = 0.02 * (1 + nu) / (3 * (1 - nu))

w = 200.0
xs = (np.arange(n) + 0.5 - n / 2) * w / n
X, Y = np.meshgrid(xs, xs)  # rows = y


def gR(z):
    d = np.stack([X - at[0], Y - at[1], np.full_like(X, z - at[2])], axis=-1)
    th = np.arctan2(d @ c1, -(d @ c2))
    x, y = d @ exd, d @ eyd
    r2 = x * x + y * y + 1e-12
    ux = bem / (2 * np.pi) * (th + x * y / (2 * (1 - nu) * r2))
    uy = -bem / (2 * np.pi) * ((1 - 2 * nu) / (4 * (1 - nu)) * np.log(r2) + (x * x - y * y) / (4 * (1 - nu) * r2))
    Rx = np.dot(bs, ex) * th / (2 * np.pi) + ux * exd[0] + uy * eyd[0]
    di = np.stack([X - inc_at[0], Y - inc_at[1], np.full_like(X, z - inc_at[2])], axis=-1)
    ri = np.sqrt((di ** 2).sum(-1))
    Rx += np.where(ri <= r0, eps * di[..., 0], eps * r0 ** 3 * di[..., 0] / ri ** 3)
    return g * Rx


q = 1j * np.pi / xi - np.pi * ratio / xi
mu = np.pi * ratio / xi


def deriv(z, T, S):
    e = np.exp(2j * np.pi * (s * z + gR(z)))
    return -mu * T + q * S * e, q * T / e - mu * S


start = time.time()
T = np.ones_like(X, dtype=complex)
S = np.zeros_like(X, dtype=complex)
steps = int(round(t_nm / dz))
h = t_nm / steps
for k in range(steps):
    z = k * h
    k1t, k1s = deriv(z, T, S)
    k2t, k2s = deriv(z + h / 2, T + h / 2 * k1t, S + h / 2 * k1s)
    k3t, k3s = deriv(z + h / 2, T + h / 2 * k2t, S + h / 2 * k2s)
    k4t, k4s = deriv(z + h, T + h * k3t, S + h * k3s)
    T = T + h / 6 * (k1t + 2 * k2t + 2 * k3t + k4t)
    S = S + h / 6 * (k1s + 2 * k2s + 2 * k3s + k4s)
elapsed = time.time() - start
np.save(out, np.abs(T) ** 2)
print(f"{n}x{n} columns, {steps} steps of {h:.3f} nm: {elapsed:.2f} s, {n * n * steps / elapsed / 1e6:.2f} M column-steps/s")
