#include "clients/cli/report_lines.h"

#include <algorithm>
#include <array>
#include <charconv>
#include <cstdint>
#include <cstring>
#include <initializer_list>
#include <iterator>
#include <memory>
#include <optional>
#include <string>
#include <type_traits>
#include <vector>

#include "absl/base/attributes.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_join.h"
#include "absl/strings/string_view.h"
#include "api/report_view.h"
#include "clients/cli/atom_format.h"
#include "clients/cli/fast_json.h"

#if defined(__SSE2__)
#include <emmintrin.h>
#endif

namespace shellwright::cli {
namespace {

// Writes "7/20" or "2", quoted, as Rational::ToString writes it, at `p`,
// which has room for 2 x 20 + 3 bytes; returns the end.
char* WriteExactText(const Rational& r, char* p) {
  *p++ = '"';
  p = std::to_chars(p, p + 20, r.num()).ptr;
  if (r.den() != 1) {
    *p++ = '/';
    p = std::to_chars(p, p + 20, r.den()).ptr;
  }
  *p++ = '"';
  return p;
}

// Writes one JSON line through a raw pointer straight into the text it
// belongs to (a batch's, reused between batches), so that the many short
// pieces of a report cost no bounds-checked appends and the line is never
// copied. What is written is kept when the writer goes.
class LineWriter {
 public:
  explicit LineWriter(ReportText* out) : out_(out) {
    p_ = out_->Room(4096);
    start_ = out_->size();
    end_ = out_->room_end();
  }
  ~LineWriter() { out_->Commit(p_); }
  LineWriter(const LineWriter&) = delete;
  LineWriter& operator=(const LineWriter&) = delete;

  // The small writes are inlined where they are made (the keys and
  // literals are constants there, so their copies become fixed-size
  // moves): called, they cost some 45 instructions a key.
  template <size_t N>
  ABSL_ATTRIBUTE_ALWAYS_INLINE void Lit(const char (&text)[N]) {
    Reserve(N - 1);
    std::memcpy(p_, text, N - 1);
    p_ += N - 1;
  }
  ABSL_ATTRIBUTE_ALWAYS_INLINE void Raw(absl::string_view text) {
    Reserve(text.size());
    Copy(text);
  }
  // A member's key ("\"name\":"), after a comma unless it is the first.
  ABSL_ATTRIBUTE_ALWAYS_INLINE void Key(absl::string_view json_key,
                                        bool first) {
    Reserve(json_key.size() + 1);
    *p_ = ',';
    p_ += first ? 0 : 1;
    Copy(json_key);
  }
  ABSL_ATTRIBUTE_ALWAYS_INLINE void Char(char c) {
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
  void Exact(const Rational& r) {
    Reserve(2 * 20 + 3);
    p_ = WriteExactText(r, p_);
  }
  // The first n <= N bytes of `block`, copied whole.
  template <size_t N>
  ABSL_ATTRIBUTE_ALWAYS_INLINE void Block(const char (&block)[N], size_t n) {
    Reserve(N);
    std::memcpy(p_, block, N);
    p_ += n;
  }
  // The line so far.
  absl::string_view text() const {
    return absl::string_view(out_->data() + start_,
                             p_ - (out_->data() + start_));
  }

 private:
  ABSL_ATTRIBUTE_ALWAYS_INLINE void Reserve(size_t n) {
    if (static_cast<size_t>(end_ - p_) < n) Grow(n);
  }
  // REQUIRES: room for `text`.
  ABSL_ATTRIBUTE_ALWAYS_INLINE void Copy(absl::string_view text) {
    const size_t n = text.size();
    // Keys and short values are most of a line: copy 8 to 64 bytes with
    // two overlapping fixed-size moves instead of a call.
    if (n >= 8 && n <= 16) {
      std::memcpy(p_, text.data(), 8);
      std::memcpy(p_ + n - 8, text.data() + n - 8, 8);
    } else if (n > 16 && n <= 32) {
      std::memcpy(p_, text.data(), 16);
      std::memcpy(p_ + n - 16, text.data() + n - 16, 16);
    } else if (n > 32 && n <= 64) {
      std::memcpy(p_, text.data(), 32);
      std::memcpy(p_ + n - 32, text.data() + n - 32, 32);
    } else {
      std::memcpy(p_, text.data(), n);
    }
    p_ += n;
  }
  void Grow(size_t n) {
    out_->Commit(p_);
    p_ = out_->Room(n);
    end_ = out_->room_end();
  }

  ReportText* const out_;
  size_t start_;  // Where the line starts in out_.
  char* p_;
  char* end_;
};

// The text of a fragment's varying values (the counts of states and
// ions: "0.16", "\"4/25\"" in JSON), kept per thread under the value it
// stands for: a few hundred counts make up most reports, and finding a
// count's text costs less than formatting it. Direct-mapped; each slot
// holds the text of one value, in a block that is copied whole.
// `Format::Write(v, p)` writes v's text at p (room for 88 bytes) and
// returns its end; each Format has a table of its own.
template <typename Format>
class VaryingTexts {
 public:
  struct Slot {
    // The value: a number's bits and kNumber, or an exact count's
    // numerator and denominator.
    uint64_t a = 0, b = 0;
    char text[32];
    uint32_t size = 0;  // 0: empty.
  };

