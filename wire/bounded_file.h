// Reading a file a person or a request names, with a limit: regular files
// only (a directory, a device such as /dev/zero or a pipe is refused by
// name before anything is read), and the size limit enforced while reading,
// not by the size the file claims, so no input can make a process read
// without end. Used for the query file, token files and TLS files in the
// CLI and both servers. Thread-safe.
#ifndef SLICEPLAN_WIRE_BOUNDED_FILE_H_
#define SLICEPLAN_WIRE_BOUNDED_FILE_H_

#include <cstdint>
#include <string>

#include "absl/status/statusor.h"

namespace sliceplan {

// The bytes of the file at `path`, at most `limit` of them. Errors name
// the path (shortened) and, where given, `what` (e.g. "--token-file"):
// NOT_FOUND or PERMISSION_DENIED when it cannot be opened; INVALID_ARGUMENT
// "is a directory" or "is not a regular file"; RESOURCE_EXHAUSTED "is
// larger than LIMIT bytes" as soon as more than `limit` bytes were read.
absl::StatusOr<std::string> ReadBoundedFile(const std::string& path, int64_t limit,
                                            const std::string& what = "");

}  // namespace sliceplan

#endif  // SLICEPLAN_WIRE_BOUNDED_FILE_H_
