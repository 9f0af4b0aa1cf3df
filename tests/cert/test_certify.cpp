// Certification of braid words (cert/certify.hpp) on the Fibonacci model: facts of the trade about the two-qubit
// encoding, interval enclosures and modular verdicts against the exact engine (fixed seeds), non-coordinate kept
// spaces, and the decimal bounds of an enclosure (interval_bounds) on enclosures far outside the range of a double
// and on non-finite text (oracle: the decimal value of the enclosure's ends, by hand).
#include <doctest/doctest.h>

#include <random>

#include "support/fib_model.hpp"
#include "support/helpers.hpp"
#include "support/random.hpp"
#include "zetabraid/cert/certify.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/model/load.hpp"

using namespace zb;

namespace {
std::string fib_file() { return zbtest::source_dir() + "/models/fibonacci.toml"; }
}  // namespace

TEST_CASE("interval_bounds: huge and tiny enclosures round exactly, non-finite ones are refused") {
  std::string up, lo;
  // [1e400 +/- 1]: both ends are 1e400 to 6 digits (a double overflows here; before the fix: log10(inf), a cast
  // of infinity to long, then an abort in GMP)
  CHECK(interval_bounds("[1e400 +/- 1]", 64, &up, &lo));
  CHECK(up == "1.00001e400");
  CHECK(lo == "9.99999e399");
  CHECK_FALSE(interval_bounds("[+/- 1e-400]", 64, &up, &lo));
  CHECK(up == "1.00001e-400");
  CHECK(lo.empty());
  // the 2^-prec floor: 2^-64 = 5.42101086...e-20, rounded up
  CHECK_FALSE(interval_bounds("[0 +/- 0]", 64, &up, &lo));
  CHECK(up == "5.42102e-20");
  for (const char* bad : {"[+/- inf]", "[1 +/- nan]", "[nan +/- 1]", "inf"})
    CHECK_THROWS_AS(interval_bounds(bad, 64, &up, &lo), MathError);
}

TEST_CASE("two-qubit Fibonacci encoding: facts of the trade") {
  // Six t anyons of total charge 1, qubits = charges of anyons 1-3 and 4-6 (common practice): braids of anyons
  // 1-3 (or 4-6) alone never leak; the generator s3 between the groups does.
  Model m = zbtest::fibonacci_model();
  std::vector<int> six(6, 1);
  BraidGenerators g(m, 0);
  const FusionSpace& sp = g.space(six);
  Subspace keep = subspace_from_groups(sp, parse_keep(m, "1-3:t,4-6:t", 6));
  REQUIRE(keep.kept() == 4);
  std::mt19937_64 rng(20240607);
  CertifyOptions exact;
  exact.method = Method::kExact;
  for (int trial = 0; trial < 6; ++trial) {
    CHECK(certify(g, six, keep, Word::from_letters(zbtest::random_letters(rng, {1, 2}, 12)), exact).verdict == Verdict::kLeakFree);
    CHECK(certify(g, six, keep, Word::from_letters(zbtest::random_letters(rng, {4, 5}, 12)), exact).verdict == Verdict::kLeakFree);
    CHECK(certify(g, six, keep, Word::from_letters(zbtest::random_letters(rng, {1, 2, 4, 5}, 12)), exact).verdict == Verdict::kLeakFree);
  }
  CertifyResult r = certify(g, six, keep, parse_word("s3"), exact);
  CHECK(r.verdict == Verdict::kLeaks);
  REQUIRE(r.leakage);
  CHECK(r.leakage->real_sign() > 0);
  // negative control: a leak-free word's leakage is exactly zero and the interval method never says "= 0"
  CertifyResult lf = certify(g, six, keep, parse_word("s1 s2^-1 s1"), exact);
  CHECK(lf.leakage->is_zero());
  CertifyOptions iv;
  iv.method = Method::kInterval;
  CertifyResult lfi = certify(g, six, keep, parse_word("s1 s2^-1 s1"), iv);
  CHECK(lfi.verdict == Verdict::kLeakageBounded);
  // the action of a leak-free braid on the kept space is unitary
  CHECK((*lf.action * lf.action->adjoint()).is_identity());
  // leakage of a unitary map is the kept norm minus the part staying inside: 0 <= leakage <= kept dimension
  acb_t b;
  acb_init(b);
  r.leakage->ball(b, 64);
  CHECK(arb_is_positive(acb_realref(b)));
  acb_clear(b);
}

