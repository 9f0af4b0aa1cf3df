// A self-contained PARI/GP script re-checking a certificate's claim without zetabraid.
#include <fmt/format.h>

#include "zetabraid/braid/subspace.hpp"
#include "zetabraid/cert/certificate.hpp"
#include "zetabraid/error.hpp"

namespace zb {

namespace {

// THE one way text from inputs (names, paths, labels, specs) enters a GP script: as a GP string literal. Quote
// and backslash are escaped; every other byte outside printable ASCII (control characters, DEL, non-ASCII) is
// written as the four visible characters \xHH (an escaped backslash, so GP prints "\xHH" and never sees the
// byte). Such text never appears in a comment or as code.
std::string gp_string(const std::string& s) {
  std::string out = "\"";
  for (unsigned char ch : s) {
    if (ch == '"' || ch == '\\') {
      out += '\\';
      out += static_cast<char>(ch);
    } else if (ch < 0x20 || ch >= 0x7f) {
      out += fmt::format("\\\\x{:02x}", ch);
    } else {
      out += static_cast<char>(ch);
    }
  }
  return out + "\"";
}

std::string gp_strings(const std::vector<std::string>& v) {
  std::string s = "[";
  for (size_t i = 0; i < v.size(); ++i) {
    if (i) s += ", ";
    s += gp_string(v[i]);
  }
  return s + "]";
}

std::string cyclo_gp(const Cyclo& c) {
  fmpq_poly_t p;
  fmpq_poly_init(p);
  c.get_poly(p);
  char* s = fmpq_poly_get_str_pretty(p, "z");
  std::string out(s);
  flint_free(s);
  fmpq_poly_clear(p);
  return out;
}

// A Scalar as a GP polynomial in z and s1..sm (s_j = sqrt(d_j)).
std::string scalar_gp(const Scalar& x) {
  if (x.is_zero()) return "E(0)";
  std::string s;
  for (const auto& [mask, c] : x.terms()) {
    std::string mono = fmt::format("({})", cyclo_gp(c));
    for (int j = 0; j < 62; ++j)
      if (mask & (RadicalMask(1) << j)) mono += fmt::format("*s{}", j + 1);
    if (!s.empty()) s += " + ";
    s += mono;
  }
  return fmt::format("E({})", s);
}

std::string matrix_gp(const Matrix& m) {
  if (m.rows() == 0 || m.cols() == 0) return fmt::format("matrix({},{})", m.rows(), m.cols());
  std::string s = "[";
  for (size_t i = 0; i < m.rows(); ++i) {
    if (i) s += "; ";
    for (size_t j = 0; j < m.cols(); ++j) {
      if (j) s += ", ";
      s += scalar_gp(m(i, j));
    }
  }
  return fmt::format("Mat({}])", s);  // Mat(): a 1 x k or 1 x 1 literal would otherwise be a vector
}

}  // namespace

std::string export_gp(const CertificateInputs& in, const CertifyResult& r) {
  const Model& m = *in.model;
  const FieldPtr& f = m.field;
  const int nl = m.label_count();
  std::string g;
  g += "\\\\ Self-contained PARI/GP re-check of a zetabraid certificate (no zetabraid needed).\n";
  // what the script is about, as data (string literals; see gp_string), never inside a comment
  std::vector<std::string> anyon_labels;
  for (int a : in.anyons) anyon_labels.push_back(m.labels[static_cast<size_t>(a)]);
  g += fmt::format("MODEL_NAME = {};\nMODEL_FILE = {};\nANYON_LABELS = {};\nTOTAL_LABEL = {};\nKEEP = {};\n",
                   gp_string(m.name), gp_string(in.model_path), gp_strings(anyon_labels),
                   gp_string(m.labels[static_cast<size_t>(in.total)]),
                   gp_string(in.keep_spec.empty() ? in.keep_kind : in.keep_spec));
  g += "\\\\ Exact arithmetic in Q(zeta_N)(sqrt(d_1),...) as nested polmods: z = zeta_N, s_j = sqrt(d_j) > 0.\n";
  g += "\\\\ Generators are rebuilt here from the model's fusion rules, F- and R-symbols (left-associated trees,\n";
  g += "\\\\ sigma_i = F-move, R, inverse F-move; leftmost letter applied first), see docs/certificate-format.md.\n";
  int nr = f->radicand_count();
  for (int j = 1; j <= nr; ++j) g += fmt::format("s{0} = varhigher(\"s{0}\");\n", j);
  g += "z = varlower(\"z\");\n";
  g += fmt::format("NC = {};\nPHI = polcyclo(NC, z);\n", f->conductor());
  std::string e = "Mod(p, PHI)";
  for (int j = 1; j <= nr; ++j) e = fmt::format("Mod({}, s{}^2 - ({}))", e, j, cyclo_gp(f->radicand(j - 1)));
  g += fmt::format("E(p) = {};\n", e);
  g += "cj(x) = E(subst(liftall(x), z, z^(NC-1)));  \\\\ complex conjugation (fixes every s_j)\n";
  g += "ct(M) = my(sz = matsize(M)); matrix(sz[2], sz[1], i, j, cj(M[j, i]));  \\\\ conjugate transpose\n";
  g += "num(x) = my(p = liftall(x)); p = subst(p, z, exp(2*Pi*I/NC));";
  for (int j = 1; j <= nr; ++j)
    g += fmt::format(" p = subst(p, s{0}, sqrt(subst({1}, z, exp(2*Pi*I/NC))));", j, cyclo_gp(f->radicand(j - 1)));
  g += " p;\n";
  g += fmt::format("L = {};\nN = vector(L, a, matrix(L, L));\n", nl);
  for (int a = 0; a < nl; ++a)
    for (int b = 0; b < nl; ++b)
      for (int c = 0; c < nl; ++c)
        if (m.fusion(a, b, c) > 0) g += fmt::format("N[{}][{},{}] = {};\n", a + 1, b + 1, c + 1, m.fusion(a, b, c));
  g += "Fm = Map();\n";
  for (const auto& [k, v] : m.f_symbols())
    g += fmt::format("mapput(Fm, [{},{},{},{},{},{}], {});\n", k[0] + 1, k[1] + 1, k[2] + 1, k[3] + 1, k[4] + 1,
                     k[5] + 1, scalar_gp(v));
  g += "Rm = Map();\n";
  for (const auto& [k, v] : m.r_symbols())
    g += fmt::format("mapput(Rm, [{},{},{}], {});\n", k[0] + 1, k[1] + 1, k[2] + 1, scalar_gp(v));
  g += R"GP(fv(a,b,c,d,e,f) = my(v); if(mapisdefined(Fm, [a,b,c,d,e,f], &v), v, E(0));
rv(a,b,c) = my(v); if(mapisdefined(Rm, [a,b,c], &v), v, error("missing R-symbol ", [a,b,c]));
trees(an, tot) = {
  my(cur = [[an[1]]], out = List());
  for (k = 2, #an, my(nx = List());
    for (i = 1, #cur, for (y = 1, L, if (N[cur[i][k-1]][an[k], y], listput(nx, concat(cur[i], [y])))));
    cur = Vec(nx));
  for (i = 1, #cur, if (cur[i][#an] == tot, listput(out, cur[i])));
  Vec(out);
}
fmat(a,b,c,d) = {
  my(rs = [e | e <- [1..L], N[a][b,e] && N[e][c,d]], cs = [f | f <- [1..L], N[b][c,f] && N[a][f,d]]);
  [rs, cs, matrix(#rs, #cs, i, j, fv(a,b,c,d,rs[i],cs[j]))];
}
\\ matrix of sigma_k (k > 0) or sigma_|k|^-1 (k < 0) on V(an; tot); returns [matrix, new labels]
gen(an, tot, k) = {
  my(i = abs(k), T = trees(an, tot), bn = an, b = an[i], c = an[i+1]);
  bn[i] = c; bn[i+1] = b;
  my(U = trees(bn, tot), idx = Map(), S = matrix(#U, #T, p, q, E(0)));
  for (p = 1, #U, mapput(idx, U[p], p));
  for (q = 1, #T, my(t = T[q], nt = t); nt[1] = bn[1];
    if (i == 1,
      S[mapget(idx, nt), q] = if (k > 0, rv(b, c, t[2]), 1/rv(c, b, t[2])),
      my(u = t[i-1], e = t[i], d = t[i+1], F1 = fmat(u, b, c, d), F2 = fmat(u, c, b, d), F2i, er);
      F2i = F2[3]^(-1);
      er = select(x -> x == e, F1[1], 1)[1];
      for (fj = 1, #F1[2], my(ff = F1[2][fj], fi = select(x -> x == ff, F2[2], 1));
        if (#fi == 0, next); fi = fi[1];
        my(co = F1[3][er, fj] * if (k > 0, rv(b, c, ff), 1/rv(c, b, ff)));
        for (ep = 1, #F2[1], nt[i] = F2[1][ep]; S[mapget(idx, nt), q] += co * F2i[fi, ep]))));
  [S, bn];
}
)GP";
  std::string an = "[";
  for (size_t i = 0; i < in.anyons.size(); ++i) an += fmt::format("{}{}", i ? "," : "", in.anyons[i] + 1);
  an += "]";
  g += fmt::format("AN = {};\nTOT = {};\n", an, in.total + 1);
  std::string word = "[";
  in.word->for_each_letter([&](int l, std::uint32_t) {
    if (word.size() > 1) word += ',';
    word += std::to_string(l);
  });
  word += "]";
  g += fmt::format("WORD = {};\n", word);
  g += fmt::format("V = {};\n", matrix_gp(in.keep->basis));
  g += fmt::format("DIM = {}; KK = {};\n", in.space->dimension(), in.keep->kept());
  // charge groups of the kept subspace (kind "charges"): [first, last, charge] with 1-based label indices
  std::string groups = "[]";
  if (in.keep_kind == "charges") {
    groups = "[";
    auto gs = parse_keep(m, in.keep_spec, static_cast<int>(in.anyons.size()));
    for (size_t i = 0; i < gs.size(); ++i)
      groups += fmt::format("{}[{}, {}, {}]", i ? ", " : "", gs[i].first, gs[i].last, gs[i].charge + 1);
    groups += "]";
  }
  g += fmt::format("GROUPS = {};\n", groups);
  g += fmt::format("VERDICT = {};\nUNITARY = {};\n", gp_string(verdict_name(r.verdict)), m.claims_unitary ? 1 : 0);
  g += fmt::format("LEAK = {};\n", r.leakage ? scalar_gp(*r.leakage) : "0");
  g += fmt::format("HAVELEAK = {};\n", r.leakage ? 1 : 0);
  g += fmt::format("UPPER = {};\n", r.leakage_upper.empty() ? "0" : r.leakage_upper);
  g += fmt::format("LOWER = {};\n", r.leakage_lower.empty() ? "0" : r.leakage_lower);
  g += fmt::format("METHOD = {};\n", gp_string(method_name(r.method)));
  g += R"GP(ok = 1; why = "";
fail(s) = if (ok, ok = 0; why = s);
{
if (#trees(AN, TOT) != DIM, fail("dimension of the fusion space differs"));
cache = Map(); W = V; lab = AN;
for (t = 1, #WORD, my(key = [lab, WORD[t]], g);
  if (!mapisdefined(cache, key, &g), g = gen(lab, TOT, WORD[t]); mapput(cache, key, g));
  W = g[1] * W; lab = g[2]);
if (lab != AN, fail("the word does not return the anyons to their order"));
leakfree = (matrank(concat(V, W)) == KK);
\\ the kept space from the charge groups, by a different route than zetabraid's: braid each block to the
\\ front of the whole register (the anyon before it crosses the block, repeatedly), read its charge there
\\ as the intermediate label x_m, braid back: P = B^-1 Q B; then V must span exactly the image of prod P.
if (#GROUPS,
  my(P = matid(DIM));
  for (q = 1, #GROUPS, my(i0 = GROUPS[q][1], j0 = GROUPS[q][2], ch = GROUPS[q][3], m = j0 - i0 + 1,
                          lb = AN, B = matid(DIM), Q, T);
    forstep (r0 = i0 - 1, 1, -1, for (s0 = r0, r0 + m - 1, my(gg = gen(lb, TOT, s0)); B = gg[1] * B; lb = gg[2]));
    T = trees(lb, TOT);
    Q = matrix(DIM, DIM, a, b, if (a == b && T[a][m] == ch, E(1), E(0)));
    P = B^(-1) * Q * B * P);
  if (P * V != V, fail("a kept basis vector violates the charge constraints"));
  if (matrank(P) != KK, fail("the kept basis does not span the charge subspace")));
if (METHOD == "exact" || METHOD == "modular",
  if (leakfree && VERDICT != "leak-free", fail("the braid is leak-free, the claim says otherwise"));
  if (!leakfree && VERDICT != "leaks", fail("the braid leaks, the claim says otherwise")));
if (UNITARY,
  my(G = ct(V) * V, Gi = G^(-1), B = ct(V) * W, lk);
  lk = trace(Gi * (ct(W) * W)) - trace(Gi * ct(B) * Gi * B);
  if (METHOD == "exact" && HAVELEAK && lk != LEAK, fail("the exact leakage differs from the claimed value"));
  if (METHOD == "interval",
    \\ exact leakage here; its comparison with the decimal bounds is numerical at 200 digits
    default(realprecision, 200);
    if (real(num(lk)) > UPPER, fail("the leakage exceeds the claimed upper bound"));
    if (VERDICT == "leaks" && real(num(lk)) < LOWER, fail("the leakage is below the claimed lower bound"));
    if (VERDICT == "leakage-bounded" && LOWER != 0, fail("bad lower bound"))));
if (ok, print("zetabraid-gp: verified: ", VERDICT, " (", METHOD, ", ", #WORD, " letters)"),
        print("zetabraid-gp: REJECTED: ", why));
}
)GP";
  return g;
}

}  // namespace zb
