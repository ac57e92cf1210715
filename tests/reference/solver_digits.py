"""Outside references for kith's solver, from scikit-learn 1.2 (Debian's python3-sklearn).

Modes (text in, text out; files are whitespace-separated numbers, one row per line):
  data                          print sklearn.datasets.load_digits().data (1797 x 64)
  joint_p DIST IDX PERPLEXITY   sklearn.manifold._t_sne._joint_probabilities_nn on the given
                                neighbours (IDX: N x k indices, DIST: N x k squared distances);
                                prints "i j p_ij" for every stored entry
  trust FEATURES MAP K          sklearn.manifold.trustworthiness(FEATURES, MAP, n_neighbors=K)
  tsne FEATURES INIT DOF ITERS  sklearn.manifold.TSNE(n_components=cols(INIT), method='barnes_hut',
                                init=INIT, learning_rate='auto', perplexity=30, n_iter=ITERS);
                                prints the map. DOF must equal max(cols-1, 1): scikit-learn fixes it.
  kl FEATURES MAP DOF           KL(P||Q) with scikit-learn's own P (k = int(3*30+1) neighbours,
                                _joint_probabilities_nn) and the exact Student-t Q with DOF
  knn_trust FEATURES MAP K      the same as trust (alias kept for clarity in tests)
"""
import sys

import numpy as np
from scipy.sparse import csr_matrix
from sklearn.datasets import load_digits
from sklearn.manifold import TSNE, trustworthiness
from sklearn.manifold._t_sne import _joint_probabilities_nn
from sklearn.neighbors import NearestNeighbors


def load(path):
    return np.atleast_2d(np.loadtxt(path, dtype=np.float64))


def sklearn_p(x, perplexity=30.0):
    n = x.shape[0]
    k = min(n - 1, int(3.0 * perplexity + 1))
    d = NearestNeighbors(n_neighbors=k).fit(x).kneighbors_graph(mode="distance")
    d.data **= 2
    return _joint_probabilities_nn(d, perplexity, 0)


def main():
    mode = sys.argv[1]
    if mode == "data":
        np.savetxt(sys.stdout, load_digits().data, fmt="%g")
    elif mode == "joint_p":
        dist, idx, perplexity = load(sys.argv[2]), load(sys.argv[3]).astype(np.int64), float(sys.argv[4])
        n, k = idx.shape
        d = csr_matrix((dist.ravel(), idx.ravel(), np.arange(0, n * k + 1, k)), shape=(n, n))
        p = _joint_probabilities_nn(d, perplexity, 0).tocoo()
        for i, j, v in zip(p.row, p.col, p.data):
            print(i, j, repr(float(v)))
    elif mode in ("trust", "knn_trust"):
        print(repr(float(trustworthiness(load(sys.argv[2]), load(sys.argv[3]), n_neighbors=int(sys.argv[4])))))
    elif mode == "tsne":
        x, init, dof, iters = load(sys.argv[2]), load(sys.argv[3]), float(sys.argv[4]), int(sys.argv[5])
        assert dof == max(init.shape[1] - 1, 1), "scikit-learn fixes dof = max(dims - 1, 1)"
        t = TSNE(n_components=init.shape[1], method="barnes_hut", init=init, learning_rate="auto",
                 perplexity=30.0, n_iter=iters, random_state=0)
        y = t.fit_transform(x)
        np.savetxt(sys.stdout, y, fmt="%.17g")
    elif mode == "kl":
        x, y, dof = load(sys.argv[2]), load(sys.argv[3]), float(sys.argv[4])
        p = sklearn_p(x).toarray()
        d2 = ((y[:, None, :] - y[None, :, :]) ** 2).sum(-1)
        w = (1.0 + d2 / dof) ** (-(dof + 1.0) / 2.0)
        np.fill_diagonal(w, 0.0)
        q = w / w.sum()
        mask = p > 0
        print(repr(float(np.sum(p[mask] * np.log(p[mask] / q[mask])))))
    else:
        sys.exit("unknown mode " + mode)


if __name__ == "__main__":
    main()
