// Rendering of exact values and matrices (linalg/render.hpp).
#include "zetabraid/linalg/render.hpp"

#include "zetabraid/detail/raii.hpp"

namespace zb {

using ojson = nlohmann::ordered_json;

std::string ball_text(const Scalar& s, long digits, long guard_bits) {
  AcbT b;
  s.ball(b, static_cast<long>(static_cast<double>(digits) * 3.33) + guard_bits);
  return ball_str(b, digits);
}

ojson value_json(const Scalar& s, long digits, long guard_bits) {
  return {{"exact", s.str()}, {"ball", ball_text(s, digits, guard_bits)}};
}

ojson matrix_json(const Matrix& m) {
  ojson rows = ojson::array();
  for (size_t i = 0; i < m.rows(); ++i) {
    ojson r = ojson::array();
    for (size_t j = 0; j < m.cols(); ++j) r.push_back(m(i, j).str());
    rows.push_back(std::move(r));
  }
  return rows;
}

std::string matrix_text(const Matrix& m, const std::string& indent) {
  std::string s;
  for (size_t i = 0; i < m.rows(); ++i) {
    s += indent + "[";
    for (size_t j = 0; j < m.cols(); ++j) s += (j ? ", " : "") + m(i, j).str();
    s += "]\n";
  }
  return s;
}

}  // namespace zb
