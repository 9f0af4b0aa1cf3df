// Exact invariants of a braided anyon model (methods: docs/model-format.md, "Invariants").
#include "zetabraid/model/invariants.hpp"

#include <fmt/format.h>

#include <nlohmann/json.hpp>
#include <numeric>

#include "zetabraid/detail/raii.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/io/input_file.hpp"
#include "zetabraid/model/ribbon.hpp"

namespace zb {

namespace {

std::string ball_of(const Scalar& s, long digits) {
  AcbT b;
  s.ball(b, static_cast<long>(static_cast<double>(digits) * 3.33) + 16);
  return ball_str(b, digits);
}

// Writes z = exp(2 pi i j/m) when z^m = 1 is proved and the ball of z pins down j; returns false otherwise.
bool root_of_unity_index(const Scalar& z, long max_order, long* j_out, long* m_out) {
  if (z.is_zero()) return false;
  Scalar p = z;
  long m = 0;
  for (long e = 1; e <= max_order; ++e) {
    if (p.is_one()) {
      m = e;
      break;
    }
    p = p * z;
  }
  if (m == 0) return false;
  // arg(z) * m / (2 pi) is within 1/2 of exactly one integer j (mod m); certify with balls.
  for (long prec = 64; prec <= 4096; prec *= 2) {
    AcbT b;
    z.ball(b, prec);
    ArbT t, pi2, r, half;
    acb_arg(t, b, prec);
    arb_const_pi(pi2, prec);
    arb_mul_2exp_si(pi2, pi2, 1);
    arb_div(t, t, pi2, prec);
    arb_mul_si(t, t, m, prec);
    double mid = arf_get_d(arb_midref(t.get()), ARF_RND_NEAR);
    long j = std::lround(mid);
    arb_sub_si(r, t, j, prec);
    arb_abs(r, r);
    arb_set_d(half, 0.5);
    bool certain = arb_lt(r, half);
    if (certain) {
      *j_out = ((j % m) + m) % m;
      *m_out = m;
      return true;
    }
  }
  return false;
}

}  // namespace

Invariants compute_invariants(const Model& m, long) {
  const int n = m.label_count();
  const FieldPtr& F = m.field;
  Invariants inv(F);
  // d_a, nu_a and theta_a: the one computation of ribbon data (model/ribbon.hpp).
  RibbonData rd = ribbon_data(m);
  inv.dims = std::move(rd.dims);
  inv.fs = std::move(rd.fs);
  for (const Scalar& d : inv.dims) inv.global_dim2 += d * d;
  if (!inv.global_dim2.in_base()) throw MathError("D^2 involves square roots; not supported yet");
  inv.global_dim = F->sqrt(inv.global_dim2.to_base());
  if (!m.has_r) {
    inv.notes.push_back("no R-symbols: twists, S, T and c are not defined");
    return inv;
  }
  inv.braided = true;
  inv.twists = std::move(rd.twists);
  Matrix S(F, static_cast<size_t>(n), static_cast<size_t>(n)), T(F, static_cast<size_t>(n), static_cast<size_t>(n));
  Scalar Dinv = inv.global_dim.inverse();
  for (int a = 0; a < n; ++a) {
    T(static_cast<size_t>(a), static_cast<size_t>(a)) = inv.twists[static_cast<size_t>(a)];
    for (int b = 0; b < n; ++b) {
      Scalar s(F);
      for (int c : m.channels(m.dual(a), b))
        s += Scalar(F, m.fusion(m.dual(a), b, c)) * inv.dims[static_cast<size_t>(c)] * inv.twists[static_cast<size_t>(c)];
      S(static_cast<size_t>(a), static_cast<size_t>(b)) =
          s * Dinv / (inv.twists[static_cast<size_t>(a)] * inv.twists[static_cast<size_t>(b)]);
    }
  }
  inv.modular = S.rank() == static_cast<size_t>(n);
  for (int a = 0; a < n; ++a)
    inv.gauss_plus += inv.dims[static_cast<size_t>(a)] * inv.dims[static_cast<size_t>(a)] * inv.twists[static_cast<size_t>(a)];
  inv.gauss_phase = inv.gauss_plus * Dinv;
  long j = 0, mo = 1;
  if (inv.modular && root_of_unity_index(inv.gauss_phase, 8 * static_cast<long>(F->conductor()) * 8, &j, &mo)) {
    // exp(2 pi i c/8) = exp(2 pi i j/m): c = 8 j/m mod 8.
    long num = 8 * j, den = mo;
    long g = std::gcd(num, den);
    num /= g;
    den /= g;
    num %= 8 * den;
    inv.central_charge_known = true;
    inv.c_num = num;
    inv.c_den = den;
  } else if (!inv.modular) {
    inv.notes.push_back("S is singular: the model is not modular, so c is not defined");
  } else {
    inv.notes.push_back("p_+/D is not a root of unity of small order in the field: c mod 8 not determined exactly");
  }
  if (inv.modular) {
    Matrix Si = S.inverse();
    inv.verlinde_ok = true;
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b)
        for (int c = 0; c < n; ++c) {
          Scalar s(F);
          for (int t = 0; t < n; ++t)
            s += S(static_cast<size_t>(a), static_cast<size_t>(t)) * S(static_cast<size_t>(b), static_cast<size_t>(t)) *
                 Si(static_cast<size_t>(t), static_cast<size_t>(c)) / S(0, static_cast<size_t>(t));
          ++inv.verlinde_checked;
          if (s != Scalar(F, m.fusion(a, b, c))) inv.verlinde_ok = false;
        }
  }
  if (inv.modular) {
    // Frobenius-Schur indicators a second way, from twists and dimensions (formula of Bantay 1997, common
    // practice for modular categories); must agree with the F-symbol values.
    for (int a = 0; a < n; ++a) {
      Scalar s(F);
      for (int b = 0; b < n; ++b)
        for (int c = 0; c < n; ++c)
          if (m.fusion(b, c, a)) {
            Scalar q = inv.twists[static_cast<size_t>(b)] / inv.twists[static_cast<size_t>(c)];
            s += Scalar(F, m.fusion(b, c, a)) * inv.dims[static_cast<size_t>(b)] * inv.dims[static_cast<size_t>(c)] * q * q;
          }
      s /= inv.global_dim2;
      if (s != Scalar(F, inv.fs[static_cast<size_t>(a)])) {
        inv.fs_twist_formula_ok = false;
        inv.notes.push_back(fmt::format("FS indicator of {} from the twist formula is {}, from F it is {}",
                                        m.labels[static_cast<size_t>(a)], s.str(), inv.fs[static_cast<size_t>(a)]));
      }
    }
  }
  inv.S = std::move(S);
  inv.T = std::move(T);
  return inv;
}

