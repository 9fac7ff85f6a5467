# End to end: the priority keep policy's checks and reasons, and the two
# groupings (connected components, the default, and groups around keepers).
source "$(dirname "$0")/common.bash"

ARCHIVE="$SOURCE_DIR/sample_corpus/archive"

# 1. --keep priority needs its field: a usage error before any reading.
expect_exit 2 "priority without a field" -- "$KINDRED" sweep "$ARCHIVE.jsonl" --keep priority
expect_stderr "--keep priority needs --priority-field" "priority message"
[[ -s "$WORK/out" ]] && fail "records printed before the usage error"

# 2. A field no document has is counted; one every document has is not.
expect_exit 0 "absent priority field" -- "$KINDRED" sweep "$ARCHIVE.jsonl" --keep priority --priority-field nope --print none
expect_stderr "no priority       147 of 147 documents lack the priority field" "absent field count"
expect_exit 0 "priority field" -- "$KINDRED" sweep "$ARCHIVE.jsonl" --keep priority --priority-field priority --print decisions
grep -q "no priority" "$WORK/err" && fail "documents with the field counted as lacking it"

# 3. The reasons show the priorities compared, read from the input itself.
$PY - "$WORK/out" "$ARCHIVE.jsonl" <<'PY' || fail "priority reasons"
import json, sys
prio = {}
for line in open(sys.argv[2]):
    if line.strip():
        d = json.loads(line)
        prio[d["id"]] = d["priority"]
def text(v):
    return "%g" % v
bad = 0
n = 0
for line in open(sys.argv[1]):
    r = json.loads(line)
    if r["group"] is None:
        continue
    n += 1
    if r["decision"] == "keep":
        want = "keeper of its group (policy priority, priority %s)" % text(prio[r["id"]])
    else:
        want = "near-duplicate; %s is kept (priority %s against %s)" % (
            r["keeper"], text(prio[r["keeper"]]), text(prio[r["id"]]))
        if prio[r["keeper"]] < prio[r["id"]]:
            print("keeper ranks below a drop", r); bad += 1
    if r["reason"] != want:
        print("reason", r["reason"], "want", want); bad += 1
sys.exit(1 if bad or n == 0 else 0)
PY

# 4. Grouping. The default is connected components, with the records as
#    before (no grouping field); --grouping components says the same.
"$KINDRED" sweep -q "$ARCHIVE" -o "$WORK/default" || fail "default sweep"
"$KINDRED" sweep -q "$ARCHIVE" -o "$WORK/components" --grouping components || fail "components sweep"
for kind in pairs groups decisions; do
  cmp -s "$WORK/default/$kind.jsonl" "$WORK/components/$kind.jsonl" || fail "--grouping components changed $kind"
done
grep -q '"grouping"' "$WORK/default/groups.jsonl" "$WORK/default/decisions.jsonl" && fail "default records name a grouping"

# Around keepers: every drop has a confirmed pair with its keeper at the
# threshold, no document is in two groups, and the records say so.
expect_exit 0 "keepers sweep" -- "$KINDRED" sweep "$ARCHIVE" -o "$WORK/keepers" --grouping keepers --threads 2
expect_stderr "(around keepers: --grouping keepers)" "summary names the grouping"
"$KINDRED" sweep -q "$ARCHIVE" -o "$WORK/keepers1" --grouping keepers --threads 1 || fail "keepers, one thread"
for kind in groups decisions; do
  cmp -s "$WORK/keepers/$kind.jsonl" "$WORK/keepers1/$kind.jsonl" || fail "keepers $kind differ by thread count"
done
$PY - "$WORK/keepers" "$WORK/default" <<'PY' || fail "groups around keepers"
import json, sys
def load(path):
    return [json.loads(line) for line in open(path)]
pairs = {}
for p in load(sys.argv[1] + "/pairs.jsonl"):
    pairs[(p["a"], p["b"])] = pairs[(p["b"], p["a"])] = p["jaccard"]
bad = 0
seen = set()
groups = load(sys.argv[1] + "/groups.jsonl")
for g in groups:
    if g.get("grouping") != "keepers":
        print("group without grouping field", g); bad += 1
    for d in g["drops"]:
        j = pairs.get((g["keeper"], d))
        if j is None or j < 0.8:
            print("drop not confirmed with its keeper", g["keeper"], d, j); bad += 1
    for m in [g["keeper"]] + g["drops"]:
        if m in seen:
            print("in two groups", m); bad += 1
        seen.add(m)
for r in load(sys.argv[1] + "/decisions.jsonl"):
    if r.get("grouping") != "keepers":
        print("decision without grouping field", r); bad += 1
    if r["decision"] == "drop":
        want = "(jaccard %.6f with it)" % pairs[(r["id"], r["keeper"])]
        if want not in r["reason"]:
            print("reason lacks the keeper's jaccard", r); bad += 1
# The sample's components chain somewhere; around keepers they split, so
# drops are fewer and no component member is lost from the pairs.
components = load(sys.argv[2] + "/groups.jsonl")
drops_c = sum(len(g["drops"]) for g in components)
drops_k = sum(len(g["drops"]) for g in groups)
if not drops_k < drops_c:
    print("expected fewer drops around keepers", drops_k, drops_c); bad += 1
sys.exit(1 if bad else 0)
PY

# The same grouping from an index.
"$KINDRED" build -q "$WORK/a.kin" "$ARCHIVE" || fail "build"
expect_exit 0 "index sweep around keepers" -- "$KINDRED" sweep -q --index "$WORK/a.kin" --grouping keepers
cmp -s "$WORK/out" "$WORK/keepers/groups.jsonl" || fail "index sweep groups differ from the corpus sweep's"
expect_exit 2 "unknown grouping" -- "$KINDRED" sweep "$ARCHIVE" --grouping chains
expect_stderr "expected components or keepers" "grouping message"

finish
