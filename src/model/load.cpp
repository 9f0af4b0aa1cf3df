// Loading model files (format: docs/model-format.md).
#include "zetabraid/model/load.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <sstream>
#include <toml++/toml.h>

#include "zetabraid/error.hpp"
#include "zetabraid/field/expression.hpp"
#include "zetabraid/io/input_file.hpp"
#include "zetabraid/io/sha256.hpp"
#include "conventions.hpp"

namespace zb {

namespace {

constexpr int kMaxLabels = 1000;

// The text of line `line` (1-based) of text.
std::string line_of(const std::string& text, size_t line) {
  size_t start = 0;
  for (size_t l = 1; l < line && start != std::string::npos; ++l) {
    start = text.find('\n', start);
    if (start != std::string::npos) ++start;
  }
  if (start == std::string::npos || start > text.size()) return {};
  size_t end = text.find('\n', start);
  return text.substr(start, end == std::string::npos ? std::string::npos : end - start);
}

std::string trim(const std::string& s) {
  size_t a = s.find_first_not_of(" \t\r"), b = s.find_last_not_of(" \t\r");
  return a == std::string::npos ? std::string() : s.substr(a, b - a + 1);
}

// "key: what" for a TOML redefinition at `line`, read from the text itself (toml++ 3.3 quotes a wrong key for
// quoted keys): the key before '=' outside quotes, prefixed by the last [table] header above it.
std::string duplicate_key_message(const std::string& text, size_t line) {
  std::string l = line_of(text, line);
  std::string t = trim(l);
  if (!t.empty() && t[0] == '[')
    return fmt::format("{}: this table is given twice (TOML allows each table once)", printable(t));
  char quote = 0;
  size_t eq = std::string::npos;
  for (size_t i = 0; i < l.size() && eq == std::string::npos; ++i) {
    if (quote) {
      if (l[i] == '\\' && quote == '"') ++i;
      else if (l[i] == quote) quote = 0;
    } else if (l[i] == '"' || l[i] == '\'') {
      quote = l[i];
    } else if (l[i] == '=') {
      eq = i;
    }
  }
  std::string key = trim(l.substr(0, eq));
  std::string table;
  for (size_t k = line; k-- > 1;) {
    std::string h = trim(line_of(text, k));
    if (h.size() > 2 && h[0] == '[' && h.find(']') != std::string::npos) {
      table = trim(h.substr(h[1] == '[' ? 2 : 1, h.find(']') - (h[1] == '[' ? 2 : 1)));
      break;
    }
  }
  return fmt::format("{}{}: this key is given twice (TOML allows each key once per table)",
                     table.empty() ? "" : printable(table) + ".", printable(key));
}

class Loader {
 public:
  Loader(const std::string& origin, const ExpressionLimits& limits) : origin_(printable(origin)), limits_(limits) {}

  [[noreturn]] void fail(const toml::node* at, const std::string& key, const std::string& what) const {
    std::string where = origin_;
    if (at && at->source().begin.line) where += fmt::format(":{}", at->source().begin.line);
    throw InputError(fmt::format("{}: {}: {}", where, key, what));
  }
  [[noreturn]] void fail_line(int line, const std::string& key, const std::string& what) const {
    throw InputError(fmt::format("{}:{}: {}: {}", origin_, line, key, what));
  }

