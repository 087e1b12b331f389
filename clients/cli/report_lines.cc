#include "clients/cli/report_lines.h"

#include <algorithm>
#include <array>
#include <charconv>
#include <cstdint>
#include <cstring>

#include "absl/strings/str_cat.h"
#include "absl/strings/string_view.h"
#include "api/records.h"
#include "clients/cli/fast_json.h"

namespace shellwright::cli {
namespace {

// Writes one JSON line through a raw pointer into reused storage, so that
// the many short pieces of a report cost no bounds-checked appends; the
// finished line goes to its destination in one copy.
class LineWriter {
 public:
  explicit LineWriter(std::string* storage) : storage_(storage) {
    if (storage_->size() < 4096) storage_->resize(4096);
    p_ = &(*storage_)[0];
    end_ = p_ + storage_->size();
  }
  LineWriter(const LineWriter&) = delete;
  LineWriter& operator=(const LineWriter&) = delete;

  template <size_t N>
  void Lit(const char (&text)[N]) {
    Reserve(N - 1);
    std::memcpy(p_, text, N - 1);
    p_ += N - 1;
  }
  void Raw(absl::string_view text) {
    Reserve(text.size());
    std::memcpy(p_, text.data(), text.size());
    p_ += text.size();
  }
  void Char(char c) {
    Reserve(1);
    *p_++ = c;
  }
  void String(absl::string_view v) {
    Reserve(JsonStringBound(v.size()));
    p_ = WriteJsonString(v, p_);
  }
  void Double(double v) {
    Reserve(kJsonDoubleMax);
    p_ = WriteJsonDouble(v, p_);
  }
  void Int(int64_t v) {
    Reserve(24);
    p_ = std::to_chars(p_, p_ + 24, v).ptr;
  }
  absl::string_view text() const {
    return absl::string_view(storage_->data(), p_ - storage_->data());
  }

 private:
  void Reserve(size_t n) {
    if (static_cast<size_t>(end_ - p_) < n) Grow(n);
  }
  void Grow(size_t n) {
    const size_t used = p_ - storage_->data();
    storage_->resize(std::max(2 * storage_->size(), used + n));
    p_ = &(*storage_)[0] + used;
    end_ = &(*storage_)[0] + storage_->size();
  }

