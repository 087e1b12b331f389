// Tests for engine/units.h: the units table and where a written formula
// shows a unit.

#include "engine/units.h"

#include <string>

#include "absl/status/statusor.h"
#include "engine/formula.h"
#include "gtest/gtest.h"

namespace shellwright {
namespace {

// The first match of a unit named `name` in `text`, or null.
struct Found {
  bool ok = false;
  Rational count;
};

Found FindNamed(const std::string& text, const std::string& name) {
  absl::StatusOr<Formula> f = ParseFormula(text);
  EXPECT_TRUE(f.ok()) << f.status();
  Found out;
  if (!f.ok()) return out;
  for (const UnitMatch& m : FindUnitMatches(*f)) {
    for (const Unit* u : m.units) {
      if (u->name == name && !out.ok) {
        out.ok = true;
        out.count = m.count;
      }
    }
  }
  return out;
}

TEST(Units, HalfFormsCountHalfAUnit) {
  // MPS3 is M2P2S6 written per P: PS3 is half a P2S6 4- anion (Brec,
  // Solid State Ionics 22 (1986) 3, from memory).
  Found half = FindNamed("NiPS3", "hexathiohypodiphosphate");
  ASSERT_TRUE(half.ok);
  EXPECT_EQ(half.count, Rational(1, 2));
  Found whole = FindNamed("Ni2P2S6", "hexathiohypodiphosphate");
  ASSERT_TRUE(whole.ok);
  EXPECT_EQ(whole.count, Rational(1));
  // A multiplier applies to the half: (PS3)2 is one unit.
  Found twice = FindNamed("Fe2(PS3)2", "hexathiohypodiphosphate");
  ASSERT_TRUE(twice.ok);
  EXPECT_EQ(twice.count, Rational(1));
}

TEST(Units, GroupsWrittenZeroTimesHoldNoUnit) {
  // A group or run multiplied by a small nonstoichiometry (δ, read as 0)
  // holds no atoms, so no unit: a zero-count unit reached the assignment
  // in a wide search (fuzz input unit_group_written_zero_times). Written
  // once, the same group is a unit (common practice, no source).
  for (const char* text : {"KCl(C5H5)δ", "NaClCpδ", "KCl(NH4)δ"}) {
    SCOPED_TRACE(text);
    absl::StatusOr<Formula> f = ParseFormula(text);
    ASSERT_TRUE(f.ok()) << f.status();
    for (const UnitMatch& m : FindUnitMatches(*f)) {
      EXPECT_FALSE(m.count.IsZero()) << m.units.front()->name;
    }
  }
  EXPECT_TRUE(FindNamed("KCl(C5H5)", "cyclopentadienide").ok);
}

TEST(Units, WholeFormsWithRepeatedElementsCountOne) {
  // CH3COO holds both of acetate's carbons: one unit, not two halves.
  Found acetate = FindNamed("CH3COONa", "acetate");
  ASSERT_TRUE(acetate.ok);
  EXPECT_EQ(acetate.count, Rational(1));
}

TEST(Units, HalfUnitsHoldTheirBondedPairStates) {
  // P-P, Ge-Ge bonds split equally: P+4 in P2S6 4-, Ge+3 in Ge2Te6 6-
  // (Karen, McArdle and Takats, Pure Appl. Chem. 88 (2016) 831, the ionic
  // approximation).
  const Unit* p2s6 = FindUnit("hexathiohypodiphosphate");
  ASSERT_NE(p2s6, nullptr);
  EXPECT_EQ(p2s6->charge, -4);
  const Unit* ge2te6 = FindUnit("hexatellurodigermanate");
  ASSERT_NE(ge2te6, nullptr);
  EXPECT_EQ(ge2te6->charge, -6);
  for (const UnitAtom& a : ge2te6->atoms) {
    if (a.element->symbol == std::string("Ge")) {
      EXPECT_EQ(a.state, 3);
    }
  }
}

// The macrocycles are units with their place in the series: the planar
// tetradentate ones (porphyrinates, phthalocyaninate, salen, cyclam) are
// marked planar, cyclen (too small a ring, it binds cis) and tacn
// (tridentate, facial) are not (Greenwood and Earnshaw, Chemistry of the
// Elements, 2nd ed., chs. 25-29; Housecroft and Sharpe, Inorganic
// Chemistry; both from memory). Charges: the porphyrinates, Pc and salen
// bind as dianions, the aza macrocycles neutral.
TEST(Units, MacrocyclesAreLigandsAndThePlanarOnesSaySo) {
  const struct {
    const char* name;
    int charge;
    int denticity;
    bool planar;
  } kCases[] = {
      {"5,10,15,20-tetraphenylporphyrinate", -2, 4, true},
      {"2,3,7,8,12,13,17,18-octaethylporphyrinate", -2, 4, true},
      {"phthalocyaninate", -2, 4, true},
      {"N,N'-bis(salicylidene)ethylenediaminate", -2, 4, true},
      {"1,4,8,11-tetraazacyclotetradecane", 0, 4, true},
      {"1,4,7,10-tetraazacyclododecane", 0, 4, false},
      {"1,4,7-triazacyclononane", 0, 3, false},
  };
  for (const auto& c : kCases) {
    SCOPED_TRACE(c.name);
    const Unit* u = FindUnit(c.name);
    ASSERT_NE(u, nullptr);
    EXPECT_EQ(u->charge, c.charge);
    ASSERT_NE(u->ligand, nullptr);
    EXPECT_EQ(u->ligand->denticity, c.denticity);
    EXPECT_EQ(u->ligand->planar, c.planar);
    EXPECT_EQ(u->ligand->donor->symbol, std::string("N"));
  }
  // Read from the formulas that write them, once per metal.
  const struct {
    const char* formula;
    const char* unit;
    int count;
  } kFormulas[] = {
      {"Fe(TPP)Cl", "5,10,15,20-tetraphenylporphyrinate", 1},
      {"CuPc", "phthalocyaninate", 1},
      {"[Cr(tacn)2]Cl3", "1,4,7-triazacyclononane", 2},
  };
  for (const auto& c : kFormulas) {
    SCOPED_TRACE(c.formula);
    Found found = FindNamed(c.formula, c.unit);
    ASSERT_TRUE(found.ok);
    EXPECT_EQ(found.count, Rational(c.count));
  }
}

}  // namespace
}  // namespace shellwright
