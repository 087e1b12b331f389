// shellwrightd: serves shellwright.v1.ElectronStructure over gRPC.
//
//   shellwrightd --listen 127.0.0.1:50051
//   shellwrightd --listen 0.0.0.0:443 --tls-cert server.pem
//       --tls-key server.key --tls-client-ca clients-ca.pem
//       --auth-token-file /etc/shellwright/token
//
// Prints "shellwrightd listening on HOST:PORT" on stdout once serving (with
// the bound port when --listen asks for port 0). Logs go to stderr. On
// SIGTERM or SIGINT it drains: health turns NOT_SERVING, new calls get
// UNAVAILABLE, streams waiting for a batch are cancelled, and batches in
// hand are answered within --shutdown-grace seconds; then it exits 0 at
// once, whatever idle connections remain. A second signal during the drain
// exits at once with status 1.
//
// Exit codes: 0 clean shutdown; 1 cannot serve (address in use, ...);
// 2 usage or configuration error.

#include <pthread.h>
#include <signal.h>
#include <unistd.h>

#include <cstdio>
#include <cstdlib>
#include <iostream>
#include <map>
#include <string>
#include <thread>

#include "absl/status/status.h"
#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "absl/synchronization/notification.h"
#include "absl/time/time.h"
#include "server/logging.h"
#include "server/service.h"
#include "util/field_names.h"

namespace shellwright {
namespace {

constexpr int kExitOk = 0;
constexpr int kExitCannotServe = 1;
constexpr int kExitUsage = 2;

constexpr char kUsage[] = R"(usage: shellwrightd [options]

