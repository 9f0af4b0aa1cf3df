// Exact word products: product tree over integer-polynomial matrices (see word_product.hpp).
#include "zetabraid/linalg/word_product.hpp"

#include "zetabraid/detail/parallel.hpp"

#include <fmt/format.h>

#include <exception>
#include <map>
#include <mutex>
#include <thread>
#include <unordered_map>

#include "zetabraid/error.hpp"
#include "zetabraid/linalg/poly_matrix.hpp"
#include <flint/fmpz_vec.h>

#include "sparse_kernel.hpp"

namespace zb {

namespace {

void check_shapes(const std::vector<const Matrix*>& letters, const Matrix* start) {
  for (size_t i = 0; i < letters.size(); ++i) {
    if (!letters[i]) throw MathError("null letter in a word product");
    if (letters[i]->field() != letters.front()->field()) throw MathError("letters of one word from different fields");
    if (i > 0 && letters[i]->cols() != letters[i - 1]->rows())
      throw MathError(fmt::format("letter {} ({}x{}) does not compose with letter {} ({}x{})", i + 1, letters[i]->rows(),
                                  letters[i]->cols(), i, letters[i - 1]->rows(), letters[i - 1]->cols()));
  }
  if (start && !letters.empty()) {
    if (start->field() != letters.front()->field()) throw MathError("start matrix from a different field");
    if (start->rows() != letters.front()->cols())
      throw MathError(fmt::format("start matrix {}x{} does not compose with the first letter ({}x{})", start->rows(),
                                  start->cols(), letters.front()->rows(), letters.front()->cols()));
  }
}

// A run of one letter: leaf index and exponent.
struct Token {
  size_t leaf;
  unsigned long exp;
  bool operator==(const Token& o) const { return leaf == o.leaf && exp == o.exp; }
};

constexpr std::uint64_t kHashMod = (std::uint64_t{1} << 61) - 1;
std::uint64_t mulmod61(std::uint64_t a, std::uint64_t b) {
  unsigned __int128 z = static_cast<unsigned __int128>(a) * b;
  std::uint64_t lo = static_cast<std::uint64_t>(z & kHashMod), hi = static_cast<std::uint64_t>(z >> 61);
  std::uint64_t s = lo + hi;
  return s >= kHashMod ? s - kHashMod : s;
}

// Smallest period p of seq (prefix function): seq = w^q u with |w| = p, u a prefix of w.
size_t smallest_period(const std::vector<Token>& seq) {
  size_t n = seq.size();
  if (n == 0) return 0;
  std::vector<size_t> pi(n, 0);
  for (size_t i = 1; i < n; ++i) {
    size_t k = pi[i - 1];
    while (k > 0 && !(seq[i] == seq[k])) k = pi[k - 1];
    if (seq[i] == seq[k]) ++k;
    pi[i] = k;
  }
  return n - pi[n - 1];
}

class ExactTree {
 public:
  ExactTree(const PolyContext& ctx, const std::vector<PolyMatrix>& leaves, const ProductOptions& opt)
      : ctx_(ctx), leaves_(leaves), opt_(opt) {}

  // Product of a token sequence (application order).
  PolyMatrix product(const std::vector<Token>& seq) {
    if (seq.empty()) throw MathError("empty token sequence");
    if (opt_.share_repeats && seq.size() >= 4) {
      size_t n = seq.size(), p = smallest_period(seq);
      if (p <= n / 2) {
        std::vector<Token> w(seq.begin(), seq.begin() + static_cast<long>(p));
        size_t q = n / p, r = n % p;
        PolyMatrix pw = product(w);
        PolyMatrix res = PolyMatrix::pow(pw, q, ctx_);
        if (r) {
          std::vector<Token> u(seq.begin(), seq.begin() + static_cast<long>(r));
          res = PolyMatrix::mul(product(u), res, ctx_);
        }
        return res;
      }
    }
    Range rg(*this, seq);
    return rg.run();
  }

  const PolyMatrix& power(const Token& t) {
    {
      std::lock_guard<std::mutex> lock(mu_);
      auto it = powers_.find({t.leaf, t.exp});
      if (it != powers_.end()) return *it->second;
    }
    auto pm = std::make_unique<PolyMatrix>(t.exp == 1 ? leaves_[t.leaf] : PolyMatrix::pow(leaves_[t.leaf], t.exp, ctx_));
    std::lock_guard<std::mutex> lock(mu_);
    return *powers_.emplace(std::make_pair(t.leaf, t.exp), std::move(pm)).first->second;
  }

