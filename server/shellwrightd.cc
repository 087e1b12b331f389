// shellwrightd: serves shellwright.v1.ElectronStructure over gRPC.
//
//   shellwrightd --listen 127.0.0.1:50051
//   shellwrightd --listen 0.0.0.0:443 --tls-cert server.pem
//       --tls-key server.key --tls-client-ca clients-ca.pem
//       --auth-token-file /etc/shellwright/token
//
// Prints "shellwrightd listening on HOST:PORT" on stdout once serving (with
// the bound port when --listen asks for port 0). Logs go to stderr. On
// SIGTERM or SIGINT it drains: health turns NOT_SERVING at once, new calls
// get UNAVAILABLE, streams waiting for a batch are cancelled, and batches
// in hand are answered within --drain-seconds (default 10; the older name
// --shutdown-grace still works); then it exits 0 at once, whatever idle
// connections remain. A second signal during the drain
// exits at once with status 1.
//
// Exit codes: 0 clean shutdown; 1 cannot serve (address in use, ...);
// 2 usage or configuration error.

#include <pthread.h>
#include <signal.h>
#include <unistd.h>

#include <cstdlib>
#include <iostream>
#include <limits>
#include <optional>
#include <string>
#include <thread>

#include "absl/status/status.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/strip.h"
#include "absl/synchronization/notification.h"
#include "absl/time/time.h"
#include "engine/version.h"
#include "server/logging.h"
#include "server/service.h"
#include "util/command_line.h"
#include "util/field_names.h"

