// Which fields of a RecordReport a caller wants: the RecordBatch's
// report_mask (a google.protobuf.FieldMask) on the server, `check
// --fields` in the CLI. A masked report leaves the other fields at their
// defaults; the server neither builds nor sends them, and `check` writes
// only the masked keys (JSONL) or columns (CSV).
//
// The fields are those api/report_view.h's walk visits at the top level,
// in its order: ReportMask::FieldNames() is read from that walk, so a
// field added to the walk can be masked with no change here. Paths name
// top-level fields only; a repeated field (diagnostics, ions, ...) comes
// whole, as FieldMask allows for repeated fields.
//
// Example:
//
//   absl::StatusOr<shellwright::ReportMask> mask =
//       shellwright::ReportMask::FromPaths({"valid", "diagnostics"});
//   // mask->Has("valid") == true; mask->Has("ions") == false
//   shellwright::MaskedVisitor<JsonWriter> masked(*mask, json);
//   shellwright::VisitRecordReport(report, masked);  // valid, diagnostics.
//
// Thread safety: ReportMask is a value; its const methods and FieldNames()
// are thread-safe. A MaskedVisitor is used by one thread.

#ifndef SHELLWRIGHT_API_REPORT_MASK_H_
#define SHELLWRIGHT_API_REPORT_MASK_H_

#include <cstdint>
#include <initializer_list>
#include <string>
#include <vector>

#include "absl/status/statusor.h"
#include "absl/strings/string_view.h"
#include "absl/types/span.h"
#include "google/protobuf/field_mask.pb.h"

namespace shellwright {

class ReportMask {
 public:
  // Every field.
  ReportMask() = default;

  // The fields named by `paths`, each a top-level RecordReport field name;
  // no paths: every field. INVALID_ARGUMENT starting "report_mask: " and
  // naming the first path that is not a field (and listing the fields)
  // otherwise. Repeated paths are fine.
  static absl::StatusOr<ReportMask> FromPaths(
      absl::Span<const std::string> paths);
  static absl::StatusOr<ReportMask> FromPaths(
      std::initializer_list<std::string> paths) {
    return FromPaths(absl::MakeConstSpan(paths.begin(), paths.size()));
  }
  static absl::StatusOr<ReportMask> FromFieldMask(
      const google::protobuf::FieldMask& mask);
  // The fields of a comma-separated list ("valid, diagnostics"; blanks
  // around names trimmed), as FromPaths; an empty name is an error too.
  static absl::StatusOr<ReportMask> FromList(absl::string_view list);

  // The top-level RecordReport fields in the walk's (declaration) order:
  // the names a mask may hold. Read once from api/report_view.h's walk.
  static const std::vector<std::string>& FieldNames();

  // True when every field is wanted (no mask, or one naming them all).
  bool all() const { return bits_ == AllBits(); }
  // Whether the field at `index` in FieldNames() is wanted.
  bool Has(int index) const { return (bits_ >> index) & 1u; }
  // Whether the field `name` is wanted; false for a name that is no field.
  bool Has(absl::string_view name) const;

  // This mask and the field `name` too. REQUIRES: `name` is a field.
  ReportMask With(absl::string_view name) const;

  // The wanted fields' names, in FieldNames() order; empty when all().
  std::vector<std::string> Paths() const;
  // Paths() as a FieldMask (cleared first): what to send a server.
  void ToFieldMask(google::protobuf::FieldMask* out) const;

 private:
  explicit ReportMask(uint64_t bits) : bits_(bits) {}
  // The mask of `bits` (0: every field), or their error.
  static absl::StatusOr<ReportMask> FromBits(
      const absl::StatusOr<uint64_t>& bits);
  static uint64_t AllBits();

  uint64_t bits_ = AllBits();  // Bit i: FieldNames()[i].
};

// A report visitor (api/report_view.h) that passes on to `inner` only the
// top-level fields `mask` wants: Walk a report with it, and `inner` sees a
// report with the other fields left out (not visited at all, so a field's
// items are not walked). The walk must be a whole report's, from its
// first field.
template <typename Visitor>
class MaskedVisitor {
 public:
  MaskedVisitor(const ReportMask& mask, Visitor& inner)
      : mask_(mask), inner_(inner) {}

  template <typename F>
  void String(const F& f, absl::string_view v) {
    if (Next()) inner_.String(f, v);
  }
  template <typename F>
  void Int(const F& f, int32_t v) {
    if (Next()) inner_.Int(f, v);
  }
  template <typename F>
  void Double(const F& f, double v) {
    if (Next()) inner_.Double(f, v);
  }
  template <typename F>
  void Bool(const F& f, bool v) {
    if (Next()) inner_.Bool(f, v);
  }
  template <typename F, typename Items, typename Visit>
  void Messages(const F& f, const Items& items, Visit visit) {
    if (Next()) inner_.Messages(f, items, visit);
  }

 private:
  bool Next() { return mask_.Has(index_++); }

  const ReportMask& mask_;
  Visitor& inner_;
  int index_ = 0;  // Of the next top-level field in the walk.
};

}  // namespace shellwright

#endif  // SHELLWRIGHT_API_REPORT_MASK_H_
