// A braid word's generator matrices as the product engines take them (linalg IndexedWord), powers kept.
#pragma once
#include <vector>

#include "zetabraid/braid/generators.hpp"
#include "zetabraid/braid/word.hpp"
#include "zetabraid/linalg/word_product.hpp"

namespace zb {

/// The matrices of w's letters starting from the labels `anyons`, as an IndexedWord (finished); `end` receives
/// the labels after the word. Checks the range of every letter (InputError with the position). A power becomes a
/// repeat when one pass of its base returns the labels to where they were (always for identical anyons);
/// otherwise the passes until the labels come back form the repeated group (and the rest are appended).
/// Expands to the same letters, in the same order, as BraidGenerators::letters.
IndexedWord index_word(BraidGenerators& gens, const std::vector<int>& anyons, const Word& w,
                       std::vector<int>* end = nullptr);

}  // namespace zb
