// Built-in families (see families.hpp).
#include "zetabraid/model/families.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <functional>

#include "zetabraid/error.hpp"

namespace zb {

void mark_all_given(Model& m) {
  const int n = m.label_count();
  for (int a = 0; a < n; ++a)
    for (int b = 0; b < n; ++b)
      for (int c = 0; c < n; ++c)
        for (int d = 0; d < n; ++d)
          for (int e = 0; e < n; ++e) {
            if (!m.fusion(a, b, e) || !m.fusion(e, c, d)) continue;
            for (int f = 0; f < n; ++f)
              if (m.fusion(b, c, f) && m.fusion(a, f, d)) m.f_given.insert({a, b, c, d, e, f});
          }
  if (m.has_r)
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b)
        for (int c : m.channels(a, b)) m.r_given.insert({a, b, c});
}

namespace {

std::string spin_name(int twice) { return twice % 2 == 0 ? std::to_string(twice / 2) : fmt::format("{}/2", twice); }

// The quantum-integer arithmetic of SU(2)_k in Q(zeta_N), q = zeta^{N/(2(k+2))}.
struct QuantumIntegers {
  int k;
  FieldPtr F;
  CyclotomicFieldPtr K;
  std::vector<Cyclo> qint;   // [n], n = 0..2k+4
  std::vector<Cyclo> qfact;  // [n]!
  std::vector<Scalar> root;  // sqrt([n]) for n = 1..k+1
  QuantumIntegers(int level, FieldPtr f) : k(level), F(std::move(f)), K(F->cyclotomic()) {
    long step = static_cast<long>(K->conductor()) / (2 * (k + 2));
    Cyclo q = Cyclo::zeta_power(K, step), qi = Cyclo::zeta_power(K, -step);
    Cyclo den = q - qi;
    for (int n = 0; n <= 2 * k + 4; ++n) qint.push_back((q.pow(n) - qi.pow(n)) / den);
    qfact.push_back(Cyclo(K, 1));
    for (int n = 1; n <= 2 * k + 4; ++n) qfact.push_back(qfact.back() * qint[static_cast<size_t>(n)]);
  }
  // The exact square root of prod_n [n]^{e_n} (all [n] > 0 for 1 <= n <= k+1).
  Scalar sqrt_of(const std::vector<int>& e) {
    if (root.empty()) {
      root.push_back(Scalar(F, 1));  // unused index 0
      for (int n = 1; n <= k + 1; ++n) root.push_back(F->sqrt(qint[static_cast<size_t>(n)]));
    }
    Cyclo base(K, 1);
    Scalar rad(F, 1);
    for (int n = 2; n <= k + 1; ++n) {
      int x = e[static_cast<size_t>(n)];
      if (x == 0) continue;
      int h = x >= 0 ? x / 2 : -((-x + 1) / 2);  // floor(x/2)
      base *= qint[static_cast<size_t>(n)].pow(h);
      if (x - 2 * h) rad *= root[static_cast<size_t>(n)];
    }
    return Scalar(F, base) * rad;
  }
  void add_fact(std::vector<int>& e, int m, int sign) {
    if (m > k + 1) throw InternalError("quantum factorial beyond [k+1]! in a radicand");
    for (int n = 2; n <= m; ++n) e[static_cast<size_t>(n)] += sign;
  }
  // Delta^2(a,b,c) as exponents (arguments are twice the spins).
  void add_delta2(std::vector<int>& e, int a, int b, int c, int sign) {
    add_fact(e, (a + b - c) / 2, sign);
    add_fact(e, (a - b + c) / 2, sign);
    add_fact(e, (-a + b + c) / 2, sign);
    add_fact(e, (a + b + c) / 2 + 1, -sign);
  }
  Cyclo delta2(int a, int b, int c) {
    return qfact[static_cast<size_t>((a + b - c) / 2)] * qfact[static_cast<size_t>((a - b + c) / 2)] *
           qfact[static_cast<size_t>((-a + b + c) / 2)] / qfact[static_cast<size_t>((a + b + c) / 2 + 1)];
  }
  // The Racah sum of {a b e; c d f}_q (twice the spins).
  Cyclo racah_sum(int a, int b, int e, int c, int d, int f) {
    Cyclo s(K);
    int lo = std::max({a + b + e, e + c + d, b + c + f, a + f + d}) / 2;
    int hi = std::min({a + b + c + d, a + c + e + f, b + d + e + f}) / 2;
    for (int z = lo; z <= hi; ++z) {
      Cyclo den = qfact[static_cast<size_t>(z - (a + b + e) / 2)] * qfact[static_cast<size_t>(z - (e + c + d) / 2)] *
                  qfact[static_cast<size_t>(z - (b + c + f) / 2)] * qfact[static_cast<size_t>(z - (a + f + d) / 2)] *
                  qfact[static_cast<size_t>((a + b + c + d) / 2 - z)] *
                  qfact[static_cast<size_t>((a + c + e + f) / 2 - z)] *
                  qfact[static_cast<size_t>((b + d + e + f) / 2 - z)];
      Cyclo t = qfact[static_cast<size_t>(z + 1)] / den;
      if (z % 2) s -= t; else s += t;
    }
    return s;
  }
};

bool su2_fuses(int a, int b, int c, int k) {
  return std::abs(a - b) <= c && c <= a + b && (a + b + c) % 2 == 0 && a + b + c <= 2 * k;
}

}  // namespace

