#!/usr/bin/env bash
# Writes the seed inputs of the fuzz targets under tests/fuzz/seeds/<target>/.
# Deterministic: the same program gives the same bytes. The index seeds are
# made by the program itself (`kindred build` and `kindred add`); the v1_*
# index seeds are format version 1 files made by the previous release and
# are kept as they are (this script does not write them).
#
#   tests/fuzz/make_seeds.sh build/kindred
set -euo pipefail
kindred=$(realpath "$1")
seeds="$(cd "$(dirname "$0")" && pwd)/seeds"
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT

# seed TARGET NAME CONTROL_BYTE_OCTAL: stdin, after one control byte.
seed() {
  mkdir -p "$seeds/$1"
  { [[ -n "${3:-}" ]] && printf "\\$3"; cat; } >"$seeds/$1/$2"
}

# --- text: control byte (bit 0 char mode, bits 1-3 k-1), then the text ---
printf 'The harbour board met on Tuesday; it can'\''t wait. 3.14 and 1,000,000 boats.' | seed text english 010
printf 'Η επιτροπή του λιμανιού συνεδρίασε την Τρίτη.' | seed text greek 010
printf '港の委員会は火曜日に会合を開いた。カタカナとひらがな。' | seed text japanese 001
printf 'El puerto cerró el martes; ¿mañana? Ñandú ﬁnal ＡＢＣ１２３' | seed text spanish_fold 004
printf 'Broken \xff\xfe \xc3 \xe2\x82 bytes \xed\xa0\x80 surrogate \xf4\x90\x80\x80 high' | seed text invalid_utf8 010
printf 'a\0b\0c NUL\0bytes\tand\r\ncontrol \x1c\x1d\x1e\x1f chars' | seed text nul_control 011
printf 'e\xcc\x81 combining \xe1\x84\x80\xe1\x85\xa1 jamo 한국어 👩‍👩‍👧 🇬🇧 emoji' | seed text marks_emoji 000
printf 'x' | seed text one_char 003
printf '   \t\n  ' | seed text only_space 002
printf 'word' | seed text one_word 010
printf 'mixed ASCII text with one café in the middle of a long ASCII run of words here' | seed text mostly_ascii 010
printf 'U.S.A. e-mail x_y 3a.b 1.2.3 a:b can’t o\x27clock' | seed text ascii_rules 002

# --- jsonl: control byte (bit 0 @line ids, bit 1 priority "p", bit 2 64-byte limit) ---
printf '{"id":"a","text":"one two three"}\n{"id":"b","text":"four five","p":2}\n' | seed jsonl plain 002
printf '{"id":7,"text":"integer id"}\r\n\r\n  \n{"id":"x","text":"crlf and blank"}' | seed jsonl crlf_blank 000
printf '{"id":"e","text":"esc \\u0000 \\ud83d\\ude00 \\n \\" \\\\ \\u00e9"}\n' | seed jsonl escapes 000
printf '{"id":"s","text":"lone \\ud800 surrogate"}\n' | seed jsonl lone_surrogate 000
printf '{"id":"u","text":"bad \xff byte"}\n{"id":"v","text":"fine"}\n' | seed jsonl invalid_utf8 000
printf '{"id":"a","text":"x"}\n{"id":"b","body":"no text"}\n' | seed jsonl missing_field 000
printf '{"id":"a","text":"x"}\n{"id":"b","text":\n' | seed jsonl malformed 000
printf '{"id":["no"],"text":{"nested":true},"p":"high"}\n' | seed jsonl wrong_types 002
printf '{"text":"ids from lines"}\n{"text":"second"}\n' | seed jsonl line_ids 001
printf '{"id":"long","text":"%s"}\n' "$(head -c 200 /dev/zero | tr '\0' 'y')" | seed jsonl over_limit 004
printf '[1,2]\n"string"\nnull\n{"id":"a","text":"x","id":"b"}\n' | seed jsonl not_objects 000

