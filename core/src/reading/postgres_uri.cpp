#include "reading/postgres_uri.hpp"

#include <algorithm>
#include <cctype>

namespace moderato::detail {

namespace {

int hex_value(char c) {
    if (c >= '0' && c <= '9') return c - '0';
    if (c >= 'a' && c <= 'f') return c - 'a' + 10;
    if (c >= 'A' && c <= 'F') return c - 'A' + 10;
    return -1;
}

// "user:secret@host:port" without ":secret" (a ':' after the '@' is a port's).
std::string authority_without_password(std::string authority) {
    const std::size_t at = authority.rfind('@');
    if (at == std::string::npos) return authority;
    const std::size_t colon = authority.find(':');
    if (colon < at) authority.erase(colon, at - colon);
    return authority;
}

// "k=v&password=x&k2=v2" without the password parameters.
std::string query_without_password(std::string_view query) {
    std::string kept;
    while (true) {
        const std::size_t amp = std::min(query.find('&'), query.size());
        const std::string_view pair = query.substr(0, amp);
        if (percent_decoded(pair.substr(0, pair.find('='))) != "password")
            kept += (kept.empty() ? "" : "&") + std::string(pair);
        if (amp >= query.size()) break;
        query.remove_prefix(amp + 1);
    }
    return kept;
}

}  // namespace

std::string percent_decoded(std::string_view text) {
    std::string out;
    for (std::size_t i = 0; i < text.size(); ++i) {
        if (text[i] == '%' && i + 2 < text.size() && hex_value(text[i + 1]) >= 0 && hex_value(text[i + 2]) >= 0) {
            out += static_cast<char>(hex_value(text[i + 1]) * 16 + hex_value(text[i + 2]));
            i += 2;
        } else {
            out += text[i];
        }
    }
    return out;
}

std::string percent_encoded(std::string_view text, std::string_view keep) {
    static const char* hex = "0123456789ABCDEF";
    std::string out;
    for (const unsigned char ch : text) {
        const bool plain = std::isalnum(ch) || ch == '-' || ch == '.' || ch == '_' || ch == '~' ||
                           keep.find(static_cast<char>(ch)) != std::string_view::npos;
        if (plain) out += static_cast<char>(ch);
        else out += {'%', hex[ch >> 4], hex[ch & 15]};
    }
    return out;
}

std::string uri_without_password(const std::string& uri) {
    const std::size_t scheme = uri.find("://");
    if (scheme == std::string::npos) return uri;
    const std::size_t start = scheme + 3;
    const std::size_t path = std::min(uri.find_first_of("/?#", start), uri.size());
    std::string out = uri.substr(0, start) + authority_without_password(uri.substr(start, path - start));
    const std::size_t query = std::min(uri.find_first_of("?#", path), uri.size());
    out += uri.substr(path, query - path);
    if (query == uri.size() || uri[query] == '#') return out + uri.substr(query);
    const std::size_t hash = std::min(uri.find('#', query), uri.size());
    const std::string kept = query_without_password(std::string_view(uri).substr(query + 1, hash - query - 1));
    if (!kept.empty()) out += "?" + kept;
    return out + uri.substr(hash);
}

}  // namespace moderato::detail
