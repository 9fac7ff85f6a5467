// Tests of the index reader and writer through the public API: create,
// append with each duplicate-id policy, lookups, banding at query time,
// compaction, locking, torn tails, settings checks.
#include <fcntl.h>
#include <sys/file.h>
#include <unistd.h>

#include <algorithm>
#include <filesystem>
#include <catch2/catch.hpp>
#include <tuple>

#include "absl/strings/str_cat.h"
#include "kindred/banding.h"
#include "kindred/index.h"
#include "kindred/index_match.h"
#include "kindred/index_writer.h"
#include "kindred/text.h"
#include "testlib/index_fixture.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

using testing::MakeTexts;
using testing::RequireSameDocument;
using testing::SignTexts;
using testing::Slice;
using testing::TempDir;

std::unique_ptr<IndexReader> OpenOrDie(const std::string& path) {
  auto reader = IndexReader::Open(path);
  INFO(reader.status().ToString());
  REQUIRE(reader.ok());
  return *std::move(reader);
}

TEST_CASE("create then read back every document", "[index]") {
  TempDir dir;
  IndexSettings settings = testing::TestIndexSettings();
  SignedCorpus corpus = SignTexts(MakeTexts(1, 20, 50, "a/"), settings.signature);
  std::string path = dir.File("x.kin");
  REQUIRE(CreateIndex(path, settings, corpus).ok());
  auto reader = OpenOrDie(path);
  REQUIRE(reader->settings() == settings);
  REQUIRE(reader->document_count() == 20);
  REQUIRE(reader->live_count() == 20);
  REQUIRE(reader->segments().size() == 1);
  REQUIRE(reader->torn_tail_bytes() == 0);
  REQUIRE(reader->committed_size() == reader->file_size());
  for (uint32_t doc = 0; doc < 20; ++doc) RequireSameDocument(*reader, doc, corpus, doc);
  REQUIRE(reader->FindLive("a/7") == 7u);
  REQUIRE_FALSE(reader->FindLive("a/70").has_value());
  // Never replaces an existing file.
  REQUIRE(absl::IsAlreadyExists(CreateIndex(path, settings, corpus)));
}

TEST_CASE("append adds segments and reports duplicate ids by policy", "[index]") {
  TempDir dir;
  IndexSettings settings = testing::TestIndexSettings();
  SignedCorpus all = SignTexts(MakeTexts(2, 12, 50, "d"), settings.signature);
  std::string path = dir.File("x.kin");
  REQUIRE(CreateIndex(path, settings, Slice(all, 0, 6)).ok());
  auto writer = IndexWriter::Open(path);
  REQUIRE(writer.ok());
  auto added = (*writer)->Append(Slice(all, 6, 10), DuplicateIdPolicy::kError);
  REQUIRE(added.ok());
  REQUIRE(added->added == 4);
  REQUIRE(added->segment_number == 1);
  REQUIRE(added->index_numbers == std::vector<uint32_t>{6, 7, 8, 9});

  // d3 again (with d11's content) and d10: error refuses the whole batch.
  SignedCorpus again(settings.signature.perms);
  again.Add("d3", all.facts(11), {}, all.shingles(11), all.signature(11));
  again.Add("d10", all.facts(10), {}, all.shingles(10), all.signature(10));
  auto refused = (*writer)->Append(again, DuplicateIdPolicy::kError);
  REQUIRE(absl::IsInvalidArgument(refused.status()));
  REQUIRE(std::string(refused.status().message()).find("\"d3\"") != std::string::npos);
  REQUIRE((*writer)->reader().document_count() == 10);

  auto skipped = (*writer)->Append(again, DuplicateIdPolicy::kSkip);
  REQUIRE(skipped.ok());
  REQUIRE(skipped->actions == std::vector<AddAction>{AddAction::kSkipped, AddAction::kAdded});
  REQUIRE(skipped->index_numbers == std::vector<uint32_t>{3, 10});
  RequireSameDocument((*writer)->reader(), 3, all, 3);

  SignedCorpus replacement(settings.signature.perms);
  replacement.Add("d3", all.facts(11), {}, all.shingles(11), all.signature(11));
  auto replaced = (*writer)->Append(replacement, DuplicateIdPolicy::kReplace);
  REQUIRE(replaced.ok());
  REQUIRE(replaced->replaced == 1);
  const IndexReader& reader = (*writer)->reader();
  REQUIRE(reader.document_count() == 12);
  REQUIRE(reader.live_count() == 11);
  REQUIRE_FALSE(reader.is_live(3));
  REQUIRE(reader.FindLive("d3") == 11u);
  RequireSameDocument(reader, 11, replacement, 0);
  REQUIRE(reader.id(11) == "d3");
  REQUIRE(reader.segments().size() == 4);
  auto audit = AuditIndex(path);
  REQUIRE(audit.ok());
  REQUIRE(audit->ok());

  // A fresh reader sees the same.
  auto fresh = OpenOrDie(path);
  REQUIRE(fresh->live_count() == 11);
  REQUIRE_FALSE(fresh->is_live(3));
}

