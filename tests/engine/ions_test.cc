// Tests for ion handling in engine/atom.h and engine/aufbau.h: ion
// configurations and unpaired-electron counts against reference_ions.h, the
// order in which cations lose electrons, anion filling, the accepted species
// spec forms, rejection of hostile specs, and user-supplied configurations.

#include <optional>
#include <string>

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "absl/strings/escaping.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/string_view.h"
#include "engine/atom.h"
#include "engine/aufbau.h"
#include "engine/configuration.h"
#include "engine/subshell.h"
#include "gmock/gmock.h"
#include "gtest/gtest.h"
#include "tests/engine/reference_ions.h"
#include "tests/testing/engine_test_util.h"
#include "tests/testing/utf8_check.h"

namespace shellwright {
namespace {

using ::shellwright::testing::Describe;
using ::shellwright::testing::kReferenceIons;
using ::shellwright::testing::ParseOrFail;
using ::shellwright::testing::ReferenceIon;
using ::testing::HasSubstr;

constexpr Subshell k4s{4, 0};
constexpr Subshell k3d{3, 2};
constexpr Subshell k4f{4, 3};
constexpr Subshell k5s{5, 0};
constexpr Subshell k5p{5, 1};
constexpr Subshell k5d{5, 2};
constexpr Subshell k6s{6, 0};
constexpr Subshell k6p{6, 1};

const ReferenceIon* FindReferenceIon(absl::string_view spec) {
  for (const ReferenceIon& row : kReferenceIons) {
    if (spec == row.spec) return &row;
  }
  return nullptr;
}

// Full query path: parse the spec, then describe it. Returns the first
// error.
absl::Status DescribeSpecStatus(absl::string_view spec,
                                std::optional<int> charge = std::nullopt) {
  absl::StatusOr<AtomQuery> q = ParseAtomQuery(spec, charge);
  if (!q.ok()) return q.status();
  absl::StatusOr<AtomDescriptionPtr> d = DescribeAtom(*q);
  if (!d.ok()) return d.status();
  if (*d == nullptr) return absl::InternalError("null description");
  return absl::OkStatus();
}

TEST(Ions, AllReferenceIonsMatch) {
  for (const ReferenceIon& row : kReferenceIons) {
    SCOPED_TRACE(absl::StrCat(row.spec, " (", row.source, ")"));
    AtomDescriptionPtr d = Describe(row.spec);
    ASSERT_NE(d, nullptr);
    EXPECT_EQ(d->configuration_notation, row.configuration);
    EXPECT_EQ(d->unpaired_electrons, row.unpaired_electrons);
    // The notation parses back to the stored configuration, and the
    // electron count is Z - charge.
    EXPECT_EQ(ParseOrFail(row.configuration), d->configuration);
    EXPECT_EQ(d->electrons, d->element->atomic_number - d->charge);
    EXPECT_EQ(d->configuration.electrons(), d->electrons);
    EXPECT_FALSE(d->configuration_user_supplied);
  }
}

TEST(Ions, LanthanideLoses6sThen5dThen4f) {
  // Chemical convention of reference_ions.h (Greenwood & Earnshaw,
  // Chemistry of the Elements, from memory): Ce = [Xe] 4f1 5d1 6s2 loses
  // 6s, then 5d, then 4f.
  struct Step {
    const char* spec;
    int f;
    int d;
    int s;
  };
  for (const Step& step :
       {Step{"Ce", 1, 1, 2}, Step{"Ce+", 1, 1, 1}, Step{"Ce2+", 1, 1, 0},
        Step{"Ce3+", 1, 0, 0}, Step{"Ce4+", 0, 0, 0}}) {
    SCOPED_TRACE(step.spec);
    AtomDescriptionPtr d = Describe(step.spec);
    ASSERT_NE(d, nullptr);
    EXPECT_EQ(d->configuration.occupancy(k4f), step.f);
    EXPECT_EQ(d->configuration.occupancy(k5d), step.d);
    EXPECT_EQ(d->configuration.occupancy(k6s), step.s);
    // The [Xe] core, including 5s2 5p6, is never touched.
    EXPECT_EQ(d->configuration.occupancy(k5s), 2);
    EXPECT_EQ(d->configuration.occupancy(k5p), 6);
  }
  AtomDescriptionPtr ce3 = Describe("Ce3+");
  ASSERT_NE(ce3, nullptr);
  EXPECT_EQ(ce3->configuration_notation, "[Xe] 4f1");

  // Gd = [Xe] 4f7 5d1 6s2 also loses its 5d electron: Gd3+ is 4f7.
  AtomDescriptionPtr gd3 = Describe("Gd3+");
  ASSERT_NE(gd3, nullptr);
  EXPECT_EQ(gd3->configuration_notation, "[Xe] 4f7");
  EXPECT_EQ(gd3->configuration.occupancy(k5p), 6);

  // Without 5d, 4f goes once 6s is empty: Tb ([Xe] 4f9 6s2) to Tb4+ 4f7.
  AtomDescriptionPtr tb4 = Describe("Tb4+");
  ASSERT_NE(tb4, nullptr);
  EXPECT_EQ(tb4->configuration_notation, "[Xe] 4f7");
  EXPECT_EQ(tb4->configuration.occupancy(k5p), 6);
}

TEST(Ions, TransitionMetalLoses4sBefore3d) {
  // Greenwood & Earnshaw, Chemistry of the Elements, from memory:
  // Fe [Ar] 3d6 4s2 -> Fe2+ [Ar] 3d6; Cu [Ar] 3d10 4s1 -> Cu+ [Ar] 3d10;
  // V [Ar] 3d3 4s2 -> V2+ [Ar] 3d3.
  struct Case {
    const char* spec;
    int d;
  };
  for (const Case& c : {Case{"Fe2+", 6}, Case{"Fe+", 6}, Case{"Cu+", 10},
                        Case{"V2+", 3}, Case{"Co2+", 7}, Case{"Ni2+", 8}}) {
    SCOPED_TRACE(c.spec);
    AtomDescriptionPtr d = Describe(c.spec);
    ASSERT_NE(d, nullptr);
    EXPECT_EQ(d->configuration.occupancy(k3d), c.d);
    if (std::string(c.spec) == "Fe+") {
      EXPECT_EQ(d->configuration.occupancy(k4s), 1);  // one 4s left
    } else {
      EXPECT_EQ(d->configuration.occupancy(k4s), 0);
    }
  }
  // Only after 4s is empty does 3d lose electrons: Fe3+ = [Ar] 3d5.
  AtomDescriptionPtr fe3 = Describe("Fe3+");
  ASSERT_NE(fe3, nullptr);
  EXPECT_EQ(fe3->configuration.occupancy(k3d), 5);
  EXPECT_EQ(fe3->configuration.occupancy(k4s), 0);
}

TEST(Ions, PBlockKeepsNs2Pair) {
  // The ns2 "inert pair" ions keep ns2 and lose the np electrons
  // (Greenwood & Earnshaw, Chemistry of the Elements, from memory).
  struct Case {
    const char* spec;
    Subshell s;
    Subshell p;
  };
  for (const Case& c : {Case{"Pb2+", k6s, k6p}, Case{"Sn2+", k5s, k5p},
                        Case{"Bi3+", k6s, k6p}, Case{"Tl+", k6s, k6p}}) {
    SCOPED_TRACE(c.spec);
    AtomDescriptionPtr d = Describe(c.spec);
    ASSERT_NE(d, nullptr);
    EXPECT_EQ(d->configuration.occupancy(c.s), 2);
    EXPECT_EQ(d->configuration.occupancy(c.p), 0);
    EXPECT_EQ(d->unpaired_electrons, 0);
    const ReferenceIon* ref = FindReferenceIon(c.spec);
    ASSERT_NE(ref, nullptr);
    EXPECT_EQ(d->configuration_notation, ref->configuration);
  }
  // Pb4+ then loses the pair.
  AtomDescriptionPtr pb4 = Describe("Pb4+");
  ASSERT_NE(pb4, nullptr);
  EXPECT_EQ(pb4->configuration.occupancy(k6s), 0);
  EXPECT_EQ(pb4->configuration.occupancy(k5d), 10);
}

TEST(Ions, AnionsFillByMadelung) {
  // Noble-gas anions (Greenwood & Earnshaw, Chemistry of the Elements, from
  // memory, via kReferenceIons).
  for (const char* spec : {"H-", "F-", "O2-", "N3-", "Cl-", "S2-", "P3-"}) {
    SCOPED_TRACE(spec);
    AtomDescriptionPtr d = Describe(spec);
    ASSERT_NE(d, nullptr);
    const ReferenceIon* ref = FindReferenceIon(spec);
    ASSERT_NE(ref, nullptr);
    EXPECT_EQ(d->configuration_notation, ref->configuration);
    EXPECT_TRUE(d->configuration.IsClosedShell());
    EXPECT_EQ(d->unpaired_electrons, 0);
  }
  // Carbide: C4- is [Ne] (common practice, no source).
  AtomDescriptionPtr c4 = Describe("C4-");
  ASSERT_NE(c4, nullptr);
  EXPECT_EQ(c4->configuration_notation, "[Ne]");

  // Past a full p subshell the next electron goes to the next subshell in
  // Madelung order (rule stated in aufbau.h; common practice, no source):
  // Cl2- = [Ar] 4s1, and an anion of Fe ([Ar] 3d6 4s2) adds to 3d.
  AtomDescriptionPtr cl2 = Describe("Cl2-");
  ASSERT_NE(cl2, nullptr);
  EXPECT_EQ(cl2->configuration.occupancy(k4s), 1);
  EXPECT_EQ(cl2->configuration.occupancy(k3d), 0);
  EXPECT_EQ(cl2->unpaired_electrons, 1);
  AtomDescriptionPtr fe_minus = Describe("Fe-");
  ASSERT_NE(fe_minus, nullptr);
  EXPECT_EQ(fe_minus->configuration.occupancy(k3d), 7);
  EXPECT_EQ(fe_minus->configuration.occupancy(k4s), 2);

  // Any anion is Madelung filling of Z - charge electrons on top of a
  // Madelung-filling neutral: check a few elements that follow Madelung.
  for (int z : {1, 6, 7, 8, 9, 16, 17, 35, 53}) {
    for (int charge = -1; charge >= -kMaxAnionCharge; --charge) {
      SCOPED_TRACE(absl::StrCat("Z=", z, " charge=", charge));
      absl::StatusOr<Configuration> ion = IonConfiguration(z, charge);
      ASSERT_TRUE(ion.ok()) << ion.status();
      EXPECT_EQ(*ion, Configuration::Madelung(z - charge));
    }
  }
}

TEST(Ions, AnionBeyondBoundIsRejected) {
  // kMaxAnionCharge = 4 (aufbau.h; common practice, no source).
  EXPECT_TRUE(DescribeSpecStatus("C4-").ok());
  const absl::Status s = DescribeSpecStatus("C5-");
  EXPECT_EQ(s.code(), absl::StatusCode::kInvalidArgument);
  EXPECT_THAT(std::string(s.message()), HasSubstr("charge"));
}

TEST(Ions, BareNucleusIsAllowedButNoFurther) {
  AtomDescriptionPtr bare = Describe("He2+");
  ASSERT_NE(bare, nullptr);
  EXPECT_EQ(bare->electrons, 0);
  EXPECT_EQ(bare->configuration.electrons(), 0);
  EXPECT_EQ(DescribeSpecStatus("He3+").code(),
            absl::StatusCode::kInvalidArgument);
}

TEST(Ions, SpecFormsAreEquivalent) {
  absl::StatusOr<AtomQuery> numeric = ParseAtomQuery("26", 3);
  ASSERT_TRUE(numeric.ok()) << numeric.status();
  ASSERT_NE(numeric->element, nullptr);
  EXPECT_EQ(numeric->element->symbol, "Fe");
  EXPECT_EQ(numeric->charge, 3);
  absl::StatusOr<AtomDescriptionPtr> reference = DescribeAtom(*numeric);
  ASSERT_TRUE(reference.ok()) << reference.status();

  for (const char* spec : {"Fe3+", "Fe+3", "Fe(III)"}) {
    SCOPED_TRACE(spec);
    absl::StatusOr<AtomQuery> q = ParseAtomQuery(spec, std::nullopt);
    ASSERT_TRUE(q.ok()) << q.status();
    EXPECT_EQ(q->element, numeric->element);
    EXPECT_EQ(q->charge, 3);
    absl::StatusOr<AtomDescriptionPtr> d = DescribeAtom(*q);
    ASSERT_TRUE(d.ok()) << d.status();
    EXPECT_EQ((*d)->configuration, (*reference)->configuration);
    EXPECT_EQ((*d)->configuration_notation, "[Ar] 3d5");  // kReferenceIons
    EXPECT_EQ((*d)->term, (*reference)->term);
  }
  // An element name with a separate charge.
  absl::StatusOr<AtomQuery> named = ParseAtomQuery("iron", 3);
  ASSERT_TRUE(named.ok()) << named.status();
  EXPECT_EQ(named->element, numeric->element);
  EXPECT_EQ(named->charge, 3);

  // A separate charge that agrees with the spec is fine.
  absl::StatusOr<AtomQuery> agree = ParseAtomQuery("Fe3+", 3);
  ASSERT_TRUE(agree.ok()) << agree.status();
  EXPECT_EQ(agree->charge, 3);

  // Anion and neutral forms.
  for (const char* spec : {"O2-", "O-2"}) {
    absl::StatusOr<AtomQuery> q = ParseAtomQuery(spec, std::nullopt);
    ASSERT_TRUE(q.ok()) << spec << ": " << q.status();
    EXPECT_EQ(q->charge, -2);
  }
  for (const char* spec : {"Fe", "Fe(0)", "Fe+0"}) {
    absl::StatusOr<AtomQuery> q = ParseAtomQuery(spec, std::nullopt);
    ASSERT_TRUE(q.ok()) << spec << ": " << q.status();
    EXPECT_EQ(q->charge, 0);
  }
  absl::StatusOr<AtomQuery> cl = ParseAtomQuery("Cl-", std::nullopt);
  ASSERT_TRUE(cl.ok()) << cl.status();
  EXPECT_EQ(cl->charge, -1);
  absl::StatusOr<AtomQuery> na = ParseAtomQuery("Na+", std::nullopt);
  ASSERT_TRUE(na.ok()) << na.status();
  EXPECT_EQ(na->charge, 1);
}

TEST(Ions, ConflictingChargeIsRejected) {
  absl::StatusOr<AtomQuery> q = ParseAtomQuery("Fe3+", 2);
  ASSERT_FALSE(q.ok());
  EXPECT_EQ(q.status().code(), absl::StatusCode::kInvalidArgument);
  EXPECT_THAT(std::string(q.status().message()), HasSubstr("Fe3+"));
  EXPECT_THAT(std::string(q.status().message()), HasSubstr("charge"));
}

struct HostileSpec {
  std::string spec;
  // A word the error message must contain to name the problem.
  const char* must_mention;
};

TEST(Ions, HostileSpecsAreRejectedWithAReason) {
  const HostileSpec cases[] = {
      {"Fe3+3+", "charge"},
      {"Fe(IIII)", "numeral"},
      {"Fe99+", "99"},
      {"He-99", "99"},
      {std::string(10000, 'A'), "bytes"},
      {"Fe++", "charge"},
      {"Fe3", "charge"},
      {"(III)", "element"},
      {"Fe3+ ", "charge"},
      {"Xx2+", "Xx"},
      {"\xff\xfe", "element"},
      {std::string("Fe\0"
                   "3+",
                   4),
       "charge"},
      {"", "empty"},
      {"Fe(XI)", "numeral"},
      {"Fe(III", "numeral"},
      {"Fe3+-", "charge"},
      {"Fe-3+", "charge"},
      {"Fe1000+", "charge"},
  };
  for (const HostileSpec& c : cases) {
    SCOPED_TRACE(absl::StrCat("spec of ", c.spec.size(), " bytes: \"",
                              absl::CEscape(c.spec.substr(0, 20)), "\""));
    const absl::Status s = DescribeSpecStatus(c.spec);
    EXPECT_EQ(s.code(), absl::StatusCode::kInvalidArgument) << s;
    const std::string message(s.message());
    EXPECT_THAT(message, HasSubstr(c.must_mention));
    // Hostile input must not flood the message or leak raw control bytes.
    EXPECT_LT(message.size(), 400u);
    EXPECT_EQ(message.find('\0'), std::string::npos);
    // Messages travel in protobuf string fields and terminals, so they must
    // be valid UTF-8 even when the spec is not (engine/internal/text.h
    // promises that non-ASCII bytes are escaped as \xNN).
    EXPECT_TRUE(testing::IsWellFormedUtf8(message))
        << "message is not valid UTF-8: \"" << absl::CEscape(message) << "\"";
  }
}

TEST(Ions, UserSuppliedConfiguration) {
  absl::StatusOr<AtomQuery> q = ParseAtomQuery("Cr", std::nullopt);
  ASSERT_TRUE(q.ok()) << q.status();
  q->configuration = ParseOrFail("[Ar] 3d5 4s1");
  absl::StatusOr<AtomDescriptionPtr> d = DescribeAtom(*q);
  ASSERT_TRUE(d.ok()) << d.status();
  EXPECT_TRUE((*d)->configuration_user_supplied);
  EXPECT_EQ((*d)->configuration_notation, "[Ar] 3d5 4s1");
  // Six singly occupied orbitals: 7S3 (NIST ASD ground levels, from memory).
  EXPECT_EQ((*d)->unpaired_electrons, 6);
  EXPECT_EQ((*d)->term.ToAscii(), "7S3");

  // An excited configuration of Fe with the right count is accepted and
  // used as given.
  absl::StatusOr<AtomQuery> fe = ParseAtomQuery("Fe", std::nullopt);
  ASSERT_TRUE(fe.ok());
  fe->configuration = ParseOrFail("[Ar] 3d7 4s1");
  absl::StatusOr<AtomDescriptionPtr> excited = DescribeAtom(*fe);
  ASSERT_TRUE(excited.ok()) << excited.status();
  EXPECT_TRUE((*excited)->configuration_user_supplied);
  EXPECT_EQ((*excited)->configuration.occupancy(k3d), 7);
  EXPECT_EQ((*excited)->configuration.occupancy(k4s), 1);
  EXPECT_EQ((*excited)->unpaired_electrons, 4);  // 3 in 3d7 + 1 in 4s1

  // Wrong electron count: 25 electrons for neutral Cr (24).
  q->configuration = ParseOrFail("[Ar] 3d5 4s2");
  absl::StatusOr<AtomDescriptionPtr> wrong = DescribeAtom(*q);
  ASSERT_FALSE(wrong.ok());
  EXPECT_EQ(wrong.status().code(), absl::StatusCode::kInvalidArgument);
  EXPECT_THAT(std::string(wrong.status().message()), HasSubstr("electrons"));

  // For an ion the count is Z - charge: Fe3+ has 23, not 24.
  absl::StatusOr<AtomQuery> fe3 = ParseAtomQuery("Fe3+", std::nullopt);
  ASSERT_TRUE(fe3.ok());
  fe3->configuration = ParseOrFail("[Ar] 3d6");
  EXPECT_EQ(DescribeAtom(*fe3).status().code(),
            absl::StatusCode::kInvalidArgument);
  fe3->configuration = ParseOrFail("[Ar] 3d4 4s1");
  absl::StatusOr<AtomDescriptionPtr> fe3_excited = DescribeAtom(*fe3);
  ASSERT_TRUE(fe3_excited.ok()) << fe3_excited.status();
  EXPECT_TRUE((*fe3_excited)->configuration_user_supplied);
  EXPECT_EQ((*fe3_excited)->charge, 3);
}

TEST(Ions, ComputedConfigurationIsNotUserSupplied) {
  AtomDescriptionPtr cr = Describe("Cr");
  ASSERT_NE(cr, nullptr);
  EXPECT_FALSE(cr->configuration_user_supplied);
  // Cr departs from Madelung (NIST ASD ground states, from memory).
  EXPECT_EQ(cr->configuration_notation, "[Ar] 3d5 4s1");
  EXPECT_TRUE(cr->madelung_exception);
}

TEST(Ions, FormatSpeciesReadsBackAsTheSameIon) {
  EXPECT_EQ(FormatSpecies("Fe", 3), "Fe3+");
  EXPECT_EQ(FormatSpecies("Cl", -1), "Cl-");
  EXPECT_EQ(FormatSpecies("O", -2), "O2-");
  EXPECT_EQ(FormatSpecies("Na", 1), "Na+");
  EXPECT_EQ(FormatSpecies("Fe", 0), "Fe");
  for (const Element& e : AllElements()) {
    for (int charge = -4; charge <= 9; ++charge) {
      absl::StatusOr<SpeciesSpec> back =
          ParseSpeciesSpec(FormatSpecies(e.symbol, charge));
      ASSERT_TRUE(back.ok()) << back.status();
      EXPECT_EQ(back->element, &e);
      EXPECT_EQ(back->charge.value_or(0), charge);
    }
  }
}

}  // namespace
}  // namespace shellwright
