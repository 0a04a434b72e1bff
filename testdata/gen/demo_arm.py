#!/usr/bin/python3
# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.

"""Generate the embedded demo of crease: a planar two-joint arm near an obstacle.

Run from the repository root with Debian's interpreter:

    /usr/bin/python3 testdata/gen/demo_arm.py

It writes into cmd/crease/internal/demo/data/:

    arm.csv              the labeled demo sample (header cos1,sin1,cos2,sin2,class)
    arm.json             scenario parameters, per-class region topology, versions
    arm_wide.onnx        a well-sized classifier 4->16->16->3 with softmax
    arm_wide.onnx.json   its training record (versions, accuracy, seed)
    arm_narrow.onnx      a classifier with a 2-unit first layer 4->2->16->3 with softmax
    arm_narrow.onnx.json its training record

The scenario.  A planar arm with two revolute joints: link 1 (length L1) turns
about the base at the origin by the angle t1, link 2 (length L2) turns about the
elbow by the angle t2 relative to link 1.  Its configuration space is the torus
S^1 x S^1 of the two joint angles (standard in robotics, e.g. K. M. Lynch and
F. C. Park, Modern Robotics: Mechanics, Planning, and Control, Cambridge
University Press, 2017, chapter 2).  A configuration is encoded as
(cos t1, sin t1, cos t2, sin t2), which embeds the torus in R^4 as the product
of two unit circles.  A disc-shaped obstacle sits in the workspace.  The
clearance of a configuration is the smallest distance from the obstacle's
centre to either link (each a line segment) minus the obstacle's radius.  The
classes are

    contact  clearance <= 0
    near     0 < clearance <= DELTA
    clear    clearance > DELTA

The obstacle is within reach of link 1, so every configuration whose first
link crosses the obstacle is in contact whatever the elbow does: "contact" is
a band around the torus (beta = (1, 1)), "near" is the two bands on either
side of it (beta = (2, 2)), and "clear" is the remaining band (beta = (1, 1)).
The script checks these numbers on a fine grid with the Euler-Poincare formula
(beta0 - beta1 + beta2 = V - E + F for the cubical complex of the grid cells in
the class; e.g. A. Hatcher, Algebraic Topology, 2002, Theorem 2.44) and a
flood fill for beta0, and records them in arm.json.  As a second, independent
reference it records GUDHI's Vietoris-Rips Betti numbers of each class of the
demo sample at a few scales (fractions of the class's diameter).
"""

import json
import math
import os
import sys

import numpy as np
import torch
import torch.nn as nn

L1, L2 = 1.0, 0.7                   # link lengths
OBSTACLE_DIST = 0.9                 # distance of the obstacle's centre from the base
OBSTACLE_ANGLE = math.pi / 4        # direction of the obstacle's centre
OBSTACLE_R = 0.3                    # obstacle radius
DELTA = 0.5                         # "near" margin (a slow-down zone)
CLASSES = ["clear", "near", "contact"]
PER_CLASS = 300                     # demo sample: points per class
CANDIDATES = 6000                   # uniform candidates per class before farthest-point selection
TRAIN_N = 30000                     # training configurations (uniform on the torus)
SEED = 20260501
OUT = os.path.join("cmd", "crease", "internal", "demo", "data")


def seg_dist(a, b, c):
    """Distance from point c to the segments a->b (arrays ...x2)."""
    ab = b - a
    t = np.clip(((c - a) * ab).sum(-1) / (ab * ab).sum(-1), 0.0, 1.0)
    p = a + t[..., None] * ab
    return np.linalg.norm(p - c, axis=-1)


