// shellwright: command-line access to the Shellwright engine.
//
//   shellwright atom Fe3+ --geometry octahedral --json
//   shellwright compound Fe3O4
//   shellwright check records.csv --out reports.jsonl
//   shellwright elements
//   shellwright --server 127.0.0.1:50051 atom Gd3+
//
// Each command takes only its own options (`shellwright COMMAND --help`
// lists them); the options before the command choose where the answers
// come from. Exit codes: 0 ok; 1 invalid input (one line on stderr naming
// what was wrong; for check: some records invalid); 2 usage error, I/O
// error or an unreachable server.

#include <malloc.h>
#include <unistd.h>

#include <cstdlib>
#include <iostream>
#include <string>

#include "absl/status/status.h"
#include "absl/strings/str_cat.h"
#include "api/atoms.h"
#include "api/records.h"
#include "clients/cli/atom_format.h"
#include "clients/cli/backend.h"
#include "clients/cli/check.h"
#include "clients/cli/report_format.h"
#include "shellwright/v1/electron_structure.pb.h"
#include "util/command_line.h"
#include "util/field_names.h"

namespace shellwright::cli {
namespace {

constexpr int kExitOk = 0;
constexpr int kExitInvalidInput = 1;

// The request fields that commands take from an option or operand, for
// messages ("spec: unknown element" -> "SPEC: unknown element").
constexpr FieldName kFlagNames[] = {{"spec", "SPEC"},
                                    {"charge", "--charge"},
                                    {"geometry", "--geometry"},
                                    {"spin_state", "--spin-state"},
                                    {"configuration", "--configuration"},
                                    {"address", "--server"}};

// Maps a failed call to an exit code, printing one line.
int Fail(const absl::Status& status) {
  if (status.code() == absl::StatusCode::kInvalidArgument) {
    std::cerr << "shellwright: invalid input: "
              << RenameField(status.message(), kFlagNames) << "\n";
    return kExitInvalidInput;
  }
  std::cerr << "shellwright: " << absl::StatusCodeToString(status.code())
            << ": " << status.message() << "\n";
  return kExitUsage;
}

// The options before the command: where answers come from.
struct RemoteFlags {
  RemoteOptions options;
  double timeout_seconds = 30;
  CLI::Option* server = nullptr;
};

void AddRemoteOptions(CLI::App* app, RemoteFlags* flags) {
  RemoteOptions& o = flags->options;
  flags->server = app->add_option(
      "--server", o.address,
      "use shellwrightd instead of the in-process engine: HOST:PORT, "
      "several as HOST:PORT,HOST:PORT (batches go round robin; a failed "
      "server's work goes to the others), or dns:///NAME:PORT");
  CLI::Option* ca =
      app->add_option("--tls-ca", o.tls_ca_file,
                      "PEM roots to verify the server with (enables TLS)");
  CLI::Option* cert = app->add_option("--tls-cert", o.tls_cert_file,
                                      "client certificate for mutual TLS");
  CLI::Option* key =
      app->add_option("--tls-key", o.tls_key_file, "client key for mutual TLS");
  CLI::Option* name =
      app->add_option("--tls-server-name", o.tls_server_name,
                      "name expected in the server certificate");
  CLI::Option* token = app->add_option("--token-file", o.token_file,
                                       "file holding a bearer token");
  CLI::Option* timeout =
      app->add_option("--timeout", flags->timeout_seconds,
                      "per-call deadline in seconds (default 30)")
          ->check(NumberIn(0, 86400, /*above_lo=*/true));
  for (CLI::Option* remote_only : {ca, cert, key, name, token, timeout}) {
    remote_only->needs(flags->server);
  }
  cert->needs(key);
  key->needs(cert);
}

struct AtomFlags {
  std::string spec;
  int charge = 0;
  CLI::Option* charge_option = nullptr;
  std::string geometry;
  std::string spin_state;
  std::string configuration;
  bool json = false;
};

CLI::App* AddAtom(CLI::App* app, AtomFlags* f) {
  CLI::App* atom = app->add_subcommand(
      "atom",
      "describe an atom or ion: configuration, term symbol, spin "
      "state, moments");
  atom->add_option("SPEC", f->spec, "Fe, 26, iron, Fe3+, Fe+3, Fe(III), O2-")
      ->required();
  f->charge_option = atom->add_option("--charge", f->charge,
                                      "net charge, when SPEC carries none")
                         ->check(Integer());
  atom->add_option("--geometry", f->geometry,
                   "ligand-field geometry (default free)")
      ->check(OneOf<Geometry>());
  atom->add_option("--spin-state", f->spin_state,
                   "spin state in a ligand field (default auto)")
      ->check(OneOf<SpinStatePreference>());
  atom->add_option("--configuration", f->configuration,
                   "explicit configuration, e.g. \"[Ar] 3d5 4s1\"")
      ->check(CLI::Validator(
          [](std::string& v) -> std::string {
            return v.empty() ? "is empty" : "";
          },
          ""));
  atom->add_flag("--json", f->json,
                 "print the shellwright.v1.AtomDescription as JSON");
  return atom;
}

int RunAtom(const AtomFlags& f, Backend& backend) {
  v1::DescribeAtomRequest request;
  request.set_spec(f.spec);
  if (f.charge_option->count() > 0) request.set_charge(f.charge);
  // The values were checked while parsing.
  if (!f.geometry.empty()) {
    request.set_geometry(
        GeometryToProto(ParseName<Geometry>(f.geometry).value()));
  }
  if (!f.spin_state.empty()) {
    request.set_spin_state(SpinStatePreferenceToProto(
        ParseName<SpinStatePreference>(f.spin_state).value()));
  }
  request.set_configuration(f.configuration);
  v1::AtomDescription description;
  absl::Status status = backend.DescribeAtom(request, &description);
  if (!status.ok()) return Fail(status);
  if (f.json) {
    std::cout << ToJson(description, /*pretty=*/true) << "\n";
  } else {
    std::cout << FormatAtomHuman(description);
  }
  return kExitOk;
}

struct CompoundFlags {
  std::string formula;
  int charge = 0;
  CLI::Option* charge_option = nullptr;
  std::string declared;
  std::string element_geometry;
  std::string element_spin_state;
  double measured_moment = 0;
  CLI::Option* measured_option = nullptr;
  double moment_tolerance = 0;
  CLI::Option* tolerance_option = nullptr;
  int alternatives = 2;
  bool json = false;
};

CLI::App* AddCompound(CLI::App* app, CompoundFlags* f) {
  CLI::App* compound =
      app->add_subcommand("compound",
                          "validate one composition: oxidation states, ions, "
                          "moments");
  compound
      ->add_option("FORMULA", f->formula,
                   "\"Fe3O4\", \"La0.7Sr0.3MnO3\", \"CuSO4·5H2O\"")
      ->required();
  f->charge_option =
      compound
          ->add_option("--charge", f->charge,
                       "net charge of the formula unit (default 0)")
          ->check(Integer());
  compound->add_option("--declared", f->declared,
                       "declared oxidation states, e.g. \"Fe:3,O:-2\"");
  compound->add_option(
      "--element-geometry", f->element_geometry,
      "ligand-field geometry per element, e.g. \"Co:tetrahedral\"");
  compound->add_option("--element-spin-state", f->element_spin_state,
                       "spin state per element, e.g. \"Co:low\"");
  f->measured_option = compound
                           ->add_option("--measured-moment", f->measured_moment,
                                        "measured moment, μB per formula unit")
                           ->check(FiniteNumber());
  f->tolerance_option =
      compound
          ->add_option("--moment-tolerance", f->moment_tolerance,
                       "tolerance of the moment check in μB (default 0.5)")
          ->check(FiniteNumber());
  compound
      ->add_option("--alternatives", f->alternatives,
                   "further assignments to report (default 2)")
      ->check(IntegerIn(0, kMaxAlternatives));
  compound->add_flag("--json", f->json,
                     "print the shellwright.v1.RecordReport as JSON");
  return compound;
}

int RunCompound(const CompoundFlags& f, Backend& backend) {
  v1::CompositionRecord record;
  record.set_formula(f.formula);
  if (f.charge_option->count() > 0) record.set_charge(f.charge);
  if (!f.declared.empty()) record.set_declared_states(f.declared);
  if (!f.element_geometry.empty()) record.set_geometry(f.element_geometry);
  if (!f.element_spin_state.empty()) {
    record.set_spin_state(f.element_spin_state);
  }
  if (f.measured_option->count() > 0) {
    record.set_measured_moment(f.measured_moment);
  }
  if (f.tolerance_option->count() > 0) {
    record.set_moment_tolerance(f.moment_tolerance);
  }
  record.set_max_alternatives(f.alternatives);
  v1::RecordReport report;
  absl::Status status = backend.AnalyzeCompound(record, &report);
  if (!status.ok()) return Fail(status);
  if (f.json) {
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

struct CheckFlags {
  CheckOptions options;
  std::string format;
  std::string out_format;
  bool no_progress = false;
};

CLI::App* AddCheck(CLI::App* app, CheckFlags* f) {
  CLI::App* check = app->add_subcommand(
      "check",
      "validate a CSV or JSONL file of records, one report per "
      "record in input order");
  check->add_option("INPUT", f->options.input, "the records; '-' for stdin")
      ->required();
  check->add_option("--out", f->options.output,
                    "the reports; '-' for stdout (default)");
  check
      ->add_option("--format", f->format,
                   "input format (default: by INPUT's extension)")
      ->check(OneOf<RecordFormat>());
  check
      ->add_option("--out-format", f->out_format,
                   "output format (default: by --out's extension, else "
                   "jsonl)")
      ->check(OneOf<RecordFormat>());
  check
      ->add_option("--jobs", f->options.jobs,
                   "worker threads, and with --server streams (default: "
                   "all cores)")
      ->check(IntegerIn(1, 256));
  check
      ->add_option("--batch-size", f->options.batch_size,
                   "records per batch (default 256, or 500 with --server)")
      ->check(IntegerIn(1, kMaxRecordsPerBatch));
  check
      ->add_option("--alternatives", f->options.default_alternatives,
                   "alternatives for records without their own "
                   "max_alternatives (default 0)")
      ->check(IntegerIn(0, kMaxAlternatives));
  check->add_flag("--no-progress", f->no_progress,
                  "no progress line, even on a terminal");
  return check;
}

int RunCheck(CheckFlags& f, Backend& backend) {
  // Names were checked while parsing; empty means by extension.
  f.options.input_format =
      ParseName<RecordFormat>(f.format).value_or(RecordFormat::kAuto);
  f.options.output_format =
      ParseName<RecordFormat>(f.out_format).value_or(RecordFormat::kAuto);
  f.options.progress =
      !f.no_progress && isatty(2) && std::getenv("CI") == nullptr;
  absl::StatusOr<ReportCounts> summary =
      cli::RunCheck(f.options, backend, std::cerr);
  if (!summary.ok()) {
    std::cerr << "shellwright: check: " << summary.status().message() << "\n";
    return kExitUsage;
  }
  std::cerr << FormatSummary(*summary);
  return summary->invalid > 0 ? kExitInvalidInput : kExitOk;
}

int RunElements(bool json, Backend& backend) {
  v1::ListElementsResponse elements;
  absl::Status status = backend.ListElements(&elements);
  if (!status.ok()) return Fail(status);
  if (json) {
    std::cout << ToJson(elements, /*pretty=*/true) << "\n";
  } else {
    std::cout << FormatElementsHuman(elements);
  }
  return kExitOk;
}

int Main(int argc, char** argv) {
  CLI::App app{
      "Electron configurations, ions, term symbols, ligand-field spin "
      "states and moments, and validation of composition records. Moments "
      "and spin states are idealised estimates; measurement decides.",
      "shellwright"};
  app.require_subcommand(1);
  // The answer source may be named after the command too.
  app.fallthrough();
  app.footer(
      "Run 'shellwright COMMAND --help' for a command's options.\n"
      "Exit codes: 0 ok (check: every record valid), 1 invalid input "
      "(check: some records invalid), 2 usage, I/O or connection error.");
  RemoteFlags remote;
  AddRemoteOptions(&app, &remote);
  AtomFlags atom_flags;
  CLI::App* atom = AddAtom(&app, &atom_flags);
  CompoundFlags compound_flags;
  CLI::App* compound = AddCompound(&app, &compound_flags);
  CheckFlags check_flags;
  CLI::App* check = AddCheck(&app, &check_flags);
  bool elements_json = false;
  CLI::App* elements = app.add_subcommand("elements", "list the element table");
  elements->add_flag("--json", elements_json,
                     "print the shellwright.v1.ListElementsResponse as JSON");
  CLI::App* help = app.add_subcommand("help", "print this help");

  if (std::optional<int> exit =
          ParseCommandLine(app, argc, argv, std::cout, std::cerr)) {
    return *exit;
  }
  if (help->parsed()) {
    app.clear();  // Else help() describes the command parsed: help itself.
    std::cout << app.help();
    return kExitOk;
  }

  std::unique_ptr<Backend> backend;
  if (remote.server->count() > 0) {
    remote.options.timeout = absl::Seconds(remote.timeout_seconds);
    remote.options.warnings = &std::cerr;
    absl::StatusOr<std::unique_ptr<Backend>> made =
        MakeRemoteBackend(remote.options);
    if (!made.ok()) {
      std::cerr << "shellwright: "
                << RenameField(made.status().message(), kFlagNames) << "\n";
      return kExitUsage;
    }
    backend = std::move(*made);
  } else {
    backend = MakeInProcessBackend();
  }
  if (atom->parsed()) return RunAtom(atom_flags, *backend);
  if (compound->parsed()) return RunCompound(compound_flags, *backend);
  if (elements->parsed()) return RunElements(elements_json, *backend);
  if (check->parsed()) {
    // check's output buffers are a few MB and change threads; keep glibc
    // from returning them to the kernel (and zeroing fresh pages) each
    // time.
    mallopt(M_MMAP_THRESHOLD, 256 << 20);
    mallopt(M_TRIM_THRESHOLD, 512 << 20);
    return RunCheck(check_flags, *backend);
  }
  return kExitUsage;  // require_subcommand(1) makes this unreachable.
}

}  // namespace
}  // namespace shellwright::cli

int main(int argc, char** argv) { return shellwright::cli::Main(argc, argv); }
