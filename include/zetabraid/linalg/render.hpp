// Rendering of exact values and matrices, shared by the result renderings of every layer (model/render.hpp,
// braid/render.hpp, cert/render.hpp). Presentation only: nothing here decides anything.
#pragma once
#include <string>

#include <nlohmann/json.hpp>

#include "zetabraid/linalg/matrix.hpp"

namespace zb {

/// The enclosure "[m +/- r]" of s with `digits` significant digits, computed at digits * 3.33 + guard_bits bits.
std::string ball_text(const Scalar& s, long digits = 20, long guard_bits = 32);
/// JSON values keep their keys in insertion order (nlohmann::ordered_json): every rendering's key order is fixed.
/// {"exact": canonical text, "ball": ball_text(s, digits, guard_bits)}.
nlohmann::ordered_json value_json(const Scalar& s, long digits = 20, long guard_bits = 32);
/// Rows of canonical exact texts: [["1", "zeta"], ...].
nlohmann::ordered_json matrix_json(const Matrix& m);
/// One line per row, "<indent>[a, b, ...]\n".
std::string matrix_text(const Matrix& m, const std::string& indent);

}  // namespace zb
