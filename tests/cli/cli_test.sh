#!/usr/bin/env bash
# End-to-end checks of `sliceplan optimize` (docs/interfaces.md): bad input exits
# with status 2, a message naming the field on stderr and nothing on stdout;
# good input prints the JSON result with the fields outside checks read.
# Usage: cli_test.sh SLICEPLAN_BINARY SOURCE_DIR
set -u
bin=$1
src=$2
bad=$src/tests/cli/bad
examples=$src/examples
passed=0
failed=0
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT

check() {  # NAME WANT_STATUS WANT_STDERR_PART ARGS...
  local name=$1 want=$2 part=$3
  shift 3
  "$bin" "$@" >"$tmp/out" 2>"$tmp/err"
  local got=$?
  local why=""
  [ "$got" -eq "$want" ] || why="exit status $got, want $want"
  if [ "$want" -ne 0 ]; then
    [ -s "$tmp/out" ] && why="$why; stdout not empty"
    grep -qF -- "$part" "$tmp/err" || why="$why; stderr lacks '$part'"
  fi
  if [ -z "$why" ]; then
    passed=$((passed + 1))
  else
    failed=$((failed + 1))
    echo "FAIL $name: $why"
    sed 's/^/  stderr: /' "$tmp/err"
  fi
}

# Files that are no query file: refused by name at once (a device never
# ends, a directory has no size).
check query_device 2 "the query file: /dev/zero is not a regular file" optimize /dev/zero
check query_directory 2 "is a directory" optimize "$tmp"
# --version: the project's version and build type, exit 0.
if "$bin" --version >"$tmp/version" 2>&1 && grep -qE '^sliceplan [0-9]+\.[0-9]+\.[0-9]+ \(.* build\)$' "$tmp/version"; then
  passed=$((passed + 1))
else
  failed=$((failed + 1)); echo "FAIL version: $(cat "$tmp/version")"
fi

# Far more in-process threads than cores: the answer, with a warning that
# gives the numbers.
if "$bin" optimize "$examples/port_calls_small.json" --workers=8 --threads-per-worker=64 \
    --tier=greedy >"$tmp/out" 2>"$tmp/err" && grep -qF "warning: 8 workers x 64 threads = 512 search threads" "$tmp/err" \
    && [ -s "$tmp/out" ]; then
  passed=$((passed + 1))
else
  failed=$((failed + 1)); echo "FAIL oversubscribed: $(cat "$tmp/err")"
fi

