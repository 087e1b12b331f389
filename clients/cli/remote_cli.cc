#include "clients/cli/remote_cli.h"

#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <string>
#include <vector>

#include "absl/strings/str_cat.h"
#include "absl/strings/str_join.h"

#ifndef SHELLWRIGHT_REMOTE_CLI_RELATIVE
#define SHELLWRIGHT_REMOTE_CLI_RELATIVE "../libexec/shellwright"
#endif

namespace shellwright::cli {

std::vector<std::string> RemoteCliCandidates(
    absl::string_view executable_dir, absl::string_view install_relative) {
  std::vector<std::string> candidates = {
      absl::StrCat(executable_dir, "/", kRemoteCliName)};
  if (!install_relative.empty()) {
    candidates.push_back(absl::StrCat(executable_dir, "/", install_relative,
                                      "/", kRemoteCliName));
  }
  return candidates;
}

absl::Status ExecRemoteCli(char** argv) {
  std::string self(4096, '\0');
  const ssize_t n = readlink("/proc/self/exe", self.data(), self.size());
  if (n <= 0 || static_cast<size_t>(n) >= self.size()) {
    return absl::InternalError(
        absl::StrCat("cannot find this program's own path for --server: ",
                     std::strerror(errno)));
  }
  self.resize(n);
  const std::string dir = self.substr(0, self.rfind('/'));
  const std::vector<std::string> candidates =
      RemoteCliCandidates(dir, SHELLWRIGHT_REMOTE_CLI_RELATIVE);
  for (const std::string& path : candidates) {
    if (access(path.c_str(), X_OK) != 0) continue;
    execv(path.c_str(), argv);
    return absl::InternalError(absl::StrCat("--server: cannot run ", path, ": ",
                                            std::strerror(errno)));
  }
  return absl::NotFoundError(absl::StrCat(
      "--server needs ", kRemoteCliName,
      " (the CLI with the gRPC client), installed beside shellwright; not "
      "found at ",
      absl::StrJoin(candidates, " or ")));
}

}  // namespace shellwright::cli
