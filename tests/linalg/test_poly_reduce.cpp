// Reduction modulo the cyclotomic polynomial (PolyContext::reduce) against FLINT's generic remainder.
#include <doctest/doctest.h>

#include "zetabraid/field/scalar.hpp"
#include "zetabraid/linalg/poly_matrix.hpp"

using namespace zb;

TEST_CASE("PolyContext::reduce equals FLINT's fmpz_poly_rem by Phi_N (random polynomials, fixed seed)") {
  // The table reduction used in the exact engine against FLINT's generic remainder (an independent routine).
  flint_rand_t st;
  flint_randinit(st);
  for (unsigned long n : {1UL, 3UL, 5UL, 7UL, 12UL, 15UL, 20UL, 105UL}) {
    CAPTURE(n);
    PolyContext ctx(Field::make(n));
    const long deg = ctx.degree();
    fmpz_poly_t p, q;
    fmpz_poly_init(p);
    fmpz_poly_init(q);
    for (int trial = 0; trial < 40; ++trial) {
      long len = 1 + static_cast<long>(n_randint(st, static_cast<ulong>(4 * deg + 2)));
      fmpz_poly_randtest(p, st, len, 1 + n_randint(st, 300));
      fmpz_poly_rem(q, p, ctx.modulus());
      ctx.reduce(p);
      CHECK(fmpz_poly_equal(p, q));
      CHECK(fmpz_poly_length(p) <= deg);
    }
    fmpz_poly_clear(p);
    fmpz_poly_clear(q);
  }
  flint_randclear(st);
}
