// Limits of the expression parser: the bit budget on exact values and the nesting depth.
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

TEST_CASE("field eval CLI: --max-bits, the bit budget exits 3 quickly, bad conductors exit 2") {
  const std::string z = zbtest::cli();
  auto t0 = std::chrono::steady_clock::now();
  auto r = zbtest::run(z + " field eval --conductor 5 \"(2^100000)^100000\"", true);
  double s = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  CHECK(r.status == 3);
  CHECK(r.out.find("limit of 4194304 bits") != std::string::npos);
  CHECK(s < 10.0);  // no hang (not a speed test)
  r = zbtest::run(z + " field eval --conductor 5 \"(2^100)^100000 - 2^(100000)*(2^100)^99999\"", true);
  CHECK(r.status == 3);
  r = zbtest::run(z + " field eval --max-bits 20000000 --conductor 5 \"(2^100)^100000 - 2^100000*(2^100)^99000\"",
                  true);
  CHECK(r.status == 0);
  CHECK(r.out.rfind("0\n", 0) == 0);
  r = zbtest::run(z + " field eval --max-bits 100 --conductor 5 \"2^200\"", true);
  CHECK(r.status == 3);
  CHECK(r.out.find("limit of 100 bits") != std::string::npos);
  for (const char* bad : {"-5", "0", "abc", "18446744073709551611", "5x", ""}) {
    CAPTURE(bad);
    r = zbtest::run(z + " field eval --conductor \"" + bad + "\" 1", true);
    CHECK(r.status == 2);
    CHECK(r.out.find("conductor must be a positive integer") != std::string::npos);
  }
  for (const char* bad : {"-5", "0", "x"}) {
    CAPTURE(bad);
    r = zbtest::run(z + " field eval --conductor 5 --max-bits \"" + bad + "\" 1", true);
    CHECK(r.status == 2);
  }
  r = zbtest::run(z + " field eval --conductor 5 --digits -5 1", true);
  CHECK(r.status == 2);
}
