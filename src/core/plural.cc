#include "core/plural.h"

#include "absl/strings/str_cat.h"

namespace kindred {

std::string Counted(uint64_t count, std::string_view singular, std::string_view plural) {
  std::string out = absl::StrCat(count, " ");
  if (count == 1) {
    out.append(singular);
  } else if (plural.empty()) {
    out.append(singular);
    out.push_back('s');
  } else {
    out.append(plural);
  }
  return out;
}

std::string BandsByRows(uint64_t bands, uint64_t rows) {
  return absl::StrCat(Counted(bands, "band"), " x ", Counted(rows, "row"));
}

}  // namespace kindred
