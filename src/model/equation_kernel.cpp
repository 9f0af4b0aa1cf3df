// The symbol tables of the equation kernels and the integer-polynomial arithmetic (see equation_kernel.hpp).
#include "equation_kernel.hpp"

namespace zb::equations {

namespace {

// x as a sparse field value.
SparseValue<Cyclo> field_value(const Scalar& x) {
  SparseValue<Cyclo> v;
  for (const auto& [mask, cf] : x.terms()) {
    v.mask.push_back(mask);
    v.coef.push_back(cf);
  }
  v.n = v.coef.size();
  return v;
}

// x (integral coefficients) as an integer polynomial; false when some coefficient is not an integer.
bool integral_poly(const Cyclo& x, FmpzPolyT& out) {
  FmpqPolyT q;
  x.get_poly(q);
  bool ok = fmpz_is_one(fmpq_poly_denref(q.get()));
  if (ok) fmpq_poly_get_numerator(out, q);
  return ok;
}

// The integral images of field values; false when some coefficient is not an integer.
bool integral_values(const std::vector<SparseValue<Cyclo>>& from, std::vector<SparseValue<FmpzPolyT>>& to) {
  for (const SparseValue<Cyclo>& v : from) {
    SparseValue<FmpzPolyT> x;
    for (size_t i = 0; i < v.n; ++i) {
      FmpzPolyT q;
      if (!integral_poly(v.coef[i], q)) return false;
      x.mask.push_back(v.mask[i]);
      x.coef.push_back(std::move(q));
    }
    x.n = x.coef.size();
    to.push_back(std::move(x));
  }
  return true;
}

}  // namespace

EquationTables::EquationTables(const Model& m)
    : M(m), n(m.label_count()), F(m.field), generic(!(F->cyclotomic()->nf()->flag & (NF_LINEAR | NF_QUADRATIC))) {
  const nf_struct* nf = F->cyclotomic()->nf();
  size_t n6 = 1;
  for (int i = 0; i < 6; ++i) n6 *= static_cast<size_t>(n);
  dense_ = n <= 14;
  if (dense_) fdense_.assign(n6, -1);
  ValueTable<Cyclo>& fv = field_values;
  for (const auto& [key, v] : M.f_symbols()) {
    if (v.is_zero()) continue;
    int id = static_cast<int>(fv.f.size());
    fv.f.push_back(field_value(v));
    size_t i = idx6(key[0], key[1], key[2], key[3], key[4], key[5]);
    if (dense_)
      fdense_[i] = id;
    else
      fsparse_[i] = id;
  }
  // Scale every F value by the common denominator D of its coefficients, so that the kernels work with
  // integral polynomials (no rational content to maintain); the equations are rescaled accordingly
  // (pentagon: D * (G G) = sum G G G; hexagon: D * (R G R) = sum G R G, with G = D F).
  fmpz_one(scale);
  if (generic) {
    for (const SparseValue<Cyclo>& v : fv.f)
      for (size_t i = 0; i < v.n; ++i) fmpz_lcm(scale, scale, fmpq_poly_denref(NF_ELEM(v.coef[i].raw())));
    if (fmpz_bits(scale) > 64) fmpz_one(scale);
    for (SparseValue<Cyclo>& v : fv.f)
      for (size_t i = 0; i < v.n; ++i) nf_elem_scalar_mul_fmpz(v.coef[i].raw(), v.coef[i].raw(), scale, nf);
  }
  ridx_.assign(static_cast<size_t>(n) * n * n, -1);
  for (const auto& [key, v] : M.r_symbols()) {
    if (v.is_zero()) continue;
    ridx_[(static_cast<size_t>(key[0]) * n + key[1]) * n + key[2]] = static_cast<int>(fv.r.size());
    fv.r.push_back(field_value(v));
    fv.rinv.push_back(field_value(v.inverse()));
  }
  build_integral();
  ch_.resize(static_cast<size_t>(n) * n);
  for (int a = 0; a < n; ++a)
    for (int b = 0; b < n; ++b) ch_[static_cast<size_t>(a) * n + b] = M.channels(a, b);
}

// Integral images of every table value and of the cyclotomic modulus, for IntegerArith. Used when the (scaled) F
// values, the R-symbols, their inverses and the radicands all have integral coefficients.
void EquationTables::build_integral() {
  ValueTable<FmpzPolyT>& iv = integer_values;
  integral = integral_values(field_values.f, iv.f) && integral_values(field_values.r, iv.r) &&
             integral_values(field_values.rinv, iv.rinv);
  for (int j = 0; integral && j < F->radicand_count(); ++j) {
    FmpzPolyT q;
    integral = integral_poly(F->radicand(j), q);
    integer_radicands.push_back(std::move(q));
  }
  const fmpz_poly_struct* phi = F->cyclotomic()->modulus();
  degree = fmpz_poly_degree(phi);
  if (!fmpz_is_one(phi->coeffs + degree)) integral = false;
  if (integral) reducer = std::make_shared<const PhiReducer>(phi);
  if (!integral) integer_values = ValueTable<FmpzPolyT>{};
}

void IntegerArith::reduce(fmpz_poly_struct* x) const { reducer_->reduce_sparse(x); }

Cyclo IntegerArith::to_cyclo(const Coef& x) const {
  FmpqPolyT q;
  fmpq_poly_set_fmpz_poly(q, x);
  return Cyclo::from_poly(k_, q);
}

IntegerArith::Coef IntegerArith::radicand_product(const Field&, RadicalMask s) const {
  FmpzPolyT p;
  fmpz_poly_one(p);
  for (size_t j = 0; j < radicands_->size(); ++j)
    if (s & (RadicalMask{1} << j)) {
      fmpz_poly_mul(p, p, (*radicands_)[j]);
      reduce(p);
    }
  return p;
}

}  // namespace zb::equations
