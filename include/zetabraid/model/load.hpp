// Reading and writing anyon-model files (TOML; the format is specified in docs/model-format.md).
#pragma once
#include <string>

#include "zetabraid/model/model.hpp"

namespace zb {

/// Loads a model file. Errors are InputError with "file:line: key: what was expected".
/// Every value is parsed exactly with the expression syntax (plus the file's named constants).
Model load_model(const std::string& path);

/// Same, from text in memory; `origin` names the text in error messages.
Model parse_model(const std::string& text, const std::string& origin);

/// The model as a file in the documented format (exact values; re-loading gives back the same model).
/// Square roots are written as named constants r1, r2, ... for the field's radicands.
std::string model_to_toml(const Model& m);

}  // namespace zb
