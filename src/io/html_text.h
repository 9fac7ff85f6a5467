// Internal: the text of an HTML document, by this definition (also in the
// README, "Text of HTML pages"):
//
//   The document is parsed by the HTML5 (WHATWG) parsing algorithm. Its
//   text is the concatenation, in document order, of the text nodes of the
//   resulting tree (character references decoded), leaving out everything
//   inside the elements head, script, style, noscript, template, svg and
//   math (whatever their namespace) and comments. Every element that is not
//   phrasing content adds a line break ("\n") before and after its
//   contents; br adds one line break. The phrasing elements are those of
//   kPhrasingElements below (the HTML standard's list of phrasing content,
//   plus the obsolete inline elements and the parts of ruby), and every
//   element whose name holds a '-' (a custom element); all other elements,
//   known or not, are not phrasing.
//
// The reference implementation parses with Gumbo, a packaged HTML5 parser.
// HtmlToText first tries a fast path of its own (io/html_fast_text.h), which
// gives the same text as the reference on the documents it accepts, and
// leaves every other document to the reference.
//
// Thread-safety: plain functions; safe to call from many threads at once.
#ifndef KINDRED_IO_HTML_TEXT_H_
#define KINDRED_IO_HTML_TEXT_H_

#include <cstdint>
#include <string>

#include "absl/status/status.h"
#include "absl/strings/string_view.h"

namespace kindred::io {

// Space-separated names of the phrasing elements of the definition.
inline constexpr absl::string_view kPhrasingElements =
    "a abbr area audio b bdi bdo br button canvas cite code data datalist del "
    "dfn em embed i "
    "iframe img input ins kbd label link map mark math meta meter noscript "
    "object output picture "
    "progress q ruby s samp script select slot small span strong sub sup svg "
    "template textarea "
    "time u var video wbr acronym big blink font nobr strike tt rb rp rt rtc";

// Space-separated names of the elements whose contents are left out.
inline constexpr absl::string_view kSkippedElements =
    "head script style noscript template svg math";

// A guard on the parser's cost: the HTML5 algorithm scans the stack of open
// elements for many tags, so a page of N nested elements costs time in
// N squared (200,000 nested <div> take minutes). A page whose tags could
// open more than this many elements at once is not parsed.
inline constexpr int kMaxOpenElements = 10000;

// The most elements the tags of `html` could hold open at once: start tags
// count one, end tags take one away, except the void elements and those
// whose end tag may be left out (p, li, td, ...), which never nest deeply.
// Linear, and never less than the parser's depth in practice.
int OpenElementBound(absl::string_view html);

// Whether OpenElementBound(html) > kMaxOpenElements (quick for short pages).
bool NestsTooDeeply(absl::string_view html);

// Appends the text of `html` (UTF-8; ill-formed sequences become U+FFFD as
// the parser reads them) to *out, cleared first. FailedPrecondition, and an
// empty text, when OpenElementBound(html) > kMaxOpenElements; Internal only
// when the parser fails to allocate. `valid_utf8` promises that `html` is
// well-formed UTF-8 (as ConvertToUtf8 makes it), which saves a check.
// *by_reference, when given, is set to whether the reference parser read
// the page (the fast path declined it).
absl::Status HtmlToText(absl::string_view html, std::string* out, bool valid_utf8 = false,
                        bool* by_reference = nullptr);

// The same by the reference implementation alone (Gumbo), for checks.
absl::Status ReferenceHtmlToText(absl::string_view html, std::string* out);

// How many documents HtmlToText has read by each path in this process.
struct HtmlPathCounts {
  uint64_t fast = 0;       // the fast path
  uint64_t reference = 0;  // left to the reference parser
};
HtmlPathCounts HtmlTextPaths();

}  // namespace kindred::io

#endif  // KINDRED_IO_HTML_TEXT_H_
