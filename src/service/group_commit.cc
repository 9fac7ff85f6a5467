#include "service/group_commit.h"

#include <algorithm>

#include "absl/container/flat_hash_set.h"
#include "absl/strings/str_cat.h"
#include "kindred/errors.h"
#include "service/service_errors.h"

namespace kindred::service {
namespace {

// The error of every request of a group whose segment could not be
// written: a full disk stays DiskFull, any other failure is WriteFailed.
absl::Status WriteFailure(const absl::Status& written) {
  const ErrorKind kind =
      KindOf(written) == ErrorKind::kDiskFull ? ErrorKind::kDiskFull : ErrorKind::kWriteFailed;
  return WithKind(Annotate(written, "writing the index failed, nothing of this request was added"),
                  kind);
}

}  // namespace

struct GroupCommitter::Pending {
  const SignedCorpus* batch = nullptr;
  DuplicateIdPolicy policy = DuplicateIdPolicy::kError;
  absl::Status status;
  CommitOutcome outcome;
  bool done = false;
};

absl::StatusOr<std::unique_ptr<GroupCommitter>> GroupCommitter::Open(
    const std::string& path, size_t max_group_documents, std::function<void()> after_commit,
    const IndexWriteOptions& write_options) {
  auto writer = IndexWriter::Open(path, write_options);
  if (!writer.ok()) return writer.status();
  std::unique_ptr<GroupCommitter> committer(new GroupCommitter());
  committer->path_ = path;
  committer->write_options_ = write_options;
  committer->max_group_documents_ = std::max<size_t>(1, max_group_documents);
  committer->after_commit_ = std::move(after_commit);
  committer->writer_ = std::move(*writer);
  committer->thread_ = std::thread([c = committer.get()] { c->Loop(); });
  return committer;
}

GroupCommitter::~GroupCommitter() {
  {
    std::lock_guard<std::mutex> lock(mu_);
    stopping_ = true;
  }
  wake_.notify_all();
  if (thread_.joinable()) thread_.join();
}

absl::StatusOr<CommitOutcome> GroupCommitter::Submit(const SignedCorpus& batch,
                                                     DuplicateIdPolicy policy) {
  Pending pending;
  pending.batch = &batch;
  pending.policy = policy;
  std::unique_lock<std::mutex> lock(mu_);
  if (stopping_) return Refuse(Refusal::kUnavailable, "the service is stopping");
  queue_.push_back(&pending);
  wake_.notify_one();
  done_.wait(lock, [&pending] { return pending.done; });
  if (!pending.status.ok()) return pending.status;
  return std::move(pending.outcome);
}

uint64_t GroupCommitter::groups() const {
  std::lock_guard<std::mutex> lock(mu_);
  return groups_;
}

uint64_t GroupCommitter::requests() const {
  std::lock_guard<std::mutex> lock(mu_);
  return requests_;
}

void GroupCommitter::Loop() {
  std::unique_lock<std::mutex> lock(mu_);
  while (true) {
    wake_.wait(lock, [this] { return stopping_ || !queue_.empty(); });
    if (queue_.empty()) return;  // stopping, and every request answered
    std::vector<Pending*> group;
    size_t documents = 0;
    while (!queue_.empty() &&
           (group.empty() || documents + queue_.front()->batch->size() <= max_group_documents_)) {
      documents += queue_.front()->batch->size();
      group.push_back(queue_.front());
      queue_.pop_front();
    }
    lock.unlock();
    std::vector<Pending*> deferred;
    CommitGroup(group, &deferred);
    lock.lock();
    for (Pending* p : group) {
      p->done = std::find(deferred.begin(), deferred.end(), p) == deferred.end();
    }
    queue_.insert(queue_.begin(), deferred.begin(), deferred.end());
    done_.notify_all();
  }
}

bool GroupCommitter::Resolve(Pending* p, SignedCorpus* combined, std::vector<int64_t>* positions) {
  const IndexReader& reader = writer_->reader();
  const SignedCorpus& batch = *p->batch;
  CommitOutcome& out = p->outcome;
  out.actions.assign(batch.size(), AddAction::kAdded);
  out.numbers.assign(batch.size(), 0);
  positions->assign(batch.size(), -1);
  std::vector<std::optional<uint32_t>> live(batch.size());
  for (size_t i = 0; i < batch.size(); ++i) {
    live[i] = reader.FindLive(batch.id(i));
    if (live[i].has_value() && p->policy == DuplicateIdPolicy::kError) {
      p->status = Refuse(Refusal::kDuplicateId, absl::StrCat("id already indexed: \"", batch.id(i),
                                                             "\" (on_duplicate is error)"));
      return false;
    }
  }
  for (size_t i = 0; i < batch.size(); ++i) {
    if (live[i].has_value() && p->policy == DuplicateIdPolicy::kSkip) {
      out.actions[i] = AddAction::kSkipped;
      out.numbers[i] = *live[i];
      continue;
    }
    out.actions[i] = live[i].has_value() ? AddAction::kReplaced : AddAction::kAdded;
    (*positions)[i] = static_cast<int64_t>(combined->size());
    combined->Add(batch.id(i), batch.facts(i), DocumentOrigin{}, batch.shingles(i),
                  batch.signature(i));
  }
  return true;
}

bool GroupCommitter::ReopenWriter(const std::vector<Pending*>& group) {
  if (writer_ != nullptr) return true;
  if (auto reopened = IndexWriter::Open(path_, write_options_); reopened.ok()) {
    writer_ = std::move(*reopened);
    return true;
  }
  for (Pending* p : group) {
    p->status = Refuse(Refusal::kUnavailable, "the index cannot be opened for writing again");
  }
  return false;
}

void GroupCommitter::CommitGroup(const std::vector<Pending*>& group,
                                 std::vector<Pending*>* deferred) {
  if (!ReopenWriter(group)) return;
  if (combined_ == nullptr || combined_->memory_bytes() > (64 << 20)) {
    combined_ = std::make_unique<SignedCorpus>(writer_->reader().settings().signature.perms);
  }
  combined_->Clear();
  SignedCorpus& combined = *combined_;
  absl::flat_hash_set<std::string> ids;
  std::vector<Pending*> members;
  std::vector<std::vector<int64_t>> positions;
  for (Pending* p : group) {
    bool clash = false;
    for (const std::string& id : p->batch->ids()) clash |= ids.contains(id);
    if (clash) {
      deferred->push_back(p);
      continue;
    }
    std::vector<int64_t> where;
    if (!Resolve(p, &combined, &where)) continue;
    for (const std::string& id : p->batch->ids()) ids.insert(id);
    members.push_back(p);
    positions.push_back(std::move(where));
  }
  AppendResult appended;
  if (combined.size() > 0) {
    auto result = writer_->Append(combined, DuplicateIdPolicy::kReplace);
    if (!result.ok()) {
      writer_.reset();  // a failed writer refuses further appends: open again next time
      const absl::Status failed = WriteFailure(result.status());
      for (Pending* p : members) p->status = failed;
      return;
    }
    appended = std::move(*result);
    after_commit_();
  }
  {
    std::lock_guard<std::mutex> lock(mu_);
    if (appended.wrote_segment) ++groups_;
    requests_ += members.size();
  }
  for (size_t m = 0; m < members.size(); ++m) {
    CommitOutcome& out = members[m]->outcome;
    for (size_t i = 0; i < positions[m].size(); ++i) {
      if (positions[m][i] >= 0) out.numbers[i] = appended.index_numbers[positions[m][i]];
    }
    out.wrote_segment = appended.wrote_segment;
    out.segment = appended.segment_number;
    out.group_requests = static_cast<uint32_t>(members.size());
  }
}

}  // namespace kindred::service
