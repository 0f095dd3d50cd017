#!/usr/bin/python3
"""Reference table for dsp.WelchPSD: SciPy's welch with the same convention
(symmetric Hann window, no detrending, one-sided density in V²/Hz).

Run from the repository root:  /usr/bin/python3 testdata/dsp/gen_welch.py
Writes testdata/dsp/welch.json. The input is a closed-form sequence the Go
test rebuilds: x[i] = 0.8·sin(2π·0.05·i) + 0.3·cos(2π·0.173·i + 1) + 0.05·((i·7919) mod 101 − 50)/50 + 0.2.
"""
import json
import sys

import numpy as np
import scipy
from scipy import signal


def x_of(n):
    i = np.arange(n)
    return (0.8 * np.sin(2 * np.pi * 0.05 * i) + 0.3 * np.cos(2 * np.pi * 0.173 * i + 1)
            + 0.05 * (((i * 7919) % 101) - 50) / 50.0 + 0.2)


cases = []
for n, nseg, nover, fs in ((4096, 256, 128, 1000.0), (3000, 200, 0, 2500.0), (1024, 1024, 0, 1.0)):
    x = x_of(n)
    win = signal.windows.hann(nseg, sym=True)
    f, p = signal.welch(x, fs=fs, window=win, nperseg=nseg, noverlap=nover, detrend=False,
                        return_onesided=True, scaling="density")
    cases.append({"n": n, "segment": nseg, "overlap": nover, "fs_hz": fs,
                  "call": "signal.welch(x, fs=%g, window=signal.windows.hann(%d, sym=True), nperseg=%d, noverlap=%d, detrend=False, return_onesided=True, scaling='density')" % (fs, nseg, nseg, nover),
                  "freq_hz": f.tolist(), "psd": p.tolist()})

with open("testdata/dsp/welch.json", "w") as fh:
    json.dump({"generator": "testdata/dsp/gen_welch.py",
               "tool": "scipy %s, numpy %s, python %s" % (scipy.__version__, np.__version__, sys.version.split()[0]),
               "input": "x[i] = 0.8·sin(2π·0.05·i) + 0.3·cos(2π·0.173·i + 1) + 0.05·((i·7919) mod 101 − 50)/50 + 0.2",
               "cases": cases}, fh, indent=1)
    fh.write("\n")
