#!/usr/bin/python3
"""Write the NPY fixtures of internal/npy with Debian's numpy.

Every dtype numpy writes for features and labels, in both byte orders,
in C and Fortran order, and the values each holds, in
testdata/npy/expected.json (with numpy's version). Run from the
repository root:

    /usr/bin/python3 testdata/gen/npy_fixtures.py
"""
import json
import os

import numpy as np

out = "testdata/npy"
os.makedirs(out, exist_ok=True)
base = np.array([[0, 1, 2], [3, 4, 5]])
cases = {}


def save(name, a):
    np.save(os.path.join(out, name + ".npy"), a)
    flat = a.flatten(order="C")
    if a.dtype.kind in "US":
        vals = [x.decode() if isinstance(x, bytes) else str(x) for x in flat]
    elif a.dtype.kind == "b":
        vals = [int(x) for x in flat]
    else:
        vals = [float(x) for x in flat]
    cases[name] = {"descr": a.dtype.str, "shape": list(a.shape), "fortran": bool(np.isfortran(a)), "values": vals}


for order in "<>":
    for t in ["f2", "f4", "f8", "i1", "i2", "i4", "i8", "u1", "u2", "u4", "u8"]:
        dt = np.dtype(order + t) if t[1] != "1" else np.dtype(t)
        a = (base - (3 if t[0] in "fi" else 0)).astype(dt)
        if t[0] == "f":
            a = a / 4
        name = "%s_%s" % (t, "le" if order == "<" else "be")
        if t[1] == "1" and order == ">":
            continue  # one-byte types have no byte order
        save(name, a)
    save("U_%s" % ("le" if order == "<" else "be"), np.array(["outer", "inner", "ring ü"], dtype=order + "U6"))
save("bool", np.array([[True, False, True], [False, False, True]]))
save("S", np.array([b"a", b"bc", b"def"]))
save("f8_fortran", np.asfortranarray((base / 2).astype("<f8")))
save("labels_i8", np.array([2, 0, 1, 1], dtype="<i8"))
# A sample in numpy's usual types: float32 features, int64 and string
# labels (trace.ReadNPY).
save("sample_x_f4", (np.arange(18).reshape(6, 3) / 8).astype("<f4"))
save("sample_y_i8", np.array([1, 0, 1, 0, 1, 0], dtype="<i8"))
save("sample_y_U", np.array(["outer", "inner"] * 3))
save("sample_y_b", np.array([True, False] * 3))

with open(os.path.join(out, "expected.json"), "w") as f:
    json.dump({"numpy": np.__version__, "cases": cases}, f, indent=1, sort_keys=True, ensure_ascii=False)
    f.write("\n")
