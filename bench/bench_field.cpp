// Field multiplications per second in Q(zeta_N) and in a square-root extension, as ratios to complex-double
// multiplication measured in the same process. Run through scripts/bench-field.
#include <fmt/format.h>

#include <chrono>
#include <complex>
#include <random>
#include <vector>

#include "zetabraid/field/expression.hpp"

using namespace zb;
using Clock = std::chrono::steady_clock;

namespace {

template <class F>
double rate(F&& body, long min_iters) {
  // Runs body in batches until at least 0.3 s elapsed; returns operations per second.
  long iters = 0;
  auto t0 = Clock::now();
  double el = 0;
  while (el < 0.3 || iters < min_iters) {
    body();
    iters += 1;
    el = std::chrono::duration<double>(Clock::now() - t0).count();
  }
  return static_cast<double>(iters) / el;
}

Cyclo random_element(const CyclotomicFieldPtr& k, std::mt19937_64& rng) {
  fmpq_poly_t p;
  fmpq_poly_init(p);
  for (long i = 0; i < k->degree(); ++i) fmpq_poly_set_coeff_si(p, i, static_cast<long>(rng() % 19) - 9);
  Cyclo c = Cyclo::from_poly(k, p);
  fmpq_poly_clear(p);
  return c;
}

}  // namespace

int main() {
  std::mt19937_64 rng(1);
  // Baseline: complex double multiply-accumulate in a dependent chain (so it cannot be optimised away).
  const int kBatch = 1000;
  std::vector<std::complex<double>> xs(kBatch);
  for (auto& x : xs) x = {std::cos(static_cast<double>(rng() % 1000)), std::sin(static_cast<double>(rng() % 1000))};
  volatile double sink = 0;
  double base = rate([&] {
    std::complex<double> acc(1, 0);
    for (const auto& x : xs) acc *= x;
    sink = sink + acc.real();
  }, 100) * kBatch;
  fmt::print("complex double multiplication: {:.3g} mul/s (baseline, ratio 1)\n", base);
  fmt::print("{:<44} {:>12} {:>14}\n", "field", "mul/s", "time ratio");
  for (unsigned long n : {5UL, 10UL, 20UL, 40UL}) {
    auto k = CyclotomicField::make(n);
    std::vector<Cyclo> a, b;
    for (int i = 0; i < 64; ++i) {
      a.push_back(random_element(k, rng));
      b.push_back(random_element(k, rng));
    }
    Cyclo r(k);
    double ops = rate([&] {
      for (int i = 0; i < 64; ++i) {
        nf_elem_mul(r.raw(), a[static_cast<size_t>(i)].raw(), b[static_cast<size_t>(i)].raw(), k->nf());
      }
    }, 10) * 64;
    fmt::print("{:<44} {:>12.3g} {:>13.1f}x\n", fmt::format("Q(zeta_{}) (degree {}), nf_elem", n, k->degree()), ops,
               base / ops);
  }
  {
    FieldPtr f = Field::make(5);
    Scalar s = parse_expression("sqrt((1+sqrt(5))/2)", f);
    std::vector<Scalar> a, b;
    for (int i = 0; i < 64; ++i) {
      a.push_back(Scalar(f, random_element(f->cyclotomic(), rng)) + Scalar(f, random_element(f->cyclotomic(), rng)) * s);
      b.push_back(Scalar(f, random_element(f->cyclotomic(), rng)) + Scalar(f, random_element(f->cyclotomic(), rng)) * s);
    }
    double ops = rate([&] {
      for (int i = 0; i < 64; ++i) {
        Scalar r = a[static_cast<size_t>(i)] * b[static_cast<size_t>(i)];
        (void)r;
      }
    }, 10) * 64;
    fmt::print("{:<44} {:>12.3g} {:>13.1f}x\n", "Q(zeta_5)(sqrt(phi)), two-term Scalars", ops, base / ops);
  }
  fmt::print("(time ratio = time per field multiplication / time per complex-double multiplication)\n");
  return 0;
}