// Everything a reader answers, compared with a reader opened afresh.
void RequireSameAsFresh(const IndexReader& reader, uint32_t bands, uint32_t rows) {
  auto fresh = IndexReader::Open(reader.path());
  REQUIRE(fresh.ok());
  if (bands != 0) REQUIRE((*fresh)->UseBanding(bands, rows).ok());
  REQUIRE(reader.document_count() == (*fresh)->document_count());
  REQUIRE(reader.live_count() == (*fresh)->live_count());
  REQUIRE(reader.committed_size() == (*fresh)->committed_size());
  REQUIRE(reader.segments().size() == (*fresh)->segments().size());
  for (size_t s = 0; s < reader.segments().size(); ++s) {
    const SegmentInfo& a = reader.segments()[s];
    const SegmentInfo& b = (*fresh)->segments()[s];
    REQUIRE(std::tie(a.number, a.offset, a.bytes, a.first_doc, a.documents, a.retired) ==
            std::tie(b.number, b.offset, b.bytes, b.first_doc, b.documents, b.retired));
  }
  std::vector<uint64_t> a, b;
  for (uint32_t doc = 0; doc < reader.document_count(); ++doc) {
    REQUIRE(reader.is_live(doc) == (*fresh)->is_live(doc));
    REQUIRE(reader.id(doc) == (*fresh)->id(doc));
    REQUIRE(reader.FindLive(reader.id(doc)) == (*fresh)->FindLive(reader.id(doc)));
    REQUIRE(
        std::vector<uint32_t>(reader.signature(doc).begin(), reader.signature(doc).end()) ==
        std::vector<uint32_t>((*fresh)->signature(doc).begin(), (*fresh)->signature(doc).end()));
    REQUIRE(reader.ReadShingles(doc, &a).ok());
    REQUIRE((*fresh)->ReadShingles(doc, &b).ok());
    REQUIRE(a == b);
  }
  std::vector<std::pair<uint64_t, uint32_t>> keys_a, keys_b;
  reader.ForEachBandKey([&](uint64_t key, uint32_t doc) { keys_a.emplace_back(key, doc); });
  (*fresh)->ForEachBandKey([&](uint64_t key, uint32_t doc) { keys_b.emplace_back(key, doc); });
  REQUIRE(keys_a == keys_b);
  for (const auto& [key, doc] : keys_a) {
    std::vector<uint32_t> found_a, found_b;
    reader.Candidates({key}, &found_a);
    (*fresh)->Candidates({key}, &found_b);
    REQUIRE(found_a == found_b);
  }
}

