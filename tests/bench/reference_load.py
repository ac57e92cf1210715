#!/usr/bin/env python3
"""Reference reader for bench_load: numpy.loadtxt (NumPy 1.24, Debian 12) on the same CSV.
usage: reference_load.py FILE RUNS  -> prints "median_wall median_cpu sum_of_values"."""
import statistics
import sys
import time

import numpy as np

path, runs = sys.argv[1], int(sys.argv[2])
with open(path) as f:
    cols = f.readline().count(",")
walls, cpus, total = [], [], 0.0
for _ in range(runs):
    w0, c0 = time.perf_counter(), time.process_time()
    x = np.loadtxt(path, delimiter=",", skiprows=1, usecols=range(1, cols + 1), dtype=np.float64)
    walls.append(time.perf_counter() - w0)
    cpus.append(time.process_time() - c0)
    total = float(x.sum())
print(statistics.median(walls), statistics.median(cpus), repr(total))
