#!/usr/bin/env python3
"""Outside reference for kith's .npy reader: NumPy itself (numpy.lib.format.write_array, the
library that defines the format) writes arrays in every layout kith must read or refuse.
usage: write_npy.py OUT_FOLDER
Prints one line per file: NAME ROWS COLS V1 V2 ... (values as repr, which round-trips float64;
float32 files print the float32 value widened to float64), or NAME refused for layouts kith
must reject."""
import os
import sys

import numpy as np

out = sys.argv[1]
rng = np.random.default_rng(20261201)


def save(name, array, version=None, expect_ok=True):
    with open(os.path.join(out, name), "wb") as f:
        np.lib.format.write_array(f, array, version=version)
    if not expect_ok:
        print(name, "refused")
        return
    a2 = array.reshape(array.shape[0], -1) if array.ndim == 2 else array.reshape(-1, 1)
    values = " ".join(repr(float(v)) for v in a2.astype(np.float64).ravel(order="C"))
    print(name, a2.shape[0], a2.shape[1], values)


save("f8_v1.npy", rng.normal(size=(7, 5)) * 1e3, version=(1, 0))
save("f4_v2.npy", rng.normal(size=(4, 3)).astype(np.float32), version=(2, 0))
save("f8_v3_1d.npy", rng.uniform(-1, 1, size=6), version=(3, 0))
save("f8_default.npy", np.array([[1e-300, -0.0], [5e-324, 1e100], [3.0, 4.5]]))
# Features larger than 1e100 in size are refused: squared distances would overflow.
save("f8_huge.npy", np.array([[1.0, 2.0], [3.0, 1.7976931348623157e308]]), expect_ok=False)
# np.save writes a C-ordered copy of a transposed view too; check the plain path of that.
save("f8_transposed_copy.npy", np.ascontiguousarray(rng.normal(size=(3, 4)).T))
save("f8_fortran.npy", np.asfortranarray(rng.normal(size=(3, 4))), expect_ok=False)
save("f8_big_endian.npy", rng.normal(size=(3, 2)).astype(">f8"), expect_ok=False)
save("i8.npy", np.arange(6, dtype=np.int64).reshape(3, 2), expect_ok=False)
save("f2.npy", np.ones((3, 2), dtype=np.float16), expect_ok=False)
