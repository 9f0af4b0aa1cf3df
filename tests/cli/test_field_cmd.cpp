// The exact-expression syntax and `zetabraid field eval` end to end.
#include <doctest/doctest.h>

#include <nlohmann/json.hpp>

#include "support/helpers.hpp"
#include "zetabraid/field/expression.hpp"

using namespace zb;

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

TEST_CASE("field eval CLI: text, JSON, exit codes") {
  const std::string z = zbtest::cli();
  auto r = zbtest::run(z + " field eval --conductor 5 \"(zeta - zeta^2 - zeta^3 + zeta^4)^2\"");
  CHECK(r.status == 0);
  CHECK(r.out.rfind("5\n", 0) == 0);
  r = zbtest::run(z + " field eval --json --conductor 20 \"exp(2*pi*i*3/20)^20\" \"sqrt(2)\"");
  CHECK(r.status == 0);
  std::istringstream lines(r.out);
  std::string l1, l2;
  std::getline(lines, l1);
  std::getline(lines, l2);
  auto j1 = nlohmann::json::parse(l1), j2 = nlohmann::json::parse(l2);
  CHECK(j1["exact"] == "1");
  CHECK(j1["ball"] == "[1.0000000000000000000 +/- 0]");
  CHECK(std::string(j2["ball"]).rfind("[1.41421356237309504", 0) == 0);
  r = zbtest::run(z + " field eval --conductor 7 \"exp(2*pi*i/5)\"", true);
  CHECK(r.status == 2);
  CHECK(r.out.find("5 divides N") != std::string::npos);
  r = zbtest::run(z + " field eval --conductor 5 \"zeta +\"", true);
  CHECK(r.status == 2);
  CHECK(r.out.find("column 7") != std::string::npos);
  r = zbtest::run(z + " field eval --conductor 0 1", true);
  CHECK(r.status == 2);
  r = zbtest::run(z + " field eval --conductor 1000003 1", true);
  CHECK(r.status == 3);  // resource limit
  r = zbtest::run(z + " field eval", true);
  CHECK(r.status == 2);
}