 private:
  // Balanced tree over one token sequence, with repeated subtrees computed once.
  struct Range {
    ExactTree& t;
    const std::vector<Token>& seq;
    std::vector<std::uint64_t> h, pw;  // prefix hashes and powers of the base
    std::map<std::pair<size_t, std::uint64_t>, size_t> count;  // (length, hash) -> occurrences in the tree
    std::map<std::pair<size_t, std::uint64_t>, std::pair<size_t, std::shared_ptr<PolyMatrix>>> memo;  // -> (lo, value)
    std::mutex mu;
    int spawn_depth = 0;

    Range(ExactTree& tree, const std::vector<Token>& s) : t(tree), seq(s) {
      size_t n = seq.size();
      h.assign(n + 1, 0);
      pw.assign(n + 1, 1);
      const std::uint64_t base = 1000003;
      for (size_t i = 0; i < n; ++i) {
        std::uint64_t v = (static_cast<std::uint64_t>(seq[i].leaf) * 0x9E3779B97F4A7C15ULL) ^ (seq[i].exp * 0xC2B2AE3D27D4EB4FULL);
        v %= kHashMod;
        h[i + 1] = (mulmod61(h[i], base) + v) % kHashMod;
        pw[i + 1] = mulmod61(pw[i], base);
      }
      if (t.opt_.share_repeats) count_nodes(0, n);
      for (int th = t.opt_.threads; th > 1; th /= 2) ++spawn_depth;
    }
    std::pair<size_t, std::uint64_t> key(size_t lo, size_t hi) const {
      std::uint64_t x = (h[hi] + kHashMod - mulmod61(h[lo], pw[hi - lo])) % kHashMod;
      return {hi - lo, x};
    }
    void count_nodes(size_t lo, size_t hi) {
      if (hi - lo < 2) return;
      ++count[key(lo, hi)];
      size_t mid = lo + (hi - lo) / 2;
      count_nodes(lo, mid);
      count_nodes(mid, hi);
    }
    bool same(size_t a, size_t b, size_t len) const {
      for (size_t i = 0; i < len; ++i)
        if (!(seq[a + i] == seq[b + i])) return false;
      return true;
    }
    PolyMatrix run() { return node(0, seq.size(), 0); }

    PolyMatrix node(size_t lo, size_t hi, int depth) {
      if (hi - lo == 1) return t.power(seq[lo]);
      auto k = key(lo, hi);
      bool shared = false;
      if (t.opt_.share_repeats) {
        auto c = count.find(k);
        shared = c != count.end() && c->second > 1;
      }
      if (shared) {
        std::lock_guard<std::mutex> lock(mu);
        auto it = memo.find(k);
        if (it != memo.end() && same(it->second.first, lo, hi - lo)) return *it->second.second;
      }
      size_t mid = lo + (hi - lo) / 2;
      PolyMatrix left, right;
      fork_join(depth < spawn_depth && hi - lo >= 32, [&] { left = node(lo, mid, depth + 1); },
                        [&] { right = node(mid, hi, depth + 1); });
      PolyMatrix res = PolyMatrix::mul(right, left, t.ctx_);  // later letters act last (on the left)
      if (shared) {
        std::lock_guard<std::mutex> lock(mu);
        memo.emplace(k, std::make_pair(lo, std::make_shared<PolyMatrix>(res)));
      }
      return res;
    }
  };

