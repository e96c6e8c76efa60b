// Quoting what a user sent inside an error message.
//
// A message names the offending value so the user can find it, but a
// name of 100,000 characters echoed back would make the message itself the
// problem (gRPC refuses status messages past its metadata limit). So user
// strings are cut to a short prefix, and bytes that are not printable
// ASCII are escaped, which also keeps every message valid UTF-8.
// Pure functions; thread-safe.
#ifndef SLICEPLAN_CORE_MODEL_USER_TEXT_H_
#define SLICEPLAN_CORE_MODEL_USER_TEXT_H_

#include <cstddef>
#include <string>
#include <string_view>

namespace sliceplan {

inline constexpr size_t kQuotedPrefix = 40;

// `text` cut to kQuotedPrefix bytes (with "... (N bytes)" after a cut),
// other than printable ASCII escaped as \xHH.
std::string ShortName(std::string_view text);

// True when `text` is well-formed UTF-8 (RFC 3629: no overlong forms, no
// surrogates, nothing past U+10FFFF).
bool IsValidUtf8(std::string_view text);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MODEL_USER_TEXT_H_
