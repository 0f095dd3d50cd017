#!/usr/bin/python3
"""Reference table of the Dodd–Deeds planar model (L0 and ΔZ) with mpmath.

Independent of the Go code in method: the coil integral χ(α) is taken from
the hypergeometric form F(x) = ∫0^x tJ1(t)dt = (x³/6)·1F2(3/2; 5/2, 2; −x²/4)
(term-by-term integration of the series of J1, DLMF 10.2.2), evaluated by
mpmath.hyp1f2 at 25 digits (cross-checked in the script against the Struve
form (πx/2)[J1H0 − J0H1], A&S 11.1.7); the reflection coefficient is the original Dodd & Deeds (1968)
two-conductor form generalised by the transfer-matrix product (growing
exponentials, affordable at 30 digits), not the Go code's decaying
recursion; the α-integral uses 24-point Gauss–Legendre panels of width
π/r2 (graded geometrically down to π/(2^16 r2) near α = 0), out to min(70/z1, 800/r2), plus, at zero lift-off, the tail of
the mean of χ², ∫_A^∞ α(r1+r2)/π ·(...) dα, by mpmath.quad.

Run:  /usr/bin/python3 testdata/impedance/gen_planar.py > testdata/impedance/planar_ref.txt
Time dependence e^{+jωt}; ΔZ = Z(with conductor) − Z(air).
"""
import sys
import mpmath as mp

mp.mp.dps = 25
MU0 = 4e-7 * mp.pi  # the Go code uses CODATA μ0; the difference (≈1e-10 relative) is far below the table's 1e-6 use

COILS = {
    # name: r1, r2, l, N  (metres)
    "T15": (6.15e-3, 12.4e-3, 6.15e-3, 3790),
    "C9": (3.015e-3, 5.46e-3, 2.94e-3, 900),
    "P2": (1.0e-3, 1.5e-3, 0.5e-3, 50),
    "R0": (0.0, 2.0e-3, 1.0e-3, 30),
}
INF = float("inf")
# name, coil, z1, f, layers [(thickness, sigma, mur)]
CASES = [
    ("T15 half-space 100 Hz", "T15", 0.88e-3, 100, [(INF, 30.6e6, 1)]),
    ("T15 half-space 900 Hz", "T15", 0.88e-3, 900, [(INF, 30.6e6, 1)]),
    ("T15 half-space 10 kHz", "T15", 0.88e-3, 1e4, [(INF, 30.6e6, 1)]),
    ("T15 half-space 100 kHz", "T15", 0.88e-3, 1e5, [(INF, 30.6e6, 1)]),
    ("T15 plate 12.22 mm 900 Hz", "T15", 0.88e-3, 900, [(12.22e-3, 30.6e6, 1)]),
    ("T15 plate 1 mm 100 Hz", "T15", 0.88e-3, 100, [(1e-3, 30.6e6, 1)]),
    ("T15 two-layer 10 kHz", "T15", 0.88e-3, 1e4, [(0.2e-3, 5e6, 1), (INF, 30.6e6, 1)]),
    ("T15 three-layer plate 3 kHz", "T15", 0.5e-3, 3e3, [(0.3e-3, 58e6, 1), (1e-3, 1.4e6, 1), (2e-3, 20e6, 1)]),
    ("T15 magnetic steel 1 kHz", "T15", 0.88e-3, 1e3, [(INF, 6e6, 100)]),
    ("T15 magnetic coat on Al 5 kHz", "T15", 1.0e-3, 5e3, [(0.1e-3, 10e6, 50), (INF, 30.6e6, 1)]),
    ("T15 zero lift-off 900 Hz", "T15", 0.0, 900, [(INF, 30.6e6, 1)]),
    ("T15 lift-off 5 mm 900 Hz", "T15", 5e-3, 900, [(INF, 30.6e6, 1)]),
    ("C9 half-space 1 kHz", "C9", 1.32e-3, 1e3, [(INF, 16.45e6, 1)]),
    ("C9 half-space 10 kHz", "C9", 1.32e-3, 1e4, [(INF, 16.45e6, 1)]),
    ("C9 half-space 100 kHz", "C9", 1.32e-3, 1e5, [(INF, 16.45e6, 1)]),
    ("P2 Ti plate 1 MHz", "P2", 0.1e-3, 1e6, [(0.5e-3, 1.8e6, 1)]),
    ("P2 zero lift-off steel 200 kHz", "P2", 0.0, 2e5, [(INF, 5e6, 60)]),
    ("R0 half-space 500 kHz", "R0", 0.2e-3, 5e5, [(INF, 1e6, 1)]),
]


def F(x):
    if x == 0:
        return mp.mpf(0)
    return x ** 3 / 6 * mp.hyp1f2(1.5, 2.5, 2, -x * x / 4)


def F_struve(x):
    return mp.pi * x / 2 * (mp.besselj(1, x) * mp.struveh(0, x) - mp.besselj(0, x) * mp.struveh(1, x))


for _x in (mp.mpf("0.7"), mp.mpf(13), mp.mpf(420)):
    assert abs(F(_x) - F_struve(_x)) < mp.mpf(10) ** -18 * max(1, abs(F(_x))), _x