  --listen HOST:PORT          address to serve on (default 127.0.0.1:50051;
                              port 0..65535, 0 picks a free port; IPv6 as
                              [::1]:PORT; or unix:PATH)
  --tls-cert FILE             PEM server certificate chain (enables TLS)
  --tls-key FILE              PEM server private key
  --tls-client-ca FILE        PEM roots; clients must present a certificate
                              signed by one of them (mutual TLS)
  --auth-token-file FILE      require "authorization: Bearer <token>" with
                              the token held in FILE (health checks and
                              reflection stay open)
  --max-message-bytes N       largest request accepted (default 4194304)
  --max-concurrent-streams N  concurrent calls per connection (default 100;
                              0 = gRPC default)
  --idle-timeout SECONDS      close a connection with no call, or cancel an
                              AnalyzeRecords stream waiting for its next
                              batch, after this long (default 300)
  --keepalive SECONDS         ping each connection this often; drop it when
                              a ping goes unanswered for 20 s (default 60)
  --shutdown-grace SECONDS    time in-flight work gets on SIGTERM (default 10)
  --log-level LEVEL           error | warning | info (default) | debug
  --help                      print this text
)";

// The flags that set each ServerOptions field, for messages.
constexpr FieldName kFlagNames[] = {
    {"listen", "--listen"},
    {"cert_file", "--tls-cert"},
    {"key_file", "--tls-key"},
    {"client_ca_file", "--tls-client-ca"},
    {"max_message_bytes", "--max-message-bytes"},
    {"max_concurrent_streams", "--max-concurrent-streams"},
    {"idle_timeout", "--idle-timeout"},
    {"keepalive_interval", "--keepalive"}};

struct Flags {
  ServerOptions server;
  absl::Duration shutdown_grace = absl::Seconds(10);
  LogLevel log_level = LogLevel::kInfo;
};

int Usage(const std::string& problem) {
  std::cerr << "shellwrightd: " << problem << "\n"
            << "Run 'shellwrightd --help' for usage.\n";
  return kExitUsage;
}

// Parses argv into `flags`. Returns -1 to go on serving, or an exit code.
int ParseFlags(int argc, char** argv, Flags* flags) {
  std::map<std::string, std::string> values;
  for (int i = 1; i < argc; ++i) {
    std::string arg = argv[i];
    if (arg == "--help" || arg == "-h") {
      std::cout << kUsage;
      return kExitOk;
    }
    if (arg.rfind("--", 0) != 0 || arg.size() == 2) {
      return Usage(absl::StrCat("unexpected argument '", arg, "'"));
    }
    std::string name = arg.substr(2);
    std::string value;
    if (size_t eq = name.find('='); eq != std::string::npos) {
      value = name.substr(eq + 1);
      name = name.substr(0, eq);
    } else if (i + 1 < argc) {
      value = argv[++i];
    } else {
      return Usage(absl::StrCat("option --", name, " needs a value"));
    }
    values[name] = value;
  }

  for (const auto& [name, value] : values) {
    if (name == "listen") {
      if (absl::Status s = ValidateListenAddress(value); !s.ok()) {
        return Usage(absl::StrCat("--listen ", s.message()));
      }
      flags->server.listen = value;
    } else if (name == "tls-cert") {
      flags->server.tls.cert_file = value;
    } else if (name == "tls-key") {
      flags->server.tls.key_file = value;
    } else if (name == "tls-client-ca") {
      flags->server.tls.client_ca_file = value;
    } else if (name == "auth-token-file") {
      flags->server.auth_token_file = value;
    } else if (name == "max-message-bytes") {
      if (!absl::SimpleAtoi(value, &flags->server.max_message_bytes) ||
          flags->server.max_message_bytes <= 0) {
        return Usage(
            "--max-message-bytes must be a positive integer below "
            "2^31");
      }
    } else if (name == "max-concurrent-streams") {
      if (!absl::SimpleAtoi(value, &flags->server.max_concurrent_streams) ||
          flags->server.max_concurrent_streams < 0) {
        return Usage(
            "--max-concurrent-streams must be 0 or a positive "
            "integer");
      }
    } else if (name == "idle-timeout" || name == "keepalive") {
      double seconds = 0;
      if (!absl::SimpleAtod(value, &seconds) || !(seconds >= 0.001) ||
          seconds > 86400) {
        return Usage(absl::StrCat("--", name, " must be 0.001..86400 seconds"));
      }
      (name == "idle-timeout" ? flags->server.idle_timeout
                              : flags->server.keepalive_interval) =
          absl::Seconds(seconds);
    } else if (name == "shutdown-grace") {
      double seconds = 0;
      if (!absl::SimpleAtod(value, &seconds) || !(seconds >= 0) ||
          seconds > 3600) {
        return Usage("--shutdown-grace must be 0..3600 seconds");
      }
      flags->shutdown_grace = absl::Seconds(seconds);
    } else if (name == "log-level") {
      absl::StatusOr<LogLevel> level = ParseName<LogLevel>(value);
      if (!level.ok()) return Usage(std::string(level.status().message()));
      flags->log_level = *level;
    } else if (name == "auth-token" || name == "token") {
      // Deliberately unsupported: a token on the command line leaks through
      // ps, /proc and shell history.
      return Usage(absl::StrCat("--", name,
                                " is not supported; put the "
                                "token in a file and pass --auth-token-file"));
    } else {
      return Usage(absl::StrCat("unknown option --", name));
    }
  }
  return -1;
}

// Blocks SIGTERM and SIGINT in the calling thread and in every thread it
// starts afterwards (gRPC's included), so they are only ever received by
// sigwait() and no work runs in a signal handler.
sigset_t BlockShutdownSignals() {
  sigset_t set;
  sigemptyset(&set);
  sigaddset(&set, SIGTERM);
  sigaddset(&set, SIGINT);
  pthread_sigmask(SIG_BLOCK, &set, nullptr);
  // A client vanishing mid-write must not kill the process.
  signal(SIGPIPE, SIG_IGN);
  return set;
}

int RunServer(const Flags& flags, const sigset_t& signals) {
  absl::StatusOr<std::unique_ptr<ShellwrightServer>> server =
      ShellwrightServer::Start(flags.server);
  if (!server.ok()) {
    // Only a caller error names option fields.
    if (server.status().code() == absl::StatusCode::kInvalidArgument) {
      Log(LogLevel::kError, RenameField(server.status().message(), kFlagNames));
      return kExitUsage;
    }
    Log(LogLevel::kError, server.status().message());
    return kExitCannotServe;
  }
  std::cout << "shellwrightd listening on " << (*server)->address()
            << std::endl;
  Log(LogLevel::kInfo,
      absl::StrCat(
          "serving on ", (*server)->address(),
          flags.server.tls.cert_file.empty()        ? " (plaintext)"
          : flags.server.tls.client_ca_file.empty() ? " (TLS)"
                                                    : " (mutual TLS)",
          flags.server.auth_token_file.empty() ? "" : ", token required"));

  // The signal thread is detached: after the first signal it waits for a
  // second one until the process exits. It touches nothing on this stack
  // after Notify(), so it may outlive RunServer().
  absl::Notification stop;
  std::thread([signals, &stop] {
    int sig = 0;
    if (sigwait(&signals, &sig) != 0) return;
    stop.Notify();
    if (sigwait(&signals, &sig) != 0) return;
    static constexpr char kForced[] =
        "shellwrightd: second signal during shutdown, exiting now\n";
    ssize_t ignored = ::write(STDERR_FILENO, kForced, sizeof(kForced) - 1);
    (void)ignored;
    std::_Exit(kExitCannotServe);
  }).detach();

  stop.WaitForNotification();
  Log(LogLevel::kInfo,
      absl::StrCat("shutting down, grace ",
                   absl::FormatDuration(flags.shutdown_grace)));
  (*server)->Shutdown(flags.shutdown_grace);
  Log(LogLevel::kInfo, "stopped");
  return kExitOk;
}

}  // namespace
}  // namespace shellwright

int main(int argc, char** argv) {
  const sigset_t signals = shellwright::BlockShutdownSignals();
  shellwright::Flags flags;
  if (int code = shellwright::ParseFlags(argc, argv, &flags); code >= 0) {
    return code;
  }
  shellwright::SetLogLevel(flags.log_level);
  return shellwright::RunServer(flags, signals);
}