  // The slot for `v`, its text made if another value had it. Null when
  // the text is longer than a slot holds (then the caller writes it).
  static const Slot* Find(const VaryingValue& v) {
    uint64_t a, b;
    if (v.kind == VaryingValue::Kind::kNumber) {
      std::memcpy(&a, &v.number, sizeof(a));
      b = kNumber;
    } else {
      a = static_cast<uint64_t>(v.exact.num());
      b = static_cast<uint64_t>(v.exact.den());
    }
    thread_local std::unique_ptr<std::array<Slot, kSlots>> slots;
    if (slots == nullptr) slots = std::make_unique<std::array<Slot, kSlots>>();
    const uint64_t hash =
        (a * 0x9E3779B97F4A7C15ull) ^ (b * 0xC2B2AE3D27D4EB4Full);
    Slot& slot = (*slots)[hash >> (64 - kSlotBits)];
    if (slot.size != 0 && slot.a == a && slot.b == b) return &slot;
    char text[kJsonDoubleMax + 48];
    const size_t size = Format::Write(v, text) - text;
    if (size > sizeof(slot.text)) return nullptr;
    std::memcpy(slot.text, text, size);
    slot.size = static_cast<uint32_t>(size);
    slot.a = a;
    slot.b = b;
    return &slot;
  }

 private:
  // A denominator is positive: this one marks a number.
  static constexpr uint64_t kNumber = ~uint64_t{0};
  static constexpr int kSlotBits = 10;
  static constexpr size_t kSlots = size_t{1} << kSlotBits;
};

// A count as the JSON line writes it: a number as the protobuf printer
// does, an exact count quoted.
struct JsonCount {
  static char* Write(const VaryingValue& v, char* p) {
    return v.kind == VaryingValue::Kind::kNumber ? WriteJsonDouble(v.number, p)
                                                 : WriteExactText(v.exact, p);
  }
};

// A fragment of JSON kept per thread under its key (see Cached): the text
// of a message's members with gaps where the varying values go.
template <typename Key>
struct Fragment {
  std::optional<Key> key;
  std::string text;
  size_t gaps[2] = {0, 0};  // Offsets in `text` of the varying values.
  int gap_count = 0;
};

// Per-thread caches of text kept under a state's or an ion's key (an
// Entry has `std::optional<Key> key`): a few hundred distinct states and
// ions make up most reports, so each is written once per thread.
template <typename Key, typename Entry = Fragment<Key>>
Entry& CachedFragment(const Key& key) {
  // On the heap, made on first use: as thread_local storage it would be
  // zeroed by the loader at every process and thread start (the caches
  // made some 0.6 MB of TLS, docs/performance.md). Each slot is made when
  // first used too, so that a one-record process touches a page of
  // pointers, not the whole table.
  using Cache = std::array<std::unique_ptr<Entry>, Key::kCacheSlots>;
  thread_local std::unique_ptr<Cache> cache;
  if (cache == nullptr) cache = std::make_unique<Cache>();
  std::unique_ptr<Entry>& slot = (*cache)[key.Hash() % Key::kCacheSlots];
  if (slot == nullptr) slot = std::make_unique<Entry>();
  return *slot;
}

// The JSON object of a report (api/report_view.h visitor): members in
// the walk's order, which is the declaration order the protobuf printer
// uses, every field printed.
class JsonWriter {
 public:
  explicit JsonWriter(LineWriter* out) : out_(out) {}

