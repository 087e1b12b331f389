// One view of a record's report, whichever form holds it: the engine's
// CompositionReport (in process, where building a message per record
// would cost as much as the analysis) or a shellwright.v1.RecordReport (a
// server's answer).
//
// VisitRecordReport walks a report's fields in the RecordReport's
// declaration order and calls a visitor for each, so that one writer (the
// report lines of `check`), one translation (RecordReportToProto) and any
// other consumer read a report the same way from either form:
//
//   - From the engine report, the mapping is written once, below: this
//     is the one place that says which engine value fills which field.
//   - From the message, the walk is generated from the proto at build
//     time, so it needs no code per field.
//
// A visitor provides (Field has a `name`, the proto field name, which is
// also the JSON key):
//
//   void String(const Field&, absl::string_view);
//   void Int(const Field&, int32_t);
//   void Double(const Field&, double);
//   void Bool(const Field&, bool);
//   // A repeated message field; `visit(item, visitor)` visits one item's
//   // fields with the visitor for that item.
//   void Messages(const MessagesField&, const Items&, Visit visit);
//   // All of a message's fields, whose values depend only on `key` but
//   // for those `visit` marks with VaryingNumber / VaryingExact(field, i),
//   // whose values are varying[i]: a writer may keep the fragment that
//   // `visit` produces under `key`. The key is built right beside the
//   // fields it stands for, so that a new field that depends on something
//   // else is seen to need it in the key. Only the engine walk calls it.
//   void Cached(const Key& key, std::initializer_list<VaryingValue> varying,
//               Visit visit);
//   void VaryingNumber(const Field&, int i);  // A double field.
//   void VaryingExact(const Field&, int i);   // A string field: "7/10".
//
// The engine fields carry a setter (SHELLWRIGHT_REPORT_FIELD) or an adder
// (SHELLWRIGHT_REPORT_MESSAGES) for the message they stand for, which
// RecordReportToProto uses; the message walk's fields (NamedField) carry
// only the name and the JSON key.
//
// Example: api/records.cc builds the RecordReport with a visitor that calls
// each field's setter; clients/cli/report_lines.cc writes JSON and CSV
// lines with one visitor each, from either form:
//
//   JsonWriter json(&line);  // A visitor.
//   shellwright::VisitRecordReport(engine_report, record, json);
//   shellwright::VisitRecordReport(report_message, json);  // Same text.
//
// Thread safety: VisitRecordReport is thread-safe; visitors are the
// caller's.

#ifndef SHELLWRIGHT_API_REPORT_VIEW_H_
#define SHELLWRIGHT_API_REPORT_VIEW_H_

#include <cstddef>
#include <cstdint>
#include <cstring>
#include <initializer_list>
#include <string>
#include <type_traits>
#include <vector>

#include "absl/strings/string_view.h"
#include "api/records.h"
#include "api/report_mask.h"
#include "engine/composition.h"
#include "engine/ligand_field.h"
#include "engine/rational.h"
#include "shellwright/v1/electron_structure.pb.h"
#include "util/enum_names.h"

namespace shellwright {

// A field of the engine walk: its proto name, and `set(message, value)`.
template <typename Set>
struct ReportField {
  absl::string_view name;
  absl::string_view json_key;  // "\"name\":", ready to write.
  Set set;
};
template <typename Set>
constexpr ReportField<Set> MakeReportField(absl::string_view name,
                                           absl::string_view json_key,
                                           Set set) {
  return {name, json_key, set};
}

// A repeated message field of the engine walk: its name, and
// `add(message)`, which returns the new element.
template <typename Add>
struct ReportMessages {
  absl::string_view name;
  absl::string_view json_key;
  Add add;
};
template <typename Add>
constexpr ReportMessages<Add> MakeReportMessages(absl::string_view name,
                                                 absl::string_view json_key,
                                                 Add add) {
  return {name, json_key, add};
}

// The field `name` of whatever message the visitor builds.
#define SHELLWRIGHT_REPORT_FIELD(name)                                         \
  ::shellwright::MakeReportField(                                              \
      #name, "\"" #name "\":", [](auto* message, const auto& v) {              \
        if constexpr (std::is_convertible_v<decltype(v), absl::string_view>) { \
          const absl::string_view text(v);                                     \
          message->set_##name(text.data(), text.size());                       \
        } else {                                                               \
          message->set_##name(v);                                              \
        }                                                                      \
      })
