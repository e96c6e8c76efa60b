// The prepared-query commands (docs/templates.md):
//   sliceplan prepare TEMPLATE.json --out=PLANS [--max-ratio=R] [--grid=G]
//       [--workers=N | --coordinator=HOST:PORT [--tls-ca ... --token-file]]
//       [--format=text|json]
//   sliceplan choose PLANS --set=NAME=VALUE[,NAME=VALUE...] [--robust]
//       [--format=text|json]
// Each parses its arguments from its flag table, runs, and returns what
// goes to stdout; errors name the flag or the input.
#ifndef SLICEPLAN_CLI_TEMPLATE_COMMANDS_H_
#define SLICEPLAN_CLI_TEMPLATE_COMMANDS_H_

#include <string>
#include <vector>

#include "absl/status/statusor.h"

namespace sliceplan::cli {

// `cores`: the default worker count. Writes the plan set to --out (checked
// before the work starts, written whole) and returns the report.
absl::StatusOr<std::string> RunPrepare(const std::vector<std::string>& args, int cores);
absl::StatusOr<std::string> RunChoose(const std::vector<std::string>& args);

// The help of "prepare" or "choose"; empty for another name.
std::string TemplateCommandUsage(const std::string& command);

}  // namespace sliceplan::cli

#endif  // SLICEPLAN_CLI_TEMPLATE_COMMANDS_H_
