// Exact certificates (docs/certificate-format.md section 5): the image hint W = rho(w) V is recomputed exactly
// (or proved equal by modular images), then the part of W outside span V decides the verdict and gives the
// leakage.
#include <fmt/format.h>

#include "checker.hpp"
#include "zetabraid/detail/raii.hpp"

namespace zb::checker {

std::string ball128(const Scalar& s) {
  AcbT b;
  s.ball(b.get(), 128);
  return ball_str(acb_realref(b.get()), 20);
}

Matrix leak_post(const Inputs& x) {
  const FieldPtr& f = x.model.field;
  if (!x.kept_rows.empty()) {
    size_t out_rows = 0;
    for (bool b : x.kept_rows) out_rows += !b;
    Matrix post(f, out_rows, x.dim);
    for (size_t i = 0, r = 0; i < x.dim; ++i)
      if (!x.kept_rows[i]) post(r++, i) = Scalar(f, 1);
    return post;
  }
  Matrix vh = x.keep.adjoint();
  return Matrix::identity(f, x.dim) - x.keep * ((vh * x.keep).inverse() * vh);
}

namespace {

// The part of W outside span V: D = W - V G^-1 V^* W (zero exactly when W lies in span V), and the unitary
// leakage as the squared norm of D in the metric G^-1 of the kept coordinates: tr(D^* D G^-1). For a kept basis
// of tree basis vectors this is the plain sum of |W_rj|^2 over the other rows.
struct Outside {
  bool zero = true;
  Scalar leak;
};

Outside outside_part(const Inputs& x, const Matrix& w) {
  const FieldPtr& f = x.model.field;
  Outside o{true, Scalar(f)};
  if (!x.kept_rows.empty()) {
    for (size_t i = 0; i < w.rows(); ++i)
      if (!x.kept_rows[i])
        for (size_t j = 0; j < w.cols(); ++j)
          if (!w(i, j).is_zero()) {
            o.zero = false;
            o.leak += w(i, j) * w(i, j).conj();
          }
    return o;
  }
  const Matrix& v = x.keep;
  Matrix vh = v.adjoint();
  Matrix gi = (vh * v).inverse();
  Matrix d = w - v * (gi * (vh * w));
  o.zero = d.is_zero();
  Matrix dg = d * gi;
  for (size_t i = 0; i < d.rows(); ++i)
    for (size_t j = 0; j < d.cols(); ++j) o.leak += d(i, j).conj() * dg(i, j);
  return o;
}

}  // namespace

std::string check_exact(const Inputs& x, const json& c, Verdict claim, RecheckRoute route) {
  const json& jl = c["claim"]["leakage"];
  const json& jh = c["hints"];
  const FieldPtr& f = x.model.field;
  const size_t k = x.keep.cols();
  if (claim != Verdict::kLeakFree && claim != Verdict::kLeaks)
    reject("an exact certificate claims leak-free or leaks");
  expect_null(jl["upper"], "claim.leakage.upper (exact method)");
  expect_null(jl["lower"], "claim.leakage.lower (exact method)");
  Matrix w = matrix_of_rows(jh["image"], x.dim, k, f, "hints.image");
  std::string via_note;
  if (route == RecheckRoute::kModular) {
    via_note = modular_equal(x, w);
  } else if (apply_letters(x.letters.sequence, x.keep) != w) {
    reject("hints.image is not rho(word) applied to the kept basis");
  }
  Outside out = outside_part(x, w);
  const Verdict truth = out.zero ? Verdict::kLeakFree : Verdict::kLeaks;
  if (claim != truth)
    reject(fmt::format("the claim says {}, but the braid word {}", verdict_name(claim), verdict_name(truth)));
  std::string value = "not available (the model does not claim a unitary gauge)";
  const bool unitary = x.model.claims_unitary;
  if (unitary) {
    const Scalar& leak = out.leak;
    if (out.zero != leak.is_zero()) reject("internal: leakage and leak-free test disagree");
    if (scalar_of(jl["exact"], f, "claim.leakage.exact") != leak)
      reject(fmt::format("claim.leakage.exact is wrong: the leakage is {}", leak.str()));
    if (str_of(jl["ball"], "claim.leakage.ball") != ball128(leak))
      reject(fmt::format("claim.leakage.ball is wrong: expected {}", ball128(leak)));
    value = fmt::format("leakage = {} = {}", leak.str(), ball128(leak));
  } else {
    expect_null(jl["exact"], "claim.leakage.exact (model without a unitary gauge)");
    expect_null(jl["ball"], "claim.leakage.ball (model without a unitary gauge)");
  }
  // action: leak-free -> V A = W; leaking, unitary -> G A = V^* W (compression)
  if (out.zero || unitary) {
    Matrix a = matrix_of_rows(jh["action"], k, k, f, "hints.action");
    bool ok = out.zero ? x.keep * a == w : (x.keep.adjoint() * x.keep) * a == x.keep.adjoint() * w;
    if (!ok) reject("hints.action is not the induced action on the kept space");
  } else {
    expect_null(jh["action"], "hints.action");
  }
  return fmt::format("{} (exact; {} letters, kept {} of {}), {}{}", verdict_name(claim), x.word.size(), k, x.dim,
                     value, via_note);
}

}  // namespace zb::checker
