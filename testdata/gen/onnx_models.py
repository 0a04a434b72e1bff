# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.

"""Generate the ONNX fixtures in testdata/onnx/ used by onnxload's tests.

Run from the repository root with Debian's interpreter:

    /usr/bin/python3 testdata/gen/onnx_models.py

Needs python3-torch (1.13.1), python3-onnx (1.12), python3-sklearn and
python3-numpy from Debian. Each NAME.onnx gets a NAME.json sidecar holding
the library versions, the export settings, a few input rows and, for every
stage, the reference output computed by PyTorch (forward hooks on the
modules) or, for the hand-built graphs, by NumPy.

Also writes digits_sample.csv: rows of sklearn's load_digits (the UCI 8x8
handwritten digits), features divided by 16 as digits.onnx expects, with
a header line x0..x63,label.
"""

import copy
import io
import json
import os

import numpy as np
import onnx
import onnx.helper as oh
import onnx.numpy_helper as onh
import sklearn
import torch
import torch.nn as nn
from sklearn.datasets import load_digits, load_iris

OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "onnx")
VERSIONS = {
    "torch": torch.__version__,
    "onnx": onnx.__version__,
    "numpy": np.__version__,
    "sklearn": sklearn.__version__,
    "generator": "testdata/gen/onnx_models.py",
}
SKIP = (nn.Identity, nn.Dropout)


class MatAdd(nn.Module):
    """x @ W (+ b), exported as MatMul (and Add) with the bias on either side."""

    def __init__(self, n_in, n_out, bias="right"):
        super().__init__()
        self.w = nn.Parameter(torch.randn(n_in, n_out) / n_in ** 0.5)
        self.b = nn.Parameter(torch.randn(n_out)) if bias else None
        self.side = bias

    def forward(self, x):
        y = x @ self.w
        if self.side == "right":
            return y + self.b
        if self.side == "left":
            return self.b + y
        return y


class Rows(nn.Module):
    """x.reshape(-1, width): a Reshape whose shape keeps the batch first."""

    def __init__(self, width):
        super().__init__()
        self.width = width

    def forward(self, x):
        return x.reshape(-1, self.width)


class View(nn.Module):
    """x.view(x.size(0), -1): with a dynamic batch, exported as Shape,
    Gather, Unsqueeze and Concat feeding a Reshape."""

    def forward(self, x):
        return x.view(x.size(0), -1)


def leaves(model):
    return [(n, m) for n, m in model.named_modules() if n and not list(m.children())]


def torch_outputs(model, x):
    """Run model on x, returning [(module name, output)] for every stage
    module. The reference runs in float64 on a copy of the model: the
    float32 weights convert exactly, so this is the exact map the file
    describes, free of float32 rounding."""
    model = copy.deepcopy(model).double()
    x = x.double()
    rec = []
    hooks = []
    for name, m in leaves(model):
        if isinstance(m, SKIP):
            continue
        hooks.append(m.register_forward_hook(lambda mod, inp, out, name=name: rec.append((name, out.detach()))))
    with torch.no_grad():
        model(x)
    for h in hooks:
        h.remove()
    return rec


def rows(t):
    a = t.detach().double().numpy()
    return a.reshape(a.shape[0], -1).tolist()


def save(name, model, x, opset, note, dynamic=False, post=None, extra=None):
    model.eval()
    f = io.BytesIO()
    kw = {}
    if dynamic:
        kw["dynamic_axes"] = {"x": {0: "batch"}, "y": {0: "batch"}}
    torch.onnx.export(model, x, f, opset_version=opset, input_names=["x"], output_names=["y"], **kw)
    proto = onnx.load_from_string(f.getvalue())
    if post is not None:
        post(proto)
    onnx.checker.check_model(proto)
    proto.producer_name = "pytorch"
    data = proto.SerializeToString()
    with open(os.path.join(OUT, name + ".onnx"), "wb") as fh:
        fh.write(data)
    side = {
        "versions": VERSIONS,
        "opset": opset,
        "ir_version": proto.ir_version,
        "note": note,
        "reference": "torch forward hooks on each stage module, run in float64 (model.double()) on the exported weights",
        "ops": sorted({n.op_type for n in proto.graph.node}),
        "input": rows(x),
        "stages": [{"module": n, "output": rows(o)} for n, o in torch_outputs(model, x)],
    }
    if extra:
        side.update(extra)
    with open(os.path.join(OUT, name + ".json"), "w") as fh:
        json.dump(side, fh, indent=None)
        fh.write("\n")
    print(name, opset, side["ops"], len(data), "bytes")


