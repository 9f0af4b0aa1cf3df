// Gauge transformations, relabellings, mirrors and the common field (model/transform.hpp).
#include <doctest/doctest.h>

#include <fmt/format.h>

#include <chrono>
#include <numeric>

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

namespace {

// Every F entry and R-symbol of g (a Galois conjugate of m under (k, signs)) is the image of m's entry under that
// embedding: the enclosures of g's values and of Scalar::ball_at(k, signs) of m's values must overlap (an
// independent path: ball_at evaluates the embedding numerically, galois_model maps the exact coefficients).
bool entries_match_embedding(const Model& m, const Model& g, long k, RadicalMask signs) {
  bool ok = m.f_symbols().size() == g.f_symbols().size() && m.r_symbols().size() == g.r_symbols().size();
  auto same = [&](const Scalar& v, const Scalar* w) {
    if (!w) return false;
    AcbT x, y;
    v.ball_at(x, 96, k, signs);
    w->ball(y, 96);
    return acb_overlaps(x, y) != 0;
  };
  for (const auto& [key, v] : m.f_symbols()) ok = ok && same(v, g.f_symbol(key[0], key[1], key[2], key[3], key[4], key[5]));
  for (const auto& [key, v] : m.r_symbols()) ok = ok && same(v, g.r_symbol(key[0], key[1], key[2]));
  return ok;
}

}  // namespace

TEST_CASE("Galois conjugates: values are the embedding (k, signs) of the originals, and they pass model check") {
  // Common practice: a Galois conjugate of a solution of the pentagon and hexagon equations (rational
  // coefficients) is again a solution. Fibonacci has one radicand (1/phi), so 4 x 2 embeddings; sigma_2 maps
  // 1/phi = phi - 1 to -phi < 0, whose root needs i: the conjugate lives in Q(zeta_20).
  Model fib = bundled("fibonacci");
  REQUIRE(fib.field->radicand_count() == 1);
  for (long k : {1, 2, 3, 4})
    for (RadicalMask s : {RadicalMask(0), RadicalMask(1)}) {
      CAPTURE(k);
      CAPTURE(s);
      Model g = galois_model(fib, k, s);
      CHECK(entries_match_embedding(fib, g, k, s));
      CHECK(check_model(g).ok);
      CHECK(g.field->conductor() == (k == 1 || k == 4 ? 5UL : 20UL));
      if (k != 1 && k != 4) CHECK_FALSE(g.claims_unitary);
    }
  // Negative control: the conjugate with one sign is not the embedding with the other sign.
  CHECK_FALSE(entries_match_embedding(fib, galois_model(fib, 2, 0), 2, 1));
  // d_t = phi maps to 1 - phi = -1/phi under zeta -> zeta^2 (common practice: Yang-Lee has d = -1/phi).
  Model yl = galois_model(fib, 2, 0);
  RibbonData rd = ribbon_data(yl);
  const FieldPtr& f20 = yl.field;  // zeta_5 = zeta_20^4; phi = 1 + zeta_5 + zeta_5^4
  Scalar phi = Scalar(f20, 1) + Scalar::zeta_power(f20, 4) + Scalar::zeta_power(f20, 16);
  Scalar expected = Scalar(f20, 1) - phi;
  CHECK(rd.dims[1] * rd.dims[1] == expected * expected);
  CHECK(expected * phi == Scalar(f20, -1));
  for (const char* name : {"ising", "su2_k3", "su2_k4", "z5"}) {
    const std::string cap_name(name);
    CAPTURE(cap_name);
    Model m = bundled(name);
    const long n = static_cast<long>(m.field->conductor());
    long k = 2;
    while (std::gcd(k, n) != 1) ++k;
    Model g = galois_model(m, k, 0);
    CHECK(entries_match_embedding(m, g, k, 0));
    CHECK(check_model(g).ok);
  }
  CHECK_THROWS_AS(galois_model(fib, 5, 0), MathError);
  CHECK_THROWS_AS(galois_model(fib, 2, 2), MathError);
}

