#include "password_prompt.hpp"

#include <fcntl.h>
#include <termios.h>
#include <unistd.h>

#include <string>

#include "moderato/reading/postgres_source.hpp"

namespace moderato::cli {

namespace {

DatabasePasswords& book() {
    static DatabasePasswords passwords;
    return passwords;
}

// Writes `prompt` to the terminal and reads one line with echo off; false
// when there is no terminal or it cannot be read.
bool ask_terminal(const std::string& prompt, std::string& answer) {
    const int fd = ::open("/dev/tty", O_RDWR | O_NOCTTY | O_CLOEXEC);
    if (fd < 0) return false;
    termios saved{};
    const bool is_terminal = ::tcgetattr(fd, &saved) == 0;
    if (is_terminal) {
        termios quiet = saved;
        quiet.c_lflag &= ~static_cast<tcflag_t>(ECHO);
        quiet.c_lflag |= ECHONL;
        ::tcsetattr(fd, TCSAFLUSH, &quiet);
        [[maybe_unused]] const auto written = ::write(fd, prompt.data(), prompt.size());
    }
    bool line = false;
    for (char ch; is_terminal && ::read(fd, &ch, 1) == 1;) {
        if (ch == '\n' || ch == '\r') {
            line = true;
            break;
        }
        answer += ch;
    }
    if (is_terminal) ::tcsetattr(fd, TCSAFLUSH, &saved);
    ::close(fd);
    return line;
}

}  // namespace

const DatabasePasswords& typed_passwords() { return book(); }

std::string typed_password(const std::string& location) {
    const auto it = book().find(location);
    return it != book().end() ? it->second : std::string();
}

int with_typed_passwords(const std::function<int()>& command) {
    for (;;) {
        try {
            return command();
        } catch (const PasswordNeeded& e) {
            if (book().count(e.location())) throw;
            std::string typed;
            if (!ask_terminal("Password for " + e.location() + ": ", typed)) throw;
            book()[e.location()] = typed;
            typed.assign(typed.size(), '\0');
        }
    }
}

}  // namespace moderato::cli
