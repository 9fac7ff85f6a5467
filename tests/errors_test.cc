// Error kinds: each named constructor's kind and code, the kind surviving
// added context, the fallback by canonical code, and kinds set where errors
// arise (tune's second reading, the kept corpus writer).

#include "kindred/errors.h"

#include <catch2/catch.hpp>
#include <cerrno>
#include <string>
#include <vector>

#include "absl/status/statusor.h"
#include "kindred/corpus.h"
#include "kindred/kept_writer.h"
#include "kindred/labels.h"
#include "kindred/tune.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

using testing::TempDir;

TEST_CASE("each constructor records its kind over its canonical code", "[errors]") {
  struct Case {
    absl::Status status;
    ErrorKind kind;
    absl::StatusCode code;
  };
  const std::vector<Case> cases = {
      {InvalidRequest("m"), ErrorKind::kInvalidRequest, absl::StatusCode::kInvalidArgument},
      {BadInput("m"), ErrorKind::kBadInput, absl::StatusCode::kInvalidArgument},
      {LimitExceeded("m"), ErrorKind::kLimitExceeded, absl::StatusCode::kResourceExhausted},
      {InputChanged("m"), ErrorKind::kInputChanged, absl::StatusCode::kInvalidArgument},
      {IndexDamaged("m"), ErrorKind::kIndexDamaged, absl::StatusCode::kDataLoss},
      {SettingsMismatch("m"), ErrorKind::kSettingsMismatch, absl::StatusCode::kFailedPrecondition},
      {IndexBusy("m"), ErrorKind::kIndexBusy, absl::StatusCode::kUnavailable},
      {DiskFull("m"), ErrorKind::kDiskFull, absl::StatusCode::kResourceExhausted},
      {WriteFailed("m"), ErrorKind::kWriteFailed, absl::StatusCode::kAborted},
  };
  for (const Case& c : cases) {
    INFO(ErrorKindName(c.kind));
    CHECK(KindOf(c.status) == c.kind);
    CHECK(c.status.code() == c.code);
    CHECK(c.status.message() == "m");
  }
  // The two kinds of ResourceExhausted stay apart.
  CHECK(KindOf(DiskFull("x")) != KindOf(LimitExceeded("x")));
}

TEST_CASE("context added to a message keeps the kind", "[errors]") {
  const absl::Status annotated = Annotate(DiskFull("no space"), "cannot write out.jsonl");
  CHECK(annotated.message() == "cannot write out.jsonl: no space");
  CHECK(annotated.code() == absl::StatusCode::kResourceExhausted);
  CHECK(KindOf(annotated) == ErrorKind::kDiskFull);
  const absl::Status reworded = WithMessage(InputChanged("a"), "b");
  CHECK(reworded.message() == "b");
  CHECK(KindOf(reworded) == ErrorKind::kInputChanged);
  CHECK(Annotate(absl::OkStatus(), "x").ok());
  // Re-wrapping by code alone loses the kind: the reason Annotate exists.
  const absl::Status rewrapped(DiskFull("y").code(), "y");
  CHECK(KindOf(rewrapped) == ErrorKind::kLimitExceeded);
}

TEST_CASE("a status without a kind gets one from its code", "[errors]") {
  CHECK(KindOf(absl::InvalidArgumentError("m")) == ErrorKind::kBadInput);
  CHECK(KindOf(absl::NotFoundError("m")) == ErrorKind::kBadInput);
  CHECK(KindOf(absl::ResourceExhaustedError("m")) == ErrorKind::kLimitExceeded);
  CHECK(KindOf(absl::DataLossError("m")) == ErrorKind::kIndexDamaged);
  CHECK(KindOf(absl::FailedPreconditionError("m")) == ErrorKind::kSettingsMismatch);
  CHECK(KindOf(absl::UnavailableError("m")) == ErrorKind::kIndexBusy);
  CHECK(KindOf(absl::AbortedError("m")) == ErrorKind::kWriteFailed);
  CHECK(KindOf(absl::InternalError("m")) == ErrorKind::kInternal);
  CHECK(KindOf(absl::UnknownError("m")) == ErrorKind::kInternal);
  // WithKind overrides the code's kind; OK stays OK.
  CHECK(KindOf(WithKind(absl::FailedPreconditionError("m"), ErrorKind::kInvalidRequest)) ==
        ErrorKind::kInvalidRequest);
  CHECK(WithKind(absl::OkStatus(), ErrorKind::kDiskFull).ok());
}

TEST_CASE("failed system calls on inputs and outputs get their kinds", "[errors]") {
  // absl::ErrnoToStatus alone makes EIO Unavailable (an index busy) and
  // ENOTDIR FailedPrecondition (other settings): the kinds say what they are.
  CHECK(KindOf(InputErrno(EIO, "in.jsonl: read failed")) == ErrorKind::kBadInput);
  CHECK(KindOf(InputErrno(ENOTDIR, "tree: cannot read directory")) == ErrorKind::kBadInput);
  const absl::Status full = OutputErrno(ENOSPC, "out.jsonl: write failed");
  CHECK(KindOf(full) == ErrorKind::kDiskFull);
  CHECK(full.code() == absl::StatusCode::kResourceExhausted);
  CHECK(full.message() == "out.jsonl: write failed: No space left on device");
  CHECK(KindOf(OutputErrno(EDQUOT, "out")) == ErrorKind::kDiskFull);
  CHECK(KindOf(OutputErrno(ENOTDIR, "out")) == ErrorKind::kWriteFailed);
  CHECK(KindOf(OutputErrno(EIO, "out")) == ErrorKind::kWriteFailed);
  CHECK(KindOf(OutputErrno(ENAMETOOLONG, "out")) == ErrorKind::kInvalidRequest);
}

TEST_CASE("tune: a corpus that changes between its readings is InputChanged", "[errors]") {
  TempDir dir;
  const std::string first =
      dir.Write("first.jsonl",
                "{\"id\":\"a\",\"text\":\"one two three four five six\"}\n"
                "{\"id\":\"b\",\"text\":\"one two three four five seven\"}\n");
  const std::string second =
      dir.Write("second.jsonl", testing::ReadFile(first) + "{\"id\":\"c\",\"text\":\"eight\"}\n");
  int readings = 0;
  const OpenCorpus changing = [&] {
    return CorpusReader::Open({readings++ == 0 ? first : second}, InputOptions{});
  };
  auto labels = ParseLabels("a\tb\tlabel\na\tb\tduplicate\n", "labels.tsv");
  REQUIRE(labels.ok());
  TuneOptions options;
  options.grid.shingles = {{ShingleMode::kWord, 3}, {ShingleMode::kWord, 5}};
  options.grid.perms = {16};
  options.grid.thresholds = {0.5};
  auto result = RunTune(changing, *labels, "labels.tsv", options);
  REQUIRE_FALSE(result.ok());
  CHECK(readings == 2);
  CHECK(KindOf(result.status()) == ErrorKind::kInputChanged);
  CHECK(result.status().message() ==
        "the corpus changed between two readings: 3 documents now, 2 before");
}

}  // namespace
}  // namespace kindred