  template <typename F>
  void String(const F& f, absl::string_view v) {
    Key(f.json_key);
    out_->String(v);
  }
  template <typename F>
  void Int(const F& f, int32_t v) {
    Key(f.json_key);
    out_->Int(v);
  }
  template <typename F>
  void Double(const F& f, double v) {
    Key(f.json_key);
    out_->Double(v);
  }
  template <typename F>
  void Bool(const F& f, bool v) {
    Key(f.json_key);
    if (v) {
      out_->Lit("true");
    } else {
      out_->Lit("false");
    }
  }
  template <typename F, typename Items, typename Visit>
  void Messages(const F& f, const Items& items, Visit visit) {
    Key(f.json_key);
    out_->Char('[');
    bool first = true;
    for (const auto& item : items) {
      if (!first) out_->Char(',');
      first = false;
      out_->Char('{');
      JsonWriter member(out_);
      visit(item, member);
      out_->Char('}');
    }
    out_->Char(']');
  }

  // The message's members come from the fragment kept under `key`, made
  // by `visit` the first time (and whenever another key took the slot),
  // with the varying values written into its gaps.
  template <typename Key, typename Visit>
  void Cached(const Key& key, std::initializer_list<VaryingValue> varying,
              Visit visit) {
    Fragment<Key>& fragment = CachedFragment(key);
    if (!fragment.key.has_value() || !(*fragment.key == key)) {
      thread_local ReportText storage;
      storage.clear();
      {
        LineWriter scratch(&storage);
        JsonWriter recorder(&scratch);
        recorder.gaps_ = fragment.gaps;
        visit(recorder);
        fragment.gap_count = recorder.gap_count_;
      }
      fragment.text.assign(storage.data(), storage.size());
      fragment.key = key;
      fragment.key->Keep();
    }
    const absl::string_view text = fragment.text;
    size_t from = 0;
    for (int i = 0; i < fragment.gap_count; ++i) {
      out_->Raw(text.substr(from, fragment.gaps[i] - from));
      const VaryingValue& v = varying.begin()[i];
      if (const auto* kept = VaryingTexts<JsonCount>::Find(v)) {
        out_->Block(kept->text, kept->size);
      } else if (v.kind == VaryingValue::Kind::kNumber) {
        out_->Double(v.number);
      } else {
        out_->Exact(v.exact);
      }
      from = fragment.gaps[i];
    }
    out_->Raw(text.substr(from));
    first_ = false;
  }
  // Only while a fragment is made: the member's key, and a gap for its
  // value.
  template <typename F>
  void VaryingNumber(const F& f, int i) {
    Gap(f.json_key);
  }
  template <typename F>
  void VaryingExact(const F& f, int i) {
    Gap(f.json_key);
  }

 private:
  // `json_key` is "\"name\":".
  ABSL_ATTRIBUTE_ALWAYS_INLINE void Key(absl::string_view json_key) {
    out_->Key(json_key, first_);
    first_ = false;
  }
  void Gap(absl::string_view json_key) {
    Key(json_key);
    gaps_[gap_count_++] = out_->text().size();
  }

