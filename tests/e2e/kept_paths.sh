# End to end: writing the filtered corpus (--write-kept, --copy-kept,
# --list-kept) and the record files (-o) never writes outside the place the
# user named, never through a symbolic link out of it, and never over an
# input, whatever the document ids and paths look like.
source "$(dirname "$0")/common.bash"

story="The harbour board met on Tuesday evening to discuss the dredging of the north channel, which has silted up badly since the winter storms."
# A sandbox around everything; `snapshot` lists every path in it (with each
# file's bytes hashed and each link's target) except box/allowed, the one
# place commands may write. It walks by directory descriptors, so paths
# longer than PATH_MAX are seen too.
mkdir -p "$WORK/box/outside"
printf 'precious\n' >"$WORK/box/outside/victim.txt"
snapshot() {
  $PY - "$WORK/box" <<'PY'
import hashlib, os, sys
for root, dirs, files, fd in os.fwalk(os.fsencode(sys.argv[1])):
    if root == os.fsencode(sys.argv[1]) and b"allowed" in dirs:
        dirs.remove(b"allowed")
    for name in sorted(dirs + files):
        path = os.path.join(root, name)
        if os.path.islink(os.path.join(b"/proc/self/fd", str(fd).encode(), name)):
            print(path, "->", os.readlink(name, dir_fd=fd))
        elif name in files:
            with open(os.open(name, os.O_RDONLY, dir_fd=fd), "rb") as f:
                print(path, hashlib.sha1(f.read()).hexdigest())
        else:
            print(path)
PY
}

# 1. A tree whose file names look like paths, options and escapes.
tree="$WORK/box/tree"
mkdir -p "$tree/sub"
long=$(printf 'n%.0s' $(seq 1 250))
for name in '...' '..hidden' '-rf' ' space ' $'new\nline' 'back\slash' $'\xff\xfe' "$long"; do
  printf '%s %s\n' "$story" "$name" >"$tree/sub/$name"
done
printf '%s\n' "$story" >"$tree/original.txt"
cp "$tree/original.txt" "$tree/sub/exact_copy.txt"  # the one drop
# deep_dirs TOP LEVELS: nests LEVELS directories of 200 bytes under TOP and
# puts deep.txt at the bottom, relative to open directories (so it works
# past PATH_MAX too).
deep_dirs() {
  $PY - "$1" "$2" "$story" <<'PY'
import os, sys
fd = os.open(sys.argv[1], os.O_RDONLY)
for level in range(1, int(sys.argv[2]) + 1):
    part = "d" * 198 + "%02d" % level
    os.mkdir(part, dir_fd=fd)
    fd = os.open(part, os.O_RDONLY, dir_fd=fd)
with os.fdopen(os.open("deep.txt", os.O_WRONLY | os.O_CREAT, 0o644, dir_fd=fd), "w") as f:
    f.write(sys.argv[3] + " deep\n")
PY
}
deep_dirs "$tree" 15  # a 3000-byte relative path, within PATH_MAX
# Symbolic links out of the tree are never followed.
ln -s "$WORK/box/outside/victim.txt" "$tree/link_to_file.txt"
ln -s "$WORK/box/outside" "$tree/link_to_dir"

before=$(snapshot)
mkdir -p "$WORK/box/allowed"
expect_exit 0 "copy kept, awkward names" -- "$KINDRED" sweep -q "$tree" --copy-kept "$WORK/box/allowed/copy" \
  --print decisions --threshold 0.99
[[ "$(snapshot)" == "$before" ]] || fail "copy kept touched something outside its directory"
# Every kept document is copied at its relative path, byte for byte, and
# nothing else is there (no links, nothing outside the tree's own paths).
$PY - "$tree" "$WORK/box/allowed/copy" "$WORK/out" <<'PY' || fail "copy tree does not mirror the kept documents"
import json, os, stat, sys
tree, copy, decisions = (os.fsencode(a) for a in sys.argv[1:])
dropped = {json.loads(l)["id"] for l in open(decisions) if json.loads(l)["decision"] == "drop"}

