// The certificate's inputs (sections model, field, space, keep, word), each checked against the model file:
// the model found only where the certificate may name it, hashed and loaded from the same bounded read; the
// fusion space enumerated by the checker's own trees; the kept subspace re-derived by the checker's own route
// (docs/certificate-format.md section 4); the word parsed from its canonical text.
#include <fmt/format.h>

#include <cctype>
#include <filesystem>

#include "checker.hpp"
#include "zetabraid/error.hpp"
#include "zetabraid/io/input_file.hpp"
#include "zetabraid/model/load.hpp"

namespace zb::checker {

namespace {

namespace fs = std::filesystem;

// Where the model is: --model, else model.file relative to the certificate's folder, else to the current
// directory. Absolute names and ".." are refused (Unreadable: exit 2) so that a certificate cannot make the
// checker read files elsewhere.
std::string model_location(const std::string& file, const std::string& cert_path, const VerifyOptions& opt) {
  if (!opt.model_override.empty()) return opt.model_override;
  if (file.empty()) reject("model.file is empty");
  for (unsigned char ch : file)
    if (ch < 0x20 || ch == 0x7f) reject(fmt::format("model.file \"{}\" contains control characters", printable(file)));
  const fs::path p(file);
  bool escapes = p.is_absolute() || p.has_root_name() || p.has_root_directory();
  for (const auto& part : p) escapes = escapes || part == "..";
  if (escapes)
    throw Unreadable{fmt::format("model.file \"{}\" is absolute or leaves the certificate's folder; a certificate "
                                 "names its model relative to its own folder (pass --model FILE to choose the "
                                 "model explicitly)",
                                 printable(file))};
  std::error_code ec;
  const fs::path beside = fs::path(cert_path).parent_path() / p;
  if (fs::exists(beside, ec)) return beside.string();
  if (fs::exists(p, ec)) return p.string();
  throw Unreadable{fmt::format("model file \"{}\" not found beside the certificate nor in the current directory "
                               "(pass --model FILE)",
                               printable(file))};
}

void read_model(Inputs* x, const json& jm, const std::string& cert_path, const VerifyOptions& opt) {
  expect_keys(jm, {"file", "sha256", "name", "unitary"}, "model");
  const std::string path = model_location(str_of(jm["file"], "model.file"), cert_path, opt);
  const std::string want = str_of(jm["sha256"], "model.sha256");
  if (want.size() != 64 || want.find_first_not_of("0123456789abcdef") != std::string::npos)
    reject("model.sha256 must be 64 lower-case hex digits");
  std::string bytes;
  try {
    bytes = read_input_file(path, kMaxModelFileBytes, "model file");
  } catch (const InputError& e) {
    throw Unreadable{e.what()};
  }
  const std::string sha = sha256_hex(bytes);
  if (sha != want) reject(fmt::format("SHA-256 of {} is {}, the certificate says {}", path, sha, want));
  try {
    x->model = parse_model(bytes, path);
  } catch (const std::exception& e) {
    reject(fmt::format("model file {} does not load: {}", path, e.what()));
  }
  if (str_of(jm["name"], "model.name") != x->model.name) reject("model.name differs from the model file");
  if (bool_of(jm["unitary"], "model.unitary") != x->model.claims_unitary)
    reject("model.unitary differs from the model file");
}

// Radicands of the model, then those adjoined for explicit kept basis vectors (each new and independent).
void read_field(Inputs* x, const json& jf, const std::string& keep_kind) {
  expect_keys(jf, {"conductor", "radicands"}, "field");
  const FieldPtr& f = x->model.field;
  if (uint_of(jf["conductor"], "field.conductor") != f->conductor()) reject("field.conductor differs from the model");
  const int model_radicands = f->radicand_count();
  if (!jf["radicands"].is_array() || jf["radicands"].size() < static_cast<size_t>(model_radicands) ||
      jf["radicands"].size() > 62)
    reject("field.radicands differ from the model");
  for (int j = 0; j < model_radicands; ++j)
    if (str_of(jf["radicands"][static_cast<size_t>(j)], "field.radicands") != f->radicand(j).str())
      reject("field.radicands differ from the model");
  if (keep_kind != "vectors" && jf["radicands"].size() != static_cast<size_t>(model_radicands))
    reject("field.radicands: extra radicands are allowed only with explicit kept basis vectors");
  for (size_t j = static_cast<size_t>(model_radicands); j < jf["radicands"].size(); ++j) {
    std::string text = str_of(jf["radicands"][j], "field.radicands");
    Scalar d = scalar_of(jf["radicands"][j], f, "field.radicands");
    if (!d.in_base()) reject("field.radicands: a radicand must lie in Q(zeta_N)");
    const int before = f->radicand_count();
    try {
      (void)f->sqrt(d.to_base());
    } catch (const std::exception& e) {
      reject(fmt::format("field.radicands: sqrt({}) cannot be adjoined: {}", text, e.what()));
    }
    if (f->radicand_count() != before + 1 || f->radicand(before).str() != text)
      reject(fmt::format("field.radicands: {} is not a new independent radicand", text));
  }
  f->set_frozen(true);  // no value read later may adjoin a square root the certificate did not declare
}

void read_space(Inputs* x, const json& js) {
  expect_keys(js, {"anyons", "total", "dimension", "basis"}, "space");
  const Model& m = x->model;
  if (!js["anyons"].is_array() || js["anyons"].empty() || js["anyons"].size() > 4096)
    reject("space.anyons must be a nonempty array (at most 4096 anyons)");
  for (const auto& a : js["anyons"]) {
    int i = m.label_index(str_of(a, "space.anyons"));
    if (i < 0) reject(fmt::format("space.anyons: unknown label {}", a.dump()));
    x->anyons.push_back(i);
  }
  x->total = m.label_index(str_of(js["total"], "space.total"));
  if (x->total < 0) reject("space.total: unknown label");
  x->action = std::make_unique<Action>(m, x->total);
  const Trees& sp = x->action->trees(x->anyons);
  x->dim = sp.dimension();
  if (x->dim == 0) reject("the fusion space is zero-dimensional");
  if (uint_of(js["dimension"], "space.dimension") != x->dim)
    reject(fmt::format("space.dimension is {}, the fusion space has dimension {}", js["dimension"].dump(), x->dim));
  if (!js["basis"].is_array() || js["basis"].size() != x->dim) reject("space.basis has the wrong length");
  for (size_t i = 0; i < x->dim; ++i)
    if (str_of(js["basis"][i], "space.basis") != sp.label(m, i)) reject(fmt::format("space.basis[{}] differs", i));
}

struct Group {
  int first, last, charge;
};

// "1-3:t,4-6:t" in canonical form only (groups as written, "i" for a one-anyon group, no blanks).
std::vector<Group> parse_charge_spec(const Model& m, const std::string& spec, int n) {
  std::vector<Group> out;
  std::string canonical;
  size_t p = 0;
  auto number = [&]() {
    size_t s = p;
    long v = 0;
    while (p < spec.size() && std::isdigit(static_cast<unsigned char>(spec[p])) && p - s < 6) v = v * 10 + (spec[p++] - '0');
    if (p == s) reject("keep.spec: expected an anyon position");
    return static_cast<int>(v);
  };
  while (p < spec.size() || out.empty()) {
    Group g{number(), 0, 0};
    g.last = g.first;
    if (p < spec.size() && spec[p] == '-') {
      ++p;
      g.last = number();
    }
    if (p >= spec.size() || spec[p] != ':') reject("keep.spec: expected ':' before the charge label");
    const size_t ls = ++p;
    while (p < spec.size() && spec[p] != ',') ++p;
    g.charge = m.label_index(spec.substr(ls, p - ls));
    if (g.charge < 0) reject("keep.spec: unknown charge label");
    if (g.first < 1 || g.last > n || g.first > g.last) reject("keep.spec: a group is not a range of anyon positions");
    for (const Group& h : out)
      if (!(g.last < h.first || h.last < g.first)) reject("keep.spec: groups overlap");
    canonical += g.first == g.last ? fmt::format("{}{}:{}", out.empty() ? "" : ",", g.first, m.labels[static_cast<size_t>(g.charge)])
                                   : fmt::format("{}{}-{}:{}", out.empty() ? "" : ",", g.first, g.last,
                                                 m.labels[static_cast<size_t>(g.charge)]);
    out.push_back(g);
    if (p < spec.size() && ++p >= spec.size()) reject("keep.spec: a group must follow ','");  // spec[p] was ','
  }
  if (canonical != spec) reject("keep.spec is not in canonical form");
  return out;
}

// The kept basis spans exactly the subspace of the charge groups, checked by a route of the checker's own: each
// group's anyons are braided to the front of the register (the anyon before the block crosses it, repeatedly),
// where the block's total charge is the intermediate label x_m; every kept vector, braided the same way, must
// vanish outside x_m = charge. The subspace's dimension is counted from the fusion rules alone:
//   dim = dim V(reduced anyons; total) * prod over groups of dim V(block; charge)   (common practice)
// with each block replaced by its charge in the reduced list.
void check_charge_basis(Inputs* x, const std::vector<Group>& groups) {
  const Model& m = x->model;
  for (const Group& g : groups) {
    const int len = g.last - g.first + 1;
    std::vector<int> beta;
    for (int r0 = g.first - 1; r0 >= 1; --r0)
      for (int s0 = r0; s0 < r0 + len; ++s0) beta.push_back(s0);
    Letters bl = x->action->tabulate(x->anyons, beta);
    Matrix moved = apply_letters(bl.sequence, x->keep);
    const Trees& t = x->action->trees(bl.end_labels);
    for (size_t r = 0; r < t.dimension(); ++r)
      if (t.tree(r)[static_cast<size_t>(len) - 1] != g.charge)
        for (size_t j = 0; j < moved.cols(); ++j)
          if (!moved(r, j).is_zero())
            reject(fmt::format("keep.basis vector {} is not in the subspace of keep.spec (group {}-{})", j, g.first,
                               g.last));
  }
  std::vector<int> reduced;
  size_t blocks = 1;
  for (int pos = 1; pos <= static_cast<int>(x->anyons.size());) {
    const Group* in = nullptr;
    for (const Group& g : groups)
      if (g.first == pos) in = &g;
    if (!in) {
      reduced.push_back(x->anyons[static_cast<size_t>(pos) - 1]);
      ++pos;
      continue;
    }
    std::vector<int> block(x->anyons.begin() + in->first - 1, x->anyons.begin() + in->last);
    blocks *= count_trees(m, block, in->charge);
    reduced.push_back(in->charge);
    pos = in->last + 1;
  }
  const size_t want = count_trees(m, reduced, x->total) * blocks;
  if (want != x->keep.cols())
    reject(fmt::format("keep.dimension is {}, the subspace of keep.spec has dimension {}", x->keep.cols(), want));
}

void read_keep(Inputs* x, const json& jk, int model_radicands) {
  const FieldPtr& f = x->model.field;
  std::string kind = str_of(jk["kind"], "keep.kind");
  size_t k = uint_of(jk["dimension"], "keep.dimension");
  if (k == 0 || k > x->dim) reject("keep.dimension out of range");
  x->keep = matrix_of_rows(jk["basis"], k, x->dim, f, "keep.basis").transpose();
  if (x->keep.rank() != k) reject("keep.basis vectors are linearly dependent");
  if (kind == "charges") {
    check_charge_basis(x, parse_charge_spec(x->model, str_of(jk["spec"], "keep.spec"),
                                            static_cast<int>(x->anyons.size())));
  } else if (kind == "vectors" || kind == "all") {
    RadicalMask used = 0;
    for (size_t i = 0; i < x->dim; ++i)
      for (size_t j = 0; j < k; ++j)
        for (const auto& [mask, c] : x->keep(i, j).terms()) used |= mask;
    for (int r = model_radicands; r < f->radicand_count(); ++r)
      if (!(used & (RadicalMask(1) << r))) reject("field.radicands: a radicand that no kept basis vector uses");
    expect_null(jk["spec"], "keep.spec (for this kind)");
    if (kind == "all" && !x->keep.is_identity()) reject("keep.basis of kind \"all\" must be the identity");
  } else {
    reject("keep.kind must be \"charges\", \"vectors\" or \"all\"");
  }
  // a set of distinct tree basis vectors?
  x->kept_rows.assign(x->dim, false);
  for (size_t j = 0; j < k; ++j) {
    size_t ones = 0, row = 0;
    for (size_t i = 0; i < x->dim; ++i) {
      if (x->keep(i, j).is_zero()) continue;
      if (!x->keep(i, j).is_one()) ones = 2;
      ++ones;
      row = i;
    }
    if (ones != 1 || x->kept_rows[row]) {
      x->kept_rows.clear();
      break;
    }
    x->kept_rows[row] = true;
  }
}

// "1 -2 3": signed generator indices separated by single blanks (the canonical text; "" is the empty word).
void read_word(Inputs* x, const json& jw) {
  expect_keys(jw, {"letters", "length"}, "word");
  const std::string s = str_of(jw["letters"], "word.letters");
  const long n = static_cast<long>(x->anyons.size());
  size_t p = 0;
  while (p < s.size()) {
    if (!x->word.empty()) {
      if (s[p] != ' ') reject("word.letters is not in canonical form");
      ++p;
    }
    bool neg = p < s.size() && s[p] == '-';
    if (neg) ++p;
    size_t st = p;
    long v = 0;
    while (p < s.size() && std::isdigit(static_cast<unsigned char>(s[p])) && p - st < 7) v = v * 10 + (s[p++] - '0');
    if (p == st || s[st] == '0' || (p < s.size() && s[p] != ' '))
      reject("word.letters is not in canonical form (signed generator indices separated by single blanks)");
    if (v >= n) reject(fmt::format("word.letters: generator {} outside 1..{}", v, n - 1));
    x->word.push_back(static_cast<int>(neg ? -v : v));
  }
  if (uint_of(jw["length"], "word.length") != x->word.size()) reject("word.length differs from the letters");
}

}  // namespace

void read_inputs(Inputs* x, const json& c, const std::string& cert_path, const VerifyOptions& opt) {
  read_model(x, c["model"], cert_path, opt);
  const json& jk = c["keep"];
  expect_keys(jk, {"kind", "spec", "dimension", "basis"}, "keep");
  const int model_radicands = x->model.field->radicand_count();
  read_field(x, c["field"], str_of(jk["kind"], "keep.kind"));
  read_space(x, c["space"]);
  read_keep(x, jk, model_radicands);
  read_word(x, c["word"]);
  x->letters = x->action->tabulate(x->anyons, x->word);
  if (x->letters.end_labels != x->anyons) reject("the word does not return the anyons to their order");
}

}  // namespace zb::checker