  LineWriter* const out_;
  bool first_ = true;
  size_t* gaps_ = nullptr;  // Where a recorder notes its gaps.
  int gap_count_ = 0;
};

// A count as a CSV cell writes it: a number as absl::StrAppend does
// (%.6g), an exact count as Rational::ToString does ("4/25"), unquoted.
struct CsvCount {
  static char* Write(const VaryingValue& v, char* p) {
    if (v.kind == VaryingValue::Kind::kNumber) {
      const absl::AlphaNum text(v.number);
      std::memcpy(p, text.data(), text.size());
      return p + text.size();
    }
    p = std::to_chars(p, p + 20, v.exact.num()).ptr;
    if (v.exact.den() != 1) {
      *p++ = '/';
      p = std::to_chars(p, p + 20, v.exact.den()).ptr;
    }
    return p;
  }
};

// Whether `field` holds a comma, a quote or a line break: 16 bytes at a
// time with SSE2 (part of every x86-64; cells of ions and messages are a
// few hundred bytes), without reading outside the field: a short one is
// first copied into a zeroed block (a zero byte is none of the four),
// and a longer one's last block overlaps the one before it. Elsewhere
// byte by byte.
bool NeedsCsvQuotes(absl::string_view field) {
#if defined(__SSE2__)
  const auto special = [](__m128i x) {
    const __m128i hit =
        _mm_or_si128(_mm_or_si128(_mm_cmpeq_epi8(x, _mm_set1_epi8(',')),
                                  _mm_cmpeq_epi8(x, _mm_set1_epi8('"'))),
                     _mm_or_si128(_mm_cmpeq_epi8(x, _mm_set1_epi8('\n')),
                                  _mm_cmpeq_epi8(x, _mm_set1_epi8('\r'))));
    return _mm_movemask_epi8(hit) != 0;
  };
  const size_t n = field.size();
  if (n < 16) {
    alignas(16) char block[16] = {};
    CopyShortText(field.data(), n, block);
    return special(_mm_load_si128(reinterpret_cast<const __m128i*>(block)));
  }
  size_t i = 0;
  for (; i + 16 <= n; i += 16) {
    if (special(_mm_loadu_si128(
            reinterpret_cast<const __m128i*>(field.data() + i)))) {
      return true;
    }
  }
  return i < n && special(_mm_loadu_si128(
                      reinterpret_cast<const __m128i*>(field.data() + n - 16)));
#else
  // A plain scan: find_first_of builds a 256-entry table on every call.
  for (const char c : field) {
    if (c == ',' || c == '"' || c == '\n' || c == '\r') return true;
  }
  return false;
#endif
}

// Appends `field`, quoted when it holds a comma, a quote or a line break.
void CsvField(absl::string_view field, ReportText* out) {
  if (!NeedsCsvQuotes(field)) {
    out->append(field.data(), field.size());
    return;
  }
  // Quoted, with each quote doubled: the runs up to and including each
  // quote, then the rest.
  out->push_back('"');
  size_t from = 0;
  for (size_t quote = field.find('"'); quote != absl::string_view::npos;
       quote = field.find('"', quote + 1)) {
    out->append(field.data() + from, quote + 1 - from);
    out->push_back('"');
    from = quote + 1;
  }
  out->append(field.data() + from, field.size() - from);
  out->push_back('"');
}

// Appends the pieces one by one: absl::StrAppend makes its room with
// std::string::resize, which writes it full of zeros first. (Text is a
// std::string or a ReportText, here and below.)
template <typename Text>
void AppendPieces(Text* out, std::initializer_list<absl::string_view> pieces) {
  for (absl::string_view piece : pieces)
    out->append(piece.data(), piece.size());
}

// Appends `separator` to a joined list, except before its first item.
template <typename Text>
void Separate(absl::string_view separator, bool* first, Text* list) {
  if (!*first) list->append(separator.data(), separator.size());
  *first = false;
}

// Appends a signed oxidation state, the one spelling of human output, CSV
// and messages: "Fe+2", "O-2", "Xe0".
template <typename Text>
void AppendState(absl::string_view element, int32_t state, Text* out) {
  out->append(element.data(), element.size());
  if (state > 0) out->push_back('+');
  const absl::AlphaNum number(state);
  out->append(number.data(), number.size());
}

// What a CSV cell holds.
enum class Cell {
  kRow,
  kId,
  kValid,
  kFormula,
  kKind,
  kStates,
  kFigure,      // A number, blank for an invalid record.
  kSaturation,  // A number, blank where no estimate is made.
  kModel,
  kSaturationModel,
  kFamily,
  kTotalValence,
  kIons,
  kCodes,
  kMessages,
};

// A CSV column, the report field it comes from and what its cell holds.
struct CsvColumn {
  absl::string_view name;
  absl::string_view field;
  Cell cell;
};

// The CSV columns, in the header's order (see ReportCsvHeader).
constexpr CsvColumn kCsvColumns[] = {
    {"row", "row", Cell::kRow},
    {"id", "id", Cell::kId},
    {"valid", "valid", Cell::kValid},
    {"formula", "formula", Cell::kFormula},
    {"composition_kind", "composition_kind", Cell::kKind},
    {"oxidation_states", "oxidation_states", Cell::kStates},
    {"score", "score", Cell::kFigure},
    {"unpaired_per_formula_unit", "unpaired_per_formula_unit", Cell::kFigure},
    {"effective_moment_per_formula_unit", "effective_moment_per_formula_unit",
     Cell::kFigure},
    {"expected_moment_low", "expected_moment_low", Cell::kFigure},
    {"expected_moment_high", "expected_moment_high", Cell::kFigure},
    {"curie_constant", "curie_constant", Cell::kFigure},
    {"valence_electron_concentration", "valence_electron_concentration",
     Cell::kFigure},
    {"saturation_moment_per_formula_unit", "saturation_moment_per_formula_unit",
     Cell::kSaturation},
    {"saturation_moment_low", "saturation_moment_low", Cell::kSaturation},
    {"saturation_moment_high", "saturation_moment_high", Cell::kSaturation},
    {"saturation_moment_model", "saturation_moment_model",
     Cell::kSaturationModel},
    {"moment_model", "moment_model", Cell::kModel},
    {"structure_family", "structure_family", Cell::kFamily},
    {"total_valence_electrons", "total_valence_electrons", Cell::kTotalValence},
    {"ions", "ions", Cell::kIons},
    {"diagnostic_codes", "diagnostics", Cell::kCodes},
    {"diagnostics", "diagnostics", Cell::kMessages}};
constexpr size_t kCsvColumnCount = std::size(kCsvColumns);
// The numbers of the columns, which the gatherer keeps by column.

// Each column's field as its index in ReportMask::FieldNames(), so that
// a mask is asked per column with a shift.
const std::array<int, kCsvColumnCount>& CsvColumnFields() {
  static const std::array<int, kCsvColumnCount> fields = [] {
    std::array<int, kCsvColumnCount> fields;
    const std::vector<std::string>& names = ReportMask::FieldNames();
    for (size_t c = 0; c < kCsvColumnCount; ++c) {
      fields[c] = static_cast<int>(
          std::find(names.begin(), names.end(), kCsvColumns[c].field) -
          names.begin());
    }
    return fields;
  }();
  return fields;
}

// The values of one CSV line, gathered from the walk (api/report_view.h
// visitor): the report's own scalars, and its states, ions and diagnostics
// joined into one cell each (formats in ReportCsvHeader's comment).
// Alternatives have no column.
class CsvGatherer : public TopLevelVisitor {
 public:
  CsvGatherer() : cells_(Cells()) {
    states.clear();
    ions.clear();
    codes.clear();
    messages.clear();
  }
  CsvGatherer(const CsvGatherer&) = delete;
  CsvGatherer& operator=(const CsvGatherer&) = delete;

