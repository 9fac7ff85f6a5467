// Corruption: every byte of a small real index flipped, and the file cut at
// every length. Each read must either succeed with exactly the right data or
// fail with DataLoss; never crash, never return wrong matches.
#include <catch2/catch.hpp>
#include <cstdio>

#include "absl/strings/str_format.h"
#include "kindred/index.h"
#include "kindred/index_match.h"
#include "kindred/index_writer.h"
#include "testlib/index_fixture.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

using testing::Slice;

struct Expected {
  std::vector<uint32_t> segment_ends;  // document count after each segment
  std::vector<std::string> ids;
  std::vector<std::vector<uint64_t>> shingles;
  std::vector<std::vector<uint32_t>> signatures;
  std::vector<bool> live_after;  // liveness with every segment
  std::vector<IndexMatch> matches;
};

bool SameMatches(const std::vector<IndexMatch>& a, const std::vector<IndexMatch>& b) {
  if (a.size() != b.size()) return false;
  for (size_t i = 0; i < a.size(); ++i) {
    if (a[i].query() != b[i].query() || a[i].other() != b[i].other() ||
        a[i].in_index != b[i].in_index || a[i].pair.shared != b[i].pair.shared ||
        a[i].pair.jaccard != b[i].pair.jaccard || a[i].pair.estimate != b[i].pair.estimate) {
      return false;
    }
  }
  return true;
}

enum class Outcome { kOpenFailed, kSomeReadFailed, kAllRead };

// Checks everything a reader of the file returns: either exactly the
// expected data or DataLoss errors (which it reports in the outcome); fails
// the test on anything else.
Outcome ReadAndCompare(const std::string& path, const Expected& expected,
                       const SignedCorpus& queries, bool truncated) {
  auto reader = IndexReader::Open(path);
  if (!reader.ok()) {
    INFO(reader.status().ToString());
    REQUIRE(absl::IsDataLoss(reader.status()));
    return Outcome::kOpenFailed;
  }
  Outcome outcome = Outcome::kAllRead;
  const IndexReader& r = **reader;
  uint32_t count = r.document_count();
  size_t segments = r.segments().size();
  if (!truncated) {
    REQUIRE(segments == expected.segment_ends.size());
  }
  REQUIRE(segments <= expected.segment_ends.size());
  REQUIRE(count == (segments == 0 ? 0 : expected.segment_ends[segments - 1]));
  std::vector<uint64_t> set;
  for (uint32_t doc = 0; doc < count; ++doc) {
    REQUIRE(r.id(doc) == expected.ids[doc]);
    auto signature = r.signature(doc);
    REQUIRE(std::vector<uint32_t>(signature.begin(), signature.end()) == expected.signatures[doc]);
    absl::Status read = r.ReadShingles(doc, &set);
    if (read.ok()) {
      REQUIRE(set == expected.shingles[doc]);
    } else {
      REQUIRE(absl::IsDataLoss(read));
      outcome = Outcome::kSomeReadFailed;
    }
  }
  if (segments == expected.segment_ends.size()) {
    for (uint32_t doc = 0; doc < count; ++doc) REQUIRE(r.is_live(doc) == expected.live_after[doc]);
    auto matches = MatchAgainstIndex(r, queries, IndexMatchOptions{{0.5}, 1, false});
    if (matches.ok()) {
      REQUIRE(SameMatches(*matches, expected.matches));
    } else {
      REQUIRE(absl::IsDataLoss(matches.status()));
      outcome = Outcome::kSomeReadFailed;
    }
  }
  return outcome;
}

