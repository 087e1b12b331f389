// Structure families read from a composition, the ions placed on their
// sites, and the ordered (saturation) moment of Néel's collinear model.
//
// PlaceIons() recognises four families from the counts and the assigned
// oxidation states alone, with no structure data:
//   spinel       AB2X4, X = O, S or Se: 3 small cations per 4 anions
//                (Fe3O4, NiFe2O4, Li0.5Fe2.5O4, Fe2TiO4, Co3O4, FeCr2S4);
//   garnet       A3B5O12: 8 cations per 12 O, 3 of them large (Y, the
//                lanthanides, Bi3+, Ca2+, Na+) or, in silicate and germanate
//                garnets, 3 Si/Ge beside 3 Mg2+, Fe2+ or Mn2+
//                (Y3Fe5O12, Gd3Fe5O12, Ca3Fe2Si3O12);
//   hexaferrite  magnetoplumbite AB12O19: one large A per 12 small cations
//                (BaFe12O19, SrFe12O19, LaFe12O19);
//   perovskite   ABX3, X = O or F: one large A (alkali but Li, Ca, Sr, Ba,
//                Pb2+, Bi3+, Y, lanthanides) and one small B per 3 anions
//                (LaMnO3, La0.7Sr0.3MnO3, KNiF3, BiFeO3).
// Every ion must be free (no polyatomic unit), every cation positive and
// the only anion the family's. The small cations go to the tetrahedral
// sites in order of their octahedral site preference
// (data/site_preferences.tsv: ligand-field energies after Dunitz and Orgel
// and McClure, 1957, and the strong non-ligand-field preferences of Zn2+,
// Ga3+, Ge4+, Si4+, Ti4+ and Sn4+); docs/method.md, "Sites and
// sublattices", gives the rules, their sources and their known misses.
//
// NeelSaturation() gives |Σ_sites direction × Σ occupants count × moment|
// per formula unit, with the exchange rules of each family (a ferrimagnet
// whose one side carries no moment orders antiferromagnetically: 0;
// perovskites by superexchange and double exchange).
//
// These are idealised estimates from the composition alone: real cation
// distributions depend on preparation, and canting, covalency and orbital
// moments move real moments. Measurement decides.
//
// Example:
//
//   absl::StatusOr<shellwright::Formula> f =
//       shellwright::ParseFormula("NiFe2O4");
//   absl::StatusOr<shellwright::OxidationResult> r =
//       shellwright::AssignOxidationStates(*f, {});
//   std::optional<shellwright::SitePlacement> p = shellwright::PlaceIons(
//       *f, *r->best, shellwright::FamilyChoice::kAuto);
//   // p->family == kSpinel, *p->inversion == 1: Fe3+ on the tetrahedral
//   // A site, Fe3+ and Ni2+ (in that order) on the octahedral B site.
//   // With ordered moments {5 (A Fe3+), 5 (B Fe3+), 2 (B Ni2+)}:
//   shellwright::NeelSaturation(*p, {5, 5, 2}).saturation;  // 2
//
// Thread safety: pure functions.

#ifndef SHELLWRIGHT_ENGINE_SITES_H_
#define SHELLWRIGHT_ENGINE_SITES_H_

#include <optional>
#include <string>
#include <vector>

#include "absl/strings/string_view.h"
#include "absl/types/span.h"
#include "engine/atom.h"
#include "engine/element.h"
#include "engine/formula.h"
#include "engine/ligand_field.h"
#include "engine/oxidation.h"
#include "engine/rational.h"
#include "util/enum_names.h"