  template <typename F>
  void String(const F& f, absl::string_view v) {
    if (f.name == "id") {
      id = v;
    } else if (f.name == "formula") {
      formula = v;
    } else if (f.name == "composition_kind") {
      kind = v;
    } else if (f.name == "moment_model") {
      model = v;
    } else if (f.name == "saturation_moment_model") {
      saturation_model = v;
    } else if (f.name == "structure_family") {
      family = v;
    }
  }
  template <typename F>
  void Int(const F& f, int32_t v) {
    if (f.name == "row") row = v;
  }
  template <typename F>
  void Double(const F& f, double v) {
    if (const int c = NumberColumn(f); c >= 0) numbers[c] = v;
  }
  template <typename F>
  void Bool(const F& f, bool v) {
    if (f.name == "valid") valid = v;
    if (f.name == "saturation_moment_estimated") estimated = v;
  }
  template <typename F, typename Items, typename Visit>
  void Messages(const F& f, const Items& items, Visit visit) {
    if (f.name == "oxidation_states") {
      bool first = true;
      for (const auto& item : items) {
        Separate(";", &first, &states);
        ItemCell state(ItemCell::kState, &states);
        visit(item, state);
        state.Finish();
      }
    } else if (f.name == "ions") {
      bool first = true;
      for (const auto& item : items) {
        Separate("; ", &first, &ions);
        ItemCell ion(ItemCell::kIon, &ions);
        visit(item, ion);
        ion.Finish();
      }
    } else if (f.name == "diagnostics") {
      bool first_code = true, first_message = true;
      for (const auto& item : items) {
        Member d;
        visit(item, d);
        Separate(";", &first_code, &codes);
        AppendPieces(&codes, {d.severity, ":", d.code});
        Separate(" | ", &first_message, &messages);
        AppendPieces(&messages, {d.severity, " ", d.code, ": ", d.message});
      }
    }
  }

  // The line of the columns `mask` wants, line break included.
  void Write(const ReportMask& mask, ReportText* out) const {
    const std::array<int, kCsvColumnCount>& fields = CsvColumnFields();
    bool first = true;
    for (size_t c = 0; c < kCsvColumnCount; ++c) {
      if (!mask.Has(fields[c])) continue;
      if (!first) out->push_back(',');
      first = false;
      WriteCell(c, out);
    }
    out->push_back('\n');
  }

