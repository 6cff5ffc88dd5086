#include "commands.hpp"
#include "moderato/error.hpp"

namespace moderato::cli {

int run_probe(const std::vector<std::string>&) {
    throw InputError("probing is being built and is not available in this version");
}

}  // namespace moderato::cli