namespace shellwright {
namespace {

constexpr int kExitOk = 0;
constexpr int kExitCannotServe = 1;

// The flags that set each ServerOptions field, for messages.
constexpr FieldName kFlagNames[] = {
    {"listen", "--listen"},
    {"cert_file", "--tls-cert"},
    {"key_file", "--tls-key"},
    {"client_ca_file", "--tls-client-ca"},
    {"max_message_bytes", "--max-message-bytes"},
    {"max_concurrent_streams", "--max-concurrent-streams"},
    {"idle_timeout", "--idle-timeout"},
    {"keepalive_interval", "--keepalive"},
    {"max_connection_age", "--max-connection-age"},
    {"max_concurrent_calls", "--max-concurrent-calls"},
    {"token_rate_limit", "--token-rate-limit"},
    {"auth_token_file", "--auth-token-file"}};

struct Flags {
  ServerOptions server;
  double drain_seconds = 10;
  double idle_timeout_seconds =
      absl::ToDoubleSeconds(ServerOptions().idle_timeout);
  double keepalive_seconds =
      absl::ToDoubleSeconds(ServerOptions().keepalive_interval);
  double max_connection_age_seconds =
      absl::ToDoubleSeconds(ServerOptions().max_connection_age);
  double max_connection_age_grace_seconds =
      absl::ToDoubleSeconds(ServerOptions().max_connection_age_grace);
  std::string log_level = "info";
};

// Parses argv into `flags`. Returns nullopt to go on serving, or an exit
// code.
std::optional<int> ParseFlags(int argc, char** argv, Flags* flags) {
  CLI::App app{"Serves shellwright.v1.ElectronStructure over gRPC.",
               "shellwrightd"};
  app.set_version_flag(
      "--version",
      std::string(absl::StripSuffix(VersionText("shellwrightd"), "\n")),
      "print the version and the data tables' versions");
  ServerOptions& server = flags->server;
  app.add_option("--listen", server.listen,
                 "address to serve on: HOST:PORT (port 0 picks a free "
                 "port; IPv6 as [::1]:PORT) or unix:PATH")
      ->check(Accepts(ValidateListenAddress, "HOST:PORT"))
      ->capture_default_str();
  CLI::Option* cert =
      app.add_option("--tls-cert", server.tls.cert_file,
                     "PEM server certificate chain (enables TLS)");
  CLI::Option* key =
      app.add_option("--tls-key", server.tls.key_file, "PEM server key");
  cert->needs(key);
  key->needs(cert);
  app.add_option("--tls-client-ca", server.tls.client_ca_file,
                 "PEM roots; clients must present a certificate signed by "
                 "one of them (mutual TLS)")
      ->needs(cert);
  app.add_option("--auth-token-file", server.auth_token_file,
                 "require \"authorization: Bearer <token>\" with the token "
                 "held in this file (health checks and reflection stay "
                 "open)");
  // A token on the command line leaks through ps, /proc and shell history.
  for (const char* name : {"--auth-token", "--token"}) {
    RefuseOption(&app, name,
                 absl::StrCat(name,
                              " is not supported; put the token in a "
                              "file and pass --auth-token-file"));
  }
  app.add_option("--max-message-bytes", server.max_message_bytes,
                 "largest request accepted, in bytes")
      ->check(IntegerIn(1, std::numeric_limits<int>::max()))
      ->capture_default_str();
  app.add_option("--max-concurrent-streams", server.max_concurrent_streams,
                 "concurrent calls per connection (0: gRPC's default)")
      ->check(IntegerIn(0, std::numeric_limits<int>::max()))
      ->capture_default_str();
  app.add_option("--idle-timeout", flags->idle_timeout_seconds,
                 "seconds after which a connection with no call is closed, "
                 "and an AnalyzeRecords stream waiting for its next batch "
                 "cancelled")
      ->check(NumberIn(0.001, 86400))
      ->capture_default_str();
  app.add_option("--keepalive", flags->keepalive_seconds,
                 "seconds between pings on each connection; one unanswered "
                 "for 20 s drops it")
      ->check(NumberIn(0.001, 86400))
      ->capture_default_str();
  app.add_option("--max-connection-age", flags->max_connection_age_seconds,
                 "seconds after which a connection gets GOAWAY so that "
                 "clients reconnect and load balancers rebalance (0: never)")
      ->check(NumberIn(0, 31 * 86400))
      ->capture_default_str();
  app.add_option("--max-connection-age-grace",
                 flags->max_connection_age_grace_seconds,
                 "seconds the calls on such a connection get to end")
      ->check(NumberIn(0, 86400))
      ->capture_default_str();
  CallLimits& limits = server.limits;
  app.add_option("--max-concurrent-calls", limits.max_concurrent_calls,
                 "calls in progress at once, over all connections; more get "
                 "RESOURCE_EXHAUSTED (0: no limit)")
      ->check(IntegerIn(0, std::numeric_limits<int>::max()))
      ->capture_default_str();
  app.add_option("--token-rate-limit", limits.token_rate_limit,
                 "requests per second (a call or one batch each) for "
                 "callers with the token; more get RESOURCE_EXHAUSTED "
                 "(0: no limit)")
      ->check(NumberIn(0, 1e9))
      ->capture_default_str();
  app.add_option("--token-rate-burst", limits.token_rate_burst,
                 "requests allowed at once above --token-rate-limit")
      ->check(IntegerIn(1, std::numeric_limits<int>::max()))
      ->capture_default_str();
  app.add_option("--drain-seconds,--shutdown-grace", flags->drain_seconds,
                 "on SIGTERM, seconds the batches already received get to be "
                 "answered (health turns NOT_SERVING and new calls get "
                 "UNAVAILABLE at once)")
      ->check(NumberIn(0, 3600))
      ->capture_default_str();
  app.add_option("--log-level", flags->log_level, "lines written to stderr")
      ->check(OneOf<LogLevel>())
      ->capture_default_str();
  if (std::optional<int> exit =
          ParseCommandLine(app, argc, argv, std::cout, std::cerr)) {
    return exit;
  }
  server.idle_timeout = absl::Seconds(flags->idle_timeout_seconds);
  server.keepalive_interval = absl::Seconds(flags->keepalive_seconds);
  server.max_connection_age = absl::Seconds(flags->max_connection_age_seconds);
  server.max_connection_age_grace =
      absl::Seconds(flags->max_connection_age_grace_seconds);
  return std::nullopt;
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
  const absl::Duration grace = absl::Seconds(flags.drain_seconds);
  Log(LogLevel::kInfo,
      absl::StrCat("shutting down, grace ", absl::FormatDuration(grace)));
  (*server)->Shutdown(grace);
  Log(LogLevel::kInfo, "stopped");
  return kExitOk;
}

}  // namespace
}  // namespace shellwright

int main(int argc, char** argv) {
  const sigset_t signals = shellwright::BlockShutdownSignals();
  shellwright::Flags flags;
  if (std::optional<int> exit = shellwright::ParseFlags(argc, argv, &flags)) {
    return *exit;
  }
  // The name was checked while parsing.
  shellwright::SetLogLevel(
      shellwright::ParseName<shellwright::LogLevel>(flags.log_level).value());
  return shellwright::RunServer(flags, signals);
}
