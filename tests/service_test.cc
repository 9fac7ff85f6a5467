// The service core without HTTP: group commit (durability, arrival order,
// clashing ids, a full disk) and request parsing limits.
#include <catch2/catch.hpp>

#include <atomic>
#include <thread>
#include <vector>

#include "testlib/fault_file_system.h"
#include "kindred/index.h"
#include "kindred/index_writer.h"
#include "kindred/errors.h"
#include "service/group_commit.h"
#include "service/service_errors.h"
#include "service/service_replies.h"
#include "service/service_request.h"
#include "testlib/index_fixture.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

using service::GroupCommitter;
using testing::FaultFileSystem;
using testing::FaultKind;
using testing::Slice;

struct Fixture {
  testing::TempDir dir;
  std::string path = dir.File("s.kin");
  IndexSettings settings = testing::TestIndexSettings(32, 16, 2);
  SignedCorpus all = testing::SignTexts(testing::MakeTexts(21, 40, 60, "g"), settings.signature);
  Fixture() { REQUIRE(CreateIndex(path, settings, Slice(all, 0, 10)).ok()); }
};

TEST_CASE("group commit: concurrent adds are all durable, fewer segments than requests",
          "[service]") {
  Fixture f;
  std::atomic<int> commits{0};
  {
    auto committer = GroupCommitter::Open(f.path, 1000, [&commits] { commits++; });
    REQUIRE(committer.ok());
    std::vector<SignedCorpus> batches;
    for (size_t i = 10; i < 40; ++i) batches.push_back(Slice(f.all, i, i + 1));
    std::vector<std::thread> threads;
    std::atomic<int> ok{0};
    for (auto& batch : batches) {
      threads.emplace_back([&] {
        auto outcome = (*committer)->Submit(batch, DuplicateIdPolicy::kError);
        if (outcome.ok() && outcome->actions[0] == AddAction::kAdded) ok++;
      });
    }
    for (auto& t : threads) t.join();
    REQUIRE(ok == 30);
    REQUIRE((*committer)->requests() == 30);
    REQUIRE((*committer)->groups() == static_cast<uint64_t>(commits.load()));
  }
  auto reader = IndexReader::Open(f.path);
  REQUIRE(reader.ok());
  REQUIRE((*reader)->live_count() == 40);
  for (size_t i = 10; i < 40; ++i) REQUIRE((*reader)->FindLive(f.all.id(i)).has_value());
}

TEST_CASE("group commit: duplicate ids per policy", "[service]") {
  Fixture f;
  auto committer = GroupCommitter::Open(f.path, 1000, [] {});
  REQUIRE(committer.ok());
  SignedCorpus old = Slice(f.all, 5, 7);  // ids already indexed
  auto refused = (*committer)->Submit(old, DuplicateIdPolicy::kError);
  REQUIRE(service::RefusalOf(refused.status()) == service::Refusal::kDuplicateId);
  auto skipped = (*committer)->Submit(old, DuplicateIdPolicy::kSkip);
  REQUIRE(skipped.ok());
  REQUIRE(skipped->actions == std::vector<AddAction>{AddAction::kSkipped, AddAction::kSkipped});
  REQUIRE(skipped->numbers == std::vector<uint32_t>{5, 6});
  REQUIRE_FALSE(skipped->wrote_segment);
  auto replaced = (*committer)->Submit(old, DuplicateIdPolicy::kReplace);
  REQUIRE(replaced.ok());
  REQUIRE(replaced->actions[0] == AddAction::kReplaced);
  REQUIRE(replaced->numbers == std::vector<uint32_t>{10, 11});
}

