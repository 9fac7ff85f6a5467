#include "service/index_service.h"

#include <chrono>

#include "absl/cleanup/cleanup.h"
#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "kindred/explain.h"
#include "kindred/records.h"
#include "kindred/shingles.h"

namespace kindred::service {
namespace {

double SecondsSince(std::chrono::steady_clock::time_point start) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
}

// The byte spans of the query document's text whose shingles `other` holds.
void AppendMarkedSpans(const std::vector<ShingleText>& texts, absl::Span<const uint64_t> other,
                       uint64_t seed, std::string* out) {
  *out += ",\"marked_spans\":[";
  bool first = true;
  for (const TextSpan& span : SharedSpans(texts, other, seed)) {
    absl::StrAppend(out, first ? "" : ",", "[", span.begin, ",", span.end, "]");
    first = false;
  }
  *out += "]";
}

// JSON Lines match records -> the elements of a JSON array, each record
// with its marked spans when asked for.
absl::Status RecordsToArray(std::string_view lines, absl::Span<const IndexMatch> matches,
                            const ServiceRequest& request, const IndexReader& reader,
                            const SignedCorpus& batch, std::string* out) {
  std::vector<std::optional<std::vector<ShingleText>>> texts(batch.size());
  std::vector<uint64_t> stored;
  size_t i = 0;
  for (size_t begin = 0; begin < lines.size(); ++i) {
    size_t end = lines.find('\n', begin);
    if (end == std::string_view::npos) end = lines.size();
    std::string_view record = lines.substr(begin, end - begin);
    begin = end + 1;
    if (i > 0) *out += ",";
    if (!request.marked_spans) {
      *out += record;
      continue;
    }
    const IndexMatch& m = matches[i];
    if (!texts[m.query].has_value()) {
      auto made = ShingleTexts(request.documents[m.query].text, reader.settings().signature);
      if (!made.ok()) return made.status();
      texts[m.query] = std::move(*made);
    }
    // m.other is an index document number, or a batch one.
    absl::Span<const uint64_t> other;
    if (m.in_index) {
      if (absl::Status read = reader.ReadShingles(m.other, &stored); !read.ok()) return read;
      other = stored;
    } else {
      other = batch.shingles(m.other);
    }
    *out += record.substr(0, record.size() - 1);  // without the closing brace
    AppendMarkedSpans(*texts[m.query], other, reader.settings().signature.seed, out);
    *out += "}";
  }
  return absl::OkStatus();
}

}  // namespace

absl::StatusOr<std::unique_ptr<IndexService>> IndexService::Open(const ServiceOptions& options) {
  std::unique_ptr<IndexService> service(new IndexService());
  service->options_ = options;
  IndexService* self = service.get();
  if (options.allow_add) {  // the lock first: a busy index fails at once
    IndexWriteOptions write_options;
    write_options.reserve_bytes = options.reserve_bytes;
    auto committer = GroupCommitter::Open(
        options.path, options.max_group_documents, [self] { self->CatchUp(); }, write_options);
    if (!committer.ok()) return committer.status();
    service->committer_ = std::move(*committer);
  }
  auto reader = IndexReader::Open(options.path);
  if (!reader.ok()) return reader.status();
  service->reader_ = std::move(*reader);
  auto signer = TextSigner::Create(service->reader_->settings().signature);
  if (!signer.ok()) return signer.status();
  service->signer_ = std::move(*signer);
  return service;
}

IndexService::~IndexService() { committer_.reset(); }

void IndexService::CatchUp() {
  std::unique_lock<std::shared_mutex> lock(state_mu_);
  // On error the reader is unchanged; the next commit tries again.
  (void)reader_->ReadAppended();
  std::lock_guard<std::mutex> banded(banded_mu_);
  banded_.clear();
}

void IndexService::WithReader(const std::function<void(const IndexReader&)>& visit) const {
  std::shared_lock<std::shared_mutex> lock(state_mu_);
  visit(*reader_);
}

ServiceCounts IndexService::counts() const {
  ServiceCounts counts;
  counts.documents_checked = documents_checked_.load();
  counts.documents_added = documents_added_.load();
  counts.matches = matches_.load();
  if (committer_ != nullptr) {
    counts.segments = committer_->groups();
    counts.add_requests_committed = committer_->requests();
  }
  WithReader([&counts](const IndexReader& reader) { counts.live_documents = reader.live_count(); });
  return counts;
}

absl::StatusOr<std::shared_ptr<const IndexReader>> IndexService::ReaderFor(
    const MatchSettings& match) {
  if (!NeedsOtherBanding(reader_->settings(), match)) return reader_;
  std::lock_guard<std::mutex> lock(banded_mu_);
  const auto key = std::make_pair(match.bands, match.rows);
  if (auto it = banded_.find(key); it != banded_.end()) return it->second;
  auto reader = IndexReader::Open(options_.path);
  if (!reader.ok()) return reader.status();
  if (absl::Status status = (*reader)->UseBanding(match.bands, match.rows); !status.ok()) {
    return status;
  }
  if (banded_.size() >= options_.other_bandings) banded_.erase(banded_.begin());
  std::shared_ptr<const IndexReader> shared = std::move(*reader);
  banded_[key] = shared;
  return shared;
}

