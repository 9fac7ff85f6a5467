// kindred: the second reading of a lean sweep.
//
// A lean SignedCorpus (see signed_corpus.h) keeps band keys only. Once the
// candidate pairs are known, ReloadShingles reads the corpus again, skipping
// every document that is in no candidate pair without parsing it, and
// attaches the shingle sets and signatures of the others, so that they can
// be verified exactly. Each document read again is checked against what
// signing recorded (its id and its band keys): a file changed between the
// two readings is an error, never a silent mix of two versions.
//
// Thread-safety: a plain function; uses `threads` worker threads inside.
#ifndef KINDRED_CORE_RELOAD_H_
#define KINDRED_CORE_RELOAD_H_

#include <cstdint>
#include <vector>

#include "absl/status/status.h"
#include "absl/types/span.h"
#include "kindred/corpus.h"
#include "kindred/settings.h"
#include "kindred/signed_corpus.h"

namespace kindred {

// Attaches to `corpus` the sets and signatures of documents `docs`
// (ascending, no repeats). `inputs` and `options` are those of the reader
// that signed `corpus` (CorpusReader::ResolvedInputs() after the end, and
// options()), `settings` the settings it was signed with; document indices
// of `corpus` are that reader's ordinals. Requires corpus->lean().
// Errors: the reader's (a file gone or unreadable now), InvalidArgument
// naming the document when it changed since the first reading.
absl::Status ReloadShingles(const std::vector<ResolvedInput>& inputs, const InputOptions& options,
                            const SignatureSettings& settings, absl::Span<const uint32_t> docs,
                            int threads, SignedCorpus* corpus);

}  // namespace kindred

#endif  // KINDRED_CORE_RELOAD_H_