TEST_CASE("after each append, the reader caught up equals a fresh one", "[index]") {
  TempDir dir;
  IndexSettings settings = testing::TestIndexSettings(32, 8, 4);
  SignedCorpus all = SignTexts(MakeTexts(9, 30, 50, "r"), settings.signature);
  std::string path = dir.File("x.kin");
  REQUIRE(CreateIndex(path, settings, Slice(all, 0, 8)).ok());
  // A plain reader and one with a query-time banding, caught up by hand.
  auto plain = OpenOrDie(path);
  auto rebanded = OpenOrDie(path);
  REQUIRE(rebanded->UseBanding(16, 2).ok());
  auto writer = IndexWriter::Open(path);
  REQUIRE(writer.ok());
  for (size_t begin = 8; begin < 30; begin += 5) {
    const size_t end = std::min<size_t>(30, begin + 5);
    REQUIRE((*writer)->Append(Slice(all, begin, end), DuplicateIdPolicy::kError).ok());
    // Two earlier documents come back with other content: retirements.
    SignedCorpus replacement(settings.signature.perms);
    for (size_t i : {begin - 8, begin - 3}) {
      replacement.Add(all.id(i), all.facts(end - 1), {}, all.shingles(end - 1),
                      all.signature(end - 1));
    }
    REQUIRE((*writer)->Append(replacement, DuplicateIdPolicy::kReplace).ok());
    RequireSameAsFresh((*writer)->reader(), 0, 0);
    REQUIRE(plain->ReadAppended().ok());
    RequireSameAsFresh(*plain, 0, 0);
    REQUIRE(rebanded->ReadAppended().ok());
    RequireSameAsFresh(*rebanded, 16, 2);
  }
  REQUIRE((*writer)->reader().segments().size() == 11);
  REQUIRE(plain->ReadAppended().ok());  // nothing new: unchanged
  RequireSameAsFresh(*plain, 0, 0);
}

TEST_CASE("a second writer fails at once with Unavailable", "[index]") {
  TempDir dir;
  IndexSettings settings = testing::TestIndexSettings();
  std::string path = dir.File("x.kin");
  REQUIRE(CreateIndex(path, settings, SignedCorpus(settings.signature.perms)).ok());
  auto first = IndexWriter::Open(path);
  REQUIRE(first.ok());
  auto second = IndexWriter::Open(path);
  REQUIRE(absl::IsUnavailable(second.status()));
  REQUIRE(absl::IsUnavailable(CompactIndex(path).status()));
  // A lock held by another process (flock on another open file description).
  first->reset();
  int fd = open(path.c_str(), O_RDONLY);
  REQUIRE(flock(fd, LOCK_EX | LOCK_NB) == 0);
  REQUIRE(absl::IsUnavailable(IndexWriter::Open(path).status()));
  close(fd);
  REQUIRE(IndexWriter::Open(path).ok());
  // Readers need no lock.
  auto writer = IndexWriter::Open(path);
  REQUIRE(IndexReader::Open(path).ok());
}

TEST_CASE("compaction keeps the live documents in order, atomically", "[index]") {
  TempDir dir;
  IndexSettings settings = testing::TestIndexSettings();
  SignedCorpus all = SignTexts(MakeTexts(3, 15, 50, "c"), settings.signature);
  std::string path = dir.File("x.kin");
  REQUIRE(CreateIndex(path, settings, Slice(all, 0, 5)).ok());
  {
    auto writer = IndexWriter::Open(path);
    REQUIRE((*writer)->Append(Slice(all, 5, 10), DuplicateIdPolicy::kError).ok());
    SignedCorpus replace(settings.signature.perms);
    replace.Add("c2", all.facts(12), {}, all.shingles(12), all.signature(12));
    REQUIRE((*writer)->Append(replace, DuplicateIdPolicy::kReplace).ok());
  }
  auto old_reader = OpenOrDie(path);  // keeps the old file mapped
  auto result = CompactIndex(path, CompactOptions{8, 4});
  REQUIRE(result.ok());
  REQUIRE(result->segments_before == 3);
  REQUIRE(result->documents_before == 11);
  REQUIRE(result->documents_after == 10);
  auto reader = OpenOrDie(path);
  REQUIRE(reader->segments().size() == 1);
  REQUIRE(reader->document_count() == 10);
  REQUIRE(reader->bands() == 8);
  REQUIRE(reader->rows() == 4);
  std::vector<size_t> expected = {0, 1, 3, 4, 5, 6, 7, 8, 9};
  for (uint32_t doc = 0; doc < expected.size(); ++doc) {
    RequireSameDocument(*reader, doc, all, expected[doc]);
  }
  REQUIRE(reader->id(9) == "c2");
  REQUIRE(reader->file_size() == result->bytes_after);
  // The old mapping still reads the old file.
  REQUIRE(old_reader->document_count() == 11);
  RequireSameDocument(*old_reader, 4, all, 4);
  auto audit = AuditIndex(path);
  REQUIRE(audit->ok());
  // A writer after compaction appends to the new file.
  auto writer = IndexWriter::Open(path);
  REQUIRE(writer.ok());
  REQUIRE((*writer)->Append(Slice(all, 13, 15), DuplicateIdPolicy::kError).ok());
  REQUIRE(OpenOrDie(path)->document_count() == 12);
}

