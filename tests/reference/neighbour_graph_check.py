"""Outside checks for scripts/neighbour_graph.py and kith's --neighbours, from scikit-learn 1.2
(Debian's python3-sklearn: sklearn.neighbors.NearestNeighbors, algorithm='brute', the exact
search) and SciPy (scipy.spatial.procrustes).

Modes:
  write DIR N D SEED   invented features: N rows in D columns, 12 Gaussian clusters in a
                       40-dimensional subspace (a seeded random orthonormal 40 x D basis), so the
                       rows have rank 40 and kith's PCA to 50 dimensions keeps every distance;
                       written as DIR/x.npy and as three shards DIR/shards/part-0.npy .. part-2.npy
  graph X.npy G-indices.npy M
                       compares the graph's rows of a seeded sample of M rows with
                       NearestNeighbors(n_neighbors=k + 1) fitted on all of X (the row itself
                       dropped): prints the share of neighbour indices that agree, in order, and
                       the largest absolute difference of the distances
  procrustes A B       scipy.spatial.procrustes disparity of two kith .npy layouts (0 = the same
                       shape up to shift, scale, rotation and mirroring), and whether their bytes
                       are equal (1 or 0)
"""
import os
import sys

import numpy as np


def write(folder, n, d, seed):
    rng = np.random.default_rng(seed)
    basis, _ = np.linalg.qr(rng.normal(size=(d, 40)))  # D x 40, orthonormal columns
    centres = rng.normal(scale=4.0, size=(12, 40))
    label = rng.integers(0, 12, size=n)
    latent = centres[label] + rng.normal(size=(n, 40))
    x = latent @ basis.T
    np.save(os.path.join(folder, "x.npy"), x)
    os.makedirs(os.path.join(folder, "shards"), exist_ok=True)
    for s, part in enumerate(np.array_split(x, 3)):
        np.save(os.path.join(folder, "shards", "part-%d.npy" % s), part)


def check_graph(x_path, indices_path, sample):
    from sklearn.neighbors import NearestNeighbors

    x = np.load(x_path)
    idx = np.load(indices_path)
    dist = np.load(indices_path[: -len("-indices.npy")] + "-distances.npy")
    k = idx.shape[1]
    rows = np.sort(np.random.default_rng(5).choice(x.shape[0], size=min(sample, x.shape[0]), replace=False))
    d_ref, i_ref = NearestNeighbors(n_neighbors=k + 1, algorithm="brute").fit(x).kneighbors(x[rows])
    idx, dist = idx[rows], dist[rows]
    # Each row's nearest is itself (continuous invented data has no duplicate rows).
    i_ref, d_ref = i_ref[:, 1:], d_ref[:, 1:]
    print("%.6f %.3g" % ((idx == i_ref).mean(), np.abs(dist - d_ref).max()))


def procrustes(a, b):
    from scipy.spatial import procrustes as scipy_procrustes

    ya, yb = np.load(a), np.load(b)
    _, _, disparity = scipy_procrustes(ya, yb)
    with open(a, "rb") as fa, open(b, "rb") as fb:
        same = fa.read() == fb.read()
    print("%.6g %d" % (disparity, int(same)))


def main():
    mode = sys.argv[1]
    if mode == "write":
        write(sys.argv[2], int(sys.argv[3]), int(sys.argv[4]), int(sys.argv[5]))
    elif mode == "graph":
        check_graph(sys.argv[2], sys.argv[3], int(sys.argv[4]))
    elif mode == "procrustes":
        procrustes(sys.argv[2], sys.argv[3])
    else:
        sys.exit("unknown mode " + mode)


if __name__ == "__main__":
    main()
