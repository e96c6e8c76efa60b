#include "wire/json_shape.h"

#include <string>
#include <vector>

#include "absl/container/flat_hash_set.h"
#include "absl/strings/ascii.h"
#include "absl/strings/str_cat.h"
#include "core/model/user_text.h"

namespace sliceplan {
namespace {

struct Frame {
  bool array = false;
  int index = 0;         // arrays: the element being read
  std::string key;       // objects: the member being read
  bool want_key = true;  // objects: a string now is a key
  absl::flat_hash_set<std::string> keys;
};

class ShapeScanner {
 public:
  explicit ShapeScanner(std::string_view json) : json_(json) {}

  absl::Status Run() {
    while (pos_ < json_.size()) {
      const char c = json_[pos_];
      absl::Status s = absl::OkStatus();
      if (c == '"') {
        s = String();
      } else if (c == '{' || c == '[') {
        s = Open(c == '[');
      } else if (c == '}' || c == ']') {
        if (!stack_.empty()) stack_.pop_back();
        ++pos_;
      } else if (c == ',') {
        if (!stack_.empty()) {
          Frame& top = stack_.back();
          top.array ? ++top.index : (top.want_key = true, 0);
        }
        ++pos_;
      } else if (c == 'n' && InArray()) {
        return Error("null inside an array");
      } else {
        ++pos_;
      }
      if (!s.ok()) return s;
    }
    return absl::OkStatus();
  }

 private:
  bool InArray() const { return !stack_.empty() && stack_.back().array; }

  absl::Status Open(bool array) {
    if (array && InArray()) return Error("an array inside an array");
    if (static_cast<int>(stack_.size()) >= kMaxJsonDepth) {
      return Error(absl::StrCat("nested deeper than ", kMaxJsonDepth, " levels"));
    }
    Frame f;
    f.array = array;
    stack_.push_back(std::move(f));
    ++pos_;
    return absl::OkStatus();
  }

  // Reads a string; in an object awaiting a key, records it.
  absl::Status String() {
    const size_t start = ++pos_;
    while (pos_ < json_.size() && json_[pos_] != '"') pos_ += json_[pos_] == '\\' ? 2 : 1;
    const std::string text(json_.substr(start, std::min(pos_, json_.size()) - start));
    ++pos_;
    if (stack_.empty() || stack_.back().array || !stack_.back().want_key) return absl::OkStatus();
    Frame& top = stack_.back();
    top.want_key = false;
    top.key = text;
    if (!top.keys.insert(FieldName(text)).second) return Error("given twice in one object");
    return absl::OkStatus();
  }

  // The field a key names, whatever its spelling: escapes decoded
  // ("r\u006fws" is "rows"), and the parser's two spellings of a field
  // ("row_bytes", "rowBytes") made one by dropping underscores and case.
  static std::string FieldName(std::string_view raw) {
    std::string out;
    for (size_t i = 0; i < raw.size(); ++i) {
      char c = raw[i];
      if (c == '\\' && i + 1 < raw.size()) {
        const char e = raw[++i];
        if (e == 'u' && i + 4 < raw.size()) {  // four hex digits follow
          uint32_t code = 0;
          for (int d = 1; d <= 4; ++d) {
            const char h = raw[i + d];
            code = code * 16 + static_cast<uint32_t>(h <= '9' ? h - '0' : (h | 0x20) - 'a' + 10);
          }
          i += 4;
          AppendUtf8(code, out);
          continue;
        }
        // Other escapes: \" \\ \/ stand for themselves; control characters
        // (\n, \t, ...) never make a valid field name either way.
        c = e;
      }
      out += c;
    }
    // One field, two spellings: folded once the escapes are decoded.
    std::erase(out, '_');
    absl::AsciiStrToLower(&out);
    return out;
  }

  // A code unit as UTF-8 (surrogates kept as their own three bytes: two
  // spellings of one key still compare equal).
  static void AppendUtf8(uint32_t code, std::string& out) {
    if (code < 0x80) {
      out += static_cast<char>(code);
    } else if (code < 0x800) {
      out += static_cast<char>(0xC0 | (code >> 6));
      out += static_cast<char>(0x80 | (code & 0x3F));
    } else {
      out += static_cast<char>(0xE0 | (code >> 12));
      out += static_cast<char>(0x80 | ((code >> 6) & 0x3F));
      out += static_cast<char>(0x80 | (code & 0x3F));
    }
  }

  absl::Status Error(const std::string& what) const {
    std::string path;
    for (const Frame& f : stack_) {
      if (f.array) {
        absl::StrAppend(&path, "[", f.index, "]");
      } else if (!f.key.empty()) {
        absl::StrAppend(&path, path.empty() ? "" : ".", ShortName(f.key));
      }
    }
    return absl::InvalidArgumentError(
        absl::StrCat("query JSON: ", path.empty() ? "top level" : path, ": ", what));
  }

  std::string_view json_;
  size_t pos_ = 0;
  std::vector<Frame> stack_;
};

}  // namespace

absl::Status CheckJsonShape(std::string_view json) { return ShapeScanner(json).Run(); }

}  // namespace sliceplan
