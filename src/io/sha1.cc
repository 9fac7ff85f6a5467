// SHA-1 as specified in FIPS 180-4 section 6.1, and base32 of RFC 4648.
#include "io/sha1.h"

#include <cstring>

#include "absl/strings/str_cat.h"

namespace kindred::io {
namespace {
inline uint32_t Rotl(uint32_t x, int n) { return (x << n) | (x >> (32 - n)); }
}  // namespace

Sha1::Sha1() : h_{0x67452301u, 0xEFCDAB89u, 0x98BADCFEu, 0x10325476u, 0xC3D2E1F0u} {}

void Sha1::Block(const uint8_t* block) {
  uint32_t w[80];
  for (int t = 0; t < 16; ++t) {
    w[t] = (uint32_t{block[4 * t]} << 24) | (uint32_t{block[4 * t + 1]} << 16) |
           (uint32_t{block[4 * t + 2]} << 8) | uint32_t{block[4 * t + 3]};
  }
  for (int t = 16; t < 80; ++t) w[t] = Rotl(w[t - 3] ^ w[t - 8] ^ w[t - 14] ^ w[t - 16], 1);
  uint32_t a = h_[0], b = h_[1], c = h_[2], d = h_[3], e = h_[4];
  for (int t = 0; t < 80; ++t) {
    uint32_t f, k;
    if (t < 20) {
      f = (b & c) | (~b & d), k = 0x5A827999u;
    } else if (t < 40) {
      f = b ^ c ^ d, k = 0x6ED9EBA1u;
    } else if (t < 60) {
      f = (b & c) | (b & d) | (c & d), k = 0x8F1BBCDCu;
    } else {
      f = b ^ c ^ d, k = 0xCA62C1D6u;
    }
    const uint32_t temp = Rotl(a, 5) + f + e + k + w[t];
    e = d, d = c, c = Rotl(b, 30), b = a, a = temp;
  }
  h_[0] += a, h_[1] += b, h_[2] += c, h_[3] += d, h_[4] += e;
}

void Sha1::Update(absl::string_view bytes) {
  const uint8_t* p = reinterpret_cast<const uint8_t*>(bytes.data());
  size_t n = bytes.size();
  total_ += n;
  if (pending_size_ > 0) {
    const size_t take = std::min(n, 64 - pending_size_);
    std::memcpy(pending_ + pending_size_, p, take);
    pending_size_ += take, p += take, n -= take;
    if (pending_size_ < 64) return;
    Block(pending_);
    pending_size_ = 0;
  }
  for (; n >= 64; p += 64, n -= 64) Block(p);
  std::memcpy(pending_, p, n);
  pending_size_ = n;
}

std::array<uint8_t, 20> Sha1::Finish() {
  const uint64_t bits = total_ * 8;
  const uint8_t one = 0x80, zero = 0;
  Update(absl::string_view(reinterpret_cast<const char*>(&one), 1));
  while (pending_size_ != 56) Update(absl::string_view(reinterpret_cast<const char*>(&zero), 1));
  uint8_t length[8];
  for (int i = 0; i < 8; ++i) length[i] = static_cast<uint8_t>(bits >> (56 - 8 * i));
  Update(absl::string_view(reinterpret_cast<const char*>(length), 8));
  std::array<uint8_t, 20> digest;
  for (int i = 0; i < 20; ++i) digest[i] = static_cast<uint8_t>(h_[i / 4] >> (24 - 8 * (i % 4)));
  return digest;
}

std::string Base32(const uint8_t* bytes, size_t size) {
  static constexpr char kAlphabet[] = "ABCDEFGHIJKLMNOPQRSTUVWXYZ234567";
  std::string out;
  uint64_t buffer = 0;
  int bits = 0;
  for (size_t i = 0; i < size; ++i) {
    buffer = (buffer << 8) | bytes[i];
    bits += 8;
    while (bits >= 5) {
      out += kAlphabet[(buffer >> (bits - 5)) & 31];
      bits -= 5;
    }
  }
  if (bits > 0) out += kAlphabet[(buffer << (5 - bits)) & 31];
  while (out.size() % 8 != 0) out += '=';
  return out;
}

std::string Sha1Digest(absl::string_view bytes) {
  Sha1 sha;
  sha.Update(bytes);
  const std::array<uint8_t, 20> digest = sha.Finish();
  return absl::StrCat("sha1:", Base32(digest.data(), digest.size()));
}

}  // namespace kindred::io
