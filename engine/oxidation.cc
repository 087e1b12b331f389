#include "engine/oxidation.h"

#include <algorithm>
#include <array>
#include <cstdlib>
#include <functional>
#include <limits>
#include <numeric>
#include <optional>
#include <tuple>

#include "absl/base/attributes.h"
#include "absl/container/inlined_vector.h"
#include "absl/strings/str_cat.h"
#include "engine/internal/charge_dp.h"
#include "engine/internal/state_options.h"
#include "engine/internal/weight.h"
#include "engine/units.h"

namespace shellwright {
namespace {

using internal::Candidate;
using internal::CandidateList;
using internal::Candidates;
using internal::ChargeItem;
using internal::kMaxScaledAtoms;
using internal::Pruning;
using internal::SearchLimits;
using internal::Solution;
using internal::SolveCharge;
using internal::StateOption;
using internal::Weight;
using internal::Widening;

// One element of the formula as the search sees it. Built once per call
// and shared by every stage.
// One layer of the search: a free element, or a unit read from a match
// (element null), whose options are the charges of the match's units.
//
// A plan holds no storage of its own (so that the plans of a reading are
// cleared and rebuilt cheaply): its options are a free element's table
// (StateOptions() and CommonStateOptions(), which outlive every plan), or
// options of its own kept in its buffer's PlanStore.
struct ElementPlan {
  const Element* element = nullptr;
  Rational count;        // Atoms (or units) per formula unit.
  int64_t scaled_count;  // count x scale, >= 1 (see AssignStates).
  // The class of the formula's anions, which sets the state preferences.
  internal::AnionClass anions = internal::AnionClass::kHard;
  bool oxide = false;  // The formula holds free oxygen.
  bool declared = false;
  // No free hydride: the element is hydrogen and the reading holds free
  // carbon or nitrogen.
  bool no_hydride = false;
  // Options of its own (PlanStore), with common ones listed apart.
  bool custom = false;
  const UnitMatch* match = nullptr;     // For a unit layer,
  absl::Span<const Unit* const> units;  // the unit of each option.
  // The options in search order, and those whose states are all common,
  // with their index in all (every option of a declared element or a
  // unit).
  absl::Span<const StateOption> all;
  absl::Span<const StateOption> common;
  // While MakePlans builds the plan: where its own options (declared
  // states, unit charges or a custom list), its own common options and
  // its units lie in the PlanStore; own_begin < 0 while it has none.
  int own_begin = -1, own_end = 0;
  int own_common_begin = 0, own_common_end = 0;
  int units_begin = 0, units_end = 0;

  absl::Span<const StateOption> options() const { return all; }
  absl::Span<const StateOption> common_options() const { return common; }
};

using Plans = absl::InlinedVector<ElementPlan, 8>;

// The options and units that the plans of one buffer hold of their own:
// the declared states, the unit charges of a unit layer, or a custom list
// (a d-block metal beside a pi-acceptor ligand (Ni(CO)4) with state 0
// added, a metal among chalcogenide anions only with the states above its
// chalcogenide maximum made uncommon, and the like). Inline room for the
// usual few, reused from reading to reading.
struct PlanStore {
  absl::InlinedVector<StateOption, 16> options;
  absl::InlinedVector<StateOption, 16> common_options;
  absl::InlinedVector<const Unit*, 8> units;

