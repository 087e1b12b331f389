#include "tests/testing/subprocess.h"

#include <fcntl.h>
#include <poll.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cstdlib>

namespace shellwright::testing {

CommandResult RunCommand(const std::vector<std::string>& argv,
                         const std::string& stdin_text) {
  CommandResult result;
  int in_pipe[2], out_pipe[2], err_pipe[2];
  if (pipe(in_pipe) != 0 || pipe(out_pipe) != 0 || pipe(err_pipe) != 0) {
    return result;
  }
  const pid_t pid = fork();
  if (pid == 0) {
    dup2(in_pipe[0], 0);
    dup2(out_pipe[1], 1);
    dup2(err_pipe[1], 2);
    for (int fd : {in_pipe[0], in_pipe[1], out_pipe[0], out_pipe[1],
                   err_pipe[0], err_pipe[1]}) {
      close(fd);
    }
    std::vector<char*> args;
    for (const std::string& a : argv)
      args.push_back(const_cast<char*>(a.c_str()));
    args.push_back(nullptr);
    execv(args[0], args.data());
    _exit(127);
  }
  close(in_pipe[0]);
  close(out_pipe[1]);
  close(err_pipe[1]);
  // Feed stdin and drain both outputs without deadlocking.
  size_t written = 0;
  if (stdin_text.empty()) close(in_pipe[1]);
  fcntl(in_pipe[1], F_SETFL, O_NONBLOCK);
  bool in_open = !stdin_text.empty(), out_open = true, err_open = true;
  char buf[65536];
  while (out_open || err_open) {
    pollfd fds[3];
    int n = 0;
    int out_i = -1, err_i = -1, in_i = -1;
    if (out_open) {
      fds[n] = {out_pipe[0], POLLIN, 0};
      out_i = n++;
    }
    if (err_open) {
      fds[n] = {err_pipe[0], POLLIN, 0};
      err_i = n++;
    }
    if (in_open) {
      fds[n] = {in_pipe[1], POLLOUT, 0};
      in_i = n++;
    }
    if (poll(fds, n, 60000) <= 0) break;
    if (out_i >= 0 && fds[out_i].revents) {
      ssize_t r = read(out_pipe[0], buf, sizeof(buf));
      if (r <= 0)
        out_open = false;
      else
        result.out.append(buf, r);
    }
    if (err_i >= 0 && fds[err_i].revents) {
      ssize_t r = read(err_pipe[0], buf, sizeof(buf));
      if (r <= 0)
        err_open = false;
      else
        result.err.append(buf, r);
    }
    if (in_i >= 0 && fds[in_i].revents) {
      ssize_t w = write(in_pipe[1], stdin_text.data() + written,
                        stdin_text.size() - written);
      if (w > 0) written += w;
      if (w < 0 || written == stdin_text.size()) {
        close(in_pipe[1]);
        in_open = false;
      }
    }
  }
  if (in_open) close(in_pipe[1]);
  close(out_pipe[0]);
  close(err_pipe[0]);
  int status = 0;
  waitpid(pid, &status, 0);
  if (WIFEXITED(status)) result.exit_code = WEXITSTATUS(status);
  return result;
}

std::string BinPath(const std::string& relative) {
  const char* dir = std::getenv("SHELLWRIGHT_BIN_DIR");
  return std::string(dir ? dir : SHELLWRIGHT_DEFAULT_BIN_DIR) + "/" + relative;
}

std::string SourcePath(const std::string& relative) {
  const char* dir = std::getenv("SHELLWRIGHT_SOURCE_DIR");
  return std::string(dir ? dir : SHELLWRIGHT_DEFAULT_SOURCE_DIR) + "/" +
         relative;
}

}  // namespace shellwright::testing
