// The message of the InputError a call throws, for the tests that check the
// exact words users read.
#pragma once

#include <string>
#include <utility>

#include "moderato/support/error.hpp"

namespace moderato::test {

// The message of the InputError `f` throws, or "" when it throws none (any
// other exception passes through and fails the test).
template <typename F>
std::string input_error_of(F&& f) {
    try {
        std::forward<F>(f)();
    } catch (const InputError& e) {
        return e.what();
    }
    return {};
}

}  // namespace moderato::test
