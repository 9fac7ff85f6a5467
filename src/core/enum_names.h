// Internal: the one error for a name that no value of an enum has.
#ifndef KINDRED_CORE_ENUM_NAMES_H_
#define KINDRED_CORE_ENUM_NAMES_H_

#include <string_view>

#include "absl/status/status.h"

namespace kindred {

// InvalidArgument: `<setting>: expected <expected>, not "<name>"`.
absl::Status UnknownName(std::string_view setting, std::string_view expected,
                         std::string_view name);

}  // namespace kindred

#endif  // KINDRED_CORE_ENUM_NAMES_H_
