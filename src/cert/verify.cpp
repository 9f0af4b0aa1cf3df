// The independent checker behind `zetabraid verify`.
//
// Shared with the producer (trusted base, small and separately tested): the exact field, Matrix arithmetic,
// the model loader, the fusion-tree enumeration and the charge projectors that recompute the kept basis.
// NOT shared: the action of the word's letters (rebuilt here by applying the F-R-F move to basis vectors
// directly), every product of a word (a plain left-to-right application here; the producer goes through
// linalg/word_product), the leakage formula and the decision logic.
#include <fmt/format.h>

#include <filesystem>
#include <map>
#include <nlohmann/json.hpp>
#include <set>

#include "zetabraid/cert/certificate.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/model/load.hpp"

namespace zb {

namespace {

using json = nlohmann::json;

struct Reject {
  std::string why;
};

[[noreturn]] void reject(const std::string& why) { throw Reject{why}; }

void expect_keys(const json& o, const std::set<std::string>& keys, const std::string& where) {
  if (!o.is_object()) reject(fmt::format("{} is not an object", where));
  for (auto it = o.begin(); it != o.end(); ++it)
    if (!keys.count(it.key())) reject(fmt::format("unexpected key '{}' in {}", it.key(), where));
  for (const auto& k : keys)
    if (!o.contains(k)) reject(fmt::format("missing key '{}' in {}", k, where));
}

std::string str_of(const json& v, const std::string& where) {
  if (!v.is_string()) reject(fmt::format("{} must be a string", where));
  return v.get<std::string>();
}

size_t uint_of(const json& v, const std::string& where) {
  if (!v.is_number_unsigned()) reject(fmt::format("{} must be a non-negative integer", where));
  return v.get<size_t>();
}

Scalar scalar_of(const json& v, const FieldPtr& f, const std::string& where) {
  std::string s = str_of(v, where);
  try {
    return parse_expression(s, f);
  } catch (const InputError& e) {
    reject(fmt::format("{}: not an exact expression: {}", where, e.what()));
  }
}

Matrix matrix_of_rows(const json& v, size_t rows, size_t cols, const FieldPtr& f, const std::string& where) {
  if (!v.is_array() || v.size() != rows) reject(fmt::format("{} must be an array of {} rows", where, rows));
  Matrix m(f, rows, cols);
  for (size_t i = 0; i < rows; ++i) {
    if (!v[i].is_array() || v[i].size() != cols) reject(fmt::format("{} row {} must have {} entries", where, i, cols));
    for (size_t j = 0; j < cols; ++j) m(i, j) = scalar_of(v[i][j], f, fmt::format("{}[{}][{}]", where, i, j));
  }
  return m;
}

// Generator action rebuilt from F and R (no generator matrices, no word products shared with the producer).
class Action {
 public:
  Action(const Model& m, int total) : m_(m), total_(total) {}

  const FusionSpace& space(const std::vector<int>& labels) {
    auto it = spaces_.find(labels);
    if (it == spaces_.end()) it = spaces_.emplace(labels, std::make_unique<FusionSpace>(m_, labels, total_)).first;
    return *it->second;
  }

