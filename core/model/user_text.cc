#include "core/model/user_text.h"

#include <cstdint>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"

namespace sliceplan {

std::string ShortName(std::string_view text) {
  std::string out;
  const std::string_view head = text.substr(0, kQuotedPrefix);
  for (unsigned char c : head) {
    if (c >= 0x20 && c < 0x7f && c != '\\') {
      out += static_cast<char>(c);
    } else {
      absl::StrAppendFormat(&out, "\\x%02x", c);
    }
  }
  if (head.size() < text.size()) absl::StrAppend(&out, "... (", text.size(), " bytes)");
  return out;
}

bool IsValidUtf8(std::string_view text) {
  size_t i = 0;
  while (i < text.size()) {
    const unsigned char c = text[i];
    int extra = 0;
    uint32_t code = 0;
    if (c < 0x80) {
      ++i;
      continue;
    } else if ((c & 0xE0) == 0xC0) {
      extra = 1, code = c & 0x1F;
    } else if ((c & 0xF0) == 0xE0) {
      extra = 2, code = c & 0x0F;
    } else if ((c & 0xF8) == 0xF0) {
      extra = 3, code = c & 0x07;
    } else {
      return false;
    }
    if (text.size() - i <= static_cast<size_t>(extra)) return false;  // cut short
    for (int k = 1; k <= extra; ++k) {
      const unsigned char d = text[i + k];
      if ((d & 0xC0) != 0x80) return false;
      code = (code << 6) | (d & 0x3F);
    }
    static constexpr uint32_t kMinForLength[] = {0, 0x80, 0x800, 0x10000};
    if (code < kMinForLength[extra] || code > 0x10FFFF || (code >= 0xD800 && code <= 0xDFFF)) {
      return false;
    }
    i += extra + 1;
  }
  return true;
}

}  // namespace sliceplan
