// kindred plan --measure containment: the containment LSH plan
// (containment_lsh.h) for a threshold and signature length: the size
// partitions, the banding of each pair of partitions, the probability of
// proposing a pair as a function of containment, and expected candidates.
#ifndef KINDRED_CLI_PLAN_CONTAINMENT_H_
#define KINDRED_CLI_PLAN_CONTAINMENT_H_

#include <cstdint>
#include <string>

#include "cli/formats.h"

namespace kindred::cli {

struct ContainmentPlanRequest {
  double threshold = 0.8;
  uint32_t perms = 128;
  double fn_weight = 0;
  double fp_weight = 0;
  double min_recall = 0;
  uint32_t min_size = 0;     // --min-contained-size
  uint32_t largest = 0;      // --largest-size: the largest document, in shingles
  uint64_t documents = 0;    // --documents: corpus size for expected candidates (0: none)
  double background = 0.02;  // --background-containment of unrelated pairs
  OutputFormat format = OutputFormat::kText;
};

// Prints the plan in `request.format` (text, jsonl or tsv) on stdout;
// returns the exit code. The request is validated by the caller, except
// min_size and largest.
int RunContainmentPlan(const ContainmentPlanRequest& request);

}  // namespace kindred::cli

#endif  // KINDRED_CLI_PLAN_CONTAINMENT_H_