check unknown_field 2 "(relations[0]) depth" optimize "$bad/unknown_field.json"
check duplicate_name 2 "relations[1].name: duplicate relation name" optimize "$bad/duplicate_name.json"
check missing_rows 2 "relations[1] (cranes).rows: missing" optimize "$bad/missing_rows.json"
check rows_zero 2 "relations[0] (berths).rows" optimize "$bad/rows_zero.json"
check rows_negative 2 "relations[0] (berths).rows: must be a finite number > 0, got -3" optimize "$bad/rows_negative.json"
check selectivity_high 2 "predicates[0].selectivity: must lie in (0, 1]" optimize "$bad/selectivity_high.json"
check selectivity_zero 2 "predicates[0].selectivity" optimize "$bad/selectivity_zero.json"
check unknown_relation 2 "predicates[0].relations[1]: unknown relation \"tugboats\"" optimize "$bad/unknown_relation.json"
check repeated_relation 2 "predicates[0].relations[1]: relation \"berths\" is named twice" optimize "$bad/repeated_relation.json"
check truncated 2 "query JSON" optimize "$bad/truncated.json"
check join_type 2 'joins[0].type: "exists" is not a join type' optimize "$bad/join_type.json"
check join_null_side 2 "the null-supplying side of the left join joins[0]" optimize "$bad/join_null_side.json"
check join_greedy 2 "reorder inner joins only" optimize "$examples/port_inspections_joins.json" --tier=greedy
check too_many_relations 2 "65 relations given; the exact search takes at most 64 (the greedy, linear and idp tiers take more)" optimize "$bad/too_many_relations.json" --tier=exact
check missing_file 2 "no_such_query.json" optimize "$tmp/no_such_query.json"
check no_file 2 "QUERY.json: no query file given" optimize
check slices_not_power 2 "--slices: 3 is not a power of two" optimize "$examples/port_calls_small.json" --slices=3
check slices_too_many 2 "--slices: 8 slices need 3 disjoint triples" optimize "$examples/port_calls_small.json" --slices=8
check slices_too_many_left 2 "--slices: 16 slices need 4 disjoint pairs" optimize "$examples/port_calls_small.json" --slices=16 --shape=left-deep
check bad_shape 2 "--shape=round: expected bushy or left-deep" optimize "$examples/port_calls_small.json" --shape=round
check unknown_flag 2 "--speed: unknown flag" optimize "$examples/port_calls_small.json" --speed=3
check unknown_command 2 "unknown command" reorder "$examples/port_calls_small.json"
check rows_past_range 2 "the largest relations: manifests 1e+160" optimize "$bad/rows_past_range.json"
check rows_past_range_left 2 "has at least 1e+300 rows" optimize "$bad/rows_past_range.json" --shape=left-deep
check nested_predicate_array 2 "predicates[1]: an array inside an array" optimize "$bad/nested_predicate_array.json"
check null_relation 2 "relations[1]: null inside an array" optimize "$bad/null_relation.json"
check key_twice 2 "relations[0].rows: given twice in one object" optimize "$bad/key_twice.json"
check alpha_with_cout 2 "alpha: only the cluster model" optimize "$examples/port_calls_small.json" --alpha=1.5
check hopeless_deadline 1 "refused up front" optimize "$examples/port_logistics.json" --tier=exact --slices=1 --workers=1 --deadline-seconds=0.001
check node_counts_past_limit 2 "node_counts: 17 given; the limit is 16" optimize "$examples/port_calls_small.json" --cost=cluster --node-counts=1,2,3,4,5,6,7,8,9,10,11,12,13,14,15,16,17
check no_coordinator 1 "coordinator 127.0.0.1:1: nothing listens at that address (UNAVAILABLE:" optimize "$examples/port_calls_small.json" --coordinator=127.0.0.1:1
check workers_no_coordinator 1 "coordinator 127.0.0.1:1:" workers --coordinator=127.0.0.1:1
check memo_limit 2 "over the memo limit of 1048576 bytes; more slices do not bring it under" optimize "$examples/port_logistics.json" --tier=exact --slices=1 --memo-limit=1MiB
check bad_tier 2 "--tier=fast: expected auto, exact, idp, linear, greedy or anytime" optimize "$examples/port_logistics.json" --tier=fast
check idp_left_deep 2 "idp builds bushy plans" optimize "$examples/port_logistics.json" --tier=idp --shape=left-deep
check anytime_cout 2 "tier anytime: searches the cluster model" optimize "$examples/port_calls_small.json" --tier=anytime
check cluster_past_exact 2 "the cluster model is searched by the exact or the anytime tier" optimize "$examples/port_calls_small.json" --cost=cluster --tier=greedy
check slices_past_exact 2 "--slices: slices divide the exact search" optimize "$bad/too_many_relations.json" --slices=2

