# End to end: a band-key table damaged consistently (one entry made to name
# another document, the segment's table checksum and its commit record
# rewritten so that every checksum still verifies) is found only by audit's
# cross-check of the stored keys against the stored signatures: audit names
# it and exits 4, while opening the index (info) still succeeds.
source "$(dirname "$0")/common.bash"

$PY "$SOURCE_DIR/tools/gen_corpus.py" --docs 60 --seed 23 --dup-rate 0.1 --out "$WORK/corpus.jsonl" \
  >/dev/null 2>&1 || fail "gen_corpus"
expect_exit 0 "build" -- "$KINDRED" build -q "$WORK/x.kin" "$WORK/corpus.jsonl"
expect_exit 0 "the intact index audits clean" -- "$KINDRED" audit "$WORK/x.kin"

# Rewrites one band_docs entry of the first segment (src/index/FORMAT.md),
# then the tables checksum and the commit record's checksum (XXH3-64, seed 0).
cp "$WORK/x.kin" "$WORK/keys.kin"
$PY - "$WORK/keys.kin" <<'PYEOF' || fail "damaging the band-key table"
import struct, sys, xxhash
path = sys.argv[1]
data = bytearray(open(path, "rb").read())
pad = lambda n: (n + 7) // 8 * 8
perms = struct.unpack_from("<I", data, 32)[0]
seg = 1536  # the first segment, in versions 2 and 3
assert data[seg:seg + 4] == b"KSEG"
_, docs, _, _, id_bytes, shingle_bytes, keys, retired = struct.unpack_from("<IIIQQQQQ", data, seg + 4)
body = seg + 64
band_keys = body + pad(docs * 56) + pad(docs * 4) + pad(docs * 4 * perms)
band_docs = band_keys + pad(keys * 8)
tables_end = band_docs + pad(keys * 4) + pad(retired * 8) + pad(id_bytes)
commit = tables_end + pad(shingle_bytes)
assert data[commit:commit + 4] == b"KCMT"
key = lambda i: struct.unpack_from("<Q", data, band_keys + 8 * i)[0]
# An entry whose key no neighbour shares: naming another document keeps the
# table sorted as the format requires.
i = next(i for i in range(1, keys - 1) if key(i - 1) != key(i) != key(i + 1))
doc = struct.unpack_from("<I", data, band_docs + 4 * i)[0]
struct.pack_into("<I", data, band_docs + 4 * i, (doc + 1) % docs)
struct.pack_into("<Q", data, commit + 16, xxhash.xxh3_64_intdigest(bytes(data[seg:tables_end])))
struct.pack_into("<Q", data, commit + 24, xxhash.xxh3_64_intdigest(bytes(data[commit:commit + 24])))
open(path, "wb").write(data)
PYEOF
cmp -s "$WORK/x.kin" "$WORK/keys.kin" && fail "the band-key table was not changed"
expect_exit 0 "every checksum still verifies: info opens it" -- "$KINDRED" info "$WORK/keys.kin"
expect_exit 4 "audit a damaged band-key table" -- "$KINDRED" audit "$WORK/keys.kin"
grep -qxF "problem: the band-key tables do not match the stored signatures" "$WORK/out" ||
  fail "audit names no band-key finding: $(cat "$WORK/out")"
expect_stderr "keys.kin: 1 problem" "audit: only that finding"

finish