TEST_CASE("a torn tail is reported, ignored by readers and cut by the next writer", "[index]") {
  TempDir dir;
  IndexSettings settings = testing::TestIndexSettings();
  SignedCorpus all = SignTexts(MakeTexts(4, 8, 40, "t"), settings.signature);
  std::string path = dir.File("x.kin");
  REQUIRE(CreateIndex(path, settings, Slice(all, 0, 4)).ok());
  uint64_t committed = OpenOrDie(path)->file_size();
  {
    int fd = open(path.c_str(), O_WRONLY | O_APPEND);
    REQUIRE(write(fd, "KSEG partial segment", 20) == 20);
    close(fd);
  }
  auto reader = OpenOrDie(path);
  REQUIRE(reader->document_count() == 4);
  REQUIRE(reader->torn_tail_bytes() == 20);
  REQUIRE(reader->committed_size() == committed);
  auto audit = AuditIndex(path);
  REQUIRE(audit->ok());
  REQUIRE(audit->torn_tail_bytes == 20);
  REQUIRE(audit->notes.size() == 1);
  auto cut = RepairIndex(path);
  REQUIRE(cut.ok());
  REQUIRE(cut->torn_tail_cut == 20);
  REQUIRE(cut->repaired_path.empty());
  REQUIRE(OpenOrDie(path)->file_size() == committed);
  REQUIRE(RepairIndex(path)->torn_tail_cut == 0);
}

TEST_CASE("settings are checked on open", "[index]") {
  IndexSettings stored = testing::TestIndexSettings();
  std::vector<std::string> warnings;
  REQUIRE(CheckIndexSettings(stored, stored.signature, stored.unicode_version, &warnings).ok());
  REQUIRE(warnings.empty());
  SignatureSettings other = stored.signature;
  other.k = 4;
  absl::Status status = CheckIndexSettings(stored, other, stored.unicode_version, &warnings);
  REQUIRE(absl::IsFailedPrecondition(status));
  REQUIRE(std::string(status.message()).find("k=3") != std::string::npos);
  REQUIRE(std::string(status.message()).find("k=4") != std::string::npos);
  REQUIRE(CheckIndexSettings(stored, stored.signature, "Unicode 16.0, ICU 76.1", &warnings).ok());
  REQUIRE(warnings.size() == 1);
  REQUIRE(warnings[0].find("Unicode 16.0") != std::string::npos);
}

TEST_CASE("query-time banding finds the same candidates as a fresh table", "[index]") {
  TempDir dir;
  IndexSettings settings = testing::TestIndexSettings(32, 16, 2);
  SignedCorpus all = SignTexts(MakeTexts(5, 30, 60, "q"), settings.signature);
  std::string path = dir.File("x.kin");
  REQUIRE(CreateIndex(path, settings, Slice(all, 0, 20)).ok());
  auto reader = OpenOrDie(path);
  REQUIRE(absl::IsInvalidArgument(reader->UseBanding(8, 5)));  // 40 > 32 slots
  REQUIRE(reader->UseBanding(4, 8).ok());
  std::string path2 = dir.File("y.kin");
  IndexSettings settings2 = settings;
  settings2.bands = 4;
  settings2.rows = 8;
  REQUIRE(CreateIndex(path2, settings2, Slice(all, 0, 20)).ok());
  auto reference = OpenOrDie(path2);
  std::vector<uint64_t> keys(4);
  for (size_t q = 20; q < 30; ++q) {
    BandKeys(all.signature(q), Banding{4, 8}, absl::MakeSpan(keys));
    std::vector<uint32_t> a, b;
    reader->Candidates(keys, &a);
    reference->Candidates(keys, &b);
    REQUIRE(a == b);
  }
}

