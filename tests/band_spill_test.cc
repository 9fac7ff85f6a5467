// Spilled band keys: the merge of sorted runs and resident entries gives
// every entry once, in (key, doc) order, as one in-memory sort does; scratch
// files that cannot be made are errors, not crashes.
#include "core/band_spill.h"

#include <algorithm>
#include <catch2/catch.hpp>

#include "kindred/banding.h"
#include "testlib/similar_sets.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

using testing::SplitMix64;

TEST_CASE("Merged runs give the entries of one sort of everything", "[band_spill]") {
  testing::TempDir dir;
  constexpr uint32_t kBands = 3;
  SplitMix64 random(11);
  // Keys from a small range, so buckets of many documents cross runs; some
  // documents have no key in a band.
  std::vector<std::vector<uint64_t>> keys(5000, std::vector<uint64_t>(kBands));
  for (auto& doc : keys) {
    for (uint64_t& key : doc) key = random.Between(0, 9) == 0 ? kNoBandKey : random.Between(1, 700);
  }
  auto spill = BandSpill::Create(dir.path(), kBands);
  REQUIRE(spill.ok());
  // Runs of uneven sizes, then the rest stays resident.
  size_t begin = 0;
  for (size_t size : {1, 999, 1500, 37, 2000}) {
    // Band by band, as a corpus holds them.
    std::vector<std::vector<uint64_t>> columns(kBands);
    for (size_t doc = begin; doc < begin + size; ++doc) {
      for (uint32_t band = 0; band < kBands; ++band) columns[band].push_back(keys[doc][band]);
    }
    std::vector<const uint64_t*> run;
    for (const auto& column : columns) run.push_back(column.data());
    REQUIRE((*spill)->AddRun(static_cast<uint32_t>(begin), size, run).ok());
    begin += size;
  }
  REQUIRE((*spill)->runs() == 5);
  CHECK((*spill)->bytes_written() > 0);
  for (uint32_t band = 0; band < kBands; ++band) {
    std::vector<BucketEntry> all;
    EntryVector resident, scratch;
    HugePageVector<uint32_t> offsets;
    for (size_t doc = 0; doc < keys.size(); ++doc) {
      if (keys[doc][band] == kNoBandKey) continue;
      all.push_back({keys[doc][band], static_cast<uint32_t>(doc)});
      if (doc >= begin) resident.push_back(all.back());
    }
    std::sort(all.begin(), all.end());
    SortEntries(resident, scratch, offsets);
    BandMerger merger(**spill, band, resident);
    std::vector<BucketEntry> merged;
    BucketEntry entry;
    for (;;) {
      auto more = merger.Next(&entry);
      REQUIRE(more.ok());
      if (!*more) break;
      merged.push_back(entry);
    }
    REQUIRE(merged.size() == all.size());
    for (size_t i = 0; i < all.size(); ++i) {
      CHECK(merged[i].key == all[i].key);
      CHECK(merged[i].doc == all[i].doc);
    }
  }
}

TEST_CASE("The partitioned sort orders like std::sort, equal keys included", "[band_spill]") {
  SplitMix64 random(12);
  for (size_t n : {0, 5, 1023, 1024, 50000}) {
    EntryVector entries, scratch;
    HugePageVector<uint32_t> offsets;
    for (size_t i = 0; i < n; ++i) {
      // Half random hashes, half a few repeated keys.
      const uint64_t key = i % 2 ? random.Next() : random.Between(1, 5) << 60;
      entries.push_back({key, static_cast<uint32_t>(random.Between(0, 1000000))});
    }
    std::vector<BucketEntry> expected(entries.begin(), entries.end());
    std::sort(expected.begin(), expected.end());
    SortEntries(entries, scratch, offsets);
    REQUIRE(entries.size() == expected.size());
    for (size_t i = 0; i < n; ++i) {
      CHECK(entries[i].key == expected[i].key);
      CHECK(entries[i].doc == expected[i].doc);
    }
  }
}

TEST_CASE("A scratch directory that cannot take files is an error", "[band_spill]") {
  auto missing = BandSpill::Create("/nonexistent-kindred-dir", 4);
  REQUIRE(!missing.ok());
  CHECK(missing.status().code() == absl::StatusCode::kAborted);
  CHECK_THAT(std::string(missing.status().message()), Catch::Contains("/nonexistent-kindred-dir"));
}

}  // namespace
}  // namespace kindred
