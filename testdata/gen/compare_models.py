# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.

"""Generate the model-comparison fixtures in testdata/compare/.

Run from the repository root with Debian's interpreter:

    /usr/bin/python3 testdata/gen/compare_models.py

Needs python3-torch (1.13), python3-onnx (1.12) and python3-numpy (1.24)
from Debian; nothing else. The output is deterministic: fixed seeds, one
torch thread, deterministic torch algorithms, and full-batch training.

It writes:

    rings3.csv     our scenario "three rings": three concentric noisy circles
                   in the plane with radii 1, 2 and 3, 200 points per class at
                   uniformly random angles and Gaussian radial noise of sd
                   0.08 (numpy default_rng seed 3). Columns x,y,ring with ring
                   one of "inner", "middle", "outer". The rows are interleaved
                   inner, middle, outer, inner, ... so that any prefix of the
                   file (for example the first 60 rows used in cka.json) holds
                   all three classes equally.
    base.onnx      2->16->16->3 ReLU MLP, trained with Adam (lr 0.01),
                   full-batch cross-entropy, torch seed 1, until 100 %
                   training accuracy or at most 3000 steps.
    fp16.onnx      base with every weight and bias rounded to float16 and
                   back to float32.
    retrained.onnx same architecture and training as base, torch seed 2.
    pruned.onnx    base with the 50 % smallest-magnitude weights of each of
                   the first two Linear layers set to zero (per layer, ties
                   broken by position; biases and the last layer untouched;
                   no retraining). If that copy were still above 90 %
                   accurate, the generator would prune 70 % instead; the
                   fraction used is recorded in manifest.json.
    int8.onnx      base with each weight tensor quantised per tensor to
                   symmetric int8 (scale = max|w|/127 in float64,
                   q = round-half-even(w/scale) clipped to [-127, 127],
                   w' = float32(q*scale)); biases untouched.
    narrow.onnx    2->1->16->3 trained like base (torch seed 1): a one-unit
                   bottleneck cannot separate concentric rings.
    manifest.json  per model: architecture, accuracy on rings3.csv, how it
                   was made; generator and library versions.
    cka.json       reference values of linear CKA (Kornblith, Norouzi, Lee,
                   Hinton, "Similarity of Neural Network Representations
                   Revisited", ICML 2019): for column-centred X and Y,
                   CKA = ||Y^T X||_F^2 / (||X^T X||_F ||Y^T Y||_F), in float64.

All models are float32, exported by torch.onnx.export at opset 13 with input
"x" of shape [N, 2] (dynamic batch axis "batch") and output "logits" (no
softmax). Class index order is the lexical order of the labels: inner=0,
middle=1, outer=2. Accuracies are computed by a NumPy forward pass (float64
arithmetic) over the float32 initialisers read back from each exported file.
The "hidden" CKA case uses the same NumPy forward pass: activations after the
first ReLU of base.onnx and retrained.onnx on the first 60 rows of
rings3.csv.
"""

import copy
import json
import os
import platform

import numpy as np
import onnx
import onnx.numpy_helper as onh
import torch
import torch.nn as nn

GENERATOR = "testdata/gen/compare_models.py"
OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "compare")
CLASSES = ["inner", "middle", "outer"]  # lexical order = class index
RADII = [1.0, 2.0, 3.0]
PER_CLASS = 200
NOISE_SD = 0.08
DATA_SEED = 3
MAX_STEPS = 3000
LR = 0.01
PRUNE_FRACTIONS = (0.5, 0.7)
VERSIONS = {
    "python": platform.python_version(),
    "numpy": np.__version__,
    "torch": torch.__version__,
    "onnx": onnx.__version__,
}


def rings():
    """Return (xy, label index) of the three-ring sample, rows interleaved by class."""
    rng = np.random.default_rng(DATA_SEED)
    pts = []
    for r in RADII:
        th = rng.uniform(0.0, 2.0 * np.pi, PER_CLASS)
        rad = r + NOISE_SD * rng.standard_normal(PER_CLASS)
        pts.append(np.stack([rad * np.cos(th), rad * np.sin(th)], axis=1))
    xy = np.empty((3 * PER_CLASS, 2))
    lab = np.empty(3 * PER_CLASS, dtype=np.int64)
    for k in range(3):
        xy[k::3] = pts[k]
        lab[k::3] = k
    return xy, lab


