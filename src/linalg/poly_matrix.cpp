#include "zetabraid/linalg/poly_matrix.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <memory>

#include <flint/fmpq_mat.h>
#include <flint/fmpz_mat.h>

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

PolyContext::PolyContext(FieldPtr f)
    : f_(std::move(f)), n_(f_->cyclotomic()->degree()), reducer_(f_->cyclotomic()->modulus()) {
  fmpz_poly_init(phi_);
  fmpz_poly_set(phi_, f_->cyclotomic()->modulus());
  // Evaluation points 0, 1, -1, 2, -2, ... (2n - 2 of them) and infinity for products of length 2n - 1.
  const long np = 2 * n_ - 2;
  for (long q = 0; q < np; ++q) ev_.points.push_back(q == 0 ? 0 : (q % 2 ? (q + 1) / 2 : -(q / 2)));
  fmpz_mat_init(ev_.inverse, np, np);
  fmpz_mat_init(ev_.top_powers, np, 1);
  fmpz_init_set_ui(ev_.denominator, 1);
  if (np > 0) {
    fmpq_mat_t v, vi;
    fmpq_mat_init(v, np, np);
    fmpq_mat_init(vi, np, np);
    fmpz_t x;
    fmpz_init(x);
    for (long q = 0; q < np; ++q) {
      for (long k = 0; k < np; ++k) {
        fmpz_set_si(x, ev_.points[static_cast<size_t>(q)]);
        fmpz_pow_ui(x, x, static_cast<ulong>(k));
        fmpq_set_fmpz_frac(fmpq_mat_entry(v, q, k), x, ev_.denominator);
      }
      fmpz_set_si(x, ev_.points[static_cast<size_t>(q)]);
      fmpz_pow_ui(fmpz_mat_entry(ev_.top_powers, q, 0), x, static_cast<ulong>(np));
    }
    if (!fmpq_mat_inv(vi, v)) throw MathError("singular evaluation matrix");
    fmpq_mat_get_fmpz_mat_matwise(ev_.inverse, ev_.denominator, vi);
    fmpz_clear(x);
    fmpq_mat_clear(vi);
    fmpq_mat_clear(v);
  }
}

PolyContext::~PolyContext() {
  fmpz_mat_clear(ev_.inverse);
  fmpz_mat_clear(ev_.top_powers);
  fmpz_clear(ev_.denominator);
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
  return mul_impl(a, nullptr, b, ctx, true);
}

PolyMatrix PolyMatrix::mul_reference(const PolyMatrix& a, const PolyMatrix& b, const PolyContext& ctx) {
  return mul_impl(a, nullptr, b, ctx, false);
}

namespace {

// Values of an entry polynomial p at the context's evaluation points, then p's coefficient of x^(n-1) (the value
// "at infinity" of a polynomial of length <= n): out has points + 1 slots.
void evaluate_entry(fmpz* out, const fmpz_poly_struct* p, const PolyContext& ctx) {
  const auto& ev = ctx.evaluation();
  const long len = fmpz_poly_length(p), n = ctx.degree();
  const fmpz* co = p->coeffs;
  for (size_t q = 0; q < ev.points.size(); ++q) {
    fmpz* v = out + q;
    const slong x = ev.points[q];
    if (len == 0) {
      fmpz_zero(v);
    } else if (x == 0) {
      fmpz_set(v, co);
    } else {
      fmpz_set(v, co + len - 1);  // Horner
      for (long t = len - 2; t >= 0; --t) {
        fmpz_mul_si(v, v, x);
        fmpz_add(v, v, co + t);
      }
    }
  }
  if (len == n) fmpz_set(out + ev.points.size(), co + n - 1);
  else fmpz_zero(out + ev.points.size());
}

// Inverse of evaluate_entry for a sum of products of two such polynomials (length <= 2n - 1): the coefficients
// from the values (vals: points + 1 slots, overwritten), exact divisions only. Not reduced modulo Phi_N.
void interpolate_entry(fmpz_poly_struct* out, fmpz* vals, const PolyContext& ctx) {
  const auto& ev = ctx.evaluation();
  const long len = 2 * ctx.degree() - 1;
  const size_t np = ev.points.size();
  const fmpz* top = vals + np;
  for (size_t q = 0; q < np; ++q) fmpz_submul(vals + q, top, fmpz_mat_entry(ev.top_powers, static_cast<slong>(q), 0));
  fmpz_poly_fit_length(out, len);
  for (size_t k = 0; k < np; ++k) {
    fmpz* ck = out->coeffs + k;
    fmpz_zero(ck);
    for (size_t q = 0; q < np; ++q)
      fmpz_addmul(ck, fmpz_mat_entry(ev.inverse, static_cast<slong>(k), static_cast<slong>(q)), vals + q);
    fmpz_divexact(ck, ck, ev.denominator);
  }
  fmpz_set(out->coeffs + len - 1, top);
  _fmpz_poly_set_length(out, len);
  _fmpz_poly_normalise(out);
}

// For every entry the index of its only nonzero part (-1: zero entry); false when some entry has two.
bool single_part_view(const PolyMatrix& m, std::vector<int>* idx) {
  idx->assign(static_cast<size_t>(m.rows() * m.cols()), -1);
  for (size_t k = 0; k < m.mask_count(); ++k)
    for (long i = 0; i < m.rows(); ++i)
      for (long j = 0; j < m.cols(); ++j) {
        if (fmpz_poly_is_zero(fmpz_poly_mat_entry(m.part(k), i, j))) continue;
        int& x = (*idx)[static_cast<size_t>(i * m.cols() + j)];
        if (x >= 0) return false;
        x = static_cast<int>(k);
      }
  return true;
}

}  // namespace

