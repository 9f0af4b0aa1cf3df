// Exact consistency checks of an anyon model: fusion rules, F-symbol data, pentagons, hexagons, unitarity.
//
// Every equation is decided exactly in the model's field (no floating point decides anything); a failed
// equation is reported with its labels and its exact residual (left side minus right side) plus a ball.
// Equations (conventions of model.hpp):
//   pentagon  [F^{fcd}_e]_{gl} [F^{abl}_e]_{fk} = sum_h [F^{abc}_g]_{fh} [F^{ahd}_e]_{gk} [F^{bcd}_k]_{hl}
//   hexagon   R^{ca}_e [F^{acb}_d]_{eg} R^{cb}_g = sum_f [F^{cab}_d]_{ef} R^{cf}_d [F^{abc}_d]_{fg}
//   hexagon (reverse, R replaced by the inverse of the reversed exchange)
//             (R^{ac}_e)^{-1} [F^{acb}_d]_{eg} (R^{bc}_g)^{-1} = sum_f [F^{cab}_d]_{ef} (R^{fc}_d)^{-1} [F^{abc}_d]_{fg}
#pragma once
#include <functional>
#include <string>
#include <vector>

#include "zetabraid/model/model.hpp"

namespace zb {

struct CheckCount {
  std::string name;   ///< e.g. "pentagon"
  long count = 0;     ///< equations (or conditions) checked, all exactly
  long failed = 0;
  bool skipped = false;
  std::string note;   ///< why skipped, or what was checked
  long not_checked = 0;  ///< equations skipped because a symbol they need is missing from the file
};

struct CheckFailure {
  std::string check;        ///< name of the check
  std::string where;        ///< the labels of the equation, e.g. "a=t b=t c=t d=t e=t f=1 g=t k=t l=1"
  std::string what;         ///< the condition, e.g. "pentagon: left - right != 0"
  std::string residual;     ///< exact residual ("" when not a number)
  std::string residual_ball;
  int line = 0;             ///< source line of an offending entry, when known (for an equation: of its top suspect)
  std::vector<int> lines;   ///< for an equation: the source lines of every symbol it involves, ascending
};

/// A symbol (F entry or R-symbol) that failing equations involve, ranked by blame (check_model fills these when
/// a pentagon or hexagon fails). See docs/model-format.md "Which entry is wrong".
struct Suspect {
  std::string symbol;        ///< "F^{a b c}_d[e,f]" or "R^{a b}_c" (label names)
  int line = 0;              ///< source line of the entry (0 = unknown)
  long failures = 0;         ///< failing equations that involve it
  long passes = 0;           ///< passing equations that involve it
  /// A value that makes every equation involving the symbol hold exactly (and, when claimed, unitarity and the
  /// other structural conditions of its block), found by solving a failing equation linear in it; empty if none.
  std::string repair;
};

/// An admissible symbol that some equation needs but the file does not give.
struct MissingSymbol {
  std::string symbol;        ///< as in Suspect
  long needed_by = 0;        ///< equations skipped because of it (and possibly other missing symbols)
};

struct CheckOptions {
  int threads = 0;                  ///< thread_count(threads) workers (detail/parallel.hpp): 0 = all cores, at most 8
  size_t max_failures = 100;        ///< failures listed per check (all are counted)
  long ball_digits = 15;
  /// Use the number-field kernel even when the integer kernel applies (for tests comparing the two).
  bool force_field_kernel = false;
  /// Suspects listed (each with a one-entry repair attempt) when an equation fails; 0 turns the search off.
  size_t max_suspects = 5;
  /// Called now and then from the checking thread with a stage name and the fraction done (0..1).
  std::function<void(const std::string&, double)> progress;
};

struct CheckReport {
  bool ok = true;
  std::vector<CheckCount> checks;
  std::vector<CheckFailure> failures;
  std::vector<Suspect> suspects;       ///< ranked: most failing equations first, then fewest passing ones
  std::vector<MissingSymbol> missing;  ///< each missing symbol once, in label order
  std::string suspects_note;           ///< why no suspects were computed, when equations failed
  double seconds = 0;
  const CheckCount* find(const std::string& name) const;
};

/// Runs every check that applies (hexagons only with R-symbols, unitarity only when claimed).
CheckReport check_model(const Model& m, const CheckOptions& opt = {});

/// Pentagon and hexagon equations only (for benchmarks): returns the number of equations and failures.
/// threads as in CheckOptions.
struct EquationCount {
  long pentagons = 0, hexagons = 0, failed = 0;
};
EquationCount check_equations_only(const Model& m, int threads = 1);

}  // namespace zb
