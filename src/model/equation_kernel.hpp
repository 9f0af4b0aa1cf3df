// The exact arithmetic under the pentagon and hexagon checks (private to src/model/).
//
// F- and R-symbols are copied once into flat tables of sparse radical-monomial values (mask, coefficient), so the
// equation loops do no map lookups and create no Scalar temporaries. One kernel, EquationKernel<Arith>, does the
// nine operations the drivers need (make, fv, rv, riv, mul, addmul, sub, scale, finish, is_zero, unscale) on such
// values; the coefficient arithmetic is a policy:
//   * FieldArith: antic nf_elem in Q(zeta_N). For antic's generic representation (degree > 2) sums of products are
//     left unreduced and uncanonicalised (they stay exact polynomials) and finish() reduces once per equation.
//   * IntegerArith: integer polynomials with a sparse reduction modulo the monic Phi_N (few terms for the conductors
//     of SU(2)_k, e.g. Phi_48 = x^16 - x^8 + 1). Used when every table value has integral coefficients (after
//     scaling F by a common denominator) -- the common case, and about twice as fast.
#pragma once
#include <memory>
#include <unordered_map>
#include <utility>
#include <vector>

#include "zetabraid/detail/raii.hpp"
#include "zetabraid/field/phi_reduce.hpp"
#include "zetabraid/field/scalar.hpp"
#include "zetabraid/model/model.hpp"

namespace zb::equations {

/// sum_i coef[i] * sqrt(d_{mask[i]}) with reusable storage: the first n slots are live.
template <class Coef>
struct SparseValue {
  std::vector<RadicalMask> mask;
  std::vector<Coef> coef;
  size_t n = 0;
  void clear() { n = 0; }
};

/// Coefficients in Q(zeta_N) (antic nf_elem).
class FieldArith {
 public:
  using Coef = Cyclo;
  FieldArith(CyclotomicFieldPtr k, bool lazy) : k_(std::move(k)), nf_(k_->nf()), lazy_(lazy) {}

  Coef make() const { return Cyclo(k_); }
  void zero(Coef& x) const { nf_elem_zero(x.raw(), nf_); }
  /// out = x * y (* rad); reduced unless !reduced and the field is generic (then an exact unreduced polynomial).
  void product(Coef& out, const Coef& x, const Coef& y, const Coef* rad, bool reduced, Coef& tmp) const {
    const bool lazy = lazy_ && !reduced;
    const nf_elem_struct* left = x.raw();
    if (rad) {
      nf_elem_mul(tmp.raw(), x.raw(), rad->raw(), nf_);
      left = tmp.raw();
    }
    if (lazy)
      nf_elem_mul_red(out.raw(), left, y.raw(), nf_, 0);
    else
      nf_elem_mul(out.raw(), left, y.raw(), nf_);
  }
  /// s += t (s and t reduced when `reduced`; otherwise possibly unreduced polynomials).
  void add(Coef& s, const Coef& t, bool reduced) const {
    if (lazy_ && !reduced)
      fmpq_poly_add_can(NF_ELEM(s.raw()), NF_ELEM(s.raw()), NF_ELEM(t.raw()), 0);
    else
      nf_elem_add(s.raw(), s.raw(), t.raw(), nf_);
  }
  /// s -= t, s an accumulated (possibly unreduced) value.
  void sub(Coef& s, const Coef& t) const {
    if (lazy_)
      fmpq_poly_sub_can(NF_ELEM(s.raw()), NF_ELEM(s.raw()), NF_ELEM(t.raw()), 0);
    else
      nf_elem_sub(s.raw(), s.raw(), t.raw(), nf_);
  }
  void scale(Coef& x, const fmpz* c) const {
    if (lazy_)
      fmpq_poly_scalar_mul_fmpz(NF_ELEM(x.raw()), NF_ELEM(x.raw()), c);
    else
      nf_elem_scalar_mul_fmpz(x.raw(), x.raw(), c, nf_);
  }
  /// Back to canonical reduced form.
  void finish(Coef& x) const {
    if (!lazy_) return;
    fmpq_poly_canonicalise(NF_ELEM(x.raw()));
    nf_elem_reduce(x.raw(), nf_);
    nf_elem_canonicalise(x.raw(), nf_);
  }
  bool is_zero(const Coef& x) const { return nf_elem_is_zero(x.raw(), nf_); }
  Cyclo to_cyclo(const Coef& x) const { return x; }
  Coef radicand_product(const Field& f, RadicalMask s) const { return f.radicand_product(s); }

