#include "zetabraid/linalg/modular.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <thread>
#include <unordered_map>

#include "zetabraid/detail/parallel.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/linalg/word_product.hpp"

namespace zb {

namespace {

nmod_t make_nmod(ulong p) {
  nmod_t m;
  nmod_init(&m, p);
  return m;
}

}  // namespace

ModularImage word_product_mod(const std::vector<const Matrix*>& letters, const Matrix& start, const ModularPrime& q) {
  size_t r = start.rows();
  for (size_t i = 0; i < letters.size(); ++i) {
    if (!letters[i] || letters[i]->cols() != r) throw MathError(fmt::format("letter {} does not compose", i + 1));
    r = letters[i]->rows();
  }
  return word_product_mod(IndexedWord::from_letters(letters), start, q);
}

ModularImage word_product_mod(const IndexedWord& word, const Matrix& start, const ModularPrime& q) {
  if (!word.empty() && word.cols() != start.rows()) throw MathError("letter 1 does not compose");
  nmod_t m = make_nmod(q.p);
  // Distinct letters reduced once, as lists of nonzero entries (row, col, value).
  struct Entry {
    size_t i, j;
    ulong v;
  };
  std::vector<std::vector<Entry>> sparse;
  for (const Matrix* l : word.letters()) {
    ModularImage g = reduce_matrix(*l, q);
    std::vector<Entry> e;
    for (size_t i = 0; i < g.rows(); ++i)
      for (size_t j = 0; j < g.cols(); ++j)
        if (g(i, j)) e.push_back({i, j, g(i, j)});
    sparse.push_back(std::move(e));
  }
  ModularImage acc = reduce_matrix(start, q);
  const size_t k = start.cols();
  word.for_each([&](std::uint32_t x) {
    ModularImage out(q.p, word.letters()[x]->rows(), k);
    for (const Entry& e : sparse[x]) {
      ulong* dst = &out(e.i, 0);
      const ulong* src = &acc(e.j, 0);
      for (size_t j = 0; j < k; ++j) dst[j] = nmod_add(dst[j], nmod_mul(e.v, src[j], m), m);
    }
    acc = std::move(out);
  });
  return acc;
}

ModularImage word_product_mod(const std::vector<const Matrix*>& letters, const ModularPrime& q) {
  if (letters.empty()) throw MathError("empty word: no matrix shape to return");
  return word_product_mod(letters, Matrix::identity(letters.front()->field(), letters.front()->cols()), q);
}

namespace {

// Image of X = post * (word * start) - offset at q; false when p divides a denominator.
bool image_of(ModularImage* out, const IndexedWord& word, const Matrix& start, const Matrix* post,
              const Matrix* offset, const ModularPrime& q) {
  try {
    ModularImage w = word_product_mod(word, start, q);
    if (post) w = reduce_matrix(*post, q) * w;
    if (offset) {
      ModularImage o = reduce_matrix(*offset, q);
      const nmod_t& m = w.modulus();
      for (size_t i = 0; i < w.rows(); ++i)
        for (size_t j = 0; j < w.cols(); ++j) w(i, j) = nmod_sub(w(i, j), o(i, j), m);
    }
    *out = std::move(w);
    return true;
  } catch (const MathError&) {
    return false;
  }
}

// Upper bound B (mag) of prod over all embeddings of |sigma(x)|, maximised over the entries x of X.
// Per embedding the conjugated letters are enclosed in Arb balls and the kept columns propagated. Letter by
// letter, the radii grow like the product of the letters' absolute-value matrices (the wrapping effect: about
// half a bit per letter even for unitary letters, whose true growth is 0). With block > 1 the letters are first
// multiplied into blocks of `block` letters (ball matrices, rows x cols of the block) and the columns propagated
// block by block, so the radii grow like the blocks' norms, close to the true growth. Rigorous either way.
void conjugate_norm_bound(mag_t out, const std::vector<const Matrix*>& letters, const Matrix& start, const Matrix* post,
                          const Matrix* offset, long prec, size_t block) {
  const Field& f = *start.field();
  const slong k = static_cast<slong>(start.cols());
  const size_t rows = post ? post->rows() : (letters.empty() ? start.rows() : letters.back()->rows());
  std::vector<mag_struct> entry(rows * static_cast<size_t>(k));
  for (auto& e : entry) {
    mag_init(&e);
    mag_one(&e);
  }
  struct Entry {
    slong i, j;
    acb_struct v;
  };
  mag_t t;
  mag_init(t);
  // Sparse letter times a ball matrix: dst (rows(l) x cols(src)) = l * src.
  auto apply = [prec](acb_mat_t dst, const Matrix& l, const std::vector<Entry>& g, const acb_mat_t src) {
    acb_mat_clear(dst);
    acb_mat_init(dst, static_cast<slong>(l.rows()), acb_mat_ncols(src));
    for (const Entry& en : g)
      for (slong j = 0; j < acb_mat_ncols(src); ++j)
        acb_addmul(acb_mat_entry(dst, en.i, j), &en.v, acb_mat_entry(src, en.j, j), prec);
  };
  for (const Embedding& e : embeddings_up_to_conjugation(f)) {
    auto ball_of = [&](acb_t b, const Scalar& x) { x.ball_at(b, prec, e.a, e.signs); };
    std::unordered_map<const Matrix*, std::vector<Entry>> tab;
    auto table = [&](const Matrix* m) -> const std::vector<Entry>& {
      auto it = tab.find(m);
      if (it != tab.end()) return it->second;
      std::vector<Entry> v;
      for (size_t i = 0; i < m->rows(); ++i)
        for (size_t j = 0; j < m->cols(); ++j)
          if (!(*m)(i, j).is_zero()) {
            v.push_back({static_cast<slong>(i), static_cast<slong>(j), {}});
            acb_init(&v.back().v);
            ball_of(&v.back().v, (*m)(i, j));
          }
      return tab.emplace(m, std::move(v)).first->second;
    };
    acb_mat_t acc, blk, tmp;
    acb_mat_init(acc, static_cast<slong>(start.rows()), k);
    acb_mat_init(blk, 0, 0);
    acb_mat_init(tmp, 0, 0);
    for (size_t i = 0; i < start.rows(); ++i)
      for (slong j = 0; j < k; ++j) ball_of(acb_mat_entry(acc, static_cast<slong>(i), j), start(i, static_cast<size_t>(j)));
    for (size_t pos = 0; pos < letters.size();) {
      size_t end = std::min(letters.size(), pos + std::max<size_t>(block, 1));
      if (end - pos == 1) {
        apply(tmp, *letters[pos], table(letters[pos]), acc);
        acb_mat_swap(tmp, acc);
      } else {
        acb_mat_clear(blk);
        acb_mat_init(blk, static_cast<slong>(letters[pos]->cols()), static_cast<slong>(letters[pos]->cols()));
        acb_mat_one(blk);
        for (size_t x = pos; x < end; ++x) {
          apply(tmp, *letters[x], table(letters[x]), blk);
          acb_mat_swap(tmp, blk);
        }
        acb_mat_clear(tmp);
        acb_mat_init(tmp, acb_mat_nrows(blk), k);
        acb_mat_mul(tmp, blk, acc, prec);
        acb_mat_swap(tmp, acc);
      }
      pos = end;
    }
    if (post) {
      acb_mat_t pb;
      acb_mat_init(pb, static_cast<slong>(post->rows()), static_cast<slong>(post->cols()));
      for (size_t i = 0; i < post->rows(); ++i)
        for (size_t j = 0; j < post->cols(); ++j) ball_of(acb_mat_entry(pb, static_cast<slong>(i), static_cast<slong>(j)), (*post)(i, j));
      acb_mat_clear(tmp);
      acb_mat_init(tmp, static_cast<slong>(post->rows()), k);
      acb_mat_mul(tmp, pb, acc, prec);
      acb_mat_swap(tmp, acc);
      acb_mat_clear(pb);
    }
    acb_t o;
    acb_init(o);
    for (size_t i = 0; i < rows; ++i)
      for (slong j = 0; j < k; ++j) {
        acb_ptr x = acb_mat_entry(acc, static_cast<slong>(i), j);
        if (offset) {
          ball_of(o, (*offset)(i, static_cast<size_t>(j)));
          acb_sub(x, x, o, prec);
        }
        acb_get_mag(t, x);
        for (int w = 0; w < e.weight; ++w)
          mag_mul(&entry[i * static_cast<size_t>(k) + static_cast<size_t>(j)], &entry[i * static_cast<size_t>(k) + static_cast<size_t>(j)], t);
      }
    acb_clear(o);
    acb_mat_clear(acc);
    acb_mat_clear(blk);
    acb_mat_clear(tmp);
    for (auto& [m, v] : tab)
      for (auto& en : v) acb_clear(&en.v);
  }
  mag_zero(out);
  for (auto& x : entry) {
    mag_max(out, out, &x);
    mag_clear(&x);
  }
  mag_clear(t);
}

// First nonzero entry of an image, if any.
bool first_nonzero(const ModularImage& im, size_t* r, size_t* c) {
  for (size_t i = 0; i < im.rows(); ++i)
    for (size_t j = 0; j < im.cols(); ++j)
      if (im(i, j)) {
        *r = i;
        *c = j;
        return true;
      }
  return false;
}

}  // namespace

void modular_norm_bound(mag_t bound, std::string* multiplier, const std::vector<const Matrix*>& letters,
                        const Matrix& start, const Matrix* post, const Matrix* offset, const ModularZeroOptions& opt) {
  const Field& f = *start.field();
  fmpz_t s, t;
  fmpz_init(s);
  fmpz_init(t);
  order_multiplier(s, start);
  for (const Matrix* m : {post, offset})
    if (m) {
      order_multiplier(t, *m);
      fmpz_mul(s, s, t);
    }
  {
    std::unordered_map<const Matrix*, ulong> count;  // s_L^(occurrences) for each distinct letter
    for (const Matrix* l : letters) ++count[l];
    for (const auto& [l, c] : count) {
      order_multiplier(t, *l);
      fmpz_pow_ui(t, t, c);
      fmpz_mul(s, s, t);
    }
  }
  if (multiplier) {
    char* sd = fmpz_get_str(nullptr, 10, s);
    *multiplier = sd;
    flint_free(sd);
  }
  size_t block = opt.block;
  if (block == 0) {
    size_t dim = std::max<size_t>(1, start.rows());
    block = std::clamp<size_t>(128 * std::max<size_t>(1, start.cols()) / dim, 1, 128);
  }
  conjugate_norm_bound(bound, letters, start, post, offset, opt.ball_precision, block);
  mag_t sm;
  mag_init(sm);
  mag_set_fmpz(sm, s);
  mag_pow_ui(sm, sm, static_cast<ulong>(f.cyclotomic()->degree()) << f.radicand_count());
  mag_mul(bound, bound, sm);
  mag_clear(sm);
  fmpz_clear(s);
  fmpz_clear(t);
}

ModularZeroResult modular_zero_test(const std::vector<const Matrix*>& letters, const Matrix& start, const Matrix* post,
                                    const Matrix* offset, const ModularZeroOptions& opt) {
  const Field& f = *start.field();
  {
    size_t r = start.rows();
    for (size_t i = 0; i < letters.size(); ++i) {
      if (!letters[i] || letters[i]->cols() != r) throw MathError(fmt::format("letter {} does not compose", i + 1));
      r = letters[i]->rows();
    }
    if (post && post->cols() != r) throw MathError("post matrix does not compose with the word");
    size_t rows = post ? post->rows() : r;
    if (offset && (offset->rows() != rows || offset->cols() != start.cols()))
      throw MathError("offset matrix does not match the product's shape");
  }
  ModularZeroResult res;
  const IndexedWord word = IndexedWord::from_letters(letters);  // distinct letters found once for all primes
  // Primes are taken in choose_primes order; a prime dividing a denominator is skipped (never at 62 bits for
  // the bundled models, but possible in principle).
  std::vector<ModularPrime> pool;
  size_t next = 0;
  auto run = [&](size_t count) -> bool {  // images at the next `count` usable primes; true when nonzero found
    while (count > 0) {
      if (pool.size() < next + count) pool = choose_primes(f, next + count + 8, 62);
      size_t batch = count;
      struct Outcome {  // per prime: usable, and the first nonzero entry of the image if any
        bool ok = false, nonzero = false;
        size_t r = 0, c = 0;
        ulong v = 0;
      };
      std::vector<Outcome> out(batch);
      auto work = [&](size_t lo, size_t hi) {
        ModularImage im(2, 0, 0);
        for (size_t b = lo; b < hi; ++b) {
          out[b].ok = image_of(&im, word, start, post, offset, pool[next + b]);
          if (out[b].ok && first_nonzero(im, &out[b].r, &out[b].c)) {
            out[b].nonzero = true;
            out[b].v = im(out[b].r, out[b].c);
          }
        }
      };
      int th = std::max(1, std::min<int>(opt.threads, static_cast<int>(batch)));
      if (th > 1)
        fork_join(true, [&] { work(0, batch / 2); }, [&] { work(batch / 2, batch); });
      else
        work(0, batch);
      size_t used = 0;
      for (size_t b = 0; b < batch; ++b) {
        if (!out[b].ok) continue;
        ++used;
        if (out[b].nonzero) {
          res.nonzero = true;
          res.witness = pool[next + b];
          res.row = out[b].r;
          res.col = out[b].c;
          res.value = out[b].v;
          return true;
        }
        res.primes.push_back(pool[next + b]);
      }
      next += batch;
      count -= used;
    }
    return false;
  };
  if (run(std::max<size_t>(1, opt.filter_primes)) || !opt.prove_zero) return res;
  fmpz_t t;
  fmpz_init(t);
  mag_t bound;
  mag_init(bound);
  modular_norm_bound(bound, &res.multiplier, letters, start, post, offset, opt);
  arf_t x;
  arf_init(x);
  arf_set_mag(x, bound);
  fmpz_t man, ex;
  fmpz_init(man);
  fmpz_init(ex);
  arf_get_fmpz_2exp(man, ex, x);
  res.bound_bits = arf_is_zero(x) ? 0 : static_cast<long>(fmpz_bits(man)) + fmpz_get_si(ex);
  {
    char* a = fmpz_get_str(nullptr, 10, man);
    char* b = fmpz_get_str(nullptr, 10, ex);
    res.norm_bound = fmt::format("{}*2^{}", a, b);
    flint_free(a);
    flint_free(b);
  }
  fmpz_clear(man);
  fmpz_clear(ex);
  arf_clear(x);
  // The primes' product must exceed B * 2^64: the margin lets a checker whose own rigorous bound comes out a little
  // above B (other rounding) accept the same primes. Primes are >= 2^61: each adds at least 61 bits.
  mag_mul_2exp_si(bound, bound, 64);
  const long target_bits = res.bound_bits + 64;
  auto product_exceeds = [&]() {
    fmpz_one(t);
    for (const ModularPrime& q : res.primes) fmpz_mul_ui(t, t, q.p);
    mag_t pm;
    mag_init(pm);
    mag_set_fmpz_lower(pm, t);
    bool ok = mag_cmp(bound, pm) < 0;
    mag_clear(pm);
    return ok;
  };
  while (!product_exceeds()) {
    size_t have_bits = 61 * res.primes.size();
    size_t need = target_bits > static_cast<long>(have_bits) ? (static_cast<size_t>(target_bits) - have_bits) / 61 + 1 : 1;
    if (res.primes.size() + need > opt.max_primes)
      throw ResourceError(fmt::format("the norm bound has {} bits: proving zero by modular images needs about {} "
                                      "primes (limit {}); use the exact engine instead",
                                      res.bound_bits, res.primes.size() + need, opt.max_primes));
    if (run(need)) break;
  }
  res.zero = !res.nonzero;
  mag_clear(bound);
  fmpz_clear(t);
  return res;
}

ModularZeroResult modular_zero_test(const IndexedWord& word, const Matrix& start, const Matrix* post,
                                    const Matrix* offset, const ModularZeroOptions& opt) {
  return modular_zero_test(word.expand_pointers(), start, post, offset, opt);
}

}  // namespace zb
