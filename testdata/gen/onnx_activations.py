# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.
"""Export small MLPs with one activation each, at every opset from 7 to
17, for onnxload's activation stages (testdata/onnx/act_<name>_op<N>).

Each model is Linear(3, 4) → activation → Linear(4, 2), seeded. Where
PyTorch refuses to export an activation at an opset, the error is
recorded in testdata/onnx/act_exports.json instead of a model, and
act_exports.json lists the op types of every export. Every export is
kept as a fixture, with the sidecar onnxload's fixture test reads
(NAME.json): the versions, opset, op types, input rows and, per stage
in forward order, the module's name as torch.nn.Module.named_modules()
gives it with its output (forward hooks), computed in float64 by a
float64 copy of the model (the weights are float32 values, so the
copy has the same weights exactly). Run from the repository root:

    /usr/bin/python3 testdata/gen/onnx_activations.py
"""
import copy
import json
import os

import onnx
import torch
import torch.nn as nn

out = "testdata/onnx"

activations = [
    ("relu6", lambda: nn.ReLU6()),
    ("hardtanh", lambda: nn.Hardtanh(-0.5, 1.25)),
    ("prelu", lambda: nn.PReLU()),
    ("prelu4", lambda: nn.PReLU(4)),
    ("hardsigmoid", lambda: nn.Hardsigmoid()),
    ("hardswish", lambda: nn.Hardswish()),
    ("selu", lambda: nn.SELU()),
    ("celu", lambda: nn.CELU(0.7)),
    ("mish", lambda: nn.Mish()),
    ("gelu_tanh", lambda: nn.GELU(approximate="tanh")),
]


def model(act):
    torch.manual_seed(11)
    m = nn.Sequential(nn.Linear(3, 4), act, nn.Linear(4, 2)).eval()
    if isinstance(act, nn.PReLU):
        with torch.no_grad():
            # Slopes away from the default 0.25, distinct per unit.
            act.weight.copy_(torch.tensor([0.1, -0.3, 0.6, 0.2][:act.weight.numel()]))
    return m


def hooked(m, x):
    """(name, output) of every leaf module that runs, in order."""
    seen = []
    hooks = [mod.register_forward_hook(lambda mod, i, o, n=n: seen.append((n, o.detach())))
             for n, mod in m.named_modules() if len(list(mod.children())) == 0]
    m(x)
    for h in hooks:
        h.remove()
    return seen


def main():
    torch.manual_seed(5)
    # Spread wide enough to reach every piece (−3, 3 for hardswish and
    # hardsigmoid, 6 for relu6).
    x = torch.randn(8, 3) * 4
    versions = {"torch": torch.__version__, "onnx": onnx.__version__}
    exports = {"versions": versions, "exports": {}}
    for name, make in activations:
        for opset in range(7, 18):
            m = model(make())
            fname = "act_%s_op%d" % (name, opset)
            path = os.path.join(out, fname + ".onnx")
            try:
                torch.onnx.export(m, x, path, opset_version=opset, input_names=["x"], output_names=["y"],
                                  dynamic_axes={"x": {0: "batch"}})
            except Exception as e:  # torch raises several types
                if os.path.exists(path):
                    os.remove(path)
                msg = str(e).strip().splitlines()[0]
                exports["exports"][fname] = {"error": type(e).__name__ + ": " + msg}
                continue
            g = onnx.load(path)
            ops = sorted({n.op_type for n in g.graph.node})
            seq = [n.op_type for n in g.graph.node]
            exports["exports"][fname] = {"ops": seq}
            m64 = copy.deepcopy(m).double()
            with torch.no_grad():
                stages = hooked(m64, x.double())
            side = {
                "versions": versions,
                "opset": g.opset_import[0].version, "ir_version": g.ir_version,
                "reference": "PyTorch module outputs in float64 (forward hooks on a float64 copy of the model)",
                "note": "see testdata/gen/onnx_activations.py",
                "ops": ops,
                "input": x.double().tolist(),
                "stages": [{"module": mod, "output": o.tolist()} for mod, o in stages],
            }
            with open(os.path.join(out, fname + ".json"), "w") as f:
                json.dump(side, f)
                f.write("\n")
    with open(os.path.join(out, "act_exports.json"), "w") as f:
        json.dump(exports, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
