// The pentagon and hexagon drivers (private to src/model/): blocks of equations, run in parallel over one of the
// arithmetics of equation_kernel.hpp, gathered in block order so that reports never depend on the thread count.
#pragma once
#include "zetabraid/model/check.hpp"

namespace zb::equations {

/// Checks every pentagon and, with R-symbols, both hexagons; appends the counts ("pentagon", "hexagon",
/// "hexagon_reverse", or a skipped "hexagon") to rep.checks and at most opt.max_failures failures per check to
/// rep.failures. Threads: thread_count(opt.threads).
void check_pentagons_hexagons(const Model& m, const CheckOptions& opt, CheckReport& rep);

}  // namespace zb::equations