  // v in V(labels) -> sigma_k^{+-1} v in V(labels swapped); labels updated.
  std::vector<Scalar> apply(std::vector<int>& labels, int k, const std::vector<Scalar>& v) {
    const size_t i = static_cast<size_t>(k > 0 ? k : -k);
    const FusionSpace& from = space(labels);
    std::vector<int> to_labels = labels;
    std::swap(to_labels[i - 1], to_labels[i]);
    const FusionSpace& to = space(to_labels);
    std::vector<Scalar> out(to.dimension(), Scalar(m_.field));
    const int b = labels[i - 1], c = labels[i];
    for (size_t s = 0; s < from.dimension(); ++s) {
      if (v[s].is_zero()) continue;
      std::vector<int> t = from.tree(s);
      t[0] = to_labels[0];
      if (i == 1) {
        Scalar r = k > 0 ? rsym(b, c, t[1]) : rsym(c, b, t[1]).inverse();
        out[static_cast<size_t>(to.index_of(t))] += r * v[s];
        continue;
      }
      const int u = t[i - 2], e = t[i - 1], d = t[i];
      // sum over f of F^{u b c}_d[e,f] R (F^{u c b}_d)^{-1}[f,e']
      const Local& f1 = local(u, b, c, d);
      const Local& f2 = local(u, c, b, d);
      size_t er = 0;
      while (er < f1.rows.size() && f1.rows[er] != e) ++er;
      if (er == f1.rows.size()) reject("internal: tree not admissible in F");
      for (size_t fj = 0; fj < f1.cols.size(); ++fj) {
        const int f = f1.cols[fj];
        if (f1.f(er, fj).is_zero()) continue;
        size_t fi = 0;
        while (fi < f2.cols.size() && f2.cols[fi] != f) ++fi;
        if (fi == f2.cols.size()) continue;
        Scalar coeff = f1.f(er, fj) * (k > 0 ? rsym(b, c, f) : rsym(c, b, f).inverse()) * v[s];
        for (size_t ep = 0; ep < f2.rows.size(); ++ep) {
          const Scalar& z = f2.finv(fi, ep);
          if (z.is_zero()) continue;
          t[i - 1] = f2.rows[ep];
          long row = to.index_of(t);
          if (row < 0) reject("internal: image tree missing");
          out[static_cast<size_t>(row)] += coeff * z;
        }
      }
    }
    labels = to_labels;
    return out;
  }

