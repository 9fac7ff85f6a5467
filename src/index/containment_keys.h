// The containment keys an index stores for a document (built with its band
// keys by key_table.h), and the containment search over them (FORMAT.md,
// "Containment keys").
//
// LSH Ensemble (Zhu, Nargesian, Pu, Miller, "LSH Ensemble: Internet-Scale
// Domain Search", PVLDB 9(12), VLDB 2016; see containment_lsh.h) proposes a
// pair whose documents are in size partitions i and j when they agree on one
// band of the banding PairOf(min(i, j), max(i, j)). Band keys depend only on
// the band's number and rows (banding.h), not on how many bands there are,
// so a document of partition j serves every query partition when it stores,
// for each rows value r, the keys of bands 0..B-1 with B the most bands any
// of its pairs uses with r rows (NeededBandings). A query of partition i
// looks up its own keys of the same kind and keeps a document of partition
// j found by band n of r rows only when PairOf(i, j) has r rows and more
// than n bands: exactly the pairs the plan proposes.
//
// Pure functions; plans are immutable and shared between threads.
#ifndef KINDRED_INDEX_CONTAINMENT_KEYS_H_
#define KINDRED_INDEX_CONTAINMENT_KEYS_H_

#include <cstdint>
#include <memory>
#include <vector>

#include "absl/types/span.h"
#include "kindred/banding.h"
#include "kindred/containment_lsh.h"
#include "kindred/index.h"

namespace kindred::index {

// The plan of `keys` for signatures of `perms` slots. Computing one costs
// tens of milliseconds, so each is computed once per process and shared.
std::shared_ptr<const ContainmentPlan> PlanOf(const ContainmentKeys& keys, uint32_t perms);

// For each rows value (ascending), the most bands any pair of `partition`
// with a partition of the plan uses with that many rows.
std::vector<Banding> NeededBandings(const ContainmentPlan& plan, int partition);

// Whether the plan proposes a pair of partitions i and j that agree on band
// `band` of `rows` rows.
bool Proposes(const ContainmentPlan& plan, int i, int j, uint32_t rows, uint32_t band);

}  // namespace kindred::index

#endif  // KINDRED_INDEX_CONTAINMENT_KEYS_H_
