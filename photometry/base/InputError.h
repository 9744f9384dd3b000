#pragma once
// The exception for everything a user can get wrong: missing or unreadable files, columns, units and
// option values. The message is one line that names the file, column or option.
#include <stdexcept>
#include <string>

namespace starcensus {

class InputError : public std::runtime_error {
  public:
    using std::runtime_error::runtime_error;
};

} // namespace starcensus
