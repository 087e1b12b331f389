// Report lines for `shellwright check`: one JSONL or CSV line per record.
//
// A line is written either from a shellwright.v1.RecordReport (a server's
// answer) or straight from the engine's CompositionReport (in-process),
// which skips building a message per record. Both give the same bytes:
// one JSON writer and one CSV writer read either form through
// api/report_view.h's walk, the JSON is exactly what the protobuf printer
// writes for the RecordReport, and tests compare the two forms record by
// record.
//
// Example:
//   std::string text;
//   shellwright::cli::AppendReportLine(
//       shellwright::cli::ReportLineFormat::kJsonl, report, &text);
//   // text: {"id":"s1","valid":true,...}\n
//
// Thread safety: thread-safe.

#ifndef SHELLWRIGHT_CLIENTS_CLI_REPORT_LINES_H_
#define SHELLWRIGHT_CLIENTS_CLI_REPORT_LINES_H_

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <map>
#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "absl/base/attributes.h"
#include "absl/status/status.h"
#include "absl/strings/string_view.h"
#include "api/report_mask.h"
#include "engine/composition.h"
#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright::cli {

enum class ReportLineFormat { kJsonl, kCsv };

// Counts of reports by verdict and diagnostic code: `check`'s summary.
struct ReportCounts {
  int64_t rows = 0;
  int64_t valid = 0;
  int64_t invalid = 0;
  int64_t rows_with_warnings = 0;  // Rows with at least one warning.
  int64_t diagnostics = 0;         // All diagnostics of all rows.
  // Diagnostic code -> count, one map per severity, indexed by Severity
  // (error, warning, info; engine/composition.h).
  std::map<std::string, int64_t> by_code[3];

  // Adds `other`'s counts to these.
  void Add(const ReportCounts& other);
};

// A report's row, id and whether it has a warning: what `check` needs to
// spot ids that repeat across batches.
struct ReportRow {
  int32_t row;
  std::string id;
  bool warned;
};

// Text that grows without filling its new room first: a batch's report
// lines are written straight into it (AddReport), and `check` writes it
// out as it is. Unlike std::string::resize, making room writes nothing,
// so a line costs one pass over its bytes. Movable, not copyable.
class ReportText {
 public:
  ReportText() = default;
  ReportText(ReportText&& other) noexcept { *this = std::move(other); }
  ReportText& operator=(ReportText&& other) noexcept {
    data_ = std::move(other.data_);
    size_ = other.size_;
    capacity_ = other.capacity_;
    other.size_ = other.capacity_ = 0;
    return *this;
  }

  const char* data() const { return data_.get(); }
  size_t size() const { return size_; }
  size_t capacity() const { return capacity_; }
  bool empty() const { return size_ == 0; }
  absl::string_view view() const { return absl::string_view(data(), size_); }
  // Keeps the room.
  void clear() { size_ = 0; }

  // Room for `n` bytes in all, kept text included.
  void reserve(size_t n) {
    if (n > capacity_) Regrow(n);
  }
  // Room for `n` more bytes: returns where they go, to be written and
  // then kept with Commit(end).
  ABSL_ATTRIBUTE_ALWAYS_INLINE char* Room(size_t n) {
    if (capacity_ - size_ < n) Regrow(std::max(2 * capacity_, size_ + n));
    return data_.get() + size_;
  }
  // Keeps the text written up to `end`, a pointer into the room that
  // the last Room() call returned.
  void Commit(const char* end) { size_ = end - data_.get(); }
  // The end of the room: Room()'s pointer may write up to here.
  char* room_end() { return data_.get() + capacity_; }

  ABSL_ATTRIBUTE_ALWAYS_INLINE void append(const char* text, size_t n) {
    if (n > 32) {
      AppendLong(text, n);
      return;
    }
    char* at = Room(n);
    // Most pieces are short (keys, counts, names): up to 32 bytes go in
    // with two fixed-size moves, which may overlap, instead of a call.
    if (n >= 16) {
      Move<16>(text, at);
      Move<16>(text + n - 16, at + n - 16);
    } else if (n >= 8) {
      Move<8>(text, at);
      Move<8>(text + n - 8, at + n - 8);
    } else if (n >= 4) {
      Move<4>(text, at);
      Move<4>(text + n - 4, at + n - 4);
    } else if (n > 0) {
      at[0] = text[0];
      at[n / 2] = text[n / 2];
      at[n - 1] = text[n - 1];
    }
    size_ += n;
  }
  ABSL_ATTRIBUTE_ALWAYS_INLINE void append(absl::string_view text) {
    append(text.data(), text.size());
  }
  ABSL_ATTRIBUTE_ALWAYS_INLINE void push_back(char c) {
    *Room(1) = c;
    ++size_;
  }

