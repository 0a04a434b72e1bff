# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.
"""Writes testdata/trace/rings.csv, the two-ring sample of the trace tests.

Run with the system interpreter (python 3.11, numpy 1.24.2):

    /usr/bin/python3 testdata/gen/trace_rings.py

Two classes of 24 points on circles of radius 1 centred at (3, 3) ("low")
and (3, 8) ("high"), at angles 2πk/24. The lower half of each circle
mirrors the upper half exactly (same cosine, negated sine), so projecting
onto the first coordinate sends point k and point 24 − k of a ring to one
point, and each point of one ring onto the points of the other ring with
the same cosine.
"""
import os
import platform

import numpy as np

M = 24
OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "trace", "rings.csv")


def main():
    rows = []
    for name, cy in (("low", 3.0), ("high", 8.0)):
        for k in range(M):
            j = min(k, M - k)
            th = 2 * np.pi * j / M
            c, s = np.cos(th), np.sin(th)
            if k > M // 2:
                s = -s
            rows.append((3.0 + c, cy + s, name))
    with open(OUT, "w") as fh:
        fh.write("# two rings of %d points; testdata/gen/trace_rings.py, python %s, numpy %s\n"
                 % (M, platform.python_version(), np.__version__))
        fh.write("x,y,ring\n")
        for x, y, name in rows:
            fh.write("%.17g,%.17g,%s\n" % (x, y, name))


if __name__ == "__main__":
    main()
