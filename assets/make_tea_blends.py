#!/usr/bin/env python3
"""Writes assets/tea_blends.csv: kith's small bundled sample collection, 300 invented tea blends
of an imaginary blending house, each with twelve tasting and brewing measures (features) and a
name, family and origin (tags). Invented data in a scenario of our own: six families with their
own typical profile plus per-blend variation, a handful of blends filed under the wrong family
(so suspect checks have something to find), and some names holding commas and quotes (so the
file exercises CSV quoting). Deterministic: rerun with /usr/bin/python3 assets/make_tea_blends.py."""
import csv
import os
import random

rng = random.Random(4242)
FEATURES = ["steep_minutes", "water_temp_c", "caffeine_mg", "astringency", "sweetness", "floral", "smoky",
            "malty", "grassy", "citrus", "earthy", "body"]
# Typical profile per family (invented): steep, temp, caffeine, then 0-10 tasting scores.
FAMILIES = {
    "green":   [2.5, 78, 30, 4, 4, 3, 0.5, 1, 8, 3, 2, 3],
    "black":   [4.0, 96, 55, 6, 3, 2, 1.5, 8, 1, 2, 3, 8],
    "oolong":  [3.5, 90, 40, 3, 6, 7, 2, 4, 3, 3, 3, 6],
    "white":   [4.5, 80, 20, 2, 7, 6, 0, 1, 4, 2, 1, 3],
    "smoked":  [4.0, 97, 50, 6, 2, 1, 9, 6, 1, 1, 6, 8],
    "herbal":  [6.0, 99, 0, 1, 5, 5, 0.5, 0.5, 5, 7, 3, 2],
}
SPREAD = [0.6, 3, 8, 1.2, 1.2, 1.2, 0.8, 1.2, 1.2, 1.2, 1.2, 1.2]
ORIGINS = ["Carrow Hills", "Lowmere", "Isle of Tavin", "Brackenford", "Sallow Coast", "Upper Quell"]
WORDS_A = ["Harbour", "Lantern", "Quiet", "Copper", "Morning", "Ember", "Juniper", "Orchard", "Velvet", "Drift",
           "Meadow", "Cinder", "Willow", "Saffron", "Tidal", "Hollow", "Amber", "Frost", "Garden", "Kettle"]
WORDS_B = ["Dusk", "Steps", "Field", "Fold", "Mist", "Hearth", "Path", "Gate", "Bloom", "Reed", "Stone", "Cup",
           "Thread", "Lane", "Bell", "Moss", "Glow", "Shore", "Knot", "Leaf"]

rows, names = [], set()
per_family = 50
for family, centre in FAMILIES.items():
    for k in range(per_family):
        while True:
            name = rng.choice(WORDS_A) + " " + rng.choice(WORDS_B)
            if rng.random() < 0.06:
                name += ", late harvest"
            if rng.random() < 0.03:
                name = 'The "' + name + '"'
            if name not in names:
                break
        names.add(name)
        values = []
        for j, (c, s) in enumerate(zip(centre, SPREAD)):
            v = rng.gauss(c, s)
            if j >= 3:
                v = min(10.0, max(0.0, v))
            values.append(v)
        values[2] = max(0.0, values[2])  # caffeine
        filed_under = family
        if rng.random() < 0.02:  # mislabelled in the house catalogue
            filed_under = rng.choice([f for f in FAMILIES if f != family])
        rows.append([name, filed_under, rng.choice(ORIGINS)] + values)
rng.shuffle(rows)

out = os.path.join(os.path.dirname(os.path.abspath(__file__)), "tea_blends.csv")
with open(out, "w", newline="", encoding="utf-8") as f:
    w = csv.writer(f, lineterminator="\n")
    w.writerow(["id", "name", "family", "origin"] + FEATURES)
    for i, r in enumerate(rows):
        fmt = [("%.1f" if j < 2 else "%.0f" if j == 2 else "%.2f") % v for j, v in enumerate(r[3:])]
        w.writerow(["blend-%03d" % (i + 1)] + r[:3] + fmt)
print("wrote", out, len(rows), "blends")
