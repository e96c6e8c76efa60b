// How both servers log: to stderr (stdout carries only the announced
// addresses), either as text lines for people or, with --log-format=json,
// as one JSON object per line for log collectors:
//
//   {"time":"2026-12-03T06:12:00.123Z","level":"info","server":"worker",
//    "event":"slice","request_id":"4f1c...","index":3,"seconds":0.21}
//
// A plain spdlog line becomes {"time":...,"level":...,"server":...,
// "msg":"..."}; a LogEvent's fields are written as fields of their own.
#ifndef SLICEPLAN_RPC_SERVER_LOG_H_
#define SLICEPLAN_RPC_SERVER_LOG_H_

#include <cstdint>
#include <memory>
#include <string>
#include <string_view>

#include "absl/status/statusor.h"
#include "spdlog/spdlog.h"

namespace sliceplan {

enum class LogFormat { kText, kJson };

// "text" or "json"; INVALID_ARGUMENT naming --log-format otherwise.
absl::StatusOr<LogFormat> ParseLogFormat(std::string_view name);

// A logger writing to `sink` in `format`, every line naming `server`
// ("worker", "coordinator").
std::shared_ptr<spdlog::logger> MakeServerLogger(LogFormat format, std::string_view server,
                                                 spdlog::sink_ptr sink);

// Makes spdlog's default logger MakeServerLogger on stderr, and LogEvent
// write in `format`. Call once, before serving.
void SetUpServerLog(LogFormat format, std::string_view server);

// One structured log line: an event name and key/value fields, in the
// order added. Text: `slice request_id=4f1c index=3 seconds=0.21`, a
// value with a space or quote written as a quoted string. JSON: each field
// a member, numbers as JSON numbers.
class LogEvent {
 public:
  explicit LogEvent(std::string_view event);

  LogEvent& Add(std::string_view key, std::string_view value);
  LogEvent& Add(std::string_view key, const char* value) {
    return Add(key, std::string_view(value));
  }
  LogEvent& Add(std::string_view key, double value);
  LogEvent& Add(std::string_view key, int64_t value);
  LogEvent& Add(std::string_view key, uint64_t value);
  LogEvent& Add(std::string_view key, int value) { return Add(key, int64_t{value}); }
  LogEvent& Add(std::string_view key, uint32_t value) { return Add(key, uint64_t{value}); }
  LogEvent& Add(std::string_view key, bool value);

  // Writes the line at `level` through the default logger, in the format
  // SetUpServerLog chose (text before it is called).
  void Log(spdlog::level::level_enum level = spdlog::level::info) const;

  // The message handed to a logger of `format` (what Log writes).
  std::string payload(LogFormat format) const;

 private:
  void AddRaw(std::string_view key, const std::string& text_value, const std::string& json_value);

  std::string text_;
  std::string json_;  // "event":"slice","index":3 (no braces)
};

}  // namespace sliceplan

#endif  // SLICEPLAN_RPC_SERVER_LOG_H_
