# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.
"""Writes the reference fixtures of package trace/overlap.

Run on Debian 12 with the system interpreter (python3-sklearn 1.2.1,
python3-numpy 1.24.2):

    /usr/bin/python3 testdata/gen/overlap_fixtures.py

Each output file testdata/overlap/<name>.json holds the sample (x, labels),
the fold assignment used for the linear probe, the library versions, and
the reference values computed here with scikit-learn and numpy. go test
only reads these files; it never runs Python.

The fold assignment is a port of overlap.Folds (keep in sync with
trace/overlap/probe.go): within each class, members are ordered by a
SplitMix64 key of (seed, index), classes are concatenated in index order,
and the p-th point of that list goes to fold p mod k.
"""

import json
import os
import platform
import sys

import numpy as np
import sklearn
from sklearn.datasets import load_digits, make_blobs
from sklearn.decomposition import PCA
from sklearn.linear_model import LogisticRegression
from sklearn.metrics import silhouette_score
from sklearn.model_selection import LeaveOneOut, cross_val_predict
from sklearn.neighbors import KNeighborsClassifier
from sklearn.pipeline import make_pipeline
from sklearn.preprocessing import StandardScaler

OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "overlap")
MASK = (1 << 64) - 1
KS = [1, 5, 10]
FOLDS = 5
SEED = 1
PROBE_C = 1.0


def splitmix64(x):
    x = (x + 0x9E3779B97F4A7C15) & MASK
    z = x
    z = ((z ^ (z >> 30)) * 0xBF58476D1CE4E5B9) & MASK
    z = ((z ^ (z >> 27)) * 0x94D049BB133111EB) & MASK
    return z ^ (z >> 31)


def folds(labels, k, seed):
    """Port of overlap.Folds."""
    s = splitmix64(seed & MASK)
    n = len(labels)
    classes = max(labels) + 1
    order = []
    for c in range(classes):
        members = [i for i in range(n) if labels[i] == c]
        members.sort(key=lambda i: (splitmix64(s ^ i), i))
        order.extend(members)
    f = [0] * n
    for p, i in enumerate(order):
        f[i] = p % k
    return f


def knn_reference(x, y, k):
    """LOO k-NN accuracy from scikit-learn, plus the mean fraction of the
    k nearest other points sharing the label (numpy, ties by index)."""
    clf = KNeighborsClassifier(n_neighbors=k, algorithm="brute")
    pred = cross_val_predict(clf, x, y, cv=LeaveOneOut())
    acc = float(np.mean(pred == y))
    # numpy: exact squared distances (x - y)·(x - y), self excluded.
    d2 = ((x[:, None, :] - x[None, :, :]) ** 2).sum(-1)
    np.fill_diagonal(d2, np.inf)
    idx = np.argsort(d2, axis=1, kind="stable")[:, :k]
    share = float(np.mean(y[idx] == y[:, None]))
    # Points whose k-th and (k+1)-th neighbour distances tie: there the
    # neighbour set, and maybe the vote, depends on tie order.
    srt = np.take_along_axis(d2, np.argsort(d2, axis=1, kind="stable"), 1)
    tied = int(np.sum(srt[:, k - 1] == srt[:, k]))
    return {"k": k, "loo_accuracy": acc, "mean_share": share,
            "boundary_ties": tied}


def fisher(x, y):
    mu = x.mean(0)
    sw = 0.0
    sb = 0.0
    for c in np.unique(y):
        xc = x[y == c]
        mc = xc.mean(0)
        sw += ((xc - mc) ** 2).sum()
        sb += len(xc) * ((mc - mu) ** 2).sum()
    return sb / sw


def nc1(x, y):
    """tr(Σ_W Σ_B⁺)/C after Papyan, Han and Donoho (PNAS 2020); Σ_B⁺ from
    numpy's symmetric eigendecomposition, eigenvalues at or below
    d·λ_max·ε treated as zero."""
    classes = np.unique(y)
    n, d = x.shape
    mu = x.mean(0)
    sw = np.zeros((d, d))
    sb = np.zeros((d, d))
    for c in classes:
        xc = x[y == c]
        mc = xc.mean(0)
        r = xc - mc
        sw += r.T @ r
        m = (mc - mu)[:, None]
        sb += m @ m.T
    sw /= n
    sb /= len(classes)
    w, v = np.linalg.eigh(sb)
    tol = d * w.max() * np.finfo(float).eps
    keep = w > tol
    pinv = (v[:, keep] / w[keep]) @ v[:, keep].T
    return float(np.trace(sw @ pinv) / len(classes)), int(keep.sum())