  std::string* storage_;
  char* p_;
  char* end_;
};

// JSON members in the protobuf printer's order: declaration order, every
// field printed (the RecordReport tree has no presence fields). `key` is
// the quoted name with its colon and, after an object's first member, the
// comma before it: ",\"state\":".
template <size_t N>
void Str(const char (&key)[N], absl::string_view v, LineWriter* out) {
  out->Lit(key);
  out->String(v);
}
template <size_t N>
void Int(const char (&key)[N], int32_t v, LineWriter* out) {
  out->Lit(key);
  out->Int(v);
}
template <size_t N>
void Dbl(const char (&key)[N], double v, LineWriter* out) {
  out->Lit(key);
  out->Double(v);
}
template <size_t N>
void Bool(const char (&key)[N], bool v, LineWriter* out) {
  out->Lit(key);
  if (v) {
    out->Lit("true");
  } else {
    out->Lit("false");
  }
}

// Writes `items` as the members of a JSON array, `write(item, out)` each.
template <typename Items, typename Write>
void Each(const Items& items, Write write, LineWriter* out) {
  bool first = true;
  for (const auto& item : items) {
    if (!first) out->Char(',');
    first = false;
    write(item, out);
  }
}

// The record-level values of a report, whichever type holds them.
struct ReportFields {
  absl::string_view id;
  bool valid;
  int32_t row;
  absl::string_view formula;
  absl::string_view kind;
  double score;
  double unpaired;
  double effective_moment;
  double moment_low;
  double moment_high;
  double curie_constant;
  double vec;
};

ReportFields FieldsOf(const v1::RecordReport& r) {
  return {r.id(),
          r.valid(),
          r.row(),
          r.formula(),
          r.composition_kind(),
          r.score(),
          r.unpaired_per_formula_unit(),
          r.effective_moment_per_formula_unit(),
          r.expected_moment_low(),
          r.expected_moment_high(),
          r.curie_constant(),
          r.valence_electron_concentration()};
}

// As RecordReportToProto fills them: without an assignment, only the id,
// verdict, echoes and diagnostics are set.
ReportFields FieldsOf(const CompositionReport& r,
                      const v1::CompositionRecord& record) {
  ReportFields f{
      r.id, r.valid, record.row(), EchoedFormula(record), "", 0, 0, 0, 0, 0,
      0,    0};
  if (!r.assignment.has_value()) return f;
  f.kind = Name(r.kind);
  f.score = r.assignment->score;
  f.unpaired = r.unpaired_per_formula_unit;
  f.effective_moment = r.effective_moment_per_formula_unit;
  f.moment_low = r.expected_moment_low;
  f.moment_high = r.expected_moment_high;
  f.curie_constant = r.curie_constant;
  f.vec = r.valence_electron_concentration;
  return f;
}

void DiagnosticJson(absl::string_view severity, absl::string_view code,
                    absl::string_view message, int32_t column,
                    LineWriter* out) {
  Str("{\"severity\":", severity, out);
  Str(",\"code\":", code, out);
  Str(",\"message\":", message, out);
  Int(",\"column\":", column, out);
  out->Char('}');
}

void StateJson(absl::string_view element, int32_t state, double count,
               absl::string_view count_exact, bool common, bool declared,
               LineWriter* out) {
  Str("{\"element\":", element, out);
  Int(",\"state\":", state, out);
  Dbl(",\"count\":", count, out);
  Str(",\"count_exact\":", count_exact, out);
  Bool(",\"common\":", common, out);
  Bool(",\"declared\":", declared, out);
  out->Char('}');
}

void ProtoStateJson(const v1::OxidationState& s, LineWriter* out) {
  StateJson(s.element(), s.state(), s.count(), s.count_exact(), s.common(),
            s.declared(), out);
}

// "7/20" or "2", as Rational::ToString writes it, without a temporary.
void AppendExact(const Rational& r, LineWriter* out) {
  out->Char('"');
  out->Int(r.num());
  if (r.den() != 1) {
    out->Char('/');
    out->Int(r.den());
  }
  out->Char('"');
}

// An engine state's JSON: the text around its count and exact count
// depends only on the element, state and flags, so each thread keeps it,
// cut from StateJson's own output.
void EngineStateJson(const AssignedState& s, LineWriter* out) {
  struct Entry {
    const Element* element = nullptr;
    int state = 0;
    bool common = false, declared = false;
    std::string head;    // Through "count":
    std::string middle;  // ,"count_exact":
    std::string tail;    // From ,"common":
  };
  thread_local std::array<Entry, 256> cache;
  Entry& e = cache[(static_cast<unsigned>(s.element->atomic_number) * 31u +
                    static_cast<unsigned>(s.state + 16) * 4u +
                    (s.common ? 2u : 0u) + (s.declared ? 1u : 0u)) %
                   cache.size()];
  if (e.element != s.element || e.state != s.state || e.common != s.common ||
      e.declared != s.declared) {
    std::string storage;
    LineWriter w(&storage);
    StateJson(s.element->symbol, s.state, 0, "", s.common, s.declared, &w);
    const std::string text(w.text());
    constexpr char kCount[] = ",\"count\":0";
    constexpr char kExact[] = ",\"count_exact\":\"\"";
    const size_t count_at = text.find(kCount);
    const size_t exact_at = text.find(kExact, count_at);
    e.element = s.element;
    e.state = s.state;
    e.common = s.common;
    e.declared = s.declared;
    e.head = text.substr(0, count_at + sizeof(kCount) - 2);
    e.middle = text.substr(exact_at, sizeof(kExact) - 3);
    e.tail = text.substr(exact_at + sizeof(kExact) - 1);
  }
  out->Raw(e.head);
  out->Double(s.count.ToDouble());
  out->Raw(e.middle);
  AppendExact(s.count, out);
  out->Raw(e.tail);
}

// `states` writes the members of the oxidation_states array.
template <typename States>
void AssignmentJson(States states, double score, int32_t uncommon,
                    int32_t inconsistencies, LineWriter* out) {
  out->Lit("{\"oxidation_states\":[");
  states(out);
  out->Char(']');
  Dbl(",\"score\":", score, out);
  Int(",\"uncommon_states\":", uncommon, out);
  Int(",\"electronegativity_inconsistencies\":", inconsistencies, out);
  out->Char('}');
}

void IonJson(const v1::IonReport& i, LineWriter* out) {
  Str("{\"element\":", i.element(), out);
  Int(",\"state\":", i.state(), out);
  Dbl(",\"count\":", i.count(), out);
  Str(",\"species\":", i.species(), out);
  Str(",\"configuration\":", i.configuration(), out);
  Int(",\"unpaired_electrons\":", i.unpaired_electrons(), out);
  Str(",\"geometry\":", i.geometry(), out);
  Str(",\"spin_state\":", i.spin_state(), out);
  Str(",\"ligand_field_occupancy\":", i.ligand_field_occupancy(), out);
  Str(",\"term_symbol\":", i.term_symbol(), out);
  Dbl(",\"moment\":", i.moment(), out);
  Str(",\"moment_basis\":", i.moment_basis(), out);
  Dbl(",\"moment_low\":", i.moment_low(), out);
  Dbl(",\"moment_high\":", i.moment_high(), out);
  out->Char('}');
}

uint64_t Bits(double v) {
  uint64_t b;
  std::memcpy(&b, &v, sizeof(b));
  return b;
}

// An engine ion's JSON. Everything but the count follows from the
// description (immutable, shared) and the moment range, and a record's
// ions come from a few hundred of those, so each thread keeps the text on
// either side of the count, made by the proto path itself. An entry holds
// its description, so the pointer it is keyed by stays valid.
void EngineIonJson(const IonAnnotation& ion, LineWriter* out) {
  struct Entry {
    AtomDescriptionPtr description;
    const Element* element = nullptr;
    int state = 0;
    uint64_t moment = 0, low = 0, high = 0;
    std::string head;  // Through "count":
    std::string tail;  // From ,"species":
  };
  thread_local std::array<Entry, 1024> cache;
  const uint64_t moment = Bits(ion.moment), low = Bits(ion.moment_low),
                 high = Bits(ion.moment_high);
  const uint64_t hash =
      (reinterpret_cast<uintptr_t>(ion.description.get()) ^
       (moment * 0x9E3779B97F4A7C15ull) ^ (low * 0xC2B2AE3D27D4EB4Full) ^
       (high * 0x165667B19E3779F9ull) ^ static_cast<uint64_t>(ion.state)) *
      0xFF51AFD7ED558CCDull;
  Entry& e = cache[hash >> 54];
  if (e.description != ion.description || e.element != ion.element ||
      e.state != ion.state || e.moment != moment || e.low != low ||
      e.high != high) {
    thread_local v1::IonReport proto;
    IonAnnotationToProto(ion, &proto);
    std::string storage;
    LineWriter w(&storage);
    IonJson(proto, &w);
    const std::string text(w.text());
    constexpr char kCount[] = ",\"count\":";
    const size_t head_end = text.find(kCount) + sizeof(kCount) - 1;
    const size_t tail_start = text.find(",\"species\":", head_end);
    e.description = ion.description;
    e.element = ion.element;
    e.state = ion.state;
    e.moment = moment;
    e.low = low;
    e.high = high;
    e.head = text.substr(0, head_end);
    e.tail = text.substr(tail_start);
  }
  out->Raw(e.head);
  out->Double(ion.count.ToDouble());
  out->Raw(e.tail);
}

// The report object. `diagnostics` is a visitor as for ReportCsv; the
// other callbacks write the members of one array.
template <typename Diagnostics, typename States, typename Alternatives,
          typename Ions>
void ReportJson(const ReportFields& f, Diagnostics diagnostics, States states,
                Alternatives alternatives, Ions ions, LineWriter* out) {
  Str("{\"id\":", f.id, out);
  Bool(",\"valid\":", f.valid, out);
  Int(",\"row\":", f.row, out);
  Str(",\"formula\":", f.formula, out);
  Str(",\"composition_kind\":", f.kind, out);
  out->Lit(",\"diagnostics\":[");
  bool first = true;
  diagnostics([&](absl::string_view severity, absl::string_view code,
                  absl::string_view message, int32_t column) {
    if (!first) out->Char(',');
    first = false;
    DiagnosticJson(severity, code, message, column, out);
  });
  out->Lit("],\"oxidation_states\":[");
  states(out);
  out->Lit("]");
  Dbl(",\"score\":", f.score, out);
  out->Lit(",\"alternatives\":[");
  alternatives(out);
  out->Lit("],\"ions\":[");
  ions(out);
  out->Lit("]");
  Dbl(",\"unpaired_per_formula_unit\":", f.unpaired, out);
  Dbl(",\"effective_moment_per_formula_unit\":", f.effective_moment, out);
  Dbl(",\"expected_moment_low\":", f.moment_low, out);
  Dbl(",\"expected_moment_high\":", f.moment_high, out);
  Dbl(",\"curie_constant\":", f.curie_constant, out);
  Dbl(",\"valence_electron_concentration\":", f.vec, out);
  out->Lit("}\n");
}

// Appends `field`, quoted when it holds a comma, a quote or a line break.
void CsvField(absl::string_view field, std::string* out) {
  out->push_back(',');
  if (field.find_first_of(",\"\n\r") == absl::string_view::npos) {
    out->append(field.data(), field.size());
    return;
  }
  out->push_back('"');
  for (char c : field) {
    if (c == '"') out->push_back('"');
    out->push_back(c);
  }
  out->push_back('"');
}

// Appends `separator` to a joined list, except before its first item.
void Separate(absl::string_view separator, bool* first, std::string* list) {
  if (!*first) list->append(separator.data(), separator.size());
  *first = false;
}

void CsvState(absl::string_view element, int state, absl::string_view exact,
              bool* first, std::string* list) {
  Separate(" ", first, list);
  absl::StrAppend(list, element, ":", state, "x", exact);
}

void CsvCode(absl::string_view code, bool* first, std::string* list) {
  Separate(";", first, list);
  list->append(code.data(), code.size());
}

void CsvMessage(absl::string_view severity, absl::string_view message,
                bool* first, std::string* list) {
  Separate(" | ", first, list);
  absl::StrAppend(list, severity, ": ", message);
}

// One CSV line. `states` appends the joined states to a buffer, and
// `diagnostics` calls its visitor with (severity, code, message, column)
// for each diagnostic.
template <typename States, typename Diagnostics>
void ReportCsv(const ReportFields& f, States states, Diagnostics diagnostics,
               std::string* out) {
  thread_local std::string list;
  absl::StrAppend(out, f.row);
  CsvField(f.id, out);
  out->append(f.valid ? ",true" : ",false");
  CsvField(f.formula, out);
  CsvField(f.kind, out);
  list.clear();
  states(&list);
  CsvField(list, out);
  // StrAppend prints doubles as %.6g does (but for the sign of a NaN,
  // which reports never hold).
  for (double v : {f.score, f.unpaired, f.effective_moment, f.moment_low,
                   f.moment_high, f.curie_constant, f.vec}) {
    absl::StrAppend(out, ",", v);
  }
  list.clear();
  bool first = true;
  diagnostics([&](absl::string_view, absl::string_view code, absl::string_view,
                  int32_t) { CsvCode(code, &first, &list); });
  CsvField(list, out);
  list.clear();
  first = true;
  diagnostics([&](absl::string_view severity, absl::string_view,
                  absl::string_view message,
                  int32_t) { CsvMessage(severity, message, &first, &list); });
  CsvField(list, out);
  out->push_back('\n');
}

}  // namespace

std::string ReportCsvHeader() {
  return "row,id,valid,formula,composition_kind,oxidation_states,score,"
         "unpaired_per_formula_unit,effective_moment_per_formula_unit,"
         "expected_moment_low,expected_moment_high,curie_constant,"
         "valence_electron_concentration,diagnostic_codes,diagnostics";
}

void AppendReportLine(ReportLineFormat format, const v1::RecordReport& r,
                      std::string* out) {
  const ReportFields f = FieldsOf(r);
  auto diagnostics = [&r](auto visit) {
    for (const v1::Diagnostic& d : r.diagnostics()) {
      visit(d.severity(), d.code(), d.message(), d.column());
    }
  };
  if (format == ReportLineFormat::kCsv) {
    ReportCsv(
        f,
        [&](std::string* list) {
          bool first = true;
          for (const v1::OxidationState& s : r.oxidation_states()) {
            CsvState(s.element(), s.state(), s.count_exact(), &first, list);
          }
        },
        diagnostics, out);
    return;
  }
  thread_local std::string storage;
  LineWriter w(&storage);
  ReportJson(
      f, diagnostics,
      [&](LineWriter* o) { Each(r.oxidation_states(), ProtoStateJson, o); },
      [&](LineWriter* o) {
        Each(
            r.alternatives(),
            [](const v1::OxidationAssignment& a, LineWriter* o) {
              AssignmentJson(
                  [&](LineWriter* o) {
                    Each(a.oxidation_states(), ProtoStateJson, o);
                  },
                  a.score(), a.uncommon_states(),
                  a.electronegativity_inconsistencies(), o);
            },
            o);
      },
      [&](LineWriter* o) { Each(r.ions(), IonJson, o); }, &w);
  out->append(w.text().data(), w.text().size());
}

void AppendReportLine(ReportLineFormat format, const CompositionReport& r,
                      const v1::CompositionRecord& record, std::string* out) {
  const ReportFields f = FieldsOf(r, record);
  const bool assigned = r.assignment.has_value();
  auto diagnostics = [&r](auto visit) {
    for (const Diagnostic& d : r.diagnostics) {
      visit(Name(d.severity), d.code, d.message, d.column);
    }
  };
  if (format == ReportLineFormat::kCsv) {
    ReportCsv(
        f,
        [&](std::string* list) {
          if (!assigned) return;
          bool first = true;
          for (const AssignedState& s : r.assignment->states) {
            CsvState(s.element->symbol, s.state, s.count.ToString(), &first,
                     list);
          }
        },
        diagnostics, out);
    return;
  }
  thread_local std::string storage;
  LineWriter w(&storage);
  ReportJson(
      f, diagnostics,
      [&](LineWriter* o) {
        if (assigned) Each(r.assignment->states, EngineStateJson, o);
      },
      [&](LineWriter* o) {
        if (!assigned) return;
        Each(
            r.alternatives,
            [](const OxidationAssignment& a, LineWriter* o) {
              AssignmentJson(
                  [&](LineWriter* o) { Each(a.states, EngineStateJson, o); },
                  a.score, a.uncommon_states,
                  a.electronegativity_inconsistencies, o);
            },
            o);
      },
      [&](LineWriter* o) {
        if (assigned) Each(r.ions, EngineIonJson, o);
      },
      &w);
  out->append(w.text().data(), w.text().size());
}

void ReportCounts::Add(const ReportCounts& other) {
  rows += other.rows;
  valid += other.valid;
  invalid += other.invalid;
  for (const auto& [code, count] : other.by_code) by_code[code] += count;
}

void AddReport(ReportLineFormat format, const v1::RecordReport& report,
               ReportLines* out) {
  AppendReportLine(format, report, &out->text);
  ReportCounts& c = out->counts;
  ++c.rows;
  ++(report.valid() ? c.valid : c.invalid);
  for (const v1::Diagnostic& d : report.diagnostics()) ++c.by_code[d.code()];
}

void AddReport(ReportLineFormat format, const CompositionReport& report,
               const v1::CompositionRecord& record, ReportLines* out) {
  AppendReportLine(format, report, record, &out->text);
  ReportCounts& c = out->counts;
  ++c.rows;
  ++(report.valid ? c.valid : c.invalid);
  for (const Diagnostic& d : report.diagnostics) ++c.by_code[d.code];
}

}  // namespace shellwright::cli
