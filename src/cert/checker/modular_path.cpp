// Modular certificates and `verify --via modular` (docs/certificate-format.md sections 6a and 7): the checker's
// own reduction mod p, its own propagation of the kept columns, its own conjugate enclosures and norm bound.
// Shared with the producer (trusted base, linalg/modular_base.hpp): make_prime (validates a prime record),
// choose_primes, embeddings_up_to_conjugation and order_multiplier.
#include <fmt/format.h>

#include <algorithm>
#include <cmath>

#include "checker.hpp"
#include "zetabraid/detail/raii.hpp"

namespace zb::checker {

namespace {

// Image of x at (p, zeta -> w, sqrt(d_j) -> roots[j]); rejects when p divides a denominator.
ulong mod_image(const Scalar& x, const ModularPrime& q, const nmod_t& m) {
  ulong v = 0;
  FmpqPolyT p;
  for (const auto& [mask, c] : x.terms()) {
    c.get_poly(p.get());
    const ulong den = fmpz_fdiv_ui(fmpq_poly_denref(p.get()), m.n);
    if (den == 0) reject(fmt::format("prime {} divides a denominator of {}", q.p, c.str()));
    ulong t = 0;
    for (long k = fmpq_poly_length(p.get()) - 1; k >= 0; --k)
      t = nmod_add(nmod_mul(t, q.zeta, m), fmpz_fdiv_ui(fmpq_poly_numref(p.get()) + k, m.n), m);
    t = nmod_mul(t, n_invmod(den, m.n), m);
    for (size_t j = 0; j < q.roots.size(); ++j)
      if (mask & (RadicalMask{1} << j)) t = nmod_mul(t, q.roots[j], m);
    v = nmod_add(v, t, m);
  }
  return v;
}

// Image of X = post * rho(w) * start - offset (post, offset may be null), row-major rows(X) x cols(start).
std::vector<ulong> mod_product(const std::vector<const LetterTable*>& w, const Matrix& start, const Matrix* post,
                               const Matrix* offset, const ModularPrime& q) {
  nmod_t m;
  nmod_init(&m, q.p);
  const size_t k = start.cols();
  std::vector<ulong> acc(start.rows() * k), next;
  for (size_t i = 0; i < start.rows(); ++i)
    for (size_t j = 0; j < k; ++j) acc[i * k + j] = mod_image(start(i, j), q, m);
  std::map<const LetterTable*, std::vector<ulong>> values;
  for (const LetterTable* t : w) {
    auto it = values.find(t);
    if (it == values.end()) {
      std::vector<ulong> v;
      for (const auto& e : t->entries) v.push_back(mod_image(e.value, q, m));
      it = values.emplace(t, std::move(v)).first;
    }
    next.assign(t->rows * k, 0);
    for (size_t e = 0; e < t->entries.size(); ++e) {
      const ulong a = it->second[e];
      ulong* dst = &next[t->entries[e].row * k];
      const ulong* src = &acc[t->entries[e].col * k];
      for (size_t j = 0; j < k; ++j) dst[j] = nmod_add(dst[j], nmod_mul(a, src[j], m), m);
    }
    acc.swap(next);
  }
  if (post) {
    next.assign(post->rows() * k, 0);
    for (size_t i = 0; i < post->rows(); ++i)
      for (size_t r = 0; r < post->cols(); ++r) {
        if ((*post)(i, r).is_zero()) continue;
        const ulong a = mod_image((*post)(i, r), q, m);
        for (size_t j = 0; j < k; ++j) next[i * k + j] = nmod_add(next[i * k + j], nmod_mul(a, acc[r * k + j], m), m);
      }
    acc.swap(next);
  }
  if (offset)
    for (size_t i = 0; i < offset->rows(); ++i)
      for (size_t j = 0; j < k; ++j) acc[i * k + j] = nmod_sub(acc[i * k + j], mod_image((*offset)(i, j), q, m), m);
  return acc;
}

// cur <- table * cur (sparse), balls at prec.
void left_apply(acb_mat_t cur, size_t out_rows, const std::vector<LetterTable::Entry>& ent,
                const std::vector<acb_struct>& val, long prec) {
  AcbMatT nx(static_cast<slong>(out_rows), acb_mat_ncols(cur));
  for (size_t n = 0; n < ent.size(); ++n)
    for (slong j = 0; j < acb_mat_ncols(cur); ++j)
      acb_addmul(acb_mat_entry(nx.get(), static_cast<slong>(ent[n].row), j), &val[n],
                 acb_mat_entry(cur, static_cast<slong>(ent[n].col), j), prec);
  acb_mat_swap(nx.get(), cur);
}

// Balls of a table's entries under one embedding.
std::vector<acb_struct> embedded(const std::vector<LetterTable::Entry>& ent, const Embedding& e, long prec) {
  std::vector<acb_struct> v(ent.size());
  for (size_t n = 0; n < v.size(); ++n) {
    acb_init(&v[n]);
    ent[n].value.ball_at(&v[n], prec, e.a, e.signs);
  }
  return v;
}
void clear_balls(std::vector<acb_struct>& v) {
  for (auto& z : v) acb_clear(&z);
}

// The product over every factor (start, post, offset, each letter occurrence) of its order multiplier.
void multiplier(fmpz_t s, const std::vector<const LetterTable*>& w, const Matrix& start, const Matrix* post,
                const Matrix* offset) {
  FmpzT u, v;
  order_multiplier(s, start);
  for (const Matrix* mm : {post, offset})
    if (mm) {
      order_multiplier(u.get(), *mm);
      fmpz_mul(s, s, u.get());
    }
  std::map<const LetterTable*, ulong> count;
  for (const LetterTable* tb : w) ++count[tb];
  for (const auto& [tb, c] : count) {
    fmpz_one(u.get());
    for (const auto& en : tb->entries) {
      Matrix one(start.field(), 1, 1);
      one(0, 0) = en.value;
      order_multiplier(v.get(), one);
      fmpz_lcm(u.get(), u.get(), v.get());
    }
    fmpz_pow_ui(u.get(), u.get(), c);
    fmpz_mul(s, s, u.get());
  }
}

// Upper bound of s^[L:Q] * max over entries x of X of prod_sigma |sigma(x)| (section 6a). Per embedding the word
// is cut into blocks of letters, each block enclosed as a ball matrix, and the kept columns multiplied by the
// blocks in turn (radii then grow like the blocks' norms).
void mod_norm_bound(mag_t out, const std::vector<const LetterTable*>& w, const Matrix& start, const Matrix* post,
                    const Matrix* offset, long prec) {
  const Field& f = *start.field();
  const slong k = static_cast<slong>(start.cols());
  const size_t block =
      std::clamp<size_t>(128 * std::max<size_t>(1, start.cols()) / std::max<size_t>(1, start.rows()), 1, 128);
  const slong rows = static_cast<slong>(post ? post->rows() : (w.empty() ? start.rows() : w.back()->rows));
  std::vector<MagT> entry(static_cast<size_t>(rows * k));
  for (auto& e : entry) mag_one(e.get());
  MagT t;
  AcbT o;
  for (const Embedding& e : embeddings_up_to_conjugation(f)) {
    std::map<const LetterTable*, std::vector<acb_struct>> balls;
    auto values = [&](const LetterTable* tb) -> const std::vector<acb_struct>& {
      auto it = balls.find(tb);
      if (it == balls.end()) it = balls.emplace(tb, embedded(tb->entries, e, prec)).first;
      return it->second;
    };
    AcbMatT v(static_cast<slong>(start.rows()), k);
    for (size_t i = 0; i < start.rows(); ++i)
      for (slong j = 0; j < k; ++j)
        start(i, static_cast<size_t>(j)).ball_at(acb_mat_entry(v.get(), static_cast<slong>(i), j), prec, e.a, e.signs);
    for (size_t at = 0; at < w.size(); at += block) {
      const size_t end = std::min(w.size(), at + block);
      if (end - at == 1) {
        left_apply(v.get(), w[at]->rows, w[at]->entries, values(w[at]), prec);
        continue;
      }
      AcbMatT blk(acb_mat_nrows(v.get()), acb_mat_nrows(v.get()));
      acb_mat_one(blk.get());
      for (size_t x = at; x < end; ++x) left_apply(blk.get(), w[x]->rows, w[x]->entries, values(w[x]), prec);
      AcbMatT prod(acb_mat_nrows(blk.get()), k);
      acb_mat_mul(prod.get(), blk.get(), v.get(), prec);
      acb_mat_swap(prod.get(), v.get());
    }
    if (post) {
      std::vector<LetterTable::Entry> pe;
      for (size_t i = 0; i < post->rows(); ++i)
        for (size_t r = 0; r < post->cols(); ++r)
          if (!(*post)(i, r).is_zero()) pe.push_back({i, r, (*post)(i, r)});
      std::vector<acb_struct> pv = embedded(pe, e, prec);
      left_apply(v.get(), post->rows(), pe, pv, prec);
      clear_balls(pv);
    }
    for (slong i = 0; i < rows; ++i)
      for (slong j = 0; j < k; ++j) {
        acb_ptr x = acb_mat_entry(v.get(), i, j);
        if (offset) {
          (*offset)(static_cast<size_t>(i), static_cast<size_t>(j)).ball_at(o.get(), prec, e.a, e.signs);
          acb_sub(x, x, o.get(), prec);
        }
        acb_get_mag(t.get(), x);
        for (int r = 0; r < e.weight; ++r) mag_mul(entry[static_cast<size_t>(i * k + j)].get(), entry[static_cast<size_t>(i * k + j)].get(), t.get());
      }
    for (auto& [tb, vals] : balls) clear_balls(vals);
  }
  mag_zero(out);
  for (auto& z : entry) mag_max(out, out, z.get());
  FmpzT s;
  multiplier(s.get(), w, start, post, offset);
  mag_set_fmpz(t.get(), s.get());
  mag_pow_ui(t.get(), t.get(), static_cast<ulong>(f.cyclotomic()->degree()) << f.radicand_count());
  mag_mul(out, out, t.get());
}

// "digits" without a leading zero (or "0" when zero_ok), at most 10^6 characters.
bool plain_integer(const std::string& s, bool zero_ok) {
  if (s.empty() || s.size() > 1000000 || s.find_first_not_of("0123456789") != std::string::npos) return false;
  return s[0] != '0' || (zero_ok && s == "0");
}

// The producer's informational fields of a norm-bound proof: well-formed and consistent, never trusted.
void check_informational(const json& jp) {
  const std::string s = str_of(jp["multiplier"], "proof.multiplier");
  if (!plain_integer(s, false)) reject("proof.multiplier must be a positive decimal integer");
  const std::string b = str_of(jp["norm_bound"], "proof.norm_bound");
  const size_t star = b.find("*2^");
  std::string e = star == std::string::npos ? "" : b.substr(star + 3);
  const bool neg = !e.empty() && e[0] == '-';
  if (neg) e = e.substr(1);
  if (star == std::string::npos || !plain_integer(b.substr(0, star), true) || !plain_integer(e, true) || e.size() > 18)
    reject("proof.norm_bound must read M*2^E with integers M >= 0 and E");
  if (!jp["bound_bits"].is_number_integer()) reject("proof.bound_bits must be an integer");
  FmpzT m;
  fmpz_set_str(m.get(), b.substr(0, star).c_str(), 10);
  const long ex = (neg ? -1 : 1) * std::stol(e);
  const long bits = fmpz_is_zero(m.get()) ? 0 : static_cast<long>(fmpz_bits(m.get())) + ex;
  if (jp["bound_bits"].get<long long>() != bits) reject("proof.bound_bits is not the bit length of proof.norm_bound");
}

// Proof that X = post * rho(w) * start is zero ("norm-bound") or nonzero ("nonzero-image").
std::string check_proof(const json& jp, const std::vector<const LetterTable*>& w, const Matrix& start,
                        const Matrix& post, bool claim_zero, long prec) {
  const Field& f = *start.field();
  const std::string kind = str_of(jp["kind"], "proof.kind");
  const size_t k = start.cols();
  if (!claim_zero) {
    if (kind != "nonzero-image") reject("a leaking verdict by modular images needs proof.kind \"nonzero-image\"");
    expect_keys(jp, {"kind", "prime", "row", "col", "value"}, "proof");
    ModularPrime q = prime_of(jp["prime"], f, "proof.prime");
    const size_t row = uint_of(jp["row"], "proof.row"), col = uint_of(jp["col"], "proof.col");
    const ulong value = uint_of(jp["value"], "proof.value", ~ulong(0));
    if (row >= post.rows() || col >= k) reject("proof.row/col outside the leak block");
    std::vector<ulong> im = mod_product(w, start, &post, nullptr, q);
    if (im[row * k + col] == 0) reject(fmt::format("the leak block's entry ({}, {}) vanishes mod {}", row, col, q.p));
    if (im[row * k + col] != value) reject("proof.value is not the image of the stated entry");
    return fmt::format("entry ({}, {}) is {} != 0 mod {}", row, col, value, q.p);
  }
  if (kind != "norm-bound") reject("a zero claim by modular images needs proof.kind \"norm-bound\"");
  expect_keys(jp, {"kind", "multiplier", "norm_bound", "bound_bits", "primes"}, "proof");
  check_informational(jp);
  if (!jp["primes"].is_array() || jp["primes"].empty() || jp["primes"].size() > 200000)
    reject("proof.primes must be a non-empty array (at most 200000 primes)");
  std::set<ulong> seen;
  FmpzT prod;
  fmpz_one(prod.get());
  for (size_t i = 0; i < jp["primes"].size(); ++i) {
    ModularPrime q = prime_of(jp["primes"][i], f, fmt::format("proof.primes[{}]", i));
    if (!seen.insert(q.p).second) reject(fmt::format("proof.primes: {} occurs twice", q.p));
    for (ulong v : mod_product(w, start, &post, nullptr, q))
      if (v) reject(fmt::format("the image mod {} is not zero", q.p));
    fmpz_mul_ui(prod.get(), prod.get(), q.p);
  }
  MagT bound, pm;
  mod_norm_bound(bound.get(), w, start, &post, nullptr, prec);
  mag_set_fmpz_lower(pm.get(), prod.get());
  if (mag_cmp(bound.get(), pm.get()) >= 0)
    reject("the product of proof.primes does not exceed the checker's norm bound");
  const std::string shown = mag_is_zero(bound.get())
                                ? std::string("0")  // display only
                                : fmt::format("~2^{}", static_cast<long>(std::ceil(mag_get_d_log2_approx(bound.get()))));
  return fmt::format("images vanish at {} primes, product > norm bound {}", seen.size(), shown);
}

}  // namespace

std::string modular_equal(const Inputs& x, const Matrix& hint) {
  const Field& f = *x.model.field;
  const auto& w = x.letters.sequence;
  MagT bound, pm;
  mod_norm_bound(bound.get(), w, x.keep, nullptr, &hint, 128);
  FmpzT prod;
  fmpz_one(prod.get());
  size_t used = 0, want = 1;
  std::vector<ModularPrime> primes;
  for (;;) {
    mag_set_fmpz_lower(pm.get(), prod.get());
    if (used > 0 && mag_cmp(bound.get(), pm.get()) < 0) break;
    if (used >= primes.size()) {
      want = std::max<size_t>(2 * want, static_cast<size_t>(std::max(0.0, mag_get_d_log2_approx(bound.get()))) / 61 + 2);
      if (want > 200000) reject("the norm bound needs more than 200000 primes (use the exact route)");
      primes = choose_primes(f, want, 62);
    }
    const ModularPrime& q = primes[used++];
    for (ulong v : mod_product(w, x.keep, nullptr, &hint, q))
      if (v) reject(fmt::format("hints.image is not rho(word) applied to the kept basis (differs mod {})", q.p));
    fmpz_mul_ui(prod.get(), prod.get(), q.p);
  }
  const long bits = static_cast<long>(std::ceil(mag_get_d_log2_approx(bound.get())));  // display only
  return fmt::format("; image checked mod {} primes (norm bound ~2^{})", used, bits);
}

std::string check_modular(const Inputs& x, const json& c, Verdict claim, long prec) {
  const json& jl = c["claim"]["leakage"];
  const json& jh = c["hints"];
  if (claim != Verdict::kLeakFree && claim != Verdict::kLeaks)
    reject("a modular certificate claims leak-free or leaks");
  for (const char* key : {"exact", "ball", "upper", "lower"})
    expect_null(jl[key], fmt::format("claim.leakage.{} (modular method)", key));
  expect_null(jh["image"], "hints.image (modular method)");
  expect_null(jh["action"], "hints.action (modular method)");
  if (prec < 32 || prec > 4096) reject("method.precision_bits out of range (32..4096)");
  // the checker's own leak block: rows outside the kept coordinates, or 1 - V G^-1 V^*
  const Matrix post = leak_post(x);
  const std::string what = check_proof(c["proof"], x.letters.sequence, x.keep, post, claim == Verdict::kLeakFree, prec);
  return fmt::format("{} (modular; {} letters, kept {} of {}): {}", verdict_name(claim), x.word.size(), x.keep.cols(),
                     x.dim, what);
}

}  // namespace zb::checker
