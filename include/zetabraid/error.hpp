// Error types and the tool's exit codes.
#pragma once
#include <stdexcept>
#include <string>

namespace zb {

/// Exit codes of the whole tool (documented in the README).
enum ExitCode : int {
  kExitOk = 0,          ///< success; every checked claim holds
  kExitClaimFalse = 1,  ///< a checked claim is false (failed equation, leaking braid, rejected certificate)
  kExitInput = 2,       ///< usage or input error (bad file, bad expression, out-of-range generator)
  kExitResource = 3,    ///< a request exceeded a resource limit (dimension, word length, precision)
  kExitInternal = 4,    ///< an internal error (a bug: please report)
};

/// Bad input from the user: an expression, a file, an option. Carries an optional location.
class InputError : public std::runtime_error {
 public:
  explicit InputError(const std::string& what) : std::runtime_error(what) {}
};

/// A request that would exceed a documented resource limit.
class ResourceError : public std::runtime_error {
 public:
  explicit ResourceError(const std::string& what) : std::runtime_error(what) {}
};

/// A mathematical precondition failed (division by zero, incompatible fields, non-composable braid).
class MathError : public std::runtime_error {
 public:
  explicit MathError(const std::string& what) : std::runtime_error(what) {}
};

/// A broken internal invariant: a bug in zetabraid, never the user's input (exit 4).
class InternalError : public std::logic_error {
 public:
  explicit InternalError(const std::string& what) : std::logic_error(what) {}
};

}  // namespace zb