  void Clear() {
    options.clear();
    common_options.clear();
    units.clear();
  }
  // Points each plan's spans at what it holds here, once nothing more is
  // added (the vectors may have moved while they grew).
  void Resolve(Plans* plans) const {
    for (ElementPlan& p : *plans) {
      if (p.match != nullptr) {
        p.units = absl::MakeConstSpan(units).subspan(
            p.units_begin, p.units_end - p.units_begin);
      }
      if (p.own_begin < 0) continue;
      p.all = absl::MakeConstSpan(options).subspan(p.own_begin,
                                                   p.own_end - p.own_begin);
      p.common = p.custom ? absl::MakeConstSpan(common_options)
                                .subspan(p.own_common_begin,
                                         p.own_common_end - p.own_common_begin)
                          : p.all;
    }
  }
};
using ChargeItems = absl::InlinedVector<ChargeItem, 8>;

// The search's view of the plans: one layer per element.
ChargeItems ItemsOf(const Plans& plans) {
  // Appended, not made with room and assigned: no zeroing first.
  ChargeItems items;
  for (const ElementPlan& p : plans) {
    items.push_back(ChargeItem{p.scaled_count, p.options()});
  }
  return items;
}

// The leading options of `options` (an element's table, in search order:
// negative states first) with no positive state.
absl::Span<const StateOption> NonPositivePrefix(
    absl::Span<const StateOption> options) {
  size_t n = 0;
  while (n < options.size() && options[n].high <= 0) ++n;
  return options.first(n);
}

// Candidate electronegativity thresholds: elements above a threshold
// should be negative, those below positive. The first is the default
// (only the most electronegative element(s) above); the others are tried
// when it leaves an inconsistency (NH4Cl: N and Cl both negative). A
// complex cation of neutral ligands holds no anion at all: with
// `positive_net`, a reading with neutral units (water, ammonia) gets a
// last candidate that puts every element below it, so that [Cu(NH3)4]2+
// and [Fe(H2O)6]2+ read their ligands as units without an inconsistency.
using ThresholdList = absl::InlinedVector<double, 8>;

// Passes every electronegativity the thresholds lie between to `take`
// (with repeats, in plan order); true when the plans hold a neutral unit.
template <typename Take>
bool ThresholdValues(const Plans& plans, Take take) {
  bool neutral_unit = false;
  for (const ElementPlan& p : plans) {
    if (p.match != nullptr) {
      neutral_unit |= p.match->units.front()->charge == 0;
      // An anion counts as its most electronegative atom, a cation
      // (ammonium) as its least; a neutral unit not at all.
      int charge = 0;
      for (const Unit* u : p.match->units) {
        if (u->charge != 0) charge = u->charge;
      }
      double most = 0, least = 10;
      for (const UnitAtom& a : p.match->units.front()->atoms) {
        const double en = a.element->pauling_electronegativity.value_or(0);
        most = std::max(most, en);
        least = std::min(least, en);
      }
      if (charge < 0 && most > 0) take(most);
      if (charge > 0 && least > 0) take(least);
      continue;
    }
    if (p.element->pauling_electronegativity.has_value()) {
      take(*p.element->pauling_electronegativity);
    }
    // Pb(II) at 1.87 is less electronegative than Te: PbTe needs a
    // threshold between them.
    for (const double en : internal::StateElectronegativities(*p.element)) {
      take(en);
    }
  }
  return neutral_unit;
}

ThresholdList Thresholds(const Plans& plans, bool positive_net) {
  ThresholdList values;
  const bool neutral_unit =
      ThresholdValues(plans, [&values](double v) { values.push_back(v); });
  std::sort(values.begin(), values.end(), std::greater<double>());
  values.erase(std::unique(values.begin(), values.end()), values.end());
  ThresholdList out;
  if (values.empty()) return {std::numeric_limits<double>::infinity()};
  if (values.size() == 1) {
    out.push_back(values[0] - 0.01);
  } else {
    for (size_t j = 0; j + 1 < values.size(); ++j) {
      out.push_back((values[j] + values[j + 1]) / 2);
    }
  }
  if (positive_net && neutral_unit) {
    out.push_back(std::numeric_limits<double>::infinity());
  }
  return out;
}

// Thresholds(plans, ...)[0], without sorting or listing the others: the
// search tries the rest only when the first leaves an inconsistency (or no
// balance), which few records do.
double FirstThreshold(const Plans& plans) {
  // The largest and second largest distinct values; `distinct` counts
  // distinct values up to 2 (a repeat of a dropped third may count again).
  double first = -std::numeric_limits<double>::infinity();
  double second = first;
  int distinct = 0;
  ThresholdValues(plans, [&](double v) {
    if (distinct > 0 && v == first) return;
    if (distinct > 1 && v == second) return;
    if (distinct == 0 || v > first) {
      second = first;
      first = v;
    } else if (distinct == 1 || v > second) {
      second = v;
    }
    ++distinct;
  });
  if (distinct == 0) return std::numeric_limits<double>::infinity();
  if (distinct == 1) return first - 0.01;
  return (first + second) / 2;
}

bool AboveThreshold(const Element& e, double threshold) {
  return e.pauling_electronegativity.has_value() &&
         *e.pauling_electronegativity > threshold;
}

// The weight of option `o` of element `e` with every atom in the upper
// state. A positive state is inconsistent when its electronegativity
// (that of the state, data/state_electronegativities.tsv) is above the
// threshold; a negative one when the element's is not.
Weight OptionWeight(const Element& e, const StateOption& o,
                    int64_t scaled_count, double threshold,
                    internal::AnionClass anions) {
  const bool inconsistent = o.high > 0
                                ? o.high_electronegativity > threshold
                                : o.low < 0 && !AboveThreshold(e, threshold);
  // A mixed option's naturalness depends on the split: this is the value
  // with every atom in the upper state, and Candidate::per_low_atom adds
  // the rest.
  return Weight::Of(o.uncommon, inconsistent ? 1 : 0,
                    scaled_count * (o.HighNatural(anions) + o.spread));
}

// Naturalness per unpaired electron of a radical unit, above the 2 of a
// state one rank down (state_options.h), so that nitroprusside holds NO+
// with Fe(II), not NO with Fe(III) (common practice, no source).
constexpr int64_t kRadicalStep = 3;

// Whether `formula` is an ordered double perovskite A2BB'O6 whose B' is a
// 4d or 5d metal of groups 4 to 11 (Sr2FeMoO6, Ba2YMoO6, La2CoIrO6): per 6
// oxygen, 2 A-site cations and 2 B-site metals of at least two elements,
// one such 4d/5d metal among them, nothing else. The A sites take large
// cations (Na, K, Ca, Sr, Ba, Pb, Bi, La to Lu); some of these sit on B
// sites too (Na in Ba2NaOsO6, Ca in Ba2CaOsO6, Ho in Ba2HoRuO6), so every
// subset of them present is tried as the A-site set.
bool IsOrderedDoublePerovskite(const Formula& formula) {
  Rational oxygen(0);
  for (const ElementAmount& a : formula.amounts) {
    if (a.element->atomic_number == 8) oxygen = a.count;
  }
  if (oxygen.IsZero() || formula.amounts.size() < 4 ||
      formula.amounts.size() > 8) {
    return false;
  }
  const auto a_site = [](const Element& e) {
    const int z = e.atomic_number;
    return z == 11 || z == 19 || z == 20 || z == 38 || z == 56 || z == 82 ||
           z == 83 || (z >= 57 && z <= 71);
  };
  const auto heavy_partner = [](const Element& e) {
    return e.block == Block::kD && e.period >= 5 && e.group >= 4 &&
           e.group <= 11;
  };
  // Bit k: the k-th metal of the formula could sit on an A site.
  uint32_t candidates = 0;
  bool any_heavy = false;
  for (size_t k = 0; k < formula.amounts.size(); ++k) {
    const Element& e = *formula.amounts[k].element;
    if (e.atomic_number == 8) continue;
    if (!IsMetal(e)) return false;
    if (a_site(e)) candidates |= 1u << k;
    any_heavy |= heavy_partner(e);
  }
  // Every A-site set below needs a heavy partner on the B sites: without
  // one in the formula, none qualifies (the usual perovskite, La1-xSrxMnO3).
  if (!any_heavy) return false;
  for (uint32_t a_set = candidates; a_set != 0;
       a_set = (a_set - 1) & candidates) {
    Rational a_sum(0), b_sum(0);
    int b_elements = 0, heavy = 0;
    for (size_t k = 0; k < formula.amounts.size(); ++k) {
      const ElementAmount& a = formula.amounts[k];
      if (a.element->atomic_number == 8) continue;
      if (a_set & (1u << k)) {
        a_sum = a_sum + a.count;
      } else {
        b_sum = b_sum + a.count;
        ++b_elements;
        if (heavy_partner(*a.element)) ++heavy;
      }
    }
    // A : B : O = 2 : 2 : 6.
    if (a_sum * Rational(3) == oxygen && b_sum * Rational(3) == oxygen &&
        b_elements >= 2 && heavy >= 1) {
      return true;
    }
  }
  return false;
}

// Whether `formula` is a delafossite ABO2 whose A is Cu, Ag, Pd or Pt
// (CuFeO2, CuCrO2, AgCrO2, PdCoO2): one A and one other metal per two
// oxygen, nothing else. A is monovalent there, linear between two O
// (Shannon, Rogers and Prewitt, Inorg. Chem. 10 (1971) 713, from memory).
bool IsDelafossite(const Formula& formula) {
  if (formula.amounts.size() != 3) return false;
  Rational oxygen(0), a(0), b(0);
  for (const ElementAmount& x : formula.amounts) {
    const int z = x.element->atomic_number;
    if (z == 8) {
      oxygen = x.count;
    } else if (z == 29 || z == 47 || z == 46 || z == 78) {
      if (!a.IsZero()) return false;
      a = x.count;
    } else if (IsMetal(*x.element)) {
      b = x.count;
    } else {
      return false;
    }
  }
  return !a.IsZero() && a == b && oxygen == a * Rational(2);
}

// The structure class of `formula` that sets its B sites' state
// preferences: kDoublePerovskite, kDelafossite, or kHard for neither. It
// belongs to the formula, so AssignStates finds it once for every reading
// and search pass.
internal::AnionClass StructureClassOf(const Formula& formula) {
  if (IsOrderedDoublePerovskite(formula)) {
    return internal::AnionClass::kDoublePerovskite;
  }
  if (IsDelafossite(formula)) return internal::AnionClass::kDelafossite;
  return internal::AnionClass::kHard;
}

// A reading of the formula: the unit matches read as units.
using Reading = absl::InlinedVector<const UnitMatch*, 4>;

// Metal-rich halides and chalcogenides of the cluster formers, at most
// three anions per metal atom and no other non-metal, hold metal clusters
// whose +2 and +3 states are the usual ones: [Mo6Cl8]4+ in MoCl2,
// [Nb6Cl12]2+ in Nb6Cl14, Ta6Cl15, the Re3Cl9 triangles of ReCl3, the
// Chevrel phases PbMo6S8 and SnMo6S8 (Pb(II), Sn(II)) and LaMo6Se8
// (Greenwood and Earnshaw, Chemistry of the Elements, 2nd ed., chs. 22 and
// 23; Chevrel, Sergent and Prigent, J. Solid State Chem. 3 (1971) 515;
// from memory). Kept out of line: few records hold a cluster former.
ABSL_ATTRIBUTE_NOINLINE bool HoldsMetalClusters(const Plans& plans) {
  Rational metal(0), anion(0);
  for (const ElementPlan& p : plans) {
    const Element& e = *p.element;
    const int z = e.atomic_number;
    if (IsClusterFormer(e)) {
      metal = metal + p.count;
    } else if (IsHeavyChalcogen(z) || IsHalogen(z)) {
      anion = anion + p.count;
    } else if (!IsMetal(e)) {
      return false;
    }
  }
  return !(metal * Rational(3) < anion);
}

// Whether every unit of `reading` is a cation (ammonium, the
// tetraalkylammonium ions): counter-ions of a cluster anion, which leave
// the cluster's states alone ((NH4)2[Mo6Cl14] holds the same [Mo6Cl8]4+
// core as K2Mo6Cl14). True for no unit.
bool OnlyCationicUnits(const Reading& reading) {
  for (const UnitMatch* m : reading) {
    for (const Unit* u : m->units) {
      if (u->charge <= 0) return false;
    }
  }
  return true;
}

// The heavy p-block metals of groups 13 and 14 with a stable inert-pair
// state (In, Tl, Sn, Pb).
bool IsInertPairMetal(const Element& e) {
  return e.block == Block::kP && (e.group == 13 || e.group == 14) &&
         e.period >= 5 && IsMetal(e);
}

// The atoms of `a`'s element left free by the units of `reading` (may be
// negative: the units need more than the formula holds); `*in_unit` says
// whether a unit holds any.
Rational FreeCount(const ElementAmount& a, const Reading& reading,
                   bool* in_unit) {
  Rational count = a.count;
  *in_unit = false;
  for (const UnitMatch* m : reading) {
    for (const UnitAtom& u : m->units.front()->atoms) {
      if (u.element == a.element) {
        count = count - m->count * Rational(u.count);
        *in_unit = true;
      }
    }
  }
  return count;
}

// Whether unit `u` of match `m` may be read beside the free elements
// `element(0..n-1)`. A unit read from a bare run keeps to the cations it
// is met with (EuO2 is no superoxide), and needs one of them (ClO2 is no
// superoxide of Cl+1; H2O2 is a peroxide, H being in the s block).
template <typename ElementAt>
bool UnitAccepted(const Unit& u, const UnitMatch& m, size_t n,
                  const ElementAt& element) {
  bool accepted = !m.weak;
  for (size_t k = 0; k < n && m.weak; ++k) {
    const Element& e = element(k);
    const bool cation = u.AcceptsCation(e);
    if (IsMetal(e) && !cation) return false;
    accepted |= cation;
  }
  return accepted;
}

// Whether MakePlans could plan `reading` as far as its units go: they
// need no more atoms than the formula holds, their counts are whole at
// `scale`, and each match keeps a unit that its free elements accept (a
// unit read from a bare run keeps to the cations it is met with, and needs
// one of them). MakePlans asks this before it builds the element plans,
// which most such readings would build for nothing: the bare O2 of
// LiCoO2 and O3 of LaMnO3, which no transition metal keeps as peroxide or
// ozonide.
bool MayPlan(const Formula& formula, const Rational& scale,
             const Reading& reading) {
  absl::InlinedVector<const Element*, 8> free_elements;
  for (const ElementAmount& a : formula.amounts) {
    bool in_unit = false;
    const Rational count = FreeCount(a, reading, &in_unit);
    if (count < Rational(0)) return false;
    if (!count.IsZero()) free_elements.push_back(a.element);
  }
  const auto element = [&](size_t k) -> const Element& {
    return *free_elements[k];
  };
  for (const UnitMatch* m : reading) {
    if (!(m->count * scale).IsInteger()) return false;
    bool any = false;
    for (const Unit* u : m->units) {
      any |= UnitAccepted(*u, *m, free_elements.size(), element);
    }
    if (!any) return false;
  }
  return true;
}

// Whether the radical units of `m` are bound to a metal as their
// closed-shell pi-acceptor twin: a metal nitrosyl counts its NO as NO+
// (nitrosonium, isoelectronic with CO), the linear three-electron donor of
// the {MNO}n notation of Enemark and Feltham, Coord. Chem. Rev. 13 (1974)
// 339 (from memory). So where one of the first `free_elements` plans is a
// d-block metal, the radical reading of NO is not taken: Co(CO)3NO is
// Co(-I), Fe(CO)2(NO)2 Fe(-II), 18-electron and diamagnetic, not Co(0) and
// Fe(0) beside NO radicals.
bool RadicalBoundAsAcceptor(const UnitMatch& m, const Plans& plans,
                            size_t free_elements) {
  bool acceptor = false;
  for (const Unit* v : m.units) {
    acceptor |=
        v->unpaired == 0 && v->ligand != nullptr && IsPiAcceptor(*v->ligand);
  }
  if (!acceptor) return false;
  for (size_t k = 0; k < free_elements; ++k) {
    if (plans[k].element->block == Block::kD) return true;
  }
  return false;
}

// The two ends of the electronegativity order of a compound of non-metals
// alone (IsMetal false for every element: B, Si, Ge, As, Sb and Te count
// as non-metals), without hydrogen: the element whose Pauling value is
// above every other element's, and the one whose value is below. Null
// where no element is strictly first (last), and both null for a formula
// that holds a metal, hydrogen, an element without a value, or a single
// element.
//
// Oxidation states follow electronegativity: the bonding electrons go to
// the more electronegative partner (IUPAC, Nomenclature of Inorganic
// Chemistry, Recommendations 2005, the Red Book, from memory; Greenwood
// and Earnshaw, Chemistry of the Elements, 2nd ed., ch. 15 for S2Cl2,
// SCl2 and P4S3, from memory). So, in a neutral compound of non-metals,
// the most electronegative element positive, or the least negative,
// inverts the order: something else must take the opposite sign, and it
// is less (more) electronegative. MakePlans makes those states uncommon
// there (docs/method.md). Hydrogen is left out: beside P, As, Sb and Te
// its Pauling value is within 0.15 of theirs, and the usual convention
// for their hydrides (H2Te with Te-2) does not follow the order.
struct NonMetalOrder {
  const Element* most = nullptr;
  const Element* least = nullptr;
};

NonMetalOrder NonMetalOrderOf(const Formula& formula) {
  NonMetalOrder order;
  if (formula.amounts.size() < 2) return order;
  double most = -1, least = 100;
  for (const ElementAmount& a : formula.amounts) {
    const Element& e = *a.element;
    if (IsMetal(e) || e.atomic_number == 1 ||
        !e.pauling_electronegativity.has_value()) {
      return NonMetalOrder();
    }
    const double x = *e.pauling_electronegativity;
    if (x > most) {
      most = x;
      order.most = &e;
    } else if (x == most) {
      order.most = nullptr;  // A tie: no element is first.
    }
    if (x < least) {
      least = x;
      order.least = &e;
    } else if (x == least) {
      order.least = nullptr;
    }
  }
  return order;
}

// Whether the plans are a tetrahedral framework of group 13 atoms B (Al,
// Ga, In) and a majority of group 14 atoms C (Si, Ge, Sn) around alkali
// or alkaline-earth guests A (or Eu, divalent), whose charge (their group
// number each, 2 for Eu)
// equals the number of B atoms: the type-I clathrates A8B16C30
// (Ba8Ga16Ge30, Sr8Ga16Ge30, Ba8Al16Si30) and their relatives (K8Ga8Si38).
// Each framework atom then has four valence electrons and makes four
// bonds, so by the Zintl-Klemm concept B is B-1 and C is C0 (Eisenmann,
// Schaefer and Zagler, J. Less-Common Met. 118 (1986) 43; Nolas et al.,
// Appl. Phys. Lett. 73 (1998) 178; from memory). The group 14 majority
// leaves out the CaAl2Si2 type (one Si per Al), read with Al+3 and Si-4.
bool IsTetrahedralFramework(const Plans& plans) {
  Rational guest_charge(0), group13(0), group14(0);
  for (const ElementPlan& p : plans) {
    const Element& e = *p.element;
    const bool framework_period = e.period >= 3 && e.period <= 5;
    if (e.block == Block::kS && e.atomic_number != 1 &&
        (e.group == 1 || e.group == 2)) {
      guest_charge = guest_charge + p.count * Rational(e.group);
    } else if (e.atomic_number == 63) {
      // Eu(II) guests, as Ba(II) ones: Eu8Ga16Ge30 (Paschen et al., Phys.
      // Rev. B 64 (2001) 214404, from memory).
      guest_charge = guest_charge + p.count * Rational(2);
    } else if (e.group == 13 && framework_period) {
      group13 = group13 + p.count;
    } else if (e.group == 14 && framework_period) {
      group14 = group14 + p.count;
    } else {
      return false;
    }
  }
  return !group13.IsZero() && guest_charge == group13 && group13 < group14;
}

// Builds the plan of every free element and unit of `reading`, or returns
// false when the reading's units need more atoms than the formula holds.
// Declared elements take exactly their declared states.
//
// `scaled_counts` holds each formula element's count times `scale`;
// `structure` is the formula's StructureClassOf; `order` its
// NonMetalOrderOf. The options and units the plans hold of their own go
// to `*own`, which must outlive them.
bool MakePlans(const Formula& formula, const Rational& scale,
               absl::Span<const int64_t> scaled_counts,
               const OxidationOptions& options, const Reading& reading,
               bool zintl, internal::AnionClass structure,
               const NonMetalOrder& order, Plans* out, PlanStore* own) {
  Plans& plans = *out;
  PlanStore& store = *own;
  plans.clear();
  store.Clear();
  if (!reading.empty() && !MayPlan(formula, scale, reading)) return false;
  plans.reserve(formula.amounts.size() + reading.size());
  bool carbon_or_nitrogen = false;
  for (size_t i = 0; i < formula.amounts.size(); ++i) {
    const ElementAmount& a = formula.amounts[i];
    bool in_unit = false;
    const Rational count =
        reading.empty() ? a.count : FreeCount(a, reading, &in_unit);
    if (count < Rational(0)) return false;
    if (count.IsZero()) continue;

    carbon_or_nitrogen |=
        a.element->atomic_number == 6 || a.element->atomic_number == 7;
    ElementPlan& p = plans.emplace_back();
    p.element = a.element;
    const internal::OptionTables tables =
        internal::StateOptionTables(*a.element);
    p.all = tables.all;
    p.common = tables.common;
    p.count = count;
    p.scaled_count = in_unit ? (count * scale).num() : scaled_counts[i];
    for (const DeclaredState& d : options.declared) {
      if (d.element != p.element) continue;
      if (!p.declared) p.own_begin = static_cast<int>(store.options.size());
      p.declared = true;
      bool common = d.state == 0;  // The elemental state is always known.
      for (const KnownOxidationState& k : internal::KnownStates(*p.element)) {
        if (k.state == d.state) common = k.common;
      }
      store.options.push_back(internal::MakeStateOption(
          *p.element, static_cast<int>(store.options.size()) - p.own_begin,
          d.state, d.state, common, common));
      p.own_end = static_cast<int>(store.options.size());
    }
  }
  // A pi-acceptor ligand (carbon monoxide, phosphines: IsPiAcceptor)
  // lets d-block metals take state 0, as in metal carbonyls.
  // Cyanide (IsAnionicPiAcceptor) does so for the transition metals of
  // groups 3 to 10: K4[Ni(CN)4] is Ni(0). The metals of groups 11 and 12
  // keep their own states beside it (no Zn(I) in K2Zn3[Fe(CN)6]2).
  bool pi_acceptor = false;
  bool cyanide = false;   // An anionic pi acceptor.
  bool nitrosyl = false;  // A cationic pi acceptor: NO+.
  for (const UnitMatch* m : reading) {
    for (const Unit* u : m->units) {
      if (u->ligand == nullptr) continue;
      const bool acceptor = IsPiAcceptor(*u->ligand);
      pi_acceptor |= acceptor;
      cyanide |= !acceptor && IsAnionicPiAcceptor(*u->ligand);
      nitrosyl |= acceptor && u->charge > 0;
    }
  }
  // Hydrogen beside a free d-block metal and pi-acceptor ligands, with no
  // free C, N, O, P or S to bond to, is bound to the metal: a hydride
  // ligand, H-1 (HCo(CO)4 is Co(I), HRh(CO)(PPh3)3 Rh(I), IrHCl2(PPh3)3
  // Ir(III); Greenwood and Earnshaw, Chemistry of the Elements, 2nd ed.,
  // chs. 8 and 26, from memory).
  bool hydride_ligand = false;
  if (pi_acceptor) {
    bool metal = false, host = false, hydrogen = false;
    for (const ElementPlan& p : plans) {
      const int z = p.element->atomic_number;
      metal |= p.element->block == Block::kD;
      host |= z == 6 || z == 7 || z == 8 || z == 15 || z == 16;
      hydrogen |= z == 1;
    }
    hydride_ligand = metal && hydrogen && !host;
  }
  // Chalcogenide anions only (no free O, F, Cl or N): metals keep to their
  // chalcogenide maximum (MnS2 is Mn(II) disulfide, not Mn(IV) sulfide).
  // Heavy pnictides with no other non-metal: transition metals keep to +4,
  // the highest formal state of their pnictides, reached with pnictogen
  // pairs (loellingite FeAs2, sperrylite PtAs2, marcasite-type CrSb2 with
  // Sb2 4-; Hulliger, Struct. Bonding 4 (1968) 83, from memory): CrSb2 is
  // not Cr(VI) antimonide.
  bool chalcogen = false, hard_anion = false, cluster_former = false;
  bool pnictogen = false, other_nonmetal = false;
  bool heavy_halogen = false, fluorine = false, transition_metal = false;
  bool oxide = false, lithium = false, nickel = false;
  for (const ElementPlan& p : plans) {
    const int z = p.element->atomic_number;
    oxide |= z == 8;
    lithium |= z == 3;
    nickel |= z == 28;
    heavy_halogen |= IsHeavyHalogen(z);
    fluorine |= z == 9;
    transition_metal |= IsTransitionMetal(*p.element);
    chalcogen |= IsHeavyChalcogen(z);
    hard_anion |= z == 7 || z == 8 || z == 9 || z == 17;
    cluster_former |= IsClusterFormer(*p.element);
    if (IsHeavyPnictogen(z)) {
      pnictogen = true;
    } else {
      other_nonmetal |= !IsMetal(*p.element);
    }
  }
  const bool soft_only = chalcogen && !hard_anion;
  // Every unit of the reading a pair of S, Se or Te atoms (pyrite-type
  // disulfides, diselenides, ditellurides), with no free hard anion.
  bool chalcogen_pairs = !reading.empty() && !hard_anion;
  for (const UnitMatch* m : reading) {
    for (const UnitAtom& a : m->units.front()->atoms) {
      chalcogen_pairs &= IsHeavyChalcogen(a.element->atomic_number);
    }
  }
  const bool pnictide_only = pnictogen && !other_nonmetal && !zintl;
  const bool clusters =
      cluster_former && OnlyCationicUnits(reading) && HoldsMetalClusters(plans);
  // Every cation an alkali metal (for the Zintl clusters below); only a
  // Zintl reading asks, so other records skip the loop.
  bool alkali_only = zintl;
  if (zintl) {
    for (const ElementPlan& p : plans) {
      if (!IsZintlAnionFormer(*p.element)) {
        alkali_only &= p.element->group == 1 && p.element->atomic_number != 1;
      }
    }
  }
  const bool framework = zintl && IsTetrahedralFramework(plans);
  // Lithium nickel oxides with as many cations as oxygen atoms, the layered
  // LiMO2 cathodes (LiNi0.8Co0.1Mn0.1O2, Li1.2Ni0.2Mn0.6O2) and rock-salt
  // LixNi1-xO: Ni(II)/Ni(III) is their native mixed valence, beside Co(III)
  // and Mn(IV) (Ohzuku and Makimura, Chem. Lett. 30 (2001) 642; Noh et al.,
  // J. Power Sources 233 (2013) 121; Verwey et al., Philips Res. Rep. 5
  // (1950) 173 for LixNi1-xO; from memory). The Ni mix costs no spread
  // there, so that a minor Co does not become Co(II) beside Ni(III) to
  // spare the Ni mix: NMC811 is Ni(II)/Ni(III) with Co(III), not Ni(III)
  // with Co(II).
  // The counts are compared scaled: each plan's scaled count is its count
  // times the one positive scale, an exact integer.
  bool nickel_mix_free = false;
  if (oxide && lithium && nickel && !fluorine) {
    int64_t cations = 0, oxygen = 0;
    bool metals_only = true;
    for (const ElementPlan& p : plans) {
      if (p.element->atomic_number == 8) {
        oxygen = p.scaled_count;
      } else if (IsMetal(*p.element)) {
        cations += p.scaled_count;
      } else {
        metals_only = false;
      }
    }
    nickel_mix_free = metals_only && cations == oxygen;
  }
  // Free Cl, Br and I beside a free transition metal and free oxygen, with
  // no fluorine and fewer than three oxygen atoms per halogen atom, are
  // halide (metal-rich records with no oxygen keep their readings): a
  // positive halogen is bonded to O or F, in an oxo-anion (a unit) or an
  // interhalogen, never beside a metal it could take electrons from.
  // ReOCl3(PPh3)2 is Re(V) with chloride, not Re(-I) with Cl(I);
  // [ReO2(py)4]Cl is Re(V), not Re(III) with Cl(I) (Greenwood and
  // Earnshaw, Chemistry of the Elements, 2nd ed., ch. 24, from memory).
  bool halide_only = false;
  if (heavy_halogen && transition_metal && !fluorine) {
    int64_t halogen = 0, oxygen = 0;  // Scaled, as above.
    for (const ElementPlan& p : plans) {
      const int z = p.element->atomic_number;
      if (IsHeavyHalogen(z)) halogen += p.scaled_count;
      if (z == 8) oxygen += p.scaled_count;
    }
    halide_only = oxygen != 0 && oxygen < halogen * 3;
  }
  // The B sites of an ordered double perovskite, delafossites and the
  // cations of Zintl phases read their own state preferences, and the
  // states listed there count as common (Mo+5 in Sr2FeMoO6 and Ba2YMoO6,
  // Os+6 in Ca2NiOsO6, Pd+1 in PdCoO2, Yb+2 in YbZn2Sb2).
  internal::AnionClass anions = soft_only ? internal::AnionClass::kSoft
                                : zintl   ? internal::AnionClass::kZintl
                                          : internal::AnionClass::kHard;
  if (!soft_only && reading.empty() && oxide && options.net_charge == 0) {
    anions = structure;
  }
  const bool own_rows = anions == internal::AnionClass::kDoublePerovskite ||
                        anions == internal::AnionClass::kDelafossite ||
                        anions == internal::AnionClass::kZintl;
  // Whether any element may get options of its own below (zero beside
  // pi acceptors, a state limit, Zintl polyanion states, listed
  // preferences, clusters, the order of non-metals): most records have
  // none, and their elements keep their tables.
  const bool inversion = order.most != nullptr || order.least != nullptr;
  const bool any_custom = pi_acceptor || cyanide || soft_only ||
                          chalcogen_pairs || pnictide_only || zintl ||
                          own_rows || clusters || nickel_mix_free || inversion;
  for (ElementPlan& p : plans) {
    p.no_hydride = carbon_or_nitrogen && p.element->atomic_number == 1;
    p.oxide = oxide;
    p.anions = anions;
    if (p.declared) continue;
    const int z = p.element->atomic_number;
    // Oxygen is positive only bonded to fluorine, the one element more
    // electronegative (OF2, O2F2; Greenwood and Earnshaw, Chemistry of the
    // Elements, 2nd ed., ch. 14, from memory): without fluorine its
    // options stop at the negative ones, which come first in the tables.
    if (z == 8 && !fluorine) {
      p.all = NonPositivePrefix(p.all);
      p.common = NonPositivePrefix(p.common);
    }
    if ((hydride_ligand && z == 1) || (halide_only && IsHeavyHalogen(z))) {
      p.custom = true;
      const StateOption o =
          internal::MakeStateOption(*p.element, 0, -1, -1, true, true);
      p.own_begin = static_cast<int>(store.options.size());
      p.own_common_begin = static_cast<int>(store.common_options.size());
      store.options.push_back(o);
      store.common_options.push_back(o);
      p.own_end = static_cast<int>(store.options.size());
      p.own_common_end = static_cast<int>(store.common_options.size());
      continue;
    }
    if (!any_custom) continue;
    const bool zero = p.element->block == Block::kD &&
                      (pi_acceptor || (cyanide && p.element->group <= 10));
    const int limit = soft_only ? internal::ChalcogenideMaxState(*p.element)
                      : pnictide_only && p.element->block == Block::kD ? 4
                                                                       : -1;
    // In a Zintl phase the polyanion atoms take -(8 - N) to -1, all
    // common (N valence electrons: Si-1 in CaSi2, Tl-1 in NaTl).
    const bool polyanion = zintl && IsZintlAnionFormer(*p.element);
    const bool listed =
        own_rows && internal::HasPreferenceRows(*p.element, anions);
    const bool cluster = clusters && IsClusterFormer(*p.element);
    // Beside the clusters, In, Tl, Sn and Pb keep their inert pair
    // (group - 12: In(I), Sn(II)), the cluster taking their electrons
    // (docs/method.md).
    const int inert_pair =
        clusters && IsInertPairMetal(*p.element) ? p.element->group - 12 : 0;
    // Among chalcogenides, free or in X2 pairs, the chalcogenide maximum
    // itself is attested (the table names the compound that shows it) and
    // counts as common whatever the element's general flag: erlichmanite
    // OsS2, OsSe2 and OsTe2 are Os(II) with X2 2- pairs, low-spin d6 and
    // diamagnetic like laurite RuS2 (Hulliger, Struct. Bonding 4 (1968)
    // 83; Vaughan and Craig, Mineral Chemistry of Metal Sulfides (1978);
    // from memory), not Os(IV) with two unpaired electrons.
    const int attested =
        (soft_only || chalcogen_pairs) && p.element->block == Block::kD
            ? internal::ChalcogenideMaxState(*p.element)
            : -1;
    const bool nickel_mix = nickel_mix_free && z == 28;
    // Among non-metals alone, the most electronegative element's positive
    // states and the least electronegative one's negative states invert
    // the order (NonMetalOrder): uncommon, whatever the table says, so
    // that the ordered reading wins (S2Cl2 is S+1 with Cl-1, not a
    // disulfide with Cl+1). With a net charge only the sign that forces
    // an opposite one counts.
    const bool inverts_positive =
        p.element == order.most && options.net_charge <= 0;
    const bool inverts_negative =
        p.element == order.least && options.net_charge >= 0;
    if (!zero && limit < 0 && attested < 0 && !polyanion && !listed &&
        !cluster && inert_pair == 0 && !nickel_mix && !inverts_positive &&
        !inverts_negative) {
      continue;
    }
    p.custom = true;
    p.own_begin = static_cast<int>(store.options.size());
    p.own_common_begin = static_cast<int>(store.common_options.size());
    // Room for the table's options and state 0 at once, rather than
    // growing one option at a time.
    store.options.reserve(store.options.size() + p.all.size() + 1);
    store.common_options.reserve(store.common_options.size() + p.common.size() +
                                 1);
    bool zero_added = !zero;
    const bool platinum_metal = p.element->block == Block::kD &&
                                p.element->period >= 5 &&
                                p.element->group >= 8 && p.element->group <= 10;
    auto add = [&p, &store, limit, listed, anions, zero, cluster, nitrosyl,
                inert_pair, attested, platinum_metal, nickel_mix,
                inverts_positive,
                inverts_negative](int low, int high, bool low_common,
                                  bool high_common, bool needs_oxide = false,
                                  const StateOption* table = nullptr) {
      if (cluster) {
        // +1 in a mix with +2 only: the mean of a reduced cluster (a lone
        // Mo(I) or W(I) halide is unknown).
        low_common |= (low >= 2 && low <= 3) || (low == 1 && high == 2);
        high_common |= high == 2 || high == 3;
      }
      low_common |= inert_pair != 0 && low == inert_pair;
      high_common |= inert_pair != 0 && high == inert_pair;
      // Beside pi-acceptor ligands the low states are the usual ones: the
      // carbonylmetallates [Fe(CO)4]2- and [V(CO)6]-, Mn(I) in Mn(CO)5Br
      // (Greenwood and Earnshaw, Chemistry of the Elements, 2nd ed., ch.
      // 19, from memory).
      if (zero) {
        low_common |= low <= 1;
        high_common |= high <= 1;
      }
      if (limit >= 0) {
        // Mixed valence one step above the chalcogenide maximum stays
        // common where the state is: the thiospinels CuCr2S4 (Cr(III)/
        // Cr(IV)) and CuIr2S4 (Ir(III)/Ir(IV)) beside Cu(I).
        const bool step_above = low == limit && high == limit + 1;
        low_common &= low <= limit;
        high_common &= high <= limit || step_above;
        // For the platinum metals the step above is common even where the
        // state alone is not: the thiospinels CuRh2S4 and CuRh2Se4 hold
        // Cu(I) beside Rh(III)/Rh(IV), as CuIr2S4 holds Ir(III)/Ir(IV)
        // (Hulliger, Struct. Bonding 4 (1968) 83; Radaelli et al., Nature
        // 416 (2002) 155; from memory), not Cu(II) with Rh(III).
        high_common |= step_above && platinum_metal;
      }
      if (attested >= 0) {
        // The state alone, or as the upper state of a mix one step below
        // (Nb(III)/Nb(IV) in Fe1/3NbS2); a mix reaching above it keeps
        // its flags.
        low_common |= low == attested && high == attested;
        high_common |= high == attested && low >= attested - 1;
      }
      if (listed) {
        low_common |= internal::ListedPreference(*p.element, low, anions);
        high_common |= internal::ListedPreference(*p.element, high, anions);
      }
      // A mix never straddles zero: both states have the sign.
      if ((inverts_positive && high > 0) || (inverts_negative && low < 0)) {
        low_common = high_common = false;
      }
      // An option of the element's table whose flags stay as they are
      // is the table's, but for its place in this list: copied, not
      // built again.
      const int index = static_cast<int>(store.options.size()) - p.own_begin;
      StateOption o;
      if (table != nullptr && low_common == table->low_common &&
          high_common == table->high_common) {
        o = *table;
        o.index = index;
      } else {
        o = internal::MakeStateOption(*p.element, index, low, high, low_common,
                                      high_common, needs_oxide);
      }
      // The cluster's electrons are shared by all its atoms: +1 to +3 is
      // its usual mean (+2.33 in the Chevrel phases' [Mo6S8]2-, +1.67 in
      // the [Mo6Se6]2- chains of Cs2Mo6Se6, +1.83 in Nb6I11), no mixed
      // valence to weigh. The cluster takes the electrons the other
      // cations give, those staying in their lowest usual states (Sn(II)
      // and Eu(II) in SnMo6S8 and EuMo6S8, In(I) in In2Mo6Se6): each atom
      // weighs a rank step (2) per state below +3.
      if (cluster && low >= 1 && high <= 3) {
        o.spread = 0;
        for (int c = 0; c < internal::kAnionClasses; ++c) {
          o.high_natural[c] = 2 * (3 - high);
          o.low_extra_natural[c] = low != high ? 2 : 0;
        }
      }
      // The inert pair is the natural state beside the cluster: no group
      // gap or rank step for In(I) in In2Mo6Se6.
      if (inert_pair != 0 && low == inert_pair && high == inert_pair) {
        for (int c = 0; c < internal::kAnionClasses; ++c) {
          o.high_natural[c] = 0;
        }
      }
      // Beside NO+ the {MNO}n count sets the metal's formal state, low
      // whatever its rank: the brown-ring ion [Fe(H2O)5(NO)]2+ is Fe(I)
      // with NO+ (Greenwood and Earnshaw, Chemistry of the Elements, 2nd
      // ed., ch. 11, from memory), not Fe(III) beside sulfur(IV).
      if (zero && nitrosyl && high <= 1) {
        for (int c = 0; c < internal::kAnionClasses; ++c) {
          o.high_natural[c] = o.low_extra_natural[c] = 0;
        }
      }
      if (nickel_mix && low == 2 && high == 3) o.spread = 0;
      store.options.push_back(o);
      if (o.low_common && o.high_common) store.common_options.push_back(o);
      p.own_end = static_cast<int>(store.options.size());
      p.own_common_end = static_cast<int>(store.common_options.size());
    };
    if (framework && polyanion) {
      // Four-bonded framework atoms (IsTetrahedralFramework): B-1, C0.
      const int q = p.element->group == 13 ? -1 : 0;
      add(q, q, true, true);
      continue;
    }
    if (polyanion) {
      for (int q = p.element->group - 18; q <= -1; ++q) {
        add(q, q, true, true);
        if (q < -1) add(q, q + 1, true, true);
      }
      // Cages and clusters: atoms with their full 8 - N homonuclear bonds
      // are neutral, so -1 mixes with 0 there: the group 15 cages P7 3-,
      // P11 3-, As7 3- and Sb7 3- (three P-1, four P0 in Na3P7), and the
      // group 14 clusters and clathrate frameworks of the alkali metals
      // (K4Ge9, Na4Sn9, K8Ge44) (Corbett, Chem. Rev. 85 (1985) 383, from
      // memory). Not beside alkaline-earth metals in group 14, whose
      // BaSn3 is a polar intermetallic.
      // A group 15 atom with three such bonds is neutral alone too (As0
      // of [In2As2]2- in EuIn2As2, the middle As of [As3]2- in CaAs3).
      if (p.element->group == 15) add(0, 0, true, true);
      if (p.element->group == 15 || (p.element->group == 14 && alkali_only)) {
        add(-1, 0, true, true);
      }
    }
    // p.all is still the table's here (PlanStore::Resolve sets it last).
    for (const StateOption& o : p.all) {
      if (polyanion && o.low < 0) continue;
      // Among heavy pnictides a transition-metal state wholly above +4 is
      // not met at all (not merely uncommon): the skutterudite IrSb3 is
      // Ir(III) with Sb4 4- rings, as CoSb3 and RhSb3 are (Hulliger,
      // Struct. Bonding 4 (1968) 83, from memory), not Ir(IX).
      if (pnictide_only && p.element->block == Block::kD && o.low > limit) {
        continue;
      }
      if (!zero_added && o.low > 0) {
        add(0, 0, true, true);
        zero_added = true;
      }
      add(o.low, o.high, o.low_common, o.high_common, o.needs_oxide, &o);
    }
    if (!zero_added) add(0, 0, true, true);
  }
  const size_t free_elements = plans.size();
  for (const UnitMatch* m : reading) {
    if (!(m->count * scale).IsInteger()) return false;  // "(O2)0.5" in KO.
    ElementPlan& p = plans.emplace_back();
    p.match = m;
    p.count = m->count;
    p.scaled_count = (m->count * scale).num();
    p.own_begin = p.own_end = static_cast<int>(store.options.size());
    p.units_begin = p.units_end = static_cast<int>(store.units.size());
    for (const Unit* u : m->units) {
      if (!UnitAccepted(*u, *m, free_elements, [&](size_t k) -> const Element& {
            return *plans[k].element;
          })) {
        continue;
      }
      if (pi_acceptor && u->unpaired > 0 &&
          RadicalBoundAsAcceptor(*m, plans, free_elements)) {
        continue;
      }
      store.units.push_back(u);
      StateOption o;
      o.low = o.high = u->charge;
      o.index = p.units_end - p.units_begin;
      store.options.push_back(o);
      p.own_end = static_cast<int>(store.options.size());
      p.units_end = static_cast<int>(store.units.size());
    }
    if (p.units_end == p.units_begin) return false;
  }
  store.Resolve(&plans);
  return !plans.empty();
}

// An option excluded from the search: element index and its states.
struct Forbidden {
  int element = -1;
  int low = 0;
  int high = 0;
};

// Whether element `i` may take option `o`, one of its options() or
// common_options() (which keep undeclared elements to common states).
// Undeclared elements mix valence only with two scaled atoms; declared
// states are always kept. The forbidden option is dropped. In a strict
// search, free hydrogen is not a hydride beside free carbon or nitrogen.
bool Allowed(const ElementPlan& p, int i, bool strict,
             const Forbidden& forbidden, const StateOption& o) {
  if (!p.declared) {
    if (o.mixed() && p.scaled_count < 2) return false;
    if (o.needs_oxide && !p.oxide) return false;
    if (strict && p.no_hydride && o.low < 0) return false;
  }
  return forbidden.element != i || o.low != forbidden.low ||
         o.high != forbidden.high;
}

// Fills the narrow (`common_only`) or wide candidate list of element `i`,
// appending to candidates->all. Inlined into its callers' loops over the
// elements: as a call it paid a long prologue per list.
ABSL_ATTRIBUTE_ALWAYS_INLINE inline void BuildList(
    const Plans& plans, size_t i, const Forbidden& forbidden, double threshold,
    bool common_only, bool strict, Candidates* candidates) {
  {
    const ElementPlan& p = plans[i];
    const bool unit = p.match != nullptr;
    CandidateList& list =
        common_only ? candidates->narrow[i] : candidates->wide[i];
    list.begin = candidates->all.size();
    list.mixed = 0;
    list.min_contribution = std::numeric_limits<int64_t>::max();
    list.max_contribution = std::numeric_limits<int64_t>::min();
    list.min_weight = list.min_uncommon_weight = Weight::Infinite();
    for (const StateOption& o :
         common_only ? p.common_options() : p.options()) {
      if (!Allowed(p, static_cast<int>(i), strict, forbidden, o)) {
        continue;
      }
      // A radical unit (nitric oxide, superoxide) ranks after a
      // closed-shell one of the same atoms when both balance: nitroprusside
      // holds NO+ and Fe(II), not NO and Fe(III).
      const Weight weight = unit ? Weight::Of(0, 0,
                                              p.scaled_count * kRadicalStep *
                                                  p.units[o.index]->unpaired)
                                 : OptionWeight(*p.element, o, p.scaled_count,
                                                threshold, p.anions);
      const Weight per_low_atom =
          unit ? Weight() : Weight::Of(0, 0, o.LowExtraNatural(p.anions));
      candidates->all.push_back(
          Candidate{o.index, o.low, o.high, weight, per_low_atom});
      if (o.mixed()) ++list.mixed;
      // The least this candidate adds: with as many atoms as may be in
      // the lower state when that lowers the weight.
      const Weight least =
          o.mixed() && per_low_atom < Weight()
              ? weight + Weight::FromPacked(per_low_atom.packed() *
                                            (p.scaled_count - 1))
              : weight;
      list.min_weight = std::min(list.min_weight, least);
      if (!p.declared && o.uncommon > 0) {
        list.min_uncommon_weight = std::min(list.min_uncommon_weight, least);
      }
      list.min_contribution =
          std::min(list.min_contribution, p.scaled_count * o.low);
      list.max_contribution =
          std::max(list.max_contribution, p.scaled_count * o.high);
    }
    list.end = candidates->all.size();
  }
}

// Fills the narrow (`common_only`) or wide candidate lists of every
// element, appending to candidates->all.
void BuildCandidates(const Plans& plans, const Forbidden& forbidden,
                     double threshold, bool common_only, bool strict,
                     Candidates* candidates) {
  for (size_t i = 0; i < plans.size(); ++i) {
    BuildList(plans, i, forbidden, threshold, common_only, strict, candidates);
  }
}

// This thread's candidate lists, reused by every search (their buffer
// keeps its capacity).
Candidates& SearchCandidates() {
  thread_local Candidates candidates;
  return candidates;
}

// Atoms per formula unit of `scaled` scaled atoms.
Rational PerFormulaUnit(int64_t scaled, const Rational& scale) {
  // None (most records' spread) needs no reduction.
  if (scaled == 0) return Rational(0);
  // One reduction: scaled x den stays far inside int64 (kMaxScaledAtoms).
  return Rational(scaled * scale.den(), scale.num());
}

// The printed score of a weight (oxidation.h): 100 x uncommon +
// 10 x (inconsistencies + a redox-incompatible pair) + naturalness per
// formula unit. Each lower term is capped below the unit of the term above
// it (naturalness at 9.99, the terms below uncommon at 99.99), so the
// score never orders two assignments against the ranking.
double PrintedScore(Weight w, bool redox_incompatible, const Rational& scale) {
  // The quotient of two integers that a double holds exactly is the
  // correctly rounded value of their fraction, whatever its terms: so the
  // unreduced one gives PerFormulaUnit(...).ToDouble() without a gcd.
  constexpr int64_t kExact = int64_t{1} << 53;
  const __int128 scaled = static_cast<__int128>(w.naturalness()) * scale.den();
  const double per_unit =
      scaled > -kExact && scaled < kExact && scale.num() < kExact
          ? static_cast<double>(static_cast<int64_t>(scaled)) /
                static_cast<double>(scale.num())
          : PerFormulaUnit(w.naturalness(), scale).ToDouble();
  const double natural = std::min(9.99, per_unit);
  const int64_t faults = w.inconsistencies() + (redox_incompatible ? 1 : 0);
  const double lower =
      faults >= 9 ? 99.99 : 10.0 * static_cast<double>(faults) + natural;
  return 100.0 * static_cast<double>(w.uncommon()) + lower;
}

// The first pair of free ions in `a` that would react (oxidation.h).
std::optional<RedoxPair> FindRedoxIncompatible(const OxidationAssignment& a) {
  for (const AssignedState& ox : a.states) {
    if (ox.unit >= 0 || ox.state <= 0) continue;
    const std::optional<double> e_ox =
        internal::PotentialDownFrom(*ox.element, ox.state);
    if (!e_ox.has_value()) continue;
    for (const AssignedState& red : a.states) {
      if (red.unit >= 0 || red.state <= 0 || red.element == ox.element) {
        continue;
      }
      const std::optional<double> e_red =
          internal::PotentialDownTo(*red.element, red.state);
      if (e_red.has_value() && *e_ox - *e_red > kRedoxIncompatibleVolts) {
        return RedoxPair{ox.element,  ox.state,  *e_ox,
                         red.element, red.state, *e_red};
      }
    }
  }
  return std::nullopt;
}

// Ranks assignments of one reading's search by their weight, with a
// redox-incompatible pair counted as one more inconsistency (oxidation.h).
bool RanksBefore(Weight wx, const OxidationAssignment& x, Weight wy,
                 const OxidationAssignment& y) {
  const auto key = [](Weight w, const OxidationAssignment& a) {
    return std::make_tuple(
        w.uncommon(),
        w.inconsistencies() + (a.redox_incompatible.has_value() ? 1 : 0),
        w.naturalness());
  };
  return key(wx, x) < key(wy, y);
}

OxidationAssignment ToAssignment(const Formula& formula, const Plans& plans,
                                 const Solution& s, const Rational& scale) {
  OxidationAssignment a;
  a.states.reserve(2 * plans.size());  // Two entries per mixed element.
  bool units = false;
  for (size_t i = 0; i < plans.size(); ++i) {
    const ElementPlan& p = plans[i];
    const StateOption& o = p.options()[s.choices[i].option];
    if (p.match != nullptr) {
      const Unit* u = p.units[s.choices[i].option];
      const int index = static_cast<int>(a.units.size());
      a.units.push_back({u, p.count, p.match->group, p.match->enclosing});
      for (const UnitAtom& atom : u->atoms) {
        a.states.push_back({atom.element, atom.state,
                            p.count * Rational(atom.count), true, false,
                            index});
      }
      units = true;
    } else if (!o.mixed()) {
      a.states.push_back({p.element, o.low, p.count, o.low_common, p.declared});
    } else {
      const int64_t k = s.choices[i].low_atoms;
      a.states.push_back(
          {p.element, o.low, PerFormulaUnit(k, scale), o.low_common, false});
      a.states.push_back({p.element, o.high,
                          PerFormulaUnit(p.scaled_count - k, scale),
                          o.high_common, false});
    }
  }
  if (units) {
    // Formula order of the elements; free ions, then units, for each.
    auto position = [&](const Element* e) {
      for (size_t k = 0; k < formula.amounts.size(); ++k) {
        if (formula.amounts[k].element == e) return static_cast<int>(k);
      }
      return 0;
    };
    std::stable_sort(a.states.begin(), a.states.end(),
                     [&](const AssignedState& x, const AssignedState& y) {
                       const int px = position(x.element);
                       const int py = position(y.element);
                       return px != py ? px < py : x.unit < y.unit;
                     });
    // Atoms at several positions of one unit with the same state are one
    // entry (terminal N-1 twice in azide).
    std::vector<AssignedState> merged;
    for (const AssignedState& st : a.states) {
      if (!merged.empty() && merged.back().unit >= 0 &&
          merged.back().unit == st.unit &&
          merged.back().element == st.element &&
          merged.back().state == st.state) {
        merged.back().count = merged.back().count + st.count;
      } else {
        merged.push_back(st);
      }
    }
    a.states = std::move(merged);
  }
  a.uncommon_states = static_cast<int>(s.weight.uncommon());
  a.electronegativity_inconsistencies =
      static_cast<int>(s.weight.inconsistencies());
  // Spread as oxidation.h defines it: mixed valence and radical units.
  int64_t spread = 0;
  for (size_t i = 0; i < plans.size(); ++i) {
    const ElementPlan& p = plans[i];
    const StateOption& o = p.options()[s.choices[i].option];
    if (p.match != nullptr) {
      spread += p.scaled_count * p.units[s.choices[i].option]->unpaired;
    } else {
      spread += p.scaled_count * (o.high - o.low);
    }
  }
  a.spread = PerFormulaUnit(spread, scale);
  // Not for soft anions, nor for delafossites, whose A(I) is structural
  // (CuFeO2 is Cu(I) with Fe(III), 0.62 V apart).
  if (plans.empty() ||
      (plans.front().anions != internal::AnionClass::kSoft &&
       plans.front().anions != internal::AnionClass::kDelafossite)) {
    a.redox_incompatible = FindRedoxIncompatible(a);
  }
  a.score = PrintedScore(s.weight, a.redox_incompatible.has_value(), scale);
  return a;
}

// How one record is searched: exhaustively (SolveCharge, in stages), or,
// when that would exceed the record's work budget, among assignments with
// at most one mixed-valence element (SolveChargeOneMixed).
struct Search {
  int64_t target = 0;  // Net charge in scaled units.
  bool one_mixed = false;
  bool strict = true;  // See Allowed.
  bool zintl = false;  // Polyanion states by the 8-N rule (MakePlans).
  // The formula's StructureClassOf and NonMetalOrderOf (AssignStates
  // finds them once).
  internal::AnionClass structure = internal::AnionClass::kHard;
  NonMetalOrder order;
  // Each formula element's count times the scale (AssignStates).
  absl::InlinedVector<int64_t, 8> scaled_counts;
  UnitMatches all_matches;  // Of the formula (AssignStates finds them).
  UnitMatches matches;      // Of the formula, but those on declared elements.
  internal::WorkBudget budget{internal::kRecordCellVisits, false};
  // The plans of the reading being tried and of the best one so far
  // (SearchReadings): they trade places instead of being moved.
  std::array<Plans, 2> plan_buffers;
  std::array<PlanStore, 2> plan_stores;  // What each buffer's plans hold.
};

// Finds the best assignment. Exhaustively, it widens the search in stages,
// each exact for what it decides:
//   1. common states only: any solution here outranks all others;
//   2. one element at a time may take uncommon states: if the best has a
//      single uncommon state, no solution with more can beat it;
//   3. every known state for every element.
// Stages 1 and 2 keep the charge windows narrow, which is what makes the
// typical record cheap.
//
// Only a result lighter than `bound` is wanted (see SearchLimits):
// anything else may come back as no solution. When the budget runs out
// the result is no solution and search->budget says so.
//
// With `narrow_built`, SearchCandidates() holds the narrow lists for
// `forbidden` already (exhaustive search only).
Solution SolveStaged(const Plans& plans, const ChargeItems& items,
                     const Forbidden& forbidden, double threshold,
                     Search* search, Weight bound = Weight::Infinite(),
                     bool narrow_built = false) {
  Candidates& candidates = SearchCandidates();
  const int64_t target = search->target;
  internal::WorkBudget* const budget = &search->budget;
  // The restricted search takes every allowed option at once (the wide
  // lists); the exhaustive one starts narrow. Every return below returns
  // `best`, which is then built in the caller's place.
  if (!narrow_built) {
    candidates.all.clear();
    BuildCandidates(plans, forbidden, threshold,
                    /*common_only=*/!search->one_mixed, search->strict,
                    &candidates);
  }
  // Every solution shares the declared states, D of them uncommon. A
  // narrow solution (common and declared states only) weighs below
  // D + 1 uncommon states and every solution of the later stages at least
  // that, so a narrow solution ends the search. With a bound up to one
  // uncommon state nothing in the later stages can come below it either.
  // With a higher bound, whatever the narrow stage dropped weighs at least
  // the bound, and so does everything the later stages could find.
  Solution best = search->one_mixed
                      ? internal::SolveChargeOneMixed(
                            items, candidates, Widening::All(), target,
                            SearchLimits{bound, false, budget})
                      : SolveCharge(items, candidates, Widening::None(), target,
                                    SearchLimits{bound, false, budget});
  if (search->one_mixed) return best;
  if (!best.weight.IsInfinite() || bound <= Weight::Uncommon(1) ||
      budget->exhausted) {
    return best;
  }
  BuildCandidates(plans, forbidden, threshold, /*common_only=*/false,
                  search->strict, &candidates);
  for (size_t k = 0; k < plans.size(); ++k) {
    Solution s = SolveCharge(items, candidates,
                             Widening::One(static_cast<int>(k)), target,
                             SearchLimits{std::min(bound, best.weight),
                                          /*must_widen=*/true, budget});
    if (s.weight < best.weight) best = std::move(s);
  }
  if (best.weight < Weight::Uncommon(2) || budget->exhausted) return best;
  // Stage 3, deepened: solutions with at most m uncommon states weigh
  // below m + 1 uncommon states, so bounding the search there keeps it to
  // them. The first m that finds one has found the best; a search the
  // bound did not prune was the unbounded one. After two fruitless
  // bounded searches (a record that no state balances, say) the last one
  // goes unbounded, so that deepening never costs more than a few
  // searches.
  const Weight limit = std::min(bound, best.weight);
  int fruitless = 0;
  for (int64_t m = 2;; ++m) {
    const Weight cap =
        fruitless == 2 ? limit : std::min(Weight::BelowUncommon(m + 1), limit);
    Pruning pruning = Pruning::kNone;
    Solution s = SolveCharge(items, candidates, Widening::All(), target,
                             SearchLimits{cap, false, budget}, &pruning);
    if (s.weight < best.weight) {
      best = std::move(s);
      break;
    }
    if (cap >= limit || pruning == Pruning::kNone || budget->exhausted) break;
    if (pruning == Pruning::kInSearch) ++fruitless;
  }
  return best;
}

// The best assignment of one reading's plans, trying the
// electronegativity thresholds as the ranking says (oxidation.h); only a
// result below `bound` is wanted. `*chosen` is the threshold it was found
// with.
Solution SolveReading(const Plans& plans, const Forbidden& forbidden,
                      Search* search, Weight bound, double* chosen) {
  const ChargeItems items = ItemsOf(plans);
  const double first = FirstThreshold(plans);
  Solution best = SolveStaged(plans, items, forbidden, first, search, bound);
  *chosen = first;
  if (!best.weight.IsInfinite() && !best.weight.HasInconsistency()) {
    return best;
  }
  const ThresholdList thresholds = Thresholds(plans, search->target > 0);
  for (size_t j = 1; j < thresholds.size(); ++j) {
    Solution s = SolveStaged(plans, items, forbidden, thresholds[j], search,
                             std::min(bound, best.weight));
    if (s.weight < best.weight) {
      best = std::move(s);
      *chosen = thresholds[j];
    }
  }
  return best;
}

// The readings to try: none, the greedy maximal set of non-overlapping
// matches (groups first, then longer runs), and that set without each of
// its runs in turn (refilled greedily): at most 2 + kMaxUnitMatches.
// Where `bracketed` (the formula writes a complex in square brackets),
// a run outside every bracket is the complex's counter-ion as written and
// is not left out: [V(H2O)6]SO4 is V(II) sulfate, not V(IV) beside
// sulfur(IV) (Greenwood and Earnshaw, Chemistry of the Elements, 2nd ed.,
// ch. 22, from memory).
using ReadingList = absl::InlinedVector<Reading, 4>;

ReadingList Readings(const UnitMatches& matches, bool bracketed) {
  ReadingList readings(1);
  if (matches.empty()) return readings;
  auto greedy = [&](const UnitMatch* skip) {
    Reading r;
    for (const UnitMatch& m : matches) {
      if (&m == skip) continue;
      bool free = true;
      for (const UnitMatch* chosen : r) free &= !m.Overlaps(*chosen);
      if (free) r.push_back(&m);
    }
    return r;
  };
  const Reading all = greedy(nullptr);
  readings.push_back(all);
  for (const UnitMatch* m : all) {
    if (m->group >= 0 || (bracketed && m->enclosing < 0)) continue;
    Reading r = greedy(m);
    if (std::find(readings.begin(), readings.end(), r) == readings.end()) {
      readings.push_back(std::move(r));
    }
  }
  return readings;
}

// How a reading ranks after its weight (oxidation.h, c and d): open-shell
// atoms in units read from bare runs, then atoms in units (more first).
struct ReadingTerms {
  int64_t weak_open_atoms = 0;
  int64_t unit_atoms = 0;

