#include "commands.hpp"
#include "moderato/error.hpp"

namespace moderato::cli {

int run_power(const std::vector<std::string>&) {
    throw InputError("power planning is being built and is not available in this version");
}

}  // namespace moderato::cli