TEST_CASE("a crowded index key proposes its first live document only", "[index]") {
  TempDir dir;
  IndexSettings settings = testing::TestIndexSettings(32, 16, 2);
  // 30 copies of one template (every band key shared by all of them), then
  // ten distinct documents.
  std::vector<std::pair<std::string, std::string>> texts;
  for (int i = 0; i < 30; ++i) {
    texts.emplace_back(absl::StrCat("t", i), "the same boilerplate footer of every page here");
  }
  for (const auto& text : MakeTexts(11, 10, 40, "x")) texts.push_back(text);
  SignedCorpus all = SignTexts(texts, settings.signature);
  std::string path = dir.File("x.kin");
  REQUIRE(CreateIndex(path, settings, all).ok());
  auto reader = OpenOrDie(path);
  std::vector<uint64_t> keys(16);
  BandKeys(all.signature(0), Banding{16, 2}, absl::MakeSpan(keys));

  std::vector<uint32_t> found;
  uint64_t crowded = 0;
  reader->Candidates(keys, &found, 0, &crowded);  // no cap
  REQUIRE(found.size() == 30);
  REQUIRE(crowded == 0);
  found.clear();
  reader->Candidates(keys, &found, 30, &crowded);  // 30 is not more than 30
  REQUIRE(found.size() == 30);
  REQUIRE(crowded == 0);
  found.clear();
  reader->Candidates(keys, &found, 10, &crowded);
  REQUIRE(found == std::vector<uint32_t>{0});
  REQUIRE(crowded == 16);  // every band

  // The representative is the first live one: replace t0, then t1 leads.
  {
    auto writer = IndexWriter::Open(path);
    REQUIRE(writer.ok());
    SignedCorpus replacement(settings.signature.perms);
    replacement.Add("t0", all.facts(30), {}, all.shingles(30), all.signature(30));
    REQUIRE((*writer)->Append(replacement, DuplicateIdPolicy::kReplace).ok());
  }
  REQUIRE(reader->ReadAppended().ok());
  found.clear();
  reader->Candidates(keys, &found, 10);
  REQUIRE(found == std::vector<uint32_t>{1});
  // The same through a query-time banding.
  REQUIRE(reader->UseBanding(8, 4).ok());
  std::vector<uint64_t> keys8(8);
  BandKeys(all.signature(0), Banding{8, 4}, absl::MakeSpan(keys8));
  found.clear();
  crowded = 0;
  reader->Candidates(keys8, &found, 10, &crowded);
  REQUIRE(found == std::vector<uint32_t>{1});
  REQUIRE(crowded == 8);

  // Matching: a query copy of the template is confirmed against the
  // representative only, and the crowded keys are counted.
  REQUIRE(reader->UseBanding(16, 2).ok());
  SignedCorpus query = Slice(all, 5, 6);
  IndexMatchOptions options;
  options.match.threshold = 0.9;
  options.max_bucket = 10;
  options.crowded_keys = &crowded;
  auto matches = MatchAgainstIndex(*reader, query, options);
  REQUIRE(matches.ok());
  REQUIRE(matches->size() == 1);
  REQUIRE((*matches)[0].other() == 1);
  REQUIRE(crowded == 16);
  options.max_bucket = 0;
  matches = MatchAgainstIndex(*reader, query, options);
  REQUIRE(matches.ok());
  REQUIRE(matches->size() == 29);  // t1..t29
  REQUIRE(crowded == 0);
}

