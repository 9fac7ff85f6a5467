// HTTP response heads and bodies inside WARC records.
#include "io/http_payload.h"

#include <brotli/decode.h>
#include <zlib.h>

#include <cstring>
#include <vector>

#include "absl/strings/ascii.h"
#include "absl/strings/match.h"
#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"
#include "kindred/errors.h"

namespace kindred::io {
namespace {

absl::Status TooLarge(uint64_t max_bytes) {
  return LimitExceeded(absl::StrCat("the decoded payload is larger than ", max_bytes, " bytes"));
}

// Inflates one zlib/gzip/raw deflate stream (`window_bits` as for
// inflateInit2) and any gzip members after it.
absl::Status Inflate(absl::string_view in, int window_bits, uint64_t max_bytes, std::string* out) {
  z_stream z;
  std::memset(&z, 0, sizeof(z));
  if (inflateInit2(&z, window_bits) != Z_OK) return absl::InternalError("zlib initialization");
  z.next_in = reinterpret_cast<Bytef*>(const_cast<char*>(in.data()));
  z.avail_in = static_cast<uInt>(in.size());
  out->clear();
  char chunk[64 << 10];
  absl::Status status;
  for (;;) {
    z.next_out = reinterpret_cast<Bytef*>(chunk);
    z.avail_out = sizeof(chunk);
    const int result = inflate(&z, Z_NO_FLUSH);
    out->append(chunk, sizeof(chunk) - z.avail_out);
    if (out->size() > max_bytes) {
      status = TooLarge(max_bytes);
      break;
    }
    if (result == Z_STREAM_END) {
      if (z.avail_in == 0 || window_bits < 0) break;
      inflateReset(&z);  // another gzip member
      continue;
    }
    if (result == Z_BUF_ERROR && z.avail_in == 0) break;  // cut short: keep what came out
    if (result != Z_OK) {
      status = absl::InvalidArgumentError(
          absl::StrCat("corrupt compressed body: ", z.msg != nullptr ? z.msg : zError(result)));
      break;
    }
  }
  inflateEnd(&z);
  return status;
}

absl::Status Unbrotli(absl::string_view in, uint64_t max_bytes, std::string* out) {
  BrotliDecoderState* state = BrotliDecoderCreateInstance(nullptr, nullptr, nullptr);
  if (state == nullptr) return absl::InternalError("brotli initialization");
  size_t available_in = in.size();
  const uint8_t* next_in = reinterpret_cast<const uint8_t*>(in.data());
  out->clear();
  uint8_t chunk[64 << 10];
  absl::Status status;
  for (;;) {
    size_t available_out = sizeof(chunk);
    uint8_t* next_out = chunk;
    const BrotliDecoderResult result = BrotliDecoderDecompressStream(
        state, &available_in, &next_in, &available_out, &next_out, nullptr);
    out->append(reinterpret_cast<char*>(chunk), sizeof(chunk) - available_out);
    if (out->size() > max_bytes) {
      status = TooLarge(max_bytes);
      break;
    }
    if (result == BROTLI_DECODER_RESULT_SUCCESS) break;
    if (result == BROTLI_DECODER_RESULT_NEEDS_MORE_INPUT) break;  // cut short
    if (result == BROTLI_DECODER_RESULT_ERROR) {
      status = absl::InvalidArgumentError(absl::StrCat(
          "corrupt brotli body: ", BrotliDecoderErrorString(BrotliDecoderGetErrorCode(state))));
      break;
    }
  }
  BrotliDecoderDestroyInstance(state);
  return status;
}

}  // namespace

void ParseContentType(absl::string_view value, std::string* media_type, std::string* charset) {
  charset->clear();
  media_type->clear();
  // A missing field is a null view, which StrSplit turns into no parts.
  std::vector<absl::string_view> parts = absl::StrSplit(value, ';');
  if (parts.empty()) return;
  *media_type = absl::AsciiStrToLower(absl::StripAsciiWhitespace(parts[0]));
  for (size_t i = 1; i < parts.size(); ++i) {
    absl::string_view param = absl::StripAsciiWhitespace(parts[i]);
    const size_t eq = param.find('=');
    if (eq == absl::string_view::npos) continue;
    if (!absl::EqualsIgnoreCase(absl::StripAsciiWhitespace(param.substr(0, eq)), "charset")) {
      continue;
    }
    absl::string_view v = absl::StripAsciiWhitespace(param.substr(eq + 1));
    if (v.size() >= 2 && (v.front() == '"' || v.front() == '\'') && v.back() == v.front()) {
      v = v.substr(1, v.size() - 2);
    }
    *charset = std::string(absl::StripAsciiWhitespace(v));
    return;
  }
}

absl::StatusOr<HttpHead> ParseHttpHead(absl::string_view block) {
  HttpHead head;
  size_t pos = 0;
  bool first = true;
  for (;;) {
    const size_t eol = block.find('\n', pos);
    if (eol == absl::string_view::npos) {
      return absl::InvalidArgumentError("the HTTP header does not end");
    }
    absl::string_view line = block.substr(pos, eol - pos);
    if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
    pos = eol + 1;
    if (first) {
      first = false;
      std::vector<absl::string_view> words = absl::StrSplit(line, absl::MaxSplits(' ', 2));
      if (words.size() < 2 || !absl::StartsWith(words[0], "HTTP/") ||
          !absl::SimpleAtoi(words[1], &head.status)) {
        return absl::InvalidArgumentError("no HTTP status line");
      }
      continue;
    }
    if (line.empty()) break;
    const size_t colon = line.find(':');
    if (colon == absl::string_view::npos) continue;  // tolerated, as browsers do
    absl::string_view name = absl::StripAsciiWhitespace(line.substr(0, colon));
    absl::string_view value = absl::StripAsciiWhitespace(line.substr(colon + 1));
    if (absl::EqualsIgnoreCase(name, "Content-Type")) {
      ParseContentType(value, &head.media_type, &head.charset);
    } else if (absl::EqualsIgnoreCase(name, "Transfer-Encoding")) {
      head.transfer_encoding = absl::AsciiStrToLower(value);
    } else if (absl::EqualsIgnoreCase(name, "Content-Encoding")) {
      head.content_encoding = absl::AsciiStrToLower(value);
    }
  }
  head.body_offset = pos;
  return head;
}

absl::Status Dechunk(absl::string_view body, uint64_t max_bytes, std::string* out) {
  out->clear();
  size_t pos = 0;
  while (pos < body.size()) {
    const size_t eol = body.find('\n', pos);
    if (eol == absl::string_view::npos) break;
    absl::string_view size_line = body.substr(pos, eol - pos);
    size_line = size_line.substr(0, size_line.find(';'));  // chunk extensions
    uint64_t size = 0;
    if (!absl::SimpleHexAtoi(absl::StripAsciiWhitespace(size_line), &size)) {
      return absl::InvalidArgumentError("malformed chunked body");
    }
    pos = eol + 1;
    if (size == 0) break;                                    // trailers follow
    if (size > body.size() - pos) size = body.size() - pos;  // cut short
    if (out->size() + size > max_bytes) return TooLarge(max_bytes);
    out->append(body.data() + pos, size);
    pos += size;
    if (pos < body.size() && body[pos] == '\r') ++pos;
    if (pos < body.size() && body[pos] == '\n') ++pos;
  }
  return absl::OkStatus();
}

absl::Status DecodeHttpBody(const HttpHead& head, absl::string_view body, uint64_t max_bytes,
                            std::string* out) {
  std::string current;
  if (absl::StrContains(head.transfer_encoding, "chunked")) {
    if (absl::Status s = Dechunk(body, max_bytes, &current); !s.ok()) return s;
  } else {
    if (body.size() > max_bytes) return TooLarge(max_bytes);
    current.assign(body.data(), body.size());
  }
  // Codings are listed in the order they were applied: undo the last first.
  std::vector<absl::string_view> codings = absl::StrSplit(head.content_encoding, ',');
  for (auto it = codings.rbegin(); it != codings.rend(); ++it) {
    absl::string_view coding = absl::StripAsciiWhitespace(*it);
    std::string next;
    absl::Status s;
    if (coding.empty() || coding == "identity") continue;
    if (coding == "gzip" || coding == "x-gzip") {
      s = Inflate(current, 15 + 32, max_bytes, &next);
    } else if (coding == "deflate") {
      // RFC 9110 says zlib-wrapped; some servers send raw deflate.
      const bool zlib_wrapped =
          current.size() >= 2 && (current[0] & 0x0f) == 8 &&
          ((static_cast<unsigned char>(current[0]) << 8) | static_cast<unsigned char>(current[1])) %
                  31 ==
              0;
      s = Inflate(current, zlib_wrapped ? 15 : -15, max_bytes, &next);
    } else if (coding == "br") {
      s = Unbrotli(current, max_bytes, &next);
    } else {
      return absl::InvalidArgumentError(absl::StrCat("unknown content coding \"", coding, "\""));
    }
    if (!s.ok()) return s;
    current.swap(next);
  }
  out->swap(current);
  return absl::OkStatus();
}

}  // namespace kindred::io