bool PolyMatrix::graded_pair(const PolyMatrix& a, const PolyMatrix& b) {
  std::vector<int> ia, ib;
  return a.c_ == b.r_ && single_part_view(a, &ia) && single_part_view(b, &ib);
}

// Product when every entry of a and b lies in a single part (braid-group letters and their products are graded
// this way: sqrt(d) occurs exactly in the entries between basis vectors of different classes). Each entry of the
// product is a sum over k of single products A_ik B_kj y_S y_T = A_ik B_kj d_(S&T) y_(S^T), grouped by (S^T, S&T):
// one polynomial product per k instead of one per pair of parts. With `evaluate`, the polynomial products are
// done by evaluation at 2n - 1 points (0, 1, -1, 2, ..., infinity), summed there and interpolated exactly: 2n - 1
// integer products per term instead of n^2.
PolyMatrix PolyMatrix::mul_graded(const PolyMatrix& a, const PolyMatrix& b, const PolyContext& ctx, bool evaluate) {
  const long r = a.r_, inner = a.c_, c = b.c_;
  if (a.c_ != b.r_) throw MathError("mul_graded: shapes do not compose");
  std::vector<int> ia, ib;
  if (!single_part_view(a, &ia) || !single_part_view(b, &ib)) throw MathError("mul_graded: factors are not graded");
  if (evaluate && !ctx.has_evaluation()) throw MathError("mul_graded: no evaluation points for this degree");
  fmpz_t l, scale;
  fmpz_init_set_ui(l, 1);
  fmpz_init(scale);
  for (RadicalMask sa : a.masks_)
    for (RadicalMask sb : b.masks_)
      if (sa & sb) fmpz_lcm(l, l, ctx.radicand_product(sa & sb).den);
  const size_t slots = evaluate ? ctx.evaluation().points.size() + 1 : 0;
  std::vector<fmpz> ea, eb;  // evaluations, slots per entry
  if (evaluate) {
    ea.resize(static_cast<size_t>(r * inner) * slots);
    eb.resize(static_cast<size_t>(inner * c) * slots);
    for (auto& v : ea) fmpz_init(&v);
    for (auto& v : eb) fmpz_init(&v);
    for (long i = 0; i < r; ++i)
      for (long k = 0; k < inner; ++k) {
        int p = ia[static_cast<size_t>(i * inner + k)];
        if (p >= 0) evaluate_entry(&ea[static_cast<size_t>(i * inner + k) * slots], fmpz_poly_mat_entry(a.parts_[static_cast<size_t>(p)], i, k), ctx);
      }
    for (long k = 0; k < inner; ++k)
      for (long j = 0; j < c; ++j) {
        int p = ib[static_cast<size_t>(k * c + j)];
        if (p >= 0) evaluate_entry(&eb[static_cast<size_t>(k * c + j) * slots], fmpz_poly_mat_entry(b.parts_[static_cast<size_t>(p)], k, j), ctx);
      }
  }
  struct Acc {
    RadicalMask m, common;
  };
  std::vector<Acc> accs;
  std::vector<fmpz> vals;                // evaluate: slots per accumulator
  std::vector<fmpz_poly_struct> polys;   // otherwise: one polynomial per accumulator
  fmpz_poly_t t;
  fmpz_poly_init(t);
  std::map<RadicalMask, fmpz_poly_mat_struct*> parts;
  for (long i = 0; i < r; ++i)
    for (long j = 0; j < c; ++j) {
      accs.clear();
      for (long k = 0; k < inner; ++k) {
        int pa = ia[static_cast<size_t>(i * inner + k)], pb = ib[static_cast<size_t>(k * c + j)];
        if (pa < 0 || pb < 0) continue;
        RadicalMask sa = a.masks_[static_cast<size_t>(pa)], sb = b.masks_[static_cast<size_t>(pb)];
        RadicalMask m = sa ^ sb, common = sa & sb;
        size_t q = 0;
        while (q < accs.size() && !(accs[q].m == m && accs[q].common == common)) ++q;
        if (q == accs.size()) {
          accs.push_back({m, common});
          if (evaluate) {
            if (vals.size() < (q + 1) * slots) {
              size_t old = vals.size();
              vals.resize((q + 1) * slots);  // fmpz is a plain word: moved values stay valid
              for (size_t x = old; x < vals.size(); ++x) fmpz_init(&vals[x]);
            }
            for (size_t x = 0; x < slots; ++x) fmpz_zero(&vals[q * slots + x]);
          } else {
            if (polys.size() < q + 1) {
              polys.emplace_back();
              fmpz_poly_init(&polys.back());
            }
            fmpz_poly_zero(&polys[q]);
          }
        }
        if (evaluate) {
          const fmpz* x = &ea[static_cast<size_t>(i * inner + k) * slots];
          const fmpz* y = &eb[static_cast<size_t>(k * c + j) * slots];
          fmpz* v = &vals[q * slots];
          for (size_t z = 0; z < slots; ++z) fmpz_addmul(v + z, x + z, y + z);
        } else {
          fmpz_poly_mul(t, fmpz_poly_mat_entry(a.parts_[static_cast<size_t>(pa)], i, k),
                        fmpz_poly_mat_entry(b.parts_[static_cast<size_t>(pb)], k, j));
          fmpz_poly_add(&polys[q], &polys[q], t);
        }
      }
      for (size_t q = 0; q < accs.size(); ++q) {
        const Acc& ac = accs[q];
        if (evaluate) interpolate_entry(t, &vals[q * slots], ctx);
        else fmpz_poly_swap(t, &polys[q]);
        if (fmpz_poly_is_zero(t)) continue;
        ctx.reduce(t);
        if (ac.common) {
          const auto& rp = ctx.radicand_product(ac.common);
          fmpz_poly_mul(t, t, rp.num);
          fmpz_divexact(scale, l, rp.den);
          if (!fmpz_is_one(scale)) fmpz_poly_scalar_mul_fmpz(t, t, scale);
        } else if (!fmpz_is_one(l)) {
          fmpz_poly_scalar_mul_fmpz(t, t, l);
        }
        auto it = parts.find(ac.m);
        if (it == parts.end()) it = parts.emplace(ac.m, new_mat(r, c)).first;
        fmpz_poly_struct* e = fmpz_poly_mat_entry(it->second, i, j);
        fmpz_poly_add(e, e, t);
        ctx.reduce(e);
      }
    }
  fmpz_poly_clear(t);
  for (auto& p : polys) fmpz_poly_clear(&p);
  for (auto& v : vals) fmpz_clear(&v);
  for (auto& v : ea) fmpz_clear(&v);
  for (auto& v : eb) fmpz_clear(&v);
  PolyMatrix out(r, c);
  for (auto& [m, p] : parts) {
    out.masks_.push_back(m);
    out.parts_.push_back(p);
  }
  fmpz_mul(out.den_, a.den_, b.den_);
  fmpz_mul(out.den_, out.den_, l);
  fmpz_clear(scale);
  fmpz_clear(l);
  out.normalise();
  return out;
}

