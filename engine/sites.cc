#include "engine/sites.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <initializer_list>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "absl/container/inlined_vector.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "engine/coordination.h"
#include "engine/internal/data_tables.h"
#include "engine/internal/lazy_element_rows.h"

namespace shellwright {
namespace {

constexpr int kZLithium = 3;
constexpr int kZOxygen = 8;
constexpr int kZFluorine = 9;
constexpr int kZSilicon = 14;
constexpr int kZSulfur = 16;
constexpr int kZCalcium = 20;
constexpr int kZTitanium = 22;
constexpr int kZVanadium = 23;
constexpr int kZChromium = 24;
constexpr int kZManganese = 25;
constexpr int kZCobalt = 27;
constexpr int kZNickel = 28;
constexpr int kZCopper = 29;
constexpr int kZGermanium = 32;
constexpr int kZSelenium = 34;
constexpr int kZStrontium = 38;
constexpr int kZYttrium = 39;
constexpr int kZRuthenium = 44;
constexpr int kZCadmium = 48;
constexpr int kZTellurium = 52;
constexpr int kZGadolinium = 64;
constexpr int kZLutetium = 71;
constexpr int kZMercury = 80;
constexpr int kZBismuth = 83;

// Counts are rationals; placements stop (no family) rather than risk
// overflow when a formula is too finely divided for them.
constexpr int64_t kMaxDenominator = 1000000;
constexpr int64_t kMaxNumerator = 1000000000;

bool Small(const Rational& r) {
  return r.den() <= kMaxDenominator && std::llabs(r.num()) <= kMaxNumerator;
}

// `v` to three decimals, without trailing zeros: "0.5", "16", "3.7". A
// piece for absl::StrCat and StrAppend, its digits held in the AlphaNum
// itself: no string is made for it.
absl::AlphaNum Rounded(double v) {
  const double r = std::round(v * 1000) / 1000;
  // Whole numbers, the usual case, without the floating-point formatter.
  if (r == std::trunc(r) && std::abs(r) < 1e9) {
    return absl::AlphaNum(static_cast<int64_t>(r));
  }
  return absl::AlphaNum(r);
}

// Large cations: the A site of perovskites and hexaferrites and the c site
// of garnets (8 to 12 oxygen neighbours). Alkali metals but Li, Ca, Sr,
// Ba, Ra, Y, the lanthanides, Pb2+ and Bi3+ (common practice, no source:
// Shannon radii above about 1 Å in 8-coordination).
bool IsLargeCation(const Element& e, int state) {
  const int z = e.atomic_number;
  if (e.group == 1) return z != 1 && z != kZLithium;
  if (e.group == 2) return z == 20 || z == 38 || z == 56 || z == 88;
  if (z == 39 || (z >= 57 && z <= 71)) return true;
  if (z == 82) return state == 2;
  if (z == 83) return state == 3;
  return false;
}

// Cations with a stereochemically active lone pair, kept off spinel sites
// (common practice, no source).
bool IsLonePairCation(const Element& e, int state) {
  const int z = e.atomic_number;
  return (z == 50 && state == 2) || (z == 51 && state == 3) ||
         (z == 81 && state == 1) || (z == 49 && state == 1) || z == 82 ||
         z == 83;
}

// A small cation of spinels, garnets and hexaferrites: a metal, Si or Ge,
// neither large nor a lone-pair cation.
bool IsSmallCation(const Element& e, int state) {
  const int z = e.atomic_number;
  return (IsMetal(e) || z == kZSilicon || z == kZGermanium) &&
         !IsLargeCation(e, state) && !IsLonePairCation(e, state);
}

// ---------------------------------------------------------------------------
// Octahedral site preference (data/site_preferences.tsv).

struct Preference {
  int strong = 1;  // 0 strongly tetrahedral, 1 none, 2 strongly octahedral.
  double ospe = 0;
  int weak = 0;  // 1 weakly octahedral.
  bool low_spin = false;
  bool from_d_count = false;  // Read from a "dN" row.
};

Preference FromRow(const internal::SitePreferenceRow& row) {
  Preference p;
  p.strong = row.preference == 't' ? 0 : row.preference == 'o' ? 2 : 1;
  p.ospe = row.ospe;
  p.weak = row.preference == 'w' ? 1 : 0;
  p.low_spin = row.low_spin;
  return p;
}

// The row of (e, state), else its d-count row, else none. Rows for spinels
// only count when `spinel` is true.
Preference LookupPreference(const Element& e, int state, bool spinel) {
  const absl::Span<const internal::SitePreferenceRow> rows =
      internal::SitePreferenceRows();
  for (const internal::SitePreferenceRow& row : rows) {
    if (row.d_electrons < 0 && row.atomic_number == e.atomic_number &&
        row.state == state && (spinel || !row.spinel_only)) {
      return FromRow(row);
    }
  }
  const int d = CoordinationDCount(e, state);
  if (d >= 1 && d <= 9 && e.block == Block::kD && e.period >= 5) {
    // A 4d or 5d ion with d electrons is low spin, and its octahedral
    // stabilisation (up to 2.4 Delta_o, Delta_o about half as large again
    // as for 3d) outweighs any 3d ion's: Rh3+ is octahedral in the normal
    // spinels CoRh2O4, CuRh2O4 and ZnRh2O4, and Ir in CuIr2S4 (Greenwood and
    // Earnshaw, Chemistry of the Elements, 2nd ed., from memory).
    Preference p;
    p.strong = 2;
    p.low_spin = true;
    return p;
  }
  if (d >= 0) {
    for (const internal::SitePreferenceRow& row : rows) {
      if (row.d_electrons == d) {
        Preference p = FromRow(row);
        p.from_d_count = true;
        return p;
      }
    }
  }
  return Preference();
}

// -1, 0 or 1: how `a` compares with `b` in octahedral preference.
int ComparePreference(const Preference& a, const Preference& b) {
  if (a.strong != b.strong) return a.strong < b.strong ? -1 : 1;
  if (a.ospe != b.ospe) return a.ospe < b.ospe ? -1 : 1;
  if (a.weak != b.weak) return a.weak < b.weak ? -1 : 1;
  return 0;
}

// ---------------------------------------------------------------------------
// Recognition.

// The record's ions, counted per family formula unit (4, 12, 19 or 3
// anions).
struct Ion {
  const Element* element;
  int state;
  Rational count;
  Preference preference;
  // The preference as OrderText writes it ("Ni2+ 86 kJ/mol"), where it
  // was read from the cache, else empty.
  absl::string_view preference_text;
  int tie = 0;  // The family's tie-break rank: lower goes tetrahedral first.
  size_t order = 0;  // Position in the assignment.
};
using Ions = absl::InlinedVector<Ion, 8>;

struct Shape {
  int anion_z = 0;
  Rational anions;
  Rational cations;
  double ratio = 0;  // cations / anions, for the cheap first test.
};

// Cheap first test, no allocation and no rational arithmetic: one anion
// element among O, F, S, Se, every other element a metal, Si or Ge.
bool ReadShape(const Formula& formula, Shape* shape) {
  const ElementAmount* anion = nullptr;
  double cations = 0;
  for (const ElementAmount& amount : formula.amounts) {
    const int z = amount.element->atomic_number;
    if (z == kZOxygen || z == kZFluorine || z == kZSulfur || z == kZSelenium) {
      if (anion != nullptr) return false;
      anion = &amount;
    } else if (IsMetal(*amount.element) || z == kZSilicon || z == kZGermanium) {
      cations += amount.count.ToDouble();
    } else {
      return false;
    }
  }
  if (anion == nullptr || cations == 0) return false;
  shape->anion_z = anion->element->atomic_number;
  shape->ratio = cations / anion->count.ToDouble();
  return true;
}

// The exact counts, once the ratio is promising.
void CountExactly(const Formula& formula, Shape* shape) {
  shape->cations = Rational();
  for (const ElementAmount& amount : formula.amounts) {
    if (amount.element->atomic_number == shape->anion_z) {
      shape->anions = amount.count;
    } else {
      shape->cations = shape->cations + amount.count;
    }
  }
}

// cations / anions == num / den.
bool RatioIs(const Shape& s, int num, int den) {
  // Cross-multiplied (denominators are positive), with no rational to
  // reduce.
  return static_cast<__int128>(s.cations.num()) * s.anions.den() * den ==
         static_cast<__int128>(s.anions.num()) * s.cations.den() * num;
}

// The same, in floating point, within rounding.
bool RatioNear(const Shape& s, int num, int den) {
  return std::abs(s.ratio - static_cast<double>(num) / den) < 1e-9;
}

struct FamilySpec {
  StructureFamily family;
  int anions;          // Per family formula unit.
  int cations;         // Per family formula unit.
  bool chalcogenides;  // S and Se allowed besides O.
  bool fluorides;
};

constexpr FamilySpec kSpinel = {StructureFamily::kSpinel, 4, 3, true, false};
constexpr FamilySpec kGarnet = {StructureFamily::kGarnet, 12, 8, false, false};
constexpr FamilySpec kHexaferrite = {StructureFamily::kHexaferrite, 19, 13,
                                     false, false};
constexpr FamilySpec kPerovskite = {StructureFamily::kPerovskite, 3, 2, false,
                                    true};

std::string AnionText(const FamilySpec& spec) {
  if (spec.chalcogenides) return "O, S or Se";
  if (spec.fluorides) return "O or F";
  return "O";
}

bool AnionFits(const FamilySpec& spec, const Shape& s) {
  return s.anion_z == kZOxygen ||
         (spec.chalcogenides &&
          (s.anion_z == kZSulfur || s.anion_z == kZSelenium)) ||
         (spec.fluorides && s.anion_z == kZFluorine);
}

// The cheap pattern test: the anion and the ratio in floating point.
bool Candidate(const FamilySpec& spec, const Shape& s) {
  return AnionFits(spec, s) && RatioNear(s, spec.cations, spec.anions);
}

// The exact pattern test of `spec` on the shape (after CountExactly).
// Fills `why` when not null.
bool ShapeFits(const FamilySpec& spec, const Shape& s, std::string* why) {
  if (!AnionFits(spec, s)) {
    if (why) {
      *why = absl::StrCat("needs ", AnionText(spec),
                          " as the only anion beside metal cations");
    }
    return false;
  }
  if (!RatioIs(s, spec.cations, spec.anions)) {
    if (why) {
      *why = absl::StrCat("needs ", spec.cations, " cations per ", spec.anions,
                          " anions, found ", s.cations.ToString(), " per ",
                          s.anions.ToString());
    }
    return false;
  }
  return true;
}

constexpr char kTooFine[] = "the counts are too finely divided";

// Record formula units per family formula unit: the record's anions over
// the family's, 1 with no arithmetic when they agree (Fe3O4, LaMnO3).
Rational RecordUnitsPerFamilyUnit(const FamilySpec& spec, const Shape& shape) {
  const Rational family_anions(spec.anions);
  return shape.anions == family_anions
             ? Rational(1)
             : shape.anions * Rational(1, spec.anions);
}

// Reads the assignment's ions, counted per family formula unit
// (`unscale` = RecordUnitsPerFamilyUnit). False (with `why`) when an ion
// sits in a unit, a cation is not positive, the anion is not in its usual
// state or the counts are too finely divided.
bool ReadIons(const OxidationAssignment& a, const FamilySpec& spec,
              const Shape& shape, const Rational& unscale, Ions* ions,
              std::string* why) {
  const bool unit_scale = unscale == Rational(1);
  const Rational scale =
      unit_scale ? unscale : Rational(unscale.den(), unscale.num());
  const int anion_state = shape.anion_z == kZFluorine ? -1 : -2;
  for (const AssignedState& s : a.states) {
    if (s.unit >= 0) {
      if (why) *why = "the assignment reads a polyatomic unit";
      return false;
    }
    if (s.element->atomic_number == shape.anion_z) {
      if (s.state != anion_state) {
        if (why) {
          *why = absl::StrCat(
              "the anion is ", FormatSpecies(s.element->symbol, s.state),
              ", not ", FormatSpecies(s.element->symbol, anion_state));
        }
        return false;
      }
      continue;
    }
    if (s.state <= 0) {
      if (why) {
        *why = absl::StrCat(FormatSpecies(s.element->symbol, s.state),
                            " is not a cation");
      }
      return false;
    }
    const Rational count = unit_scale ? s.count : s.count * scale;
    if (!Small(count) || count.den() > 1000) {
      if (why) *why = kTooFine;
      return false;
    }
    ions->push_back(Ion{s.element, s.state, count, Preference(), {}});
  }
  return true;
}

// Splits `ions` into the large cations and the others.
Rational LargeTotal(const Ions& ions) {
  Rational total;
  for (const Ion& ion : ions) {
    if (IsLargeCation(*ion.element, ion.state)) total = total + ion.count;
  }
  return total;
}

std::string Species(const Ion& ion) {
  return FormatSpecies(ion.element->symbol, ion.state);
}

// ---------------------------------------------------------------------------
// Filling sites.

// Sites filled together: a capacity shared by sites in fixed proportions.
struct Pool {
  Rational capacity;
  absl::InlinedVector<std::pair<int, Rational>, 3> shares;  // Site, share.
};

// a × b, with no arithmetic when b is 1 (the usual factor).
Rational Times(const Rational& a, const Rational& b) {
  return b.IsInteger() && b.num() == 1 ? a : a * b;
}

// The record's count of a family-unit count.
Rational ToRecord(const Rational& count, const Rational& unscale) {
  return Times(count, unscale);
}

void AddOccupant(Site* site, const Ion& ion, const Rational& count) {
  if (count.IsZero()) return;
  for (SiteOccupant& o : site->occupants) {
    if (o.element == ion.element && o.state == ion.state) {
      o.count = o.count + count;
      return;
    }
  }
  site->occupants.push_back(SiteOccupant{ion.element, ion.state, count});
}

// Appends "Ni2+ 86 kJ/mol" or "Zn2+ strongly tetrahedral" to `out`.
void AppendPreference(const Element& e, int state, const Preference& p,
                      std::string* out) {
  absl::StrAppend(out, FormatSpecies(e.symbol, state));
  if (p.low_spin) absl::StrAppend(out, " (low spin)");
  if (p.strong == 0) {
    absl::StrAppend(out, " strongly tetrahedral");
  } else if (p.strong == 2) {
    absl::StrAppend(out, " strongly octahedral");
  } else {
    absl::StrAppend(out, " ", Rounded(p.ospe), " kJ/mol");
    if (p.from_d_count) absl::StrAppend(out, " (isoelectronic row)");
    if (p.weak) absl::StrAppend(out, ", weakly octahedral");
  }
}

// A cation's preference and its text, read for a spinel or another family.
struct PreferenceEntry {
  Preference preference;
  std::string text;
};

// Cations in states 1 to kMaxCachedState read their preference from a
// cache, filled once per element: the lookup scans the table and every
// placement writes the texts.
constexpr int kMaxCachedState = 9;

// The cached entry of `e` in `state`, or null outside the cached states.
const PreferenceEntry* CachedPreference(const Element& e, int state,
                                        bool spinel) {
  if (state < 1 || state > kMaxCachedState) return nullptr;
  // Per state from 1, for another family and for a spinel.
  using Row = std::array<std::array<PreferenceEntry, 2>, kMaxCachedState>;
  static auto* const kTable = new internal::LazyElementRows<Row>;
  const Row& row = kTable->Get(e.atomic_number, [&e] {
    Row made;
    for (int q = 1; q <= kMaxCachedState; ++q) {
      for (const bool for_spinel : {false, true}) {
        PreferenceEntry& entry = made[q - 1][for_spinel ? 1 : 0];
        entry.preference = LookupPreference(e, q, for_spinel);
        AppendPreference(e, q, entry.preference, &entry.text);
      }
    }
    return made;
  });
  return &row[state - 1][spinel ? 1 : 0];
}

// Sets the preference of `ion`, read for a spinel or another family.
void ReadPreference(bool spinel, Ion* ion) {
  if (const PreferenceEntry* entry =
          CachedPreference(*ion->element, ion->state, spinel)) {
    ion->preference = entry->preference;
    ion->preference_text = entry->text;
  } else {
    ion->preference = LookupPreference(*ion->element, ion->state, spinel);
    ion->preference_text = {};
  }
}

// Sorts `ions` least octahedral first (preference, read for a spinel or
// another family, then the tie rank) and
// pours them into `pools` in order; ions that tie completely share a pool
// in proportion to their counts. Counts on sites are the record's
// (`unscale` = record formula units per family unit). False on overflow.
bool Pour(Ions* ions, absl::Span<const Pool> pools, const Rational& unscale,
          bool spinel, std::vector<Site>* sites) {
  for (Ion& ion : *ions) ReadPreference(spinel, &ion);
  // Formula order breaks the remaining ties (std::sort, unlike
  // std::stable_sort, allocates nothing).
  for (size_t k = 0; k < ions->size(); ++k) (*ions)[k].order = k;
  std::sort(ions->begin(), ions->end(), [](const Ion& a, const Ion& b) {
    const int c = ComparePreference(a.preference, b.preference);
    if (c != 0) return c < 0;
    if (a.tie != b.tie) return a.tie < b.tie;
    return a.order < b.order;
  });
  size_t pool = 0;
  Rational left = pools.empty() ? Rational() : pools[0].capacity;
  size_t i = 0;
  while (i < ions->size() && pool < pools.size()) {
    // A group of ions that tie completely.
    size_t end = i + 1;
    Rational group = (*ions)[i].count;
    while (end < ions->size() &&
           ComparePreference((*ions)[i].preference, (*ions)[end].preference) ==
               0 &&
           (*ions)[i].tie == (*ions)[end].tie) {
      group = group + (*ions)[end].count;
      ++end;
    }
    Rational remaining = group;  // Of the group, still to place.
    while (!remaining.IsZero() && pool < pools.size()) {
      // The rest of the group fits in what the pool has left, or fills it.
      const bool fits = !(left < remaining);
      const Rational take = fits ? remaining : left;
      // Each ion's part of `take`, in proportion to its count: all of a
      // lone ion's, all of each count when the whole group fits.
      const bool alone = end == i + 1;
      const Rational fraction = alone || take == group
                                    ? Rational(1)
                                    : take * Rational(group.den(), group.num());
      for (size_t k = i; k < end; ++k) {
        const Rational amount =
            alone ? take : Times((*ions)[k].count, fraction);
        for (const auto& [site, share] : pools[pool].shares) {
          const Rational placed = ToRecord(Times(amount, share), unscale);
          if (!Small(placed)) return false;
          AddOccupant(&(*sites)[site], (*ions)[k], placed);
        }
      }
      // Whichever was taken in full is now empty.
      if (fits) {
        left = left - take;
        remaining = Rational();
      } else {
        remaining = remaining - take;
        left = Rational();
      }
      if (!Small(remaining) || !Small(left)) return false;
      if (left.IsZero() && ++pool < pools.size()) left = pools[pool].capacity;
    }
    i = end;
  }
  return true;
}

// "Fe3+ 0 kJ/mol, Ni2+ 86 kJ/mol": the ions in the order they were placed.
std::string OrderText(const Ions& ions) {
  size_t size = 0;  // Of the cached texts and the separators.
  for (const Ion& ion : ions) size += ion.preference_text.size() + 2;
  std::string text;
  text.reserve(size);
  for (const Ion& ion : ions) {
    if (!text.empty()) text += ", ";
    if (ion.preference_text.empty()) {
      AppendPreference(*ion.element, ion.state, ion.preference, &text);
    } else {
      text.append(ion.preference_text.data(), ion.preference_text.size());
    }
  }
  return text;
}

constexpr absl::string_view kPreferenceSource =
    "octahedral site preference energies after Dunitz and Orgel 1957 and "
    "McClure 1957, data/site_preferences.tsv";

struct SiteSpec {
  absl::string_view name;  // In static storage (Site::name).
  Geometry geometry;
  int direction;
};

// Adds `sites` to `p`, each with room for `room` occupants (each ion of
// the placement at most once), so that filling them reallocates nothing.
void AddSites(std::initializer_list<SiteSpec> sites, size_t room,
              SitePlacement* p) {
  p->sites.reserve(sites.size());
  for (const SiteSpec& spec : sites) {
    Site& site = p->sites.emplace_back(
        Site{spec.name, spec.geometry, spec.direction, {}});
    site.occupants.reserve(room);
  }
}

// ---------------------------------------------------------------------------
// The families.

std::optional<SitePlacement> PlaceSpinel(Ions ions, const Rational& unscale,
                                         std::string* why) {
  for (const Ion& ion : ions) {
    if (!IsSmallCation(*ion.element, ion.state)) {
      if (why)
        *why = absl::StrCat(Species(ion), " is too large for a spinel site");
      return std::nullopt;
    }
  }
  // The A-type charge: the lowest charge whose ions sum to one per AB2X4,
  // else the lowest charge.
  int lowest = 1000;
  int a_type = 0;
  for (size_t i = 0; i < ions.size(); ++i) {
    const int state = ions[i].state;
    lowest = std::min(lowest, state);
    // Each charge is summed once, from its first ion on.
    bool summed = false;
    for (size_t j = 0; j < i; ++j) summed |= ions[j].state == state;
    if (summed) continue;
    Rational total = ions[i].count;
    for (size_t j = i + 1; j < ions.size(); ++j) {
      if (ions[j].state == state) total = total + ions[j].count;
    }
    if (total == Rational(1) && (a_type == 0 || state < a_type)) {
      a_type = state;
    }
  }
  if (a_type == 0) a_type = lowest;
  for (Ion& ion : ions) ion.tie = ion.state == a_type ? 0 : 1;

  SitePlacement p;
  p.family = StructureFamily::kSpinel;
  AddSites({{"A (tetrahedral)", Geometry::kTetrahedral, -1},
            {"B (octahedral)", Geometry::kOctahedral, +1}},
           ions.size(), &p);
  const Pool pools[] = {{Rational(1), {{0, Rational(1)}}},
                        {Rational(2), {{1, Rational(1)}}}};
  if (!Pour(&ions, pools, unscale, /*spinel=*/true, &p.sites)) {
    if (why) *why = kTooFine;
    return std::nullopt;
  }
  Rational a_type_on_a;
  for (const SiteOccupant& o : p.sites[0].occupants) {
    if (o.state == a_type) a_type_on_a = a_type_on_a + o.count;
  }
  // The tetrahedral site holds one per AB2X4: its share of the record.
  const double inversion =
      1.0 - (a_type_on_a * Rational(unscale.den(), unscale.num())).ToDouble();
  p.inversion = std::abs(inversion) < 1e-12 ? 0.0 : inversion;
  const char* kind = *p.inversion == 0   ? "normal"
                     : *p.inversion == 1 ? "inverse"
                                         : "partly inverse";
  p.note = absl::StrCat(
      kind, " spinel (inversion ", Rounded(*p.inversion),
      ", the fraction of the tetrahedral site not held by the ", a_type,
      "+ ions): the tetrahedral A site takes the ions of least octahedral "
      "preference, in order ",
      OrderText(ions), " (", kPreferenceSource,
      "); ties keep the normal distribution");
  return p;
}

// Mg2+, Mn2+, Fe2+ and Ca2+: the c-site ions of silicate and germanate
// garnets (pyrope, spessartine, almandine, grossular).
bool IsGarnetDivalent(const Ion& ion) {
  const int z = ion.element->atomic_number;
  return ion.state == 2 && (z == 12 || z == 25 || z == 26 || z == 20);
}

std::optional<SitePlacement> PlaceGarnet(Ions ions, const Rational& unscale,
                                         std::string* why) {
  Rational large = LargeTotal(ions);
  bool silicate = false;
  if (large != Rational(3)) {
    // Silicate and germanate garnets with small divalent c ions.
    Rational si_ge, divalent;
    for (const Ion& ion : ions) {
      const int z = ion.element->atomic_number;
      if (z == kZSilicon || z == kZGermanium) si_ge = si_ge + ion.count;
      if (IsGarnetDivalent(ion)) divalent = divalent + ion.count;
    }
    if (!large.IsZero() || si_ge != Rational(3) || divalent != Rational(3)) {
      if (why) {
        *why = absl::StrCat(
            "needs 3 large cations (Y, lanthanides, Bi3+, Ca2+, Na+) per 12 "
            "O, or 3 Si/Ge beside 3 Mg2+, Mn2+, Fe2+ or Ca2+, found ",
            large.ToString(), " large");
      }
      return std::nullopt;
    }
    silicate = true;
  }
  SitePlacement p;
  p.family = StructureFamily::kGarnet;
  AddSites({{"c (dodecahedral)", Geometry::kTetrahedral, -1},
            {"a (octahedral)", Geometry::kOctahedral, -1},
            {"d (tetrahedral)", Geometry::kTetrahedral, +1}},
           ions.size(), &p);
  Ions rest;
  for (const Ion& ion : ions) {
    const bool on_c = silicate ? IsGarnetDivalent(ion)
                               : IsLargeCation(*ion.element, ion.state);
    if (on_c) {
      AddOccupant(&p.sites[0], ion, ToRecord(ion.count, unscale));
      continue;
    }
    if (!IsSmallCation(*ion.element, ion.state)) {
      if (why)
        *why = absl::StrCat(Species(ion), " fits neither garnet a nor d site");
      return std::nullopt;
    }
    rest.push_back(ion);
    // Ties: the lighter (smaller) ion takes the tetrahedral site.
    rest.back().tie = ion.element->atomic_number;
  }
  const Pool pools[] = {{Rational(3), {{2, Rational(1)}}},
                        {Rational(2), {{1, Rational(1)}}}};
  if (!Pour(&rest, pools, unscale, /*spinel=*/false, &p.sites)) {
    if (why) *why = kTooFine;
    return std::nullopt;
  }
  p.note = absl::StrCat(
      "garnet {c3}[a2](d3)O12: ",
      silicate ? "the divalent ions beside Si/Ge" : "the large cations",
      " on the dodecahedral c site; the tetrahedral d site takes the ions of "
      "least octahedral preference, in order ",
      OrderText(rest), " (", kPreferenceSource,
      "); ties put the lighter ion on d");
  return p;
}

std::optional<SitePlacement> PlaceHexaferrite(Ions ions,
                                              const Rational& unscale,
                                              std::string* why) {
  if (LargeTotal(ions) != Rational(1)) {
    if (why) {
      *why = absl::StrCat(
          "needs one large cation (Ba, Sr, Pb2+, Ca, La) per 19 O, found ",
          LargeTotal(ions).ToString());
    }
    return std::nullopt;
  }
  SitePlacement p;
  p.family = StructureFamily::kHexaferrite;
  AddSites({{"A (12-coordinate)", Geometry::kFree, 0},
            {"12k (octahedral)", Geometry::kOctahedral, +1},
            {"4f1 (tetrahedral)", Geometry::kTetrahedral, -1},
            {"4f2 (octahedral)", Geometry::kOctahedral, -1},
            {"2a (octahedral)", Geometry::kOctahedral, +1},
            {"2b (trigonal bipyramidal)", Geometry::kFree, +1}},
           ions.size(), &p);
  Ions rest;
  for (const Ion& ion : ions) {
    if (IsLargeCation(*ion.element, ion.state)) {
      AddOccupant(&p.sites[0], ion, ToRecord(ion.count, unscale));
      continue;
    }
    if (!IsSmallCation(*ion.element, ion.state)) {
      if (why) *why = absl::StrCat(Species(ion), " fits no hexaferrite site");
      return std::nullopt;
    }
    rest.push_back(ion);
    // Ties: the majority ion keeps the tetrahedral and bipyramidal sites.
    rest.back().tie = static_cast<int>(-ion.count.ToDouble() * 1000);
  }
  const Pool pools[] = {
      {Rational(2), {{2, Rational(1)}}},
      {Rational(1), {{5, Rational(1)}}},
      {Rational(9),
       {{1, Rational(6, 9)}, {3, Rational(2, 9)}, {4, Rational(1, 9)}}}};
  if (!Pour(&rest, pools, unscale, /*spinel=*/false, &p.sites)) {
    if (why) *why = kTooFine;
    return std::nullopt;
  }
  p.note = absl::StrCat(
      "magnetoplumbite hexaferrite AB12O19: the large cation on the A site; "
      "the tetrahedral 4f1 and then the bipyramidal 2b site take the ions of "
      "least octahedral preference, in order ",
      OrderText(rest), " (", kPreferenceSource,
      "); ties leave them to the majority ion; the rest share 12k, 4f2 and 2a "
      "in proportion to their multiplicity (no preference among octahedral "
      "sites)");
  return p;
}

std::optional<SitePlacement> PlacePerovskite(const Ions& ions,
                                             const Rational& unscale,
                                             std::string* why) {
  Rational large, small;
  for (const Ion& ion : ions) {
    if (IsLargeCation(*ion.element, ion.state)) {
      large = large + ion.count;
    } else if (IsMetal(*ion.element)) {
      small = small + ion.count;
    } else {
      if (why) *why = absl::StrCat(Species(ion), " fits no perovskite site");
      return std::nullopt;
    }
  }
  if (large != Rational(1) || small != Rational(1)) {
    if (why) {
      *why = absl::StrCat(
          "needs one large A cation (alkali but Li, Ca, Sr, Ba, Pb2+, Bi3+, "
          "Y, lanthanides) and one small B cation per 3 anions, found ",
          large.ToString(), " and ", small.ToString());
    }
    return std::nullopt;
  }
  SitePlacement p;
  p.family = StructureFamily::kPerovskite;
  AddSites({{"A (12-coordinate)", Geometry::kFree, 0},
            {"B (octahedral)", Geometry::kOctahedral, +1}},
           ions.size(), &p);
  for (const Ion& ion : ions) {
    const int site = IsLargeCation(*ion.element, ion.state) ? 0 : 1;
    AddOccupant(&p.sites[site], ion, ToRecord(ion.count, unscale));
  }
  p.note =
      "perovskite ABX3: the large cations on the 12-coordinate A site, the "
      "small ones on the octahedral B site";
  return p;
}

std::optional<SitePlacement> TryFamily(const FamilySpec& spec,
                                       const Shape& shape,
                                       const OxidationAssignment& a,
                                       std::string* why) {
  if (!ShapeFits(spec, shape, why)) return std::nullopt;
  const Rational unscale = RecordUnitsPerFamilyUnit(spec, shape);
  Ions ions;
  if (!ReadIons(a, spec, shape, unscale, &ions, why)) return std::nullopt;
  std::optional<SitePlacement> p;
  switch (spec.family) {
    case StructureFamily::kSpinel:
      p = PlaceSpinel(std::move(ions), unscale, why);
      break;
    case StructureFamily::kGarnet:
      p = PlaceGarnet(std::move(ions), unscale, why);
      break;
    case StructureFamily::kHexaferrite:
      p = PlaceHexaferrite(std::move(ions), unscale, why);
      break;
    case StructureFamily::kPerovskite:
      p = PlacePerovskite(ions, unscale, why);
      break;
    case StructureFamily::kNone:
      break;
  }
  if (p.has_value()) p->anion_z = shape.anion_z;
  return p;
}

const FamilySpec* SpecOf(FamilyChoice choice) {
  switch (choice) {
    case FamilyChoice::kSpinel:
      return &kSpinel;
    case FamilyChoice::kGarnet:
      return &kGarnet;
    case FamilyChoice::kHexaferrite:
      return &kHexaferrite;
    case FamilyChoice::kPerovskite:
      return &kPerovskite;
    case FamilyChoice::kAuto:
    case FamilyChoice::kOff:
      break;
  }
  return nullptr;
}

// The Cr3S4 type (docs/method.md, "Sites and sublattices"). A sulfide,
// selenide or telluride with 3 metal cations per 4 anions is a spinel only
// when, per AB2X4, one cation is fit for the tetrahedral A site among
// these soft anions: a closed-shell cation (d0, d10 or main group: Cu+,
// Zn2+, Cd2+, Hg2+, Ga3+, In3+, Mg2+), or, in sulfides only, Mn, Fe or Co
// (high-spin d5 to d7: FeCr2S4, MnCr2S4, CoCr2S4, greigite Fe3S4,
// linnaeite Co3S4) unless Ti or V sits beside it, and Ni unless Ti, V or
// Cr does (polydymite Ni3S4 and violarite FeNi2S4 are spinels, NiCr2S4 is
// not). Otherwise the compound takes the monoclinic Cr3S4 type, a NiAs
// derivative with every metal octahedral and every other metal layer
// half empty: Cr3S4, Cr3Se4, Cr3Te4, V3S4, V3Se4, Ti3S4, Fe3Se4, Fe3Te4,
// Co3Se4, Ni3Se4, FeV2S4, NiCr2S4, FeCr2Se4 (Hulliger, Structural
// Chemistry of Layer-Type Phases (1976); Jellinek, Acta Cryst. 10 (1957)
// 620; Wells, Structural Inorganic Chemistry, 5th ed.; all from memory).
// Returns false, touching nothing, for any other composition.
bool IsDefectNiAsChalcogenide(const OxidationAssignment& a, std::string* note) {
  // Most records hold no S, Se or Te: they leave before any count is summed.
  bool chalcogen = false;
  for (const AssignedState& s : a.states) {
    const int z = s.element->atomic_number;
    chalcogen |= z == kZSulfur || z == kZSelenium || z == kZTellurium;
  }
  if (!chalcogen) return false;
  int anion_z = 0;
  Rational anions, cations, fit;
  bool early = false;  // Ti or V among the cations.
  bool chromium = false;
  for (const AssignedState& s : a.states) {
    const int z = s.element->atomic_number;
    if (s.unit >= 0) return false;
    if (z == kZSulfur || z == kZSelenium || z == kZTellurium) {
      if ((anion_z != 0 && anion_z != z) || s.state != -2) return false;
      anion_z = z;
      anions = anions + s.count;
      continue;
    }
    if (s.state <= 0 || !IsSmallCation(*s.element, s.state)) return false;
    cations = cations + s.count;
    early |= z == kZTitanium || z == kZVanadium;
    chromium |= z == kZChromium;
  }
  if (anion_z == 0 || cations.IsZero() ||
      !(cations * Rational(4) == anions * Rational(3))) {
    return false;
  }
  for (const AssignedState& s : a.states) {
    if (s.state <= 0) continue;
    const Element& e = *s.element;
    const int z = e.atomic_number;
    const int d = e.group - s.state;
    const bool closed =
        e.block != Block::kD || d == 0 || (e.group >= 11 && d == 10);
    const bool sulfide = anion_z == kZSulfur;
    const bool mid = sulfide && !early && z >= kZManganese && z <= kZCobalt;
    const bool nickel = sulfide && !early && !chromium && z == kZNickel;
    if (closed || mid || nickel) fit = fit + s.count;
  }
  // One fit cation per 4 anions at least.
  if (!(fit * Rational(4) < anions)) return false;
  if (note != nullptr) {
    *note =
        "not a spinel: no cation fit for a tetrahedral site among these "
        "anions, so every metal is octahedral, as in the monoclinic Cr3S4 "
        "type (defect NiAs) of the 3d metals (Hulliger, Structural "
        "Chemistry of Layer-Type Phases, 1976, from memory); no sublattice "
        "saturation moment is estimated";
  }
  return true;
}

}  // namespace

std::optional<SitePlacement> PlaceIons(const Formula& formula,
                                       const OxidationAssignment& a,
                                       FamilyChoice choice,
                                       std::string* why_not) {
  if (why_not != nullptr) why_not->clear();
  if (choice == FamilyChoice::kOff) return std::nullopt;
  Shape shape;
  // A charged formula (an ion) is no crystal of a family.
  const bool shape_ok =
      formula.charge.value_or(0) == 0 && ReadShape(formula, &shape);
  if (const FamilySpec* spec = SpecOf(choice)) {
    std::string why;
    std::optional<SitePlacement> p;
    if (!shape_ok) {
      why = absl::StrCat("needs a neutral formula with ", AnionText(*spec),
                         " as the only anion beside metal cations");
    } else {
      CountExactly(formula, &shape);
      p = TryFamily(*spec, shape, a, &why);
    }
    if (!p.has_value() && why_not != nullptr) {
      *why_not = absl::StrCat(Name(spec->family), ": ", why);
    }
    return p;
  }
  // kAuto: the ratio picks at most two candidate families; nothing is
  // allocated before one matches.
  if (!shape_ok) return std::nullopt;
  bool counted = false;
  for (const FamilySpec* spec :
       {&kSpinel, &kPerovskite, &kHexaferrite, &kGarnet}) {
    if (!Candidate(*spec, shape)) continue;
    if (spec == &kSpinel && shape.anion_z != kZOxygen &&
        IsDefectNiAsChalcogenide(a, nullptr)) {
      continue;
    }
    if (!counted) {
      CountExactly(formula, &shape);
      counted = true;
    }
    if (std::optional<SitePlacement> p = TryFamily(*spec, shape, a, nullptr)) {
      return p;
    }
  }
  return std::nullopt;
}

std::optional<std::string> DefectNiAsNote(const OxidationAssignment& a) {
  std::string note;
  if (!IsDefectNiAsChalcogenide(a, &note)) return std::nullopt;
  return note;
}

double OrderedIonMoment(const AtomDescription& ion) {
  return ion.moments.recommended_basis == MomentBasis::kJ
             ? ion.moments.saturation
             : ion.moments.spin_moment;
}

namespace {

constexpr double kNoMoment = 1e-9;

absl::AlphaNum Mu(double v) { return Rounded(v); }

// Σ count × moment of site `s`, from `m` at `*next`.
double SiteMoment(const Site& s, absl::Span<const double> m, size_t* next) {
  double total = 0;
  for (const SiteOccupant& o : s.occupants) {
    total += o.count.ToDouble() * m[(*next)++];
  }
  return total;
}

SublatticeMoment Undetermined(std::string note) {
  SublatticeMoment r;
  r.determined = false;
  r.note = std::move(note);
  return r;
}

// Appends the names of the sites of one side (`direction` +1 or -1) to
// `out`, joined by " + ".
void AppendSiteNames(const SitePlacement& p, int direction, std::string* out) {
  bool first = true;
  for (const Site& s : p.sites) {
    if (direction > 0 ? s.direction <= 0 : s.direction >= 0) continue;
    if (!first) out->append(" + ");
    out->append(s.name.data(), s.name.size());
    first = false;
  }
}

// A sulfide or selenide spinel ACr2X4 with A = Cd or Hg (no moment) and
// Cr3+ alone on B: CdCr2S4, CdCr2Se4 and HgCr2Se4 are ferromagnets, 3 μB
// per Cr (Baltzer, Wojtowicz, Robbins and Lopatin, Phys. Rev. 151 (1966)
// 367, from memory); HgCr2S4 reaches that in a small field. ZnCr2S4 and
// ZnCr2Se4, with a smaller cell, order as antiferromagnetic spirals, and the
// oxide spinels antiferromagnetically. With Cu(I) on A the B site holds
// Cr3+ and Cr4+: CuCr2S4 and CuCr2Se4 are ferromagnets of about 5 μB per
// formula unit (Lotgering, Solid State Commun. 2 (1964) 55, from memory).
bool FerromagneticChromiumSpinel(const SitePlacement& p,
                                 absl::Span<const double> moments) {
  if (p.family != StructureFamily::kSpinel ||
      (p.anion_z != kZSulfur && p.anion_z != kZSelenium)) {
    return false;
  }
  size_t next = 0;
  bool chromium = false;
  for (const Site& s : p.sites) {
    for (const SiteOccupant& o : s.occupants) {
      const int z = o.element->atomic_number;
      const bool magnetic = moments[next++] >= kNoMoment;
      if (s.direction < 0) {  // The tetrahedral A site.
        if (magnetic || (z != kZCadmium && z != kZMercury &&
                         (z != kZCopper || o.state != 1))) {
          return false;
        }
      } else {
        if (z != kZChromium || (o.state != 3 && o.state != 4)) return false;
        chromium = true;
      }
    }
  }
  return chromium;
}

// An oxide spinel with no moment on the tetrahedral A site and Ni2+ beside
// Mn4+ on B, as the 1:3 ordered LiNi0.5Mn1.5O4 (Li2NiMn3O8): Ni and Mn
// order antiparallel, a ferrimagnet below about 130 K (Blasse, J. Phys.
// Chem. Solids 27 (1966) 383, and the cathode literature since, from
// memory). Returns the B-site moments of Mn and of Ni, or nullopt.
std::optional<std::pair<double, double>> NickelManganeseSpinel(
    const SitePlacement& p, absl::Span<const double> moments) {
  if (p.family != StructureFamily::kSpinel || p.anion_z != kZOxygen) {
    return std::nullopt;
  }
  size_t next = 0;
  double manganese = 0, nickel = 0;
  for (const Site& s : p.sites) {
    for (const SiteOccupant& o : s.occupants) {
      const double m = o.count.ToDouble() * moments[next++];
      if (m < kNoMoment) continue;
      const int z = o.element->atomic_number;
      if (s.direction < 0) return std::nullopt;  // A moment on A.
      if (z == kZManganese && o.state == 4) {
        manganese += m;
      } else if (z == kZNickel && o.state == 2) {
        nickel += m;
      } else {
        return std::nullopt;
      }
    }
  }
  if (manganese < kNoMoment || nickel < kNoMoment) return std::nullopt;
  return std::make_pair(manganese, nickel);
}

// The family rules below fill the note only when `describe` is true: the
// corners of a range need the number alone.
SublatticeMoment TwoSided(const SitePlacement& p,
                          absl::Span<const double> moments, bool describe) {
  size_t next = 0;
  double up = 0, down = 0;
  for (const Site& s : p.sites) {
    const double m = SiteMoment(s, moments, &next);
    if (s.direction > 0) {
      up += m;
    } else if (s.direction < 0) {
      down += m;
    }
  }
  SublatticeMoment r;
  const bool one_side_empty = up < kNoMoment || down < kNoMoment;
  if (one_side_empty && FerromagneticChromiumSpinel(p, moments)) {
    r.saturation = up + down;
    if (!describe) return r;
    r.note = absl::StrCat(
        "chalcogenide spinel with Cr alone on the octahedral site and Cd, "
        "Hg or Cu(I) on the tetrahedral one: the 90° Cr–X–Cr superexchange "
        "is ferromagnetic and wins (Baltzer et al., Phys. Rev. 151 (1966) "
        "367; Lotgering, Solid State Commun. 2 (1964) 55; from memory): ",
        Mu(r.saturation),
        " μB per formula unit at 0 K; the Zn compounds and the oxides order "
        "antiferromagnetically");
    return r;
  }
  if (one_side_empty) {
    if (const auto ni_mn = NickelManganeseSpinel(p, moments)) {
      r.saturation = std::abs(ni_mn->first - ni_mn->second);
      if (!describe) return r;
      r.note = absl::StrCat(
          "oxide spinel with Ni2+ and Mn4+ on the octahedral site and no "
          "moment on the tetrahedral one (LiNi0.5Mn1.5O4): Ni orders "
          "antiparallel to Mn, a ferrimagnet (Blasse, J. Phys. Chem. Solids "
          "27 (1966) 383, from memory): |",
          Mu(ni_mn->first), " − ", Mu(ni_mn->second), "| = ", Mu(r.saturation),
          " μB per formula unit at 0 K; Ni/Mn disorder and Mn3+ lower real "
          "samples' moments");
      return r;
    }
  }
  r.saturation = one_side_empty ? 0 : std::abs(up - down);
  if (!describe) return r;
  r.note.reserve(256);  // Room for the usual note, filled piece by piece.
  r.note = "Néel collinear model: ";
  AppendSiteNames(p, +1, &r.note);
  absl::StrAppend(&r.note, " ", Mu(up), " μB against ");
  AppendSiteNames(p, -1, &r.note);
  absl::StrAppend(&r.note, " ", Mu(down), " μB");
  if (one_side_empty) {
    absl::StrAppend(
        &r.note,
        "; one sublattice carries no moment, so the other orders "
        "antiferromagnetically within itself and the net moment is 0 "
        "(Smit and Wijn, Ferrites, 1959, from memory)");
  } else {
    absl::StrAppend(&r.note, ", net ", Mu(r.saturation),
                    " μB per formula unit");
  }
  return r;
}

// True for a lanthanide ion whose 4f shell is less than half full (Ce3+ to
// Sm3+): J = L − S, so its moment points against its spin.
bool IsLightLanthanide(const Element& e, int state) {
  const int z = e.atomic_number;
  const int f = z - 54 - state;  // 4f electrons beyond the Xe core.
  return z >= 57 && z <= 71 && f > 0 && f < 7;
}

SublatticeMoment Garnet(const SitePlacement& p,
                        absl::Span<const double> moments, bool describe) {
  size_t next = 0;
  const size_t first_c = 0;  // c is the first site.
  const double c = SiteMoment(p.sites[0], moments, &next);
  const double a = SiteMoment(p.sites[1], moments, &next);
  const double d = SiteMoment(p.sites[2], moments, &next);
  SublatticeMoment r;
  if (a < kNoMoment || d < kNoMoment) {
    r.saturation = 0;
    if (!describe) return r;
    r.note = absl::StrCat(
        "Néel collinear model: a ", Mu(a), " μB, d ", Mu(d),
        " μB; one of them carries no moment, so the other orders "
        "antiferromagnetically within itself and the c ions (",
        Mu(c),
        " μB) are left without an ordered partner: net 0 (Smit and Wijn, "
        "Ferrites, 1959, from memory)");
    return r;
  }
  // The c ions' spins couple antiparallel to the net iron spin; a heavy
  // rare earth's moment follows its spin, a light one's (J = L − S) points
  // against it, along the iron moment.
  const double iron = std::abs(d - a);
  double against = 0, along = 0;
  for (size_t i = 0; i < p.sites[0].occupants.size(); ++i) {
    const SiteOccupant& o = p.sites[0].occupants[i];
    const double m = o.count.ToDouble() * moments[first_c + i];
    if (IsLightLanthanide(*o.element, o.state)) {
      along += m;
    } else {
      against += m;
    }
  }
  r.saturation = std::abs(iron + along - against);
  if (!describe) return r;
  const std::string fe =
      absl::StrCat("Néel collinear model: d ", Mu(d), " μB against a ", Mu(a),
                   " μB, net ", Mu(iron), " μB");
  if (against + along < kNoMoment) {
    r.note =
        absl::StrCat(fe, "; the c ions carry no moment: ", Mu(r.saturation),
                     " μB per formula unit at 0 K");
    return r;
  }
  r.note = absl::StrCat(
      fe, "; the c ions' spins align antiparallel to it, so that ",
      against > 0 ? absl::StrCat(Mu(against),
                                 " μB (heavy rare earths and others) point "
                                 "against it")
                  : "",
      against > 0 && along > 0 ? " and " : "",
      along > 0 ? absl::StrCat(Mu(along),
                               " μB (light rare earths, J = L − S) point "
                               "along it")
                : "",
      ": ", Mu(r.saturation),
      " μB per formula unit at 0 K (Néel 1948; Pauthenet 1958 for the "
      "rare-earth garnets, from memory)");
  return r;
}

// An ordered double perovskite A2BB'X6: two magnetic B ions of different
// elements in equal numbers, each in one state. Rock-salt order puts every
// B beside six B', so the B-O-B' superexchange decides:
//   - a 3d ion with a 4d or 5d ion orders antiparallel, a ferrimagnet
//     (Sr2FeMoO6, Ba2FeReO6, Sr2CrReO6; Kobayashi et al., Nature 395
//     (1998) 677, and Serrate, De Teresa and Ibarra, J. Phys.: Condens.
//     Matter 19 (2007) 023201, from memory);
//   - two 3d ions, one with half-filled eg (d8, or high-spin d7) and one
//     with empty eg (d3), order in parallel by the Goodenough-Kanamori
//     rules (La2NiMnO6 about 5 uB, La2CoMnO6 about 6; Rogado et al., Adv.
//     Mater. 17 (2005) 2225, from memory).
// nullopt for any other B site.
std::optional<SublatticeMoment> DoublePerovskite(
    const Site& b, absl::Span<const double> moments, bool describe) {
  if (b.occupants.size() != 2) return std::nullopt;
  const SiteOccupant& x = b.occupants[0];
  const SiteOccupant& y = b.occupants[1];
  if (x.element == y.element || !(x.count == y.count) ||
      moments[0] < kNoMoment || moments[1] < kNoMoment) {
    return std::nullopt;
  }
  const double mx = x.count.ToDouble() * moments[0];
  const double my = y.count.ToDouble() * moments[1];
  const int px = x.element->period, py = y.element->period;
  const bool is_3d_x = x.element->block == Block::kD && px == 4;
  const bool is_3d_y = y.element->block == Block::kD && py == 4;
  const bool heavy_x = x.element->block == Block::kD && px >= 5;
  const bool heavy_y = y.element->block == Block::kD && py >= 5;
  SublatticeMoment r;
  if ((is_3d_x && heavy_y) || (heavy_x && is_3d_y)) {
    r.saturation = std::abs(mx - my);
    if (describe) {
      r.note = absl::StrCat(
          "ordered double perovskite: the 3d and the 4d/5d B ions order "
          "antiparallel (a ferrimagnet, as Sr2FeMoO6 and Ba2FeReO6): |",
          Mu(mx), " − ", Mu(my), "| = ", Mu(r.saturation),
          " μB per formula unit; B/B' antisite disorder lowers real "
          "samples' moments; A-site moments are left out");
    }
    return r;
  }
  auto half_filled_eg = [&moments](const SiteOccupant& o, int i) {
    const int d = CoordinationDCount(*o.element, o.state);
    return d == 8 || (d == 7 && moments[i] > 2.5);  // High-spin d7: 3 uB.
  };
  if (is_3d_x && is_3d_y &&
      ((half_filled_eg(x, 0) && CoordinationDCount(*y.element, y.state) == 3) ||
       (half_filled_eg(y, 1) &&
        CoordinationDCount(*x.element, x.state) == 3))) {
    r.saturation = mx + my;
    if (describe) {
      r.note = absl::StrCat(
          "ordered double perovskite: half-filled and empty eg B ions order "
          "in parallel by 180° superexchange (Goodenough–Kanamori rules, as "
          "La2NiMnO6): ",
          Mu(mx), " + ", Mu(my), " = ", Mu(r.saturation),
          " μB per formula unit; antisite disorder lowers it; A-site moments "
          "are left out");
    }
    return r;
  }
  return std::nullopt;
}

// Perovskites with one magnetic B ion in one state that order
// ferromagnetically, against the antiferromagnetic 180° superexchange
// rule; every A-site occupant must be one of the listed A cations:
//   - Ti3+ with the small A cations Y and Gd to Lu: the Ti sublattice
//     orders ferromagnetically by orbital order (YTiO3 0.84 μB per Ti,
//     Tc 30 K), while LaTiO3 to SmTiO3 are antiferromagnets (Greedan,
//     J. Less-Common Met. 111 (1985) 335, from memory);
//   - Mn3+ with Bi: BiMnO3, 3.6 μB per Mn, Tc 105 K (Sugawara et al.,
//     J. Phys. Soc. Jpn. 25 (1968) 1553, from memory), while LaMnO3 is an
//     A-type antiferromagnet;
//   - Ru4+ with Sr, or with Sr and Ca while Sr is at least 3/10 of the A
//     site: SrRuO3, an itinerant ferromagnet of about 1.1-1.6 μB per Ru,
//     Tc 160 K (Callaghan, Moeller and Ward, Inorg. Chem. 5 (1966) 1572,
//     from memory), while CaRuO3 does not order; in Sr1-xCaxRuO3 the Curie
//     temperature falls with x and the order is gone near x = 0.7 (Cao et
//     al., Phys. Rev. B 56 (1997) 321, from memory);
//   - Co4+ with Sr: SrCoO3, about 2.5 μB per Co, Tc 305 K (Long et al.,
//     J. Phys.: Condens. Matter 23 (2011) 245601, from memory).
// Returns the reference compound's name, or nullptr.
const char* FerromagneticPerovskite(const Site& a_site, const Element& b,
                                    int state) {
  const int z = b.atomic_number;
  const auto every_a = [&a_site](auto fits) {
    for (const SiteOccupant& o : a_site.occupants) {
      if (!fits(o.element->atomic_number)) return false;
    }
    return !a_site.occupants.empty();
  };
  if (z == kZTitanium && state == 3 && every_a([](int a) {
        return a == kZYttrium || (a >= kZGadolinium && a <= kZLutetium);
      })) {
    return "YTiO3";
  }
  if (z == kZManganese && state == 3 &&
      every_a([](int a) { return a == kZBismuth; })) {
    return "BiMnO3";
  }
  if (z == kZRuthenium && state == 4 &&
      every_a([](int a) { return a == kZStrontium || a == kZCalcium; })) {
    Rational sr(0), all(0);
    for (const SiteOccupant& o : a_site.occupants) {
      all = all + o.count;
      if (o.element->atomic_number == kZStrontium) sr = sr + o.count;
    }
    // Sr / all >= 3/10.
    if (!(sr * Rational(10) < all * Rational(3))) return "SrRuO3";
  }
  if (z == kZCobalt && state == 4 &&
      every_a([](int a) { return a == kZStrontium; })) {
    return "SrCoO3";
  }
  return nullptr;
}

SublatticeMoment Perovskite(const SitePlacement& p,
                            absl::Span<const double> moments, bool describe) {
  const Site& a_site = p.sites[0];
  const Site& b = p.sites[1];
  const size_t first_b = a_site.occupants.size();
  if (std::optional<SublatticeMoment> d = DoublePerovskite(
          b, moments.subspan(first_b, b.occupants.size()), describe)) {
    return *d;
  }
  const Element* magnetic = nullptr;
  for (size_t i = 0; i < b.occupants.size(); ++i) {
    if (moments[first_b + i] < kNoMoment) continue;
    const Element* e = b.occupants[i].element;
    if (magnetic != nullptr && e != magnetic) {
      return Undetermined(
          "perovskite: the B site holds several magnetic elements (a double "
          "perovskite or solid solution); their exchange signs depend on the "
          "ordering of the B ions and are not estimated");
    }
    magnetic = e;
  }
  // The magnetic element's states on B, magnetic or not (Co3+ low spin
  // beside Co4+ is mixed valence too).
  int states = 0;
  double total = 0;
  for (size_t i = 0; i < b.occupants.size(); ++i) {
    if (b.occupants[i].element != magnetic) continue;
    ++states;
    total += b.occupants[i].count.ToDouble() * moments[first_b + i];
  }
  SublatticeMoment r;
  if (magnetic == nullptr) {
    if (describe) r.note = "perovskite: no ordered moment on the B site";
    return r;
  }
  if (states == 1) {
    for (const SiteOccupant& o : b.occupants) {
      if (o.element != magnetic) continue;
      if (const char* like =
              FerromagneticPerovskite(a_site, *magnetic, o.state)) {
        r.saturation = total;
        if (!describe) return r;
        r.note = absl::StrCat(
            "perovskite: ", magnetic->symbol, o.state, "+ on the B site with ",
            "these A cations orders ferromagnetically, as ", like,
            ", against the 180° superexchange rule (see docs/method.md for "
            "the sources): ",
            Mu(total),
            " μB per formula unit at 0 K from the ion's spin-only moment; "
            "measured moments are smaller (YTiO3 0.84, SrRuO3 about 1.1-1.6 "
            "μB per B ion) or follow another spin state (SrCoO3 about 2.5); "
            "A-site moments are left out");
        return r;
      }
    }
    if (!describe) return r;
    r.note = absl::StrCat(
        "perovskite: one magnetic B ion (", magnetic->symbol,
        " in one state) orders antiferromagnetically by 180° superexchange "
        "(Goodenough–Kanamori rules): net 0; canting gives the orthoferrites "
        "a weak moment (about 0.05 μB); A-site moments are left out");
    return r;
  }
  r.saturation = total;
  if (!describe) return r;
  r.note = absl::StrCat(
      "perovskite: mixed-valence ", magnetic->symbol,
      " on the B site orders ferromagnetically by double exchange (Zener "
      "1951): Σ count × moment = ",
      Mu(total),
      " μB per formula unit; holds in the ferromagnetic range of doping "
      "(La1-xSrxMnO3 about 0.17 < x < 0.5), not for charge-ordered or "
      "antiferromagnetic compositions; A-site moments are left out");
  return r;
}

}  // namespace

namespace {

SublatticeMoment Saturation(const SitePlacement& p,
                            absl::Span<const double> ordered_moments,
                            bool describe) {
  size_t occupants = 0;
  for (const Site& s : p.sites) occupants += s.occupants.size();
  if (occupants != ordered_moments.size()) {
    return Undetermined(absl::StrCat("expected ", occupants,
                                     " ordered moments, one per occupant, got ",
                                     ordered_moments.size()));
  }
  switch (p.family) {
    case StructureFamily::kSpinel:
    case StructureFamily::kHexaferrite:
      return TwoSided(p, ordered_moments, describe);
    case StructureFamily::kGarnet:
      if (p.sites.size() == 3) return Garnet(p, ordered_moments, describe);
      break;
    case StructureFamily::kPerovskite:
      if (p.sites.size() == 2) return Perovskite(p, ordered_moments, describe);
      break;
    case StructureFamily::kNone:
      break;
  }
  return Undetermined("no structure family: no sublattice model");
}

}  // namespace

SublatticeMoment NeelSaturation(const SitePlacement& p,
                                absl::Span<const double> ordered_moments) {
  return Saturation(p, ordered_moments, /*describe=*/true);
}

double NeelSaturationValue(const SitePlacement& p,
                           absl::Span<const double> ordered_moments) {
  return Saturation(p, ordered_moments, /*describe=*/false).saturation;
}

}  // namespace shellwright
