// Exact consistency checks (equations in check.hpp). The structural checks -- fusion rules (unit, duals,
// associativity, commutativity), F- and R-data (admissibility, invertibility, normalisation) and the unitarity of
// a claimed unitary gauge -- live here; the pentagon and hexagon drivers in equations.cpp, their arithmetic in
// equation_kernel.hpp.
#include "zetabraid/model/check.hpp"

#include <fmt/format.h>

#include <chrono>
#include <optional>

#include "blame.hpp"
#include "equations.hpp"
#include "zetabraid/detail/raii.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/linalg/matrix.hpp"

namespace zb {

const CheckCount* CheckReport::find(const std::string& name) const {
  for (const CheckCount& c : checks)
    if (c.name == name) return &c;
  return nullptr;
}

namespace {

constexpr int kMaxCheckLabels = 128;

std::string ball_of(const Scalar& s, long digits) {
  AcbT b;
  s.ball(b, static_cast<long>(static_cast<double>(digits) * 3.33) + 16);
  return ball_str(b, digits);
}

// The structural checks of one model, each appending its count to the report.
struct StructureChecks {
  const Model& M;
  const CheckOptions& opt;
  CheckReport& rep;
  const int n = M.label_count();
  std::vector<Model::FBlock> fblocks = blocks_of(M);

  static std::vector<Model::FBlock> blocks_of(const Model& m) {
    std::vector<Model::FBlock> out;
    m.for_each_f_block([&](const Model::FBlock& B) { out.push_back(B); });
    return out;
  }
  std::string L(int a) const { return M.labels[static_cast<size_t>(a)]; }
  void add_failure(CheckCount& cc, CheckFailure f) {
    ++cc.failed;
    size_t listed = 0;
    for (const CheckFailure& x : rep.failures) listed += x.check == cc.name;
    if (listed < opt.max_failures) rep.failures.push_back(std::move(f));
  }
  static CheckFailure simple(const std::string& check, std::string where, std::string what, int line = 0) {
    CheckFailure f;
    f.check = check;
    f.where = std::move(where);
    f.what = std::move(what);
    f.line = line;
    return f;
  }
  CheckFailure with_residual(CheckFailure f, const Scalar& residual) const {
    f.residual = residual.str();
    f.residual_ball = ball_of(residual, opt.ball_digits);
    return f;
  }
  Matrix block_matrix(const Model::FBlock& B) const {
    Matrix X(M.field, B.rows.size(), B.cols.size());
    for (size_t i = 0; i < B.rows.size(); ++i)
      for (size_t j = 0; j < B.cols.size(); ++j)
        if (const Scalar* v = M.f_symbol(B.a, B.b, B.c, B.d, B.rows[i], B.cols[j])) X(i, j) = *v;
    return X;
  }
  // Source line of the block's row e (the first given entry of that row; 0 = unknown).
  int block_line(const Model::FBlock& B, int e) const {
    for (int f : B.cols) {
      auto it = M.f_line.find({B.a, B.b, B.c, B.d, e, f});
      if (it != M.f_line.end() && it->second) return it->second;
    }
    return 0;
  }
  std::string block_name(const Model::FBlock& B) const {
    return fmt::format("a={} b={} c={} d={}", L(B.a), L(B.b), L(B.c), L(B.d));
  }

