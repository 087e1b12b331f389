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
// error or an unreachable server; check stopped by SIGINT or SIGTERM:
// 130 or 143, after its summary.

#include <malloc.h>
#include <unistd.h>

#include <cstdlib>
#include <fstream>
#include <iostream>
#include <string>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/strip.h"
#include "api/atoms.h"
#include "api/caution.h"
#include "api/records.h"
#include "api/report_mask.h"
#include "clients/cli/atom_format.h"
#include "clients/cli/backend.h"
#include "clients/cli/check.h"
#include "clients/cli/report_format.h"
#include "engine/version.h"
#include "shellwright/v1/electron_structure.pb.h"
#include "util/command_line.h"
#include "util/field_names.h"
#include "util/stop_signals.h"

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
                                    {"address", "--server"},
                                    {"fields", "--fields"}};

// Where answers come from: the gRPC target ("" in process), for messages.
std::string* ServerTargetForMessages() {
  static std::string* target = new std::string;
  return target;
}

// `status` with a failure to reach the server explained in the user's
// words (backend.h).
absl::Status Explained(const absl::Status& status) {
  if (ServerTargetForMessages()->empty()) return status;
  return ExplainRemoteFailure(status, *ServerTargetForMessages());
}

// Maps a failed call to an exit code, printing one line.
int Fail(const absl::Status& failed) {
  const absl::Status status = Explained(failed);
  if (status.code() == absl::StatusCode::kInvalidArgument) {
    std::cerr << "shellwright: invalid input: "
              << RenameField(status.message(), kFlagNames) << "\n";
    return kExitInvalidInput;
  }
  if (status.code() == absl::StatusCode::kUnavailable ||
      status.code() == absl::StatusCode::kDeadlineExceeded) {
    std::cerr << "shellwright: " << status.message() << "\n";
    return kExitUsage;
  }
  std::cerr << "shellwright: " << absl::StatusCodeToString(status.code())
            << ": " << status.message() << "\n";
  return kExitUsage;
}

// Human output ends with the moment caution, once, unless --quiet.
void PrintCaution(bool quiet) {
  if (!quiet) std::cout << "\n" << kMomentCaution << "\n";
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
      absl::StrCat("use shellwrightd instead of the in-process engine: "
                   "HOST[:PORT] (default port ",
                   kDefaultServerPort,
                   "), several as HOST:PORT,HOST:PORT (batches go round "
                   "robin; a failed server's work goes to the others), or "
                   "dns:///NAME:PORT"));
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
  std::vector<std::string> specs;
  int charge = 0;
  CLI::Option* charge_option = nullptr;
  std::string geometry;
  std::string spin_state;
  std::string configuration;
  CLI::Option* configuration_option = nullptr;
  bool json = false;
};

CLI::App* AddAtom(CLI::App* app, AtomFlags* f) {
  CLI::App* atom = app->add_subcommand(
      "atom",
      "describe an atom or ion: configuration, term symbol, spin "
      "state, moments");
  atom->add_option("SPEC", f->specs,
                   "one or more species: Fe, 26, iron, Fe3+, Fe+3, Fe(III), "
                   "Fe³⁺, O2-")
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
  f->configuration_option = atom->add_option(
      "--configuration", f->configuration,
      "explicit configuration of one SPEC, e.g. \"[Ar] 3d5 4s1\"");
  f->configuration_option->check(CLI::Validator(
      [](std::string& v) -> std::string { return v.empty() ? "is empty" : ""; },
      ""));
  atom->add_flag("--json", f->json,
                 "print the shellwright.v1.AtomDescription as JSON (one "
                 "line per SPEC when there are several)");
  return atom;
}

