// Gauge transformations, relabellings, mirrors and the common field (model/transform.hpp).
#include <doctest/doctest.h>

#include <chrono>

#include "support/helpers.hpp"
#include "zetabraid/detail/raii.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/model/check.hpp"
#include "zetabraid/model/load.hpp"
#include "zetabraid/model/ribbon.hpp"
#include "zetabraid/model/transform.hpp"

using namespace zb;

namespace {

Model bundled(const std::string& name) { return load_model(zbtest::source_dir() + "/models/" + name + ".toml"); }

// Models whose check runs well under a second here (su2_k5 and above are left to the slower suites).
const char* kSmallModels[] = {"fibonacci", "ising", "ising_nu3", "su2_k1", "su2_k2", "su2_k3", "su2_k3_even",
                              "su2_k4", "su2_k4_cyclotomic", "three_fermion", "toric_code", "yang_lee", "z3", "z4",
                              "z5"};

}  // namespace

TEST_CASE("a random gauge copy of every small bundled model still passes model check") {
  // Gauge invariance of the pentagon and hexagons (Kitaev 2006, App. E; from memory): a consistent model stays
  // consistent under any vertex rescaling. The copies really differ from the original (some entry changed).
  for (const char* name : kSmallModels) {
    const std::string cap_name(name);
    CAPTURE(cap_name);
    Model m = bundled(name);
    Model g = apply_gauge(m, random_gauge(m, 1234));
    CHECK(check_model(g).ok);
    bool changed = false;
    for (const auto& [k, v] : m.f_symbols()) changed = changed || *g.f_symbol(k[0], k[1], k[2], k[3], k[4], k[5]) != v;
    // Every entry of SU(2)_1 (Z_2 semion) is gauge invariant: its only multi-vertex ratios cancel.
    if (std::string(name) != "su2_k1") CHECK(changed);
    // d, nu and theta are gauge invariant.
    RibbonData r0 = ribbon_data(m), r1 = ribbon_data(g);
    CHECK(r0.dims == r1.dims);
    CHECK(r0.fs == r1.fs);
    CHECK(r0.twists == r1.twists);
  }
}

TEST_CASE("the R-factor must be u^{ab}_c/u^{ba}_c in this convention: the opposite ratio breaks the hexagon") {
  // Negative control for the formula in transform.hpp: same F-transform, R multiplied by u^{ba}_c/u^{ab}_c.
  Model m = bundled("ising");
  Gauge u = random_gauge(m, 7);
  Model good = apply_gauge(m, u);
  Model bad = good;
  auto U = [&](int a, int b, int c) { return u.count({a, b, c}) ? u.at({a, b, c}) : Scalar(m.field, 1); };
  for (const auto& [k, v] : m.r_symbols())
    bad.set_r_symbol(k[0], k[1], k[2], v * U(k[1], k[0], k[2]) / U(k[0], k[1], k[2]));
  CHECK(check_model(good).ok);
  CHECK_FALSE(check_model(bad).ok);
}

TEST_CASE("relabelling: Z_3 with 1 <-> 2 swapped moves the data; the unit must stay") {
  Model m = bundled("z3");
  std::vector<int> perm;
  std::vector<std::string> names;
  parse_relabeling(m, "1:2,2:1", &perm, &names);
  CHECK(perm == std::vector<int>{0, 2, 1});
  CHECK(names == std::vector<std::string>{"0", "1", "2"});
  Model r = relabel_model(m, perm, names);
  // R^{ab} = exp(2 pi i ab/3) in z3.toml; the new label 1 is the old 2: R'^{1 2}_0 = R^{2 1}_0.
  CHECK(*r.r_symbol(1, 2, 0) == *m.r_symbol(2, 1, 0));
  CHECK(*r.r_symbol(1, 1, 2) == *m.r_symbol(2, 2, 1));
  CHECK(check_model(r).ok);
  CHECK_THROWS_AS(parse_relabeling(m, "0:1,1:0", &perm, &names), InputError);
  CHECK_THROWS_AS(parse_relabeling(m, "7:1", &perm, &names), InputError);
  CHECK_THROWS_AS(parse_relabeling(m, "1:x,2:x", &perm, &names), InputError);
  CHECK_THROWS_AS(parse_relabeling(m, "1", &perm, &names), InputError);
  // New names that are not a permutation of the old ones rename in place.
  parse_relabeling(m, "1:a,2:b", &perm, &names);
  CHECK(perm == std::vector<int>{0, 1, 2});
  CHECK(names == std::vector<std::string>{"0", "a", "b"});
}

TEST_CASE("mirror: conjugated data stay consistent and the twists are conjugated") {
  // Common practice: complex conjugation of F and R gives the mirror (reversed-braiding) model, theta -> conj theta.
  for (const char* name : {"fibonacci", "ising", "su2_k3"}) {
    const std::string cap_name(name);
    CAPTURE(cap_name);
    Model m = bundled(name);
    Model c = mirror_model(m);
    CHECK(check_model(c).ok);
    RibbonData r0 = ribbon_data(m), r1 = ribbon_data(c);
    for (size_t a = 0; a < r0.twists.size(); ++a) CHECK(r1.twists[a] == r0.twists[a].conj());
  }
}

TEST_CASE("moving into a larger common field keeps the model (checked by values and by model check)") {
  Model fib = bundled("fibonacci"), ising = bundled("ising");
  FieldPtr f = common_field(fib, ising);
  CHECK(f->conductor() == 80);
  Model m = move_to_field(fib, f);
  CHECK(check_model(m).ok);
  // Same complex numbers: compare enclosures of every entry before and after.
  for (const auto& [k, v] : fib.f_symbols()) {
    AcbT x, y, d;
    v.ball(x, 128);
    m.f_symbol(k[0], k[1], k[2], k[3], k[4], k[5])->ball(y, 128);
    acb_sub(d, x, y, 128);
    CHECK(acb_contains_zero(d));
    CHECK(mag_cmp_2exp_si(arb_radref(acb_realref(d.get())), -100) < 0);
  }
  CHECK_THROWS_AS(move_to_field(ising, Field::make(5)), MathError);
}

TEST_CASE("model transform on the command line writes a file that loads and checks") {
  std::string dir = zbtest::tmpdir("zb_transform"), out = dir + "/fib_g.toml";
  auto r = zbtest::run(zbtest::cli() + " model transform " + zbtest::source_dir() + "/models/fibonacci.toml --gauge-seed 5 -o " + out);
  REQUIRE(r.status == 0);
  CHECK(check_model(load_model(out)).ok);
  r = zbtest::run(zbtest::cli() + " model transform " + zbtest::source_dir() + "/models/z3.toml --relabel '1:2,2:1' --mirror -o " + out);
  REQUIRE(r.status == 0);
  CHECK(check_model(load_model(out)).ok);
  r = zbtest::run(zbtest::cli() + " model transform " + zbtest::source_dir() + "/models/z3.toml -o " + out);
  CHECK(r.status == 2);
  r = zbtest::run(zbtest::cli() + " model transform " + zbtest::source_dir() + "/models/z3.toml --relabel 'q:1' -o " + out);
  CHECK(r.status == 2);
}
