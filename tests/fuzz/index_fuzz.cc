// Fuzz target: opening, auditing and querying an index file made of
// arbitrary bytes.
//
// Input: one control byte (bit 0: recompute every checksum first, so that
// mutations reach the structural checks; bit 1: also query with a banding
// other than the stored one), then the file's bytes. Besides crashes, it
// checks that:
//   - an error names the index file;
//   - a file that fails to open is never audited as sound;
//   - an opened index answers every accessor consistently (signature length,
//     shingle counts, live ids found again, candidates live and ascending);
//   - an index audited as sound finds each live document with shingles among
//     the candidates of its own band keys, and its checksums are exactly the
//     ones FORMAT.md describes;
//   - salvage (audit --repair) never crashes, and loses nothing of a sound
//     index.
#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include "absl/strings/match.h"
#include "fuzz_util.h"
#include "index/index_salvage.h"
#include "index_checksums.h"
#include "kindred/banding.h"
#include "kindred/index.h"
#include "kindred/index_writer.h"

namespace kindred::fuzz {
namespace {

void CheckCandidates(const IndexReader& reader, uint32_t doc, bool must_find) {
  Banding banding{reader.bands(), reader.rows()};
  std::vector<uint64_t> keys(banding.bands);
  BandKeys(reader.signature(doc), banding, absl::MakeSpan(keys));
  std::vector<uint32_t> found;
  reader.Candidates(keys, &found);
  Require(std::is_sorted(found.begin(), found.end()) &&
              std::adjacent_find(found.begin(), found.end()) == found.end(),
          "candidates ascend without repeats");
  for (uint32_t candidate : found) {
    Require(candidate < reader.document_count() && reader.is_live(candidate),
            "candidates are live documents");
  }
  if (must_find) {
    Require(std::binary_search(found.begin(), found.end(), doc),
            "a sound index finds a document among its own candidates");
  }
}

void CheckDocuments(const IndexReader& reader, bool sound) {
  uint32_t live = 0;
  std::vector<uint64_t> shingles;
  for (uint32_t doc = 0; doc < reader.document_count(); ++doc) {
    Require(reader.signature(doc).size() == reader.settings().signature.perms,
            "a signature has perms slots");
    reader.facts(doc);
    absl::Status read = reader.ReadShingles(doc, &shingles);
    Require(read.ok() || !sound, "a sound index decodes every shingle set");
    if (read.ok()) {
      Require(shingles.size() == reader.shingle_count(doc), "decoded set has shingle_count");
      Require(std::adjacent_find(shingles.begin(), shingles.end(),
                                 [](uint64_t a, uint64_t b) { return a >= b; }) == shingles.end(),
              "a decoded set ascends strictly");
    }
    if (!reader.is_live(doc)) continue;
    ++live;
    std::optional<uint32_t> found = reader.FindLive(reader.id(doc));
    Require(found.has_value() && reader.id(*found) == reader.id(doc) && reader.is_live(*found),
            "a live id is found again");
    CheckCandidates(reader, doc, sound && read.ok() && !shingles.empty());
  }
  Require(live == reader.live_count(), "live_count counts the live documents");
  reader.ForEachBandKey([&reader](uint64_t, uint32_t doc) {
    Require(doc < reader.document_count() && reader.is_live(doc), "band keys of live documents");
  });
}

void CheckIndex(const std::string& path, const std::string& bytes, bool other_banding) {
  auto reader = IndexReader::Open(path);
  auto audit = AuditIndex(path);
  Require(audit.ok(), "audit reads an existing file");
  index::Salvage salvage;
  index::SalvageIndex(bytes, &salvage).IgnoreError();  // any bytes: no crash
  if (!reader.ok()) {
    Require(absl::StrContains(reader.status().message(), path), "an error names the index");
    Require(!audit->ok(), "an index that fails to open is not audited as sound");
    return;
  }
  const bool sound = audit->ok();
  // A torn tail may hold anything; a damaged commit slot is sound while the
  // other one verifies.
  if (sound && (*reader)->torn_tail_bytes() == 0 && (*reader)->damaged_commit_slots() == 0) {
    std::string fixed = bytes;
    FixIndexChecksums(&fixed);
    Require(fixed == bytes, "a sound index has exactly the checksums FORMAT.md describes");
    index::Salvage salvage;
    Require(index::SalvageIndex(bytes, &salvage).ok(), "a sound index can be salvaged");
    Require(salvage.lost.empty() && salvage.live.size() == (*reader)->live_count(),
            "salvaging a sound index loses nothing");
  }
  CheckDocuments(**reader, sound);
  if (other_banding) {
    const uint32_t perms = (*reader)->settings().signature.perms;
    const uint32_t rows = std::max<uint32_t>(1, perms / 4);
    Require((*reader)->UseBanding(perms / rows, rows).ok(), "a valid banding is accepted");
    CheckDocuments(**reader, sound);
    Require(!(*reader)->UseBanding(perms + 1, 1).ok(), "too many slots are refused");
  }
}

}  // namespace
}  // namespace kindred::fuzz

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  if (size == 0) return 0;
  std::string bytes(reinterpret_cast<const char*>(data + 1), size - 1);
  if ((data[0] & 1) != 0) kindred::fuzz::FixIndexChecksums(&bytes);
  const std::string& path = kindred::fuzz::WriteScratch(
      reinterpret_cast<const uint8_t*>(bytes.data()), bytes.size(), ".kin");
  kindred::fuzz::CheckIndex(path, bytes, (data[0] & 2) != 0);
  return 0;
}
