#include "core/model/json_text.h"

#include <cmath>

#include "absl/strings/str_format.h"

namespace sliceplan {

std::string JsonNumber(double x) {
  if (!std::isfinite(x)) return "null";
  return absl::StrFormat("%.17g", x);
}

std::string JsonString(std::string_view s) {
  std::string out = "\"";
  out.reserve(s.size() + 2);
  for (const char c : s) {
    switch (c) {
      case '"':
        out += "\\\"";
        break;
      case '\\':
        out += "\\\\";
        break;
      case '\n':
        out += "\\n";
        break;
      case '\t':
        out += "\\t";
        break;
      case '\r':
        out += "\\r";
        break;
      default:
        if (static_cast<unsigned char>(c) < 0x20) {
          absl::StrAppendFormat(&out, "\\u%04x", c);
        } else {
          out += c;
        }
    }
  }
  return out + "\"";
}

}  // namespace sliceplan
