// Built-in families of anyon models (model/families.hpp): SU(2)_k in both gauges and its even part pass every
// consistency equation exactly; a sign-flipped R-symbol breaks the hexagons only.
#include <doctest/doctest.h>

#include "zetabraid/model/check.hpp"
#include "zetabraid/model/families.hpp"

using namespace zb;

TEST_CASE("SU(2)_k, k = 1..6: every consistency equation holds exactly (both gauges, and the even part)") {
  for (int k = 1; k <= 6; ++k) {
    CAPTURE(k);
    CHECK(check_model(make_su2(k)).ok);
    CHECK(check_model(make_su2(k, Su2Gauge::kCyclotomic)).ok);
    if (k % 2 == 1) CHECK(check_model(make_su2(k, Su2Gauge::kUnitary, true)).ok);
  }
  // The cyclotomic gauge needs no square roots.
  Model c = make_su2(5, Su2Gauge::kCyclotomic);
  for (const auto& [key, v] : c.f_symbols()) CHECK(v.in_base());
  CHECK(c.field->radicand_count() == 0);
}

TEST_CASE("negative control: a sign flipped R-symbol of SU(2)_3 breaks the hexagons only") {
  Model m = make_su2(3);
  m.set_r_symbol(1, 1, 0, -*m.r_symbol(1, 1, 0));
  CheckReport r = check_model(m);
  CHECK(r.find("pentagon")->failed == 0);
  CHECK(r.find("hexagon")->failed > 0);
}
