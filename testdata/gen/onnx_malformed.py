# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.

"""Generate testdata/onnx/malformed/: bad or unsupported ONNX files.

Run from the repository root with Debian's interpreter (python3-onnx 1.12,
python3-numpy):

    /usr/bin/python3 testdata/gen/onnx_malformed.py

Each file is listed in malformed/manifest.json with the error class the
loader must report ("format", "unsupported" or "limit"), whether it fails
while decoding or while building stages, and why. Byte-level damage
(truncation, bit flips, random bytes) starts from testdata/onnx/digits.onnx
and opset9_batchnorm.onnx, so run onnx_models.py first.
"""

import json
import os
import random

import numpy as np
import onnx
import onnx.helper as oh
import onnx.numpy_helper as onh
from onnx import TensorProto

HERE = os.path.dirname(os.path.abspath(__file__))
SRC = os.path.join(HERE, "..", "onnx")
OUT = os.path.join(SRC, "malformed")
manifest = {}


def put(name, data, want, stage, why):
    if isinstance(data, onnx.ModelProto):
        data = data.SerializeToString()
    with open(os.path.join(OUT, name), "wb") as fh:
        fh.write(data)
    manifest[name] = {"want": want, "at": stage, "why": why}


def f32(a):
    return np.asarray(a, dtype=np.float32)


def mlp(nodes=None, inits=None, inputs=None, outputs=None, opset=13):
    """A tiny valid model: y = Relu(x W + b), x of shape (n, 3)."""
    if nodes is None:
        nodes = [oh.make_node("Gemm", ["x", "W", "b"], ["h"], name="/fc/Gemm", transB=1),
                 oh.make_node("Relu", ["h"], ["y"], name="/act/Relu")]
    if inits is None:
        inits = [onh.from_array(f32(np.ones((2, 3))), "W"), onh.from_array(f32([0.5, -0.5]), "b")]
    if inputs is None:
        inputs = [oh.make_tensor_value_info("x", TensorProto.FLOAT, ["n", 3])]
    if outputs is None:
        outputs = [oh.make_tensor_value_info("y", TensorProto.FLOAT, ["n", 2])]
    g = oh.make_graph(nodes, "g", inputs, outputs, inits)
    m = oh.make_model(g, opset_imports=[oh.make_opsetid("", opset)], producer_name="crease-malformed")
    m.ir_version = 7
    return m


