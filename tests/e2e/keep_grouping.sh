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

finish
