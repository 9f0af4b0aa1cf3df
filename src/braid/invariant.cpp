#include "zetabraid/braid/invariant.hpp"

#include <fmt/format.h>

#include <cstdlib>
#include <numeric>

#include "zetabraid/error.hpp"
#include "zetabraid/linalg/word_product.hpp"

namespace zb {

LinkInvariant link_invariant(const Model& model, const std::vector<int>& strands, const Word& w) {
  const int n = static_cast<int>(strands.size());
  w.check_range(n);
  // follow strands: pos[k] = strand at position k
  std::vector<int> pos(static_cast<size_t>(n));
  std::iota(pos.begin(), pos.end(), 0);
  std::vector<std::pair<int, int>> crossings;  // strands crossing at each letter
  const std::vector<int> letters = w.expand();
  for (int l : letters) {
    size_t i = static_cast<size_t>(std::abs(l));
    crossings.emplace_back(pos[i - 1], pos[i]);
    std::swap(pos[i - 1], pos[i]);
  }
  // permutation: strand pos[k] ends at position k; the closure joins the top of position k to the bottom of k
  std::vector<int> next(static_cast<size_t>(n));
  for (int k = 0; k < n; ++k) next[static_cast<size_t>(pos[static_cast<size_t>(k)])] = k;
  std::vector<int> comp(static_cast<size_t>(n), -1);
  int nc = 0;
  for (int s = 0; s < n; ++s) {
    if (comp[static_cast<size_t>(s)] >= 0) continue;
    for (int t = s; comp[static_cast<size_t>(t)] < 0; t = next[static_cast<size_t>(t)]) comp[static_cast<size_t>(t)] = nc;
    ++nc;
  }
  for (int s = 0; s < n; ++s)
    if (strands[static_cast<size_t>(s)] != strands[static_cast<size_t>(next[static_cast<size_t>(s)])])
      throw InputError("the braid closure joins strands of different anyon types: the word must return every label "
                       "to its position");
  LinkInvariant out{Scalar(model.field), Scalar(model.field), Scalar(model.field), nc,
                    std::vector<long>(static_cast<size_t>(nc), 0)};
  for (size_t k = 0; k < w.size(); ++k) {
    auto [x, y] = crossings[k];
    if (comp[static_cast<size_t>(x)] == comp[static_cast<size_t>(y)])
      out.self_writhe[static_cast<size_t>(comp[static_cast<size_t>(x)])] += letters[k] > 0 ? 1 : -1;
  }
  const RibbonData rd = ribbon_data(model);  // d and theta with the model's FS indicators
  auto dim = [&](int a) { return rd.dims[static_cast<size_t>(a)]; };
  auto twist_of = [&](int a) {
    if (!rd.braided) throw MathError("the model has no R-symbols: the link invariant needs braiding");
    return rd.twists[static_cast<size_t>(a)];
  };
  for (int c = 0; c < model.label_count(); ++c) {
    BraidGenerators gens(model, c);
    const FusionSpace& sp = gens.space(strands);
    if (sp.dimension() == 0) continue;
    Scalar tr(model.field);
    if (w.size() == 0) {
      tr = Scalar(model.field, static_cast<long>(sp.dimension()));
    } else {
      tr = word_product(gens.letters(strands, w)).trace();
    }
    out.quantum_trace += dim(c) * tr;
  }
  Scalar corr(model.field, 1);
  for (int s = 0; s < n; ++s) {
    // one representative strand per component
    int k = comp[static_cast<size_t>(s)];
    bool first = true;
    for (int t = 0; t < s; ++t) first = first && comp[static_cast<size_t>(t)] != k;
    if (!first) continue;
    corr *= twist_of(strands[static_cast<size_t>(s)]).pow(-out.self_writhe[static_cast<size_t>(k)]);
  }
  out.invariant = corr * out.quantum_trace / dim(strands[0]);
  bool uniform = true;
  for (int a : strands) uniform = uniform && a == strands[0];
  out.writhe_normalised =
      uniform ? twist_of(strands[0]).pow(-w.writhe()) * out.quantum_trace / dim(strands[0]) : out.invariant;
  return out;
}

}  // namespace zb