Model make_su2(int k, Su2Gauge gauge, bool even_only) {
  if (k < 1) throw InputError("SU(2)_k needs a level k >= 1");
  if (k > 40) throw ResourceError("SU(2)_k is limited to k <= 40");
  Model m;
  unsigned long conductor = static_cast<unsigned long>(even_only ? 2 * (k + 2) : 4 * (k + 2));
  m.field = Field::make(conductor);
  std::vector<int> spins;  // twice the spin of each label
  for (int j = 0; j <= k; ++j)
    if (!even_only || j % 2 == 0) spins.push_back(j);
  for (int j : spins) m.labels.push_back(spin_name(j));
  const int n = static_cast<int>(spins.size());
  m.init_fusion();
  for (int a = 0; a < n; ++a)
    for (int b = 0; b < n; ++b)
      for (int c = 0; c < n; ++c)
        if (su2_fuses(spins[a], spins[b], spins[c], k)) m.set_fusion(a, b, c, 1);
  std::string cmd = fmt::format("zetabraid model make su2 --level {}{}{}", k,
                                gauge == Su2Gauge::kCyclotomic ? " --gauge cyclotomic" : "", even_only ? " --even" : "");
  m.name = fmt::format("SU(2)_{}{}{}", k, even_only ? " integer spins" : "",
                       gauge == Su2Gauge::kCyclotomic ? " (cyclotomic gauge)" : "");
  m.source = fmt::format(
      "Generated by `{}`.\n"
      "Quantum 6j-symbols of Kirillov & Reshetikhin (1989), q = exp(pi i/(k+2)), [n] = (q^n - q^-n)/(q - q^-1):\n"
      "unitary gauge [F^{{j1 j2 j3}}_j]_{{j12 j23}} = (-1)^(j1+j2+j3+j) sqrt([2 j12+1][2 j23+1]) {{j1 j2 j12; j3 j j23}}_q"
      "{};\n"
      "R^{{j1 j2}}_j = (-1)^(j1+j2-j) q^(j(j+1) - j1(j1+1) - j2(j2+1)).",
      cmd,
      gauge == Su2Gauge::kCyclotomic
          ? ", then the gauge u^{ab}_c = 1/(Delta(a,b,c) sqrt([2c+1])), giving\n"
            "[F]_{ef} = (-1)^(a+b+c+d) [2f+1] Delta(b,c,f)^2 Delta(a,f,d)^2 (Racah sum) in Q(zeta)"
          : "");
  m.claims_unitary = gauge == Su2Gauge::kUnitary;
  m.has_r = true;
  QuantumIntegers Q(k, m.field);
  std::vector<int> ex(static_cast<size_t>(k) + 2);
  for (int ia = 0; ia < n; ++ia)
    for (int ib = 0; ib < n; ++ib)
      for (int ic = 0; ic < n; ++ic)
        for (int id = 0; id < n; ++id)
          for (int ie = 0; ie < n; ++ie) {
            int a = spins[ia], b = spins[ib], c = spins[ic], d = spins[id], e = spins[ie];
            if (!su2_fuses(a, b, e, k) || !su2_fuses(e, c, d, k)) continue;
            for (int iff = 0; iff < n; ++iff) {
              int f = spins[iff];
              if (!su2_fuses(b, c, f, k) || !su2_fuses(a, f, d, k)) continue;
              Cyclo sum = Q.racah_sum(a, b, e, c, d, f);
              bool neg = ((a + b + c + d) / 2) % 2 != 0;
              Scalar v(m.field);
              if (gauge == Su2Gauge::kUnitary) {
                std::fill(ex.begin(), ex.end(), 0);
                ex[static_cast<size_t>(e + 1)] += 1;
                ex[static_cast<size_t>(f + 1)] += 1;
                Q.add_delta2(ex, a, b, e, 1);
                Q.add_delta2(ex, e, c, d, 1);
                Q.add_delta2(ex, b, c, f, 1);
                Q.add_delta2(ex, a, f, d, 1);
                v = Q.sqrt_of(ex) * Scalar(m.field, sum);
              } else {
                v = Scalar(m.field, Q.qint[static_cast<size_t>(f + 1)] * Q.delta2(b, c, f) * Q.delta2(a, f, d) * sum);
              }
              if (neg) v = -v;
              m.f_given.insert({ia, ib, ic, id, ie, iff});
              if (!v.is_zero()) m.set_f_symbol(ia, ib, ic, id, ie, iff, v);
            }
          }
  long qstep = static_cast<long>(conductor) / (2 * (k + 2));  // q = zeta^qstep
  for (int ia = 0; ia < n; ++ia)
    for (int ib = 0; ib < n; ++ib)
      for (int ic : m.channels(ia, ib)) {
        int a = spins[ia], b = spins[ib], c = spins[ic];
        long x = static_cast<long>(c) * (c + 2) - static_cast<long>(a) * (a + 2) - static_cast<long>(b) * (b + 2);
        // q^(x/4) = zeta^(qstep x / 4); qstep x is divisible by 4 (see the parity argument in the docs).
        if ((qstep * x) % 4 != 0) throw InternalError("R-symbol exponent not in the field");
        Scalar r = Scalar::zeta_power(m.field, qstep * x / 4);
        if (((a + b - c) / 2) % 2) r = -r;
        m.r_given.insert({ia, ib, ic});
        m.set_r_symbol(ia, ib, ic, r);
      }
  return m;
}

