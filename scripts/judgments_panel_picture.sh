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
# Open the panel; after a while turn the blend (Map panel slider) down to 0, later up to about 3.5,
# so the chart shows the map honouring the judgments less, then more; choose a row of the list.
cat > "$dir/script.txt" <<SCRIPT
5 key L
150 move 1068 94
152 press left
155 move 1030 94
158 move 990 94
161 move 960 94
165 release left
480 move 1000 94
482 press left
485 move 1050 94
488 move 1092 94
492 release left
800 key ctrl+DOWN
802 key ctrl+DOWN
804 key ctrl+DOWN
806 key ctrl+DOWN
940 move 640 795
950 shot $out
951 quit
SCRIPT
xvfb-run -a -s '-screen 0 1280x800x24' build/kith open "$dir/tea.kith" --frames 1000 --script "$dir/script.txt"
echo "wrote $out"
rm -rf "$dir"
