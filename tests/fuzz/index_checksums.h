// Recomputes the checksums of an index file's bytes, following the layout of
// src/index/FORMAT.md (format versions 1 and 2), so that mutated bytes reach the
// reader's structural checks instead of stopping at a checksum mismatch.
//
// Pure function over a buffer; thread-safe.
#ifndef KINDRED_TESTS_FUZZ_INDEX_CHECKSUMS_H_
#define KINDRED_TESTS_FUZZ_INDEX_CHECKSUMS_H_

#include <string>

namespace kindred::fuzz {

// Rewrites in place every checksum field of `file` that the layout lets it
// find: the file header's, the commit slots' (version 2), then segment by segment each document's
// shingle checksum, the segment header's, the tables checksum and the commit record's. Stops at the
// first structure whose sizes do not fit the file. Other bytes are left as they are.
void FixIndexChecksums(std::string* file);

}  // namespace kindred::fuzz

#endif  // KINDRED_TESTS_FUZZ_INDEX_CHECKSUMS_H_
