// The exact-expression syntax (field/expression.hpp): roots of unity, malformed input naming the column, and the
// limits of the parser (the bit budget on exact values and the nesting depth).
#include <doctest/doctest.h>

#include <fmt/format.h>

#include <chrono>

#include "support/helpers.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/field/square_test.hpp"

using namespace zb;

namespace {

// Runs f, which must throw ResourceError naming the limit, without hanging.
template <class F>
void refused_quickly(F&& f, long limit = kDefaultMaxValueBits) {
  auto t0 = std::chrono::steady_clock::now();
  try {
    f();
    FAIL("accepted");
  } catch (const ResourceError& e) {
    CHECK(std::string(e.what()).find(fmt::format("limit of {} bits", limit)) != std::string::npos);
  }
  double s = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  CHECK(s < 10.0);  // refused before any big computation: a hang would take minutes (not a speed test)
}

}  // namespace

TEST_CASE("bit budget: huge powers are refused before they are computed") {
  FieldPtr f = Field::make(5);
  refused_quickly([&] { parse_expression("(2^100000)^100000", f); });
  refused_quickly([&] { parse_expression("(3/7 + zeta^2)^100000 * (2^10000)^1000", f); });
}

TEST_CASE("bit budget: repeated squaring, inverses and long products stop at the limit") {
  FieldPtr f = Field::make(7);
  // ((2^1000)^2)^2 ... 40 times: each step doubles the size; refused once a value passes 2^22 bits.
  std::string sq = "2^1000";
  for (int i = 0; i < 40; ++i) sq = "(" + sq + ")^2";
  refused_quickly([&] { parse_expression(sq, f); });
  // The inverse of 2^300000 + zeta in Q(zeta_7) has about phi^2 * 300000 bits: refused before nf_elem_inv.
  refused_quickly([&] { parse_expression("1/((2^100000)^3 + zeta)", f); });
  refused_quickly([&] { parse_expression("((2^100000)^3 + zeta)^-1", f); });
  // A product of many large factors.
  std::string prod = "2^90000";
  for (int i = 0; i < 60; ++i) prod += "*3^90000";
  refused_quickly([&] { parse_expression(prod, f); });
  // Under the limit everything still works, and the inverse is exact.
  Scalar x = parse_expression("2^3000 + zeta", f);
  CHECK((x * parse_expression("1/(2^3000 + zeta)", f)).is_one());
  CHECK(parse_expression("(2^100)^1000", f) == parse_expression("2^100000", f));
}

TEST_CASE("square roots of huge values: the norm method is bounded, messages quote values abbreviated") {
  FieldPtr f = Field::make(5);
  // A 400000-bit square: the witnesses find no non-residue, and the norm method would factor a polynomial of
  // about 64 * 400000 bits; refused at once (without the bound a 2-million-bit square ran over two minutes).
  auto t0 = std::chrono::steady_clock::now();
  try {
    parse_expression("sqrt(((2^100000)^2 + zeta + zeta^4)^2)", f);
    FAIL("accepted");
  } catch (const ResourceError& e) {
    CHECK(std::string(e.what()).find(fmt::format("limit of {} bits", kMaxNormMethodBits)) != std::string::npos);
    CHECK(std::string(e.what()).size() < 600);
  }
  CHECK(std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count() < 10.0);  // no hang (not a speed test)
  // Small squares still reduce.
  CHECK(parse_expression("sqrt((2^1000 + zeta + zeta^4)^2) - (2^1000 + zeta + zeta^4)", f).is_zero());
  CHECK(f->radicand_count() == 0);
  try {
    parse_expression("sqrt((2^100000)^3 * zeta)", f);
    FAIL("accepted");
  } catch (const ExpressionError& e) {
    CHECK(std::string(e.what()).find("is not real") != std::string::npos);
    CHECK(std::string(e.what()).size() < 600);
  }
}