# --- compressed: the file's bytes ---
text='The harbour board met on Tuesday evening to discuss the dredging.'
printf '%s\n' "$text" | gzip -9 -n | seed compressed gzip
{ printf 'first member\n' | gzip -n; printf 'second member\n' | gzip -n; } | seed compressed gzip_members
/usr/bin/python3 -c '
import gzip, sys
sys.stdout.buffer.write(gzip.compress(b"header with a name and mtime\n", mtime=1))' | seed compressed gzip_header
printf '' | gzip -n | seed compressed gzip_empty
printf '%s\n' "$text" | zstd -q -19 -c | seed compressed zstd
{ printf 'frame one\n' | zstd -q -c; printf 'frame two\n' | zstd -q -c --no-check; } | seed compressed zstd_frames
head -c 3000 /dev/zero | zstd -q -c | seed compressed zstd_zeros
printf '%s\n' "$text" | gzip -n | head -c 30 | seed compressed gzip_truncated
printf '%s\n' "$text" | seed compressed plain

# --- labels: the file's bytes ---
printf 'a\tb\tlabel\ndoc1\tdoc2\tduplicate\ndoc1\tdoc3\tno\n' | seed labels tsv_header
printf 'a,b,label\r\n"doc, one","doc ""two""",yes\r\n3,4,0\r\n' | seed labels csv_quoted
printf '{"a":"x","b":"y","label":true}\n{"a":1,"b":2,"label":"distinct"}\n\n' | seed labels jsonl
printf 'x\ty\tmaybe\n' | seed labels unknown_label
printf 'x,x,dup\n' | seed labels self_pair
printf 'x,y,1\ny,x,0\n' | seed labels twice
printf '"unterminated,quote,1\n' | seed labels bad_quote

# --- index: control byte (bit 0 fix checksums, bit 1 other banding), then the file ---
cat >"$work/docs.jsonl" <<'JSONL'
{"id":"a","text":"the harbour board met on tuesday to discuss dredging"}
{"id":"b","text":"the harbour board met on tuesday to discuss the dredging"}
{"id":"c","text":"lost cat grey tabby"}
{"id":"d","text":""}
JSONL
printf '{"id":"e","text":"a new upload about the harbour board meeting"}\n{"id":"a","text":"replaced"}\n' >"$work/more.jsonl"
q=(-q --threads 1)
"$kindred" build "${q[@]}" "$work/one.kin" "$work/docs.jsonl" --perms 8 --bands 4 --rows 2
seed index one_segment 001 <"$work/one.kin"
seed index one_segment_raw 002 <"$work/one.kin"
cp "$work/one.kin" "$work/two.kin"
"$kindred" add "${q[@]}" "$work/two.kin" "$work/more.jsonl" --on-duplicate replace >/dev/null
seed index two_segments 003 <"$work/two.kin"
"$kindred" build "${q[@]}" "$work/char.kin" "$work/docs.jsonl" --perms 4 --bands 2 --rows 2 \
  --shingle char -k 3 --signer classic
seed index char_classic 001 <"$work/char.kin"
head -c 200 "$work/two.kin" | seed index truncated 001
echo "seeds written under $seeds"

# --- warc: control byte (bit 0 record ids, bit 1 any status, bit 2 4 KiB limit, bit 3 strict), then the file ---
warc_record() {  # TYPE URI CONTENT_TYPE BLOCK [EXTRA_HEADER_LINE]
  printf 'WARC/1.1\r\nWARC-Type: %s\r\nWARC-Target-URI: %s\r\nWARC-Record-ID: <urn:uuid:%s>\r\n%sContent-Type: %s\r\nContent-Length: %d\r\n\r\n%s\r\n\r\n' \
    "$1" "$2" "$(printf '%s' "$2" | md5sum | cut -c1-12)" "${5:-}" "$3" "${#4}" "$4"
}
http_page=$'HTTP/1.1 200 OK\r\nContent-Type: text/html; charset=utf-8\r\n\r\n<p>The harbour <b>board</b> met.</p>'
chunked=$'HTTP/1.1 200 OK\r\nContent-Type: text/html\r\nTransfer-Encoding: chunked\r\n\r\n5\r\n<p>ab\r\n3\r\ncd.\r\n0\r\n\r\n'
{ warc_record warcinfo "" application/warc-fields $'software: seed\r\n'
  warc_record request http://a.test/ 'application/http; msgtype=request' $'GET / HTTP/1.1\r\n\r\n'
  warc_record response http://a.test/ 'application/http; msgtype=response' "$http_page"
  warc_record response http://a.test/c 'application/http; msgtype=response' "$chunked" $'WARC-Payload-Digest: sha1:AAAA\r\n'
  warc_record resource '<http://a.test/r>' 'text/plain; charset=latin1' $'caf\xe9 au lait'
  warc_record conversion http://a.test/ text/plain 'converted text'
} | seed warc records 000
warc_record response http://a.test/404 'application/http; msgtype=response' \
  $'HTTP/1.1 404 Not Found\r\nContent-Type: text/html\r\n\r\ngone' | seed warc status 002