TEST_CASE("--invert-f and --transpose-f are involutions; for unitary F the inverse is the conjugate transpose") {
  for (const char* name : {"fibonacci", "ising", "su2_k3", "su2_k4"}) {
    const std::string cap_name(name);
    CAPTURE(cap_name);
    Model m = bundled(name);
    Model g = apply_gauge(m, random_gauge(m, 99));  // a non-unitary gauge: F^{-1} differs from F
    for (const Model* x : {&m, &g}) {
      Model ii = invert_f_blocks(invert_f_blocks(*x)), tt = transpose_f_blocks(transpose_f_blocks(*x));
      CHECK(ii.f_symbols() == x->f_symbols());
      CHECK(tt.f_symbols() == x->f_symbols());
      CHECK(ii.r_symbols() == x->r_symbols());
    }
    // Common practice: a unitary F block has inverse = conjugate transpose (m is in a unitary gauge).
    REQUIRE(m.claims_unitary);
    Model inv = invert_f_blocks(m), tr = transpose_f_blocks(m);
    CHECK(inv.f_symbols().size() == tr.f_symbols().size());
    for (const auto& [k, v] : inv.f_symbols()) CHECK(v == tr.f_symbol(k[0], k[1], k[2], k[3], k[4], k[5])->conj());
    // Fibonacci's only 2x2 block stays an involution under a gauge (a similarity), so there inverting changes nothing.
    if (std::string(name) != "fibonacci") CHECK(invert_f_blocks(g).f_symbols() != g.f_symbols());
  }
  // Negative control: the inverted blocks of a gauge copy of Ising are not a consistent model in this convention.
  Model is = bundled("ising");
  CHECK_FALSE(check_model(invert_f_blocks(apply_gauge(is, random_gauge(is, 99)))).ok);
}

TEST_CASE("model transform --galois, --invert-f on the command line") {
  std::string dir = zbtest::tmpdir("zb_transform_galois"), out = dir + "/g.toml", out2 = dir + "/g2.toml";
  std::string fib = zbtest::source_dir() + "/models/fibonacci.toml";
  auto r = zbtest::run(zbtest::cli() + " model transform " + fib + " --galois 2 -o " + out);
  REQUIRE(r.status == 0);
  CHECK(zbtest::run(zbtest::cli() + " model check " + out).status == 0);
  Model g = load_model(out);
  CHECK(entries_match_embedding(bundled("fibonacci"), g, 2, 0));
  r = zbtest::run(zbtest::cli() + " model transform " + fib + " --galois 3 --galois-signs - -o " + out);
  REQUIRE(r.status == 0);
  CHECK(entries_match_embedding(bundled("fibonacci"), load_model(out), 3, 1));
  CHECK(zbtest::run(zbtest::cli() + " model transform " + fib + " --galois 5 -o " + out).status == 2);
  CHECK(zbtest::run(zbtest::cli() + " model transform " + fib + " --galois 2 --galois-signs +- -o " + out).status == 2);
  CHECK(zbtest::run(zbtest::cli() + " model transform " + fib + " --galois-signs - -o " + out).status == 2);
  // Inverting twice gives back the data (on a gauge copy, where inverting changes them).
  std::string ising = zbtest::source_dir() + "/models/ising.toml";
  REQUIRE(zbtest::run(zbtest::cli() + " model transform " + ising + " --gauge-seed 4 -o " + out).status == 0);
  r = zbtest::run(zbtest::cli() + " model transform " + out + " --invert-f -o " + out2, true);
  REQUIRE(r.status == 0);
  CHECK(r.out.find("NOT") != std::string::npos);
  Model once = load_model(out2);
  REQUIRE(zbtest::run(zbtest::cli() + " model transform " + out2 + " --invert-f -o " + out2 + ".2").status == 0);
  Model orig = load_model(out), twice = load_model(out2 + ".2");
  // Separate loads have separate fields: compare the canonical texts.
  auto text = [](const Model& m) {
    std::string t;
    for (const auto& [k, v] : m.f_symbols()) t += fmt::format("F{} {} {} {} {} {} = {}\n", k[0], k[1], k[2], k[3], k[4], k[5], v.str());
    for (const auto& [k, v] : m.r_symbols()) t += fmt::format("R{} {} {} = {}\n", k[0], k[1], k[2], v.str());
    return t;
  };
  CHECK(text(once) != text(orig));
  CHECK(text(twice) == text(orig));
}
