#include "kindred/document_table.h"

#include <utility>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/str_cat.h"
#include "core/record_codec.h"
#include "kindred/errors.h"

namespace kindred {
namespace {

constexpr std::string_view kTag = "DOCS";
constexpr std::string_view kWhat = "document table";
// Bytes of a row with an empty id (the least a row takes).
constexpr size_t kMinRowBytes = 4 + 8 + 8 + 1 + 4 + 8 + 8 + 4;

std::string Place(const DocumentOrigin& origin) {
  std::string place = absl::StrCat("input ", origin.input);
  if (origin.line > 0) absl::StrAppend(&place, " line ", origin.line);
  return place;
}

}  // namespace

std::string SerializeDocumentTable(const DocumentTable& table) {
  internal::RecordBuilder out(kTag);
  out.U32(table.first_document);
  out.U64(table.documents.size());
  for (const DocumentRecord& doc : table.documents) {
    out.Bytes(doc.id);
    out.U64(doc.facts.length);
    out.F64(doc.facts.priority);
    out.U8(doc.facts.has_priority ? 1 : 0);
    out.U32(doc.origin.input);
    out.U64(doc.origin.line);
    out.U64(doc.origin.offset);
    out.U32(doc.shingle_count);
  }
  return std::move(out).Finish();
}

absl::StatusOr<DocumentTable> ParseDocumentTable(std::string_view bytes) {
  internal::RecordParser in(bytes, kTag, kWhat);
  DocumentTable table;
  uint64_t count = 0;
  if (in.U32(&table.first_document) && in.U64(&count)) {
    if (count > in.remaining() / kMinRowBytes) {
      return in.Corrupt(absl::StrCat("counts ", count, " documents in ", in.remaining(), " bytes"));
    }
    if (count > uint64_t{UINT32_MAX} + 1 - table.first_document) {
      return in.Corrupt("document numbers beyond 2^32");
    }
    table.documents.resize(count);
    for (DocumentRecord& doc : table.documents) {
      uint8_t has_priority = 0;
      if (!(in.Bytes(&doc.id) && in.U64(&doc.facts.length) && in.F64(&doc.facts.priority) &&
            in.U8(&has_priority) && in.U32(&doc.origin.input) && in.U64(&doc.origin.line) &&
            in.U64(&doc.origin.offset) && in.U32(&doc.shingle_count))) {
        break;
      }
      if (has_priority > 1) return in.Corrupt("a priority flag is neither 0 nor 1");
      doc.facts.has_priority = has_priority == 1;
    }
  }
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
                                   "; first seen at ",
                                   Place(all.documents[it->second].origin), ")"));
    }
  }
  return all;
}

}  // namespace kindred
