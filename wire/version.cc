#include "wire/version.h"

#include "absl/strings/str_cat.h"

namespace sliceplan {

std::string VersionLine(const std::string& binary) {
  const char* type = SLICEPLAN_BUILD_TYPE;
  return absl::StrCat(binary, " ", SLICEPLAN_VERSION, " (", *type ? type : "unspecified",
                      " build)");
}

}  // namespace sliceplan
