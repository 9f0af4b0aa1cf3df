#include "sparse_kernel.hpp"

#include <cmath>
#include <cstdlib>
#include <algorithm>
#if defined(__x86_64__) && defined(__GNUC__)
#include <immintrin.h>
#endif
#include <map>

#include "zetabraid/error.hpp"

namespace zb::detail {

bool SparseLetter::make(SparseLetter* out, const PolyMatrix& g, const PolyContext& ctx, int radicands) {
  if (radicands > 4 || !fmpz_is_one(g.denominator())) return false;
  const long n = ctx.degree();
  const int nm = 1 << radicands;
  out->rows_ = g.rows();
  out->cols_ = g.cols();
  out->terms_.clear();
  fmpz_poly_t h, xt;
  fmpz_poly_init(h);
  fmpz_poly_init(xt);
  bool ok = true;
  // Per (row i, result mask T): sum of ||M||_inf, for beta.
  std::map<std::pair<long, int>, double> rowsum;
  for (size_t k = 0; k < g.mask_count() && ok; ++k) {
    RadicalMask s = g.mask(k);
    const fmpz_poly_mat_struct* part = g.part(k);
    for (long i = 0; i < g.rows() && ok; ++i)
      for (long c = 0; c < g.cols() && ok; ++c) {
        const fmpz_poly_struct* e = fmpz_poly_mat_entry(part, i, c);
        if (fmpz_poly_is_zero(e)) continue;
        for (int u = 0; u < nm && ok; ++u) {
          RadicalMask common = s & static_cast<RadicalMask>(u);
          fmpz_poly_set(h, e);
          if (common) {
            const auto& rp = ctx.radicand_product(common);
            if (!fmpz_is_one(rp.den)) {
              ok = false;
              break;
            }
            fmpz_poly_mul(h, h, rp.num);
            fmpz_poly_rem(h, h, ctx.modulus());
          }
          Term t{i, c, u, static_cast<int>(s ^ static_cast<RadicalMask>(u)), {}};
          std::vector<double> rabs(static_cast<size_t>(n), 0.0);
          for (long col = 0; col < n && ok; ++col) {
            fmpz_poly_zero(xt);
            fmpz_poly_set_coeff_ui(xt, col, 1);
            fmpz_poly_mul(xt, xt, h);
            if (fmpz_poly_length(xt) > n) fmpz_poly_rem(xt, xt, ctx.modulus());
            for (long r = 0; r < fmpz_poly_length(xt); ++r) {
              const fmpz* v = fmpz_poly_get_coeff_ptr(xt, r);
              if (fmpz_is_zero(v)) continue;
              if (fmpz_bits(v) > 30) {
                ok = false;
                break;
              }
              slong sv = fmpz_get_si(v);
              t.m.push_back({static_cast<std::int32_t>(r), static_cast<std::int32_t>(col), sv});
              rabs[static_cast<size_t>(r)] += std::fabs(static_cast<double>(sv));
            }
          }
          double norm = 0;
          for (double x : rabs) norm = std::max(norm, x);
          rowsum[{i, t.to}] += norm;
          if (!t.m.empty()) out->terms_.push_back(std::move(t));
        }
      }
  }
  fmpz_poly_clear(xt);
  fmpz_poly_clear(h);
  if (!ok) return false;
  // Grouped form: terms by destination (to, i); dense n x n matrices.
  out->groups_.clear();
  out->sources_.clear();
  out->dense_.clear();
  std::map<std::pair<int, long>, std::vector<size_t>> by_dest;
  for (size_t q = 0; q < out->terms_.size(); ++q) by_dest[{out->terms_[q].to, out->terms_[q].i}].push_back(q);
  for (const auto& [dest, list] : by_dest) {
    out->groups_.push_back({dest.first, dest.second, out->sources_.size(), list.size()});
    for (size_t q : list) {
      const Term& t = out->terms_[q];
      out->sources_.push_back({t.from, t.c, out->dense_.size()});
      out->dense_.resize(out->dense_.size() + static_cast<size_t>(n * n), 0);
      std::int64_t* d = out->dense_.data() + out->sources_.back().dense;
      for (const KernelEntry& e : t.m) d[e.t * n + e.r] += e.v;  // column-major: [t][r]
    }
  }
  out->beta_ = 0;
  for (const auto& [key, v] : rowsum) out->beta_ = std::max(out->beta_, v);
  return true;
}

std::int64_t SmallBlock::max_abs() const {
  std::int64_t m = 0;
  for (std::int64_t v : a) m = std::max(m, v < 0 ? -v : v);
  return m;
}

SmallBlock SmallBlock::identity(long d, long n, long masks) {
  SmallBlock b{d, d, n, masks, std::vector<std::int64_t>(static_cast<size_t>(masks * d * d * n), 0)};
  for (long i = 0; i < d; ++i) b.a[static_cast<size_t>(i * n * d + i)] = 1;
  b.bound = 1;
  return b;
}

bool SmallBlock::from_poly(SmallBlock* out, const PolyMatrix& p, long n, long masks) {
  *out = SmallBlock{p.rows(), p.cols(), n, masks, std::vector<std::int64_t>(static_cast<size_t>(masks * p.rows() * p.cols() * n), 0)};
  for (size_t q = 0; q < p.mask_count(); ++q) {
    long u = static_cast<long>(p.mask(q));
    if (u >= masks) return false;
    for (long i = 0; i < p.rows(); ++i)
      for (long j = 0; j < p.cols(); ++j) {
        const fmpz_poly_struct* e = fmpz_poly_mat_entry(p.part(q), i, j);
        for (long t = 0; t < fmpz_poly_length(e); ++t) {
          const fmpz* v = fmpz_poly_get_coeff_ptr(e, t);
          if (fmpz_bits(v) > 40) return false;
          out->a[static_cast<size_t>(((u * p.rows() + i) * n + t) * p.cols() + j)] = fmpz_get_si(v);
        }
      }
  }
  return true;
}

bool fits_small(const SparseLetter& g, SmallBlock& x) {
  constexpr double kLimit = 4.0e18;  // < 2^62, with margin for the double rounding of beta and the product
  if (x.bound >= 0 && x.bound * g.beta() < kLimit) return true;
  x.bound = static_cast<double>(x.max_abs());  // exact rescan
  return x.bound * g.beta() < kLimit;
}

namespace {
// The hot loop: dst rows += v * src rows over the entries of one multiplication matrix.
void axpy_rows(std::int64_t* __restrict dst, const std::int64_t* __restrict src, const KernelEntry* e, size_t count,
               long k) {
  for (size_t q = 0; q < count; ++q) {
    std::int64_t* d0 = dst + e[q].r * k;
    const std::int64_t* s0 = src + e[q].t * k;
    const std::int64_t v = e[q].v;
    for (long j = 0; j < k; ++j) d0[j] += v * s0[j];
  }
}
}  // namespace

SmallBlock apply(const SparseLetter& g, const SmallBlock& x) {
  SmallBlock y;
  apply_into(&y, g, x);
  return y;
}

namespace {
// One destination column block: dst[r * k + j] = sum over the group's sources of M[r][t] * src[t * k + j], for
// N coefficients (compile-time) and every column j. Partial sums are sums of a subset of the terms that the
// letter's beta bounds, so they stay below the same int64 limit as the entry-by-entry kernel.
template <int N>
void group_columns(std::int64_t* __restrict dst, const std::int64_t* const* src, const std::int64_t* const* mat,
                   size_t count, long k, bool add) {
  for (long j = 0; j < k; ++j) {
    std::int64_t acc[N];
    for (int r = 0; r < N; ++r) acc[r] = add ? dst[r * k + j] : 0;
    for (size_t q = 0; q < count; ++q) {
      const std::int64_t* s = src[q] + j;
      const std::int64_t* m = mat[q];
      std::int64_t v[N];
      for (int t = 0; t < N; ++t) v[t] = s[t * k];
      for (int r = 0; r < N; ++r)
        for (int t = 0; t < N; ++t) acc[r] += m[t * N + r] * v[t];
    }
    for (int r = 0; r < N; ++r) dst[r * k + j] = acc[r];
  }
}

// The same for N = 4 and 8 with AVX-512 (DQ, VL) 64-bit lane multiplies: one vector holds the N coefficients of
// a destination column; each source adds column t of its matrix times the broadcast operand coefficient. Same
// integer operations as group_columns (wrapping int64 arithmetic, exact under the same bound), so the results are
// identical; chosen at run time when the processor has these instructions.
#if defined(__x86_64__) && defined(__GNUC__)
#define ZB_HAVE_AVX512_KERNEL 1
__attribute__((target("avx512f,avx512dq,avx512vl"))) void group_columns4_avx512(
    std::int64_t* __restrict dst, const std::int64_t* const* src, const std::int64_t* const* mat, size_t count, long k,
    bool add) {
  for (long j = 0; j < k; ++j) {
    __m256i acc = add ? _mm256_set_epi64x(dst[3 * k + j], dst[2 * k + j], dst[k + j], dst[j]) : _mm256_setzero_si256();
    for (size_t q = 0; q < count; ++q) {
      const std::int64_t* s = src[q] + j;
      const std::int64_t* m = mat[q];
      acc = _mm256_add_epi64(acc, _mm256_mullo_epi64(_mm256_loadu_si256(reinterpret_cast<const __m256i*>(m)), _mm256_set1_epi64x(s[0])));
      acc = _mm256_add_epi64(acc, _mm256_mullo_epi64(_mm256_loadu_si256(reinterpret_cast<const __m256i*>(m + 4)), _mm256_set1_epi64x(s[k])));
      acc = _mm256_add_epi64(acc, _mm256_mullo_epi64(_mm256_loadu_si256(reinterpret_cast<const __m256i*>(m + 8)), _mm256_set1_epi64x(s[2 * k])));
      acc = _mm256_add_epi64(acc, _mm256_mullo_epi64(_mm256_loadu_si256(reinterpret_cast<const __m256i*>(m + 12)), _mm256_set1_epi64x(s[3 * k])));
    }
    alignas(32) std::int64_t out[4];
    _mm256_store_si256(reinterpret_cast<__m256i*>(out), acc);
    for (int r = 0; r < 4; ++r) dst[r * k + j] = out[r];
  }
}

__attribute__((target("avx512f,avx512dq,avx512vl"))) void group_columns8_avx512(
    std::int64_t* __restrict dst, const std::int64_t* const* src, const std::int64_t* const* mat, size_t count, long k,
    bool add) {
  for (long j = 0; j < k; ++j) {
    alignas(64) std::int64_t out[8];
    for (int r = 0; r < 8; ++r) out[r] = add ? dst[r * k + j] : 0;
    __m512i acc = _mm512_load_si512(out);
    for (size_t q = 0; q < count; ++q) {
      const std::int64_t* s = src[q] + j;
      const std::int64_t* m = mat[q];
      for (int t = 0; t < 8; ++t)
        acc = _mm512_add_epi64(acc, _mm512_mullo_epi64(_mm512_loadu_si512(m + 8 * t), _mm512_set1_epi64(s[t * k])));
    }
    _mm512_store_si512(out, acc);
    for (int r = 0; r < 8; ++r) dst[r * k + j] = out[r];
  }
}

// Whole letter for N = 4 (no per-group pointer tables or calls): the same sums as group_columns4_avx512.
__attribute__((target("avx512f,avx512dq,avx512vl"))) void letter4_avx512(std::int64_t* y, long yrows,
                                                                         const std::int64_t* x, long xrows, long k,
                                                                         const SparseLetter& g) {
  const SparseLetter::Source* so = g.sources().data();
  const std::int64_t* dense = g.dense().data();
  for (const auto& gr : g.groups()) {
    std::int64_t* dst = y + ((gr.to * yrows + gr.i) * k) * 4;
    for (long j = 0; j < k; ++j) {
      __m256i acc = _mm256_setzero_si256();
      for (size_t q = gr.first; q < gr.first + gr.count; ++q) {
        const std::int64_t* s = x + ((so[q].from * xrows + so[q].c) * k) * 4 + j;
        const std::int64_t* m = dense + so[q].dense;
        acc = _mm256_add_epi64(acc, _mm256_mullo_epi64(_mm256_loadu_si256(reinterpret_cast<const __m256i*>(m)), _mm256_set1_epi64x(s[0])));
        acc = _mm256_add_epi64(acc, _mm256_mullo_epi64(_mm256_loadu_si256(reinterpret_cast<const __m256i*>(m + 4)), _mm256_set1_epi64x(s[k])));
        acc = _mm256_add_epi64(acc, _mm256_mullo_epi64(_mm256_loadu_si256(reinterpret_cast<const __m256i*>(m + 8)), _mm256_set1_epi64x(s[2 * k])));
        acc = _mm256_add_epi64(acc, _mm256_mullo_epi64(_mm256_loadu_si256(reinterpret_cast<const __m256i*>(m + 12)), _mm256_set1_epi64x(s[3 * k])));
      }
      alignas(32) std::int64_t out[4];
      _mm256_store_si256(reinterpret_cast<__m256i*>(out), acc);
      dst[j] = out[0];
      dst[k + j] = out[1];
      dst[2 * k + j] = out[2];
      dst[3 * k + j] = out[3];
    }
  }
}

bool have_avx512() {
  static const bool yes = __builtin_cpu_supports("avx512f") && __builtin_cpu_supports("avx512dq") &&
                          __builtin_cpu_supports("avx512vl");
  return yes;
}
#endif

void group_columns_any(std::int64_t* __restrict dst, const std::int64_t* const* src, const std::int64_t* const* mat,
                       size_t count, long k, long n, bool add) {
  for (long j = 0; j < k; ++j)
    for (long r = 0; r < n; ++r) {
      std::int64_t acc = add ? dst[r * k + j] : 0;
      for (size_t q = 0; q < count; ++q)
        for (long t = 0; t < n; ++t) acc += mat[q][t * n + r] * src[q][t * k + j];
      dst[r * k + j] = acc;
    }
}
}  // namespace

void apply_into(SmallBlock* out, const SparseLetter& g, const SmallBlock& x) { apply_into_grouped(out, g, x); }

void apply_into_grouped(SmallBlock* out, const SparseLetter& g, const SmallBlock& x, bool allow_vector) {
#ifdef ZB_HAVE_AVX512_KERNEL
  const bool vector = allow_vector && have_avx512();
#else
  (void)allow_vector;
#endif
  if (g.cols() != x.rows) throw MathError("letter does not compose with the operand");
  if (out == &x) throw MathError("apply_into: output aliases the operand");
  SmallBlock& y = *out;
  y.rows = g.rows();
  y.k = x.k;
  y.n = x.n;
  y.masks = x.masks;
  // Every destination (mask, row) block is written whole by its group; zero-fill only when some has no group.
  const size_t size = static_cast<size_t>(x.masks * g.rows() * x.k * x.n);
  if (g.groups().size() == static_cast<size_t>(x.masks * g.rows())) y.a.resize(size);
  else y.a.assign(size, 0);
  y.bound = -1;
  const long k = x.k, n = x.n;
  if (x.bound >= 0) y.bound = x.bound * g.beta() * (1 + 1e-12);
#ifdef ZB_HAVE_AVX512_KERNEL
  if (vector && n == 4) {
    letter4_avx512(y.a.data(), y.rows, x.a.data(), x.rows, k, g);
    return;
  }
#endif
  const std::int64_t* src[64];
  const std::int64_t* mat[64];
  for (const auto& gr : g.groups()) {
    std::int64_t* dst = y.a.data() + ((gr.to * y.rows + gr.i) * k) * n;
    for (size_t first = 0; first < gr.count; first += 64) {
      size_t cnt = std::min<size_t>(64, gr.count - first);
      for (size_t q = 0; q < cnt; ++q) {
        const auto& so = g.sources()[gr.first + first + q];
        src[q] = x.a.data() + ((so.from * x.rows + so.c) * k) * n;
        mat[q] = g.dense().data() + so.dense;
      }
      const bool add = first > 0;  // later chunks of a long group add to the first one's sums
      switch (n) {
        case 1: group_columns<1>(dst, src, mat, cnt, k, add); break;
        case 2: group_columns<2>(dst, src, mat, cnt, k, add); break;
#ifdef ZB_HAVE_AVX512_KERNEL
        case 4:
          if (vector) group_columns4_avx512(dst, src, mat, cnt, k, add);
          else group_columns<4>(dst, src, mat, cnt, k, add);
          break;
        case 8:
          if (vector) group_columns8_avx512(dst, src, mat, cnt, k, add);
          else group_columns<8>(dst, src, mat, cnt, k, add);
          break;
#else
        case 4: group_columns<4>(dst, src, mat, cnt, k, add); break;
        case 8: group_columns<8>(dst, src, mat, cnt, k, add); break;
#endif
        case 6: group_columns<6>(dst, src, mat, cnt, k, add); break;
        default: group_columns_any(dst, src, mat, cnt, k, n, add); break;
      }
    }
  }
}

void apply_into_entries(SmallBlock* out, const SparseLetter& g, const SmallBlock& x) {
  if (g.cols() != x.rows) throw MathError("letter does not compose with the operand");
  if (out == &x) throw MathError("apply_into: output aliases the operand");
  SmallBlock& y = *out;
  y.rows = g.rows();
  y.k = x.k;
  y.n = x.n;
  y.masks = x.masks;
  y.a.assign(static_cast<size_t>(x.masks * g.rows() * x.k * x.n), 0);  // keeps the buffer when the size repeats
  y.bound = -1;
  const long k = x.k, n = x.n;
  if (x.bound >= 0) y.bound = x.bound * g.beta() * (1 + 1e-12);
  for (const auto& t : g.terms()) {
    std::int64_t* dst = y.a.data() + ((t.to * y.rows + t.i) * k) * n;
    const std::int64_t* src = x.a.data() + ((t.from * x.rows + t.c) * k) * n;
    axpy_rows(dst, src, t.m.data(), t.m.size(), k);
  }
}

BigBlock::BigBlock(long r, long kk, long nn, long m) : rows(r), k(kk), n(nn), masks(m), a(static_cast<size_t>(m * r * kk * nn)) {
  for (auto& v : a) fmpz_init(&v);
}

BigBlock::BigBlock(const SmallBlock& s) : BigBlock(s.rows, s.k, s.n, s.masks) {
  for (size_t i = 0; i < a.size(); ++i) fmpz_set_si(&a[i], s.a[i]);
}

BigBlock::BigBlock(BigBlock&& o) noexcept : rows(o.rows), k(o.k), n(o.n), masks(o.masks), a(std::move(o.a)) { o.a.clear(); }

BigBlock& BigBlock::operator=(BigBlock&& o) noexcept {
  if (this != &o) {
    for (auto& v : a) fmpz_clear(&v);
    rows = o.rows;
    k = o.k;
    n = o.n;
    masks = o.masks;
    a = std::move(o.a);
    o.a.clear();
  }
  return *this;
}

BigBlock::~BigBlock() {
  for (auto& v : a) fmpz_clear(&v);
}

BigBlock apply(const SparseLetter& g, const BigBlock& x) {
  if (g.cols() != x.rows) throw MathError("letter does not compose with the operand");
  BigBlock y(g.rows(), x.k, x.n, x.masks);
  const long k = x.k, n = x.n;
  for (const auto& t : g.terms()) {
    fmpz* dst = y.a.data() + ((t.to * y.rows + t.i) * k) * n;
    const fmpz* src = x.a.data() + ((t.from * x.rows + t.c) * k) * n;
    for (const KernelEntry& e : t.m)
      for (long j = 0; j < k; ++j) {
        const fmpz* s = src + e.t * k + j;
        if (fmpz_is_zero(s)) continue;
        if (e.v == 1)
          fmpz_add(dst + e.r * k + j, dst + e.r * k + j, s);
        else if (e.v == -1)
          fmpz_sub(dst + e.r * k + j, dst + e.r * k + j, s);
        else if (e.v > 0)  // not fmpz_addmul_si: in FLINT 2.9 it can leave a small value in non-canonical mpz form
          fmpz_addmul_ui(dst + e.r * k + j, s, static_cast<ulong>(e.v));
        else
          fmpz_submul_ui(dst + e.r * k + j, s, static_cast<ulong>(-e.v));
      }
  }
  return y;
}

namespace {
template <class Get>
PolyMatrix to_poly_impl(long rows, long k, long n, long masks, const fmpz* den, Get get) {
  std::vector<std::pair<RadicalMask, fmpz_poly_mat_struct*>> parts;
  for (long u = 0; u < masks; ++u) {
    auto* pm = new fmpz_poly_mat_struct;
    fmpz_poly_mat_init(pm, rows, k);
    for (long i = 0; i < rows; ++i)
      for (long j = 0; j < k; ++j) {
        fmpz_poly_struct* e = fmpz_poly_mat_entry(pm, i, j);
        for (long t = n - 1; t >= 0; --t) get(e, ((u * rows + i) * n + t) * k + j, t);
      }
    parts.emplace_back(static_cast<RadicalMask>(u), pm);
  }
  return PolyMatrix::from_parts(rows, k, std::move(parts), den);
}
}  // namespace

PolyMatrix SmallBlock::to_poly(const PolyContext&, const fmpz* den) const {
  return to_poly_impl(rows, k, n, masks, den, [&](fmpz_poly_struct* e, long idx, long t) {
    if (a[static_cast<size_t>(idx)]) fmpz_poly_set_coeff_si(e, t, a[static_cast<size_t>(idx)]);
  });
}

PolyMatrix BigBlock::to_poly(const PolyContext&, const fmpz* den) const {
  return to_poly_impl(rows, k, n, masks, den, [&](fmpz_poly_struct* e, long idx, long t) {
    if (!fmpz_is_zero(&a[static_cast<size_t>(idx)])) fmpz_poly_set_coeff_fmpz(e, t, &a[static_cast<size_t>(idx)]);
  });
}

}  // namespace zb::detail
