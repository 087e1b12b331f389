// shellwright: command-line access to the Shellwright engine.
//
//   shellwright atom Fe3+ --geometry octahedral --json
//   shellwright elements
//   shellwright --server 127.0.0.1:50051 atom Gd3+
//
// Exit codes: 0 ok; 1 invalid input (one line on stderr naming what was
// wrong); 2 usage error, I/O error or an unreachable server.

#include <cstdlib>
#include <iostream>
#include <map>
#include <optional>
#include <set>
#include <string>
#include <vector>

#include "absl/status/status.h"
#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "clients/cli/atom_format.h"
#include "clients/cli/backend.h"
#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright::cli {
namespace {

constexpr int kExitOk = 0;
constexpr int kExitInvalidInput = 1;
constexpr int kExitUsage = 2;

constexpr char kUsage[] = R"(usage: shellwright [global options] COMMAND [options]

Commands:
  atom SPEC        describe an atom or ion: Fe, 26, iron, Fe3+, Fe+3,
                   Fe(III), O2-
      --charge N           net charge (when SPEC carries none)
      --geometry G         free | octahedral | tetrahedral | square_planar
      --spin-state S       auto | high | low (default auto)
      --configuration C    explicit configuration, e.g. "[Ar] 3d5 4s1"
      --json               print the shellwright.v1.AtomDescription as JSON
  elements         list the element table (--json for JSON)
  help             print this text

Global options:
  --server HOST:PORT       use a shellwrightd server instead of the
                           in-process engine
  --tls-ca FILE            PEM roots to verify the server (enables TLS)
  --tls-cert FILE          client certificate for mutual TLS
  --tls-key FILE           client key for mutual TLS
  --tls-server-name NAME   name expected in the server certificate
  --token-file FILE        file holding a bearer token for the server
  --timeout SECONDS        per-call deadline (default 30)

Exit codes: 0 ok, 1 invalid input, 2 usage or connection error.
)";

struct Args {
  std::vector<std::string> positional;
  std::map<std::string, std::string> values;
  std::set<std::string> flags;
};

// Options that take a value; everything else starting with "--" is a flag.
const std::set<std::string>& ValueOptions() {
  static const auto* const kOptions = new std::set<std::string>{
      "server", "tls-ca", "tls-cert", "tls-key", "tls-server-name",
      "token-file", "timeout", "charge", "geometry", "spin-state",
      "configuration"};
  return *kOptions;
}

const std::set<std::string>& FlagOptions() {
  static const auto* const kFlags = new std::set<std::string>{"json", "help"};
  return *kFlags;
}

int Usage(const std::string& problem) {
  std::cerr << "shellwright: " << problem << "\n"
            << "Run 'shellwright help' for usage.\n";
  return kExitUsage;
}

// Parses argv; on error prints it and returns nullopt.
std::optional<Args> ParseArgs(int argc, char** argv, int* exit_code) {
  Args args;
  for (int i = 1; i < argc; ++i) {
    std::string a = argv[i];
    if (a.size() > 2 && a.rfind("--", 0) == 0) {
      std::string name = a.substr(2);
      std::optional<std::string> value;
      if (size_t eq = name.find('='); eq != std::string::npos) {
        value = name.substr(eq + 1);
        name = name.substr(0, eq);
      }
      if (ValueOptions().count(name)) {
        if (!value.has_value()) {
          if (i + 1 >= argc) {
            *exit_code = Usage(absl::StrCat("option --", name,
                                            " needs a value"));
            return std::nullopt;
          }
          value = argv[++i];
        }
        args.values[name] = *value;
      } else if (FlagOptions().count(name) && !value.has_value()) {
        args.flags.insert(name);
      } else {
        *exit_code = Usage(absl::StrCat("unknown option --", name));
        return std::nullopt;
      }
    } else {
      args.positional.push_back(a);
    }
  }
  return args;
}

// Maps a failed call to an exit code, printing one line.
int Fail(const absl::Status& status) {
  if (status.code() == absl::StatusCode::kInvalidArgument) {
    std::cerr << "shellwright: invalid input: " << status.message() << "\n";
    return kExitInvalidInput;
  }
  std::cerr << "shellwright: " << absl::StatusCodeToString(status.code())
            << ": " << status.message() << "\n";
  return kExitUsage;
}

