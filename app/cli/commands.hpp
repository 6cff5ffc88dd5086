// The subcommands of moderato-cli. Each returns the process exit code and
// throws moderato::InputError for bad input (exit code 2).
#pragma once

#include <string>
#include <vector>

namespace moderato::cli {

int run_fit(const std::vector<std::string>& args);
int run_columns(const std::vector<std::string>& args);
int run_probe(const std::vector<std::string>& args);
int run_power(const std::vector<std::string>& args);
// Only in a build with the workbench (MODERATO_HAVE_RENDER).
int run_render(const std::vector<std::string>& args);

}  // namespace moderato::cli