  Model run(const std::string& text) {
    toml::table root;
    try {
      root = toml::parse(text, origin_);
    } catch (const toml::parse_error& e) {
      const auto line = e.source().begin.line;
      if (e.description().find("cannot redefine existing") != std::string_view::npos)
        throw InputError(fmt::format("{}:{}: {}", origin_, line, duplicate_key_message(text, line)));
      throw InputError(fmt::format("{}:{}:{}: not valid TOML: {}", origin_, line, e.source().begin.column,
                                   printable(std::string(e.description()))));
    }
    static const std::set<std::string> known = {"format", "name", "source", "labels", "unitary", "field",
                                                "constants", "fusion", "F", "R", "f_unlisted", "r_unlisted",
                                                "conventions"};
    for (auto&& [k, v] : root)
      if (!known.count(std::string(k.str())))
        fail(&v, std::string(k.str()),
             "unknown key; expected one of format, name, source, labels, unitary, [field], [constants], "
             "f_unlisted, r_unlisted, [conventions], [fusion], [F], [R]");
    Model m;
    if (auto* f = root.get("format")) {
      auto s = f->value<std::string>();
      if (!s || *s != "zetabraid-model 1") fail(f, "format", "expected the string \"zetabraid-model 1\"");
    }
    m.name = get_string(root, "name", false);
    m.source = get_string(root, "source", false);
    if (auto* u = root.get("unitary")) {
      auto b = u->value<bool>();
      if (!b || !u->is_boolean()) fail(u, "unitary", "expected true or false");
      m.claims_unitary = *b;
    }
    read_conventions(root);
    read_field(root, m);
    read_labels(root, m);
    read_constants(root, m);
    read_fusion(root, m);
    read_f(root, m);
    fill_unlisted(root, m);
    read_r(root, m);
    if (const toml::node* u = root.get("r_unlisted")) {
      Scalar v = value(*u, "r_unlisted", m.field);
      m.has_r = true;
      // Only the R-symbols with the unit among a, b (R^{1b}_b, R^{a1}_a): a missing R-symbol of two nontrivial
      // labels stays missing, so that model check reports it instead of silently using this value.
      for (int a = 0; a < m.label_count(); ++a)
        for (int b = 0; b < m.label_count(); ++b)
          for (int c : m.channels(a, b))
            if ((a == 0 || b == 0) && !m.r_given.count({a, b, c}))
              put_r(m, {a, b, c}, v, static_cast<int>(u->source().begin.line), u, "r_unlisted");
    }
    // The printed conventions are converted before anything else sees the model.
    apply_conventions(m, conv_, origin_);
    return m;
  }

 private:
  std::string origin_;
  ExpressionLimits limits_;
  std::map<std::string, Scalar> names_;
  FileConventions conv_;

  // [conventions]: f_matrix, r_exchange, f_indices (docs/model-format.md, "Conventions of a printed table").
  void read_conventions(const toml::table& root) {
    const toml::node* cn = root.get("conventions");
    if (!cn) return;
    if (!cn->is_table()) fail(cn, "conventions", "expected a table [conventions]");
    conv_.line = static_cast<int>(cn->source().begin.line);
    for (auto&& [k, v] : *cn->as_table()) {
      const std::string key = "conventions." + std::string(k.str());
      auto s = v.value<std::string>();
      if (k.str() == "f_matrix") {
        using FM = FileConventions::FMatrix;
        bool found = false;
        for (FM c : {FM::kAsIs, FM::kTranspose, FM::kInverse, FM::kInverseTranspose})
          if (v.is_string() && *s == f_matrix_name(c)) conv_.f_matrix = c, found = true;
        if (!found)
          fail(&v, key, "expected \"as-zetabraid\", \"transpose\", \"inverse\" or \"inverse-transpose\"");
      } else if (k.str() == "r_exchange") {
        if (!v.is_string() || (*s != "counterclockwise" && *s != "clockwise"))
          fail(&v, key, "expected \"counterclockwise\" or \"clockwise\"");
        conv_.r_clockwise = *s == "clockwise";
      } else if (k.str() == "f_indices") {
        if (!v.is_string()) fail(&v, key, "expected a string such as \"abcd-ef\"");
        read_f_indices(*s, &v, key);
      } else {
        fail(&v, key, "unknown key; expected f_matrix, r_exchange or f_indices");
      }
    }
  }

  // f_indices: the letters a b c d e f, each once, in the order of the six labels of an F key (separators ' ',
  // '-', ';', ',' ignored); e is the channel of a x b and f the channel of b x c.
  void read_f_indices(const std::string& s, const toml::node* at, const std::string& key) {
    const std::string what = "expected the letters a, b, c, d, e, f each once (e: the channel of a x b, f: the "
                             "channel of b x c), e.g. \"abcd-ef\", \"abcd-fe\" or \"abe-cdf\"";
    std::array<int, 6> pos{-1, -1, -1, -1, -1, -1};
    int n = 0;
    for (char ch : s) {
      if (ch == ' ' || ch == '-' || ch == ';' || ch == ',') continue;
      if (ch < 'a' || ch > 'f' || pos[static_cast<size_t>(ch - 'a')] >= 0) fail(at, key, what);
      pos[static_cast<size_t>(ch - 'a')] = n++;
    }
    if (n != 6) fail(at, key, what);
    conv_.f_key_pos = pos;
  }

