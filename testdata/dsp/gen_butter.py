#!/usr/bin/python3
"""Reference tables for the dsp package's Butterworth designs and zero-phase filter.

Run with Debian's interpreter from the repository root:

    /usr/bin/python3 testdata/dsp/gen_butter.py

Writes testdata/dsp/butter_sos.json and testdata/dsp/sosfiltfilt.json.
The test inputs are closed-form sequences that the Go tests rebuild
themselves (see the "input" description in each case).
"""
import json
import sys

import numpy as np
import scipy
from scipy import signal

HEADER = {
    "generator": "testdata/dsp/gen_butter.py",
    "tool": "scipy %s, numpy %s, python %s" % (scipy.__version__, np.__version__, sys.version.split()[0]),
}


def butter_cases():
    cases = []
    fs = 1000.0
    for order in range(1, 9):
        for fc in (10.0, 123.0, 400.0):
            sos = signal.butter(order, fc, btype="lowpass", fs=fs, output="sos")
            cases.append({"kind": "lowpass", "order": order, "low_hz": fc, "high_hz": 0, "fs_hz": fs,
                          "call": "signal.butter(%d, %g, btype='lowpass', fs=%g, output='sos')" % (order, fc, fs),
                          "sos": sos.tolist()})
        for fc in (5.0, 250.0):
            sos = signal.butter(order, fc, btype="highpass", fs=fs, output="sos")
            cases.append({"kind": "highpass", "order": order, "low_hz": fc, "high_hz": 0, "fs_hz": fs,
                          "call": "signal.butter(%d, %g, btype='highpass', fs=%g, output='sos')" % (order, fc, fs),
                          "sos": sos.tolist()})
    # Band-pass: compared on the frequency response (section pairing of the
    # zeros is a free choice), so store |H| and arg H on a grid.
    bp = []
    for order in (1, 2, 3, 4, 6):
        lo, hi = 40.0, 160.0
        sos = signal.butter(order, [lo, hi], btype="bandpass", fs=fs, output="sos")
        freqs = np.array([1.0, 20.0, 40.0, 60.0, 80.0, 100.0, 140.0, 160.0, 200.0, 300.0, 450.0])
        w, h = signal.sosfreqz(sos, worN=freqs, fs=fs)
        bp.append({"order": order, "low_hz": lo, "high_hz": hi, "fs_hz": fs,
                   "call": "signal.sosfreqz(signal.butter(%d, [%g, %g], btype='bandpass', fs=%g, output='sos'), worN=freqs, fs=%g)" % (order, lo, hi, fs, fs),
                   "freq_hz": freqs.tolist(), "re": h.real.tolist(), "im": h.imag.tolist()})
    return cases, bp


def test_input(n):
    """x[i] = sin(2π·0.01·i) + 0.5·cos(2π·0.23·i + 0.3) + 0.002·i + 0.7 (real part)
    and 0.3·cos(2π·0.003·i) − 0.001·i (imaginary part)."""
    i = np.arange(n, dtype=float)
    re = np.sin(2 * np.pi * 0.01 * i) + 0.5 * np.cos(2 * np.pi * 0.23 * i + 0.3) + 0.002 * i + 0.7
    im = 0.3 * np.cos(2 * np.pi * 0.003 * i) - 0.001 * i
    return re + 1j * im


def filtfilt_cases():
    out = []
    for order, fc, kind, n in ((4, 50.0, "lowpass", 400), (3, 20.0, "lowpass", 300), (2, 100.0, "highpass", 200), (5, 150.0, "lowpass", 64)):
        fs = 1000.0
        sos = signal.butter(order, fc, btype=kind, fs=fs, output="sos")
        x = test_input(n)
        y = signal.sosfiltfilt(sos, x)
        out.append({"kind": kind, "order": order, "cutoff_hz": fc, "fs_hz": fs, "n": n,
                    "input": "x[i] = sin(2π·0.01·i) + 0.5·cos(2π·0.23·i + 0.3) + 0.002·i + 0.7 + j(0.3·cos(2π·0.003·i) − 0.001·i)",
                    "call": "signal.sosfiltfilt(signal.butter(%d, %g, btype='%s', fs=%g, output='sos'), x)  # padtype='odd', padlen default" % (order, fc, kind, fs),
                    "re": y.real.tolist(), "im": y.imag.tolist()})
    return out


def main():
    lp, bp = butter_cases()
    with open("testdata/dsp/butter_sos.json", "w") as f:
        json.dump(dict(HEADER, cases=lp, bandpass=bp), f, indent=1)
        f.write("\n")
    with open("testdata/dsp/sosfiltfilt.json", "w") as f:
        json.dump(dict(HEADER, cases=filtfilt_cases()), f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
