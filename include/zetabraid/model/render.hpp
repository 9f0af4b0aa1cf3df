// Renderings of the model layer's results, for people (text lines) and programs (one JSON object), in one place.
// Presentation only: the results are computed by model/check.hpp and model/invariants.hpp.
//
// Naming used by every layer's render.hpp: <result>_text returns whole lines (each ending in '\n'),
// <result>_json returns one compact JSON object (keys in a fixed order, no trailing newline).
#pragma once
#include <string>

#include "zetabraid/model/check.hpp"
#include "zetabraid/model/compare.hpp"
#include "zetabraid/model/invariants.hpp"

namespace zb {

/// The report of check_model for the model loaded from `path` (the path names the file in text and JSON).
/// JSON keys: ok, model, file, checks {name: {count, failed[, skipped][, note]}}, failures [{check, labels,
/// condition[, residual {exact, ball}][, line]}], exact, seconds.
std::string check_report_text(const Model& m, const std::string& path, const CheckReport& rep);
std::string check_report_json(const Model& m, const std::string& path, const CheckReport& rep);

/// Invariants; every number as {"exact", "ball"} in JSON, enclosures with `digits` significant digits.
/// JSON keys: model, labels, dimensions, global_dimension_squared, global_dimension, fs_indicators, twists, S, T,
/// [gauss_sum, gauss_phase,] central_charge_mod8, modular, verlinde {ok, checked}, [fs_twist_formula_ok,] notes.
/// `verified` = false (model info --unchecked: the data failed model check) adds the key "verified": false last in
/// JSON and a warning line before and on every value in text.
std::string invariants_text(const Model& m, const Invariants& inv, long digits = 15, bool verified = true);
std::string invariants_json(const Model& m, const Invariants& inv, long digits = 15, bool verified = true);

/// Why `model info` refuses data that fail model check: the reason and the first failure (lines, no JSON).
std::string model_info_refusal(const Model& m, const std::string& path, const CheckReport& rep);

/// The result of compare_models for files path_a and path_b. JSON keys: verdict, file_a, file_b, relabeling
/// {labelA: labelB} (when equivalent), gauge [{vertex, u}] (vertices not listed have u = 1; present when explicit),
/// gauge_note, differs {invariant, detail, a, b[, loop [{entry, exponent, ratio}]]} (when not equivalent),
/// relabelings_tried, notes, exact.
std::string compare_text(const CompareResult& r, const std::string& path_a, const std::string& path_b);
std::string compare_json(const CompareResult& r, const std::string& path_a, const std::string& path_b);

}  // namespace zb
