#include "rpc/server_log.h"

#include <atomic>
#include <cmath>
#include <memory>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "core/model/json_text.h"
#include "spdlog/pattern_formatter.h"
#include "spdlog/sinks/stdout_color_sinks.h"

namespace sliceplan {
namespace {

// A LogEvent's JSON members travel in the message behind this byte, so the
// formatter can tell them from a plain message (which it quotes).
constexpr char kFieldsMark = '\x1e';

std::atomic<bool> json_logs{false};

// %J in the JSON pattern: the message as members of the line's object.
class JsonPayload final : public spdlog::custom_flag_formatter {
 public:
  void format(const spdlog::details::log_msg& msg, const std::tm&,
              spdlog::memory_buf_t& dest) override {
    const std::string_view payload(msg.payload.data(), msg.payload.size());
    const std::string out = !payload.empty() && payload.front() == kFieldsMark
                                ? std::string(payload.substr(1))
                                : absl::StrCat("\"msg\":", JsonString(payload));
    dest.append(out.data(), out.data() + out.size());
  }
  std::unique_ptr<custom_flag_formatter> clone() const override {
    return std::make_unique<JsonPayload>();
  }
};

// A text value as it stands when it is one plain word, quoted otherwise.
std::string TextValue(std::string_view v) {
  const bool plain = !v.empty() && v.find_first_of(" \"=\t\n\r\\") == std::string_view::npos;
  return plain ? std::string(v) : JsonString(v);
}

}  // namespace

absl::StatusOr<LogFormat> ParseLogFormat(std::string_view name) {
  if (name == "text") return LogFormat::kText;
  if (name == "json") return LogFormat::kJson;
  return absl::InvalidArgumentError(
      absl::StrCat("--log-format: \"", std::string(name.substr(0, 32)), "\" is not text or json"));
}

std::shared_ptr<spdlog::logger> MakeServerLogger(LogFormat format, std::string_view server,
                                                 spdlog::sink_ptr sink) {
  auto logger = std::make_shared<spdlog::logger>(std::string(server), std::move(sink));
  if (format == LogFormat::kJson) {
    auto formatter = std::make_unique<spdlog::pattern_formatter>(spdlog::pattern_time_type::utc);
    formatter->add_flag<JsonPayload>('J');  // before the pattern, which is parsed when set
    formatter->set_pattern(absl::StrCat(R"({"time":"%Y-%m-%dT%H:%M:%S.%eZ","level":"%l","server":)",
                                        JsonString(server), ",%J}"));
    logger->set_formatter(std::move(formatter));
  } else {
    logger->set_pattern("[%Y-%m-%d %H:%M:%S.%e] [%n] [%l] %v");
  }
  return logger;
}

void SetUpServerLog(LogFormat format, std::string_view server) {
  json_logs = format == LogFormat::kJson;
  spdlog::set_default_logger(
      MakeServerLogger(format, server, std::make_shared<spdlog::sinks::stderr_color_sink_mt>()));
}

LogEvent::LogEvent(std::string_view event)
    : text_(event), json_(absl::StrCat("\"event\":", JsonString(event))) {}

void LogEvent::AddRaw(std::string_view key, const std::string& text_value,
                      const std::string& json_value) {
  absl::StrAppend(&text_, " ", std::string(key), "=", text_value);
  absl::StrAppend(&json_, ",", JsonString(key), ":", json_value);
}

LogEvent& LogEvent::Add(std::string_view key, std::string_view value) {
  AddRaw(key, TextValue(value), JsonString(value));
  return *this;
}

LogEvent& LogEvent::Add(std::string_view key, double value) {
  // Nine digits: enough for a log line; %g's forms are all JSON numbers.
  const std::string shown = absl::StrFormat("%.9g", value);
  AddRaw(key, shown, std::isfinite(value) ? shown : "null");
  return *this;
}

LogEvent& LogEvent::Add(std::string_view key, int64_t value) {
  AddRaw(key, absl::StrCat(value), absl::StrCat(value));
  return *this;
}

LogEvent& LogEvent::Add(std::string_view key, uint64_t value) {
  AddRaw(key, absl::StrCat(value), absl::StrCat(value));
  return *this;
}

LogEvent& LogEvent::Add(std::string_view key, bool value) {
  AddRaw(key, value ? "true" : "false", value ? "true" : "false");
  return *this;
}

void LogEvent::Log(spdlog::level::level_enum level) const {
  spdlog::log(level, "{}", json_logs ? payload(LogFormat::kJson) : text_);
}

std::string LogEvent::payload(LogFormat format) const {
  return format == LogFormat::kJson ? absl::StrCat(std::string(1, kFieldsMark), json_) : text_;
}

}  // namespace sliceplan
