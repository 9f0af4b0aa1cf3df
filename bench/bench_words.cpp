// Braid-word products on Fibonacci anyons: exact engine, interval engine (bits kept), one modular image and a
// straightforward exact PARI/GP product, each as a time ratio to complex double in the same process.
// Run through scripts/bench-words. Usage: zb_bench_words MODEL_FILE [--quick] [--gp PATH] [--gp-limit SECONDS]
//                                        [--anyons N] [--length L] [--no-gp] [--threads T]
//                                        [--kernel auto|entries|portable|avx2|avx512]
//
// Cases: 6 anyons, total charge 1 (the two-qubit encoding, dimension 5): the full 5x5 product.
//        10 and 14 anyons, total charge 1 (dimensions 34 and 233): 4 columns (the first four basis vectors)
//        propagated through the word, as a leakage certificate needs.
// Complex double baseline: the same letters as complex<double> matrices, applied one by one to the same columns
// (identity for 6 anyons), visiting only nonzero generator entries (the fastest plain double method here).
#include <fmt/format.h>

#include <chrono>
#include <complex>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <functional>
#include <memory>
#include <random>
#include <string>
#include <unordered_map>
#include <vector>

#include "zetabraid/braid/generators.hpp"
#include "zetabraid/linalg/modular.hpp"
#include "zetabraid/linalg/word_product.hpp"
#include "zetabraid/model/load.hpp"

using namespace zb;
using Clock = std::chrono::steady_clock;

