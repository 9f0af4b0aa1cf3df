// `zetabraid field eval` end to end: text, JSON, exit codes, the bit budget and the square-root regression.
#include <doctest/doctest.h>

#include <chrono>
#include <nlohmann/json.hpp>

#include "support/helpers.hpp"
#include "zetabraid/field/expression.hpp"

using namespace zb;

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

TEST_CASE("regression: 1 - sqrt(3)/2 is the square of (sqrt(3) - 1)/2 in Q(zeta_12), not a new radicand") {
  // (zeta + zeta^11) = 2 cos(pi/6) = sqrt(3) (common practice), and ((sqrt3 - 1)/2)^2 = (4 - 2 sqrt3)/4.
  FieldPtr f = Field::make(12);
  Scalar v = parse_expression("sqrt(1 - (zeta+zeta^11)/2) - ((zeta+zeta^11)-1)/2", f);
  CHECK(v.is_zero());
  CHECK(f->radicand_count() == 0);
  const std::string z = zbtest::cli();
  auto r = zbtest::run(z + " field eval --conductor 12 \"sqrt(1 - (zeta+zeta^11)/2) - ((zeta+zeta^11)-1)/2\"");
  CHECK(r.status == 0);
  CHECK(r.out.rfind("0\n", 0) == 0);
}