 private:
  CyclotomicFieldPtr k_;
  const nf_struct* nf_;
  bool lazy_;
};

/// Coefficients in Z[x], reduced modulo Phi_N = x^d + sum_j c_j x^j (monic, coefficients fitting a long).
class IntegerArith {
 public:
  using Coef = FmpzPolyT;
  IntegerArith(CyclotomicFieldPtr k, std::shared_ptr<const PhiReducer> reducer,
               const std::vector<FmpzPolyT>* radicands)
      : k_(std::move(k)), reducer_(std::move(reducer)), radicands_(radicands) {}

  Coef make() const { return FmpzPolyT(); }
  void zero(Coef& x) const { fmpz_poly_zero(x); }
  void product(Coef& out, const Coef& x, const Coef& y, const Coef* rad, bool reduced, Coef& tmp) const {
    fmpz_poly_mul(out, x, y);
    if (rad) {
      reduce(out);
      fmpz_poly_mul(tmp, out, *rad);
      fmpz_poly_swap(out, tmp);
    }
    if (reduced) reduce(out);
  }
  void add(Coef& s, const Coef& t, bool) const { fmpz_poly_add(s, s, t); }
  void sub(Coef& s, const Coef& t) const { fmpz_poly_sub(s, s, t); }
  void scale(Coef& x, const fmpz* c) const { fmpz_poly_scalar_mul_fmpz(x, x, c); }
  void finish(Coef& x) const { reduce(x); }
  bool is_zero(const Coef& x) const { return fmpz_poly_is_zero(x.get()); }
  Cyclo to_cyclo(const Coef& x) const;
  Coef radicand_product(const Field& f, RadicalMask s) const;
  /// x <- x mod Phi_N, using x^d = -sum_j c_j x^j.
  void reduce(fmpz_poly_struct* x) const;

 private:
  CyclotomicFieldPtr k_;
  std::shared_ptr<const PhiReducer> reducer_;  // the field layer's reduction modulo Phi_N
  const std::vector<FmpzPolyT>* radicands_;      // integral images of the field's radicands
};

/// Every F- and R-symbol of a model in the form one arithmetic needs.
template <class Coef>
struct ValueTable {
  std::vector<SparseValue<Coef>> f, r, rinv;  // indexed by EquationTables::fid / rid
};

/// The flat index of the model's symbols and their values for both arithmetics.
struct EquationTables {
  const Model& M;
  int n;
  FieldPtr F;
  bool generic;        ///< antic's generic representation (degree > 2): lazy reduction in FieldArith
  FmpzT scale;         ///< F values are stored multiplied by this integer
  bool integral = false;  ///< IntegerArith applies (every value, radicand and Phi_N integral)
  ValueTable<Cyclo> field_values;
  ValueTable<FmpzPolyT> integer_values;
  long degree = 0;
  std::shared_ptr<const PhiReducer> reducer;  ///< reduction modulo Phi_N (when integral)
  std::vector<FmpzPolyT> integer_radicands;

  explicit EquationTables(const Model& m);
  EquationTables(const EquationTables&) = delete;
  EquationTables& operator=(const EquationTables&) = delete;

  size_t idx6(int a, int b, int c, int d, int e, int f) const {
    size_t N = static_cast<size_t>(n);
    return ((((static_cast<size_t>(a) * N + b) * N + c) * N + d) * N + e) * N + f;
  }
  /// Index of [F^{abc}_d]_{ef} in the value tables, or -1 (zero or not admissible).
  int fid(int a, int b, int c, int d, int e, int f) const {
    size_t i = idx6(a, b, c, d, e, f);
    if (dense_) return fdense_[i];
    auto it = fsparse_.find(i);
    return it == fsparse_.end() ? -1 : it->second;
  }
  /// Index of R^{ab}_c, or -1.
  int rid(int a, int b, int c) const { return ridx_[(static_cast<size_t>(a) * n + b) * n + c]; }
  /// Channels of a x b, ascending.
  const std::vector<int>& chan(int a, int b) const { return ch_[static_cast<size_t>(a) * n + b]; }
  bool N(int a, int b, int c) const { return M.fusion(a, b, c) > 0; }

  FieldArith field_arith() const { return FieldArith(F->cyclotomic(), generic); }
  IntegerArith integer_arith() const {
    return IntegerArith(F->cyclotomic(), reducer, &integer_radicands);
  }
  const ValueTable<Cyclo>& values(const FieldArith&) const { return field_values; }
  const ValueTable<FmpzPolyT>& values(const IntegerArith&) const { return integer_values; }

