// Tests for engine/oxidation.h: charge-balanced oxidation states.

#include "engine/oxidation.h"

#include <map>
#include <string>

#include "gmock/gmock.h"
#include "gtest/gtest.h"

namespace shellwright {
namespace {

// "Fe:2x1 Fe:3x2 O:-2x4" for compact comparisons.
std::string Describe(const OxidationAssignment& a) {
  std::string out;
  for (const AssignedState& s : a.states) {
    if (!out.empty()) out += " ";
    out += std::string(s.element->symbol) + ":" + std::to_string(s.state) +
           "x" + s.count.ToString();
  }
  return out;
}

OxidationResult Solve(const std::string& formula, int charge = 0) {
  absl::StatusOr<Formula> f = ParseFormula(formula);
  EXPECT_TRUE(f.ok()) << f.status();
  OxidationOptions options;
  options.net_charge = charge;
  absl::StatusOr<OxidationResult> r = AssignOxidationStates(*f, options);
  EXPECT_TRUE(r.ok()) << r.status();
  return r.ok() ? *r : OxidationResult();
}

std::string Best(const std::string& formula, int charge = 0) {
  OxidationResult r = Solve(formula, charge);
  return r.best.has_value() ? Describe(*r.best) : "none";
}

TEST(Oxidation, MixedValenceExamplesFromTheSpecification) {
  // Greenwood & Earnshaw, Chemistry of the Elements: magnetite is
  // Fe(II)Fe(III)2O4, red lead is Pb(II)2Pb(IV)O4 (from memory).
  EXPECT_EQ(Best("Fe3O4"), "Fe:2x1 Fe:3x2 O:-2x4");
  EXPECT_EQ(Best("Pb3O4"), "Pb:2x2 Pb:4x1 O:-2x4");
  // Half-delithiated LiCoO2 holds Co3+/Co4+ in equal parts (common
  // practice, no source).
  EXPECT_EQ(Best("Li0.5CoO2"), "Li:1x1/2 Co:3x1/2 Co:4x1/2 O:-2x2");
}

TEST(Oxidation, SimpleSalts) {
  // Common practice, no source.
  EXPECT_EQ(Best("NaCl"), "Na:1x1 Cl:-1x1");
  EXPECT_EQ(Best("Fe2O3"), "Fe:3x2 O:-2x3");
  EXPECT_EQ(Best("LiFePO4"), "Li:1x1 Fe:2x1 P:5x1 O:-2x4");
  EXPECT_EQ(Best("SO4", -2), "S:6x1 O:-2x4");
}

TEST(Oxidation, MetalsAndElements) {
  EXPECT_EQ(Solve("Fe0.7Ni0.3").kind, CompositionKind::kMetallic);
  EXPECT_EQ(Solve("AlCoCrFeNi").kind, CompositionKind::kMetallic);
  EXPECT_EQ(Solve("O2").kind, CompositionKind::kElemental);
  EXPECT_EQ(Best("O2"), "O:0x2");
}

TEST(Oxidation, UnbalanceableHasNoAssignment) {
  // F has only the -1 state and Na only +1 (Greenwood & Earnshaw, from
  // memory), so NaF2 cannot balance.
  EXPECT_FALSE(Solve("NaF2").best.has_value());
}

}  // namespace
}  // namespace shellwright
