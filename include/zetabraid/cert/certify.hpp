// Certification of braid words against a kept subspace: exact (leak-free / leaks with the exact leakage) or by
// interval arithmetic (rigorous "leakage <= eps").
//
// Leakage in the unitary normalisation (the fusion-tree basis is orthonormal in a unitary gauge):
//     leakage(w) = || P_out rho(w) P_in ||_F^2,   P_in = orthogonal projector onto the kept space K, P_out = 1 - P_in.
// With a kept basis V (columns, Gram matrix G = V^* V) and W = rho(w) V:
//     leakage = tr(G^-1 W^* W) - tr(G^-1 W^* V G^-1 V^* W)      (= sum of |W_rj|^2 over rows r outside K
//                                                                  when V is a set of tree basis vectors).
// Leak-free is decided without any inner product: rho(w) K is contained in K, i.e. W = V C for some C (then C is
// the induced action on K in the basis V). This is gauge-independent, so it is decided for any model; the
// leakage value needs a model that claims a unitary gauge.
#pragma once
#include <optional>
#include <string>

#include "zetabraid/braid/subspace.hpp"
#include "zetabraid/cert/verdict.hpp"
#include "zetabraid/linalg/modular.hpp"

namespace zb {

// Methods: exact (exact engine: verdict, exact leakage, induced action); modular (the leak block
// X = (1 - P) rho(w) V by modular images alone: "leaks" from one nonzero image, "leak-free" from images vanishing
// at primes whose product exceeds a norm bound, linalg/modular.hpp; no leakage value); interval (Arb balls).
enum class Method { kExact, kInterval, kAuto, kModular };
Method parse_method(const std::string& s);  ///< "exact", "interval", "modular", "auto"; InputError otherwise
std::string method_name(Method m);

struct CertifyOptions {
  Method method = Method::kAuto;
  long precision = 0;              ///< interval working precision in bits; 0 = automatic (raised until decided)
  long target_bits = 64;           ///< automatic precision: raise until the leakage radius is below 2^-target_bits
  long max_precision = 1 << 16;    ///< cap of the automatic precision
  size_t exact_budget = 2'000'000; ///< auto: exact when letters * dimension * kept <= budget, else interval
                                   ///< (unitary models) or a modular filter, then exact (other models)
  int threads = 1;                 ///< worker threads of the product engines (same result at any count)
};

struct CertifyResult {
  Verdict verdict = Verdict::kLeakFree;
  Method method = Method::kExact;  ///< method actually used
  size_t dimension = 0, kept = 0, letters = 0;
  bool unitary = false;
  std::optional<Scalar> leakage;   ///< exact leakage (exact method, unitary model)
  std::string leakage_ball;        ///< enclosure "[m +/- r]" (empty when unknown)
  std::string leakage_upper;       ///< decimal upper bound (interval method): leakage <= this
  std::string leakage_lower;       ///< decimal lower bound > 0 when the interval method proves leaking
  long precision = 0;              ///< working precision of the ball (bits)
  long accuracy_bits = 0;          ///< -log2 of the leakage enclosure radius (interval)
  std::optional<Matrix> image;     ///< W = rho(w) V (exact method)
  std::optional<Matrix> action;    ///< induced action on K in the basis V (exact method; see above)
  std::optional<ModularZeroResult> modular;  ///< modular method: the witness or the primes and norm bound
};

/// The leak block's left factor: X = post * rho(w) V vanishes exactly when rho(w) K lies in K. For a coordinate
/// subspace the rows outside the kept coordinates (a 0/1 selection); otherwise 1 - V G^-1 V^* (G = V^* V).
Matrix leak_post(const Subspace& keep);

/// Checks that the word returns the anyons to their order; the kept subspace lives in V(anyons; total).
CertifyResult certify(BraidGenerators& gens, const std::vector<int>& anyons, const Subspace& keep, const Word& w,
                      const CertifyOptions& opt);

/// Leakage and leak-free test from an exact image W = rho(w)V (shared by certify; the checker has its own).
struct ExactLeak {
  bool leak_free = false;
  std::optional<Scalar> leakage;
  std::optional<Matrix> action;
};
ExactLeak exact_leakage(const Subspace& keep, const Matrix& image, bool unitary);

/// A decimal string that is >= x (x an arf), with `digits` significant digits.
std::string decimal_upper(const arf_t x, int digits = 6);
/// A decimal string that is <= x (x >= 0).
std::string decimal_lower(const arf_t x, int digits = 6);
/// The stated bounds of an interval result, derived from its printed enclosure `ball` alone (so a checker can
/// re-derive them): upper = max(ub(ball), 2^-prec) rounded up to 6 digits; lower = lb(ball) rounded down when
/// the ball is positive (returns true: the word provably leaks), else empty.
bool interval_bounds(const std::string& ball, long prec, std::string* upper, std::string* lower);
/// Parses a decimal string "d.ddde-N" (as written above) exactly into x. Returns false if malformed.
bool parse_decimal(arb_t x, const std::string& s, long prec);

}  // namespace zb
