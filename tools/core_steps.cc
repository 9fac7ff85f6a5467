// kindred_core_steps: times the steps every document needs by the
// definition (DESIGN: fold and split words, hash every word window with
// XXH3, MinHash), on the texts of a JSON Lines corpus already in memory: no
// reading, no JSON, no candidate search. tools/bench.py sets the result
// beside `wc -w` on the same file, as the floor under signing throughput on
// one core.
//
// Usage: kindred_core_steps CORPUS.jsonl [ROUNDS]
// Prints one line per round: "round R: shingle S s, shingle+sign T s", then
// "best: shingle S s, shingle+sign T s, MB M".
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <vector>

#include "kindred/corpus.h"
#include "kindred/shingles.h"
#include "kindred/signer.h"

namespace {

// The texts of the corpus at `path`, into *texts; their bytes into *bytes.
absl::Status ReadTexts(const char* path, std::vector<std::string>* texts, size_t* bytes) {
  auto reader = kindred::CorpusReader::Open({path}, {});
  if (!reader.ok()) return reader.status();
  std::vector<kindred::Document> batch;
  for (;;) {
    auto read = (*reader)->ReadBatch(&batch, 4096, size_t{64} << 20);
    if (!read.ok()) return read.status();
    if (*read == 0) return absl::OkStatus();
    for (kindred::Document& doc : batch) {
      *bytes += doc.text.size();
      texts->push_back(std::move(doc.text));
    }
  }
}

}  // namespace

int main(int argc, char** argv) {
  if (argc < 2) {
    std::fprintf(stderr, "usage: kindred_core_steps CORPUS.jsonl [ROUNDS]\n");
    return 2;
  }
  const int rounds = argc > 2 ? std::max(1, std::atoi(argv[2])) : 3;
  std::vector<std::string> texts;
  size_t bytes = 0;
  if (absl::Status read = ReadTexts(argv[1], &texts, &bytes); !read.ok()) {
    std::fprintf(stderr, "%s\n", read.ToString().c_str());
    return 3;
  }
  const kindred::SignatureSettings settings;  // word 5-shingles, 128 perms
  auto shingler = kindred::Shingler::Create(settings);
  if (!shingler.ok()) return 1;
  const kindred::Signer signer(settings);
  std::vector<uint64_t> bag;
  std::vector<uint32_t> signature(settings.perms);
  uint64_t check = 0;  // keeps the work observable
  const auto seconds = [](auto since) {
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - since).count();
  };
  double best_shingle = 1e30, best_both = 1e30;
  for (int round = 1; round <= rounds; ++round) {
    auto start = std::chrono::steady_clock::now();
    for (const std::string& text : texts) {
      if (!(*shingler)->ShingleBag(text, &bag).ok()) return 1;
      check += bag.size();
    }
    const double shingle = seconds(start);
    start = std::chrono::steady_clock::now();
    for (const std::string& text : texts) {
      if (!(*shingler)->ShingleBag(text, &bag).ok()) return 1;
      signer.Sign(bag, absl::MakeSpan(signature));
      check += signature[0];
    }
    const double both = seconds(start);
    std::printf("round %d: shingle %.4f s, shingle+sign %.4f s\n", round, shingle, both);
    best_shingle = std::min(best_shingle, shingle);
    best_both = std::min(best_both, both);
  }
  std::printf("best: shingle %.4f s, shingle+sign %.4f s, MB %.1f (check %llu)\n", best_shingle,
              best_both, static_cast<double>(bytes) / 1e6, static_cast<unsigned long long>(check));
  return 0;
}