  const PolyContext& ctx_;
  const std::vector<PolyMatrix>& leaves_;
  const ProductOptions& opt_;
  std::mutex mu_;
  std::map<std::pair<size_t, unsigned long>, std::unique_ptr<PolyMatrix>> powers_;
};

}  // namespace

Matrix word_product_naive(const std::vector<const Matrix*>& letters, const Matrix& start) {
  check_shapes(letters, &start);
  Matrix acc = start;
  for (const Matrix* m : letters) acc = *m * acc;
  return acc;
}

Matrix word_product(const std::vector<const Matrix*>& letters) { return word_product(letters, ProductOptions{}); }

namespace {
// Every distinct letter as a PolyMatrix (converted once).
std::vector<PolyMatrix> convert(const IndexedWord& w, const PolyContext& ctx) {
  std::vector<PolyMatrix> leaves;
  leaves.reserve(w.letters().size());
  for (const Matrix* m : w.letters()) leaves.push_back(PolyMatrix::from_matrix(*m, ctx));
  return leaves;
}
}  // namespace

namespace {

// Sparse int64 kernels for every distinct letter, or empty when some letter does not qualify.
std::vector<detail::SparseLetter> kernels(const std::vector<PolyMatrix>& leaves, const PolyContext& ctx) {
  std::vector<detail::SparseLetter> k(leaves.size());
  for (size_t i = 0; i < leaves.size(); ++i)
    if (!detail::SparseLetter::make(&k[i], leaves[i], ctx, ctx.field()->radicand_count())) return {};
  return k;
}

// Letters [lo, hi) of the word (leaf indices) multiplied in int64 blocks while the coefficient bound allows;
// appends the block products (application order) to out.
void small_blocks(std::vector<PolyMatrix>* out, const std::vector<size_t>& seq, size_t lo, size_t hi,
                  const std::vector<detail::SparseLetter>& kern, const std::vector<PolyMatrix>& leaves,
                  const PolyContext& ctx, LetterKernel variant) {
  const long n = ctx.degree(), masks = 1L << ctx.field()->radicand_count();
  bool empty = true;
  detail::SmallBlock acc, spare;
  for (size_t x = lo; x < hi; ++x) {
    const detail::SparseLetter& g = kern[seq[x]];
    if (empty) acc = detail::SmallBlock::identity(g.cols(), n, masks);
    if (!detail::fits_small(g, acc)) {
      if (!empty) {
        out->push_back(acc.to_poly(ctx));
        acc = detail::SmallBlock::identity(g.cols(), n, masks);
        empty = true;
      }
      if (!detail::fits_small(g, acc)) {
        out->push_back(leaves[seq[x]]);
        continue;
      }
    }
    detail::apply_into(&spare, g, acc, variant);
    std::swap(acc, spare);
    empty = false;
  }
  if (!empty) out->push_back(acc.to_poly(ctx));
}

}  // namespace

namespace {

// The exact product of one flat stretch of the word (runs of one letter, application order; `count` letters in
// all) as a PolyMatrix. `kern` holds the int64 kernels of the letters once computed (empty: not yet, or unusable).
PolyMatrix flat_product(std::vector<Token> tokens, size_t count, const std::vector<PolyMatrix>& leaves,
                        std::vector<detail::SparseLetter>* kern, bool* kern_tried, const PolyContext& ctx,
                        const ProductOptions& opt) {
  if (!opt.share_repeats) {  // runs as single letters (measurements, tests)
    std::vector<Token> single;
    single.reserve(count);
    for (const Token& t : tokens)
      for (unsigned long e = 0; e < t.exp; ++e) single.push_back({t.leaf, 1});
    tokens = std::move(single);
  }
  // Words with long runs or a period go through the tree with powers and shared subtrees; others are first cut
  // into int64 blocks (sparse letters, exact coefficient bounds), then the blocks go through the tree.
  bool repetitive = opt.share_repeats && (tokens.size() * 4 < count * 3 ||
                                          (tokens.size() >= 4 && smallest_period(tokens) <= tokens.size() / 2));
  if (!repetitive && opt.small_kernel && !*kern_tried) {
    *kern = kernels(leaves, ctx);
    *kern_tried = true;
  }
  if (repetitive || kern->empty()) {
    ExactTree tree(ctx, leaves, opt);
    return tree.product(tokens);
  }
  const std::vector<detail::SparseLetter>& kn = *kern;
  std::vector<size_t> seq;
  seq.reserve(count);
  for (const Token& t : tokens)
    for (unsigned long e = 0; e < t.exp; ++e) seq.push_back(t.leaf);
  int parts = std::max(1, std::min<int>(opt.threads, static_cast<int>(seq.size() / 64) + 1));
  std::vector<std::vector<PolyMatrix>> blocks(static_cast<size_t>(parts));
  parallel_for(static_cast<size_t>(parts), parts, [&](size_t p) {
    size_t lo = seq.size() * p / static_cast<size_t>(parts);
    size_t hi = seq.size() * (p + 1) / static_cast<size_t>(parts);
    small_blocks(&blocks[p], seq, lo, hi, kn, leaves, ctx, opt.kernel);
  });
  std::vector<PolyMatrix> all;
  for (auto& b : blocks)
    for (auto& m : b) all.push_back(std::move(m));
  std::vector<Token> toks;
  for (size_t i = 0; i < all.size(); ++i) toks.push_back({i, 1});
  ProductOptions o = opt;
  o.share_repeats = false;
  ExactTree tree(ctx, all, o);
  return tree.product(toks);
}

}  // namespace

namespace {

// The exact product over the tree of an IndexedWord: flat stretches of letters by flat_product, each group once
// (raised to its repeat by binary powering), the factors of a sequence by a balanced product tree.
class TreeProduct {
 public:
  TreeProduct(const IndexedWord& w, const PolyContext& ctx, const ProductOptions& opt)
      : w_(w), ctx_(ctx), opt_(opt), leaves_(convert(w, ctx)) {}

