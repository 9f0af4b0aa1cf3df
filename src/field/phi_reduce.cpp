#include "zetabraid/field/phi_reduce.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cstdlib>

#include "zetabraid/error.hpp"

namespace zb {

PhiReducer::PhiReducer(const fmpz_poly_struct* modulus, long max_length) : n_(fmpz_poly_degree(modulus)) {
  if (n_ < 0 || !fmpz_is_one(fmpz_poly_lead(modulus))) throw MathError("PhiReducer: the modulus must be monic");
  fmpz_poly_init(phi_);
  fmpz_poly_set(phi_, modulus);
  if (max_length < 0) max_length = std::max(n_, 3 * n_ - 2);
  for (long j = 0; j < n_; ++j) {
    const fmpz* c = phi_->coeffs + j;
    if (fmpz_is_zero(c)) continue;
    if (!fmpz_fits_si(c)) {
      sparse_ok_ = false;
      sparse_.clear();
      break;
    }
    sparse_.emplace_back(fmpz_get_si(c), j);
  }
  if (n_ < 1) return;  // Phi of degree 0 (the constant 1): everything reduces to 0, by fmpz_poly_rem
  // x^k mod Phi_N for k = n .. max_length - 1, by x^(k+1) = x * x^k reduced with the monic Phi_N.
  fmpz_poly_t xk;
  fmpz_poly_init(xk);
  fmpz_poly_set_coeff_ui(xk, static_cast<ulong>(n_), 1);
  fmpz_poly_rem(xk, xk, phi_);
  bool fits = true;
  for (long k = n_; k < max_length && fits; ++k) {
    std::vector<std::int64_t> row(static_cast<size_t>(n_), 0);
    std::int64_t m = 0;
    for (long i = 0; i < fmpz_poly_length(xk); ++i) {
      const fmpz* c = fmpz_poly_get_coeff_ptr(xk, i);
      if (fmpz_bits(c) > 40) {
        fits = false;
        break;
      }
      row[static_cast<size_t>(i)] = fmpz_get_si(c);
      m = std::max<std::int64_t>(m, std::llabs(row[static_cast<size_t>(i)]));
    }
    table_.push_back(std::move(row));
    row_max_.push_back(m);
    fmpz_poly_shift_left(xk, xk, 1);
    fmpz_poly_rem(xk, xk, phi_);
  }
  if (!fits) {
    table_.clear();
    row_max_.clear();
  }
  fmpz_poly_clear(xk);
}

PhiReducer::~PhiReducer() { fmpz_poly_clear(phi_); }

void PhiReducer::reduce_sparse(fmpz_poly_struct* x) const {
  if (!sparse_ok_ || n_ < 1) {
    reduce(x);
    return;
  }
  const long d = n_;
  const long len = x->length;
  if (len <= d) return;
  fmpz* co = x->coeffs;
  for (long i = len - 1; i >= d; --i) {
    if (fmpz_is_zero(co + i)) continue;
    // Not fmpz_submul_si: in FLINT 2.9 the _si variants can leave a small result in non-canonical form (then
    // equal numbers compare unequal); the _ui variants are correct.
    for (const auto& [cj, j] : sparse_) {
      if (cj > 0)
        fmpz_submul_ui(co + (i - d + j), co + i, static_cast<ulong>(cj));
      else
        fmpz_addmul_ui(co + (i - d + j), co + i, static_cast<ulong>(-cj));
    }
    fmpz_zero(co + i);
  }
  _fmpz_poly_set_length(x, d);
  _fmpz_poly_normalise(x);
}

void PhiReducer::reduce(fmpz* c, long len) const {
  if (len <= n_) return;
  if (len > table_length()) throw MathError(fmt::format("PhiReducer: length {} beyond the table ({})", len, table_length()));
  // Signed small multipliers go through the _ui variants (FLINT 2.9's *_si variants can leave non-canonical values).
  for (long k = n_; k < len; ++k) {
    if (fmpz_is_zero(c + k)) continue;
    const std::vector<std::int64_t>& row = table_[static_cast<size_t>(k - n_)];
    for (long i = 0; i < n_; ++i) {
      std::int64_t t = row[static_cast<size_t>(i)];
      if (t > 0) fmpz_addmul_ui(c + i, c + k, static_cast<ulong>(t));
      else if (t < 0) fmpz_submul_ui(c + i, c + k, static_cast<ulong>(-t));
    }
    fmpz_zero(c + k);
  }
}

void PhiReducer::reduce(fmpz_poly_t p) const {
  const long len = fmpz_poly_length(p);
  if (len <= n_) return;
  if (len > table_length()) {
    fmpz_poly_rem(p, p, phi_);
    return;
  }
  reduce(p->coeffs, len);
  _fmpz_poly_set_length(p, n_);
  _fmpz_poly_normalise(p);
}

bool PhiReducer::reduce_int64(std::int64_t* c, long len) const {
  if (len <= n_) return true;
  if (len > table_length()) return false;
  // Bound every partial sum: |c_i| + sum_k |c_k| * max|row_k| < 2^63 (computed exactly in 128 bits).
  unsigned __int128 low = 0, add = 0;
  for (long i = 0; i < n_; ++i)
    low = std::max<unsigned __int128>(low, static_cast<unsigned __int128>(std::llabs(c[i] == INT64_MIN ? INT64_MAX : c[i])));
  for (long k = n_; k < len; ++k) {
    if (c[k] == INT64_MIN) return false;
    add += static_cast<unsigned __int128>(std::llabs(c[k])) * static_cast<unsigned __int128>(row_max_[static_cast<size_t>(k - n_)]);
  }
  if (low + add >= (static_cast<unsigned __int128>(1) << 63)) return false;
  for (long k = n_; k < len; ++k) {
    const std::int64_t ck = c[k];
    if (ck == 0) continue;
    const std::vector<std::int64_t>& row = table_[static_cast<size_t>(k - n_)];
    for (long i = 0; i < n_; ++i) c[i] += ck * row[static_cast<size_t>(i)];
    c[k] = 0;
  }
  return true;
}

double PhiReducer::growth(long len) const {
  double g = 1;
  for (long k = n_; k < std::min(len, table_length()); ++k) g += static_cast<double>(row_max_[static_cast<size_t>(k - n_)]);
  return g;
}

}  // namespace zb
