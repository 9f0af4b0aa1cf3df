// Interval certificates (docs/certificate-format.md section 7): the stated bounds are re-derived from the stated
// enclosure, then the checker recomputes its own enclosure of the leakage, raising the precision until it
// confirms the claim or contradicts it.
#include <fmt/format.h>

#include <algorithm>

#include "checker.hpp"
#include "zetabraid/detail/raii.hpp"

namespace zb::checker {

namespace {

struct Claim {
  Verdict verdict;
  std::string ball_text, upper_text, lower_text;
  ArbT ball, upper, lower;
};

// Reads and re-derives the claim: every number bounded (numbers.cpp), bounds and verdict derived from `ball`.
void read_claim(Claim* cl, const json& jl, long prec) {
  cl->upper_text = str_of(jl["upper"], "claim.leakage.upper");
  if (!parse_decimal(cl->upper.get(), cl->upper_text, 256))
    reject("claim.leakage.upper is not a decimal within the format's range");
  if (cl->verdict == Verdict::kLeaks) {
    cl->lower_text = str_of(jl["lower"], "claim.leakage.lower");
    if (!parse_decimal(cl->lower.get(), cl->lower_text, 256) || !arb_is_positive(cl->lower.get()))
      reject("claim.leakage.lower must be a positive decimal within the format's range for a leaking verdict");
  } else {
    expect_null(jl["lower"], "claim.leakage.lower (leakage-bounded)");
  }
  cl->ball_text = str_of(jl["ball"], "claim.leakage.ball");
  if (!parse_ball(cl->ball.get(), cl->ball_text, 256))
    reject("claim.leakage.ball is not an enclosure [m +/- r] within the format's range");
  std::string up, lo;
  const bool pos = derive_bounds(cl->ball_text, prec, &up, &lo);
  if ((cl->verdict == Verdict::kLeaks) != pos)
    reject(fmt::format("claim.verdict {} does not follow from the enclosure {}", verdict_name(cl->verdict),
                       cl->ball_text));
  if (up != cl->upper_text) reject(fmt::format("claim.leakage.upper should be {} (derived from the enclosure)", up));
  if (pos && lo != cl->lower_text)
    reject(fmt::format("claim.leakage.lower should be {} (derived from the enclosure)", lo));
}

enum class Judgement { kConfirmed, kUnknown, kFalse };

// Compares the recomputed enclosure with the claim; *problem says what could not be confirmed.
Judgement judge(const Claim& cl, const arb_t leak, long p, std::string* problem) {
  ArbT t;
  arb_sub(t.get(), cl.upper.get(), leak, p);
  const bool up_ok = arb_is_nonnegative(t.get());
  bool low_ok = true;
  if (cl.verdict == Verdict::kLeaks) {
    arb_sub(t.get(), leak, cl.lower.get(), p);
    low_ok = arb_is_nonnegative(t.get());
  }
  const bool ball_ok = arb_contains(cl.ball.get(), leak);
  if (up_ok && low_ok && ball_ok) return Judgement::kConfirmed;
  const std::string got = ball_str(leak, 20);
  *problem = !up_ok    ? fmt::format("cannot confirm leakage <= {} (recomputed enclosure {})", cl.upper_text, got)
             : !low_ok ? fmt::format("cannot confirm leakage >= {} (recomputed enclosure {})", cl.lower_text, got)
                       : fmt::format("claim.leakage.ball {} does not contain the recomputed enclosure {}",
                                     cl.ball_text, got);
  // a claim that is false at this precision already (disjoint) needs no more precision
  if (!low_ok) {
    arb_sub(t.get(), leak, cl.lower.get(), p);
    if (arb_is_negative(t.get())) return Judgement::kFalse;
  }
  arb_sub(t.get(), cl.upper.get(), leak, p);
  return arb_is_negative(t.get()) ? Judgement::kFalse : Judgement::kUnknown;
}

bool letters_unitary(const Inputs& x) {
  for (const auto& t : x.letters.distinct) {
    if (t->rows != x.dim || t->cols != x.dim) return false;
    Matrix m = t->dense(x.model.field);
    if (!(m.adjoint() * m).is_identity()) return false;
  }
  return true;
}

std::string verified(const Inputs& x, const Claim& cl, const arb_t leak, long p, const char* how) {
  return fmt::format("{} (interval; {} letters, kept {} of {}), leakage <= {}{}, re-checked at {} bits ({}; "
                     "enclosure {})",
                     verdict_name(cl.verdict), x.word.size(), x.keep.cols(), x.dim, cl.upper_text,
                     cl.verdict == Verdict::kLeaks ? ", leakage >= " + cl.lower_text : std::string(), p, how,
                     ball_str(leak, 20));
}

}  // namespace

std::string check_interval(const Inputs& x, const json& c, Verdict verdict, long prec, bool plain) {
  const json& jl = c["claim"]["leakage"];
  const json& jh = c["hints"];
  if (!x.model.claims_unitary) reject("an interval certificate needs a model that claims a unitary gauge");
  if (verdict != Verdict::kLeaks && verdict != Verdict::kLeakageBounded)
    reject("an interval certificate claims leakage-bounded or leaks (never leak-free)");
  expect_null(jh["image"], "hints.image (interval method)");
  expect_null(jh["action"], "hints.action (interval method)");
  expect_null(jl["exact"], "claim.leakage.exact (interval method)");
  if (prec < 16 || prec > (1L << 20)) reject("method.precision_bits out of range (16..2^20)");
  Claim cl{verdict, {}, {}, {}, {}, {}, {}};
  read_claim(&cl, jl, prec);
  const size_t dim = x.dim, k = x.keep.cols();
  const bool coordinate = !x.kept_rows.empty();
  const long length = static_cast<long>(x.word.size());
  const auto& seq = x.letters.sequence;
  ArbT leak;
  std::string problem;
  // the error-bound propagation relies on ||U||_2 = 1: every distinct letter is checked unitary exactly
  if (!plain && letters_unitary(x)) {
    // the error is about L 2^-p: the producer's precision plus 2 log2 L + 32 bits suffices for an honest
    // certificate; doubled on failure
    long lg = 0;
    while (lg < 62 && (1L << lg) <= length) ++lg;
    const long p0 = prec + 2 * lg + 32;
    const long cap = std::min<long>(std::max<long>(8 * p0, 2048), 1 << 18);
    for (long p = p0;; p *= 2) {
      AcbMatT mid(static_cast<slong>(dim), static_cast<slong>(k));
      mag_ptr err = _mag_vec_init(static_cast<slong>(k));
      unitary_image(mid.get(), err, x.keep, seq, p);
      if (coordinate) {
        coordinate_leakage_bounded(leak.get(), mid.get(), err, x.kept_rows, p);
      } else {
        // |entry error| <= column error: every entry of column j gets radius e_j (real and imaginary parts)
        for (size_t j = 0; j < k; ++j)
          for (size_t i = 0; i < dim; ++i)
            acb_add_error_mag(acb_mat_entry(mid.get(), static_cast<slong>(i), static_cast<slong>(j)), err + j);
        outside_leakage(leak.get(), mid.get(), x.keep, p);
      }
      _mag_vec_clear(err, static_cast<slong>(k));
      const Judgement r = judge(cl, leak.get(), p, &problem);
      if (r == Judgement::kConfirmed) return verified(x, cl, leak.get(), p, "unitary letters, one error bound per column");
      if (r == Judgement::kFalse || p >= cap) reject(problem);
    }
  }
  // a plain product loses up to about a bit per letter: start there rather than at the producer's precision
  const long cap = std::min<long>(std::max<long>(prec * 8, 256 + 4 * length), 1 << 18);
  const long start = std::max<long>(prec, 64 + length);
  for (long p = std::min(start, cap); p <= cap; p *= 2) {
    AcbMatT img(static_cast<slong>(dim), static_cast<slong>(k));
    plain_image(img.get(), x.keep, seq, p);
    if (coordinate)
      coordinate_leakage(leak.get(), img.get(), x.kept_rows, p);
    else
      outside_leakage(leak.get(), img.get(), x.keep, p);
    const Judgement r = judge(cl, leak.get(), p, &problem);
    if (r == Judgement::kConfirmed) return verified(x, cl, leak.get(), p, "plain ball product");
    if (r == Judgement::kFalse) break;
  }
  reject(problem);
}

}  // namespace zb::checker
