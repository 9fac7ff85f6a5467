#include "io/binary_content.h"

#include <cstdint>

#include "absl/strings/str_cat.h"

namespace kindred::io {
namespace {

// Length of the well-formed sequence starting at bytes[i] (Unicode Standard,
// Table 3-7), 0 when it is ill-formed, or -1 when it is valid so far but cut
// off by the end of `bytes`.
int SequenceLength(std::string_view bytes, size_t i) {
  const uint8_t lead = static_cast<uint8_t>(bytes[i]);
  if (lead < 0x80) return 1;
  int length = 0;
  uint8_t low = 0x80, high = 0xBF;  // range of the second byte
  if (lead >= 0xC2 && lead <= 0xDF) {
    length = 2;
  } else if (lead >= 0xE0 && lead <= 0xEF) {
    length = 3;
    if (lead == 0xE0) low = 0xA0;
    if (lead == 0xED) high = 0x9F;
  } else if (lead >= 0xF0 && lead <= 0xF4) {
    length = 4;
    if (lead == 0xF0) low = 0x90;
    if (lead == 0xF4) high = 0x8F;
  } else {
    return 0;
  }
  for (int k = 1; k < length; ++k) {
    if (i + k >= bytes.size()) return -1;
    const uint8_t byte = static_cast<uint8_t>(bytes[i + k]);
    if (k == 1 ? (byte < low || byte > high) : (byte < 0x80 || byte > 0xBF)) return 0;
  }
  return length;
}

}  // namespace

size_t IllFormedUtf8Bytes(std::string_view bytes) {
  size_t bad = 0;
  for (size_t i = 0; i < bytes.size();) {
    const int length = SequenceLength(bytes, i);
    if (length < 0) break;
    if (length == 0) {
      ++bad;
      ++i;
    } else {
      i += static_cast<size_t>(length);
    }
  }
  return bad;
}

bool LooksBinary(std::string_view text, std::string* why) {
  const std::string_view probe = text.substr(0, kBinaryProbeBytes);
  if (const size_t nul = probe.find('\0'); nul != std::string_view::npos) {
    if (why != nullptr) *why = absl::StrCat("binary: a NUL byte at byte ", nul);
    return true;
  }
  const size_t bad = IllFormedUtf8Bytes(probe);
  if (bad * 10 > probe.size()) {
    if (why != nullptr) {
      *why = absl::StrCat("binary: ", bad, " of the first ", probe.size(),
                          " bytes are not UTF-8");
    }
    return true;
  }
  return false;
}

}  // namespace kindred::io