  // The labels {a, b, c, d, e, f} of an F key, or {a, b, c, d} of a block key,
  // from the labels in the order the file writes them (f_indices).
  std::vector<int> f_key_labels(const std::vector<int>& l) const {
    const auto& pos = conv_.f_key_pos;
    if (l.size() == 6) {
      std::vector<int> out(6);
      for (size_t i = 0; i < 6; ++i) out[i] = l[static_cast<size_t>(pos[i])];
      return out;
    }
    std::vector<int> order{0, 1, 2, 3};  // letters a..d sorted by their place in the six-label key
    std::sort(order.begin(), order.end(),
              [&](int x, int y) { return pos[static_cast<size_t>(x)] < pos[static_cast<size_t>(y)]; });
    std::vector<int> out(4);
    for (size_t i = 0; i < 4; ++i) out[static_cast<size_t>(order[i])] = l[i];
    return out;
  }

  std::string get_string(const toml::table& t, const char* key, bool required) {
    const toml::node* n = t.get(key);
    if (!n) {
      if (required) throw InputError(fmt::format("{}: {}: missing (expected a string)", origin_, key));
      return {};
    }
    auto s = n->value<std::string>();
    if (!n->is_string()) fail(n, key, "expected a string");
    return *s;
  }

  Scalar value(const toml::node& n, const std::string& key, const FieldPtr& f) {
    if (n.is_integer()) return Scalar(f, static_cast<long>(*n.value<int64_t>()));
    if (!n.is_string()) fail(&n, key, "expected an exact value as a string, e.g. \"1/2 + sqrt(5)/2\"");
    try {
      return parse_expression(*n.value<std::string>(), f, names_, limits_);
    } catch (const InputError& e) {
      fail(&n, key, fmt::format("{} (in \"{}\")", e.what(), printable(abbreviate(*n.value<std::string>()))));
    } catch (const ResourceError& e) {
      throw ResourceError(fmt::format("{}:{}: {}: {}", origin_, n.source().begin.line, key, e.what()));
    }
  }

  void read_field(const toml::table& root, Model& m) {
    const toml::node* fn = root.get("field");
    if (!fn || !fn->is_table())
      throw InputError(fmt::format("{}: field: missing table [field] (expected conductor = N)", origin_));
    const toml::table& ft = *fn->as_table();
    for (auto&& [k, v] : ft)
      if (k.str() != "conductor" && k.str() != "radicands")
        fail(&v, "field." + std::string(k.str()),
             "unknown key; expected conductor or radicands (in TOML, keys after a [table] header belong to that "
             "table: put top-level keys such as labels before the first [table])");
    const toml::node* c = ft.get("conductor");
    if (!c) fail(fn, "field.conductor", "missing (expected a positive integer N for Q(zeta_N))");
    if (!c->is_integer() || *c->value<int64_t>() < 1)
      fail(c, "field.conductor", "expected a positive integer N for Q(zeta_N)");
    try {
      m.field = Field::make(static_cast<unsigned long>(*c->value<int64_t>()));
    } catch (const InputError& e) {
      fail(c, "field.conductor", e.what());
    } catch (const ResourceError& e) {
      throw ResourceError(fmt::format("{}:{}: field.conductor: {}", origin_, c->source().begin.line, e.what()));
    }
    if (const toml::node* r = ft.get("radicands")) {
      if (!r->is_array()) fail(r, "field.radicands", "expected an array of exact values, e.g. [\"5\"]");
      size_t idx = 0;
      for (const toml::node& e : *r->as_array()) {
        std::string key = fmt::format("field.radicands[{}]", idx++);
        Scalar x = value(e, key, m.field);
        if (!x.in_base()) fail(&e, key, "a radicand must lie in Q(zeta_N) (no square roots inside)");
        if (x.is_zero()) fail(&e, key, "a radicand must be nonzero");
        try {
          m.field->sqrt(x.to_base());
        } catch (const InputError& err) {
          fail(&e, key, err.what());
        }
      }
    }
  }

