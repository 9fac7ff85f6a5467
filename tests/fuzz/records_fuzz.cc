// Fuzz target: the parsers of the sweep's records (src/core/RECORDS.md) over
// arbitrary bytes: the band-key table (versions 1 and 2) and the document
// table (versions 1 and 2).
//
// Input: one control byte (bit 0: the record, 0 band-key table, 1 document
// table; bit 1: set the frame's payload length and checksum first, so that
// mutations reach the payload's own checks), then the record's bytes.
// Besides crashes, it checks that:
//   - an error is of kind bad_input and starts with the record's name;
//   - a parsed table is written again (current version) into bytes that
//     parse to the same table;
//   - a parsed band-key table is sorted, and its partitions written by
//     SerializeBandKeyPartitions are the bytes of each partition's table.
#include <algorithm>
#include <bit>
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "fuzz_util.h"
#include "kindred/band_key_table.h"
#include "kindred/document_table.h"
#include "kindred/errors.h"
#include "xxhash.h"

namespace kindred::fuzz {
namespace {

constexpr size_t kHeader = 24, kTrailer = 8;

// Sets the header's payload length and the trailing checksum of `bytes` (a
// record of at least a frame's size) to match its bytes.
void FixFrame(std::string* bytes) {
  if (bytes->size() < kHeader + kTrailer) return;
  const uint64_t length = bytes->size() - kHeader - kTrailer;
  for (int i = 0; i < 8; ++i) (*bytes)[16 + i] = static_cast<char>(length >> (8 * i));
  const size_t body = bytes->size() - kTrailer;
  const uint64_t sum = XXH3_64bits(bytes->data(), body);
  for (int i = 0; i < 8; ++i) (*bytes)[body + i] = static_cast<char>(sum >> (8 * i));
}

void CheckError(const absl::Status& status, std::string_view what) {
  Require(KindOf(status) == ErrorKind::kBadInput, "a damaged record is bad input");
  const std::string_view message(status.message().data(), status.message().size());
  Require(message.starts_with(what), "an error starts with the record's name");
}

void BandKeys(std::string_view bytes) {
  auto table = ParseBandKeyTable(bytes);
  if (!table.ok()) return CheckError(table.status(), "band-key table: ");
  Require(std::is_sorted(table->records.begin(), table->records.end()), "rows sorted");
  auto again = ParseBandKeyTable(SerializeBandKeyTable(*table));
  Require(again.ok() && *again == *table, "a table written again reads the same");
  const std::vector<BandKeyTable> parts = PartitionBandKeys(*table, 3);
  const std::vector<std::string> part_bytes = SerializeBandKeyPartitions(*table, 3);
  Require(part_bytes.size() == 3, "three partitions");
  for (size_t p = 0; p < 3; ++p) {
    Require(part_bytes[p] == SerializeBandKeyTable(parts[p]), "partitions written directly");
  }
}

void Documents(std::string_view bytes) {
  auto table = ParseDocumentTable(bytes);
  if (!table.ok()) return CheckError(table.status(), "document table: ");
  auto again = ParseDocumentTable(SerializeDocumentTable(*table));
  Require(again.ok(), "a table written again reads");
  // Compared by bits: a NaN priority is not equal to itself.
  Require(again->first_document == table->first_document &&
              again->documents.size() == table->documents.size(),
          "a table written again has the same rows");
  for (size_t i = 0; i < table->documents.size(); ++i) {
    const DocumentRecord& x = table->documents[i];
    const DocumentRecord& y = again->documents[i];
    Require(x.id == y.id && x.facts.length == y.facts.length &&
                std::bit_cast<uint64_t>(x.facts.priority) ==
                    std::bit_cast<uint64_t>(y.facts.priority) &&
                x.facts.has_priority == y.facts.has_priority && x.origin == y.origin &&
                x.shingle_count == y.shingle_count,
            "a row written again reads the same");
  }
}

}  // namespace
}  // namespace kindred::fuzz

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  if (size == 0) return 0;
  const uint8_t control = data[0];
  std::string bytes(reinterpret_cast<const char*>(data) + 1, size - 1);
  if ((control & 2) != 0) kindred::fuzz::FixFrame(&bytes);
  if ((control & 1) == 0) {
    kindred::fuzz::BandKeys(bytes);
  } else {
    kindred::fuzz::Documents(bytes);
  }
  return 0;
}
