// Paths for tests that run the project's binaries, and the subprocess
// helpers (util/subprocess.h) under the tests' namespace.
//
// Example:
//
//   shellwright::testing::CommandResult r = shellwright::testing::RunCommand(
//       {shellwright::testing::BinPath("clients/shellwright"), "atom", "Fe"});
//   EXPECT_EQ(r.exit_code, 0) << r.err;
//
// Thread safety: the path functions are thread-safe.

#ifndef SHELLWRIGHT_TESTS_TESTING_SUBPROCESS_H_
#define SHELLWRIGHT_TESTS_TESTING_SUBPROCESS_H_

#include <string>

#include "util/subprocess.h"

namespace shellwright::testing {

using ::shellwright::ChildProcess;
using ::shellwright::CommandResult;
using ::shellwright::RunCommand;

// $SHELLWRIGHT_BIN_DIR/relative (the build tree; defaults to the tree the
// test was built in).
std::string BinPath(const std::string& relative);

// $SHELLWRIGHT_SOURCE_DIR/relative (the checkout; defaults to the one the
// test was built from).
std::string SourcePath(const std::string& relative);

}  // namespace shellwright::testing

#endif  // SHELLWRIGHT_TESTS_TESTING_SUBPROCESS_H_
