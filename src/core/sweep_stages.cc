// The stages of a sweep over records (declared in sweep_stages.h).
#include "kindred/sweep_stages.h"

#include <algorithm>
#include <utility>

#include "absl/strings/str_cat.h"
#include "core/verify_pairs.h"
#include "kindred/errors.h"
#include "kindred/shingles.h"
#include "kindred/signer.h"

namespace kindred {
namespace {

// Signs the whole shard: into a corpus that keeps every set and signature
// with options.keep_sets, otherwise into a lean one (band keys of `banding`).
absl::StatusOr<SignedCorpus> SignWhole(CorpusReader& reader, const SignatureSettings& settings,
                                       Banding banding, const ShardOptions& options,
                                       SignStats* stats) {
  if (absl::Status status = settings.Validate(); !status.ok()) return status;
  SignedCorpus corpus = options.keep_sets ? SignedCorpus(settings.perms)
                                          : SignedCorpus::Lean(settings.perms, banding);
  SignOptions sign = options.sign;
  sign.flush = nullptr;
  if (absl::Status status = SignCorpus(reader, settings, sign, &corpus, stats); !status.ok()) {
    return status;
  }
  if (corpus.size() > uint64_t{UINT32_MAX} + 1 - options.first_document) {
    return LimitExceeded("a shard's documents are numbered beyond 2^32");
  }
  return corpus;
}

// Whether document `doc`, read again, is the one of row `row` of the table
// signing made.
bool SameDocument(const Document& doc, bool empty, const DocumentRecord& row) {
  return doc.id == row.id && doc.text.size() == row.facts.length &&
         doc.source.line == row.origin.line && doc.source.offset == row.origin.offset &&
         empty == (row.shingle_count == 0);
}

// The document's place for a message: "path:line", or the path.
std::string Where(const Document& doc) {
  return doc.source.line > 0 ? absl::StrCat(doc.source.path, ":", doc.source.line)
                             : doc.source.path;
}

// The pairs of one bucket (documents ascending) into *pairs, and its counts.
void PairBucket(absl::Span<const BandKeyRecord> bucket, uint64_t max_bucket,
                std::vector<PackedPair>* pairs, CandidateStats* stats) {
  stats->bucket_entries += bucket.size();
  stats->largest_bucket = std::max<uint64_t>(stats->largest_bucket, bucket.size());
  if (bucket.size() > max_bucket) {
    ++stats->oversized_buckets;
    for (size_t y = 1; y < bucket.size(); ++y) {
      pairs->push_back(PackPair(bucket[0].document, bucket[y].document));
    }
    return;
  }
  for (size_t x = 0; x < bucket.size(); ++x) {
    for (size_t y = x + 1; y < bucket.size(); ++y) {
      pairs->push_back(PackPair(bucket[x].document, bucket[y].document));
    }
  }
}

}  // namespace

absl::StatusOr<SignedShard> SignShard(CorpusReader& reader, const SignatureSettings& settings,
                                      Banding banding, const ShardOptions& options) {
  if (banding.bands == 0 || banding.rows == 0 || banding.slots() > settings.perms) {
    return InvalidRequest(absl::StrCat("banding ", banding.bands, "x", banding.rows,
                                       " does not fit signatures of ", settings.perms, " slots"));
  }
  SignedShard shard;
  absl::StatusOr<SignedCorpus> corpus = SignWhole(reader, settings, banding, options, &shard.stats);
  if (!corpus.ok()) return corpus.status();
  const size_t count = corpus->size();
  shard.documents.first_document = options.first_document;
  shard.documents.documents.resize(count);
  shard.sets = SetStore(settings.perms);
  std::vector<uint8_t> present(count);
  for (size_t doc = 0; doc < count; ++doc) {
    DocumentRecord& record = shard.documents.documents[doc];
    record.id = corpus->id(doc);
    record.facts = corpus->facts(doc);
    record.origin = corpus->origin(doc);
    record.origin.input += options.first_input;
    record.shingle_count = corpus->shingle_count(doc);
    present[doc] = record.shingle_count != 0;
    if (options.keep_sets) {
      shard.sets.Add(options.first_document + static_cast<uint32_t>(doc), corpus->shingles(doc),
                     corpus->signature(doc));
    }
  }
  // The keys band by band: a lean corpus holds them so; a full one's are
  // computed from the signatures.
  std::vector<uint64_t> computed;
  if (options.keep_sets) {
    computed.assign(size_t{banding.bands} * count, kNoBandKey);
    std::vector<uint64_t> keys(banding.bands);
    for (size_t doc = 0; doc < count; ++doc) {
      if (!present[doc]) continue;
      BandKeys(corpus->signature(doc), banding, absl::MakeSpan(keys));
      for (uint32_t band = 0; band < banding.bands; ++band) {
        computed[band * count + doc] = keys[band];
      }
    }
  }
  std::vector<absl::Span<const uint64_t>> columns;
  for (uint32_t band = 0; band < banding.bands; ++band) {
    columns.push_back(options.keep_sets ? absl::MakeConstSpan(computed).subspan(band * count, count)
                                        : corpus->band_column(band));
  }
  const BandKeyColumns keys{columns, present, options.first_document};
  if (options.key_partitions == 0) {
    shard.band_keys = BandKeyTableOf(keys);
  } else {
    shard.band_key_bytes = SerializeBandKeyColumns(keys, options.key_partitions);
  }
  return shard;
}

absl::StatusOr<SetStore> ReadShardSets(CorpusReader& reader, const SignatureSettings& settings,
                                       const ShardOptions& options,
                                       absl::Span<const uint32_t> documents) {
  if (absl::Status status = settings.Validate(); !status.ok()) return status;
  auto shingler = Shingler::Create(settings);
  if (!shingler.ok()) return shingler.status();
  std::vector<uint64_t> wanted;  // shard-local numbers, ascending
  const DocumentTable* expected = options.expected;
  for (const uint32_t number : documents) {
    if (number < options.first_document) continue;
    const uint64_t doc = number - options.first_document;
    if (expected == nullptr || doc < expected->documents.size()) wanted.push_back(doc);
  }
  reader.SetFilter(
      [&wanted](uint64_t n) { return std::binary_search(wanted.begin(), wanted.end(), n); });
  const Signer signer(settings);
  std::vector<uint32_t> signature(settings.perms);
  ShingleSet set;
  std::vector<Document> batch;
  SetStore sets(settings.perms);
  for (;;) {
    absl::StatusOr<size_t> count = reader.ReadBatch(&batch, 1024, 16 << 20);
    if (!count.ok()) return count.status();
    if (*count == 0) break;
    for (const Document& doc : batch) {
      if (absl::Status s = (*shingler)->Shingle(doc.text, &set); !s.ok()) return s;
      if (expected != nullptr &&
          (doc.ordinal >= expected->documents.size() ||
           !SameDocument(doc, set.empty(), expected->documents[doc.ordinal]))) {
        return InputChanged(absl::StrCat(Where(doc), ": document \"", doc.id,
                                         "\" changed since it was first read; run again"));
      }
      signer.Sign(set, absl::MakeSpan(signature));
      sets.Add(options.first_document + static_cast<uint32_t>(doc.ordinal), set, signature);
    }
  }
  if (expected != nullptr && sets.size() < wanted.size()) {
    const std::string name = reader.inputs().empty() ? "a shard" : reader.inputs()[0];
    return InputChanged(absl::StrCat(name, ": fewer documents than when it was first read"));
  }
  return sets;
}

CandidatePairs FindPartitionCandidates(const BandKeyTable& table, uint64_t max_bucket) {
  CandidatePairs out;
  const std::vector<BandKeyRecord>& records = table.records;
  for (size_t begin = 0; begin < records.size();) {
    size_t end = begin + 1;
    while (end < records.size() && records[end].band == records[begin].band &&
           records[end].key == records[begin].key) {
      ++end;
    }
    PairBucket(absl::MakeConstSpan(records).subspan(begin, end - begin), max_bucket, &out.pairs,
               &out.stats);
    begin = end;
  }
  std::sort(out.pairs.begin(), out.pairs.end());
  out.pairs.erase(std::unique(out.pairs.begin(), out.pairs.end()), out.pairs.end());
  out.stats.candidate_pairs = out.pairs.size();
  return out;
}

absl::StatusOr<std::vector<ScoredPair>> VerifyCandidates(absl::Span<const PackedPair> candidates,
                                                         const SetStore& sets,
                                                         const MatchSettings& match, int threads) {
  for (const PackedPair pair : candidates) {
    for (const uint32_t doc : {PairFirst(pair), PairSecond(pair)}) {
      if (!sets.contains(doc)) {
        return InvalidRequest(
            absl::StrCat("verification: document ", doc, " of a candidate pair has no set"));
      }
    }
  }
  return internal::VerifyWith(candidates, sets, match, std::max(1, threads));
}

std::vector<Group> GroupDocuments(const DocumentTable& table, absl::Span<const ScoredPair> pairs,
                                  KeepPolicy keep, Grouping grouping) {
  std::vector<KeepFacts> facts;
  facts.reserve(table.documents.size());
  for (const DocumentRecord& doc : table.documents) facts.push_back(doc.facts);
  return GroupPairs(pairs, facts, keep, grouping);
}

void WriteSweepRecordParts(const SweepRecordOptions& options, absl::Span<const ScoredPair> pairs,
                           absl::Span<const Group> groups, absl::Span<const std::string> ids,
                           absl::Span<const KeepFacts> facts, absl::Span<const uint8_t> empty,
                           SweepRecordParts* out) {
  const int threads = options.threads;
  if (options.pairs) WritePairRecords(options.format, pairs, ids, &out->pairs, threads);
  if (options.groups) {
    WriteGroupRecords(options.format, groups, ids, options.keep, &out->groups, options.grouping,
                      threads);
  }
  if (options.decisions) {
    WriteDecisionRecords(options.format, groups, pairs, ids, empty, options.keep, &out->decisions,
                         facts, options.grouping, threads);
  }
}

void WriteSweepRecords(const SweepRecordOptions& options, absl::Span<const ScoredPair> pairs,
                       absl::Span<const Group> groups, absl::Span<const std::string> ids,
                       absl::Span<const KeepFacts> facts, absl::Span<const uint8_t> empty,
                       SweepRecords* out) {
  SweepRecordParts parts;
  WriteSweepRecordParts(options, pairs, groups, ids, facts, empty, &parts);
  JoinParts(parts.pairs, &out->pairs);
  JoinParts(parts.groups, &out->groups);
  JoinParts(parts.decisions, &out->decisions);
}

SweepRecords FormatSweepRecords(const DocumentTable& table, absl::Span<const ScoredPair> pairs,
                                absl::Span<const Group> groups, const SweepRecordOptions& options) {
  std::vector<std::string> ids;
  std::vector<KeepFacts> facts;
  std::vector<uint8_t> empty;
  ids.reserve(table.documents.size());
  facts.reserve(table.documents.size());
  empty.reserve(table.documents.size());
  for (const DocumentRecord& doc : table.documents) {
    ids.push_back(doc.id);
    facts.push_back(doc.facts);
    empty.push_back(doc.shingle_count == 0);
  }
  SweepRecords out;
  WriteSweepRecords(options, pairs, groups, ids, facts, empty, &out);
  return out;
}

}  // namespace kindred
