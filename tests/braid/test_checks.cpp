// Exact checks of braid-group representations (braid/checks.hpp): braid relations, unitarity, eigenvalues with
// multiplicities, Hecke relations, the full twist and the image algebra, on the Fibonacci model built in code, the
// bundled Ising file and the Ising-type nu = 3 model; a wrong R-symbol as the negative control.
#include <doctest/doctest.h>

#include <filesystem>
#include <set>

#include "support/fib_model.hpp"
#include "support/helpers.hpp"
#include "support/ising_nu3.hpp"
#include "zetabraid/braid/checks.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/model/load.hpp"
#include "zetabraid/model/ribbon.hpp"

using namespace zb;

namespace {
std::string model_path(const std::string& name) { return zbtest::source_dir() + "/models/" + name; }
}  // namespace

TEST_CASE("generators: inverses, unitarity, braid relations, eigenvalues, Hecke, full twist") {
  Model m = zbtest::fibonacci_model();
  for (int total = 0; total < 2; ++total)
    for (int n = 3; n <= 6; ++n) {
      std::vector<int> a(static_cast<size_t>(n), 1);
      BraidGenerators g(m, total);
      BraidReport r = check_braid_representation(g, a);
      CHECK(r.ok());
      CHECK(r.twist_checked);
      // Full twist = theta_c / theta_t^n (ribbon identity; Kassel, Quantum Groups, ch. XIV;
      // Bakalov & Kirillov, Lectures on Tensor Categories, ch. 3)
      CHECK(r.twist_holds);
      for (int i = 1; i < n; ++i) {
        const Matrix& s = g.matrix(a, i);
        CHECK((s * s.adjoint()).is_identity());  // unitary gauge => unitary generators
        CHECK((s * g.matrix(a, -i)).is_identity());
      }
    }
  // the six-anyon two-qubit space (common practice): dimension 5, each generator has the two eigenvalues
  // R^{tt}_1 (multiplicity 2) and R^{tt}_t (multiplicity 3); Hecke relation holds
  BraidGenerators g(m, 0);
  std::vector<int> six(6, 1);
  BraidReport r = check_braid_representation(g, six);
  CHECK(r.dimension == 5);
  for (const auto& e : r.eigen) {
    REQUIRE(e.eigenvalues.size() == 2);
    CHECK(e.complete);
    CHECK(e.hecke_holds);
    std::multiset<size_t> mult{e.eigenvalues[0].multiplicity, e.eigenvalues[1].multiplicity};
    CHECK(mult == std::multiset<size_t>{2, 3});
    for (const auto& ev : e.eigenvalues)
      CHECK((ev.multiplicity == 2 ? ev.value == *m.r_symbol(1, 1, 0) : ev.value == *m.r_symbol(1, 1, 1)));
  }
  // Burnside: the Fibonacci representation on 6 anyons is irreducible (Freedman, Larsen & Wang 2002: the image
  // is dense), so the image spans all 5x5 matrices
  CHECK(r.algebra_dimension == 25);
  // theta_t = exp(4 pi i/5) (Kitaev 2006, Fibonacci)
  CHECK(twist(m, 1) == parse_expression("exp(4*pi*i/5)", m.field));
  CHECK(quantum_dimension(m, 1) == parse_expression("1 + zeta^2 + zeta^8", m.field));
}

TEST_CASE("negative control: a wrong R-symbol breaks the braid relations or the full twist") {
  Model bad = zbtest::fibonacci_model(true);
  BraidGenerators g(bad, 1);
  BraidReport r = check_braid_representation(g, {1, 1, 1, 1});
  CHECK_FALSE(r.ok());
}

TEST_CASE("braid checks on bundled models") {
  if (!std::filesystem::exists(model_path("ising.toml"))) return;
  // Ising: sigma anyons, full twist theta_c/theta_sigma^n; four sigmas of total charge 1 span 2 dimensions
  // (common practice; Nayak et al. 2008)
  Model m = load_model(model_path("ising.toml"));
  int s = m.label_index("sigma");
  for (int n = 2; n <= 6; ++n)
    for (int c = 0; c < m.label_count(); ++c) {
      BraidGenerators g(m, c);
      std::vector<int> a(static_cast<size_t>(n), s);
      if (g.space(a).dimension() == 0) continue;
      BraidReport r = check_braid_representation(g, a);
      CHECK(r.ok());
      CHECK(r.twist_holds);
    }
  BraidGenerators g(m, 0);
  CHECK(g.space({s, s, s, s}).dimension() == 2);
  // the Ising image is finite (Clifford-type): on 4 sigmas the algebra is the full 2x2 matrix algebra
  CHECK(check_braid_representation(g, {s, s, s, s}).algebra_dimension == 4);
  // twist of sigma: exp(2 pi i/16) (Kitaev 2006, Ising: theta_sigma = e^{i pi/8})
  CHECK(twist(m, s) == parse_expression("zeta", m.field));
}

TEST_CASE("Ising-type nu = 3: full twists theta_c / theta_sigma^n and the quadratic relation") {
  // The full twist (s1 ... s_{n-1})^n acts on V(sigma^n; c) as theta_c / theta_sigma^n (common practice;
  // Kitaev 2006 Appendix E); each s_i has eigenvalues R^{ss}_1, R^{ss}_psi, so (s - R_1)(s - R_psi) = 0.
  for (const Model& m : zbtest::nu3_models()) {
    CAPTURE(m.claims_unitary);
    zbtest::Nu3 x{m.field};
    const int s = m.label_index("sigma");
    Scalar theta_c[3] = {Scalar(m.field, 1), x.theta(), Scalar(m.field, -1)};
    int tested = 0, hecke = 0;
    for (int n = 2; n <= 5; ++n)
      for (int c = 0; c < 3; ++c) {
        BraidGenerators g(m, c);
        std::vector<int> a(static_cast<size_t>(n), s);
        if (g.space(a).dimension() == 0) continue;
        CAPTURE(n);
        CAPTURE(c);
        BraidReport r = check_braid_representation(g, a);
        CHECK(r.ok());
        REQUIRE(r.twist_checked);
        CHECK(r.twist_holds);
        CHECK(*r.twist_expected == theta_c[c] / x.theta().pow(n));
        for (const GeneratorEigen& e : r.eigen) {
          CHECK(e.hecke_checked == (e.eigenvalues.size() == 2));  // two distinct eigenvalues from dimension 2 on
          if (e.hecke_checked) CHECK(e.hecke_holds);
          hecke += e.hecke_checked;
          for (const Eigenvalue& v : e.eigenvalues) CHECK((v.value == x.r1() || v.value == x.rpsi()));
        }
        ++tested;
      }
    CHECK(tested == 6);  // n = 2, 4: c = 1, psi; n = 3, 5: c = sigma
    CHECK(hecke > 0);
  }
}
