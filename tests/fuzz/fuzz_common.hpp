// Shared by the libFuzzer targets: bad input (InputError) is an expected
// outcome; any other exception is an internal fault, so it aborts and
// libFuzzer records the input as a crash.
#pragma once

#include <cstdio>
#include <cstdlib>
#include <exception>
#include <string>

#include "moderato/support/error.hpp"

namespace moderato::fuzz {

[[noreturn]] inline void internal_error(const char* target, const char* what) {
    std::fprintf(stderr, "%s: internal error (not an InputError): %s\n", target, what);
    std::abort();
}

// A stated property of the output did not hold.
inline void require(bool ok, const char* target, const char* property) {
    if (!ok) internal_error(target, property);
}

// Runs `body`; InputError is fine, any other exception aborts.
template <class F>
void run_guarded(const char* target, F&& body) {
    try {
        body();
    } catch (const InputError&) {
    } catch (const std::exception& e) {
        internal_error(target, e.what());
    } catch (...) {
        internal_error(target, "an exception of unknown type");
    }
}

}  // namespace moderato::fuzz
