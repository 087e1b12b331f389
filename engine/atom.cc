#include "engine/atom.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>
#include <memory>
#include <mutex>
#include <utility>

#include "absl/strings/match.h"
#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/strip.h"
#include "engine/aufbau.h"
#include "engine/internal/data_tables.h"
#include "engine/internal/lazy_element_rows.h"
#include "engine/internal/text.h"
#include "engine/magnetism.h"
#include "engine/oxidation.h"

namespace shellwright {
namespace {

using internal::QuoteForMessage;

absl::Status SpecError(absl::string_view spec, absl::string_view problem) {
  return absl::InvalidArgumentError(
      absl::StrCat("species ", QuoteForMessage(spec), ": ", problem));
}

// Stock numerals; index is the oxidation state.
constexpr absl::string_view kRomanNumerals[] = {
    "0", "I", "II", "III", "IV", "V", "VI", "VII", "VIII", "IX", "X"};

absl::StatusOr<int> ParseCharge(absl::string_view spec,
                                absl::string_view rest) {
  if (rest.front() == '(') {
    if (rest.back() != ')' || rest.size() < 3) {
      return SpecError(spec, "a Stock numeral must be written like (III)");
    }
    absl::string_view numeral = rest.substr(1, rest.size() - 2);
    int sign = 1;
    if (numeral.front() == '-' || numeral.front() == '+') {
      sign = numeral.front() == '-' ? -1 : 1;
      numeral.remove_prefix(1);
    }
    for (int value = 0; value < static_cast<int>(std::size(kRomanNumerals));
         ++value) {
      if (numeral == kRomanNumerals[value]) return sign * value;
    }
    return SpecError(
        spec, absl::StrCat("invalid Stock numeral ", QuoteForMessage(numeral),
                           " (expected 0 or I to X)"));
  }
  size_t i = 0;
  int sign = 0;
  if (rest[i] == '+' || rest[i] == '-') {
    sign = rest[i] == '-' ? -1 : 1;
    ++i;
  }
  int magnitude = 0;
  const size_t digits_start = i;
  while (i < rest.size() && rest[i] >= '0' && rest[i] <= '9') {
    if (i - digits_start >= 3) return SpecError(spec, "charge is too large");
    magnitude = magnitude * 10 + (rest[i] - '0');
    ++i;
  }
  const bool has_digits = i > digits_start;
  if (sign == 0) {
    // Digits then sign: "3+", "2-".
    if (!has_digits || i == rest.size() || (rest[i] != '+' && rest[i] != '-')) {
      return SpecError(spec,
                       absl::StrCat("malformed charge ", QuoteForMessage(rest),
                                    " (expected e.g. 3+, +3, 2- or (III))"));
    }
    sign = rest[i] == '-' ? -1 : 1;
    ++i;
  } else if (!has_digits) {
    magnitude = 1;  // "Cl-", "Na+"
  }
  if (i != rest.size()) {
    return SpecError(
        spec, absl::StrCat("unexpected text ", QuoteForMessage(rest.substr(i)),
                           " after the charge"));
  }
  return sign * magnitude;
}

// `text` with superscript digits and signs ("³⁺") as ASCII ("3+").
std::string WithoutSuperscripts(absl::string_view text) {
  static constexpr std::pair<absl::string_view, char> kForms[] = {
      {"\u2070", '0'}, {"\u00B9", '1'}, {"\u00B2", '2'}, {"\u00B3", '3'},
      {"\u2074", '4'}, {"\u2075", '5'}, {"\u2076", '6'}, {"\u2077", '7'},
      {"\u2078", '8'}, {"\u2079", '9'}, {"\u207A", '+'}, {"\u207B", '-'}};
  std::string out;
  while (!text.empty()) {
    bool replaced = false;
    for (const auto& [form, ascii] : kForms) {
      if (absl::StartsWith(text, form)) {
        out.push_back(ascii);
        text.remove_prefix(form.size());
        replaced = true;
        break;
      }
    }
    if (!replaced) {
      out.push_back(text.front());
      text.remove_prefix(1);
    }
  }
  return out;
}

// Outermost shell; for d-block also (n-1)d; for f-block also (n-1)d and
// (n-2)f. Subshells beyond the period (anions, excited states) count too.
int ValenceElectrons(const Element& e, const Configuration& c) {
  int total = 0;
  for (Subshell s : c.OccupiedSubshells()) {
    const bool counts =
        s.n >= e.period ||
        (s.l == 2 && s.n == e.period - 1 &&
         (e.block == Block::kD || e.block == Block::kF)) ||
        (s.l == 3 && s.n == e.period - 2 && e.block == Block::kF);
    if (counts) total += c.occupancy(s);
  }
  return total;
}

// The measured ground level of neutral `z` where it departs from Hund's
// rules (data/ground_level_departures.tsv), or nullptr.
const internal::GroundLevelDepartureRow* GroundLevelDeparture(int z) {
  for (const internal::GroundLevelDepartureRow& row :
       internal::GroundLevelDepartureRows()) {
    if (row.atomic_number == z) return &row;
  }
  return nullptr;
}

// Picks the d subshell a ligand field acts on: the single open d subshell,
// or, for a d-block element with a closed or empty d subshell, its
// (period-1)d subshell. nullopt when the field does not apply.
std::optional<Subshell> LigandFieldSubshell(const Element& e,
                                            const Configuration& c) {
  std::optional<Subshell> open_d;
  int open_d_count = 0;
  for (Subshell s : c.OpenSubshells()) {
    if (s.l == 2) {
      open_d = s;
      ++open_d_count;
    }
  }
  if (open_d_count == 1) return open_d;
  if (open_d_count == 0 && e.block == Block::kD && e.period >= 4) {
    return Subshell{e.period - 1, 2};
  }
  return std::nullopt;
}

AtomDescriptionPtr Build(const Element& element, int charge,
                         const Configuration& configuration, bool user_supplied,
                         Geometry geometry, SpinStatePreference spin) {
  auto d = std::make_shared<AtomDescription>();
  const int z = element.atomic_number;
  d->element = &element;
  d->charge = charge;
  d->electrons = configuration.electrons();
  d->configuration = configuration;
  d->configuration_user_supplied = user_supplied;

  const bool neutral_noble_gas =
      charge == 0 && element.group == 18 && !user_supplied;
  d->configuration_notation = configuration.ToCoreNotation(
      neutral_noble_gas ? z - 1 : std::numeric_limits<int>::max());
  d->full_notation = configuration.ToFullNotation();
  d->filling_order_notation = configuration.ToFillingOrderNotation();
  for (Subshell s : configuration.OccupiedSubshells()) {
    const int e = configuration.occupancy(s);
    d->subshells.push_back({s, e, s.Capacity(), HundUnpairedElectrons(s.l, e)});
  }
  d->open_subshells = configuration.OpenSubshells();
  d->valence_electrons = ValenceElectrons(element, configuration);

  if (charge == 0 && !user_supplied) {
    const absl::string_view source = MadelungExceptionSource(z);
    if (!source.empty()) {
      d->madelung_exception = true;
      d->madelung_exception_source = std::string(source);
      d->notes.push_back(absl::StrCat(
          "measured ground configuration departs from Madelung filling (",
          Configuration::Madelung(z).ToCoreNotation(), "); source: ", source));
    }
  }

  if (charge != 0) {
    bool known = false;
    std::string states;
    for (const KnownOxidationState& k : KnownOxidationStates(element)) {
      known |= k.state == charge;
      absl::StrAppend(&states, states.empty() ? "" : ", ",
                      k.state > 0 ? "+" : "", k.state);
    }
    if (!known) {
      d->notes.push_back(absl::StrCat(
          "oxidation state ", charge > 0 ? "+" : "", charge,
          " is not a known oxidation state of ", element.symbol,
          " (known: ", states.empty() ? "none" : states,
          "; data/oxidation_states.tsv): described as a free ion only"));
    }
  }
  if (user_supplied) {
    absl::StatusOr<Configuration> ground = IonConfiguration(z, charge);
    if (ground.ok() && !(*ground == configuration)) {
      d->notes.push_back(absl::StrCat(
          "the configuration given is not the ground configuration (",
          ground->ToCoreNotation(),
          "); its term and level are the lowest of the configuration given, "
          "not the ground level"));
    }
  }

  // Term symbol: Hund's rules, or the observed level where it departs.
  const TermSymbol hund = HundGroundTerm(configuration);
  d->term = hund;
  d->term_source = "Hund's rules";
  if (charge == 0 && !user_supplied) {
    // compile_tables has checked that the level parses.
    const internal::GroundLevelDepartureRow* row = GroundLevelDeparture(z);
    absl::StatusOr<TermSymbol> observed =
        row != nullptr ? TermSymbol::Parse(row->observed_level)
                       : absl::StatusOr<TermSymbol>(hund);
    if (observed.ok() && *observed != hund) {
      d->term = *observed;
      d->hund_term = hund;
      d->term_source = row->source;
      d->notes.push_back(
          absl::StrCat("observed ground level ", observed->ToAscii(),
                       " differs from the Hund's-rules prediction ",
                       hund.ToAscii(), "; source: ", d->term_source));
    }
  }

  // Unpaired electrons, with the ligand field where it applies.
  d->unpaired_electrons = configuration.UnpairedElectrons();
  if (geometry != Geometry::kFree) {
    if (std::optional<Subshell> ds =
            LigandFieldSubshell(element, configuration)) {
      const int de = configuration.occupancy(*ds);
      LigandFieldResult lf{
          *ds, SplitD(de, geometry, ResolveSpinState(geometry, spin, ds->n))};
      d->unpaired_electrons +=
          lf.splitting.unpaired - HundUnpairedElectrons(2, de);
      d->ligand_field = std::move(lf);
    } else {
      d->notes.push_back(absl::StrCat(
          "geometry ", Name(geometry),
          " ignored: ligand-field splitting is modelled only for ions with "
          "one open d subshell or a d-block element's d subshell"));
    }
  }

  Moments& m = d->moments;
  m.spin_only = SpinOnlyMoment(d->unpaired_electrons);
  m.lande_g = LandeG(d->term);
  m.j_moment = JMoment(d->term);
  m.saturation = SaturationMoment(d->term);
  m.spin_moment = d->unpaired_electrons;
  bool open_f = false;
  for (Subshell s : d->open_subshells) open_f |= s.l == 3;
  if (open_f) {
    m.recommended = m.j_moment;
    m.recommended_basis = MomentBasis::kJ;
  } else {
    m.recommended = m.spin_only;
    m.recommended_basis = MomentBasis::kSpinOnly;
  }
  if (!user_supplied) {
    if (std::optional<MeasuredMoment> measured =
            FindMeasuredMoment(z, charge)) {
      m.measured = measured->moment;
      m.measured_source = measured->source;
      if (std::abs(measured->moment - m.recommended) > 0.5) {
        d->notes.push_back(absl::StrCat(
            "measured moment ", measured->moment,
            " μB departs from the free-ion estimate because excited J "
            "multiplets lie close to the ground level; source: ",
            measured->source));
      }
    }
  }
  return d;
}

// Descriptions for every (Z, charge) with no geometry and no override,
// charge from -kMaxAnionCharge to +Z, each built on first use: a process
// that asks about a few ions (one CLI call) builds only those, a long run
// ends up with the whole table.
//
// Each element's slots are allocated on its first use too: the whole
// table is some 150 KB, which a one-record process would zero page by
// page.
//
// The slots are guarded by std::call_once (internal::OnceSlot, which
// skips it once a slot is built), not absl::call_once: the
// latter is cheaper once a slot is built, but its waiting path runs in
// the uninstrumented Abseil library, so ThreadSanitizer cannot see the
// ordering and reports the first reads of a slot as races.
class DescriptionCache {
 public:
  // REQUIRES: -kMaxAnionCharge <= charge <= e.atomic_number.
  const AtomDescriptionPtr& Get(const Element& e, int charge) {
    const int z = e.atomic_number;
    // std::max: z is at least 1, which GCC cannot see when it inlines this
    // into a link-time optimised caller (it warns of a huge allocation).
    element_once_[z].Run([&] {
      rows_[z] =
          std::make_unique<Entry[]>(std::max(z, 0) + kMaxAnionCharge + 1);
    });
    Entry& entry = rows_[z][charge + kMaxAnionCharge];
    // Each slot is written once, by the call_once that guards it.
    entry.built.Run([&] {
      absl::StatusOr<Configuration> c = IonConfiguration(z, charge);
      if (!c.ok()) return;
      entry.description = Build(e, charge, *c, /*user_supplied=*/false,
                                Geometry::kFree, SpinStatePreference::kAuto);
    });
    return entry.description;
  }

