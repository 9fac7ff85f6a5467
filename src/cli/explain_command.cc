// kindred explain: why two documents match (exact and estimated similarity,
// containment, shingle counts, and the shared passages marked in both texts).
#include <unistd.h>

#include <cstdio>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "cli/cli.h"
#include "cli/common_options.h"
#include "cli/index_options.h"
#include "cli/formats.h"
#include "cli/output.h"
#include "cli/usage.h"
#include "kindred/explain.h"
#include "kindred/index.h"
#include "kindred/records.h"
#include "kindred/signer.h"
#include "kindred/text.h"

namespace kindred::cli {
namespace {

struct ExplainFlags {
  std::string a, b;
  std::vector<std::string> corpus;
  std::string index;
  InputFlags input;
  SignatureFlags signature;
  std::string color = "auto";
  size_t passages = 10;
  bool no_text = false;
  std::string format = "text";
};

// What explain works from: texts (when known) and, from an index, the
// stored numbers.
struct Subject {
  std::string name_a, name_b;
  bool has_texts = false;
  std::string text_a, text_b;
};

// One file read as one text document, exactly as sweep reads a text file:
// gzip or zstd detected by content and decompressed, with the same limits.
absl::StatusOr<std::string> ReadFileText(const std::string& path, const InputOptions& options) {
  InputOptions text = options;
  text.format = InputFormat::kText;
  absl::StatusOr<std::unique_ptr<CorpusReader>> reader = CorpusReader::Open({path}, text);
  if (!reader.ok()) return reader.status();
  if ((*reader)->ResolvedInputs()[0].is_directory) {
    return absl::InvalidArgumentError(
        absl::StrCat(path, ": is a directory; give a file, or ids with --corpus"));
  }
  std::vector<Document> batch;
  absl::StatusOr<size_t> read = (*reader)->ReadBatch(&batch, 1, 1);
  if (!read.ok()) return read.status();
  if (*read != 1) return absl::InvalidArgumentError(absl::StrCat(path, ": no document"));
  return std::move(batch[0].text);
}

absl::Status LoadTexts(const ExplainFlags& flags, Subject* subject) {
  subject->name_a = flags.a;
  subject->name_b = flags.b;
  if (flags.corpus.empty()) {
    if (!flags.index.empty()) return absl::OkStatus();
    absl::StatusOr<InputOptions> options = ToInputOptions(flags.input);
    if (!options.ok()) return options.status();
    absl::StatusOr<std::string> a = ReadFileText(flags.a, *options);
    if (!a.ok()) return a.status();
    absl::StatusOr<std::string> b = ReadFileText(flags.b, *options);
    if (!b.ok()) return b.status();
    subject->text_a = std::move(*a);
    subject->text_b = std::move(*b);
  } else {
    absl::StatusOr<InputOptions> options = ToInputOptions(flags.input);
    if (!options.ok()) return options.status();
    absl::StatusOr<std::unique_ptr<CorpusReader>> reader =
        CorpusReader::Open(flags.corpus, *options);
    if (!reader.ok()) return reader.status();
    const std::vector<std::string> ids = {flags.a, flags.b};
    absl::StatusOr<std::vector<std::string>> texts = ReadTexts(**reader, ids);
    if (!texts.ok()) return texts.status();
    subject->text_a = std::move((*texts)[0]);
    subject->text_b = std::move((*texts)[1]);
  }
  subject->has_texts = true;
  return absl::OkStatus();
}

// Numbers from the index's stored sets and signatures; passages from the
// texts when there are any.
absl::StatusOr<Explanation> ExplainFromIndex(const ExplainFlags& flags, const Subject& subject) {
  ReportStaleTempFiles(flags.index);
  absl::StatusOr<std::unique_ptr<IndexReader>> index = IndexReader::Open(flags.index);
  if (!index.ok()) return index.status();
  const SignatureSettings settings = (*index)->settings().signature;
  Explanation out;
  if (subject.has_texts) {
    absl::StatusOr<Explanation> from_texts = Explain(subject.text_a, subject.text_b, settings);
    if (!from_texts.ok()) return from_texts.status();
    out = std::move(*from_texts);
  }
  out.settings = settings;
  std::vector<uint64_t> sets[2];
  uint32_t docs[2];
  for (int side = 0; side < 2; ++side) {
    const std::string& id = side == 0 ? flags.a : flags.b;
    std::optional<uint32_t> doc = (*index)->FindLive(id);
    if (!doc) {
      return absl::NotFoundError(absl::StrCat("id \"", id, "\" is not in ", flags.index));
    }
    docs[side] = *doc;
    if (absl::Status s = (*index)->ReadShingles(*doc, &sets[side]); !s.ok()) return s;
  }
  MeasureExplanation(sets[0], sets[1], (*index)->signature(docs[0]), (*index)->signature(docs[1]),
                     &out);
  return out;
}

std::string Numbers(const Subject& subject, const Explanation& e) {
  const ScoredPair& o = e.measure;
  std::string out = absl::StrFormat(
      "a: %s\nb: %s\nsettings: %s\n\n"
      "exact Jaccard            %.4f\nsignature estimate       %.4f  (%u "
      "perms)\n"
      "containment of a in b    %.4f\ncontainment of b in a    %.4f\n"
      "shingles of a            %u\nshingles of b            %u\nshared "
      "shingles          %u\n"
      "only in a                %u\nonly in b                %u\n",
      subject.name_a, subject.name_b, e.settings.ToString(), o.jaccard, o.estimate,
      e.settings.perms, o.ContainmentOfAInB(), o.ContainmentOfBInA(), o.size_a, o.size_b, o.shared,
      o.size_a - o.shared, o.size_b - o.shared);
  for (const auto& [name, size] : {std::pair{"a", o.size_a}, std::pair{"b", o.size_b}}) {
    if (size == 0) {
      out += absl::StrFormat(
          "note: %s has no shingles; an empty document is never anyone's "
          "duplicate\n",
          name);
    }
  }
  return out;
}

// A short one-line excerpt of a span.
std::string Excerpt(const std::string& text, const TextSpan& span) {
  std::string excerpt =
      RepairUtf8(std::string_view(text).substr(span.begin, span.end - span.begin));
  for (char& c : excerpt) {
    if (c == '\n' || c == '\r' || c == '\t') c = ' ';
  }
  if (excerpt.size() > 160) {
    size_t cut = 150;
    while (cut > 0 && (static_cast<unsigned char>(excerpt[cut]) & 0xC0) == 0x80) --cut;
    excerpt = absl::StrCat(excerpt.substr(0, cut), " ... (", span.end - span.begin, " bytes)");
  }
  return excerpt;
}

std::string Passages(const Subject& subject, const Explanation& e, size_t limit) {
  std::string out = absl::StrFormat(
      "\nLongest shared passages (%u in all; byte ranges of a = b):\n", e.passages.size());
  for (size_t i = 0; i < e.passages.size() && i < limit; ++i) {
    const AlignedPassage& p = e.passages[i];
    out += absl::StrFormat("%3u. a %u-%u = b %u-%u, %u shingles\n     \"%s\"\n", i + 1, p.a.begin,
                           p.a.end, p.b.begin, p.b.end, p.shingles, Excerpt(subject.text_a, p.a));
  }
  return out;
}

std::string MarkedTexts(const Subject& subject, const Explanation& e, bool color) {
  const std::string open = color ? "\x1b[30;43m" : "[[";
  const std::string close = color ? "\x1b[0m" : "]]";
  return absl::StrFormat(
      "\na, shared passages marked %s:\n%s\n\nb, shared passages marked "
      "%s:\n%s\n",
      color ? "in colour" : "[[like this]]",
      RepairUtf8(MarkSpans(subject.text_a, e.marked_a, open, close)),
      color ? "in colour" : "[[like this]]",
      RepairUtf8(MarkSpans(subject.text_b, e.marked_b, open, close)));
}

void AppendSpans(const std::vector<TextSpan>& spans, RecordWriter* record) {
  record->BeginList();
  for (const TextSpan& span : spans) record->NumberItem({span.begin, span.end});
  record->EndList();
}

void AppendPassages(const std::vector<AlignedPassage>& passages, RecordWriter* record) {
  record->BeginList();
  for (const AlignedPassage& p : passages) {
    RecordWriter item = record->ListItem({"a", "b", "shingles"});
    item.NumberList({p.a.begin, p.a.end});
    item.NumberList({p.b.begin, p.b.end});
    item.Number(p.shingles);
    item.EndItem();
  }
  record->EndList();
}

std::string JsonRecord(const Subject& subject, const Explanation& e) {
  std::vector<std::string> columns = {"a",          "b",          "jaccard",
                                      "estimate",   "containment_a_in_b", "containment_b_in_a",
                                      "shingles_a", "shingles_b", "shared",
                                      "perms"};
  if (subject.has_texts) columns.insert(columns.end(), {"marked_a", "marked_b", "passages"});
  std::string out;
  RecordWriter record(RecordFormat::kJsonLines, std::move(columns), &out);
  record.String(subject.name_a);
  record.String(subject.name_b);
  const ScoredPair& m = e.measure;
  for (double value : {m.jaccard, m.estimate, m.ContainmentOfAInB(), m.ContainmentOfBInA()}) {
    record.Similarity(value);
  }
  for (uint64_t value :
       {uint64_t{m.size_a}, uint64_t{m.size_b}, uint64_t{m.shared}, uint64_t{e.settings.perms}}) {
    record.Number(value);
  }
  if (subject.has_texts) {
    AppendSpans(e.marked_a, &record);
    AppendSpans(e.marked_b, &record);
    AppendPassages(e.passages, &record);
  }
  record.EndRow();
  return out;
}

// --color: auto (on a terminal), always or never.
absl::StatusOr<bool> UseColor(std::string_view color) {
  if (color == "always") return true;
  if (color == "never") return false;
  if (color == "auto") return isatty(STDOUT_FILENO) == 1;
  return absl::InvalidArgumentError("--color: expected auto, always or never");
}

int RunExplainCommand(const ExplainFlags& flags) {
  if (absl::StatusOr<InputOptions> options = ToInputOptions(flags.input); !options.ok()) {
    return Fail(kExitUsage, options.status());
  }
  absl::StatusOr<OutputFormat> format = ParseOutputFormat(flags.format);
  if (!format.ok()) return Fail(kExitUsage, format.status());
  absl::StatusOr<bool> color = UseColor(flags.color);
  if (!color.ok()) return Fail(kExitUsage, color.status());
  Subject subject;
  if (absl::Status s = LoadTexts(flags, &subject); !s.ok()) return Fail(kExitInput, s);
  absl::StatusOr<Explanation> explanation;
  if (!flags.index.empty()) {
    explanation = ExplainFromIndex(flags, subject);
  } else {
    absl::StatusOr<SignatureSettings> settings = ToSignatureSettings(flags.signature);
    if (!settings.ok()) return Fail(kExitUsage, settings.status());
    explanation = Explain(subject.text_a, subject.text_b, *settings);
  }
  if (!explanation.ok()) return Fail(explanation.status());
  std::string out;
  if (*format == OutputFormat::kJson) {
    out = JsonRecord(subject, *explanation);
  } else {
    out = Numbers(subject, *explanation);
    if (subject.has_texts) {
      out += Passages(subject, *explanation, flags.passages);
      if (!flags.no_text) out += MarkedTexts(subject, *explanation, *color);
    } else {
      out +=
          "\n(the index holds shingle sets, not texts: give --corpus too to "
          "see the passages)\n";
    }
  }
  if (absl::Status s = WriteOutputFile("-", out); !s.ok()) return Fail(kExitOutput, s);
  return kExitOk;
}

}  // namespace

void RegisterExplain(CLI::App& app, int* exit_code) {
  auto flags = std::make_shared<ExplainFlags>();
  CLI::App* command = app.add_subcommand("explain",
                                         "Show why two documents match: exact and "
                                         "estimated similarity, containment, "
                                         "and the shared passages marked");
  command->add_option("a", flags->a, "first document: a file, or an id with --corpus/--index")
      ->required();
  command->add_option("b", flags->b, "second document: a file, or an id with --corpus/--index")
      ->required();
  command
      ->add_option("--corpus", flags->corpus,
                   "read the two documents by id from this corpus (a directory or file; "
                   "repeat for more)")
      ->allow_extra_args(false)
      ->group("Input");
  command
      ->add_option("--index", flags->index,
                   "take the numbers from this index file (its settings); with "
                   "--corpus also "
                   "show the passages")
      ->group("Input");
  AddInputOptions(command, &flags->input);
  AddSignatureOptions(command, &flags->signature);
  command
      ->add_option("--color", flags->color,
                   "mark passages in colour: auto (on a terminal), "
                   "always or never ([[ ]] markers)")
      ->check(CLI::IsMember({"auto", "always", "never"}))
      ->default_str("auto")
      ->group("Output");
  command->add_option("--passages", flags->passages, "longest shared passages listed")
      ->transform(WholeNumber(0, UINT32_MAX))
      ->default_str("10")
      ->group("Output");
  command->add_flag("--no-text", flags->no_text, "do not print the two marked texts")
      ->group("Output");
  AddFormatOption(command, &flags->format, {"text", "json"}, {{"jsonl", "json"}});
  command->callback([flags, exit_code] { *exit_code = RunExplainCommand(*flags); });
}

}  // namespace kindred::cli
