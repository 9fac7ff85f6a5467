# End to end: kindred's text of HTML pages against an independent
# implementation of the same definition (tests/reference/
# html_text_reference.py: html5lib, Debian python3-html5lib, and PyICU),
# compared as word tokens. Pages: the invented pages of the sample crawl,
# fixed and random hostile markup (tests/reference/hostile_pages.py), and a
# sample of the HTML files under /usr/share. tools/html_reference_all.sh
# runs the same comparison over every HTML file under /usr/share.
source "$(dirname "$0")/common.bash"

TEXTS=$(dirname "$KINDRED")/tools/kindred_texts
REF=$SOURCE_DIR/tests/reference

$PY "$REF/hostile_pages.py" "$WORK/pages" 150 || fail "making hostile pages"
$PY - "$SOURCE_DIR/tools" "$WORK/pages" <<'PY' || fail "writing the crawl pages"
import gzip, os, sys
sys.path.insert(0, sys.argv[1])
import make_sample_crawl as crawl
crawl.build_pages()
for i, (path, (content_type, body, extra)) in enumerate(sorted(crawl.PAGES.items())):
    if not content_type.startswith("text/html"):
        continue
    if extra.get("Content-Encoding") == "gzip":
        body = gzip.decompress(body)
    with open(os.path.join(sys.argv[2], f"crawl_{i:02d}.html"), "wb") as f:
        f.write(body)
PY
# Pages left to the full tool, where their differences are counted: the two
# parsers follow different versions of the standard's rules for <template>
# (html5lib 1.1 and Gumbo 0.10 both predate later changes), and Gumbo 0.10
# puts text that is directly inside a <form> after the form instead of in it
# (so "<form>f</form>b" gives "fb" where the standard's tree gives "f", "b").
for page in "$WORK"/pages/*.html; do
  if grep -aqi -e '<template' -e '<form' "$page"; then
    rm "$page"
  fi
done
find /usr/share/doc -type f \( -name '*.html' -o -name '*.htm' \) -size -100k 2>/dev/null | sort |
  awk 'NR % 25 == 1' | head -8 | xargs -r grep -aLi -e '<template' -e '<form' >"$WORK/system_pages"
mapfile -t pages < <(ls "$WORK"/pages/*.html; cat "$WORK/system_pages")
(( ${#pages[@]} >= 100 )) || fail "only ${#pages[@]} pages to compare"
"$TEXTS" --html "${pages[@]}" >"$WORK/ours.jsonl" || fail "kindred_texts --html"
$PY "$REF/html_text_reference.py" "$WORK/ours.jsonl" "${pages[@]}" >"$WORK/compare" ||
  fail "word tokens differ: $(grep DIFF "$WORK/compare" | head -5)"
grep -q "identical" "$WORK/compare" || fail "no comparison summary"

finish
