"""Outside references for kith's --metric cosine, from scikit-learn 1.2 (Debian's python3-sklearn),
on scikit-learn's bundled digits data (sklearn.datasets.load_digits).

Modes:
  write DIR N SEED     the first N digits rows as DIR/plain.csv, as DIR/scaled.csv (each row
                       multiplied by its own random positive factor, a power of two 2^u with u
                       uniform in -4..4, seeded, so the scaling is exact in floating point) and as
                       DIR/unit.csv (the rows divided by their length, %.17g); all with an id
                       column and a text "digit" tag column
  trust CSV MAP K      sklearn.manifold.trustworthiness(X, MAP, n_neighbors=K, metric='cosine'),
                       X the feature columns of CSV, MAP a kith .npy layout
  compare A B          two kith .npy layouts: the largest coordinate difference divided by the
                       root-mean-square coordinate of A, and whether the bytes are equal (1 or 0)
  procrustes A B       scipy.spatial.procrustes disparity of two kith .npy layouts (0 = the same
                       shape up to shift, scale, rotation and mirroring)
"""
import sys

import numpy as np
from sklearn.datasets import load_digits
from sklearn.manifold import trustworthiness


def write_csv(path, x, digits):
    with open(path, "w") as f:
        f.write("id,digit," + ",".join("p%d" % c for c in range(x.shape[1])) + "\n")
        for i, row in enumerate(x):
            f.write("r%d,d%d," % (i + 1, digits[i]) + ",".join("%.17g" % v for v in row) + "\n")


def features(path):
    return np.loadtxt(path, delimiter=",", skiprows=1, usecols=range(2, 66), dtype=np.float64)


def main():
    mode = sys.argv[1]
    if mode == "write":
        folder, n, seed = sys.argv[2], int(sys.argv[3]), int(sys.argv[4])
        d = load_digits()
        x, y = d.data[:n].astype(np.float64), d.target[:n]
        factors = 2.0 ** np.random.default_rng(seed).integers(-4, 5, size=(n, 1))
        write_csv(folder + "/plain.csv", x, y)
        write_csv(folder + "/scaled.csv", x * factors, y)
        write_csv(folder + "/unit.csv", x / np.linalg.norm(x, axis=1, keepdims=True), y)
    elif mode == "trust":
        x, m, k = features(sys.argv[2]), np.load(sys.argv[3]), int(sys.argv[4])
        print(repr(float(trustworthiness(x, m, n_neighbors=k, metric="cosine"))))
    elif mode == "compare":
        a, b = np.load(sys.argv[2]), np.load(sys.argv[3])
        rms = float(np.sqrt(np.mean(a * a)))
        print(repr(float(np.max(np.abs(a - b)) / rms)), int(a.tobytes() == b.tobytes()))
    elif mode == "procrustes":
        from scipy.spatial import procrustes
        print(repr(float(procrustes(np.load(sys.argv[2]), np.load(sys.argv[3]))[2])))
    else:
        sys.exit("unknown mode " + mode)


if __name__ == "__main__":
    main()
