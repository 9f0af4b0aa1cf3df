// Writing model files in the documented format (docs/model-format.md).
#include <fmt/format.h>

#include <sstream>

#include "zetabraid/model/load.hpp"

namespace zb {

namespace {

std::string quote(const std::string& s) {
  std::string out = "\"";
  for (char c : s) {
    if (c == '"' || c == '\\') out += '\\';
    if (c == '\n') {
      out += "\\n";
      continue;
    }
    out += c;
  }
  return out + "\"";
}

// A value with square roots written through the constants r1, r2, ... (r_j = sqrt(radicand j)).
std::string value_text(const Scalar& v) {
  return v.str([](int j) { return fmt::format("r{}", j + 1); });
}


}  // namespace

std::string model_to_toml(const Model& m) {
  std::ostringstream o;
  const int n = m.label_count();
  auto L = [&](int a) { return m.labels[static_cast<size_t>(a)]; };
  o << "# " << m.name << "\n";
  if (!m.source.empty()) {
    std::istringstream src(m.source);
    std::string line;
    while (std::getline(src, line)) o << "# " << line << "\n";
  }
  o << "format = \"zetabraid-model 1\"\n";
  o << "name = " << quote(m.name) << "\n";
  o << "source = " << quote(m.source) << "\n";
  o << "labels = [";
  for (int a = 0; a < n; ++a) o << (a ? ", " : "") << quote(L(a));
  o << "]\n";
  o << "unitary = " << (m.claims_unitary ? "true" : "false") << "\n\n";
  o << "[field]\nconductor = " << m.field->conductor() << "\n";
  if (m.field->radicand_count()) {
    o << "radicands = [";
    for (int j = 0; j < m.field->radicand_count(); ++j)
      o << (j ? ", " : "") << quote(m.field->radicand(j).str());
    o << "]\n\n[constants]\n";
    for (int j = 0; j < m.field->radicand_count(); ++j)
      o << "r" << j + 1 << " = " << quote("sqrt(" + m.field->radicand(j).str() + ")") << "\n";
  }
  o << "\n[fusion]\n";
  for (int a = 1; a < n; ++a)
    for (int b = 1; b < n; ++b) {
      o << quote(L(a) + " " + L(b)) << " = [";
      bool first = true;
      for (int c : m.channels(a, b)) {
        o << (first ? "" : ", ") << quote(L(c));
        first = false;
      }
      o << "]\n";
    }
  o << "\n[F]   # \"a b c d\" = matrix [F^{abc}_d]_{ef}: rows e, columns f, in label order\n";
  for (int a = 0; a < n; ++a)
    for (int b = 0; b < n; ++b)
      for (int c = 0; c < n; ++c)
        for (int d = 0; d < n; ++d) {
          auto rows = m.left_channels(a, b, c, d), cols = m.right_channels(a, b, c, d);
          if (rows.empty() || rows.size() != cols.size()) continue;
          bool any = false;
          for (int e : rows)
            for (int f : cols) any = any || m.f_given.count({a, b, c, d, e, f}) || m.f_symbol(a, b, c, d, e, f);
          if (!any) continue;
          auto val = [&](int e, int f) {
            const Scalar* v = m.f_symbol(a, b, c, d, e, f);
            return quote(v ? value_text(*v) : "0");
          };
          o << quote(L(a) + " " + L(b) + " " + L(c) + " " + L(d)) << " = ";
          if (rows.size() == 1) {
            o << val(rows[0], cols[0]) << "\n";
            continue;
          }
          o << "[";
          for (size_t i = 0; i < rows.size(); ++i) {
            o << (i ? ",\n  [" : "[");
            for (size_t j = 0; j < cols.size(); ++j) o << (j ? ", " : "") << val(rows[i], cols[j]);
            o << "]";
          }
          o << "]\n";
        }
  if (m.has_r) {
    o << "\n[R]   # \"a b\" = [R^{ab}_c for each channel c in label order]\n";
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b) {
        auto ch = m.channels(a, b);
        if (ch.empty()) continue;
        o << quote(L(a) + " " + L(b)) << " = [";
        for (size_t i = 0; i < ch.size(); ++i) {
          const Scalar* v = m.r_symbol(a, b, ch[i]);
          o << (i ? ", " : "") << quote(v ? value_text(*v) : "0");
        }
        o << "]\n";
      }
  }
  return o.str();
}

}  // namespace zb
