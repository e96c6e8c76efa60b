#include "wire/bounded_file.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>

#include "absl/strings/str_cat.h"
#include "core/model/user_text.h"

namespace sliceplan {
namespace {

// Closes a descriptor on every path out.
class Descriptor {
 public:
  explicit Descriptor(int fd) : fd_(fd) {}
  ~Descriptor() {
    if (fd_ >= 0) close(fd_);
  }
  Descriptor(const Descriptor&) = delete;
  Descriptor& operator=(const Descriptor&) = delete;
  int get() const { return fd_; }

 private:
  int fd_;
};

constexpr size_t kChunk = 64 << 10;

}  // namespace

absl::StatusOr<std::string> ReadBoundedFile(const std::string& path, int64_t limit,
                                            const std::string& what) {
  const std::string name = absl::StrCat(what.empty() ? "" : what + ": ", ShortName(path));
  // O_NONBLOCK: opening a pipe with no writer must not wait (a regular
  // file ignores it).
  const Descriptor fd(open(path.c_str(), O_RDONLY | O_CLOEXEC | O_NONBLOCK));
  if (fd.get() < 0) {
    const int err = errno;
    const std::string why = absl::StrCat(name, ": ", std::strerror(err));
    return err == EACCES ? absl::PermissionDeniedError(why) : absl::NotFoundError(why);
  }
  struct stat st {};
  if (fstat(fd.get(), &st) != 0) {
    return absl::NotFoundError(absl::StrCat(name, ": ", std::strerror(errno)));
  }
  if (S_ISDIR(st.st_mode)) return absl::InvalidArgumentError(absl::StrCat(name, " is a directory"));
  if (!S_ISREG(st.st_mode)) {
    return absl::InvalidArgumentError(absl::StrCat(name, " is not a regular file"));
  }
  std::string out;
  char buffer[kChunk];
  for (;;) {
    const ssize_t got = read(fd.get(), buffer, sizeof buffer);
    if (got < 0) {
      if (errno == EINTR) continue;
      return absl::DataLossError(absl::StrCat(name, ": ", std::strerror(errno)));
    }
    if (got == 0) return out;
    if (static_cast<int64_t>(out.size()) + got > limit) {
      return absl::ResourceExhaustedError(
          absl::StrCat(name, " is larger than ", limit, " bytes (the limit)"));
    }
    out.append(buffer, static_cast<size_t>(got));
  }
}

}  // namespace sliceplan
