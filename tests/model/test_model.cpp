// The Model type (model/model.hpp): copies keep working F lookups.
#include <doctest/doctest.h>

#include "zetabraid/model/check.hpp"
#include "zetabraid/model/families.hpp"
#include "zetabraid/model/model.hpp"

using namespace zb;

TEST_CASE("copies of a model keep working F lookups") {
  Model* m = new Model(make_su2(2));
  Model c = *m;
  delete m;
  REQUIRE(c.f_symbol(1, 1, 1, 1, 0, 0));
  CHECK(check_model(c).ok);
}
