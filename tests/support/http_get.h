// A plain HTTP/1.0 GET over a socket, for the tests that scrape a
// server's /metrics (no client library: the request is one line).
#ifndef SLICEPLAN_TESTS_SUPPORT_HTTP_GET_H_
#define SLICEPLAN_TESTS_SUPPORT_HTTP_GET_H_

#include <map>
#include <string>

#include "absl/status/statusor.h"

namespace sliceplan::testing {

// The body of http://ADDRESS/PATH (ADDRESS as IPv4:PORT). Errors:
// UNAVAILABLE when it cannot connect, INTERNAL for an answer that is not
// "HTTP/1.x 200".
absl::StatusOr<std::string> HttpGet(const std::string& address, const std::string& path);

// The samples of a Prometheus text exposition: "name{labels}" (exactly as
// written) -> value; comment lines skipped.
std::map<std::string, double> ParseMetrics(const std::string& text);

}  // namespace sliceplan::testing

#endif  // SLICEPLAN_TESTS_SUPPORT_HTTP_GET_H_
