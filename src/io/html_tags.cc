// The element names of the fast HTML-to-text path.
#include "io/html_tags.h"

#include <cstring>
#include <vector>

#include "absl/strings/str_split.h"

namespace kindred::io::html_tags {
namespace {

constexpr uint16_t P = kPhrasing, K = kSkipped, S = kSpecial, F = kFormatElement,
                   B = kScopeBoundary, I = kImpliedEnd, H = kHeadingFlag, T = kTableContext;

struct Row {
  const char* names;  // space-separated
  Start start;
  End end;
  uint16_t flags;
};

// The HTML standard's tree construction rules, "in body", as the reference
// parser (Gumbo 0.10.1) implements them; flags from the standard's
// categories and the text definition's lists. Only names the reference
// parser knows are here: it treats every other name alike (see
// HtmlTree::AnyOtherEndTag).
const Row kRows[] = {
    {"html", Start::kIgnored, End::kIgnore, S | B | T},
    {"head", Start::kIgnored, End::kAnyOther, S | K},
    {"body", Start::kIgnored, End::kIgnore, S},
    {"title", Start::kTitle, End::kAnyOther, S},
    {"base basefont bgsound", Start::kHeadVoid, End::kAnyOther, S},
    {"link meta", Start::kHeadVoid, End::kAnyOther, S | P},
    {"style", Start::kStyle, End::kAnyOther, S | K},
    {"noframes", Start::kStyle, End::kAnyOther, S},
    {"script", Start::kScript, End::kAnyOther, S | K | P},
    {"noscript", Start::kOrdinary, End::kAnyOther, S | K | P},
    {"template", Start::kBail, End::kIgnore, S | K | P | B},
    {"address article aside blockquote center details dir div dl fieldset "
     "figcaption figure "
     "footer header hgroup menu nav ol section summary ul",
     Start::kBlock, End::kBlock, S},
    // Not in the reference parser's "special" category.
    {"main", Start::kBlock, End::kBlock, 0},
    {"p", Start::kBlock, End::kParagraph, S | I},
    {"h1 h2 h3 h4 h5 h6", Start::kHeading, End::kHeading, S | H},
    {"pre listing", Start::kPre, End::kBlock, S},
    {"hr", Start::kHr, End::kAnyOther, S},
    {"li", Start::kListItem, End::kListItem, S | I},
    {"dd dt", Start::kDefinition, End::kDefinition, S | I},
    {"form", Start::kForm, End::kForm, S},
    {"button", Start::kButton, End::kBlock, S | P},
    {"a", Start::kAnchor, End::kFormatting, F | P},
    {"b big code em font i s small strike strong tt u", Start::kFormatting, End::kFormatting,
     F | P},
    {"nobr", Start::kNobr, End::kFormatting, F | P},
    {"applet marquee", Start::kMarker, End::kMarker, S | B},
    {"object", Start::kMarker, End::kMarker, S | B | P},
    {"table", Start::kTable, End::kAnyOther, S | B | T},
    {"caption", Start::kIgnored, End::kAnyOther, S | B},
    {"colgroup col tbody thead tfoot tr frame", Start::kIgnored, End::kAnyOther, S},
    {"td th", Start::kIgnored, End::kAnyOther, S | B},
    {"area embed img input wbr", Start::kVoid, End::kAnyOther, S | P},
    {"br", Start::kVoid, End::kBreak, S | P},
    {"image", Start::kVoid, End::kAnyOther, P},
    {"param source track", Start::kVoidPlain, End::kAnyOther, S},
    {"textarea", Start::kTextarea, End::kAnyOther, S | P},
    {"xmp", Start::kXmp, End::kAnyOther, S},
    {"iframe", Start::kRawVisible, End::kAnyOther, S | P},
    {"noembed", Start::kRawVisible, End::kAnyOther, S},
    {"option optgroup", Start::kOption, End::kAnyOther, I},
    {"svg math", Start::kForeign, End::kAnyOther, K | P},
    {"select", Start::kBail, End::kAnyOther, S | P},
    {"rb rp rt rtc", Start::kBail, End::kAnyOther, I | P},
    {"frameset plaintext isindex menuitem keygen mi mo mn ms mtext mglyph "
     "malignmark "
     "annotation-xml foreignobject desc",
     Start::kBail, End::kAnyOther, S},
    {"abbr audio bdi bdo canvas cite data datalist del dfn ins kbd label map "
     "mark meter output "
     "progress q ruby samp span sub sup time var video acronym "
     "blink",
     Start::kOrdinary, End::kAnyOther, P},
    {"legend multicol spacer nextid", Start::kOrdinary, End::kAnyOther, 0},
};

// The elements OpenElementBound (io/html_text.h) does not count.
bool NeverDeepName(absl::string_view name) {
  static constexpr absl::string_view kNames[] = {
      "area",     "base",    "br",     "col",   "embed",  "hr",       "img",    "input",
      "link",     "meta",    "source", "track", "wbr",    "param",    "keygen", "image",
      "p",        "li",      "dt",     "dd",    "option", "optgroup", "tr",     "td",
      "th",       "thead",   "tbody",  "tfoot", "rb",     "rt",       "rp",     "rtc",
      "colgroup", "caption", "html",   "head",  "body"};
  for (absl::string_view never : kNames) {
    if (name == never) return true;
  }
  return false;
}

constexpr int kSlots = 512;

struct Table {
  std::vector<TagInfo> infos;
  TagId slots[kSlots] = {};