 private:
  // Column c's cell.
  void WriteCell(size_t c, ReportText* out) const {
    switch (kCsvColumns[c].cell) {
      case Cell::kFigure:
      case Cell::kTotalValence:
        // StrAppend prints doubles as %.6g does (but for the sign of a
        // NaN, which reports never hold). An invalid record's figures are
        // blank, not 0: it has none.
        if (valid) out->append(absl::AlphaNum(numbers[c]).Piece());
        break;
      case Cell::kSaturation:
        // No estimate is a blank, not 0 (Fe2VAl's estimate is 0).
        if (valid && estimated) {
          out->append(absl::AlphaNum(numbers[c]).Piece());
        }
        break;
      case Cell::kRow:
        out->append(absl::AlphaNum(row).Piece());
        break;
      case Cell::kId:
        CsvField(id, out);
        break;
      case Cell::kValid:
        out->append(valid ? "true" : "false");
        break;
      case Cell::kFormula:
        CsvField(formula, out);
        break;
      case Cell::kKind:
        CsvField(kind, out);
        break;
      case Cell::kStates:
        CsvField(states.view(), out);
        break;
      case Cell::kModel:
        CsvField(model, out);
        break;
      case Cell::kSaturationModel:
        CsvField(saturation_model, out);
        break;
      case Cell::kFamily:
        CsvField(family, out);
        break;
      case Cell::kIons:
        CsvField(ions.view(), out);
        break;
      case Cell::kCodes:
        CsvField(codes.view(), out);
        break;
      case Cell::kMessages:
        CsvField(messages.view(), out);
        break;
    }
  }

  // A state, an ion or a diagnostic: the members a cell needs. The views
  // point into the report being walked, which outlives the member.
  struct Member : FieldByFieldVisitor<Member> {
    absl::string_view element, code, severity, message, exact, spin_state,
        geometry, site;
    std::string occupancy;
    int32_t state = 0;
    int32_t unpaired = 0;
    double count = 0;
    double moment = 0;
    std::string varying_exact;  // Made from a VaryingExact value.

    template <typename F>
    void String(const F& f, absl::string_view v) {
      absl::string_view* to = f.name == "element"       ? &element
                              : f.name == "code"        ? &code
                              : f.name == "severity"    ? &severity
                              : f.name == "message"     ? &message
                              : f.name == "count_exact" ? &exact
                              : f.name == "spin_state"  ? &spin_state
                              : f.name == "geometry"    ? &geometry
                              : f.name == "site"        ? &site
                                                        : nullptr;
      if (to != nullptr) *to = v;
      // The engine walk makes this text on the fly: keep a copy.
      if (f.name == "ligand_field_occupancy")
        occupancy.assign(v.data(), v.size());
    }
    template <typename F>
    void Int(const F& f, int32_t v) {
      if (f.name == "state") state = v;
      if (f.name == "unpaired_electrons") unpaired = v;
    }
    template <typename F>
    void Double(const F& f, double v) {
      if (f.name == "count") count = v;
      if (f.name == "moment") moment = v;
    }
    template <typename F>
    void Bool(const F&, bool) {}
    template <typename F, typename Items, typename Visit>
    void Messages(const F&, const Items&, Visit) {}
    template <typename F>
    void VaryingNumber(const F& f, int i) {
      if (f.name == "count") count = varying(i).number;
    }
    template <typename F>
    void VaryingExact(const F& f, int i) {
      if (f.name != "count_exact") return;
      varying_exact = varying(i).exact.ToString();
      exact = varying_exact;
    }
  };

  // A state's or an ion's text before and after its count in its cell,
  // kept per thread under the item's key.
  template <typename Key>
  struct AroundCount {
    std::optional<Key> key;
    std::string before, after;
  };

  // Appends a state's part of its cell ("Fe+2:4/25") or an ion's ("Fe+3
  // count=2 unpaired=5 spin=high/octahedral moment=5.91608 site=B") to
  // `out`: from its fields one by one (the message walk), or, where the
  // walk offers it (Cached, the engine walk), from the text kept under the
  // item's key around its count, which is all that varies.
  class ItemCell {
   public:
    enum Kind { kState, kIon };
    ItemCell(Kind kind, ReportText* out) : kind_(kind), out_(out) {}

    template <typename F>
    void String(const F& f, absl::string_view v) {
      fields_.String(f, v);
    }
    template <typename F>
    void Int(const F& f, int32_t v) {
      fields_.Int(f, v);
    }
    template <typename F>
    void Double(const F& f, double v) {
      fields_.Double(f, v);
    }
    template <typename F>
    void Bool(const F&, bool) {}
    template <typename F, typename Items, typename Visit>
    void Messages(const F&, const Items&, Visit) {}
    // Only Cached's walk has varying values, and it goes to a Member.
    template <typename F>
    void VaryingNumber(const F&, int) {}
    template <typename F>
    void VaryingExact(const F&, int) {}