TEST_CASE("group commit: a full disk fails the group and keeps the index", "[service]") {
  Fixture f;
  const std::string before = testing::ReadFile(f.path);
  FaultFileSystem full(DefaultFileSystem(), FaultKind::kDiskFull, 0);
  auto committer = GroupCommitter::Open(
      f.path, 1000, [] {}, IndexWriteOptions{&full});
  REQUIRE(committer.ok());
  SignedCorpus batch = Slice(f.all, 10, 12);
  auto failed = (*committer)->Submit(batch, DuplicateIdPolicy::kError);
  REQUIRE(KindOf(failed.status()) == ErrorKind::kDiskFull);
  REQUIRE_FALSE(service::RefusalOf(failed.status()).has_value());
  // The disk stays full: the next request fails too, the service goes on.
  auto again = (*committer)->Submit(batch, DuplicateIdPolicy::kError);
  REQUIRE_FALSE(again.ok());
  committer->reset();
  REQUIRE(testing::ReadFile(f.path) == before);
  auto audit = AuditIndex(f.path);
  REQUIRE(audit.ok());
  REQUIRE(audit->ok());
}

TEST_CASE("request parsing: fields, limits, nesting, invalid UTF-8", "[service]") {
  service::RequestLimits limits;
  limits.max_document_bytes = 10;
  limits.max_documents = 2;
  auto parsed = service::ParseJsonRequest(
      R"({"documents":[{"id":7,"text":"a b"}],"threshold":0.5,"measure":"containment",)"
      R"("on_duplicate":"skip","max_bucket":0,"marked_spans":true})",
      limits);
  REQUIRE(parsed.ok());
  REQUIRE(parsed->documents[0].id == "7");
  REQUIRE(*parsed->query.threshold == 0.5);
  REQUIRE(*parsed->query.measure == Measure::kContainment);
  REQUIRE(parsed->on_duplicate == DuplicateIdPolicy::kSkip);
  REQUIRE(parsed->max_bucket == 0);
  REQUIRE(parsed->marked_spans);
  REQUIRE(
      KindOf(service::ParseJsonRequest(R"({"documents":[{"id":"a","text":"0123456789x"}]})", limits)
                 .status()) == ErrorKind::kLimitExceeded);
  REQUIRE(
      KindOf(
          service::ParseJsonRequest(
              R"({"documents":[{"id":"a","text":""},{"id":"b","text":""},{"id":"c","text":""}]})",
              limits)
              .status()) == ErrorKind::kLimitExceeded);
  REQUIRE(KindOf(service::ParseJsonRequest(R"({"documents":[[[[[[[[[[[]]]]]]]]]]]})", limits)
                     .status()) == ErrorKind::kBadInput);
  REQUIRE(KindOf(service::ParseJsonRequest(R"({"documents":[],"colour":1})", limits).status()) ==
          ErrorKind::kBadInput);
  // U+FFFD stands for each ill-formed sequence, as in JSON Lines inputs.
  auto repaired =
      service::ParseJsonRequest("{\"documents\":[{\"id\":\"a\",\"text\":\"\xff\"}]}", limits);
  REQUIRE(repaired.ok());
  REQUIRE(repaired->documents[0].text == "\xEF\xBF\xBD");
}

TEST_CASE("refusals: kind kept through a status, none on other errors", "[service]") {
  const absl::Status refused = service::Refuse(service::Refusal::kReadOnly, "read-only");
  REQUIRE(absl::IsFailedPrecondition(refused));
  REQUIRE(refused.message() == "read-only");
  REQUIRE(service::RefusalOf(refused) == service::Refusal::kReadOnly);
  REQUIRE(service::RefusalOf(Annotate(refused, "add")) == service::Refusal::kReadOnly);
  REQUIRE_FALSE(service::RefusalOf(BadInput("x")).has_value());
  REQUIRE_FALSE(service::RefusalOf(absl::UnavailableError("x")).has_value());
}

TEST_CASE("replies: one JSON object per line, strings escaped", "[service]") {
  REQUIRE(service::ErrorReply("bad \"x\"\n", "bad_request") ==
          "{\"error\":\"bad \\\"x\\\"\\u000a\",\"kind\":\"bad_request\"}\n");
  REQUIRE(service::HealthReply(147, true) ==
          "{\"status\":\"ok\",\"live\":147,\"allow_add\":true}\n");
}

}  // namespace
}  // namespace kindred