 private:
  bool dense_;
  std::vector<int> fdense_;
  std::unordered_map<std::uint64_t, int> fsparse_;
  std::vector<int> ridx_;
  std::vector<std::vector<int>> ch_;
  void build_integral();
};

/// Per-thread scratch space and the nine operations on sparse values, over one coefficient arithmetic.
template <class Arith>
class EquationKernel {
 public:
  using Coef = typename Arith::Coef;
  using Value = SparseValue<Coef>;

  EquationKernel(const EquationTables& t, Arith arith)
      : T(t), A(std::move(arith)), vals_(t.values(A)), t1_(A.make()), t2_(A.make()) {}

  Value make() const { return Value(); }
  const Value* fv(int a, int b, int c, int d, int e, int f) const {
    int i = T.fid(a, b, c, d, e, f);
    return i < 0 ? nullptr : &vals_.f[static_cast<size_t>(i)];
  }
  const Value* rv(int a, int b, int c) const {
    int i = T.rid(a, b, c);
    return i < 0 ? nullptr : &vals_.r[static_cast<size_t>(i)];
  }
  const Value* riv(int a, int b, int c) const {
    int i = T.rid(a, b, c);
    return i < 0 ? nullptr : &vals_.rinv[static_cast<size_t>(i)];
  }
  /// out += x * y, left unreduced where the arithmetic allows (finish() reduces once per equation).
  void addmul(Value& out, const Value& x, const Value& y) { accumulate(out, x, y, false); }
  /// out = x * y, reduced (used as a factor again).
  void mul(Value& out, const Value& x, const Value& y) {
    out.clear();
    accumulate(out, x, y, true);
  }
  void sub(Value& out, const Value& x) {
    for (size_t i = 0; i < x.n; ++i) A.sub(slot(out, x.mask[i]), x.coef[i]);
  }
  /// v *= the F scale (exact).
  void scale(Value& v) {
    if (fmpz_is_one(T.scale)) return;
    for (size_t i = 0; i < v.n; ++i) A.scale(v.coef[i], T.scale);
  }
  void finish(Value& v) {
    for (size_t i = 0; i < v.n; ++i) A.finish(v.coef[i]);
  }
  bool is_zero(const Value& v) const {
    for (size_t i = 0; i < v.n; ++i)
      if (!A.is_zero(v.coef[i])) return false;
    return true;
  }
  /// The true residual from a finished, scaled one: divided by scale^power.
  Scalar unscale(const Value& v, int power) const {
    Scalar r(T.F);
    for (size_t i = 0; i < v.n; ++i) {
      Cyclo c = A.to_cyclo(v.coef[i]);
      if (!c.is_zero()) r += Scalar::monomial(T.F, c, v.mask[i]);
    }
    if (fmpz_is_one(T.scale)) return r;
    FmpqT q;
    fmpz_pow_ui(fmpq_denref(q.get()), T.scale, static_cast<ulong>(power));
    fmpz_one(fmpq_numref(q.get()));
    return r * Scalar(T.F, Cyclo(T.F->cyclotomic(), q));
  }

 private:
  const EquationTables& T;
  Arith A;
  const ValueTable<Coef>& vals_;
  Coef t1_, t2_;
  std::unordered_map<RadicalMask, Coef> rad_;

  Coef& slot(Value& v, RadicalMask mask) {
    for (size_t i = 0; i < v.n; ++i)
      if (v.mask[i] == mask) return v.coef[i];
    if (v.n == v.coef.size()) {
      v.coef.push_back(A.make());
      v.mask.push_back(mask);
    } else {
      v.mask[v.n] = mask;
      A.zero(v.coef[v.n]);
    }
    return v.coef[v.n++];
  }
  const Coef& radicand_product(RadicalMask s) {
    auto it = rad_.find(s);
    if (it != rad_.end()) return it->second;
    return rad_.emplace(s, A.radicand_product(*T.F, s)).first->second;
  }
  void accumulate(Value& out, const Value& x, const Value& y, bool reduced) {
    for (size_t i = 0; i < x.n; ++i)
      for (size_t j = 0; j < y.n; ++j) {
        RadicalMask common = x.mask[i] & y.mask[j];
        A.product(t1_, x.coef[i], y.coef[j], common ? &radicand_product(common) : nullptr, reduced, t2_);
        A.add(slot(out, x.mask[i] ^ y.mask[j]), t1_, reduced);
      }
  }
};

}  // namespace zb::equations
