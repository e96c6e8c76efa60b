// JSON text pieces: string literals and numbers, for every writer of JSON
// in the project (the CLI's results, the servers' JSON log lines).
#ifndef SLICEPLAN_CORE_MODEL_JSON_TEXT_H_
#define SLICEPLAN_CORE_MODEL_JSON_TEXT_H_

#include <string>
#include <string_view>

namespace sliceplan {

// A JSON string literal, quotes included, with the escapes of RFC 8259
// (section 7): quote, backslash and every control character below 0x20.
// Bytes from 0x80 up are copied as they are.
std::string JsonString(std::string_view s);

// A JSON number: %.17g round-trips a double; JSON has no inf or nan, so
// those become null.
std::string JsonNumber(double x);

}  // namespace sliceplan

#endif  // SLICEPLAN_CORE_MODEL_JSON_TEXT_H_
