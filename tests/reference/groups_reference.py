"""Reference data and scores for kith's groups (tests/test_analysis_groups.cpp).

usage:
  groups_reference.py blobs OUT.csv DIMS SEED   well-separated Gaussian blobs from
      sklearn.datasets.make_blobs (6 centres, standard deviation 1, centres in a box of
      +-40 drawn again until every pair is at least 12 standard deviations apart);
      writes id,truth,x,y[,z]
  groups_reference.py noise OUT.csv DIMS SEED   uniform noise in the unit cube (numpy), same layout
  groups_reference.py ari TRUTH.txt PRED.txt    prints sklearn.metrics.adjusted_rand_score
      (Hubert & Arabie 1985) of two label files (one integer per line; -1 = no group, kept as its
      own label so ungrouped items count against the score)
"""
import sys

import numpy as np


def write(path, points, truth):
    with open(path, "w") as f:
        f.write("id,truth," + ",".join("xyz"[: points.shape[1]]) + "\n")
        for i, (p, t) in enumerate(zip(points, truth)):
            f.write("b%d,g%d,%s\n" % (i, t, ",".join("%.17g" % v for v in p)))


mode = sys.argv[1]
if mode == "blobs":
    from sklearn.datasets import make_blobs

    dims, seed = int(sys.argv[3]), int(sys.argv[4])
    rng = np.random.RandomState(seed)
    while True:
        centres = rng.uniform(-40, 40, size=(6, dims))
        d = np.sqrt(((centres[:, None, :] - centres[None, :, :]) ** 2).sum(-1))
        if d[np.triu_indices(6, 1)].min() >= 12:
            break
    x, y = make_blobs(n_samples=1500, centers=centres, cluster_std=1.0, random_state=seed)
    write(sys.argv[2], x, y)
elif mode == "noise":
    dims, seed = int(sys.argv[3]), int(sys.argv[4])
    x = np.random.RandomState(seed).uniform(0, 1, size=(1500, dims))
    write(sys.argv[2], x, np.zeros(len(x), dtype=int))
elif mode == "ari":
    from sklearn.metrics import adjusted_rand_score

    a = np.loadtxt(sys.argv[2], dtype=int)
    b = np.loadtxt(sys.argv[3], dtype=int)
    print("%.6f" % adjusted_rand_score(a, b))
else:
    sys.exit("unknown mode " + mode)