def files_of(top):  # {relative path: bytes} of regular files; links are errors
    found = {}
    for root, dirs, files, fd in os.fwalk(top):
        for name in dirs + files:
            mode = os.stat(name, dir_fd=fd, follow_symlinks=False).st_mode
            if stat.S_ISLNK(mode):
                if top == copy:
                    raise AssertionError(f"link in the copy: {name}")
                continue
            if stat.S_ISREG(mode):
                with open(os.open(name, os.O_RDONLY, dir_fd=fd), "rb") as f:
                    found[os.path.relpath(os.path.join(root, name), top)] = f.read()
    return found

source, copied = files_of(tree), files_of(copy)
# Ids are the relative paths, invalid UTF-8 bytes shown as U+FFFD.
want = {rel: data for rel, data in source.items()
        if rel.decode("utf-8", "replace") not in dropped}
assert set(copied) == set(want), sorted(set(copied) ^ set(want))[:5]
assert all(copied[rel] == want[rel] for rel in copied), "a copy differs from its source"
assert len(dropped) >= 1, "the awkward copies of the story are not grouped"
PY

# A tree nested past PATH_MAX (4096 bytes) is refused with the place named.
mkdir -p "$WORK/box/deep_tree"
deep_dirs "$WORK/box/deep_tree" 24
before=$(snapshot)
expect_exit 3 "tree past PATH_MAX" -- "$KINDRED" sweep -q "$WORK/box/deep_tree" --copy-kept "$WORK/box/allowed/deep_copy"
expect_stderr "File name too long" "tree past PATH_MAX: reason"
expect_stderr "deep_tree/dddd" "tree past PATH_MAX: directory named"
[[ "$(snapshot)" == "$before" && ! -e "$WORK/box/allowed/deep_copy" ]] || fail "a refused deep tree wrote something"
rm -rf "$WORK/box/deep_tree"

# 2. The copy directory given through a symbolic link into the input tree,
# inside the tree, or holding the tree: refused, nothing written.
ln -s "$tree/sub" "$WORK/box/sneaky"
before=$(snapshot)
expect_exit 2 "copy dir through a link into the input" -- "$KINDRED" sweep -q "$tree" --copy-kept "$WORK/box/sneaky/copy"
expect_stderr "overlaps the input" "copy dir inside the input refused"
expect_exit 2 "copy dir inside the input" -- "$KINDRED" sweep -q "$tree" --copy-kept "$tree/copy"
expect_exit 2 "copy dir holding the input" -- "$KINDRED" sweep -q "$tree" --copy-kept "$WORK/box"
expect_exit 2 "copy dir with .. into the input" -- "$KINDRED" sweep -q "$tree" --copy-kept "$WORK/box/allowed/../tree/x"
[[ "$(snapshot)" == "$before" ]] || fail "a refused copy wrote something"

# 3. A copy directory that is a symbolic link to an empty directory: the
# tree built beside it cannot replace the link, so the copy fails (exit 7)
# with nothing written in the link's target and no temporary left behind.
mkdir -p "$WORK/box/allowed/target"
ln -s "$WORK/box/allowed/target" "$WORK/box/allowed/linked"
listing=$(ls -A "$WORK/box/allowed")
expect_exit 7 "copy dir that is a link" -- "$KINDRED" sweep -q "$tree" --copy-kept "$WORK/box/allowed/linked"
expect_stderr "linked: cannot rename into place" "copy dir that is a link: reason"
[[ -z "$(ls -A "$WORK/box/allowed/target")" ]] || fail "copies written through a link"
[[ "$(ls -A "$WORK/box/allowed")" == "$listing" ]] || fail "temporary copy tree left behind"
[[ "$(snapshot)" == "$before" ]] || fail "copy through a link wrote outside"

# 4. JSON Lines ids that look like paths never become paths; the kept lines
# go to the one file named, and an output that is an input is refused.
$PY - "$WORK/box/ids.jsonl" "$story" <<'PY'
import json, sys
ids = ["../../outside/victim.txt", "/etc/passwd", "a/../../b", "nul\u0000byte", "x" * 5000,
       "~/home", "C:\\windows", "-", ".", ""]
with open(sys.argv[1], "w") as out:
    for i, doc_id in enumerate(ids):
        out.write(json.dumps({"id": doc_id, "text": sys.argv[2] + (" copy" if i % 2 else "")}) + "\n")
