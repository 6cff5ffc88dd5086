// Passwords for PostgreSQL sources on the command line: never an option or
// part of the address, but typed at the terminal when the server asks for
// one that libpq's password file (~/.pgpass) and PGPASSWORD do not give.
// Kept in this process's memory only.
#pragma once

#include <functional>

#include "moderato/project/project_loader.hpp"

namespace moderato::cli {

// The passwords typed so far in this run, by address (without a password).
const DatabasePasswords& typed_passwords();
// The password typed for `location`, or "" (libpq then reads its password file).
std::string typed_password(const std::string& location);

// Runs `command`; when it throws PasswordNeeded for an address not asked
// for yet and this process has a terminal (/dev/tty), asks for the password
// there without echo and runs `command` again. Without a terminal, or when
// the same address is asked for again, the PasswordNeeded goes on. The
// command must read its data before it writes anything, as every command does.
int with_typed_passwords(const std::function<int()>& command);

}  // namespace moderato::cli