 private:
  struct Entry {
    internal::OnceSlot built;
    AtomDescriptionPtr description;
  };
  std::array<internal::OnceSlot, kMaxAtomicNumber + 1> element_once_;
  std::array<std::unique_ptr<Entry[]>, kMaxAtomicNumber + 1> rows_;
};

DescriptionCache& Cache() {
  static DescriptionCache* const kCache = new DescriptionCache;
  return *kCache;
}

// Ligand-field descriptions of d-block ions in the charge range chemistry
// uses, each built on first use. Records annotate every d ion in a
// geometry, so this keeps composition analysis to table lookups.
class LigandFieldCache {
 public:
  static constexpr int kMinCharge = -kMaxAnionCharge;
  static constexpr int kMaxCharge = 9;
  static constexpr int kCharges = kMaxCharge - kMinCharge + 1;
  // Every geometry but kFree.
  static constexpr int kGeometries = kGeometryCount - 1;
  static constexpr int kSpins = 3;  // Auto, high, low.

  // nullptr when the query is outside the cached set.
  const AtomDescription* Find(const Element& e, int charge, Geometry g,
                              SpinStatePreference s) {
    if (e.block != Block::kD || charge < kMinCharge || charge > kMaxCharge ||
        charge > e.atomic_number || g == Geometry::kFree) {
      return nullptr;
    }
    PerElement& slot = Element(e.atomic_number);
    const int i = Index(charge, g, s);
    slot.built[i].Run([&] {
      absl::StatusOr<Configuration> c =
          IonConfiguration(e.atomic_number, charge);
      if (c.ok()) {
        slot.entries[i] = Build(e, charge, *c, /*user_supplied=*/false, g, s);
      }
    });
    return slot.entries[i].get();
  }