TEST_CASE("matches against an index are confirmed exactly", "[index]") {
  TempDir dir;
  IndexSettings settings = testing::TestIndexSettings(64, 32, 2);
  SignedCorpus all = SignTexts(MakeTexts(6, 30, 60, "m"), settings.signature);
  std::string path = dir.File("x.kin");
  REQUIRE(CreateIndex(path, settings, Slice(all, 0, 20)).ok());
  auto reader = OpenOrDie(path);
  IndexMatchOptions options;
  options.match.threshold = 0.5;
  auto matches = MatchAgainstIndex(*reader, Slice(all, 20, 30), options);
  REQUIRE(matches.ok());
  REQUIRE_FALSE(matches->empty());
  for (const IndexMatch& m : *matches) {
    // Exact Jaccard recomputed here with std::set_intersection.
    auto q = all.shingles(20 + m.query());
    auto o = all.shingles(m.in_index ? m.other() : 20 + m.other());
    std::vector<uint64_t> both;
    std::set_intersection(q.begin(), q.end(), o.begin(), o.end(), std::back_inserter(both));
    double jaccard = double(both.size()) / double(q.size() + o.size() - both.size());
    REQUIRE(m.pair.jaccard == Approx(jaccard));
    REQUIRE(m.pair.jaccard >= 0.5);
    REQUIRE(m.pair.shared == both.size());
    REQUIRE(m.pair.ContainmentOfAInB() == Approx(double(both.size()) / q.size()));
    REQUIRE(m.pair.ContainmentOfBInA() == Approx(double(both.size()) / o.size()));
    if (!m.in_index) REQUIRE(m.other() < m.query());
  }
}

}  // namespace
}  // namespace kindred

namespace kindred {
namespace {

// The ids of the candidates `reader` proposes for every document of `all`.
std::vector<std::vector<std::string>> CandidateIds(const IndexReader& reader,
                                                   const SignedCorpus& all) {
  std::vector<std::vector<std::string>> out;
  std::vector<uint64_t> keys(reader.bands());
  for (size_t i = 0; i < all.size(); ++i) {
    BandKeys(all.signature(i), Banding{reader.bands(), reader.rows()}, absl::MakeSpan(keys));
    std::vector<uint32_t> docs;
    reader.Candidates(keys, &docs);
    std::vector<std::string> ids;
    for (uint32_t doc : docs) ids.emplace_back(reader.id(doc));
    std::sort(ids.begin(), ids.end());
    out.push_back(std::move(ids));
  }
  return out;
}

TEST_CASE("a file of many mid-sized segments answers as its compacted copy", "[reader]") {
  TempDir dir;
  const std::string path = dir.File("many.kin");
  const IndexSettings settings = testing::TestIndexSettings();
  auto texts = MakeTexts(3, 12 * 70, 20, "m");
  const SignedCorpus all = SignTexts(texts, settings.signature);
  REQUIRE(CreateIndex(path, settings, Slice(all, 0, 70)).ok());
  {
    auto writer = IndexWriter::Open(path);
    REQUIRE(writer.ok());
    for (size_t k = 1; k < 12; ++k) {  // segments of 70 documents: not small, more than 8
      REQUIRE((*writer)->Append(Slice(all, 70 * k, 70 * k + 70), DuplicateIdPolicy::kError).ok());
    }
    const SignedCorpus replacement =
        SignTexts({{texts[5].first, texts[800].second}}, settings.signature);
    REQUIRE((*writer)->Append(replacement, DuplicateIdPolicy::kReplace).ok());
  }
  const std::string copy = dir.File("one.kin");
  std::filesystem::copy_file(path, copy);
  REQUIRE(CompactIndex(copy).ok());
  IndexOpenOptions options;
  options.many_queries = GENERATE(false, true);
  auto many = IndexReader::Open(path, options);
  auto one = IndexReader::Open(copy);
  REQUIRE(many.ok());
  REQUIRE(one.ok());
  REQUIRE((*many)->segments().size() == 13);
  REQUIRE((*one)->segments().size() == 1);
  REQUIRE(CandidateIds(**many, all) == CandidateIds(**one, all));
  for (const auto& [id, text] : texts) {
    auto a = (*many)->FindLive(id);
    auto b = (*one)->FindLive(id);
    REQUIRE(a.has_value());
    REQUIRE(b.has_value());
    REQUIRE((*many)->shingle_count(*a) == (*one)->shingle_count(*b));
  }
}

}  // namespace
}  // namespace kindred
