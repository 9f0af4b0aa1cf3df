// Ribbon data (model/ribbon.hpp): quantum dimensions, Frobenius-Schur indicators and twists, including models
// whose indicators are -1, against published closed forms.
#include <doctest/doctest.h>
#include <fmt/format.h>

#include "support/helpers.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/model/check.hpp"
#include "zetabraid/model/families.hpp"
#include "zetabraid/model/invariants.hpp"
#include "zetabraid/model/load.hpp"
#include "zetabraid/model/ribbon.hpp"

using namespace zb;

namespace {

// The Ising-type model with odd Chern number nu from Kitaev, Ann. Phys. 321 (2006) 2, section 10.1, Table 1
// (from memory): kappa = (-1)^((nu^2-1)/8), F^{sss}_s = (kappa/sqrt 2)[[1,1],[1,-1]], F^{s psi s}_psi =
// F^{psi s psi}_s = -1, R^{ss}_1 = kappa e^{-i pi nu/8}, R^{ss}_psi = kappa e^{3 i pi nu/8}, R^{s psi}_s =
// R^{psi s}_s = -i^nu, R^{psi psi}_1 = -1.
int kappa(int nu) { return ((nu * nu - 1) / 8) % 2 == 0 ? 1 : -1; }
std::string ising_type(int nu) {
  int k = kappa(nu);
  std::string h = k > 0 ? "1/sqrt(2)" : "-1/sqrt(2)", mh = k > 0 ? "-1/sqrt(2)" : "1/sqrt(2)";
  std::string sg = k > 0 ? "" : "-";
  // -i^nu: nu = 1 mod 4 -> -i, nu = 3 mod 4 -> i
  std::string rsp = nu % 4 == 1 ? "-i" : "i";
  return fmt::format(R"TOML(format = "zetabraid-model 1"
name = "Ising-type nu = {0}"
labels = ["1", "sigma", "psi"]
unitary = true
f_unlisted = "1"
r_unlisted = "1"
[field]
conductor = 16
[fusion]
"sigma sigma" = ["1", "psi"]
"sigma psi" = ["sigma"]
"psi psi" = ["1"]
[F]
"sigma sigma sigma sigma" = [["{1}", "{1}"], ["{1}", "{2}"]]
"sigma psi sigma psi" = "-1"
"psi sigma psi sigma" = "-1"
[R]
"sigma sigma" = ["{3}exp(-{0}*pi*i/8)", "{3}exp(3*{0}*pi*i/8)"]
"sigma psi" = "{4}"
"psi sigma" = "{4}"
"psi psi" = "-1"
)TOML",
                     nu, h, mh, sg, rsp);
}

}  // namespace

TEST_CASE("the sixteenfold way, odd nu: d_sigma = sqrt 2, nu_sigma = kappa, theta_sigma = e^{i pi nu/8}, c = nu/2") {
  // Kitaev 2006, Table 1 (from memory): for odd nu the sigma indicator is kappa = (-1)^((nu^2-1)/8), i.e. -1 for
  // nu = 3, 5 (mod 8) and +1 for nu = 1, 7; theta_sigma = e^{i pi nu/8}; the chiral central charge is nu/2.
  for (int nu : {1, 3, 5, 7, 9, 11, 13, 15}) {
    CAPTURE(nu);
    Model m = parse_model(ising_type(nu), fmt::format("ising nu={}", nu));
    REQUIRE(check_model(m).ok);
    const FieldPtr& f = m.field;
    RibbonData rd = ribbon_data(m);
    REQUIRE(rd.braided);
    CHECK(rd.dims[0].is_one());
    CHECK(rd.dims[1] == parse_expression("sqrt(2)", f));
    CHECK(rd.dims[2].is_one());
    CHECK(rd.fs[0] == 1);
    CHECK(rd.fs[1] == kappa(nu));
    CHECK(rd.fs[2] == 1);
    CHECK(rd.twists[1] == parse_expression(fmt::format("exp({}*pi*i/8)", nu), f));
    CHECK(rd.twists[2] == Scalar(f, -1));
    // Bonderson 2007, section 2.3 (from memory): [F^{a a a}_a]_{11} = nu_a / d_a for self-dual a.
    CHECK(*m.f_symbol(1, 1, 1, 1, 0, 0) == Scalar(f, rd.fs[1]) / rd.dims[1]);
    Invariants inv = compute_invariants(m);
    CHECK(inv.fs == rd.fs);
    CHECK(inv.fs_twist_formula_ok);  // Bantay's formula from S and T agrees (modular)
    REQUIRE(inv.central_charge_known);
    CHECK(Scalar(f, Cyclo(f->cyclotomic(), inv.c_num, inv.c_den)) == Scalar(f, Cyclo(f->cyclotomic(), nu % 16, 2)));
  }
}

