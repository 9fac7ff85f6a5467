#include "kindred/document_table.h"

#include <bit>
#include <utility>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/str_cat.h"
#include "core/record_codec.h"
#include "kindred/errors.h"

namespace kindred {
namespace {

constexpr std::string_view kTag = "DOCS";
constexpr std::string_view kWhat = "document table";
// Version 2 is written; versions 1 and 2 are read (RECORDS.md).
constexpr uint32_t kVersion = 2;
// Bytes of a row with an empty id (the least a row takes), by version.
constexpr size_t kMinRowBytesV1 = 4 + 8 + 8 + 1 + 4 + 8 + 8 + 4;
constexpr size_t kMinRowBytesV2 = 6;
// Version 2's row flags.
constexpr uint8_t kHasPriority = 1, kPriorityWritten = 2, kOffsetUnknown = 4;

std::string Place(const DocumentOrigin& origin) {
  std::string place = absl::StrCat("input ", origin.input);
  if (origin.line > 0) absl::StrAppend(&place, " line ", origin.line);
  return place;
}

}  // namespace

std::string SerializeDocumentTable(const DocumentTable& table) {
  internal::RecordBuilder out(kTag, kVersion);
  out.Reserve(12 + table.documents.size() * 24);
  out.U32(table.first_document);
  out.U64(table.documents.size());
  for (const DocumentRecord& doc : table.documents) {
    out.Varint(doc.id.size());
    out.Raw(doc.id);
    out.Varint(doc.facts.length);
    // The priority's bits only when not 0 (+0.0: no priority field).
    const bool priority = std::bit_cast<uint64_t>(doc.facts.priority) != 0;
    const bool unknown = doc.origin.offset == kUnknownOffset;
    out.U8((doc.facts.has_priority ? kHasPriority : 0) | (priority ? kPriorityWritten : 0) |
           (unknown ? kOffsetUnknown : 0));
    if (priority) out.F64(doc.facts.priority);
    out.Varint(doc.origin.input);
    out.Varint(doc.origin.line);
    if (!unknown) out.Varint(doc.origin.offset);
    out.Varint(doc.shingle_count);
  }
  return std::move(out).Finish();
}

namespace {

// Version 1: fixed-width rows.
absl::Status ReadRowsV1(internal::RecordParser& in, DocumentTable* table) {
  for (DocumentRecord& doc : table->documents) {
    uint8_t has_priority = 0;
    if (!(in.Bytes(&doc.id) && in.U64(&doc.facts.length) && in.F64(&doc.facts.priority) &&
          in.U8(&has_priority) && in.U32(&doc.origin.input) && in.U64(&doc.origin.line) &&
          in.U64(&doc.origin.offset) && in.U32(&doc.shingle_count))) {
      break;  // Finish() says why
    }
    if (has_priority > 1) return in.Corrupt("a priority flag is neither 0 nor 1");
    doc.facts.has_priority = has_priority == 1;
  }
  return absl::OkStatus();
}

// Version 2: varints, and the priority and offset only when there are any.
absl::Status ReadRowsV2(internal::RecordParser& in, DocumentTable* table) {
  for (DocumentRecord& doc : table->documents) {
    uint64_t id_size = 0, input = 0, shingles = 0;
    const char* id = nullptr;
    uint8_t flags = 0;
    if (!(in.Varint(&id_size) && in.Take(id_size, &id) && in.Varint(&doc.facts.length) &&
          in.U8(&flags))) {
      break;
    }
    if (flags > (kHasPriority | kPriorityWritten | kOffsetUnknown)) {
      return in.Corrupt(absl::StrCat("unknown flags ", flags, " in a row"));
    }
    doc.id.assign(id, id_size);
    doc.facts.has_priority = (flags & kHasPriority) != 0;
    if ((flags & kPriorityWritten) != 0) {
      if (!in.F64(&doc.facts.priority)) break;
      if (std::bit_cast<uint64_t>(doc.facts.priority) == 0) {
        return in.Corrupt("a priority of +0.0 written out");
      }
    }
    if (!(in.Varint(&input) && in.Varint(&doc.origin.line))) break;
    if ((flags & kOffsetUnknown) == 0) {
      if (!in.Varint(&doc.origin.offset)) break;
      if (doc.origin.offset == kUnknownOffset) return in.Corrupt("an offset of 2^64-1 written out");
    }
    if (!in.Varint(&shingles)) break;
    if (input > UINT32_MAX || shingles > UINT32_MAX) {
      return in.Corrupt("an input number or shingle count beyond 32 bits");
    }
    doc.origin.input = static_cast<uint32_t>(input);
    doc.shingle_count = static_cast<uint32_t>(shingles);
  }
  return absl::OkStatus();
}

}  // namespace

absl::StatusOr<DocumentTable> ParseDocumentTable(std::string_view bytes) {
  internal::RecordParser in(bytes, kTag, kWhat, 1, kVersion);
  DocumentTable table;
  uint64_t count = 0;
  absl::Status rows;
  if (in.U32(&table.first_document) && in.U64(&count)) {
    const size_t least = in.version() == 1 ? kMinRowBytesV1 : kMinRowBytesV2;
    if (count > in.remaining() / least) {
      return in.Corrupt(absl::StrCat("counts ", count, " documents in ", in.remaining(), " bytes"));
    }
    if (count > uint64_t{UINT32_MAX} + 1 - table.first_document) {
      return in.Corrupt("document numbers beyond 2^32");
    }
    table.documents.resize(count);
    rows = in.version() == 1 ? ReadRowsV1(in, &table) : ReadRowsV2(in, &table);
  }
  if (!in.status().ok()) return in.status();
  if (!rows.ok()) return rows;
  if (absl::Status status = in.Finish(); !status.ok()) return status;
  return table;
}

absl::StatusOr<DocumentTable> JoinDocumentTables(std::vector<DocumentTable> parts) {
  DocumentTable all;
  if (parts.empty()) return all;
  all.first_document = parts[0].first_document;
  size_t total = 0;
  for (const DocumentTable& part : parts) total += part.documents.size();
  all.documents.reserve(total);
  absl::flat_hash_map<std::string_view, uint32_t> seen;
  seen.reserve(total);
  for (DocumentTable& part : parts) {
    const uint64_t expected = all.first_document + all.documents.size();
    if (part.first_document != expected) {
      return InvalidRequest(absl::StrCat("document tables do not join: a part starts at document ",
                                         part.first_document, ", the one before ends at ",
                                         expected));
    }
    for (DocumentRecord& doc : part.documents) all.documents.push_back(std::move(doc));
  }
  for (size_t i = 0; i < all.documents.size(); ++i) {
    const DocumentRecord& doc = all.documents[i];
    auto [it, fresh] = seen.emplace(doc.id, static_cast<uint32_t>(i));
    if (!fresh) {
      return BadInput(absl::StrCat("duplicate id \"", doc.id, "\" (", Place(doc.origin),
                                   "; first seen at ", Place(all.documents[it->second].origin),
                                   ")"));
    }
  }
  return all;
}

}  // namespace kindred
