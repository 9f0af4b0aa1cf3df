// index_word: a braid word's matrices as an IndexedWord with the powers kept, against BraidGenerators::letters
// (the flat list) and the naive product, for identical anyons and for labels the powers permute.
#include <doctest/doctest.h>

#include "support/fib_model.hpp"
#include "zetabraid/braid/word_index.hpp"
#include "zetabraid/error.hpp"

using namespace zb;

TEST_CASE("index_word expands to BraidGenerators::letters and gives the same products") {
  Model m = zbtest::fibonacci_model();
  const int one = 0, t = 1;
  BraidGenerators gens(m, t);
  struct Case {
    std::vector<int> anyons;
    const char* word;
  };
  const std::vector<Case> cases = {
      {{t, t, t, t}, "(s1 s2^-1)^7 s3^5 ((s1 s3)^2 s2)^-3"},
      {{t, one, t, t}, "(s1 s2)^5 s3^4 (s2 s3^-1)^-3 s1^3"},  // labels permuted by the powers' bases
      {{t, one, t, t}, "((s1 s2 s3)^2 s1)^4"},
  };
  for (const Case& c : cases) {
    CAPTURE(c.word);
    Word w = parse_word(c.word);
    std::vector<int> end1, end2;
    const std::vector<const Matrix*> flat = gens.letters(c.anyons, w, &end1);
    const IndexedWord iw = index_word(gens, c.anyons, w, &end2);
    CHECK(iw.expand_pointers() == flat);
    CHECK(end1 == end2);
    const size_t dim = gens.space(c.anyons).dimension();
    CHECK(word_product_columns(iw, Matrix::identity(m.field, dim)) ==
          word_product_naive(flat, Matrix::identity(m.field, dim)));
  }
  // Identical anyons: the powers are repeats of the groups, not expanded.
  const IndexedWord iw = index_word(gens, {t, t, t, t}, parse_word("(s1 s2^-1)^300"));
  CHECK(iw.length() == 600);
  CHECK(iw.sequences()[0].size() == 1);
  CHECK(iw.sequences()[0][0].repeat == 300);
  CHECK_THROWS_AS(index_word(gens, {t, t, t}, parse_word("s1 s3")), InputError);
}
