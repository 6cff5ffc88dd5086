// SHA-256 (FIPS 180-4) and atomic file writes.
#include "moderato/support/file_util.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#if defined(__x86_64__) && (defined(__GNUC__) || defined(__clang__))
#include <cpuid.h>
#include <immintrin.h>
#endif

#include <algorithm>
#include <array>
#include <cerrno>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <random>
#include <vector>

#include "moderato/support/error.hpp"

namespace moderato {

namespace {

constexpr std::array<std::uint32_t, 64> kRound{
    0x428a2f98, 0x71374491, 0xb5c0fbcf, 0xe9b5dba5, 0x3956c25b, 0x59f111f1, 0x923f82a4, 0xab1c5ed5,
    0xd807aa98, 0x12835b01, 0x243185be, 0x550c7dc3, 0x72be5d74, 0x80deb1fe, 0x9bdc06a7, 0xc19bf174,
    0xe49b69c1, 0xefbe4786, 0x0fc19dc6, 0x240ca1cc, 0x2de92c6f, 0x4a7484aa, 0x5cb0a9dc, 0x76f988da,
    0x983e5152, 0xa831c66d, 0xb00327c8, 0xbf597fc7, 0xc6e00bf3, 0xd5a79147, 0x06ca6351, 0x14292967,
    0x27b70a85, 0x2e1b2138, 0x4d2c6dfc, 0x53380d13, 0x650a7354, 0x766a0abb, 0x81c2c92e, 0x92722c85,
    0xa2bfe8a1, 0xa81a664b, 0xc24b8b70, 0xc76c51a3, 0xd192e819, 0xd6990624, 0xf40e3585, 0x106aa070,
    0x19a4c116, 0x1e376c08, 0x2748774c, 0x34b0bcb5, 0x391c0cb3, 0x4ed8aa4a, 0x5b9cca4f, 0x682e6ff3,
    0x748f82ee, 0x78a5636f, 0x84c87814, 0x8cc70208, 0x90befffa, 0xa4506ceb, 0xbef9a3f7, 0xc67178f2};

inline std::uint32_t rotr(std::uint32_t x, int n) { return (x >> n) | (x << (32 - n)); }

// Processes `blocks` 64-byte blocks into the state h[0..7].
using BlockFunction = void (*)(std::uint32_t* h, const unsigned char* data, std::size_t blocks);

// FIPS 180-4, section 6.2.2, one block at a time.
void blocks_portable(std::uint32_t* h_, const unsigned char* data, std::size_t blocks) {
    for (; blocks > 0; --blocks, data += 64) {
        std::uint32_t w[64];
        for (int i = 0; i < 16; ++i)
            w[i] = (std::uint32_t{data[4 * i]} << 24) | (std::uint32_t{data[4 * i + 1]} << 16) |
                   (std::uint32_t{data[4 * i + 2]} << 8) | std::uint32_t{data[4 * i + 3]};
        for (int i = 16; i < 64; ++i) {
            const std::uint32_t s0 = rotr(w[i - 15], 7) ^ rotr(w[i - 15], 18) ^ (w[i - 15] >> 3);
            const std::uint32_t s1 = rotr(w[i - 2], 17) ^ rotr(w[i - 2], 19) ^ (w[i - 2] >> 10);
            w[i] = w[i - 16] + s0 + w[i - 7] + s1;
        }
        std::uint32_t a = h_[0], b = h_[1], c = h_[2], d = h_[3], e = h_[4], f = h_[5], g = h_[6], h = h_[7];
        for (int i = 0; i < 64; ++i) {
            const std::uint32_t t1 =
                h + (rotr(e, 6) ^ rotr(e, 11) ^ rotr(e, 25)) + ((e & f) ^ (~e & g)) + kRound[i] + w[i];
            const std::uint32_t t2 = (rotr(a, 2) ^ rotr(a, 13) ^ rotr(a, 22)) + ((a & b) ^ (a & c) ^ (b & c));
            h = g;
            g = f;
            f = e;
            e = d + t1;
            d = c;
            c = b;
            b = a;
            a = t1 + t2;
        }
        h_[0] += a, h_[1] += b, h_[2] += c, h_[3] += d, h_[4] += e, h_[5] += f, h_[6] += g, h_[7] += h;
    }
}

#if defined(__x86_64__) && (defined(__GNUC__) || defined(__clang__))
#define MODERATO_SHA256_X86 1

// The x86 SHA extensions (sha256rnds2 does two rounds, sha256msg1/msg2 the
// message schedule), used when the processor has them: about five times the
// speed of the portable code, which matters for hashing big data files.
// The state is kept as ABEF and CDGH in two registers.
__attribute__((target("sha,sse4.1,ssse3"))) void blocks_x86(std::uint32_t* h, const unsigned char* data,
                                                            std::size_t blocks) {
    const __m128i byte_swap = _mm_set_epi64x(0x0c0d0e0f08090a0bULL, 0x0405060700010203ULL);
    __m128i t = _mm_loadu_si128(reinterpret_cast<const __m128i*>(h));           // A B C D (lanes 0..3)
    __m128i state1 = _mm_loadu_si128(reinterpret_cast<const __m128i*>(h + 4));  // E F G H
    t = _mm_shuffle_epi32(t, 0xB1);                                             // C D A B -> B A D C
    state1 = _mm_shuffle_epi32(state1, 0x1B);                                   // H G F E
    __m128i state0 = _mm_alignr_epi8(t, state1, 8);                             // ABEF
    state1 = _mm_blend_epi16(state1, t, 0xF0);                                  // CDGH
    for (; blocks > 0; --blocks, data += 64) {
        const __m128i save0 = state0, save1 = state1;
        __m128i m[4];
#pragma GCC unroll 16
        for (int i = 0; i < 16; ++i) {
            // Rounds 4i .. 4i+3 with message words W[4i .. 4i+3] in m[i % 4].
            if (i < 4)
                m[i] = _mm_shuffle_epi8(_mm_loadu_si128(reinterpret_cast<const __m128i*>(data + 16 * i)), byte_swap);
            __m128i msg = _mm_add_epi32(m[i % 4], _mm_loadu_si128(reinterpret_cast<const __m128i*>(&kRound[4 * i])));
            state1 = _mm_sha256rnds2_epu32(state1, state0, msg);
            if (i >= 3 && i <= 14) {
                // Finish W[4(i+1) ..]: W[t-7] terms, then the sigma1 terms.
                const __m128i w7 = _mm_alignr_epi8(m[i % 4], m[(i + 3) % 4], 4);
                m[(i + 1) % 4] = _mm_sha256msg2_epu32(_mm_add_epi32(m[(i + 1) % 4], w7), m[i % 4]);
            }
            msg = _mm_shuffle_epi32(msg, 0x0E);
            state0 = _mm_sha256rnds2_epu32(state0, state1, msg);
            // Start W[4(i+3) ..]: W[t-16] + sigma0(W[t-15]).
            if (i >= 1 && i <= 12) m[(i + 3) % 4] = _mm_sha256msg1_epu32(m[(i + 3) % 4], m[i % 4]);
        }
        state0 = _mm_add_epi32(state0, save0);
        state1 = _mm_add_epi32(state1, save1);
    }
    t = _mm_shuffle_epi32(state0, 0x1B);        // FEBA
    state1 = _mm_shuffle_epi32(state1, 0xB1);   // DCHG
    state0 = _mm_blend_epi16(t, state1, 0xF0);  // DCBA
    state1 = _mm_alignr_epi8(state1, t, 8);     // HGFE
    _mm_storeu_si128(reinterpret_cast<__m128i*>(h), state0);
    _mm_storeu_si128(reinterpret_cast<__m128i*>(h + 4), state1);
}

bool cpu_has_sha_extensions() {
    unsigned a = 0, b = 0, c = 0, d = 0;
    if (!__get_cpuid(1, &a, &b, &c, &d)) return false;
    const bool ssse3 = c & (1u << 9), sse41 = c & (1u << 19);
    if (!__get_cpuid_count(7, 0, &a, &b, &c, &d)) return false;
    const bool sha = b & (1u << 29);
    return ssse3 && sse41 && sha;
}
#endif

BlockFunction best_blocks() {
#ifdef MODERATO_SHA256_X86
    static const BlockFunction f = cpu_has_sha_extensions() ? blocks_x86 : blocks_portable;
    return f;
#else
    return blocks_portable;
#endif
}

class Sha256 {
public:
    explicit Sha256(BlockFunction blocks = best_blocks()) : blocks_(blocks) {}