def main():
    os.makedirs(OUT, exist_ok=True)
    digits = open(os.path.join(SRC, "digits.onnx"), "rb").read()
    small = open(os.path.join(SRC, "opset9_batchnorm.onnx"), "rb").read()

    put("empty.onnx", b"", "format", "decode", "empty file")
    put("text.onnx", b"this is not an ONNX model, just a line of text\n", "format", "decode", "plain text")
    put("json.onnx", b'{"ir_version": 7, "graph": {}}\n', "format", "decode", "JSON instead of protobuf")
    rng = random.Random(20261201)
    for k in range(3):
        put("random%d.onnx" % k, bytes(rng.randrange(256) for _ in range(64 + 200 * k)), "format", "decode", "random bytes")
    for cut in (1, 10, 100, 1000, len(digits) // 2, len(digits) - 1):
        put("truncated%d.onnx" % cut, digits[:cut], "format", "decode", "digits.onnx truncated to %d bytes" % cut)

    # Bit flips at chosen places in a valid file.
    m = onnx.load_from_string(small)
    b = bytearray(small)
    # The graph field (7, bytes) has tag 0x3a; find it and flip the top bit
    # of the last byte of its length, so the length runs past the end.
    i = b.index(b"\x3a", 0)
    j = i + 1
    while b[j] & 0x80:
        j += 1
    flip = bytearray(b)
    flip[j] ^= 0x40
    put("bitflip_graphlen.onnx", bytes(flip), "format", "decode", "bit flip in the graph length")
    flip = bytearray(b)
    flip[i] ^= 0x07  # wire type 2 -> 5 and field stays 7: graph is not a message
    put("bitflip_wiretype.onnx", bytes(flip), "format", "decode", "bit flip turning the graph field into a fixed32")
    flip = bytearray(b)
    flip[0] |= 0x07  # first tag gets wire type 7 (invalid)
    put("bitflip_tag.onnx", bytes(flip), "format", "decode", "bit flip giving an invalid wire type")

    # Tensors.
    w = TensorProto(name="W", data_type=TensorProto.FLOAT, dims=[2, 3], raw_data=f32(np.ones(5)).tobytes())
    put("short_raw_data.onnx", mlp(inits=[w, onh.from_array(f32([0, 0]), "b")]), "format", "decode", "raw_data shorter than dims need")
    w = TensorProto(name="W", data_type=TensorProto.FLOAT, dims=[2, 3], float_data=[1, 2, 3, 4])
    put("short_float_data.onnx", mlp(inits=[w, onh.from_array(f32([0, 0]), "b")]), "format", "decode", "float_data shorter than dims need")
    w = TensorProto(name="W", data_type=TensorProto.FLOAT, dims=[-2, 3])
    put("negative_dim.onnx", mlp(inits=[w, onh.from_array(f32([0, 0]), "b")]), "format", "decode", "negative tensor dimension")
    w = TensorProto(name="W", data_type=TensorProto.FLOAT, dims=[1 << 40, 3])
    put("huge_dim.onnx", mlp(inits=[w, onh.from_array(f32([0, 0]), "b")]), "limit", "decode", "tensor dimension 2^40 (MaxDim)")
    w = TensorProto(name="W", data_type=TensorProto.FLOAT, dims=[1 << 20, 1 << 20])
    put("huge_elements.onnx", mlp(inits=[w, onh.from_array(f32([0, 0]), "b")]), "limit", "decode", "2^40 elements (MaxElements)")
    big = oh.make_model(oh.make_graph([oh.make_node("Relu", ["x"], ["y"])], "g",
                                      [oh.make_tensor_value_info("x", TensorProto.FLOAT, [1 << 31, 1 << 31, 1 << 31])],
                                      [oh.make_tensor_value_info("y", TensorProto.FLOAT, None)]),
                        opset_imports=[oh.make_opsetid("", 13)])
    big.ir_version = 7
    put("huge_input_shape.onnx", big, "limit", "decode", "a tiny file declaring an input of 2^93 elements")
    neg = mlp(inputs=[oh.make_tensor_value_info("x", TensorProto.FLOAT, ["n", 3])])
    neg.graph.input[0].type.tensor_type.shape.dim[1].dim_value = -3
    put("negative_input_dim.onnx", neg, "format", "decode", "negative declared input dimension")
    w = oh.make_tensor("W", TensorProto.FLOAT16, [2, 3], np.ones(6, dtype=np.float16).view(np.uint16).tolist())
    put("float16.onnx", mlp(inits=[w, onh.from_array(f32([0, 0]), "b")]), "unsupported", "decode", "float16 initializer")
    put("bfloat16_input.onnx", mlp(inputs=[oh.make_tensor_value_info("x", TensorProto.BFLOAT16, ["n", 3])]), "unsupported", "decode", "bfloat16 graph input")
    s = TensorProto(name="W", data_type=TensorProto.STRING, dims=[1], string_data=[b"a"])
    put("string_tensor.onnx", mlp(inits=[s, onh.from_array(f32([0, 0]), "b")]), "unsupported", "decode", "string initializer")
    w = TensorProto(name="W", data_type=TensorProto.FLOAT, dims=[2, 3], data_location=TensorProto.EXTERNAL)
    e = w.external_data.add()
    e.key, e.value = "location", "weights.bin"
    put("external_data.onnx", mlp(inits=[w, onh.from_array(f32([0, 0]), "b")]), "unsupported", "decode", "external data")

    # Graph structure.
    put("dangling_input.onnx", mlp(nodes=[oh.make_node("Gemm", ["x", "W", "b"], ["h"], name="/fc/Gemm", transB=1),
                                          oh.make_node("Relu", ["nowhere"], ["y"], name="/act/Relu")]),
        "format", "decode", "Relu reads a value nobody defines")
    put("self_loop.onnx", mlp(nodes=[oh.make_node("Gemm", ["x", "W", "b"], ["h"], name="/fc/Gemm", transB=1),
                                     oh.make_node("Add", ["h", "y"], ["y"], name="/loop/Add")]),
        "format", "decode", "a node consuming its own output")
    put("cycle.onnx", mlp(nodes=[oh.make_node("Relu", ["z"], ["h"], name="a"),
                                 oh.make_node("Relu", ["h"], ["z"], name="b"),
                                 oh.make_node("Relu", ["z"], ["y"], name="c")]),
        "format", "decode", "two nodes feeding each other")
    put("duplicate_output.onnx", mlp(nodes=[oh.make_node("Gemm", ["x", "W", "b"], ["h"], name="/fc/Gemm", transB=1),
                                            oh.make_node("Relu", ["h"], ["h"], name="/act/Relu"),
                                            oh.make_node("Relu", ["h"], ["y"], name="/act2/Relu")]),
        "format", "decode", "two nodes define the same value")
    put("custom_domain.onnx", mlp(nodes=[oh.make_node("Gemm", ["x", "W", "b"], ["h"], name="/fc/Gemm", transB=1),
                                         oh.make_node("FancyRelu", ["h"], ["y"], name="/act/FancyRelu", domain="com.example")]),
        "unsupported", "decode", "operator from a custom domain")
    then_g = oh.make_graph([oh.make_node("Identity", ["h"], ["t"])], "then", [], [oh.make_tensor_value_info("t", TensorProto.FLOAT, None)])
    else_g = oh.make_graph([oh.make_node("Relu", ["h"], ["e"])], "else", [], [oh.make_tensor_value_info("e", TensorProto.FLOAT, None)])
    cond = onh.from_array(np.array(True), "cond")
    put("if_node.onnx", mlp(nodes=[oh.make_node("Gemm", ["x", "W", "b"], ["h"], name="/fc/Gemm", transB=1),
                                   oh.make_node("If", ["cond"], ["y"], name="/branch/If", then_branch=then_g, else_branch=else_g)],
                            inits=[onh.from_array(f32(np.ones((2, 3))), "W"), onh.from_array(f32([0.5, -0.5]), "b"), cond]),
        "unsupported", "decode", "If node with subgraph attributes")
    body = oh.make_graph([oh.make_node("Identity", ["c_in"], ["c_out"])], "body",
                         [oh.make_tensor_value_info("i", TensorProto.INT64, []), oh.make_tensor_value_info("c_in", TensorProto.BOOL, [])],
                         [oh.make_tensor_value_info("c_out", TensorProto.BOOL, [])])
    put("loop_node.onnx", mlp(nodes=[oh.make_node("Loop", ["", "cond"], [], name="/loop/Loop", body=body),
                                     oh.make_node("Gemm", ["x", "W", "b"], ["h"], name="/fc/Gemm", transB=1),
                                     oh.make_node("Relu", ["h"], ["y"], name="/act/Relu")],
                              inits=[onh.from_array(f32(np.ones((2, 3))), "W"), onh.from_array(f32([0.5, -0.5]), "b"), cond]),
        "unsupported", "decode", "Loop node with a body graph")
    put("no_outputs.onnx", mlp(outputs=[]), "format", "decode", "graph without outputs")
    nog = onnx.ModelProto(ir_version=7)
    nog.opset_import.add().version = 13
    put("no_graph.onnx", nog, "format", "decode", "model without a graph")
    seq = mlp(inputs=[oh.make_tensor_sequence_value_info("x", TensorProto.FLOAT, None)])
    put("sequence_input.onnx", seq, "unsupported", "decode", "sequence-typed graph input")

    # Valid files the stage builder must refuse.
    put("conv.onnx", mlp(nodes=[oh.make_node("Conv", ["x", "W"], ["y"], name="/conv/Conv")]),
        "unsupported", "stages", "Conv is not an MLP operator")
    put("gelu_erf.onnx", mlp(nodes=[oh.make_node("Gemm", ["x", "W", "b"], ["h"], name="/fc/Gemm", transB=1),
                                    oh.make_node("Erf", ["h"], ["y"], name="/act/Erf")]),
        "unsupported", "stages", "Erf from a decomposed GELU")
    put("softmax_batch.onnx", mlp(nodes=[oh.make_node("Gemm", ["x", "W", "b"], ["h"], name="/fc/Gemm", transB=1),
                                         oh.make_node("Softmax", ["h"], ["y"], name="/sm/Softmax", axis=0)]),
        "unsupported", "stages", "Softmax over the batch axis")
    put("matmul_mismatch.onnx", mlp(nodes=[oh.make_node("MatMul", ["x", "W"], ["y"], name="/fc/MatMul")]),
        "format", "stages", "MatMul weight (2, 3) does not fit input width 3")

    with open(os.path.join(OUT, "manifest.json"), "w") as fh:
        json.dump({"generator": "testdata/gen/onnx_malformed.py", "onnx": onnx.__version__, "numpy": np.__version__,
                   "files": manifest}, fh, indent=1, sort_keys=True)
        fh.write("\n")
    print(len(manifest), "files")


if __name__ == "__main__":
    main()
