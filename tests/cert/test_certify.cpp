// The producer's decimal bounds of an enclosure (cert/certify.hpp interval_bounds) on enclosures far outside the
// range of a double, and on non-finite text. Oracle: the decimal value of the enclosure's ends, by hand.
#include <doctest/doctest.h>

#include "zetabraid/cert/certify.hpp"
#include "zetabraid/error.hpp"

using namespace zb;

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
