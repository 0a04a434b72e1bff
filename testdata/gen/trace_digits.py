# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.
"""Writes testdata/trace/digits_reference.json, the reference values of the
trace acceptance test on the digits model.

Run on Debian 12 with the system interpreter (python3-torch 1.13.1,
python3-sklearn 1.2.1, python3-onnx 1.12.0, python3-numpy 1.24.2):

    /usr/bin/python3 testdata/gen/trace_digits.py

It reads the weights of testdata/onnx/digits.onnx (made by
testdata/gen/onnx_models.py) with onnx, runs the same network in torch in
float64 on every row of testdata/onnx/digits_sample.csv, and computes with
scikit-learn, at the input and at the last hidden stage (the second ReLU,
stage 4 of the trace), the leave-one-out 5-NN accuracy and the 5-fold
cross-validated accuracy of a standardised multinomial logistic probe.
The folds and the scikit-learn calls are those of the trace/overlap
fixtures (testdata/gen/overlap_fixtures.py, imported here), so the
numbers are defined exactly as package overlap defines them.
go test only reads the JSON; it never runs Python.
"""
import json
import os
import sys

import numpy as np
import onnx
import sklearn
import torch
from onnx import numpy_helper

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, HERE)
import overlap_fixtures as ref  # noqa: E402  (folds, knn_reference, probe)

ROOT = os.path.join(HERE, "..")
K = 5
SEED = 1


def main():
    model = onnx.load(os.path.join(ROOT, "onnx", "digits.onnx"))
    w = {i.name: torch.tensor(numpy_helper.to_array(i), dtype=torch.float64)
         for i in model.graph.initializer}
    data = np.loadtxt(os.path.join(ROOT, "onnx", "digits_sample.csv"),
                      delimiter=",", skiprows=1)
    x = torch.tensor(data[:, :-1], dtype=torch.float64)
    y = data[:, -1].astype(int)
    with torch.no_grad():
        h1 = torch.relu(torch.nn.functional.linear(x, w["0.weight"], w["0.bias"]))
        h2 = torch.relu(torch.nn.functional.linear(h1, w["2.weight"], w["2.bias"]))
    assert ref.FOLDS == 5 and ref.SEED == SEED
    f = ref.folds(list(y), ref.FOLDS, SEED)
    doc = {
        "generator": "testdata/gen/trace_digits.py",
        "versions": {"torch": torch.__version__, "sklearn": sklearn.__version__,
                     "onnx": onnx.__version__, "numpy": np.__version__},
        "rows": int(len(y)), "k": K, "folds": ref.FOLDS, "seed": SEED,
        "stages": {},
    }
    for stage, act in (("0", x.numpy()), ("4", h2.numpy())):
        knn = ref.knn_reference(act, y, K)
        pr = ref.probe(act, y, f)
        doc["stages"][stage] = {"knn_accuracy": knn["loo_accuracy"],
                                "knn_boundary_ties": knn["boundary_ties"],
                                "probe_accuracy": pr["accuracy"]}
    out = os.path.join(ROOT, "trace", "digits_reference.json")
    os.makedirs(os.path.dirname(out), exist_ok=True)
    with open(out, "w") as fh:
        json.dump(doc, fh, indent=1, sort_keys=True)
        fh.write("\n")
    print(out, doc["stages"], file=sys.stderr)


if __name__ == "__main__":
    main()
