// The user-facing error type: a file (or option) and what is wrong with it, one line.
#pragma once

#include <stdexcept>
#include <string>

namespace machcut {

// Thrown for problems in user input (files, meshes, options). Never for programmer errors:
// those are asserts. `what()` is the complete one-line message "FILE: PROBLEM".
class InputError : public std::runtime_error {
 public:
  InputError(const std::string& source, const std::string& problem)
      : std::runtime_error(source.empty() ? problem : source + ": " + problem),
        source_(source),
        problem_(problem) {}
  const std::string& source() const { return source_; }
  const std::string& problem() const { return problem_; }

 private:
  std::string source_;
  std::string problem_;
};

// Thrown when the input was read but the model (or a requested result) cannot be analysed:
// the message says why ("model not usable: …"). Front ends map it to exit code 1.
class UnusableModel : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

}  // namespace machcut
