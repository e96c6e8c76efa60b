#include "cli/output_file.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstdio>
#include <cstdlib>
#include <cstring>

#include "absl/strings/str_cat.h"
#include "core/model/user_text.h"

namespace sliceplan {
namespace {

absl::Status Refuse(const std::string& flag, const std::string& path, const std::string& why) {
  return absl::InvalidArgumentError(absl::StrCat(flag, ": ", ShortName(path), " ", why));
}

std::string DirectoryOf(const std::string& path) {
  const size_t slash = path.rfind('/');
  if (slash == std::string::npos) return ".";
  return slash == 0 ? "/" : path.substr(0, slash);
}

}  // namespace

absl::StatusOr<OutputFile> OutputFile::Prepare(const std::string& path, const std::string& flag,
                                               const std::vector<std::string>& inputs) {
  struct stat st {};
  if (lstat(path.c_str(), &st) == 0) {
    if (S_ISLNK(st.st_mode)) return Refuse(flag, path, "is a symbolic link; name the file itself");
    if (S_ISDIR(st.st_mode)) return Refuse(flag, path, "is a directory");
    if (!S_ISREG(st.st_mode)) return Refuse(flag, path, "is not a regular file");
    for (const std::string& input : inputs) {
      struct stat in {};
      if (stat(input.c_str(), &in) == 0 && in.st_dev == st.st_dev && in.st_ino == st.st_ino) {
        return Refuse(
            flag, path,
            absl::StrCat("is the input file ", ShortName(input), "; it would be overwritten"));
      }
    }
  }
  std::string temp = DirectoryOf(path) + "/.sliceplan-XXXXXX";
  const int fd = mkstemp(temp.data());
  if (fd < 0) {
    return Refuse(flag, path,
                  absl::StrCat("cannot be written (its directory: ", std::strerror(errno), ")"));
  }
  return OutputFile(path, flag, temp, fd);
}

OutputFile::OutputFile(OutputFile&& other) noexcept
    : path_(std::move(other.path_)),
      flag_(std::move(other.flag_)),
      temp_(std::move(other.temp_)),
      fd_(other.fd_) {
  other.temp_.clear();
  other.fd_ = -1;
}

OutputFile::~OutputFile() {
  if (fd_ >= 0) close(fd_);
  if (!temp_.empty()) unlink(temp_.c_str());
}

absl::Status OutputFile::Commit(const std::string& text) {
  const auto fail = [&](const char* step) {
    return absl::UnavailableError(absl::StrCat(flag_, ": cannot write ", ShortName(path_), " (",
                                               step, ": ", std::strerror(errno),
                                               "); the file was left as it was"));
  };
  for (size_t done = 0; done < text.size();) {
    const ssize_t n = write(fd_, text.data() + done, text.size() - done);
    if (n < 0) {
      if (errno == EINTR) continue;
      return fail("write");
    }
    done += static_cast<size_t>(n);
  }
  // mkstemp makes the file private; a plot is for reading.
  if (fchmod(fd_, 0644) != 0 || close(fd_) != 0) {
    fd_ = -1;
    return fail("close");
  }
  fd_ = -1;
  if (rename(temp_.c_str(), path_.c_str()) != 0) return fail("rename");
  temp_.clear();
  return absl::OkStatus();
}

}  // namespace sliceplan
