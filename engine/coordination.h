// What surrounds a d ion, as far as a formula shows it: its ligands, its
// geometry and the spin state they set.
//
// A formula carries no structure, so this is the most plausible reading,
// in this order (docs/method.md, "Ligands and spin states"):
//   1. Ligands. Inside a bracketed complex (`K4[Fe(CN)6]`, `[CoF6]`), the
//      units and monatomic anions written in the bracket. Otherwise the
//      ligand units of the formula (`Ni(CO)4`, `·6H2O`, `Fe(C5H5)2`) and
//      its monatomic anions (oxide, fluoride, sulfide), averaged by count
//      and denticity. Each ligand's strength is its Jørgensen f factor
//      (data/spectrochemical_series.tsv).
//   2. Geometry. A complex with 4 donor sites is square planar for a d8
//      ion with 4d/5d character or strong-field ligands (f >= 1.5), else
//      tetrahedral; with 5, on one metal atom, square pyramidal with an
//      oxo ([ReOCl4]-, VO(acac)2), for d4-d7 and for d8 without a neutral
//      pi acceptor ([Ni(CN)5]3-), else trigonal bipyramidal (Fe(CO)5);
//      with 6 it is octahedral; 3 on a d10 ion trigonal planar, 7 and 9
//      in a complex pentagonal bipyramidal and tricapped trigonal
//      prismatic. Bis(acac) M(II) of Mn to Ni oligomerise: octahedral. The
//      metals of a polynuclear carbonyl short of 18 valence electrons
//      (Mn2(CO)10, Co2(CO)8) pair their odd electrons in metal-metal bonds and
//      are octahedral counting them. A group 5 or 6 d1/d2 ion in a 1:2
//      chalcogenide (MoS2) is trigonal prismatic. A 4d/5d d8 ion, or Cu(III),
//      whose formula shows no coordination is square planar (PdCl2, KCuO2),
//      except among fluorides (PdF2, K3CuF6). Otherwise octahedral.
//   3. Spin state. 4d and 5d ions are low spin; tetrahedral 3d ions high
//      spin. An octahedral 3d d4-d7 ion is low spin when the ligands' f
//      exceeds the ion's crossover f (data/spin_crossover.tsv), high spin
//      otherwise; within 0.1 of it the ion is flagged near a crossover.
// A record's geometry and spin-state settings override.
//
// These are idealised estimates: spin states are set by structure,
// temperature and pressure, and measurement decides.
//
// Example:
//
//   absl::StatusOr<Formula> f = ParseFormula("K4[Fe(CN)6]");
//   absl::StatusOr<OxidationResult> r =
//       AssignOxidationStates(*f, OxidationOptions());
//   IonEnvironment env = FindEnvironment(*f, *r->best, iron_state);
//   env.geometry;    // kOctahedral
//   env.spin_state;  // kLow: cyanide f 1.7 > Fe2+ crossover
//
// Thread safety: pure functions.

#ifndef SHELLWRIGHT_ENGINE_COORDINATION_H_
#define SHELLWRIGHT_ENGINE_COORDINATION_H_

#include <optional>

#include "absl/container/inlined_vector.h"
#include "engine/formula.h"
#include "engine/ligand_field.h"
#include "engine/oxidation.h"
#include "engine/units.h"
#include "util/enum_names.h"

