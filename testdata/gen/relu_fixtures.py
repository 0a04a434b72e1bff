# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.
"""Reference values for package relu and internal/knn.

Run with the Debian interpreter from the repository root:

    /usr/bin/python3 testdata/gen/relu_fixtures.py

Writes testdata/relu/{rank,knn,stage}.json. Library versions are recorded
in each file. Floats are written with repr, which round-trips exactly.
"""
import json

import numpy as np
import sklearn
from sklearn.datasets import load_digits
from sklearn.neighbors import NearestNeighbors

VERSIONS = {"numpy": np.__version__, "sklearn": sklearn.__version__}
rng = np.random.default_rng(20261201)


def digits(n=300):
    d = load_digits()
    return d.data[:n].astype(float), d.target[:n].astype(int)


def write(name, obj):
    obj["versions"] = VERSIONS
    obj["generator"] = "testdata/gen/relu_fixtures.py"
    with open("testdata/relu/" + name, "w") as f:
        json.dump(obj, f, separators=(",", ":"))
        f.write("\n")


def rank_case(name, a, centred=False):
    m = a - a.mean(axis=0) if centred else a
    return {
        "name": name,
        "centred": centred,
        "rows": a.shape[0],
        "cols": a.shape[1],
        "data": a.ravel().tolist(),
        "singular": np.linalg.svd(m, compute_uv=False).tolist(),
        "rank": int(np.linalg.matrix_rank(m)),
    }


xd, yd = digits()
cases = [
    rank_case("gauss-5x3", rng.standard_normal((5, 3))),
    rank_case("gauss-3x7", rng.standard_normal((3, 7))),
    rank_case("product-rank2-6x4", rng.standard_normal((6, 2)) @ rng.standard_normal((2, 4))),
    rank_case("product-rank3-8x8", rng.standard_normal((8, 3)) @ rng.standard_normal((3, 8))),
    rank_case("graded-4x4", np.diag([1.0, 1e-3, 1e-9, 1e-17]) @ np.linalg.qr(rng.standard_normal((4, 4)))[0]),
    rank_case("digits-300x64-centred", xd, centred=True),
]
write("rank.json", {"cases": cases})

# k nearest neighbours, neighbours of each indexed point excluding itself.
knn_cases = []
for name, x, k in [("gauss-200x5", rng.standard_normal((200, 5)), 5), ("digits-300x64", xd, 5)]:
    nn = NearestNeighbors(n_neighbors=k, algorithm="brute").fit(x)
    dist, idx = nn.kneighbors()
    knn_cases.append({"name": name, "rows": x.shape[0], "cols": x.shape[1], "k": k,
                      "data": x.ravel().tolist(), "index": idx.ravel().tolist(),
                      "dist": dist.ravel().tolist()})
write("knn.json", {"cases": knn_cases})


def relu_stage(name, x, labels, w, b, tau, k):
    """A ReLU stage after an affine map: in = x, pre = x W^T + b, out = max(pre, 0)."""
    pre = x @ w.T + b
    out = np.maximum(pre, 0)
    n = x.shape[0]
    nn_in = NearestNeighbors(n_neighbors=1, algorithm="brute").fit(pre).kneighbors()[0][:, 0]
    nn_out = NearestNeighbors(n_neighbors=1, algorithm="brute").fit(out).kneighbors()[0][:, 0]
    s_in, s_out = float(np.median(nn_in)), float(np.median(nn_out))
    din = np.sqrt(((pre[:, None, :] - pre[None, :, :]) ** 2).sum(-1))
    dout = np.sqrt(((out[:, None, :] - out[None, :, :]) ** 2).sum(-1))
    iu = np.triu_indices(n, 1)
    glued = (din[iu] > tau * s_in) & (dout[iu] <= tau * s_out)
    same = labels[iu[0]] == labels[iu[1]]
    dk, ik = NearestNeighbors(n_neighbors=k, algorithm="brute").fit(pre).kneighbors()
    ratios = []
    for i in range(n):
        for q in range(k):
            if dk[i, q] > 0:
                ratios.append(dout[i, ik[i, q]] / dk[i, q])
    pats = (pre > 0)
    keys, counts = np.unique(pats, axis=0, return_counts=True)
    p = counts / n
    return {
        "name": name, "rows": n, "in": pre.shape[1], "labels": labels.tolist(),
        "pre": pre.ravel().tolist(), "post": out.ravel().tolist(),
        "tau": tau, "k": k, "scale_in": s_in, "scale_out": s_out,
        "glued_total": int(glued.sum()), "glued_within": int((glued & same).sum()),
        "glued_cross": int((glued & ~same).sum()),
        "distort_p10": float(np.percentile(ratios, 10)), "distort_median": float(np.percentile(ratios, 50)),
        "distort_p90": float(np.percentile(ratios, 90)), "distort_pairs": len(ratios),
        "patterns": int(len(keys)), "entropy_bits": float(-(p * np.log2(p)).sum()),
        "dead": np.where(~pats.any(axis=0))[0].tolist(), "always": np.where(pats.all(axis=0))[0].tolist(),
    }


stages = []
xg = rng.standard_normal((250, 6))
yg = (xg[:, 0] > 0).astype(int) + 2 * (xg[:, 1] > 0).astype(int)
wg = rng.standard_normal((8, 6))
bg = rng.standard_normal(8) - 1.0
wg[3] = 0
bg[3] = -1  # a dead unit
stages.append(relu_stage("gauss-250x6-to-8", xg, yg, wg, bg, 0.5, 5))
xs = xd / 16.0
wd = rng.standard_normal((12, 64)) * 0.3
bd = rng.standard_normal(12) * 0.5
stages.append(relu_stage("digits-300x64-to-12", xs, yd, wd, bd, 0.5, 5))
write("stage.json", {"cases": stages})
