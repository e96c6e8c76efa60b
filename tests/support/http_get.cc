#include "tests/support/http_get.h"

#include <arpa/inet.h>
#include <netinet/in.h>
#include <sys/socket.h>
#include <unistd.h>

#include <sstream>

#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"

namespace sliceplan::testing {

absl::StatusOr<std::string> HttpGet(const std::string& address, const std::string& path) {
  const size_t colon = address.rfind(':');
  sockaddr_in to{};
  to.sin_family = AF_INET;
  int port = 0;
  if (colon == std::string::npos || !absl::SimpleAtoi(address.substr(colon + 1), &port) ||
      inet_pton(AF_INET, address.substr(0, colon).c_str(), &to.sin_addr) != 1) {
    return absl::InvalidArgumentError(absl::StrCat("not IPv4:PORT: ", address));
  }
  to.sin_port = htons(static_cast<uint16_t>(port));
  const int fd = socket(AF_INET, SOCK_STREAM, 0);
  if (fd < 0) return absl::InternalError("socket failed");
  if (connect(fd, reinterpret_cast<const sockaddr*>(&to), sizeof to) != 0) {
    close(fd);
    return absl::UnavailableError(absl::StrCat("cannot connect to ", address));
  }
  const std::string request =
      absl::StrCat("GET ", path, " HTTP/1.0\r\nHost: ", address, "\r\n\r\n");
  if (write(fd, request.data(), request.size()) != static_cast<ssize_t>(request.size())) {
    close(fd);
    return absl::InternalError("short write");
  }
  std::string answer;
  char buf[4096];
  for (ssize_t n; (n = read(fd, buf, sizeof buf)) > 0;) answer.append(buf, static_cast<size_t>(n));
  close(fd);
  const size_t body = answer.find("\r\n\r\n");
  if (answer.rfind("HTTP/1.", 0) != 0 || answer.find(" 200 ") > answer.find("\r\n") ||
      body == std::string::npos) {
    return absl::InternalError(absl::StrCat("bad answer: ", answer.substr(0, 200)));
  }
  return answer.substr(body + 4);
}

std::map<std::string, double> ParseMetrics(const std::string& text) {
  std::map<std::string, double> out;
  std::istringstream lines(text);
  for (std::string line; std::getline(lines, line);) {
    if (line.empty() || line[0] == '#') continue;
    const size_t space = line.rfind(' ');
    double value = 0;
    if (space == std::string::npos || !absl::SimpleAtod(line.substr(space + 1), &value)) continue;
    out[line.substr(0, space)] = value;
  }
  return out;
}

}  // namespace sliceplan::testing
