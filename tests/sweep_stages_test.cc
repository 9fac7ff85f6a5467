// The sweep's stages over records, run shard by shard and partition by
// partition as a sweep spread over machines runs them, against RunSweep over
// the whole corpus: the same pairs, groups and record files, byte for byte.
#include "kindred/sweep_stages.h"

#include <catch2/catch.hpp>

#include "absl/strings/str_cat.h"
#include "kindred/errors.h"
#include "kindred/sweep.h"
#include "testlib/similar_sets.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

using testing::SplitMix64;

// Random-word documents, edited copies (some exact), and an empty one, as
// JSON Lines cut into `shards` files; returns the files.
std::vector<std::string> ShardedCorpus(const testing::TempDir& dir, int shards, int originals,
                                       int copies) {
  SplitMix64 random(99);
  std::vector<std::string> vocabulary;
  for (int w = 0; w < 800; ++w) {
    vocabulary.push_back(absl::StrCat("w", random.Between(0, 1u << 30)));
  }
  std::vector<std::vector<int>> docs;
  for (int d = 0; d < originals; ++d) {
    std::vector<int> words(random.Between(30, 120));
    for (int& word : words) word = static_cast<int>(random.Between(0, vocabulary.size() - 1));
    docs.push_back(words);
  }
  for (int c = 0; c < copies; ++c) {
    std::vector<int> words = docs[random.Between(0, 7)];  // crowded buckets
    const uint64_t rate = random.Between(0, 3) * 2;      // percent of words replaced
    for (int& word : words) {
      if (random.Between(0, 99) < rate) word = static_cast<int>(random.Between(0, 799));
    }
    docs.push_back(words);
  }
  std::vector<std::string> lines;
  for (size_t d = 0; d < docs.size(); ++d) {
    std::string text;
    for (int word : docs[d]) absl::StrAppend(&text, text.empty() ? "" : " ", vocabulary[word]);
    if (d == 5) text.clear();
    lines.push_back(absl::StrCat("{\"id\":\"doc", d, "\",\"text\":\"", text,
                                 "\",\"priority\":", d % 7, "}\n"));
  }
  std::vector<std::string> files;
  for (int s = 0; s < shards; ++s) {
    std::string shard;
    for (size_t d = lines.size() * s / shards; d < lines.size() * (s + 1) / shards; ++d) {
      shard += lines[d];
    }
    files.push_back(dir.Write(absl::StrCat("shard", s, ".jsonl"), shard));
  }
  return files;
}

std::unique_ptr<CorpusReader> Open(std::vector<std::string> paths) {
  InputOptions input;
  input.priority_field = "priority";
  auto reader = CorpusReader::Open(std::move(paths), input);
  REQUIRE(reader.ok());
  return *std::move(reader);
}

struct StagedSweep {
  DocumentTable documents;
  CandidatePairs candidates;
  std::vector<ScoredPair> pairs;
  std::vector<Group> groups;
  SweepRecords records;
};

