// Tests for the shellwright CLI (clients/shellwright): output, JSON schema
// and exit codes, by running the real binary.

#include <string>

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
using ::testing::HasSubstr;

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
      {{"atom", "Fe", "Co"}, "'Co'"},
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
    EXPECT_EQ(ion.spin_state(), "high");
  }
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

}  // namespace
}  // namespace shellwright
