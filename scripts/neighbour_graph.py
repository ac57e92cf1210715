#!/usr/bin/python3
"""Exact k-nearest-neighbour graph of a feature matrix on Dask, for `kith ... --neighbours GRAPH`.

    /usr/bin/python3 scripts/neighbour_graph.py IN.npy|SHARDS_DIR -o GRAPH [--k K]
        [--metric euclidean|cosine] [--scheduler ADDRESS] [--workers N] [--block-rows R]

IN.npy is an (N, D) float array; SHARDS_DIR is a folder of such arrays (*.npy, same D), taken in
the order of their names and stacked, as if they were one array. The rows are cut into blocks of
R rows; one task per pair of blocks finds, for every row of either, its nearest rows in the
other (squared distances from one matrix product, |a|^2 + |b|^2 - 2 a.b, a few spare
candidates kept, then recomputed as sum (a - b)^2 in float64 so rounding in the product form
cannot change the answer); one task per block merges its row of results. So the work is
(N / R)^2 / 2 independent tasks of R x R x D each, and each worker holds only a few blocks at once:
it runs on a LocalCluster on this machine by default, or on any running Dask scheduler
(--scheduler tcp://HOST:8786) whose workers can read the input path.

GRAPH is what kith reads:
  NAME-indices.npy  writes NAME-indices.npy (int64, (N, K): each row's neighbours' row numbers,
                    nearest first, the row itself left out) and NAME-distances.npy (float64,
                    (N, K): their distances, not squared);
  NAME.csv          writes id,neighbour,distance, one line per edge, ids being row numbers from
                    0 (as kith numbers the rows of a .npy given without --tags).
An existing output is never replaced: the script stops with exit code 2 before any work.
Under --metric cosine each row is first divided by its length (a row of zeros is refused) and the
distances are between those unit rows, as kith's own --metric cosine.

Exit codes: 0 written, 1 failed (nothing written), 2 bad usage or an output that exists,
3 bad input.
"""
import argparse
import os
import sys
import tempfile

# One BLAS thread per process: each Dask worker is already one process on one core, and more
# threads per worker only compete for the same cores (set before numpy loads its BLAS).
for _name in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_name, "1")

import numpy as np  # noqa: E402

SPARE = 8  # candidates kept beyond k + 1 per block before the exact recomputation


class BadInput(Exception):
    pass


def shards_of(path):
    """[(file, rows)] in row order, and D."""
    if os.path.isdir(path):
        files = sorted(os.path.join(path, f) for f in os.listdir(path) if f.lower().endswith(".npy"))
        if not files:
            raise BadInput("%s: expected .npy files in this folder, found none" % path)
    else:
        files = [path]
    shards, dims = [], None
    for f in files:
        try:
            a = np.load(f, mmap_mode="r", allow_pickle=False)
        except (OSError, ValueError) as e:
            raise BadInput("%s: expected a .npy array: %s" % (f, e))
        if a.ndim != 2 or a.dtype.kind != "f":
            raise BadInput("%s: expected a 2-D float array (rows, features), found shape %s of %s" % (f, a.shape, a.dtype))
        if dims is not None and a.shape[1] != dims:
            raise BadInput("%s: expected %d columns, as %s has, found %d" % (f, dims, files[0], a.shape[1]))
        dims = a.shape[1]
        shards.append((f, a.shape[0]))
    return shards, dims


def blocks_of(shards, block_rows):
    """[(file, start, stop, first_row)]: blocks of at most block_rows rows, none across shards."""
    out, row = [], 0
    for f, rows in shards:
        for s in range(0, rows, block_rows):
            e = min(rows, s + block_rows)
            out.append((f, s, e, row + s))
        row += rows
    return out