# The cluster model's parameters.
small=$examples/port_calls_small.json
check alpha_low 2 "alpha: must be a finite number >= 1" optimize "$small" --cost=cluster --alpha=0.9
check objectives_empty 2 "objectives: unknown objective \"\"" optimize "$small" --cost=cluster --objectives=
check objectives_unknown 2 "objectives: unknown objective \"speed\"" optimize "$small" --cost=cluster --objectives=latency_s,speed
check rate_high 2 "sample_rates[1]: must lie in (0, 1], got 1.5" optimize "$small" --cost=cluster --sample-rates=1,1.5
check rate_zero 2 "sample_rates[0]: must lie in (0, 1], got 0" optimize "$small" --cost=cluster --sample-rates=0
check nodes_past_int 2 "4294967296 is not" optimize "$small" --cost=cluster --node-counts=4,4294967296
check nodes_zero 2 "node_counts[1]: must be a whole number in 1..1000000, got 0" optimize "$small" --cost=cluster --node-counts=4,0
check bad_bound 2 "bound: \"latency<=3\" names no metric" optimize "$small" --cost=cluster --bound=latency\<=3
check plot_needs_cluster 2 "--plot: needs --cost=cluster" optimize "$small" --plot="$tmp/x.svg"

# A cluster run: the frontier in JSON by increasing latency, the chosen plan
# meets its bound, the plot is an SVG with one tooltip per plan.
check cluster_ok 0 "" optimize "$small" --cost=cluster --sample-rates=1,0.1 --format=json \
  --bound=completeness\>=0.5 --prefer=node_seconds --plot="$tmp/frontier.svg" --slices=2
if python3 - "$tmp/out" "$tmp/frontier.svg" <<'PY'
import json, re, sys
doc = json.load(open(sys.argv[1]))
plans = doc["plans"]
assert len(plans) >= 2, plans
lat = [p["costs"]["latency_s"] for p in plans]
assert lat == sorted(lat), lat
chosen = plans[doc["chosen"]]["costs"]
assert chosen["completeness"] >= 0.5, chosen
ok = [p["costs"] for p in plans if p["costs"]["completeness"] >= 0.5]
assert chosen["node_seconds"] == min(c["node_seconds"] for c in ok), (chosen, ok)
svg = open(sys.argv[2]).read()
assert svg.startswith("<svg") and svg.count("<title>") == len(plans), svg[:200]
# The plot explains itself: the rule that chose, the chosen plan named,
# the third objective's scale, and physical choices in every tooltip.
assert "chosen by: least node_seconds" in svg and "bound: completeness &gt;= 0.5" in svg, svg
assert svg.count("chosen: plan %d<" % doc["chosen"]) == 1, svg
assert "colour: completeness" in svg, svg
tips = re.findall(r"<title>([^<]*)</title>", svg)
assert all(re.search(r"\[(shuffle|bcast-r|bcast-l) \d+\]", t) for t in tips), tips[:3]
# Each plan's physical choices: one leaf per relation, one [strategy nodes]
# per join, and no two frontier plans written alike.
physical = [p["physical"] for p in plans]
assert len(set(physical)) == len(physical), physical
for p in plans:
    joins = re.findall(r"\[(shuffle|bcast-r|bcast-l) (\d+)\]", p["physical"])
    assert len(joins) == p["tree"].count("("), (p["physical"], p["tree"])
    assert all(int(n) >= 1 for _, n in joins), p["physical"]
assert any("@0.1" in p for p in physical), physical
PY
then passed=$((passed + 1)); else failed=$((failed + 1)); echo "FAIL cluster_json"; fi

# Thousands of frontier plans: the JSON keeps every one, the plot draws one
# point per 4-pixel cell and says so, the chosen plan ringed.
python3 "$examples/generate_port_query.py" 4 >"$tmp/four.json"
check cluster_many 0 "" optimize "$tmp/four.json" --cost=cluster --format=json \
  --node-counts=1,2,3,4,5,6,7,8 --sample-rates=1,0.5,0.25,0.1,0.05,0.02,0.01,0.005 \
  --plot="$tmp/many.svg"
if python3 - "$tmp/out" "$tmp/many.svg" <<'PY'
import json, sys
doc = json.load(open(sys.argv[1]))
plans = doc["plans"]
assert len(plans) > 400, len(plans)
svg = open(sys.argv[2]).read()
assert "plans (drawn: one per 4-pixel cell)" in svg, svg[:400]
assert "%d plans" % len(plans) in svg, svg[:400]
drawn = svg.count("<title>")
assert 0 < drawn < len(plans), (drawn, len(plans))
assert svg.count("chosen: plan %d<" % doc["chosen"]) == 1
PY
then passed=$((passed + 1)); else failed=$((failed + 1)); echo "FAIL cluster_many"; fi

