#include "rpc/flag_names.h"

#include <algorithm>

namespace sliceplan {

std::vector<char*> UnderscoreFlagNames(int argc, char** argv, std::vector<std::string>& storage) {
  storage.assign(argv, argv + argc);
  bool flags = true;
  for (size_t i = 1; i < storage.size(); ++i) {
    std::string& arg = storage[i];
    if (arg == "--") flags = false;
    if (!flags || arg.rfind("--", 0) != 0) continue;
    const size_t end = std::min(arg.find('='), arg.size());
    for (size_t c = 2; c < end; ++c) {
      if (arg[c] == '-') arg[c] = '_';
    }
  }
  std::vector<char*> out;
  for (std::string& s : storage) out.push_back(s.data());
  return out;
}

}  // namespace sliceplan