    void update(const unsigned char* data, std::size_t size) {
        bytes_ += size;
        if (fill_ > 0) {
            const std::size_t take = std::min(size, std::size_t{64} - fill_);
            std::memcpy(block_.data() + fill_, data, take);
            fill_ += take;
            data += take;
            size -= take;
            if (fill_ < 64) return;
            blocks_(h_.data(), block_.data(), 1);
            fill_ = 0;
        }
        const std::size_t whole = size / 64;
        if (whole > 0) blocks_(h_.data(), data, whole);
        data += whole * 64;
        size -= whole * 64;
        std::memcpy(block_.data(), data, size);
        fill_ = size;
    }

    std::string hex() {
        const std::uint64_t bits = bytes_ * 8;
        unsigned char tail[128] = {0x80};
        const std::size_t pad = (fill_ < 56 ? 56 : 120) - fill_;
        for (int i = 0; i < 8; ++i)
            tail[pad + static_cast<std::size_t>(i)] = static_cast<unsigned char>(bits >> (56 - 8 * i));
        update(tail, pad + 8);
        static const char* digits = "0123456789abcdef";
        std::string out;
        for (const std::uint32_t word : h_)
            for (int shift = 28; shift >= 0; shift -= 4) out.push_back(digits[(word >> shift) & 0xf]);
        return out;
    }

private:
    BlockFunction blocks_;
    std::array<std::uint32_t, 8> h_{0x6a09e667, 0xbb67ae85, 0x3c6ef372, 0xa54ff53a,
                                    0x510e527f, 0x9b05688c, 0x1f83d9ab, 0x5be0cd19};
    std::array<unsigned char, 64> block_{};
    std::size_t fill_ = 0;
    std::uint64_t bytes_ = 0;
};

}  // namespace

std::string sha256_hex(std::string_view bytes) {
    Sha256 s;
    s.update(reinterpret_cast<const unsigned char*>(bytes.data()), bytes.size());
    return s.hex();
}

namespace detail {

std::string sha256_hex_portable(std::string_view bytes) {
    Sha256 s(blocks_portable);
    s.update(reinterpret_cast<const unsigned char*>(bytes.data()), bytes.size());
    return s.hex();
}

bool sha256_uses_cpu_extensions() {
#ifdef MODERATO_SHA256_X86
    return best_blocks() == blocks_x86;
#else
    return false;
#endif
}

}  // namespace detail

std::string sha256_file(const std::string& path) {
    const int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
    if (fd < 0) throw InputError(path + ": cannot be read (" + std::strerror(errno) + ")");
    Sha256 s;
    std::vector<unsigned char> buffer(std::size_t{1} << 20);
    for (;;) {
        const ssize_t got = ::read(fd, buffer.data(), buffer.size());
        if (got < 0) {
            if (errno == EINTR) continue;
            const int err = errno;
            ::close(fd);
            throw InputError(path + ": read error (" + std::strerror(err) + ")");
        }
        if (got == 0) break;
        s.update(buffer.data(), static_cast<std::size_t>(got));
    }
    ::close(fd);
    return s.hex();
}

std::string read_file_bytes(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    if (!in) throw InputError(path + ": cannot be read (" + std::strerror(errno) + ")");
    std::string out((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
    if (in.bad()) throw InputError(path + ": read error");
    return out;
}

void write_file_atomically(const std::string& path, std::string_view content) {
    namespace fs = std::filesystem;
    // Writing through a symbolic link replaces the file it points to, not the link.
    fs::path target(path);
    std::error_code ec;
    if (fs::is_symlink(target, ec)) {
        const fs::path real = fs::weakly_canonical(target, ec);
        if (!ec) target = real;
    }
    const fs::path dir = target.has_parent_path() ? target.parent_path() : fs::path(".");
    // A replaced file keeps its permissions; a new one gets 0666 less the umask.
    mode_t mode = 0666;
    bool keep_mode = false;
    struct stat old {};
    if (::stat(target.c_str(), &old) == 0 && S_ISREG(old.st_mode)) {
        mode = old.st_mode & 07777;
        keep_mode = true;
    }
    std::random_device rd;
    std::string temp;
    int fd = -1;
    for (int attempt = 0; attempt < 16 && fd < 0; ++attempt) {
        temp = (dir / ("." + target.filename().string() + ".tmp-" + std::to_string(rd() & 0xffffff))).string();
        fd = ::open(temp.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, mode);
        if (fd < 0 && errno != EEXIST) break;
    }
    if (fd < 0)
        throw InputError(path + ": cannot be written (" + std::strerror(errno) + "); the file was left as it was");
    const auto fail = [&](const char* what) {
        const int err = errno;
        ::close(fd);
        ::unlink(temp.c_str());
        throw InputError(path + ": " + what + " (" + std::strerror(err) + "); the file was left as it was");
    };
    if (keep_mode && ::fchmod(fd, mode) != 0) fail("cannot be written");
    std::size_t done = 0;
    while (done < content.size()) {
        const ssize_t n = ::write(fd, content.data() + done, content.size() - done);
        if (n < 0) {
            if (errno == EINTR) continue;
            fail("cannot be written");
        }
        done += static_cast<std::size_t>(n);
    }
    if (::fsync(fd) != 0) fail("cannot be flushed to disk");
    if (::close(fd) != 0) {
        const int err = errno;
        ::unlink(temp.c_str());
        throw InputError(path + ": cannot be written (" + std::strerror(err) + "); the file was left as it was");
    }
    if (::rename(temp.c_str(), target.c_str()) != 0) {
        const int err = errno;
        ::unlink(temp.c_str());
        throw InputError(path + ": cannot be replaced (" + std::strerror(err) + "); the file was left as it was");
    }
    // Make the rename itself durable (best effort: some file systems refuse).
    const int dfd = ::open(dir.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
    if (dfd >= 0) {
        ::fsync(dfd);
        ::close(dfd);
    }
}

}  // namespace moderato