  static unsigned Hash(absl::string_view name) {
    unsigned h = static_cast<unsigned>(name.size()) * 131;
    for (char c : name) h = h * 31 + static_cast<unsigned char>(c);
    return h % kSlots;
  }
  Table() {
    infos.push_back({"", 0, Start::kOrdinary, End::kAnyOther, 0});  // kUnknown
    for (const Row& row : kRows) {
      for (absl::string_view name : absl::StrSplit(row.names, ' ')) {
        char* copy = new char[name.size() + 1];  // lives as long as the process
        std::memcpy(copy, name.data(), name.size());
        copy[name.size()] = '\0';
        const TagId id = static_cast<TagId>(infos.size());
        const uint16_t never_deep = NeverDeepName(name) ? kNeverDeep : 0;
        infos.push_back({copy, static_cast<uint8_t>(name.size()), row.start, row.end,
                         static_cast<uint16_t>(row.flags | never_deep)});
        unsigned slot = Hash(name);
        while (slots[slot] != kUnknown) slot = (slot + 1) % kSlots;
        slots[slot] = id;
      }
    }
  }
  TagId Find(absl::string_view name) const {
    for (unsigned slot = Hash(name);; slot = (slot + 1) % kSlots) {
      const TagId id = slots[slot];
      if (id == kUnknown || absl::string_view(infos[id].name, infos[id].length) == name) return id;
    }
  }
};

const Table& TheTable() {
  static const Table* table = new Table();
  return *table;
}

TagId Id(const char* name) { return TheTable().Find(name); }

}  // namespace

const TagInfo& Info(TagId id) { return TheTable().infos[id]; }

TagId LookUpTag(absl::string_view name) {
  if (name.size() > 14) return kUnknown;
  return TheTable().Find(name);
}

const TagId kHtml = Id("html"), kHead = Id("head"), kBody = Id("body"), kP = Id("p"),
            kLi = Id("li"), kDd = Id("dd"), kDt = Id("dt"), kTable = Id("table"),
            kTbody = Id("tbody"), kThead = Id("thead"), kTfoot = Id("tfoot"), kTr = Id("tr"),
            kTd = Id("td"), kTh = Id("th"), kForm = Id("form"), kButton = Id("button"),
            kA = Id("a"), kNobr = Id("nobr"), kNoscript = Id("noscript"), kBr = Id("br"),
            kImg = Id("img"), kImage = Id("image"), kOl = Id("ol"), kUl = Id("ul"),
            kOption = Id("option"), kOptgroup = Id("optgroup"), kTextarea = Id("textarea"),
            kTitle = Id("title"), kScript = Id("script"), kStyle = Id("style"),
            kNoframes = Id("noframes"), kTemplate = Id("template"), kSvg = Id("svg"),
            kMath = Id("math"), kSelect = Id("select"), kCaption = Id("caption"),
            kColgroup = Id("colgroup"), kCol = Id("col"), kFrameset = Id("frameset");

}  // namespace kindred::io::html_tags
