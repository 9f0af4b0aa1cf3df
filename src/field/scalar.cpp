#include "zetabraid/field/scalar.hpp"

#include <fmt/format.h>

#include <bit>

#include "zetabraid/error.hpp"
#include "zetabraid/field/square_test.hpp"

namespace zb {

// ---------------- Field ----------------

FieldPtr Field::make(unsigned long conductor) { return make(CyclotomicField::make(conductor)); }
FieldPtr Field::make(CyclotomicFieldPtr k) {
  FieldPtr f(new Field(std::move(k)));
  f->witnesses_ = std::make_unique<WitnessList>(f->k_->conductor());
  return f;
}

const std::vector<signed char>& Field::radicand_symbols(int j, size_t count) {
  if (symbols_.size() < radicands_.size()) symbols_.resize(radicands_.size());
  auto& v = symbols_[static_cast<size_t>(j)];
  while (v.size() < count) v.push_back(static_cast<signed char>(legendre_at(radicands_[static_cast<size_t>(j)], witnesses_->at(v.size()))));
  return v;
}

const Cyclo& Field::radicand_product(RadicalMask s) const {
  std::lock_guard<std::mutex> lock(mu_);
  auto it = products_.find(s);
  if (it != products_.end()) return it->second;
  Cyclo p(k_, 1);
  for (int j = 0; j < radicand_count(); ++j)
    if (s & (RadicalMask{1} << j)) p *= radicands_[static_cast<size_t>(j)];
  return products_.emplace(s, std::move(p)).first->second;
}

const Field::Conjugate& Field::conjugate_radicand(int j, long a) const {
  const long n = static_cast<long>(conductor());
  const long am = ((a % n) + n) % n;
  std::lock_guard<std::mutex> lock(mu_);
  auto it = conjugates_.find({j, am});
  if (it != conjugates_.end()) return it->second;
  Cyclo v = radicands_.at(static_cast<size_t>(j)).galois(am);
  int sign = v.real_sign();
  return conjugates_.emplace(std::make_pair(j, am), Conjugate{std::move(v), sign}).first->second;
}

bool Field::sqrt_in_base(const Cyclo& x, Cyclo* root) {
  WitnessList w(x.field()->conductor());
  SquareAnswer a = decide_square(x, w);
  if (!a.is_square) return false;
  Cyclo r = *a.root;
  if (r.is_real() && r.real_sign() < 0) r = -r;
  if (root) *root = r;
  return true;
}

namespace {

// Legendre-symbol vectors over F_2 (bit set = non-residue) of elements at a common list of witnesses.
struct BitVec {
  std::vector<std::uint8_t> b;
  bool zero_somewhere = false;
};

// Re-reads a cached coefficient string (produced by Cyclo::str) in x's field.
Cyclo parse_cyclo_cached(const std::string& s, const Cyclo& like) {
  // Cached results are stored as power-basis coefficient lists "c0;c1;..." to avoid re-parsing expressions.
  fmpq_poly_t p;
  fmpq_poly_init(p);
  fmpq_t q;
  fmpq_init(q);
  size_t start = 0;
  long k = 0;
  while (start <= s.size()) {
    size_t end = s.find(';', start);
    if (end == std::string::npos) end = s.size();
    std::string part = s.substr(start, end - start);
    if (!part.empty()) {
      fmpq_set_str(q, part.c_str(), 10);
      fmpq_poly_set_coeff_fmpq(p, k, q);
    }
    ++k;
    start = end + 1;
  }
  Cyclo c = Cyclo::from_poly(like.field(), p);
  fmpq_clear(q);
  fmpq_poly_clear(p);
  return c;
}

std::string coeff_string(const Cyclo& c) {
  fmpq_poly_t p;
  fmpq_poly_init(p);
  c.get_poly(p);
  fmpq_t q;
  fmpq_init(q);
  std::string s;
  for (long k = 0; k < fmpq_poly_length(p); ++k) {
    fmpq_poly_get_coeff_fmpq(q, p, k);
    char* cs = fmpq_get_str(nullptr, 10, q);
    s += (k ? ";" : "") + std::string(cs);
    flint_free(cs);
  }
  fmpq_clear(q);
  fmpq_poly_clear(p);
  return s;
}

// Solves target = sum_{j in S} vecs[j] over F_2.
struct F2Solution {
  enum Kind { kOutsideSpan, kInSpan, kDegenerate } kind = kDegenerate;
  RadicalMask subset = 0;
};

F2Solution solve_f2(const std::vector<BitVec>& vecs, const BitVec& target) {
  size_t m = vecs.size(), n = target.b.size();
  std::vector<std::vector<std::uint8_t>> rows;
  std::vector<RadicalMask> tags;
  std::vector<size_t> pivots;
  for (size_t j = 0; j < m; ++j) {
    std::vector<std::uint8_t> r = vecs[j].b;
    RadicalMask tag = RadicalMask{1} << j;
    for (size_t k = 0; k < rows.size(); ++k)
      if (r[pivots[k]]) {
        for (size_t c = 0; c < n; ++c) r[c] ^= rows[k][c];
        tag ^= tags[k];
      }
    size_t piv = n;
    for (size_t c = 0; c < n; ++c)
      if (r[c]) { piv = c; break; }
    if (piv == n) return {};  // the radicands' vectors are dependent at this length
    rows.push_back(r);
    tags.push_back(tag);
    pivots.push_back(piv);
  }
  std::vector<std::uint8_t> t = target.b;
  RadicalMask s = 0;
  for (size_t k = 0; k < rows.size(); ++k)
    if (t[pivots[k]]) {
      for (size_t c = 0; c < n; ++c) t[c] ^= rows[k][c];
      s ^= tags[k];
    }
  for (size_t c = 0; c < n; ++c)
    if (t[c]) return {F2Solution::kOutsideSpan, 0};
  return {F2Solution::kInSpan, s};
}

}  // namespace

Scalar Field::sqrt(const Cyclo& x) {
  auto self = shared_from_this();
  if (x.is_zero()) return Scalar(self);
  if (!x.is_real())
    throw InputError("sqrt(...) needs a real radicand; " + abbreviate(x.str()) + " is not real under zeta -> exp(2*pi*i/N)");
  if (x.real_sign() < 0) {
    // u = (zeta - zeta^-1)^2 = -4 sin^2(2 pi/N) < 0 and zeta - zeta^-1 = i * 2 sin(2 pi/N): the principal root.
    if (k_->conductor() < 3)
      throw InputError("sqrt of the negative number " + abbreviate(x.str()) + " is not real; Q(zeta_N) needs N >= 3 for it "
                       "(e.g. conductor 4, where i lies)");
    Cyclo s0 = Cyclo::zeta_power(k_, 1) - Cyclo::zeta_power(k_, -1);
    return Scalar(self, s0) * sqrt(x / (s0 * s0));
  }
  std::lock_guard<std::mutex> guard(grow_mu_);
  std::string key = coeff_string(x);
  auto hit = sqrt_cache_.find(key);
  if (hit != sqrt_cache_.end()) {
    Scalar r(self);
    for (const auto& [m, c] : hit->second) r += Scalar::monomial(self, parse_cyclo_cached(c, x), m);
    return r;
  }
  Scalar r = sqrt_uncached(x);
  std::vector<std::pair<RadicalMask, std::string>> terms;
  for (const auto& [m, c] : r.terms()) terms.emplace_back(m, coeff_string(c));
  sqrt_cache_.emplace(key, std::move(terms));
  return r;
}

Scalar Field::sqrt_uncached(const Cyclo& x) {
  auto self = shared_from_this();
  WitnessList& wl = *witnesses_;
  // Legendre vectors at degree-one primes. Positions where any symbol is 0 are dropped for everyone, so at every
  // kept position the symbols are multiplicative: ( x d_S | P ) = ( x | P ) prod_{j in S} ( d_j | P ).
  for (size_t count = 64; count <= 4096; count *= 2) {
    std::vector<BitVec> vecs(radicands_.size());
    std::vector<std::uint8_t> keep(count, 1);
    for (int j = 0; j < radicand_count(); ++j) {
      const auto& sym = radicand_symbols(j, count);
      auto& v = vecs[static_cast<size_t>(j)].b;
      v.resize(count);
      for (size_t i = 0; i < count; ++i) {
        v[i] = sym[i] == -1;
        if (sym[i] == 0) keep[i] = 0;
      }
    }
    BitVec tv;
    tv.b.resize(count);
    for (size_t i = 0; i < count; ++i) {
      int l = legendre_at(x, wl.at(i));
      tv.b[i] = l == -1;
      if (l == 0) keep[i] = 0;
    }
    for (size_t i = 0; i < count; ++i)
      if (!keep[i]) {
        tv.b[i] = 0;
        for (BitVec& v : vecs) v.b[i] = 0;
      }
    F2Solution sol = solve_f2(vecs, tv);
    if (sol.kind == F2Solution::kDegenerate) continue;  // too few witnesses to separate the radicands
    if (sol.kind == F2Solution::kOutsideSpan) {
      // For every subset S, x d_S is a non-residue at some kept witness: no x d_S is a square. Adjoin x.
      if (frozen_)
        throw InputError("sqrt(" + abbreviate(x.str()) + ") is not in the declared field: add it to the radicands");
      if (radicand_count() >= kMaxRadicands)
        throw ResourceError(fmt::format("more than {} independent square roots requested", kMaxRadicands));
      radicands_.push_back(x);
      return Scalar::monomial(self, Cyclo(k_, 1), RadicalMask{1} << (radicand_count() - 1));
    }
    // x * d_S looks like a square: find its root exactly (verified by squaring), else look further.
    Cyclo dS(k_, 1);
    for (int j = 0; j < radicand_count(); ++j)
      if (sol.subset & (RadicalMask{1} << j)) dS *= radicands_[static_cast<size_t>(j)];
    Cyclo r(k_);
    if (sqrt_in_base(x * dS, &r)) {
      // sqrt(x) = r / sqrt(d_S) = (r / d_S) * sqrt(d_S), with r > 0 so the result is the positive root.
      return Scalar::monomial(self, r / dS, sol.subset);
    }
  }
  throw ResourceError("could not decide whether sqrt(" + abbreviate(x.str()) + ") is independent of the existing radicals");
}

// ---------------- Scalar ----------------

Scalar::Scalar(FieldPtr f) : f_(std::move(f)) {}
Scalar::Scalar(FieldPtr f, long v) : f_(std::move(f)) {
  if (v != 0) t_.emplace(0, Cyclo(f_->cyclotomic(), v));
}
Scalar::Scalar(FieldPtr f, const Cyclo& c) : f_(std::move(f)) {
  if (!c.is_zero()) t_.emplace(0, c);
}
Scalar Scalar::zeta_power(FieldPtr f, long e) {
  Cyclo z = Cyclo::zeta_power(f->cyclotomic(), e);
  return Scalar(std::move(f), z);
}
Scalar Scalar::monomial(FieldPtr f, const Cyclo& c, RadicalMask s) {
  Scalar r(std::move(f));
  if (!c.is_zero()) r.t_.emplace(s, c);
  return r;
}

void Scalar::check_same(const Scalar& o) const {
  if (f_ != o.f_) throw MathError("mixing numbers from two different fields");
}

Scalar& Scalar::operator+=(const Scalar& o) {
  check_same(o);
  for (const auto& [m, c] : o.t_) {
    auto it = t_.find(m);
    if (it == t_.end()) {
      t_.emplace(m, c);
    } else {
      it->second += c;
      if (it->second.is_zero()) t_.erase(it);
    }
  }
  return *this;
}
Scalar& Scalar::operator-=(const Scalar& o) {
  check_same(o);
  for (const auto& [m, c] : o.t_) {
    auto it = t_.find(m);
    if (it == t_.end()) {
      t_.emplace(m, -c);
    } else {
      it->second -= c;
      if (it->second.is_zero()) t_.erase(it);
    }
  }
  return *this;
}
Scalar Scalar::operator-() const {
  Scalar r(f_);
  for (const auto& [m, c] : t_) r.t_.emplace(m, -c);
  return r;
}

Scalar operator*(const Scalar& a, const Scalar& b) {
  a.check_same(b);
  Scalar r(a.f_);
  if (a.t_.size() == 1 && a.t_.begin()->first == 0 && a.t_.begin()->second.is_one()) return b;
  if (b.t_.size() == 1 && b.t_.begin()->first == 0 && b.t_.begin()->second.is_one()) return a;
  if (a.t_.size() * b.t_.size() > Scalar::kMaxTermProducts)
    throw ResourceError(fmt::format("a product of values with {} and {} square-root terms exceeds the limit of {} "
                                    "term products",
                                    a.t_.size(), b.t_.size(), Scalar::kMaxTermProducts));
  for (const auto& [ma, ca] : a.t_)
    for (const auto& [mb, cb] : b.t_) {
      Cyclo c = ca * cb;
      RadicalMask common = ma & mb;
      if (common) c *= a.f_->radicand_product(common);
      RadicalMask m = ma ^ mb;
      auto it = r.t_.find(m);
      if (it == r.t_.end()) {
        r.t_.emplace(m, std::move(c));
      } else {
        it->second += c;
        if (it->second.is_zero()) r.t_.erase(it);
      }
    }
  if (r.t_.size() > Scalar::kMaxTerms)
    throw ResourceError(fmt::format("a value with {} square-root terms exceeds the limit of {} terms", r.t_.size(),
                                    Scalar::kMaxTerms));
  return r;
}
Scalar& Scalar::operator*=(const Scalar& o) { return *this = *this * o; }
Scalar& Scalar::operator/=(const Scalar& o) { return *this = *this * o.inverse(); }

bool operator==(const Scalar& a, const Scalar& b) {
  a.check_same(b);
  if (a.t_.size() != b.t_.size()) return false;
  for (auto ia = a.t_.begin(), ib = b.t_.begin(); ia != a.t_.end(); ++ia, ++ib)
    if (ia->first != ib->first || ia->second != ib->second) return false;
  return true;
}

Scalar Scalar::flip(RadicalMask s) const {
  Scalar r(f_);
  for (const auto& [m, c] : t_) r.t_.emplace(m, (std::popcount(m & s) & 1) ? -c : c);
  return r;
}

Scalar Scalar::inverse() const {
  if (is_zero()) throw MathError("division by zero");
  if (in_base()) return Scalar(f_, base_part().inverse());
  RadicalMask all = 0;
  for (const auto& [m, c] : t_) all |= m;
  RadicalMask top = RadicalMask{1} << (63 - std::countl_zero(all));
  Scalar other = flip(top);
  Scalar y = *this * other;  // fixed by the flip, so free of sqrt(d_top)
  return other * y.inverse();
}

Scalar Scalar::pow(long e) const {
  if (e < 0) return inverse().pow(-e);
  Scalar r(f_, 1), b = *this;
  while (e) {
    if (e & 1) r = r * b;
    e >>= 1;
    if (e) b = b * b;
  }
  return r;
}

Scalar Scalar::conj() const {
  Scalar r(f_);
  for (const auto& [m, c] : t_) r.t_.emplace(m, c.conj());
  return r;
}

long Scalar::size_bits() const {
  long b = 0;
  for (const auto& [m, c] : t_) b += c.size().total;
  return b;
}

bool Scalar::is_one() const { return t_.size() == 1 && t_.begin()->first == 0 && t_.begin()->second.is_one(); }
bool Scalar::in_base() const { return t_.empty() || (t_.size() == 1 && t_.begin()->first == 0); }
const Cyclo& Scalar::base_part() const {
  static thread_local std::map<const CyclotomicField*, Cyclo> zeros;
  auto it = t_.find(0);
  if (it != t_.end()) return it->second;
  auto z = zeros.find(f_->cyclotomic().get());
  if (z == zeros.end()) z = zeros.emplace(f_->cyclotomic().get(), Cyclo(f_->cyclotomic())).first;
  return z->second;
}
Cyclo Scalar::to_base() const {
  if (!in_base()) throw MathError("number " + str() + " is not in Q(zeta_N)");
  return base_part();
}

int Scalar::real_sign() const {
  if (!is_real()) throw MathError("sign requested of a non-real number " + str());
  if (is_zero()) return 0;
  if (in_base()) return base_part().real_sign();
  return sign_of_nonzero_real([this](acb_t b, long prec) { ball(b, prec); }, str());
}

std::string Scalar::str() const {
  return str([this](int j) { return "sqrt(" + f_->radicand(j).str() + ")"; });
}

std::string Scalar::str(const std::function<std::string(int)>& radical_name) const {
  if (t_.empty()) return "0";
  std::string s;
  for (const auto& [m, c] : t_) {
    std::string cs = c.str();
    std::string term;
    if (m == 0) {
      term = cs;
    } else {
      std::string rad;
      for (int j = 0; j < 64; ++j)
        if (m & (RadicalMask{1} << j)) rad += (rad.empty() ? "" : "*") + radical_name(j);
      if (cs == "1")
        term = rad;
      else if (cs == "-1")
        term = "-" + rad;
      else if (cs.find(' ') != std::string::npos)
        term = "(" + cs + ")*" + rad;
      else
        term = cs + "*" + rad;
    }
    if (s.empty())
      s = term;
    else if (term[0] == '-')
      s += " - " + term.substr(1);
    else
      s += " + " + term;
  }
  return s;
}

void Scalar::ball(acb_t out, long prec) const { ball_at(out, prec, 1, 0); }

void Scalar::ball_at(acb_t out, long prec, long a, RadicalMask signs) const {
  acb_zero(out);
  if (t_.empty()) return;
  const long n = static_cast<long>(f_->conductor());
  const bool identity = ((a % n) + n) % n == 1 % n && signs == 0;
  // Under the standard embedding a real (or purely imaginary) value gets an exactly zero imaginary (real) part.
  const bool real = identity && is_real(), imaginary = identity && !real && conj() == -*this;  // exact
  std::map<RadicalMask, Cyclo> img;  // sigma_a(c_S)
  if (!identity)
    for (const auto& [m, cf] : t_) img.emplace(m, cf.galois(a));
  const std::map<RadicalMask, Cyclo>& terms = identity ? t_ : img;
  // sigma_a(d_j) is real (d_j lies in the real subfield); its sign is decided exactly (d_j itself is > 0)
  std::vector<const Cyclo*> rad;
  std::vector<int> sign;
  for (int j = 0; j < f_->radicand_count(); ++j) {
    if (identity) {
      rad.push_back(&f_->radicand(j));
      sign.push_back(1);
    } else {
      const Field::Conjugate& c = f_->conjugate_radicand(j, a);
      rad.push_back(&c.value);
      sign.push_back(c.sign);
    }
  }
  acb_t c, r;
  acb_init(c);
  acb_init(r);
  arb_t sq;
  arb_init(sq);
  // Terms of different radical masks can cancel: the working precision doubles until the (nonzero) sum has prec
  // correct relative bits (each term is itself evaluated to wp relative bits).
  for (long wp = prec + 20;; wp *= 2) {
    acb_zero(out);
    for (const auto& [m, cf] : terms) {
      cf.ball(c, wp);
      for (int j = 0; j < 64; ++j)
        if (m & (RadicalMask{1} << j)) {
          rad[static_cast<size_t>(j)]->ball(r, wp);
          arb_abs(sq, acb_realref(r));
          arb_sqrt(sq, sq, wp);
          if (sign[static_cast<size_t>(j)] < 0) acb_mul_onei(c, c);
          acb_mul_arb(c, c, sq, wp);
          if (signs & (RadicalMask{1} << j)) acb_neg(c, c);
        }
      acb_add(out, out, c, wp);
    }
    if (real) arb_zero(acb_imagref(out));
    if (imaginary) arb_zero(acb_realref(out));
    if (acb_rel_accuracy_bits(out) >= prec || wp > (1L << 24)) break;
  }
  acb_set_round(out, out, prec);
  arb_clear(sq);
  acb_clear(r);
  acb_clear(c);
}

std::string ball_str(const arb_t b, long digits) {
  char* s = arb_get_str(b, digits, 0);
  std::string out(s);
  flint_free(s);
  if (out.front() != '[') out = "[" + out + " +/- 0]";
  return out;
}

std::string ball_str(const acb_t b, long digits) {
  if (arb_is_zero(acb_imagref(b))) return ball_str(acb_realref(b), digits);
  if (arb_is_zero(acb_realref(b))) return ball_str(acb_imagref(b), digits) + "*i";
  return ball_str(acb_realref(b), digits) + " + " + ball_str(acb_imagref(b), digits) + "*i";
}

}  // namespace zb
