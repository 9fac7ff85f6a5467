// The JSON replies of the service, each one object followed by a line
// break, written with the library's RecordWriter (kindred/records.h), so
// that strings are escaped and similarities printed as in every other
// output. Field names and order are those README.md lists ("kindred
// serve").
//
// Thread-safety: plain functions; a writer is used by one thread.
#ifndef KINDRED_SERVICE_SERVICE_REPLIES_H_
#define KINDRED_SERVICE_SERVICE_REPLIES_H_

#include <cstdint>
#include <string>
#include <string_view>

#include "absl/status/status.h"
#include "absl/types/span.h"
#include "kindred/index.h"
#include "kindred/index_match.h"
#include "kindred/records.h"
#include "kindred/signed_corpus.h"
#include "service/group_commit.h"
#include "service/service_request.h"

namespace kindred::service {

// The top-level fields of a check reply and of an add reply, in order; the
// first is "matches".
std::vector<std::string> CheckReplyColumns();
std::vector<std::string> AddReplyColumns();

// The "matches" field into `reply`: one match record per match (the
// fields of `kindred check`'s records, kindred/index_match.h), each with
// "marked_spans" when the request asks for them (the byte spans of the
// upload whose shingles the matched document holds). Errors: reading a
// stored set (IndexDamaged), shingling the upload again.
absl::Status WriteMatchList(absl::Span<const IndexMatch> matches, const ServiceRequest& request,
                            const IndexReader& reader, const SignedCorpus& batch,
                            const MatchSettings& match, RecordWriter* reply);

// The "documents" field of an add reply into `reply` (id, action, number
// per document) and then the counts "added", "replaced", "skipped".
void WriteAddedDocuments(const SignedCorpus& batch, const CommitOutcome& outcome,
                         RecordWriter* reply);

// {"error": message, "kind": kind}
std::string ErrorReply(std::string_view message, std::string_view kind);
// {"status": "ok", "live": N, "allow_add": B}
std::string HealthReply(uint32_t live, bool allow_add);

}  // namespace kindred::service

#endif  // KINDRED_SERVICE_SERVICE_REPLIES_H_