// One answer per SPEC, in order; a bad SPEC gets its one-line error and
// the others are still answered. The caution ends human output once.
int RunAtom(const AtomFlags& f, bool quiet, Backend& backend) {
  if (f.specs.size() > 1 && f.configuration_option->count() > 0) {
    std::cerr << "shellwright: --configuration describes one species; give "
                 "one SPEC with it\nRun 'shellwright atom --help' for "
                 "usage.\n";
    return kExitUsage;
  }
  int exit = kExitOk;
  bool printed = false;
  for (const std::string& spec : f.specs) {
    v1::DescribeAtomRequest request;
    request.set_spec(spec);
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
    if (!status.ok()) {
      std::cout << std::flush;
      const int failed = Fail(status);
      if (failed == kExitUsage) return failed;  // The server is gone.
      exit = failed;
      continue;
    }
    if (f.json) {
      std::cout << ToJson(description, /*pretty=*/f.specs.size() == 1) << "\n";
    } else {
      if (printed) std::cout << "\n";
      std::cout << FormatAtomHuman(description);
    }
    printed = true;
  }
  if (printed && !f.json) PrintCaution(quiet);
  return exit;
}

struct CompoundFlags {
  std::string formula;
  int charge = 0;
  CLI::Option* charge_option = nullptr;
  std::string declared;
  std::string element_geometry;
  std::string element_spin_state;
  std::string variables;
  double measured_moment = 0;
  CLI::Option* measured_option = nullptr;
  double moment_tolerance = 0;
  CLI::Option* tolerance_option = nullptr;
  double measured_saturation = 0;
  CLI::Option* saturation_option = nullptr;
  double saturation_tolerance = 0;
  CLI::Option* saturation_tolerance_option = nullptr;
  std::string structure_family;
  double temperature = 0;
  CLI::Option* temperature_option = nullptr;
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
                   "\"Fe3O4\", \"La0.7Sr0.3MnO3\", \"CuSO4·5H2O\", "
                   "\"[Fe(H2O)6]2+\", \"YBa2Cu3O7-δ\"")
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
  compound->add_option("--variables", f->variables,
                       "values of the formula's variables, e.g. \"x=0.3\" "
                       "for La1-xSrxMnO3 (δ and d default to 0)");
  f->measured_option = compound
                           ->add_option("--measured-moment", f->measured_moment,
                                        "measured effective (Curie-Weiss) "
                                        "moment, μB per formula unit")
                           ->check(FiniteNumber());
  f->tolerance_option =
      compound
          ->add_option("--moment-tolerance", f->moment_tolerance,
                       "tolerance of the moment check in μB (default 0.5)")
          ->check(FiniteNumber());
  f->saturation_option =
      compound
          ->add_option("--measured-saturation-moment", f->measured_saturation,
                       "measured ordered (saturation) moment at low "
                       "temperature, μB per formula unit")
          ->check(FiniteNumber());
  f->saturation_tolerance_option =
      compound
          ->add_option("--saturation-tolerance", f->saturation_tolerance,
                       "tolerance of the saturation check in μB (default "
                       "0.5)")
          ->check(FiniteNumber());
  compound->add_option("--structure-family", f->structure_family,
                       "place ions on the sites of this family: auto "
                       "(default), none, spinel, garnet, hexaferrite, "
                       "perovskite");
  f->temperature_option =
      compound
          ->add_option("--temperature", f->temperature,
                       "temperature in K for Van Vleck and Kotani moments "
                       "(default 300)")
          ->check(FiniteNumber());
  compound
      ->add_option("--alternatives", f->alternatives,
                   "further assignments to report (default 2)")
      ->check(IntegerIn(0, kMaxAlternatives));
  compound->add_flag("--json", f->json,
                     "print the shellwright.v1.RecordReport as JSON");
  return compound;
}