int RunAtom(const Args& args, Backend& backend) {
  if (args.positional.size() != 2) {
    return Usage("atom takes exactly one SPEC (e.g. Fe, 26, iron, Fe3+)");
  }
  v1::DescribeAtomRequest request;
  request.set_spec(args.positional[1]);
  if (auto it = args.values.find("charge"); it != args.values.end()) {
    int charge = 0;
    if (!absl::SimpleAtoi(it->second, &charge)) {
      return Usage(absl::StrCat("--charge must be an integer, got '",
                                it->second, "'"));
    }
    request.set_charge(charge);
  }
  if (auto it = args.values.find("geometry"); it != args.values.end()) {
    const std::string& g = it->second;
    if (g == "free") {
      request.set_geometry(v1::GEOMETRY_FREE);
    } else if (g == "octahedral") {
      request.set_geometry(v1::GEOMETRY_OCTAHEDRAL);
    } else if (g == "tetrahedral") {
      request.set_geometry(v1::GEOMETRY_TETRAHEDRAL);
    } else if (g == "square_planar" || g == "square-planar") {
      request.set_geometry(v1::GEOMETRY_SQUARE_PLANAR);
    } else {
      return Usage(absl::StrCat("--geometry must be free, octahedral, "
                                "tetrahedral or square_planar, got '",
                                g, "'"));
    }
  }
  if (auto it = args.values.find("spin-state"); it != args.values.end()) {
    const std::string& s = it->second;
    if (s == "auto") {
      request.set_spin_state(v1::SPIN_STATE_AUTO);
    } else if (s == "high") {
      request.set_spin_state(v1::SPIN_STATE_HIGH);
    } else if (s == "low") {
      request.set_spin_state(v1::SPIN_STATE_LOW);
    } else {
      return Usage(absl::StrCat("--spin-state must be auto, high or low, "
                                "got '", s, "'"));
    }
  }
  if (auto it = args.values.find("configuration"); it != args.values.end()) {
    if (it->second.empty()) return Usage("--configuration is empty");
    request.set_configuration(it->second);
  }
  v1::AtomDescription description;
  absl::Status status = backend.DescribeAtom(request, &description);
  if (!status.ok()) return Fail(status);
  if (args.flags.count("json")) {
    std::cout << ToJson(description, /*pretty=*/true) << "\n";
  } else {
    std::cout << FormatAtomHuman(description);
  }
  return kExitOk;
}

int RunElements(const Args& args, Backend& backend) {
  if (args.positional.size() != 1) return Usage("elements takes no operands");
  v1::ListElementsResponse elements;
  absl::Status status = backend.ListElements(&elements);
  if (!status.ok()) return Fail(status);
  if (args.flags.count("json")) {
    std::cout << ToJson(elements, /*pretty=*/true) << "\n";
  } else {
    std::cout << FormatElementsHuman(elements);
  }
  return kExitOk;
}

int Main(int argc, char** argv) {
  int exit_code = kExitOk;
  std::optional<Args> args = ParseArgs(argc, argv, &exit_code);
  if (!args.has_value()) return exit_code;
  if (args->flags.count("help") ||
      (!args->positional.empty() && args->positional[0] == "help")) {
    std::cout << kUsage;
    return kExitOk;
  }
  if (args->positional.empty()) return Usage("no command given");

  std::unique_ptr<Backend> backend;
  if (auto it = args->values.find("server"); it != args->values.end()) {
    RemoteOptions options;
    options.address = it->second;
    auto get = [&](const char* name) {
      auto v = args->values.find(name);
      return v == args->values.end() ? std::string() : v->second;
    };
    options.tls_ca_file = get("tls-ca");
    options.tls_cert_file = get("tls-cert");
    options.tls_key_file = get("tls-key");
    options.tls_server_name = get("tls-server-name");
    options.token_file = get("token-file");
    if (std::string t = get("timeout"); !t.empty()) {
      double seconds = 0;
      if (!absl::SimpleAtod(t, &seconds) || seconds <= 0) {
        return Usage("--timeout must be a positive number of seconds");
      }
      options.timeout = absl::Seconds(seconds);
    }
    absl::StatusOr<std::unique_ptr<Backend>> remote =
        MakeRemoteBackend(options);
    if (!remote.ok()) {
      std::cerr << "shellwright: " << remote.status().message() << "\n";
      return kExitUsage;
    }
    backend = std::move(*remote);
  } else {
    for (const char* remote_only :
         {"tls-ca", "tls-cert", "tls-key", "tls-server-name", "token-file"}) {
      if (args->values.count(remote_only)) {
        return Usage(absl::StrCat("--", remote_only, " needs --server"));
      }
    }
    backend = MakeInProcessBackend();
  }

  const std::string& command = args->positional[0];
  if (command == "atom") return RunAtom(*args, *backend);
  if (command == "elements") return RunElements(*args, *backend);
  return Usage(absl::StrCat("unknown command '", command, "'"));
}

}  // namespace
}  // namespace shellwright::cli

int main(int argc, char** argv) { return shellwright::cli::Main(argc, argv); }
