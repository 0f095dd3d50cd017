#!/usr/bin/python3
"""SciPy reference implementation of one Dodd–Deeds ΔZ evaluation, for the
speed comparison with the Go PlanarModel (bench/results/impedance-model.md).

Same integral as impedance.PlanarModel.Impedance (Dodd & Deeds 1968; MODEL.md
§1.4): ΔZ = K ∫ χ²/α⁶ e^{−2αz1}(1 − e^{−αl})² φ(α) dα with the Struve form of
χ (scipy.special.struve) and the cancellation-free half-space coefficient,
integrated by scipy.integrate.quad (QUADPACK QAG) on [0, 40/z1] with
epsrel = 1e-9 for the real and imaginary parts. Case: T15 coil, 0.88 mm
lift-off, half-space 30.6 MS/m, 900 Hz.

Run:  /usr/bin/python3 bench/impedance_quad.py [--go]
With --go it also runs the Go benchmark BenchmarkPlanarModelImpedance in
the same session and prints the speed ratio.
"""
import math
import re
import subprocess
import sys
import time

import numpy as np
import scipy
from scipy import integrate, special

MU0 = 4e-7 * math.pi
r1, r2, l, N = 6.15e-3, 12.4e-3, 6.15e-3, 3790
z1, f, sigma = 0.88e-3, 900.0, 30.6e6
REF = complex(120.6144247, -267.6632223)  # MODEL.md §3.3 (mpmath and SciPy)


def F(x):
    return math.pi * x / 2 * (special.j1(x) * special.struve(0, x) - special.j0(x) * special.struve(1, x))


def dz():
    om = 2 * math.pi * f
    k2 = om * MU0 * sigma

    def phi(a):
        a1 = np.sqrt(complex(a * a, k2))
        return complex(0, -k2) / (a + a1) ** 2

    def g(a):
        if a == 0:
            return 0j
        c = F(a * r2) - F(a * r1)
        return c * c / a ** 6 * math.exp(-2 * a * z1) * (-math.expm1(-a * l)) ** 2 * phi(a)

    A = 40 / z1
    re_, _ = integrate.quad(lambda a: g(a).real, 0, A, limit=4000, epsabs=0, epsrel=1e-9)
    im_, _ = integrate.quad(lambda a: g(a).imag, 0, A, limit=4000, epsabs=0, epsrel=1e-9)
    K = complex(0, om * math.pi * MU0 * N * N / (l * l * (r2 - r1) ** 2))
    return K * complex(re_, im_)


def main():
    v = dz()
    reps = 5
    t0, c0 = time.perf_counter(), time.process_time()
    for _ in range(reps):
        v = dz()
    t = (time.perf_counter() - t0) / reps
    cpu = (time.process_time() - c0) / reps
    err = abs(v - REF) / abs(REF)
    print("scipy %s, numpy %s, python %s" % (scipy.__version__, np.__version__, sys.version.split()[0]))
    print("SciPy quad ΔZ = %.10f %+.10fj Ω, rel. diff. from reference %.2e" % (v.real, v.imag, err))
    print("SciPy quad time per ΔZ: %.1f µs wall, %.1f µs CPU" % (t * 1e6, cpu * 1e6))
    if "--go" in sys.argv:
        out = subprocess.run(["go", "test", "-run", "^$", "-bench", "BenchmarkPlanarModelImpedance$",
                              "-benchtime", "2s", "./impedance"], capture_output=True, text=True, check=True).stdout
        m = re.search(r"BenchmarkPlanarModelImpedance\S*\s+\d+\s+([\d.]+) ns/op", out)
        print(out.strip())
        if m:
            ns = float(m.group(1))
            print("Go PlanarModel time per ΔZ: %.1f µs; SciPy/Go ratio: %.0f×" % (ns / 1e3, t * 1e9 / ns))


if __name__ == "__main__":
    main()
