// Internal: the character encoding of a crawled payload and its conversion
// to UTF-8.
//
// The encoding is chosen in this order: the charset of the HTTP (or WARC)
// Content-Type, a byte-order mark, for HTML a <meta charset> or
// <meta http-equiv="Content-Type" content="...charset=..."> in the first
// 1,024 bytes (the WHATWG "prescan" of the HTML standard, section 13.2.3.2),
// else UTF-8. A label is resolved by the WHATWG Encoding Standard's table
// of labels (written here from that table; labels it does not list are
// ignored, as the standard says). Conversion uses ICU converters (ucnv);
// every byte sequence that does not convert becomes one U+FFFD and is
// counted.
//
// Thread-safety: plain functions; each call opens its own converter.
#ifndef KINDRED_IO_CHARSET_H_
#define KINDRED_IO_CHARSET_H_

#include <cstdint>
#include <string>

#include "absl/status/status.h"
#include "absl/strings/string_view.h"

namespace kindred::io {

// The WHATWG encoding name for `label` (trimmed, case-insensitive), e.g.
// "latin1" -> "windows-1252"; "" for a label the standard does not list.
std::string EncodingForLabel(absl::string_view label);

// The encoding of `bytes`, by the order above. `declared` is the
// Content-Type's charset parameter ("" if none). *bom_bytes receives the
// length of a byte-order mark to skip (0 if none or if `declared` won).
std::string ChooseEncoding(absl::string_view declared, absl::string_view bytes, bool html,
                           size_t* bom_bytes);

// The encoding named in a <meta> element within the first 1,024 bytes of
// `bytes`, or "".
std::string PrescanMeta(absl::string_view bytes);

// Converts `bytes` from WHATWG encoding `encoding` to UTF-8 in *out.
// *replaced receives the number of U+FFFD substituted. UTF-8 input is
// copied with ill-formed sequences replaced and counted too.
absl::Status ConvertToUtf8(absl::string_view encoding, absl::string_view bytes, std::string* out,
                           uint32_t* replaced);

}  // namespace kindred::io

#endif  // KINDRED_IO_CHARSET_H_
