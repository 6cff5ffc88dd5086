// Private: the parts of a libpq URI ("postgresql://user@host:port/db?k=v")
// that hold a password, for messages and for what a project records, and
// percent-encoding for the addresses Moderato writes. One reading of a URI
// for the command line's refusal and the reader's scrubbing.
#pragma once

#include <string>
#include <string_view>

namespace moderato::detail {

// RFC 3986 percent-decoding ("%2F" is '/'); a '%' not followed by two hex
// digits stays as it is.
std::string percent_decoded(std::string_view text);

// Every byte but RFC 3986's unreserved characters and those in `keep` as %XX.
std::string percent_encoded(std::string_view text, std::string_view keep = {});

// The URI without a password: "user:secret@host" becomes "user@host", and
// every query parameter whose (decoded) name is "password" goes.
std::string uri_without_password(const std::string& uri);

// Whether the URI holds a password in either place.
inline bool uri_has_password(const std::string& uri) { return uri_without_password(uri) != uri; }

}  // namespace moderato::detail
