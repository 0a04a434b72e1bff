#!/usr/bin/python3
# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.

"""Generate the data and models for crease's reproduction of a published finding.

Run from the repository root with Debian's interpreter:

    /usr/bin/python3 testdata/gen/betti_repro.py

The finding (G. Naitzat, A. Zhitnikov, L.-H. Lim, "Topology of deep neural
networks", Journal of Machine Learning Research 21(184), 2020): a network
trained to (near) zero training error on data whose classes have non-trivial
topology changes the topology of each class layer by layer until, at the
output, each class is topologically simple (one component, no holes); and
networks with ReLU activations reduce the Betti numbers faster than networks
of the same shape with tanh activations.

Our dataset (not the paper's): a chain of three rings in R^3.  Class "ends" is
two solid rings (tubes of radius TUBE around circles of radius 1) lying in the
xy-plane with centres at (-SHIFT, 0, 0) and (+SHIFT, 0, 0); class "link" is one
solid ring in the xz-plane centred at the origin that passes through the holes
of both.  So "ends" has beta = (2, 2) and "link" has beta = (1, 1), and the two
classes are linked: no continuous map that keeps them apart can be undone in
R^3.

Two networks of the same shape 3 -> 10 -> 10 -> 10 -> 10 -> 10 -> 10 -> 2, one
with ReLU and one with tanh after every hidden affine layer, are trained with
the same seed on the committed sample until every training point is classified
correctly.  The script writes into testdata/repro/:

    chain.csv          the sample (header x,y,z,class), which is also the training set
    chain.json         dataset parameters and versions
    relu.onnx, tanh.onnx            the trained networks (float32, opset 13, logits out)
    relu.onnx.json, tanh.onnx.json  training records: versions, epochs, accuracy
"""

import json
import math
import os
import sys

import numpy as np
import torch
import torch.nn as nn

TUBE = 0.05        # tube radius of every ring: thin enough that the rings lie apart by several sampling spacings
SHIFT = 1.3         # centres of the two "ends" rings on the x-axis
PER_CLASS = 600     # sample points per class
SEED = 20260502
WIDTH, DEPTH = 10, 6
OUT = os.path.join("testdata", "repro")
CLASSES = ["ends", "link"]


def solid_ring(rng, n, centre, plane):
    """n points uniform in the solid tube of radius TUBE around a unit circle."""
    # Uniform in the tube: angle along the circle weighted by the local
    # circumference (Pappus), so sample by rejection on the radius of the point.
    pts = []
    while len(pts) < n:
        phi = rng.uniform(0, 2 * math.pi)
        psi = rng.uniform(0, 2 * math.pi)
        rho = TUBE * math.sqrt(rng.uniform())
        r = 1 + rho * math.cos(psi)
        if rng.uniform() * (1 + TUBE) > r:
            continue
        a, b, h = r * math.cos(phi), r * math.sin(phi), rho * math.sin(psi)
        if plane == "xy":
            p = (a, b, h)
        else:  # xz
            p = (a, h, b)
        pts.append([p[0] + centre[0], p[1] + centre[1], p[2] + centre[2]])
    return np.array(pts)


def build(act):
    layers, w = [], 3
    for _ in range(DEPTH):
        layers += [nn.Linear(w, WIDTH), act()]
        w = WIDTH
    layers.append(nn.Linear(w, 2))
    return nn.Sequential(*layers)


def train(act, x, y, seed):
    torch.manual_seed(seed)
    net = build(act)
    xt = torch.tensor(x, dtype=torch.float32)
    yt = torch.tensor(y, dtype=torch.int64)
    opt = torch.optim.Adam(net.parameters(), lr=0.005)
    loss_fn = nn.CrossEntropyLoss()
    epoch = 0
    perfect_since = None
    # Full-batch training; stop 500 epochs after the training accuracy first
    # reaches 100 % and stays there (a margin that survives float32 export).
    while epoch < 20000:
        opt.zero_grad()
        out = net(xt)
        loss = loss_fn(out, yt)
        loss.backward()
        opt.step()
        epoch += 1
        acc = float((out.argmax(1) == yt).float().mean())
        if acc == 1.0:
            if perfect_since is None:
                perfect_since = epoch
            if epoch - perfect_since >= 500:
                break
        else:
            perfect_since = None
    with torch.no_grad():
        out = net(xt)
        acc = float((out.argmax(1) == yt).float().mean())
        loss = float(loss_fn(out, yt))
    return net.eval(), epoch, acc, loss


def main():
    os.makedirs(OUT, exist_ok=True)
    rng = np.random.default_rng(SEED)
    versions = {"python": sys.version.split()[0], "torch": torch.__version__, "numpy": np.__version__}
    a1 = solid_ring(rng, PER_CLASS // 2, (-SHIFT, 0, 0), "xy")
    a2 = solid_ring(rng, PER_CLASS - PER_CLASS // 2, (SHIFT, 0, 0), "xy")
    b = solid_ring(rng, PER_CLASS, (0, 0, 0), "xz")
    x = np.concatenate([a1, a2, b])
    y = np.array([0] * PER_CLASS + [1] * PER_CLASS)
    with open(os.path.join(OUT, "chain.csv"), "w") as f:
        f.write("# crease reproduction sample: a chain of three solid rings in R^3 (class ends: the two outer rings)\n")
        f.write("# generated by testdata/gen/betti_repro.py with python %s, numpy %s, torch %s; seed %d\n"
                % (versions["python"], versions["numpy"], versions["torch"], SEED))
        f.write("x,y,z,class\n")
        for p, k in zip(x, y):
            f.write("%r,%r,%r,%s\n" % (float(p[0]), float(p[1]), float(p[2]), CLASSES[k]))
    meta = {
        "dataset": "chain of three solid rings in R^3",
        "classes": CLASSES,
        "class_betti": {"ends": [2, 2], "link": [1, 1]},
        "class_betti_source": "by construction: a solid ring deformation-retracts to its core circle",
        "tube_radius": TUBE,
        "ring_radius": 1.0,
        "ends_centres": [[-SHIFT, 0, 0], [SHIFT, 0, 0]],
        "per_class": PER_CLASS,
        "seed": SEED,
        "versions": versions,
    }
    with open(os.path.join(OUT, "chain.json"), "w") as f:
        json.dump(meta, f, indent=1, sort_keys=True)
        f.write("\n")

    for name, act in (("relu", nn.ReLU), ("tanh", nn.Tanh)):
        net, epochs, acc, loss = train(act, x, y, SEED)
        path = os.path.join(OUT, name + ".onnx")
        torch.onnx.export(net, torch.zeros(1, 3), path, opset_version=13,
                          input_names=["point"], output_names=["logits"],
                          dynamic_axes={"point": {0: "batch"}, "logits": {0: "batch"}})
        rec = {
            "model": name + ".onnx",
            "architecture": "3-%s-2 MLP, %s after every hidden affine layer, logits out" % ("-".join([str(WIDTH)] * DEPTH), name),
            "activation": name,
            "layers": [3] + [WIDTH] * DEPTH + [2],
            "opset": 13,
            "dtype": "float32",
            "optimizer": "Adam lr 0.005, full batch, cross-entropy; stop 500 epochs after training accuracy reaches 100 %",
            "seed": SEED,
            "epochs": epochs,
            "accuracy_train": acc,
            "loss_train": loss,
            "versions": versions,
        }
        with open(path + ".json", "w") as f:
            json.dump(rec, f, indent=1, sort_keys=True)
            f.write("\n")
        print(name, "epochs", epochs, "acc", acc, "loss", loss)


if __name__ == "__main__":
    main()
