# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.
"""Point clouds and GUDHI reference barcodes for package homology.

Run with the Debian interpreter from the repository root:

    /usr/bin/python3 testdata/gen/homology_clouds.py

Writes
  testdata/homology/<name>.csv      small clouds for the GUDHI comparison
  testdata/homology/gudhi.json      reference barcodes (GUDHI RipsComplex)
  testdata/homology/bench/<name>.csv  the benchmark clouds (no reference)

Every cloud comes from a fixed seed. Coordinates are written with %.17g, so
Go parses exactly the doubles GUDHI saw.

Reference convention (the same as package homology):
  * filtration value of a simplex = its longest edge (Euclidean length);
  * RipsComplex(points=P, max_edge_length=T) keeps edges of length <= T;
    create_simplex_tree(max_dimension=maxdim+1); persistence with
    homology_coeff_field=p, min_persistence=0, which keeps only bars with
    death - birth > 0 (zero-length bars are dropped, as in the Go engine);
  * bars alive at T have death +inf (stored as null in JSON).
"enclosing" cases: the Go side uses its default threshold (the enclosing
radius, min over points of the max distance); GUDHI gets T = that radius
times (1 + 1e-6): at and above the enclosing radius every Rips complex is a
cone, so the barcode is the same for every T >= radius and no edge sits at
the cut. "truncated" cases: T is the midpoint of a gap between consecutive
pairwise distances (gap recorded), so rounding cannot move an edge across T.
"""
import json
import os
import sys

import gudhi
import numpy as np
import sklearn
from sklearn.datasets import load_digits

VERSIONS = {
    "gudhi": gudhi.__version__,
    "numpy": np.__version__,
    "sklearn": sklearn.__version__,
    "python": sys.version.split()[0],
}
COMMAND = "/usr/bin/python3 testdata/gen/homology_clouds.py"
OUT = "testdata/homology"


def torus(n, R, r, seed):
    """n points of the torus of radii R, r in R^3, uniform angles."""
    g = np.random.default_rng(seed)
    u = g.uniform(0, 2 * np.pi, n)
    v = g.uniform(0, 2 * np.pi, n)
    return np.stack([(R + r * np.cos(v)) * np.cos(u),
                     (R + r * np.cos(v)) * np.sin(u),
                     r * np.sin(v)], axis=1)


def sphere(n, dim, seed):
    """n points uniform on the unit sphere S^(dim-1) in R^dim."""
    g = np.random.default_rng(seed)
    x = g.standard_normal((n, dim))
    return x / np.linalg.norm(x, axis=1, keepdims=True)


def circle(n, noise, seed, centre=(0.0, 0.0), radius=1.0):
    g = np.random.default_rng(seed)
    a = g.uniform(0, 2 * np.pi, n)
    x = np.stack([centre[0] + radius * np.cos(a),
                  centre[1] + radius * np.sin(a)], axis=1)
    return x + noise * g.standard_normal((n, 2))


def clusters(n, dim, c, seed, spread=1.0, sep=6.0):
    """n points from c Gaussian clusters in R^dim with centres sep apart."""
    g = np.random.default_rng(seed)
    centres = sep * np.eye(c, dim)
    lab = np.arange(n) % c
    return centres[lab] + spread * g.standard_normal((n, dim))


def veronese(n, seed):
    """n points of RP^2 embedded in R^6 by x -> (x_i x_j) of unit x."""
    x = sphere(n, 3, seed)
    s = np.sqrt(2.0)
    return np.stack([x[:, 0]**2, x[:, 1]**2, x[:, 2]**2,
                     s * x[:, 0] * x[:, 1], s * x[:, 0] * x[:, 2],
                     s * x[:, 1] * x[:, 2]], axis=1)


def pdist(x):
    d = x[:, None, :] - x[None, :, :]
    return np.sqrt((d * d).sum(axis=2))


def enclosing(x):
    return float(pdist(x).max(axis=1).min())


