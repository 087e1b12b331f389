// Running the project's own binaries from tests.
//
// Example:
//   shellwright::testing::CommandResult r =
//       shellwright::testing::RunCommand({BinPath("clients/shellwright"),
//                                         "atom", "Fe", "--json"});
//   EXPECT_EQ(r.exit_code, 0);

#ifndef SHELLWRIGHT_TESTS_TESTING_SUBPROCESS_H_
#define SHELLWRIGHT_TESTS_TESTING_SUBPROCESS_H_

#include <string>
#include <vector>

namespace shellwright::testing {

struct CommandResult {
  int exit_code = -1;  // -1 when the process did not exit normally.
  std::string out;     // Standard output.
  std::string err;     // Standard error.
};

// Runs argv[0] with the arguments, feeding `stdin_text`, and waits for it.
CommandResult RunCommand(const std::vector<std::string>& argv,
                         const std::string& stdin_text = "");

// $SHELLWRIGHT_BIN_DIR/relative (the build tree).
std::string BinPath(const std::string& relative);

// $SHELLWRIGHT_SOURCE_DIR/relative (the checkout).
std::string SourcePath(const std::string& relative);

}  // namespace shellwright::testing

#endif  // SHELLWRIGHT_TESTS_TESTING_SUBPROCESS_H_
