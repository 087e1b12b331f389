// The CLI's twin with the remote backend. `shellwright` answers in process
// and links no gRPC, which would triple its start-up (docs/performance.md,
// "One record in a fresh process"); given --server it hands its whole
// command line to `shellwright-remote`, the same program (main.cc) built
// with the remote backend (remote_backend.cc), which parses it again and
// asks the server. Both print through the same formatting code, so the
// answers match.
//
// Example (in main, after parsing, when --server was given):
//
//   absl::Status failed = shellwright::cli::ExecRemoteCli(argv);
//   std::cerr << "shellwright: " << failed.message() << "\n";
//   return 2;  // ExecRemoteCli returns only when it could not run it.

#ifndef SHELLWRIGHT_CLIENTS_CLI_REMOTE_CLI_H_
#define SHELLWRIGHT_CLIENTS_CLI_REMOTE_CLI_H_

#include <string>
#include <vector>

#include "absl/status/status.h"
#include "absl/strings/string_view.h"

namespace shellwright::cli {

// The twin's file name.
inline constexpr char kRemoteCliName[] = "shellwright-remote";

// Where to look for the twin, in order, given the directory of the
// running executable: that directory itself (the build tree), then
// `install_relative` under it (an installed tree: bin/ to
// libexec/shellwright/, set at configure time). Pure; thread-safe.
std::vector<std::string> RemoteCliCandidates(
    absl::string_view executable_dir, absl::string_view install_relative);

// Replaces this process with the first executable RemoteCliCandidates()
// names for the directory of /proc/self/exe, passing `argv` (argv[0]
// included) and the environment unchanged. Returns only on failure:
// NOT_FOUND naming the places tried, or INTERNAL when exec failed. Call
// before starting threads or writing output.
absl::Status ExecRemoteCli(char** argv);

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_REMOTE_CLI_H_
