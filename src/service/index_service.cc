#include "service/index_service.h"

#include <chrono>

#include "absl/cleanup/cleanup.h"
#include "absl/container/flat_hash_set.h"
#include "absl/strings/str_cat.h"
#include "kindred/records.h"
#include "service/service_errors.h"
#include "service/service_replies.h"

namespace kindred::service {
namespace {

double SecondsSince(std::chrono::steady_clock::time_point start) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
}

// The first id that `documents` repeats, if any.
std::optional<std::string_view> RepeatedId(absl::Span<const TextDocument> documents) {
  absl::flat_hash_set<std::string_view> seen;
  for (const TextDocument& doc : documents) {
    if (!seen.insert(doc.id).second) return doc.id;
  }
  return std::nullopt;
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
  IndexOpenOptions open_options;
  open_options.many_queries = true;
  auto reader = IndexReader::Open(options.path, open_options);
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
                                        RecordWriter* reply) {
  auto match = ResolveQueryMatch(reader_->settings(), request.query);
  if (!match.ok()) return match.status();
  if (auto repeated = RepeatedId(request.documents); repeated.has_value()) {
    return Refuse(Refusal::kDuplicateId,
                  absl::StrCat("duplicate id \"", std::string(*repeated), "\""));
  }
  if (absl::Status signed_ok = signer_->Sign(request.documents, batch); !signed_ok.ok()) {
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
  return WriteMatchList(*matches, request, **reader, *batch, *match, reply);
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
  std::string out;
  RecordWriter reply(RecordFormat::kJsonLines, CheckReplyColumns(), &out);
  if (absl::Status status = SignAndMatch(request, std::nullopt, &batch, &matches, &reply);
      !status.ok()) {
    return status;
  }
  size_t empty = 0;
  for (size_t i = 0; i < batch.size(); ++i) empty += batch.shingle_count(i) == 0;
  documents_checked_ += batch.size();
  matches_ += matches.size();
  reply.Number(batch.size());
  reply.Number(CountMatchedUploads(matches, batch.size()));
  reply.Number(empty);
  reply.Fixed(SecondsSince(start), 6);
  reply.EndRow();
  return out;
}

absl::StatusOr<std::string> IndexService::Add(const ServiceRequest& request) {
  if (committer_ == nullptr) {
    return Refuse(Refusal::kReadOnly,
                  "this service is read-only: start it with --allow-add to accept adds");
  }
  const auto start = std::chrono::steady_clock::now();
  std::unique_ptr<SignedCorpus> corpus = TakeCorpus();
  absl::Cleanup give = [this, &corpus] { GiveCorpus(std::move(corpus)); };
  SignedCorpus& batch = *corpus;
  std::vector<IndexMatch> matches;
  std::string out;
  RecordWriter reply(RecordFormat::kJsonLines, AddReplyColumns(), &out);
  if (absl::Status status = SignAndMatch(request, request.on_duplicate, &batch, &matches, &reply);
      !status.ok()) {
    return status;
  }
  auto outcome = committer_->Submit(batch, request.on_duplicate);
  if (!outcome.ok()) return outcome.status();
  WriteAddedDocuments(batch, *outcome, &reply);
  for (AddAction action : outcome->actions) documents_added_ += action != AddAction::kSkipped;
  matches_ += matches.size();
  if (outcome->wrote_segment) {
    reply.Number(outcome->segment);
  } else {
    reply.Null();
  }
  reply.Number(outcome->group_requests);
  reply.Fixed(SecondsSince(start), 6);
  reply.EndRow();
  return out;
}

}  // namespace kindred::service
