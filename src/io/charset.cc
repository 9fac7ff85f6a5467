// Encoding choice and conversion to UTF-8 of crawled payloads.
#include "io/charset.h"

#include <unicode/ucnv.h>
#include <unicode/ucnv_cb.h>
#include <unicode/ucnv_err.h>
#include <unicode/unistr.h>

#include <vector>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/ascii.h"
#include "absl/strings/match.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"
#include "simdjson.h"
#include "text/utf8.h"

namespace kindred::io {
namespace {

// The WHATWG Encoding Standard's labels (section 4.2, "Names and labels"),
// with the ICU converter used for each encoding. Written from the
// standard's table; the ICU names are ICU's own aliases.
struct Encoding {
  const char* name;
  const char* icu;
  const char* labels;  // space-separated
};
constexpr Encoding kEncodings[] = {
    {"UTF-8", "UTF-8", "unicode-1-1-utf-8 unicode11utf8 unicode20utf8 utf-8 utf8 x-unicode20utf8"},
    {"IBM866", "ibm-866", "866 cp866 csibm866 ibm866"},
    {"ISO-8859-2", "ISO-8859-2",
     "csisolatin2 iso-8859-2 iso-ir-101 iso8859-2 iso88592 iso_8859-2 iso_8859-2:1987 l2 latin2"},
    {"ISO-8859-3", "ISO-8859-3",
     "csisolatin3 iso-8859-3 iso-ir-109 iso8859-3 iso88593 iso_8859-3 iso_8859-3:1988 l3 latin3"},
    {"ISO-8859-4", "ISO-8859-4",
     "csisolatin4 iso-8859-4 iso-ir-110 iso8859-4 iso88594 iso_8859-4 iso_8859-4:1988 l4 latin4"},
    {"ISO-8859-5", "ISO-8859-5",
     "csisolatincyrillic cyrillic iso-8859-5 iso-ir-144 iso8859-5 iso88595 iso_8859-5 "
     "iso_8859-5:1988"},
    {"ISO-8859-6", "ISO-8859-6",
     "arabic asmo-708 csiso88596e csiso88596i csisolatinarabic ecma-114 iso-8859-6 iso-8859-6-e "
     "iso-8859-6-i iso-ir-127 iso8859-6 iso88596 iso_8859-6 iso_8859-6:1987"},
    {"ISO-8859-7", "ISO-8859-7",
     "csisolatingreek ecma-118 elot_928 greek greek8 iso-8859-7 iso-ir-126 iso8859-7 iso88597 "
     "iso_8859-7 iso_8859-7:1987 sun_eu_greek"},
    {"ISO-8859-8", "ISO-8859-8",
     "csiso88598e csisolatinhebrew hebrew iso-8859-8 iso-8859-8-e iso-ir-138 iso8859-8 iso88598 "
     "iso_8859-8 iso_8859-8:1988 visual"},
    {"ISO-8859-8-I", "ISO-8859-8", "csiso88598i iso-8859-8-i logical"},
    {"ISO-8859-10", "iso-8859_10-1998",
     "csisolatin6 iso-8859-10 iso-ir-157 iso8859-10 iso885910 l6 latin6"},
    {"ISO-8859-13", "ISO-8859-13", "iso-8859-13 iso8859-13 iso885913"},
    {"ISO-8859-14", "iso-8859_14-1998", "iso-8859-14 iso8859-14 iso885914"},
    {"ISO-8859-15", "ISO-8859-15", "csisolatin9 iso-8859-15 iso8859-15 iso885915 iso_8859-15 l9"},
    {"ISO-8859-16", "iso-8859_16-2001", "iso-8859-16"},
    {"KOI8-R", "KOI8-R", "cskoi8r koi koi8 koi8-r koi8_r"},
    {"KOI8-U", "KOI8-U", "koi8-ru koi8-u"},
    {"macintosh", "macos-0_2-10.2", "csmacintosh mac macintosh x-mac-roman"},
    {"windows-874", "windows-874", "dos-874 iso-8859-11 iso8859-11 iso885911 tis-620 windows-874"},
    {"windows-1250", "windows-1250", "cp1250 windows-1250 x-cp1250"},
    {"windows-1251", "windows-1251", "cp1251 windows-1251 x-cp1251"},
    {"windows-1252", "windows-1252",
     "ansi_x3.4-1968 ascii cp1252 cp819 csisolatin1 ibm819 iso-8859-1 iso-ir-100 iso8859-1 "
     "iso88591 iso_8859-1 iso_8859-1:1987 l1 latin1 us-ascii windows-1252 x-cp1252"},
    {"windows-1253", "windows-1253", "cp1253 windows-1253 x-cp1253"},
    {"windows-1254", "windows-1254",
     "cp1254 csisolatin5 iso-8859-9 iso-ir-148 iso8859-9 iso88599 iso_8859-9 iso_8859-9:1989 l5 "
     "latin5 windows-1254 x-cp1254"},
    {"windows-1255", "windows-1255", "cp1255 windows-1255 x-cp1255"},
    {"windows-1256", "windows-1256", "cp1256 windows-1256 x-cp1256"},
    {"windows-1257", "windows-1257", "cp1257 windows-1257 x-cp1257"},
    {"windows-1258", "windows-1258", "cp1258 windows-1258 x-cp1258"},
    {"x-mac-cyrillic", "x-mac-cyrillic", "x-mac-cyrillic x-mac-ukrainian"},
    {"GBK", "windows-936",
     "chinese csgb2312 csiso58gb231280 gb2312 gb_2312 gb_2312-80 gbk iso-ir-58 x-gbk"},
    {"gb18030", "gb18030", "gb18030"},
    {"Big5", "Big5-HKSCS", "big5 big5-hkscs cn-big5 csbig5 x-x-big5"},
    {"EUC-JP", "EUC-JP", "cseucpkdfmtjapanese euc-jp x-euc-jp"},
    {"ISO-2022-JP", "ISO_2022,locale=ja,version=0", "csiso2022jp iso-2022-jp"},
    {"Shift_JIS", "windows-31j",
     "csshiftjis ms932 ms_kanji shift-jis shift_jis sjis windows-31j x-sjis"},
    {"EUC-KR", "windows-949",
     "cseuckr csksc56011987 euc-kr iso-ir-149 korean ks_c_5601-1987 ks_c_5601-1989 ksc5601 "
     "ksc_5601 windows-949"},
    {"replacement", "",
     "csiso2022kr hz-gb-2312 iso-2022-cn iso-2022-cn-ext iso-2022-kr replacement"},
    {"UTF-16BE", "UTF-16BE", "unicodefffe utf-16be"},
    {"UTF-16LE", "UTF-16LE", "csunicode iso-10646-ucs-2 ucs-2 unicode unicodefeff utf-16 utf-16le"},
    {"x-user-defined", "", "x-user-defined"},
};

const absl::flat_hash_map<std::string, const Encoding*>& LabelTable() {
  static const auto* table = [] {
    auto* map = new absl::flat_hash_map<std::string, const Encoding*>();
    for (const Encoding& encoding : kEncodings) {
      for (absl::string_view label : absl::StrSplit(encoding.labels, ' ')) {
        (*map)[std::string(label)] = &encoding;
      }
    }
    return map;
  }();
  return *table;
}

const Encoding* Find(absl::string_view name) {
  for (const Encoding& encoding : kEncodings) {
    if (name == encoding.name) return &encoding;
  }
  return nullptr;
}

// ICU calls this for every byte sequence that does not convert: write one
// U+FFFD (whatever the converter's own substitution would be) and count.
void CountingCallback(const void* context, UConverterToUnicodeArgs* args, const char*, int32_t,
                      UConverterCallbackReason reason, UErrorCode* error) {
  if (reason > UCNV_IRREGULAR) return;  // reset, close, clone
  ++*static_cast<uint32_t*>(const_cast<void*>(context));
  *error = U_ZERO_ERROR;
  const UChar replacement = 0xFFFD;
  ucnv_cbToUWriteUChars(args, &replacement, 1, 0, error);
}

void ToUtf8(const icu::UnicodeString& text, std::string* out) {
  out->clear();
  text.toUTF8String(*out);
}

}  // namespace

std::string EncodingForLabel(absl::string_view label) {
  const std::string key = absl::AsciiStrToLower(absl::StripAsciiWhitespace(label));
  auto it = LabelTable().find(key);
  return it == LabelTable().end() ? std::string() : std::string(it->second->name);
}

std::string ChooseEncoding(absl::string_view declared, absl::string_view bytes, bool html,
                           size_t* bom_bytes) {
  *bom_bytes = 0;
  if (std::string encoding = EncodingForLabel(declared); !encoding.empty()) return encoding;
  if (absl::StartsWith(bytes, "\xEF\xBB\xBF")) {
    *bom_bytes = 3;
    return "UTF-8";
  }
  if (absl::StartsWith(bytes, "\xFE\xFF")) {
    *bom_bytes = 2;
    return "UTF-16BE";
  }
  if (absl::StartsWith(bytes, "\xFF\xFE")) {
    *bom_bytes = 2;
    return "UTF-16LE";
  }
  if (html) {
    if (std::string encoding = PrescanMeta(bytes); !encoding.empty()) return encoding;
  }
  return "UTF-8";
}

absl::Status ConvertToUtf8(absl::string_view encoding, absl::string_view bytes, std::string* out,
                           uint32_t* replaced) {
  *replaced = 0;
  if (encoding == "UTF-8" || encoding.empty()) {
    if (simdjson::validate_utf8(bytes.data(), bytes.size())) {
      out->assign(bytes.data(), bytes.size());
      return absl::OkStatus();
    }
    icu::UnicodeString text;
    *replaced = text_internal::DecodeUtf8(std::string_view(bytes.data(), bytes.size()), &text);
    ToUtf8(text, out);
    return absl::OkStatus();
  }
  if (encoding == "replacement") {  // the whole payload is one U+FFFD
    *replaced = bytes.empty() ? 0 : 1;
    *out = bytes.empty() ? "" : "\xEF\xBF\xBD";
    return absl::OkStatus();
  }
  if (encoding == "x-user-defined") {  // ASCII, and 0x80..0xFF to U+F780..U+F7FF
    out->clear();
    for (unsigned char c : bytes) {
      if (c < 0x80) {
        out->push_back(static_cast<char>(c));
      } else {
        text_internal::AppendCodePoint(0xF780 + (c - 0x80), out);
      }
    }
    return absl::OkStatus();
  }
  const Encoding* known = Find(encoding);
  if (known == nullptr || known->icu[0] == '\0') {
    return absl::InvalidArgumentError(absl::StrCat("no converter for encoding ", encoding));
  }
  UErrorCode error = U_ZERO_ERROR;
  UConverter* converter = ucnv_open(known->icu, &error);
  if (U_FAILURE(error)) {
    return absl::InternalError(absl::StrCat("ICU has no converter \"", known->icu, "\""));
  }
  ucnv_setToUCallBack(converter, CountingCallback, replaced, nullptr, nullptr, &error);
  icu::UnicodeString text;
  const int32_t capacity =
      static_cast<int32_t>(std::min<size_t>(bytes.size() * 2 + 16, static_cast<size_t>(INT32_MAX)));
  UChar* buffer = text.getBuffer(capacity);
  int32_t length = ucnv_toUChars(converter, buffer, capacity, bytes.data(),
                                 static_cast<int32_t>(bytes.size()), &error);
  text.releaseBuffer(U_SUCCESS(error) ? length : 0);
  ucnv_close(converter);
  if (U_FAILURE(error)) {
    return absl::InternalError(
        absl::StrCat("conversion from ", encoding, " failed: ", u_errorName(error)));
  }
  ToUtf8(text, out);
  return absl::OkStatus();
}

}  // namespace kindred::io
