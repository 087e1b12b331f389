// Tests for engine/element.h: the element table and lookups.

#include "engine/element.h"

#include <set>
#include <string>

#include "gmock/gmock.h"
#include "gtest/gtest.h"

namespace shellwright {
namespace {

using ::testing::HasSubstr;

TEST(Element, TableHoldsAll118InOrder) {
  absl::Span<const Element> all = AllElements();
  ASSERT_EQ(all.size(), 118u);
  std::set<std::string> symbols;
  for (size_t i = 0; i < all.size(); ++i) {
    EXPECT_EQ(all[i].atomic_number, static_cast<int>(i) + 1);
    EXPECT_TRUE(symbols.insert(std::string(all[i].symbol)).second);
    EXPECT_GE(all[i].period, 1);
    EXPECT_LE(all[i].period, 7);
    EXPECT_GT(all[i].standard_atomic_weight, 0.9);
  }
}

TEST(Element, KnownProperties) {
  // IUPAC standard atomic weights (abridged), from memory.
  const Element* fe = FindElementBySymbol("Fe");
  ASSERT_NE(fe, nullptr);
  EXPECT_EQ(fe->atomic_number, 26);
  EXPECT_EQ(fe->name, "Iron");
  EXPECT_EQ(fe->period, 4);
  EXPECT_EQ(fe->group, 8);
  EXPECT_EQ(fe->block, Block::kD);
  EXPECT_NEAR(fe->standard_atomic_weight, 55.845, 0.001);
  // Pauling electronegativity, CRC Handbook, from memory.
  ASSERT_TRUE(fe->pauling_electronegativity.has_value());
  EXPECT_NEAR(*fe->pauling_electronegativity, 1.83, 0.01);
  const Element* f = FindElementBySymbol("F");
  ASSERT_NE(f, nullptr);
  EXPECT_NEAR(*f->pauling_electronegativity, 3.98, 0.01);
  EXPECT_FALSE(fe->electronegativity_estimated);
  EXPECT_FALSE(f->electronegativity_estimated);
  // Interpolated values in the CRC Handbook's table (from memory) are
  // flagged as estimates.
  for (const char* symbol : {"Pm", "Eu", "Tb", "Yb", "Am"}) {
    const Element* e = FindElementBySymbol(symbol);
    ASSERT_NE(e, nullptr);
    EXPECT_TRUE(e->electronegativity_estimated) << symbol;
    EXPECT_TRUE(e->pauling_electronegativity.has_value()) << symbol;
  }
  const Element* ne = FindElementBySymbol("Ne");
  ASSERT_NE(ne, nullptr);
  EXPECT_FALSE(ne->pauling_electronegativity.has_value());
  const Element* tc = FindElementBySymbol("Tc");
  ASSERT_NE(tc, nullptr);
  EXPECT_TRUE(tc->atomic_weight_is_mass_number);
}

TEST(Element, LooksUpBySymbolNumberAndName) {
  for (const char* spec : {"Fe", "26", "iron", "Iron", "IRON"}) {
    absl::StatusOr<const Element*> e = LookupElement(spec);
    ASSERT_TRUE(e.ok()) << spec << ": " << e.status();
    EXPECT_EQ((*e)->symbol, "Fe") << spec;
  }
  EXPECT_EQ((*LookupElement("aluminum"))->symbol, "Al");
  EXPECT_EQ((*LookupElement("Caesium"))->symbol, "Cs");
  EXPECT_EQ((*LookupElement("cesium"))->symbol, "Cs");
  EXPECT_EQ((*LookupElement("sulphur"))->symbol, "S");
  EXPECT_EQ((*LookupElement("118"))->symbol, "Og");
  EXPECT_EQ((*LookupElement("1"))->symbol, "H");
}

TEST(Element, RejectsBadInputWithAClearMessage) {
  struct Case {
    const char* spec;
    const char* message_part;
  };
  const Case cases[] = {
      {"", "empty"},
      {"Xx", "unknown element 'Xx'"},
      {"0", "atomic number 0 is out of range"},
      {"119", "atomic number 119 is out of range"},
      {"99999999999", "out of range"},
      {"fe", "did you mean 'Fe'"},
      {"FE", "did you mean 'Fe'"},
      {"co", "did you mean 'Co'"},
      {"2x", "whole number"},
  };
  for (const Case& c : cases) {
    absl::StatusOr<const Element*> e = LookupElement(c.spec);
    ASSERT_FALSE(e.ok()) << c.spec;
    EXPECT_EQ(e.status().code(), absl::StatusCode::kInvalidArgument);
    EXPECT_THAT(e.status().message(), HasSubstr(c.message_part)) << c.spec;
  }
  EXPECT_FALSE(LookupElement(std::string(100000, 'A')).ok());
  EXPECT_EQ(FindElementBySymbol("fe"), nullptr);
}

}  // namespace
}  // namespace shellwright
