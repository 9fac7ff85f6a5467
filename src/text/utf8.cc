#include "text/utf8.h"

#include <cstring>

#include "kindred/text.h"

namespace kindred {
namespace text_internal {
namespace {

// Length of the well-formed prefix of the sequence starting at bytes[i]
// (0 when the lead byte itself is ill-formed), and its scalar value. The
// second-byte ranges follow Table 3-7 "Well-Formed UTF-8 Byte Sequences" of
// the Unicode Standard.
struct Sequence {
  int valid_length;  // bytes that belong to the sequence (>= 1 when valid)
  bool complete;     // the sequence is a whole well-formed character
  char32_t value;
};

Sequence ReadSequence(const unsigned char* p, size_t left) {
  const unsigned char lead = p[0];
  if (lead < 0x80) return {1, true, lead};
  int need;
  unsigned char lo = 0x80, hi = 0xBF;
  char32_t value;
  if (lead >= 0xC2 && lead <= 0xDF) {
    need = 1, value = lead & 0x1F;
  } else if (lead >= 0xE0 && lead <= 0xEF) {
    need = 2, value = lead & 0x0F;
    if (lead == 0xE0) lo = 0xA0;
    if (lead == 0xED) hi = 0x9F;
  } else if (lead >= 0xF0 && lead <= 0xF4) {
    need = 3, value = lead & 0x07;
    if (lead == 0xF0) lo = 0x90;
    if (lead == 0xF4) hi = 0x8F;
  } else {
    return {0, false, 0};
  }
  int taken = 1;
  for (int i = 1; i <= need; ++i) {
    if (static_cast<size_t>(i) >= left) return {taken, false, 0};
    const unsigned char b = p[i];
    const unsigned char min = i == 1 ? lo : 0x80;
    const unsigned char max = i == 1 ? hi : 0xBF;
    if (b < min || b > max) return {taken, false, 0};
    value = (value << 6) | (b & 0x3F);
    ++taken;
  }
  return {taken, true, value};
}

}  // namespace

uint32_t DecodeUtf8(std::string_view bytes, icu::UnicodeString* out,
                    std::vector<uint32_t>* unit_begin) {
  // Each byte yields at most one UTF-16 unit (a 4-byte sequence yields two).
  const int32_t capacity = static_cast<int32_t>(bytes.size()) + 1;
  char16_t* buffer = out->getBuffer(capacity);
  if (unit_begin != nullptr) unit_begin->clear();
  const auto* p = reinterpret_cast<const unsigned char*>(bytes.data());
  const size_t n = bytes.size();
  int32_t length = 0;
  uint32_t replaced = 0;
  size_t i = 0;
  while (i < n) {
    if (unit_begin != nullptr) unit_begin->push_back(static_cast<uint32_t>(i));
    if (p[i] < 0x80) {
      buffer[length++] = p[i++];
      continue;
    }
    const Sequence s = ReadSequence(p + i, n - i);
    if (!s.complete) {
      buffer[length++] = 0xFFFD;
      ++replaced;
      i += s.valid_length == 0 ? 1 : s.valid_length;
    } else if (s.value < 0x10000) {
      buffer[length++] = static_cast<char16_t>(s.value);
      i += s.valid_length;
    } else {
      buffer[length++] = static_cast<char16_t>(0xD7C0 + (s.value >> 10));
      if (unit_begin != nullptr)
        unit_begin->push_back(static_cast<uint32_t>(i));
      buffer[length++] = static_cast<char16_t>(0xDC00 | (s.value & 0x3FF));
      i += s.valid_length;
    }
  }
  if (unit_begin != nullptr) unit_begin->push_back(static_cast<uint32_t>(n));
  out->releaseBuffer(length);
  return replaced;
}

void AppendCodePoint(char32_t c, std::string* out) {
  char buf[4];
  int len;
  if (c < 0x80) {
    out->push_back(static_cast<char>(c));
    return;
  } else if (c < 0x800) {
    buf[0] = static_cast<char>(0xC0 | (c >> 6));
    buf[1] = static_cast<char>(0x80 | (c & 0x3F));
    len = 2;
  } else if (c < 0x10000) {
    buf[0] = static_cast<char>(0xE0 | (c >> 12));
    buf[1] = static_cast<char>(0x80 | ((c >> 6) & 0x3F));
    buf[2] = static_cast<char>(0x80 | (c & 0x3F));
    len = 3;
  } else {
    buf[0] = static_cast<char>(0xF0 | (c >> 18));
    buf[1] = static_cast<char>(0x80 | ((c >> 12) & 0x3F));
    buf[2] = static_cast<char>(0x80 | ((c >> 6) & 0x3F));
    buf[3] = static_cast<char>(0x80 | (c & 0x3F));
    len = 4;
  }
  out->append(buf, len);
}

void AppendUtf8(const char16_t* units, int32_t begin, int32_t end,
                std::string* out) {
  for (int32_t i = begin; i < end; ++i) {
    const char16_t u = units[i];
    if (u < 0x80) {
      out->push_back(static_cast<char>(u));
    } else if (u < 0xD800 || u > 0xDFFF) {
      AppendCodePoint(u, out);
    } else if (u <= 0xDBFF && i + 1 < end && units[i + 1] >= 0xDC00 &&
               units[i + 1] <= 0xDFFF) {
      AppendCodePoint(0x10000 + ((u - 0xD800) << 10) + (units[i + 1] - 0xDC00),
                      out);
      ++i;
    } else {
      AppendCodePoint(0xFFFD, out);
    }
  }
}

}  // namespace text_internal

bool IsAscii(std::string_view bytes) {
  const char* p = bytes.data();
  size_t n = bytes.size();
  uint64_t high = 0;
  // Eight bytes at a time; the OR of all words keeps any set high bit.
  while (n >= 32) {
    uint64_t w[4];
    std::memcpy(w, p, sizeof(w));
    high |= (w[0] | w[1] | w[2] | w[3]) & 0x8080808080808080ULL;
    if (high != 0) return false;
    p += 32, n -= 32;
  }
  while (n >= 8) {
    uint64_t w;
    std::memcpy(&w, p, 8);
    high |= w & 0x8080808080808080ULL;
    p += 8, n -= 8;
  }
  while (n > 0) {
    high |= static_cast<unsigned char>(*p++) & 0x80;
    --n;
  }
  return high == 0;
}

std::string RepairUtf8(std::string_view bytes, uint32_t* replaced) {
  std::string out;
  out.reserve(bytes.size());
  const auto* p = reinterpret_cast<const unsigned char*>(bytes.data());
  uint32_t count = 0;
  size_t i = 0;
  while (i < bytes.size()) {
    const text_internal::Sequence s =
        text_internal::ReadSequence(p + i, bytes.size() - i);
    if (s.complete) {
      out.append(bytes.data() + i, s.valid_length);
      i += s.valid_length;
    } else {
      out.append("\xEF\xBF\xBD");
      ++count;
      i += s.valid_length == 0 ? 1 : s.valid_length;
    }
  }
  if (replaced != nullptr) *replaced = count;
  return out;
}

}  // namespace kindred
