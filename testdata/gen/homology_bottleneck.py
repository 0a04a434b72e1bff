# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.
"""GUDHI reference bottleneck distances for package homology.

Run with the Debian interpreter from the repository root, after
homology_clouds.py (it reads testdata/homology/gudhi.json):

    /usr/bin/python3 testdata/gen/homology_bottleneck.py

Writes testdata/homology/bottleneck.json: pairs of barcodes (bars [birth,
death], death null = +inf) and gudhi.bottleneck_distance(a, b, e=0) (exact;
GUDHI matches infinite bars only with each other, +inf when their numbers
differ; stored as null). Pairs come from the GUDHI barcodes of the fixture
clouds and from random diagrams with a fixed seed, some on a coarse grid
so that many costs tie.
"""
import json

import gudhi
import numpy as np

OUT = "testdata/homology/bottleneck.json"


def arr(bars):
    return np.array([[b, np.inf if d is None else d] for b, d in bars]).reshape(-1, 2)


def rnd(g, n, grid):
    bars = []
    for _ in range(n):
        b = g.uniform(0, 2)
        d = None if g.uniform() < 0.1 else b + g.exponential(0.5)
        if grid:
            b = round(b * 10) / 10
            d = None if d is None else max(b + 0.1, round(d * 10) / 10)
        bars.append([b, d])
    return bars


def main():
    fx = {c["name"]: c["bars"] for c in json.load(open("testdata/homology/gudhi.json"))["cases"]}
    pairs = [
        ("torus150-H1/torus300_t1-H1", fx["torus150"][1], fx["torus300_t1"][1]),
        ("rp2_z2-H1/rp2_z3-H1", fx["rp2_z2"][1], fx["rp2_z3"][1]),
        ("sphere60-H0/sphere200_t-H0", fx["sphere60"][0], fx["sphere200_t"][0]),
        ("noisycircle200-H1/circle100-H1", fx["noisycircle200"][1], fx["circle100"][1]),
        ("digits150-H1/digits300_t-H1", fx["digits150"][1], fx["digits300_t"][1]),
        ("twocircles-H1/figure8-H1", fx["twocircles"][1], fx["figure8"][1]),
        ("cube250_t-H2/empty", fx["cube250_t"][2], []),
    ]
    g = np.random.default_rng(301)
    for i in range(24):
        grid = i % 2 == 1
        na, nb = int(g.integers(0, 25)), int(g.integers(0, 25))
        a, b = rnd(g, na, grid), rnd(g, nb, grid)
        if i % 3 == 0:  # same number of infinite bars, so the distance is finite
            a = [x for x in a if x[1] is not None]
            b = [x for x in b if x[1] is not None]
        pairs.append(("random%02d%s" % (i, "-grid" if grid else ""), a, b))
    out = []
    for name, a, b in pairs:
        d = float(gudhi.bottleneck_distance(arr(a), arr(b), 0))
        out.append({"name": name, "a": a, "b": b, "distance": None if np.isinf(d) else d})
    doc = {"versions": {"gudhi": gudhi.__version__, "numpy": np.__version__},
           "command": "/usr/bin/python3 testdata/gen/homology_bottleneck.py",
           "reference": "gudhi.bottleneck_distance(a, b, e=0)", "pairs": out}
    with open(OUT, "w") as f:
        json.dump(doc, f, indent=0)
        f.write("\n")
    print(len(out), "pairs;", sum(p["distance"] is None for p in out), "infinite")


if __name__ == "__main__":
    main()