def add_identity_dropout(proto):
    """Insert an Identity and an inference Dropout after the graph input."""
    g = proto.graph
    inp = g.input[0].name
    for n in g.node:
        for k, v in enumerate(n.input):
            if v == inp:
                n.input[k] = "dropped"
    # No training_mode input (it defaults to false): onnx-go v0.5.0, the
    # test reference, cannot decode bool tensors.
    ratio = onh.from_array(np.array(0.25, dtype=np.float32), "ratio")
    g.initializer.extend([ratio])
    g.node.insert(0, oh.make_node("Dropout", ["kept", "ratio"], ["dropped"], name="/drop/Dropout"))
    g.node.insert(0, oh.make_node("Identity", [inp], ["kept"], name="/ident/Identity"))


def hand_built():
    """Graphs PyTorch does not emit directly: Gemm with alpha, beta and
    transB=0, a bias from a Constant node, and nodes out of order. The
    reference is NumPy."""
    rng = np.random.default_rng(7)
    x = rng.standard_normal((6, 5))
    B = rng.standard_normal((5, 4))
    C = rng.standard_normal((4,))
    W2 = rng.standard_normal((3, 4))
    c2 = rng.standard_normal((1, 3))
    alpha, beta = 0.5, 2.0
    y1 = alpha * x @ B + beta * C
    y2 = np.maximum(y1, 0)
    y3 = y2 @ W2.T + c2
    y4 = y3 - np.log(np.exp(y3 - y3.max(1, keepdims=True)).sum(1, keepdims=True)) - y3.max(1, keepdims=True)
    f32 = lambda a: a.astype(np.float32)
    nodes = [
        # Deliberately out of topological order: the loader sorts.
        oh.make_node("LogSoftmax", ["h3"], ["y"], name="/out/LogSoftmax", axis=1),
        oh.make_node("Add", ["c2", "h2m"], ["h3"], name="/fc2/Add"),
        oh.make_node("Gemm", ["x", "B", "C"], ["h1"], name="/fc1/Gemm", alpha=alpha, beta=beta, transB=0),
        oh.make_node("Relu", ["h1"], ["h2"], name="/act/Relu"),
        oh.make_node("Constant", [], ["c2"], name="/fc2/Constant", value=onh.from_array(f32(c2), "c2v")),
        oh.make_node("Transpose", ["W2"], ["W2t"], name="/fc2/Transpose", perm=[1, 0]),
        oh.make_node("MatMul", ["h2", "W2t"], ["h2m"], name="/fc2/MatMul"),
    ]
    g = oh.make_graph(
        nodes, "hand_built",
        [oh.make_tensor_value_info("x", onnx.TensorProto.FLOAT, ["n", 5])],
        [oh.make_tensor_value_info("y", onnx.TensorProto.FLOAT, ["n", 3])],
        [onh.from_array(f32(B), "B"), onh.from_array(f32(C), "C"), onh.from_array(f32(W2), "W2")],
    )
    m = oh.make_model(g, opset_imports=[oh.make_opsetid("", 13)], producer_name="onnx.helper")
    m.ir_version = 7
    with open(os.path.join(OUT, "gemm_attrs.onnx"), "wb") as fh:
        fh.write(m.SerializeToString())
    # NumPy reference from the float32-rounded weights, in float64.
    B, C, W2, c2 = (f32(a).astype(np.float64) for a in (B, C, W2, c2))
    y1 = alpha * x @ B + beta * C
    y2 = np.maximum(y1, 0)
    y3 = y2 @ W2.T + c2
    mx = y3.max(1, keepdims=True)
    y4 = y3 - mx - np.log(np.exp(y3 - mx).sum(1, keepdims=True))
    side = {
        "versions": VERSIONS,
        "opset": 13,
        "ir_version": 7,
        "note": "hand-built with onnx.helper: Gemm alpha=0.5 beta=2 transB=0, Constant bias on the left of Add, Transpose of an initializer, nodes out of order",
        "reference": "numpy float64 on the float32 weights",
        "ops": sorted({n.op_type for n in nodes}),
        "input": x.tolist(),
        "stages": [{"module": n, "output": o.tolist()} for n, o in
                   [("fc1", y1), ("act", y2), ("fc2", y3), ("out", y4)]],
    }
    with open(os.path.join(OUT, "gemm_attrs.json"), "w") as fh:
        json.dump(side, fh)
        fh.write("\n")
    print("gemm_attrs", 13, side["ops"])


