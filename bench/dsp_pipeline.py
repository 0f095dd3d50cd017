#!/usr/bin/python3
"""NumPy/SciPy version of the work measured by BenchmarkDemodulate10M in
whorl/dsp (dsp/bench_test.go), for comparison in bench/results/dsp.md.

Run with Debian's interpreter:  /usr/bin/python3 bench/dsp_pipeline.py

Work: a 10 s record at 1 MHz (10 million samples) holding tones at 400 kHz
(1 V, 0.3 rad) and 100 kHz (0.5 V, -1 rad); for each tone: mix to baseband
with e^{-jωn/fs}, B-spline (four boxcars of 50 samples) decimation by 50
(scipy.signal.upfirdn, polyphase), zero-phase 4th-order Butterworth at
400 Hz on the 20 kHz intermediate rate (scipy.signal.sosfiltfilt), and
every 10th sample (2 kHz out): the same algorithm as dsp.Demodulate.
Also timed: the straightforward SciPy pipeline (sosfiltfilt at the full
1 MHz rate, then decimation) and a NumPy memory copy of the record.
Each is timed best of 3 with time.perf_counter.
"""
import platform
import sys
import time

import numpy as np
import scipy
from scipy import signal

FS = 1e6
N = 10_000_000
TONES = ((400e3, 1.0, 0.3), (100e3, 0.5, -1.0))
D1, D2, OUT = 50, 10, 2000.0
LP = OUT / 5


def record():
    n = np.arange(N, dtype=float)
    v = np.zeros(N)
    for f, a, ph in TONES:
        v += a * np.cos(2 * np.pi * f / FS * n + ph)
    return v


def bspline(d1, k=4):
    h = np.ones(1)
    for _ in range(k):
        h = np.convolve(h, np.ones(d1))
    return 2 * h / d1 ** k


H = bspline(D1)
SOS1 = signal.butter(4, LP, fs=FS / D1, output="sos")
SOSFULL = signal.butter(4, LP, fs=FS, output="sos")


def demod_same_algorithm(v):
    n = np.arange(len(v), dtype=float)
    out = []
    for f, _, _ in TONES:
        u = v * np.exp(-1j * 2 * np.pi * f / FS * n)
        y1 = signal.upfirdn(H, u, down=D1)
        # upfirdn output k is centred on input k*D1 - (len(H)-1)/2; keep
        # the outputs whose kernel lies wholly inside the record.
        first = int(np.ceil((len(H) - 1) / D1))
        m1 = (len(v) - len(H)) // D1 + 1
        y1 = y1[first:first + m1]
        y2 = signal.sosfiltfilt(SOS1, y1)
        out.append(y2[::D2])
    return out


def demod_full_rate(v):
    n = np.arange(len(v), dtype=float)
    out = []
    for f, _, _ in TONES:
        u = v * np.exp(-1j * 2 * np.pi * f / FS * n)
        y = 2 * signal.sosfiltfilt(SOSFULL, u)
        out.append(y[::int(FS / OUT)])
    return out


def best_of(fn, *args, repeat=3):
    best, res = float("inf"), None
    for _ in range(repeat):
        t0 = time.perf_counter()
        res = fn(*args)
        best = min(best, time.perf_counter() - t0)
    return best, res


def main():
    v = record()
    dst = np.empty_like(v)
    t_copy, _ = best_of(np.copyto, dst, v)
    t_same, out = best_of(demod_same_algorithm, v)
    for (f, a, ph), z in zip(TONES, out):
        mid = z[len(z) // 4: 3 * len(z) // 4]
        err = np.max(np.abs(mid - a * np.exp(1j * ph))) / a
        print("check %g Hz: max relative error %.2e over the middle half" % (f, err))
    t_full, _ = best_of(demod_full_rate, v, repeat=1)
    print("python %s, numpy %s, scipy %s, %s" % (sys.version.split()[0], np.__version__, scipy.__version__, platform.machine()))
    print("memory copy (numpy.copyto, 10M float64): %.1f ms" % (1e3 * t_copy))
    print("same algorithm (upfirdn + sosfiltfilt), 2 tones: %.1f ms = %.2f Msamples/s" % (1e3 * t_same, N / t_same / 1e6))
    print("full-rate sosfiltfilt, 2 tones (once): %.1f ms = %.2f Msamples/s" % (1e3 * t_full, N / t_full / 1e6))


if __name__ == "__main__":
    main()
