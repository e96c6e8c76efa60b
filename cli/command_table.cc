#include "cli/command_table.h"

#include <algorithm>
#include <map>
#include <memory>

#include "CLI/CLI.hpp"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_split.h"

namespace sliceplan::cli {
namespace {

// The help's width and the column its descriptions start at.
constexpr size_t kHelpWidth = 80;
constexpr size_t kNameColumn = 34;

// `text` broken into lines of at most `width` characters at spaces (a word
// longer than the width keeps its own line).
std::string Wrap(const std::string& text, size_t width) {
  std::string out;
  size_t line = 0;
  for (absl::string_view word : absl::StrSplit(text, ' ', absl::SkipEmpty())) {
    if (line > 0 && line + 1 + word.size() > width) {
      out += '\n';
      line = 0;
    } else if (line > 0) {
      out += ' ';
      ++line;
    }
    absl::StrAppend(&out, word);
    line += word.size();
  }
  return out;
}

struct BuiltApp {
  std::unique_ptr<CLI::App> app;
  std::string operand;  // the first operand; any other stays among the extras
  std::map<const CLI::Option*, const FlagRow*> rows;
};

// The CLI11 application of one command. Values are kept as strings: the
// rows' setters validate them, so errors read the same for every flag.
std::unique_ptr<BuiltApp> Build(const CommandTable& table) {
  auto built = std::make_unique<BuiltApp>();
  built->app =
      std::make_unique<CLI::App>(Wrap(table.summary, kHelpWidth) + "\n", "sliceplan " + table.name);
  CLI::App& app = *built->app;
  app.allow_extras();
  app.set_help_flag("--help", "print this help");
  app.get_formatter()->column_width(kNameColumn);
  if (!table.operand.empty()) {
    app.add_option(table.operand, built->operand, "the " + table.operand_what)->type_name("");
  }
  for (const FlagRow& row : table.flags) {
    std::string help = row.help;
    if (!row.default_text.empty()) absl::StrAppend(&help, " (default: ", row.default_text, ")");
    CLI::Option* option = nullptr;
    if (row.value.empty()) {
      option = app.add_flag("--" + row.name);
    } else {
      option = app.add_option("--" + row.name, [](const CLI::results_t&) { return true; });
      option->type_name(row.value)->multi_option_policy(CLI::MultiOptionPolicy::TakeAll);
    }
    option->description(Wrap(help, kHelpWidth - kNameColumn));
    built->rows[option] = &row;
  }
  return built;
}

// CLI11 reads "--name=" as a flag still waiting for its value; here it is
// the empty value, which the row's setter judges.
std::vector<std::string> Reversed(const std::vector<std::string>& args) {
  std::vector<std::string> out;
  for (auto it = args.rbegin(); it != args.rend(); ++it) {
    const bool empty_value = it->size() > 3 && it->rfind("--", 0) == 0 && it->back() == '=' &&
                             it->find('=') == it->size() - 1;
    if (empty_value) {
      out.push_back("");
      out.push_back(it->substr(0, it->size() - 1));
    } else {
      out.push_back(*it);
    }
  }
  return out;
}

absl::Status CheckOperands(const CommandTable& table, const std::vector<std::string>& operands) {
  if (table.operand.empty()) {
    if (operands.empty()) return absl::OkStatus();
    return absl::InvalidArgumentError(
        absl::StrCat(operands[0], ": unknown argument (", table.name, " takes no operand)"));
  }
  if (operands.empty()) {
    return absl::InvalidArgumentError(
        absl::StrCat(table.operand, ": no ", table.operand_what, " given"));
  }
  if (operands.size() > 1) {
    return absl::InvalidArgumentError(absl::StrCat(table.operand, ": a second ", table.operand_what,
                                                   " \"", operands[1], "\" was given"));
  }
  table.set_operand(operands[0]);
  return absl::OkStatus();
}

// Edits (insertions, deletions, substitutions) between a and b.
size_t EditDistance(const std::string& a, const std::string& b) {
  std::vector<size_t> row(b.size() + 1);
  for (size_t j = 0; j <= b.size(); ++j) row[j] = j;
  for (size_t i = 1; i <= a.size(); ++i) {
    size_t diagonal = row[0];
    row[0] = i;
    for (size_t j = 1; j <= b.size(); ++j) {
      const size_t up = row[j];
      row[j] = std::min({row[j] + 1, row[j - 1] + 1, diagonal + (a[i - 1] != b[j - 1])});
      diagonal = up;
    }
  }
  return row[b.size()];
}

// "--shap: unknown flag; did you mean --shape?", or for a switch given a
// value, how to give it.
absl::Status UnknownFlag(const CommandTable& table, const std::string& given) {
  const std::string name = given.substr(given.find_first_not_of('-'));
  std::vector<std::string> names;
  for (const FlagRow& row : table.flags) {
    if (row.name == name && row.value.empty()) {
      return absl::InvalidArgumentError(
          absl::StrCat(given, ": a switch takes no value; give --", name, " alone"));
    }
    names.push_back(row.name);
  }
  if (const std::string meant = DidYouMean(name, names); !meant.empty()) {
    return absl::InvalidArgumentError(
        absl::StrCat(given, ": unknown flag; did you mean --", meant, "?"));
  }
  return absl::InvalidArgumentError(absl::StrCat(given, ": unknown flag (see --help)"));
}

}  // namespace

absl::Status ParseCommand(const CommandTable& table, const std::vector<std::string>& args) {
  std::unique_ptr<BuiltApp> built = Build(table);
  std::vector<std::string> reversed = Reversed(args);
  try {
    built->app->parse(reversed);
  } catch (const CLI::ArgumentMismatch& e) {  // "--shape: 1 required ... missing"
    const std::string what = e.what();
    const std::string flag = what.substr(0, what.find(':'));
    return absl::InvalidArgumentError(
        absl::StrCat(flag, ": flags take a value, as in ", flag, "=VALUE"));
  } catch (const CLI::ParseError& e) {
    return absl::InvalidArgumentError(e.what());
  }
  std::vector<std::string> operands;
  if (!built->operand.empty()) operands.push_back(built->operand);
  for (const std::string& extra : built->app->remaining()) {
    if (extra.rfind("-", 0) == 0) return UnknownFlag(table, extra.substr(0, extra.find('=')));
    operands.push_back(extra);
  }
  if (absl::Status s = CheckOperands(table, operands); !s.ok()) return s;
  std::map<const CLI::Option*, size_t> seen;
  for (const CLI::Option* option : built->app->parse_order()) {
    const auto row = built->rows.find(option);
    if (row == built->rows.end()) continue;  // the operand
    const size_t k = seen[option]++;
    const std::string value = row->second->value.empty() ? "true" : option->results().at(k);
    if (absl::Status s = row->second->set(value); !s.ok()) return s;
  }
  return absl::OkStatus();
}

std::string CommandHelp(const CommandTable& table) { return Build(table)->app->help(); }

std::string DidYouMean(const std::string& given, const std::vector<std::string>& names) {
  const std::string* nearest = nullptr;
  size_t best = 0;
  for (const std::string& name : names) {
    const size_t d = EditDistance(given, name);
    if (nearest == nullptr || d < best) nearest = &name, best = d;
  }
  if (nearest != nullptr && best <= 2 && 3 * best <= given.size()) return *nearest;
  const std::string* begun = nullptr;
  for (const std::string& name : names) {
    if (given.size() < 3 || name.rfind(given, 0) != 0) continue;
    if (begun != nullptr) return "";  // begins two: no guess
    begun = &name;
  }
  return begun != nullptr ? *begun : "";
}

}  // namespace sliceplan::cli
