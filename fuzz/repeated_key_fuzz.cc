// libFuzzer target: a key given twice in one object is refused whatever
// its spelling (docs/interfaces.md's query JSON; wire/json_shape.h). The
// input picks an object of a small valid query, one of its keys, the
// duplicate's spelling (the field's other name where it has one, any of
// its characters as a \u escape in either case of hex) and where the
// duplicate goes; the query with the duplicate must be refused as "given
// twice", and the same query with the key only respelled, not repeated,
// must parse as the plain one does.
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "absl/strings/str_format.h"
#include "wire/query_proto.h"

namespace {

struct Member {
  std::vector<std::string> spellings;  // the parser's names for the field
  std::string value;                   // JSON text
};
using Object = std::vector<Member>;

const std::vector<Object>& Objects() {
  static const auto* objects = new std::vector<Object>{
      // 0: a relation, 1: another, 2: a predicate, 3: the top level
      {{{"name"}, "\"berths\""}, {{"rows"}, "1200"}, {{"row_bytes", "rowBytes"}, "64"}},
      {{{"name"}, "\"cranes\""}, {{"rows"}, "300"}, {{"row_bytes", "rowBytes"}, "48"}},
      {{{"relations"}, "[\"berths\", \"cranes\"]"}, {{"selectivity"}, "0.01"}},
      {{{"relations"}, ""}, {{"predicates"}, ""}},
  };
  return *objects;
}

// Reads the fuzzer's bytes one at a time, zeros once they run out.
class Bytes {
 public:
  Bytes(const uint8_t* data, size_t size) : data_(data), size_(size) {}
  uint8_t Next() { return pos_ < size_ ? data_[pos_++] : 0; }

 private:
  const uint8_t* data_;
  size_t size_;
  size_t pos_ = 0;
};

// `name` with each character escaped as \uXXXX where the input says so.
std::string Respell(const std::string& name, Bytes& in) {
  std::string out;
  for (char c : name) {
    const uint8_t b = in.Next();
    if (b & 1) {
      const unsigned code = static_cast<unsigned char>(c);
      out += (b & 2) ? absl::StrFormat("\\u%04X", code) : absl::StrFormat("\\u%04x", code);
    } else {
      out += c;
    }
  }
  return out;
}

struct Twist {
  size_t object = SIZE_MAX, member = 0;  // SIZE_MAX: no twist
  std::string spelling;                  // the key as written for the respelled member
  bool repeat = false;                   // written twice (the original spelling first or last)
  bool respelled_first = false;
};

std::string Render(size_t k, const Twist& t);

// One member of object `k`; the top level's arrays hold the other objects.
std::string RenderMember(size_t k, size_t i, const std::string& key, const Twist& t) {
  std::string value = Objects()[k][i].value;
  if (k == 3) {
    value = i == 0 ? "[" + Render(0, t) + ", " + Render(1, t) + "]" : "[" + Render(2, t) + "]";
  }
  return "\"" + key + "\": " + value;
}

// Object `k` as JSON (3: the whole query), with the twist where it applies.
std::string Render(size_t k, const Twist& t) {
  const Object& object = Objects()[k];
  std::string out = "{";
  for (size_t i = 0; i < object.size(); ++i) {
    std::vector<std::string> keys = {object[i].spellings[0]};
    if (k == t.object && i == t.member) {
      keys = {t.spelling};
      if (t.repeat) {
        keys.push_back(object[i].spellings[0]);
        if (!t.respelled_first) std::swap(keys[0], keys[1]);
      }
    }
    for (const std::string& key : keys) {
      if (out.size() > 1) out += ", ";
      out += RenderMember(k, i, key, t);
    }
  }
  return out + "}";
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  Bytes in(data, size);
  Twist t;
  t.object = in.Next() % Objects().size();
  const Object& object = Objects()[t.object];
  t.member = in.Next() % object.size();
  const Member& m = object[t.member];
  t.respelled_first = in.Next() & 1;
  t.spelling = Respell(m.spellings[in.Next() % m.spellings.size()], in);

  t.repeat = false;
  const auto plain = sliceplan::ParseQueryJson(Render(3, {}));
  const auto respelled = sliceplan::ParseQueryJson(Render(3, t));
  // Respelled alone, the query is the plain one, field for field.
  if (!plain.ok() || !respelled.ok() ||
      sliceplan::QueryToProto(*respelled).SerializeAsString() !=
          sliceplan::QueryToProto(*plain).SerializeAsString()) {
    __builtin_trap();
  }

  t.repeat = true;
  const auto twice = sliceplan::ParseQueryJson(Render(3, t));
  if (twice.ok() || twice.status().message().find("given twice") == std::string_view::npos) {
    __builtin_trap();
  }
  return 0;
}
