// The version line every binary prints for --version: the project's
// version (CMakeLists.txt) and the build type it was compiled as.
#ifndef SLICEPLAN_WIRE_VERSION_H_
#define SLICEPLAN_WIRE_VERSION_H_

#include <string>

namespace sliceplan {

// "sliceplan-worker 0.1.0 (RelWithDebInfo build)".
std::string VersionLine(const std::string& binary);

}  // namespace sliceplan

#endif  // SLICEPLAN_WIRE_VERSION_H_
