// Verdicts of a braid word against a kept subspace, and their names in certificates, JSON and text.
// Part of the trusted base shared by the producer and the independent checker (docs/certificate-format.md §7).
#pragma once
#include <optional>
#include <string>
#include <string_view>

namespace zb {

enum class Verdict {
  kLeakFree,        ///< rho(w) maps the kept subspace into itself (exactly)
  kLeaks,           ///< it does not (a proof: an exact leak block, a nonzero image or a positive enclosure)
  kLeakageBounded,  ///< interval method: leakage <= a stated decimal bound
};

/// "leak-free", "leaks", "leakage-bounded" (the strings written in certificates).
inline std::string verdict_name(Verdict v) {
  switch (v) {
    case Verdict::kLeakFree: return "leak-free";
    case Verdict::kLeaks: return "leaks";
    case Verdict::kLeakageBounded: return "leakage-bounded";
  }
  return "?";
}

/// The verdict named exactly `s`, or nothing.
inline std::optional<Verdict> parse_verdict(std::string_view s) {
  for (Verdict v : {Verdict::kLeakFree, Verdict::kLeaks, Verdict::kLeakageBounded})
    if (verdict_name(v) == s) return v;
  return std::nullopt;
}

}  // namespace zb