PolyMatrix PolyMatrix::mul_sparse(const PolyMatrix& a, const Nonzeros& nz, const PolyMatrix& b, const PolyContext& ctx) {
  if (nz.size() != a.parts_.size()) throw MathError("nonzero lists do not match the matrix");
  return mul_impl(a, &nz, b, ctx, false);
}

PolyMatrix PolyMatrix::mul_impl(const PolyMatrix& a, const Nonzeros* nz, const PolyMatrix& b, const PolyContext& ctx,
                                bool fast) {
  if (a.c_ != b.r_) throw MathError(fmt::format("matrix shapes {}x{} and {}x{} do not compose", a.r_, a.c_, b.r_, b.c_));
  PolyMatrix out(a.r_, b.c_);
  if (a.parts_.empty() || b.parts_.empty()) return out;
  if (fast && !nz) {
    std::vector<int> ia, ib;
    if (single_part_view(a, &ia) && single_part_view(b, &ib)) {
      // Evaluation pays once the coefficients are several limbs long (measured crossover ~500 bits on 5 x 5).
      const bool evaluate = ctx.has_evaluation() && std::max(a.max_bits(), b.max_bits()) >= 512;
      return mul_graded(a, b, ctx, evaluate);
    }
  }
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
        ctx.reduce(e);
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