namespace {

// An abelian model on a product of cyclic groups with trivial F and R^{ab}_{a+b} = zeta^{form(a, b)}.
Model make_abelian(const std::vector<int>& orders, const std::vector<std::string>& names, unsigned long conductor,
                   const std::function<long(const std::vector<int>&, const std::vector<int>&)>& form) {
  Model m;
  m.field = Field::make(conductor);
  m.labels = names;
  int n = static_cast<int>(names.size());
  auto digits = [&](int x) {
    std::vector<int> d;
    for (int o : orders) {
      d.push_back(x % o);
      x /= o;
    }
    return d;
  };
  auto index = [&](const std::vector<int>& d) {
    int x = 0, mult = 1;
    for (size_t i = 0; i < orders.size(); ++i) {
      x += d[i] * mult;
      mult *= orders[i];
    }
    return x;
  };
  auto add = [&](int a, int b) {
    auto da = digits(a), db = digits(b);
    for (size_t i = 0; i < orders.size(); ++i) da[i] = (da[i] + db[i]) % orders[i];
    return index(da);
  };
  m.init_fusion();
  for (int a = 0; a < n; ++a)
    for (int b = 0; b < n; ++b) m.set_fusion(a, b, add(a, b), 1);
  m.has_r = true;
  for (int a = 0; a < n; ++a)
    for (int b = 0; b < n; ++b)
      for (int c = 0; c < n; ++c) {
        int e = add(a, b), f = add(b, c), d = add(e, c);
        m.f_given.insert({a, b, c, d, e, f});
        m.set_f_symbol(a, b, c, d, e, f, Scalar(m.field, 1));
      }
  for (int a = 0; a < n; ++a)
    for (int b = 0; b < n; ++b) {
      m.r_given.insert({a, b, add(a, b)});
      m.set_r_symbol(a, b, add(a, b), Scalar::zeta_power(m.field, form(digits(a), digits(b))));
    }
  return m;
}

}  // namespace

Model make_cyclic(int order, int power) {
  if (order < 1) throw InputError("Z_N needs N >= 1");
  std::vector<std::string> names;
  for (int a = 0; a < order; ++a) names.push_back(std::to_string(a));
  Model m = make_abelian({order}, names, static_cast<unsigned long>(order),
                         [&](const std::vector<int>& a, const std::vector<int>& b) {
                           return static_cast<long>(power) * a[0] * b[0];
                         });
  m.name = fmt::format("Z_{} anyons, R^{{ab}} = exp(2 pi i {} a b/{})", order, power, order);
  m.source = fmt::format(
      "Generated by `zetabraid model make cyclic --order {} --power {}`.\n"
      "Abelian anyons on Z_{}: trivial F-symbols, R^{{ab}}_{{a+b}} = exp(2 pi i p a b/N) with p = {}; a bicharacter, so\n"
      "both hexagons hold with trivial F (common practice for abelian anyons).",
      order, power, order, power);
  m.claims_unitary = true;
  return m;
}

Model make_toric_code() {
  Model m = make_abelian({2, 2}, {"1", "e", "m", "f"}, 2,
                         [](const std::vector<int>& a, const std::vector<int>& b) { return static_cast<long>(a[0] * b[1]); });
  m.name = "Toric code";
  m.source =
      "Generated by `zetabraid model make toric-code`.\n"
      "Z_2 x Z_2 anyons e = (1,0), m = (0,1), f = e x m (Kitaev, Ann. Phys. 303 (2003) 2): trivial F-symbols and\n"
      "R^{ab} = (-1)^(a_e b_m), so theta_e = theta_m = 1, theta_f = -1 and the e-m monodromy is -1.";
  m.claims_unitary = true;
  return m;
}

Model make_three_fermion() {
  Model m = make_abelian({2, 2}, {"1", "f1", "f2", "f3"}, 2, [](const std::vector<int>& a, const std::vector<int>& b) {
    return static_cast<long>(a[0] * b[0] + a[0] * b[1] + a[1] * b[1]);
  });
  m.name = "Three-fermion model";
  m.source =
      "Generated by `zetabraid model make three-fermion`.\n"
      "Z_2 x Z_2 anyons f1 = (1,0), f2 = (0,1), f3 = (1,1): trivial F-symbols and R^{ab} = (-1)^(a1 b1 + a1 b2 + a2 b2),\n"
      "so every nontrivial anyon has twist -1 and each pair has monodromy -1 (common practice: the SO(8)_1-type model).";
  m.claims_unitary = true;
  return m;
}

}  // namespace zb
