#include "zetabraid/braid/word_index.hpp"

#include <cstdlib>
#include <map>

namespace zb {

namespace {

class Indexer {
 public:
  Indexer(BraidGenerators& gens, const Word& w, IndexedWord* out, const std::vector<int>& anyons)
      : gens_(gens), w_(w), out_(out) {
    for (int a : anyons) uniform_ = uniform_ && a == anyons.front();
  }

  // Appends Word sequence s (inverted when `inv`) to IndexedWord sequence `into`, moving the labels `cur`.
  void sequence(std::uint32_t s, bool inv, std::uint32_t into, std::vector<int>& cur) {
    const auto& items = w_.sequences()[s];
    for (size_t x = 0; x < items.size(); ++x) {
      const Word::Item& it = items[inv ? items.size() - 1 - x : x];
      const bool neg = inv != (it.exponent < 0);
      const std::uint64_t m = it.exponent < 0 ? 0ULL - static_cast<std::uint64_t>(it.exponent)
                                              : static_cast<std::uint64_t>(it.exponent);
      if (it.letter) {
        const int l = neg ? -it.letter : it.letter;
        const size_t i = static_cast<size_t>(std::abs(l));
        if (cur[i - 1] == cur[i]) {  // the labels stay: one matrix, repeated
          out_->append_letter(into, letter(cur, l), m);
          continue;
        }
        for (std::uint64_t r = 0; r < m; ++r) {  // two different labels exchanged at every letter
          out_->append_letter(into, letter(cur, l));
          std::swap(cur[i - 1], cur[i]);
        }
        continue;
      }
      // A group: passes until the labels come back form the repeated unit.
      const std::vector<int> start = cur;
      const std::uint32_t unit = out_->add_sequence();
      std::uint64_t passes = 0;
      do {
        const std::uint32_t pass = out_->add_sequence();
        sequence(it.group, neg, pass, cur);
        out_->append_group(unit, pass, 1);
        ++passes;
      } while (passes < m && cur != start);
      if (cur != start) {  // never came back within m passes: the passes once
        out_->append_group(into, unit, 1);
        continue;
      }
      out_->append_group(into, unit, m / passes);
      for (std::uint64_t r = 0; r < m % passes; ++r) {
        const std::uint32_t pass = out_->add_sequence();
        sequence(it.group, neg, pass, cur);
        out_->append_group(into, pass, 1);
      }
    }
  }

 private:
  std::uint32_t letter(const std::vector<int>& labels, int l) {
    if (uniform_) {  // identical anyons: the labels never change, one matrix per signed letter
      auto it = by_letter_.find(l);
      if (it == by_letter_.end()) it = by_letter_.emplace(l, out_->letter(&gens_.matrix(labels, l))).first;
      return it->second;
    }
    auto key = std::make_pair(labels, l);
    auto it = cache_.find(key);
    if (it == cache_.end()) it = cache_.emplace(key, out_->letter(&gens_.matrix(labels, l))).first;
    return it->second;
  }
  BraidGenerators& gens_;
  const Word& w_;
  IndexedWord* out_;
  bool uniform_ = true;
  std::map<int, std::uint32_t> by_letter_;
  std::map<std::pair<std::vector<int>, int>, std::uint32_t> cache_;
};

}  // namespace

IndexedWord index_word(BraidGenerators& gens, const std::vector<int>& anyons, const Word& w, std::vector<int>* end) {
  w.check_range(static_cast<int>(anyons.size()));
  IndexedWord out;
  std::vector<int> cur = anyons;
  Indexer(gens, w, &out, anyons).sequence(0, false, 0, cur);
  out.finish();
  if (end) *end = cur;
  return out;
}

}  // namespace zb
