// kindred (internal): a count with its noun, for summaries and messages.
// Every summary line that prints "<count> <noun>" goes through Counted, so
// that a count of one reads "1 document", never "1 documents".
#ifndef KINDRED_CORE_PLURAL_H_
#define KINDRED_CORE_PLURAL_H_

#include <cstdint>
#include <string>
#include <string_view>

namespace kindred {

// "1 document", "0 documents", "2 documents": the noun is `singular` for a
// count of exactly one, else `plural` (default: `singular` + "s").
std::string Counted(uint64_t count, std::string_view singular, std::string_view plural = {});

// "15 bands x 8 rows", "1 band x 128 rows".
std::string BandsByRows(uint64_t bands, uint64_t rows);

}  // namespace kindred

#endif  // KINDRED_CORE_PLURAL_H_
