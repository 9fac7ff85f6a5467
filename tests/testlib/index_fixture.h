// Test-only: small signed corpora for the index tests, made from generated
// text through the real shingler and signer, with planted near-duplicates.
#ifndef KINDRED_TESTS_TESTLIB_INDEX_FIXTURE_H_
#define KINDRED_TESTS_TESTLIB_INDEX_FIXTURE_H_

#include <cstdint>
#include <string>
#include <utility>
#include <vector>

#include "kindred/index.h"
#include "kindred/signed_corpus.h"

namespace kindred::testing {

// Index settings for tests: word 3-shingles, `perms` slots, `bands` x
// `rows` stored banding, threshold 0.5.
IndexSettings TestIndexSettings(uint32_t perms = 32, uint32_t bands = 16, uint32_t rows = 2);

// (id, text) documents: `count` texts of about `words` words drawn from a
// small vocabulary (seeded), where every third document is an edited copy
// of an earlier one (a few words replaced), so near-duplicates exist.
// Ids are prefix + number.
std::vector<std::pair<std::string, std::string>> MakeTexts(uint64_t seed, size_t count,
                                                           size_t words, const std::string& prefix);

// Shingles and signs `texts` under settings.signature; facts: length = text
// bytes, priority = document number (every other document has one).
SignedCorpus SignTexts(const std::vector<std::pair<std::string, std::string>>& texts,
                       const SignatureSettings& settings);

// Documents [begin, end) of `corpus` as a new corpus.
SignedCorpus Slice(const SignedCorpus& corpus, size_t begin, size_t end);

// Checks (with Catch2 REQUIREs) that live document `doc` of `reader` holds
// exactly document `i` of `corpus`: id, facts, signature, shingle set.
void RequireSameDocument(const IndexReader& reader, uint32_t doc, const SignedCorpus& corpus,
                         size_t i);

}  // namespace kindred::testing

#endif  // KINDRED_TESTS_TESTLIB_INDEX_FIXTURE_H_