def clearance(t1, t2):
    c = np.array([OBSTACLE_DIST * math.cos(OBSTACLE_ANGLE), OBSTACLE_DIST * math.sin(OBSTACLE_ANGLE)])
    base = np.zeros(t1.shape + (2,))
    elbow = np.stack([L1 * np.cos(t1), L1 * np.sin(t1)], -1)
    tip = elbow + np.stack([L2 * np.cos(t1 + t2), L2 * np.sin(t1 + t2)], -1)
    return np.minimum(seg_dist(base, elbow, c), seg_dist(elbow, tip, c)) - OBSTACLE_R


def classify(t1, t2):
    d = clearance(t1, t2)
    y = np.zeros(d.shape, dtype=np.int64)   # clear
    y[(d > 0) & (d <= DELTA)] = 1           # near
    y[d <= 0] = 2                           # contact
    return y


def encode(t1, t2):
    return np.stack([np.cos(t1), np.sin(t1), np.cos(t2), np.sin(t2)], -1)


def grid_betti(mask):
    """Betti numbers of the union of closed grid squares on the periodic grid."""
    n, m = mask.shape
    verts = np.zeros_like(mask)
    for di in (0, 1):
        for dj in (0, 1):
            verts |= np.roll(np.roll(mask, di, 0), dj, 1)
    edges_a = mask | np.roll(mask, 1, 0)
    edges_b = mask | np.roll(mask, 1, 1)
    chi = int(verts.sum()) - int(edges_a.sum()) - int(edges_b.sum()) + int(mask.sum())
    # Closed squares touching at a corner are connected: 8-neighbourhood.
    label = -np.ones(mask.shape, dtype=np.int64)
    comps = 0
    for i in range(n):
        for j in range(m):
            if mask[i, j] and label[i, j] < 0:
                stack = [(i, j)]
                label[i, j] = comps
                while stack:
                    a, b = stack.pop()
                    for da in (-1, 0, 1):
                        for db in (-1, 0, 1):
                            x, y = (a + da) % n, (b + db) % m
                            if mask[x, y] and label[x, y] < 0:
                                label[x, y] = comps
                                stack.append((x, y))
                comps += 1
    b2 = 1 if mask.all() else 0
    return [comps, comps + b2 - chi, b2]


def maxmin(points, m, first):
    """Greedy farthest-point selection of m rows of points, starting at row first."""
    chosen = [first]
    d = np.linalg.norm(points - points[first], axis=1)
    for _ in range(m - 1):
        i = int(d.argmax())
        chosen.append(i)
        d = np.minimum(d, np.linalg.norm(points - points[i], axis=1))
    return np.array(chosen)


def sample_classes(rng):
    """PER_CLASS configurations of each class.

    Candidates are drawn uniformly on the torus (CANDIDATES per class, by
    rejection); PER_CLASS of them are then picked by greedy farthest-point
    selection in the R^4 encoding, so the sample covers each class region
    evenly (a random first point keeps it seeded).
    """
    got = {k: [] for k in range(3)}
    while min(len(v) for v in got.values()) < CANDIDATES:
        t = rng.uniform(0, 2 * math.pi, size=(50000, 2))
        y = classify(t[:, 0], t[:, 1])
        for k in range(3):
            need = CANDIDATES - len(got[k])
            if need > 0:
                got[k].extend(t[y == k][:need].tolist())
    ts, ys = [], []
    for k in range(3):
        cand = np.array(got[k])
        idx = maxmin(encode(cand[:, 0], cand[:, 1]), PER_CLASS, int(rng.integers(CANDIDATES)))
        ts.append(cand[idx])
        ys.extend([k] * PER_CLASS)
    return np.concatenate(ts), np.array(ys)


def gudhi_betti(points, fracs):
    try:
        import gudhi
    except ImportError:
        return None, None
    from scipy.spatial.distance import pdist
    diam = float(pdist(points).max())
    out = {}
    for f in fracs:
        eps = f * diam
        st = gudhi.RipsComplex(points=points, max_edge_length=eps).create_simplex_tree(max_dimension=2)
        st.compute_persistence(homology_coeff_field=2, persistence_dim_max=True)
        b = st.betti_numbers()
        out["%.2f" % f] = [int(b[0]) if len(b) > 0 else 0, int(b[1]) if len(b) > 1 else 0]
    return out, gudhi.__version__