# Past 64 relations the cluster model answers by the anytime search: every
# plan a tree over all 200 relations with its physical choices, the set
# non-dominated, the plot drawn with cut tooltips; the text table leaves
# the trees to the JSON but the chosen plan's.
python3 "$examples/generate_port_query.py" 200 >"$tmp/wide.json"
check cluster_wide 0 "" optimize "$tmp/wide.json" --cost=cluster --format=json \
  --deadline-seconds=1.5 --plot="$tmp/wide.svg" --quiet
if python3 - "$tmp/out" "$tmp/wide.json" "$tmp/wide.svg" <<'PY'
import json, re, sys
doc, query = json.load(open(sys.argv[1])), json.load(open(sys.argv[2]))
names = sorted(r["name"] for r in query["relations"])
assert doc["tier"] == "anytime" and doc["proven_optimal"] is False, doc["tier"]
plans = doc["plans"]
assert plans and doc["chosen"] is not None and 0 <= doc["chosen"] < len(plans)
costs = [(p["costs"]["latency_s"], p["costs"]["node_seconds"], p["costs"]["completeness"]) for p in plans]
for i, a in enumerate(costs):
    for j, b in enumerate(costs):
        assert i == j or not (b[0] <= a[0] and b[1] <= a[1] and b[2] >= a[2]), (i, j)
for p in plans:
    assert sorted(n["relation"] for n in p["nodes"] if "relation" in n) == names
    assert len(p["nodes"]) == 2 * len(names) - 1
    assert len(re.findall(r"\[(shuffle|bcast-r|bcast-l) \d+\]", p["physical"])) == len(names) - 1
svg = open(sys.argv[3]).read()
assert svg.count("<title>") >= 1 and "(200 relations; the JSON has the whole tree)" in svg
PY
then passed=$((passed + 1)); else failed=$((failed + 1)); echo "FAIL cluster_wide_json"; fi
check cluster_wide_text 0 "" optimize "$tmp/wide.json" --cost=cluster --deadline-seconds=1 --quiet
if grep -q "the trees are shown up to 64 relations" "$tmp/out" && grep -q "^chosen: plan" "$tmp/out" \
  && grep -q "of bushy plans of 200 relations" "$tmp/out"
then passed=$((passed + 1)); else failed=$((failed + 1)); echo "FAIL cluster_wide_text"; cat "$tmp/out" | head -20; fi

# A good run: JSON with the fields of docs/interfaces.md, one plan, P slices.
check json_ok 0 "" optimize "$examples/port_calls_small.json" --format=json --slices=4 --workers=2
if python3 - "$tmp/out" <<'PY'
import json, sys
doc = json.load(open(sys.argv[1]))
plans = doc["plans"]
assert len(plans) == 1, plans
tree = plans[0]["tree"]
assert tree.startswith("(") and tree.count("(") == 5, tree
for name in ["shipments", "containers", "voyages", "vessels", "ports", "customers"]:
    assert tree.count(name) == 1, (name, tree)
assert plans[0]["costs"]["cout"] > 0
slices = doc["stats"]["slices"]
assert [s["index"] for s in slices] == [0, 1, 2, 3], slices
for s in slices:
    assert s["subsets"] == 7 ** 2 * 2 ** 0 and s["splits"] > 0 and s["seconds"] >= 0, s
assert doc["tier"] == "exact" and doc["proven_optimal"] is True, doc
# Every node, children before parents, the root last and the plan's rows.
nodes = plans[0]["nodes"]
assert len(nodes) == 11, nodes
leaves = [n["relation"] for n in nodes if "relation" in n]
assert sorted(leaves) == sorted(["shipments", "containers", "voyages", "vessels", "ports", "customers"])
for i, n in enumerate(nodes):
    assert n["cardinality"] > 0, n
    if "type" in n:
        assert n["type"] == "inner" and 0 <= n["left"] < i and 0 <= n["right"] < i, (i, n)
