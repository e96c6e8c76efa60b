// A file the CLI writes besides its answer (--plot), made safe: checked
// before any work starts (so an unwritable path costs no search), never
// one of the command's inputs, never through a symbolic link, and written
// whole or not at all (a temporary file in the same directory, renamed
// over the path). Single-threaded.
#ifndef SLICEPLAN_CLI_OUTPUT_FILE_H_
#define SLICEPLAN_CLI_OUTPUT_FILE_H_

#include <string>
#include <vector>

#include "absl/status/statusor.h"

namespace sliceplan {

class OutputFile {
 public:
  // INVALID_ARGUMENT naming `flag`: the path is a directory, a symbolic
  // link, or the same file as one of `inputs`; or its directory does not
  // take a new file (the temporary file is created here).
  static absl::StatusOr<OutputFile> Prepare(const std::string& path, const std::string& flag,
                                            const std::vector<std::string>& inputs);
  OutputFile(OutputFile&& other) noexcept;
  OutputFile& operator=(OutputFile&&) = delete;
  OutputFile(const OutputFile&) = delete;
  ~OutputFile();  // removes the temporary file unless committed

  // Writes `text` to the temporary file and renames it over the path.
  // UNAVAILABLE naming the flag when writing fails (the old file stays).
  absl::Status Commit(const std::string& text);

 private:
  OutputFile(std::string path, std::string flag, std::string temp, int fd)
      : path_(std::move(path)), flag_(std::move(flag)), temp_(std::move(temp)), fd_(fd) {}

  std::string path_;
  std::string flag_;
  std::string temp_;  // empty once committed or moved from
  int fd_ = -1;
};

}  // namespace sliceplan

#endif  // SLICEPLAN_CLI_OUTPUT_FILE_H_