namespace {

double seconds_since(Clock::time_point t0) { return std::chrono::duration<double>(Clock::now() - t0).count(); }

// Mean time of body(), repeated until 0.2 s have passed (at most max_reps times).
double time_it(const std::function<void()>& body, int max_reps = 1000) {
  auto t0 = Clock::now();
  int reps = 0;
  double el = 0;
  do {
    body();
    ++reps;
    el = seconds_since(t0);
  } while (el < 0.2 && reps < max_reps);
  return el / reps;
}

using cd = std::complex<double>;
struct DoubleLetter {
  size_t rows;
  std::vector<std::pair<size_t, size_t>> nz;
  std::vector<cd> v;
};

DoubleLetter to_double(const Matrix& m) {
  DoubleLetter d{m.rows(), {}, {}};
  acb_t b;
  acb_init(b);
  for (size_t i = 0; i < m.rows(); ++i)
    for (size_t j = 0; j < m.cols(); ++j)
      if (!m(i, j).is_zero()) {
        m(i, j).ball(b, 64);  // display-grade value for the baseline only
        d.nz.emplace_back(i, j);
        d.v.emplace_back(arf_get_d(arb_midref(acb_realref(b)), ARF_RND_NEAR), arf_get_d(arb_midref(acb_imagref(b)), ARF_RND_NEAR));
      }
  acb_clear(b);
  return d;
}

std::vector<cd> double_product(const std::vector<const DoubleLetter*>& w, size_t dim, size_t k) {
  std::vector<cd> acc(dim * k, 0.0), next;
  for (size_t j = 0; j < k; ++j) acc[j * k + j] = 1.0;
  for (const DoubleLetter* l : w) {
    next.assign(l->rows * k, 0.0);
    for (size_t e = 0; e < l->nz.size(); ++e) {
      auto [i, c] = l->nz[e];
      cd v = l->v[e];
      for (size_t j = 0; j < k; ++j) next[i * k + j] += v * acc[c * k + j];
    }
    acc.swap(next);
  }
  return acc;
}

// GP text of a scalar: z = zeta_N as Mod(y, polcyclo(N, y)), s1.. the square roots as Mod(x, x^2 - d_j).
std::string gp_scalar(const Scalar& x) {
  if (x.is_zero()) return "0";
  std::string out;
  for (const auto& [mask, c] : x.terms()) {
    std::string cs = c.str();
    for (size_t at; (at = cs.find("zeta")) != std::string::npos;) cs.replace(at, 4, "z");
    std::string t = "(" + cs + ")";
    for (int j = 0; j < 64; ++j)
      if (mask & (RadicalMask{1} << j)) t += fmt::format("*s{}", j + 1);
    out += (out.empty() ? "" : "+") + t;
  }
  return out;
}

std::string gp_matrix(const Matrix& m) {
  std::string s = "[";
  for (size_t i = 0; i < m.rows(); ++i) {
    for (size_t j = 0; j < m.cols(); ++j) s += (j ? "," : "") + gp_scalar(m(i, j));
    s += i + 1 < m.rows() ? ";" : "]";
  }
  if (m.cols() == 0 || m.rows() == 0) s = "matrix(0,0)";
  return s;
}

// Runs a straightforward left-to-right exact product in GP on the same word; returns seconds (negative: over the
// limit, value = -limit).
double gp_time(const std::string& gp, const Field& f, const std::vector<const Matrix*>& w, const Matrix& start,
               double limit, const Matrix* expect, int* agrees) {
  std::unordered_map<const Matrix*, size_t> idx;
  std::vector<const Matrix*> distinct;
  std::string seq;
  for (const Matrix* m : w) {
    auto it = idx.find(m);
    if (it == idx.end()) {
      it = idx.emplace(m, distinct.size() + 1).first;
      distinct.push_back(m);
    }
    seq += (seq.empty() ? "" : ",") + std::to_string(it->second);
  }
  std::string path = fmt::format("/tmp/zb_bench_words_{}.gp", ::getpid());
  std::ofstream o(path);
  o << "default(parisizemax, 2000000000);\n";
  o << fmt::format("z = Mod(y, polcyclo({}, y));\n", f.conductor());
  for (int j = 0; j < f.radicand_count(); ++j) {
    std::string r = f.radicand(j).str();
    for (size_t at; (at = r.find("zeta")) != std::string::npos;) r.replace(at, 4, "z");
    o << fmt::format("s{} = Mod(x, x^2 - ({}));\n", j + 1, r);
  }
  o << "L = vector(" << distinct.size() << ");\n";
  for (size_t i = 0; i < distinct.size(); ++i) o << "L[" << i + 1 << "] = " << gp_matrix(*distinct[i]) << ";\n";
  o << "W = [" << seq << "];\n";
  o << "P = " << gp_matrix(start) << ";\n";
  o << "t0 = getabstime();\n";
  // alarm() returns an error object (it does not raise one) when the time is up: test the type.
  o << fmt::format("r = iferr(alarm({}, for(i = 1, #W, P = L[W[i]] * P); 1), E, E);\n", static_cast<long>(limit));
  o << "r = type(r) != \"t_ERROR\";\n";
  o << "print(if(r, getabstime() - t0, -1));\n";
  if (expect) o << "R = " << gp_matrix(*expect) << ";\nprint(if(r, P == R, -1));\n";
  o << "quit\n";
  o.close();
  std::string log = path + ".log";
  std::string cmd = gp + " -q -f --default colors=no " + path + " 2>" + log;
  FILE* p = popen(cmd.c_str(), "r");
  double ms = -1;
  *agrees = -1;
  if (p) {
    char buf[256];
    if (fgets(buf, sizeof buf, p)) ms = std::atof(buf);
    if (expect && fgets(buf, sizeof buf, p)) *agrees = std::atoi(buf);
    pclose(p);
  }
  if (*agrees == 0) {  // keep the script and GP's messages for inspection
    std::fprintf(stderr, "GP script kept: %s (messages: %s)\n", path.c_str(), log.c_str());
    return ms < 0 ? -limit : ms / 1000.0;
  }
  std::remove(path.c_str());
  std::remove(log.c_str());
  return ms < 0 ? -limit : ms / 1000.0;
}

std::vector<const Matrix*> random_word(BraidGenerators& g, const std::vector<int>& anyons, size_t len, unsigned seed) {
  std::mt19937_64 rng(seed);
  std::vector<int> wl;
  int strands = static_cast<int>(anyons.size());
  for (size_t i = 0; i < len; ++i) {
    int k = 1 + static_cast<int>(rng() % static_cast<unsigned>(strands - 1));
    wl.push_back(rng() % 2 ? k : -k);
  }
  return g.letters(anyons, Word::from_letters(wl));
}

std::string ratio(double t, double base) {
  if (t < 0) return fmt::format(">{:.0f}", -t / base);
  double r = t / base;
  return r >= 100 ? fmt::format("{:.0f}", r) : fmt::format("{:.2g}", r);
}

}  // namespace