    template <typename Key, typename Visit>
    void Cached(const Key& key, std::initializer_list<VaryingValue> varying,
                Visit visit) {
      AroundCount<Key>& kept = CachedFragment<Key, AroundCount<Key>>(key);
      if (!kept.key.has_value() || !(*kept.key == key)) {
        Member item;
        item.Cached(key, varying, visit);
        kept.before.clear();
        kept.after.clear();
        Around(item, &kept.before, &kept.after);
        kept.key = key;
        kept.key->Keep();
      }
      out_->append(kept.before);
      // The count as the walk gives it: a state's exact one (as
      // Rational::ToString writes it), an ion's number.
      const VaryingValue& count = varying.begin()[kind_ == kState ? 1 : 0];
      if (const auto* text = VaryingTexts<CsvCount>::Find(count)) {
        out_->append(text->text, text->size);
      } else {
        char buffer[kJsonDoubleMax + 48];
        out_->append(buffer, CsvCount::Write(count, buffer) - buffer);
      }
      out_->append(kept.after);
      done_ = true;
    }

    // Appends the part from the fields, unless Cached has appended it.
    void Finish() {
      if (done_) return;
      std::string before, after;
      Around(fields_, &before, &after);
      out_->append(before);
      if (kind_ == kState) {
        out_->append(fields_.exact.data(), fields_.exact.size());
      } else {
        out_->append(absl::AlphaNum(fields_.count).Piece());
      }
      out_->append(after);
    }

   private:
    // The text before and after the count.
    void Around(const Member& m, std::string* before,
                std::string* after) const {
      AppendState(m.element, m.state, before);
      if (kind_ == kState) {
        before->push_back(':');
        return;
      }
      before->append(" count=");
      absl::StrAppend(after, " unpaired=", m.unpaired);
      // A spin state only where high and low spin differ (not for d0,
      // d10 or octahedral d3, say), as in human output.
      if (!m.spin_state.empty() && SpinStateMatters(m.geometry, m.occupancy)) {
        absl::StrAppend(after, " spin=", m.spin_state, "/", m.geometry);
      }
      absl::StrAppend(after, " moment=", m.moment);
      if (!m.site.empty()) absl::StrAppend(after, " site=", m.site);
    }

    const Kind kind_;
    ReportText* const out_;
    Member fields_;  // The fields, when they come one by one.
    bool done_ = false;
  };

  // The joined cells, in storage kept per thread: their room is made
  // once, not for every line. ReportText: their many short pieces are
  // appended without a call each.
  struct JoinedCells {
    ReportText states, ions, codes, messages;
  };
  static JoinedCells& Cells() {
    thread_local JoinedCells cells;
    return cells;
  }

  // The column of a number field, or -1: looked up once per field of the
  // engine walk, each of whose fields has a type of its own (a macro's
  // lambda), and by name for the message walk's NamedField.
  template <typename F>
  static int NumberColumn(const F& f) {
    if constexpr (std::is_same_v<F, NamedField>) {
      return FindNumberColumn(f.name);
    } else {
      static const int column = FindNumberColumn(f.name);
      return column;
    }
  }
  static int FindNumberColumn(absl::string_view name) {
    for (size_t c = 0; c < kCsvColumnCount; ++c) {
      if (name == kCsvColumns[c].field) return static_cast<int>(c);
    }
    return -1;
  }

