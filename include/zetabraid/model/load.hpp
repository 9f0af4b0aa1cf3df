// Reading and writing anyon-model files (TOML; the format is specified in docs/model-format.md).
#pragma once
#include <string>

#include "zetabraid/field/expression.hpp"
#include "zetabraid/model/model.hpp"

namespace zb {

/// Loads a model file: reads it once (read_input_file: regular files only, at most kMaxModelFileBytes) and
/// parses exactly those bytes, whose SHA-256 is stored in Model::source_sha256. Errors are InputError with
/// "file:line: key: what was expected"; ResourceError ("file:line: key: ...") when a value exceeds `limits`
/// (limits.max_bits bounds the size of every exact value, docs/model-format.md "Limits").
/// Every value is parsed exactly with the expression syntax (plus the file's named constants).
Model load_model(const std::string& path, const ExpressionLimits& limits = {});

/// Same, from text in memory (the common entry point of load_model); `origin` names the text in error messages.
/// Model::source_sha256 is the SHA-256 of `text`.
Model parse_model(const std::string& text, const std::string& origin, const ExpressionLimits& limits = {});

/// The model as a file in the documented format (exact values; re-loading gives back the same model).
/// Square roots are written as named constants r1, r2, ... for the field's radicands.
std::string model_to_toml(const Model& m);

}  // namespace zb