namespace {
using ojson = nlohmann::ordered_json;
ojson num(const Scalar& s, long digits) { return ojson{{"exact", s.str()}, {"ball", ball_of(s, digits)}}; }
ojson num_int(const FieldPtr& f, long v, long digits) { return num(Scalar(f, v), digits); }
}  // namespace

std::string invariants_json(const Model& m, const Invariants& inv, long digits) {
  const FieldPtr& F = m.field;
  ojson j;
  j["model"] = m.name;
  j["labels"] = m.labels;
  ojson dims = ojson::array();
  for (const Scalar& d : inv.dims) dims.push_back(num(d, digits));
  j["dimensions"] = dims;
  j["global_dimension_squared"] = num(inv.global_dim2, digits);
  j["global_dimension"] = num(inv.global_dim, digits);
  ojson fs = ojson::array();
  for (int v : inv.fs) fs.push_back(num_int(F, v, digits));
  j["fs_indicators"] = fs;
  ojson tw = ojson::array();
  for (const Scalar& t : inv.twists) tw.push_back(num(t, digits));
  j["twists"] = inv.braided ? tw : ojson(nullptr);
  auto mat = [&](const std::optional<Matrix>& M) {
    if (!M) return ojson(nullptr);
    ojson rows = ojson::array();
    for (size_t a = 0; a < M->rows(); ++a) {
      ojson row = ojson::array();
      for (size_t b = 0; b < M->cols(); ++b) row.push_back(num((*M)(a, b), digits));
      rows.push_back(row);
    }
    return rows;
  };
  j["S"] = mat(inv.S);
  j["T"] = mat(inv.T);
  if (inv.braided) {
    j["gauss_sum"] = num(inv.gauss_plus, digits);
    j["gauss_phase"] = num(inv.gauss_phase, digits);
  }
  if (inv.central_charge_known) {
    std::string exact = inv.c_den == 1 ? std::to_string(inv.c_num) : fmt::format("{}/{}", inv.c_num, inv.c_den);
    Scalar c(F, Cyclo(F->cyclotomic(), inv.c_num, inv.c_den));
    j["central_charge_mod8"] = ojson{{"exact", exact}, {"ball", ball_of(c, digits)}};
  } else {
    j["central_charge_mod8"] = nullptr;
  }
  j["modular"] = inv.modular;
  j["verlinde"] = ojson{{"ok", inv.verlinde_ok}, {"checked", inv.verlinde_checked}};
  if (inv.modular) j["fs_twist_formula_ok"] = inv.fs_twist_formula_ok;
  j["notes"] = inv.notes;
  return j.dump();
}

std::string invariants_text(const Model& m, const Invariants& inv, long digits) {
  std::string o = fmt::format("model {}: exact invariants (each enclosure is a rigorous ball)\n", printable(m.name));
  auto line = [&](const std::string& what, const Scalar& s) {
    o += fmt::format("  {:<24} {}\n  {:<24}   in {}\n", what, s.str(), "", ball_of(s, digits));
  };
  const int n = m.label_count();
  for (int a = 0; a < n; ++a) line("d_" + m.labels[a], inv.dims[static_cast<size_t>(a)]);
  line("D^2", inv.global_dim2);
  line("D", inv.global_dim);
  for (int a = 0; a < n; ++a) o += fmt::format("  {:<24} {}\n", "nu_" + m.labels[a] + " (FS indicator)", inv.fs[a]);
  if (inv.braided) {
    for (int a = 0; a < n; ++a) line("theta_" + m.labels[a], inv.twists[static_cast<size_t>(a)]);
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b)
        line(fmt::format("S[{},{}]", m.labels[a], m.labels[b]), (*inv.S)(static_cast<size_t>(a), static_cast<size_t>(b)));
    line("p_+ (Gauss sum)", inv.gauss_plus);
    line("p_+/D", inv.gauss_phase);
    o += fmt::format("  modular (S invertible)   {}\n", inv.modular ? "yes" : "no");
    if (inv.central_charge_known)
      o += fmt::format("  central charge mod 8     {}\n",
                       inv.c_den == 1 ? std::to_string(inv.c_num) : fmt::format("{}/{}", inv.c_num, inv.c_den));
    if (inv.modular)
      o += fmt::format("  Verlinde formula         {} ({} fusion coefficients compared exactly)\n",
                       inv.verlinde_ok ? "reproduces N" : "does NOT reproduce N", inv.verlinde_checked);
  }
  for (const std::string& s : inv.notes) o += "  note: " + s + "\n";
  return o;
}

}  // namespace zb
