// Errors that reach the user. Every failure caused by user input is thrown as
// loupe::Error whose message names the file, line or byte and says what to do.
#pragma once

#include <stdexcept>
#include <string>

namespace loupe {

class Error : public std::runtime_error {
 public:
  explicit Error(const std::string& message) : std::runtime_error(message) {}
};

}  // namespace loupe