def margin(x, y):
    d = np.sqrt(((x[:, None, :] - x[None, :, :]) ** 2).sum(-1))
    same = y[:, None] == y[None, :]
    cross = d[~same].min()
    dd = d.copy()
    dd[~same] = np.inf
    np.fill_diagonal(dd, np.inf)
    within = dd.min(1)
    within = within[np.isfinite(within)]
    return float(cross), float(within.mean()), float(cross / within.mean())


def probe(x, y, f):
    pred = np.empty_like(y)
    per = []
    for k in range(FOLDS):
        te = np.array(f) == k
        clf = make_pipeline(StandardScaler(), LogisticRegression(
            C=PROBE_C, multi_class="multinomial", solver="lbfgs",
            max_iter=20000, tol=1e-10))
        clf.fit(x[~te], y[~te])
        pred[te] = clf.predict(x[te])
        per.append(float(np.mean(pred[te] == y[te])))
    return {"c": PROBE_C, "folds": FOLDS, "seed": SEED,
            "accuracy": float(np.mean(pred == y)), "fold_accuracy": per}


def voronoi(p, y):
    classes = int(y.max()) + 1
    top = np.sort(p, axis=1)
    gap = top[:, -1] - top[:, -2]
    own = p[np.arange(len(y)), y]
    other = p.copy()
    other[np.arange(len(y)), y] = -np.inf
    inside = own > other.max(1)
    return {
        "inside": [float(inside[y == c].mean()) for c in range(classes)],
        "inside_all": float(inside.mean()),
        "gap_mean": [float(gap[y == c].mean()) for c in range(classes)],
        "gap_median": [float(np.median(gap[y == c])) for c in range(classes)],
    }


def reference(name, x, y, extra=None):
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=int)
    f = folds(list(y), FOLDS, SEED)
    pca = PCA(svd_solver="full").fit(x)
    cross, within, ratio = margin(x, y)
    nc, rank = nc1(x, y)
    doc = {
        "generator": "testdata/gen/overlap_fixtures.py",
        "versions": {"python": platform.python_version(),
                     "numpy": np.__version__, "sklearn": sklearn.__version__},
        "name": name,
        "labels": y.tolist(),
        "x": [[float(v) if not float(v).is_integer() else int(v) for v in row]
              for row in x],
        "folds": f,
        "knn": [knn_reference(x, y, k) for k in KS],
        "silhouette": float(silhouette_score(x, y, metric="euclidean")),
        "pca_ratio": pca.explained_variance_ratio_.tolist(),
        "pca_dim90": int(PCA(n_components=0.90, svd_solver="full").fit(x).n_components_),
        "pca_dim95": int(PCA(n_components=0.95, svd_solver="full").fit(x).n_components_),
        "fisher": float(fisher(x, y)),
        "nc1": nc, "nc1_rank": rank,
        "margin": {"cross": cross, "within_mean": within, "ratio": ratio},
        "probe": probe(x, y, f),
    }
    if extra:
        doc.update(extra)
    path = os.path.join(OUT, name + ".json")
    with open(path, "w") as fh:
        json.dump(doc, fh, separators=(",", ":"))
        fh.write("\n")
    print(path, os.path.getsize(path), "bytes", file=sys.stderr)


def main():
    os.makedirs(OUT, exist_ok=True)
    # UCI 8×8 handwritten digits as scikit-learn ships them, all 1797 rows.
    dig = load_digits()
    reference("digits", dig.data, dig.target)
    # Overlapping Gaussian blobs: continuous values, no distance ties.
    xb, yb = make_blobs(n_samples=300, centers=3, n_features=5,
                        cluster_std=2.5, random_state=0)
    reference("blobs", xb, yb)
    # Softmax of nearest-centre scores −‖x − centre‖²/(2σ²) of four
    # overlapping blobs: probability rows, argmax not always the label.
    xs, ys, centres = make_blobs(n_samples=200, centers=4, n_features=6,
                                 cluster_std=3.0, random_state=1,
                                 return_centers=True)
    z = -((xs[:, None, :] - centres[None, :, :]) ** 2).sum(-1) / (2 * 9.0)
    z -= z.max(1, keepdims=True)
    p = np.exp(z)
    p /= p.sum(1, keepdims=True)
    reference("softmax", p, ys, {"voronoi": voronoi(p, ys)})


if __name__ == "__main__":
    main()