TEST_CASE("bit budget: ExpressionLimits::max_bits overrides the default, also for integer literals") {
  FieldPtr f = Field::make(3);
  ExpressionLimits big;
  big.max_bits = 1L << 24;
  CHECK_THROWS_AS(parse_expression("(2^100)^100000", f), ResourceError);  // 10^7 bits
  CHECK(parse_expression("(2^100)^100000", f, big).size_bits() > 10000000);
  ExpressionLimits small;
  small.max_bits = 1000;
  refused_quickly([&] { parse_expression("1" + std::string(400, '0'), f, small); }, 1000);
  refused_quickly([&] { parse_expression("2^999 * 2^999", f, small); }, 1000);
  CHECK(parse_expression("2^900", f, small) == parse_expression("2^450 * 2^450", f));
}

TEST_CASE("nesting: one constant for the check and the message, parentheses and unary signs count one level") {
  FieldPtr f = Field::make(5);
  auto nested = [](int d) { return std::string(static_cast<size_t>(d), '(') + "1" + std::string(static_cast<size_t>(d), ')'); };
  CHECK(parse_expression(nested(kMaxExpressionDepth), f).is_one());
  CHECK(parse_expression(std::string(kMaxExpressionDepth, '-') + "1", f).is_one());
  CHECK(parse_expression("sqrt(" + nested(kMaxExpressionDepth - 1) + ")", f).is_one());
  for (const std::string& bad : {nested(kMaxExpressionDepth + 1), std::string(kMaxExpressionDepth + 1, '-') + "1",
                                 "exp(" + std::string(kMaxExpressionDepth, '(') + "2*pi*i/5" +
                                     std::string(kMaxExpressionDepth, ')') + ")"}) {
    try {
      parse_expression(bad, f);
      FAIL("accepted");
    } catch (const ExpressionError& e) {
      CHECK(std::string(e.what()).find(fmt::format("deeper than {} levels", kMaxExpressionDepth)) !=
            std::string::npos);
    }
  }
  // The README states the same limit (Exact expressions, "Limits").
  CHECK(zbtest::slurp(zbtest::source_dir() + "/README.md")
            .find(fmt::format("nesting depth {}", kMaxExpressionDepth)) != std::string::npos);
}

TEST_CASE("roots of unity: exp(2*pi*i*p/q) is accepted exactly when it lies in Q(zeta_N)") {
  FieldPtr f20 = Field::make(20);
  CHECK(parse_expression("exp(2*pi*i*3/20)", f20) == Scalar::zeta_power(f20, 3));
  CHECK(parse_expression("exp(2*pi*i*3/20)^20", f20).is_one());
  CHECK(parse_expression("exp(pi*i/2)", f20) == parse_expression("i", f20));
  CHECK(parse_expression("exp(-2*pi*i/5)", f20) == Scalar::zeta_power(f20, -4));
  FieldPtr f5 = Field::make(5);
  // Q(zeta_5) = Q(zeta_10) (common practice), so exp(2*pi*i/10) = -zeta^3 lies in it.
  CHECK(parse_expression("exp(2*pi*i/10)", f5) == -Scalar::zeta_power(f5, 3));
  FieldPtr f7 = Field::make(7);
  CHECK_THROWS_AS(parse_expression("exp(2*pi*i/5)", f7), ExpressionError);
  CHECK_THROWS_AS(parse_expression("i", f7), ExpressionError);
}

TEST_CASE("malformed expressions name the column") {
  FieldPtr f = Field::make(5);
  struct Bad { const char* text; size_t col; };
  for (Bad b : {Bad{"zeta +", 7}, Bad{"(1 + 2", 7}, Bad{"2 ** 3", 4}, Bad{"foo", 1}, Bad{"1/0", 2},
                Bad{"0.5", 2}, Bad{"zeta^x", 6}, Bad{"2^3^4", 4}, Bad{"exp(pi)", 5}, Bad{"1 $ 2", 3}}) {
    CAPTURE(b.text);
    try {
      parse_expression(b.text, f);
      FAIL("accepted");
    } catch (const ExpressionError& e) {
      CHECK(e.column() == b.col);
    }
  }
  // Deep nesting and oversized input fail cleanly.
  std::string deep(100000, '(');
  CHECK_THROWS_AS(parse_expression(deep, f), ExpressionError);
  CHECK_THROWS_AS(parse_expression("zeta^99999999", f), ExpressionError);
}
