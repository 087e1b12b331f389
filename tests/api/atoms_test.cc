// Tests for api/atoms.h: the proto <-> engine translation of atom queries
// and descriptions, and the DescribeAtom(s) / ListElements answers.

#include "api/atoms.h"

#include <string>

#include "gmock/gmock.h"
#include "gtest/gtest.h"

namespace shellwright {
namespace {

using ::testing::HasSubstr;
using ::testing::StartsWith;

v1::DescribeAtomRequest Spec(const std::string& spec) {
  v1::DescribeAtomRequest request;
  request.set_spec(spec);
  return request;
}

TEST(Atoms, EngineEnumsMapOntoProtoEnumsBothWays) {
  for (Geometry g : {Geometry::kFree, Geometry::kOctahedral,
                     Geometry::kTetrahedral, Geometry::kSquarePlanar}) {
    v1::DescribeAtomRequest request = Spec("Fe");
    request.set_geometry(GeometryToProto(g));
    EXPECT_NE(request.geometry(), v1::GEOMETRY_UNSPECIFIED);
    absl::StatusOr<AtomQuery> q = AtomQueryFromProto(request);
    ASSERT_TRUE(q.ok()) << q.status();
    EXPECT_EQ(q->geometry, g) << Name(g);
  }
  for (SpinStatePreference s :
       {SpinStatePreference::kAuto, SpinStatePreference::kHigh,
        SpinStatePreference::kLow, SpinStatePreference::kIntermediate}) {
    v1::DescribeAtomRequest request = Spec("Fe");
    request.set_spin_state(SpinStatePreferenceToProto(s));
    absl::StatusOr<AtomQuery> q = AtomQueryFromProto(request);
    ASSERT_TRUE(q.ok()) << q.status();
    EXPECT_EQ(q->spin_state, s) << Name(s);
  }
  // UNSPECIFIED means the defaults.
  absl::StatusOr<AtomQuery> q = AtomQueryFromProto(Spec("Fe"));
  ASSERT_TRUE(q.ok());
  EXPECT_EQ(q->geometry, Geometry::kFree);
  EXPECT_EQ(q->spin_state, SpinStatePreference::kAuto);
}

TEST(Atoms, ErrorsStartWithTheRequestField) {
  v1::DescribeAtomRequest unknown = Spec("Xx");
  v1::DescribeAtomRequest z;
  z.set_atomic_number(119);
  v1::DescribeAtomRequest geometry = Spec("Fe");
  geometry.set_geometry(static_cast<v1::Geometry>(42));
  v1::DescribeAtomRequest spin = Spec("Fe");
  spin.set_spin_state(static_cast<v1::SpinStatePreference>(42));
  v1::DescribeAtomRequest configuration = Spec("Cr");
  configuration.set_configuration("[Ar] 3d99");
  v1::DescribeAtomRequest charge = Spec("He");
  charge.set_charge(-99);
  const struct {
    const v1::DescribeAtomRequest* request;
    const char* field;
  } kCases[] = {{&unknown, "spec: "},
                {&z, "atomic_number: "},
                {&geometry, "geometry: "},
                {&spin, "spin_state: "},
                {&configuration, "configuration: "},
                {&charge, "charge: "},
                {nullptr, "spec: "}};
  for (const auto& c : kCases) {
    v1::AtomDescription out;
    const v1::DescribeAtomRequest none;
    absl::Status s = DescribeAtomMessage(c.request ? *c.request : none, &out);
    EXPECT_EQ(s.code(), absl::StatusCode::kInvalidArgument) << c.field;
    EXPECT_THAT(std::string(s.message()), StartsWith(c.field));
  }
}

TEST(Atoms, DescribesAnIonFromItsSpec) {
  // NIST ASD ground states, from memory: Fe3+ is [Ar] 3d5, 6S5/2.
  v1::AtomDescription d;
  ASSERT_TRUE(DescribeAtomMessage(Spec("Fe3+"), &d).ok());
  EXPECT_EQ(d.symbol(), "Fe");
  EXPECT_EQ(d.charge(), 3);
  EXPECT_EQ(d.electrons(), 23);
  EXPECT_EQ(d.configuration(), "[Ar] 3d5");
  EXPECT_EQ(d.unpaired_electrons(), 5);
  EXPECT_EQ(d.term_symbol(), "6S5/2");
  EXPECT_EQ(d.parity(), "even");
  EXPECT_EQ(d.block(), "d");
  EXPECT_EQ(d.geometry(), "free");
  EXPECT_FALSE(d.has_ligand_field());
  EXPECT_EQ(d.recommended_moment_basis(), "spin_only");
  // An ion of an element whose neutral configuration is a measured
  // exception says so (Cu is [Ar] 3d10 4s1; NIST ASD, from memory).
  ASSERT_TRUE(DescribeAtomMessage(Spec("Cu+"), &d).ok());
  EXPECT_THAT(d.configuration_source(), HasSubstr("measured neutral"));
}

TEST(Atoms, LigandFieldFollowsTheRequest) {
  // Low-spin d6 octahedral is diamagnetic (Miessler & Tarr, Inorganic
  // Chemistry, ligand field chapter, from memory).
  v1::DescribeAtomRequest request = Spec("Co3+");
  request.set_geometry(v1::GEOMETRY_OCTAHEDRAL);
  request.set_spin_state(v1::SPIN_STATE_LOW);
  v1::AtomDescription d;
  ASSERT_TRUE(DescribeAtomMessage(request, &d).ok());
  ASSERT_TRUE(d.has_ligand_field());
  EXPECT_EQ(d.geometry(), "octahedral");
  EXPECT_EQ(d.spin_state(), "low");
  EXPECT_EQ(d.ligand_field().occupancy(), "t2g6 eg0");
  EXPECT_EQ(d.ligand_field().unpaired_electrons(), 0);

  // Intermediate spin: square-planar d6 leaves dx2-y2 empty, two unpaired
  // (four-coordinate Fe(TPP), S = 1; Scheidt and Reed, Chem. Rev. 81
  // (1981) 543, from memory). Not defined in an octahedron.
  v1::DescribeAtomRequest planar = Spec("Fe2+");
  planar.set_geometry(v1::GEOMETRY_SQUARE_PLANAR);
  planar.set_spin_state(v1::SPIN_STATE_INTERMEDIATE);
  v1::AtomDescription p;
  ASSERT_TRUE(DescribeAtomMessage(planar, &p).ok());
  EXPECT_EQ(p.spin_state(), "intermediate");
  EXPECT_EQ(p.ligand_field().spin_state(), "intermediate");
  EXPECT_EQ(p.ligand_field().occupancy(), "eg4 a1g1 b2g1 b1g0");
  EXPECT_EQ(p.ligand_field().unpaired_electrons(), 2);
  v1::DescribeAtomRequest octahedral = planar;
  octahedral.set_geometry(v1::GEOMETRY_OCTAHEDRAL);
  const absl::Status bad = DescribeAtomMessage(octahedral, &p);
  EXPECT_EQ(bad.code(), absl::StatusCode::kInvalidArgument);
  EXPECT_THAT(bad.message(), HasSubstr("square_planar"));
}

TEST(Atoms, ItemsCarryTheirOwnResultOrError) {
  v1::DescribeAtomResult good;
  DescribeAtomItem(Spec("Ne"), &good);
  EXPECT_TRUE(good.has_description());
  EXPECT_FALSE(good.has_error());
  v1::DescribeAtomResult bad;
  DescribeAtomItem(Spec("Xx"), &bad);
  ASSERT_TRUE(bad.has_error());
  EXPECT_EQ(bad.error().code(),
            static_cast<int>(absl::StatusCode::kInvalidArgument));
  v1::AtomDescription direct;
  EXPECT_EQ(bad.error().message(),
            DescribeAtomMessage(Spec("Xx"), &direct).message());

  v1::DescribeAtomsRequest batch;
  *batch.add_requests() = Spec("Ne");
  *batch.add_requests() = Spec("Xx");
  v1::DescribeAtomsResponse response;
  ASSERT_TRUE(DescribeAtomsMessage(batch, &response).ok());
  ASSERT_EQ(response.results_size(), 2);
  EXPECT_EQ(response.results(0).SerializeAsString(), good.SerializeAsString());
  EXPECT_EQ(response.results(1).SerializeAsString(), bad.SerializeAsString());
}

TEST(Atoms, DescribeAtomsRefusesOversizedBatches) {
  v1::DescribeAtomsRequest batch;
  for (int i = 0; i <= kMaxDescribeAtomsBatch; ++i) {
    *batch.add_requests() = Spec("H");
  }
  v1::DescribeAtomsResponse response;
  absl::Status s = DescribeAtomsMessage(batch, &response);
  EXPECT_EQ(s.code(), absl::StatusCode::kInvalidArgument);
  EXPECT_THAT(std::string(s.message()), StartsWith("requests: "));
}

TEST(Atoms, ListsEveryElementWithItsGroundConfiguration) {
  v1::ListElementsResponse list;
  ListElementsMessage(&list);
  ASSERT_EQ(list.elements_size(), 118);
  // IUPAC periodic table and NIST ASD ground states, from memory.
  const v1::Element& fe = list.elements(25);
  EXPECT_EQ(fe.symbol(), "Fe");
  EXPECT_EQ(fe.atomic_number(), 26);
  EXPECT_EQ(fe.period(), 4);
  EXPECT_EQ(fe.group(), 8);
  EXPECT_EQ(fe.block(), "d");
  EXPECT_EQ(fe.ground_configuration(), "[Ar] 3d6 4s2");
  EXPECT_TRUE(fe.has_pauling_electronegativity());
  for (const v1::Element& e : list.elements()) {
    EXPECT_FALSE(e.ground_configuration().empty()) << e.symbol();
  }
}

}  // namespace
}  // namespace shellwright
