// shellwright: command-line access to the Shellwright engine.
//
//   shellwright atom Fe3+ --geometry octahedral --json
//   shellwright elements
//   shellwright --server 127.0.0.1:50051 atom Gd3+
//
// Exit codes: 0 ok; 1 invalid input (one line on stderr naming what was
// wrong); 2 usage error, I/O error or an unreachable server.

#include <unistd.h>

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
#include "api/atoms.h"
#include "clients/cli/atom_format.h"
#include "clients/cli/backend.h"
#include "clients/cli/check.h"
#include "clients/cli/report_format.h"
#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright::cli {
namespace {

constexpr int kExitOk = 0;
constexpr int kExitInvalidInput = 1;
constexpr int kExitUsage = 2;

constexpr char kUsage[] =
    R"(usage: shellwright [global options] COMMAND [options]

Commands:
  atom SPEC        describe an atom or ion: Fe, 26, iron, Fe3+, Fe+3,
                   Fe(III), O2-
      --charge N           net charge (when SPEC carries none)
      --geometry G         free | octahedral | tetrahedral | square_planar
      --spin-state S       auto | high | low (default auto)
      --configuration C    explicit configuration, e.g. "[Ar] 3d5 4s1"
      --json               print the shellwright.v1.AtomDescription as JSON
  compound FORMULA validate one composition: oxidation states, ions,
                   moments ("Fe3O4", "La0.7Sr0.3MnO3", "CuSO4·5H2O")
      --charge N           net charge of the formula unit
      --declared S         declared states, e.g. "Fe:3,O:-2"
      --geometry S         per-element geometry, e.g. "Co:tetrahedral"
      --spin-state S       per-element spin state, e.g. "Co:low"
      --measured-moment X  measured μB per formula unit
      --moment-tolerance X tolerance in μB (default 0.5)
      --alternatives K     alternatives to report, 0-5 (default 2)
      --json               print the shellwright.v1.RecordReport as JSON
  check INPUT      validate a CSV or JSONL file of records ('-' for stdin)
      --out OUTPUT         JSONL or CSV by extension ('-' for stdout, default)
      --format F           input format csv|jsonl (default: by extension)
      --out-format F       output format csv|jsonl (default: by extension)
      --jobs N             worker threads (default: all cores)
      --batch-size N       records per batch (default 256, or 500 with
                           --server)
      --alternatives K     alternatives per record without its own
                           max_alternatives, 0-5 (default 0)
      --no-progress        no progress bar even on a terminal
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

Exit codes: 0 ok (check: every row valid), 1 invalid input (check: some
rows invalid), 2 usage, I/O or connection error.
)";

struct Args {
  std::vector<std::string> positional;
  std::map<std::string, std::string> values;
  std::set<std::string> flags;

  // The value of option --`name`, or nullptr when it was not given.
  const std::string* Value(const std::string& name) const {
    auto it = values.find(name);
    return it == values.end() ? nullptr : &it->second;
  }
};

// Options that take a value; everything else starting with "--" is a flag.
const std::set<std::string>& ValueOptions() {
  static const auto* const kOptions = new std::set<std::string>{
      "server",          "tls-ca",           "tls-cert",      "tls-key",
      "tls-server-name", "token-file",       "timeout",       "charge",
      "geometry",        "spin-state",       "configuration", "declared",
      "measured-moment", "moment-tolerance", "alternatives",  "out",
      "format",          "out-format",       "jobs",          "batch-size"};
  return *kOptions;
}

