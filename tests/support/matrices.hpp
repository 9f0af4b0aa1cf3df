// Matrices for the tests (linear-algebra layer and above): seeded random matrices and words of matrices over a
// zetabraid Field, and the ball containment check the ball engines are compared with.
#pragma once
#include <algorithm>
#include <random>
#include <vector>

#include "support/random.hpp"
#include "zetabraid/detail/flint.hpp"
#include "zetabraid/linalg/matrix.hpp"

namespace zbtest {

/// Random matrix with entries in the field: one or two terms, each a random_cyclo (bound 3) times a random radical
/// monomial; about `zero_pct` percent of the entries are zero.
inline zb::Matrix random_matrix(const zb::FieldPtr& f, size_t r, size_t c, std::mt19937_64& rng, int zero_pct = 30) {
  zb::Matrix m(f, r, c);
  std::uniform_int_distribution<int> pct(0, 99);
  zb::RadicalMask all = (zb::RadicalMask{1} << f->radicand_count()) - 1;
  std::uniform_int_distribution<zb::RadicalMask> mask(0, all);
  for (size_t i = 0; i < r; ++i)
    for (size_t j = 0; j < c; ++j) {
      if (pct(rng) < zero_pct) continue;
      zb::Scalar s(f);
      int terms = 1 + pct(rng) % 2;
      for (int t = 0; t < terms; ++t)
        s += zb::Scalar::monomial(f, random_cyclo(f->cyclotomic(), rng, 3), mask(rng));
      m(i, j) = s;
    }
  return m;
}

/// A word of `len` letters from `pool`, with runs and a repeated block mixed in.
inline std::vector<const zb::Matrix*> random_matrix_word(const std::vector<zb::Matrix>& pool, size_t len,
                                                         std::mt19937_64& rng) {
  std::uniform_int_distribution<size_t> pick(0, pool.size() - 1);
  std::vector<const zb::Matrix*> w;
  while (w.size() < len) {
    int kind = static_cast<int>(rng() % 4);
    if (kind == 0) {  // a run
      const zb::Matrix* m = &pool[pick(rng)];
      for (size_t k = rng() % 5; k-- > 0 && w.size() < len;) w.push_back(m);
    } else if (kind == 1 && w.size() >= 3) {  // repeat an earlier block
      size_t a = rng() % (w.size() - 2), b = std::min(w.size(), a + 1 + rng() % 6);
      std::vector<const zb::Matrix*> blk(w.begin() + static_cast<long>(a), w.begin() + static_cast<long>(b));
      for (const zb::Matrix* m : blk)
        if (w.size() < len) w.push_back(m);
    } else {
      w.push_back(&pool[pick(rng)]);
    }
  }
  return w;
}

/// Ball check: the exact value's tight enclosure lies inside the computed ball.
inline bool contains_exact(const acb_mat_t b, const zb::Matrix& exact) {
  acb_mat_t e;
  acb_mat_init(e, static_cast<long>(exact.rows()), static_cast<long>(exact.cols()));
  exact.ball(e, 1024);
  bool ok = true;
  for (long i = 0; i < acb_mat_nrows(e) && ok; ++i)
    for (long j = 0; j < acb_mat_ncols(e) && ok; ++j)
      ok = acb_contains(acb_mat_entry(b, i, j), acb_mat_entry(e, i, j));
  acb_mat_clear(e);
  return ok;
}

}  // namespace zbtest