  void fusion_unit();
  void fusion_duals();
  void fusion_associativity();
  void fusion_commutativity();
  void f_admissible();
  void f_invertible();
  void f_normalisation();
  void r_admissible();
  void unitarity();
};

void StructureChecks::fusion_unit() {
  CheckCount cc;
  cc.name = "fusion_unit";
  for (int a = 0; a < n; ++a) {
    ++cc.count;
    bool ok = true;
    for (int b = 0; b < n; ++b) ok = ok && M.fusion(0, a, b) == (a == b) && M.fusion(a, 0, b) == (a == b);
    if (!ok)
      add_failure(cc, simple(cc.name, "a=" + L(a),
                             fmt::format("{} x {} and {} x {} must both be exactly {}", L(0), L(a), L(a), L(0), L(a))));
  }
  rep.checks.push_back(cc);
}

void StructureChecks::fusion_duals() {
  CheckCount cc;
  cc.name = "fusion_duals";
  for (int a = 0; a < n; ++a) {
    ++cc.count;
    int found = 0, dual = -1;
    bool mult_ok = true;
    for (int b = 0; b < n; ++b)
      if (M.fusion(a, b, 0) > 0) {
        ++found;
        dual = b;
        mult_ok = mult_ok && M.fusion(a, b, 0) == 1;
      }
    if (found != 1 || !mult_ok || M.fusion(dual, a, 0) != 1) {
      add_failure(cc, simple(cc.name, "a=" + L(a),
                             fmt::format("exactly one label b with {} in a x b (and in b x a) is required; found {}",
                                         L(0), found)));
    } else {
      bool nonempty = true;
      for (int b = 0; b < n; ++b) nonempty = nonempty && !M.channels(a, b).empty();
      if (!nonempty) add_failure(cc, simple(cc.name, "a=" + L(a), "some product a x b has no channel"));
    }
  }
  rep.checks.push_back(cc);
}

void StructureChecks::fusion_associativity() {
  CheckCount cc;
  cc.name = "fusion_associativity";
  for (int a = 0; a < n; ++a)
    for (int b = 0; b < n; ++b)
      for (int c = 0; c < n; ++c)
        for (int d = 0; d < n; ++d) {
          ++cc.count;
          long left = 0, right = 0;
          for (int e = 0; e < n; ++e) {
            left += static_cast<long>(M.fusion(a, b, e)) * M.fusion(e, c, d);
            right += static_cast<long>(M.fusion(b, c, e)) * M.fusion(a, e, d);
          }
          if (left != right)
            add_failure(cc, simple(cc.name, fmt::format("a={} b={} c={} d={}", L(a), L(b), L(c), L(d)),
                                   fmt::format("(a x b) x c contains d {} times but a x (b x c) {} times", left,
                                               right)));
        }
  rep.checks.push_back(cc);
}

void StructureChecks::fusion_commutativity() {
  CheckCount cc;
  cc.name = "fusion_commutativity";
  for (int a = 0; a < n; ++a)
    for (int b = a + 1; b < n; ++b) {
      ++cc.count;
      bool ok = true;
      for (int c = 0; c < n; ++c) ok = ok && M.fusion(a, b, c) == M.fusion(b, a, c);
      if (!ok)
        add_failure(cc, simple(cc.name, fmt::format("a={} b={}", L(a), L(b)), "a braided model needs a x b = b x a"));
    }
  rep.checks.push_back(cc);
}

void StructureChecks::f_admissible() {
  CheckCount cc;
  cc.name = "f_admissible";
  for (const Model::FBlock& B : fblocks)
    for (int e : B.rows)
      for (int f : B.cols) {
        ++cc.count;
        if (!M.f_given.count({B.a, B.b, B.c, B.d, e, f}))
          add_failure(cc, simple(cc.name,
                                 fmt::format("a={} b={} c={} d={} e={} f={}", L(B.a), L(B.b), L(B.c), L(B.d), L(e),
                                             L(f)),
                                 "admissible F-symbol [F^{abc}_d]_{ef} is missing"));
      }
  for (const auto& [k, v] : M.f_symbols()) {
    bool adm = M.fusion(k[0], k[1], k[4]) && M.fusion(k[4], k[2], k[3]) && M.fusion(k[1], k[2], k[5]) &&
               M.fusion(k[0], k[5], k[3]);
    if (adm || v.is_zero()) continue;
    ++cc.count;
    auto it = M.f_line.find(k);
    add_failure(cc, simple(cc.name,
                           fmt::format("a={} b={} c={} d={} e={} f={}", L(k[0]), L(k[1]), L(k[2]), L(k[3]), L(k[4]),
                                       L(k[5])),
                           "nonzero F-symbol that the fusion rules do not allow",
                           it == M.f_line.end() ? 0 : it->second));
  }
  rep.checks.push_back(cc);
}

void StructureChecks::f_invertible() {
  CheckCount cc;
  cc.name = "f_invertible";
  for (const Model::FBlock& B : fblocks) {
    ++cc.count;
    if (B.rows.size() != B.cols.size()) {
      add_failure(cc, simple(cc.name, block_name(B),
                             fmt::format("F^{{abc}}_d is {}x{}, not square (fusion rules not associative)",
                                         B.rows.size(), B.cols.size())));
      continue;
    }
    size_t rank = block_matrix(B).rank();
    if (rank != B.rows.size())
      add_failure(cc, simple(cc.name, block_name(B),
                             fmt::format("F^{{abc}}_d is singular (rank {} of {})", rank, B.rows.size()),
                             B.rows.empty() ? 0 : block_line(B, B.rows[0])));
  }
  rep.checks.push_back(cc);
}

void StructureChecks::f_normalisation() {
  CheckCount cc;
  cc.name = "f_normalisation";
  for (const Model::FBlock& B : fblocks) {
    if (B.a != 0 && B.b != 0 && B.c != 0) continue;
    Matrix X = block_matrix(B);
    for (size_t i = 0; i < B.rows.size(); ++i)
      for (size_t j = 0; j < B.cols.size(); ++j) {
        ++cc.count;
        if (X(i, j).is_one()) continue;
        auto ln = M.f_line.find({B.a, B.b, B.c, B.d, B.rows[i], B.cols[j]});
        CheckFailure f = simple(cc.name, block_name(B) + fmt::format(" e={} f={}", L(B.rows[i]), L(B.cols[j])),
                                "an F-symbol with the unit among a, b, c must be 1",
                                ln == M.f_line.end() ? 0 : ln->second);
        add_failure(cc, with_residual(std::move(f), X(i, j) - Scalar(M.field, 1)));
      }
  }
  rep.checks.push_back(cc);
}

void StructureChecks::r_admissible() {
  CheckCount cc;
  cc.name = "r_admissible";
  for (int a = 0; a < n; ++a)
    for (int b = 0; b < n; ++b)
      for (int c = 0; c < n; ++c) {
        bool adm = M.fusion(a, b, c) > 0;
        const Scalar* v = M.r_symbol(a, b, c);
        std::string where = fmt::format("a={} b={} c={}", L(a), L(b), L(c));
        if (adm) {
          ++cc.count;
          if (!M.r_given.count({a, b, c}))
            add_failure(cc, simple(cc.name, where, "admissible R-symbol R^{ab}_c is missing"));
          else if (!v)
            add_failure(cc, simple(cc.name, where, "R^{ab}_c must be nonzero (the exchange is invertible)"));
        } else if (v) {
          ++cc.count;
          auto it = M.r_line.find({a, b, c});
          add_failure(cc, simple(cc.name, where, "nonzero R-symbol that the fusion rules do not allow",
                                 it == M.r_line.end() ? 0 : it->second));
        }
      }
  rep.checks.push_back(cc);
}

void StructureChecks::unitarity() {
  CheckCount cc;
  cc.name = "unitarity";
  for (const Model::FBlock& B : fblocks) {
    if (B.rows.size() != B.cols.size()) continue;
    ++cc.count;
    Matrix X = block_matrix(B);
    Matrix D = X * X.adjoint() - Matrix::identity(M.field, B.rows.size());
    if (D.is_zero()) continue;
    size_t wi = 0, wj = 0;
    for (size_t i = 0; i < D.rows(); ++i)
      for (size_t j = 0; j < D.cols(); ++j)
        if (D(wi, wj).is_zero() && !D(i, j).is_zero()) wi = i, wj = j;
    add_failure(cc, with_residual(simple(cc.name,
                                         block_name(B) + fmt::format(" entry [{},{}] of F F^dagger",
                                                                     L(B.rows[wi]), L(B.rows[wj])),
                                         "F^{abc}_d (F^{abc}_d)^dagger != 1 (gauge claimed unitary); the residual "
                                         "is that entry minus the identity's",
                                         block_line(B, B.rows[wi])),
                                  D(wi, wj)));
  }
  for (const auto& [k, v] : M.r_symbols()) {
    ++cc.count;
    Scalar dev = v.abs2() - Scalar(M.field, 1);
    if (dev.is_zero()) continue;
    auto ln = M.r_line.find(k);
    add_failure(cc, with_residual(simple(cc.name, fmt::format("R a={} b={} c={}", L(k[0]), L(k[1]), L(k[2])),
                                         "|R^{ab}_c|^2 != 1 (gauge claimed unitary)",
                                         ln == M.r_line.end() ? 0 : ln->second),
                                  dev));
  }
  rep.checks.push_back(cc);
}

// At most this many equation terms are written out to locate wrong entries (or to check around missing ones).
constexpr long kMaxBlameTerms = 2'000'000;

// Pentagons and hexagons: the fast drivers for complete data, the written-out equations (blame.hpp) when symbols
// are missing (so that no equation is evaluated with a made-up value); then suspects when an equation fails.
void equations_and_blame(const Model& M, const CheckOptions& opt, CheckReport& rep) {
  const bool missing = blame::has_missing_symbols(M);
  const size_t first = rep.checks.size();
  std::optional<blame::EquationSet> E;
  std::vector<blame::Status> st;
  if (missing) {
    E = blame::enumerate_equations(M, kMaxBlameTerms);
    st = blame::evaluate(M, *E, opt.threads);
    blame::report_equations(M, opt, *E, st, rep);
  } else {
    equations::check_pentagons_hexagons(M, opt, rep);
  }
  long failed = 0;
  for (size_t i = first; i < rep.checks.size(); ++i) failed += rep.checks[i].failed;
  if (failed == 0 || opt.max_suspects == 0) return;
  if (!E) {
    try {
      E = blame::enumerate_equations(M, kMaxBlameTerms);
    } catch (const ResourceError& e) {
      rep.suspects_note = e.what();
      return;
    }
    st = blame::evaluate(M, *E, opt.threads);
  }
  blame::find_suspects(M, opt, *E, st, rep);
}

}  // namespace

CheckReport check_model(const Model& M, const CheckOptions& opt) {
  auto t0 = std::chrono::steady_clock::now();
  CheckReport rep;
  const int n = M.label_count();
  if (n == 0) throw InputError("the model has no labels");
  if (n > kMaxCheckLabels)
    throw ResourceError(fmt::format("model check supports at most {} labels (the model has {})", kMaxCheckLabels, n));
  StructureChecks s{M, opt, rep};
  s.fusion_unit();
  s.fusion_duals();
  s.fusion_associativity();
  if (M.has_r) s.fusion_commutativity();
  s.f_admissible();
  s.f_invertible();
  s.f_normalisation();
  if (M.has_r) s.r_admissible();
  equations_and_blame(M, opt, rep);
  if (M.claims_unitary) s.unitarity();
  for (const CheckCount& c : rep.checks) rep.ok = rep.ok && c.failed == 0;
  rep.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return rep;
}

}  // namespace zb
