// Modular images (linalg/modular.hpp): images of exact word products equal the exact result reduced mod p, and the
// chosen primes checked by PARI/GP. The proofs of zero by the norm bound on generator words of anyon models are
// tested with those letters in tests/braid/test_generators.cpp (they need the braid layer).
#include <doctest/doctest.h>
#include <fmt/format.h>

#include <random>

#include "support/helpers.hpp"
#include "support/matrices.hpp"
#include "support/random.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/linalg/modular.hpp"
#include "zetabraid/linalg/word_product.hpp"

using namespace zb;
using zbtest::field_with_roots;

TEST_CASE("modular images equal the exact result reduced mod p") {
  FieldPtr f = field_with_roots(5, {"zeta + zeta^4"});
  auto primes = choose_primes(*f, 3, 62);
  REQUIRE(primes.size() == 3);
  std::mt19937_64 rng(3);
  std::vector<Matrix> pool;
  for (int k = 0; k < 3; ++k) pool.push_back(zbtest::random_matrix(f, 4, 4, rng, 30));
  auto w = zbtest::random_matrix_word(pool, 40, rng);
  Matrix exact = word_product(w);
  Matrix start = zbtest::random_matrix(f, 4, 2, rng, 0);
  Matrix exact_cols = word_product_columns(w, start);
  for (const auto& q : primes) {
    CHECK(q.p % 5 == 1);
    CHECK(word_product_mod(w, q) == reduce_matrix(exact, q));
    CHECK(word_product_mod(w, start, q) == reduce_matrix(exact_cols, q));
    // Homomorphism: image of a product = product of images.
    CHECK(reduce_matrix(pool[0] * pool[1], q) == reduce_matrix(pool[0], q) * reduce_matrix(pool[1], q));
    // Negative control: a different word has a different image.
    std::vector<const Matrix*> w2 = w;
    w2[3] = w2[3] == &pool[0] ? &pool[1] : &pool[0];
    CHECK(word_product_mod(w2, q) != reduce_matrix(exact, q));
  }
  // make_prime rejects a wrong root of the radicand.
  auto q = primes[0];
  CHECK_NOTHROW(make_prime(*f, q.p, q.zeta, q.roots));
  CHECK_THROWS_AS(make_prime(*f, q.p, q.zeta, {q.roots[0] + 1}), InputError);
  CHECK_THROWS_AS(make_prime(*f, q.p, 1, q.roots), InputError);
  CHECK_THROWS_AS(make_prime(*f, q.p + 2, q.zeta, q.roots), InputError);
}

TEST_CASE("chosen primes checked by PARI/GP") {
  if (!zbtest::have_gp()) return;
  FieldPtr f = field_with_roots(5, {"zeta + zeta^4"});
  auto primes = choose_primes(*f, 2, 62);
  for (const auto& q : primes) {
    // Independent oracle (PARI/GP): p prime, w a root of polcyclo(5) mod p, s^2 = w + w^4 mod p.
    std::string prog = fmt::format(
        "p={}; w=Mod({},p); s=Mod({},p); print(isprime(p) && subst(polcyclo(5),x,w)==0 && s^2==w+w^4)", q.p, q.zeta,
        q.roots[0]);
    CHECK(zbtest::gp(prog) == "1");
    std::string wrong = fmt::format("p={}; w=Mod({},p); print(subst(polcyclo(5),x,w+1)==0)", q.p, q.zeta);
    CHECK(zbtest::gp(wrong) == "0");  // negative control
  }
}