def gap_threshold(x, target):
    """Midpoint of the widest gap between consecutive distinct pairwise
    distances in [0.95 target, 1.05 target]."""
    d = pdist(x)
    v = np.unique(d[np.triu_indices(len(x), 1)])
    lo = np.searchsorted(v, 0.95 * target)
    hi = np.searchsorted(v, 1.05 * target)
    lo = max(lo - 1, 0)
    hi = min(hi + 1, len(v))
    w = v[lo:hi]
    k = int(np.argmax(np.diff(w)))
    return float((w[k] + w[k + 1]) / 2), float(w[k + 1] - w[k])


def write_csv(path, x):
    with open(path, "w") as f:
        for row in x:
            f.write(",".join("%.17g" % v for v in row))
            f.write("\n")


def gudhi_bars(x, T, maxdim, field):
    rc = gudhi.RipsComplex(points=x, max_edge_length=T)
    st = rc.create_simplex_tree(max_dimension=maxdim + 1)
    st.persistence(homology_coeff_field=field, min_persistence=0)
    out = []
    for d in range(maxdim + 1):
        iv = st.persistence_intervals_in_dimension(d)
        bars = []
        for b, e in iv:
            b, e = float(b), float(e)
            if e - b <= 0:
                continue  # same convention as the engine (GUDHI drops them too)
            bars.append([b, None if np.isinf(e) else e])
        bars.sort(key=lambda t: (t[0], float("inf") if t[1] is None else t[1]))
        out.append(bars)
    return out, st.num_simplices()


def case(name, x, maxdim, mode, target=None, field=2, note="", file=None):
    x = np.ascontiguousarray(x, dtype=float)
    file = file or name + ".csv"
    # Re-read the coordinates as printed so GUDHI sees the CSV's doubles.
    write_csv(os.path.join(OUT, file), x)
    x = np.loadtxt(os.path.join(OUT, file), delimiter=",", ndmin=2)
    enc = enclosing(x)
    c = {"name": name, "file": file, "points": len(x),
         "dim": x.shape[1], "maxdim": maxdim, "field": field,
         "mode": mode, "enclosing_radius": enc, "note": note}
    if mode == "enclosing":
        T = enc * (1 + 1e-6)
        c["threshold"] = 0.0
    else:
        T, gap = gap_threshold(x, target)
        c["threshold"] = T
        c["threshold_gap"] = gap
    c["gudhi_max_edge_length"] = T
    c["bars"], c["simplices"] = gudhi_bars(x, T, maxdim, field)
    print("%-16s n=%4d d=%2d maxdim=%d p=%d T=%.6g simplices=%d bars=%s" % (
        name, len(x), x.shape[1], maxdim, field, T, c["simplices"],
        [len(b) for b in c["bars"]]), file=sys.stderr)
    return c