int RunCompound(const CompoundFlags& f, bool quiet, Backend& backend) {
  v1::CompositionRecord record;
  record.set_formula(f.formula);
  if (f.charge_option->count() > 0) record.set_charge(f.charge);
  if (!f.declared.empty()) record.set_declared_states(f.declared);
  if (!f.element_geometry.empty()) record.set_geometry(f.element_geometry);
  if (!f.element_spin_state.empty()) {
    record.set_spin_state(f.element_spin_state);
  }
  record.set_variables(f.variables);
  if (f.measured_option->count() > 0) {
    record.set_measured_moment(f.measured_moment);
  }
  if (f.tolerance_option->count() > 0) {
    record.set_moment_tolerance(f.moment_tolerance);
  }
  if (f.saturation_option->count() > 0) {
    record.set_measured_saturation_moment(f.measured_saturation);
  }
  if (f.saturation_tolerance_option->count() > 0) {
    record.set_saturation_moment_tolerance(f.saturation_tolerance);
  }
  record.set_structure_family(f.structure_family);
  if (f.temperature_option->count() > 0) {
    record.set_temperature(f.temperature);
  }
  record.set_max_alternatives(f.alternatives);
  v1::RecordReport report;
  absl::Status status = backend.AnalyzeCompound(record, &report);
  if (!status.ok()) return Fail(status);
  // The report names its errors; they are not repeated on stderr.
  if (f.json) {
    std::cout << ToJson(report, /*pretty=*/true) << "\n";
  } else {
    std::cout << FormatReportHuman(report);
    if (report.valid()) PrintCaution(quiet);
  }
  return report.valid() ? kExitOk : kExitInvalidInput;
}

struct CheckFlags {
  CheckOptions options;
  std::string summary_json;
  std::string format;
  std::string out_format;
  std::string fields;
  bool no_progress = false;
};

// The report fields a --fields value names (ReportMask::FromList), its
// error message naming no field: the parser puts --fields before it.
absl::StatusOr<ReportMask> ParseFields(absl::string_view text) {
  absl::StatusOr<ReportMask> mask = ReportMask::FromList(text);
  if (!mask.ok()) {
    return absl::InvalidArgumentError(
        absl::StripPrefix(mask.status().message(), "report_mask: "));
  }
  return mask;
}

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
  check
      ->add_option("--fields", f->fields,
                   "write only these report fields, comma-separated (CSV: "
                   "their columns); a server sends only these (default: "
                   "all)")
      ->check(Accepts(
          [](const std::string& text) { return ParseFields(text).status(); },
          "FIELD[,FIELD...]"));
  check->add_option("--summary-json", f->summary_json,
                    "also write the summary as one JSON object to this file");
  check->add_flag("--no-progress", f->no_progress,
                  "no progress line, even on a terminal");
  return check;
}

int RunCheck(CheckFlags& f, bool quiet, Backend& backend) {
  // Names were checked while parsing; empty means by extension.
  f.options.input_format =
      ParseName<RecordFormat>(f.format).value_or(RecordFormat::kAuto);
  f.options.output_format =
      ParseName<RecordFormat>(f.out_format).value_or(RecordFormat::kAuto);
  f.options.progress =
      !f.no_progress && isatty(2) && std::getenv("CI") == nullptr;
  if (!f.fields.empty()) f.options.fields = *ParseFields(f.fields);  // Checked.
  // SIGINT and SIGTERM stop reading; what was read is answered and
  // written, then the summary says how far the run got.
  std::unique_ptr<StopSignals> stop = StopSignals::Install();
  f.options.stop = stop.get();
  absl::StatusOr<CheckResult> result =
      cli::RunCheck(f.options, backend, std::cerr);
  if (!result.ok()) {
    std::cerr << "shellwright: check: "
              << RenameField(Explained(result.status()).message(), kFlagNames)
              << "\n";
    return kExitUsage;
  }
  const ReportCounts& summary = result->counts;
  if (result->stopped_by != 0) {
    std::cerr << "shellwright: check: stopped by "
              << StopSignalName(result->stopped_by) << "; "
              << (f.options.output == "-"
                      ? absl::StrCat(summary.rows,
                                     " reports were written to standard "
                                     "output, each line whole")
                      : absl::StrCat("--out '", f.options.output,
                                     "' was left as it was"))
              << ". The records after them were not read.\n";
  }
  std::cerr << FormatSummary(summary, /*caution=*/!quiet);
  if (!f.summary_json.empty()) {
    std::ofstream out(f.summary_json, std::ios::binary | std::ios::trunc);
    out << FormatSummaryJson(summary);
    out.close();
    if (!out) {
      std::cerr << "shellwright: check: cannot write --summary-json file '"
                << f.summary_json << "'\n";
      return kExitUsage;
    }
  }
  if (result->stopped_by != 0) return 128 + result->stopped_by;
  return summary.invalid > 0 ? kExitInvalidInput : kExitOk;
}

