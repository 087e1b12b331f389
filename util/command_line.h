// Command-line parsing for the project's binaries (shellwright,
// shellwrightd, shellwright_loadgen, compile_tables), on CLI11: real
// subcommands, each option accepted only where it means something, values
// checked against their ranges or name tables, and one way to fail.
//
// A usage error prints "<program>: <problem>" and "Run '<command> --help'
// for usage." on stderr and makes the binary exit 2; --help prints the
// help of the command it follows on stdout and exits 0.
//
// Example:
//
//   CLI::App app{"describe atoms", "shellwright"};
//   auto* atom = app.add_subcommand("atom", "describe an atom or ion");
//   std::string geometry = "free";
//   atom->add_option("--geometry", geometry)
//       ->check(shellwright::OneOf<shellwright::Geometry>());
//   int jobs = 0;
//   app.add_option("--jobs", jobs)->check(shellwright::IntegerIn(1, 256));
//   if (std::optional<int> exit = shellwright::ParseCommandLine(
//           app, argc, argv, std::cout, std::cerr)) {
//     return *exit;
//   }
//
// Thread safety: call from one thread (main).

#ifndef SHELLWRIGHT_UTIL_COMMAND_LINE_H_
#define SHELLWRIGHT_UTIL_COMMAND_LINE_H_

#include <cmath>
#include <cstdint>
#include <functional>
#include <optional>
#include <ostream>
#include <string>

#include "CLI/CLI.hpp"
#include "absl/status/status.h"
#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_join.h"
#include "absl/strings/strip.h"
#include "util/enum_names.h"
#include "util/utf8.h"

