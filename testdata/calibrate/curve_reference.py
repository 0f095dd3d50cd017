#!/usr/bin/python3
"""Reference values for the calibrate package's polynomial depth curves.

Fits depth = polynomial(phase) by least squares with numpy.polyfit and
depth = a + b*phase + c*ln(vpp) with numpy.linalg.lstsq, and writes the
fitted values at a few phases to curve-reference.json, with the tool
versions. Run: /usr/bin/python3 testdata/calibrate/curve_reference.py
"""
import json, math, sys
import numpy, scipy

phase = [40.0, 66.5, 88.0, 112.4, 131.0, 138.0]
depth = [100.0, 78.9, 61.2, 40.6, 19.4, 12.0]
vpp = [1.17, 1.54, 1.85, 2.75, 4.0, 3.1]
at = [45.0, 75.0, 100.0, 125.0]

out = {"tool": "numpy %s, scipy %s, python %s" % (numpy.__version__, scipy.__version__, sys.version.split()[0]),
       "phase_deg": phase, "depth_pct": depth, "vpp": vpp, "eval_phase_deg": at, "fits": []}
for order in (1, 2, 3):
    c = numpy.polyfit(phase, depth, order)
    out["fits"].append({"call": "numpy.polyfit(phase, depth, %d)" % order, "order": order,
                        "values": [float(numpy.polyval(c, x)) for x in at],
                        "residuals": [float(d - numpy.polyval(c, x)) for x, d in zip(phase, depth)]})
A = numpy.column_stack([numpy.ones(len(phase)), phase, numpy.log(vpp)])
beta, *_ = numpy.linalg.lstsq(A, numpy.array(depth), rcond=None)
out["phase_amplitude"] = {"call": "numpy.linalg.lstsq([1, phase, ln vpp], depth)",
                          "eval_vpp": 2.0,
                          "values": [float(beta[0] + beta[1] * x + beta[2] * math.log(2.0)) for x in at]}
json.dump(out, open(sys.argv[1] if len(sys.argv) > 1 else "curve-reference.json", "w"), indent=1)