struct ElementsFlags {
  ElementFilter filter;
  bool json = false;
  bool csv = false;
};

CLI::App* AddElements(CLI::App* app, ElementsFlags* f) {
  CLI::App* elements =
      app->add_subcommand("elements", "list the element table");
  elements
      ->add_option("--block", f->filter.block, "only this block: s, p, d, f")
      ->check(CLI::IsMember({"s", "p", "d", "f"}));
  elements->add_option("--period", f->filter.period, "only this period (1-7)")
      ->check(IntegerIn(1, 7));
  elements
      ->add_option("--group", f->filter.group,
                   "only this group (1-18; La-Yb and Ac-No have none)")
      ->check(IntegerIn(1, 18));
  CLI::Option* json = elements->add_flag(
      "--json", f->json,
      "print the shellwright.v1.ListElementsResponse as JSON");
  elements->add_flag("--csv", f->csv, "print CSV with a header row")
      ->excludes(json);
  return elements;
}

int RunElements(const ElementsFlags& f, Backend& backend) {
  v1::ListElementsResponse elements;
  absl::Status status = backend.ListElements(&elements);
  if (!status.ok()) return Fail(status);
  FilterElements(f.filter, &elements);
  if (f.json) {
    std::cout << ToJson(elements, /*pretty=*/true) << "\n";
  } else if (f.csv) {
    std::cout << FormatElementsCsv(elements);
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
      "(check: some records invalid), 2 usage, I/O or connection error, "
      "130/143 check stopped by SIGINT/SIGTERM.");
  app.set_version_flag(
      "--version",
      std::string(absl::StripSuffix(VersionText("shellwright"), "\n")),
      "print the version and the data tables' versions");
  bool quiet = false;
  app.add_flag("--quiet", quiet,
               "leave out the caution that ends human output and the "
               "summary of check");
  RemoteFlags remote;
  AddRemoteOptions(&app, &remote);
  AtomFlags atom_flags;
  CLI::App* atom = AddAtom(&app, &atom_flags);
  CompoundFlags compound_flags;
  CLI::App* compound = AddCompound(&app, &compound_flags);
  CheckFlags check_flags;
  CLI::App* check = AddCheck(&app, &check_flags);
  ElementsFlags elements_flags;
  CLI::App* elements = AddElements(&app, &elements_flags);
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
    // One server's failures are explained in plain words; with several,
    // the message names each server's last failure itself.
    if (absl::StatusOr<std::vector<std::string>> targets =
            ParseServerTargets(remote.options.address);
        targets.ok() && targets->size() == 1) {
      *ServerTargetForMessages() = ServerTarget(targets->front());
    }
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
  if (atom->parsed()) return RunAtom(atom_flags, quiet, *backend);
  if (compound->parsed()) return RunCompound(compound_flags, quiet, *backend);
  if (elements->parsed()) return RunElements(elements_flags, *backend);
  if (check->parsed()) {
    // check's output buffers are a few MB and change threads; keep glibc
    // from returning them to the kernel (and zeroing fresh pages) each
    // time.
    mallopt(M_MMAP_THRESHOLD, 256 << 20);
    mallopt(M_TRIM_THRESHOLD, 512 << 20);
    return RunCheck(check_flags, quiet, *backend);
  }
  return kExitUsage;  // require_subcommand(1) makes this unreachable.
}

}  // namespace
}  // namespace shellwright::cli

int main(int argc, char** argv) { return shellwright::cli::Main(argc, argv); }
