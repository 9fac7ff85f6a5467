#include "kindred/index_match.h"

#include <algorithm>
#include <chrono>
#include <mutex>
#include <utility>

#include "core/parallel.h"
#include "index/containment_lookup.h"
#include "kindred/banding.h"
#include "kindred/candidates.h"
#include "kindred/containment_candidates.h"
#include "kindred/signer.h"
#include "kindred/verify.h"

namespace kindred {
namespace {

// The confirmed indexed matches of batch document `q`, appended to *out;
// candidates from `containment` when not null, else from the reader's
// banding.
absl::Status MatchOne(const IndexReader& reader, const index::ContainmentLookup* containment,
                      const SignedCorpus& batch, uint32_t q, const IndexMatchOptions& options,
                      std::vector<IndexMatch>* out, uint64_t* crowded) {
  auto query = batch.shingles(q);
  if (query.empty()) return absl::OkStatus();
  std::vector<uint32_t> candidates;
  if (containment != nullptr) {
    containment->Candidates(batch.signature(q), static_cast<uint32_t>(query.size()),
                            options.max_bucket, &candidates, crowded);
  } else {
    std::vector<uint64_t> keys(reader.bands());
    BandKeys(batch.signature(q), Banding{reader.bands(), reader.rows()}, absl::MakeSpan(keys));
    reader.Candidates(keys, &candidates, options.max_bucket, crowded);
  }
  std::vector<uint64_t> stored;
  for (uint32_t doc : candidates) {
    if (options.exclude_same_id && reader.id(doc) == batch.id(q)) continue;
    if (absl::Status read = reader.ReadShingles(doc, &stored); !read.ok()) return read;
    IndexMatch match{MeasureOverlap(query, stored), true};
    if (!PassesThreshold(match.pair, options.match)) continue;
    match.pair.a = q;
    match.pair.b = doc;
    match.pair.estimate = EstimateJaccard(batch.signature(q), reader.signature(doc));
    out->push_back(match);
  }
  return absl::OkStatus();
}

// Within the batch: each confirmed pair (a < b) is reported once, as a
// match of the later document b with the earlier a, appended to
// (*per_query)[b]. (One document has no pairs; skipping the search saves its
// tables, most of a one-document check's time.)
void MatchWithinBatch(const IndexReader& reader, const index::ContainmentLookup* containment,
                      const SignedCorpus& batch, const IndexMatchOptions& options,
                      std::vector<std::vector<IndexMatch>>* per_query) {
  const uint64_t cap = options.max_bucket == 0 ? kDefaultMaxBucket : options.max_bucket;
  std::vector<PackedPair> candidates;
  if (containment != nullptr) {
    ContainmentPlanOptions plan = containment->plan().options();
    ContainmentCandidateStats stats;
    candidates = FindContainmentCandidates(batch, PlanForCorpus(batch, plan),
                                           std::max(1, options.threads), &stats, cap);
  } else {
    CandidateStats stats;
    candidates = FindCandidatePairs(batch, Banding{reader.bands(), reader.rows()}, options.threads,
                                    &stats, cap);
  }
  for (ScoredPair pair : VerifyPairs(batch, candidates, options.match, options.threads)) {
    // The later batch document is the query.
    std::swap(pair.a, pair.b);
    std::swap(pair.size_a, pair.size_b);
    (*per_query)[pair.a].push_back(IndexMatch{pair, false});
  }
}

}  // namespace

absl::StatusOr<std::vector<IndexMatch>> MatchAgainstIndex(const IndexReader& reader,
                                                          const SignedCorpus& batch,
                                                          const IndexMatchOptions& options) {
  if (batch.perms() != reader.settings().signature.perms) {
    return absl::InvalidArgumentError("batch signatures do not fit the index");
  }
  std::vector<std::vector<IndexMatch>> per_query(batch.size());
  if (options.query_seconds != nullptr) options.query_seconds->assign(batch.size(), 0.0);
  std::mutex error_mutex;
  absl::Status error;
  uint64_t crowded_total = 0;
  std::shared_ptr<const index::ContainmentLookup> containment;
  if (UsesContainmentSearch(options.match)) {
    containment = reader.containment_lookups().For(reader, options.match);
  }
  ParallelFor(batch.size(), options.threads, [&](size_t begin, size_t end, int) {
    uint64_t crowded = 0;
    for (size_t q = begin; q < end; ++q) {
      const auto start = std::chrono::steady_clock::now();
      absl::Status status = MatchOne(reader, containment.get(), batch, static_cast<uint32_t>(q),
                                     options, &per_query[q], &crowded);
      if (options.query_seconds != nullptr) {
        (*options.query_seconds)[q] =
            std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
      }
      if (!status.ok()) {
        std::lock_guard<std::mutex> lock(error_mutex);
        if (error.ok()) error = status;
      }
    }
    std::lock_guard<std::mutex> lock(error_mutex);
    crowded_total += crowded;
  });
  if (!error.ok()) return error;
  if (options.crowded_keys != nullptr) *options.crowded_keys = crowded_total;
  if (batch.size() > 1) MatchWithinBatch(reader, containment.get(), batch, options, &per_query);
  std::vector<IndexMatch> matches;
  for (auto& list : per_query) {
    std::stable_sort(list.begin(), list.end(), [](const IndexMatch& x, const IndexMatch& y) {
      return x.in_index != y.in_index ? x.in_index : x.other() < y.other();
    });
    matches.insert(matches.end(), list.begin(), list.end());
  }
  return matches;
}

const char* ContainedWay(const IndexMatch& match, double threshold) {
  const auto inside = [&](uint32_t size) { return match.pair.shared >= threshold * size - 1e-9; };
  const bool id_in_match = inside(match.pair.size_a);
  const bool match_in_id = inside(match.pair.size_b);
  if (id_in_match && match_in_id) return "both";
  return id_in_match ? "id_in_match" : "match_in_id";
}

std::vector<std::string> MatchRecordColumns(const MatchSettings* match) {
  std::vector<std::string> columns = {"id",
                                      "match",
                                      "match_in",
                                      "jaccard",
                                      "estimate",
                                      "containment_id_in_match",
                                      "containment_match_in_id",
                                      "shared",
                                      "shingles_id",
                                      "shingles_match"};
  if (match != nullptr && match->measure == Measure::kContainment) columns.push_back("contained");
  return columns;
}

void WriteMatchFields(const IndexMatch& m, const IndexReader& reader, const SignedCorpus& batch,
                      const MatchSettings* match, RecordWriter* writer) {
  writer->String(batch.id(m.query()));
  writer->String(m.in_index ? reader.id(m.other()) : std::string_view(batch.id(m.other())));
  writer->String(m.in_index ? "index" : "batch");
  writer->Similarity(m.pair.jaccard);
  writer->Similarity(m.pair.estimate);
  writer->Similarity(m.pair.ContainmentOfAInB());
  writer->Similarity(m.pair.ContainmentOfBInA());
  writer->Number(m.pair.shared);
  writer->Number(m.pair.size_a);
  writer->Number(m.pair.size_b);
  if (match != nullptr && match->measure == Measure::kContainment) {
    writer->String(ContainedWay(m, match->threshold));
  }
}

void WriteMatchRecords(RecordFormat format, absl::Span<const IndexMatch> matches,
                       const IndexReader& reader, const SignedCorpus& batch, std::string* out,
                       const MatchSettings* match) {
  RecordWriter writer(format, MatchRecordColumns(match), out);
  for (const IndexMatch& m : matches) {
    WriteMatchFields(m, reader, batch, match, &writer);
    writer.EndRow();
  }
}

absl::Status LoadIndexedCorpus(const IndexReader& reader, SignedCorpus* out,
                               std::vector<uint32_t>* numbers) {
  std::vector<uint64_t> shingles;
  for (uint32_t doc = 0; doc < reader.document_count(); ++doc) {
    if (!reader.is_live(doc)) continue;
    if (absl::Status read = reader.ReadShingles(doc, &shingles); !read.ok()) return read;
    out->Add(std::string(reader.id(doc)), reader.facts(doc), DocumentOrigin{}, shingles,
             reader.signature(doc));
    if (numbers != nullptr) numbers->push_back(doc);
  }
  return absl::OkStatus();
}

absl::StatusOr<SweepResult> SweepIndex(const IndexReader& reader, const MatchSettings& match,
                                       KeepPolicy keep, int threads) {
  SweepOptions options;
  options.signature = reader.settings().signature;
  options.match = match;
  if (!UsesContainmentSearch(options.match)) {
    const Banding banding = ResolveBanding(options.match, options.signature.perms,
                                           Banding{reader.bands(), reader.rows()});
    options.match.bands = banding.bands;
    options.match.rows = banding.rows;
  }
  options.keep = keep;
  options.sign.threads = threads;
  SweepResult result(options.signature.perms);
  if (absl::Status load = LoadIndexedCorpus(reader, &result.corpus, nullptr); !load.ok()) {
    return load;
  }
  MatchCorpus(result.corpus, options, &result);
  return result;
}

}  // namespace kindred