PY
before=$(snapshot)
expect_exit 0 "adversarial JSON ids" -- "$KINDRED" sweep -q "$WORK/box/ids.jsonl" --write-kept "$WORK/box/allowed/kept.jsonl" --threshold 0.99
[[ "$(snapshot)" == "$before" ]] || fail "adversarial ids wrote outside"
$PY -c 'import json,sys; [json.loads(l) for l in open(sys.argv[1])]' "$WORK/box/allowed/kept.jsonl" || fail "kept lines are not JSON"
cp "$WORK/box/ids.jsonl" "$WORK/ids.before"
expect_exit 2 "kept output equal to the input" -- "$KINDRED" sweep -q "$WORK/box/ids.jsonl" --write-kept "$WORK/box/ids.jsonl"
expect_stderr "is an input" "output equal to an input refused"
ln -s "$WORK/box/ids.jsonl" "$WORK/box/allowed/alias.jsonl"
expect_exit 2 "kept output linked to the input" -- "$KINDRED" sweep -q "$WORK/box/ids.jsonl" --write-kept "$WORK/box/allowed/alias.jsonl"
expect_exit 2 "kept output inside the input tree" -- "$KINDRED" sweep -q "$tree" --list-kept "$tree/list.txt"
cmp -s "$WORK/box/ids.jsonl" "$WORK/ids.before" || fail "an input was modified"
# A dangling link at the output name is replaced, its target never created.
ln -s "$WORK/box/outside/created_through_link.jsonl" "$WORK/box/allowed/dangling.jsonl"
expect_exit 0 "kept output over a dangling link" -- "$KINDRED" sweep -q "$WORK/box/ids.jsonl" --write-kept "$WORK/box/allowed/dangling.jsonl"
[[ ! -e "$WORK/box/outside/created_through_link.jsonl" ]] || fail "wrote through a dangling link"
[[ -f "$WORK/box/allowed/dangling.jsonl" && ! -L "$WORK/box/allowed/dangling.jsonl" ]] || fail "dangling link not replaced"
# A name too long for the file system: a clear error, nothing left behind.
expect_exit 2 "kept output name too long" -- "$KINDRED" sweep -q "$WORK/box/ids.jsonl" --write-kept "$WORK/box/allowed/$(printf 'L%.0s' $(seq 1 300)).jsonl"
expect_stderr "File name too long" "long name error"

# 5. Record files (-o) never replace an input either.
mkdir -p "$WORK/box/data"
cp "$WORK/box/ids.jsonl" "$WORK/box/data/pairs.jsonl"
cp "$WORK/box/data/pairs.jsonl" "$WORK/pairs.before"
"$KINDRED" sweep -q "$WORK/box/data/pairs.jsonl" -o "$WORK/box/data" >"$WORK/out" 2>"$WORK/err"
cmp -s "$WORK/box/data/pairs.jsonl" "$WORK/pairs.before" || fail "-o overwrote an input named pairs.jsonl"
expect_exit 2 "-o over an input" -- "$KINDRED" sweep -q "$WORK/box/data/pairs.jsonl" -o "$WORK/box/data"
expect_exit 2 "-o inside an input tree" -- "$KINDRED" sweep -q "$tree" -o "$tree/results"
[[ ! -e "$tree/results" ]] || fail "-o created a directory inside the input tree"
expect_exit 2 "kept lines over a record file" -- "$KINDRED" sweep -q "$WORK/box/ids.jsonl" \
  -o "$WORK/box/allowed/records" --write-kept "$WORK/box/allowed/records/pairs.jsonl"
expect_stderr "is also a record file" "kept lines over a record file: reason"
[[ ! -e "$WORK/box/allowed/records" ]] || fail "a refused run created its record directory"

# 6. Standard input read twice for the kept corpus: its copy lives in a
# private temporary directory that is removed afterwards.
mkdir -p "$WORK/tmp"
expect_exit 0 "kept lines of standard input" -- \
  env TMPDIR="$WORK/tmp" "$KINDRED" sweep -q - --write-kept "$WORK/box/allowed/stdin_kept.jsonl" <"$WORK/box/ids.jsonl"
[[ -z "$(ls -A "$WORK/tmp")" ]] || fail "standard input copy left behind: $(ls -A "$WORK/tmp")"
[[ -s "$WORK/box/allowed/stdin_kept.jsonl" ]] || fail "no kept lines from standard input"

finish