def gudhi_persistent(points, fracs):
    """Numbers of H0 and H1 bars longer than fraction x diameter.

    The filtration stops at half the diameter (bars alive there count as
    long); every fraction asked for is well below that.
    """
    import gudhi
    from scipy.spatial.distance import pdist
    diam = float(pdist(points).max())
    st = gudhi.RipsComplex(points=points, max_edge_length=0.5 * diam).create_simplex_tree(max_dimension=2)
    st.compute_persistence(homology_coeff_field=2, persistence_dim_max=True)
    out = {}
    for f in fracs:
        cnt = [0, 0]
        for dim, (b, d) in st.persistence():
            if dim < 2 and d - b > f * diam:
                cnt[dim] += 1
        out["%.2f" % f] = cnt
    return out


def train(hidden1, rng_seed, x, y, epochs):
    torch.manual_seed(rng_seed)
    net = nn.Sequential(
        nn.Linear(4, hidden1), nn.ReLU(),
        nn.Linear(hidden1, 16), nn.ReLU(),
        nn.Linear(16, 3),
    )
    xt = torch.tensor(x, dtype=torch.float32)
    yt = torch.tensor(y, dtype=torch.int64)
    # Class weights balance the rare classes (contact and near are ~20% together).
    counts = np.bincount(y, minlength=3).astype(np.float64)
    w = torch.tensor(counts.sum() / (3 * counts), dtype=torch.float32)
    loss_fn = nn.CrossEntropyLoss(weight=w)
    opt = torch.optim.Adam(net.parameters(), lr=0.01)
    sched = torch.optim.lr_scheduler.StepLR(opt, step_size=epochs // 3, gamma=0.3)
    g = torch.Generator().manual_seed(rng_seed)
    for _ in range(epochs):
        perm = torch.randperm(len(xt), generator=g)
        for i in range(0, len(xt), 500):
            idx = perm[i:i + 500]
            opt.zero_grad()
            loss = loss_fn(net(xt[idx]), yt[idx])
            loss.backward()
            opt.step()
        sched.step()
    return net


def accuracy(net, x, y):
    with torch.no_grad():
        p = net(torch.tensor(x, dtype=torch.float32)).argmax(1).numpy()
    per = [float((p[y == k] == k).mean()) for k in range(3)]
    return float((p == y).mean()), per


def export(net, path):
    model = nn.Sequential(*net, nn.Softmax(dim=1)).eval()
    dummy = torch.zeros(1, 4, dtype=torch.float32)
    torch.onnx.export(model, dummy, path, opset_version=13,
                      input_names=["config"], output_names=["probs"],
                      dynamic_axes={"config": {0: "batch"}, "probs": {0: "batch"}})


def main():
    os.makedirs(OUT, exist_ok=True)
    rng = np.random.default_rng(SEED)
    versions = {"python": sys.version.split()[0], "torch": torch.__version__, "numpy": np.__version__}

    # Ground-truth topology of each class region on a fine grid.
    n = 720
    g = (np.arange(n) + 0.5) / n * 2 * math.pi
    T1, T2 = np.meshgrid(g, g, indexing="ij")
    yg = classify(T1, T2)
    region = {CLASSES[k]: grid_betti(yg == k) for k in range(3)}
    share = {CLASSES[k]: float((yg == k).mean()) for k in range(3)}

    # Demo sample.
    ts, ys = sample_classes(rng)
    xs = encode(ts[:, 0], ts[:, 1])
    with open(os.path.join(OUT, "arm.csv"), "w") as f:
        f.write("# crease demo sample: planar two-joint arm, configurations (cos t1, sin t1, cos t2, sin t2)\n")
        f.write("# generated by testdata/gen/demo_arm.py with python %s, numpy %s, torch %s; seed %d\n"
                % (versions["python"], versions["numpy"], versions["torch"], SEED))
        f.write("cos1,sin1,cos2,sin2,class\n")
        for p, k in zip(xs, ys):
            f.write("%s,%s,%s,%s,%s\n" % (repr(float(p[0])), repr(float(p[1])), repr(float(p[2])), repr(float(p[3])), CLASSES[k]))

    rips, pers, gver = {}, {}, None
    for k in range(3):
        b, gver = gudhi_betti(xs[ys == k], [0.10, 0.15, 0.20])
        rips[CLASSES[k]] = b
        pers[CLASSES[k]] = gudhi_persistent(xs[ys == k], [0.05, 0.10, 0.20])

    meta = {
        "scenario": "planar two-joint arm, configuration space the torus of joint angles",
        "link_lengths": [L1, L2],
        "obstacle": {"center": [OBSTACLE_DIST * math.cos(OBSTACLE_ANGLE), OBSTACLE_DIST * math.sin(OBSTACLE_ANGLE)],
                     "radius": OBSTACLE_R},
        "near_margin": DELTA,
        "classes": CLASSES,
        "per_class": PER_CLASS,
        "seed": SEED,
        "region_betti": region,
        "region_betti_method": "cubical complex of a %dx%d periodic grid: flood fill (beta0) and Euler-Poincare (beta1)" % (n, n),
        "region_share": share,
        "sample_rips_betti": rips,
        "sample_rips_betti_method": "gudhi %s RipsComplex at max_edge_length = fraction x class diameter, Z/2" % gver,
        "sample_persistent_bars": pers,
        "sample_persistent_bars_method": "gudhi %s RipsComplex, filtration up to half the class diameter, Z/2: number of H0/H1 bars with death - birth > fraction x class diameter (the essential H0 bar counts)" % gver,
        "versions": dict(versions, gudhi=gver),
    }
    with open(os.path.join(OUT, "arm.json"), "w") as f:
        json.dump(meta, f, indent=1, sort_keys=True)
        f.write("\n")

    # Training set: uniform configurations, disjoint from the demo sample's draws.
    tt = rng.uniform(0, 2 * math.pi, size=(TRAIN_N, 2))
    xt, yt = encode(tt[:, 0], tt[:, 1]), classify(tt[:, 0], tt[:, 1])
    for name, h1, epochs in (("arm_wide", 16, 120), ("arm_narrow", 2, 120)):
        net = train(h1, SEED + h1, xt, yt, epochs)
        acc_train, per_train = accuracy(net, xt, yt)
        acc_demo, per_demo = accuracy(net, xs, ys)
        path = os.path.join(OUT, name + ".onnx")
        export(net, path)
        rec = {
            "model": name + ".onnx",
            "architecture": "4-%d-16-3 ReLU MLP, softmax output" % h1,
            "layers": [4, h1, 16, 3],
            "opset": 13,
            "dtype": "float32",
            "train_size": TRAIN_N,
            "epochs": epochs,
            "optimizer": "Adam lr 0.01, step decay x0.3 every %d epochs, batch 500, class-weighted cross-entropy" % (epochs // 3),
            "seed": SEED + h1,
            "accuracy_train": acc_train,
            "accuracy_train_per_class": dict(zip(CLASSES, per_train)),
            "accuracy_demo_sample": acc_demo,
            "accuracy_demo_per_class": dict(zip(CLASSES, per_demo)),
            "versions": versions,
        }
        with open(path + ".json", "w") as f:
            json.dump(rec, f, indent=1, sort_keys=True)
            f.write("\n")
        print(name, "train acc %.4f demo acc %.4f" % (acc_train, acc_demo), per_demo)
    print("region betti", region)
    print("rips betti", rips)
    print("persistent bars", pers)


if __name__ == "__main__":
    main()
