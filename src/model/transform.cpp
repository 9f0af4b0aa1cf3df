// Gauge transformations, relabellings, mirrors and the move into a common field (model/transform.hpp).
#include "zetabraid/model/transform.hpp"

#include <fmt/format.h>

#include <numeric>
#include <random>
#include <set>

#include "zetabraid/detail/raii.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/io/input_file.hpp"
#include "zetabraid/linalg/matrix.hpp"

namespace zb {

namespace {

// A copy of m's header (name, source, unitarity claim, R present) over field f, with labels permuted by perm
// (old i -> new perm[i]) and named `names` (by new index); fusion rules carried over; no F or R yet.
Model empty_copy(const Model& m, const FieldPtr& f, const std::vector<int>& perm, const std::vector<std::string>& names) {
  Model out;
  out.name = m.name;
  out.source = m.source;
  out.field = f;
  out.labels = names;
  out.claims_unitary = m.claims_unitary;
  out.has_r = m.has_r;
  out.init_fusion();
  const int n = m.label_count();
  for (int a = 0; a < n; ++a)
    for (int b = 0; b < n; ++b)
      for (int c = 0; c < n; ++c)
        if (int k = m.fusion(a, b, c)) out.set_fusion(perm[a], perm[b], perm[c], k);
  return out;
}

std::vector<int> identity(int n) {
  std::vector<int> p(static_cast<size_t>(n));
  std::iota(p.begin(), p.end(), 0);
  return p;
}

// Every F entry and R-symbol of m (stored or given) mapped by perm and valued by fv / rv (keys in m's labels).
template <class FV, class RV>
Model map_model(const Model& m, const FieldPtr& f, const std::vector<int>& perm, const std::vector<std::string>& names,
                FV fv, RV rv) {
  Model out = empty_copy(m, f, perm, names);
  auto P = [&](int x) { return perm[static_cast<size_t>(x)]; };
  for (const auto& k : m.f_given) out.f_given.insert({P(k[0]), P(k[1]), P(k[2]), P(k[3]), P(k[4]), P(k[5])});
  for (const auto& k : m.r_given) out.r_given.insert({P(k[0]), P(k[1]), P(k[2])});
  for (const auto& [k, v] : m.f_symbols()) {
    Scalar w = fv(k, v);
    if (!w.is_zero()) out.set_f_symbol(P(k[0]), P(k[1]), P(k[2]), P(k[3]), P(k[4]), P(k[5]), std::move(w));
  }
  for (const auto& [k, v] : m.r_symbols()) {
    Scalar w = rv(k, v);
    if (!w.is_zero()) out.set_r_symbol(P(k[0]), P(k[1]), P(k[2]), std::move(w));
  }
  return out;
}

// zeta_N -> zeta_M^(M/N) on one element of Q(zeta_N).
Cyclo move_cyclo(const Cyclo& c, const CyclotomicFieldPtr& to, unsigned long step) {
  FmpqPolyT p, q;
  c.get_poly(p.get());
  const long len = fmpq_poly_length(p.get());
  FmpzT num;
  fmpq_poly_fit_length(q.get(), len == 0 ? 1 : (len - 1) * static_cast<long>(step) + 1);
  for (long i = 0; i < len; ++i) {
    FmpqT coef;
    fmpq_poly_get_coeff_fmpq(coef.get(), p.get(), i);
    fmpq_poly_set_coeff_fmpq(q.get(), i * static_cast<long>(step), coef.get());
  }
  return Cyclo::from_poly(to, q.get());
}

}  // namespace

Model apply_gauge(const Model& m, const Gauge& u) {
  auto U = [&](int a, int b, int c) -> Scalar {
    auto it = u.find({a, b, c});
    if (it == u.end()) return Scalar(m.field, 1);
    if (it->second.is_zero()) throw MathError(fmt::format("gauge factor u^{{{} {}}}_{} is zero", a, b, c));
    return it->second;
  };
  const int n = m.label_count();
  // A unitary gauge (every |u| = 1) keeps F unitary and |R| = 1; any other drops the unitarity claim.
  bool unitary = true;
  for (const auto& [v, x] : u) unitary = unitary && x.abs2().is_one();
  Model out = map_model(
      m, m.field, identity(n), m.labels,
      [&](const std::array<int, 6>& k, const Scalar& v) {
        const int a = k[0], b = k[1], c = k[2], d = k[3], e = k[4], f = k[5];
        return v * U(a, b, e) * U(e, c, d) / (U(b, c, f) * U(a, f, d));
      },
      [&](const std::array<int, 3>& k, const Scalar& v) { return v * U(k[0], k[1], k[2]) / U(k[1], k[0], k[2]); });
  out.claims_unitary = m.claims_unitary && unitary;
  return out;
}

Gauge random_gauge(const Model& m, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  const long N = static_cast<long>(m.field->conductor());
  Gauge g;
  const int n = m.label_count();
  for (int a = 1; a < n; ++a)
    for (int b = 1; b < n; ++b)
      for (int c : m.channels(a, b)) {
        long p = 1 + static_cast<long>(rng() % 5), q = 1 + static_cast<long>(rng() % 5);
        long sign = (rng() & 1) ? 1 : -1, k = static_cast<long>(rng() % static_cast<std::uint64_t>(N));
        Cyclo v = Cyclo::zeta_power(m.field->cyclotomic(), k) * Cyclo(m.field->cyclotomic(), sign * p, q);
        g.insert_or_assign({a, b, c}, Scalar(m.field, v));
      }
  return g;
}

Model relabel_model(const Model& m, const std::vector<int>& perm, const std::vector<std::string>& names) {
  const int n = m.label_count();
  if (static_cast<int>(perm.size()) != n || static_cast<int>(names.size()) != n)
    throw MathError("relabel_model: the permutation and the names must have one entry per label");
  std::vector<int> seen(static_cast<size_t>(n), 0);
  for (int p : perm) {
    if (p < 0 || p >= n || seen[static_cast<size_t>(p)]++) throw MathError("relabel_model: not a permutation");
  }
  if (perm[0] != 0) throw MathError("relabel_model: the unit must stay label 0");
  auto same = [](const auto&, const Scalar& v) { return v; };
  return map_model(m, m.field, perm, names, same, same);
}

void parse_relabeling(const Model& m, const std::string& spec, std::vector<int>* perm, std::vector<std::string>* names) {
  const int n = m.label_count();
  std::vector<std::string> newname = m.labels;
  std::set<int> renamed;
  size_t pos = 0;
  while (pos <= spec.size()) {
    size_t comma = spec.find(',', pos);
    std::string item = spec.substr(pos, comma == std::string::npos ? std::string::npos : comma - pos);
    pos = comma == std::string::npos ? spec.size() + 1 : comma + 1;
    auto trim = [](std::string s) {
      while (!s.empty() && s.front() == ' ') s.erase(s.begin());
      while (!s.empty() && s.back() == ' ') s.pop_back();
      return s;
    };
    item = trim(item);
    if (item.empty()) continue;
    size_t colon = item.find(':');
    if (colon == std::string::npos)
      throw InputError(fmt::format("--relabel: expected old:new, found \"{}\"", printable(item)));
    std::string from = trim(item.substr(0, colon)), to = trim(item.substr(colon + 1));
    int a = m.label_index(from);
    if (a < 0) throw InputError(fmt::format("--relabel: unknown label \"{}\"", printable(from)));
    if (to.empty() || to.find_first_of(" \t\"\\") != std::string::npos)
      throw InputError(fmt::format("--relabel: bad new name \"{}\" for {}", printable(to), printable(from)));
    if (!renamed.insert(a).second) throw InputError(fmt::format("--relabel: label \"{}\" given twice", printable(from)));
    newname[static_cast<size_t>(a)] = to;
  }
  if (std::set<std::string>(newname.begin(), newname.end()).size() != newname.size())
    throw InputError("--relabel: two labels would get the same name");
  std::vector<int> p = identity(n);
  if (std::set<std::string>(newname.begin(), newname.end()) == std::set<std::string>(m.labels.begin(), m.labels.end())) {
    for (int a = 0; a < n; ++a) p[static_cast<size_t>(a)] = m.label_index(newname[static_cast<size_t>(a)]);
    if (p[0] != 0) throw InputError("--relabel: the unit must keep its name (it stays the first label)");
  }
  std::vector<std::string> nm(static_cast<size_t>(n));
  for (int a = 0; a < n; ++a) nm[static_cast<size_t>(p[static_cast<size_t>(a)])] = newname[static_cast<size_t>(a)];
  *perm = p;
  *names = nm;
}

Model mirror_model(const Model& m) {
  auto conj = [](const auto&, const Scalar& v) { return v.conj(); };
  Model out = map_model(m, m.field, identity(m.label_count()), m.labels, conj, conj);
  out.name = "mirror of " + m.name;
  return out;
}

Model galois_model(const Model& m, long k, RadicalMask signs) {
  const unsigned long N = m.field->conductor();
  const long n = static_cast<long>(N);
  const long km = ((k % n) + n) % n;
  if (std::gcd(km, n) != 1 && N != 1)
    throw MathError(fmt::format("galois_model: k = {} is not prime to the conductor {}", k, N));
  const int nrad = m.field->radicand_count();
  if (nrad < 64 && (signs >> nrad) != 0)
    throw MathError(fmt::format("galois_model: sign mask {} has bits past the {} radicands", signs, nrad));
  // sigma_k(d_j) is real; a negative one needs i for its principal root.
  bool negative = false;
  for (int j = 0; j < nrad; ++j) negative = negative || m.field->conjugate_radicand(j, km).sign < 0;
  const unsigned long M = negative && N % 4 != 0 ? std::lcm(N, 4UL) : N;
  const unsigned long step = M / N;
  FieldPtr to = Field::make(M);
  auto image = [&](const Cyclo& c) { return move_cyclo(N == 1 ? c : c.galois(km), to->cyclotomic(), step); };
  std::vector<Scalar> roots;
  for (int j = 0; j < nrad; ++j) {
    Scalar r = to->sqrt(image(m.field->radicand(j)));
    roots.push_back(signs & (RadicalMask(1) << j) ? -r : r);
  }
  std::map<RadicalMask, Scalar> products;
  auto product = [&](RadicalMask s) -> const Scalar& {
    auto it = products.find(s);
    if (it != products.end()) return it->second;
    Scalar p(to, 1);
    for (int j = 0; j < nrad; ++j)
      if (s & (RadicalMask(1) << j)) p *= roots[static_cast<size_t>(j)];
    return products.emplace(s, std::move(p)).first->second;
  };
  auto map = [&](const auto&, const Scalar& v) {
    Scalar out(to);
    for (const auto& [s, c] : v.terms()) out += Scalar(to, image(c)) * product(s);
    return out;
  };
  Model out = map_model(m, to, identity(m.label_count()), m.labels, map, map);
  out.name = fmt::format("Galois conjugate (k = {}, signs = {}) of {}", km, signs, m.name);
  out.claims_unitary = m.claims_unitary && signs == 0 && (km == 1 || km == n - 1);
  return out;
}

namespace {

// Every square F block replaced by op(block) (rows e, columns f in ascending order); R unchanged.
template <class Op>
Model map_f_blocks(const Model& m, Op op, const char* what) {
  Model out = m;
  out.clear_symbols();
  out.claims_unitary = false;
  m.for_each_f_block([&](const Model::FBlock& b) {
    const size_t n = b.rows.size();
    if (b.cols.size() != n)
      throw MathError(fmt::format("{}: the block F^{{{} {} {}}}_{} is not square", what, b.a, b.b, b.c, b.d));
    Matrix x(m.field, n, n);
    for (size_t i = 0; i < n; ++i)
      for (size_t j = 0; j < n; ++j)
        if (const Scalar* v = m.f_symbol(b.a, b.b, b.c, b.d, b.rows[i], b.cols[j])) x(i, j) = *v;
    Matrix y = op(x);
    for (size_t i = 0; i < n; ++i)
      for (size_t j = 0; j < n; ++j) {
        out.f_given.insert({b.a, b.b, b.c, b.d, b.rows[i], b.cols[j]});
        if (!y(i, j).is_zero()) out.set_f_symbol(b.a, b.b, b.c, b.d, b.rows[i], b.cols[j], y(i, j));
      }
  });
  out.r_given = m.r_given;
  out.r_line = m.r_line;
  for (const auto& [k, v] : m.r_symbols()) out.set_r_symbol(k[0], k[1], k[2], v);
  return out;
}

}  // namespace

Model invert_f_blocks(const Model& m) {
  return map_f_blocks(m, [](const Matrix& x) { return x.inverse(); }, "invert_f_blocks");
}

Model transpose_f_blocks(const Model& m) {
  return map_f_blocks(m, [](const Matrix& x) { return x.transpose(); }, "transpose_f_blocks");
}

FieldPtr common_field(const Model& a, const Model& b) {
  const unsigned long M = std::lcm(a.field->conductor(), b.field->conductor());
  FieldPtr f = Field::make(M);
  for (const Model* m : {&a, &b}) {
    const unsigned long step = M / m->field->conductor();
    for (int j = 0; j < m->field->radicand_count(); ++j) f->sqrt(move_cyclo(m->field->radicand(j), f->cyclotomic(), step));
  }
  return f;
}

Model move_to_field(const Model& m, const FieldPtr& to) {
  const unsigned long N = m.field->conductor(), M = to->conductor();
  if (M % N != 0) throw MathError(fmt::format("move_to_field: Q(zeta_{}) is not contained in Q(zeta_{})", N, M));
  const unsigned long step = M / N;
  std::vector<Scalar> roots;
  for (int j = 0; j < m.field->radicand_count(); ++j)
    roots.push_back(to->sqrt(move_cyclo(m.field->radicand(j), to->cyclotomic(), step)));
  std::map<RadicalMask, Scalar> products;
  auto product = [&](RadicalMask s) -> const Scalar& {
    auto it = products.find(s);
    if (it != products.end()) return it->second;
    Scalar p(to, 1);
    for (int j = 0; j < static_cast<int>(roots.size()); ++j)
      if (s & (RadicalMask(1) << j)) p *= roots[static_cast<size_t>(j)];
    return products.emplace(s, std::move(p)).first->second;
  };
  auto mv = [&](const auto&, const Scalar& v) {
    Scalar out(to);
    for (const auto& [s, c] : v.terms()) out += Scalar(to, move_cyclo(c, to->cyclotomic(), step)) * product(s);
    return out;
  };
  Model out = map_model(m, to, identity(m.label_count()), m.labels, mv, mv);
  out.source_sha256 = m.source_sha256;
  return out;
}

}  // namespace zb
