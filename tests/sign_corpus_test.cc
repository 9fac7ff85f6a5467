// Tests of SignCorpus, the threaded read-sign-commit pipeline: the corpus it
// builds and the first error it reports do not depend on the thread count
// or the batch size.
#include <zlib.h>

#include <catch2/catch.hpp>
#include <string>
#include <vector>

#include "absl/strings/str_cat.h"
#include "kindred/corpus.h"
#include "kindred/signed_corpus.h"
#include "testlib/temp_dir.h"

namespace kindred {
namespace {

// A JSON Lines corpus of `docs` documents of varied length with ids d0, d1...
std::string Corpus(int docs) {
  std::string out;
  for (int d = 0; d < docs; ++d) {
    std::string text;
    for (int w = 0; w < 5 + (d * 37) % 300; ++w)
      absl::StrAppend(&text, "w", (d * 7 + w * 13) % 500, " ");
    absl::StrAppend(&out, "{\"id\": \"d", d, "\", \"text\": \"", text, "\"}\n");
  }
  return out;
}

struct Outcome {
  absl::Status status;
  std::vector<std::string> ids;
  std::vector<uint64_t> band_keys;
  std::vector<uint32_t> signatures;
  SignStats stats;
  int progress_calls = 0;
};

Outcome Sign(const std::vector<std::string>& inputs, int threads, size_t batch_documents,
             bool lean) {
  SignatureSettings settings;
  settings.perms = 32;
  auto reader = CorpusReader::Open(inputs, InputOptions{});
  REQUIRE(reader.ok());
  SignedCorpus corpus =
      lean ? SignedCorpus::Lean(settings.perms, Banding{8, 4}) : SignedCorpus(settings.perms);
  SignOptions options;
  options.threads = threads;
  options.batch_documents = batch_documents;
  Outcome outcome;
  options.progress = [&](const SignStats&) { ++outcome.progress_calls; };
  outcome.status = SignCorpus(**reader, settings, options, &corpus, &outcome.stats);
  for (size_t d = 0; d < corpus.size(); ++d) {
    outcome.ids.push_back(corpus.id(d));
    if (lean) {
      for (uint32_t band = 0; band < corpus.lean_banding().bands; ++band) {
        outcome.band_keys.push_back(corpus.band_key(d, band));
      }
    } else {
      const auto signature = corpus.signature(d);
      outcome.signatures.insert(outcome.signatures.end(), signature.begin(), signature.end());
    }
  }
  return outcome;
}

TEST_CASE("the same corpus for any thread count and batch size", "[sign]") {
  testing::TempDir dir;
  const std::string path = dir.Write("corpus.jsonl", Corpus(700));
  for (bool lean : {false, true}) {
    const Outcome reference = Sign({path}, 1, 256, lean);
    REQUIRE(reference.status.ok());
    REQUIRE(reference.ids.size() == 700);
    CHECK(reference.ids[699] == "d699");
    for (int threads : {1, 2, 3, 8}) {
      for (size_t batch : {1, 7, 256, 4096}) {
        const Outcome outcome = Sign({path}, threads, batch, lean);
        REQUIRE(outcome.status.ok());
        CHECK(outcome.ids == reference.ids);
        CHECK(outcome.band_keys == reference.band_keys);
        CHECK(outcome.signatures == reference.signatures);
        CHECK(outcome.stats.documents == 700);
        CHECK(outcome.stats.bytes == reference.stats.bytes);
        CHECK(outcome.progress_calls == static_cast<int>((700 + batch - 1) / batch));
      }
    }
  }
}

TEST_CASE("the first problem in read order is the one reported", "[sign]") {
  testing::TempDir dir;
  std::string corpus = Corpus(300);
  const std::string repeat = "{\"id\": \"d5\", \"text\": \"again\"}\n";
  const std::string broken = "{\"id\": \"x\", \"text\": }\n";
  SECTION("a repeated id before a malformed line") {
    const std::string path = dir.Write("c.jsonl", corpus + repeat + Corpus(40) + broken);
    for (int threads : {1, 2, 5}) {
      for (size_t batch : {1, 16, 256}) {
        const Outcome outcome = Sign({path}, threads, batch, true);
        CHECK(outcome.status.code() == absl::StatusCode::kInvalidArgument);
        CHECK(std::string(outcome.status.message()) ==
              path + ":301: duplicate id \"d5\" (first seen at " + path + ":6)");
        CHECK(outcome.ids.size() == 300);
      }
    }
  }
  SECTION("a malformed line before a repeated id") {
    const std::string path = dir.Write("c.jsonl", corpus + broken + repeat);
    for (int threads : {1, 2, 5}) {
      for (size_t batch : {1, 16, 256}) {
        const Outcome outcome = Sign({path}, threads, batch, true);
        CHECK(outcome.status.code() == absl::StatusCode::kInvalidArgument);
        CHECK_THAT(std::string(outcome.status.message()),
                   Catch::StartsWith(path + ":301: invalid JSON"));
        CHECK(outcome.ids.size() == 300);
      }
    }
  }
  SECTION("a truncated gzip file after good documents") {
    // The documents read before the damage are signed; then the read error.
    std::string packed(compressBound(corpus.size()) + 64, '\0');
    z_stream z{};
    REQUIRE(deflateInit2(&z, 6, Z_DEFLATED, 15 + 16, 8, Z_DEFAULT_STRATEGY) == Z_OK);
    z.next_in = reinterpret_cast<Bytef*>(corpus.data());
    z.avail_in = static_cast<uInt>(corpus.size());
    z.next_out = reinterpret_cast<Bytef*>(packed.data());
    z.avail_out = static_cast<uInt>(packed.size());
    REQUIRE(deflate(&z, Z_FINISH) == Z_STREAM_END);
    packed.resize(z.total_out / 2);
    deflateEnd(&z);
    const std::string good = dir.Write("a.jsonl", "{\"id\": \"first\", \"text\": \"x\"}\n");
    const std::string path = dir.Write("b.jsonl.gz", packed);
    std::vector<std::string> ids;
    for (int threads : {1, 2, 5}) {
      for (size_t batch : {1, 16, 256}) {
        const Outcome outcome = Sign({good, path}, threads, batch, true);
        CHECK(outcome.status.code() == absl::StatusCode::kInvalidArgument);
        CHECK_THAT(std::string(outcome.status.message()), Catch::Contains("truncated gzip"));
        REQUIRE(outcome.ids.size() > 1);
        CHECK(outcome.ids[0] == "first");
        if (ids.empty()) ids = outcome.ids;
        CHECK(outcome.ids == ids);
      }
    }
  }
}

}  // namespace
}  // namespace kindred
