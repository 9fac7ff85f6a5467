#!/usr/bin/env bash
# TSV and CSV records round-trip whatever the ids hold (spaces, tabs, commas,
# quotes, newlines, backslashes, non-ASCII): groups are one row per drop, so
# every id is a field of its own. CSV is read back with Python's csv module
# (an independent RFC 4180 reader); TSV by splitting rows on newlines and
# fields on tabs and undoing the documented escapes (\t \n \r \\). Both must
# give the same groups, pairs and decisions as the JSON Lines records.
source "$(dirname "$0")/common.bash"

$PY - "$WORK/corpus.jsonl" <<'PY'
import json, sys
ids = ["plain.txt", "with space.txt", "tab\there", "comma,and \"quotes\"", "new\nline",
       "back\\slash", "ünïcode ✓", "trailing space ", "x\r\ny"]
story = ("the harbour board met on tuesday to discuss the new ferry timetable and the "
         "repairs to the north pier which were delayed by the winter storms this year ")
other = ("a choir from the valley will sing at the old chapel on saturday evening and "
         "tickets are on sale at the library and the bakery on the high street now ")
third = ("the council voted to keep the swimming pool open through the autumn after "
         "a petition signed by more than four hundred residents of the town last month ")
texts = [story, story + "today", story, other, other + "again", third, third + "too",
         third, "unrelated words about nothing in particular at all here"]
with open(sys.argv[1], "w") as f:
    for i, t in zip(ids, texts):
        f.write(json.dumps({"id": i, "text": t}) + "\n")
PY

for kind in groups pairs decisions; do
  for format in jsonl tsv csv; do
    expect_exit 0 "$kind $format" -- "$KINDRED" sweep -q -j 1 --print "$kind" --format "$format" \
      "$WORK/corpus.jsonl"
    cp "$WORK/out" "$WORK/$kind.$format"
  done
done

$PY - "$WORK" <<'PY' || fail "TSV/CSV records do not round-trip"
import csv, json, sys
work = sys.argv[1]

def read_jsonl(kind):
    return [json.loads(line) for line in open(f"{work}/{kind}.jsonl", encoding="utf-8")]

def read_csv(kind):
    with open(f"{work}/{kind}.csv", newline="", encoding="utf-8") as f:
        return list(csv.DictReader(f))

def unescape_tsv(field):
    out, i = [], 0
    while i < len(field):
        c = field[i]
        if c == "\\":
            out.append({"t": "\t", "n": "\n", "r": "\r", "\\": "\\"}[field[i + 1]])
            i += 2
        else:
            out.append(c)
            i += 1
    return "".join(out)

def read_tsv(kind):
    data = open(f"{work}/{kind}.tsv", encoding="utf-8", newline="").read()
    assert data.endswith("\n")
    rows = [line.split("\t") for line in data[:-1].split("\n")]
    header = rows[0]
    assert all(len(r) == len(header) for r in rows), "ragged TSV"
    return [dict(zip(header, map(unescape_tsv, r))) for r in rows[1:]]

def groups_from_rows(rows):
    groups = {}
    for r in rows:
        g = groups.setdefault(int(r["group"]), {"size": int(r["size"]), "keeper": r["keeper"],
                                                "drops": [], "policy": r["policy"]})
        assert g["keeper"] == r["keeper"]
        g["drops"].append(r["drop"])
    return groups

want = {g["group"]: {"size": g["size"], "keeper": g["keeper"], "drops": g["drops"],
                     "policy": g["policy"]} for g in read_jsonl("groups")}
assert len(want) == 3 and sum(len(g["drops"]) for g in want.values()) == 5, want
assert any("\n" in g["keeper"] or any("\n" in d for d in g["drops"]) for g in want.values())
for reader in (read_csv, read_tsv):
    got = groups_from_rows(reader("groups"))
    assert got == want, (reader.__name__, got, want)

def norm(rows):  # JSON numbers and nulls as the text fields print them
    return [{k: ("" if v is None else v if isinstance(v, str) else
                 f"{v:.6f}" if isinstance(v, float) else str(v)) for k, v in r.items()}
            for r in rows]

for kind in ("pairs", "decisions"):
    want_rows = norm(read_jsonl(kind))
    assert want_rows, kind
    for reader in (read_csv, read_tsv):
        got = [dict(r) for r in reader(kind)]
        assert got == want_rows, (kind, reader.__name__, got[:2], want_rows[:2])
PY

finish
