// The facts of an open index as one JSON object: what `kindred info
// --format json` prints and GET /v1/info of `kindred serve` returns.
#ifndef KINDRED_SERVICE_INDEX_INFO_H_
#define KINDRED_SERVICE_INDEX_INFO_H_

#include <string>

#include "kindred/index.h"

namespace kindred::service {

// One line of JSON (with its newline): the file, its format and commit
// generation, its settings, its document counts and sizes, and its segments.
std::string IndexInfoJson(const IndexReader& reader);

}  // namespace kindred::service

#endif  // KINDRED_SERVICE_INDEX_INFO_H_
