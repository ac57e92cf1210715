"""Outside reference for kith's portable maths (tests/test_solver_portable_math.cpp), from numpy.

  portable_math_reference.py N SEED   N random arguments per function, one line each:
                                      name x [y] value   (repr, so every bit is kept)

numpy's exp, log, log1p, sin, cos, arctan, arctan2, cbrt, hypot and power on float64 (numpy
calls the C library or its own SIMD loops; either is accurate to about an ulp).
"""
import sys

import numpy as np


def main():
    n, seed = int(sys.argv[1]), int(sys.argv[2])
    rng = np.random.default_rng(seed)
    cases = {
        "exp": (np.exp, rng.uniform(-700, 700, n)),
        "log": (np.log, 10.0 ** rng.uniform(-300, 300, n)),
        "log1p": (np.log1p, np.concatenate([rng.uniform(-0.999, 10, n // 2), rng.uniform(-1e-9, 1e-9, n - n // 2)])),
        "sin": (np.sin, rng.uniform(-1000, 1000, n)),
        "cos": (np.cos, rng.uniform(-1000, 1000, n)),
        "atan": (np.arctan, rng.uniform(-50, 50, n)),
        "cbrt": (np.cbrt, (10.0 ** rng.uniform(-300, 300, n)) * rng.choice([-1.0, 1.0], n)),
    }
    for name, (f, x) in cases.items():
        for v, r in zip(x, f(x)):
            print(name, repr(float(v)), repr(float(r)))
    y, x = rng.uniform(-100, 100, n), rng.uniform(-100, 100, n)
    for a, b, r in zip(y, x, np.arctan2(y, x)):
        print("atan2", repr(float(a)), repr(float(b)), repr(float(r)))
    for a, b, r in zip(y, x, np.hypot(y, x)):
        print("hypot", repr(float(a)), repr(float(b)), repr(float(r)))
    base, power = rng.uniform(0, 1, n), rng.uniform(-8, 8, n)
    for a, b, r in zip(base, power, np.power(base, power)):
        print("pow", repr(float(a)), repr(float(b)), repr(float(r)))


if __name__ == "__main__":
    main()