 private:
  // Moves the text to a new block of `capacity` bytes.
  ABSL_ATTRIBUTE_NOINLINE void Regrow(size_t capacity) {
    std::unique_ptr<char[]> grown(new char[capacity]);
    if (size_ > 0) std::memcpy(grown.get(), data_.get(), size_);
    data_ = std::move(grown);
    capacity_ = capacity;
  }

  // Not inlined: the compiler, seeing a short source where it would be,
  // would warn of this copy's reading past it.
  ABSL_ATTRIBUTE_NOINLINE void AppendLong(const char* text, size_t n) {
    std::memcpy(Room(n), text, n);
    size_ += n;
  }
  // Copies N bytes through a register-sized value.
  template <size_t N>
  static void Move(const char* from, char* to) {
    char block[N];
    std::memcpy(block, from, N);
    std::memcpy(to, block, N);
  }

  std::unique_ptr<char[]> data_;
  size_t size_ = 0;
  size_t capacity_ = 0;
};

// The lines of a batch of reports, their counts, and their rows in order.
struct ReportLines {
  ReportText text;
  ReportCounts counts;
  std::vector<ReportRow> rows;
};

// The CSV header, without a line break: the columns whose field `mask`
// wants (diagnostic_codes and diagnostics both come from diagnostics).
// The cells:
//   oxidation_states  element, signed state, ':', exact count, joined by
//                     ';': "Fe+2:1;Fe+3:2;O-2:4" (counts may be "11/2");
//   the figures       score ... valence_electron_concentration: numbers,
//                     blank for an invalid record (it has none);
//   saturation_moment_per_formula_unit, saturation_moment_low,
//   saturation_moment_high  blank where no estimate is made;
//   saturation_moment_model  "sublattice_neel", a metallic model, or "";
//   moment_model      its name ("slater_pauling_alloy", "none", ...);
//   structure_family  "spinel", "garnet", ... or "" (no sites);
//   total_valence_electrons  Z_t, blank for an invalid record;
//   ions              one per ion, joined by "; ": "Fe+3 count=2
//                     unpaired=5 spin=high/octahedral moment=5.91608"
//                     (spin only where high and low spin differ), and
//                     " site=B" where a structure family placed it;
//   diagnostic_codes  severity:code joined by ';':
//                     "warning:possible_hydrate_typo;info:mixed_valence";
//   diagnostics       "severity code: message" joined by " | ".
std::string ReportCsvHeader(const ReportMask& mask = ReportMask());

// OK when every field `mask` names has a CSV column; otherwise
// INVALID_ARGUMENT starting "fields: ", naming the field and the fields
// that have columns (alternatives and units have none).
absl::Status CheckCsvFields(const ReportMask& mask);

// What to ask a server for when lines in `format` show the fields of
// `mask`: those, what their CSV cells are made from, and what AddReport
// counts (id, row, valid, diagnostics).
ReportMask FieldsToRequest(ReportLineFormat format, const ReportMask& mask);

// Appends the report's line, line break included, with the fields (JSONL)
// or columns (CSV) of `mask`.
void AppendReportLine(ReportLineFormat format, const v1::RecordReport& report,
                      std::string* out, const ReportMask& mask = ReportMask());

// The same line as for RecordReportToProto(report, record) (api/
// records.h), written from the engine report; `record` supplies the echoed
// row and formula.
void AppendReportLine(ReportLineFormat format, const CompositionReport& report,
                      const v1::CompositionRecord& record, std::string* out,
                      const ReportMask& mask = ReportMask());

// AppendReportLine to out->text, and the report counted in out->counts
// (whatever `mask` says: a remote report must hold FieldsToRequest's).
void AddReport(ReportLineFormat format, const v1::RecordReport& report,
               ReportLines* out, const ReportMask& mask = ReportMask());
void AddReport(ReportLineFormat format, const CompositionReport& report,
               const v1::CompositionRecord& record, ReportLines* out,
               const ReportMask& mask = ReportMask());

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_REPORT_LINES_H_
