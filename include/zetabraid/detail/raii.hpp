// RAII owners for FLINT/Arb objects: every init is paired with its clear by construction.
//
//   FmpzT s;  fmpz_set_ui(s, 3);     // converts to fmpz* wherever an fmpz_t is expected
//   ArbT x;   arb_set_si(x, 1);
//   AcbMatT m(rows, cols);
//
// Owners are move-only (no deep copies by accident); moving swaps the contents with a freshly initialised object.
#pragma once
#include <string>
#include <utility>

#include "zetabraid/detail/flint.hpp"

namespace zb {

/// Owner of one FLINT/Arb scalar-like object S, initialised by Init and cleared by Clear.
template <class S, void (*Init)(S*), void (*Clear)(S*)>
class FlintOwner {
 public:
  FlintOwner() { Init(v_); }
  ~FlintOwner() { Clear(v_); }
  FlintOwner(const FlintOwner&) = delete;
  FlintOwner& operator=(const FlintOwner&) = delete;
  FlintOwner(FlintOwner&& o) noexcept {
    Init(v_);
    std::swap(v_[0], o.v_[0]);
  }
  FlintOwner& operator=(FlintOwner&& o) noexcept {
    std::swap(v_[0], o.v_[0]);
    return *this;
  }
  S* get() { return v_; }
  const S* get() const { return v_; }
  operator S*() { return v_; }
  operator const S*() const { return v_; }

 private:
  S v_[1];
};

namespace detail {
// Wrappers with the exact signature FlintOwner needs (some FLINT functions are macros or inline).
inline void fmpz_init_(fmpz* x) { fmpz_init(x); }
inline void fmpz_clear_(fmpz* x) { fmpz_clear(x); }
inline void fmpq_init_(fmpq* x) { fmpq_init(x); }
inline void fmpq_clear_(fmpq* x) { fmpq_clear(x); }
inline void fmpz_poly_init_(fmpz_poly_struct* x) { fmpz_poly_init(x); }
inline void fmpz_poly_clear_(fmpz_poly_struct* x) { fmpz_poly_clear(x); }
inline void fmpq_poly_init_(fmpq_poly_struct* x) { fmpq_poly_init(x); }
inline void fmpq_poly_clear_(fmpq_poly_struct* x) { fmpq_poly_clear(x); }
inline void arb_init_(arb_struct* x) { arb_init(x); }
inline void arb_clear_(arb_struct* x) { arb_clear(x); }
inline void acb_init_(acb_struct* x) { acb_init(x); }
inline void acb_clear_(acb_struct* x) { acb_clear(x); }
inline void arf_init_(arf_struct* x) { arf_init(x); }
inline void arf_clear_(arf_struct* x) { arf_clear(x); }
inline void mag_init_(mag_struct* x) { mag_init(x); }
inline void mag_clear_(mag_struct* x) { mag_clear(x); }
}  // namespace detail

using FmpzT = FlintOwner<fmpz, detail::fmpz_init_, detail::fmpz_clear_>;
using FmpqT = FlintOwner<fmpq, detail::fmpq_init_, detail::fmpq_clear_>;
using FmpzPolyT = FlintOwner<fmpz_poly_struct, detail::fmpz_poly_init_, detail::fmpz_poly_clear_>;
using FmpqPolyT = FlintOwner<fmpq_poly_struct, detail::fmpq_poly_init_, detail::fmpq_poly_clear_>;
using ArbT = FlintOwner<arb_struct, detail::arb_init_, detail::arb_clear_>;
using AcbT = FlintOwner<acb_struct, detail::acb_init_, detail::acb_clear_>;
using ArfT = FlintOwner<arf_struct, detail::arf_init_, detail::arf_clear_>;
using MagT = FlintOwner<mag_struct, detail::mag_init_, detail::mag_clear_>;

/// Owner of an acb_mat of fixed shape.
class AcbMatT {
 public:
  AcbMatT(long rows, long cols) { acb_mat_init(m_, rows, cols); }
  ~AcbMatT() { acb_mat_clear(m_); }
  AcbMatT(const AcbMatT&) = delete;
  AcbMatT& operator=(const AcbMatT&) = delete;
  AcbMatT(AcbMatT&& o) noexcept {
    acb_mat_init(m_, 0, 0);
    std::swap(m_[0], o.m_[0]);
  }
  AcbMatT& operator=(AcbMatT&& o) noexcept {
    std::swap(m_[0], o.m_[0]);
    return *this;
  }
  acb_mat_struct* get() { return m_; }
  const acb_mat_struct* get() const { return m_; }
  operator acb_mat_struct*() { return m_; }
  operator const acb_mat_struct*() const { return m_; }

 private:
  acb_mat_t m_;
};

/// Owner of an array of n fmpz (zeroed), as _fmpz_vec_init.
class FmpzVecT {
 public:
  explicit FmpzVecT(long n) : n_(n), v_(n > 0 ? _fmpz_vec_init(n) : nullptr) {}
  ~FmpzVecT() {
    if (v_) _fmpz_vec_clear(v_, n_);
  }
  FmpzVecT(const FmpzVecT&) = delete;
  FmpzVecT& operator=(const FmpzVecT&) = delete;
  FmpzVecT(FmpzVecT&& o) noexcept : n_(o.n_), v_(o.v_) {
    o.v_ = nullptr;
    o.n_ = 0;
  }
  fmpz* get() { return v_; }
  fmpz& operator[](long i) { return v_[i]; }
  long size() const { return n_; }

 private:
  long n_;
  fmpz* v_;
};

/// Decimal text of an integer (the FLINT string is freed here: never hand fmpz_get_str's result to a std::string
/// directly).
inline std::string fmpz_string(const fmpz* x) {
  char* c = fmpz_get_str(nullptr, 10, x);
  std::string s(c);
  flint_free(c);
  return s;
}

}  // namespace zb
