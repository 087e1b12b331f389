#include "engine/ligand_field.h"

#include <algorithm>
#include <array>
#include <iterator>

#include "absl/strings/str_cat.h"

namespace shellwright {
namespace {

struct LevelSpec {
  absl::string_view name;
  int orbitals;
};

std::vector<LevelSpec> LevelsFor(Geometry g) {
  switch (g) {
    case Geometry::kOctahedral:
      return {{"t2g", 3}, {"eg", 2}};
    case Geometry::kTetrahedral:
      return {{"e", 2}, {"t2", 3}};
    case Geometry::kSquarePlanar:
      return {{"eg", 2}, {"a1g", 1}, {"b2g", 1}, {"b1g", 1}};
    case Geometry::kTrigonalPrismatic:
      return {{"a1'", 1}, {"e'", 2}, {"e''", 2}};
    case Geometry::kTrigonalBipyramidal:
      // D3h with the axis along z: (xz, yz) lowest, then (xy, x2-y2), z2
      // highest (Huheey, Keiter and Keiter, Inorganic Chemistry, 4th ed.,
      // from memory).
      return {{"e''", 2}, {"e'", 2}, {"a1'", 1}};
    case Geometry::kSquareAntiprismatic:
      // D4d, eight-coordinate: z2 lowest, then (xy, x2-y2), (xz, yz)
      // highest. The dodecahedron (D2d) also has a single lowest orbital
      // (x2-y2), so d1 and d2 fill alike: [Mo(CN)8]4- is diamagnetic d2
      // (Greenwood and Earnshaw, Chemistry of the Elements, 2nd ed.,
      // ch. 23, from memory).
      return {{"a1", 1}, {"e2", 2}, {"e3", 2}};
    case Geometry::kLinear:
      // D-infinity-h, two-coordinate along z: (xy, x2-y2) lowest, then
      // (xz, yz), z2 highest (Huheey, Keiter and Keiter, Inorganic
      // Chemistry, 4th ed., from memory).
      return {{"δg", 2}, {"πg", 2}, {"σg", 1}};
    case Geometry::kSquarePyramidal:
      // C4v, apical ligand along z. Sigma bonding leaves dxy and (dxz,
      // dyz) nonbonding; an apical pi donor (oxo) raises (dxz, dyz), so
      // dxy is lowest (Ballhausen and Gray, Inorg. Chem. 1 (1962) 111,
      // vanadyl, from memory).
      return {{"b2", 1}, {"e", 2}, {"a1", 1}, {"b1", 1}};
    case Geometry::kTrigonalPlanar:
      // D3h, three ligands in the xy plane: (xz, yz) nonbonding, z2 weakly
      // and (xy, x2-y2) strongly antibonding (sigma angular overlap model,
      // common practice, no source).
      return {{"e''", 2}, {"a1'", 1}, {"e'", 2}};
    case Geometry::kPentagonalBipyramidal:
      // D5h, axis along z: (xz, yz) nonbonding, then (xy, x2-y2), z2
      // highest (sigma angular overlap model, common practice, no source).
      return {{"e1''", 2}, {"e2'", 2}, {"a1'", 1}};
    case Geometry::kTricappedTrigonalPrismatic:
      // D3h, nine-coordinate: z2 lowest, then (xy, x2-y2), (xz, yz)
      // (sigma angular overlap model, common practice, no source).
      return {{"a1'", 1}, {"e'", 2}, {"e''", 2}};
    case Geometry::kFree:
      break;
  }
  return {{"d", 5}};
}

}  // namespace

SpinState ResolveSpinState(Geometry geometry, SpinStatePreference preference,
                           int n) {
  if (preference == SpinStatePreference::kHigh) return SpinState::kHigh;
  if (preference == SpinStatePreference::kLow) return SpinState::kLow;
  if (preference == SpinStatePreference::kIntermediate) {
    return SpinState::kIntermediate;
  }
  switch (geometry) {
    case Geometry::kOctahedral:
      return n <= 3 ? SpinState::kHigh : SpinState::kLow;
    case Geometry::kTetrahedral:
      return SpinState::kHigh;
    case Geometry::kSquarePlanar:
    case Geometry::kTrigonalPrismatic:
    case Geometry::kTrigonalBipyramidal:
    case Geometry::kSquareAntiprismatic:
    case Geometry::kLinear:
    case Geometry::kSquarePyramidal:
    case Geometry::kTrigonalPlanar:
    case Geometry::kPentagonalBipyramidal:
    case Geometry::kTricappedTrigonalPrismatic:
      return SpinState::kLow;
    case Geometry::kFree:
      break;
  }
  return SpinState::kHigh;
}

std::string LigandFieldSplitting::Notation() const {
  std::string out;
  for (const SplitLevel& level : levels) {
    if (!out.empty()) out.push_back(' ');
    absl::StrAppend(&out, level.name, level.electrons);
  }
  return out;
}

LigandFieldSplitting SplitD(int d_electrons, Geometry geometry,
                            SpinState spin_state) {
  LigandFieldSplitting result;
  result.geometry = geometry;
  result.spin_state = spin_state;
  const std::vector<LevelSpec> specs = LevelsFor(geometry);
  std::vector<int> filled(specs.size(), 0);
  int left = std::clamp(d_electrons, 0, 10);
  if (spin_state == SpinState::kLow) {
    for (size_t i = 0; i < specs.size() && left > 0; ++i) {
      filled[i] = std::min(left, 2 * specs[i].orbitals);
      left -= filled[i];
    }
  } else {
    // Singly occupy every orbital, lowest level first, then pair; the
    // intermediate state leaves the highest level for last.
    const size_t open = spin_state == SpinState::kIntermediate
                            ? specs.size() - 1
                            : specs.size();
    for (int pass = 0; pass < 2; ++pass) {
      for (size_t i = 0; i < open && left > 0; ++i) {
        const int add = std::min(left, specs[i].orbitals);
        filled[i] += add;
        left -= add;
      }
    }
    for (size_t i = open; i < specs.size() && left > 0; ++i) {
      filled[i] = std::min(left, 2 * specs[i].orbitals);
      left -= filled[i];
    }
  }
  for (size_t i = 0; i < specs.size(); ++i) {
    const int orbitals = specs[i].orbitals;
    const int e = filled[i];
    const int unpaired = e <= orbitals ? e : 2 * orbitals - e;
    result.levels.push_back(SplitLevel{specs[i].name, orbitals, e, unpaired});
    result.unpaired += unpaired;
  }
  return result;
}

bool HasSpinChoice(int d_electrons, Geometry geometry) {
  if (geometry == Geometry::kFree || d_electrons < 0 || d_electrons > 10) {
    return false;
  }
  constexpr size_t kGeometries =
      std::size(EnumNames<Geometry>::kNames);  // Indexed by value.
  static const auto* const table = [] {
    auto* t = new std::array<std::array<bool, 11>, kGeometries>();
    for (const auto& named : EnumNames<Geometry>::kNames) {
      if (named.value == Geometry::kFree) continue;
      for (int d = 0; d <= 10; ++d) {
        (*t)[static_cast<size_t>(named.value)][d] =
            SplitD(d, named.value, SpinState::kHigh).unpaired !=
            SplitD(d, named.value, SpinState::kLow).unpaired;
      }
    }
    return t;
  }();
  const size_t g = static_cast<size_t>(geometry);
  return g < kGeometries && (*table)[g][d_electrons];
}

}  // namespace shellwright
