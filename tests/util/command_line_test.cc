// Tests for util/command_line.h: the validators' messages and how
// ParseCommandLine reports misuse.

#include "util/command_line.h"

#include <sstream>
#include <string>
#include <vector>

#include "gmock/gmock.h"
#include "gtest/gtest.h"

namespace shellwright {

enum class Flavour { kSweet, kSour };

template <>
struct EnumNames<Flavour> {
  static constexpr absl::string_view kWhat = "flavour";
  static constexpr NamedValue<Flavour> kNames[] = {{Flavour::kSweet, "sweet"},
                                                   {Flavour::kSour, "sour"}};
};

namespace {

using ::testing::HasSubstr;

// A small program: `tool [--level N] run [--flavour F] [--ratio X] NAME`.
struct Result {
  std::optional<int> exit;
  std::string out, err;
  std::string name, flavour;
  int level = 0;
};

Result RunTool(std::vector<std::string> args) {
  Result r;
  CLI::App app{"a tool", "tool"};
  app.require_subcommand(1);
  app.fallthrough();
  app.add_option("--level", r.level)->check(IntegerIn(1, 3));
  RefuseOption(&app, "--password", "--password is not supported; use a file");
  CLI::App* run = app.add_subcommand("run", "run it");
  run->add_option("NAME", r.name)->required();
  run->add_option("--flavour", r.flavour)->check(OneOf<Flavour>());
  double ratio = 0;
  run->add_option("--ratio", ratio)->check(NumberIn(0, 1, /*above_lo=*/true));
  run->add_option("--even", ratio)
      ->check(Accepts(
          [](const std::string& v) {
            return v.size() % 2 == 0 ? absl::OkStatus()
                                     : absl::InvalidArgumentError("odd length");
          },
          "TEXT"));
  args.insert(args.begin(), "tool");
  std::vector<const char*> argv;
  for (const std::string& a : args) argv.push_back(a.c_str());
  std::ostringstream out, err;
  r.exit = ParseCommandLine(app, static_cast<int>(argv.size()), argv.data(),
                            out, err);
  r.out = out.str();
  r.err = err.str();
  return r;
}

TEST(CommandLine, GoodArgumentsGoOn) {
  Result r = RunTool({"--level", "2", "run", "x", "--flavour", "sour"});
  EXPECT_FALSE(r.exit.has_value()) << r.err;
  EXPECT_EQ(r.level, 2);
  EXPECT_EQ(r.name, "x");
  EXPECT_EQ(r.flavour, "sour");
  // Options before the command may come after it too.
  EXPECT_FALSE(RunTool({"run", "x", "--level", "3"}).exit.has_value());
}

TEST(CommandLine, HelpExitsZeroOnStdout) {
  Result r = RunTool({"run", "--help"});
  EXPECT_EQ(r.exit, 0);
  EXPECT_THAT(r.out, HasSubstr("--flavour"));
  EXPECT_THAT(r.out, HasSubstr("sweet|sour"));
  EXPECT_TRUE(r.err.empty());
}

TEST(CommandLine, MisuseExitsTwoNamingTheProblem) {
  const struct {
    std::vector<std::string> args;
    const char* message;
  } kCases[] = {
      {{}, "tool: no command given\nRun 'tool --help' for usage.\n"},
      {{"walk"}, "tool: unknown command 'walk'\n"},
      {{"--bogus"}, "tool: tool has no option --bogus\n"},
      {{"run"}, "NAME is required"},
      {{"run", "x", "y"}, "tool: unexpected argument 'y' for run\n"},
      {{"run", "x", "--bogus=1"},
       "tool: run has no option --bogus\nRun 'tool run --help' for usage.\n"},
      {{"run", "x", "--flavour"}, "option --flavour needs a value"},
      {{"run", "x", "--flavour", "salty"},
       "--flavour: unknown flavour 'salty' (expected sweet or sour)"},
      {{"--level", "4", "run", "x"},
       "--level: '4' is not an integer from 1 to 3"},
      {{"run", "x", "--ratio", "0"}, "--ratio: '0' is not a number above 0"},
      {{"run", "x", "--ratio", "inf"}, "--ratio: 'inf' is not a number"},
      {{"run", "x", "--even", "abc"}, "--even: odd length"},
      {{"--password", "hunter2", "run", "x"},
       "tool: --password is not supported; use a file\n"},
  };
  for (const auto& c : kCases) {
    Result r = RunTool(c.args);
    SCOPED_TRACE(::testing::PrintToString(c.args));
    EXPECT_EQ(r.exit, kExitUsage);
    EXPECT_THAT(r.err, HasSubstr(c.message));
    EXPECT_TRUE(r.out.empty());
  }
}

}  // namespace
}  // namespace shellwright