TEST_CASE("flipped bytes and truncations are detected or harmless", "[corruption]") {
  testing::TempDir dir;
  IndexSettings settings = testing::TestIndexSettings(8, 4, 2);
  SignedCorpus all = testing::SignTexts(testing::MakeTexts(21, 12, 24, "k"), settings.signature);
  std::string path = dir.File("x.kin");
  REQUIRE(CreateIndex(path, settings, Slice(all, 0, 4)).ok());
  {
    auto writer = IndexWriter::Open(path);
    REQUIRE((*writer)->Append(Slice(all, 4, 7), DuplicateIdPolicy::kError).ok());
    SignedCorpus replace(settings.signature.perms);
    replace.Add("k1", all.facts(7), {}, all.shingles(7), all.signature(7));
    REQUIRE((*writer)->Append(replace, DuplicateIdPolicy::kReplace).ok());
  }
  const std::string original = testing::ReadFile(path);
  Expected expected;
  SignedCorpus queries = Slice(all, 8, 12);
  {
    auto reader = IndexReader::Open(path);
    REQUIRE(reader.ok());
    for (const SegmentInfo& s : (*reader)->segments()) {
      expected.segment_ends.push_back(s.first_doc + s.documents);
    }
    for (uint32_t doc = 0; doc < (*reader)->document_count(); ++doc) {
      expected.ids.emplace_back((*reader)->id(doc));
      auto signature = (*reader)->signature(doc);
      expected.signatures.emplace_back(signature.begin(), signature.end());
      expected.shingles.emplace_back();
      REQUIRE((*reader)->ReadShingles(doc, &expected.shingles.back()).ok());
      expected.live_after.push_back((*reader)->is_live(doc));
    }
    auto matches = MatchAgainstIndex(**reader, queries, IndexMatchOptions{{0.5}, 1, false});
    REQUIRE(matches.ok());
    expected.matches = *matches;
  }
  REQUIRE(expected.segment_ends == std::vector<uint32_t>{4, 7, 8});
  REQUIRE_FALSE(expected.matches.empty());  // the query really exercises matching
  REQUIRE(original.size() < 8000);

  std::string damaged_path = dir.File("damaged.kin");
  auto write = [&](const std::string& bytes) {
    std::remove(damaged_path.c_str());
    dir.Write("damaged.kin", bytes);
  };
  size_t unnoticed = 0;
  for (size_t i = 0; i < original.size(); ++i) {
    for (unsigned mask : {1u << (i % 8), 0xffu}) {
      CAPTURE(i, mask);
      std::string bytes = original;
      bytes[i] = static_cast<char>(bytes[i] ^ mask);
      write(bytes);
      if (ReadAndCompare(damaged_path, expected, queries, false) == Outcome::kAllRead) {
        // A damaged commit slot is harmless while the other verifies (the
        // two slots exist for that); audit notes it.
        if (i >= 512 && i < 1536) {
          auto audit = AuditIndex(damaged_path);
          REQUIRE(audit.ok());
          REQUIRE(audit->ok());
          REQUIRE(audit->notes.size() == 1);
          continue;
        }
        // Only the zero padding after each segment's shingle sets is
        // covered by no checksum (audit checks it; see below). Reading
        // through it is harmless: the data came out right.
        REQUIRE(original[i] == 0);
        ++unnoticed;
      }
    }
  }
  REQUIRE(unnoticed <= 2 * 7 * 3);  // at most 7 padding bytes per segment
  for (size_t length = 0; length < original.size(); ++length) {
    CAPTURE(length);
    write(original.substr(0, length));
    ReadAndCompare(damaged_path, expected, queries, true);
  }
}

TEST_CASE("audit names each kind of damage", "[corruption]") {
  testing::TempDir dir;
  IndexSettings settings = testing::TestIndexSettings(8, 4, 2);
  SignedCorpus all = testing::SignTexts(testing::MakeTexts(22, 6, 20, "a"), settings.signature);
  std::string path = dir.File("x.kin");
  REQUIRE(CreateIndex(path, settings, all).ok());
  const std::string original = testing::ReadFile(path);
  auto audit_of = [&](const std::string& bytes) {
    std::remove(path.c_str());
    dir.Write("x.kin", bytes);
    auto report = AuditIndex(path);
    REQUIRE(report.ok());
    return *report;
  };
  REQUIRE(audit_of(original).ok());
  // Bad magic.
  std::string bad = original;
  bad[0] = 'X';
  AuditReport report = audit_of(bad);
  REQUIRE(report.problems.size() == 1);
  REQUIRE(report.problems[0].find("not a kindred index") != std::string::npos);
  // A damaged shingle set: named by document.
  auto reader = IndexReader::Open(dir.Write("copy.kin", original));
  const SegmentInfo& seg = (*reader)->segments()[0];
  size_t last_shingle_byte = seg.offset + seg.bytes - 32 - 1;
  while (original[last_shingle_byte] == 0) --last_shingle_byte;  // skip padding
  bad = original;
  bad[last_shingle_byte] ^= 0x01;
  report = audit_of(bad);
  REQUIRE(report.problems.size() == 1);
  // Named by id and number, with the damaged byte range (not the segment's start).
  const std::string& problem = report.problems[0];
  INFO(problem);
  REQUIRE(problem.find(absl::StrFormat("document \"%s\" (number 5): shingle set does not verify: "
                                       "bytes ",
                                       (*reader)->id(5))) != std::string::npos);
  uint64_t from = 0, to = 0;
  REQUIRE(std::sscanf(problem.c_str() + problem.find("bytes "), "bytes %lu..%lu", &from, &to) == 2);
  REQUIRE(from <= last_shingle_byte);
  REQUIRE(last_shingle_byte < to);
  REQUIRE(from > seg.offset);
  // Nonzero padding.
  if (original[seg.offset + seg.bytes - 33] == 0) {
    bad = original;
    bad[seg.offset + seg.bytes - 33] = 1;
    report = audit_of(bad);
    REQUIRE(report.problems.size() == 1);
    REQUIRE(report.problems[0].find("nonzero padding") != std::string::npos);
  }
  // A cut-off committed segment is damage, not a torn tail: the file
  // records its committed length.
  report = audit_of(original.substr(0, original.size() - 5));
  REQUIRE(report.problems.size() == 1);
  REQUIRE(report.problems[0].find(absl::StrFormat("the file is %u bytes but records %u committed",
                                                  original.size() - 5, original.size())) !=
          std::string::npos);
  // Bytes after the recorded commit: a torn tail, a note and not a problem.
  report = audit_of(original + std::string("KSEG torn"));
  REQUIRE(report.ok());
  REQUIRE(report.notes.size() == 1);
  REQUIRE(report.torn_tail_bytes == 9);
  REQUIRE(report.documents == 6);
}

}  // namespace
}  // namespace kindred
