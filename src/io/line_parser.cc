// LineParser: JSON lines a reader left unparsed (CorpusReader::DeferParsing)
// made into documents.
#include "absl/strings/str_cat.h"
#include "io/byte_stream.h"
#include "io/html_text.h"
#include "io/json_line.h"
#include "kindred/corpus.h"
#include "kindred/errors.h"

namespace kindred {

class LineParser::Impl {
 public:
  explicit Impl(const InputOptions& options)
      : json(options),
        ids_with_path(options.ids_with_path && options.id_field != io::kLineNumberId),
        stdin_copy_path(options.stdin_copy_path) {}
  io::JsonLineParser json;
  bool ids_with_path;
  std::string stdin_copy_path;
  std::string line;  // the raw line, swapped out of the document
};

LineParser::LineParser(const InputOptions& options) : impl_(std::make_unique<Impl>(options)) {}
LineParser::~LineParser() = default;

absl::Status LineParser::Finish(Document* doc) {
  if (!doc->unparsed) return absl::OkStatus();
  if (doc->unparsed_html) {
    impl_->line.swap(doc->text);
    doc->unparsed = doc->unparsed_html = false;
    absl::Status made =
        io::HtmlToText(impl_->line, &doc->text, /*valid_utf8=*/true, &doc->html_by_reference);
    if (!made.ok()) {
      return Annotate(made, absl::StrCat(io::DisplayName(doc->source.path), ": ", doc->id));
    }
    return absl::OkStatus();
  }
  // The raw line moves to this parser's buffer and the document's buffer
  // receives the text: both are reused, nothing is allocated per line.
  impl_->line.swap(doc->text);
  doc->unparsed = false;
  const std::string& path = doc->source.path;
  // As io::DisplayName, without a copy of the path for every line.
  const absl::string_view display = path == "-" ? "standard input" : absl::string_view(path);
  absl::Status parsed = impl_->json.Parse(impl_->line, display, doc->source.line, doc);
  if (parsed.ok() && impl_->ids_with_path) {
    // Standard input read again from its copy keeps the name "-".
    const bool copy = !impl_->stdin_copy_path.empty() && path == impl_->stdin_copy_path;
    doc->id.insert(0, absl::StrCat(copy ? absl::string_view("-") : absl::string_view(path), ":"));
  }
  return parsed;
}

}  // namespace kindred
