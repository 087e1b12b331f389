// Spin states of d-electron ions in a ligand (crystal) field.
//
// The five d orbitals split into levels whose order depends on the
// coordination geometry. Electrons fill the levels lowest first:
//   - high spin: one electron in every orbital, lowest level first, before
//     any pairing (Hund's first rule across the split levels);
//   - low spin: each level fills completely before the next one opens;
//   - intermediate spin: high spin across every level but the highest,
//     which opens only when the others are full (square-planar Fe(TPP),
//     S = 1, with dx2-y2 empty).
// Levels, lowest first:
//   octahedral     t2g (3 orbitals), eg (2)
//   tetrahedral    e (2), t2 (3)
//   square planar  eg (dxz, dyz), a1g (dz2), b2g (dxy), b1g (dx2-y2)
//   trigonal prism a1' (dz2), e' (dxy, dx2-y2), e'' (dxz, dyz): the d1 and
//                  d2 ions of MoS2-type layers fill a1' (Wilson and Yoffe,
//                  Adv. Phys. 18 (1969) 193, from memory)
//   square pyramid b2 (dxy), e (dxz, dyz), a1 (dz2), b1 (dx2-y2): the
//                  apical oxo of VO(acac)2 and [ReOCl4]- raises e above b2
//                  (Ballhausen and Gray, Inorg. Chem. 1 (1962) 111, from
//                  memory), so low-spin d2 pairs in dxy
//   trigonal plane e'' (dxz, dyz), a1' (dz2), e' (dxy, dx2-y2)
//   pentagonal bipyramid e1'' (dxz, dyz), e2' (dxy, dx2-y2), a1' (dz2)
//   tricapped trigonal prism a1' (dz2), e' (dxy, dx2-y2), e'' (dxz, dyz)
//                  (these three from the sigma angular overlap model,
//                  common practice, no source)
// SpinStatePreference::kAuto picks high spin for 3d ions and low spin for
// 4d and 5d ions in octahedral fields, high spin in tetrahedral fields,
// and low spin in square-planar and trigonal-prismatic fields (common practice,
// no source: the splitting grows down a group, tetrahedral splitting is about
// 4/9 of octahedral, and square-planar d8 is diamagnetic).
//
// These are idealised one-electron pictures. Real spin states depend on
// the ligands, and measurement decides.
//
// Example:
//
//   shellwright::SplitD(6, shellwright::Geometry::kOctahedral,
//                       shellwright::SpinState::kLow);
//   // levels t2g6 eg0, unpaired 0, Notation() "t2g6 eg0"
//   shellwright::ParseName<shellwright::Geometry>("square_planar");
//   shellwright::Name(shellwright::Geometry::kOctahedral);  // "octahedral"
//
// Thread safety: pure functions.

#ifndef SHELLWRIGHT_ENGINE_LIGAND_FIELD_H_
#define SHELLWRIGHT_ENGINE_LIGAND_FIELD_H_

#include <string>
#include <vector>

#include "absl/strings/string_view.h"
#include "util/enum_names.h"

