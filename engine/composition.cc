#include "engine/composition.h"

#include <array>
#include <cmath>
#include <cstring>
#include <initializer_list>
#include <memory>
#include <numeric>

#include "absl/container/inlined_vector.h"
#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_format.h"
#include "absl/strings/str_join.h"
#include "absl/strings/str_split.h"
#include "absl/strings/strip.h"
#include "engine/aufbau.h"
#include "engine/formula.h"
#include "engine/internal/lazy_element_rows.h"
#include "engine/internal/state_options.h"
#include "engine/internal/text.h"
#include "engine/ion_moments.h"
#include "engine/ligand_field.h"
#include "engine/magnetism.h"
#include "engine/sites.h"
#include "engine/units.h"

namespace shellwright {
namespace {

using internal::LazyElementRows;
using internal::QuoteForMessage;

void Add(CompositionReport* r, Severity severity, std::string code,
         std::string message, int column = 0) {
  // Room for most records' diagnostics at the first; a record without
  // any (a third of typical input) allocates none.
  if (r->diagnostics.capacity() == 0) r->diagnostics.reserve(4);
  r->diagnostics.push_back(
      Diagnostic{severity, std::move(code), std::move(message), column});
}

std::string SignedState(int state) {
  return state > 0 ? absl::StrCat("+", state) : absl::StrCat(state);
}

// The pieces of a short message joined, as absl::StrCat joins them, in a
// buffer on the stack and copied out once: StrCat sizes its result with
// resize, which fills it before the pieces are copied in (libstdc++ has no
// uninitialised resize), and its result allocates anyway past 15 bytes.
std::string ShortMessage(std::initializer_list<absl::string_view> pieces) {
  char buffer[128];
  size_t n = 0;
  for (absl::string_view piece : pieces) {
    if (piece.size() > sizeof(buffer) - n) return absl::StrJoin(pieces, "");
    std::memcpy(buffer + n, piece.data(), piece.size());
    n += piece.size();
  }
  return std::string(buffer, n);
}

std::string AssignmentText(const OxidationAssignment& a) {
  std::string out;
  for (const AssignedState& s : a.states) {
    if (!out.empty()) out += ", ";
    absl::StrAppend(&out, s.element->symbol, SignedState(s.state), " x",
                    absl::StrFormat("%g", s.count.ToDouble()));
  }
  return out;
}

// Parses "Fe:3,O:-2" style lists. `value` turns the text after ':' into a
// value or returns false.
template <typename T, typename ParseValue>
bool ParseElementList(absl::string_view text, absl::string_view what,
                      ParseValue value,
                      std::vector<std::pair<const Element*, T>>* out,
                      std::string* error) {
  if (text.empty()) return true;  // The usual case: nothing set.
  for (absl::string_view item : absl::StrSplit(text, ',')) {
    item = absl::StripAsciiWhitespace(item);
    if (item.empty()) continue;
    const size_t colon = item.find(':');
    if (colon == absl::string_view::npos) {
      *error = absl::StrCat(what, " item ", QuoteForMessage(item),
                            " must look like Element:value");
      return false;
    }
    const absl::string_view symbol =
        absl::StripAsciiWhitespace(item.substr(0, colon));
    const Element* e = FindElementBySymbol(symbol);
    if (e == nullptr) {
      *error = absl::StrCat(what, " names unknown element ",
                            QuoteForMessage(symbol));
      return false;
    }
    for (const auto& [existing, unused] : *out) {
      if (existing == e) {
        *error = absl::StrCat(what, " gives ", e->symbol, " twice");
        return false;
      }
    }
    T parsed;
    const absl::string_view v =
        absl::StripAsciiWhitespace(item.substr(colon + 1));
    if (!value(v, &parsed)) {
      *error = absl::StrCat(what, " value ", QuoteForMessage(v), " for ",
                            e->symbol, " is not valid");
      return false;
    }
    out->emplace_back(e, parsed);
  }
  return true;
}

// "3", "+3", "3+", "III", "-II" (as `atom` reads a charge).
bool ParseState(absl::string_view v, int* state) {
  absl::StatusOr<int> parsed = ParseOxidationState(v);
  if (!parsed.ok()) return false;
  *state = *parsed;
  return *state >= -9 && *state <= 9;
}

template <typename T>
const T* FindSetting(const std::vector<std::pair<const Element*, T>>& list,
                     const Element* e) {
  for (const auto& [element, value] : list) {
    if (element == e) return &value;
  }
  return nullptr;
}

// Whether the +1 ion of d-block element `e` keeps an ns electron in its
// free-ion ground configuration (Mn+ 3d5 4s1, Fe+ 3d6 4s1, Re+ 5d5 6s1).
// Built once for every element.
bool MonocationKeepsS(const Element& e) {
  static const std::array<bool, kMaxAtomicNumber + 1>* const kTable = [] {
    auto* t = new std::array<bool, kMaxAtomicNumber + 1>{};
    for (int z = 1; z <= kMaxAtomicNumber; ++z) {
      absl::StatusOr<const Element*> el = ElementByAtomicNumber(z);
      if (!el.ok()) continue;
      const int d = CoordinationDCount(**el, 1);
      if (d < 0) continue;
      absl::StatusOr<Configuration> ground = IonConfiguration(z, 1);
      (*t)[z] =
          ground.ok() && ground->occupancy(Subshell{(*el)->period - 1, 2}) != d;
    }
    return t;
  }();
  return (*kTable)[e.atomic_number];
}

absl::StatusOr<AtomDescriptionPtr> DescribeIon(const Element* e, int charge,
                                               Geometry g,
                                               SpinStatePreference s) {
  AtomQuery q;
  q.element = e;
  q.charge = charge;
  q.geometry = g;
  q.spin_state = s;
  if (g != Geometry::kFree &&
      (charge <= 0 || (charge == 1 && MonocationKeepsS(*e)))) {
    // A d-block atom in state 0 or below (Ni(CO)4, [Fe(CO)4]2-), or a +1
    // ion whose free ground configuration keeps an s electron (Mn(I) of
    // Mn(CO)5Br, Re(I) of Re(CO)5Cl: d6, low spin, diamagnetic), counts
    // its d electrons as coordination chemistry does: group - state.
    const int d = CoordinationDCount(*e, charge);
    if (d >= 0) {
      const char* core = e->period == 4   ? "[Ar]"
                         : e->period == 5 ? "[Kr]"
                         : e->period == 6 ? "[Xe] 4f14"
                                          : "[Rn] 5f14";
      absl::StatusOr<Configuration> c =
          Configuration::Parse(absl::StrCat(core, " ", e->period - 1, "d", d));
      if (c.ok() && c->electrons() == e->atomic_number - charge) {
        q.configuration = *c;
      }
    }
  }
  return DescribeAtom(q);
}

// The ends of the expected moment range of a d ion in the default
// geometry: the spin-only moment low spin in an octahedral field, and the
// larger of the free ion's spin-only and J moments. Empty where the ion
// cannot be described.
struct RangeEnds {
  std::optional<double> low;
  std::optional<double> high;
};

RangeEnds DescribeRangeEnds(const Element* e, int state) {
  RangeEnds ends;
  absl::StatusOr<AtomDescriptionPtr> low =
      DescribeIon(e, state, Geometry::kOctahedral, SpinStatePreference::kLow);
  absl::StatusOr<AtomDescriptionPtr> high =
      DescribeIon(e, state, Geometry::kFree, SpinStatePreference::kAuto);
  if (low.ok()) ends.low = (*low)->moments.spin_only;
  if (high.ok()) {
    ends.high = std::max((*high)->moments.spin_only, (*high)->moments.j_moment);
  }
  return ends;
}

// RangeEnds depend only on the element and the state: read once per
// element, for every state a record can hold (-9..+9), from the same
// descriptions.
RangeEnds FindRangeEnds(const Element* e, int state) {
  constexpr int kMaxState = 9;
  if (state < -kMaxState || state > kMaxState) {
    return DescribeRangeEnds(e, state);
  }
  using Row = std::array<RangeEnds, 2 * kMaxState + 1>;
  static auto* const kTable = new LazyElementRows<Row>;
  return kTable->Get(e->atomic_number, [&] {
    Row row;
    for (int q = -kMaxState; q <= kMaxState; ++q) {
      row[q + kMaxState] = DescribeRangeEnds(e, q);
    }
    return row;
  })[state + kMaxState];
}

// The ordered moment g S of an ion with `unpaired` electrons whose
// effective moment g √(S(S+1)) is `effective`.
double OrderedFromEffective(double effective, int unpaired) {
  if (unpaired <= 0) return 0;
  const double spin = unpaired / 2.0;
  return effective * spin / std::sqrt(spin * (spin + 1.0));
}

// The d electrons of a split d subshell.
int SplitElectrons(const LigandFieldSplitting& split) {
  int n = 0;
  for (const SplitLevel& level : split.levels) n += level.electrons;
  return n;
}

// Unpaired electrons of d^n in `g` and `spin`, read from a table built on
// first use (SplitD allocates; every record's d ions ask).
int SplitUnpaired(int d, Geometry g, SpinState spin) {
  constexpr int kGeometries = kGeometryCount;
  constexpr int kSpins = 3;  // SpinState values.
  using Table = std::array<int, 11 * kGeometries * kSpins>;
  static const Table* const kTable = [] {
    auto* t = new Table;
    for (int n = 0; n <= 10; ++n) {
      for (int k = 0; k < kGeometries; ++k) {
        for (int spin = 0; spin < kSpins; ++spin) {
          const Geometry geometry = static_cast<Geometry>(k);
          (*t)[(n * kGeometries + k) * kSpins + spin] =
              geometry == Geometry::kFree
                  ? 0
                  : SplitD(n, geometry, static_cast<SpinState>(spin)).unpaired;
        }
      }
    }
    return t;
  }();
  if (d < 0 || d > 10) return 0;
  return (*kTable)[(d * kGeometries + static_cast<int>(g)) * kSpins +
                   static_cast<int>(spin)];
}

// The effective range of a 3d ion in one spin state: spin-only widened
// by the tabulated orbital contribution, or spin-only alone where the
// table has no row. Sets *tabulated when it has one.
std::pair<double, double> SpinStateRange(int d, Geometry g, SpinState spin,
                                         bool* tabulated) {
  const double spin_only = SpinOnlyMoment(SplitUnpaired(d, g, spin));
  const std::optional<MomentRange> row = FindOrbitalRange(d, g, spin);
  if (tabulated != nullptr) *tabulated = row.has_value();
  if (!row.has_value()) return {spin_only, spin_only};
  return {std::min(spin_only, row->low), std::max(spin_only, row->high)};
}

// Van Vleck and Kotani estimates of one ion at the default temperature,
// computed once per element (every record with Nd3+ or Ru3+ asks).
struct RoomTemperatureMoments {
  std::optional<VanVleckResult> van_vleck;
  std::optional<KotaniEstimate> kotani;
};

const RoomTemperatureMoments& FindRoomTemperatureMoments(const Element* e,
                                                         int state) {
  constexpr int kMaxState = 9;
  using Row = std::array<RoomTemperatureMoments, 2 * kMaxState + 1>;
  static auto* const kTable = new LazyElementRows<Row>;
  static const RoomTemperatureMoments* const kNone = new RoomTemperatureMoments;
  if (state < -kMaxState || state > kMaxState) return *kNone;
  return kTable->Get(e->atomic_number, [&] {
    Row row;
    for (int q = -kMaxState; q <= kMaxState; ++q) {
      row[q + kMaxState].van_vleck =
          VanVleckMoment(e->atomic_number, q, kDefaultTemperature);
      row[q + kMaxState].kotani =
          EstimateKotaniMoment(*e, q, kDefaultTemperature);
    }
    return row;
  })[state + kMaxState];
}

// The moment of a 4f ion with tabulated multiplet intervals: a Van Vleck
// sum over its J levels at `temperature` (engine/ion_moments.h). Near room
// temperature (within kRoomTemperatureBand) the range runs to the
// measured room-temperature value. False where no sum applies.
bool SetVanVleck(const AtomDescription& d, const AssignedState& s,
                 double temperature, IonAnnotation* ion) {
  constexpr double kRoomTemperatureBand = 50;  // K.
  const std::optional<VanVleckResult> vv =
      temperature == kDefaultTemperature
          ? FindRoomTemperatureMoments(s.element, s.state).van_vleck
          : VanVleckMoment(s.element->atomic_number, s.state, temperature);
  if (!vv.has_value()) return false;
  const Moments& m = d.moments;
  ion->moment = ion->moment_low = ion->moment_high = vv->effective_moment;
  ion->model = IonMomentModel::kVanVleck;
  ion->range_basis = RangeBasis::kExact;
  if (m.measured.has_value() &&
      std::abs(temperature - kRoomTemperatureK) <= kRoomTemperatureBand) {
    ion->moment_low = std::min(ion->moment_low, *m.measured);
    ion->moment_high = std::max(ion->moment_high, *m.measured);
    ion->range_basis = RangeBasis::kMeasured;
  }
  ion->ordered_moment = ion->ordered_low = ion->ordered_high = m.saturation;
  return true;
}

// The anion element most atoms of the assignment's free anions belong to
// (O in UO2, Cl in UCl4), or 0.
int MainAnion(const OxidationAssignment& a) {
  int z = 0;
  Rational most(0);
  for (const AssignedState& t : a.states) {
    if (t.unit >= 0 || t.state >= 0 || !(most < t.count)) continue;
    most = t.count;
    z = t.element->atomic_number;
  }
  return z;
}

// The moment of an actinide ion: a measured value for it in its anion
// class where one is tabulated, else a cautioned estimate around the
// Russell-Saunders J moment (engine/ion_moments.h). False outside 5f ions.
bool SetActinide(const AtomDescription& d, const AssignedState& s, int anion_z,
                 IonAnnotation* ion) {
  const int z = s.element->atomic_number;
  if (s.element->block != Block::kF || s.element->period != 7) return false;
  if (std::optional<ActinideMoment> row =
          FindActinideMoment(z, s.state, anion_z)) {
    ion->moment = (row->low + row->high) / 2;
    ion->moment_low = row->low;
    ion->moment_high = row->high;
    ion->model = IonMomentModel::kTabulated;
    ion->range_basis = RangeBasis::kMeasured;
  } else if (std::optional<ActinideEstimate> e =
                 EstimateActinideMoment(z, s.state)) {
    ion->moment = e->j_moment;
    ion->moment_low = std::min(e->low, e->j_moment);
    ion->moment_high = std::max(e->high, e->j_moment);
    ion->model = IonMomentModel::kJMultiplet;
    ion->range_basis = RangeBasis::kEstimate;
  } else {
    return false;
  }
  ion->ordered_moment = d.moments.saturation;
  ion->ordered_low = std::min(ion->ordered_moment, ion->moment_low);
  ion->ordered_high = std::max(ion->ordered_moment, ion->moment_high);
  return true;
}

// The moment of a low-spin octahedral 4d or 5d t2g^n ion (n 1..5) whose
// spin-orbit constant is tabulated: Kotani's value at `temperature`, with
// a range to spin-only (engine/ion_moments.h). False where none applies.
bool SetKotani(const AtomDescription& d, const AssignedState& s,
               double temperature, IonAnnotation* ion) {
  const LigandFieldSplitting& split = d.ligand_field->splitting;
  if (split.geometry != Geometry::kOctahedral || split.levels.size() < 2 ||
      split.levels[1].electrons != 0) {
    return false;
  }
  const std::optional<KotaniEstimate> k =
      temperature == kDefaultTemperature
          ? FindRoomTemperatureMoments(s.element, s.state).kotani
          : EstimateKotaniMoment(*s.element, s.state, temperature);
  if (!k.has_value() || k->t2g_electrons != split.levels[0].electrons) {
    return false;
  }
  ion->moment = k->kotani_moment;
  ion->moment_low = k->low;
  ion->moment_high = k->high;
  ion->model = IonMomentModel::kKotani;
  ion->range_basis = RangeBasis::kSpinOrbit;
  return true;
}

void SetMomentRange(const AtomDescription& d, const IonEnvironment& env,
                    const AssignedState& s, bool fixed, double temperature,
                    int anion_z, IonAnnotation* ion) {
  const Moments& m = d.moments;
  ion->moment = m.recommended;
  ion->model = m.recommended_basis == MomentBasis::kJ
                   ? IonMomentModel::kJMultiplet
                   : IonMomentModel::kSpinOnly;
  ion->moment_low = ion->moment_high = ion->moment;
  ion->range_basis = RangeBasis::kExact;
  const int unpaired = d.unpaired_electrons;
  ion->ordered_moment = ion->model == IonMomentModel::kJMultiplet
                            ? m.saturation
                            : static_cast<double>(unpaired);
  ion->ordered_low = ion->ordered_high = ion->ordered_moment;
  if (d.ligand_field.has_value()) {
    const LigandFieldSplitting& split = d.ligand_field->splitting;
    const int n = SplitElectrons(split);
    if (d.ligand_field->subshell.n == 3) {
      if (env.near_crossover && !fixed) {
        // Either state may be found: the range spans both.
        const auto low =
            SpinStateRange(n, split.geometry, SpinState::kLow, nullptr);
        const auto high =
            SpinStateRange(n, split.geometry, SpinState::kHigh, nullptr);
        ion->moment_low = std::min({ion->moment, low.first, high.first});
        ion->moment_high = std::max({ion->moment, low.second, high.second});
        ion->ordered_low = OrderedFromEffective(
            low.first, SplitUnpaired(n, split.geometry, SpinState::kLow));
        ion->ordered_high = OrderedFromEffective(
            high.second, SplitUnpaired(n, split.geometry, SpinState::kHigh));
        ion->range_basis = RangeBasis::kSpinCrossover;
      } else {
        bool tabulated = false;
        const auto range =
            SpinStateRange(n, split.geometry, split.spin_state, &tabulated);
        if (tabulated) {
          ion->moment_low = std::min(ion->moment, range.first);
          ion->moment_high = std::max(ion->moment, range.second);
          ion->range_basis = RangeBasis::kOrbitalContribution;
          // An S-state ion (high-spin d5, 6S) has no orbital moment to
          // lend: g = 2 exactly, and the effective range is scatter.
          const bool s_state = d.term.l == 0 && d.term.two_s == unpaired;
          if (!s_state) {
            ion->ordered_low = OrderedFromEffective(ion->moment_low, unpaired);
            ion->ordered_high =
                OrderedFromEffective(ion->moment_high, unpaired);
          }
        }
      }
    } else if (SetKotani(d, s, temperature, ion)) {
      // Done.
    } else if (!fixed) {
      // 4d and 5d ions: from low spin to the free ion.
      const RangeEnds ends = FindRangeEnds(s.element, s.state);
      if (ends.low.has_value()) {
        ion->moment_low = std::min(ion->moment_low, *ends.low);
      }
      if (ends.high.has_value()) {
        ion->moment_high = std::max(ion->moment_high, *ends.high);
      }
      ion->range_basis = RangeBasis::kSpinStates;
    }
  } else if (SetActinide(d, s, anion_z, ion) ||
             SetVanVleck(d, s, temperature, ion)) {
    // Done.
  } else if (!fixed && m.recommended_basis == MomentBasis::kJ &&
             m.measured.has_value()) {
    ion->moment_low = std::min(ion->moment, *m.measured);
    ion->moment_high = std::max(ion->moment, *m.measured);
    ion->range_basis = RangeBasis::kMeasured;
  }
}

// Annotates every free ion with its environment and moment range, and
// every unit with its moment.
// The record's per-element settings.
struct ElementSettings {
  std::vector<std::pair<const Element*, Geometry>> geometry;
  std::vector<std::pair<const Element*, SpinStatePreference>> spin;
};

// The environment of the free ion `s` as its ligands and the record's
// settings set it (engine/coordination.h); `cache` is the record's.
IonEnvironment EnvironmentOf(const Formula& formula, const AssignedState& s,
                             const ElementSettings& settings,
                             const CompositionReport& r,
                             EnvironmentCache* cache,
                             ComplexSide side = ComplexSide::kAsWritten) {
  const Geometry* g_set = FindSetting(settings.geometry, s.element);
  const SpinStatePreference* s_set = FindSetting(settings.spin, s.element);
  IonEnvironment env;
  if (s.element->block == Block::kD && (r.kind == CompositionKind::kIonic ||
                                        r.kind == CompositionKind::kZintl)) {
    env = FindEnvironment(formula, *r.assignment, s, g_set, s_set, side, cache);
  } else {
    env.geometry = g_set != nullptr ? *g_set : Geometry::kFree;
    env.spin_state = s_set != nullptr ? *s_set : SpinStatePreference::kAuto;
    if (g_set != nullptr || s_set != nullptr) env.basis = SpinBasis::kRecord;
  }
  return env;
}

// `env` with the coordination of `site` in place of the default
// octahedron, where the record set neither geometry nor spin state: the
// tetrahedral sites of spinels and garnets hold high-spin 3d ions (common
// practice, no source: tetrahedral splitting is about 4/9 of octahedral).
IonEnvironment OnSite(IonEnvironment env, const AssignedState& s,
                      const Site& site) {
  if (env.basis == SpinBasis::kRecord || s.element->block != Block::kD ||
      site.geometry == env.geometry || env.metal_metal_bonded) {
    return env;
  }
  env.geometry = site.geometry;
  env.near_crossover = false;
  if (site.geometry == Geometry::kTetrahedral) {
    const int d = CoordinationDCount(*s.element, s.state);
    env.spin_state = SpinStatePreference::kHigh;
    env.basis =
        d >= 3 && d <= 6 ? SpinBasis::kTetrahedral : SpinBasis::kNoChoice;
  } else {
    env.spin_state = SpinStatePreference::kAuto;
    env.basis = SpinBasis::kNone;
  }
  return env;
}

// What an ion's annotation depends on besides its count and site, at the
// default temperature: its element and state, its environment, whether
// the record's settings fix its geometry or spin state, whether the record
// is a Zintl phase, and the main anion.
struct IonAnnotationKey {
  const Element* element = nullptr;
  const Ligand* ligand = nullptr;
  uint64_t f_bits = 0;  // IonEnvironment::f, bit for bit.
  // The rest in one word, compared at once: the state (bits 0-31), the
  // main anion's atomic number (32-39), the geometry (40-47), the spin
  // state preference (48-51), the spin basis (52-59), and whether the ion
  // is near a crossover (60), bonded to other metal atoms (61), in a Zintl
  // phase (62) and set by the record's settings (63).
  uint64_t packed = 0;