namespace shellwright {

enum class StructureFamily {
  kNone,
  kSpinel,
  kGarnet,
  kHexaferrite,
  kPerovskite
};

// A record's setting: recognise any family (kAuto), none (kOff), or read
// the composition as one family only.
enum class FamilyChoice {
  kAuto,
  kOff,
  kSpinel,
  kGarnet,
  kHexaferrite,
  kPerovskite
};

// Names for Name() / ParseName() (util/enum_names.h).
template <>
struct EnumNames<StructureFamily> {
  static constexpr absl::string_view kWhat = "structure family";
  static constexpr NamedValue<StructureFamily> kNames[] = {
      {StructureFamily::kNone, "none"},
      {StructureFamily::kSpinel, "spinel"},
      {StructureFamily::kGarnet, "garnet"},
      {StructureFamily::kHexaferrite, "hexaferrite"},
      {StructureFamily::kPerovskite, "perovskite"}};
};
template <>
struct EnumNames<FamilyChoice> {
  static constexpr absl::string_view kWhat = "structure family";
  static constexpr NamedValue<FamilyChoice> kNames[] = {
      {FamilyChoice::kAuto, "auto"},
      {FamilyChoice::kOff, "none"},
      {FamilyChoice::kSpinel, "spinel"},
      {FamilyChoice::kGarnet, "garnet"},
      {FamilyChoice::kHexaferrite, "hexaferrite"},
      {FamilyChoice::kPerovskite, "perovskite"}};
  static constexpr NamedValue<FamilyChoice> kAliases[] = {
      {FamilyChoice::kOff, "off"}};
};

// An ion on a site: `count` ions per formula unit of the record's formula.
struct SiteOccupant {
  const Element* element = nullptr;
  int state = 0;
  Rational count;
};

struct Site {
  // "A (tetrahedral)", "12k (octahedral)", "c (dodecahedral)", ...; in
  // static storage, so that reports may point at it.
  absl::string_view name;
  // For the ligand field of the ions on it. Sites with no Geometry of
  // their own take the nearest (docs/method.md): the garnet c site
  // (dodecahedral, a distorted cube) kTetrahedral, whose level order
  // (e below t2) a cube shares; the hexaferrite 2b site (trigonal
  // bipyramidal) and the perovskite A site (12-coordinate) kFree.
  Geometry geometry = Geometry::kFree;
  // +1 or -1 in Néel's collinear model; 0: not part of the ordered
  // magnetic structure (the A sites of hexaferrites and perovskites). The
  // garnet c site is -1, antiparallel to d; NeelSaturation turns it
  // against the net iron moment whichever of a and d wins.
  int direction = 0;
  std::vector<SiteOccupant> occupants;  // Least octahedral first.
};

struct SitePlacement {
  StructureFamily family = StructureFamily::kNone;
  std::vector<Site> sites;
  // Spinel only: the fraction of the tetrahedral site not held by the
  // A-type ions, 0 normal, 1 inverse. The A-type ions are those of the one
  // charge whose counts sum to one per formula unit of 4 anions (Fe2+ in
  // Fe3O4, Ti4+ in Fe2TiO4, Zn2+ and Ni2+ in Ni0.5Zn0.5Fe2O4; the lowest
  // such charge when several do, as Li+ in LiMn2O4), else the
  // lowest-charge ions (Li+ in Li0.5Fe2.5O4).
  std::optional<double> inversion;
  // The anion's atomic number (8 for an oxide, 16 for a sulfide).
  int anion_z = 0;
  // How the placement was decided, for the report: "inverse spinel:
  // octahedral site preference Ni2+ 86 kJ/mol > Fe3+ 0 (Dunitz and Orgel
  // 1957, McClure 1957)".
  std::string note;
};

// Recognises a structure family in `formula` with the oxidation states of
// `a` (an assignment of AssignOxidationStates for this formula) and places
// its ions on the family's sites. Returns nullopt when `choice` is kOff,
// when no family's pattern matches (kAuto), or when the forced family does
// not fit; then, when `why_not` is not null, it receives the reason for a
// forced family ("garnet: needs 8 cations per 12 O, found 2 per 3")
// and is cleared otherwise. A composition that matches no family costs a
// few comparisons and no allocation.
std::optional<SitePlacement> PlaceIons(const Formula& formula,
                                       const OxidationAssignment& a,
                                       FamilyChoice choice,
                                       std::string* why_not = nullptr);

// A sulfide, selenide or telluride of 3 metal cations per 4 anions that
// holds no cation fit for a spinel's tetrahedral site among these anions
// (Cr3S4, V3S4, Fe3Se4, Cr3Te4): the monoclinic Cr3S4 type, which
// PlaceIons does not read as a spinel unless the family is forced. Returns
// the report's note for such an assignment, nullopt otherwise.
std::optional<std::string> DefectNiAsNote(const OxidationAssignment& a);

// The ordered moment of one ion in Néel's model, in μB: g_J·J when an f
// subshell is open (AtomDescription::moments.saturation), else the spin
// moment 2S with g = 2 (quenched orbital moment).
double OrderedIonMoment(const AtomDescription& ion);

struct SublatticeMoment {
  double saturation = 0;  // μB per formula unit; 0 when !determined.
  std::string note;       // The model and what it did.
  // False when the family's rules give no estimate (a perovskite whose B
  // site holds several magnetic elements, or moments that do not match
  // the placement); `note` says why.
  bool determined = true;
};

// The saturation moment per formula unit of `p` in Néel's collinear model,
// given the ordered moment (μB per ion, e.g. OrderedIonMoment) of every
// occupant, flattened in site order then occupant order. Rules:
//   - spinel, hexaferrite: |Σ direction × Σ count × moment|; when every
//     site of one direction carries no moment, the other side orders
//     antiferromagnetically within itself: 0 (ZnFe2O4, Co3O4);
//   - garnet: iron-site net M_Fe = Σ d − Σ a; 0 when a or d carries no
//     moment; the c ions' spins align antiparallel to M_Fe, so that heavy
//     rare earths (4f7 and beyond) and other c ions count against it and
//     light ones (Ce3+ to Sm3+, J = L − S) along it:
//     | |M_Fe| + Σ light − Σ others | (Gd3Fe5O12: |5 − 21| = 16 at 0 K);
//   - perovskite: A ions left out; a B site of one magnetic element in one
//     state orders antiferromagnetically (Goodenough–Kanamori): 0; one
//     element in two states orders ferromagnetically by double exchange:
//     Σ count × moment (La0.7Sr0.3MnO3: 3.7); several magnetic elements:
//     not determined.
// Thread safety: pure function.
SublatticeMoment NeelSaturation(const SitePlacement& p,
                                absl::Span<const double> ordered_moments);

// NeelSaturation(p, ordered_moments).saturation, without building its
// note: for the many moment sets of a range. Thread safety: pure function.
double NeelSaturationValue(const SitePlacement& p,
                           absl::Span<const double> ordered_moments);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_SITES_H_
