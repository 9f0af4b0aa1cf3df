// Fixture: the Ising-type nu = 3 model (indicator -1) from the bundled file, and its values written from the
// published table (not read from the model), for the braid-layer tests.
#pragma once
#include <string>
#include <vector>

#include "support/helpers.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/model/load.hpp"

namespace zbtest {

// Kitaev, Ann. Phys. 321 (2006) 2, section 10.1, Table 1 (from memory), Ising-type nu = 3: kappa = -1,
// d_sigma = sqrt 2, theta_sigma = e^{3 pi i/8}, theta_psi = -1, R^{ss}_1 = -e^{-3 pi i/8}, R^{ss}_psi = e^{i pi/8},
// R^{s psi}_s R^{psi s}_s = (-i^3)^2 = -1. Written here from the table, not read from the model.
struct Nu3 {
  zb::FieldPtr f;
  zb::Scalar e(const std::string& x) const { return zb::parse_expression(x, f); }
  zb::Scalar d() const { return e("sqrt(2)"); }
  zb::Scalar theta() const { return e("exp(3*pi*i/8)"); }
  zb::Scalar r1() const { return e("-exp(-3*pi*i/8)"); }
  zb::Scalar rpsi() const { return e("exp(pi*i/8)"); }
};

// The nu = 3 file and the same data without the unitarity claim (a claim must not change any value).
inline std::vector<zb::Model> nu3_models() {
  zb::Model m = zb::load_model(source_dir() + "/models/ising_nu3.toml");
  zb::Model nc = m;
  nc.claims_unitary = false;
  return {m, nc};
}

}  // namespace zbtest