  IonAnnotationKey(const AssignedState& s, const IonEnvironment& env,
                   int anion_z, bool zintl, bool set)
      : element(s.element), ligand(env.ligand) {
    static_assert(sizeof(env.f) == sizeof(f_bits));
    static_assert(kMaxAtomicNumber < 256);
    std::memcpy(&f_bits, &env.f, sizeof(f_bits));
    packed = uint64_t{static_cast<uint32_t>(s.state)} |
             (static_cast<uint64_t>(anion_z & 0xff) << 32) |
             (static_cast<uint64_t>(env.geometry) << 40) |
             (static_cast<uint64_t>(env.spin_state) << 48) |
             (static_cast<uint64_t>(env.basis) << 52) |
             (uint64_t{env.near_crossover} << 60) |
             (uint64_t{env.metal_metal_bonded} << 61) |
             (uint64_t{zintl} << 62) | (uint64_t{set} << 63);
  }
  IonAnnotationKey() = default;

  bool operator==(const IonAnnotationKey& o) const {
    return element == o.element && ligand == o.ligand && f_bits == o.f_bits &&
           packed == o.packed;
  }
  size_t Hash() const {
    uint64_t h = (reinterpret_cast<uintptr_t>(element) ^ f_bits ^ packed) *
                     0x9E3779B97F4A7C15ull ^
                 reinterpret_cast<uintptr_t>(ligand);
    h *= 0x9E3779B97F4A7C15ull;
    return static_cast<size_t>(h >> 56);  // kIonAnnotationSets = 256.
  }
};

// Annotations already made on this thread, by key: a record's ions are
// mostly ions of earlier records (Mn3+ among oxides), and describing one
// and setting its moments costs several times a lookup. Two ways per set,
// the less recently used one refilled: in a direct-mapped table two
// frequent keys of one slot (Y3+ and O2- of a perovskite, say) took turns
// in it and were described again at nearly every record. Made on first
// use (about 120 KB a thread); the descriptions are this thread's handles
// (DescribeAtom), so a copy touches no shared count.
constexpr size_t kIonAnnotationSets = 256;
struct IonAnnotationSlot {
  bool used = false;
  IonAnnotationKey key;
  IonAnnotation ion{};
};
struct IonAnnotationSet {
  std::array<IonAnnotationSlot, 2> ways;
  int recent = 0;  // The way last found or filled.
};

// The slot holding `key` (`*hit`), else the one to fill with it.
IonAnnotationSlot& IonAnnotationSlotFor(const IonAnnotationKey& key,
                                        bool* hit) {
  thread_local std::unique_ptr<std::array<IonAnnotationSet, kIonAnnotationSets>>
      sets;
  if (sets == nullptr) {
    sets = std::make_unique<std::array<IonAnnotationSet, kIonAnnotationSets>>();
  }
  IonAnnotationSet& set = (*sets)[key.Hash()];
  for (int w = 0; w < 2; ++w) {
    if (set.ways[w].used && set.ways[w].key == key) {
      set.recent = w;
      *hit = true;
      return set.ways[w];
    }
  }
  set.recent = 1 - set.recent;
  *hit = false;
  return set.ways[set.recent];
}

// Annotates the free ion `s` (`count` of it, in `env`, on `site` when a
// structure family placed it there) with its description and moments.
// At the default temperature the annotation is taken from this thread's
// earlier ones where their key matches (IonAnnotationKey).
void AnnotateIon(const AssignedState& s, const Rational& count,
                 const IonEnvironment& env, const Site* site,
                 const ElementSettings& settings, double temperature,
                 int anion_z, CompositionReport* r) {
  IonAnnotationSlot* slot = nullptr;
  IonAnnotationKey key;
  if (temperature == kDefaultTemperature) {
    key =
        IonAnnotationKey(s, env, anion_z, r->kind == CompositionKind::kZintl,
                         FindSetting(settings.geometry, s.element) != nullptr ||
                             FindSetting(settings.spin, s.element) != nullptr);
    bool hit = false;
    slot = &IonAnnotationSlotFor(key, &hit);
    if (hit) {
      IonAnnotation& ion = r->ions.emplace_back(slot->ion);
      ion.count = count;
      if (site != nullptr) ion.site = site->name;
      return;
    }
  }
  absl::StatusOr<AtomDescriptionPtr> d =
      DescribeIon(s.element, s.state, env.geometry, env.spin_state);
  if (!d.ok()) {
    Add(r, Severity::kWarning, codes::kIonNotDescribed,
        absl::StrCat(s.element->symbol, SignedState(s.state), ": ",
                     d.status().message()));
    return;
  }
  // The report's ion is filled in place and owns the description.
  IonAnnotation& ion = r->ions.emplace_back(
      IonAnnotation{s.element, s.state, count, *std::move(d), 0, 0, 0});
  const AtomDescription& description = *ion.description;
  ion.ligand = env.ligand;
  ion.ligand_f = env.f;
  ion.spin_basis =
      description.ligand_field.has_value() ? env.basis : SpinBasis::kNone;
  ion.near_spin_crossover = env.near_crossover;
  // A Zintl polyanion atom at 0 holds its full 8 - N bonds (Sn0 of the
  // Sn9 4- cluster in Na4Sn9), though a free Sn atom has two p electrons.
  const bool cluster_atom = r->kind == CompositionKind::kZintl &&
                            s.state == 0 && IsZintlAnionFormer(*s.element);
  ion.bonded = internal::OpenShellState(*s.element, s.state) ||
               env.metal_metal_bonded || cluster_atom;
  if (site != nullptr) ion.site = site->name;
  if (!ion.bonded) {  // Bonded: no moment, all zero.
    const bool fixed =
        FindSetting(settings.geometry, s.element) != nullptr ||
        FindSetting(settings.spin, s.element) != nullptr ||
        (s.state <= 0 && description.configuration_user_supplied);
    SetMomentRange(description, env, s, fixed, temperature, anion_z, &ion);
  }
  if (slot != nullptr) {
    slot->used = true;
    slot->key = key;
    slot->ion = ion;
    slot->ion.count = Rational();
    slot->ion.site = {};
  }
}

// The two sides of a formula that writes an element both in a bracketed
// complex and outside it; not sites of a structure family (no Néel
// direction).
const Site& InComplexSite() {
  static const Site* const site =
      new Site{"in the bracketed complex", Geometry::kOctahedral, 0, {}};
  return *site;
}
const Site& OutsideComplexSite() {
  static const Site* const site =
      new Site{"outside the bracketed complex", Geometry::kOctahedral, 0, {}};
  return *site;
}

// Annotates every free ion with its environment and moment range (one
// ion per site it occupies where `placement` placed it), and every unit
// with its moment.
void Annotate(const Formula& formula, const ElementSettings& settings,
              const SitePlacement* placement, double temperature,
              CompositionReport* r) {
  const OxidationAssignment& assignment = *r->assignment;
  const int anion_z = MainAnion(assignment);
  r->ions.reserve(assignment.states.size() + (placement != nullptr ? 4 : 0));
  for (const AssignedUnit& u : assignment.units) {
    r->units.push_back({u.unit, u.count,
                        std::sqrt(static_cast<double>(
                            u.unit->unpaired * (u.unit->unpaired + 2)))});
  }
  // What the ions' environments share, worked out once.
  EnvironmentCache cache;
  for (const AssignedState& s : assignment.states) {
    if (s.unit >= 0) continue;  // Bonded in a unit: not an ion.
    // An element written both in a bracketed complex and outside it
    // (Prussian blue): one ion for each side, each in its own ligands.
    if (placement == nullptr && r->kind == CompositionKind::kIonic &&
        WritesComplex(formula, &cache) &&
        FindSetting(settings.geometry, s.element) == nullptr &&
        FindSetting(settings.spin, s.element) == nullptr) {
      if (const std::optional<Rational> inside =
              AtomsInComplex(formula, assignment, s)) {
        const Rational outside = s.count - *inside;
        if (!inside->IsZero()) {
          AnnotateIon(s, *inside,
                      EnvironmentOf(formula, s, settings, *r, &cache,
                                    ComplexSide::kInside),
                      &InComplexSite(), settings, temperature, anion_z, r);
        }
        if (!outside.IsZero()) {
          AnnotateIon(s, outside,
                      EnvironmentOf(formula, s, settings, *r, &cache,
                                    ComplexSide::kOutside),
                      &OutsideComplexSite(), settings, temperature, anion_z, r);
        }
        continue;
      }
    }
    const IonEnvironment env = EnvironmentOf(formula, s, settings, *r, &cache);
    bool placed = false;
    if (placement != nullptr) {
      for (const Site& site : placement->sites) {
        for (const SiteOccupant& o : site.occupants) {
          if (o.element != s.element || o.state != s.state) continue;
          AnnotateIon(s, o.count, OnSite(env, s, site), &site, settings,
                      temperature, anion_z, r);
          placed = true;
        }
      }
    }
    if (!placed) {
      AnnotateIon(s, s.count, env, nullptr, settings, temperature, anion_z, r);
    }
  }
}

// The saturation moment of ions placed on sites, with its range, from
// Néel's collinear model (engine/sites.h): each occupant's ordered moment
// at its nominal value and at the ends of its range, the range taken over
// the corners that raise one sublattice and lower the other.
// Takes the placement's note into the report (it is not needed again).
void ApplySublattices(SitePlacement* placed, CompositionReport* r) {
  const SitePlacement& placement = *placed;
  // Inline room for the usual few occupants: no allocation per record.
  using Moments = absl::InlinedVector<double, 8>;
  Moments nominal, up_high, up_low;
  for (const Site& site : placement.sites) {
    for (const SiteOccupant& o : site.occupants) {
      const IonAnnotation* found = nullptr;
      for (const IonAnnotation& ion : r->ions) {
        if (ion.element == o.element && ion.state == o.state &&
            ion.site == site.name) {
          found = &ion;
        }
      }
      if (found == nullptr) return;  // Not described: no estimate.
      nominal.push_back(found->ordered_moment);
      const bool up = site.direction >= 0;
      up_high.push_back(up ? found->ordered_high : found->ordered_low);
      up_low.push_back(up ? found->ordered_low : found->ordered_high);
    }
  }
  SublatticeMoment m = NeelSaturation(placement, nominal);
  if (m.note.empty()) {
    r->structure_note = std::move(placed->note);
  } else {
    // The model's note has room for the placement's before it (it reserves
    // 256 bytes): no allocation for the usual pair.
    m.note.insert(0, "; ").insert(0, placement.note);
    r->structure_note = std::move(m.note);
  }
  if (!m.determined) return;
  double low = m.saturation, high = m.saturation;
  // Where every ordered moment is exact (S-state ions), so is the sum.
  const bool exact = up_high == nominal && up_low == nominal;
  for (const Moments* corner : {&up_high, &up_low}) {
    if (exact) break;
    const double c = NeelSaturationValue(placement, *corner);
    low = std::min(low, c);
    high = std::max(high, c);
  }
  r->saturation_moment_per_formula_unit = m.saturation;
  r->saturation_moment_low = low;
  r->saturation_moment_high = high;
  r->saturation_model = MomentModel::kSublatticeNeel;
}

// Ionic and Zintl compositions whose only magnetic ions are 4f7 S-state
// ions (Eu2+, Gd3+, Tb4+) and that no structure family placed: L = 0, so
// the crystal field cannot reduce the moment, and each ion saturates at
// g_J J = 7 μB, ordered in EuO, EuS and GdN (ferromagnets: 6.8-7 μB per
// formula unit; Coey, Magnetism and Magnetic Materials (2010), from
// memory) and reached in a field in the antiferromagnets EuTe and Gd2O3.
// Other magnetic ions: no estimate, as before.
void ApplyFourFSevenSaturation(CompositionReport* r) {
  double saturation = 0;
  for (const IonAnnotation& ion : r->ions) {
    if (ion.ordered_moment == 0) continue;
    const Element& e = *ion.element;
    const bool lanthanide = e.block == Block::kF && e.period == 6;
    if (!lanthanide || e.atomic_number - 54 - ion.state != 7) return;
    saturation += ion.count.ToDouble() * ion.ordered_moment;
  }
  if (saturation == 0) return;
  r->saturation_moment_per_formula_unit = saturation;
  r->saturation_moment_low = r->saturation_moment_high = saturation;
  r->saturation_model = MomentModel::kRareEarth4f;
  if (r->moment_note.empty()) {
    r->moment_note =
        "saturation: 4f7 S-state ions (L = 0) at g_J J = 7 μB each, "
        "ordered in the ferromagnets EuO, EuS and GdN and reached in a "
        "field in antiferromagnets";
  }
}

// Chromium compounds that no structure family placed and whose exchange is
// ferromagnetic, saturating at the spin-only ordered moment 2S per Cr:
//   - the layered trihalides CrX3 (X = Cl, Br, I) and the tellurides
//     CrSiTe3 and CrGeTe3 ((Si2Te6)6- and (Ge2Te6)6- units): edge-sharing
//     Cr(III)X6 octahedra, whose 90° Cr-X-Cr superexchange between
//     half-filled t2g shells orders each layer ferromagnetically
//     (Goodenough-Kanamori rules; Goodenough, Magnetism and the Chemical
//     Bond, 1963, from memory). CrBr3 (3.0 μB per Cr: Dillon and Olson,
//     J. Appl. Phys. 36 (1965) 1259), CrI3 (3.1: McGuire et al., Chem.
//     Mater. 27 (2015) 612), Cr2Ge2Te6 (Carteaux et al., J. Phys.: Condens.
//     Matter 7 (1995) 69) and CrSiTe3 are ferromagnets; CrCl3 stacks its
//     layers antiferromagnetically and reaches 3 μB in a field of about
//     0.2 T (all from memory);
//   - rutile CrO2, a half-metallic ferromagnet of 2 μB per Cr (Schwarz,
//     J. Phys. F 16 (1986) L211; Coey, Magnetism and Magnetic Materials
//     (2010); from memory).
// Cr must be the only cation and in one state; other compositions: no
// estimate, as before.
void ApplyChromiumFerromagnetSaturation(const OxidationAssignment& a,
                                        CompositionReport* r) {
  constexpr int kChromium = 24;
  // Most records leave here: a magnetic ion that is not Cr.
  bool any_chromium = false;
  for (const IonAnnotation& ion : r->ions) {
    if (ion.ordered_moment == 0) continue;
    if (ion.element->atomic_number != kChromium) return;
    any_chromium = true;
  }
  if (!any_chromium) return;
  int state = 0;
  Rational chromium(0), halide(0), oxide(0), sulfide(0), other_anion(0);
  for (const AssignedState& s : a.states) {
    const int z = s.element->atomic_number;
    if (s.unit >= 0) continue;
    if (z == kChromium) {
      if (state != 0 && s.state != state) return;
      state = s.state;
      chromium = chromium + s.count;
    } else if (s.state > 0) {
      return;
    } else if (z == 17 || z == 35 || z == 53) {
      halide = halide + s.count;
    } else if (z == 8) {
      oxide = oxide + s.count;
    } else if (z == 16 && s.state == -2) {
      sulfide = sulfide + s.count;
    } else {
      other_anion = other_anion + s.count;
    }
  }
  if (chromium.IsZero()) return;
  // Units: only the (Si2Te6)6- and (Ge2Te6)6- of the tellurides.
  bool telluride_units = false;
  for (const AssignedUnit& u : a.units) {
    for (const UnitAtom& atom : u.unit->atoms) {
      const int z = atom.element->atomic_number;
      if (z != 14 && z != 32 && z != 52) return;
    }
    telluride_units = true;
  }
  const char* note = nullptr;
  if (state == 3 && oxide.IsZero() && sulfide.IsZero() &&
      other_anion.IsZero() &&
      ((telluride_units && halide.IsZero()) ||
       (!telluride_units && halide == chromium * Rational(3)))) {
    note =
        "saturation: ferromagnetic Cr(III) layers (CrI3, CrBr3, Cr2Ge2Te6: "
        "90° Cr-X-Cr superexchange between half-filled t2g shells, "
        "Goodenough-Kanamori rules), 2S = 3 μB per Cr; CrCl3 stacks its "
        "layers antiferromagnetically and reaches it in a small field";
  } else if (state == 3 && oxide.IsZero() && other_anion.IsZero() &&
             !telluride_units && halide == chromium && sulfide == chromium) {
    note =
        "saturation: CrSBr-type layers, ferromagnetic within the layer "
        "(Cr(III), half-filled t2g) and stacked antiferromagnetically; a "
        "field of about 1 T aligns them: 2S = 3 μB per Cr";
  } else if (state == 4 && !telluride_units && halide.IsZero() &&
             sulfide.IsZero() && other_anion.IsZero() &&
             oxide == chromium * Rational(2)) {
    note =
        "saturation: rutile CrO2, a half-metallic ferromagnet: 2S = 2 μB "
        "per Cr";
  } else {
    return;
  }
  double saturation = 0;
  for (const IonAnnotation& ion : r->ions) {
    saturation += ion.count.ToDouble() * ion.ordered_moment;
  }
  if (saturation == 0) return;
  r->saturation_moment_per_formula_unit = saturation;
  r->saturation_moment_low = r->saturation_moment_high = saturation;
  r->saturation_model = MomentModel::kSpinOnlyFerromagnet;
  if (r->moment_note.empty()) r->moment_note = note;
}

// Unpaired electrons per formula unit, exactly: 0.7 x 4 + 0.3 x 3 is 3.7,
// not 3.6999999999999997.
double UnpairedPerFormulaUnit(const std::vector<IonAnnotation>& ions,
                              const std::vector<UnitAnnotation>& units) {
  // Summed over a common denominator while numerator and denominator stay
  // exactly representable as doubles: their quotient is then the correctly
  // rounded value of the sum, as the reduced fraction's is.
  constexpr int64_t kExact = int64_t{1} << 53;
  int64_t den = units.empty() ? 1 : 0;  // Units take the exact path.
  for (const IonAnnotation& ion : ions) {
    const int64_t d = ion.count.den();
    if (den % d == 0) continue;
    const __int128 lcm = static_cast<__int128>(den / std::gcd(den, d)) * d;
    if (lcm >= kExact) {
      den = 0;
      break;
    }
    den = static_cast<int64_t>(lcm);
  }
  __int128 num = 0;
  for (const IonAnnotation& ion : ions) {
    if (den == 0) break;
    num += static_cast<__int128>(ion.count.num()) * (den / ion.count.den()) *
           ion.unpaired();
    if (num >= kExact || num <= -kExact) den = 0;
  }
  if (den != 0) {
    return static_cast<double>(static_cast<int64_t>(num)) /
           static_cast<double>(den);
  }
  Rational unpaired(0);
  for (const IonAnnotation& ion : ions) {
    unpaired = unpaired + ion.count * Rational(ion.unpaired());
  }
  for (const UnitAnnotation& u : units) {
    unpaired = unpaired + u.count * Rational(u.unit->unpaired);
  }
  return unpaired.ToDouble();
}

// Replaces the free-atom sums of a metallic phase with the metallic
// model's figures (engine/metallic_moments.h): its localised 4f moments
// where it has them, otherwise none.
void ApplyMetallicModel(const Formula& formula, CompositionReport* r) {
  // Atoms in a metal are no free atoms: their free-atom unpaired electrons
  // are no local moments (Fe3Al's Fe would carry 4 each).
  for (IonAnnotation& ion : r->ions) {
    ion.bonded = true;
    ion.moment = ion.moment_low = ion.moment_high = 0;
    ion.ordered_moment = ion.ordered_low = ion.ordered_high = 0;
  }
  MetallicMomentEstimate m = EstimateMetallicMoment(formula.amounts);
  r->moment_model = m.model;
  r->saturation_moment_per_formula_unit = m.saturation;
  if (m.saturation.has_value()) {
    r->saturation_moment_low = r->saturation_moment_high = *m.saturation;
    r->saturation_model = m.model;
  }
  r->moment_note = std::move(m.note);
  const double effective = m.effective.value_or(0);
  r->unpaired_per_formula_unit = m.localized_unpaired;
  r->effective_moment_per_formula_unit = effective;
  r->expected_moment_low = r->expected_moment_high = effective;
  r->curie_constant = CurieConstantPerMomentSquared() * effective * effective;
}

void Summarise(const Formula& formula, CompositionReport* r) {
  double mu2 = 0, lo2 = 0, hi2 = 0;
  for (const IonAnnotation& ion : r->ions) {
    const double c = ion.count.ToDouble();
    mu2 += c * ion.moment * ion.moment;
    lo2 += c * ion.moment_low * ion.moment_low;
    hi2 += c * ion.moment_high * ion.moment_high;
  }
  for (const UnitAnnotation& u : r->units) {
    const double c = u.count.ToDouble() * u.moment * u.moment;
    mu2 += c;
    lo2 += c;
    hi2 += c;
  }
  r->unpaired_per_formula_unit = UnpairedPerFormulaUnit(r->ions, r->units);
  r->effective_moment_per_formula_unit = std::sqrt(mu2);
  r->expected_moment_low = std::sqrt(lo2);
  r->expected_moment_high = std::sqrt(hi2);
  r->curie_constant = CurieConstantPerMomentSquared() * mu2;
  // Valence electron concentration: composition-weighted mean of the
  // atoms' valence electrons (Guo et al., J. Appl. Phys. 109, 103505
  // (2011), from memory), lanthanides counted as trivalent.
  const ValenceElectronCount valence = CountValenceElectrons(formula.amounts);
  r->total_valence_electrons = valence.per_formula_unit;
  r->valence_electron_concentration = valence.per_atom;
  const bool metal_phase =
      r->kind == CompositionKind::kMetallic ||
      r->kind == CompositionKind::kIntermetallic ||
      (r->kind == CompositionKind::kElemental && formula.amounts.size() == 1 &&
       IsMetal(*formula.amounts[0].element));
  if (metal_phase) ApplyMetallicModel(formula, r);
}

// Checks a measured moment against its expected range [low, high]: an
// error naming `what` when it lies outside by more than the tolerance.
// Returns false (with an error) for a bad value or tolerance.
void CheckOneMoment(absl::string_view what, double measured,
                    std::optional<double> tolerance_set, double low,
                    double high, absl::string_view model,
                    CompositionReport* r) {
  const double tolerance = tolerance_set.value_or(kDefaultMomentTolerance);
  if (measured < low - tolerance || measured > high + tolerance) {
    Add(r, Severity::kError, codes::kMomentOutOfRange,
        absl::StrFormat("measured %s %.2f μB per formula unit is outside the "
                        "expected %.2f to %.2f μB (±%.2f, %s); estimates are "
                        "idealised",
                        what, measured, low, high, tolerance, model));
  }
}

bool BadMomentValues(std::optional<double> measured,
                     std::optional<double> tolerance) {
  auto bad = [](std::optional<double> v) {
    return v.has_value() && (!std::isfinite(*v) || *v < 0);
  };
  return bad(measured) || (measured.has_value() && bad(tolerance));
}

void CheckMeasuredMoments(const CompositionInput& input, CompositionReport* r) {
  const bool local =
      r->kind == CompositionKind::kIonic || r->kind == CompositionKind::kZintl;
  if (BadMomentValues(input.measured_moment, input.moment_tolerance)) {
    Add(r, Severity::kError, codes::kMalformedRecord,
        "measured_moment and moment_tolerance must be finite and "
        "non-negative");
  } else if (input.measured_moment.has_value()) {
    if (!local) {
      Add(r, Severity::kInfo, codes::kMomentCheckSkipped,
          "local-moment estimates do not apply to metallic or elemental "
          "compositions; the measured moment was not checked");
    } else {
      CheckOneMoment("effective moment", *input.measured_moment,
                     input.moment_tolerance, r->expected_moment_low,
                     r->expected_moment_high, "local moments", r);
    }
  }
  if (BadMomentValues(input.measured_saturation_moment,
                      input.saturation_moment_tolerance)) {
    Add(r, Severity::kError, codes::kMalformedRecord,
        "measured_saturation_moment and saturation_moment_tolerance must be "
        "finite and non-negative");
  } else if (input.measured_saturation_moment.has_value()) {
    if (!r->saturation_moment_per_formula_unit.has_value()) {
      Add(r, Severity::kInfo, codes::kMomentCheckSkipped,
          "no ordered-moment model applies to this composition; the "
          "measured saturation moment was not checked");
    } else {
      CheckOneMoment("saturation moment", *input.measured_saturation_moment,
                     input.saturation_moment_tolerance,
                     r->saturation_moment_low, r->saturation_moment_high,
                     Name(r->saturation_model), r);
    }
  }
}

}  // namespace

double CurieConstantPerMomentSquared() {
  constexpr double kAvogadro = 6.02214076e23;         // 1/mol, CODATA 2018.
  constexpr double kBohrMagneton = 9.2740100783e-21;  // erg/G, CODATA 2018.
  constexpr double kBoltzmann = 1.380649e-16;         // erg/K, CODATA 2018.
  return kAvogadro * kBohrMagneton * kBohrMagneton / (3.0 * kBoltzmann);
}

namespace {

// AnalyzeComposition without `valid`. Every return returns `r`, which the
// compiler then builds in the caller's place (no move of the report).
CompositionReport Analyze(const CompositionInput& input) {
  CompositionReport r;
  r.id = input.id;
  if (r.id.size() > kMaxRecordIdLength) {
    r.id.resize(Utf8Prefix(r.id, kMaxRecordIdLength).size());
    Add(&r, Severity::kError, codes::kIdTooLong,
        absl::StrCat("id is ", input.id.size(), " bytes, above the limit of ",
                     kMaxRecordIdLength, "; truncated"));
  }

  FormulaOptions formula_options;
  if (!input.variables.empty()) {
    absl::StatusOr<std::vector<FormulaVariable>> variables =
        ParseFormulaVariables(input.variables);
    if (!variables.ok()) {
      Add(&r, Severity::kError, codes::kMalformedVariables,
          std::string(variables.status().message()));
      return r;
    }
    formula_options.variables = *std::move(variables);
  }
  FormulaIssue issue;
  absl::StatusOr<Formula> formula =
      ParseFormula(input.formula, formula_options, &issue);
  // The formula's storage goes back to this thread's parser when the
  // record is done, whichever way Analyze returns.
  struct Recycle {
    absl::StatusOr<Formula>* formula;
    ~Recycle() {
      if (formula->ok()) RecycleFormula(std::move(**formula));
    }
  } recycle{&formula};
  if (!formula.ok()) {
    Add(&r, Severity::kError, issue.code,
        absl::StrCat("formula ", QuoteForMessage(input.formula), ": ",
                     issue.message),
        issue.column);
    return r;
  }
  for (FormulaIssue& w : formula->warnings) {  // Not needed again.
    Add(&r, Severity::kWarning, std::move(w.code), std::move(w.message),
        w.column);
  }
  for (FormulaIssue& i : formula->infos) {
    Add(&r, Severity::kInfo, std::move(i.code), std::move(i.message), i.column);
  }
  // A charge suffix ("NH4+") gives the net charge; a record charge must
  // agree with it.
  std::optional<int> net_charge = input.net_charge;
  if (formula->charge.has_value()) {
    if (net_charge.has_value() && *net_charge != *formula->charge) {
      Add(&r, Severity::kError, codes::kChargeContradictsFormula,
          absl::StrCat("formula ", QuoteForMessage(input.formula),
                       " carries charge ", *formula->charge > 0 ? "+" : "",
                       *formula->charge, " but the record's charge is ",
                       *net_charge > 0 ? "+" : "", *net_charge));
      return r;
    }
    net_charge = formula->charge;
  }

  // Per-record settings.
  if (input.temperature.has_value() &&
      !(std::isfinite(*input.temperature) && *input.temperature > 0 &&
        *input.temperature <= kMaxTemperature)) {
    Add(&r, Severity::kError, codes::kMalformedRecord,
        absl::StrFormat("temperature %g K is not valid: it must be above 0 "
                        "and at most %g K",
                        *input.temperature, kMaxTemperature));
  }
  std::vector<std::pair<const Element*, int>> declared;
  ElementSettings settings;
  std::vector<std::pair<const Element*, Geometry>>& geometry =
      settings.geometry;
  std::vector<std::pair<const Element*, SpinStatePreference>>& spin =
      settings.spin;
  std::string error;
  if (!ParseElementList<int>(input.declared_states, "declared_states",
                             ParseState, &declared, &error)) {
    Add(&r, Severity::kError, codes::kMalformedDeclaredStates, error);
  }
  if (!ParseElementList<Geometry>(
          input.geometry, "geometry",
          [](absl::string_view v, Geometry* g) {
            absl::StatusOr<Geometry> p = ParseName<Geometry>(v);
            if (p.ok()) *g = *p;
            return p.ok();
          },
          &geometry, &error) ||
      !ParseElementList<SpinStatePreference>(
          input.spin_state, "spin_state",
          [](absl::string_view v, SpinStatePreference* s) {
            absl::StatusOr<SpinStatePreference> p =
                ParseName<SpinStatePreference>(v);
            if (p.ok()) *s = *p;
            return p.ok();
          },
          &spin, &error)) {
    Add(&r, Severity::kError, codes::kMalformedElementSettings, error);
  }
  // The intermediate spin state needs the geometry it is defined in
  // (IntermediateSpinApplies), set in the same record.
  for (const auto& [e, preference] : spin) {
    if (preference != SpinStatePreference::kIntermediate) continue;
    const Geometry* g = FindSetting(geometry, e);
    if (g == nullptr || !IntermediateSpinApplies(*g)) {
      Add(&r, Severity::kError, codes::kMalformedElementSettings,
          absl::StrCat("spin_state ", e->symbol,
                       ":intermediate needs geometry ", e->symbol,
                       ":square_planar or ", e->symbol,
                       ":square_pyramidal (the intermediate state leaves "
                       "dx2-y2 empty, a level of those geometries only)"));
    }
  }
  FamilyChoice family = FamilyChoice::kAuto;
  if (!input.structure_family.empty()) {
    absl::StatusOr<FamilyChoice> parsed = ParseName<FamilyChoice>(
        absl::StripAsciiWhitespace(input.structure_family));
    if (parsed.ok()) {
      family = *parsed;
    } else {
      Add(&r, Severity::kError, codes::kMalformedElementSettings,
          absl::StrCat("structure_family ",
                       QuoteForMessage(input.structure_family),
                       " is not one of auto, none, spinel, garnet, "
                       "hexaferrite, perovskite"));
    }
  }
  OxidationOptions options;
  options.net_charge = net_charge.value_or(0);
  options.max_alternatives = input.max_alternatives;
  for (const auto& [e, state] : declared) {
    bool present = false;
    for (const ElementAmount& a : formula->amounts) present |= a.element == e;
    if (!present) {
      Add(&r, Severity::kError, codes::kMalformedDeclaredStates,
          absl::StrCat("declared_states names ", e->symbol,
                       ", which the formula does not contain"));
      continue;
    }
    bool known = state == 0;  // The elemental state is implied.
    for (const KnownOxidationState& k : KnownOxidationStates(*e)) {
      known |= k.state == state;
    }
    if (!known) {
      Add(&r, Severity::kWarning, codes::kDeclaredStateUnknown,
          absl::StrCat("declared ", e->symbol, SignedState(state),
                       " is not in the table of known oxidation states"));
    }
    options.declared.push_back({e, state});
  }
  for (const Diagnostic& d : r.diagnostics) {
    if (d.severity == Severity::kError) return r;
  }

  absl::StatusOr<OxidationResult> solved =
      AssignOxidationStates(*formula, options);
  if (!solved.ok()) {
    Add(&r, Severity::kError,
        absl::IsResourceExhausted(solved.status())
            ? codes::kSearchBudgetExceeded
            : codes::kChargeNotBalanced,
        std::string(solved.status().message()));
    return r;
  }
  if (solved->one_mixed_search) {
    Add(&r, Severity::kInfo, codes::kMixedValenceSearchLimited,
        "the counts are too finely divided for an exhaustive search within "
        "one record's work budget: the states are the best with at most "
        "one mixed-valence element");
  }
  if (solved->alternatives_cut) {
    Add(&r, Severity::kInfo, codes::kAlternativesLimited,
        "the alternatives' work budget ran out: fewer alternatives than "
        "asked for may be listed");
  }
  r.kind = solved->kind;
  if (!solved->best.has_value()) {
    if (solved->without_declared.has_value()) {
      Add(&r, Severity::kError, codes::kDeclaredStateContradictsBalance,
          absl::StrCat(
              "the declared states cannot balance ", input.formula,
              " to net charge ", options.net_charge,
              "; without them: ", AssignmentText(*solved->without_declared)));
    } else {
      Add(&r, Severity::kError, codes::kChargeNotBalanced,
          absl::StrCat("no combination of known oxidation states balances ",
                       input.formula, " to net charge ", options.net_charge));
    }
    return r;
  }
  if (!options.declared.empty()) {
    // Declared states that force otherwise-avoidable uncommon states on the
    // other elements contradict the balance, even though some balance
    // exists (Fe:2 in Fe2O3 needs peroxide oxygen).
    OxidationOptions free = options;
    free.declared.clear();
    free.max_alternatives = 0;
    absl::StatusOr<OxidationResult> unconstrained =
        AssignOxidationStates(*formula, free);
    int forced = 0;
    for (const AssignedState& s : solved->best->states) {
      if (s.declared) continue;
      // Counted as the ranking counts them (oxidation.h).
      forced +=
          (s.common ? 0 : 1) +
          (s.unit < 0 && internal::BoundOnlyState(*s.element, s.state) ? 1 : 0);
    }
    if (unconstrained.ok() && unconstrained->best.has_value() &&
        forced > unconstrained->best->uncommon_states) {
      Add(&r, Severity::kError, codes::kDeclaredStateContradictsBalance,
          absl::StrCat(
              "the declared states balance ", input.formula,
              " only with uncommon states (", AssignmentText(*solved->best),
              "); without them: ", AssignmentText(*unconstrained->best)));
      return r;
    }
  }
  r.assignment = std::move(solved->best);
  r.alternatives = std::move(solved->alternatives);
  if (r.kind == CompositionKind::kMetallic) {
    Add(&r, Severity::kInfo, codes::kMetallicComposition,
        "all elements are metals: reported as metallic, every state 0");
  } else if (r.kind == CompositionKind::kElemental) {
    Add(&r, Severity::kInfo, codes::kElementalComposition,
        "a single element: reported as elemental, state 0");
  } else if (r.kind == CompositionKind::kIntermetallic) {
    Add(&r, Severity::kInfo, codes::kIntermetallicComposition,
        absl::StrFormat(
            "%s: reported as intermetallic, every state 0 (electronegativity "
            "mean %.2f, difference %.2f); the best formal reading, where "
            "one balances, is the first alternative. A classification from "
            "composition alone: structure and measurement decide",
            solved->bonding.rule, solved->bonding.electronegativity_mean,
            solved->bonding.electronegativity_difference));
  } else if (r.kind == CompositionKind::kZintl) {
    Add(&r, Severity::kInfo, codes::kZintlComposition,
        absl::StrFormat("%s: a Zintl phase, its polyanion atoms in states "
                        "-(8-N) to -1 (electronegativity mean %.2f, "
                        "difference %.2f)",
                        solved->bonding.rule,
                        solved->bonding.electronegativity_mean,
                        solved->bonding.electronegativity_difference));
  }
  // An element's second free state makes it mixed valence (a third does
  // not say so again); atoms in units have their own states. An element
  // has a few states at most.
  std::array<uint8_t, kMaxAtomicNumber + 1> free_states{};
  for (const AssignedState& s : r.assignment->states) {
    if (s.unit < 0 && ++free_states[s.element->atomic_number] == 2) {
      Add(&r, Severity::kInfo, codes::kMixedValence,
          ShortMessage({s.element->symbol, " is mixed valence"}));
    }
    if (!s.common) {
      // The state signed as SignedState signs it.
      Add(&r, Severity::kWarning, codes::kUncommonOxidationState,
          ShortMessage({s.element->symbol, s.state > 0 ? "+" : "",
                        absl::AlphaNum(s.state).Piece(),
                        " is not a common oxidation state"}));
    }
  }

  // Made in place, not moved from a temporary.
  std::string why_not;
  std::optional<SitePlacement> placement =
      r.kind == CompositionKind::kIonic
          ? PlaceIons(*formula, *r.assignment, family, &why_not)
          : std::nullopt;
  if (r.kind == CompositionKind::kIonic) {
    if (!why_not.empty()) {
      Add(&r, Severity::kWarning, codes::kStructureFamilyNotMatched,
          absl::StrCat("structure_family ", Name(family),
                       " does not fit: ", why_not));
    }
  } else if (family != FamilyChoice::kAuto && family != FamilyChoice::kOff) {
    Add(&r, Severity::kWarning, codes::kStructureFamilyNotMatched,
        absl::StrCat("structure_family ", Name(family),
                     " applies to ionic compositions only"));
  }
  Annotate(*formula, settings, placement ? &*placement : nullptr,
           input.temperature.value_or(kDefaultTemperature), &r);
  Summarise(*formula, &r);
  if (placement.has_value()) {
    r.structure_family = Name(placement->family);
    ApplySublattices(&*placement, &r);
  } else if (r.kind == CompositionKind::kIonic &&
             family == FamilyChoice::kAuto) {
    // The Cr3S4 type: spinel counts, no spinel (engine/sites.h), so no
    // sublattice saturation moment; the report says why.
    if (std::optional<std::string> note = DefectNiAsNote(*r.assignment)) {
      r.structure_note = std::move(*note);
      if (r.moment_note.empty()) {
        r.moment_note =
            "saturation: none (spinel counts but no spinel, as the Cr3S4 "
            "type: outside the spinel sublattice model)";
      }
    }
  }
  if (!r.saturation_moment_per_formula_unit.has_value() &&
      (r.kind == CompositionKind::kIonic ||
       r.kind == CompositionKind::kZintl)) {
    ApplyFourFSevenSaturation(&r);
    if (!r.saturation_moment_per_formula_unit.has_value()) {
      ApplyChromiumFerromagnetSaturation(*r.assignment, &r);
    }
  }

  CheckMeasuredMoments(input, &r);
  return r;
}

}  // namespace

CompositionReport AnalyzeComposition(const CompositionInput& input) {
  CompositionReport r = Analyze(input);
  r.valid = true;
  for (const Diagnostic& d : r.diagnostics) {
    if (d.severity == Severity::kError) r.valid = false;
  }
  return r;
}

}  // namespace shellwright
