"""Reference for kith's suspect ranking (tests/test_analysis_suspects.cpp).

Source: scikit-learn's bundled digits data (sklearn.datasets.load_digits, 1797 8x8 pictures of
handwritten digits, 64 features) with 2% of the labels flipped at random to another digit
(numpy RandomState(seed)). The outside reference is scikit-learn's KNeighborsClassifier
(default k = 5) with out-of-fold predictions from sklearn.model_selection.cross_val_predict
(5-fold stratified): an item is flagged when its out-of-fold prediction differs from its
(possibly flipped) label. We also rank by the out-of-fold probability of the given label
(lowest first) and take the top 2%, to compare rankings of the same length.

usage: digits_suspects.py OUT_DIR [SEED]
writes OUT_DIR/digits.csv (id,label,p0..p63) and OUT_DIR/flipped.txt (one 0/1 per item),
prints one line: n flipped ref_set_precision ref_set_recall ref_top_precision ref_top_recall
"""
import os
import sys

import numpy as np
from sklearn.datasets import load_digits
from sklearn.model_selection import cross_val_predict
from sklearn.neighbors import KNeighborsClassifier

out_dir = sys.argv[1]
seed = int(sys.argv[2]) if len(sys.argv) > 2 else 7
x, y = load_digits(return_X_y=True)
n = len(y)
rng = np.random.RandomState(seed)
m = int(round(0.02 * n))
flip = rng.choice(n, size=m, replace=False)
noisy = y.copy()
for i in flip:
    noisy[i] = (y[i] + rng.randint(1, 10)) % 10  # a different digit
flipped = np.zeros(n, dtype=int)
flipped[flip] = 1

with open(os.path.join(out_dir, "digits.csv"), "w") as f:
    f.write("id,digit," + ",".join("p%d" % j for j in range(x.shape[1])) + "\n")
    for i in range(n):
        f.write("item%04d,d%d,%s\n" % (i, noisy[i], ",".join("%g" % v for v in x[i])))
with open(os.path.join(out_dir, "flipped.txt"), "w") as f:
    f.write("\n".join(str(v) for v in flipped) + "\n")

knn = KNeighborsClassifier()
pred = cross_val_predict(knn, x, noisy)
flag = pred != noisy
hit = np.sum(flag & (flipped == 1))
set_precision = hit / max(1, np.sum(flag))
set_recall = hit / m

proba = cross_val_predict(knn, x, noisy, method="predict_proba")
p_given = proba[np.arange(n), noisy]
top = np.argsort(p_given, kind="stable")[:m]
top_hit = np.sum(flipped[top])
print(n, m, "%.6f %.6f %.6f %.6f" % (set_precision, set_recall, top_hit / m, top_hit / m))