def load_block(f, start, stop, metric):
    x = np.array(np.load(f, mmap_mode="r", allow_pickle=False)[start:stop], dtype=np.float64)
    if not np.all(np.isfinite(x)):
        r = int(np.argwhere(~np.isfinite(x))[0][0])
        raise BadInput("%s: row %d holds a value that is not a finite number" % (f, start + r))
    if metric == "cosine":
        length = np.sqrt((x * x).sum(axis=1))
        if np.any(length == 0):
            r = int(np.argmax(length == 0))
            raise BadInput("%s: row %d has no direction (all its features are 0), so it has no cosine distance"
                           % (f, start + r))
        x = x / length[:, None]
    return x


def exact_d2(q, r, cand):
    """sum (q_i - r_j)^2 in float64 for each row i of q and each j in cand[i], column by column so
    the temporaries stay (len(q), keep) rather than (len(q), keep, D)."""
    d2 = np.zeros(cand.shape)
    for c in range(q.shape[1]):
        diff = q[:, c][:, None] - r[:, c][cand]
        d2 += diff * diff
    return d2


def nearest_of(d, q, r, r0, keep):
    """For each row of q, its `keep` nearest rows of r (rows r0..) by the approximate squared
    distances d, with exact squared distances: (indices, d2)."""
    keep = min(keep, r.shape[0])
    if keep < r.shape[0]:
        cand = np.argpartition(d, keep - 1, axis=1)[:, :keep]
    else:
        cand = np.tile(np.arange(r.shape[0]), (q.shape[0], 1))
    return cand + r0, exact_d2(q, r, cand)


def nearest_between(a, a0, b, b0, keep):
    """Both directions of one pair of blocks from one matrix product: (a's nearest in b, b's
    nearest in a); for a block with itself the second is None."""
    d = (a * a).sum(1)[:, None] + (b * b).sum(1)[None, :] - 2.0 * (a @ b.T)
    forward = nearest_of(d, a, b, b0, keep)
    backward = None if a0 == b0 else nearest_of(d.T, b, a, a0, keep)
    return forward, backward


def merge_rows(parts, q0, k):
    """Each row's k nearest others from the blocks' candidates, nearest first, ties by row."""
    idx = np.concatenate([p[0] for p in parts], axis=1)
    d2 = np.concatenate([p[1] for p in parts], axis=1)
    rows = q0 + np.arange(idx.shape[0])
    d2 = np.where(idx == rows[:, None], np.inf, d2)  # the row itself
    order = np.lexsort((idx, d2), axis=1)[:, :k]
    take = np.take_along_axis
    return take(idx, order, axis=1), np.sqrt(take(d2, order, axis=1))


def compute(blocks, k, metric, client):
    """One task per unordered pair of blocks (the product serves both directions), one per block
    to merge its candidates."""
    import dask

    loaded = [dask.delayed(load_block)(f, s, e, metric) for f, s, e, _ in blocks]
    keep = k + 1 + SPARE
    parts = [[] for _ in blocks]
    for i, (_, _, _, a0) in enumerate(blocks):
        for j in range(i, len(blocks)):
            b0 = blocks[j][3]
            both = dask.delayed(nearest_between, nout=2)(loaded[i], a0, loaded[j], b0, keep)
            parts[i].append(both[0])
            if j != i:
                parts[j].append(both[1])
    merged = [dask.delayed(merge_rows)(parts[i], blocks[i][3], k) for i in range(len(blocks))]
    results = client.compute(merged, sync=True)
    return np.concatenate([r[0] for r in results]), np.concatenate([r[1] for r in results])


def write_new(path, write):
    """Writes PATH through a temporary file beside it, and links it in place only if PATH still
    does not exist (os.link refuses an existing name), so nothing is ever written over."""
    folder = os.path.dirname(os.path.abspath(path))
    fd, tmp = tempfile.mkstemp(prefix=".neighbour-graph-", dir=folder)
    try:
        with os.fdopen(fd, "wb") as f:
            write(f)
            f.flush()
            os.fsync(f.fileno())
        os.link(tmp, path)
    finally:
        os.unlink(tmp)


