#include "service/service_request.h"

#include <simdjson.h>

#include "absl/strings/str_cat.h"
#include "kindred/errors.h"
#include "kindred/text.h"

namespace kindred::service {
namespace {

using simdjson::dom::element;
using simdjson::dom::element_type;

absl::Status Malformed(std::string_view what) {
  return BadInput(what);
}

absl::StatusOr<std::string> IdOf(element value, size_t index) {
  switch (value.type()) {
    case element_type::STRING:
      return std::string(value.get_string().value_unsafe());
    case element_type::INT64:
      return absl::StrCat(value.get_int64().value_unsafe());
    case element_type::UINT64:
      return absl::StrCat(value.get_uint64().value_unsafe());
    default:
      return Malformed(absl::StrCat("documents[", index, "].id: expected a string or an integer"));
  }
}

absl::Status ReadDocuments(element list, const RequestLimits& limits, ServiceRequest* out) {
  simdjson::dom::array array;
  if (list.get_array().get(array) != simdjson::SUCCESS) {
    return Malformed("\"documents\": expected an array");
  }
  if (array.size() > limits.max_documents) {
    return LimitExceeded(absl::StrCat(
        array.size(), " documents in one request: the limit is ", limits.max_documents));
  }
  size_t index = 0;
  for (element item : array) {
    if (!item.is_object()) {
      return Malformed(absl::StrCat("documents[", index, "]: expected an object"));
    }
    element id, text;
    if (item["id"].get(id) != simdjson::SUCCESS) {
      return Malformed(absl::StrCat("documents[", index, "]: missing field \"id\""));
    }
    if (item["text"].get(text) != simdjson::SUCCESS) {
      return Malformed(absl::StrCat("documents[", index, "]: missing field \"text\""));
    }
    auto id_text = IdOf(id, index);
    if (!id_text.ok()) return id_text.status();
    std::string_view body;
    if (text.get_string().get(body) != simdjson::SUCCESS) {
      return Malformed(absl::StrCat("documents[", index, "].text: expected a string"));
    }
    if (body.size() > limits.max_document_bytes) {
      return LimitExceeded(absl::StrCat("document \"", *id_text, "\" has ",
                                                       body.size(), " bytes: the limit is ",
                                                       limits.max_document_bytes));
    }
    out->documents.push_back(TextDocument{std::move(*id_text), std::string(body)});
    ++index;
  }
  return absl::OkStatus();
}

absl::Status ReadOptions(simdjson::dom::object object, ServiceRequest* out) {
  for (auto [std_key, value] : object) {
    const absl::string_view key(std_key.data(), std_key.size());
    if (key == "documents") continue;
    if (key == "threshold") {
      double threshold;
      if (value.get_double().get(threshold) != simdjson::SUCCESS) {
        return Malformed("\"threshold\": expected a number");
      }
      out->query.threshold = threshold;
    } else if (key == "measure" || key == "on_duplicate") {
      std::string_view name;
      if (value.get_string().get(name) != simdjson::SUCCESS) {
        return Malformed(absl::StrCat("\"", key, "\": expected a string"));
      }
      if (key == "measure") {
        auto measure = ParseMeasure(name);
        if (!measure.ok()) return measure.status();
        out->query.measure = *measure;
      } else {
        auto policy = ParseDuplicateIdPolicy(name);
        if (!policy.ok())
          return Malformed(absl::StrCat("on_duplicate: ", policy.status().message()));
        out->on_duplicate = *policy;
      }
    } else if (key == "max_bucket") {
      uint64_t max_bucket;
      if (value.get_uint64().get(max_bucket) != simdjson::SUCCESS || max_bucket == 1) {
        return Malformed("\"max_bucket\": expected 0 (no cap) or an integer of at least 2");
      }
      out->max_bucket = max_bucket;
    } else if (key == "marked_spans") {
      bool marked;
      if (value.get_bool().get(marked) != simdjson::SUCCESS) {
        return Malformed("\"marked_spans\": expected true or false");
      }
      out->marked_spans = marked;
    } else {
      return Malformed(absl::StrCat("unknown field \"", key, "\""));
    }
  }
  return absl::OkStatus();
}

}  // namespace

absl::StatusOr<ServiceRequest> ParseJsonRequest(std::string_view body,
                                                const RequestLimits& limits) {
  // Ill-formed UTF-8 is repaired (U+FFFD), as in files; the check first,
  // at SIMD speed, spares the copy through the repair for valid bodies.
  const simdjson::padded_string padded = simdjson::validate_utf8(body.data(), body.size())
                                             ? simdjson::padded_string(body)
                                             : simdjson::padded_string(RepairUtf8(body));
  simdjson::dom::parser parser;
  if (parser.allocate(padded.size(), limits.max_depth) != simdjson::SUCCESS) {
    return LimitExceeded("cannot allocate the JSON parser");
  }
  element root;
  if (auto error = parser.parse(padded).get(root); error != simdjson::SUCCESS) {
    if (error == simdjson::DEPTH_ERROR) {
      return Malformed(
          absl::StrCat("malformed JSON: nested deeper than ", limits.max_depth, " levels"));
    }
    return Malformed(absl::StrCat("malformed JSON: ", simdjson::error_message(error)));
  }
  simdjson::dom::object object;
  if (root.get_object().get(object) != simdjson::SUCCESS) {
    return Malformed("the body must be a JSON object with a field \"documents\"");
  }
  element documents;
  if (object["documents"].get(documents) != simdjson::SUCCESS) {
    return Malformed("missing field \"documents\"");
  }
  ServiceRequest request;
  if (absl::Status status = ReadOptions(object, &request); !status.ok()) return status;
  if (absl::Status status = ReadDocuments(documents, limits, &request); !status.ok()) {
    return status;
  }
  return request;
}

absl::StatusOr<ServiceRequest> TextRequest(std::string_view body, std::string id,
                                           const RequestLimits& limits) {
  if (body.size() > limits.max_document_bytes) {
    return LimitExceeded(absl::StrCat(
        "document of ", body.size(), " bytes: the limit is ", limits.max_document_bytes));
  }
  ServiceRequest request;
  request.documents.push_back(TextDocument{std::move(id), std::string(body)});
  return request;
}

}  // namespace kindred::service