int main(int argc, char** argv) {
  if (argc < 2) {
    std::fprintf(stderr, "usage: zb_bench_words MODEL_FILE [--quick] [--gp PATH] [--gp-limit SECONDS] [--anyons N] [--length L] [--no-gp] [--threads T] [--kernel NAME]\n");
    return 2;
  }
  std::string gp = "gp";
  bool quick = false;
  double gp_limit = 200;
  int only_n = 0;         // --anyons N: only that case
  size_t only_len = 0;    // --length L: only that length
  bool no_gp = false;     // --no-gp: skip the PARI/GP runs
  int threads = 2;        // --threads T: also time the exact engine with T threads (1: skip)
  LetterKernel kernel = LetterKernel::kAuto;  // --kernel NAME: force an int64 letter kernel variant
  for (int i = 2; i < argc; ++i) {
    std::string a = argv[i];
    if (a == "--quick") quick = true;
    else if (a == "--gp" && i + 1 < argc) gp = argv[++i];
    else if (a == "--gp-limit" && i + 1 < argc) gp_limit = std::atof(argv[++i]);
    else if (a == "--anyons" && i + 1 < argc) only_n = std::atoi(argv[++i]);
    else if (a == "--length" && i + 1 < argc) only_len = static_cast<size_t>(std::atol(argv[++i]));
    else if (a == "--no-gp") no_gp = true;
    else if (a == "--threads" && i + 1 < argc) threads = std::atoi(argv[++i]);
    else if (a == "--kernel" && i + 1 < argc) {
      if (!letter_kernel_from_name(argv[++i], &kernel)) {
        std::fprintf(stderr, "unknown kernel '%s' (auto, entries, portable, avx2, avx512)\n", argv[i]);
        return 2;
      }
      if (!letter_kernel_available(kernel)) {
        std::fprintf(stderr, "kernel '%s' is not available on this processor\n", argv[i]);
        return 2;
      }
    }
  }
  ProductOptions po1;
  po1.kernel = kernel;
  Model model = load_model(argv[1]);
  int one = model.label_index("1"), tau = model.label_index("t");
  BraidGenerators gens(model, one);
  ModularPrime q = choose_primes(*model.field, 1, 62)[0];
  std::vector<size_t> lengths = quick ? std::vector<size_t>{100, 1000} : std::vector<size_t>{100, 1000, 10000, 30000, 100000};
  std::vector<int> counts = quick ? std::vector<int>{6, 10} : std::vector<int>{6, 10, 14};
  const double exact_budget = 300;
  if (only_n) counts = {only_n};
  if (only_len) lengths = {only_len};
  int gp_checked = 0;  // seconds: skip an exact run predicted to take longer

  fmt::print("Fibonacci anyons, total charge 1; times as ratios to complex double (same process, same word).\n");
  fmt::print("modular prime p = {} (zeta -> {}, sqrt -> {})\n", q.p, q.zeta, q.roots.empty() ? 0 : q.roots[0]);
  fmt::print("int64 letter kernel: {}{}\n\n", letter_kernel_name(letter_kernel_resolve(kernel)),
             kernel == LetterKernel::kAuto ? " (chosen for this processor)" : " (forced)");
  fmt::print("{:>3} {:>4} {:>4} {:>7} | {:>11} | {:>7} {:>7} {:>7} {:>9} {:>5} {:>5} {:>7} {:>12} | {:>9} {:>9} {:>9}\n",
             "n", "dim", "cols", "L", "double [s]", "exact", fmt::format("ex {}th", threads), "ival", "ival bits", "prec",
             "runs", "mod p", "proof (pr.)", "GP/double", "GP/exact", fmt::format("GP/ex{}t", threads));
  for (int n : counts) {
    std::vector<int> anyons(static_cast<size_t>(n), tau);
    size_t dim = gens.space(anyons).dimension();
    size_t k = n == 6 ? dim : 4;
    Matrix start = Matrix::identity(model.field, dim).columns([&] {
      std::vector<size_t> c;
      for (size_t j = 0; j < k; ++j) c.push_back(j);
      return c;
    }());
    double prev_exact = 0, prev_proof = 0;
    size_t prev_len = 0, prev_proof_len = 0;
    for (size_t len : lengths) {
      auto w = random_word(gens, anyons, len, 1000u + static_cast<unsigned>(n));
      std::unordered_map<const Matrix*, DoubleLetter> dl;
      std::vector<const DoubleLetter*> dw;
      for (const Matrix* m : w) {
        auto it = dl.find(m);
        if (it == dl.end()) it = dl.emplace(m, to_double(*m)).first;
        dw.push_back(&it->second);
      }
      volatile double sink = 0;
      double t_double = time_it([&] { sink = sink + double_product(dw, dim, k)[0].real(); });

      // Exact engine (skipped when predicted far over budget: the column engine grows ~L^2, the tree ~L^1.3).
      double t_exact = -1;
      double grow = n == 6 ? 1.5 : 2.0;
      bool skip = prev_len && prev_exact * std::pow(static_cast<double>(len) / static_cast<double>(prev_len), grow) > exact_budget;
      std::unique_ptr<Matrix> exact;
      if (!skip) {
        t_exact = time_it([&] {
          Matrix r = n == 6 ? word_product(w, po1) : word_product_columns(w, start, po1);
          sink = sink + static_cast<double>(r.rows());
          if (!exact) exact = std::make_unique<Matrix>(std::move(r));
        }, 20);
        prev_exact = t_exact;
        prev_len = len;
      }
      // The same exact product with `threads` worker threads (identical result; wall-clock time).
      double t_exact_mt = -1;
      if (!skip && threads > 1) {
        ProductOptions po = po1;
        po.threads = threads;
        t_exact_mt = time_it([&] {
          Matrix r = n == 6 ? word_product(w, po) : word_product_columns(w, start, po);
          sink = sink + static_cast<double>(r.rows());
        }, 20);
      }
      // A deterministic proof by modular images that the exact result is rho(w) * start (what `verify --via
      // modular` does): images of the difference at primes whose product exceeds the norm bound. ~L^2: L <= 10^4.
      double t_proof = -1;
      size_t proof_primes = 0;
      // (cost ~ primes * L * nnz * columns: skipped when the previous length's proof predicts over 60 s)
      bool proof_skip = prev_proof > 0 && prev_proof * std::pow(static_cast<double>(len) / static_cast<double>(prev_proof_len), 2.0) > 60;
      if (exact && len <= 10000 && !proof_skip) {
        t_proof = time_it([&] {
          ModularZeroResult z = modular_zero_test(w, start, nullptr, exact.get());
          proof_primes = z.primes.size();
        }, 5);
        prev_proof = t_proof;
        prev_proof_len = len;
      }
      // Interval engine, adaptive precision for 64 bits.
      BallReport rep;
      acb_mat_t b;
      acb_mat_init(b, static_cast<long>(dim), static_cast<long>(k));
      BallOptions bo;
      bo.target_bits = 64;
      double t_ball = time_it([&] { rep = word_product_ball_adaptive(b, w, start, bo); }, 50);
      acb_mat_clear(b);
      double t_mod = time_it([&] {
        ModularImage im = word_product_mod(w, start, q);
        sink = sink + static_cast<double>(im(0, 0));
      });
      std::string gps = "-", gpe = "-", gpe2 = "-";
      if (len <= 30000 && !no_gp) {
        int agrees = -1;
        double t_gp = gp_time(gp, *model.field, w, start, gp_limit, exact.get(), &agrees);
        if (agrees == 0) {
          std::fprintf(stderr, "PARI/GP product differs from the exact engine (n=%d, L=%zu)\n", n, len);
          return 1;
        }
        gp_checked += agrees == 1;
        gps = ratio(t_gp, t_double);
        if (t_exact > 0) gpe = t_gp < 0 ? fmt::format(">{:.0f}", -t_gp / t_exact) : fmt::format("{:.0f}", t_gp / t_exact);
        if (t_exact_mt > 0)
          gpe2 = t_gp < 0 ? fmt::format(">{:.0f}", -t_gp / t_exact_mt) : fmt::format("{:.0f}", t_gp / t_exact_mt);
      }
      fmt::print("{:>3} {:>4} {:>4} {:>7} | {:>11.3g} | {:>7} {:>7} {:>7} {:>9} {:>5} {:>5} {:>7} {:>12} | {:>9} {:>9} {:>9}\n",
                 n, dim, k, len, t_double, t_exact < 0 ? std::string("skip") : ratio(t_exact, t_double),
                 t_exact_mt < 0 ? std::string("-") : ratio(t_exact_mt, t_double), ratio(t_ball, t_double),
                 rep.accuracy_bits, rep.precision, rep.runs, ratio(t_mod, t_double),
                 t_proof < 0 ? std::string("-") : fmt::format("{} ({})", ratio(t_proof, t_double), proof_primes), gps,
                 gpe, gpe2);
      std::fflush(stdout);
    }
  }
  fmt::print("\nPARI/GP's product was checked equal to the exact engine's result in {} runs (the others: GP over its "
             "time limit or exact run skipped).\n", gp_checked);
  return 0;
}
