"""kith's solver vs scikit-learn 1.2 TSNE(method='barnes_hut'), side by side in one run.

Usage (from the repository root, after building):
  /usr/bin/python3 tests/bench/bench_solver.py [--build build] [--skip-100k] [--skip-sklearn-10k]

Same data, 1000 iterations, 3-D, dof = 2 (scikit-learn fixes dof = max(dims - 1, 1) = 2), perplexity
30, theta/angle 0.5, learning rate 'auto' (the same step in both, see solver/fit/schedule.h), PCA start.
Data: digits (sklearn.datasets.load_digits, 1797 x 64); a 10,000 x 50 Gaussian mixture (10
centres, numpy seed 0); a 100,000 x 50 mixture (kith only). Reported: wall time and peak memory
(both from /usr/bin/time -v of each run), KL(P||Q) of each final map computed by kith with the
same P for both maps (k = 90 neighbours, exact Q up to 20,000 items, Barnes-Hut above),
trustworthiness (sklearn.manifold.trustworthiness, k = 5) on a fixed 5,000-item subsample (numpy
seed 1), and kith's iterations per second at N = 1k, 10k, 100k. Prints a Markdown table.
"""
import argparse
import json
import os
import re
import subprocess
import sys
import tempfile
import time

import numpy as np
from sklearn.datasets import load_digits
from sklearn.manifold import trustworthiness

HERE = os.path.dirname(os.path.abspath(__file__))


def timed(cmd):
    """Runs cmd under /usr/bin/time -v; returns (stdout, wall seconds, peak RSS in MB)."""
    p = subprocess.run(["/usr/bin/time", "-v"] + cmd, capture_output=True, text=True)
    if p.returncode != 0:
        sys.exit("failed: %s\n%s" % (" ".join(cmd), p.stderr[-2000:]))
    wall = re.search(r"Elapsed \(wall clock\) time \(h:mm:ss or m:ss\): (\S+)", p.stderr).group(1)
    parts = [float(x) for x in wall.split(":")]
    seconds = sum(v * 60 ** i for i, v in enumerate(reversed(parts)))
    rss = int(re.search(r"Maximum resident set size \(kbytes\): (\d+)", p.stderr).group(1)) / 1024.0
    return p.stdout, seconds, rss


def mixture(n, f, seed):
    rng = np.random.default_rng(seed)
    centres = 4.0 * rng.standard_normal((10, f))
    return centres[np.arange(n) % 10] + rng.standard_normal((n, f))


SKLEARN_RUN = r"""
import sys, numpy as np
from sklearn.manifold import TSNE
x = np.load(sys.argv[1])
y = TSNE(n_components=3, method='barnes_hut', angle=0.5, perplexity=30.0, n_iter=1000, init='pca',
         learning_rate='auto', random_state=0).fit_transform(x)
np.save(sys.argv[2], y.astype(np.float64))
"""


def trust5000(x, y):
    idx = np.sort(np.random.default_rng(1).choice(len(x), size=min(5000, len(x)), replace=False))
    return trustworthiness(x[idx], y[idx], n_neighbors=5)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--build", default="build")
    ap.add_argument("--skip-100k", action="store_true")
    ap.add_argument("--skip-sklearn-10k", action="store_true")
    args = ap.parse_args()
    driver = os.path.join(args.build, "tests", "bench_solver")
    tmp = tempfile.mkdtemp(prefix="kith-bench-")
    sk_script = os.path.join(tmp, "sk.py")
    open(sk_script, "w").write(SKLEARN_RUN)
    sets = [("digits 1797x64", load_digits().data.astype(np.float64), True),
            ("mixture 10,000x50", mixture(10000, 50, 0), not args.skip_sklearn_10k)]
    if not args.skip_100k:
        sets.append(("mixture 100,000x50", mixture(100000, 50, 0), False))
    rows = []
    print("| data | program | wall s | peak MB | KL (same P) | trustworthiness k=5 (5,000 sample) |", flush=True)
    print("|---|---|---|---|---|---|", flush=True)
    for name, x, with_sklearn in sets:
        xf = os.path.join(tmp, "x.npy")
        np.save(xf, x)
        runs = [("kith", [driver, "fit", xf, os.path.join(tmp, "kith.npy"), "1000", "3", "2", "0"], "kith.npy")]
        if with_sklearn:
            runs.append(("scikit-learn", ["/usr/bin/python3", sk_script, xf, os.path.join(tmp, "sk.npy")], "sk.npy"))
        results = {}
        for prog, cmd, out in runs:
            _, wall, rss = timed(cmd)
            y = np.load(os.path.join(tmp, out))
            kl = json.loads(subprocess.run([driver, "kl", xf, os.path.join(tmp, out), "2"], capture_output=True,
                                           text=True, check=True).stdout)["kl"]
            t = trust5000(x, y)
            results[prog] = (wall, rss, kl, t)
            print("| %s | %s | %.1f | %.0f | %.4f | %.4f |" % (name, prog, wall, rss, kl, t), flush=True)
        if "scikit-learn" in results:
            k, s = results["kith"], results["scikit-learn"]
            print("| %s | ratio sklearn/kith | %.1fx | %.2fx | KL kith/sklearn %.3f | trust diff %+.4f |"
                  % (name, s[0] / k[0], s[1] / k[1], k[2] / s[2], k[3] - s[3]), flush=True)
    print("\nkith iterations per second (3-D, dof 2, theta 0.5, after 300 schedule steps):", flush=True)
    print("| N | threads | it/s (wall) | it/s per CPU second |", flush=True)
    print("|---|---|---|---|", flush=True)
    for n in ([1000, 10000] + ([] if args.skip_100k else [100000])):
        for threads in (1, 2):
            r = json.loads(subprocess.run([driver, "rate", str(n), str(threads), "3", "2"], capture_output=True,
                                          text=True, check=True).stdout)
            print("| %d | %d | %.1f | %.1f |" % (n, threads, r["iterations_per_second"], r["iterations_per_cpu_second"]),
                  flush=True)


if __name__ == "__main__":
    main()
