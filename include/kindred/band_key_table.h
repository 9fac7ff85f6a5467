// kindred: the band-key table, a record of the banding stage.
//
// One row per (band, key, document): document `document` has band key `key`
// in band `band` (banding.h). Documents with no shingles have no rows (their
// keys are kNoBandKey, which never match). Two documents share a bucket when
// they have rows with the same band and key.
//
// A table is sorted by (band, key, document). It can be cut into P
// partitions by BandKeyPartition(key, P): every bucket lies whole in one
// partition, so candidate search runs on each partition alone (and on the
// merge of the same partition from many shards).
//
// The serialized form is documented in src/core/RECORDS.md. Plain data;
// thread-compatible.
#ifndef KINDRED_BAND_KEY_TABLE_H_
#define KINDRED_BAND_KEY_TABLE_H_

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "absl/status/statusor.h"
#include "absl/types/span.h"

namespace kindred {

struct BandKeyRecord {
  uint32_t band = 0;
  uint64_t key = 0;
  uint32_t document = 0;
  friend bool operator==(const BandKeyRecord&, const BandKeyRecord&) = default;
  // The table order: band, then key, then document.
  friend bool operator<(const BandKeyRecord& x, const BandKeyRecord& y) {
    if (x.band != y.band) return x.band < y.band;
    if (x.key != y.key) return x.key < y.key;
    return x.document < y.document;
  }
};

struct BandKeyTable {
  std::vector<BandKeyRecord> records;  // sorted (see SortBandKeys) unless said otherwise
  friend bool operator==(const BandKeyTable&, const BandKeyTable&) = default;
};

// Sorts the table into (band, key, document) order.
void SortBandKeys(BandKeyTable* table);

// The partition of a key among `partitions` (>= 1): a fixed mix of the key
// reduced to [0, partitions), the same on every machine.
uint32_t BandKeyPartition(uint64_t key, uint32_t partitions);

// The table cut into `partitions` (>= 1) tables by BandKeyPartition, each
// sorted. Requires a sorted table.
std::vector<BandKeyTable> PartitionBandKeys(const BandKeyTable& table, uint32_t partitions);

// Sorted tables merged into one sorted table (for one partition: the tables
// of that partition from every shard).
BandKeyTable MergeBandKeys(absl::Span<const BandKeyTable> tables);

// The table in the current format (version 2: rows grouped by band, keys by
// differences, documents from the table's least). Requires a sorted table.
std::string SerializeBandKeyTable(const BandKeyTable& table);

// The same bytes as SerializeBandKeyTable of each of
// PartitionBandKeys(table, partitions), without building those tables.
// Requires a sorted table.
std::vector<std::string> SerializeBandKeyPartitions(const BandKeyTable& table, uint32_t partitions);

// Band keys held by columns, as a signer holds them: in band b (of
// columns.size()), document first + i has key columns[b][i], or none when
// that is kNoBandKey or present[i] is 0. Every column has present.size()
// keys. Views; the caller owns the data.
struct BandKeyColumns {
  absl::Span<const absl::Span<const uint64_t>> columns;
  absl::Span<const uint8_t> present;
  uint32_t first = 0;
};

// The sorted table of those keys.
BandKeyTable BandKeyTableOf(const BandKeyColumns& keys);

// SerializeBandKeyPartitions(BandKeyTableOf(keys), partitions), the same
// bytes, written from the columns without building the table.
std::vector<std::string> SerializeBandKeyColumns(const BandKeyColumns& keys, uint32_t partitions);

// Reads versions 1 and 2. Errors: BadInput when `bytes` are not a whole,
// intact band-key table, or its rows are not sorted.
absl::StatusOr<BandKeyTable> ParseBandKeyTable(std::string_view bytes);

}  // namespace kindred

#endif  // KINDRED_BAND_KEY_TABLE_H_
