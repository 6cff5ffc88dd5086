// SHA-256 through OpenSSL's EVP digest interface; files are streamed in
// 1 MiB reads, so a file of any size hashes in constant memory.
#include "moderato/support/sha256.hpp"

#include <fcntl.h>
#include <openssl/evp.h>
#include <unistd.h>

#include <array>
#include <cerrno>
#include <cstring>
#include <memory>
#include <stdexcept>
#include <vector>

#include "moderato/support/error.hpp"

namespace moderato {

namespace {

// One running digest. A failure inside libcrypto is not something a file can
// cause (it would be a broken installation), so it is a logic error.
class Sha256 {
public:
    Sha256() : ctx_(EVP_MD_CTX_new(), EVP_MD_CTX_free) {
        if (!ctx_ || EVP_DigestInit_ex(ctx_.get(), EVP_sha256(), nullptr) != 1)
            throw std::runtime_error("SHA-256: libcrypto could not start a digest");
    }
    void update(const void* data, std::size_t size) {
        if (size > 0 && EVP_DigestUpdate(ctx_.get(), data, size) != 1)
            throw std::runtime_error("SHA-256: libcrypto could not update a digest");
    }
    std::string hex() {
        std::array<unsigned char, EVP_MAX_MD_SIZE> digest{};
        unsigned int length = 0;
        if (EVP_DigestFinal_ex(ctx_.get(), digest.data(), &length) != 1 || length != 32)
            throw std::runtime_error("SHA-256: libcrypto could not finish a digest");
        static constexpr char kHex[] = "0123456789abcdef";
        std::string out(2 * length, '0');
        for (unsigned int i = 0; i < length; ++i) {
            out[2 * i] = kHex[digest[i] >> 4];
            out[2 * i + 1] = kHex[digest[i] & 15];
        }
        return out;
    }

private:
    std::unique_ptr<EVP_MD_CTX, decltype(&EVP_MD_CTX_free)> ctx_;
};

// Closes the descriptor however the hashing ends.
struct FileDescriptor {
    int fd;
    ~FileDescriptor() {
        if (fd >= 0) ::close(fd);
    }
};

}  // namespace

std::string sha256_hex(std::string_view bytes) {
    Sha256 s;
    s.update(bytes.data(), bytes.size());
    return s.hex();
}

std::string sha256_file(const std::string& path) {
    const std::atomic<bool> never{false};
    return sha256_file(path, never);
}

std::string sha256_file(const std::string& path, const std::atomic<bool>& stop) {
    const FileDescriptor file{::open(path.c_str(), O_RDONLY | O_CLOEXEC)};
    if (file.fd < 0) throw InputError(path + ": cannot be read (" + std::strerror(errno) + ")");
    Sha256 s;
    std::vector<unsigned char> buffer(std::size_t{1} << 20);
    for (;;) {
        if (stop.load(std::memory_order_relaxed)) return {};
        const ssize_t got = ::read(file.fd, buffer.data(), buffer.size());
        if (got < 0) {
            if (errno == EINTR) continue;
            throw InputError(path + ": read error (" + std::strerror(errno) + ")");
        }
        if (got == 0) break;
        s.update(buffer.data(), static_cast<std::size_t>(got));
    }
    return s.hex();
}

}  // namespace moderato