assert nodes[-1]["cardinality"] == plans[0]["cardinality"], nodes[-1]
PY
then passed=$((passed + 1)); else failed=$((failed + 1)); echo "FAIL json_fields"; fi

# Past the exact reach, auto still answers: a plan over all 65 relations,
# from a heuristic tier, not claimed optimal.
check wide_ok 0 "" optimize "$bad/too_many_relations.json" --format=json --workers=1 --budget-seconds=1
if python3 - "$tmp/out" "$bad/too_many_relations.json" <<'PY'
import json, re, sys
doc, query = json.load(open(sys.argv[1])), json.load(open(sys.argv[2]))
assert doc["tier"] in ("greedy", "linear", "idp"), doc["tier"]
assert doc["proven_optimal"] is False, doc
names = re.findall(r"[A-Za-z_][A-Za-z0-9_]*", doc["plans"][0]["tree"])
assert sorted(names) == sorted(r["name"] for r in query["relations"]), names
assert doc["plans"][0]["costs"]["cout"] > 0
PY
then passed=$((passed + 1)); else failed=$((failed + 1)); echo "FAIL wide_json"; fi

# --cross-products=false: the JSON says so and no join of the plan is a
# cross product (every join is backed by a predicate between its sides).
if "$bin" optimize "$examples/port_calls_small.json" --cross-products=false --format=json \
     --shape=left-deep >"$tmp/connected" 2>/dev/null &&
   python3 - "$tmp/connected" "$examples/port_calls_small.json" <<'PY'
import json, sys
doc, query = json.load(open(sys.argv[1])), json.load(open(sys.argv[2]))
assert doc["cross_products"] is False and doc["shape"] == "left-deep", doc
tree = doc["plans"][0]["tree"]
def parse(s, i=0):
    if s[i] == "(":
        left, i = parse(s, i + 1)
        right, i = parse(s, i + 1)
        return (left, right), i + 1
    j = i
    while j < len(s) and s[j] not in " ()":
        j += 1
    return s[i:j], j
def leaves(t):
    return {t} if isinstance(t, str) else leaves(t[0]) | leaves(t[1])
def check(t):
    if isinstance(t, str):
        return
    l, r = leaves(t[0]), leaves(t[1])
    assert isinstance(t[1], str), ("left-deep", t)
    assert any(set(p["relations"]) <= l | r and set(p["relations"]) & l and set(p["relations"]) & r
               for p in query["predicates"]), ("cross product", l, r)
    check(t[0]); check(t[1])
check(parse(tree)[0])
PY
then passed=$((passed + 1)); else failed=$((failed + 1)); echo "FAIL connected_plan"; fi

# Every format names the same plan: the same query, slice count and one
# worker (a deterministic run) in text, JSON and DOT; each run must succeed,
# and the DOT graph is rebuilt into a tree and compared with the JSON tree.
formats_ok=1
for f in text json dot; do
  "$bin" optimize "$examples/port_calls_small.json" --format=$f --slices=2 --workers=1 \
    >"$tmp/$f" 2>"$tmp/err" || { formats_ok=0; echo "FAIL format_$f: exit status $?"; }
  [ -s "$tmp/$f" ] || { formats_ok=0; echo "FAIL format_$f: no output"; }
done
if [ "$formats_ok" -eq 1 ] && python3 - "$tmp/json" "$tmp/text" "$tmp/dot" <<'PY'
import json, re, sys
tree = json.load(open(sys.argv[1]))["plans"][0]["tree"]
assert tree.count("(") == 5, tree
assert tree in open(sys.argv[2]).read(), ("text", tree)
labels, kids, has_parent = {}, {}, set()
for line in open(sys.argv[3]):
    m = re.match(r'\s*(n\d+) \[label="([^\\"]*)', line)
    if m:
        labels[m.group(1)] = m.group(2)
    m = re.match(r'\s*(n\d+) -> (n\d+) \[label="([LR])"\]', line)
    if m:
        kids.setdefault(m.group(1), {})[m.group(3)] = m.group(2)
        has_parent.add(m.group(2))