namespace shellwright {

// Why an ion has its spin state.
enum class SpinBasis {
  kNone,         // Not a d ion in a ligand field.
  kRecord,       // The record (or the caller) set geometry or spin state.
  kNoChoice,     // Its d count has one state in this geometry.
  kLigandField,  // Ligand f against the ion's crossover f.
  kHeavyMetal,   // 4d or 5d: low spin.
  kTetrahedral,  // Tetrahedral 3d: high spin.
  kDefaultHigh,  // No ligand known: 3d high spin.
  // An octahedral 3d ion in an oxygen-deficient perovskite of the
  // brownmillerite kind (A2B2O5, SrCoO2.5): high spin.
  kOxygenDeficientPerovskite,
  // A metal of a polynuclear carbonyl short of 18 valence electrons
  // (Mn2(CO)10), or of the metallic Pd(I) layers of PdCoO2: paired in
  // metal-metal bonds.
  kMetalMetalBond,
  // A 3d metal of the metallic layers of the layered pnictides (BaFe2As2,
  // LaFeAsO): its d electrons itinerant, no local moment.
  kItinerant,
  // An 18-electron complex of pi acceptors, or a 16-electron one of a 4d
  // or 5d metal, whose idealised geometry would leave d electrons
  // unpaired (CpV(CO)4, RuCl2(PPh3)3): all paired.
  kElectronCount,
  // A 4d or 5d d2 ion with multiply bonded oxo ligands in an octahedral
  // complex (trans-[OsO2(OH)4]2-, [ReOCl5]2-, [ReO2(py)4]+): the M=O bonds
  // raise dxz and dyz, and both d electrons pair in dxy.
  kMetalOxo,
};

template <>
struct EnumNames<SpinBasis> {
  static constexpr absl::string_view kWhat = "spin-state basis";
  static constexpr NamedValue<SpinBasis> kNames[] = {
      {SpinBasis::kNone, ""},
      {SpinBasis::kRecord, "record"},
      {SpinBasis::kNoChoice, "no_choice"},
      {SpinBasis::kLigandField, "ligand_field"},
      {SpinBasis::kHeavyMetal, "4d_5d_low_spin"},
      {SpinBasis::kTetrahedral, "tetrahedral_high_spin"},
      {SpinBasis::kDefaultHigh, "default_high_spin"},
      {SpinBasis::kOxygenDeficientPerovskite, "oxygen_deficient_perovskite"},
      {SpinBasis::kMetalMetalBond, "metal_metal_bond"},
      {SpinBasis::kItinerant, "itinerant"},
      {SpinBasis::kElectronCount, "electron_count"},
      {SpinBasis::kMetalOxo, "metal_oxo"}};
};

// Which of an element's atoms an environment is for, where the formula
// writes the element both inside a bracketed complex and outside one
// (Prussian blue, Fe4[Fe(CN)6]3: the C-bound iron in the complex, the
// N-bound iron outside it).
enum class ComplexSide {
  kAsWritten,  // Where the element's first written atom is.
  kInside,     // In the first bracketed complex that holds the element.
  kOutside,    // Outside every bracketed complex.
};

struct IonEnvironment {
  Geometry geometry = Geometry::kOctahedral;
  SpinStatePreference spin_state = SpinStatePreference::kAuto;
  // The ligand that most of the donor sites hold, or null when none is
  // known; `f` is the count- and denticity-weighted mean f (0 if none).
  const Ligand* ligand = nullptr;
  double f = 0;
  SpinBasis basis = SpinBasis::kNone;
  bool near_crossover = false;
  // Its d electrons pair in metal-metal bonds (kMetalMetalBond), in a
  // closed 18- or 16-electron shell (kElectronCount) or below the M=O pi
  // bonds (kMetalOxo), or are itinerant (kItinerant): no local moment.
  bool metal_metal_bonded = false;
};

// The environment of the d-block ion `ion` (an entry of `assignment`).
// `geometry_set` and `spin_set` are the record's settings for its element,
// or null; `side` says which of its atoms (ComplexSide).
IonEnvironment FindEnvironment(const Formula& formula,
                               const OxidationAssignment& assignment,
                               const AssignedState& ion,
                               const Geometry* geometry_set,
                               const SpinStatePreference* spin_set,
                               ComplexSide side = ComplexSide::kAsWritten);

// What FindEnvironment reads from the whole formula and assignment, the
// same for every ion outside a bracketed complex: the ligands outside
// complexes, whether the formula writes a complex, and two tests of the
// anions. A record with several d ions works these out once with a cache
// that it passes to FindEnvironment for each of them; the answers are the
// same as without it. A cache belongs to one formula and assignment.
struct EnvironmentCache {
  struct LigandSites {
    const Ligand* ligand;
    double sites;  // Ligands times denticity, per formula unit.
  };
  // The formula writes a '[' group; -1 until asked.
  int has_complex = -1;
  // The ligands outside every complex, once `ligands_ready`.
  bool ligands_ready = false;
  absl::InlinedVector<LigandSites, 4> sites;
  bool molecular = true;  // Only unit ligands (no monatomic anions).
  double unlisted = 0;    // Neutral unranked units (inside complexes only).
  // A free pnictide anion (P, As, Sb or Bi at -3); -1 until asked.
  int pnictide = -1;
  // The brownmillerite test of the assignment; -1 until asked.
  int oxygen_deficient_perovskite = -1;
};
IonEnvironment FindEnvironment(const Formula& formula,
                               const OxidationAssignment& assignment,
                               const AssignedState& ion,
                               const Geometry* geometry_set,
                               const SpinStatePreference* spin_set,
                               ComplexSide side, EnvironmentCache* cache);

// Whether `formula` writes a bracketed complex ('['), asked once per
// cache.
bool WritesComplex(const Formula& formula, EnvironmentCache* cache);

// How many of the `ion.count` atoms of `ion` (a free d-block ion of
// `assignment`) sit inside a bracketed complex, where its element is
// written both inside one and outside (Fe4[Fe(CN)6]3); nullopt where it is
// not. The element's states are shared out so that the complexes hold one
// state where the counts allow it (Fe4[Fe(CN)6]3: 3 Fe2+ inside, 4 Fe3+
// outside; Mn3[Mn(CN)6]2: 2 Mn3+ inside), the lower state where two would
// (KFe[Fe(CN)6]: Fe2+, low spin at the carbon end, beside high-spin Fe3+
// at the nitrogen end; Greenwood and Earnshaw, Chemistry of the Elements,
// 2nd ed., ch. 25, from memory), else the lower states first.
std::optional<Rational> AtomsInComplex(const Formula& formula,
                                       const OxidationAssignment& assignment,
                                       const AssignedState& ion);

// The d electrons of a d-block ion counted as coordination chemistry
// does: group - state (Ni(CO)4's Ni0 is d10, Fe-2 is d10), or -1 when
// that is outside 0..10.
int CoordinationDCount(const Element& e, int state);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_COORDINATION_H_
