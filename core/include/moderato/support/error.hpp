// Errors the user can act on: every message names the file, line, column or
// variable at fault. Core code throws InputError for bad input and lets any
// other exception mean an internal fault.
#pragma once

#include <stdexcept>
#include <string>

namespace moderato {

class InputError : public std::runtime_error {
public:
    explicit InputError(const std::string& message) : std::runtime_error(message) {}
};

// Long work (reading, bootstrap) stopped because the caller asked it to.
struct Cancelled : std::exception {
    const char* what() const noexcept override { return "cancelled"; }
};

}  // namespace moderato