// The stages as a cluster runs them, every record shipped as its bytes.
StagedSweep RunStages(const std::vector<std::string>& shards, const SweepOptions& options,
                      uint32_t partitions, const SweepRecordOptions& record_options) {
  const Banding banding = ResolveBanding(options.match, options.signature.perms);
  std::vector<DocumentTable> tables;
  std::vector<std::vector<std::string>> partition_bytes(partitions);
  ShardOptions shard_options;
  for (size_t s = 0; s < shards.size(); ++s) {
    shard_options.first_input = static_cast<uint32_t>(s);
    auto reader = Open({shards[s]});
    auto shard = SignShard(*reader, options.signature, banding, shard_options);
    REQUIRE(shard.ok());
    auto table = ParseDocumentTable(SerializeDocumentTable(shard->documents));
    REQUIRE(table.ok());
    tables.push_back(*std::move(table));
    const std::vector<BandKeyTable> parts = PartitionBandKeys(shard->band_keys, partitions);
    for (uint32_t p = 0; p < partitions; ++p) {
      partition_bytes[p].push_back(SerializeBandKeyTable(parts[p]));
    }
    // Signed again with the partitions written from the signer's keys: the
    // same bytes, and no table.
    ShardOptions direct = shard_options;
    direct.key_partitions = partitions;
    auto again = SignShard(*Open({shards[s]}), options.signature, banding, direct);
    REQUIRE(again.ok());
    CHECK(again->band_keys.records.empty());
    for (uint32_t p = 0; p < partitions; ++p) {
      CHECK(again->band_key_bytes.at(p) == partition_bytes[p].back());
    }
    shard_options.first_document += static_cast<uint32_t>(shard->documents.documents.size());
  }
  std::vector<CandidatePairs> found;
  for (uint32_t p = 0; p < partitions; ++p) {
    std::vector<BandKeyTable> from_shards;
    for (const std::string& bytes : partition_bytes[p]) {
      auto table = ParseBandKeyTable(bytes);
      REQUIRE(table.ok());
      from_shards.push_back(*std::move(table));
    }
    auto part = ParseCandidatePairs(SerializeCandidatePairs(
        FindPartitionCandidates(MergeBandKeys(from_shards), options.max_bucket)));
    REQUIRE(part.ok());
    found.push_back(*std::move(part));
  }
  StagedSweep out;
  out.candidates = MergeCandidatePairs(found);
  const std::vector<uint32_t> wanted = CandidateDocuments(out.candidates.pairs);
  SetStore sets(options.signature.perms);
  shard_options.first_document = 0;
  for (size_t s = 0; s < shards.size(); ++s) {
    auto reader = Open({shards[s]});
    auto shard_sets = ReadShardSets(*reader, options.signature, shard_options, wanted);
    REQUIRE(shard_sets.ok());
    auto shipped = ParseSetStore(SerializeSetStore(*shard_sets));
    REQUIRE(shipped.ok());
    sets.Merge(*shipped);
    shard_options.first_document += static_cast<uint32_t>(tables[s].documents.size());
  }
  auto pairs = VerifyCandidates(out.candidates.pairs, sets, options.match, 2);
  REQUIRE(pairs.ok());
  auto shipped_pairs = ParseScoredPairs(SerializeScoredPairs(*pairs));
  REQUIRE(shipped_pairs.ok());
  out.pairs = *std::move(shipped_pairs);
  auto joined = JoinDocumentTables(std::move(tables));
  REQUIRE(joined.ok());
  out.documents = *std::move(joined);
  out.groups = GroupDocuments(out.documents, out.pairs, record_options.keep,
                              record_options.grouping);
  out.records = FormatSweepRecords(out.documents, out.pairs, out.groups, record_options);
  return out;
}

SweepRecords LocalRecords(const SweepResult& result, const SweepRecordOptions& options) {
  std::vector<uint8_t> empty(result.corpus.size());
  for (size_t doc = 0; doc < empty.size(); ++doc) empty[doc] = result.corpus.shingle_count(doc) == 0;
  SweepRecords out;
  WriteSweepRecords(options, result.pairs, result.groups, result.corpus.ids(),
                    result.corpus.all_facts(), empty, &out);
  return out;
}

TEST_CASE("Stages over shards and partitions give a local sweep's records", "[stages]") {
  testing::TempDir dir;
  const std::vector<std::string> shards = ShardedCorpus(dir, 3, 120, 120);
  for (const uint64_t max_bucket : {uint64_t{4}, kDefaultMaxBucket}) {
    for (const uint32_t partitions : {1u, 7u}) {
      INFO("max_bucket " << max_bucket << ", partitions " << partitions);
      SweepOptions options;
      options.match.threshold = 0.7;
      options.max_bucket = max_bucket;
      options.keep = KeepPolicy::kPriority;
      SweepRecordOptions record_options;
      record_options.keep = options.keep;
      auto reader = Open(shards);
      auto local = RunSweep(*reader, options);
      REQUIRE(local.ok());
      const StagedSweep staged = RunStages(shards, options, partitions, record_options);
      CHECK(staged.candidates.stats == local->stats.candidates);
      REQUIRE(staged.pairs.size() == local->pairs.size());
      CHECK(staged.pairs == local->pairs);
      CHECK(staged.groups.size() == local->groups.size());
      const SweepRecords expected = LocalRecords(*local, record_options);
      CHECK(staged.records.pairs == expected.pairs);
      CHECK(staged.records.groups == expected.groups);
      CHECK(staged.records.decisions == expected.decisions);
      CHECK_FALSE(expected.decisions.empty());
      if (max_bucket == 4) CHECK(staged.candidates.stats.oversized_buckets > 0);
      for (size_t doc = 0; doc < staged.documents.documents.size(); ++doc) {
        CHECK(staged.documents.documents[doc].id == local->corpus.id(doc));
        CHECK(staged.documents.documents[doc].origin == local->corpus.origin(doc));
      }
    }
  }
}

