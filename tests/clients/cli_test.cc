// Tests for the shellwright CLI (clients/shellwright): output, JSON schema
// and exit codes, by running the real binary.

#include <string>
#include <vector>

#include "gmock/gmock.h"
#include "google/protobuf/util/json_util.h"
#include "gtest/gtest.h"
#include "shellwright/v1/electron_structure.pb.h"
#include "tests/testing/subprocess.h"

namespace shellwright {
namespace {

using ::shellwright::testing::BinPath;
using ::shellwright::testing::CommandResult;
using ::shellwright::testing::RunCommand;
using ::testing::Contains;
using ::testing::ContainsRegex;
using ::testing::HasSubstr;
using ::testing::Not;

CommandResult Cli(std::vector<std::string> args) {
  args.insert(args.begin(), BinPath("clients/shellwright"));
  return RunCommand(args);
}

v1::AtomDescription ParseJson(const std::string& json) {
  v1::AtomDescription d;
  EXPECT_TRUE(google::protobuf::util::JsonStringToMessage(json, &d).ok())
      << json;
  return d;
}

TEST(Cli, IronByAtomicNumberAsJson) {
  // NIST ASD ground states, from memory: Fe is [Ar] 3d6 4s2, 5D4.
  CommandResult r = Cli({"atom", "26", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  v1::AtomDescription d = ParseJson(r.out);
  EXPECT_EQ(d.symbol(), "Fe");
  EXPECT_EQ(d.configuration(), "[Ar] 3d6 4s2");
  EXPECT_EQ(d.unpaired_electrons(), 4);
  EXPECT_EQ(d.electrons(), 26);
}

TEST(Cli, JsonAlwaysPrintsDefaultValuedKeys) {
  CommandResult r = Cli({"atom", "Ne", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  for (const char* key :
       {"\"symbol\"", "\"atomic_number\"", "\"charge\": 0", "\"electrons\"",
        "\"configuration\"", "\"full_configuration\"", "\"subshells\"",
        "\"unpaired_electrons\": 0", "\"term_symbol\"", "\"lande_g\": 0",
        "\"capacity\"", "\"l\": \"s\""}) {
    EXPECT_THAT(r.out, HasSubstr(key));
  }
}

TEST(Cli, HumanOutputHasBoxDiagramAndCaution) {
  CommandResult r = Cli({"atom", "iron"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_THAT(r.out, HasSubstr("[Ar] 3d6 4s2"));
  EXPECT_THAT(r.out, HasSubstr("3d  [↑↓][↑ ][↑ ][↑ ][↑ ]"));
  EXPECT_THAT(r.out, HasSubstr("⁵D₄"));
  EXPECT_THAT(r.out, HasSubstr("idealised"));
}

TEST(Cli, InvalidInputExitsOneWithOneLine) {
  for (const char* spec :
       {"Xx", "0", "119", "", "fe", "Fe3+3+", "Fe(IIII)", "Fe99+", "He-99"}) {
    CommandResult r = Cli({"atom", spec});
    EXPECT_EQ(r.exit_code, 1) << spec;
    EXPECT_TRUE(r.out.empty()) << spec;
    EXPECT_EQ(std::count(r.err.begin(), r.err.end(), '\n'), 1) << r.err;
  }
  CommandResult r = Cli({"atom", std::string(100000, 'F')});
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_LT(r.err.size(), 400u);
}

TEST(Cli, UsageErrorsExitTwoNamingTheProblem) {
  const struct {
    std::vector<std::string> args;
    const char* named;  // The message names this.
  } kCases[] = {
      {{}, "no command"},
      {{"frobnicate"}, "frobnicate"},
      {{"atom"}, "SPEC"},
      {{"atom", "Fe", "Co", "--configuration", "[Ar] 3d6 4s2"},
       "--configuration"},
      {{"elements", "--block", "g"}, "--block"},
      {{"elements", "--period", "8"}, "--period"},
      {{"elements", "--json", "--csv"}, "--csv"},
      {{"atom", "Fe", "--bogus"}, "--bogus"},
      {{"atom", "Fe", "--charge"}, "--charge"},
      {{"atom", "Fe", "--charge", "x"}, "--charge"},
      {{"atom", "Fe", "--geometry", "cubic"}, "cubic"},
      {{"atom", "Fe", "--spin-state", "medium"}, "--spin-state"},
      // Options of another command are refused, not ignored.
      {{"atom", "Fe", "--jobs", "3"}, "--jobs"},
      {{"atom", "Fe", "--out", "x.jsonl"}, "--out"},
      {{"elements", "--alternatives", "2"}, "--alternatives"},
      {{"check", "in.csv", "--json"}, "--json"},
      // compound's per-element settings are --element-geometry and
      // --element-spin-state; --geometry means one geometry (atom).
      {{"compound", "Fe2O3", "--geometry", "Fe:octahedral"}, "--geometry"},
      {{"compound", "Fe2O3", "--alternatives", "6"}, "--alternatives"},
      {{"compound", "Fe2O3", "--measured-moment", "nan"}, "--measured-moment"},
      {{"check", "in.csv", "--jobs", "0"}, "--jobs"},
      {{"check", "in.csv", "--batch-size", "10001"}, "--batch-size"},
      {{"check", "in.csv", "--format", "xml"}, "xml"},
      // --fields names report fields; a wrong one is named, with the list.
      {{"check", "in.csv", "--fields", "valid,validity"}, "'validity'"},
      {{"check", "in.csv", "--fields", "ions.moment"}, "'ions.moment'"},
      {{"check", "in.csv", "--fields", "validity"},
       "diagnostics, oxidation_states"},
      {{"check", "in.csv", "--fields", "valid,,id"}, "--fields"},
      {{"atom", "Fe", "--fields", "valid"}, "--fields"},
      // Remote settings need a server.
      {{"--tls-ca", "ca.pem", "atom", "Fe"}, "--server"},
      {{"--timeout", "5", "atom", "Fe"}, "--server"},
      {{"--server", "127.0.0.1:1", "--timeout", "-1", "atom", "Fe"},
       "--timeout"},
  };
  for (const auto& c : kCases) {
    CommandResult r = Cli(c.args);
    SCOPED_TRACE(::testing::PrintToString(c.args));
    EXPECT_EQ(r.exit_code, 2) << r.err;
    EXPECT_THAT(r.err, HasSubstr(c.named));
    EXPECT_TRUE(r.out.empty());
  }
}

TEST(Cli, CheckFieldsWithoutACsvColumnIsAUsageError) {
  const std::string input = std::string(SHELLWRIGHT_DEFAULT_SOURCE_DIR) +
                            "/data/demo/sample_registry.csv";
  CommandResult r = Cli({"check", input, "--fields", "valid,alternatives",
                         "--out", "-", "--out-format", "csv"});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_THAT(r.err, HasSubstr("--fields: 'alternatives' has no CSV column"));
  EXPECT_THAT(r.err, HasSubstr("oxidation_states"));  // The ones that have.
  EXPECT_TRUE(r.out.empty());
  // JSONL has every field.
  CommandResult jsonl =
      Cli({"check", input, "--fields", "valid,alternatives", "--out", "-"});
  EXPECT_EQ(jsonl.exit_code, 1) << jsonl.err;  // The registry has defects.
  EXPECT_THAT(jsonl.out, HasSubstr("{\"valid\":true,\"alternatives\":[]}\n"));
}

TEST(Cli, EachCommandHasItsOwnHelp) {
  const struct {
    const char* command;
    const char* has;
    const char* lacks;
  } kCases[] = {{"atom", "--geometry", "--jobs"},
                {"compound", "--element-geometry", "--jobs"},
                {"check", "--batch-size", "--geometry"},
                {"elements", "--json", "--out"}};
  for (const auto& c : kCases) {
    CommandResult r = Cli({c.command, "--help"});
    SCOPED_TRACE(c.command);
    EXPECT_EQ(r.exit_code, 0) << r.err;
    EXPECT_THAT(r.out, HasSubstr(c.has));
    EXPECT_THAT(r.out, ::testing::Not(HasSubstr(c.lacks)));
  }
  CommandResult help = Cli({"help"});
  EXPECT_EQ(help.exit_code, 0);
  EXPECT_EQ(help.out, Cli({"--help"}).out);
  EXPECT_THAT(help.out, HasSubstr("compound"));
}

TEST(Cli, CompoundTakesSettingsPerElement) {
  // Co3O4 is a normal spinel: Co2+ tetrahedral, Co3+ octahedral low spin
  // (Greenwood and Earnshaw, Chemistry of the Elements, from memory).
  CommandResult r =
      Cli({"compound", "Co3O4", "--element-geometry", "Co:tetrahedral",
           "--element-spin-state", "Co:high", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  v1::RecordReport report;
  ASSERT_TRUE(google::protobuf::util::JsonStringToMessage(r.out, &report).ok())
      << r.out;
  ASSERT_GT(report.ions_size(), 0);
  for (const v1::IonReport& ion : report.ions()) {
    if (ion.element() != "Co") continue;
    EXPECT_EQ(ion.geometry(), "tetrahedral");
    // Tetrahedral d7 (Co2+) has one spin state and gets no label; d6
    // (Co3+) takes the requested one.
    EXPECT_EQ(ion.spin_state(), ion.state() == 3 ? "high" : "") << ion.state();
  }
}

TEST(Cli, IntermediateSpinOnAPlanarMacrocycle) {
  // Four-coordinate FePc is S = 1 with dx2-y2 empty (Barraclough, Martin,
  // Mitra and Sherwood, J. Chem. Phys. 53 (1970) 1638, from memory).
  CommandResult r = Cli({"compound", "FePc", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  v1::RecordReport report;
  ASSERT_TRUE(google::protobuf::util::JsonStringToMessage(r.out, &report).ok())
      << r.out;
  bool seen = false;
  for (const v1::IonReport& ion : report.ions()) {
    if (ion.element() != "Fe") continue;
    seen = true;
    EXPECT_EQ(ion.state(), 2);
    EXPECT_EQ(ion.geometry(), "square_planar");
    EXPECT_EQ(ion.spin_state(), "intermediate");
    EXPECT_EQ(ion.ligand(), "phthalocyaninate");
    EXPECT_EQ(ion.unpaired_electrons(), 2);
  }
  EXPECT_TRUE(seen);
  // The human table labels it and ends with the caution.
  CommandResult human = Cli({"compound", "FePc"});
  ASSERT_EQ(human.exit_code, 0) << human.err;
  EXPECT_THAT(human.out, HasSubstr("intermediate (square_planar"));
  EXPECT_THAT(human.out, HasSubstr("idealised estimates"));
  // The atom command takes it in a square plane only.
  CommandResult atom = Cli({"atom", "Fe2+", "--geometry", "square_planar",
                            "--spin-state", "intermediate", "--json"});
  ASSERT_EQ(atom.exit_code, 0) << atom.err;
  EXPECT_EQ(ParseJson(atom.out).unpaired_electrons(), 2);
  CommandResult octahedral = Cli({"atom", "Fe2+", "--geometry", "octahedral",
                                  "--spin-state", "intermediate"});
  EXPECT_NE(octahedral.exit_code, 0);
  EXPECT_THAT(octahedral.err, HasSubstr("square_planar"));
  // A record asks for it beside the geometry only.
  CommandResult record = Cli({"compound", "FeCl2", "--element-spin-state",
                              "Fe:intermediate", "--json"});
  EXPECT_THAT(record.out, HasSubstr("Fe:intermediate needs geometry"));
}

TEST(Cli, CompoundGivesTheInverseSpinelOfMagnetite) {
  // Issue 11's check: Fe3O4 is an inverse spinel with 4 μB per formula
  // unit (Smit and Wijn, Ferrites, about 4.1 measured, from memory).
  CommandResult r = Cli(
      {"compound", "Fe3O4", "--json", "--measured-saturation-moment", "4.1"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  v1::RecordReport report;
  ASSERT_TRUE(google::protobuf::util::JsonStringToMessage(r.out, &report).ok())
      << r.out;
  EXPECT_TRUE(report.valid());
  EXPECT_EQ(report.structure_family(), "spinel");
  EXPECT_THAT(report.structure_note(), HasSubstr("inverse spinel"));
  EXPECT_EQ(report.saturation_moment_per_formula_unit(), 4);
  EXPECT_EQ(report.saturation_moment_model(), "sublattice_neel");
  // Haematite at 3.0 μB: two high-spin Fe3+ expect about 8.4 μB.
  CommandResult fe2o3 =
      Cli({"compound", "Fe2O3", "--json", "--measured-moment", "3.0"});
  ASSERT_TRUE(
      google::protobuf::util::JsonStringToMessage(fe2o3.out, &report).ok());
  EXPECT_FALSE(report.valid());
  bool out_of_range = false;
  for (const v1::Diagnostic& d : report.diagnostics()) {
    out_of_range |= d.code() == "moment_out_of_range";
  }
  EXPECT_TRUE(out_of_range) << fe2o3.out;
  // Human output names the sites and the ordered moment.
  CommandResult human = Cli({"compound", "Fe3O4"});
  EXPECT_THAT(human.out, HasSubstr("Sites: spinel"));
  EXPECT_THAT(human.out, HasSubstr("Ordered moment: 4 μB per formula unit"));
  // Spinel counts without a spinel say why there is no estimate: Fe3Se4
  // is the monoclinic Cr3S4 type (Hulliger, Structural Chemistry of
  // Layer-Type Phases (1976), from memory).
  CommandResult cr3s4 = Cli({"compound", "Fe3Se4"});
  EXPECT_THAT(cr3s4.out, HasSubstr("Sites: not a spinel"));
  EXPECT_THAT(cr3s4.out, Not(HasSubstr("Ordered moment")));
  // A bad family name is a clear error in the report.
  CommandResult bad =
      Cli({"compound", "Fe3O4", "--structure-family", "wurtzite"});
  EXPECT_THAT(bad.out, HasSubstr("wurtzite"));
}

TEST(Cli, CompoundGivesMetallicMomentEstimates) {
  // Co2MnAl: M = Z_t - 24 = 28 - 24 = 4 μB (Slater-Pauling rule for
  // Heusler compounds; measured 4.01, Webster, J. Phys. Chem. Solids 32,
  // 1221 (1971), from memory).
  CommandResult r = Cli({"compound", "Co2MnAl", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  v1::RecordReport report;
  ASSERT_TRUE(google::protobuf::util::JsonStringToMessage(r.out, &report).ok())
      << r.out;
  EXPECT_EQ(report.moment_model(), "slater_pauling_full_heusler");
  EXPECT_TRUE(report.saturation_moment_estimated());
  EXPECT_EQ(report.saturation_moment_per_formula_unit(), 4);
  EXPECT_EQ(report.total_valence_electrons(), 28);
  EXPECT_EQ(report.unpaired_per_formula_unit(), 0);  // Not 2 x 3 + 5 + 1.
  // Human output says what the figure is, and that measurement decides.
  CommandResult human = Cli({"compound", "Co2MnAl"});
  ASSERT_EQ(human.exit_code, 0) << human.err;
  EXPECT_THAT(human.out, HasSubstr("Ordered moment: 4 μB per formula unit"));
  EXPECT_THAT(human.out, HasSubstr("measurement decides"));
  EXPECT_THAT(human.out, HasSubstr("free-atom configuration"));
  // Outside every rule: no estimate, and the reason.
  CommandResult none = Cli({"compound", "Pd", "--json"});
  ASSERT_TRUE(
      google::protobuf::util::JsonStringToMessage(none.out, &report).ok());
  EXPECT_EQ(report.moment_model(), "none");
  EXPECT_FALSE(report.saturation_moment_estimated());
  EXPECT_THAT(report.moment_note(), HasSubstr("no estimate"));
  EXPECT_THAT(Cli({"compound", "Pd"}).out,
              HasSubstr("Ordered moment: no estimate"));
}

TEST(Cli, MessagesNameTheOptionThatCarriedTheValue) {
  CommandResult r = Cli({"atom", "Fe", "--charge", "99"});
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("--charge: "));
  CommandResult spec = Cli({"atom", "Xx"});
  EXPECT_EQ(spec.exit_code, 1);
  EXPECT_THAT(spec.err, HasSubstr("SPEC: "));
}

TEST(Cli, DoneWhenChecksForIons) {
  // Kittel, Introduction to Solid State Physics, paramagnetism chapter:
  // Gd3+ 8S7/2, p = 7.94.
  CommandResult gd = Cli({"atom", "Gd3+", "--json"});
  ASSERT_EQ(gd.exit_code, 0) << gd.err;
  v1::AtomDescription d = ParseJson(gd.out);
  EXPECT_EQ(d.configuration(), "[Xe] 4f7");
  EXPECT_EQ(d.unpaired_electrons(), 7);
  EXPECT_EQ(d.term_symbol(), "8So7/2");
  EXPECT_NEAR(d.j_moment(), 7.94, 0.005);
  // Low-spin d6 octahedral is diamagnetic (Miessler & Tarr, Inorganic
  // Chemistry, ligand field chapter, from memory).
  CommandResult co = Cli({"atom", "Co3+", "--geometry", "octahedral",
                          "--spin-state", "low", "--json"});
  ASSERT_EQ(co.exit_code, 0) << co.err;
  EXPECT_EQ(ParseJson(co.out).unpaired_electrons(), 0);
  // NIST ASD ground levels, from memory: Ce is 1G°4; Hund's rules give 3H°4.
  CommandResult ce = Cli({"atom", "Ce", "--json"});
  ASSERT_EQ(ce.exit_code, 0) << ce.err;
  v1::AtomDescription c = ParseJson(ce.out);
  EXPECT_EQ(c.term_symbol(), "1Go4");
  EXPECT_EQ(c.hund_term_symbol(), "3Ho4");
}

TEST(Cli, ChargeOptionAndConfigurationOverride) {
  CommandResult r = Cli({"atom", "26", "--charge", "2", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(ParseJson(r.out).configuration(), "[Ar] 3d6");
  CommandResult o =
      Cli({"atom", "Cr", "--configuration", "[Ar] 3d4 4s2", "--json"});
  ASSERT_EQ(o.exit_code, 0) << o.err;
  EXPECT_TRUE(ParseJson(o.out).configuration_user_supplied());
  EXPECT_EQ(ParseJson(o.out).unpaired_electrons(), 4);
  CommandResult bad = Cli({"atom", "Cr", "--configuration", "[Ar] 3d4"});
  EXPECT_EQ(bad.exit_code, 1);
  EXPECT_THAT(bad.err, HasSubstr("22 electrons"));
  CommandResult pauli = Cli({"atom", "Cr", "--configuration", "[Ar] 3d11"});
  EXPECT_EQ(pauli.exit_code, 1);
  EXPECT_THAT(pauli.err, HasSubstr("Pauli capacity"));
}

TEST(Cli, ElementsListsAll118) {
  CommandResult r = Cli({"elements", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  v1::ListElementsResponse list;
  ASSERT_TRUE(google::protobuf::util::JsonStringToMessage(r.out, &list).ok());
  EXPECT_EQ(list.elements_size(), 118);
}

TEST(Cli, WorksFromAnyDirectory) {
  // The tables are compiled in: no data files are read at run time.
  CommandResult r = RunCommand(
      {"/bin/sh", "-c",
       "cd / && '" + BinPath("clients/shellwright") + "' atom Fe --json"});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  EXPECT_THAT(r.out, HasSubstr("[Ar] 3d6 4s2"));
}

int Count(const std::string& text, const std::string& what) {
  int n = 0;
  for (size_t at = text.find(what); at != std::string::npos;
       at = text.find(what, at + what.size())) {
    ++n;
  }
  return n;
}

TEST(Cli, AtomTakesSeveralSpeciesInOneCall) {
  CommandResult human = Cli({"atom", "Fe2+", "Fe3+", "Co3+"});
  ASSERT_EQ(human.exit_code, 0) << human.err;
  EXPECT_THAT(human.out, HasSubstr("Fe2+  Iron"));
  EXPECT_THAT(human.out, HasSubstr("Fe3+  Iron"));
  EXPECT_THAT(human.out, HasSubstr("Co3+  Cobalt"));
  // The caution ends the output once, not once per species.
  EXPECT_EQ(Count(human.out, "Caution:"), 1) << human.out;
  EXPECT_GT(human.out.rfind("Caution:"), human.out.rfind("Co3+  Cobalt"));

  CommandResult json = Cli({"atom", "Fe2+", "Fe3+", "Co3+", "--json"});
  ASSERT_EQ(json.exit_code, 0) << json.err;
  std::vector<std::string> lines;
  for (size_t start = 0; start < json.out.size();) {
    const size_t end = json.out.find('\n', start);
    lines.push_back(json.out.substr(start, end - start));
    start = end + 1;
  }
  ASSERT_EQ(lines.size(), 3u) << json.out;
  // NIST ASD, from memory: Fe2+ [Ar] 3d6, Fe3+ [Ar] 3d5, Co3+ [Ar] 3d6.
  EXPECT_EQ(ParseJson(lines[0]).configuration(), "[Ar] 3d6");
  EXPECT_EQ(ParseJson(lines[1]).configuration(), "[Ar] 3d5");
  EXPECT_EQ(ParseJson(lines[2]).symbol(), "Co");

  // A bad species gets its one line; the others are still answered.
  CommandResult mixed = Cli({"atom", "Fe2+", "Xx", "Co3+", "--json"});
  EXPECT_EQ(mixed.exit_code, 1);
  EXPECT_EQ(Count(mixed.out, "\n"), 2) << mixed.out;
  EXPECT_EQ(Count(mixed.err, "\n"), 1) << mixed.err;
  EXPECT_THAT(mixed.err, HasSubstr("Xx"));
}

TEST(Cli, QuietDropsTheCaution) {
  for (std::vector<std::string> args :
       {std::vector<std::string>{"atom", "Fe"},
        std::vector<std::string>{"compound", "Fe2O3"}}) {
    CommandResult loud = Cli(args);
    EXPECT_EQ(Count(loud.out, "Caution:"), 1) << loud.out;
    args.push_back("--quiet");
    CommandResult quiet = Cli(args);
    EXPECT_EQ(quiet.exit_code, 0) << quiet.err;
    EXPECT_THAT(quiet.out, ::testing::Not(HasSubstr("Caution")));
  }
}

TEST(Cli, RegressionCompoundErrorPrintedOnce) {
  // Issue 16: errors appeared in the report and again on stderr.
  CommandResult r = Cli({"compound", "Fe2O3)"});
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_EQ(Count(r.out + r.err, "malformed"), 1) << r.out << r.err;
  EXPECT_THAT(r.out, HasSubstr("INVALID"));
  EXPECT_TRUE(r.err.empty()) << r.err;
}

TEST(Cli, RegressionUnpairedCountSaysWhichFieldItIs) {
  // Issue 16: "Unpaired electrons 0" beside free-ion boxes showing 4.
  // Low-spin octahedral d6 has none, the free ion four (Miessler & Tarr,
  // Inorganic Chemistry, ligand field chapter, from memory).
  CommandResult r =
      Cli({"atom", "Co3+", "--geometry", "octahedral", "--spin-state", "low"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_THAT(r.out,
              HasSubstr("0 in the octahedral field (low spin); 4 in the free "
                        "ion"));
  EXPECT_THAT(r.out, HasSubstr("Open subshells of the free ion"));
}

TEST(Cli, RegressionNoSpinLabelWithoutSpinChoice) {
  // Issue 16: Ti4+ (d0) showed "high (octahedral)", Cu+ (d10) "t2g6 eg4".
  CommandResult ti = Cli({"compound", "TiO2"});
  ASSERT_EQ(ti.exit_code, 0) << ti.err;
  EXPECT_THAT(ti.out, ::testing::Not(HasSubstr("high")));
  EXPECT_THAT(ti.out, ::testing::Not(HasSubstr("t2g")));
  CommandResult cu = Cli({"compound", "CuCl"});
  ASSERT_EQ(cu.exit_code, 0) << cu.err;
  EXPECT_THAT(cu.out, ::testing::Not(HasSubstr("high")));
  EXPECT_THAT(cu.out, ::testing::Not(HasSubstr("eg4")));
  CommandResult atom = Cli({"atom", "Ti4+", "--geometry", "octahedral"});
  EXPECT_THAT(atom.out, HasSubstr("empty d subshell: no spin state"));
  // Octahedral d3 has one spin state whatever the field strength
  // (Miessler & Tarr, from memory).
  CommandResult cr = Cli({"atom", "Cr3+", "--geometry", "octahedral"});
  EXPECT_THAT(cr.out, HasSubstr("d3: one spin state only"));
}

TEST(Cli, RegressionTetrahedralOccupancyReadsUnambiguously) {
  // Issue 16: "e4 t23" reads as t2 with 3 or t with 23. Tetrahedral Co2+
  // (d7) is e4 t2^3 (Miessler & Tarr, from memory).
  CommandResult r =
      Cli({"compound", "CoCl2", "--element-geometry", "Co:tetrahedral"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_THAT(r.out, HasSubstr("e⁴ t2³"));
  EXPECT_THAT(r.out, ::testing::Not(HasSubstr("t23")));
}

TEST(Cli, RegressionAlternativesBestFirst) {
  // Issue 16: an alternative with score 138 came before one with 136 (in
  // Ca10(PO4)6(OH)2, which its phosphate and hydroxide units now settle
  // with no alternative). La0.7Sr0.3MnO3 has several.
  CommandResult r = Cli({"compound", "La0.7Sr0.3MnO3", "--alternatives", "3"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  double last = -1;
  int seen = 0;
  for (size_t at = r.out.find("Alternative"); at != std::string::npos;
       at = r.out.find("Alternative", at + 1)) {
    const size_t score = r.out.find("(score ", at);
    ASSERT_NE(score, std::string::npos);
    const double value = std::stod(r.out.substr(score + 7));
    EXPECT_GE(value, last) << r.out;
    last = value;
    ++seen;
  }
  EXPECT_GE(seen, 2) << r.out;
}

TEST(Cli, RegressionOneUnpairedElectronIsSingular) {
  // Issue 16: "1 unpaired electrons". CuO: Cu2+ is d9, one unpaired
  // electron (Greenwood and Earnshaw, from memory).
  CommandResult r = Cli({"compound", "CuO"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_THAT(r.out, HasSubstr("1 unpaired electron,"));
  EXPECT_THAT(r.out, ::testing::Not(HasSubstr("1 unpaired electrons")));
}

TEST(Cli, RegressionAtomicWeightsKeepTrailingZeros) {
  // Issue 16: O printed as 16 and K as 39.1. IUPAC abridged standard
  // atomic weights (CIAAW 2021, from memory): O 15.999, Ne 20.180,
  // K 39.098, Tc [98].
  CommandResult r = Cli({"elements"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_THAT(r.out, ContainsRegex("\n8 +O +Oxygen .* 15\\.999 "));
  EXPECT_THAT(r.out, ContainsRegex("\n10 +Ne +Neon .* 20\\.180 "));
  EXPECT_THAT(r.out, ContainsRegex("\n19 +K +Potassium .* 39\\.098 "));
  EXPECT_THAT(r.out, ContainsRegex("\n43 +Tc .* \\[98\\] "));
  // Pauling electronegativity column (Pauling scale, from memory: O 3.44).
  EXPECT_THAT(r.out, ContainsRegex("\n8 +O .* 3\\.44 "));
}

TEST(Cli, ElementsFiltersAndCsv) {
  CommandResult r = Cli({"elements", "--period", "2", "--block", "p", "--csv"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  // Period 2, p block: B, C, N, O, F, Ne (periodic table layout).
  EXPECT_EQ(Count(r.out, "\n"), 7) << r.out;
  EXPECT_THAT(r.out, ::testing::StartsWith("atomic_number,symbol,name,"));
  EXPECT_THAT(r.out, HasSubstr("\n8,O,Oxygen,2,16,p,15.999,false,3.44,"));
  EXPECT_THAT(r.out, HasSubstr("\n10,Ne,Neon,2,18,p,20.180,false,,"));
  CommandResult group = Cli({"elements", "--group", "1", "--json"});
  v1::ListElementsResponse list;
  ASSERT_TRUE(
      google::protobuf::util::JsonStringToMessage(group.out, &list).ok());
  // Group 1: H, Li, Na, K, Rb, Cs, Fr.
  EXPECT_EQ(list.elements_size(), 7);
}

TEST(Cli, ElementsFlagEstimatedElectronegativities) {
  // Tb's tabulated value is an interpolation (CRC Handbook, from memory).
  CommandResult csv = Cli({"elements", "--csv"});
  ASSERT_EQ(csv.exit_code, 0) << csv.err;
  EXPECT_THAT(csv.out, HasSubstr(",ground_configuration,"
                                 "electronegativity_estimated\n"));
  EXPECT_THAT(csv.out, ::testing::ContainsRegex("\n65,Tb,[^\n]*,true\n"));
  EXPECT_THAT(csv.out, ::testing::ContainsRegex("\n26,Fe,[^\n]*,false\n"));
  CommandResult human = Cli({"elements"});
  ASSERT_EQ(human.exit_code, 0) << human.err;
  EXPECT_THAT(human.out, ::testing::ContainsRegex("Tb +Terbium[^\n]*~1\\.10"));
  EXPECT_THAT(human.out, HasSubstr("~ an estimate"));
}

TEST(Cli, RegressionLevelOfANonGroundConfigurationIsNotTheGroundLevel) {
  // Issue 16: "[Ar] 3d4 4s2" is not Cr's ground configuration ([Ar] 3d5
  // 4s1, NIST ASD, from memory), so its lowest level is not "Ground level".
  CommandResult r = Cli({"atom", "Cr", "--configuration", "[Ar] 3d4 4s2"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_THAT(r.out, HasSubstr("Lowest level"));
  EXPECT_THAT(r.out, ::testing::Not(HasSubstr("Ground level")));
  EXPECT_THAT(r.out, HasSubstr("not the ground configuration ([Ar] 3d5 4s1)"));
  CommandResult ground = Cli({"atom", "Cr", "--configuration", "[Ar] 3d5 4s1"});
  EXPECT_THAT(ground.out, ::testing::Not(HasSubstr("not the ground")));
}

TEST(Cli, RegressionUnknownOxidationStateGetsANote) {
  // Issue 16: Fe(VIII) was described with no word that iron has no known
  // +8 state (highest +6, Greenwood and Earnshaw, from memory).
  CommandResult r = Cli({"atom", "Fe(VIII)", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  v1::AtomDescription d = ParseJson(r.out);
  ASSERT_GE(d.notes_size(), 1);
  EXPECT_THAT(d.notes(0), HasSubstr("+8 is not a known oxidation state of Fe"));
  CommandResult known = Cli({"atom", "Fe(III)", "--json"});
  EXPECT_EQ(ParseJson(known.out).notes_size(), 0);
}

TEST(Cli, EveryBinaryPrintsItsVersion) {
  for (const char* binary : {"clients/shellwright", "server/shellwrightd",
                             "clients/loadgen/shellwright_loadgen"}) {
    CommandResult r = RunCommand({BinPath(binary), "--version"});
    SCOPED_TRACE(binary);
    EXPECT_EQ(r.exit_code, 0) << r.err;
    EXPECT_THAT(r.out, ContainsRegex("^shellwright[a-z_]* [0-9]+\\.[0-9]+"));
    EXPECT_THAT(r.out, ContainsRegex("data/elements.tsv sha256:[0-9a-f]{12}"));
    EXPECT_THAT(r.out,
                ContainsRegex("data/oxidation_states.tsv sha256:[0-9a-f]{12}"));
  }
}

TEST(Cli, ConnectionFailureSaysWhatWasTriedAndWhatToCheck) {
  // Port 1 on loopback: nothing listens there.
  CommandResult r =
      Cli({"--server", "127.0.0.1:1", "--timeout", "5", "atom", "Fe"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_THAT(r.err, HasSubstr("cannot reach shellwrightd at 127.0.0.1:1"));
  EXPECT_THAT(r.err, HasSubstr("check that the server is running"));
  EXPECT_EQ(Count(r.err, "\n"), 1) << r.err;
}

TEST(Cli, DoneWhenChargedComplexIsValidWithChargePlusTwo) {
  // Issue 16: [Fe(H2O)6]2+ is hexaaquairon(II): Fe+2, water neutral
  // (Greenwood and Earnshaw, from memory).
  CommandResult r = Cli({"compound", "[Fe(H2O)6]2+", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  v1::RecordReport report;
  ASSERT_TRUE(google::protobuf::util::JsonStringToMessage(r.out, &report).ok());
  EXPECT_TRUE(report.valid());
  double charge = 0;
  for (const v1::OxidationState& s : report.oxidation_states()) {
    charge += s.state() * s.count();
    if (s.element() == "Fe") {
      EXPECT_EQ(s.state(), 2);
    }
  }
  EXPECT_DOUBLE_EQ(charge, 2);
  // A record charge that contradicts the suffix is an error.
  CommandResult contradicts =
      Cli({"compound", "[Fe(H2O)6]2+", "--charge", "3", "--json"});
  EXPECT_EQ(contradicts.exit_code, 1);
  EXPECT_THAT(contradicts.out, HasSubstr("charge_contradicts_formula"));
}

TEST(Cli, DoneWhenNonstoichiometricCuprateIsValidWithAnInfo) {
  CommandResult r = Cli({"compound", "YBa2Cu3O7-δ", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  v1::RecordReport report;
  ASSERT_TRUE(google::protobuf::util::JsonStringToMessage(r.out, &report).ok());
  EXPECT_TRUE(report.valid());
  bool info = false;
  for (const v1::Diagnostic& d : report.diagnostics()) {
    info |= d.severity() == "info" && d.code() == "nonstoichiometry_assumed";
  }
  EXPECT_TRUE(info) << r.out;
  CommandResult given =
      Cli({"compound", "La1-xSrxMnO3", "--variables", "x=0.3", "--quiet"});
  EXPECT_EQ(given.exit_code, 0) << given.out;
  EXPECT_THAT(given.out, HasSubstr("La+3 ×7/10"));
  CommandResult missing = Cli({"compound", "La1-xSrxMnO3"});
  EXPECT_EQ(missing.exit_code, 1);
  EXPECT_THAT(missing.out, HasSubstr("variable_without_value"));
}

TEST(Cli, SuperscriptChargesAndDeclaredStatesInEveryForm) {
  CommandResult atom = Cli({"atom", "Fe³⁺", "--json"});
  ASSERT_EQ(atom.exit_code, 0) << atom.err;
  EXPECT_EQ(ParseJson(atom.out).charge(), 3);
  for (const char* declared : {"Fe:III", "Fe:3+", "Fe:+3", "Fe:3"}) {
    CommandResult r =
        Cli({"compound", "Fe2O3", "--declared", declared, "--quiet"});
    EXPECT_EQ(r.exit_code, 0) << declared << r.out;
    EXPECT_THAT(r.out, HasSubstr("Fe+3 ×2")) << declared;
  }
}

// The shared libraries the dynamic loader loads for `binary` running
// `args`, as its LD_DEBUG=libs trace lists them (the "calling init:" lines).
std::vector<std::string> LoadedLibraries(const std::string& binary,
                                         std::vector<std::string> args) {
  args.insert(args.begin(), {"/usr/bin/env", "LD_DEBUG=libs", binary});
  CommandResult r = RunCommand(args);
  EXPECT_EQ(r.exit_code, 0) << r.err;
  std::vector<std::string> libraries;
  const std::string marker = "calling init: ";
  for (size_t at = r.err.find(marker); at != std::string::npos;
       at = r.err.find(marker, at + 1)) {
    const size_t start = at + marker.size();
    libraries.push_back(r.err.substr(start, r.err.find('\n', start) - start));
  }
  return libraries;
}

// The in-process CLI links no gRPC; with SHELLWRIGHT_STATIC_CLI (off in
// sanitizer and fuzzer builds) it takes Abseil and protobuf from static
// archives, since loading them as shared libraries dominated a one-record
// run (docs/performance.md, "One record in a fresh process").
TEST(Cli, InProcessCliLoadsNoGrpcAbseilOrProtobufLibraries) {
  const std::vector<std::string> in_process = LoadedLibraries(
      BinPath("clients/shellwright"), {"compound", "Fe3O4", "--json"});
  ASSERT_FALSE(in_process.empty()) << "no LD_DEBUG trace";
  EXPECT_THAT(in_process, Contains(HasSubstr("libc.so")));
  EXPECT_THAT(in_process, Not(Contains(HasSubstr("libgrpc"))));
#if SHELLWRIGHT_STATIC_CLI
  EXPECT_THAT(in_process, Not(Contains(HasSubstr("libabsl_"))));
  EXPECT_THAT(in_process, Not(Contains(HasSubstr("libprotobuf"))));
#endif
  // The twin that --server runs is the one that loads gRPC, which shows
  // that the trace would name it.
  EXPECT_THAT(
      LoadedLibraries(BinPath("clients/shellwright-remote"), {"atom", "Fe3+"}),
      Contains(HasSubstr("libgrpc++")));
}

}  // namespace
}  // namespace shellwright
