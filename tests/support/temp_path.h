// A fresh path in the system's temporary directory for one test, removed
// before use and at the end (the process id keeps parallel runs apart).
#ifndef SLICEPLAN_TESTS_SUPPORT_TEMP_PATH_H_
#define SLICEPLAN_TESTS_SUPPORT_TEMP_PATH_H_

#include <unistd.h>

#include <filesystem>
#include <string>

namespace sliceplan::testing {

class TempPath {
 public:
  explicit TempPath(const std::string& name)
      : path_(std::filesystem::temp_directory_path() /
              ("sliceplan_" + std::to_string(getpid()) + "_" + name)) {
    std::filesystem::remove(path_);
  }
  ~TempPath() { std::filesystem::remove(path_); }
  TempPath(const TempPath&) = delete;
  TempPath& operator=(const TempPath&) = delete;
  std::string str() const { return path_.string(); }

 private:
  std::filesystem::path path_;
};

}  // namespace sliceplan::testing

#endif  // SLICEPLAN_TESTS_SUPPORT_TEMP_PATH_H_
