#include "cli/command_table.h"

#include <string>
#include <vector>

#include "cli/cli_config.h"
#include "gtest/gtest.h"

namespace sliceplan::cli {
namespace {

struct Seen {
  std::string operand;
  std::vector<std::string> values;  // "name=value" in the order the setters ran
};

CommandTable Table(Seen& seen) {
  auto record = [&seen](const std::string& name) {
    return [&seen, name](const std::string& v) {
      if (v == "bad") return absl::InvalidArgumentError("--" + name + "=bad: expected good");
      seen.values.push_back(name + "=" + v);
      return absl::OkStatus();
    };
  };
  return {"try",
          "A command for the test.",
          "FILE",
          "input file",
          [&seen](const std::string& f) { seen.operand = f; },
          {{"mode", "a|b", "a", "the mode", record("mode")},
           {"bound", "B", "", "repeatable", record("bound")},
           {"quiet", "", "", "no noise", record("quiet")}}};
}

TEST(CommandTableTest, SettersRunInTheOrderGiven) {
  Seen seen;
  ASSERT_TRUE(ParseCommand(Table(seen),
                           {"--bound=1", "f", "--mode", "b", "--quiet", "--bound=2", "--mode=a"})
                  .ok());
  EXPECT_EQ(seen.operand, "f");
  EXPECT_EQ(seen.values,
            (std::vector<std::string>{"bound=1", "mode=b", "quiet=true", "bound=2", "mode=a"}));
}

TEST(CommandTableTest, AnEmptyValueReachesTheSetter) {
  Seen seen;
  ASSERT_TRUE(ParseCommand(Table(seen), {"f", "--mode=", "--bound=3"}).ok());
  EXPECT_EQ(seen.values, (std::vector<std::string>{"mode=", "bound=3"}));
}

TEST(CommandTableTest, RefusalsNameTheProblem) {
  const std::pair<std::vector<std::string>, std::string> cases[] = {
      {{"f", "--mode=bad"}, "--mode=bad: expected good"},
      {{"f", "--speed=3"}, "--speed: unknown flag (see --help)"},
      {{"f", "-x"}, "-x: unknown flag (see --help)"},
      // A near miss gets a suggestion: one edit from "mode", two from "bound".
      {{"f", "--mod=a"}, "--mod: unknown flag; did you mean --mode?"},
      {{"f", "--bond=2"}, "--bond: unknown flag; did you mean --bound?"},
      {{"f", "--mode"}, "--mode: flags take a value, as in --mode=VALUE"},
      {{"f", "g"}, "FILE: a second input file \"g\" was given"},
      {{"--quiet"}, "FILE: no input file given"},
  };
  for (const auto& [args, message] : cases) {
    Seen seen;
    const absl::Status s = ParseCommand(Table(seen), args);
    EXPECT_EQ(s.code(), absl::StatusCode::kInvalidArgument) << message;
    EXPECT_EQ(s.message(), message);
  }
}

TEST(CommandTableTest, DidYouMeanTakesTheNearestThenTheOnlyNameBegun) {
  const std::vector<std::string> names = {"deadline-seconds", "shape", "sample-rates", "slices"};
  EXPECT_EQ(DidYouMean("shap", names), "shape");                // one edit
  EXPECT_EQ(DidYouMean("deadlin", names), "deadline-seconds");  // the only name it begins
  EXPECT_EQ(DidYouMean("s", names), "");                        // too short to guess
  EXPECT_EQ(DidYouMean("sl", names), "");
  EXPECT_EQ(DidYouMean("speed", names), "");  // nothing near
  EXPECT_EQ(DidYouMean("optimise", {"optimize", "workers"}), "optimize");
}

TEST(CommandTableTest, HelpListsEveryFlagWithItsDefault) {
  Seen seen;
  const std::string help = CommandHelp(Table(seen));
  EXPECT_NE(help.find("A command for the test."), std::string::npos) << help;
  EXPECT_NE(help.find("--mode a|b"), std::string::npos) << help;
  EXPECT_NE(help.find("the mode (default: a)"), std::string::npos) << help;
  EXPECT_NE(help.find("--bound B"), std::string::npos) << help;
  EXPECT_NE(help.find("no noise"), std::string::npos) << help;
  EXPECT_EQ(help.find("TEXT"), std::string::npos) << help;  // no type names of the library
}

// The flag spellings docs/interfaces.md fixes, each in its command's help.
TEST(CommandTableTest, EveryDocumentedFlagIsInTheHelp) {
  const std::pair<std::string, std::vector<std::string>> documented[] = {
      {"optimize",
       {"--shape",
        "--cross-products",
        "--cost",
        "--slices",
        "--workers",
        "--coordinator",
        "--format",
        "--tier",
        "--deadline-seconds",
        "--threads-per-worker",
        "--tls-ca",
        "--tls-cert",
        "--tls-key",
        "--token-file",
        "--partial-on-deadline",
        "--memo-limit",
        "--plot",
        "--objectives",
        "--alpha",
        "--bound",
        "--prefer",
        "--sample-rates",
        "--node-counts",
        "--budget-seconds",
        "--quiet"}},
      {"capacity",
       {"--deadline-seconds", "--shape", "--cross-products", "--threads-per-worker", "--format",
        "--plot", "--coordinator", "--seconds-per-split", "--seconds-per-connected-set"}},
      {"workers", {"--coordinator", "--tls-ca", "--tls-cert", "--tls-key", "--token-file"}},
  };
  for (const auto& [command, flags] : documented) {
    const std::string help = CommandUsage(command);
    for (const std::string& flag : flags) {
      EXPECT_NE(help.find("  " + flag + " "), std::string::npos) << command << " " << flag;
    }
  }
}

}  // namespace
}  // namespace sliceplan::cli
