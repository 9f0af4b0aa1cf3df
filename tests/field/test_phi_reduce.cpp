// Reduction modulo the cyclotomic polynomial (field/phi_reduce.hpp) against FLINT's generic remainder
// fmpz_poly_rem by Phi_N (an independent routine), for fmpz and int64 coefficients; fixed seeds.
#include <doctest/doctest.h>

#include <random>

#include "zetabraid/field/phi_reduce.hpp"

using namespace zb;

namespace {
const unsigned long kConductors[] = {1, 3, 5, 7, 12, 15, 20, 105};

struct Phi {
  fmpz_poly_t p;
  explicit Phi(unsigned long n) {
    fmpz_poly_init(p);
    fmpz_poly_cyclotomic(p, n);
  }
  ~Phi() { fmpz_poly_clear(p); }
};
}  // namespace

TEST_CASE("PhiReducer::reduce (fmpz) equals fmpz_poly_rem by Phi_N (random polynomials, fixed seed)") {
  flint_rand_t st;
  flint_randinit(st);
  for (unsigned long n : kConductors) {
    CAPTURE(n);
    Phi phi(n);
    PhiReducer red(phi.p);
    const long deg = red.degree();
    CHECK(deg == fmpz_poly_degree(phi.p));
    fmpz_poly_t p, q;
    fmpz_poly_init(p);
    fmpz_poly_init(q);
    for (int trial = 0; trial < 40; ++trial) {
      // Lengths inside the table and beyond it (the fmpz_poly_rem fallback).
      long len = 1 + static_cast<long>(n_randint(st, static_cast<ulong>(4 * deg + 2)));
      fmpz_poly_randtest(p, st, len, 1 + n_randint(st, 300));
      fmpz_poly_rem(q, p, phi.p);
      red.reduce(p);
      CHECK(fmpz_poly_equal(p, q));
      CHECK(fmpz_poly_length(p) <= deg);
    }
    fmpz_poly_clear(p);
    fmpz_poly_clear(q);
  }
  flint_randclear(st);
}

TEST_CASE("PhiReducer::reduce_int64 equals fmpz_poly_rem, and refuses when the bound says int64 could overflow") {
  std::mt19937_64 rng(5150);
  for (unsigned long n : kConductors) {
    CAPTURE(n);
    Phi phi(n);
    PhiReducer red(phi.p);
    const long deg = red.degree(), len_max = red.table_length();
    fmpz_poly_t p, q;
    fmpz_poly_init(p);
    fmpz_poly_init(q);
    for (int trial = 0; trial < 40; ++trial) {
      long len = 1 + static_cast<long>(rng() % static_cast<unsigned long>(len_max));
      int bits = 1 + static_cast<int>(rng() % 62);
      std::vector<std::int64_t> c(static_cast<size_t>(len));
      for (auto& v : c) v = static_cast<std::int64_t>(rng() >> (64 - bits)) * (rng() % 2 ? 1 : -1);
      fmpz_poly_zero(p);
      for (long i = 0; i < len; ++i) fmpz_poly_set_coeff_si(p, i, c[static_cast<size_t>(i)]);
      fmpz_poly_rem(q, p, phi.p);
      // Is the exact remainder (and every partial sum, by the same bound) inside int64? reduce_int64 may refuse
      // only when its rigorous bound reaches 2^63; small inputs must succeed.
      std::vector<std::int64_t> before = c;
      bool ok = red.reduce_int64(c.data(), len);
      if (bits <= 40) CHECK(ok);
      if (ok) {
        fmpz_poly_t r;
        fmpz_poly_init(r);
        for (long i = 0; i < std::min(len, deg); ++i) fmpz_poly_set_coeff_si(r, i, c[static_cast<size_t>(i)]);
        CHECK(fmpz_poly_equal(r, q));
        for (long i = deg; i < len; ++i) CHECK(c[static_cast<size_t>(i)] == 0);
        fmpz_poly_clear(r);
      } else {
        CHECK(c == before);  // refused: untouched
      }
    }
    fmpz_poly_clear(p);
    fmpz_poly_clear(q);
  }
  // Negative control: a huge coefficient at x^n for Phi_7 (x^6 = -(1 + x + ... + x^5)) next to a huge one at x^0.
  Phi phi7(7);
  PhiReducer red(phi7.p);
  std::vector<std::int64_t> c = {INT64_MAX - 5, 0, 0, 0, 0, 0, -(INT64_MAX - 5)};
  CHECK_FALSE(red.reduce_int64(c.data(), 7));
  CHECK(red.growth(7) == 2.0);  // 1 + max|coefficients of x^6 mod Phi_7| = 1 + 1
}
