# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.
"""The ReLU circle of TestReLUCircleBar and its GUDHI barcodes.

Run from the repository root with the Debian interpreter (Go on the PATH):

    /usr/bin/python3 testdata/gen/relu_circle_bars.py

Writes
  testdata/homology/relu_circle.csv   400 points in R^64: the ReLU image of
      a noisy circle, `go run testdata/gen/relu_circle.go -n 400` (run by
      this script; shortest round-trip decimals, read back as written)
  testdata/homology/relu_circle.json  GUDHI barcodes (H0, H1, Z/2) at the
      enclosing radius, below the death of the circle's bar and just above
      it, in the case format of gudhi.json, plus the long bar, the simplices
      that create and kill it, and the same scales in float32 arithmetic

Why: on the 3000-point cloud of bench/homology.sh (relu_circle.go's
defaults) crease reports the circle as one long H1 bar, and a Ripser run at
its default threshold (the enclosing radius) was reported to show none,
while Ripser at explicit thresholds below and above the death showed it.
Ripser computes in float (value_t); "float32" records the enclosing radius
and the death as Ripser's arithmetic gives them (float coordinates, float
differences, squares summed in order, float square root), to show that the
bar dies well inside the default threshold whatever the precision (and at
the enclosing radius the complex is a cone: every H1 class has died). What
differs is time: Ripser prints the H1 bars in decreasing order of birth as
it reduces their columns and spends nearly all its run on this bar's one
column (see TestReLUCircleBar), so a run stopped at a time limit lacks it. The reference is GUDHI's
RipsComplex, a third implementation.

Conventions are those of homology_clouds.py: filtration = longest edge;
bars with death - birth <= 0 dropped; a null death is +inf; enclosing
cases give GUDHI max_edge_length = radius * (1 + 1e-6) and the Go side its
default threshold (0); truncated cases sit in the middle of the widest gap
between pairwise distances near the target, gap recorded.
"""
import hashlib
import json
import os
import subprocess
import sys

import gudhi
import numpy as np

OUT = "testdata/homology"
GEN = ["go", "run", "testdata/gen/relu_circle.go", "-n", "400", "-dim", "64", "-noise", "0.05", "-seed", "1"]


def versions():
    go = subprocess.run(["go", "env", "GOVERSION"], capture_output=True, text=True, check=True).stdout.strip()
    return {"gudhi": gudhi.__version__, "numpy": np.__version__,
            "python": sys.version.split()[0], "go": go}


def pdist(x):
    d = x[:, None, :] - x[None, :, :]
    return np.sqrt((d * d).sum(axis=2))


def pdist32(x):
    """Distances as Ripser's value_t = float arithmetic gives them."""
    x = x.astype(np.float32)
    n, dim = x.shape
    s = np.zeros((n, n), dtype=np.float32)
    for k in range(dim):  # squares summed in coordinate order, in float
        t = x[:, None, k] - x[None, :, k]
        s = s + t * t
    return np.sqrt(s)


def gap_threshold(d, lo, hi):
    """Middle of the widest gap between consecutive distinct pairwise
    distances in [lo, hi], and its width."""
    v = np.unique(d[np.triu_indices(len(d), 1)])
    w = v[(v >= lo) & (v <= hi)]
    k = int(np.argmax(np.diff(w)))
    return float((w[k] + w[k + 1]) / 2), float(w[k + 1] - w[k])


def bars_of(st, maxdim):
    out = []
    for dim in range(maxdim + 1):
        bars = []
        for b, e in st.persistence_intervals_in_dimension(dim):
            b, e = float(b), float(e)
            if e - b <= 0:
                continue
            bars.append([b, None if np.isinf(e) else e])
        bars.sort(key=lambda t: (t[0], float("inf") if t[1] is None else t[1]))
        out.append(bars)
    return out


def rips(x, T, maxdim=1):
    st = gudhi.RipsComplex(points=x, max_edge_length=T).create_simplex_tree(max_dimension=maxdim + 1)
    st.persistence(homology_coeff_field=2, min_persistence=0)
    return st