TEST_CASE("interval enclosures contain the exact leakage (fixed seeds)") {
  Model m = zbtest::fibonacci_model();
  std::vector<int> six(6, 1);
  BraidGenerators g(m, 0);
  Subspace keep = subspace_from_groups(g.space(six), parse_keep(m, "1-3:t,4-6:t", 6));
  std::mt19937_64 rng(7);
  CertifyOptions ex, iv;
  ex.method = Method::kExact;
  iv.method = Method::kInterval;
  for (int trial = 0; trial < 5; ++trial) {
    Word w = Word::from_letters(zbtest::random_letters(rng, {1, 2, 3, 4, 5}, 40));
    CertifyResult a = certify(g, six, keep, w, ex), b = certify(g, six, keep, w, iv);
    CHECK(a.verdict == Verdict::kLeaks);
    CHECK(b.verdict == Verdict::kLeaks);
    arb_t x, y;
    arb_init(x);
    arb_init(y);
    acb_t e;
    acb_init(e);
    a.leakage->ball(e, 256);
    REQUIRE(arb_set_str(y, b.leakage_ball.c_str(), 256) == 0);
    CHECK(arb_overlaps(y, acb_realref(e)));
    REQUIRE(parse_decimal(x, b.leakage_upper, 256));
    arb_sub(x, x, acb_realref(e), 256);
    CHECK(arb_is_nonnegative(x));
    REQUIRE(parse_decimal(x, b.leakage_lower, 256));
    arb_sub(x, acb_realref(e), x, 256);
    CHECK(arb_is_nonnegative(x));
    arb_clear(x);
    arb_clear(y);
    acb_clear(e);
  }
}

TEST_CASE("two qubits inside eight anyons: a non-coordinate kept space") {
  // With anyons 7-8 unconstrained the charge of anyons 4-6 is not a tree label, so the kept space is spanned
  // by projector columns. Braids of 1-3, of 4-6 and of 7-8 keep it; s3 and s6 do not. The leakage is
  // cross-checked against k - tr(G^-1 B* G^-1 B), B = V* rho V, which holds because rho is unitary.
  Model m = zbtest::fibonacci_model();
  std::vector<int> eight(8, 1);
  BraidGenerators g(m, 0);
  const FusionSpace& sp = g.space(eight);
  Subspace keep = subspace_from_groups(sp, parse_keep(m, "1-3:t,4-6:t", 8));
  REQUIRE_FALSE(keep.coordinate);
  CertifyOptions ex;
  ex.method = Method::kExact;
  std::mt19937_64 rng(99);
  for (int trial = 0; trial < 3; ++trial)
    CHECK(certify(g, eight, keep, Word::from_letters(zbtest::random_letters(rng, {1, 2, 4, 5, 7}, 10)), ex).verdict == Verdict::kLeakFree);
  for (const char* w : {"s3", "s6", "s3 s6 s1", "s6^-1 s5"}) {
    CAPTURE(w);
    CertifyResult r = certify(g, eight, keep, parse_word(w), ex);
    CHECK(r.verdict == Verdict::kLeaks);
    const Matrix& v = keep.basis;
    Matrix gi = (v.adjoint() * v).inverse();
    Matrix b = v.adjoint() * *r.image;
    Scalar other = Scalar(m.field, static_cast<long>(keep.kept())) - (gi * b.adjoint() * gi * b).trace();
    CHECK(*r.leakage == other);
  }
}

TEST_CASE("decimal bounds round in the stated direction") {
  arf_t x;
  arf_init(x);
  arf_set_d(x, 0.1234567);
  CHECK(decimal_upper(x, 3) == "1.24e-1");
  CHECK(decimal_lower(x, 3) == "1.23e-1");
  arf_set_d(x, 9.9999);
  CHECK(decimal_upper(x, 3) == "1.00e1");
  arf_set_si(x, 1000);
  CHECK(decimal_upper(x, 3) == "1.00e3");
  arf_clear(x);
  arb_t y;
  arb_init(y);
  CHECK(parse_decimal(y, "2.5e-3", 64));
  CHECK_FALSE(parse_decimal(y, "2.5e", 64));
  CHECK_FALSE(parse_decimal(y, "abc", 64));
  arb_clear(y);
}

TEST_CASE("modular verdicts equal the exact engine's on random two-qubit words (seeded)") {
  Model m = load_model(fib_file());
  BraidGenerators g(m, m.label_index("1"));
  std::vector<int> six(6, m.label_index("t"));
  Subspace keep = subspace_from_groups(g.space(six), parse_keep(m, "1-3:t,4-6:t", 6));
  CertifyOptions ex, mo;
  ex.method = Method::kExact;
  mo.method = Method::kModular;
  int free = 0, leaks = 0;
  for (unsigned seed = 1; seed <= 16; ++seed) {
    // Words on one qubit's anyons (1-2 or 4-5) are leak-free (common practice); mixed words mostly leak.
    std::vector<int> gens = seed % 4 == 0 ? std::vector<int>{1, 2} : seed % 4 == 1 ? std::vector<int>{4, 5}
                                                                                   : std::vector<int>{1, 2, 3, 4, 5};
    Word w = parse_word(zbtest::letters_text(zbtest::random_letters(seed, gens, 30 + 5 * seed)));
    CertifyResult a = certify(g, six, keep, w, ex), b = certify(g, six, keep, w, mo);
    CAPTURE(seed);
    CHECK(a.verdict == b.verdict);
    REQUIRE(b.modular);
    CHECK(b.modular->zero == (b.verdict == Verdict::kLeakFree));
    CHECK(!b.leakage);
    (a.verdict == Verdict::kLeakFree ? free : leaks)++;
  }
  CHECK(free > 0);
  CHECK(leaks > 0);
}