  bool operator<(const ReadingTerms& o) const {
    if (weak_open_atoms != o.weak_open_atoms) {
      return weak_open_atoms < o.weak_open_atoms;
    }
    return unit_atoms > o.unit_atoms;
  }
};

ReadingTerms TermsOf(const Plans& plans, const Solution& s) {
  ReadingTerms t;
  for (size_t i = 0; i < plans.size(); ++i) {
    const ElementPlan& p = plans[i];
    if (p.match == nullptr) continue;
    const Unit* u = p.units[s.choices[i].option];
    t.unit_atoms += p.scaled_count * u->total_atoms;
    if (p.match->weak)
      t.weak_open_atoms += p.scaled_count * u->open_shell_atoms;
  }
  return t;
}

// The best reading: its plans, its best solution, the threshold and the
// search phase it was found in.
struct BestReading {
  const Plans* plans = nullptr;  // One of Search::plan_buffers.
  Solution solution;
  ReadingTerms terms;
  double threshold = 0;
  bool strict = true;
  bool found = false;
};

// Searches every reading, strictly first (see Allowed), then, when no
// reading balances, leniently. Stops early when search->budget runs out.
BestReading SearchReadings(const Formula& formula,
                           const OxidationOptions& options,
                           const Rational& scale, Search* search) {
  BestReading best;
  bool bracketed = false;
  if (!search->matches.empty()) {
    for (const WrittenGroup& g : formula.groups) bracketed |= g.bracket == '[';
  }
  const ReadingList readings = Readings(search->matches, bracketed);
  // An organic unit written out in the formula (CH3NH3 in CH3NH3SnI3, an
  // abbreviation's expansion in MASnI3, C2O4 in an oxalate), its carbon
  // bonded to hydrogen: a reading that leaves every such unit's atoms free
  // is the lenient fallback only, as the unbracketed reading of a bracketed
  // complex is. Free, that carbon reads as a carbide beside protons, and
  // CH3NH3SnI3 read Sn(IV) with C-4 and N-3 where the compound is
  // methylammonium tin(II) iodide (Saparov and Mitzi, Chem. Rev. 116
  // (2016) 4558, from memory).
  const auto organic = [](const UnitMatch* m) {
    if (m->weak) return false;
    bool carbon = false, hydrogen = false;
    for (const UnitAtom& a : m->units.front()->atoms) {
      carbon |= a.element->atomic_number == 6;
      hydrogen |= a.element->atomic_number == 1;
    }
    return carbon && hydrogen;
  };
  bool organic_written = false;
  for (const UnitMatch& m : search->matches) organic_written |= organic(&m);
  // The buffer the next reading's plans go to; the other holds the best's.
  int work = 0;
  for (const bool strict : {true, false}) {
    search->strict = strict;
    for (const Reading& reading : readings) {
      // A formula that writes its complex in square brackets shows its
      // units: the reading without any is the lenient fallback only.
      if (bracketed && strict && reading.empty() && readings.size() > 1) {
        continue;
      }
      if (organic_written && strict && readings.size() > 1 &&
          std::none_of(reading.begin(), reading.end(), organic)) {
        continue;
      }
      bool weak = false;
      for (const UnitMatch* m : reading) weak |= m->weak;
      // A reading with open-shell units from bare runs cannot beat a
      // perfect one without them.
      if (best.found && weak && best.solution.weight == Weight() &&
          best.terms.weak_open_atoms == 0) {
        continue;
      }
      Plans& plans = search->plan_buffers[work];
      if (!MakePlans(formula, scale, search->scaled_counts, options, reading,
                     search->zintl, search->structure, search->order, &plans,
                     &search->plan_stores[work])) {
        continue;
      }
      const Weight bound =
          best.found ? Weight::FromPacked(best.solution.weight.packed() + 1)
                     : Weight::Infinite();
      double threshold = 0;
      Solution s = SolveReading(plans, Forbidden(), search, bound, &threshold);
      if (search->budget.exhausted) return best;
      if (s.weight.IsInfinite()) continue;
      const ReadingTerms terms = TermsOf(plans, s);
      if (best.found &&
          (best.solution.weight < s.weight ||
           (s.weight == best.solution.weight && !(terms < best.terms)))) {
        continue;
      }
      // MakePlans rebuilds a buffer from scratch: the next reading takes
      // the other one.
      best.plans = &plans;
      work = 1 - work;
      // Only the reading's items have choices (Solution): the rest of the
      // fixed array is not copied.
      best.solution.weight = s.weight;
      std::copy_n(s.choices.begin(), plans.size(),
                  best.solution.choices.begin());
      best.terms = terms;
      best.threshold = threshold;
      best.strict = strict;
      best.found = true;
    }
    if (best.found) break;
  }
  return best;
}

// The best assignment (or, when the declared states rule every one out,
// the best undeclared one) and the alternatives, into `result`. Stops
// early when search->budget runs out.
void SearchAssignments(const Formula& formula, const OxidationOptions& options,
                       const Rational& scale, Search* search,
                       OxidationResult* result) {
  search->matches = search->all_matches;
  if (!options.declared.empty()) {
    // Units do not swallow an element whose state the record declares.
    search->matches.erase(
        std::remove_if(search->matches.begin(), search->matches.end(),
                       [&](const UnitMatch& m) {
                         for (const UnitAtom& a : m.units.front()->atoms) {
                           for (const DeclaredState& d : options.declared) {
                             if (d.element == a.element) return true;
                           }
                         }
                         return false;
                       }),
        search->matches.end());
  }
  const BestReading best = SearchReadings(formula, options, scale, search);
  if (search->budget.exhausted) return;
  if (!best.found) {
    if (!options.declared.empty()) {
      OxidationOptions free = options;
      free.declared.clear();
      search->matches = search->all_matches;
      const BestReading s = SearchReadings(formula, free, scale, search);
      if (s.found) {
        result->without_declared =
            ToAssignment(formula, *s.plans, s.solution, scale);
      }
    }
    return;
  }
  const Plans& plans = *best.plans;
  result->best = ToAssignment(formula, plans, best.solution, scale);
  // A redox-incompatible best looks for a compatible alternative even
  // when none is to be reported.
  const bool incompatible = result->best->redox_incompatible.has_value();
  if (options.max_alternatives <= 0 && !incompatible) return;
  search->strict = best.strict;
  const double threshold = best.threshold;
  const ChargeItems items = ItemsOf(plans);
  // The alternatives have a budget of their own: when it runs out they
  // stop, and the best assignment stands.
  search->budget =
      internal::WorkBudget{search->one_mixed ? internal::kRestrictedCellVisits
                                             : internal::kRecordCellVisits,
                           false};

  // Alternatives: forbid, one element at a time, the option the best
  // assignment chose for it, and take the best of what remains.
  std::vector<std::pair<Weight, OxidationAssignment>> found;
  // Once max_alternatives are found, a search only matters if it comes
  // below the heaviest of the lightest max_alternatives (a tie ranks
  // after it, being found later; a duplicate of a skipped one would be
  // skipped too, weighing the same).
  std::vector<Weight> weights;
  const size_t wanted =
      static_cast<size_t>(incompatible ? std::max(options.max_alternatives, 3)
                                       : options.max_alternatives);
  // With no alternatives to report, a search only matters if it could
  // rank before every assignment found so far (RanksBefore): its weight
  // must be below the lightest of their ranking keys, in which a
  // redox-incompatible assignment counts one inconsistency more. A tie
  // ranks after what was found first.
  const auto rank_key = [](Weight w, const OxidationAssignment& a) {
    return a.redox_incompatible.has_value()
               ? Weight::FromPacked(w.packed() + Weight::kInconsistencyUnit)
               : w;
  };
  Weight rank_bound = rank_key(best.solution.weight, *result->best);
  // Forbidding an option of element i changes only its own narrow list:
  // the others are built once, and each search rebuilds element i's after
  // them (a list's place in Candidates::all does not matter).
  const bool reuse_narrow = !search->one_mixed;
  Candidates& candidates = SearchCandidates();
  size_t narrow_end = 0;
  if (reuse_narrow) {
    candidates.all.clear();
    BuildCandidates(plans, Forbidden(), threshold, /*common_only=*/true,
                    search->strict, &candidates);
    narrow_end = candidates.all.size();
  }
  // The best is the lightest assignment of these plans, so a search that
  // forbids one of its options finds nothing below it: one bounded by the
  // best's weight (a compatible alternative as light as the best set
  // rank_bound there) finds nothing at all, and may be skipped where that
  // changes no one's share of the budget. That holds when every search
  // stops at its narrow stage (a bound of at most one uncommon state) and
  // even all of them at their most could not exhaust the budget or hit
  // the cell limit (NarrowSearchWorkBound: forbidding shrinks the work).
  bool skip_hopeless = false;
  if (reuse_narrow && options.max_alternatives <= 0 &&
      rank_bound <= Weight::Uncommon(1)) {
    int64_t searches = 0;
    for (const ElementPlan& p : plans) searches += p.declared ? 0 : 1;
    int64_t cells = 0;
    const int64_t visits = internal::NarrowSearchWorkBound(
        items, candidates, search->target, &cells);
    skip_hopeless = cells <= internal::kMaxSearchCells &&
                    visits * searches <= search->budget.cell_visits;
  }
  for (size_t i = 0; i < plans.size(); ++i) {
    if (plans[i].declared) continue;
    Weight bound =
        options.max_alternatives <= 0 ? rank_bound : Weight::Infinite();
    if (found.size() >= wanted) {
      weights.clear();
      for (const auto& [w, unused] : found) weights.push_back(w);
      std::nth_element(weights.begin(), weights.begin() + (wanted - 1),
                       weights.end());
      bound = std::min(bound, weights[wanted - 1]);
    }
    if (skip_hopeless && bound <= best.solution.weight) continue;
    const StateOption& chosen =
        plans[i].options()[best.solution.choices[i].option];
    const Forbidden forbidden{static_cast<int>(i), chosen.low, chosen.high};
    CandidateList unforbidden;
    if (reuse_narrow) {
      unforbidden = candidates.narrow[i];
      candidates.all.resize(narrow_end);
      BuildList(plans, i, forbidden, threshold, /*common_only=*/true,
                search->strict, &candidates);
    }
    const Solution s = SolveStaged(plans, items, forbidden, threshold, search,
                                   bound, /*narrow_built=*/reuse_narrow);
    if (reuse_narrow) candidates.narrow[i] = unforbidden;
    if (search->budget.exhausted) {
      result->alternatives_cut = true;
      break;
    }
    if (s.weight.IsInfinite()) continue;
    OxidationAssignment a = ToAssignment(formula, plans, s, scale);
    bool duplicate = false;
    for (const auto& [w, other] : found) {
      if (other.states.size() != a.states.size()) continue;
      bool same = true;
      for (size_t k = 0; k < a.states.size() && same; ++k) {
        same = a.states[k].element == other.states[k].element &&
               a.states[k].state == other.states[k].state &&
               a.states[k].count == other.states[k].count;
      }
      duplicate |= same;
    }
    if (duplicate) continue;
    rank_bound = std::min(rank_bound, rank_key(s.weight, a));
    found.emplace_back(s.weight, std::move(a));
  }
  if (options.max_alternatives <= 0) {
    // Nothing to report but the best: the first of the lightest, which is
    // what the stable sort below would put first, without sorting.
    size_t first = found.size();  // found.size() for the best itself.
    for (size_t k = 0; k < found.size(); ++k) {
      const bool before =
          first == found.size()
              ? RanksBefore(found[k].first, found[k].second,
                            best.solution.weight, *result->best)
              : RanksBefore(found[k].first, found[k].second, found[first].first,
                            found[first].second);
      if (before) first = k;
    }
    if (first < found.size()) result->best = std::move(found[first].second);
    return;
  }
  found.emplace(found.begin(), best.solution.weight, *std::move(result->best));
  std::stable_sort(found.begin(), found.end(),
                   [](const auto& x, const auto& y) {
                     return RanksBefore(x.first, x.second, y.first, y.second);
                   });
  result->best = std::move(found.front().second);
  found.erase(found.begin());
  for (auto& [w, a] : found) {
    if (static_cast<int>(result->alternatives.size()) >=
        options.max_alternatives) {
      break;
    }
    result->alternatives.push_back(std::move(a));
  }
}

// The cells an exhaustive search with every state allowed would hold, at
// most: the charge window of each layer summed over the layers. A record
// whose window is too wide for kMaxSearchCells goes straight to the
// restricted search instead of spending its budget on the stages that
// come before the widest one.
// The widest span of an element's known states, 0 included (as
// WideSearchCells takes them), over the periodic table. A layer of the
// all-states search is no wider than its prefix's span plus one, so
// n x (scaled atoms x this + 1) bounds WideSearchCells from above.
int64_t WidestStateSpan() {
  static const int64_t kSpan = [] {
    int64_t widest = 0;
    for (const Element& e : AllElements()) {
      const absl::Span<const KnownOxidationState> known =
          internal::KnownStates(e);
      if (known.empty()) continue;
      widest = std::max<int64_t>(widest, std::max(0, known.back().state) -
                                             std::min(0, known.front().state));
    }
    return widest;
  }();
  return kSpan;
}

int64_t WideSearchCells(const Formula& formula,
                        absl::Span<const int64_t> scaled_counts,
                        int64_t target) {
  const size_t n = formula.amounts.size();
  std::array<int64_t, kMaxDistinctElements + 1> rest_min, rest_max;
  std::array<int64_t, kMaxDistinctElements> lo_state, hi_state;
  rest_min[n] = rest_max[n] = 0;
  for (size_t i = n; i-- > 0;) {
    const ElementAmount& a = formula.amounts[i];
    const int64_t c = scaled_counts[i];
    const absl::Span<const KnownOxidationState> known =
        internal::KnownStates(*a.element);
    lo_state[i] = known.empty() ? 0 : std::min(0, known.front().state);
    hi_state[i] = known.empty() ? 0 : std::max(0, known.back().state);
    rest_min[i] = rest_min[i + 1] + c * lo_state[i];
    rest_max[i] = rest_max[i + 1] + c * hi_state[i];
  }
  int64_t cells = 0, prefix_min = 0, prefix_max = 0;
  for (size_t i = 0; i < n; ++i) {
    const int64_t c = scaled_counts[i];
    prefix_min += c * lo_state[i];
    prefix_max += c * hi_state[i];
    const int64_t lo = std::max(prefix_min, target - rest_max[i + 1]);
    const int64_t hi = std::min(prefix_max, target - rest_min[i + 1]);
    if (hi >= lo) cells += hi - lo + 1;
  }
  return cells;
}

}  // namespace

absl::Span<const KnownOxidationState> KnownOxidationStates(
    const Element& element) {
  return internal::KnownStates(element);
}

namespace {

// The non-metals by atomic number: H, He, B, C, N, O, F, Ne, Si, P, S, Cl,
// Ar, Ge, As, Se, Br, Kr, Sb, Te, I, Xe, At, Rn, Ts, Og. A constant table:
// IsMetal runs several times a record.
constexpr std::array<bool, kMaxAtomicNumber + 1> MetalTable() {
  std::array<bool, kMaxAtomicNumber + 1> metal{};
  for (bool& m : metal) m = true;
  for (const int z : {1,  2,  5,  6,  7,  8,  9,  10, 14, 15, 16, 17,  18,
                      32, 33, 34, 35, 36, 51, 52, 53, 54, 85, 86, 117, 118}) {
    metal[z] = false;
  }
  return metal;
}

}  // namespace

bool IsMetal(const Element& e) {
  static constexpr std::array<bool, kMaxAtomicNumber + 1> kMetal = MetalTable();
  return kMetal[e.atomic_number];
}

namespace {

// The formal-state search of AssignOxidationStates, for an ionic
// composition or, with `zintl`, a Zintl phase.
absl::StatusOr<OxidationResult> AssignStates(const Formula& formula,
                                             const OxidationOptions& options,
                                             bool zintl);

}  // namespace

absl::StatusOr<OxidationResult> AssignOxidationStates(
    const Formula& formula, const OxidationOptions& options) {
  if (formula.amounts.empty()) {
    return absl::InvalidArgumentError("formula has no elements");
  }
  if (formula.amounts.size() > kMaxDistinctElements) {
    return absl::InvalidArgumentError(absl::StrCat(
        "formula has ", formula.amounts.size(),
        " distinct elements, above the limit of ", kMaxDistinctElements));
  }
  for (const DeclaredState& d : options.declared) {
    bool present = false;
    for (const ElementAmount& a : formula.amounts) {
      present |= a.element == d.element;
    }
    if (!present) {
      return absl::InvalidArgumentError(
          absl::StrCat("declared state for ", d.element->symbol,
                       ", which the formula does not contain"));
    }
  }
  OxidationResult result;
  result.bonding = ClassifyBonding(formula);
  bool declared_all_zero = true;
  for (const DeclaredState& d : options.declared) {
    declared_all_zero &= d.state == 0;
  }
  const CompositionKind kind = result.bonding.kind;
  // Every atom in state 0, for a metallic or intermetallic composition,
  // with the best ionic reading first among the alternatives of an
  // intermetallic one, for the user who wants one, unless the caller
  // already knows none balances.
  auto neutral = [&](OxidationResult r, bool formal_may_balance) {
    r.kind = r.bonding.kind;
    OxidationAssignment a;
    a.states.reserve(formula.amounts.size());
    for (const ElementAmount& amount : formula.amounts) {
      bool declared = false;
      for (const DeclaredState& d : options.declared) {
        declared |= d.element == amount.element;
      }
      a.states.push_back({amount.element, 0, amount.count, true, declared});
    }
    r.best = std::move(a);
    if (r.kind == CompositionKind::kIntermetallic && formal_may_balance) {
      OxidationOptions ionic = options;
      ionic.max_alternatives = std::max(0, options.max_alternatives - 1);
      absl::StatusOr<OxidationResult> formal =
          AssignStates(formula, ionic, /*zintl=*/false);
      if (formal.ok() && formal->best.has_value()) {
        r.alternatives.push_back(*std::move(formal->best));
        for (OxidationAssignment& other : formal->alternatives) {
          r.alternatives.push_back(std::move(other));
        }
        r.alternatives_cut = formal->alternatives_cut;
      }
    }
    return r;
  };
  // A net charge or a declared non-zero state asks for formal states.
  const bool formal_asked = options.net_charge != 0 || !declared_all_zero;
  if (!formal_asked && kind != CompositionKind::kIonic &&
      kind != CompositionKind::kZintl) {
    return neutral(std::move(result), /*formal_may_balance=*/true);
  }
  if (kind == CompositionKind::kZintl) {
    absl::StatusOr<OxidationResult> zintl =
        AssignStates(formula, options, /*zintl=*/true);
    if (!zintl.ok() || zintl->best.has_value()) {
      if (zintl.ok()) {
        zintl->kind = kind;
        zintl->bonding = result.bonding;
      }
      return zintl;
    }
    // No 8-N balance: formal states as for any compound.
  }
  absl::StatusOr<OxidationResult> formal =
      AssignStates(formula, options, /*zintl=*/false);
  if (formal.ok()) formal->bonding = result.bonding;
  if (kind == CompositionKind::kZintl && !formal_asked && formal.ok() &&
      !formal->best.has_value() && !formal->without_declared.has_value()) {
    // Neither the 8-N rule nor formal states balance it: not an
    // electron-precise Zintl phase but a polar intermetallic, as BaAl4,
    // BaSn3 and SrGa4 are (Nesper, Angew. Chem. Int. Ed. Engl. 30 (1991)
    // 789, from memory).
    result.bonding.kind = CompositionKind::kIntermetallic;
    result.bonding.rule =
        "an electropositive metal with p-block atoms that balance neither "
        "by the 8-N rule nor formally: a polar intermetallic";
    // The formal search just found no balance: no ionic reading to add.
    return neutral(std::move(result), /*formal_may_balance=*/false);
  }
  return formal;
}

namespace {

absl::StatusOr<OxidationResult> AssignStates(const Formula& formula,
                                             const OxidationOptions& options,
                                             bool zintl) {
  OxidationResult result;
  // Scale counts to integers: L, the least common denominator.
  int64_t lcd = 1;
  for (const ElementAmount& a : formula.amounts) {
    if (lcd % a.count.den() == 0) continue;  // Integer counts, mostly.
    lcd = std::lcm(lcd, a.count.den());
    if (lcd > kMaxStoichiometryDenominator) {
      return absl::InvalidArgumentError(absl::StrCat(
          "stoichiometry is too finely divided to balance exactly (common "
          "denominator above ",
          kMaxStoichiometryDenominator, ")"));
    }
  }
  int64_t scaled_atoms = 0;
  for (const ElementAmount& a : formula.amounts) {
    scaled_atoms += a.count.num() * (lcd / a.count.den());
  }
  if (scaled_atoms > kMaxScaledAtoms) {
    return absl::InvalidArgumentError(
        "stoichiometry is too large to balance (more than 10^6 atoms per "
        "formula unit after scaling to integers)");
  }
  struct Release {
    ~Release() { internal::ReleaseSearchScratch(); }
  } release;
  Search search;
  search.zintl = zintl;
  search.structure = StructureClassOf(formula);
  search.order = NonMetalOrderOf(formula);
  search.all_matches = FindUnitMatches(formula);
  // The same answer however the formula unit is written: the search runs
  // on the formula divided by the greatest common divisor g of its scaled
  // counts, net charge and unit counts (Ba2Bi2O6 as BaBiO3), and on twice
  // that when an element would have a single atom, which could not be
  // split over two states (BaBiO3 as Ba2Bi2O6, Bi3+ with Bi5+). The scale
  // is then L x m / g, with m = 1 or 2.
  int64_t g = std::abs(static_cast<int64_t>(options.net_charge) * lcd);
  // (Once g is 1 it stays 1.)
  for (const ElementAmount& a : formula.amounts) {
    if (g == 1) break;
    g = std::gcd(g, a.count.num() * (lcd / a.count.den()));
  }
  for (const UnitMatch& m : search.all_matches) {
    if (g == 1) break;
    if ((m.count * Rational(lcd)).IsInteger()) {
      g = std::gcd(g, (m.count * Rational(lcd)).num());
    }
  }
  int64_t twice = 1;
  for (const ElementAmount& a : formula.amounts) {
    if (a.count.num() * (lcd / a.count.den()) == g &&
        2 * scaled_atoms / g <= kMaxScaledAtoms) {
      twice = 2;
    }
  }
  const Rational scale(lcd * twice, g);
  search.target = (Rational(options.net_charge) * scale).num();
  // g divides every count times lcd, so these are exact.
  int64_t search_atoms = 0;
  for (const ElementAmount& a : formula.amounts) {
    search.scaled_counts.push_back(a.count.num() * (lcd / a.count.den()) / g *
                                   twice);
    search_atoms += search.scaled_counts.back();
  }
  // Most records are far inside the limit by the quick bound (at most
  // 48 x (10^6 x the span + 1): no overflow).
  const int64_t quick_cells = static_cast<int64_t>(formula.amounts.size()) *
                              (search_atoms * WidestStateSpan() + 1);
  if (quick_cells <= internal::kMaxSearchCells ||
      WideSearchCells(formula, search.scaled_counts, search.target) <=
          internal::kMaxSearchCells) {
    SearchAssignments(formula, options, scale, &search, &result);
    if (!search.budget.exhausted || result.alternatives_cut) return result;
  }
  // Too wide for the exhaustive search within the budget: search again
  // among assignments with at most one mixed-valence element.
  OxidationResult limited;
  limited.kind = result.kind;
  limited.one_mixed_search = true;
  search.one_mixed = true;
  search.budget = internal::WorkBudget{internal::kRestrictedCellVisits, false};
  SearchAssignments(formula, options, scale, &search, &limited);
  // "No balance" from the restricted search is no verdict: an assignment
  // with two or more mixed-valence elements may exist.
  if (!limited.best.has_value()) {
    return absl::ResourceExhaustedError(absl::StrCat(
        "balancing this stoichiometry exhaustively would exceed the work "
        "budget of one record, and no balance with at most one "
        "mixed-valence element was found",
        search.budget.exhausted ? " within it" : "",
        "; its counts are too finely divided for the number of elements"));
  }
  return limited;
}

}  // namespace

}  // namespace shellwright
