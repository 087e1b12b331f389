#include "engine/coordination.h"

#include <algorithm>
#include <cmath>

#include "absl/container/inlined_vector.h"

namespace shellwright {
namespace {

// Crossover f where the table has no row, by charge (common practice, no
// source: the splitting grows with charge faster than the pairing energy).
double DefaultCrossover(int state) {
  if (state <= 2) return 1.5;
  if (state == 3) return 1.2;
  return 0.9;
}

// Ligand f from which a d8 ion with four donor sites is square planar
// and a five-coordinate ion low spin (common practice, no source: cyanide
// and carbon monoxide, not ammonia).
constexpr double kStrongFieldF = 1.5;

// How close to its crossover f an ion is flagged (common practice, no
// source: about the spread of f between neighbours in the series).
constexpr double kNearCrossover = 0.1;

// Whether group `g` lies inside group `outer` (or is it).
bool Inside(const Formula& formula, int g, int outer) {
  for (; g >= 0; g = formula.groups[g].parent) {
    if (g == outer) return true;
  }
  return false;
}

// The innermost '[' group around term `t`, or -1.
int ComplexAround(const Formula& formula, const WrittenTerm& t) {
  for (int g = t.group; g >= 0; g = formula.groups[g].parent) {
    if (formula.groups[g].bracket == '[') return g;
  }
  return -1;
}

// The innermost '[' group around the atoms of `e` that `side` names, or -1.
int ComplexOf(const Formula& formula, const Element* e, ComplexSide side) {
  if (side == ComplexSide::kOutside) return -1;
  for (const WrittenTerm& t : formula.terms) {
    if (t.element != e) continue;
    const int g = ComplexAround(formula, t);
    if (g >= 0 || side == ComplexSide::kAsWritten) return g;
  }
  return -1;
}

// The number of free states `e` is listed with in `assignment` (the
// atoms of a mixed-valence element appear once per state).
double CountStates(const OxidationAssignment& assignment, const Element* e) {
  double n = 0;
  for (const AssignedState& s : assignment.states) {
    if (s.unit < 0 && s.element == e) ++n;
  }
  return n;
}

// Atoms of `e` written inside group `g`, per formula unit.
Rational AtomsInside(const Formula& formula, const Element* e, int g) {
  Rational n(0);
  for (const WrittenTerm& t : formula.terms) {
    if (t.element == e && Inside(formula, t.group, g)) {
      n = n + t.count * t.multiplier;
    }
  }
  return n;
}

// x < y × num / den, cross-multiplied (denominators are positive), with
// no rational to reduce.
bool BelowMultiple(const Rational& x, const Rational& y, int num, int den) {
  return static_cast<__int128>(x.num()) * y.den() * den <
         static_cast<__int128>(y.num()) * x.den() * num;
}

// An A-site cation of a perovskite: Ca, Sr, Ba, Y or a lanthanide.
bool PerovskiteASite(const Element& e) {
  const int z = e.atomic_number;
  return z == 20 || z == 38 || z == 56 || z == 39 || (z >= 57 && z <= 71);
}

// Whether `assignment` is an oxygen-deficient perovskite of the
// brownmillerite kind: free A-site cations (PerovskiteASite) and 3d metals
// in equal numbers, oxide as the only anion, and from 2.5 up to (not
// including) 2.75 oxygen per 3d metal: nearer the brownmillerite A2B2O5
// than the perovskite ABO3 (common practice, no source for the bound). In
// A2B2O5 half the B sites are tetrahedral and the octahedra share their
// apical oxygen with the tetrahedra; their metal-oxygen bonds are longer
// than in the perovskite and their field weaker (docs/method.md).
bool OxygenDeficientPerovskite(const OxidationAssignment& assignment) {
  if (!assignment.units.empty()) return false;
  // The counts in floating point first: a few positive terms, each within
  // a relative 2^-53 of its value, so a margin of 1e-9 leaves to the exact
  // sums only the records at a bound (and those that pass).
  double ad = 0, bd = 0, od = 0;
  for (const AssignedState& s : assignment.states) {
    const int z = s.element->atomic_number;
    if (s.state < 0) {
      if (z != 8 || s.state != -2) return false;
      od += s.count.ToDouble();
    } else if (z >= 21 && z <= 30) {
      bd += s.count.ToDouble();
    } else if (PerovskiteASite(*s.element) && s.state > 0) {
      ad += s.count.ToDouble();
    } else {
      return false;  // Another cation, or O in a state other than -2.
    }
  }
  constexpr double kMargin = 1e-9;
  if (bd <= 0 || std::abs(ad - bd) > kMargin * bd ||
      od < 2.5 * bd * (1 - kMargin) || od >= 2.75 * bd * (1 + kMargin)) {
    return false;
  }
  Rational a(0), b(0), o(0);
  for (const AssignedState& s : assignment.states) {
    const int z = s.element->atomic_number;
    if (s.state < 0) {
      o = o + s.count;
    } else if (z >= 21 && z <= 30) {
      b = b + s.count;
    } else {
      a = a + s.count;
    }
  }
  return !b.IsZero() && a == b && !BelowMultiple(o, b, 5, 2) &&
         BelowMultiple(o, b, 11, 4);
}

using Site = EnvironmentCache::LigandSites;
using Sites = absl::InlinedVector<Site, 4>;

// The ligands of `complex` (-1: of the ions outside every complex) into
// `out`: the units and monatomic anions there, with their sites.
void GatherLigands(const Formula& formula,
                   const OxidationAssignment& assignment, int complex,
                   EnvironmentCache* out) {
  for (const AssignedUnit& u : assignment.units) {
    const bool in_complex =
        complex >= 0 &&
        (Inside(formula, u.enclosing, complex) || u.group == complex);
    // An ion outside any complex does not take another complex's ligands.
    bool in_a_complex = false;
    for (int g = u.group >= 0 ? u.group : u.enclosing; g >= 0;
         g = formula.groups[g].parent) {
      in_a_complex |= formula.groups[g].bracket == '[';
    }
    if (complex >= 0 ? !in_complex : in_a_complex) continue;
    if (u.unit->ligand == nullptr) {
      // A neutral unit written in the complex is a ligand the series does
      // not rank (ethylene in Zeise's salt, K[PtCl3(C2H4)]): it takes a
      // site but no part in f.
      if (complex >= 0 && u.unit->charge == 0) {
        out->unlisted += u.count.ToDouble();
      }
      continue;
    }
    out->sites.push_back(
        {u.unit->ligand, u.count.ToDouble() * u.unit->ligand->denticity});
  }
  for (const AssignedState& s : assignment.states) {
    if (s.unit >= 0 || s.state >= 0) continue;
    const Ligand* l = FindAnionLigand(*s.element);
    if (l == nullptr) continue;
    const double count =
        complex >= 0 ? AtomsInside(formula, s.element, complex).ToDouble()
                     : s.count.ToDouble();
    if (count <= 0) continue;
    out->sites.push_back({l, count * l->denticity});
    out->molecular = false;
  }
  out->ligands_ready = true;
}

// Whether every site is held by an anionic O,O-chelate (acac).
bool OxygenChelatesOnly(const Sites& sites) {
  for (const Site& s : sites) {
    const Ligand& l = *s.ligand;
    if (l.unit == nullptr || l.denticity != 2 || l.unit->charge >= 0 ||
        l.donor->atomic_number != 8) {
      return false;
    }
  }
  return !sites.empty();
}

}  // namespace

bool WritesComplex(const Formula& formula, EnvironmentCache* cache) {
  if (cache->has_complex < 0) {
    cache->has_complex = 0;
    for (const WrittenGroup& g : formula.groups) {
      if (g.bracket == '[') cache->has_complex = 1;
    }
  }
  return cache->has_complex != 0;
}

int CoordinationDCount(const Element& e, int state) {
  if (e.block != Block::kD || e.group < 3 || e.group > 12) return -1;
  const int d = e.group - state;
  return d >= 0 && d <= 10 ? d : -1;
}

std::optional<Rational> AtomsInComplex(const Formula& formula,
                                       const OxidationAssignment& assignment,
                                       const AssignedState& ion) {
  if (ion.element->block != Block::kD || ion.unit >= 0) return std::nullopt;
  Rational inside(0);
  for (const WrittenTerm& t : formula.terms) {
    if (t.element == ion.element && ComplexAround(formula, t) >= 0) {
      inside = inside + t.count * t.multiplier;
    }
  }
  if (inside.IsZero()) return std::nullopt;
  // The element's free states, lower first (as the assignment lists them).
  absl::InlinedVector<const AssignedState*, 4> states;
  Rational total(0);
  for (const AssignedState& s : assignment.states) {
    if (s.element != ion.element || s.unit >= 0) continue;
    states.push_back(&s);
    total = total + s.count;
  }
  if (!(inside < total)) return std::nullopt;  // All inside.
  std::sort(states.begin(), states.end(),
            [](const AssignedState* a, const AssignedState* b) {
              return a->state < b->state;
            });
  for (const AssignedState* s : states) {
    if (s->count == inside) return s == &ion ? inside : Rational(0);
  }
  Rational left = inside;
  for (const AssignedState* s : states) {
    const Rational take = s->count < left ? s->count : left;
    if (s == &ion) return take;
    left = left - take;
  }
  return Rational(0);
}

// A 3d metal from Cr to Ni at +1 to +3 beside at least as many free
// pnictide anions (P, As, Sb or Bi at -3) as its own atoms, and at least
// as many as other anion atoms (the oxide of LaFeAsO), with no unit:
// the edge-sharing MX4 tetrahedra of the layered pnictides (BaFe2As2,
// LiFeAs, LaFeAsO, CaMn2Sb2) and of the [MnSb4]9- tetrahedra of
// Ca14MnSb11 (Johrendt, J. Mater. Chem. 21 (2011) 13726; Kauzlarich (ed.),
// Chemistry, Structure, and Bonding of Zintl Phases and Ions, VCH (1996);
// from memory).
// `*any_pnictide` (when not null) keeps whether the assignment holds a
// free pnictide anion at all, for the next ion: -1 until known.
bool InPnictideTetrahedra(const OxidationAssignment& assignment,
                          const AssignedState& ion, int* any_pnictide) {
  const int z = ion.element->atomic_number;
  if (z < 24 || z > 28 || ion.state < 1 || ion.state > 3 ||
      !assignment.units.empty()) {
    return false;
  }
  // Most records hold no pnictide: no sums for them.
  if (any_pnictide == nullptr || *any_pnictide < 0) {
    bool any = false;
    for (const AssignedState& s : assignment.states) {
      const int sz = s.element->atomic_number;
      any |= s.state == -3 && IsHeavyPnictogen(sz);
    }
    if (any_pnictide != nullptr) *any_pnictide = any ? 1 : 0;
    if (!any) return false;
  } else if (*any_pnictide == 0) {
    return false;
  }
  Rational pnictide(0), other_anion(0), metal(0);
  for (const AssignedState& s : assignment.states) {
    const int sz = s.element->atomic_number;
    if (s.state == -3 && IsHeavyPnictogen(sz)) {
      pnictide = pnictide + s.count;
    } else if (s.state < 0) {
      other_anion = other_anion + s.count;
    } else if (s.element == ion.element) {
      metal = metal + s.count;
    }
  }
  return !metal.IsZero() && !(pnictide < metal) && !(pnictide < other_anion);
}

// A 4d or 5d metal of groups 4 to 7 in a low state among halide,
// oxide or chalcogenide anions only, with no unit and few anions per metal
// atom: its d electrons pair in metal-metal bonds. The octahedral clusters
// [Mo6Cl8]4+ of MoCl2, [Nb6Cl12]2+ of Nb6Cl14, the Mo6S8 clusters of the
// Chevrel phases (PbMo6S8), the Re3Cl9 triangles of ReCl3, the Zr6
// clusters, NbO, and the metal pairs of NbCl4, NbO2, MoO2 and WO2 are
// diamagnetic or Pauli paramagnetic (Greenwood and Earnshaw, Chemistry of
// the Elements, 2nd ed., chs. 21-24; Cotton, Murillo and Walton, Multiple
// Bonds between Metal Atoms, 3rd ed.; Chevrel, Sergent and Prigent, J.
// Solid State Chem. 3 (1971) 515; all from memory). Up to +3 with at most
// 4.5 anions per metal atom (K3W2Cl9, Cs3Re3Cl12; the isolated [MoCl6]3-
// of K3MoCl6 keeps its three unpaired electrons); at +4 with d1 to d3,
// oxide anions only, at most 8/3 per metal atom (rutile-derived NbO2,
// MoO2, WO2, ReO2, and the Mo3O13 triangles of Zn2Mo3O8 and Mg2Mo3O8,
// diamagnetic with six electrons in Mo-Mo bonds: McCarroll, Katz and Ward,
// J. Am. Chem. Soc. 79 (1957) 5410; Cotton, Inorg. Chem. 3 (1964) 1217;
// from memory), halides only, at most four, d1 (NbCl4, NbI4), or, d3,
// two chalcogenide anions per metal atom (the Re4 clusters of ReS2, ReSe2
// and TcS2). No other transition metal of groups 3 to 10 may be present,
// but for the 3d M(II) of the M2Mo3O8 oxides (Fe2Mo3O8) and of the
// Chevrel phases (Ni2Mo6S8). Cationic units are counter-ions and are
// left out: (NH4)2[Mo6Cl14] and (NBu4)2[Mo6Cl14] hold the diamagnetic
// [Mo6Cl14]2- cluster anion of K2Mo6Cl14 (Greenwood and Earnshaw,
// Chemistry of the Elements, 2nd ed., ch. 23, from memory).
bool PairsInMetalClusters(const OxidationAssignment& assignment,
                          const AssignedState& ion, int d) {
  const Element& e = *ion.element;
  if (!IsClusterFormer(e) || d < 1 || ion.state < 1 || ion.state > 4) {
    return false;
  }
  for (const AssignedUnit& u : assignment.units) {
    if (u.unit->charge <= 0) return false;
  }
  Rational anions(0), metal(0);
  bool oxide = false, chalcogen = false, halide = false;
  // Another transition metal, and whether each is a 3d M(II) or a d0
  // group 3 M(III), which hold no electrons for the cluster.
  bool other_metal = false, other_closed = true;
  for (const AssignedState& s : assignment.states) {
    if (s.unit >= 0) continue;  // A counter-ion's atoms.
    const int z = s.element->atomic_number;
    if (s.element == &e) {
      metal = metal + s.count;
      continue;
    }
    const bool o = z == 8, ch = IsHeavyChalcogen(z), x = IsHalogen(z);
    if (!o && !ch && !x) {
      if (s.state < 0) return false;  // Another anion.
      if (s.element->block == Block::kD && s.element->group >= 3 &&
          s.element->group <= 10) {
        other_metal = true;
        other_closed &= (s.element->period == 4 && s.state == 2) ||
                        (s.element->group == 3 && s.state == 3);
      }
      continue;
    }
    oxide |= o;
    chalcogen |= ch;
    halide |= x;
    anions = anions + s.count;
  }
  if (metal.IsZero() || anions.IsZero()) return false;
  if (other_metal) {
    // Another transition metal could hold the electrons (MnCrCoWO3.91),
    // but for the 3d M(II) and Sc(III) cations of the M2Mo3O8 oxides,
    // eight oxygen per three cluster atoms at +4: Fe2Mo3O8 (kamiokite),
    // Co2Mo3O8, Mn2Mo3O8 and Ni2Mo3O8 hold high-spin M(II) beside the
    // same diamagnetic Mo3O13 triangles as Zn2Mo3O8 (McCarroll, Katz and
    // Ward, J. Am. Chem. Soc. 79 (1957) 5410, from memory); their moment
    // is the M(II) one.
    // So do the 3d M(II) in the channels of the Chevrel phases, at most
    // 4/3 chalcogen per cluster atom at +2 or +3: Ni2Mo6S8, Co2Mo6S8 and
    // Fe2Mo6S8 hold the same Mo6S8 clusters as PbMo6S8 (Chevrel, Sergent
    // and Prigent, J. Solid State Chem. 3 (1971) 515, from memory).
    if (!other_closed) return false;
    if (ion.state <= 3) {
      return chalcogen && !oxide && !halide &&
             !(metal * Rational(4, 3) < anions);
    }
    return oxide && !halide && !chalcogen && anions == metal * Rational(8, 3);
  }
  if (ion.state <= 3) return !(metal * Rational(9, 2) < anions);
  if (d > 3) return false;
  // The d3 dichalcogenides of group 7, two S or Se per metal atom, no
  // other anion: the distorted CdI2-type layers of ReS2, ReSe2 and TcS2
  // hold Re4 (Tc4) parallelogram clusters, Re-Re bonded, and are
  // diamagnetic semiconductors (Wildervanck and Jellinek, J. Less-Common
  // Met. 24 (1971) 73; Greenwood and Earnshaw, Chemistry of the Elements,
  // 2nd ed., ch. 24; from memory). The d1 and d2 layers of groups 5 and 6
  // (NbSe2, MoS2) are band metals and semiconductors, not clusters.
  if (chalcogen) {
    return d == 3 && !oxide && !halide && anions == metal * Rational(2);
  }
  if (oxide && !halide) return !(metal * Rational(8, 3) < anions);
  return halide && !oxide && d == 1 && !(metal * Rational(4) < anions);
}

// A low-spin d4 or d5 metal, the only cation, with one pnictogen pair
// unit (P2 4-, As2 4-, Sb2 4-, AsS 3-, SbS 3-) per metal atom: the
// loellingite-type d4 FeP2, FeAs2, FeSb2, RuP2 and OsP2 and the
// arsenopyrite-type d5 FeAsS, CoAs2 and CoSb2 are diamagnetic
// semiconductors, their remaining d electrons paired in metal-metal bonds
// along the chains of edge-sharing octahedra (Hulliger and Mooser, J.
// Phys. Chem. Solids 26 (1965) 429, from memory). So are the d2 Mo and W
// of MoP2, WP2 and MoAs2, semimetals with no local moment (Ruehl and
// Jeitschko, Monatsh. Chem. 114 (1983) 817, from memory); the d2 Cr of
// CrSb2 is not paired (it orders antiferromagnetically with about 2 uB).
bool PairsAlongPnictideChains(const OxidationAssignment& assignment,
                              const AssignedState& ion, int d) {
  if (ion.element->block != Block::kD ||
      !(d == 4 || d == 5 || (d == 2 && IsClusterFormer(*ion.element))) ||
      assignment.units.empty()) {
    return false;
  }
  Rational pairs(0), metal(0);
  for (const AssignedUnit& u : assignment.units) {
    const std::vector<UnitAtom>& atoms = u.unit->atoms;
    int pnictogen = 0, atoms_in_unit = 0;
    for (const UnitAtom& a : atoms) {
      atoms_in_unit += a.count;
      pnictogen += a.element->group == 15 ? a.count : 0;
    }
    if (atoms_in_unit != 2 || pnictogen == 0) return false;
    pairs = pairs + u.count;
  }
  for (const AssignedState& s : assignment.states) {
    if (s.unit >= 0) continue;
    if (s.element != ion.element) return false;
    metal = metal + s.count;
  }
  return pairs == metal;
}

// The CdI2-type tellurides of groups 9 and 10, MTe2 with M the only metal
// (CoTe2, NiTe2, RhTe2, IrTe2, PdTe2, PtTe2): Te-Te contacts between the
// layers make them metals, Pauli paramagnetic with no local moment
// (Hulliger, Structural Chemistry of Layer-Type Phases (1976); Wilson and
// Yoffe, Adv. Phys. 18 (1969) 193; IrTe2's Ir-Ir dimers below 270 K stay
// nonmagnetic; all from memory). Their formal reading (ditelluride beside
// M(II), or telluride beside M(IV)) leaves d electrons that form no moment.
bool InMetallicTellurideLayers(const OxidationAssignment& assignment,
                               const AssignedState& ion) {
  const Element& e = *ion.element;
  if (e.block != Block::kD || (e.group != 9 && e.group != 10)) return false;
  Rational tellurium(0), metal(0);
  for (const AssignedState& s : assignment.states) {
    // Te free or in ditelluride units, each atom counted once.
    if (s.element->atomic_number == 52 && (s.unit >= 0 || s.state < 0)) {
      tellurium = tellurium + s.count;
    } else if (s.element == &e) {
      metal = metal + s.count;
    } else {
      return false;
    }
  }
  return !metal.IsZero() && tellurium == metal * Rational(2);
}

// A d0-d2 metal in a high state holding four anions per d-block metal
// atom, with no unit: the tetrahedral oxo-anions and tetroxides of M(V) to
// M(VIII) written without a unit of the table (KReO4, KRuO4, RuO4, OsO4;
// wolframite-type FeWO4, whose second d-block metal leaves two oxygen atoms
// per metal, is octahedral) and the molecular tetrahalides of 3d M(IV)
// (TiCl4, TiBr4, VCl4; the fluorides are polymers) (Greenwood and
// Earnshaw, Chemistry of the Elements, 2nd ed., chs. 21-25, from memory).
bool FourAnionTetrahedra(const OxidationAssignment& assignment,
                         const AssignedState& ion) {
  if (!assignment.units.empty()) return false;
  Rational metals(0), oxide(0), halide(0), other(0);
  for (const AssignedState& s : assignment.states) {
    const int z = s.element->atomic_number;
    if (s.state < 0) {
      if (z == 8) {
        oxide = oxide + s.count;
      } else if (IsHeavyHalogen(z)) {
        halide = halide + s.count;
      } else {
        return false;
      }
    } else if (IsTransitionMetal(*s.element)) {
      metals = metals + s.count;
    } else {
      other = other + s.count;
    }
  }
  if (ion.state >= 5) {
    return halide.IsZero() && oxide == metals * Rational(4);
  }
  return oxide.IsZero() && other.IsZero() && halide == metals * Rational(4);
}

IonEnvironment FindEnvironment(const Formula& formula,
                               const OxidationAssignment& assignment,
                               const AssignedState& ion,
                               const Geometry* geometry_set,
                               const SpinStatePreference* spin_set,
                               ComplexSide side) {
  return FindEnvironment(formula, assignment, ion, geometry_set, spin_set, side,
                         nullptr);
}

IonEnvironment FindEnvironment(const Formula& formula,
                               const OxidationAssignment& assignment,
                               const AssignedState& ion,
                               const Geometry* geometry_set,
                               const SpinStatePreference* spin_set,
                               ComplexSide side, EnvironmentCache* cache) {
  IonEnvironment env;
  const Element& e = *ion.element;
  const int d = CoordinationDCount(e, ion.state);
  const int n = e.period - 1;  // 3 for 3d.

  // Ligands: those outside every complex from the cache, when there is
  // one; a complex's gathered here.
  const int complex = cache != nullptr && !WritesComplex(formula, cache)
                          ? -1
                          : ComplexOf(formula, &e, side);
  EnvironmentCache local;
  EnvironmentCache& gathered = complex < 0 && cache != nullptr ? *cache : local;
  if (!gathered.ligands_ready) {
    GatherLigands(formula, assignment, complex, &gathered);
  }
  const Sites& sites = gathered.sites;
  const bool molecular = gathered.molecular;
  const double unlisted = gathered.unlisted;
  double metal = 0;  // This element's atoms where the ligands are counted.
  if (complex >= 0) {
    metal = AtomsInside(formula, &e, complex).ToDouble();
  } else {
    for (const AssignedState& s : assignment.states) {
      if (s.element == &e && s.unit < 0) metal += s.count.ToDouble();
    }
  }
  double total = 0, weighted = 0, most = 0;
  double strong = 0;  // Sites held by strong-field ligands.
  for (const Site& s : sites) {
    total += s.sites;
    if (s.ligand->f >= kStrongFieldF) strong += s.sites;
    weighted += s.sites * s.ligand->f;
    if (s.sites > most) {
      most = s.sites;
      env.ligand = s.ligand;
    }
  }
  if (total > 0) env.f = weighted / total;
  total += unlisted;
  // An oxo-anion written in a complex one site short of six chelates,
  // taking two sites: [Co(NH3)4(CO3)]+ is octahedral, low-spin and
  // diamagnetic Co(III) (Greenwood and Earnshaw, Chemistry of the
  // Elements, 2nd ed., ch. 26, from memory).
  if (complex >= 0) {
    const double in_complex = AtomsInside(formula, &e, complex).ToDouble();
    if (in_complex > 0 && std::abs(total / in_complex - 5) < 0.01) {
      for (const AssignedUnit& u : assignment.units) {
        const absl::string_view name = u.unit->name;
        if ((Inside(formula, u.enclosing, complex) || u.group == complex) &&
            (name == "carbonate" || name == "nitrate" || name == "acetate" ||
             name == "sulfate")) {
          total += in_complex;
          break;
        }
      }
    }
  }
  bool pi_acceptors_only = !sites.empty();
  bool pi_acceptor = false;
  bool cyanide = false;   // An anionic pi acceptor (IsAnionicPiAcceptor).
  bool nitrosyl = false;  // NO+, the one cationic pi acceptor.
  double oxo = 0;         // Sites of monatomic oxide.
  double chelate = 0;     // Sites of unit ligands with two or more.
  double planar = 0;      // Sites of planar tetradentate ligands.
  bool unit_ligand = false;
  for (const Site& s : sites) {
    const Ligand& l = *s.ligand;
    if (l.unit != nullptr) {
      unit_ligand = true;
      const bool acceptor = IsPiAcceptor(l);
      pi_acceptor |= acceptor;
      pi_acceptors_only &= acceptor;
      nitrosyl |= acceptor && l.unit->charge > 0;
      cyanide |= !acceptor && IsAnionicPiAcceptor(l);
      if (l.denticity >= 2) chelate += s.sites;
      if (l.planar) planar += s.sites;
    } else {
      pi_acceptors_only = false;
      if (l.anion->atomic_number == 8) oxo += s.sites;
    }
  }
  // A metal-oxo ("yl") group written with chelating ligands only, and no
  // other anion, is a molecule: VO(acac)2, TiO(acac)2, MoO2(acac)2
  // (Greenwood and Earnshaw, Chemistry of the Elements, 2nd ed., chs. 21
  // and 22, from memory).
  const bool oxo_chelate = chelate > 0 && oxo > 0 && complex < 0 &&
                           std::abs(oxo + chelate - total) < 0.01 &&
                           oxo <= 2 * metal + 0.01;
  // One planar tetradentate ligand per metal atom (a porphyrinate,
  // phthalocyaninate, salen or cyclam) holds its four equatorial sites:
  // Fe(TPP)Cl and Mn(salen)Cl are five-coordinate molecules, CuPc and
  // Co(salen) square planar (Greenwood and Earnshaw, Chemistry of the
  // Elements, 2nd ed., chs. 25-29; Scheidt and Reed, Chem. Rev. 81 (1981)
  // 543; from memory).
  const bool macrocycle =
      metal > 0 && std::abs(planar - 4 * metal) < 0.01 && total > 0;
  // Donor sites per metal atom, where the formula shows them: in a
  // complex, with molecular ligands only (Ni(CO)4), beside a pi-acceptor
  // ligand, which makes a molecular complex of the halides written with
  // it (RhCl(PPh3)3, Mn(CO)5Br, NiCl2(PEt3)2), in an oxo chelate, or
  // around a planar macrocycle (Fe(TPP)Cl).
  const double cn = (complex >= 0 ||
                     ((molecular || pi_acceptor || oxo_chelate || macrocycle) &&
                      total > 0)) &&
                            metal > 0
                        ? total / metal
                        : 0;

  // The Pd(I) and Pt(I) layers of the delafossites PdCoO2, PdCrO2 and
  // PtCoO2 are metallic, their d electrons shared in Pd-Pd bonds (Shannon,
  // Rogers and Prewitt, Inorg. Chem. 10 (1971) 713, from memory): no local
  // moment.
  if (geometry_set == nullptr && spin_set == nullptr && complex < 0 &&
      ion.state == 1 && (e.atomic_number == 46 || e.atomic_number == 78) &&
      assignment.units.empty()) {
    Rational oxygen(0), self(0), other(0);
    int others = 0;
    for (const AssignedState& s : assignment.states) {
      if (s.element->atomic_number == 8) {
        oxygen = oxygen + s.count;
      } else if (s.element == &e) {
        self = self + s.count;
      } else {
        other = other + s.count;
        ++others;
      }
    }
    if (others == 1 && other == self && oxygen == self * Rational(2)) {
      env.geometry = Geometry::kFree;
      env.basis = SpinBasis::kMetalMetalBond;
      env.metal_metal_bonded = true;
      return env;
    }
  }

  // The layered pnictides: tetrahedral; the Cr, Fe, Co and Ni layers are
  // metallic, their d electrons itinerant (BaFe2As2 orders with about 0.9
  // uB per Fe, LaFeAsO with about 0.4; BaNi2As2 and LaNiAsO are Pauli
  // paramagnets; Johrendt, J. Mater. Chem. 21 (2011) 13726, from memory):
  // no local moment. Mn(II) keeps its local high-spin moment (BaMn2As2
  // orders with 3.9 uB; Singh et al., Phys. Rev. B 79 (2009) 094519, from
  // memory).
  if (geometry_set == nullptr && spin_set == nullptr && complex < 0 &&
      InPnictideTetrahedra(assignment, ion,
                           cache != nullptr ? &cache->pnictide : nullptr)) {
    env.geometry = Geometry::kTetrahedral;
    if (e.atomic_number != 25) {
      env.spin_state = SpinStatePreference::kHigh;
      env.basis = SpinBasis::kItinerant;
      env.metal_metal_bonded = true;
      return env;
    }
  }

  // The metallic CdI2-type tellurides of groups 9 and 10: itinerant.
  if (geometry_set == nullptr && spin_set == nullptr && complex < 0 &&
      InMetallicTellurideLayers(assignment, ion)) {
    env.geometry = Geometry::kOctahedral;
    env.spin_state = SpinStatePreference::kLow;
    env.basis = SpinBasis::kItinerant;
    env.metal_metal_bonded = true;
    return env;
  }

  // Low-valent 4d and 5d clusters and metal pairs, and the pnictide
  // chains of loellingite and arsenopyrite: no local moment. A written
  // complex that holds more than one atom of the metal is a cluster anion
  // ([Mo6Cl14]2-, [Re3Cl12]3-), not a mononuclear complex.
  if (geometry_set == nullptr && spin_set == nullptr &&
      (complex < 0 || Rational(1) < AtomsInside(formula, &e, complex)) &&
      (PairsInMetalClusters(assignment, ion, d) ||
       (complex < 0 && PairsAlongPnictideChains(assignment, ion, d)))) {
    env.geometry = Geometry::kOctahedral;
    env.spin_state = SpinStatePreference::kLow;
    env.basis = SpinBasis::kMetalMetalBond;
    env.metal_metal_bonded = true;
    return env;
  }

  // Atoms of every d-block metal where the ligands are counted: in the
  // complex, or the formula's free ones; counted only for the two rules
  // below that ask (pi acceptors, or a d4 or d7 ion that may pair with
  // its twin).
  double metals = 0;
  bool other_metal = false;  // A d-block metal other than this one.
  if (geometry_set == nullptr && spin_set == nullptr &&
      (pi_acceptor || cyanide || d == 4 || d == 7)) {
    for (const AssignedState& s : assignment.states) {
      if (s.unit >= 0 || s.element->block != Block::kD) continue;
      other_metal |= s.element != &e;
      metals += complex >= 0
                    ? AtomsInside(formula, s.element, complex).ToDouble() /
                          std::max(1.0, CountStates(assignment, s.element))
                    : s.count.ToDouble();
    }
  }

  // Polynuclear carbonyls and organometallic dimers: the 18-electron
  // rule's metal-metal bonds. Valence electrons per metal atom: its d
  // electrons and two from each donor site (Greenwood and Earnshaw,
  // Chemistry of the Elements, 2nd ed., ch. 8, metal carbonyls, from
  // memory). Mn2(CO)10, Co2(CO)8 and Fe2(CO)9 at 17; [CpFe(CO)2]2,
  // [CpMo(CO)3]2 and [CpNi(CO)]2, 17 with a Cp- and M(I), likewise.
  // A 4d or 5d d8 metal keeps 16 electrons, square planar, with no
  // metal-metal bond: the chloride-bridged [Rh(CO)2Cl]2 (Greenwood and
  // Earnshaw, Chemistry of the Elements, 2nd ed., ch. 26, from memory).
  // The dinuclear cyanometallates bond likewise, two metal atoms written
  // in one complex ([Fe(CN)6]2 is two complexes): [Co2(CN)10]6-, two
  // 17-electron [Co(CN)5]3- joined as Mn2(CO)10 is, and [Ni2(CN)6]4-,
  // Ni(I) d9 with three cyanides each and a Ni-Ni bond, each Ni square
  // planar, both diamagnetic (same source, chs. 26 and 27, from memory).
  const bool cyanide_dimer =
      cyanide && !pi_acceptor && complex >= 0 &&
      metals > 1.5 * formula.groups[complex].multiplier.ToDouble();
  if (geometry_set == nullptr && spin_set == nullptr && cn > 0 && d >= 0 &&
      !(d == 8 && n >= 4) && (pi_acceptor || cyanide_dimer) && metals > 1.5 &&
      d + 2 * total / metals < 17.99) {
    env.geometry = cyanide_dimer && d == 9 && std::abs(cn - 3) < 0.01
                       ? Geometry::kSquarePlanar
                       : Geometry::kOctahedral;
    env.spin_state = SpinStatePreference::kLow;
    env.basis = SpinBasis::kMetalMetalBond;
    env.metal_metal_bonded = true;
    return env;
  }

  // Dinuclear multiply bonded cores: two d4 ions of group 6 or 4d/5d
  // (Cr(II), Mo(II), W(II), Re(III)) or two Rh(II) d7 ions, bridged by
  // four carboxylates or holding four halides each in a complex, pair
  // their d electrons in the metal-metal bond (quadruple for d4: Cr2(OAc)4
  // (H2O)2, Mo2(OAc)4, [Re2Cl8]2-; single for Rh2(OAc)4), diamagnetic
  // (Cotton, Murillo and Walton, Multiple Bonds between Metal Atoms, 3rd
  // ed., 2005, from memory). Copper(II) acetate's Cu d9 pair couples only
  // weakly and keeps its moment at room temperature.
  if (geometry_set == nullptr && spin_set == nullptr && !other_metal &&
      std::abs(metals - 2) < 0.01 &&
      ((d == 4 && (n >= 4 || e.group == 6)) ||
       (d == 7 && e.atomic_number == 45))) {
    double carboxylates = 0, halides = 0;
    for (const AssignedUnit& u : assignment.units) {
      if (u.unit->name == "acetate" || u.unit->name == "formate") {
        carboxylates += u.count.ToDouble();
      }
    }
    for (const Site& s : sites) {
      if (s.ligand->anion != nullptr && s.ligand->anion->group == 17) {
        halides += s.sites;
      }
    }
    if (std::abs(carboxylates - 4) < 0.01 ||
        (complex >= 0 && std::abs(halides - 8) < 0.01)) {
      env.geometry = Geometry::kOctahedral;
      env.spin_state = SpinStatePreference::kLow;
      env.basis = SpinBasis::kMetalMetalBond;
      env.metal_metal_bonded = true;
      return env;
    }
  }

  // Geometry.
  if (geometry_set != nullptr) {
    env.geometry = *geometry_set;
  } else if (env.geometry == Geometry::kTetrahedral) {
    // Set above (the layered pnictides).
  } else if (std::abs(cn - 5) < 0.01 && std::abs(metal - 1) < 0.01 &&
             (complex >= 0 || pi_acceptor || oxo_chelate || macrocycle)) {
    // Five sites on one metal, in a written complex ([CuCl5]3-), from
    // pi acceptors (Fe(CO)5) or in an oxo chelate (VO(acac)2); a salt
    // hydrate's ligand count (Mn(CH3COO)3·2H2O) does not show its
    // coordination. Square pyramidal with an apical oxo ([VO(acac)2],
    // [ReOCl4]-, [CrOCl4]-), for d4 to d7 (the Jahn-Teller [MnCl5]3-,
    // low-spin [Co(CN)5]3-, the 16-electron RuCl2(PPh3)3) and for d8
    // without a neutral pi acceptor ([Ni(CN)5]3-); trigonal bipyramidal
    // otherwise (Fe(CO)5, HCo(CO)4, [CuCl5]3-) (Greenwood and Earnshaw,
    // Chemistry of the Elements, 2nd ed., chs. 22-28, from memory).
    bool neutral_pi_acceptor = false;
    for (const Site& s : sites) {
      neutral_pi_acceptor |= s.ligand->unit != nullptr &&
                             s.ligand->unit->charge == 0 &&
                             IsPiAcceptor(*s.ligand);
    }
    // A planar macrocycle with one axial ligand is a square pyramid
    // whatever the d count (Fe(TPP)Cl, Cu(TPP)(py)).
    const bool pyramid = oxo > 0 || macrocycle || (d >= 4 && d <= 7) ||
                         (d == 8 && !neutral_pi_acceptor);
    env.geometry =
        pyramid ? Geometry::kSquarePyramidal : Geometry::kTrigonalBipyramidal;
  } else if (std::abs(cn - 8) < 0.01 && complex >= 0) {
    // Eight donor sites: the octacyanometallates [Mo(CN)8]4- and
    // [W(CN)8]4- (square antiprism or dodecahedron, one low orbital either
    // way).
    env.geometry = Geometry::kSquareAntiprismatic;
  } else if (complex >= 0 && std::abs(cn - 7) < 0.01) {
    // Seven donor sites in a written complex: pentagonal bipyramidal, as
    // [ZrF7]3- and [UO2F5]3- (the heptafluoro complexes of Nb and Ta are
    // capped trigonal prisms, close in energy; Greenwood and Earnshaw,
    // Chemistry of the Elements, 2nd ed., chs. 21 and 22, from memory).
    env.geometry = Geometry::kPentagonalBipyramidal;
  } else if (complex >= 0 && std::abs(cn - 9) < 0.01) {
    // Nine donor sites: tricapped trigonal prismatic, [ReH9]2- and
    // [TcH9]2- (same source, ch. 24, from memory).
    env.geometry = Geometry::kTricappedTrigonalPrismatic;
  } else if (std::abs(cn - 2) < 0.01 && d == 10) {
    // Two donor sites on a d10 ion: linear, as in [Ag(NH3)2]+,
    // [Au(CN)2]- and Au(PPh3)Cl (Greenwood and Earnshaw, Chemistry of the
    // Elements, 2nd ed., ch. 28, from memory).
    env.geometry = Geometry::kLinear;
  } else if (d == 10 && std::abs(cn - 3) < 0.01) {
    // Three on a d10 ion: trigonal planar, as Pt(PPh3)3, [Cu(CN)3]2- and
    // [HgI3]- (same source, chs. 27-29, from memory).
    env.geometry = Geometry::kTrigonalPlanar;
  } else if (std::abs(cn - 4) < 0.01 && macrocycle) {
    // A planar macrocycle alone: square planar for every d count (CuPc,
    // Co(TPP), Fe(TPP), Ni(salen), [Ni(cyclam)]2+; same sources).
    env.geometry = Geometry::kSquarePlanar;
  } else if (std::abs(cn - 4) < 0.01 && n == 3 && ion.state == 2 && d >= 5 &&
             d <= 8 && OxygenChelatesOnly(sites)) {
    // Bis(O,O-chelates) of 3d M(II), Mn to Ni, with no other ligand
    // share their oxygen atoms in oligomers and are octahedral: the trimer
    // [Ni(acac)2]3 and the tetramer [Co(acac)2]4, high spin (Greenwood and
    // Earnshaw, Chemistry of the Elements, 2nd ed., chs. 26 and 27, from
    // memory). Cu(acac)2 (d9) is a square-planar monomer.
    env.geometry = Geometry::kOctahedral;
  } else if (std::abs(cn - 4) < 0.01) {
    // A 3d d8 ion is square planar when strong-field ligands hold at least
    // half its sites: [Ni(CN)4]2-, and NiCl2(PEt3)2 and NiCl2(PMe3)2 beside
    // tetrahedral NiCl2(PPh3)2 and [NiCl4]2- (Greenwood and Earnshaw,
    // Chemistry of the Elements, 2nd ed., ch. 27, from memory).
    // A 3d d7 ion, Co(II), is square planar and low spin among
    // strong-field chelates: the cobaloximes Co(dmgH)2, Co(salen) and the
    // cobalt(II) porphyrins and phthalocyanines, one unpaired electron
    // (Figgis and Lewis, magnetochemistry tables; Greenwood and Earnshaw,
    // Chemistry of the Elements, 2nd ed., ch. 26; from memory), while
    // [CoCl4]2- and CoCl2(PPh3)2 are tetrahedral with three.
    const bool planar_d8 =
        n >= 4 || env.f >= kStrongFieldF || 2 * strong >= total - 0.01;
    const bool planar_d7 = n == 3 && env.f >= kStrongFieldF;
    env.geometry = (d == 8 && planar_d8) || (d == 7 && planar_d7) || d == 9
                       ? Geometry::kSquarePlanar
                       : Geometry::kTetrahedral;
  } else if ((cn == 0 ? complex < 0 : cn < 3.99) && d == 8 &&
             (n >= 4 || e.atomic_number == 29) &&
             !(env.ligand != nullptr && env.ligand->anion != nullptr &&
               env.ligand->anion->atomic_number == 9)) {
    // 4d and 5d d8 ions are square planar and diamagnetic whatever the
    // formula shows, fewer than four donor sites per metal included (the
    // halide bridges of [PdCl2(C2H4)]2): PdCl2, PdO, PtS, AuCl3 (Au2Cl6),
    // but PdF2 is
    // octahedral and paramagnetic (Greenwood and Earnshaw, Chemistry of
    // the Elements, 2nd ed., chs. 27 and 28, from memory). So is Cu(III)
    // in oxides (KCuO2, NaCuO2: CuO4 chains, diamagnetic), while K3CuF6 is
    // high-spin octahedral and paramagnetic (same source, ch. 28).
    env.geometry = Geometry::kSquarePlanar;
  } else if (ion.state >= 4 && d >= 0 && d <= 2 && complex < 0 &&
             (ion.state >= 5 || n == 3) && !(d == 2 && n == 5) &&
             std::abs(total - 4 * metal) < 0.01 &&
             FourAnionTetrahedra(assignment, ion)) {
    env.geometry = Geometry::kTetrahedral;
  } else if (complex < 0 && (e.group == 5 || e.group == 6) &&
             (d == 1 || d == 2) && assignment.units.empty()) {
    // MX2 layers of group 5 and 6 chalcogenides (MoS2, NbSe2).
    Rational chalcogen(0), metals(0);
    bool other = false;
    for (const AssignedState& s : assignment.states) {
      const int z = s.element->atomic_number;
      if (IsHeavyChalcogen(z)) {
        chalcogen = chalcogen + s.count;
      } else if (s.element == &e) {
        metals = metals + s.count;
      } else {
        other = true;
      }
    }
    const bool layer = !other && chalcogen == metals * Rational(2);
    // The 3d layers are octahedral, CdI2 (1T) type: VS2, VSe2 and the
    // Cr(IV) of CrS2, CrSe2 and CrTe2, d2 with two unpaired electrons
    // (CrTe2 is a ferromagnet; Hulliger, Structural Chemistry of
    // Layer-Type Phases (1976), from memory). The 4d and 5d ones are
    // trigonal prismatic (2H-MoS2, NbSe2).
    env.geometry =
        layer && n >= 4 ? Geometry::kTrigonalPrismatic : Geometry::kOctahedral;
    if (layer && d == 1 && e.group == 5 && geometry_set == nullptr &&
        spin_set == nullptr) {
      // The d1 layers of group 5 (NbS2, NbSe2, TaS2, TaSe2, VSe2) are
      // metals: their half-filled d band gives Pauli paramagnetism, not a
      // local moment (Wilson and Yoffe, Adv. Phys. 18 (1969) 193, from
      // memory).
      env.spin_state = SpinStatePreference::kLow;
      env.basis = SpinBasis::kItinerant;
      env.metal_metal_bonded = true;
      return env;
    }
  } else {
    env.geometry = Geometry::kOctahedral;
  }

  // An 18-electron complex of pi acceptors (two electrons per donor
  // site) fills every nonbonding d orbital, where the idealised geometry
  // would leave some unpaired: CpV(CO)4, seven sites, is diamagnetic
  // (Elschenbroich, Organometallics, 3rd ed., from memory). So does a
  // 16-electron complex of a 4d or 5d metal: the five-coordinate d6
  // RuCl2(PPh3)3 and RuHCl(PPh3)3 are square pyramidal and diamagnetic,
  // not trigonal bipyramidal with two unpaired electrons (Greenwood and
  // Earnshaw, Chemistry of the Elements, 2nd ed., ch. 25, from memory).
  // A six-coordinate nitrosyl of 20 electrons counting NO+ ({MNO}8 of
  // Enemark and Feltham, Coord. Chem. Rev. 13 (1974) 339, from memory)
  // bends its NO: two electrons go to a lone pair on N, as NO- beside a
  // low-spin d6 metal, and the complex is diamagnetic: the black
  // [Co(NH3)5(NO)]2+ (Greenwood and Earnshaw, Chemistry of the Elements,
  // 2nd ed., ch. 26, from memory).
  const double electrons = d + 2 * cn;
  const bool bent_nitrosyl = nitrosyl &&
                             env.geometry == Geometry::kOctahedral &&
                             std::abs(electrons - 20) < 0.01;
  if (geometry_set == nullptr && spin_set == nullptr && pi_acceptor && d >= 0 &&
      std::abs(metal - 1) < 0.01 &&
      (std::abs(electrons - 18) < 0.01 || bent_nitrosyl ||
       (n >= 4 && std::abs(electrons - 16) < 0.01)) &&
      SplitD(d, env.geometry, SpinState::kLow).unpaired > 0) {
    env.spin_state = SpinStatePreference::kLow;
    env.basis = SpinBasis::kElectronCount;
    env.metal_metal_bonded = true;
    return env;
  }

  // A d2 ion of the 4d or 5d series with oxo ligands in an octahedral
  // complex: the short M=O bonds raise dxz and dyz well above dxy, and the
  // two d electrons pair there. The Re(V) oxo complexes [ReOCl5]2-,
  // ReOCl3(PPh3)2 and trans-[ReO2(py)4]+, the osmates(VI)
  // trans-[OsO2(OH)4]2- (K2OsO4 as records write it: osmium(VI) forms no
  // tetrahedral OsO4 2-, unlike ruthenate and ferrate) and
  // trans-[MoO2(CN)4]4- are diamagnetic (Greenwood and Earnshaw, Chemistry
  // of the Elements, 2nd ed., chs. 23-25; Winkler and Gray, Inorg. Chem.
  // 24 (1985) 346, trans-dioxo d2 ions; from memory). Written in a
  // complex, beside a unit ligand (a molecule), or as the osmate's four
  // oxygen atoms; not in an oxide (the d2 Os(VI) of the double perovskite
  // Ba2CaOsO6 keeps its moment).
  if (geometry_set == nullptr && spin_set == nullptr && d == 2 && n >= 4 &&
      oxo > 0 && env.geometry == Geometry::kOctahedral &&
      (complex >= 0 || (unit_ligand && oxo < total - 0.01) ||
       (n == 5 && ion.state >= 6 && std::abs(total - 4 * metal) < 0.01))) {
    env.spin_state = SpinStatePreference::kLow;
    env.basis = SpinBasis::kMetalOxo;
    env.metal_metal_bonded = true;
    return env;
  }

  // Spin state.
  if (spin_set != nullptr || geometry_set != nullptr) {
    env.spin_state =
        spin_set != nullptr ? *spin_set : SpinStatePreference::kAuto;
    env.basis = SpinBasis::kRecord;
    return env;
  }
  auto set = [&env](SpinState s, SpinBasis basis) {
    env.spin_state = s == SpinState::kLow ? SpinStatePreference::kLow
                     : s == SpinState::kHigh
                         ? SpinStatePreference::kHigh
                         : SpinStatePreference::kIntermediate;
    env.basis = basis;
  };
  // The ion's octahedral crossover f (spin_crossover.tsv, or the default
  // by charge), the soft anions' where they hold most sites.
  auto crossover_f = [&env, &e, &ion]() {
    const SpinCrossover* c = FindSpinCrossover(e, ion.state);
    const bool chalcogenide = env.ligand != nullptr &&
                              env.ligand->anion != nullptr &&
                              (env.ligand->anion->atomic_number == 16 ||
                               env.ligand->anion->atomic_number == 34 ||
                               env.ligand->anion->atomic_number == 52);
    return c == nullptr   ? DefaultCrossover(ion.state)
           : chalcogenide ? c->f_crossover_chalcogenide
                          : c->f_crossover;
  };
  switch (env.geometry) {
    case Geometry::kTetrahedral:
      set(SpinState::kHigh,
          d >= 3 && d <= 6 ? SpinBasis::kTetrahedral : SpinBasis::kNoChoice);
      return env;
    case Geometry::kSquarePlanar:
      if (macrocycle && n == 3 && d >= 4 && d <= 6) {
        // A planar macrocycle's 3d d4-d6 ion keeps dx2-y2 empty; the
        // other four orbitals, close together, fill high spin above the
        // ion's crossover f: Fe(TPP) and FePc S = 1, MnPc S = 3/2. Below
        // it, high spin: the Mn(II) porphyrins, S = 5/2 (Scheidt and
        // Reed, Chem. Rev. 81 (1981) 543; Barraclough, Martin, Mitra and
        // Sherwood, J. Chem. Phys. 53 (1970) 1638; from memory). A d4 ion
        // fills the four lower orbitals singly either way and is called
        // high spin, as Cr(TPP), S = 2 (Scheidt and Reed, from memory).
        const double crossover = crossover_f();
        const bool choice = d >= 5;
        set(choice && env.f > crossover ? SpinState::kIntermediate
                                        : SpinState::kHigh,
            SpinBasis::kLigandField);
        env.near_crossover =
            choice && std::abs(env.f - crossover) < kNearCrossover;
        return env;
      }
      set(SpinState::kLow,
          d == 8 ? (n >= 4 ? SpinBasis::kHeavyMetal : SpinBasis::kLigandField)
                 : SpinBasis::kNoChoice);
      return env;
    case Geometry::kTrigonalPrismatic:
    case Geometry::kLinear:
      set(SpinState::kLow, SpinBasis::kNoChoice);
      return env;
    case Geometry::kTrigonalBipyramidal:
    case Geometry::kSquareAntiprismatic:
    case Geometry::kSquarePyramidal:
    case Geometry::kTrigonalPlanar:
    case Geometry::kPentagonalBipyramidal:
    case Geometry::kTricappedTrigonalPrismatic:
      // Low spin as square planar d8 is: 4d/5d, or strong-field ligands.
      if (!HasSpinChoice(d, env.geometry)) {
        set(SpinState::kLow, SpinBasis::kNoChoice);
      } else if (n >= 4) {
        set(SpinState::kLow, SpinBasis::kHeavyMetal);
      } else if (macrocycle && env.geometry == Geometry::kSquarePyramidal) {
        // A planar macrocycle with one axial ligand: for d4-d6 the ion's
        // own crossover, as in an octahedron: Fe(TPP)Cl and Mn(TPP)Cl are
        // high spin, Co(TPP)Cl low-spin Co(III). A d7 ion stays low spin
        // as in the square plane, dx2-y2 empty, its one electron above
        // the paired ones in dz2: Co(TPP)(py) and Co(salen)(py) are
        // low-spin Co(II), S = 1/2 (Scheidt and Reed, Chem. Rev. 81
        // (1981) 543, from memory).
        set(d == 7 || env.f > crossover_f() ? SpinState::kLow
                                            : SpinState::kHigh,
            SpinBasis::kLigandField);
      } else {
        set(env.f >= kStrongFieldF ? SpinState::kLow : SpinState::kHigh,
            SpinBasis::kLigandField);
      }
      return env;
    case Geometry::kFree:
      return env;
    case Geometry::kOctahedral:
      break;
  }
  if (d < 4 || d > 7) {
    set(SpinState::kHigh, SpinBasis::kNoChoice);
    return env;
  }
  if (n >= 4) {
    set(SpinState::kLow, SpinBasis::kHeavyMetal);
    return env;
  }
  if (total <= 0) {
    set(SpinState::kHigh, SpinBasis::kDefaultHigh);
    return env;
  }
  bool oxygen_deficient;
  if (cache == nullptr) {
    oxygen_deficient = OxygenDeficientPerovskite(assignment);
  } else {
    if (cache->oxygen_deficient_perovskite < 0) {
      cache->oxygen_deficient_perovskite =
          OxygenDeficientPerovskite(assignment) ? 1 : 0;
    }
    oxygen_deficient = cache->oxygen_deficient_perovskite != 0;
  }
  if (oxygen_deficient) {
    set(SpinState::kHigh, SpinBasis::kOxygenDeficientPerovskite);
    return env;
  }
  const double crossover = crossover_f();
  set(env.f > crossover ? SpinState::kLow : SpinState::kHigh,
      SpinBasis::kLigandField);
  env.near_crossover = std::abs(env.f - crossover) < kNearCrossover;
  return env;
}

}  // namespace shellwright