printf 'not a warc file\n' | seed warc not_warc 000
warc_record resource http://a.test/ text/plain 'short' | head -c 60 | seed warc truncated 010

# --- html: control byte (declared charset 0-7, bit 3 plain text), then the payload ---
printf '<!DOCTYPE html><html><head><title>t</title><style>s</style></head><body><p>one<p>two<br>three<div>four</div><table><td>5</table>' | seed html page 000
printf '<meta charset="shift_jis"><p>\x82\xa0\x82\xa2</p>' | seed html meta_sjis 000
printf '<p>caf\xe9 \x93q\x94</p>' | seed html cp1252 002
printf '<svg><text>x</text></svg><math><mi>y</mi></math><template>z</template><noscript>n</noscript>ok &amp; &eacute &#0; \0 <![CDATA[c]]>' | seed html hostile 001
printf '\xff\xfe<\0p\0>\0h\0i\0' | seed html bom_utf16 000
printf 'plain text \xe6\xb8\xaf' | seed html plain 011

# --- records: control byte (bit 0 document table, else band-key table; bit 1 fix the frame), then the record ---
# Records of the first lines of the demo corpus signed by the Python package's
# map stage (built beside the program), in the current versions, and the
# same tables in version 1 (fixed-width rows, written here field by field).
head -n 20 "$seeds/../../../sample_corpus/archive.jsonl" >"$work/shard.jsonl"
PYTHONPATH="$(dirname "$kindred")/python" python3 - "$work/shard.jsonl" "$seeds/records" <<'PY'
import ctypes, os, struct, sys
from kindred import Settings, _kindred
xxh3 = ctypes.CDLL("libxxhash.so.0").XXH3_64bits
xxh3.restype, xxh3.argtypes = ctypes.c_uint64, [ctypes.c_char_p, ctypes.c_size_t]
def frame(tag, version, payload):
    head = b"KNDR" + tag + struct.pack("<IIQ", version, 0, len(payload)) + payload
    return head + struct.pack("<Q", xxh3(head, len(head)))
def varint(data, at):
    value = shift = 0
    while True:
        byte = data[at]; at += 1
        value |= (byte & 0x7f) << shift; shift += 7
        if byte < 0x80: return value, at
def band_rows(record):  # version 2 payload -> [(band, key, document)]
    payload, rows = record[24:-8], []
    count, base, width = struct.unpack_from("<QIB", payload); at = 13
    while len(rows) < count:
        band, at = varint(payload, at); n, at = varint(payload, at); low = payload[at]; at += 1
        key = 0
        for _ in range(n):
            high, at = varint(payload, at)
            key += (high << (8 * low)) | int.from_bytes(payload[at:at + low], "little"); at += low
            rows.append((band, key, base + int.from_bytes(payload[at:at + width], "little")))
            at += width
    return rows
table, parts = _kindred.stage_sign_shard(sys.argv[1], Settings(), "auto", "id", "text", "",
                                         15, 8, 2, 1)
os.makedirs(sys.argv[2], exist_ok=True)
def seed(name, control, data):
    with open(os.path.join(sys.argv[2], name), "wb") as out:
        out.write(bytes([control]) + data)
seed("band_keys", 0, parts[0])
seed("band_keys_fix", 2, parts[1])
rows = band_rows(parts[0])
seed("band_keys_v1", 0, frame(b"BKEY", 1, struct.pack("<Q", len(rows)) +
                              b"".join(struct.pack("<IQI", *r) for r in rows)))
seed("band_keys_empty", 0, frame(b"BKEY", 2, struct.pack("<QIB", 0, 0, 0)))
seed("documents", 1, table)
seed("documents_fix", 3, table)
seed("documents_v1", 1, frame(b"DOCS", 1, struct.pack("<IQ", 0, 1) + struct.pack("<I", 1) + b"a" +
                              struct.pack("<QdBIQQI", 3, 0.0, 0, 0, 1, 0, 4)))
PY