TEST_CASE("the bundled nu = 3 file: indicator -1, and ribbon data independent of the unitarity claim") {
  Model m = load_model(zbtest::source_dir() + "/models/ising_nu3.toml");
  REQUIRE(check_model(m).ok);
  const FieldPtr& f = m.field;
  RibbonData rd = ribbon_data(m);
  CHECK(rd.fs == std::vector<int>{1, -1, 1});
  CHECK(rd.dims[1] == parse_expression("sqrt(2)", f));
  CHECK(rd.twists[1] == parse_expression("exp(3*pi*i/8)", f));
  // The claim is only a claim: the same F and R without it must give the same d, nu, theta.
  Model nc = m;
  nc.claims_unitary = false;
  RibbonData r2 = ribbon_data(nc);
  CHECK(r2.dims == rd.dims);
  CHECK(r2.fs == rd.fs);
  CHECK(r2.twists == rd.twists);
  CHECK(quantum_dimension(nc, 1) == parse_expression("sqrt(2)", f));
  CHECK(twist(nc, 1) == parse_expression("exp(3*pi*i/8)", f));
  // negative control: the nu = 1 file has indicator +1 and a different twist
  Model one = load_model(zbtest::source_dir() + "/models/ising.toml");
  CHECK(ribbon_data(one).fs == std::vector<int>{1, 1, 1});
  CHECK(ribbon_data(one).twists[1] == parse_expression("exp(pi*i/8)", one.field));
  CHECK(ribbon_data(one).twists[1] != parse_expression("exp(3*pi*i/8)", one.field));
}

TEST_CASE("SU(2)_k: the spin-1/2 indicator is -1 and d, nu, theta do not depend on the gauge") {
  // Half-integer spins are pseudo-real, so nu_j = (-1)^{2j} (common practice); d_j = [2j+1]_q with
  // q = e^{i pi/(k+2)} and theta_j = e^{2 pi i j(j+1)/(k+2)} (Kirillov-Reshetikhin 1989; from memory).
  // Label i is the spin j = i/2.
  for (int k = 1; k <= 4; ++k)
    for (Su2Gauge gauge : {Su2Gauge::kUnitary, Su2Gauge::kCyclotomic}) {
      CAPTURE(k);
      CAPTURE(gauge == Su2Gauge::kUnitary);
      Model m = make_su2(k, gauge);
      RibbonData rd = ribbon_data(m);
      Scalar q = parse_expression(fmt::format("exp(pi*i/{})", k + 2), m.field);
      for (int j = 0; j <= k; ++j) {
        CAPTURE(j);
        CHECK(rd.fs[static_cast<size_t>(j)] == (j % 2 == 0 ? 1 : -1));
        CHECK(rd.dims[static_cast<size_t>(j)] == (q.pow(j + 1) - q.pow(-(j + 1))) / (q - q.pow(-1)));
        CHECK(rd.twists[static_cast<size_t>(j)] ==
              parse_expression(fmt::format("exp({}*pi*i/{})", j * (j + 2), 2 * (k + 2)), m.field));
      }
    }
}