def outputs_of(graph):
    if graph.lower().endswith(".csv"):
        return [graph]
    if graph.lower().endswith("-indices.npy"):
        return [graph, graph[: -len("-indices.npy")] + "-distances.npy"]
    return None


def main(argv):
    ap = argparse.ArgumentParser(
        prog="neighbour_graph.py",
        description="Exact k-nearest-neighbour graph on Dask, written as kith's --neighbours reads it.")
    ap.add_argument("input", metavar="IN.npy|SHARDS_DIR", help="an (N, D) .npy array, or a folder of them")
    ap.add_argument("-o", "--output", required=True, metavar="GRAPH",
                    help="NAME-indices.npy (and NAME-distances.npy beside it), or NAME.csv")
    ap.add_argument("--k", type=int, default=90,
                    help="neighbours per item (default: 90, what kith's default perplexity 30 uses)")
    ap.add_argument("--metric", choices=["euclidean", "cosine"], default="euclidean",
                    help="euclidean (straight-line) or cosine (rows scaled to length 1 first) (default: euclidean)")
    ap.add_argument("--scheduler", metavar="ADDRESS", help="a running Dask scheduler (default: a LocalCluster here)")
    ap.add_argument("--workers", type=int, default=None,
                    help="LocalCluster worker processes, one thread each (default: the number of cores)")
    ap.add_argument("--block-rows", type=int, default=1024, help="rows per block (default: 1024)")
    a = ap.parse_args(argv)

    def usage(message):
        print("neighbour_graph.py: " + message, file=sys.stderr)
        return 2

    outputs = outputs_of(a.output)
    if outputs is None:
        return usage("the output must be NAME-indices.npy or NAME.csv, got '%s'" % a.output)
    for o in outputs:
        if os.path.lexists(o):
            return usage("%s exists; the graph is never written over an existing file (remove it or choose another name)" % o)
    if a.k < 1 or a.block_rows < 1 or (a.workers is not None and a.workers < 1):
        return usage("--k, --block-rows and --workers must be at least 1")
    try:
        shards, _ = shards_of(a.input)
        n = sum(rows for _, rows in shards)
        if a.k > n - 1:
            raise BadInput("%s: %d rows have at most %d neighbours each, --k asks for %d" % (a.input, n, n - 1, a.k))
        blocks = blocks_of(shards, a.block_rows)

        from dask.distributed import Client, LocalCluster

        if a.scheduler:
            client, cluster = Client(a.scheduler), None
        else:
            cluster = LocalCluster(n_workers=a.workers or os.cpu_count(), threads_per_worker=1,
                                   processes=True, dashboard_address=None)
            client = Client(cluster)
        try:
            index, distance = compute(blocks, a.k, a.metric, client)
        finally:
            client.close()
            if cluster is not None:
                cluster.close()
    except BadInput as e:
        print("neighbour_graph.py: %s" % e, file=sys.stderr)
        return 3

    try:
        if len(outputs) == 2:
            write_new(outputs[0], lambda f: np.save(f, index.astype(np.int64)))
            try:
                write_new(outputs[1], lambda f: np.save(f, distance.astype(np.float64)))
            except BaseException:
                os.unlink(outputs[0])
                raise
        else:
            def csv(f):
                f.write(b"id,neighbour,distance\n")
                for i in range(index.shape[0]):
                    f.write("".join("%d,%d,%r\n" % (i, j, float(d)) for j, d in zip(index[i], distance[i])).encode())
            write_new(outputs[0], csv)
    except OSError as e:
        print("neighbour_graph.py: could not write %s: %s (nothing written)" % (a.output, e), file=sys.stderr)
        return 1
    print("wrote %s: %d items, %d neighbours each, %s, %d blocks of up to %d rows" %
          (" and ".join(outputs), index.shape[0], a.k, a.metric, len(blocks), a.block_rows))
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