  void read_labels(const toml::table& root, Model& m) {
    const toml::node* ln = root.get("labels");
    if (!ln) throw InputError(fmt::format("{}: labels: missing (expected an array of label names)", origin_));
    if (!ln->is_array() || ln->as_array()->empty())
      fail(ln, "labels", "expected a nonempty array of label names, the unit first");
    if (ln->as_array()->size() > static_cast<size_t>(kMaxLabels))
      fail(ln, "labels", fmt::format("at most {} labels are supported", kMaxLabels));
    for (const toml::node& e : *ln->as_array()) {
      if (!e.is_string()) fail(&e, "labels", "expected label names as strings");
      std::string s = *e.value<std::string>();
      if (s.empty() || s.find_first_of(" \t\r\n") != std::string::npos)
        fail(&e, "labels", fmt::format("label \"{}\": names must be nonempty and contain no spaces", s));
      if (m.label_index(s) >= 0) fail(&e, "labels", fmt::format("label \"{}\" appears twice", s));
      m.labels.push_back(s);
    }
    m.init_fusion();
  }

  void read_constants(const toml::table& root, Model& m) {
    const toml::node* cn = root.get("constants");
    if (!cn) return;
    if (!cn->is_table()) fail(cn, "constants", "expected a table of name = \"exact value\"");
    // Evaluated in file order, so a constant may use the ones above it.
    std::vector<std::pair<std::string, const toml::node*>> items;
    for (auto&& [k, v] : *cn->as_table()) items.emplace_back(std::string(k.str()), &v);
    std::stable_sort(items.begin(), items.end(), [](const auto& x, const auto& y) {
      return x.second->source().begin.line < y.second->source().begin.line;
    });
    static const std::set<std::string> builtin = {"zeta", "i", "sqrt", "conj", "exp", "pi"};
    for (auto& [k, v] : items) {
      std::string key = "constants." + k;
      bool ok = !k.empty() && (std::isalpha(static_cast<unsigned char>(k[0])) || k[0] == '_');
      for (char ch : k) ok = ok && (std::isalnum(static_cast<unsigned char>(ch)) || ch == '_');
      if (!ok) fail(v, key, "a constant's name must be letters, digits and '_', starting with a letter");
      if (builtin.count(k)) fail(v, key, "this name is built in (zeta, i, sqrt, conj, exp, pi)");
      names_.insert_or_assign(k, value(*v, key, m.field));
    }
  }

  // Splits "a b c" into label indices, checking the count.
  std::vector<int> labels_of(const Model& m, const std::string& key, const toml::node* at, const std::string& ctx,
                             std::initializer_list<size_t> counts) {
    std::istringstream in(key);
    std::vector<int> out;
    std::string w;
    while (in >> w) {
      int i = m.label_index(w);
      if (i < 0) fail(at, ctx, fmt::format("unknown label \"{}\"", w));
      out.push_back(i);
    }
    if (std::find(counts.begin(), counts.end(), out.size()) == counts.end()) {
      std::string c;
      for (size_t n : counts) c += (c.empty() ? "" : " or ") + std::to_string(n);
      fail(at, ctx, fmt::format("expected {} labels separated by spaces", c));
    }
    return out;
  }

