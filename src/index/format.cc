#include "index/format.h"

#include "absl/strings/str_format.h"
#include "index/codec.h"
#include "index/commit_area.h"
#include "kindred/errors.h"

namespace kindred::index {
namespace {

bool AddChecked(uint64_t a, uint64_t b, uint64_t* sum) {
  return !__builtin_add_overflow(a, b, sum);
}

bool MulChecked(uint64_t a, uint64_t b, uint64_t* product) {
  return !__builtin_mul_overflow(a, b, product);
}

// Appends a section of `bytes` (rounded up to 8) at *offset.
bool Place(uint64_t bytes, uint64_t* offset, uint64_t* section) {
  *section = *offset;
  uint64_t padded;
  if (!AddChecked(bytes, 7, &padded)) return false;
  return AddChecked(*offset, padded & ~uint64_t{7}, offset);
}

// The version 1 fields after magic, version and size (FORMAT.md, "File
// header"), read from `reader`; the header is `size` bytes in all.
absl::Status DecodeSettingFields(ByteReader* reader_ptr, uint32_t version, uint32_t size,
                                 IndexSettings* out) {
  ByteReader& reader = *reader_ptr;
  uint8_t mode, scheme, measure, reserved;
  uint32_t unicode_length;
  IndexSettings s;
  reader.U8(&mode), reader.U8(&scheme), reader.U8(&measure), reader.U8(&reserved);
  reader.U32(&s.signature.k), reader.U64(&s.signature.seed), reader.U32(&s.signature.perms);
  reader.U32(&s.bands), reader.U32(&s.rows), reader.U32(&unicode_length);
  reader.F64(&s.threshold);
  std::string_view unicode;
  if (unicode_length > kMaxUnicodeVersionLength ||
      (version == 1 ? RoundUp8(kFileHeaderFixedSize + unicode_length) + 8 : kHeaderSizeV2) !=
          size ||
      !reader.Bytes(unicode_length, &unicode) || mode > 1 || scheme > 1 || measure > 1 ||
      reserved != 0) {
    return absl::DataLossError("index header: malformed fields");
  }
  s.signature.mode = static_cast<ShingleMode>(mode);
  s.signature.scheme = static_cast<SignerScheme>(scheme);
  s.measure = static_cast<Measure>(measure);
  s.unicode_version = std::string(unicode);
  if (!s.signature.Validate().ok() || s.bands < 1 || s.rows < 1 ||
      uint64_t{s.bands} * s.rows > s.signature.perms ||
      !(s.threshold > 0.0 && s.threshold <= 1.0)) {
    return absl::DataLossError("index header: settings out of range");
  }
  *out = std::move(s);
  return absl::OkStatus();
}

}  // namespace

uint32_t VersionFor(const IndexSettings& settings) { return settings.containment.stored() ? 3 : 2; }

std::string EncodeFileHeader(const IndexSettings& settings, uint32_t version) {
  if (version == 0) version = VersionFor(settings);
  const std::string& unicode = settings.unicode_version;
  std::string out;
  ByteWriter writer(&out);
  writer.Bytes(kFileMagic);
  writer.U32(version);
  // Version 2 pads the header to one 512-byte sector, all checksummed.
  writer.U32(static_cast<uint32_t>(
      version == 1 ? RoundUp8(kFileHeaderFixedSize + unicode.size()) + 8 : kHeaderSizeV2));
  writer.U8(static_cast<uint8_t>(settings.signature.mode));
  writer.U8(static_cast<uint8_t>(settings.signature.scheme));
  writer.U8(static_cast<uint8_t>(settings.measure));
  writer.U8(0);
  writer.U32(settings.signature.k);
  writer.U64(settings.signature.seed);
  writer.U32(settings.signature.perms);
  writer.U32(settings.bands);
  writer.U32(settings.rows);
  writer.U32(static_cast<uint32_t>(unicode.size()));
  writer.F64(settings.threshold);
  writer.Bytes(unicode);
  writer.PadTo8();
  if (version != 1) out.resize(kHeaderSizeV2 - 8, '\0');
  if (version == 3) {
    char* fields = out.data() + kContainmentFieldsOffset;
    StoreU32(fields, settings.containment.min_size);
    StoreU32(fields + 4, settings.containment.partitions);
    StoreU64(fields + 8, std::bit_cast<uint64_t>(settings.containment.threshold));
  }
  writer.U64(Checksum(out));
  return out;
}

absl::Status DecodeFileHeader(std::string_view file, IndexSettings* settings, size_t* header_size,
                              uint32_t* version_out) {
  if (file.size() < kFileMagic.size() || file.substr(0, kFileMagic.size()) != kFileMagic) {
    return absl::DataLossError("not a kindred index (bad magic)");
  }
  ByteReader reader(file);
  uint32_t version = 0, size = 0;
  if (!reader.Skip(8) || !reader.U32(&version) || !reader.U32(&size)) {
    return absl::DataLossError("truncated index header");
  }
  // Every version keeps magic, version, size and the trailing checksum where
  // they are, so a newer file is recognized only once its header verifies.
  if (size < 24 || size > 0x10000 || size % 8 != 0) {
    return absl::DataLossError(absl::StrFormat("index header: bad size %u", size));
  }
  if (file.size() < size) return absl::DataLossError("truncated index header");
  if (Checksum(file.substr(0, size - 8)) != LoadU64(file.data() + size - 8)) {
    return absl::DataLossError("index header: checksum mismatch");
  }
  if (version > kFormatVersion) {
    return SettingsMismatch(absl::StrFormat(
        "index format version %u is newer than this program reads (%u); use a newer kindred",
        version, kFormatVersion));
  }
  if (version < kOldestFormatVersion || size < kFileHeaderFixedSize + 8 ||
      size > (version == 1 ? kMaxFileHeaderSize : kHeaderSizeV2)) {
    return absl::DataLossError(absl::StrFormat("index header: bad version %u", version));
  }
  IndexSettings decoded;
  absl::Status fields = DecodeSettingFields(&reader, version, size, &decoded);
  if (!fields.ok()) return fields;
  if (version == 3) {
    const char* at = file.data() + kContainmentFieldsOffset;
    ContainmentKeys& keys = decoded.containment;
    keys = {std::bit_cast<double>(LoadU64(at + 8)), LoadU32(at), LoadU32(at + 4)};
    if (keys.min_size < 1 || keys.partitions < 1 || keys.partitions > 32 ||
        !(keys.threshold > 0.0 && keys.threshold <= 1.0)) {
      return absl::DataLossError("index header: containment-key settings out of range");
    }
  }
  *settings = std::move(decoded);
  *header_size = size;
  if (version_out != nullptr) *version_out = version;
  return absl::OkStatus();
}

bool ComputeLayout(const SegmentHeader& h, uint32_t perms, uint64_t limit, SectionLayout* layout) {
  uint64_t offset = 0, doc_table, signatures, keys, key_docs, retired;
  if (!MulChecked(h.doc_count, kDocRecordSize, &doc_table) ||
      !MulChecked(uint64_t{h.doc_count} * 4, perms, &signatures) ||
      !MulChecked(h.key_count, 8, &keys) || !MulChecked(h.key_count, 4, &key_docs) ||
      !MulChecked(h.retired_count, 8, &retired)) {
    return false;
  }
  SectionLayout l;
  bool ok = Place(doc_table, &offset, &l.doc_table) &&
            Place(uint64_t{h.doc_count} * 4, &offset, &l.id_order) &&
            Place(signatures, &offset, &l.signatures) && Place(keys, &offset, &l.band_keys) &&
            Place(key_docs, &offset, &l.band_docs) && Place(retired, &offset, &l.retired) &&
            Place(h.id_bytes, &offset, &l.id_bytes);
  l.tables_end = offset;
  ok = ok && Place(h.shingle_bytes, &offset, &l.shingle_bytes);
  l.body_length = offset;
  if (!ok || offset > limit) return false;
  *layout = l;
  return true;
}

void EncodeSegmentHeader(const SegmentHeader& h, std::string* out) {
  size_t start = out->size();
  ByteWriter writer(out);
  writer.Bytes(kSegmentMagic);
  writer.U32(h.segment_number);
  writer.U32(h.doc_count);
  writer.U32(h.flags);
  writer.U64(h.first_doc);
  writer.U64(h.id_bytes);
  writer.U64(h.shingle_bytes);
  writer.U64(h.key_count);
  writer.U64(h.retired_count);
  writer.U64(Checksum(std::string_view(*out).substr(start)));
}

bool DecodeSegmentHeader(std::string_view bytes, SegmentHeader* h) {
  if (bytes.substr(0, 4) != kSegmentMagic) return false;
  if (Checksum(bytes.substr(0, kSegmentHeaderSize - 8)) != LoadU64(bytes.data() + 56)) {
    return false;
  }
  ByteReader reader(bytes.substr(4, kSegmentHeaderSize - 12));
  return reader.U32(&h->segment_number) && reader.U32(&h->doc_count) && reader.U32(&h->flags) &&
         reader.U64(&h->first_doc) && reader.U64(&h->id_bytes) && reader.U64(&h->shingle_bytes) &&
         reader.U64(&h->key_count) && reader.U64(&h->retired_count);
}

void EncodeCommitRecord(const CommitRecord& record, std::string* out) {
  size_t start = out->size();
  ByteWriter writer(out);
  writer.Bytes(kCommitMagic);
  writer.U32(record.segment_number);
  writer.U64(record.body_length);
  writer.U64(record.tables_checksum);
  writer.U64(Checksum(std::string_view(*out).substr(start)));
}

bool DecodeCommitRecord(std::string_view bytes, CommitRecord* record) {
  if (bytes.substr(0, 4) != kCommitMagic) return false;
  if (Checksum(bytes.substr(0, 24)) != LoadU64(bytes.data() + 24)) return false;
  record->segment_number = LoadU32(bytes.data() + 4);
  record->body_length = LoadU64(bytes.data() + 8);
  record->tables_checksum = LoadU64(bytes.data() + 16);
  return true;
}

void EncodeDocRecord(const DocRecord& r, std::string* out) {
  ByteWriter writer(out);
  writer.U64(r.id_offset);
  writer.U64(r.shingles_offset);
  writer.U64(r.shingles_checksum);
  writer.U64(r.text_length);
  writer.F64(r.priority);
  writer.U32(r.id_length);
  writer.U32(r.shingle_count);
  writer.U32(r.shingles_length);
  writer.U32(r.flags);
}

void StoreDocRecord(const DocRecord& r, char* out) {
  StoreU64(out, r.id_offset);
  StoreU64(out + 8, r.shingles_offset);
  StoreU64(out + 16, r.shingles_checksum);
  StoreU64(out + 24, r.text_length);
  StoreU64(out + 32, std::bit_cast<uint64_t>(r.priority));
  StoreU32(out + 40, r.id_length);
  StoreU32(out + 44, r.shingle_count);
  StoreU32(out + 48, r.shingles_length);
  StoreU32(out + 52, r.flags);
}

DocRecord DecodeDocRecord(std::string_view bytes) {
  DocRecord r;
  ByteReader reader(bytes);
  reader.U64(&r.id_offset), reader.U64(&r.shingles_offset), reader.U64(&r.shingles_checksum);
  reader.U64(&r.text_length), reader.F64(&r.priority), reader.U32(&r.id_length);
  reader.U32(&r.shingle_count), reader.U32(&r.shingles_length), reader.U32(&r.flags);
  return r;
}

}  // namespace kindred::index