absl::Status IndexService::SignAndMatch(const ServiceRequest& request,
                                        std::optional<DuplicateIdPolicy> policy,
                                        SignedCorpus* batch, std::vector<IndexMatch>* matches,
                                        std::string* records) {
  auto match = ResolveQueryMatch(reader_->settings(), request.query);
  if (!match.ok()) return match.status();
  if (absl::Status signed_ok = signer_->Sign(request.documents, batch); !signed_ok.ok()) {
    if (absl::StrContains(signed_ok.message(), "duplicate id")) {
      return absl::AlreadyExistsError(signed_ok.message());
    }
    return signed_ok;
  }
  std::shared_lock<std::shared_mutex> lock(state_mu_);
  auto reader = ReaderFor(*match);
  if (!reader.ok()) return reader.status();
  IndexMatchOptions options{*match, 1, false};
  options.max_bucket = request.max_bucket;
  auto found = MatchForQuery(**reader, *batch, policy, options);
  if (!found.ok()) return found.status();
  *matches = std::move(*found);
  std::string lines;
  WriteMatchRecords(RecordFormat::kJsonLines, *matches, **reader, *batch, &lines, &*match);
  return RecordsToArray(lines, *matches, request, **reader, *batch, records);
}

std::unique_ptr<SignedCorpus> IndexService::TakeCorpus() {
  {
    std::lock_guard<std::mutex> lock(pool_mu_);
    if (!pool_.empty()) {
      std::unique_ptr<SignedCorpus> corpus = std::move(pool_.back());
      pool_.pop_back();
      return corpus;
    }
  }
  return std::make_unique<SignedCorpus>(reader_->settings().signature.perms);
}

void IndexService::GiveCorpus(std::unique_ptr<SignedCorpus> corpus) {
  constexpr size_t kLargest = 16 << 20;  // a corpus grown larger is let go
  if (corpus->memory_bytes() > kLargest) return;
  corpus->Clear();
  std::lock_guard<std::mutex> lock(pool_mu_);
  pool_.push_back(std::move(corpus));
}

absl::StatusOr<std::string> IndexService::Check(const ServiceRequest& request) {
  const auto start = std::chrono::steady_clock::now();
  std::unique_ptr<SignedCorpus> corpus = TakeCorpus();
  absl::Cleanup give = [this, &corpus] { GiveCorpus(std::move(corpus)); };
  SignedCorpus& batch = *corpus;
  std::vector<IndexMatch> matches;
  std::string reply = "{\"matches\":[";
  if (absl::Status status = SignAndMatch(request, std::nullopt, &batch, &matches, &reply);
      !status.ok()) {
    return status;
  }
  size_t empty = 0;
  for (size_t i = 0; i < batch.size(); ++i) empty += batch.shingle_count(i) == 0;
  documents_checked_ += batch.size();
  matches_ += matches.size();
  absl::StrAppendFormat(&reply, "],\"checked\":%u,\"matched\":%u,\"empty\":%u,\"seconds\":%.6f}\n",
                        batch.size(), CountMatchedUploads(matches, batch.size()), empty,
                        SecondsSince(start));
  return reply;
}

absl::StatusOr<std::string> IndexService::Add(const ServiceRequest& request) {
  if (committer_ == nullptr) {
    return absl::FailedPreconditionError(
        "this service is read-only: start it with --allow-add to accept adds");
  }
  const auto start = std::chrono::steady_clock::now();
  std::unique_ptr<SignedCorpus> corpus = TakeCorpus();
  absl::Cleanup give = [this, &corpus] { GiveCorpus(std::move(corpus)); };
  SignedCorpus& batch = *corpus;
  std::vector<IndexMatch> matches;
  std::string reply = "{\"matches\":[";
  if (absl::Status status = SignAndMatch(request, request.on_duplicate, &batch, &matches, &reply);
      !status.ok()) {
    return status;
  }
  auto outcome = committer_->Submit(batch, request.on_duplicate);
  if (!outcome.ok()) return outcome.status();
  reply += "],\"documents\":[";
  uint32_t counts[3] = {0, 0, 0};
  for (size_t i = 0; i < batch.size(); ++i) {
    const AddAction action = outcome->actions[i];
    counts[static_cast<int>(action)]++;
    if (i > 0) reply += ",";
    reply += "{\"id\":";
    AppendJsonString(&reply, batch.id(i));
    absl::StrAppend(&reply, ",\"action\":\"", AddActionName(action),
                    "\",\"number\":", outcome->numbers[i], "}");
  }
  documents_added_ +=
      counts[static_cast<int>(AddAction::kAdded)] + counts[static_cast<int>(AddAction::kReplaced)];
  matches_ += matches.size();
  absl::StrAppendFormat(&reply, "],\"added\":%u,\"replaced\":%u,\"skipped\":%u,\"segment\":%s,",
                        counts[static_cast<int>(AddAction::kAdded)],
                        counts[static_cast<int>(AddAction::kReplaced)],
                        counts[static_cast<int>(AddAction::kSkipped)],
                        outcome->wrote_segment ? absl::StrCat(outcome->segment) : "null");
  absl::StrAppendFormat(&reply, "\"group_requests\":%u,\"seconds\":%.6f}\n",
                        outcome->group_requests, SecondsSince(start));
  return reply;
}

}  // namespace kindred::service
