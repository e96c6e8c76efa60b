// One command of `sliceplan` (optimize, capacity, workers), its flags
// declared once as a table: name, the value's form, default, help and the
// setter that validates the value into the command's config. The parser
// (CLI11) and the help text are generated from the table; no flag is named
// anywhere else.
//
// Flags are spelled --name=VALUE (or --name VALUE); a switch is --name.
// Setters run in the order the flags were given, so a later value of a
// flag overrides an earlier one and a repeatable flag (--bound) sees each.
#ifndef SLICEPLAN_CLI_COMMAND_TABLE_H_
#define SLICEPLAN_CLI_COMMAND_TABLE_H_

#include <functional>
#include <string>
#include <vector>

#include "absl/status/status.h"

namespace sliceplan::cli {

struct FlagRow {
  std::string name;          // without the dashes: "shape"
  std::string value;         // the value's form in the help ("bushy|left-deep"); "" for a switch
  std::string default_text;  // the default as the help shows it; "" for none
  std::string help;
  // Validates and stores one value (a switch gets "true"). Errors name the
  // flag: "--shape=round: expected bushy or left-deep".
  std::function<absl::Status(const std::string&)> set;
};

struct CommandTable {
  std::string name;     // "optimize"
  std::string summary;  // one paragraph for the help
  // The operand ("QUERY.json") and what it is ("query file"); empty for a
  // command that takes none. Exactly one must be given.
  std::string operand;
  std::string operand_what;
  std::function<void(const std::string&)> set_operand;
  std::vector<FlagRow> flags;
};

// Parses the arguments after the command's name into the table's setters.
// INVALID_ARGUMENT naming the problem: an unknown flag ("--speed: unknown
// flag"), a flag without its value, a bad value (the setter's error), a
// missing or second operand.
absl::Status ParseCommand(const CommandTable& table, const std::vector<std::string>& args);

// The command's help: usage line, summary, one line per flag with its
// default.
std::string CommandHelp(const CommandTable& table);

// What a misspelt `given` most likely meant among `names`: the nearest by
// edits (at most 2, and at most a third of its length), else the only
// name it begins ("deadlin" for "deadline-seconds"); empty when neither.
std::string DidYouMean(const std::string& given, const std::vector<std::string>& names);

}  // namespace sliceplan::cli

#endif  // SLICEPLAN_CLI_COMMAND_TABLE_H_
