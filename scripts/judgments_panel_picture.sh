#!/bin/sh
# Makes docs/judgments-panel.png: the bundled tea blends as a session with invented judgments by
# three tasters (each answers "is the anchor more like this one or that one" by tea family, with
# their own share of slips, and some questions are asked again), opened under Xvfb with the
# Judgments panel showing. Run from the repository root after building (build/kith).
set -e
out=${1:-docs/judgments-panel.png}
dir=$(mktemp -d)
/usr/bin/python3 - "$dir/judgments.csv" <<'PY'
import csv, random, sys
rows = list(csv.DictReader(open("assets/tea_blends.csv")))
rng = random.Random(4)
tasters = [("Maren", 0.04), ("Joss", 0.12), ("Quill", 0.30)]  # invented people and slip rates
asked = []
out = open(sys.argv[1], "w", newline="")
w = csv.writer(out)
w.writerow(["anchor", "nearer", "farther", "person", "time", "kind"])
t = 1796119200
for k in range(360):
    person, slip = tasters[k % 3]
    if asked and rng.random() < 0.15:
        a, b, c = rng.choice(asked)  # asked again
    else:
        a = rng.choice(rows)
        b = rng.choice([r for r in rows if r["family"] == a["family"] and r is not a])
        c = rng.choice([r for r in rows if r["family"] != a["family"]])
        asked.append((a, b, c))
    near, far = (b, c) if rng.random() > slip else (c, b)
    t += rng.randint(3, 12)
    w.writerow([a["id"], near["id"], far["id"], person, t, "pair"])
PY
build/kith new assets/tea_blends.csv -o "$dir/tea.kith" --judgments "$dir/judgments.csv" >/dev/null
build/kith judge "$dir/tea.kith" --retract 7 >/dev/null
# Open the Judgments and Agreement panels; after a while set the balance between the features and
# the people (the Map panel's slider, through its own path) to 0, later to 3.5, so the chart shows
# the map honouring the judgments less, then more. Then hide the Map panel (its "hide" at the
# right of its heading, top of the right column) so the two panels get the column's height,
# choose a row of the list (ctrl+down steps through it) and leave the pointer over the menu bar.
cat > "$dir/script.txt" <<SCRIPT
5 key L
150 set blend 0
1200 set blend 3.5
1210 move 1248 42
1212 press left
1214 release left
2300 key ctrl+DOWN
2302 key ctrl+DOWN
2304 key ctrl+DOWN
2306 key ctrl+DOWN
2440 move 700 10
2450 shot $out
2451 quit
SCRIPT
xvfb-run -a -s '-screen 0 1280x800x24' build/kith open "$dir/tea.kith" --frames 2500 --script "$dir/script.txt"
echo "wrote $out"
rm -rf "$dir"