  // The cache's handle of an entry that Find has found.
  const AtomDescriptionPtr& Handle(const Element& e, int charge, Geometry g,
                                   SpinStatePreference s) {
    return Element(e.atomic_number).entries[Index(charge, g, s)];
  }

 private:
  static constexpr int kEntries = kCharges * kGeometries * kSpins;
  // Each entry is built on first use, under its own flag.
  struct PerElement {
    std::array<internal::OnceSlot, kEntries> built;
    std::array<AtomDescriptionPtr, kEntries> entries;
  };

  static int Index(int charge, Geometry g, SpinStatePreference s) {
    return ((charge - kMinCharge) * kGeometries + (static_cast<int>(g) - 1)) *
               kSpins +
           static_cast<int>(s);
  }

  // An element's entries, allocated when it is first asked for: all of
  // them take some 0.4 MB, which a one-record process would spend most of
  // its start zeroing (docs/performance.md).
  PerElement& Element(int z) {
    made_[z].Run([&] { elements_[z] = std::make_unique<PerElement>(); });
    return *elements_[z];
  }

  std::array<internal::OnceSlot, kMaxAtomicNumber + 1> made_;
  std::array<std::unique_ptr<PerElement>, kMaxAtomicNumber + 1> elements_;
};

LigandFieldCache& FieldCache() {
  static LigandFieldCache* const kCache = new LigandFieldCache;
  return *kCache;
}

// The calling thread's own handle on a cached description. Every copy of
// a shared_ptr counts in its control block: had every thread copied the
// cache's handle, the two workers of `check` would pass that block's
// cache line back and forth on every ion they describe and every report
// they free (some 7% of a two-worker run's samples sat on the one
// `lock add`, docs/performance.md). Each thread instead keeps, per
// description, a handle with a control block of its own, which holds the
// cache's handle until the slot is taken by another description.
const AtomDescriptionPtr& ThreadHandle(const AtomDescriptionPtr& shared) {
  if (shared == nullptr) return shared;
  struct Slot {
    const AtomDescription* raw = nullptr;
    AtomDescriptionPtr own;
  };
  // A few hundred descriptions make up most records; made on first use
  // (as thread_local storage it would be zeroed at every thread start).
  static constexpr int kSlotBits = 10;
  static constexpr size_t kSlots = size_t{1} << kSlotBits;
  thread_local std::unique_ptr<std::array<Slot, kSlots>> slots;
  if (slots == nullptr) slots = std::make_unique<std::array<Slot, kSlots>>();
  const AtomDescription* const raw = shared.get();
  const uint64_t hash =
      (reinterpret_cast<uintptr_t>(raw) >> 4) * 0x9E3779B97F4A7C15ull;
  Slot& slot = (*slots)[hash >> (64 - kSlotBits)];
  if (slot.raw != raw) {
    slot.own =
        AtomDescriptionPtr(raw, [keep = shared](const AtomDescription*) {});
    slot.raw = raw;
  }
  return slot.own;
}

}  // namespace

std::string FormatSpecies(absl::string_view symbol, int charge) {
  if (charge == 0) return std::string(symbol);
  const int magnitude = charge > 0 ? charge : -charge;
  return absl::StrCat(symbol, magnitude == 1 ? "" : absl::StrCat(magnitude),
                      charge > 0 ? "+" : "-");
}

absl::StatusOr<SpeciesSpec> ParseSpeciesSpec(absl::string_view spec) {
  if (spec.empty()) return absl::InvalidArgumentError("species is empty");
  if (spec.size() > kMaxSpeciesSpecLength) {
    return SpecError(
        spec, absl::StrCat("longer than ", kMaxSpeciesSpecLength, " bytes"));
  }
  SpeciesSpec out;
  size_t i = 0;
  if (spec[0] >= '0' && spec[0] <= '9') {
    while (i < spec.size() && spec[i] >= '0' && spec[i] <= '9') ++i;
    if (i != spec.size()) {
      return SpecError(spec,
                       "an atomic number must stand alone; give the charge "
                       "separately (e.g. --charge 3) or use a symbol (Fe3+)");
    }
    absl::StatusOr<const Element*> e = LookupElement(spec);
    if (!e.ok()) return e.status();
    out.element = *e;
    return out;
  }
  while (i < spec.size() && ((spec[i] >= 'a' && spec[i] <= 'z') ||
                             (spec[i] >= 'A' && spec[i] <= 'Z'))) {
    ++i;
  }
  if (i == 0) {
    return SpecError(spec,
                     "must start with an element symbol, name or "
                     "atomic number");
  }
  absl::StatusOr<const Element*> e = LookupElement(spec.substr(0, i));
  if (!e.ok()) return e.status();
  out.element = *e;
  if (i < spec.size()) {
    const std::string ascii = WithoutSuperscripts(spec.substr(i));
    absl::StatusOr<int> charge = ParseCharge(spec, ascii);
    if (!charge.ok()) return charge.status();
    out.charge = *charge;
  }
  return out;
}

absl::StatusOr<int> ParseOxidationState(absl::string_view text) {
  std::string ascii = WithoutSuperscripts(absl::StripAsciiWhitespace(text));
  if (ascii.empty()) {
    return absl::InvalidArgumentError("oxidation state is empty");
  }
  absl::string_view v = ascii;
  int plain = 0;
  if (absl::SimpleAtoi(absl::StripPrefix(v, "+"), &plain)) return plain;
  // Roman numerals, with or without parentheses and sign: "III", "-II".
  const size_t sign = v.front() == '+' || v.front() == '-' ? 1 : 0;
  if (v.size() > sign && (v[sign] == 'I' || v[sign] == 'V' || v[sign] == 'X')) {
    ascii = absl::StrCat("(", v, ")");
    v = ascii;
  }
  return ParseCharge(text, v);
}

absl::StatusOr<AtomQuery> ParseAtomQuery(absl::string_view spec,
                                         std::optional<int> charge) {
  absl::StatusOr<SpeciesSpec> parsed = ParseSpeciesSpec(spec);
  if (!parsed.ok()) return parsed.status();
  if (parsed->charge.has_value() && charge.has_value() &&
      *parsed->charge != *charge) {
    return SpecError(
        spec, absl::StrCat("its charge ", *parsed->charge,
                           " contradicts the separate charge ", *charge));
  }
  AtomQuery q;
  q.element = parsed->element;
  q.charge = parsed->charge.value_or(charge.value_or(0));
  return q;
}

absl::StatusOr<AtomDescriptionPtr> DescribeAtom(const AtomQuery& query) {
  if (query.element == nullptr) {
    return absl::InvalidArgumentError("no element given");
  }
  const Element& e = *query.element;
  const int z = e.atomic_number;
  // CheckIonCharge's bounds, tested here first: most queries pass them,
  // and only a failing one needs its status.
  if (query.charge > z || query.charge < -kMaxAnionCharge) {
    return CheckIonCharge(e, query.charge);
  }
  if (query.spin_state == SpinStatePreference::kIntermediate &&
      query.geometry != Geometry::kFree &&
      !IntermediateSpinApplies(query.geometry)) {
    return absl::InvalidArgumentError(
        absl::StrCat("spin state intermediate applies to square_planar and "
                     "square_pyramidal only, not ",
                     Name(query.geometry)));
  }
  if (query.configuration.has_value()) {
    const int want = z - query.charge;
    const int have = query.configuration->electrons();
    if (have != want) {
      return absl::InvalidArgumentError(
          absl::StrCat("configuration holds ", have, " electrons, but ",
                       e.symbol, " with charge ", query.charge, " has ", want));
    }
    return Build(e, query.charge, *query.configuration,
                 /*user_supplied=*/true, query.geometry, query.spin_state);
  }
  if (query.geometry == Geometry::kFree) {
    return ThreadHandle(Cache().Get(e, query.charge));
  }
  if (LigandFieldCache& fields = FieldCache();
      fields.Find(e, query.charge, query.geometry, query.spin_state)) {
    return ThreadHandle(
        fields.Handle(e, query.charge, query.geometry, query.spin_state));
  }
  absl::StatusOr<Configuration> c = IonConfiguration(z, query.charge);
  if (!c.ok()) return c.status();
  return Build(e, query.charge, *c, /*user_supplied=*/false, query.geometry,
               query.spin_state);
}

}  // namespace shellwright
