// The names of the library's enums: every name parses back to its value,
// and an unknown name is an error that names the setting and the choices.
#include <catch2/catch.hpp>
#include <string>

#include "kindred/corpus.h"
#include "kindred/groups.h"
#include "kindred/index_writer.h"
#include "kindred/records.h"
#include "kindred/settings.h"

namespace kindred {
namespace {

template <typename Enum, typename Parse, typename Name>
void CheckRoundTrip(std::initializer_list<Enum> values, Parse parse, Name name) {
  for (Enum value : values) {
    INFO(name(value));
    auto parsed = parse(name(value));
    REQUIRE(parsed.ok());
    CHECK(*parsed == value);
  }
}

TEST_CASE("every enum name parses back to its value", "[names]") {
  CheckRoundTrip({ShingleMode::kWord, ShingleMode::kChar}, ParseShingleMode, ShingleModeName);
  CheckRoundTrip({SignerScheme::kOnePermutation, SignerScheme::kClassic}, ParseSignerScheme,
                 SignerSchemeName);
  CheckRoundTrip({Measure::kJaccard, Measure::kContainment}, ParseMeasure, MeasureName);
  CheckRoundTrip(
      {InputFormat::kAuto, InputFormat::kText, InputFormat::kJsonLines, InputFormat::kWarc},
      ParseInputFormat, InputFormatName);
  CheckRoundTrip({WarcIdSource::kUri, WarcIdSource::kRecordId}, ParseWarcIdSource,
                 WarcIdSourceName);
  CheckRoundTrip({KeepPolicy::kFirst, KeepPolicy::kLongest, KeepPolicy::kPriority},
                 ParseKeepPolicy, KeepPolicyName);
  CheckRoundTrip({Grouping::kComponents, Grouping::kKeepers}, ParseGrouping, GroupingName);
  CheckRoundTrip(
      {DuplicateIdPolicy::kError, DuplicateIdPolicy::kSkip, DuplicateIdPolicy::kReplace},
      ParseDuplicateIdPolicy, DuplicateIdPolicyName);
  CheckRoundTrip({RecordFormat::kJsonLines, RecordFormat::kTsv, RecordFormat::kCsv},
                 ParseRecordFormat, RecordFormatSuffix);
}

TEST_CASE("the names written in files and options are fixed", "[names]") {
  CHECK(std::string(ShingleModeName(ShingleMode::kChar)) == "char");
  CHECK(std::string(SignerSchemeName(SignerScheme::kOnePermutation)) == "oph");
  CHECK(std::string(InputFormatName(InputFormat::kJsonLines)) == "jsonl");
  CHECK(std::string(WarcIdSourceName(WarcIdSource::kRecordId)) == "record-id");
}

TEST_CASE("an unknown name names the setting, the choices and the name given", "[names]") {
  CHECK(ParseShingleMode("words").status().message() ==
        "shingle: expected word or char, not \"words\"");
  CHECK(ParseSignerScheme("").status().message() == "signer: expected oph or classic, not \"\"");
  CHECK(ParseMeasure("Jaccard").status().message() ==
        "measure: expected jaccard or containment, not \"Jaccard\"");
  CHECK(ParseInputFormat("json").status().message() ==
        "input-format: expected auto, text, jsonl or warc, not \"json\"");
  CHECK(ParseWarcIdSource("id").status().message() ==
        "warc-id: expected uri or record-id, not \"id\"");
  for (const absl::Status& status :
       {ParseShingleMode("x").status(), ParseSignerScheme("x").status(),
        ParseMeasure("x").status(), ParseInputFormat("x").status(),
        ParseWarcIdSource("x").status()}) {
    CHECK(absl::IsInvalidArgument(status));
  }
}

}  // namespace
}  // namespace kindred