def main():
    csv = os.path.join(OUT, "relu_circle.csv")
    with open(csv, "w") as f:
        subprocess.run(GEN, stdout=f, check=True)
    raw = open(csv, "rb").read()
    x = np.loadtxt(csv, delimiter=",", ndmin=2)
    d = pdist(x)
    enc = float(d.max(axis=1).min())
    diam = float(d.max())

    st = rips(x, enc * (1 + 1e-6))
    enc_bars = bars_of(st, 1)
    # The circle: the longest H1 bar, with the simplices that create and kill it.
    pairs = [(b, k) for b, k in st.persistence_pairs() if len(b) == 2 and len(k) == 3]
    birth_edge, death_tri = max(pairs, key=lambda p: st.filtration(p[1]) - st.filtration(p[0]))
    birth, death = st.filtration(birth_edge), st.filtration(death_tri)
    longest = max((e - b for b, e in enc_bars[1]), default=0)
    assert abs((death - birth) - longest) < 1e-12, "pairs and intervals disagree"
    second = sorted(e - b for b, e in enc_bars[1])[-2]

    d32 = pdist32(x)
    enc32 = float(d32.max(axis=1).min())
    i, j, k = death_tri
    death32 = float(max(d32[i, j], d32[i, k], d32[j, k]))
    birth32 = float(d32[birth_edge[0], birth_edge[1]])

    cases = [{"name": "enclosing", "mode": "enclosing", "threshold": 0.0,
              "gudhi_max_edge_length": enc * (1 + 1e-6), "bars": enc_bars,
              "simplices": st.num_simplices(),
              "note": "the default threshold of crease and Ripser"}]
    # Ripser was run at 6.0 (below the death 8.07) and 8.1 (just above):
    # the same fractions of this cloud's death.
    for name, lo, hi, note in [
            ("below_death", 0.74 * death, 0.75 * death, "the bar is alive at the threshold: death +inf"),
            ("above_death", 1.003 * death, 1.005 * death, "just above the death: the bar ends")]:
        T, gap = gap_threshold(d, lo, hi)
        s = rips(x, T)
        cases.append({"name": name, "mode": "truncated", "threshold": T, "threshold_gap": gap,
                      "gudhi_max_edge_length": T, "bars": bars_of(s, 1),
                      "simplices": s.num_simplices(), "note": note})
    for c in cases:
        c.update({"file": "relu_circle.csv", "points": len(x), "dim": x.shape[1],
                  "maxdim": 1, "field": 2, "enclosing_radius": enc})
        print("%-12s T=%.9g bars=%s simplices=%d" % (c["name"], c["gudhi_max_edge_length"],
              [len(b) for b in c["bars"]], c["simplices"]), file=sys.stderr)

    fix = {
        "versions": versions(),
        "command": "/usr/bin/python3 testdata/gen/relu_circle_bars.py",
        "cloud": {"file": "relu_circle.csv", "generator": " ".join(GEN),
                  "sha256": hashlib.sha256(raw).hexdigest()},
        "reference": "gudhi.RipsComplex(points, max_edge_length).create_simplex_tree(max_dimension=2)"
                     ".persistence(homology_coeff_field=2, min_persistence=0)",
        "diameter": diam,
        "enclosing_radius": enc,
        "circle": {"birth": birth, "death": death, "birth_edge": sorted(int(v) for v in birth_edge),
                   "death_triangle": sorted(int(v) for v in death_tri),
                   "second_longest_h1": second},
        "float32": {"enclosing_radius": enc32, "birth": birth32, "death": death32,
                    "note": "Ripser's value_t arithmetic: float coordinates and differences, "
                            "squares summed in order, float sqrt"},
        "cases": cases,
    }
    with open(os.path.join(OUT, "relu_circle.json"), "w") as f:
        json.dump(fix, f, indent=1)
        f.write("\n")
    print("circle [%.9g, %.9g), enclosing radius %.9g (float32: death %.9g, radius %.9g), "
          "second longest H1 %.3g" % (birth, death, enc, death32, enc32, second), file=sys.stderr)


if __name__ == "__main__":
    main()