const std::set<std::string>& FlagOptions() {
  static const auto* const kFlags =
      new std::set<std::string>{"json", "help", "no-progress"};
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
            *exit_code =
                Usage(absl::StrCat("option --", name, " needs a value"));
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
  if (const std::string* v = args.Value("charge")) {
    int charge = 0;
    if (!absl::SimpleAtoi(*v, &charge)) {
      return Usage(absl::StrCat("--charge must be an integer, got '", *v, "'"));
    }
    request.set_charge(charge);
  }
  if (const std::string* v = args.Value("geometry")) {
    absl::StatusOr<Geometry> g = ParseName<Geometry>(*v);
    if (!g.ok()) {
      return Usage(absl::StrCat("--geometry: ", g.status().message()));
    }
    request.set_geometry(GeometryToProto(*g));
  }
  if (const std::string* v = args.Value("spin-state")) {
    absl::StatusOr<SpinStatePreference> s = ParseName<SpinStatePreference>(*v);
    if (!s.ok()) {
      return Usage(absl::StrCat("--spin-state: ", s.status().message()));
    }
    request.set_spin_state(SpinStatePreferenceToProto(*s));
  }
  if (const std::string* v = args.Value("configuration")) {
    if (v->empty()) return Usage("--configuration is empty");
    request.set_configuration(*v);
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

int RunCompound(const Args& args, Backend& backend) {
  if (args.positional.size() != 2) {
    return Usage("compound takes exactly one FORMULA (e.g. Fe3O4)");
  }
  v1::CompositionRecord record;
  record.set_formula(args.positional[1]);
  if (const std::string* v = args.Value("charge")) {
    int charge = 0;
    if (!absl::SimpleAtoi(*v, &charge)) {
      return Usage(absl::StrCat("--charge must be an integer, got '", *v, "'"));
    }
    record.set_charge(charge);
  }
  if (const std::string* v = args.Value("declared"))
    record.set_declared_states(*v);
  if (const std::string* v = args.Value("geometry")) record.set_geometry(*v);
  if (const std::string* v = args.Value("spin-state"))
    record.set_spin_state(*v);
  if (const std::string* v = args.Value("measured-moment")) {
    double m = 0;
    if (!absl::SimpleAtod(*v, &m))
      return Usage("--measured-moment must be a number");
    record.set_measured_moment(m);
  }
  if (const std::string* v = args.Value("moment-tolerance")) {
    double t = 0;
    if (!absl::SimpleAtod(*v, &t))
      return Usage("--moment-tolerance must be a number");
    record.set_moment_tolerance(t);
  }
  record.set_max_alternatives(2);
  if (const std::string* v = args.Value("alternatives")) {
    int k = 0;
    if (!absl::SimpleAtoi(*v, &k) || k < 0 || k > 5) {
      return Usage("--alternatives must be an integer from 0 to 5");
    }
    record.set_max_alternatives(k);
  }
  v1::RecordReport report;
  absl::Status status = backend.AnalyzeCompound(record, &report);
  if (!status.ok()) return Fail(status);
  if (args.flags.count("json")) {
    std::cout << ToJson(report, /*pretty=*/true) << "\n";
  } else {
    std::cout << FormatReportHuman(report);
  }
  if (!report.valid()) {
    for (const v1::Diagnostic& d : report.diagnostics()) {
      if (d.severity() == "error") {
        std::cerr << "shellwright: invalid input: " << d.message() << "\n";
        break;
      }
    }
    return kExitInvalidInput;
  }
  return kExitOk;
}

int RunCheck(const Args& args, Backend* remote) {
  if (args.positional.size() != 2) {
    return Usage("check takes exactly one INPUT file ('-' for stdin)");
  }
  CheckOptions options;
  options.input = args.positional[1];
  if (const std::string* v = args.Value("out")) options.output = *v;
  for (auto [flag, target] :
       {std::pair<const char*, RecordFormat*>{"format", &options.input_format},
        {"out-format", &options.output_format}}) {
    if (const std::string* v = args.Value(flag)) {
      absl::StatusOr<RecordFormat> f = ParseRecordFormat(*v);
      if (!f.ok())
        return Usage(absl::StrCat("--", flag, ": ", f.status().message()));
      *target = *f;
    }
  }
  if (const std::string* v = args.Value("jobs")) {
    if (!absl::SimpleAtoi(*v, &options.jobs) || options.jobs < 1 ||
        options.jobs > 256) {
      return Usage("--jobs must be an integer from 1 to 256");
    }
  }
  if (const std::string* v = args.Value("batch-size")) {
    if (!absl::SimpleAtoi(*v, &options.batch_size) || options.batch_size < 1 ||
        options.batch_size > 10000) {
      return Usage("--batch-size must be an integer from 1 to 10000");
    }
  }
  if (const std::string* v = args.Value("alternatives")) {
    if (!absl::SimpleAtoi(*v, &options.default_alternatives) ||
        options.default_alternatives < 0 || options.default_alternatives > 5) {
      return Usage("--alternatives must be an integer from 0 to 5");
    }
  }
  options.progress = !args.flags.count("no-progress") && isatty(2) &&
                     std::getenv("CI") == nullptr;
  absl::StatusOr<CheckSummary> summary =
      cli::RunCheck(options, remote, std::cerr);
  if (!summary.ok()) {
    std::cerr << "shellwright: check: " << summary.status().message() << "\n";
    return kExitUsage;
  }
  std::cerr << FormatSummary(*summary);
  return summary->invalid > 0 ? kExitInvalidInput : kExitOk;
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
  if (const std::string* server = args->Value("server")) {
    RemoteOptions options;
    options.address = *server;
    auto get = [&](const char* name) {
      const std::string* v = args->Value(name);
      return v == nullptr ? std::string() : *v;
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
  if (command == "compound") return RunCompound(*args, *backend);
  if (command == "check") {
    return RunCheck(*args,
                    args->values.count("server") ? backend.get() : nullptr);
  }
  return Usage(absl::StrCat("unknown command '", command, "'"));
}

}  // namespace
}  // namespace shellwright::cli

int main(int argc, char** argv) { return shellwright::cli::Main(argc, argv); }
