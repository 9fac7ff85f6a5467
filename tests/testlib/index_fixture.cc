#include "testlib/index_fixture.h"

#include <catch2/catch.hpp>

#include "absl/strings/str_cat.h"
#include "kindred/shingles.h"
#include "kindred/signer.h"
#include "kindred/text.h"
#include "testlib/similar_sets.h"

namespace kindred::testing {

IndexSettings TestIndexSettings(uint32_t perms, uint32_t bands, uint32_t rows) {
  IndexSettings settings;
  settings.signature.k = 3;
  settings.signature.perms = perms;
  settings.unicode_version = UnicodeVersionString();
  settings.bands = bands;
  settings.rows = rows;
  settings.threshold = 0.5;
  return settings;
}

std::vector<std::pair<std::string, std::string>> MakeTexts(uint64_t seed, size_t count,
                                                           size_t words,
                                                           const std::string& prefix) {
  SplitMix64 random(seed);
  std::vector<std::pair<std::string, std::string>> texts;
  std::vector<std::vector<std::string>> bodies;
  for (size_t i = 0; i < count; ++i) {
    std::vector<std::string> body;
    if (i % 3 == 2) {
      body = bodies[random.Between(0, i - 1)];
      for (int edit = 0; edit < 2; ++edit) {
        body[random.Between(0, body.size() - 1)] = absl::StrCat("edit", random.Between(0, 999));
      }
    } else {
      for (size_t w = 0; w < words; ++w) body.push_back(absl::StrCat("w", random.Between(0, 400)));
    }
    std::string text;
    for (const std::string& word : body) absl::StrAppend(&text, text.empty() ? "" : " ", word);
    bodies.push_back(body);
    texts.emplace_back(absl::StrCat(prefix, i), text);
  }
  return texts;
}

SignedCorpus SignTexts(const std::vector<std::pair<std::string, std::string>>& texts,
                       const SignatureSettings& settings) {
  auto shingler = Shingler::Create(settings);
  REQUIRE(shingler.ok());
  Signer signer(settings);
  SignedCorpus corpus(settings.perms);
  ShingleSet set;
  for (size_t i = 0; i < texts.size(); ++i) {
    REQUIRE((*shingler)->Shingle(texts[i].second, &set).ok());
    KeepFacts facts{texts[i].second.size(), static_cast<double>(i), i % 2 == 0};
    corpus.Add(texts[i].first, facts, DocumentOrigin{}, set, signer.Sign(set));
  }
  return corpus;
}

SignedCorpus Slice(const SignedCorpus& corpus, size_t begin, size_t end) {
  SignedCorpus out(corpus.perms());
  for (size_t i = begin; i < end; ++i) {
    out.Add(corpus.id(i), corpus.facts(i), corpus.origin(i), corpus.shingles(i),
            corpus.signature(i));
  }
  return out;
}

void RequireSameDocument(const IndexReader& reader, uint32_t doc, const SignedCorpus& corpus,
                         size_t i) {
  REQUIRE(reader.id(doc) == corpus.id(i));
  KeepFacts facts = reader.facts(doc);
  REQUIRE(facts.length == corpus.facts(i).length);
  REQUIRE(facts.priority == corpus.facts(i).priority);
  REQUIRE(facts.has_priority == corpus.facts(i).has_priority);
  auto signature = reader.signature(doc);
  REQUIRE(std::vector<uint32_t>(signature.begin(), signature.end()) ==
          std::vector<uint32_t>(corpus.signature(i).begin(), corpus.signature(i).end()));
  std::vector<uint64_t> shingles;
  REQUIRE(reader.ReadShingles(doc, &shingles).ok());
  REQUIRE(shingles == std::vector<uint64_t>(corpus.shingles(i).begin(), corpus.shingles(i).end()));
  REQUIRE(reader.shingle_count(doc) == corpus.shingles(i).size());
}

}  // namespace kindred::testing
