#include "service/service_replies.h"

#include <optional>
#include <vector>

#include "kindred/explain.h"
#include "kindred/shingles.h"

namespace kindred::service {
namespace {

// The byte spans of the upload's text whose shingles `other` holds.
void WriteMarkedSpans(const std::vector<ShingleText>& texts, absl::Span<const uint64_t> other,
                      uint64_t seed, RecordWriter* record) {
  record->BeginList();
  for (const TextSpan& span : SharedSpans(texts, other, seed)) {
    const uint64_t bounds[2] = {span.begin, span.end};
    record->NumberItem(bounds);
  }
  record->EndList();
}

}  // namespace

std::vector<std::string> CheckReplyColumns() {
  return {"matches", "checked", "matched", "empty", "seconds"};
}

std::vector<std::string> AddReplyColumns() {
  return {"matches", "documents", "added",          "replaced",
          "skipped", "segment",   "group_requests", "seconds"};
}

absl::Status WriteMatchList(absl::Span<const IndexMatch> matches, const ServiceRequest& request,
                            const IndexReader& reader, const SignedCorpus& batch,
                            const MatchSettings& match, RecordWriter* reply) {
  std::vector<std::string> columns = MatchRecordColumns(&match);
  if (request.marked_spans) columns.push_back("marked_spans");
  std::vector<std::optional<std::vector<ShingleText>>> texts(batch.size());
  std::vector<uint64_t> stored;
  reply->BeginList();
  for (const IndexMatch& m : matches) {
    RecordWriter record = reply->ListItem(columns);
    WriteMatchFields(m, reader, batch, &match, &record);
    if (request.marked_spans) {
      if (!texts[m.query()].has_value()) {
        auto made = ShingleTexts(request.documents[m.query()].text, reader.settings().signature);
        if (!made.ok()) return made.status();
        texts[m.query()] = std::move(*made);
      }
      // m.other() is an index document number, or a batch one.
      absl::Span<const uint64_t> other;
      if (m.in_index) {
        if (absl::Status read = reader.ReadShingles(m.other(), &stored); !read.ok()) return read;
        other = stored;
      } else {
        other = batch.shingles(m.other());
      }
      WriteMarkedSpans(*texts[m.query()], other, reader.settings().signature.seed, &record);
    }
    record.EndItem();
  }
  reply->EndList();
  return absl::OkStatus();
}

void WriteAddedDocuments(const SignedCorpus& batch, const CommitOutcome& outcome,
                         RecordWriter* reply) {
  const std::vector<std::string> columns = {"id", "action", "number"};
  uint64_t counts[3] = {0, 0, 0};
  reply->BeginList();
  for (size_t i = 0; i < batch.size(); ++i) {
    const AddAction action = outcome.actions[i];
    counts[static_cast<int>(action)]++;
    RecordWriter record = reply->ListItem(columns);
    record.String(batch.id(i));
    record.String(AddActionName(action));
    record.Number(outcome.numbers[i]);
    record.EndItem();
  }
  reply->EndList();
  reply->Number(counts[static_cast<int>(AddAction::kAdded)]);
  reply->Number(counts[static_cast<int>(AddAction::kReplaced)]);
  reply->Number(counts[static_cast<int>(AddAction::kSkipped)]);
}

std::string ErrorReply(std::string_view message, std::string_view kind) {
  std::string out;
  RecordWriter writer(RecordFormat::kJsonLines, {"error", "kind"}, &out);
  writer.String(message);
  writer.String(kind);
  writer.EndRow();
  return out;
}

std::string HealthReply(uint32_t live, bool allow_add) {
  std::string out;
  RecordWriter writer(RecordFormat::kJsonLines, {"status", "live", "allow_add"}, &out);
  writer.String("ok");
  writer.Number(live);
  writer.Bool(allow_add);
  writer.EndRow();
  return out;
}

}  // namespace kindred::service
