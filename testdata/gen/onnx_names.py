#!/usr/bin/python3
"""Export MLPs whose modules nest the ways people write them, for the
stage names of onnxload (testdata/onnx/names_*.onnx).

Each model gets the sidecar onnxload's fixture test reads (NAME.json):
the versions, opset, op types, input rows and, per stage in forward
order, the module's name as torch.nn.Module.named_modules() gives it
with its output (forward hooks); a functional activation (F.relu,
torch.softmax) has no module, so its stage is named after the module it
follows, ":" and the activation's stage kind, with its output computed
here. Run from the repository root:

    /usr/bin/python3 testdata/gen/onnx_names.py
"""
import json
import os

import onnx
import torch
import torch.nn as nn
import torch.nn.functional as F

torch.manual_seed(7)
out = "testdata/onnx"


class Attr(nn.Module):
    """Attribute modules and functional activations."""

    def __init__(self):
        super().__init__()
        self.fc1 = nn.Linear(4, 8)
        self.fc2 = nn.Linear(8, 3)

    def forward(self, x):
        return torch.softmax(self.fc2(F.relu(self.fc1(x))), dim=1)


class Seq(nn.Module):
    """self.layers = nn.Sequential(...)."""

    def __init__(self):
        super().__init__()
        self.layers = nn.Sequential(nn.Linear(4, 8), nn.ReLU(), nn.Linear(8, 3))

    def forward(self, x):
        return self.layers(x)


class Functional(nn.Module):
    """F.gelu and F.silu, which PyTorch 1.13 exports as node patterns."""

    def __init__(self):
        super().__init__()
        self.fc1 = nn.Linear(4, 8)
        self.fc2 = nn.Linear(8, 6)
        self.fc3 = nn.Linear(6, 2)

    def forward(self, x):
        return self.fc3(F.silu(self.fc2(F.gelu(self.fc1(x)))))


class Lst(nn.Module):
    """A ModuleList of blocks, each a Sequential."""

    def __init__(self):
        super().__init__()
        self.blocks = nn.ModuleList([nn.Sequential(nn.Linear(4, 6), nn.Tanh()), nn.Sequential(nn.Linear(6, 5), nn.ReLU())])
        self.head = nn.Linear(5, 2)

    def forward(self, x):
        for b in self.blocks:
            x = b(x)
        return self.head(x)


def nested():
    """A Sequential inside a Sequential."""
    return nn.Sequential(nn.Sequential(nn.Linear(4, 8), nn.ReLU()), nn.Linear(8, 3))


def sidecar(name, m, x, stages, opset=13):
    path = os.path.join(out, name + ".onnx")
    torch.onnx.export(m, x, path, opset_version=opset, input_names=["x"], output_names=["y"],
                      dynamic_axes={"x": {0: "batch"}})
    g = onnx.load(path)
    side = {
        "versions": {"torch": torch.__version__, "onnx": onnx.__version__},
        "opset": g.opset_import[0].version, "ir_version": g.ir_version,
        "reference": "PyTorch module outputs (forward hooks; functional activations applied here)",
        "note": "stage names are named_modules() names; see testdata/gen/onnx_names.py",
        "ops": sorted({n.op_type for n in g.graph.node}),
        "input": x.tolist(),
        "stages": [{"module": mod, "output": o.tolist()} for mod, o in stages],
    }
    with open(os.path.join(out, name + ".json"), "w") as f:
        json.dump(side, f)
        f.write("\n")


def hooked(m, x):
    """(name, output) of every leaf module that runs, in order."""
    seen = []
    hooks = [mod.register_forward_hook(lambda mod, i, o, n=n: seen.append((n, o.detach().double())))
             for n, mod in m.named_modules() if len(list(mod.children())) == 0]
    m(x)
    for h in hooks:
        h.remove()
    return seen


x = torch.randn(6, 4)
with torch.no_grad():
    a = Attr().eval()
    h1 = a.fc1(x)
    r1 = F.relu(h1)
    h2 = a.fc2(r1)
    sidecar("names_attr", a, x, [("fc1", h1), ("fc1:relu", r1), ("fc2", h2), ("fc2:softmax", torch.softmax(h2, dim=1))])
    for name, m in [("names_seq", Seq()), ("names_list", Lst()), ("names_nested", nested())]:
        m.eval()
        sidecar(name, m, x, hooked(m, x))
    # GELU (the Erf pattern) and SiLU (Sigmoid·Mul) at the opsets where
    # PyTorch 1.13 exports them that way (Erf exists from opset 9).
    x = torch.randn(6, 4) * 2
    act = nn.Sequential(nn.Linear(4, 6), nn.GELU(), nn.Linear(6, 5), nn.SiLU(), nn.Linear(5, 2)).eval()
    for opset in (9, 13, 17):
        sidecar("act_gelu_silu_op%d" % opset, act, x, hooked(act, x), opset)
    f = Functional().eval()
    h1 = f.fc1(x)
    g1 = F.gelu(h1)
    h2 = f.fc2(g1)
    s2 = F.silu(h2)
    sidecar("act_functional", f, x, [("fc1", h1), ("fc1:gelu", g1), ("fc2", h2), ("fc2:silu", s2), ("fc3", f.fc3(s2))])