def write_csv(path, xy, lab):
    with open(path, "w") as fh:
        fh.write("# three rings (radii 1, 2, 3; %d points per class; radial noise sd %g; seed %d); "
                 "%s, python %s, numpy %s, torch %s\n"
                 % (PER_CLASS, NOISE_SD, DATA_SEED, GENERATOR,
                    VERSIONS["python"], VERSIONS["numpy"], VERSIONS["torch"]))
        fh.write("x,y,ring\n")
        for (x, y), k in zip(xy, lab):
            fh.write("%.17g,%.17g,%s\n" % (x, y, CLASSES[k]))


def read_csv(path):
    xs, labs = [], []
    with open(path) as fh:
        for line in fh:
            if line.startswith("#") or line.startswith("x,"):
                continue
            a, b, c = line.strip().split(",")
            xs.append((float(a), float(b)))
            labs.append(CLASSES.index(c))
    return np.array(xs, dtype=np.float64), np.array(labs, dtype=np.int64)


def make_net(h1, h2=16):
    return nn.Sequential(nn.Linear(2, h1), nn.ReLU(), nn.Linear(h1, h2), nn.ReLU(), nn.Linear(h2, 3))


def train(h1, seed, xy, lab):
    """Full-batch Adam until 100 % training accuracy or MAX_STEPS; returns (net, steps)."""
    torch.manual_seed(seed)
    net = make_net(h1)
    xt = torch.tensor(xy, dtype=torch.float32)
    yt = torch.tensor(lab, dtype=torch.int64)
    opt = torch.optim.Adam(net.parameters(), lr=LR)
    loss_fn = nn.CrossEntropyLoss()
    steps = 0
    while steps < MAX_STEPS:
        opt.zero_grad()
        out = net(xt)
        if bool((out.argmax(1) == yt).all()):
            break
        loss_fn(out, yt).backward()
        opt.step()
        steps += 1
    return net.eval(), steps


def linears(net):
    return [m for m in net if isinstance(m, nn.Linear)]


def modified(net, fn):
    """A deep copy of net with fn(layer index, name, float32 array) applied to each parameter."""
    out = copy.deepcopy(net)
    with torch.no_grad():
        for i, lin in enumerate(linears(out)):
            for name in ("weight", "bias"):
                p = getattr(lin, name)
                v = fn(i, name, p.detach().numpy().astype(np.float32))
                p.copy_(torch.from_numpy(np.ascontiguousarray(v, dtype=np.float32)))
    return out


def to_fp16(i, name, v):
    return v.astype(np.float16).astype(np.float32)


def pruner(frac):
    def prune(i, name, v):
        if name != "weight" or i >= 2:
            return v
        flat = v.ravel().copy()
        k = int(np.floor(frac * flat.size))
        idx = np.argsort(np.abs(flat), kind="stable")[:k]
        flat[idx] = 0.0
        return flat.reshape(v.shape)
    return prune


def to_int8(i, name, v):
    if name != "weight":
        return v
    w = v.astype(np.float64)
    scale = np.abs(w).max() / 127.0
    q = np.clip(np.round(w / scale), -127, 127)
    return (q * scale).astype(np.float32)


def export(net, path):
    dummy = torch.zeros(1, 2, dtype=torch.float32)
    torch.onnx.export(net, dummy, path, opset_version=13,
                      input_names=["x"], output_names=["logits"],
                      dynamic_axes={"x": {0: "batch"}, "logits": {0: "batch"}})
    model = onnx.load(path)
    onnx.checker.check_model(model)
    return model


