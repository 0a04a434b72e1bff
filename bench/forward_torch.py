# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.
"""Times torch's forward pass in float64 on 2 threads, in rows per
second, on the networks of onnxload's BenchmarkForward: the digits model
(testdata/onnx/digits.onnx, weights read with onnx) and a 784→512→256→10
ReLU MLP with random weights. Run with Debian's interpreter:

    /usr/bin/python3 bench/forward_torch.py

and compare with `go test -run XXX -bench BenchmarkForward ./onnxload`.
Each figure is the best of 5 rounds of at least 1 s.
"""
import os
import time

import numpy as np
import onnx
import torch
from onnx import numpy_helper

torch.set_num_threads(2)
torch.set_grad_enabled(False)
HERE = os.path.dirname(os.path.abspath(__file__))


def digits_net():
    m = onnx.load(os.path.join(HERE, "..", "testdata", "onnx", "digits.onnx"))
    init = {t.name: numpy_helper.to_array(t) for t in m.graph.initializer}
    layers = []
    for node in m.graph.node:
        if node.op_type == "Gemm":
            w, b = init[node.input[1]], init[node.input[2]]
            trans_b = any(a.name == "transB" and a.i == 1 for a in node.attribute)
            if not trans_b:
                w = w.T
            lin = torch.nn.Linear(w.shape[1], w.shape[0]).double()
            lin.weight.copy_(torch.from_numpy(w.astype(np.float64)))
            lin.bias.copy_(torch.from_numpy(b.astype(np.float64)))
            layers.append(lin)
        elif node.op_type == "Relu":
            layers.append(torch.nn.ReLU())
        else:
            raise SystemExit("digits.onnx: unexpected node " + node.op_type)
    return torch.nn.Sequential(*layers), layers[0].in_features


def mlp784():
    torch.manual_seed(0)
    net = torch.nn.Sequential(torch.nn.Linear(784, 512), torch.nn.ReLU(), torch.nn.Linear(512, 256), torch.nn.ReLU(), torch.nn.Linear(256, 10)).double()
    return net, 784


def rate(net, width, n):
    x = torch.rand(n, width, dtype=torch.float64)
    net(x)
    best = 0.0
    for _ in range(5):
        reps, t0 = 0, time.perf_counter()
        while True:
            net(x)
            reps += 1
            dt = time.perf_counter() - t0
            if dt >= 1:
                break
        best = max(best, reps * n / dt)
    return best


def main():
    print("# torch %s, float64, %d threads" % (torch.__version__, torch.get_num_threads()))
    for name, (net, width), sizes in (("digits", digits_net(), (100, 1797, 20000)), ("mlp784", mlp784(), (1000, 20000))):
        for n in sizes:
            print("%s/n=%d\t%.0f rows/s" % (name, n, rate(net, width, n)))


if __name__ == "__main__":
    main()