  void read_fusion(const toml::table& root, Model& m) {
    const toml::node* fn = root.get("fusion");
    if (!fn || !fn->is_table())
      throw InputError(fmt::format("{}: fusion: missing table [fusion] (expected \"a b\" = [channels])", origin_));
    int n = m.label_count();
    std::vector<char> given(static_cast<size_t>(n) * n, 0);
    for (auto&& [k, v] : *fn->as_table()) {
      std::string key = "fusion.\"" + std::string(k.str()) + "\"";
      auto ab = labels_of(m, std::string(k.str()), &v, key, {2});
      if (!v.is_array()) fail(&v, key, "expected an array of channel labels, e.g. [\"1\", \"t\"]");
      std::vector<int> mult(static_cast<size_t>(n), 0);
      for (const toml::node& e : *v.as_array()) {
        if (!e.is_string()) fail(&e, key, "expected channel labels as strings");
        int c = m.label_index(*e.value<std::string>());
        if (c < 0) fail(&e, key, fmt::format("unknown label \"{}\"", *e.value<std::string>()));
        if (++mult[static_cast<size_t>(c)] > 1)
          fail(&e, key, "fusion multiplicities above 1 are not supported yet (each channel once)");
      }
      for (int c = 0; c < n; ++c) m.set_fusion(ab[0], ab[1], c, mult[static_cast<size_t>(c)]);
      given[static_cast<size_t>(ab[0]) * n + ab[1]] = 2;
    }
    // Defaults: the unit (first label) fuses trivially; "b a" copies "a b" when only one of them is given.
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b) {
        if (given[static_cast<size_t>(a) * n + b]) continue;
        if (given[static_cast<size_t>(b) * n + a] == 2) {
          for (int c = 0; c < n; ++c) m.set_fusion(a, b, c, m.fusion(b, a, c));
        } else if (a == 0 || b == 0) {
          m.set_fusion(a, b, a == 0 ? b : a, 1);
        }
        given[static_cast<size_t>(a) * n + b] = 1;
      }
  }

  void put_f(Model& m, const std::array<int, 6>& k, Scalar v, int line, const toml::node* at,
             const std::string& key) {
    if (m.f_given.count(k)) fail(at, key, "this F entry is given twice");
    m.f_given.insert(k);
    m.f_line[k] = line;
    if (!v.is_zero()) m.set_f_symbol(k[0], k[1], k[2], k[3], k[4], k[5], std::move(v));
  }

  void read_f(const toml::table& root, Model& m) {
    const toml::node* fn = root.get("F");
    if (!fn) return;
    if (!fn->is_table()) fail(fn, "F", "expected a table [F]");
    for (auto&& [k, v] : *fn->as_table()) {
      std::string key = "F.\"" + std::string(k.str()) + "\"";
      auto l = f_key_labels(labels_of(m, std::string(k.str()), &v, key, {4, 6}));
      int line = static_cast<int>(v.source().begin.line);
      const bool rr = conv_.rows_are_right();  // printed rows are the channels f of b x c
      if (l.size() == 6) {
        // One entry: e (channel of a x b) and f (channel of b x c) are named by f_indices whatever the layout.
        put_f(m, {l[0], l[1], l[2], l[3], l[4], l[5]}, value(v, key, m.field), line, &v, key);
        continue;
      }
      auto rows = m.left_channels(l[0], l[1], l[2], l[3]);
      auto cols = m.right_channels(l[0], l[1], l[2], l[3]);
      if (rr) std::swap(rows, cols);
      if (rows.empty() || cols.empty())
        fail(&v, key, "F^{abc}_d is not admissible under the fusion rules (no fusion tree a b c -> d)");
      if (rows.size() != cols.size())
        fail(&v, key, fmt::format("the fusion rules give {} left-associated and {} right-associated trees, so "
                                  "F cannot be square: check the fusion rules",
                                  rows.size(), cols.size()));
      std::string shape = fmt::format("a {}x{} matrix (rows {} = {}, columns {} = {})", rows.size(), cols.size(),
                                      rr ? "f" : "e", channel_names(m, rows), rr ? "e" : "f", channel_names(m, cols));
      if (!v.is_array()) {
        if (rows.size() == 1) {
          put_f(m, {l[0], l[1], l[2], l[3], rr ? cols[0] : rows[0], rr ? rows[0] : cols[0]},
                value(v, key, m.field), line, &v, key);
          continue;
        }
        fail(&v, key, "expected " + shape);
      }
      const toml::array& arr = *v.as_array();
      if (arr.size() != rows.size()) fail(&v, key, "expected " + shape);
      for (size_t i = 0; i < rows.size(); ++i) {
        const toml::node& row = *arr.get(i);
        if (!row.is_array() || row.as_array()->size() != cols.size()) fail(&row, key, "expected " + shape);
        for (size_t j = 0; j < cols.size(); ++j) {
          const toml::node& e = *row.as_array()->get(j);
          put_f(m, {l[0], l[1], l[2], l[3], rr ? cols[j] : rows[i], rr ? rows[i] : cols[j]},
                value(e, key, m.field), static_cast<int>(e.source().begin.line), &e, key);
        }
      }
    }
  }