def layers_of(model):
    """The graph as a list of ("affine", W[out,in], b) and ("relu",) steps, float32 arrays.

    Handles Gemm (with transB) and MatMul followed by Add, and Relu.
    """
    init = {t.name: onh.to_array(t) for t in model.graph.initializer}
    steps = []
    for node in model.graph.node:
        if node.op_type == "Gemm":
            attrs = {a.name: onnx.helper.get_attribute_value(a) for a in node.attribute}
            assert attrs.get("alpha", 1.0) == 1.0 and attrs.get("beta", 1.0) == 1.0
            assert not attrs.get("transA", 0)
            w = init[node.input[1]]
            if not attrs.get("transB", 0):
                w = w.T
            b = init[node.input[2]] if len(node.input) > 2 else np.zeros(w.shape[0], np.float32)
            steps.append(("affine", w, b))
        elif node.op_type == "MatMul":
            steps.append(("affine", init[node.input[1]].T, np.zeros(init[node.input[1]].shape[1], np.float32)))
        elif node.op_type == "Add":
            name = node.input[1] if node.input[1] in init else node.input[0]
            kind, w, _ = steps[-1]
            steps[-1] = (kind, w, init[name])
        elif node.op_type == "Relu":
            steps.append(("relu",))
        else:
            raise ValueError("unexpected node %s" % node.op_type)
    return steps


def forward(model, x, stop_after_relu=None):
    """NumPy float64 forward pass over the float32 initialisers.

    With stop_after_relu=k, returns the activations after the k-th Relu (1-based).
    """
    h = np.asarray(x, dtype=np.float64)
    relus = 0
    for st in layers_of(model):
        if st[0] == "affine":
            h = h @ st[1].astype(np.float64).T + st[2].astype(np.float64)
        else:
            h = np.maximum(h, 0.0)
            relus += 1
            if relus == stop_after_relu:
                return h
    return h


def accuracy(model, xy, lab):
    return float((forward(model, xy).argmax(1) == lab).mean())


def torch_check(net, model, xy):
    """The NumPy forward pass of the exported file must agree with torch."""
    with torch.no_grad():
        t = net(torch.tensor(xy, dtype=torch.float32)).numpy().astype(np.float64)
    n = forward(model, xy)
    assert np.max(np.abs(t - n)) < 1e-4, np.max(np.abs(t - n))


def linear_cka(x, y):
    x = np.asarray(x, dtype=np.float64)
    y = np.asarray(y, dtype=np.float64)
    x = x - x.mean(axis=0)
    y = y - y.mean(axis=0)
    num = np.linalg.norm(y.T @ x, "fro") ** 2
    return float(num / (np.linalg.norm(x.T @ x, "fro") * np.linalg.norm(y.T @ y, "fro")))


def cka_case(name, x, y, note):
    x = np.asarray(x, dtype=np.float64)
    y = np.asarray(y, dtype=np.float64)
    return {"name": name, "note": note, "x": x.tolist(), "y": y.tolist(), "cka": linear_cka(x, y)}


