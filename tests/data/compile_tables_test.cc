// Tests that data/compile_tables rejects malformed tables with a message naming
// file, line and problem, and accepts the real tables.

#include <fstream>
#include <string>
#include <utility>
#include <vector>

#include "gmock/gmock.h"
#include "gtest/gtest.h"
#include "tests/testing/subprocess.h"
#include "tests/testing/temp_dir.h"

namespace shellwright {
namespace {

using ::shellwright::testing::BinPath;
using ::shellwright::testing::CommandResult;
using ::shellwright::testing::ReadFile;
using ::shellwright::testing::RunCommand;
using ::shellwright::testing::SourcePath;
using ::testing::HasSubstr;

// Runs compile_tables with the real tables, replacing `table` by
// `contents`.
CommandResult RunWith(const std::string& table, const std::string& contents) {
  // Each table: compile_tables' option and the file in data/.
  static const std::pair<const char*, const char*> kTables[] = {
      {"elements", "elements"},
      {"exceptions", "configuration_exceptions"},
      {"departures", "ground_level_departures"},
      {"moments", "measured_moments"},
      {"oxidation", "oxidation_states"},
      {"units", "units"},
      {"abbreviations", "ligand_abbreviations"},
      {"ligands", "spectrochemical_series"},
      {"crossover", "spin_crossover"},
      {"chalcogenide", "chalcogenide_states"},
      {"bound_only", "bound_only_states"},
      {"preferences", "state_preferences"},
      {"pairs", "mixed_valence_pairs"},
      {"state_en", "state_electronegativities"},
      {"potentials", "reduction_potentials"},
      {"orbital", "orbital_ranges"},
      {"intervals", "multiplet_intervals"},
      {"actinides", "actinide_moments"},
      {"spin_orbit", "spin_orbit_constants"},
      {"sites", "site_preferences"},
  };
  const testing::TempDir temp;
  const std::string& dir = temp.path();
  std::vector<std::string> args = {BinPath("data/shellwright_compile_tables")};
  for (const auto& [option, name] : kTables) {
    std::string path = SourcePath(std::string("data/") + name + ".tsv");
    if (table == name) {
      path = dir + "/" + name + ".tsv";
      std::ofstream(path) << contents;
    }
    args.push_back(std::string("--") + option + "=" + path);
  }
  args.push_back("--out=" + dir + "/out.cc");
  return RunCommand(args);
}

std::string RealTable(const std::string& name) {
  return ReadFile(SourcePath("data/" + name + ".tsv"));
}

TEST(CompileTables, AcceptsTheRealTables) {
  CommandResult r = RunWith("", "");
  EXPECT_EQ(r.exit_code, 0) << r.err;
}

TEST(CompileTables, WrongColumnCountNamesFileAndLine) {
  std::string t = RealTable("configuration_exceptions");
  t += "24\tCr\n";
  CommandResult r = RunWith("configuration_exceptions", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("configuration_exceptions.tsv:"));
  EXPECT_THAT(r.err, HasSubstr("expected 4 tab-separated fields"));
}

TEST(CompileTables, OverCapacityConfigurationIsRejected) {
  std::string t = RealTable("configuration_exceptions");
  t += "26\tFe\t[Ar] 3d11 4s2\tinvented for this test\n";
  CommandResult r = RunWith("configuration_exceptions", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("Pauli capacity"));
}

TEST(CompileTables, ElectronCountMustEqualZ) {
  std::string t = RealTable("configuration_exceptions");
  t += "26\tFe\t[Ar] 3d7 4s2\tinvented for this test\n";
  CommandResult r = RunWith("configuration_exceptions", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("holds 27 electrons, but Z is 26"));
}

TEST(CompileTables, BadNumberInElementsTable) {
  std::string t = RealTable("elements");
  const size_t pos = t.find("55.845");
  ASSERT_NE(pos, std::string::npos);
  t.replace(pos, 6, "heavy");
  CommandResult r = RunWith("elements", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("elements.tsv:"));
  EXPECT_THAT(r.err, HasSubstr("standard_atomic_weight"));
}

TEST(CompileTables, UnknownSymbolInOxidationTable) {
  std::string t = RealTable("oxidation_states");
  t += "Xq\t2\tyes\tinvented for this test\n";
  CommandResult r = RunWith("oxidation_states", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("unknown element symbol 'Xq'"));
}

TEST(CompileTables, PreferenceForAStateTheElementLacksIsRejected) {
  std::string t = RealTable("state_preferences");
  t += "Na\thard\t2\t1\tnowhere\n";
  CommandResult r = RunWith("state_preferences", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("state_preferences.tsv:"));
  EXPECT_THAT(r.err, HasSubstr("Na 2 is not a state in oxidation_states.tsv"));
}

TEST(CompileTables, PreferenceNeedsAKnownAnionClass) {
  std::string t = RealTable("state_preferences");
  t += "Fe\tmedium\t2\t1\tnowhere\n";
  CommandResult r = RunWith("state_preferences", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("expected hard, soft, double_perovskite, "));
}

TEST(CompileTables, DuplicatePreferenceIsRejected) {
  std::string t = RealTable("state_preferences");
  t += "Fe\thard\t3\t2\tnowhere\n";
  CommandResult r = RunWith("state_preferences", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("duplicate row"));
}

TEST(CompileTables, MixedValencePairMustBeOrdered) {
  std::string t = RealTable("mixed_valence_pairs");
  t += "Fe\t3\t2\tany\tnowhere\n";
  CommandResult r = RunWith("mixed_valence_pairs", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("low must be below high"));
}

TEST(CompileTables, StateElectronegativityOutOfRangeIsRejected) {
  std::string t = RealTable("state_electronegativities");
  t += "Fe\t2\t7.5\tnowhere\n";
  CommandResult r = RunWith("state_electronegativities", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("expected a number from"));
}

TEST(CompileTables, ReductionPotentialCoupleMustGoDown) {
  std::string t = RealTable("reduction_potentials");
  t += "Ni\t2\t3\t1.0\tnowhere\n";
  CommandResult r = RunWith("reduction_potentials", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("reduction_potentials.tsv:"));
  EXPECT_THAT(r.err, HasSubstr("reduced must be a positive state below"));
}

TEST(CompileTables, OrbitalRangeMustRunUpward) {
  std::string t = RealTable("orbital_ranges");
  t += "3\ttetrahedral\thigh\t4.0\t3.5\tnowhere\n";
  CommandResult r = RunWith("orbital_ranges", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("orbital_ranges.tsv:"));
  EXPECT_THAT(r.err, HasSubstr("moment_low must not exceed moment_high"));
}

TEST(CompileTables, OrbitalRangeKeyIsUnique) {
  std::string t = RealTable("orbital_ranges");
  t += "7\toctahedral\thigh\t4.0\t5.0\tnowhere\n";
  CommandResult r = RunWith("orbital_ranges", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("duplicate row"));
}

TEST(CompileTables, SitePreferenceNeedsAKnownPreference) {
  std::string t = RealTable("site_preferences");
  t += "Ba+2\t-\t0\tall\tsquare\tinvented for this test\n";
  CommandResult r = RunWith("site_preferences", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("site_preferences.tsv:"));
  EXPECT_THAT(r.err, HasSubstr("column 'preference'"));
}

TEST(CompileTables, SitePreferenceDCountMustBeAtMostTen) {
  std::string t = RealTable("site_preferences");
  t += "d11\t-\t0\tall\t-\tinvented for this test\n";
  CommandResult r = RunWith("site_preferences", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("must be d0 to d10"));
}

TEST(CompileTables, DuplicateSitePreferenceIsRejected) {
  std::string t = RealTable("site_preferences");
  t += "Ni+2\t-\t86\tall\t-\tinvented for this test\n";
  CommandResult r = RunWith("site_preferences", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("duplicate ion 'Ni+2'"));
}

TEST(CompileTables, UnitStatesMustSumToItsCharge) {
  std::string t = RealTable("units");
  t += "test unit\t-2\tS:6:1,O:-2:3\t0\tSO3\t-\tinvented for this test\n";
  CommandResult r = RunWith("units", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("sum to 0, not to the unit's charge -2"));
}

TEST(CompileTables, UnitWrittenFormMustHoldItsAtoms) {
  std::string t = RealTable("units");
  t += "test unit\t-2\tS:4:1,O:-2:3\t0\tSO4\t-\tinvented for this test\n";
  CommandResult r = RunWith("units", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("'SO4' does not hold the unit's atoms"));
}

TEST(CompileTables, LigandMustBeAUnitOrAnElement) {
  std::string t = RealTable("spectrochemical_series");
  t += "no such ligand\t1.0\tO\t1\t-\tinvented for this test\n";
  CommandResult r = RunWith("spectrochemical_series", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("neither a unit in units.tsv nor an element"));
}

// Only a tetradentate ligand can hold four donors in a plane.
TEST(CompileTables, PlanarLigandMustBeTetradentate) {
  std::string t = RealTable("spectrochemical_series");
  t += "hydrogensulfide\t0.8\tS\t1\tplanar\tinvented for this test\n";
  CommandResult r = RunWith("spectrochemical_series", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("a planar ligand must be tetradentate"));
}

// A capitalised abbreviation that is an element symbol would change the
// meaning of formulas that parse today ("Co" is cobalt).
TEST(CompileTables, AbbreviationMustNotBeAnElementSymbol) {
  std::string t = RealTable("ligand_abbreviations");
  t += "Co\tcarbon monoxide\tinvented for this test\n";
  CommandResult r = RunWith("ligand_abbreviations", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("ligand_abbreviations.tsv:"));
  EXPECT_THAT(r.err, HasSubstr("abbreviation 'Co' is an element symbol"));
}

TEST(CompileTables, AbbreviationMustBeLettersLowerCaseAfterTheFirst) {
  for (const char* bad : {"x", "bPy", "py2", "p-y"}) {
    std::string t = RealTable("ligand_abbreviations");
    t += std::string(bad) + "\tpyridine\tinvented for this test\n";
    CommandResult r = RunWith("ligand_abbreviations", t);
    EXPECT_EQ(r.exit_code, 1) << bad;
    EXPECT_THAT(r.err, HasSubstr("must be 2 to 8 ASCII letters")) << bad;
  }
}

TEST(CompileTables, AbbreviationMustNameAUnit) {
  std::string t = RealTable("ligand_abbreviations");
  t += "tmen\tno such unit\tinvented for this test\n";
  CommandResult r = RunWith("ligand_abbreviations", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("unit 'no such unit' is not a unit"));
}

TEST(CompileTables, DuplicateAbbreviationIsRejected) {
  std::string t = RealTable("ligand_abbreviations");
  t += "en\tethylenediamine\tinvented for this test\n";
  CommandResult r = RunWith("ligand_abbreviations", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("duplicate abbreviation 'en'"));
}

TEST(CompileTables, MalformedTermSymbol) {
  std::string t = RealTable("ground_level_departures");
  t += "26\tFe\t5Q9\t5D4\tinvented for this test\n";
  CommandResult r = RunWith("ground_level_departures", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("ground_level_departures.tsv:"));
  EXPECT_THAT(r.err, HasSubstr("term symbol"));
}

TEST(CompileTables, MultipletIntervalNeedsAnOpen4fShellWithL) {
  std::string t = RealTable("multiplet_intervals");
  t += "Gd\t3\t500\tinvented for this test\n";  // 4f7: L = 0.
  CommandResult r = RunWith("multiplet_intervals", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("multiplet_intervals.tsv:"));
  EXPECT_THAT(r.err, HasSubstr("open 4f shell of L > 0"));
}

TEST(CompileTables, DuplicateMultipletIntervalIsRejected) {
  std::string t = RealTable("multiplet_intervals");
  t += "Eu\t3\t400\tinvented for this test\n";
  CommandResult r = RunWith("multiplet_intervals", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("duplicate ion"));
}

TEST(CompileTables, ActinideMomentMustBeOrdered) {
  std::string t = RealTable("actinide_moments");
  t += "Np\t4\tF\tNpF4\t3.0\t2.0\tno\tinvented for this test\n";
  CommandResult r = RunWith("actinide_moments", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("moment_low is above moment_high"));
}

TEST(CompileTables, TipOnlyActinideHasNoMoment) {
  std::string t = RealTable("actinide_moments");
  t += "Pu\t4\tF\tPuF4\t0\t1.0\tyes\tinvented for this test\n";
  CommandResult r = RunWith("actinide_moments", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("tip_only row has no Curie moment"));
}

TEST(CompileTables, ActinideTableHoldsActinidesOnly) {
  std::string t = RealTable("actinide_moments");
  t += "Fe\t3\tO\tFe2O3\t5.0\t6.0\tno\tinvented for this test\n";
  CommandResult r = RunWith("actinide_moments", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("Fe is not an actinide"));
}

TEST(CompileTables, BoundOnlyStateMustBeAKnownStateOnce) {
  std::string t = RealTable("bound_only_states");
  t += "Fe\t9\tnowhere\tinvented for this test\n";
  CommandResult r = RunWith("bound_only_states", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("is not a state in oxidation_states.tsv"));
  t = RealTable("bound_only_states") + "Fe\t6\tagain\tinvented\n";
  r = RunWith("bound_only_states", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("duplicate row for Fe 6"));
}

TEST(CompileTables, SpinOrbitConstantNeedsA4dOr5dT2gIon) {
  std::string t = RealTable("spin_orbit_constants");
  t += "Fe\t3\t400\tinvented for this test\n";  // 3d.
  CommandResult r = RunWith("spin_orbit_constants", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("not a 4d or 5d ion with 1 to 5 d electrons"));
  t = RealTable("spin_orbit_constants") + "Ir\t3\t3000\tinvented\n";  // d6.
  r = RunWith("spin_orbit_constants", t);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.err, HasSubstr("not a 4d or 5d ion with 1 to 5 d electrons"));
}

}  // namespace
}  // namespace shellwright
