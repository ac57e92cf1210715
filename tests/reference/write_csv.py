#!/usr/bin/env python3
"""Outside reference for kith's CSV/TSV reader: Python's csv module (standard library) writes
tables of awkward text (separators, quotes, line breaks, non-ASCII) with RFC 4180 quoting.
usage: write_csv.py OUT_FILE SEPARATOR(comma|tab) LINE_END(lf|crlf) SEED
Prints the rows it wrote as JSON (a list of lists of strings, header first)."""
import csv
import json
import random
import sys

path, sep_name, end_name, seed = sys.argv[1], sys.argv[2], sys.argv[3], int(sys.argv[4])
sep = "," if sep_name == "comma" else "\t"
end = "\n" if end_name == "lf" else "\r\n"
rng = random.Random(seed)
alphabet = ['a', 'b', 'Z', '7', ' ', ',', '\t', '"', '\n', '\r\n', 'é', '茶', '.', '-']


def text():
    n = rng.randint(0, 8)
    return "".join(rng.choice(alphabet) for _ in range(n))


columns = rng.randint(1, 6)
rows = [["col%d" % j for j in range(columns)]]
for _ in range(rng.randint(1, 40)):
    row = [text() for _ in range(columns)]
    if columns == 1 and row[0] == "":
        row[0] = "x"  # a lone empty field would be a blank line, which readers skip
    rows.append(row)
with open(path, "w", newline="", encoding="utf-8") as f:
    csv.writer(f, delimiter=sep, lineterminator=end, quoting=csv.QUOTE_MINIMAL).writerows(rows)
print(json.dumps(rows))