namespace shellwright {

enum class Geometry {
  kFree,
  kOctahedral,
  kTetrahedral,
  kSquarePlanar,
  kTrigonalPrismatic,
  kTrigonalBipyramidal,
  kSquareAntiprismatic,
  kLinear,
  kSquarePyramidal,
  kTrigonalPlanar,
  kPentagonalBipyramidal,
  kTricappedTrigonalPrismatic
};
// Geometries, kFree included: arrays indexed by Geometry have this size.
inline constexpr int kGeometryCount =
    static_cast<int>(Geometry::kTricappedTrigonalPrismatic) + 1;
enum class SpinStatePreference { kAuto, kHigh, kLow, kIntermediate };
// kIntermediate: high spin across every level but the highest, which
// stays empty until the others are full: the S = 1 of square-planar
// Fe(TPP) and FePc and the S = 3/2 of MnPc, whose dx2-y2 lies far above
// the other four d orbitals (Scheidt and Reed, Chem. Rev. 81 (1981) 543;
// Barraclough, Martin, Mitra and Sherwood, J. Chem. Phys. 53 (1970) 1638;
// from memory). Defined for the square plane and pyramid only
// (IntermediateSpinApplies): in an octahedral field the same filling is
// low spin.
enum class SpinState { kHigh, kLow, kIntermediate };

// Names for Name() / ParseName() (util/enum_names.h).
template <>
struct EnumNames<Geometry> {
  static constexpr absl::string_view kWhat = "geometry";
  static constexpr NamedValue<Geometry> kNames[] = {
      {Geometry::kFree, "free"},
      {Geometry::kOctahedral, "octahedral"},
      {Geometry::kTetrahedral, "tetrahedral"},
      {Geometry::kSquarePlanar, "square_planar"},
      {Geometry::kTrigonalPrismatic, "trigonal_prismatic"},
      {Geometry::kTrigonalBipyramidal, "trigonal_bipyramidal"},
      {Geometry::kSquareAntiprismatic, "square_antiprismatic"},
      {Geometry::kLinear, "linear"},
      {Geometry::kSquarePyramidal, "square_pyramidal"},
      {Geometry::kTrigonalPlanar, "trigonal_planar"},
      {Geometry::kPentagonalBipyramidal, "pentagonal_bipyramidal"},
      {Geometry::kTricappedTrigonalPrismatic, "tricapped_trigonal_prismatic"}};
  static constexpr NamedValue<Geometry> kAliases[] = {
      {Geometry::kSquarePlanar, "square-planar"},
      {Geometry::kTrigonalPrismatic, "trigonal-prismatic"},
      {Geometry::kTrigonalBipyramidal, "trigonal-bipyramidal"},
      {Geometry::kSquareAntiprismatic, "square-antiprismatic"},
      {Geometry::kSquarePyramidal, "square-pyramidal"},
      {Geometry::kTrigonalPlanar, "trigonal-planar"},
      {Geometry::kPentagonalBipyramidal, "pentagonal-bipyramidal"},
      {Geometry::kTricappedTrigonalPrismatic, "tricapped-trigonal-prismatic"}};
};
template <>
struct EnumNames<SpinStatePreference> {
  static constexpr absl::string_view kWhat = "spin state";
  static constexpr NamedValue<SpinStatePreference> kNames[] = {
      {SpinStatePreference::kAuto, "auto"},
      {SpinStatePreference::kHigh, "high"},
      {SpinStatePreference::kLow, "low"},
      {SpinStatePreference::kIntermediate, "intermediate"}};
};
template <>
struct EnumNames<SpinState> {
  static constexpr absl::string_view kWhat = "spin state";
  static constexpr NamedValue<SpinState> kNames[] = {
      {SpinState::kHigh, "high"},
      {SpinState::kLow, "low"},
      {SpinState::kIntermediate, "intermediate"}};
};

// One split level of the d subshell.
struct SplitLevel {
  absl::string_view name;  // "t2g", "eg", ...
  int orbitals;            // Spatial orbitals in the level.
  int electrons;           // 0..2*orbitals.
  int unpaired;
};

struct LigandFieldSplitting {
  Geometry geometry = Geometry::kFree;
  SpinState spin_state = SpinState::kHigh;
  std::vector<SplitLevel> levels;  // Lowest level first.
  int unpaired = 0;

  // "t2g6 eg0".
  std::string Notation() const;
};

// The spin state that kAuto resolves to for a d subshell of principal
// quantum number `n` (3 for 3d) in `geometry`.
SpinState ResolveSpinState(Geometry geometry, SpinStatePreference preference,
                           int n);

// True for the geometries whose highest level is the lone dx2-y2 that
// the intermediate spin state leaves empty: square planar and square
// pyramidal. Elsewhere kIntermediate would fill as low spin, which is not
// what "intermediate spin" means for an octahedral ion (LaCoO3's debated
// t2g5 eg1), so requests and records may not ask for it there.
//
//   IntermediateSpinApplies(Geometry::kSquarePlanar);  // true: Fe(TPP)
//   IntermediateSpinApplies(Geometry::kOctahedral);    // false
constexpr bool IntermediateSpinApplies(Geometry geometry) {
  return geometry == Geometry::kSquarePlanar ||
         geometry == Geometry::kSquarePyramidal;
}

// Distributes `d_electrons` (0..10) over the levels of `geometry`.
// REQUIRES: geometry != kFree, 0 <= d_electrons <= 10.
LigandFieldSplitting SplitD(int d_electrons, Geometry geometry,
                            SpinState spin_state);

// True when `d_electrons` (0..10) in `geometry` can be high or low spin
// with different unpaired counts (SplitD's levels): octahedral d4-d7,
// tetrahedral d3-d6, square-planar d3-d8, trigonal-prismatic d2-d7. False
// for d0 and d10, for a count with one spin state in its geometry
// (octahedral d3 or d8), for kFree and for a count outside 0..10.
// Thread-safe (a table built on first use).
//
//   HasSpinChoice(6, Geometry::kOctahedral);  // true: Co3+ low or high
//   HasSpinChoice(10, Geometry::kOctahedral);  // false: Zn2+
bool HasSpinChoice(int d_electrons, Geometry geometry);

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_LIGAND_FIELD_H_
