// Exact pentagon + hexagon checking of SU(2)_k, k = 2..12 (or until about a minute has passed), against
// evaluating the same equations in complex double in the same process (a comparison only: floating point
// decides nothing in zetabraid).
#include <fmt/format.h>

#include <chrono>
#include <cstdlib>

#include "double_equations.hpp"
#include "zetabraid/model/check.hpp"
#include "zetabraid/model/families.hpp"

using namespace zb;
using Clock = std::chrono::steady_clock;

static double since(Clock::time_point t) { return std::chrono::duration<double>(Clock::now() - t).count(); }

int main(int argc, char** argv) {
  int kmax = argc > 1 ? std::atoi(argv[1]) : 12;
  double budget = argc > 2 ? std::atof(argv[2]) : 60.0;
  int threads = argc > 3 ? std::atoi(argv[3]) : 2;
  fmt::print("SU(2)_k, unitary gauge: exact pentagon + both hexagons (every equation decided exactly)\n");
  fmt::print("{:>3} {:>7} {:>10} {:>9} {:>9} {:>12} {:>12} {:>10} {:>14}\n", "k", "labels", "equations", "make s",
             "exact s", "exact eq/s", "exact/thread", "double s", "exact/double");
  auto start = Clock::now();
  for (int k = 2; k <= kmax; ++k) {
    auto t0 = Clock::now();
    Model m = make_su2(k);
    double make_s = since(t0);
    t0 = Clock::now();
    EquationCount ex = check_equations_only(m, threads);
    double exact_s = since(t0);
    double worst = 0, loop_s = 0;
    bench::DoubleEquations de(m);
    EquationCount dbl = de.run(&worst, &loop_s, 1);
    int reps = std::max(1, static_cast<int>(0.2 / std::max(loop_s, 1e-6)));
    if (reps > 1) dbl = de.run(&worst, &loop_s, reps);
    double double_s = loop_s;
    long eqs = ex.pentagons + ex.hexagons;
    if (ex.failed) fmt::print("  unexpected: {} failed equations\n", ex.failed);
    if (dbl.pentagons + dbl.hexagons != eqs) fmt::print("  unexpected: double pass counted differently\n");
    // exact/double compares one exact thread with one double thread (the double pass is single-threaded).
    double exact_cpu = exact_s * threads;
    fmt::print("{:>3} {:>7} {:>10} {:>9.3f} {:>9.3f} {:>12.0f} {:>12.0f} {:>10.4f} {:>13.0f}x\n", k, m.label_count(),
               eqs, make_s, exact_s, eqs / exact_s, eqs / exact_cpu, double_s, exact_cpu / double_s);
    std::fflush(stdout);
    if (since(start) > budget) {
      fmt::print("(stopped after {:.0f} s)\n", since(start));
      break;
    }
  }
  fmt::print("threads = {}; 'exact/thread' = equations per second per thread; 'exact/double' = time ratio of the\n"
             "exact check per thread to the complex-double evaluation of the same equations (bench/double_equations.hpp;\n"
             "for comparison only).\n", threads);
  return 0;
}