  JoinedCells& cells_;
  int32_t row = 0;
  // Views into the report being walked, which outlives the gatherer.
  absl::string_view id, formula, kind, model, saturation_model, family;
  ReportText& states = cells_.states;
  ReportText& ions = cells_.ions;
  ReportText& codes = cells_.codes;
  ReportText& messages = cells_.messages;
  bool valid = false;
  double numbers[kCsvColumnCount] = {};  // By column.
  bool estimated = false;
};

// The fields the CSV cells of `mask`'s columns are made from: the
// figures' cells need the verdict too; the saturation moment's, its flag.
ReportMask CsvCellFields(const ReportMask& mask) {
  return mask.all() ? mask
                    : mask.With("valid").With("saturation_moment_estimated");
}

// Writes the line of the fields `mask` wants of whatever `walk(mask,
// visitor)` walks.
template <typename Walk>
void WriteLine(ReportLineFormat format, const ReportMask& mask, Walk walk,
               ReportText* out) {
  if (format == ReportLineFormat::kCsv) {
    CsvGatherer csv;
    walk(CsvCellFields(mask), csv);
    csv.Write(mask, out);
    return;
  }
  LineWriter line(out);
  line.Char('{');
  JsonWriter json(&line);
  walk(mask, json);
  line.Lit("}\n");
}

// WriteLine, appended to a string (through storage kept per thread).
template <typename Walk>
void WriteLine(ReportLineFormat format, const ReportMask& mask, Walk walk,
               std::string* out) {
  thread_local ReportText storage;
  storage.clear();
  WriteLine(format, mask, walk, &storage);
  out->append(storage.data(), storage.size());
}

}  // namespace

std::string ReportCsvHeader(const ReportMask& mask) {
  const std::array<int, kCsvColumnCount>& fields = CsvColumnFields();
  std::string header;
  for (size_t c = 0; c < kCsvColumnCount; ++c) {
    if (!mask.Has(fields[c])) continue;
    if (!header.empty()) header += ',';
    absl::StrAppend(&header, kCsvColumns[c].name);
  }
  return header;
}

absl::Status CheckCsvFields(const ReportMask& mask) {
  std::vector<absl::string_view> with_columns;
  for (const CsvColumn& column : kCsvColumns) {
    if (with_columns.empty() || with_columns.back() != column.field) {
      with_columns.push_back(column.field);
    }
  }
  for (const std::string& field : mask.Paths()) {
    if (std::find(with_columns.begin(), with_columns.end(), field) ==
        with_columns.end()) {
      return absl::InvalidArgumentError(absl::StrCat(
          "fields: '", field, "' has no CSV column; the CSV columns come from ",
          absl::StrJoin(with_columns, ", "),
          " (JSONL output has every field)"));
    }
  }
  return absl::OkStatus();
}

ReportMask FieldsToRequest(ReportLineFormat format, const ReportMask& mask) {
  const ReportMask counted =
      mask.With("id").With("row").With("valid").With("diagnostics");
  return format == ReportLineFormat::kCsv ? CsvCellFields(counted) : counted;
}

void AppendReportLine(ReportLineFormat format, const v1::RecordReport& report,
                      std::string* out, const ReportMask& mask) {
  WriteLine(
      format, mask,
      [&](const ReportMask& m, auto& visitor) {
        VisitRecordReport(report, m, visitor);
      },
      out);
}

void AppendReportLine(ReportLineFormat format, const CompositionReport& report,
                      const v1::CompositionRecord& record, std::string* out,
                      const ReportMask& mask) {
  WriteLine(
      format, mask,
      [&](const ReportMask& m, auto& visitor) {
        VisitRecordReport(report, record, m, visitor);
      },
      out);
}

void ReportCounts::Add(const ReportCounts& other) {
  rows += other.rows;
  valid += other.valid;
  invalid += other.invalid;
  rows_with_warnings += other.rows_with_warnings;
  diagnostics += other.diagnostics;
  for (size_t i = 0; i < std::size(by_code); ++i) {
    for (const auto& [code, count] : other.by_code[i])
      by_code[i][code] += count;
  }
}

void AddReport(ReportLineFormat format, const v1::RecordReport& report,
               ReportLines* out, const ReportMask& mask) {
  WriteLine(
      format, mask,
      [&](const ReportMask& m, auto& visitor) {
        VisitRecordReport(report, m, visitor);
      },
      &out->text);
  ReportCounts& c = out->counts;
  ++c.rows;
  ++(report.valid() ? c.valid : c.invalid);
  bool warned = false;
  for (const v1::Diagnostic& d : report.diagnostics()) {
    // Reports made by api/ name one of the three severities.
    const Severity severity =
        ParseName<Severity>(d.severity()).value_or(Severity::kError);
    warned |= severity == Severity::kWarning;
    ++c.by_code[static_cast<int>(severity)][d.code()];
  }
  c.rows_with_warnings += warned;
  c.diagnostics += report.diagnostics_size();
  out->rows.push_back({report.row(), report.id(), warned});
}

void AddReport(ReportLineFormat format, const CompositionReport& report,
               const v1::CompositionRecord& record, ReportLines* out,
               const ReportMask& mask) {
  WriteLine(
      format, mask,
      [&](const ReportMask& m, auto& visitor) {
        VisitRecordReport(report, record, m, visitor);
      },
      &out->text);
  ReportCounts& c = out->counts;
  ++c.rows;
  ++(report.valid ? c.valid : c.invalid);
  bool warned = false;
  for (const Diagnostic& d : report.diagnostics) {
    warned |= d.severity == Severity::kWarning;
    ++c.by_code[static_cast<int>(d.severity)][d.code];
  }
  c.rows_with_warnings += warned;
  c.diagnostics += static_cast<int64_t>(report.diagnostics.size());
  out->rows.push_back({record.row(), report.id, warned});
}

}  // namespace shellwright::cli