namespace shellwright {

// Exit code of a usage error, for every binary.
inline constexpr int kExitUsage = 2;

// A decimal integer from `lo` to `hi`.
inline CLI::Validator IntegerIn(int64_t lo, int64_t hi) {
  return CLI::Validator(
      [lo, hi](std::string& text) -> std::string {
        int64_t value = 0;
        if (!absl::SimpleAtoi(text, &value) || value < lo || value > hi) {
          return absl::StrCat(QuoteForMessage(text), " is not an integer from ",
                              lo, " to ", hi);
        }
        return "";
      },
      absl::StrCat(lo, "..", hi));
}

// Any decimal integer that fits an int.
inline CLI::Validator Integer() {
  return CLI::Validator(
      [](std::string& text) -> std::string {
        int value = 0;
        return absl::SimpleAtoi(text, &value)
                   ? ""
                   : absl::StrCat(QuoteForMessage(text), " is not an integer");
      },
      "");
}

// Any finite number.
inline CLI::Validator FiniteNumber() {
  return CLI::Validator(
      [](std::string& text) -> std::string {
        double value = 0;
        return absl::SimpleAtod(text, &value) && std::isfinite(value)
                   ? ""
                   : absl::StrCat(QuoteForMessage(text),
                                  " is not a finite number");
      },
      "");
}

// A finite number from `lo` to `hi`; above `lo` only when `above_lo`.
inline CLI::Validator NumberIn(double lo, double hi, bool above_lo = false) {
  return CLI::Validator(
      [lo, hi, above_lo](std::string& text) -> std::string {
        double value = 0;
        if (!absl::SimpleAtod(text, &value) || !std::isfinite(value) ||
            value < lo || (above_lo && value == lo) || value > hi) {
          return absl::StrCat(QuoteForMessage(text), " is not a number ",
                              above_lo ? "above " : "from ", lo, " to ", hi);
        }
        return "";
      },
      absl::StrCat(above_lo ? "(" : "[", lo, ", ", hi, "]"));
}

// One of the names of enum E (util/enum_names.h), aliases included.
template <typename E>
CLI::Validator OneOf() {
  return CLI::Validator(
      [](std::string& text) -> std::string {
        absl::StatusOr<E> value = ParseName<E>(text);
        return value.ok() ? "" : std::string(value.status().message());
      },
      absl::StrJoin(NameList<E>(), "|"));
}

// Whatever `check` accepts; its error's message otherwise.
inline CLI::Validator Accepts(
    std::function<absl::Status(const std::string&)> check,
    std::string description) {
  return CLI::Validator(
      [check = std::move(check)](std::string& text) -> std::string {
        absl::Status status = check(text);
        return status.ok() ? "" : std::string(status.message());
      },
      std::move(description));
}

// A hidden option that is refused whenever given, with `why` (which names
// the option): for options that must not exist, such as a secret on the
// command line, but that users try.
inline void RefuseOption(CLI::App* app, const std::string& name,
                         const std::string& why) {
  app->add_option(name)
      ->check(CLI::Validator([why](std::string&) -> std::string { return why; },
                             ""))
      ->group("");
}

// Parses argv into `app`. Returns nullopt to go on, or the exit code the
// binary should return: 0 after printing the help asked for (on `out`),
// kExitUsage after printing a usage error (on `err`). Unknown options and
// extra operands are usage errors naming them and the command they were
// given to.
inline std::optional<int> ParseCommandLine(CLI::App& app, int argc,
                                           const char* const* argv,
                                           std::ostream& out,
                                           std::ostream& err) {
  // Extras are collected and reported here, in words naming the command,
  // rather than by CLI11.
  app.allow_extras();
  for (CLI::App* sub : app.get_subcommands({})) sub->allow_extras();
  const std::string program = app.get_name();
  // "shellwright atom" once the command is known.
  auto command_of = [&program](CLI::App& app) {
    std::string command = program;
    for (CLI::App* sub : app.get_subcommands()) {
      command = absl::StrCat(program, " ", sub->get_name());
    }
    return command;
  };
  auto usage = [&](const std::string& command, const std::string& problem) {
    err << program << ": " << problem << "\nRun '" << command
        << " --help' for usage.\n";
    return kExitUsage;
  };
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    if (e.get_exit_code() == static_cast<int>(CLI::ExitCodes::Success)) {
      return app.exit(e, out, err);  // --help.
    }
    if (e.get_name() == "ArgumentMismatch") {
      // CLI11 says "--out: 1 required TEXT missing".
      const std::string what = e.what();
      return usage(command_of(app),
                   absl::StrCat("option ", what.substr(0, what.find(':')),
                                " needs a value"));
    }
    if (!app.get_subcommands({}).empty() && app.get_subcommands().empty()) {
      // No command: say which word was not one, or that none was given.
      const std::vector<std::string> extras = app.remaining();
      for (const std::string& extra : extras) {
        if (extra[0] != '-') {
          return usage(program, absl::StrCat("unknown command ",
                                             QuoteForMessage(extra)));
        }
      }
      if (!extras.empty()) {
        return usage(program,
                     absl::StrCat(program, " has no option ",
                                  extras[0].substr(0, extras[0].find('='))));
      }
      if (e.get_name() == "RequiredError") {
        return usage(program, "no command given");
      }
    }
    // CLI11 names a hidden option "" in its messages (": why"); the
    // messages of RefuseOption name their option themselves.
    return usage(command_of(app),
                 std::string(absl::StripPrefix(e.what(), ": ")));
  }
  std::vector<std::string> extras = app.remaining();
  std::string where = program;
  for (CLI::App* sub : app.get_subcommands()) {
    for (const std::string& extra : sub->remaining()) extras.push_back(extra);
    where = sub->get_name();
  }
  const std::string command = command_of(app);
  if (extras.empty()) return std::nullopt;
  const std::string& first = extras.front();
  if (first.size() > 1 && first[0] == '-') {
    return usage(command, absl::StrCat(where, " has no option ",
                                       first.substr(0, first.find('='))));
  }
  return usage(command, absl::StrCat("unexpected argument ",
                                     QuoteForMessage(first), " for ", where));
}

}  // namespace shellwright

#endif  // SHELLWRIGHT_UTIL_COMMAND_LINE_H_
