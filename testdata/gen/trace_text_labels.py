# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.
"""Writes testdata/trace/circles_text.{onnx,csv,json}: a classifier whose
output units are not in the alphabetical order of its text labels.

Run with Debian's interpreter (python3-torch 1.13, python3-sklearn 1.2,
python3-onnx 1.12):

    /usr/bin/python3 testdata/gen/trace_text_labels.py

scikit-learn's make_circles (200 points, noise 0.05, factor 0.5, seed 3);
the label of the outer circle is "outer" and is output unit 0, the inner
circle "inner" is unit 1, so alphabetical order (inner, outer) is the
wrong one. The MLP 2→16→16→2 with ReLU and a final Softmax is trained
with Adam until it classifies every point; the sidecar records torch's
accuracy (the share of points whose largest softmax output is their own
class's unit, which is the share inside their own vertex's Voronoi cell
of the simplex) and the library versions.
"""
import json
import os
import platform

import numpy as np
import onnx
import sklearn
import torch
import torch.nn as nn
from sklearn.datasets import make_circles

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, "..", "trace")


def main():
    x, y = make_circles(n_samples=200, noise=0.05, factor=0.5, random_state=3)
    # make_circles labels the outer circle 0 and the inner one 1.
    names = ["outer", "inner"]
    torch.manual_seed(3)
    m = nn.Sequential(nn.Linear(2, 16), nn.ReLU(), nn.Linear(16, 16), nn.ReLU(), nn.Linear(16, 2), nn.Softmax(dim=1))
    opt = torch.optim.Adam(m.parameters(), 1e-2)
    xt, yt = torch.tensor(x, dtype=torch.float32), torch.tensor(y)
    for _ in range(2000):
        opt.zero_grad()
        loss = nn.functional.nll_loss(torch.log(m(xt) + 1e-12), yt)
        loss.backward()
        opt.step()
    m.eval()
    with torch.no_grad():
        acc = float((m(xt).argmax(1) == yt).float().mean())
    path = os.path.join(OUT, "circles_text.onnx")
    torch.onnx.export(m, torch.zeros(1, 2), path, input_names=["x"], output_names=["y"],
                      dynamic_axes={"x": {0: "n"}, "y": {0: "n"}}, opset_version=13)
    with open(os.path.join(OUT, "circles_text.csv"), "w") as fh:
        fh.write("# make_circles(200, noise=0.05, factor=0.5, random_state=3); testdata/gen/trace_text_labels.py\n")
        fh.write("x,y,circle\n")
        for (a, b), l in zip(x, y):
            fh.write("%.17g,%.17g,%s\n" % (a, b, names[l]))
    with open(os.path.join(OUT, "circles_text.json"), "w") as fh:
        json.dump({
            "generator": "testdata/gen/trace_text_labels.py",
            "versions": {"python": platform.python_version(), "torch": torch.__version__, "onnx": onnx.__version__,
                         "sklearn": sklearn.__version__, "numpy": np.__version__},
            "units": names,
            "torch_accuracy": acc,
        }, fh, indent=1)
        fh.write("\n")
    print("accuracy", acc)


if __name__ == "__main__":
    main()