  PolyMatrix sequence(std::uint32_t s) {
    std::vector<PolyMatrix> parts;
    std::vector<Token> tokens;
    size_t count = 0;
    auto flush = [&] {
      if (tokens.empty()) return;
      parts.push_back(flat_product(std::move(tokens), count, leaves_, &kern_, &kern_tried_, ctx_, opt_));
      tokens.clear();
      count = 0;
    };
    for (const IndexedWord::Item& it : w_.sequences()[s]) {
      if (!it.group) {
        tokens.push_back({it.index, static_cast<unsigned long>(it.repeat)});
        count += static_cast<size_t>(it.repeat);
        continue;
      }
      flush();
      PolyMatrix g = sequence(it.index);
      parts.push_back(it.repeat == 1 ? std::move(g) : PolyMatrix::pow(g, static_cast<unsigned long>(it.repeat), ctx_));
    }
    flush();
    if (parts.empty()) throw MathError("empty sequence in an indexed word");
    if (parts.size() == 1) return std::move(parts.front());
    std::vector<Token> toks;
    for (size_t i = 0; i < parts.size(); ++i) toks.push_back({i, 1});
    ProductOptions o = opt_;
    o.share_repeats = false;
    ExactTree tree(ctx_, parts, o);
    return tree.product(toks);
  }