TEST_CASE("Verifying a pair whose set was not shipped is an error", "[stages]") {
  SetStore sets(2);
  sets.Add(0, std::vector<uint64_t>{1, 2}, std::vector<uint32_t>{1, 2});
  const absl::Status status =
      VerifyCandidates({PackPair(0, 3)}, sets, MatchSettings{}, 1).status();
  CHECK(KindOf(status) == ErrorKind::kInvalidRequest);
  CHECK(status.message() == "verification: document 3 of a candidate pair has no set");
}

TEST_CASE("A banding that does not fit the signature is refused", "[stages]") {
  testing::TempDir dir;
  auto reader = Open({dir.Write("a.jsonl", "{\"id\":\"a\",\"text\":\"x y z\"}\n")});
  SignatureSettings settings;
  CHECK(KindOf(SignShard(*reader, settings, Banding{20, 7}, ShardOptions{}).status()) ==
        ErrorKind::kInvalidRequest);
  CHECK(ResolveBanding(MatchSettings{}, 128) == ChooseBanding(0.8, 128));
  MatchSettings given;
  given.bands = 4;
  given.rows = 8;
  CHECK(ResolveBanding(given, 128) == Banding{4, 8});
}

TEST_CASE("Reading a shard again gives the wanted sets and notices a changed document",
          "[stages]") {
  testing::TempDir dir;
  const std::string lines =
      "{\"id\":\"a\",\"text\":\"one two three four five six\"}\n"
      "{\"id\":\"b\",\"text\":\"seven eight nine ten eleven\"}\n"
      "{\"id\":\"c\",\"text\":\"twelve thirteen fourteen\"}\n";
  const std::string path = dir.Write("s.jsonl", lines);
  SignatureSettings settings;
  auto reader = Open({path});
  auto shard = SignShard(*reader, settings, Banding{16, 8}, ShardOptions{});
  REQUIRE(shard.ok());
  ShardOptions options;
  options.first_document = 10;
  options.expected = &shard->documents;
  auto again = Open({path});
  auto sets = ReadShardSets(*again, settings, options, {9, 10, 12, 13});
  REQUIRE(sets.ok());
  CHECK(sets->documents() == std::vector<uint32_t>{10, 12});
  CHECK(sets->shingles(10).size() == 2);  // word 5-shingles of six words
  // The third document, one word longer now: named by file, line and id.
  std::string changed = lines;
  changed.replace(changed.find("fourteen"), 8, "fourteen fifteen");
  dir.Write("s.jsonl", changed);
  auto third = Open({path});
  const absl::Status status = ReadShardSets(*third, settings, options, {12}).status();
  CHECK(KindOf(status) == ErrorKind::kInputChanged);
  CHECK(status.message() ==
        absl::StrCat(path, ":3: document \"c\" changed since it was first read; run again"));
  // A shard cut short.
  dir.Write("s.jsonl", lines.substr(0, lines.find('\n') + 1));
  auto cut = Open({path});
  CHECK(KindOf(ReadShardSets(*cut, settings, options, {11}).status()) ==
        ErrorKind::kInputChanged);
}

}  // namespace
}  // namespace kindred