def main():
    torch.set_num_threads(1)
    torch.use_deterministic_algorithms(True)
    os.makedirs(OUT, exist_ok=True)

    xy, lab = rings()
    csv_path = os.path.join(OUT, "rings3.csv")
    write_csv(csv_path, xy, lab)
    xy, lab = read_csv(csv_path)  # train and evaluate on exactly what the file holds

    manifest = {"generator": GENERATOR, "versions": VERSIONS, "data": "rings3.csv",
                "classes": CLASSES, "input": "x", "output": "logits", "opset": 13,
                "models": {}}
    models = {}

    def record(fname, net, arch, how, extra=None):
        path = os.path.join(OUT, fname)
        model = export(net, path)
        torch_check(net, model, xy)
        models[fname] = model
        entry = {"architecture": arch, "accuracy": accuracy(model, xy, lab), "how": how,
                 "nodes": [n.op_type for n in model.graph.node]}
        if extra:
            entry.update(extra)
        manifest["models"][fname] = entry
        return model

    train_how = ("Adam lr %g, full-batch cross-entropy on rings3.csv, torch seed %d, "
                 "stopped at 100 %% training accuracy or after %d steps")

    base, steps = train(16, 1, xy, lab)
    record("base.onnx", base, "2-16-16-3 relu", train_how % (LR, 1, MAX_STEPS),
           {"seed": 1, "steps": steps})

    record("fp16.onnx", modified(base, to_fp16), "2-16-16-3 relu",
           "base.onnx with every weight and bias rounded to float16 and back to float32")

    retrained, steps2 = train(16, 2, xy, lab)
    record("retrained.onnx", retrained, "2-16-16-3 relu", train_how % (LR, 2, MAX_STEPS),
           {"seed": 2, "steps": steps2})

    for frac in PRUNE_FRACTIONS:
        pruned = modified(base, pruner(frac))
        record("pruned.onnx", pruned, "2-16-16-3 relu",
               "base.onnx with the %d %% smallest-magnitude weights of each of the first two "
               "Linear layers set to zero (per layer; ties broken by position; biases and the "
               "last layer untouched; no retraining)" % round(100 * frac),
               {"prune_fraction": frac,
                "prune_rule": "prune 50 %; if the result is still above 90 % accurate, prune 70 % instead"})
        if manifest["models"]["pruned.onnx"]["accuracy"] <= 0.9:
            break

    record("int8.onnx", modified(base, to_int8), "2-16-16-3 relu",
           "base.onnx with each weight tensor quantised per tensor to symmetric int8 "
           "(scale = max|w|/127, q = round(w/scale) clipped to [-127, 127], w' = q*scale) "
           "and dequantised to float32; biases untouched")

    narrow, steps3 = train(1, 1, xy, lab)
    record("narrow.onnx", narrow, "2-1-16-3 relu", train_how % (LR, 1, MAX_STEPS),
           {"seed": 1, "steps": steps3})

    with open(os.path.join(OUT, "manifest.json"), "w") as fh:
        json.dump(manifest, fh, indent=1)
        fh.write("\n")

    cases = []
    x = np.random.default_rng(11).standard_normal((40, 5))
    y = np.random.default_rng(12).standard_normal((40, 3))
    cases.append(cka_case("random", x, y, "X 40x5 standard normal (seed 11), Y 40x3 standard normal (seed 12)"))

    x = np.random.default_rng(13).standard_normal((40, 5))
    rng = np.random.default_rng(14)
    a = rng.standard_normal((5, 4))
    y = x @ a + 0.1 * rng.standard_normal((40, 4))
    cases.append(cka_case("linear", x, y,
                          "X 40x5 standard normal (seed 13); A 5x4 standard normal then noise 40x4 "
                          "standard normal from one generator (seed 14); Y = X A + 0.1 noise"))

    x = np.random.default_rng(15).standard_normal((30, 4))
    q, r = np.linalg.qr(np.random.default_rng(16).standard_normal((4, 4)))
    q = q * np.sign(np.diag(r))
    y = 2.5 * x @ q + 7.0
    cases.append(cka_case("rotation", x, y,
                          "X 30x4 standard normal (seed 15); Q orthogonal from the QR of a 4x4 "
                          "standard normal matrix (seed 16, columns signed so diag(R) > 0); "
                          "Y = 2.5 X Q + 7; CKA is 1 up to rounding"))

    hx = forward(models["base.onnx"], xy[:60], stop_after_relu=1)
    hy = forward(models["retrained.onnx"], xy[:60], stop_after_relu=1)
    cases.append(cka_case("hidden", hx, hy,
                          "activations after the first Relu of base.onnx (X) and retrained.onnx (Y) "
                          "on the first 60 rows of rings3.csv; NumPy float64 forward pass over the "
                          "exported float32 weights"))

    with open(os.path.join(OUT, "cka.json"), "w") as fh:
        json.dump({"generator": GENERATOR, "numpy": np.__version__,
                   "formula": "column-centre X and Y; ||Y^T X||_F^2 / (||X^T X||_F ||Y^T Y||_F), float64",
                   "cases": cases}, fh, indent=1)
        fh.write("\n")

    for fname, e in manifest["models"].items():
        print("%-15s %-15s acc %.4f  %s" % (fname, e["architecture"], e["accuracy"],
                                             e.get("steps", e.get("prune_fraction", ""))))
    for c in cases:
        print("cka %-9s %r" % (c["name"], c["cka"]))


if __name__ == "__main__":
    main()