def render(n):
    if n not in kids:
        return labels[n]
    return "(%s %s)" % (render(kids[n]["L"]), render(kids[n]["R"]))
roots = [n for n in labels if n not in has_parent]
assert len(roots) == 1, roots
assert render(roots[0]) == tree, (render(roots[0]), tree)
PY
then passed=$((passed + 1)); else failed=$((failed + 1)); echo "FAIL formats_agree"; fi

# The capacity planner: refusals, then the table with a given rate checked
# against the closed form: 19 relations unsliced are (3^19 - 2^20 + 1) / 2 =
# 580,606,446 symmetric splits, 0.580606446 s at 1 ns, plus the 0.2 ms
# slice round trip; the rows double from 1 to 1,024 workers and
# enough_workers is the first row within the deadline.
check capacity_no_deadline 2 "--deadline-seconds=S: missing" capacity "$examples/port_logistics.json"
check capacity_bad_deadline 2 "--deadline-seconds=-1: expected seconds" capacity "$examples/port_logistics.json" --deadline-seconds=-1
check capacity_bad_threads 2 "--threads-per-worker=0: expected a number in 1..256" capacity "$examples/port_logistics.json" --deadline-seconds=1 --threads-per-worker=0
check capacity_bad_format 2 "--format=dot: expected text or json" capacity "$examples/port_logistics.json" --deadline-seconds=1 --format=dot
check capacity_bad_file 2 "relations[0] (berths).rows" capacity "$bad/rows_negative.json" --deadline-seconds=1
echo '{"relations": [{"name": "berths", "rows": 9}, {"name": "cranes", "rows": 4}], "predicates": []}' >"$tmp/apart.json"
check capacity_disconnected 2 "not connected" capacity "$tmp/apart.json" --deadline-seconds=1 --cross-products=false
"$bin" capacity "$examples/port_logistics.json" --deadline-seconds=0.4 --seconds-per-split=1e-9 \
  --format=json --plot="$tmp/capacity.svg" >"$tmp/capacity.json" 2>"$tmp/err"
if python3 - "$tmp/capacity.json" "$tmp/capacity.svg" <<'PY'
import json, sys
doc = json.load(open(sys.argv[1]))
rows = doc["rows"]
assert [r["workers"] for r in rows] == [2 ** i for i in range(11)], rows
assert rows[0]["slices"] == 1, rows[0]
assert abs(rows[0]["seconds"] - (0.580606446 + 0.0002)) < 1e-9, rows[0]
assert all(r["slices"] >= 1 and r["slices"] & (r["slices"] - 1) == 0 for r in rows)
assert all(a["seconds"] >= b["seconds"] for a, b in zip(rows, rows[1:])), rows
first = next(r["workers"] for r in rows if r["seconds"] <= 0.4 and r["fits_memo"])
assert doc["enough_workers"] == first, (doc["enough_workers"], first)
assert doc["rates"]["calibrated"] is False and doc["rates"]["split_seconds"] == 1e-9
svg = open(sys.argv[2]).read()
# One tooltip per row, the deadline in human units, a legend, ticks at the
# plotted worker counts, the fewest enough ringed and named.
assert svg.count("<title>") == 11 and "deadline 400 ms" in svg, svg[:400]
assert "meets the deadline" in svg and "misses it (time or memo)" in svg, svg
assert all(">%d</text>" % (2 ** i) in svg for i in range(11)), svg
assert "enough: %d worker" % doc["enough_workers"] in svg, svg
flat = next((a for a, b in zip(rows, rows[1:]) if a["slices"] == b["slices"]), None)
assert flat is None or "past %d workers: no more" % flat["workers"] in svg, svg
PY
then passed=$((passed + 1)); else failed=$((failed + 1)); echo "FAIL capacity_table"; fi
# The plots render as pictures (rsvg-convert, librsvg2-bin): what a person
# sees, not only well-formed text.
if ! command -v rsvg-convert >/dev/null; then
  echo "SKIP render: no rsvg-convert (deploy/install-deps brings librsvg2-bin)"
