#include "zetabraid/linalg/poly_matrix.hpp"

#include <fmt/format.h>

#include <algorithm>

#include "zetabraid/error.hpp"

namespace zb {

namespace {

fmpz_poly_mat_struct* new_mat(long r, long c) {
  auto* m = new fmpz_poly_mat_struct;
  fmpz_poly_mat_init(m, r, c);
  return m;
}
void delete_mat(fmpz_poly_mat_struct* m) {
  fmpz_poly_mat_clear(m);
  delete m;
}

// Integer numerator and positive denominator of a Cyclo's power-basis polynomial.
void cyclo_to_int_poly(fmpz_poly_t num, fmpz_t den, const Cyclo& c) {
  fmpq_poly_t p;
  fmpq_poly_init(p);
  c.get_poly(p);
  fmpq_poly_get_numerator(num, p);
  fmpz_set(den, fmpq_poly_denref(p));
  fmpq_poly_clear(p);
}

}  // namespace

// ---------------- PolyContext ----------------

PolyContext::PolyContext(FieldPtr f) : f_(std::move(f)), n_(f_->cyclotomic()->degree()) {
  fmpz_poly_init(phi_);
  fmpz_poly_set(phi_, f_->cyclotomic()->modulus());
}

PolyContext::~PolyContext() {
  for (auto& [s, p] : rp_) {
    fmpz_poly_clear(p->num);
    fmpz_clear(p->den);
  }
  fmpz_poly_clear(phi_);
}

const PolyContext::RadicandProduct& PolyContext::radicand_product(RadicalMask s) const {
  std::lock_guard<std::mutex> lock(mu_);
  auto it = rp_.find(s);
  if (it != rp_.end()) return *it->second;
  auto p = std::make_unique<RadicandProduct>();
  fmpz_poly_init(p->num);
  fmpz_init(p->den);
  cyclo_to_int_poly(p->num, p->den, f_->radicand_product(s));
  return *rp_.emplace(s, std::move(p)).first->second;
}

// ---------------- PolyMatrix ----------------

PolyMatrix::PolyMatrix(long rows, long cols) : r_(rows), c_(cols) {}

PolyMatrix PolyMatrix::identity(long n) {
  PolyMatrix m(n, n);
  m.masks_.push_back(0);
  m.parts_.push_back(new_mat(n, n));
  fmpz_poly_mat_one(m.parts_[0]);
  return m;
}

PolyMatrix PolyMatrix::from_parts(long rows, long cols, std::vector<std::pair<RadicalMask, fmpz_poly_mat_struct*>> parts,
                                  const fmpz* den) {
  std::sort(parts.begin(), parts.end(), [](const auto& x, const auto& y) { return x.first < y.first; });
  PolyMatrix m(rows, cols);
  for (auto& [s, pm] : parts) {
    if (!m.masks_.empty() && m.masks_.back() == s) throw MathError("repeated mask in PolyMatrix::from_parts");
    m.masks_.push_back(s);
    m.parts_.push_back(pm);
  }
  if (den) {
    if (fmpz_sgn(den) <= 0) throw MathError("PolyMatrix denominator must be positive");
    fmpz_set(m.den_, den);
  }
  m.normalise();
  return m;
}

PolyMatrix::PolyMatrix(const PolyMatrix& o) : r_(o.r_), c_(o.c_), masks_(o.masks_) {
  for (auto* p : o.parts_) {
    parts_.push_back(new_mat(r_, c_));
    fmpz_poly_mat_set(parts_.back(), p);
  }
  fmpz_set(den_, o.den_);
}

PolyMatrix::PolyMatrix(PolyMatrix&& o) noexcept : r_(o.r_), c_(o.c_), masks_(std::move(o.masks_)), parts_(std::move(o.parts_)) {
  o.parts_.clear();
  o.masks_.clear();
  fmpz_swap(den_, o.den_);
}

PolyMatrix& PolyMatrix::operator=(const PolyMatrix& o) {
  if (this != &o) *this = PolyMatrix(o);
  return *this;
}

PolyMatrix& PolyMatrix::operator=(PolyMatrix&& o) noexcept {
  if (this != &o) {
    clear();
    r_ = o.r_;
    c_ = o.c_;
    masks_ = std::move(o.masks_);
    parts_ = std::move(o.parts_);
    o.masks_.clear();
    o.parts_.clear();
    fmpz_swap(den_, o.den_);
  }
  return *this;
}

PolyMatrix::~PolyMatrix() {
  clear();
  fmpz_clear(den_);
}

void PolyMatrix::clear() {
  for (auto* p : parts_) delete_mat(p);
  parts_.clear();
  masks_.clear();
  fmpz_one(den_);
}

void PolyMatrix::divide(const fmpz* d) {
  if (fmpz_sgn(d) <= 0) throw MathError("PolyMatrix::divide needs a positive integer");
  fmpz_mul(den_, den_, d);
  normalise();
}

long PolyMatrix::max_bits() const {
  long b = 0;
  for (auto* p : parts_) b = std::max(b, std::labs(fmpz_poly_mat_max_bits(p)));
  return b;
}

PolyMatrix PolyMatrix::from_matrix(const Matrix& m, const PolyContext& ctx) {
  if (m.field() != ctx.field()) throw MathError("matrix and product context belong to different fields");
  long r = static_cast<long>(m.rows()), c = static_cast<long>(m.cols());
  PolyMatrix out(r, c);
  // Common denominator: lcm of every coefficient denominator.
  fmpz_t lcm, d;
  fmpz_init_set_ui(lcm, 1);
  fmpz_init(d);
  fmpq_poly_t p;
  fmpq_poly_init(p);
  std::map<RadicalMask, fmpz_poly_mat_struct*> parts;
  for (long i = 0; i < r; ++i)
    for (long j = 0; j < c; ++j)
      for (const auto& [s, v] : m(static_cast<size_t>(i), static_cast<size_t>(j)).terms()) {
        v.get_poly(p);
        fmpz_lcm(lcm, lcm, fmpq_poly_denref(p));
        if (!parts.count(s)) parts[s] = new_mat(r, c);
      }
  for (long i = 0; i < r; ++i)
    for (long j = 0; j < c; ++j)
      for (const auto& [s, v] : m(static_cast<size_t>(i), static_cast<size_t>(j)).terms()) {
        v.get_poly(p);
        fmpz_poly_struct* e = fmpz_poly_mat_entry(parts[s], i, j);
        fmpq_poly_get_numerator(e, p);
        fmpz_divexact(d, lcm, fmpq_poly_denref(p));
        fmpz_poly_scalar_mul_fmpz(e, e, d);
      }
  for (auto& [s, pm] : parts) {
    out.masks_.push_back(s);
    out.parts_.push_back(pm);
  }
  fmpz_swap(out.den_, lcm);
  fmpq_poly_clear(p);
  fmpz_clear(d);
  fmpz_clear(lcm);
  return out;
}

Matrix PolyMatrix::to_matrix(const PolyContext& ctx) const {
  const FieldPtr& f = ctx.field();
  Matrix out(f, static_cast<size_t>(r_), static_cast<size_t>(c_));
  fmpq_poly_t p;
  fmpq_poly_init(p);
  for (size_t k = 0; k < masks_.size(); ++k)
    for (long i = 0; i < r_; ++i)
      for (long j = 0; j < c_; ++j) {
        const fmpz_poly_struct* e = fmpz_poly_mat_entry(parts_[k], i, j);
        if (fmpz_poly_is_zero(e)) continue;
        fmpq_poly_set_fmpz_poly(p, e);
        fmpq_poly_scalar_div_fmpz(p, p, den_);
        out(static_cast<size_t>(i), static_cast<size_t>(j)) +=
            Scalar::monomial(f, Cyclo::from_poly(f->cyclotomic(), p), masks_[k]);
      }
  fmpq_poly_clear(p);
  return out;
}

void PolyMatrix::normalise() {
  // Reduce modulo Phi_N is done by the caller; here: drop zero parts, cancel content with den.
  for (size_t k = 0; k < parts_.size();) {
    if (fmpz_poly_mat_is_zero(parts_[k])) {
      delete_mat(parts_[k]);
      parts_.erase(parts_.begin() + static_cast<long>(k));
      masks_.erase(masks_.begin() + static_cast<long>(k));
    } else {
      ++k;
    }
  }
  if (parts_.empty()) {
    fmpz_one(den_);
    return;
  }
  if (fmpz_is_one(den_)) return;
  fmpz_t g, t;
  fmpz_init_set(g, den_);
  fmpz_init(t);
  for (auto* pm : parts_)
    for (long i = 0; i < r_ && !fmpz_is_one(g); ++i)
      for (long j = 0; j < c_ && !fmpz_is_one(g); ++j) {
        const fmpz_poly_struct* e = fmpz_poly_mat_entry(pm, i, j);
        if (fmpz_poly_is_zero(e)) continue;
        fmpz_poly_content(t, e);
        fmpz_gcd(g, g, t);
      }
  if (!fmpz_is_one(g)) {
    for (auto* pm : parts_)
      for (long i = 0; i < r_; ++i)
        for (long j = 0; j < c_; ++j) {
          fmpz_poly_struct* e = fmpz_poly_mat_entry(pm, i, j);
          fmpz_poly_scalar_divexact_fmpz(e, e, g);
        }
    fmpz_divexact(den_, den_, g);
  }
  fmpz_clear(t);
  fmpz_clear(g);
}

PolyMatrix::Nonzeros PolyMatrix::nonzeros() const {
  Nonzeros nz(parts_.size());
  for (size_t k = 0; k < parts_.size(); ++k)
    for (long i = 0; i < r_; ++i)
      for (long j = 0; j < c_; ++j)
        if (!fmpz_poly_is_zero(fmpz_poly_mat_entry(parts_[k], i, j))) nz[k].emplace_back(i, j);
  return nz;
}

PolyMatrix PolyMatrix::mul(const PolyMatrix& a, const PolyMatrix& b, const PolyContext& ctx) {
  return mul_impl(a, nullptr, b, ctx);
}

PolyMatrix PolyMatrix::mul_sparse(const PolyMatrix& a, const Nonzeros& nz, const PolyMatrix& b, const PolyContext& ctx) {
  if (nz.size() != a.parts_.size()) throw MathError("nonzero lists do not match the matrix");
  return mul_impl(a, &nz, b, ctx);
}

PolyMatrix PolyMatrix::mul_impl(const PolyMatrix& a, const Nonzeros* nz, const PolyMatrix& b, const PolyContext& ctx) {
  if (a.c_ != b.r_) throw MathError(fmt::format("matrix shapes {}x{} and {}x{} do not compose", a.r_, a.c_, b.r_, b.c_));
  PolyMatrix out(a.r_, b.c_);
  if (a.parts_.empty() || b.parts_.empty()) return out;
  // Common denominator: den_a * den_b * lcm of the radicand-product denominators used.
  fmpz_t l, scale;
  fmpz_init_set_ui(l, 1);
  fmpz_init(scale);
  for (RadicalMask sa : a.masks_)
    for (RadicalMask sb : b.masks_)
      if (sa & sb) fmpz_lcm(l, l, ctx.radicand_product(sa & sb).den);
  std::map<RadicalMask, fmpz_poly_mat_struct*> acc;
  fmpz_poly_mat_t prod;
  fmpz_poly_mat_init(prod, a.r_, b.c_);
  for (size_t ia = 0; ia < a.masks_.size(); ++ia)
    for (size_t ib = 0; ib < b.masks_.size(); ++ib) {
      RadicalMask common = a.masks_[ia] & b.masks_[ib], m = a.masks_[ia] ^ b.masks_[ib];
      if (nz) {
        fmpz_poly_mat_zero(prod);
        fmpz_poly_t t;
        fmpz_poly_init(t);
        for (auto [i, k] : (*nz)[ia]) {
          const fmpz_poly_struct* x = fmpz_poly_mat_entry(a.parts_[ia], i, k);
          for (long j = 0; j < b.c_; ++j) {
            const fmpz_poly_struct* y = fmpz_poly_mat_entry(b.parts_[ib], k, j);
            if (fmpz_poly_is_zero(y)) continue;
            fmpz_poly_mul(t, x, y);
            fmpz_poly_add(fmpz_poly_mat_entry(prod, i, j), fmpz_poly_mat_entry(prod, i, j), t);
          }
        }
        fmpz_poly_clear(t);
      } else {
        fmpz_poly_mat_mul(prod, a.parts_[ia], b.parts_[ib]);
      }
      if (common) {
        const auto& rp = ctx.radicand_product(common);
        fmpz_divexact(scale, l, rp.den);
        for (long i = 0; i < out.r_; ++i)
          for (long j = 0; j < out.c_; ++j) {
            fmpz_poly_struct* e = fmpz_poly_mat_entry(prod, i, j);
            if (fmpz_poly_is_zero(e)) continue;
            fmpz_poly_mul(e, e, rp.num);
            if (!fmpz_is_one(scale)) fmpz_poly_scalar_mul_fmpz(e, e, scale);
          }
      } else if (!fmpz_is_one(l)) {
        fmpz_poly_mat_scalar_mul_fmpz(prod, prod, l);
      }
      auto it = acc.find(m);
      if (it == acc.end()) {
        auto* pm = new_mat(out.r_, out.c_);
        fmpz_poly_mat_swap(pm, prod);
        acc.emplace(m, pm);
      } else {
        fmpz_poly_mat_add(it->second, it->second, prod);
      }
    }
  fmpz_poly_mat_clear(prod);
  for (auto& [m, pm] : acc) {
    for (long i = 0; i < out.r_; ++i)
      for (long j = 0; j < out.c_; ++j) {
        fmpz_poly_struct* e = fmpz_poly_mat_entry(pm, i, j);
        if (fmpz_poly_length(e) >= ctx.degree() + 1) fmpz_poly_rem(e, e, ctx.modulus());
      }
    out.masks_.push_back(m);
    out.parts_.push_back(pm);
  }
  fmpz_mul(out.den_, a.den_, b.den_);
  fmpz_mul(out.den_, out.den_, l);
  fmpz_clear(scale);
  fmpz_clear(l);
  out.normalise();
  return out;
}

PolyMatrix PolyMatrix::pow(const PolyMatrix& a, unsigned long e, const PolyContext& ctx) {
  if (a.r_ != a.c_) throw MathError("power of a non-square matrix");
  PolyMatrix result = identity(a.r_), base = a;
  bool first = true;
  while (e) {
    if (e & 1) {
      result = first ? base : mul(base, result, ctx);
      first = false;
    }
    e >>= 1;
    if (e) base = mul(base, base, ctx);
  }
  return result;
}

}  // namespace zb
