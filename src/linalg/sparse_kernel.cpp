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
            ctx.reduce(h);
          }
          Term t{i, c, u, static_cast<int>(s ^ static_cast<RadicalMask>(u)), {}};
          std::vector<double> rabs(static_cast<size_t>(n), 0.0);
          for (long col = 0; col < n && ok; ++col) {
            fmpz_poly_shift_left(xt, h, col);  // x^col * h mod Phi_N
            ctx.reduce(xt);
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
  // Row program: entries by destination row, split into +1, -1 and other multipliers.
  out->prog_rows_.clear();
  out->prog_src_.clear();
  {
    std::map<std::int64_t, std::vector<ProgramSource>> by_row;
    for (const Term& t : out->terms_)
      for (const KernelEntry& e : t.m) {
        if (e.v == 0) continue;
        std::int64_t dst = (static_cast<std::int64_t>(t.to) * out->rows_ + t.i) * n + e.r;
        std::int64_t src = (static_cast<std::int64_t>(t.from) * out->cols_ + t.c) * n + e.t;
        by_row[dst].push_back({src, e.v});
      }
    for (const auto& [dst, list] : by_row) {
      ProgramRow row{dst, 0, 0, 0, static_cast<std::uint32_t>(out->prog_src_.size())};
      for (std::int64_t want : {std::int64_t{1}, std::int64_t{-1}, std::int64_t{0}})
        for (const ProgramSource& q : list) {
          bool take = want != 0 ? q.v == want : (q.v != 1 && q.v != -1);
          if (!take) continue;
          out->prog_src_.push_back(q);
          (want == 1 ? row.plus : want == -1 ? row.minus : row.times)++;
        }
      out->prog_rows_.push_back(row);
    }
    out->covers_all_ = static_cast<long>(by_row.size()) == static_cast<long>(nm) * out->rows_ * n;
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
#if defined(__x86_64__) && defined(__GNUC__)
#define ZB_HAVE_VECTOR_KERNELS 1
bool have_avx512() {
  static const bool yes = __builtin_cpu_supports("avx512f") && __builtin_cpu_supports("avx512dq") &&
                          __builtin_cpu_supports("avx512vl");
  return yes;
}
bool have_avx2() {
  static const bool yes = __builtin_cpu_supports("avx2");
  return yes;
}

// Row program with 8 columns per vector (masked at the end): the same wrapping int64 sums as the portable loop.
// (Measured against 256-bit lanes and an earlier kernel of dense n x n blocks with 64-bit multiplies: 8 lanes is
// the fastest end to end, ~10% on whole 6-anyon products; braid letters' multipliers are all +-1.)
__attribute__((target("avx512f,avx512dq,avx512vl"))) void program_avx512(std::int64_t* y, const std::int64_t* x,
                                                                         long k, const SparseLetter& g) {
  const SparseLetter::ProgramSource* src = g.program_sources().data();
  for (long j0 = 0; j0 < k; j0 += 8) {
    const __mmask8 mk = k - j0 >= 8 ? static_cast<__mmask8>(0xFF) : static_cast<__mmask8>((1u << (k - j0)) - 1);
    const std::int64_t* xj = x + j0;
    for (const auto& row : g.program_rows()) {
      const SparseLetter::ProgramSource* q = src + row.first;
      __m512i acc = _mm512_setzero_si512();
      for (std::uint32_t e = 0; e < row.plus; ++e, ++q) acc = _mm512_add_epi64(acc, _mm512_maskz_loadu_epi64(mk, xj + q->src * k));
      for (std::uint32_t e = 0; e < row.minus; ++e, ++q) acc = _mm512_sub_epi64(acc, _mm512_maskz_loadu_epi64(mk, xj + q->src * k));
      for (std::uint32_t e = 0; e < row.times; ++e, ++q)
        acc = _mm512_add_epi64(acc, _mm512_mullo_epi64(_mm512_maskz_loadu_epi64(mk, xj + q->src * k), _mm512_set1_epi64(q->v)));
      _mm512_mask_storeu_epi64(y + row.dst * k + j0, mk, acc);
    }
  }
}

// Low 64 bits of a * v in every lane (AVX2 has no 64-bit multiply): v given by its 32-bit halves, broadcast;
// a * v = a_lo v_lo + 2^32 (a_hi v_lo + a_lo v_hi) mod 2^64.
__attribute__((target("avx2"))) inline __m256i mullo64_avx2(__m256i a, __m256i v_lo, __m256i v_hi) {
  __m256i cross = _mm256_add_epi64(_mm256_mul_epu32(_mm256_srli_epi64(a, 32), v_lo), _mm256_mul_epu32(a, v_hi));
  return _mm256_add_epi64(_mm256_mul_epu32(a, v_lo), _mm256_slli_epi64(cross, 32));
}

// The first `lanes` (0..4) of 4 lanes set. (Lambdas do not inherit the target attribute: plain functions here.)
__attribute__((target("avx2"))) inline __m256i mask(long lanes) {
  return _mm256_set_epi64x(lanes > 3 ? -1 : 0, lanes > 2 ? -1 : 0, lanes > 1 ? -1 : 0, lanes > 0 ? -1 : 0);
}
__attribute__((target("avx2"))) inline __m256i load(const std::int64_t* p, __m256i m) {
  return _mm256_maskload_epi64(reinterpret_cast<const long long*>(p), m);
}

// One pass of the row program over columns j0 .. j0 + 4V - 1 with V 256-bit vectors (lanes outside k masked).
template <int V>
__attribute__((target("avx2"))) void program_avx2_pass(std::int64_t* y, const std::int64_t* xj, long k, long j0,
                                                        const SparseLetter& g, __m256i m0, __m256i m1) {
  const SparseLetter::ProgramSource* src = g.program_sources().data();
  for (const auto& row : g.program_rows()) {
    const SparseLetter::ProgramSource* q = src + row.first;
    __m256i a0 = _mm256_setzero_si256(), a1 = _mm256_setzero_si256();
    for (std::uint32_t e = 0; e < row.plus; ++e, ++q) {
      const std::int64_t* p = xj + q->src * k;
      a0 = _mm256_add_epi64(a0, load(p, m0));
      if constexpr (V == 2) a1 = _mm256_add_epi64(a1, load(p + 4, m1));
    }
    for (std::uint32_t e = 0; e < row.minus; ++e, ++q) {
      const std::int64_t* p = xj + q->src * k;
      a0 = _mm256_sub_epi64(a0, load(p, m0));
      if constexpr (V == 2) a1 = _mm256_sub_epi64(a1, load(p + 4, m1));
    }
    for (std::uint32_t e = 0; e < row.times; ++e, ++q) {
      const std::int64_t* p = xj + q->src * k;
      const std::uint64_t v = static_cast<std::uint64_t>(q->v);
      const __m256i vl = _mm256_set1_epi64x(static_cast<long long>(v & 0xFFFFFFFFu));
      const __m256i vh = _mm256_set1_epi64x(static_cast<long long>(v >> 32));
      a0 = _mm256_add_epi64(a0, mullo64_avx2(load(p, m0), vl, vh));
      if constexpr (V == 2) a1 = _mm256_add_epi64(a1, mullo64_avx2(load(p + 4, m1), vl, vh));
    }
    std::int64_t* d = y + row.dst * k + j0;
    _mm256_maskstore_epi64(reinterpret_cast<long long*>(d), m0, a0);
    if constexpr (V == 2) _mm256_maskstore_epi64(reinterpret_cast<long long*>(d + 4), m1, a1);
  }
}

// Row program with 4 columns per 256-bit vector, two vectors (8 columns) per pass over the program.
__attribute__((target("avx2"))) void program_avx2(std::int64_t* y, const std::int64_t* x, long k,
                                                   const SparseLetter& g) {
  for (long j0 = 0; j0 < k; j0 += 8) {
    const long rest = k - j0;
    if (rest > 4)
      program_avx2_pass<2>(y, x + j0, k, j0, g, mask(4), mask(rest - 4));
    else
      program_avx2_pass<1>(y, x + j0, k, j0, g, mask(rest), mask(0));
  }
}
#endif

// Portable row program (unsigned arithmetic: the same wrapping sums as the int64 kernels).
void program_portable(std::int64_t* y, const std::int64_t* x, long k, const SparseLetter& g) {
  const SparseLetter::ProgramSource* src = g.program_sources().data();
  std::vector<std::uint64_t> acc(static_cast<size_t>(k));
  for (const auto& row : g.program_rows()) {
    std::fill(acc.begin(), acc.end(), 0);
    const SparseLetter::ProgramSource* q = src + row.first;
    for (std::uint32_t e = 0; e < row.plus + row.minus + row.times; ++e, ++q) {
      const std::int64_t* s0 = x + q->src * k;
      const std::uint64_t v = static_cast<std::uint64_t>(q->v);
      for (long j = 0; j < k; ++j) acc[static_cast<size_t>(j)] += v * static_cast<std::uint64_t>(s0[j]);
    }
    for (long j = 0; j < k; ++j) y[row.dst * k + j] = static_cast<std::int64_t>(acc[static_cast<size_t>(j)]);
  }
}

// Shape, buffer and coefficient bound of y = g x (checks that g composes with x and y is not x). The buffer is
// zero-filled unless every destination is written (keeps its allocation when the size repeats).
SmallBlock& prepare_output(SmallBlock* out, const SparseLetter& g, const SmallBlock& x, bool zero_fill) {
  if (g.cols() != x.rows) throw MathError("letter does not compose with the operand");
  if (out == &x) throw MathError("apply_into: output aliases the operand");
  SmallBlock& y = *out;
  y.rows = g.rows();
  y.k = x.k;
  y.n = x.n;
  y.masks = x.masks;
  const size_t size = static_cast<size_t>(x.masks * g.rows() * x.k * x.n);
  if (zero_fill) y.a.assign(size, 0);
  else y.a.resize(size);
  y.bound = x.bound >= 0 ? x.bound * g.beta() * (1 + 1e-12) : -1;
  return y;
}

}  // namespace

void apply_into_portable(SmallBlock* out, const SparseLetter& g, const SmallBlock& x) {
  SmallBlock& y = prepare_output(out, g, x, !g.covers_all());
  program_portable(y.a.data(), x.a.data(), x.k, g);
}

void apply_into_avx2(SmallBlock* out, const SparseLetter& g, const SmallBlock& x) {
  if (!letter_kernel_available(LetterKernel::kAvx2)) throw MathError("the AVX2 letter kernel needs a processor with AVX2");
#ifdef ZB_HAVE_VECTOR_KERNELS
  SmallBlock& y = prepare_output(out, g, x, !g.covers_all());
  program_avx2(y.a.data(), x.a.data(), x.k, g);
#else
  (void)out, (void)g, (void)x;
#endif
}

void apply_into_avx512(SmallBlock* out, const SparseLetter& g, const SmallBlock& x) {
  if (!letter_kernel_available(LetterKernel::kAvx512))
    throw MathError("the AVX-512 letter kernel needs a processor with AVX-512 F, DQ and VL");
#ifdef ZB_HAVE_VECTOR_KERNELS
  SmallBlock& y = prepare_output(out, g, x, !g.covers_all());
  program_avx512(y.a.data(), x.a.data(), x.k, g);
#else
  (void)out, (void)g, (void)x;
#endif
}

void apply_into(SmallBlock* out, const SparseLetter& g, const SmallBlock& x, LetterKernel kernel) {
  switch (letter_kernel_resolve(kernel)) {
    case LetterKernel::kEntries: return apply_into_entries(out, g, x);
    case LetterKernel::kAvx2: return apply_into_avx2(out, g, x);
    case LetterKernel::kAvx512: return apply_into_avx512(out, g, x);
    default: return apply_into_portable(out, g, x);
  }
}

void apply_into_entries(SmallBlock* out, const SparseLetter& g, const SmallBlock& x) {
  SmallBlock& y = prepare_output(out, g, x, true);
  const long k = x.k, n = x.n;
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

namespace zb {

const char* letter_kernel_name(LetterKernel k) {
  switch (k) {
    case LetterKernel::kAuto: return "auto";
    case LetterKernel::kEntries: return "entries";
    case LetterKernel::kPortable: return "portable";
    case LetterKernel::kAvx2: return "avx2";
    case LetterKernel::kAvx512: return "avx512";
  }
  return "?";
}

bool letter_kernel_from_name(const std::string& name, LetterKernel* out) {
  for (LetterKernel k : {LetterKernel::kAuto, LetterKernel::kEntries, LetterKernel::kPortable, LetterKernel::kAvx2,
                         LetterKernel::kAvx512})
    if (name == letter_kernel_name(k)) {
      *out = k;
      return true;
    }
  return false;
}

bool letter_kernel_available(LetterKernel k) {
#ifdef ZB_HAVE_VECTOR_KERNELS
  if (k == LetterKernel::kAvx2) return detail::have_avx2();
  if (k == LetterKernel::kAvx512) return detail::have_avx512();
#else
  if (k == LetterKernel::kAvx2 || k == LetterKernel::kAvx512) return false;
#endif
  return true;
}

LetterKernel letter_kernel_resolve(LetterKernel k) {
  if (k != LetterKernel::kAuto) return k;
  static const LetterKernel best = letter_kernel_available(LetterKernel::kAvx512) ? LetterKernel::kAvx512
                                   : letter_kernel_available(LetterKernel::kAvx2) ? LetterKernel::kAvx2
                                                                                  : LetterKernel::kPortable;
  return best;
}

}  // namespace zb