def fixtures():
    cs = []
    cs.append(case("torus150", torus(150, 2, 1, 101), 1, "enclosing",
                   note="torus R=2 r=1 in R^3"))
    cs.append(case("torus300_t1", torus(300, 2, 1, 102), 1, "truncated", 1.0,
                   note="torus R=2 r=1, truncated near 1.0"))
    cs.append(case("torus200_h2", torus(200, 2, 1, 103), 2, "truncated", 1.2,
                   note="torus R=2 r=1, H<=2, truncated near 1.2"))
    cs.append(case("clusters16", clusters(200, 16, 3, 104), 1, "enclosing",
                   note="3 Gaussian clusters in R^16"))
    cs.append(case("gauss64", np.random.default_rng(105).standard_normal((120, 64)),
                   1, "enclosing", note="standard Gaussian cloud in R^64"))
    cs.append(case("sphere60", sphere(60, 3, 106), 2, "enclosing",
                   note="S^2, H<=2 untruncated"))
    cs.append(case("sphere200_t", sphere(200, 3, 107), 2, "truncated", 0.7,
                   note="S^2, H<=2, truncated near 0.7"))
    cs.append(case("circle100", circle(100, 0.0, 108), 1, "enclosing",
                   note="unit circle"))
    cs.append(case("noisycircle200", circle(200, 0.1, 109), 1, "enclosing",
                   note="unit circle + N(0, 0.1^2) noise"))
    cs.append(case("twocircles", np.vstack([circle(100, 0.02, 110),
                                            circle(100, 0.02, 111, centre=(3, 0), radius=0.8)]),
                   1, "enclosing", note="two disjoint noisy circles"))
    cs.append(case("figure8", np.vstack([circle(100, 0.02, 112, centre=(-1, 0)),
                                         circle(100, 0.02, 113, centre=(1, 0))]),
                   1, "enclosing", note="wedge of two circles touching at the origin"))
    cs.append(case("cube250_t", np.random.default_rng(114).uniform(0, 1, (250, 3)),
                   2, "truncated", 0.3, note="uniform unit cube, H<=2, truncated near 0.3"))
    dg = load_digits().data.astype(float)
    cs.append(case("digits150", dg[:150], 1, "enclosing",
                   note="first 150 UCI digits (sklearn load_digits), raw pixels, R^64"))
    cs.append(case("digits300_t", dg[150:450], 1, "truncated", 30.0,
                   note="UCI digits 150..449, raw pixels, truncated near 30"))
    # Integer lattice with every point twice plus a few triples: many
    # equal edge lengths (1, sqrt 2, ...) and zero-length edges.
    g = np.stack(np.meshgrid(np.arange(4), np.arange(4), np.arange(2), indexing="ij"),
                 axis=-1).reshape(-1, 3).astype(float)
    dup = np.vstack([g, g, g[:5]])
    dup = dup[np.random.default_rng(115).permutation(len(dup))]
    cs.append(case("lattice_dups", dup, 2, "enclosing",
                   note="4x4x2 integer lattice, each point twice, 5 three times (ties)"))
    cs.append(case("hexagon_ring", np.vstack([
        [[np.cos(k * np.pi / 3), np.sin(k * np.pi / 3)] for k in range(6)]]),
        2, "enclosing", note="regular hexagon of side 1 (exact ties)"))
    rp = veronese(70, 116)
    cs.append(case("rp2_z2", rp, 2, "truncated", 1.0, field=2, file="rp2.csv",
                   note="RP^2 (Veronese in R^6), Z/2"))
    cs.append(case("rp2_z3", rp, 2, "truncated", 1.0, field=3, file="rp2.csv",
                   note="same cloud as rp2_z2, Z/3"))
    return cs


def bench():
    b = os.path.join(OUT, "bench")
    os.makedirs(b, exist_ok=True)
    write_csv(os.path.join(b, "torus2000.csv"), torus(2000, 2, 1, 201))
    write_csv(os.path.join(b, "clusters1500_r16.csv"), clusters(1500, 16, 3, 202))
    write_csv(os.path.join(b, "digits1797.csv"), load_digits().data.astype(float))
    write_csv(os.path.join(b, "noisycircle1000.csv"), circle(1000, 0.1, 203))
    write_csv(os.path.join(b, "sphere600.csv"), sphere(600, 3, 204))


def main():
    os.makedirs(OUT, exist_ok=True)
    bench()
    cs = fixtures()
    doc = {"versions": VERSIONS, "command": COMMAND,
           "reference": "gudhi.RipsComplex(points, max_edge_length).create_simplex_tree("
                        "max_dimension=maxdim+1).persistence(homology_coeff_field=field, "
                        "min_persistence=0)",
           "conventions": "filtration = longest Euclidean edge; bars with death-birth <= 0 "
                          "dropped; death null = +inf (essential or alive at the threshold); "
                          "threshold 0 = enclosing radius on the Go side",
           "cases": cs}
    with open(os.path.join(OUT, "gudhi.json"), "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