else
  for svg in "$tmp/capacity.svg" "$tmp/frontier.svg" "$tmp/many.svg"; do
    if rsvg-convert "$svg" -o "$svg.png" 2>"$tmp/err" && [ -s "$svg.png" ] && [ ! -s "$tmp/err" ]; then
      passed=$((passed + 1))
    else
      failed=$((failed + 1)); echo "FAIL render $(basename "$svg")"; cat "$tmp/err"
    fi
  done
fi
# Past the exact reach: no rows, and the summary names what auto does.
"$bin" capacity "$bad/too_many_relations.json" --deadline-seconds=2 --format=json \
  >"$tmp/capacity.json" 2>"$tmp/err"
if python3 - "$tmp/capacity.json" <<'PY'
import json, sys
doc = json.load(open(sys.argv[1]))
assert doc["rows"] == [] and doc["enough_workers"] is None, doc
assert "65 relations: past the exact search's 64" in doc["summary"], doc["summary"]
PY
then passed=$((passed + 1)); else failed=$((failed + 1)); echo "FAIL capacity_past_exact"; fi

# Deadlines on queries past what the pool can search exactly. A 40-relation
# clique with cross products (3^40 splits) and a 2 s deadline: a valid plan
# over all 40 relations, not claimed optimal, within the deadline (plus a
# generous margin for a loaded machine). A 40-relation random graph without
# cross products and no deadline: answered within the 10 s default budget.
valid_plan() {  # JSON QUERY MAX_SECONDS ELAPSED
  python3 - "$@" <<'PY'
import json, re, sys
doc, query = json.load(open(sys.argv[1])), json.load(open(sys.argv[2]))
names = sorted(r["name"] for r in query["relations"])
tree = doc["plans"][0]["tree"]
assert sorted(re.findall(r"[A-Za-z_][A-Za-z0-9_]*", tree)) == names, tree
assert tree.count("(") == len(names) - 1, tree
assert doc["proven_optimal"] is False and doc["tier"] in ("greedy", "linear", "idp", "exact"), doc
assert float(sys.argv[4]) <= float(sys.argv[3]), ("took", sys.argv[4], "s")
PY
}
python3 "$examples/generate_port_query.py" 40 --graph=clique >"$tmp/clique40.json"
python3 "$examples/generate_port_query.py" 40 --graph=random >"$tmp/random40.json"
start=$(date +%s.%N)
"$bin" optimize "$tmp/clique40.json" --deadline-seconds=2 --workers=2 --format=json \
  >"$tmp/out" 2>"$tmp/err"
status=$?
elapsed=$(python3 -c "print($(date +%s.%N) - $start)")
if [ "$status" -eq 0 ] && valid_plan "$tmp/out" "$tmp/clique40.json" 3.5 "$elapsed"; then
  passed=$((passed + 1)); else failed=$((failed + 1)); echo "FAIL clique_deadline ($elapsed s)"; fi
start=$(date +%s.%N)
"$bin" optimize "$tmp/random40.json" --cross-products=false --workers=2 --format=json \
  >"$tmp/out" 2>"$tmp/err"
status=$?
elapsed=$(python3 -c "print($(date +%s.%N) - $start)")
if [ "$status" -eq 0 ] && valid_plan "$tmp/out" "$tmp/random40.json" 12 "$elapsed"; then
  passed=$((passed + 1)); else failed=$((failed + 1)); echo "FAIL random40_budget ($elapsed s)"; fi

echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ]
