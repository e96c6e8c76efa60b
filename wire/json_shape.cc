#include "wire/json_shape.h"

#include <string>
#include <vector>

#include "absl/container/flat_hash_set.h"
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
    if (!top.keys.insert(text).second) return Error("given twice in one object");
    return absl::OkStatus();
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
