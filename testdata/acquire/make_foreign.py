#!/usr/bin/python3
"""Write the invented foreign-layout export used by the acquire tests.

The layout is our own invention for testing column maps: a four-line
preamble, a header row, a units row, semicolon delimiter, decimal comma,
millivolts and millimetres, columns in an order unlike Whorl's, a constant
tube column and no time column in SI. Run: /usr/bin/python3 make_foreign.py
"""
import math

rows = []
n = 40
for i in range(n):
    pos_mm = 12.5 + 0.5 * i          # 0.5 mm axial step
    t_ms = 2.0 * i                   # 500 Hz sample rate
    u = (pos_mm - 22.0) / 2.0        # flaw centred at 22 mm
    bump = math.exp(-u * u)
    # differential: derivative-like, antisymmetric about the flaw
    d_x = -120.0 * u * bump
    d_y = 310.0 * u * bump
    a_x = 40.0 * bump + 1.25
    a_y = 95.0 * bump - 0.75
    rows.append((pos_mm, d_y, d_x, a_y, a_x, t_ms))

def dc(v, nd):
    return f"{v:.{nd}f}".replace(".", ",")

with open("R03C017_pull_20260314.csv", "w", newline="", encoding="utf-8") as f:
    f.write("\ufeff")  # byte-order mark, as some spreadsheet exports write
    f.write("Export;bench logger, invented layout for tests\r\n")
    f.write("Operator;QX-07\r\n")
    f.write("Date;14.03.2026 08:30\r\n")
    f.write("\r\n")
    f.write("Pos;CH2 quad;CH2 inph;CH1 quad;CH1 inph;Zeit;Tube\r\n")
    f.write("mm;mV;mV;mV;mV;ms;-\r\n")
    for r in rows:
        f.write(";".join([dc(r[0], 2), dc(r[1], 3), dc(r[2], 3), dc(r[3], 3), dc(r[4], 3), dc(r[5], 1), "R03C017"]) + "\r\n")