 private:
  const IndexedWord& w_;
  const PolyContext& ctx_;
  const ProductOptions& opt_;
  std::vector<PolyMatrix> leaves_;
  std::vector<detail::SparseLetter> kern_;
  bool kern_tried_ = false;
};

PolyMatrix exact_product(const IndexedWord& w, const PolyContext& ctx, const ProductOptions& opt) {
  return TreeProduct(w, ctx, opt).sequence(0);
}

}  // namespace

Matrix word_product(const IndexedWord& w, const ProductOptions& opt) {
  if (w.empty()) throw MathError("empty word: no matrix shape to return");
  PolyContext ctx(w.letters().front()->field());
  return exact_product(w, ctx, opt).to_matrix(ctx);
}

Matrix word_product(const std::vector<const Matrix*>& letters, const ProductOptions& opt) {
  if (letters.empty()) throw MathError("empty word: no matrix shape to return");
  check_shapes(letters, nullptr);
  return word_product(IndexedWord::from_letters(letters), opt);
}

Matrix word_product_columns(const std::vector<const Matrix*>& letters, const Matrix& start) {
  return word_product_columns(letters, start, ProductOptions{});
}

Matrix word_product_columns(const std::vector<const Matrix*>& letters, const Matrix& start, const ProductOptions& opt) {
  check_shapes(letters, &start);
  return word_product_columns(IndexedWord::from_letters(letters), start, opt);
}

Matrix word_product_columns(const IndexedWord& w, const Matrix& start, const ProductOptions& opt) {
  if (w.empty()) return start;
  if (start.field() != w.letters().front()->field()) throw MathError("start matrix from a different field");
  if (start.rows() != w.cols())
    throw MathError(fmt::format("start matrix {}x{} does not compose with the first letter ({} columns)", start.rows(),
                                start.cols(), w.cols()));
  PolyContext ctx(start.field());
  size_t dim = start.rows(), k = start.cols();
  for (const Matrix* m : w.letters()) dim = std::max(dim, m->rows());
  PolyMatrix s = PolyMatrix::from_matrix(start, ctx);
  if (dim > opt.columns_ratio * k && dim > opt.columns_min_dimension) {
    // Column-wise: acc <- L acc, visiting only the nonzero entries of each letter.
    const std::vector<PolyMatrix> leaves = convert(w, ctx);
    const std::vector<std::uint32_t> seq = w.expand();
    std::vector<detail::SparseLetter> kern;
    if (opt.small_kernel) kern = kernels(leaves, ctx);
    if (!kern.empty()) {
      const long n = ctx.degree(), masks = 1L << ctx.field()->radicand_count();
      detail::SmallBlock small, spare;
      bool is_small = detail::SmallBlock::from_poly(&small, s, n, masks);
      detail::BigBlock big;
      if (!is_small) {
        // Start too large for int64: go through fmpz from the beginning.
        detail::SmallBlock zero{s.rows(), s.cols(), n, masks, {}};
        zero.a.assign(static_cast<size_t>(masks * s.rows() * s.cols() * n), 0);
        big = detail::BigBlock(zero);
        for (size_t q = 0; q < s.mask_count(); ++q)
          for (long i = 0; i < s.rows(); ++i)
            for (long j = 0; j < s.cols(); ++j) {
              const fmpz_poly_struct* e = fmpz_poly_mat_entry(s.part(q), i, j);
              for (long t = 0; t < fmpz_poly_length(e); ++t)
                fmpz_set(&big.a[static_cast<size_t>(((static_cast<long>(s.mask(q)) * s.rows() + i) * n + t) * s.cols() + j)],
                         fmpz_poly_get_coeff_ptr(e, t));
            }
      }
      // Phase 1: int64 columns while the bound allows. Phase 2: fmpz columns, letter by letter. Phase 3 (once
      // the columns' coefficients are long enough that dim int64 operations are cheaper than k big-number ones):
      // int64 block products of the letters (dim x dim, sparse letters) applied to the fmpz columns.
      const size_t total = seq.size();
      size_t x = 0;
      while (x < total && is_small) {
        const detail::SparseLetter& g = kern[seq[x]];
        if (!detail::fits_small(g, small)) {
          big = detail::BigBlock(small);
          is_small = false;
          break;
        }
        detail::apply_into(&spare, g, small, opt.kernel);
        std::swap(small, spare);
        ++x;
      }
      if (is_small) return small.to_poly(ctx, s.denominator()).to_matrix(ctx);
      bool blocks = false;
      while (x < total) {
        if (opt.column_blocks && x % 32 == 0) {
          long limbs = std::labs(_fmpz_vec_max_bits(big.a.data(), static_cast<slong>(big.a.size()))) / 64;
          if (opt.column_block_limbs >= 0 ? limbs >= opt.column_block_limbs
                                          : static_cast<long>(dim) < static_cast<long>(k) * (2 + limbs))
            blocks = true;
        }
        if (blocks) break;
        big = detail::apply(kern[seq[x]], big);
        ++x;
      }
      if (x == total) return big.to_poly(ctx, s.denominator()).to_matrix(ctx);
      PolyMatrix acc = big.to_poly(ctx);
      while (x < total) {
        const detail::SparseLetter& g0 = kern[seq[x]];
        detail::SmallBlock blk = detail::SmallBlock::identity(g0.cols(), n, masks);
        size_t used = 0;
        while (x < total) {
          const detail::SparseLetter& g = kern[seq[x]];
          if (!detail::fits_small(g, blk)) break;
          detail::apply_into(&spare, g, blk, opt.kernel);
          std::swap(blk, spare);
          ++x;
          ++used;
        }
        if (used == 0) {
          acc = PolyMatrix::mul(leaves[seq[x]], acc, ctx);
          ++x;
        } else {
          acc = PolyMatrix::mul(blk.to_poly(ctx), acc, ctx);
        }
      }
      acc.divide(s.denominator());
      return acc.to_matrix(ctx);
    }
    std::vector<PolyMatrix::Nonzeros> nz;
    for (const auto& l : leaves) nz.push_back(l.nonzeros());
    PolyMatrix acc = std::move(s);
    for (std::uint32_t x : seq) acc = PolyMatrix::mul_sparse(leaves[x], nz[x], acc, ctx);
    return acc.to_matrix(ctx);
  }
  PolyMatrix p = exact_product(w, ctx, opt);
  if (start.is_identity()) return p.to_matrix(ctx);
  return PolyMatrix::mul(p, s, ctx).to_matrix(ctx);
}

}  // namespace zb
