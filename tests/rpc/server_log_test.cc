// The servers' log lines: text and JSON forms of a LogEvent and of a plain
// message. JSON validity is checked by hand against RFC 8259's grammar for
// the escapes used here; the process test parses whole logs with Python's
// json module.
#include "rpc/server_log.h"

#include <sstream>

#include "gtest/gtest.h"
#include "spdlog/sinks/ostream_sink.h"

namespace sliceplan {
namespace {

std::string Logged(LogFormat format, const std::string& message) {
  std::ostringstream out;
  auto sink = std::make_shared<spdlog::sinks::ostream_sink_mt>(out);
  auto logger = MakeServerLogger(format, "worker", sink);
  logger->info("{}", message);
  logger->flush();
  return out.str();
}

LogEvent Sample() {
  LogEvent e("slice");
  e.Add("request_id", "4f1c")
      .Add("index", 3)
      .Add("splits", uint64_t{580606446})
      .Add("seconds", 0.25)
      .Add("proven_optimal", true)
      .Add("error", "memo \"limit\" passed\n");
  return e;
}

TEST(LogEventTest, TextIsKeyValueWithQuotedValuesWhereNeeded) {
  EXPECT_EQ(Sample().payload(LogFormat::kText),
            "slice request_id=4f1c index=3 splits=580606446 seconds=0.25 proven_optimal=true "
            "error=\"memo \\\"limit\\\" passed\\n\"");
}

TEST(LogEventTest, JsonLineHasEachFieldAsAMember) {
  const std::string line = Logged(LogFormat::kJson, Sample().payload(LogFormat::kJson));
  // {"time":"2026-12-03T06:15:57.718Z","level":"info","server":"worker",...}
  ASSERT_EQ(line.rfind(R"({"time":")", 0), 0u) << line;
  EXPECT_EQ(line.substr(32),
            R"(Z","level":"info","server":"worker","event":"slice","request_id":"4f1c","index":3,)"
            R"("splits":580606446,"seconds":0.25,"proven_optimal":true,)"
            R"("error":"memo \"limit\" passed\n"})"
            "\n")
      << line;
}

TEST(LogEventTest, PlainMessageBecomesAnEscapedMsgMember) {
  const std::string line = Logged(LogFormat::kJson, "worker: 1 slice at once\t\x01");
  EXPECT_EQ(line.substr(32),
            R"(Z","level":"info","server":"worker","msg":"worker: 1 slice at once\t\u0001"})"
            "\n");
}

TEST(LogEventTest, NonFiniteNumbersAreNullInJson) {
  LogEvent e("x");
  e.Add("cost", 1.0 / 0.0);
  EXPECT_EQ(Logged(LogFormat::kJson, e.payload(LogFormat::kJson)).substr(32),
            R"(Z","level":"info","server":"worker","event":"x","cost":null})"
            "\n");
  EXPECT_EQ(e.payload(LogFormat::kText), "x cost=inf");
}

TEST(LogEventTest, TextLoggerKeepsTheMessage) {
  const std::string line = Logged(LogFormat::kText, Sample().payload(LogFormat::kText));
  EXPECT_NE(line.find("[worker] [info] slice request_id=4f1c index=3"), std::string::npos) << line;
}

TEST(LogFormatTest, ParsesTheTwoNamesAndRefusesOthers) {
  EXPECT_EQ(*ParseLogFormat("text"), LogFormat::kText);
  EXPECT_EQ(*ParseLogFormat("json"), LogFormat::kJson);
  const auto bad = ParseLogFormat("xml");
  ASSERT_FALSE(bad.ok());
  EXPECT_EQ(bad.status().message(), "--log-format: \"xml\" is not text or json");
}

}  // namespace
}  // namespace sliceplan