 private:
  struct Local {
    std::vector<int> rows, cols;
    Matrix f, finv;
  };
  const Local& local(int a, int b, int c, int d) {
    std::array<int, 4> key{a, b, c, d};
    auto it = locals_.find(key);
    if (it != locals_.end()) return it->second;
    std::vector<int> rows, cols;
    for (int e = 0; e < m_.label_count(); ++e)
      if (m_.fusion(a, b, e) > 0 && m_.fusion(e, c, d) > 0) rows.push_back(e);
    for (int f = 0; f < m_.label_count(); ++f)
      if (m_.fusion(b, c, f) > 0 && m_.fusion(a, f, d) > 0) cols.push_back(f);
    if (rows.size() != cols.size()) reject("model has a non-square F-matrix");
    Matrix f(m_.field, rows.size(), cols.size());
    for (size_t x = 0; x < rows.size(); ++x)
      for (size_t y = 0; y < cols.size(); ++y)
        if (const Scalar* s = m_.f_symbol(a, b, c, d, rows[x], cols[y])) f(x, y) = *s;
    Matrix finv = f.inverse();
    return locals_.emplace(key, Local{rows, cols, f, finv}).first->second;
  }
  Scalar rsym(int a, int b, int c) {
    const Scalar* r = m_.r_symbol(a, b, c);
    if (!r || r->is_zero()) reject(fmt::format("model lacks R^{{{} {}}}_{}", m_.labels[a], m_.labels[b], m_.labels[c]));
    return *r;
  }
  const Model& m_;
  int total_;
  std::map<std::vector<int>, std::unique_ptr<FusionSpace>> spaces_;
  std::map<std::array<int, 4>, Local> locals_;
};

// rho(w) applied to the columns of v, exactly, one letter at a time.
// Exact matrix of one letter on V(labels), from the action on basis vectors.
Matrix letter_matrix(Action& act, const std::vector<int>& labels, int k) {
  const FusionSpace& sp = act.space(labels);
  size_t n = sp.dimension();
  Matrix m(sp.model().field, n, n);
  for (size_t j = 0; j < n; ++j) {
    std::vector<Scalar> e(n, Scalar(sp.model().field));
    e[j] = Scalar(sp.model().field, 1);
    std::vector<int> l = labels;
    std::vector<Scalar> c = act.apply(l, k, e);
    for (size_t i = 0; i < n; ++i) m(i, j) = c[i];
  }
  return m;
}

// rho(w) applied to the columns of v, exactly, one letter at a time: each distinct letter's action is
// tabulated once (from the F-R-F move on basis vectors) as its nonzero entries, then applied plainly.
Matrix exact_image(Action& act, const std::vector<int>& anyons, const Word& w, const Matrix& v) {
  struct Entry {
    size_t row, col;
    Scalar value;
  };
  std::map<std::pair<std::vector<int>, int>, std::vector<Entry>> tables;
  std::vector<std::vector<Scalar>> cols(v.cols(), std::vector<Scalar>(v.rows(), Scalar(v.field())));
  for (size_t j = 0; j < v.cols(); ++j)
    for (size_t i = 0; i < v.rows(); ++i) cols[j][i] = v(i, j);
  std::vector<int> labels = anyons;
  for (int l : w.letters) {
    auto key = std::make_pair(labels, l);
    auto it = tables.find(key);
    size_t rows = 0;
    if (it == tables.end()) {
      Matrix g = letter_matrix(act, labels, l);
      std::vector<Entry> e;
      for (size_t c = 0; c < g.cols(); ++c)
        for (size_t r = 0; r < g.rows(); ++r)
          if (!g(r, c).is_zero()) e.push_back({r, c, g(r, c)});
      it = tables.emplace(key, std::move(e)).first;
    }
    std::swap(labels[static_cast<size_t>(std::abs(l)) - 1], labels[static_cast<size_t>(std::abs(l))]);
    rows = act.space(labels).dimension();
    for (auto& col : cols) {
      std::vector<Scalar> next(rows, Scalar(v.field()));
      for (const Entry& e : it->second)
        if (!col[e.col].is_zero()) next[e.row] += e.value * col[e.col];
      col = std::move(next);
    }
  }
  if (labels != anyons) reject("the word does not return the anyons to their order");
  Matrix out(v.field(), v.rows(), v.cols());
  for (size_t j = 0; j < v.cols(); ++j)
    for (size_t i = 0; i < v.rows(); ++i) out(i, j) = cols[j][i];
  return out;
}

// The part of W outside span V: D = W - V G^-1 V* W (zero exactly when W lies in span V), and the unitary
// leakage ||D||^2 in the metric G^-1: sum_{r,b} conj(D_rb) (D G^-1)_rb. For a kept basis of tree basis vectors
// this is the plain sum of |W_rj|^2 over the other rows.
struct Outside {
  bool zero = true;
  Scalar leak;
};
Outside outside_part(const Matrix& v, const Matrix& w, const std::vector<bool>* kept_rows) {
  const FieldPtr& f = v.field();
  Outside o{true, Scalar(f)};
  if (kept_rows) {
    for (size_t i = 0; i < w.rows(); ++i)
      if (!(*kept_rows)[i])
        for (size_t j = 0; j < w.cols(); ++j)
          if (!w(i, j).is_zero()) {
            o.zero = false;
            o.leak += w(i, j) * w(i, j).conj();
          }
    return o;
  }
  Matrix vh = v.adjoint();
  Matrix gi = (vh * v).inverse();
  Matrix d = w - v * (gi * (vh * w));
  o.zero = d.is_zero();
  Matrix dg = d * gi;
  for (size_t i = 0; i < d.rows(); ++i)
    for (size_t j = 0; j < d.cols(); ++j) o.leak += d(i, j).conj() * dg(i, j);
  return o;
}

// Rows kept when the columns of v are distinct tree basis vectors; empty otherwise.
std::vector<bool> coordinate_rows(const Matrix& v) {
  std::vector<bool> kept(v.rows(), false);
  for (size_t j = 0; j < v.cols(); ++j) {
    size_t ones = 0, row = 0;
    for (size_t i = 0; i < v.rows(); ++i) {
      if (v(i, j).is_zero()) continue;
      if (!v(i, j).is_one()) return {};
      ++ones;
      row = i;
    }
    if (ones != 1 || kept[row]) return {};
    kept[row] = true;
  }
  return kept;
}

std::string ball128(const Scalar& s) {
  acb_t b;
  acb_init(b);
  s.ball(b, 128);
  std::string out = ball_str(acb_realref(b), 20);
  acb_clear(b);
  return out;
}

struct Ctx {
  Model model;
  std::vector<int> anyons;
  int total = 0;
  std::unique_ptr<FusionSpace> space;
  Matrix keep{Field::make(1), 0, 0};
  Word word;
};

VerifyOutcome check(const json& c, const std::string& cert_path, const std::string& model_override) {
  expect_keys(c, {"format", "version", "model", "field", "space", "keep", "word", "claim", "method", "hints"},
              "the certificate");
  if (c["format"] != "zetabraid-certificate") reject("format is not \"zetabraid-certificate\"");
  if (!c["version"].is_number_integer() || c["version"].get<long>() != 1)
    reject("unsupported version (this checker reads version 1)");
  // model
  const json& jm = c["model"];
  expect_keys(jm, {"file", "sha256", "name", "unitary"}, "model");
  std::string path = model_override.empty() ? str_of(jm["file"], "model.file") : model_override;
  namespace fs = std::filesystem;
  if (model_override.empty() && !fs::exists(path)) {
    fs::path alt = fs::path(cert_path).parent_path() / path;
    if (fs::exists(alt)) path = alt.string();
  }
  std::string sha;
  try {
    sha = sha256_file(path);
  } catch (const InputError&) {
    reject(fmt::format("model file {} cannot be read", path));
  }
  if (sha != str_of(jm["sha256"], "model.sha256"))
    reject(fmt::format("SHA-256 of {} is {}, the certificate says {}", path, sha, jm["sha256"].dump()));
  Ctx x;
  try {
    x.model = load_model(path);
  } catch (const std::exception& e) {
    reject(fmt::format("model file {} does not load: {}", path, e.what()));
  }
  const Model& m = x.model;
  if (str_of(jm["name"], "model.name") != m.name) reject("model.name differs from the model file");
  if (!jm["unitary"].is_boolean() || jm["unitary"].get<bool>() != m.claims_unitary)
    reject("model.unitary differs from the model file");
  const FieldPtr& f = m.field;
  // field
  const json& jf = c["field"];
  expect_keys(jf, {"conductor", "radicands"}, "field");
  if (uint_of(jf["conductor"], "field.conductor") != f->conductor()) reject("field.conductor differs from the model");
  if (!jf["radicands"].is_array() || jf["radicands"].size() < static_cast<size_t>(f->radicand_count()))
    reject("field.radicands differ from the model");
  const int model_radicands = f->radicand_count();
  for (int j = 0; j < model_radicands; ++j)
    if (str_of(jf["radicands"][static_cast<size_t>(j)], "field.radicands") != f->radicand(j).str())
      reject("field.radicands differ from the model");
  // further radicands come from explicit kept basis vectors: adjoin them in order, each must be new
  for (size_t j = static_cast<size_t>(model_radicands); j < jf["radicands"].size(); ++j) {
    std::string text = str_of(jf["radicands"][j], "field.radicands");
    Scalar d = scalar_of(jf["radicands"][j], f, "field.radicands");
    if (!d.in_base()) reject("field.radicands: a radicand must lie in Q(zeta_N)");
    int before = f->radicand_count();
    try {
      (void)f->sqrt(d.to_base());
    } catch (const std::exception& e) {
      reject(fmt::format("field.radicands: sqrt({}) cannot be adjoined: {}", text, e.what()));
    }
    if (f->radicand_count() != before + 1 || f->radicand(before).str() != text)
      reject(fmt::format("field.radicands: {} is not a new independent radicand", text));
  }
  // space
  const json& js = c["space"];
  expect_keys(js, {"anyons", "total", "dimension", "basis"}, "space");
  if (!js["anyons"].is_array() || js["anyons"].empty()) reject("space.anyons must be a nonempty array");
  for (const auto& a : js["anyons"]) {
    int i = m.label_index(str_of(a, "space.anyons"));
    if (i < 0) reject(fmt::format("space.anyons: unknown label {}", a.dump()));
    x.anyons.push_back(i);
  }
  x.total = m.label_index(str_of(js["total"], "space.total"));
  if (x.total < 0) reject("space.total: unknown label");
  x.space = std::make_unique<FusionSpace>(m, x.anyons, x.total);
  const size_t dim = x.space->dimension();
  if (dim == 0) reject("the fusion space is zero-dimensional");
  if (uint_of(js["dimension"], "space.dimension") != dim)
    reject(fmt::format("space.dimension is {}, the fusion space has dimension {}", js["dimension"].dump(), dim));
  if (!js["basis"].is_array() || js["basis"].size() != dim) reject("space.basis has the wrong length");
  for (size_t i = 0; i < dim; ++i)
    if (str_of(js["basis"][i], "space.basis") != x.space->label(i)) reject(fmt::format("space.basis[{}] differs", i));
  // keep
  const json& jk = c["keep"];
  expect_keys(jk, {"kind", "spec", "dimension", "basis"}, "keep");
  std::string kind = str_of(jk["kind"], "keep.kind");
  if (kind != "vectors" && jf["radicands"].size() != static_cast<size_t>(model_radicands))
    reject("field.radicands: extra radicands are allowed only with explicit kept basis vectors");
  size_t k = uint_of(jk["dimension"], "keep.dimension");
  if (k == 0 || k > dim) reject("keep.dimension out of range");
  Matrix claimed_keep = matrix_of_rows(jk["basis"], k, dim, f, "keep.basis").transpose();
  if (kind == "charges") {
    std::string spec = str_of(jk["spec"], "keep.spec");
    Subspace s{Matrix(f, 0, 0), false, {}};
    try {
      auto groups = parse_keep(m, spec, static_cast<int>(x.anyons.size()));
      if (keep_canonical(m, groups) != spec) reject("keep.spec is not in canonical form");
      s = subspace_from_groups(*x.space, groups);
    } catch (const InputError& e) {
      reject(fmt::format("keep.spec: {}", e.what()));
    }
    if (s.basis != claimed_keep) reject("keep.basis is not the kept basis of keep.spec");
  } else if (kind == "vectors" || kind == "all") {
    RadicalMask used = 0;
    for (size_t i = 0; i < dim; ++i)
      for (size_t j = 0; j < k; ++j)
        for (const auto& [mask, c] : claimed_keep(i, j).terms()) used |= mask;
    for (int r = model_radicands; r < f->radicand_count(); ++r)
      if (!(used & (RadicalMask(1) << r))) reject("field.radicands: a radicand that no kept basis vector uses");
    if (!jk["spec"].is_null()) reject("keep.spec must be null for this kind");
    if (kind == "all" && !claimed_keep.is_identity()) reject("keep.basis of kind \"all\" must be the identity");
    if (claimed_keep.rank() != k) reject("keep.basis vectors are linearly dependent");
  } else {
    reject("keep.kind must be \"charges\", \"vectors\" or \"all\"");
  }
  x.keep = claimed_keep;
  // word
  const json& jw = c["word"];
  expect_keys(jw, {"letters", "length"}, "word");
  std::string letters = str_of(jw["letters"], "word.letters");
  try {
    x.word = parse_word(letters);
    x.word.check_range(static_cast<int>(x.anyons.size()));
  } catch (const std::exception& e) {
    reject(fmt::format("word.letters: {}", e.what()));
  }
  if (x.word.canonical() != letters) reject("word.letters is not in canonical form");
  if (uint_of(jw["length"], "word.length") != x.word.size()) reject("word.length differs from the letters");
  // claim, method, hints
  const json& jc = c["claim"];
  expect_keys(jc, {"verdict", "leakage"}, "claim");
  std::string verdict = str_of(jc["verdict"], "claim.verdict");
  const json& jl = jc["leakage"];
  expect_keys(jl, {"exact", "ball", "upper", "lower"}, "claim.leakage");
  const json& jme = c["method"];
  expect_keys(jme, {"name", "precision_bits"}, "method");
  std::string method = str_of(jme["name"], "method.name");
  size_t prec = uint_of(jme["precision_bits"], "method.precision_bits");
  const json& jh = c["hints"];
  expect_keys(jh, {"image", "action"}, "hints");
  Action act(m, x.total);
  const bool unitary = m.claims_unitary;

  if (method == "exact") {
    if (prec != 128) reject("method.precision_bits of an exact certificate must be 128 (the enclosure precision)");
    if (verdict != "leak-free" && verdict != "leaks") reject("an exact certificate claims leak-free or leaks");
    if (!jl["upper"].is_null() || !jl["lower"].is_null()) reject("claim.leakage upper/lower must be null (exact)");
    Matrix w = exact_image(act, x.anyons, x.word, x.keep);
    Matrix hint = matrix_of_rows(jh["image"], dim, k, f, "hints.image");
    if (hint != w) reject("hints.image is not rho(word) applied to the kept basis");
    std::vector<bool> rows = coordinate_rows(x.keep);
    Outside out = outside_part(x.keep, w, rows.empty() ? nullptr : &rows);
    bool leak_free = out.zero;
    std::string truth = leak_free ? "leak-free" : "leaks";
    if (verdict != truth) reject(fmt::format("the claim says {}, but the braid word {}", verdict, truth));
    std::string value = "not available (the model does not claim a unitary gauge)";
    if (unitary) {
      const Scalar& leak = out.leak;
      if (leak_free != leak.is_zero()) reject("internal: leakage and leak-free test disagree");
      if (scalar_of(jl["exact"], f, "claim.leakage.exact") != leak)
        reject(fmt::format("claim.leakage.exact is wrong: the leakage is {}", leak.str()));
      if (str_of(jl["ball"], "claim.leakage.ball") != ball128(leak))
        reject(fmt::format("claim.leakage.ball is wrong: expected {}", ball128(leak)));
      value = fmt::format("leakage = {} = {}", leak.str(), ball128(leak));
    } else if (!jl["exact"].is_null() || !jl["ball"].is_null()) {
      reject("claim.leakage must be null for a model without a unitary gauge");
    }
    // action: leak-free -> V A = W; leaking, unitary -> G A = V* W (compression)
    if (leak_free || unitary) {
      Matrix a = matrix_of_rows(jh["action"], k, k, f, "hints.action");
      bool ok = leak_free ? x.keep * a == w : (x.keep.adjoint() * x.keep) * a == x.keep.adjoint() * w;
      if (!ok) reject("hints.action is not the induced action on the kept space");
    } else if (!jh["action"].is_null()) {
      reject("hints.action must be null");
    }
    return {true, "", fmt::format("{} ({}; {} letters, kept {} of {}), {}", verdict, "exact", x.word.size(), k, dim,
                                  value)};
  }
  if (method != "interval") reject("method.name must be \"exact\" or \"interval\"");
  if (!unitary) reject("an interval certificate needs a model that claims a unitary gauge");
  if (verdict != "leaks" && verdict != "leakage-bounded")
    reject("an interval certificate claims leakage-bounded or leaks (never leak-free)");
  if (!jh["image"].is_null() || !jh["action"].is_null() || !jl["exact"].is_null())
    reject("an interval certificate carries no exact values or hints");
  if (prec < 16 || prec > (1u << 20)) reject("method.precision_bits out of range");
  arb_t upper, lower, claimed_ball, leak, t;
  arb_init(upper);
  arb_init(lower);
  arb_init(claimed_ball);
  arb_init(leak);
  arb_init(t);
  struct Clear {
    arb_ptr a[5];
    ~Clear() {
      for (auto p : a) arb_clear(p);
    }
  } clear{{upper, lower, claimed_ball, leak, t}};
  if (!parse_decimal(upper, str_of(jl["upper"], "claim.leakage.upper"), 256)) reject("claim.leakage.upper malformed");
  if (verdict == "leaks") {
    if (!parse_decimal(lower, str_of(jl["lower"], "claim.leakage.lower"), 256) || !arb_is_positive(lower))
      reject("claim.leakage.lower must be a positive decimal for a leaking verdict");
  } else if (!jl["lower"].is_null()) {
    reject("claim.leakage.lower must be null for leakage-bounded");
  }
  std::string ball_text = str_of(jl["ball"], "claim.leakage.ball");
  if (arb_set_str(claimed_ball, ball_text.c_str(), 256) != 0) reject("claim.leakage.ball malformed");
  {
    // the stated bounds and the verdict must be the ones derived from the stated enclosure
    std::string up, lo;
    bool pos = interval_bounds(ball_text, static_cast<long>(prec), &up, &lo);
    if ((verdict == "leaks") != pos)
      reject(fmt::format("claim.verdict {} does not follow from the enclosure {}", verdict, ball_text));
    if (up != str_of(jl["upper"], "claim.leakage.upper"))
      reject(fmt::format("claim.leakage.upper should be {} (derived from the enclosure)", up));
    if (pos && lo != str_of(jl["lower"], "claim.leakage.lower"))
      reject(fmt::format("claim.leakage.lower should be {} (derived from the enclosure)", lo));
  }
  // own matrices of the letters, then a plain left-to-right ball product of the kept columns
  std::map<std::pair<std::vector<int>, int>, Matrix> mats;
  std::vector<const Matrix*> seq;
  {
    std::vector<int> labels = x.anyons;
    for (int l : x.word.letters) {
      auto key = std::make_pair(labels, l);
      auto it = mats.find(key);
      if (it == mats.end()) it = mats.emplace(key, letter_matrix(act, labels, l)).first;
      seq.push_back(&it->second);
      std::swap(labels[static_cast<size_t>(std::abs(l)) - 1], labels[static_cast<size_t>(std::abs(l))]);
    }
    if (labels != x.anyons) reject("the word does not return the anyons to their order");
  }
  Matrix vh = x.keep.adjoint();
  Matrix gi = (vh * x.keep).inverse();
  // is the kept basis a set of distinct tree basis vectors?
  bool coordinate = true;
  std::vector<size_t> coord_rows;
  std::vector<bool> kept_row(dim, false);
  for (size_t j = 0; j < k && coordinate; ++j) {
    size_t ones = 0, row = 0;
    for (size_t i = 0; i < dim; ++i) {
      if (x.keep(i, j).is_zero()) continue;
      if (!x.keep(i, j).is_one()) coordinate = false;
      ++ones;
      row = i;
    }
    if (ones != 1 || kept_row[row]) coordinate = false;
    if (coordinate) kept_row[row] = true;
  }
  long cap = std::max<long>(static_cast<long>(prec) * 8, 256 + 4 * static_cast<long>(x.word.size()));
  cap = std::min<long>(cap, 1 << 18);
  std::string last_problem;
  // a plain product loses up to about a bit per letter: start there rather than at the producer's precision
  long start = std::max<long>(static_cast<long>(prec), 64 + static_cast<long>(x.word.size()));
  for (long p = std::min(start, cap); p <= cap; p *= 2) {
    acb_mat_t acc, tmp;
    acb_mat_init(acc, static_cast<slong>(dim), static_cast<slong>(k));
    x.keep.ball(acc, p);
    // letters as sparse ball matrices (entries (row, col, value)), applied column by column
    struct SparseBall {
      size_t rows = 0;
      std::vector<std::pair<size_t, size_t>> idx;
      acb_ptr vals = nullptr;
      slong n = 0;
      ~SparseBall() {
        if (vals) _acb_vec_clear(vals, n);
      }
    };
    std::map<const Matrix*, std::unique_ptr<SparseBall>> balls;
    acb_t prod;
    acb_init(prod);
    for (const Matrix* mm : seq) {
      auto it = balls.find(mm);
      if (it == balls.end()) {
        auto sb = std::make_unique<SparseBall>();
        sb->rows = mm->rows();
        for (size_t i = 0; i < mm->rows(); ++i)
          for (size_t j = 0; j < mm->cols(); ++j)
            if (!(*mm)(i, j).is_zero()) sb->idx.emplace_back(i, j);
        sb->n = static_cast<slong>(sb->idx.size());
        sb->vals = _acb_vec_init(sb->n);
        for (size_t e = 0; e < sb->idx.size(); ++e)
          (*mm)(sb->idx[e].first, sb->idx[e].second).ball(sb->vals + e, p);
        it = balls.emplace(mm, std::move(sb)).first;
      }
      const SparseBall& sb = *it->second;
      acb_mat_init(tmp, static_cast<slong>(sb.rows), static_cast<slong>(k));
      for (size_t e = 0; e < sb.idx.size(); ++e) {
        auto [i, j] = sb.idx[e];
        for (size_t c = 0; c < k; ++c) {
          acb_mul(prod, sb.vals + e, acb_mat_entry(acc, j, c), p);
          acb_add(acb_mat_entry(tmp, i, c), acb_mat_entry(tmp, i, c), prod, p);
        }
      }
      acb_mat_swap(tmp, acc);
      acb_mat_clear(tmp);
    }
    acb_clear(prod);
    if (!coord_rows.empty() || coordinate) {
      // the kept basis is a set of tree basis vectors: leakage = sum of |W_rj|^2 over rows r outside it
      arb_zero(leak);
      for (size_t i = 0; i < dim; ++i) {
        if (kept_row[i]) continue;
        for (size_t j = 0; j < k; ++j) {
          acb_srcptr e = acb_mat_entry(acc, i, j);
          arb_sqr(t, acb_realref(e), p);
          arb_add(leak, leak, t, p);
          arb_sqr(t, acb_imagref(e), p);
          arb_add(leak, leak, t, p);
        }
      }
      acb_mat_clear(acc);
    } else {
    // leakage = tr(Gi W*W) - tr(Gi W*V Gi V*W)
    acb_mat_t wb, wh, vhb, gib, a1, b1, b1h, m1, m2;
    acb_mat_init(wh, static_cast<slong>(k), static_cast<slong>(dim));
    acb_mat_init(vhb, static_cast<slong>(k), static_cast<slong>(dim));
    acb_mat_init(gib, static_cast<slong>(k), static_cast<slong>(k));
    for (auto* mm : {&a1, &b1, &b1h, &m1, &m2}) acb_mat_init(*mm, static_cast<slong>(k), static_cast<slong>(k));
    (void)wb;
    vh.ball(vhb, p);
    gi.ball(gib, p);
    acb_mat_conjugate_transpose(wh, acc);
    acb_mat_mul(a1, wh, acc, p);
    acb_mat_mul(b1, vhb, acc, p);
    acb_mat_conjugate_transpose(b1h, b1);
    acb_t tr1, tr2;
    acb_init(tr1);
    acb_init(tr2);
    acb_mat_mul(m1, gib, a1, p);
    acb_mat_trace(tr1, m1, p);
    acb_mat_mul(m1, gib, b1h, p);
    acb_mat_mul(m2, m1, gib, p);
    acb_mat_mul(m1, m2, b1, p);
    acb_mat_trace(tr2, m1, p);
    acb_sub(tr1, tr1, tr2, p);
    arb_set(leak, acb_realref(tr1));
    acb_clear(tr1);
    acb_clear(tr2);
    for (auto* mm : {&acc, &wh, &vhb, &gib, &a1, &b1, &b1h, &m1, &m2}) acb_mat_clear(*mm);
    }
    // confirm the claims
    arb_sub(t, upper, leak, p);
    bool up_ok = arb_is_nonnegative(t);
    bool low_ok = true;
    if (verdict == "leaks") {
      arb_sub(t, leak, lower, p);
      low_ok = arb_is_nonnegative(t);
    }
    bool ball_ok = arb_contains(claimed_ball, leak);
    if (up_ok && low_ok && ball_ok)
      return {true, "",
              fmt::format("{} ({}; {} letters, kept {} of {}), leakage <= {}{}, re-checked at {} bits", verdict,
                          "interval", x.word.size(), k, dim, str_of(jl["upper"], ""),
                          verdict == "leaks" ? ", leakage >= " + str_of(jl["lower"], "") : std::string(), p)};
    last_problem = !up_ok ? fmt::format("cannot confirm leakage <= {} (recomputed enclosure {})",
                                        str_of(jl["upper"], ""), ball_str(leak, 20))
                   : !low_ok ? fmt::format("cannot confirm leakage >= {} (recomputed enclosure {})",
                                           str_of(jl["lower"], ""), ball_str(leak, 20))
                             : fmt::format("claim.leakage.ball {} does not contain the recomputed enclosure {}",
                                           ball_text, ball_str(leak, 20));
    // a claim that is false at this precision already (disjoint) needs no more precision
    if (verdict == "leaks" && !low_ok) {
      arb_sub(t, leak, lower, p);
      if (arb_is_negative(t)) break;
    }
    arb_sub(t, upper, leak, p);
    if (arb_is_negative(t)) break;
  }
  reject(last_problem);
}

}  // namespace

VerifyOutcome verify_certificate(const std::string& cert_path, const std::string& model_override) {
  std::string text = read_file_bytes(cert_path);
  json c;
  try {
    c = json::parse(text);
  } catch (const std::exception& e) {
    return {false, fmt::format("not a JSON document: {}", e.what()), ""};
  }
  try {
    return check(c, cert_path, model_override);
  } catch (const Reject& r) {
    return {false, r.why, ""};
  } catch (const std::exception& e) {
    return {false, fmt::format("error while checking: {}", e.what()), ""};
  }
}

}  // namespace zb
