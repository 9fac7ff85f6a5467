// The service core of `kindred serve`: an index held open, answering checks
// and (when allowed) adds, with the replies as JSON text. Knows nothing of
// HTTP; the HTTP layer (src/cli/serve_http.*) maps its statuses to replies.
//
// Checks and adds run the same steps as `kindred check` and `kindred add`
// (kindred/index_query.h), so the same documents give the same match
// records. An add is matched against the index as it stands when the
// request arrives, then committed by group commit (group_commit.h); it is
// answered once its segment is durable and every later check sees it.
//
// Readers: one reader with the stored banding answers most queries; a query
// whose threshold or banding asks for another banding gets a reader banded
// so (built on first use, a few kept, dropped after each commit). After a
// commit the readers catch up (IndexReader::ReadAppended) under an exclusive
// lock; queries hold a shared one.
//
// Errors of Check and Add carry a library error kind (kindred/errors.h) or
// a refusal of the service (service_errors.h): InvalidRequest or BadInput
// (a bad option), refusal kDuplicateId (an id repeated in the request, or
// already indexed with on_duplicate "error"), kReadOnly (adds not
// allowed), kUnavailable (stopping, or the writer could not be opened
// again), DiskFull or WriteFailed (writing failed; nothing of the request
// added), IndexDamaged (a stored shingle set fails its checksum).
//
// Thread-safety: all methods may be called concurrently.
#ifndef KINDRED_SERVICE_INDEX_SERVICE_H_
#define KINDRED_SERVICE_INDEX_SERVICE_H_

#include <atomic>
#include <cstdint>
#include <functional>
#include <map>
#include <memory>
#include <mutex>
#include <shared_mutex>
#include <string>
#include <utility>

#include "absl/status/statusor.h"
#include "kindred/index.h"
#include "kindred/index_query.h"
#include "kindred/records.h"
#include "service/group_commit.h"
#include "service/service_request.h"

namespace kindred::service {

struct ServiceOptions {
  std::string path;
  // Open the writer (takes the lock) and accept adds.
  bool allow_add = false;
  // Documents per segment at most (a larger request is one segment alone).
  size_t max_group_documents = 20000;
  // Readers banded otherwise than the stored tables, kept at most.
  size_t other_bandings = 2;
  // Zero bytes the writer keeps past the committed end, so that a commit's
  // syncs write data only (IndexWriteOptions::reserve_bytes).
  uint64_t reserve_bytes = 4 << 20;
};

// Counts for the metrics page.
struct ServiceCounts {
  uint64_t documents_checked = 0;
  uint64_t documents_added = 0;  // added or replaced
  uint64_t matches = 0;
  uint64_t segments = 0;  // segments written by group commit
  uint64_t add_requests_committed = 0;
  uint32_t live_documents = 0;
};

class IndexService {
 public:
  // Opens the index (read-only, no lock, unless allow_add). Errors:
  // IndexReader::Open's and IndexWriter::Open's (Unavailable: another
  // writer holds the lock).
  static absl::StatusOr<std::unique_ptr<IndexService>> Open(const ServiceOptions& options);
  // Answers queued adds, then releases the writer lock.
  ~IndexService();

  bool allows_add() const { return committer_ != nullptr; }
  const IndexSettings& settings() const { return reader_->settings(); }

  // The reply of a check: {"matches":[...],"checked":N,"matched":M,
  // "empty":E,"seconds":S}.
  absl::StatusOr<std::string> Check(const ServiceRequest& request);
  // The reply of an add, once durable: {"matches":[...],"documents":[{"id",
  // "action","number"}...],"added":A,"replaced":R,"skipped":S,
  // "segment":K or null,"group_requests":G,"seconds":S}.
  absl::StatusOr<std::string> Add(const ServiceRequest& request);

  // Calls `visit` with the current reader under the shared lock.
  void WithReader(const std::function<void(const IndexReader&)>& visit) const;
  ServiceCounts counts() const;

 private:
  IndexService() = default;
  // The reader for `match` (stored or other banding); requires the shared lock.
  absl::StatusOr<std::shared_ptr<const IndexReader>> ReaderFor(const MatchSettings& match);
  // Signs and matches `request` under the shared lock; writes the reply's
  // "matches" field into *reply.
  absl::Status SignAndMatch(const ServiceRequest& request, std::optional<DuplicateIdPolicy> policy,
                            SignedCorpus* batch, std::vector<IndexMatch>* matches,
                            RecordWriter* reply);
  void CatchUp();
  // A cleared corpus for one request, from the pool (building a corpus
  // costs its first storage blocks, about a millisecond; a cleared one
  // keeps them), and back.
  std::unique_ptr<SignedCorpus> TakeCorpus();
  void GiveCorpus(std::unique_ptr<SignedCorpus> corpus);

  ServiceOptions options_;
  std::unique_ptr<TextSigner> signer_;
  mutable std::shared_mutex state_mu_;  // guards the readers' state
  std::shared_ptr<IndexReader> reader_;
  std::mutex banded_mu_;
  std::map<std::pair<uint32_t, uint32_t>, std::shared_ptr<const IndexReader>> banded_;
  std::unique_ptr<GroupCommitter> committer_;
  std::mutex pool_mu_;
  std::vector<std::unique_ptr<SignedCorpus>> pool_;
  std::atomic<uint64_t> documents_checked_{0};
  std::atomic<uint64_t> documents_added_{0};
  std::atomic<uint64_t> matches_{0};
};

}  // namespace kindred::service

#endif  // KINDRED_SERVICE_INDEX_SERVICE_H_