  // f_unlisted = "v": every entry of a one-dimensional F-block that the file does not list is v.
  void fill_unlisted(const toml::table& root, Model& m) {
    const toml::node* u = root.get("f_unlisted");
    if (!u) return;
    Scalar v = value(*u, "f_unlisted", m.field);
    int n = m.label_count(), line = static_cast<int>(u->source().begin.line);
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b)
        for (int c = 0; c < n; ++c)
          for (int d = 0; d < n; ++d) {
            auto rows = m.left_channels(a, b, c, d);
            auto cols = m.right_channels(a, b, c, d);
            if (rows.size() != 1 || cols.size() != 1) continue;
            std::array<int, 6> k{a, b, c, d, rows[0], cols[0]};
            if (m.f_given.count(k)) continue;
            m.f_given.insert(k);
            m.f_line[k] = line;
            if (!v.is_zero()) m.set_f_symbol(a, b, c, d, rows[0], cols[0], v);
          }
  }

  static std::string channel_names(const Model& m, const std::vector<int>& c) {
    std::string s;
    for (int x : c) s += (s.empty() ? "" : ", ") + m.labels[static_cast<size_t>(x)];
    return s;
  }

  void put_r(Model& m, const std::array<int, 3>& k, Scalar v, int line, const toml::node* at,
             const std::string& key) {
    if (m.r_given.count(k)) fail(at, key, "this R-symbol is given twice");
    m.r_given.insert(k);
    m.r_line[k] = line;
    if (!v.is_zero()) m.set_r_symbol(k[0], k[1], k[2], std::move(v));
  }

  void read_r(const toml::table& root, Model& m) {
    const toml::node* rn = root.get("R");
    if (!rn) return;
    if (!rn->is_table()) fail(rn, "R", "expected a table [R]");
    m.has_r = true;
    for (auto&& [k, v] : *rn->as_table()) {
      std::string key = "R.\"" + std::string(k.str()) + "\"";
      auto l = labels_of(m, std::string(k.str()), &v, key, {2, 3});
      int line = static_cast<int>(v.source().begin.line);
      if (l.size() == 3) {
        put_r(m, {l[0], l[1], l[2]}, value(v, key, m.field), line, &v, key);
        continue;
      }
      auto ch = m.channels(l[0], l[1]);
      std::string shape = fmt::format("{} value(s), one per channel ({})", ch.size(), channel_names(m, ch));
      if (!v.is_array()) {
        if (ch.size() == 1) {
          put_r(m, {l[0], l[1], ch[0]}, value(v, key, m.field), line, &v, key);
          continue;
        }
        fail(&v, key, "expected " + shape);
      }
      const toml::array& arr = *v.as_array();
      if (arr.size() != ch.size()) fail(&v, key, "expected " + shape);
      for (size_t i = 0; i < ch.size(); ++i)
        put_r(m, {l[0], l[1], ch[i]}, value(*arr.get(i), key, m.field),
              static_cast<int>(arr.get(i)->source().begin.line), arr.get(i), key);
    }
  }
};

}  // namespace

Model parse_model(const std::string& text, const std::string& origin, const ExpressionLimits& limits) {
  Model m = Loader(origin, limits).run(text);
  m.source_sha256 = sha256_hex(text);
  return m;
}

Model load_model(const std::string& path, const ExpressionLimits& limits) {
  // Read once; the hash and the parse see the same bytes.
  const std::string text = read_input_file(path, kMaxModelFileBytes, "model file");
  return parse_model(text, path, limits);
}

}  // namespace zb