#define SHELLWRIGHT_REPORT_MESSAGES(name) \
  ::shellwright::MakeReportMessages(      \
      #name,                              \
      "\"" #name "\":", [](auto* message) { return message->add_##name(); })

// A field of the message walk: its name and JSON key, no setter.
struct NamedField {
  absl::string_view name;
  absl::string_view json_key;
};

// A value that varies within a cached fragment (see Cached): a count, as
// a number or as its exact text ("7/10").
struct VaryingValue {
  enum class Kind { kNumber, kExact };
  Kind kind;
  double number = 0;
  Rational exact;

  static VaryingValue Number(double v) { return {Kind::kNumber, v, {}}; }
  static VaryingValue Exact(const Rational& r) { return {Kind::kExact, 0, r}; }
};

// A base for visitors that take a cached message field by field (all but
// a writer that keeps fragments): Cached visits at once, and a Varying*
// call reads its value with varying(i).
template <typename Derived>
class FieldByFieldVisitor {
 public:
  template <typename Key, typename Visit>
  void Cached(const Key&, std::initializer_list<VaryingValue> varying,
              Visit visit) {
    varying_ = varying.begin();
    visit(static_cast<Derived&>(*this));
    varying_ = nullptr;
  }

 protected:
  // REQUIRES: inside Cached, i < its number of varying values.
  const VaryingValue& varying(int i) const { return varying_[i]; }

 private:
  const VaryingValue* varying_ = nullptr;
};

// A base for visitors that take a report's top level and read the items
// of its repeated fields themselves (CSV columns, table columns): the
// Cached and Varying* calls, which only the items' walks make, do nothing.
class TopLevelVisitor {
 public:
  template <typename Key, typename Visit>
  void Cached(const Key&, std::initializer_list<VaryingValue>, Visit) {}
  template <typename F>
  void VaryingNumber(const F&, int) {}
  template <typename F>
  void VaryingExact(const F&, int) {}
};

namespace report_view_internal {

inline uint64_t Bits(double v) {
  uint64_t b;
  std::memcpy(&b, &v, sizeof(b));
  return b;
}

// What an assigned state's fields follow from, but for its count.
struct StateKey {
  // Slots of a writer's cache of fragments under these keys (a few
  // hundred distinct states make up most reports).
  static constexpr size_t kCacheSlots = 256;

  static StateKey Of(const Element* element, int state, bool common,
                     bool declared, const Unit* unit) {
    return {element,
            static_cast<uint32_t>(state) | (uint64_t{common} << 32) |
                (uint64_t{declared} << 33),
            unit};
  }

  const Element* element;
  // The state (low 32 bits), common (bit 32) and declared (bit 33) in one
  // word, stored at once: as three narrow fields they were stored one by
  // one and compared as one wide word, a load that waits until the
  // stores reach the cache (a key is compared right after it is built).
  uint64_t state_flags;
  const Unit* unit;  // Null for a free ion.

  void Keep() {}  // Nothing to hold: units live as long as the program.
  bool operator==(const StateKey& o) const {
    return element == o.element && state_flags == o.state_flags &&
           unit == o.unit;
  }
  uint64_t Hash() const {
    const int state = static_cast<int32_t>(static_cast<uint32_t>(state_flags));
    const uint64_t common = (state_flags >> 32) & 1;
    const uint64_t declared = (state_flags >> 33) & 1;
    return (static_cast<uint64_t>(element->atomic_number) * 31u +
            static_cast<uint64_t>(state + 16) * 4u + common * 2u + declared) ^
           (reinterpret_cast<uintptr_t>(unit) * 0x9E3779B97F4A7C15ull);
  }
};

// What an ion's fields follow from, but for its count: the description
// (immutable and shared) and the moment range. A kept key holds its
// description (Keep), so that its pointer cannot be reused by another
// while the key is kept; a key made for a lookup only points at the
// caller's, and costs no reference count.
struct IonKey {
  static constexpr size_t kCacheSlots = 1024;  // See StateKey.

  const AtomDescriptionPtr* source;  // The caller's; null once kept.
  AtomDescriptionPtr kept;
  const AtomDescription* description;
  const Element* element;
  int state;
  uint64_t moment, low, high;
  // The environment: ligand (static), its f, the basis and flags.
  const Ligand* ligand;
  uint64_t f;
  // 64-bit, as Hash reads them: Hash's shifts let the compiler load 8
  // bytes, and a load wider than the store just made (a key is hashed
  // right after it is built) waits for the store to reach the cache.
  uint64_t environment;  // basis x 4 + near x 2 + bonded.
  // The moment model and range basis, the ordered moment and the site.
  uint64_t model;
  uint64_t ordered;
  const char* site;

  void Keep() {
    if (source != nullptr) kept = *source;
    source = nullptr;
  }
  bool operator==(const IonKey& o) const {
    return description == o.description && element == o.element &&
           state == o.state && moment == o.moment && low == o.low &&
           high == o.high && ligand == o.ligand && f == o.f &&
           environment == o.environment && model == o.model &&
           ordered == o.ordered && site == o.site;
  }
  // The caches take the hash modulo their slot count, so its low bits
  // must depend on every field: the product's low bits depend only on the
  // low bits of what it multiplies (the environment and model, shifted
  // high, and the heap addresses of descriptions, which differ in high
  // bits, would not count), so its high half is folded in. Without that,
  // the A- and B-site Fe3+ of a spinel, alike but for the description and
  // the site, could share a slot and take turns in it.
  uint64_t Hash() const {
    const uint64_t h =
        (reinterpret_cast<uintptr_t>(description) ^
         (moment * 0x9E3779B97F4A7C15ull) ^ (low * 0xC2B2AE3D27D4EB4Full) ^
         (high * 0x165667B19E3779F9ull) ^ static_cast<uint64_t>(state) ^
         (f * 0x27D4EB2F165667C5ull) ^ (environment << 40) ^ (model << 52) ^
         (ordered * 0x94D049BB133111EBull) ^ reinterpret_cast<uintptr_t>(site) ^
         reinterpret_cast<uintptr_t>(ligand)) *
        0xFF51AFD7ED558CCDull;
    return h ^ (h >> 32);
  }
};

template <typename Visitor>
void VisitState(const AssignedState& s, const std::vector<AssignedUnit>& units,
                Visitor& v) {
  const Unit* unit = s.unit >= 0 ? units[s.unit].unit : nullptr;
  v.Cached(
      StateKey::Of(s.element, s.state, s.common, s.declared, unit),
      {VaryingValue::Number(s.count.ToDouble()), VaryingValue::Exact(s.count)},
      [&](auto& v) {
        v.String(SHELLWRIGHT_REPORT_FIELD(element), s.element->symbol);
        v.Int(SHELLWRIGHT_REPORT_FIELD(state), s.state);
        v.VaryingNumber(SHELLWRIGHT_REPORT_FIELD(count), 0);
        v.VaryingExact(SHELLWRIGHT_REPORT_FIELD(count_exact), 1);
        v.Bool(SHELLWRIGHT_REPORT_FIELD(common), s.common);
        v.Bool(SHELLWRIGHT_REPORT_FIELD(declared), s.declared);
        v.String(SHELLWRIGHT_REPORT_FIELD(unit),
                 unit != nullptr ? absl::string_view(unit->name)
                                 : absl::string_view(""));
      });
}

template <typename Visitor>
void VisitIon(const IonAnnotation& ion, Visitor& v) {
  const AtomDescription& d = *ion.description;
  v.Cached(
      IonKey{&ion.description, nullptr, ion.description.get(), ion.element,
             ion.state, Bits(ion.moment), Bits(ion.moment_low),
             Bits(ion.moment_high), ion.ligand, Bits(ion.ligand_f),
             static_cast<uint64_t>(static_cast<int>(ion.spin_basis) * 4 +
                                   (ion.near_spin_crossover ? 2 : 0) +
                                   (ion.bonded ? 1 : 0)),
             static_cast<uint64_t>(static_cast<int>(ion.model) * 16 +
                                   static_cast<int>(ion.range_basis)),
             Bits(ion.ordered_moment), ion.site.data()},
      {VaryingValue::Number(ion.count.ToDouble())}, [&](auto& v) {
        const LigandFieldSplitting* lf =
            d.ligand_field.has_value() ? &d.ligand_field->splitting : nullptr;
        v.String(SHELLWRIGHT_REPORT_FIELD(element), ion.element->symbol);
        v.Int(SHELLWRIGHT_REPORT_FIELD(state), ion.state);
        v.VaryingNumber(SHELLWRIGHT_REPORT_FIELD(count), 0);
        v.String(SHELLWRIGHT_REPORT_FIELD(species),
                 FormatSpecies(ion.element->symbol, ion.state));
        v.String(SHELLWRIGHT_REPORT_FIELD(configuration),
                 d.configuration_notation);
        v.Int(SHELLWRIGHT_REPORT_FIELD(unpaired_electrons), ion.unpaired());
        v.String(SHELLWRIGHT_REPORT_FIELD(geometry),
                 Name(lf != nullptr ? lf->geometry : Geometry::kFree));
        // No spin state where its d count has only one (d0, d10,
        // octahedral d3).
        int d_electrons = 0;
        if (lf != nullptr) {
          for (const SplitLevel& level : lf->levels) {
            d_electrons += level.electrons;
          }
        }
        v.String(SHELLWRIGHT_REPORT_FIELD(spin_state),
                 lf != nullptr && HasSpinChoice(d_electrons, lf->geometry)
                     ? Name(lf->spin_state)
                     : "");
        v.String(SHELLWRIGHT_REPORT_FIELD(ligand_field_occupancy),
                 lf != nullptr ? lf->Notation() : "");
        v.String(SHELLWRIGHT_REPORT_FIELD(term_symbol), d.term.ToAscii());
        v.Double(SHELLWRIGHT_REPORT_FIELD(moment), ion.moment);
        v.String(SHELLWRIGHT_REPORT_FIELD(moment_basis), Name(ion.model));
        v.Double(SHELLWRIGHT_REPORT_FIELD(moment_low), ion.moment_low);
        v.Double(SHELLWRIGHT_REPORT_FIELD(moment_high), ion.moment_high);
        v.String(SHELLWRIGHT_REPORT_FIELD(ligand),
                 ion.ligand != nullptr ? ion.ligand->Name() : "");
        v.Double(SHELLWRIGHT_REPORT_FIELD(ligand_f), ion.ligand_f);
        v.String(SHELLWRIGHT_REPORT_FIELD(spin_state_basis),
                 Name(ion.spin_basis));
        v.Bool(SHELLWRIGHT_REPORT_FIELD(near_spin_crossover),
               ion.near_spin_crossover);
        v.Bool(SHELLWRIGHT_REPORT_FIELD(bonded), ion.bonded);
        v.String(SHELLWRIGHT_REPORT_FIELD(moment_range_basis),
                 Name(ion.range_basis));
        v.Double(SHELLWRIGHT_REPORT_FIELD(ordered_moment), ion.ordered_moment);
        v.String(SHELLWRIGHT_REPORT_FIELD(site), ion.site);
      });
}

}  // namespace report_view_internal

// Walks the RecordReport that `report` stands for; `record` supplies the
// echoed row and formula. Without an assignment, only the id, the verdict,
// the echoes and the diagnostics have values; the other fields are visited
// with their defaults.
//
// A new RecordReport field (or a field of its sub-messages) is added here,
// in its declaration order, and in the proto: nothing else.
template <typename Visitor>
void VisitRecordReport(const CompositionReport& r,
                       const v1::CompositionRecord& record, Visitor& v) {
  using report_view_internal::VisitIon;
  using report_view_internal::VisitState;
  const bool assigned = r.assignment.has_value();
  static const std::vector<AssignedState>* const kNoStates =
      new std::vector<AssignedState>;
  static const std::vector<OxidationAssignment>* const kNoAlternatives =
      new std::vector<OxidationAssignment>;
  static const std::vector<IonAnnotation>* const kNoIons =
      new std::vector<IonAnnotation>;
  v.String(SHELLWRIGHT_REPORT_FIELD(id), r.id);
  v.Bool(SHELLWRIGHT_REPORT_FIELD(valid), r.valid);
  v.Int(SHELLWRIGHT_REPORT_FIELD(row), record.row());
  v.String(SHELLWRIGHT_REPORT_FIELD(formula), EchoedFormula(record));
  v.String(SHELLWRIGHT_REPORT_FIELD(composition_kind),
           assigned ? Name(r.kind) : "");
  v.Messages(SHELLWRIGHT_REPORT_MESSAGES(diagnostics), r.diagnostics,
             [](const Diagnostic& d, auto& v) {
               v.String(SHELLWRIGHT_REPORT_FIELD(severity), Name(d.severity));
               v.String(SHELLWRIGHT_REPORT_FIELD(code), d.code);
               v.String(SHELLWRIGHT_REPORT_FIELD(message), d.message);
               v.Int(SHELLWRIGHT_REPORT_FIELD(column), d.column);
             });
  static const std::vector<AssignedUnit>* const kNoUnits =
      new std::vector<AssignedUnit>;
  static const std::vector<UnitAnnotation>* const kNoUnitAnnotations =
      new std::vector<UnitAnnotation>;
  const std::vector<AssignedUnit>& units =
      assigned ? r.assignment->units : *kNoUnits;
  v.Messages(
      SHELLWRIGHT_REPORT_MESSAGES(oxidation_states),
      assigned ? r.assignment->states : *kNoStates,
      [&units](const AssignedState& s, auto& v) { VisitState(s, units, v); });
  v.Double(SHELLWRIGHT_REPORT_FIELD(score), assigned ? r.assignment->score : 0);
  v.Messages(
      SHELLWRIGHT_REPORT_MESSAGES(alternatives),
      assigned ? r.alternatives : *kNoAlternatives,
      [](const OxidationAssignment& a, auto& v) {
        v.Messages(SHELLWRIGHT_REPORT_MESSAGES(oxidation_states), a.states,
                   [&a](const AssignedState& s, auto& v) {
                     VisitState(s, a.units, v);
                   });
        v.Double(SHELLWRIGHT_REPORT_FIELD(score), a.score);
        v.Int(SHELLWRIGHT_REPORT_FIELD(uncommon_states), a.uncommon_states);
        v.Int(SHELLWRIGHT_REPORT_FIELD(electronegativity_inconsistencies),
              a.electronegativity_inconsistencies);
      });
  v.Messages(SHELLWRIGHT_REPORT_MESSAGES(ions), assigned ? r.ions : *kNoIons,
             [](const IonAnnotation& ion, auto& v) { VisitIon(ion, v); });
  v.Messages(
      SHELLWRIGHT_REPORT_MESSAGES(units),
      assigned ? r.units : *kNoUnitAnnotations,
      [](const UnitAnnotation& u, auto& v) {
        v.String(SHELLWRIGHT_REPORT_FIELD(name), u.unit->name);
        v.String(SHELLWRIGHT_REPORT_FIELD(formula), u.unit->formula);
        v.Int(SHELLWRIGHT_REPORT_FIELD(charge), u.unit->charge);
        v.Double(SHELLWRIGHT_REPORT_FIELD(count), u.count.ToDouble());
        v.String(SHELLWRIGHT_REPORT_FIELD(count_exact), u.count.ToString());
        v.Int(SHELLWRIGHT_REPORT_FIELD(unpaired_electrons), u.unit->unpaired);
        v.Double(SHELLWRIGHT_REPORT_FIELD(moment), u.moment);
      });
  auto number = [assigned](double value) { return assigned ? value : 0.0; };
  v.Double(SHELLWRIGHT_REPORT_FIELD(unpaired_per_formula_unit),
           number(r.unpaired_per_formula_unit));
  v.Double(SHELLWRIGHT_REPORT_FIELD(effective_moment_per_formula_unit),
           number(r.effective_moment_per_formula_unit));
  v.Double(SHELLWRIGHT_REPORT_FIELD(expected_moment_low),
           number(r.expected_moment_low));
  v.Double(SHELLWRIGHT_REPORT_FIELD(expected_moment_high),
           number(r.expected_moment_high));
  v.Double(SHELLWRIGHT_REPORT_FIELD(curie_constant), number(r.curie_constant));
  v.Double(SHELLWRIGHT_REPORT_FIELD(valence_electron_concentration),
           number(r.valence_electron_concentration));
  const std::optional<double>& saturation =
      r.saturation_moment_per_formula_unit;
  v.Double(SHELLWRIGHT_REPORT_FIELD(saturation_moment_per_formula_unit),
           number(saturation.value_or(0)));
  v.Bool(SHELLWRIGHT_REPORT_FIELD(saturation_moment_estimated),
         assigned && saturation.has_value());
  v.String(SHELLWRIGHT_REPORT_FIELD(moment_model),
           assigned ? Name(r.moment_model) : "");
  v.String(SHELLWRIGHT_REPORT_FIELD(moment_note),
           assigned ? absl::string_view(r.moment_note) : "");
  v.Double(SHELLWRIGHT_REPORT_FIELD(total_valence_electrons),
           number(r.total_valence_electrons));
  const bool estimated = assigned && saturation.has_value();
  v.Double(SHELLWRIGHT_REPORT_FIELD(saturation_moment_low),
           estimated ? r.saturation_moment_low : 0.0);
  v.Double(SHELLWRIGHT_REPORT_FIELD(saturation_moment_high),
           estimated ? r.saturation_moment_high : 0.0);
  v.String(SHELLWRIGHT_REPORT_FIELD(saturation_moment_model),
           estimated ? Name(r.saturation_model) : "");
  v.String(SHELLWRIGHT_REPORT_FIELD(structure_family),
           assigned ? r.structure_family : "");
  v.String(SHELLWRIGHT_REPORT_FIELD(structure_note),
           assigned ? absl::string_view(r.structure_note) : "");
}

}  // namespace shellwright