def train(model, x, y, epochs, lr=0.01):
    opt = torch.optim.Adam(model.parameters(), lr=lr)
    loss_fn = nn.CrossEntropyLoss()
    model.train()
    for _ in range(epochs):
        opt.zero_grad()
        loss = loss_fn(model(x), y)
        loss.backward()
        opt.step()
    model.eval()
    with torch.no_grad():
        acc = (model(x).argmax(1) == y).double().mean().item()
    return acc


def main():
    os.makedirs(OUT, exist_ok=True)
    torch.manual_seed(1)
    seq = nn.Sequential
    x4 = torch.randn(6, 4)
    x8 = torch.randn(6, 8)

    # Opset 7: a bias-free Linear becomes Transpose of an initializer then
    # MatMul; initializers are also listed as graph inputs (IR 3).
    save("opset7_transpose", seq(nn.Linear(4, 6), nn.Tanh(), nn.Linear(6, 3, bias=False)), x4, 7,
         "opset 7: Gemm, Tanh, Transpose(initializer)+MatMul; IR 3 initializers listed as inputs")
    # Opset 9: eval-mode BatchNormalization as its own stage.
    bn = nn.BatchNorm1d(5, eps=1e-3)
    with torch.no_grad():
        bn.running_mean.copy_(torch.randn(5))
        bn.running_var.copy_(torch.rand(5) + 0.5)
        bn.weight.copy_(torch.randn(5))
        bn.bias.copy_(torch.randn(5))
    save("opset9_batchnorm", seq(nn.Linear(8, 5), bn, nn.ReLU(), nn.Linear(5, 2)), x8, 9,
         "opset 9: BatchNormalization (eval, eps=1e-3, random running statistics and affine parameters)")
    # Opset 11: LeakyRelu and Elu with non-default slopes.
    save("opset11_leaky_elu", seq(nn.Linear(4, 7), nn.LeakyReLU(0.2), nn.Linear(7, 5), nn.ELU(0.7), nn.Linear(5, 3)), x4, 11,
         "opset 11: LeakyRelu(0.2), Elu(0.7)")
    # Opset 14: Softplus and Sigmoid.
    save("opset14_softplus_sigmoid", seq(nn.Linear(4, 6), nn.Softplus(), nn.Linear(6, 4), nn.Sigmoid()), x4, 14,
         "opset 14: Softplus, Sigmoid")
    # Opset 17: Softmax over the features.
    save("opset17_softmax", seq(nn.Linear(8, 6), nn.ReLU(), nn.Linear(6, 4), nn.Softmax(dim=1)), x8, 17,
         "opset 17: Softmax(axis=1)")
    # Opset 13: LogSoftmax with a negative axis.
    save("opset13_logsoftmax", seq(nn.Linear(4, 5), nn.Tanh(), nn.Linear(5, 3), nn.LogSoftmax(dim=-1)), x4, 13,
         "opset 13: LogSoftmax(axis=-1)")
    # MatMul + Add with the bias on either side, and a bias-free MatMul.
    save("matmul_add", seq(MatAdd(4, 6, "right"), nn.ReLU(), MatAdd(6, 5, "left"), nn.Sigmoid(), MatAdd(5, 3, None)), x4, 13,
         "MatMul+Add (bias right), Add(bias, MatMul) (bias left), bias-free MatMul")
    # A float64 model.
    save("float64", seq(nn.Linear(4, 6), nn.Tanh(), nn.Linear(6, 2)).double(), x4.double(), 13,
         "float64 weights and input")
    # A dynamic batch dimension, with Flatten of a 3-D input.
    save("dynamic_batch", seq(nn.Flatten(), nn.Linear(8, 5), nn.ReLU(), nn.Linear(5, 3)), torch.randn(6, 2, 4), 13,
         "dynamic batch dimension 'batch'; Flatten of a (batch, 2, 4) input", dynamic=True)
    # Reshape to (N, -1) of a 3-D input.
    save("reshape", seq(Rows(8), nn.Linear(8, 4), nn.ELU(), nn.Linear(4, 2)), torch.randn(6, 2, 4), 11,
         "Reshape of a (6, 2, 4) input to (-1, 8)")
    # Identity and inference Dropout inserted before the first layer.
    save("identity_dropout", seq(nn.Linear(4, 5), nn.ReLU(), nn.Linear(5, 2)), x4, 13,
         "Identity and Dropout(ratio=0.25, inference) nodes inserted after the input with onnx.helper", post=add_identity_dropout)
    for op in (9, 13):
        save("view_dynamic%d" % op, seq(View(), nn.Linear(8, 4), nn.ReLU(), nn.Linear(4, 2)), torch.randn(6, 2, 4), op,
             "x.view(x.size(0), -1) with a dynamic batch: Shape, Gather, Unsqueeze (axes as %s), Concat, Reshape" % ("attribute" if op < 13 else "input"),
             dynamic=True)
    hand_built()

    # Trained on iris (standardised features).
    iris = load_iris()
    X = iris.data.astype(np.float64)
    mean, std = X.mean(0), X.std(0)
    Xs = torch.tensor((X - mean) / std, dtype=torch.float32)
    y = torch.tensor(iris.target)
    torch.manual_seed(2)
    m = seq(nn.Linear(4, 16), nn.ReLU(), nn.Linear(16, 8), nn.ReLU(), nn.Linear(8, 3))
    acc = train(m, Xs, y, 300)
    pick = list(range(0, 150, 15))
    save("iris", m, Xs[pick], 13, "trained on sklearn load_iris, features standardised with the stored mean and std",
         extra={"train_accuracy": acc, "feature_mean": mean.tolist(), "feature_std": std.tolist(),
                "rows": pick, "labels": iris.target[pick].tolist()})

    # Trained on the UCI 8x8 digits (features / 16).
    dig = load_digits()
    Xd = torch.tensor(dig.data / 16.0, dtype=torch.float32)
    yd = torch.tensor(dig.target)
    torch.manual_seed(3)
    m = seq(nn.Linear(64, 32), nn.ReLU(), nn.Linear(32, 16), nn.ReLU(), nn.Linear(16, 10))
    acc = train(m, Xd, yd, 300)
    pick = list(range(0, 1797, 180))
    save("digits", m, Xd[pick], 13, "trained on sklearn load_digits, features divided by 16",
         dynamic=True, extra={"train_accuracy": acc, "scale": "x/16", "rows": pick, "labels": dig.target[pick].tolist()})
    n = 300
    with open(os.path.join(OUT, "digits_sample.csv"), "w") as fh:
        fh.write(",".join(["x%d" % j for j in range(64)] + ["label"]) + "\n")
        for i in range(n):
            fh.write(",".join("%.17g" % v for v in dig.data[i] / 16.0) + ",%d\n" % dig.target[i])
    print("digits_sample.csv", n, "rows; digits train accuracy", acc)


if __name__ == "__main__":
    main()
