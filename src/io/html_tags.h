// Internal: the element names the fast HTML-to-text path knows, with what
// the HTML5 tree construction rules (as the reference parser, Gumbo 0.10,
// implements them) and the text definition say about each.
//
// Thread-safety: constant data after first use; LookUpTag is thread-safe.
#ifndef KINDRED_IO_HTML_TAGS_H_
#define KINDRED_IO_HTML_TAGS_H_

#include <cstdint>

#include "absl/strings/string_view.h"

namespace kindred::io::html_tags {

// What a start tag does in the "in body" insertion mode.
enum class Start : uint8_t {
  kOrdinary,  // "any other start tag": reconstruct, insert
  kBlock,     // close a p element in button scope, insert
  kHeading,   // h1..h6
  kPre,       // pre, listing: a block; a leading LF is dropped
  kForm,
  kListItem,    // li
  kDefinition,  // dd, dt
  kButton,
  kAnchor,      // a
  kFormatting,  // b big code em font i s small strike strong tt u
  kNobr,
  kMarker,  // applet marquee object
  kTable,
  kVoid,       // area br embed img input keygen wbr (image is img)
  kVoidPlain,  // param source track: void, no reconstruction
  kHr,
  kTextarea,
  kXmp,
  kRawVisible,  // iframe noembed
  kOption,      // option optgroup
  kForeign,     // svg math
  kIgnored,     // in body: caption col colgroup frame head tbody td tfoot th thead
                // tr html body
  kHeadVoid,    // base basefont bgsound link meta
  kScript,
  kStyle,  // style (skipped), noframes (visible): RAWTEXT
  kTitle,
  kBail,  // left to the reference parser
};

// What an end tag does in "in body".
enum class End : uint8_t {
  kAnyOther,
  kBlock,  // in scope: generate implied end tags, pop until it
  kForm,
  kParagraph,
  kListItem,
  kDefinition,
  kHeading,
  kFormatting,  // the adoption agency algorithm
  kMarker,
  kBreak,   // </br> acts as <br>
  kIgnore,  // body, html (no effect on the text), template
};

enum Flags : uint16_t {
  kPhrasing = 1,        // no line breaks around it (the definition's list)
  kSkipped = 2,         // its contents are left out of the text
  kSpecial = 4,         // the standard's "special" category
  kFormatElement = 8,   // a formatting element
  kScopeBoundary = 16,  // ends the default scope
  kImpliedEnd = 32,     // popped by "generate implied end tags"
  kHeadingFlag = 64,
  kTableContext = 128,  // table, html: "clear the stack back to a table context"
  kNeverDeep = 256,     // void, or its end tag may be left out (OpenElementBound)
};

// Identifies a known name; kUnknown for any other (an ordinary element).
using TagId = uint8_t;
inline constexpr TagId kUnknown = 0;

struct TagInfo {
  const char* name;  // NUL-terminated
  uint8_t length;
  Start start;
  End end;
  uint16_t flags;
};

// Information on tag `id`.
const TagInfo& Info(TagId id);

// The id of lower-case name `name`, kUnknown if not known.
TagId LookUpTag(absl::string_view name);

// Ids the tree rules name directly.
extern const TagId kHtml, kHead, kBody, kP, kLi, kDd, kDt, kTable, kTbody, kThead, kTfoot, kTr, kTd,
    kTh, kForm, kButton, kA, kNobr, kNoscript, kBr, kImg, kImage, kOl, kUl, kOption, kOptgroup,
    kTextarea, kTitle, kScript, kStyle, kNoframes, kTemplate, kSvg, kMath, kSelect, kCaption,
    kColgroup, kCol, kFrameset;

}  // namespace kindred::io::html_tags

#endif  // KINDRED_IO_HTML_TAGS_H_
