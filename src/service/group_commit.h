// Group commit: the adds that arrive while a segment is being written are
// appended together as the next segment, so that many small adds cost one
// pair of syncs between them, not one each.
//
// GroupCommitter owns the index writer (and so the writer lock) and one
// thread that commits. Submit() queues a signed batch with its duplicate-id
// policy and blocks until the segment that holds it is durable (or the batch
// was refused). Each group is built in arrival order; a request that shares
// an id with an earlier request of the same group waits for the next group,
// so ids within a segment are unique and every request gets exactly what it
// would have got alone, committed in arrival order.
//
// Per request, on the index as it stands when its group is built:
//   error    an id already live refuses the whole request (AlreadyExists);
//   skip     documents whose id is live are left out (action skipped);
//   replace  documents whose id is live replace the indexed one.
// A write error (disk full, ...) fails every request of the group (Aborted,
// the index keeps all earlier committed documents) and the writer is opened
// again for the next group; if that fails, later requests get Unavailable.
//
// After each durable segment, `after_commit` runs on the commit thread
// before the requests of the group are answered (the service catches its
// readers up there, so a check sees an add once it is acknowledged).
//
// Thread-safety: Submit() may be called from any number of threads.
#ifndef KINDRED_SERVICE_GROUP_COMMIT_H_
#define KINDRED_SERVICE_GROUP_COMMIT_H_

#include <condition_variable>
#include <cstdint>
#include <deque>
#include <functional>
#include <memory>
#include <mutex>
#include <string>
#include <thread>
#include <vector>

#include "absl/status/statusor.h"
#include "kindred/index_writer.h"
#include "kindred/signed_corpus.h"

namespace kindred::service {

struct CommitOutcome {
  std::vector<AddAction> actions;  // per document of the batch
  std::vector<uint32_t> numbers;   // per document: its index number (the
                                   // indexed one's when skipped)
  bool wrote_segment = false;      // false when every document was skipped
  uint32_t segment = 0;
  uint32_t group_requests = 0;  // requests committed in the same segment
};

class GroupCommitter {
 public:
  // Opens the writer (takes the lock). Errors: IndexWriter::Open's.
  static absl::StatusOr<std::unique_ptr<GroupCommitter>> Open(
      const std::string& path, size_t max_group_documents, std::function<void()> after_commit,
      const IndexWriteOptions& write_options = {});
  // Answers the queued requests, then stops the thread and releases the lock.
  ~GroupCommitter();

  // Blocks until `batch` is durable in the index or refused. `batch` is
  // borrowed until then. Errors: refusals (service_errors.h) kDuplicateId
  // (an id already indexed under DuplicateIdPolicy::kError) and kUnavailable
  // (stopping, or the writer cannot be opened again); DiskFull or
  // WriteFailed (writing failed: nothing of the batch was added).
  absl::StatusOr<CommitOutcome> Submit(const SignedCorpus& batch, DuplicateIdPolicy policy);

  // Segments written and requests committed so far.
  uint64_t groups() const;
  uint64_t requests() const;

 private:
  struct Pending;
  GroupCommitter() = default;
  void Loop();
  // Commits what it can of `group`; requests that must wait are appended to
  // *deferred.
  void CommitGroup(const std::vector<Pending*>& group, std::vector<Pending*>* deferred);
  // Opens the writer again after a failure; false (every request of the
  // group refused) when it cannot be opened.
  bool ReopenWriter(const std::vector<Pending*>& group);
  // Decides each document of `p` against the index, adds the kept ones to
  // *combined (their positions in *positions); false when refused.
  bool Resolve(Pending* p, SignedCorpus* combined, std::vector<int64_t>* positions);

  std::string path_;
  IndexWriteOptions write_options_;
  size_t max_group_documents_ = 0;
  std::function<void()> after_commit_;
  std::unique_ptr<IndexWriter> writer_;  // commit thread only (after Open)
  std::unique_ptr<SignedCorpus> combined_;  // the group's documents, reused

  mutable std::mutex mu_;
  std::condition_variable wake_;
  std::condition_variable done_;
  std::deque<Pending*> queue_;
  bool stopping_ = false;
  uint64_t groups_ = 0;
  uint64_t requests_ = 0;
  std::thread thread_;
};

}  // namespace kindred::service

#endif  // KINDRED_SERVICE_GROUP_COMMIT_H_