def phi(alpha, omega, layers):
    """Reflection coefficient by the 2×2 transfer-matrix product.

    In layer i, A = a_i e^{α_i z} + b_i e^{−α_i z}; continuity of A and
    (1/μ)∂A/∂z at each interface. φ = b_0/a_0 in air above, with no
    upward-growing wave in the bottom medium.
    """
    # media: air, layers..., bottom (air if the last layer is finite)
    media = [(mp.mpf(0), mp.mpf(1))]
    thick = []
    for t, s, mu in layers:
        media.append((mp.mpf(s), mp.mpf(mu)))
        thick.append(t)
    if thick[-1] != INF:
        media.append((mp.mpf(0), mp.mpf(1)))
    al = [mp.sqrt(alpha ** 2 + 1j * omega * MU0 * mu * s) for s, mu in media]
    be = [al[i] / media[i][1] for i in range(len(media))]
    # Interfaces at z = 0, −c1, −c1−c2, ...
    zs = [mp.mpf(0)]
    for t in thick[:-1] if thick[-1] == INF else thick:
        zs.append(zs[-1] - t)
    # Start in the bottom medium with (a, b) = (1, 0) (decaying downwards:
    # e^{α z} → 0 as z → −∞) and carry upwards.
    a, b = mp.mpc(1), mp.mpc(0)
    for k in range(len(media) - 1, 0, -1):
        z = zs[k - 1]
        # values at z in medium k
        A = a * mp.exp(al[k] * z) + b * mp.exp(-al[k] * z)
        D = be[k] * (a * mp.exp(al[k] * z) - b * mp.exp(-al[k] * z))
        # medium k-1: solve a' e^{α z} + b' e^{−α z} = A, β(a' e − b' e^-) = D
        up = al[k - 1]
        ep, em = mp.exp(up * z), mp.exp(-up * z)
        a = (A + D / be[k - 1]) / (2 * ep)
        b = (A - D / be[k - 1]) / (2 * em)
    return b / a


def gl_nodes(n):
    xs, ws = [], []
    # Gauss–Legendre nodes by Newton on P_n (mpmath precision)
    for i in range(1, n + 1):
        x = mp.cos(mp.pi * (i - mp.mpf(1) / 4) / (n + mp.mpf(1) / 2))
        for _ in range(100):
            p0, p1 = mp.mpf(1), x
            for k in range(2, n + 1):
                p0, p1 = p1, ((2 * k - 1) * x * p1 - (k - 1) * p0) / k
            dp = n * (x * p1 - p0) / (x * x - 1)
            dx = p1 / dp
            x -= dx
            if abs(dx) < mp.mpf(10) ** (-mp.mp.dps + 2):
                break
        xs.append(x)
        ws.append(2 / ((1 - x * x) * dp * dp))
    return xs, ws


GX, GW = gl_nodes(24)


def coil_nodes(r1, r2, amax):
    h = mp.pi / r2
    nodes = []
    # Geometric grading towards α = 0 resolves the narrow low-α feature of
    # thin plates at low frequency (φ turns from −1 at α ≈ ωμ0σc/2).
    edges = [mp.mpf(0)] + [h / 2 ** k for k in range(16, 0, -1)]
    a = h
    while a < amax + h:
        edges.append(a)
        a += h
    for a, b in zip(edges[:-1], edges[1:]):
        for x, w in zip(GX, GW):
            al = (a + b) / 2 + (b - a) / 2 * x
            chi = F(al * r2) - F(al * r1)
            nodes.append((al, (b - a) / 2 * w, chi * chi))
    return nodes, edges[-1]


def main():
    out = sys.stdout
    out.write("# Dodd–Deeds planar model reference values (L0 and ΔZ), e^{+jωt}, SI units.\n")
    out.write("# Generated by testdata/impedance/gen_planar.py with mpmath %s at %d digits (python %s).\n"
              % (mp.__version__, mp.mp.dps, sys.version.split()[0]))
    out.write("# μ0 = 4π×1e-7 H/m. Layers: thickness:sigma:mur separated by ';', thickness inf = half-space.\n")
    out.write("# case|r1|r2|l|N|z1|f|layers|L0_H|dZ_re|dZ_im\n")
    for cname, (r1, r2, l, N) in COILS.items():
        cases = [c for c in CASES if c[1] == cname]
        zmin = min(c[2] for c in cases)
        # L0 needs the long range always.
        amaxL = mp.mpf(800) / r2
        nodes, A = coil_nodes(mp.mpf(r1), mp.mpf(r2), amaxL)
        scale = mp.pi * MU0 * N ** 2 / (mp.mpf(l) ** 2 * (mp.mpf(r2) - r1) ** 2)
        meanc = (mp.mpf(r1) + r2) / mp.pi
        lL = mp.mpf(l)
        sL = mp.fsum(w * c2 / al ** 6 * 2 * (al * lL + mp.expm1(-al * lL)) for al, w, c2 in nodes)
        sL += mp.quad(lambda a: meanc * a / a ** 6 * 2 * (a * lL + mp.expm1(-a * lL)), [A, mp.inf])
        L0 = scale * sL
        for name, _, z1, f, layers in cases:
            om = 2 * mp.pi * f
            z1m = mp.mpf(z1)

            def g(al, c2):
                return c2 / al ** 6 * mp.exp(-2 * al * z1m) * mp.expm1(-al * lL) ** 2 * phi(al, om, layers)
            amax = A if z1 == 0 else mp.mpf(70) / z1m
            s = mp.fsum(w * g(al, c2) for al, w, c2 in nodes if al < amax)
            if z1 == 0:
                s += mp.quad(lambda a: g(a, meanc * a), [A, 10 * A, mp.inf])
            dz = 1j * om * scale * s
            lay = ";".join("%s:%s:%s" % ("inf" if t == INF else repr(t), repr(sg), repr(mu)) for t, sg, mu in layers)
            out.write("%s|%r|%r|%r|%r|%r|%r|%s|%s|%s|%s\n" % (
                name, r1, r2, l, N, z1, float(f), lay,
                mp.nstr(L0, 16), mp.nstr(dz.real, 16), mp.nstr(dz.imag, 16)))
            out.flush()


if __name__ == "__main__":
    main()