// The generated walk of the messages (it uses NamedField, above).
#include "api/record_report_walk.h"  // NOLINT(build/include_order)

namespace shellwright {

// Walks a RecordReport message: the same calls, in the same order, as the
// engine walk of the report it was made from, but for Cached and the
// Varying* calls, whose fields come as ordinary ones. The walk is
// generated from the message's descriptor at build time
// (api/generate_walk.cc), so it follows the proto with no code per field.
template <typename Visitor>
void VisitRecordReport(const v1::RecordReport& report, Visitor& v) {
  report_view_internal::WalkRecordReport(report, v);
}

// The walks above, passing on only the top-level fields `mask` wants
// (api/report_mask.h): the others are not visited.
template <typename Visitor>
void VisitRecordReport(const CompositionReport& r,
                       const v1::CompositionRecord& record,
                       const ReportMask& mask, Visitor& v) {
  if (mask.all()) return VisitRecordReport(r, record, v);
  MaskedVisitor<Visitor> masked(mask, v);
  VisitRecordReport(r, record, masked);
}
template <typename Visitor>
void VisitRecordReport(const v1::RecordReport& report, const ReportMask& mask,
                       Visitor& v) {
  if (mask.all()) return VisitRecordReport(report, v);
  MaskedVisitor<Visitor> masked(mask, v);
  VisitRecordReport(report, masked);
}

}  // namespace shellwright

#endif  // SHELLWRIGHT_API_REPORT_VIEW_H_
