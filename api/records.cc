#include "api/records.h"

#include <algorithm>
#include <string>
#include <type_traits>

#include "absl/strings/str_cat.h"
#include "api/report_view.h"
#include "engine/diagnostic_codes.h"
#include "engine/formula.h"
#include "util/utf8.h"

namespace shellwright {
namespace {

// Builds a message from VisitRecordReport's calls, through each field's
// setter and adder.
template <typename Message>
class ProtoBuilder : public FieldByFieldVisitor<ProtoBuilder<Message>> {
 public:
  explicit ProtoBuilder(Message* message) : message_(message) {}

  template <typename F>
  void String(const F& f, absl::string_view v) {
    f.set(message_, v);
  }
  template <typename F>
  void Int(const F& f, int32_t v) {
    f.set(message_, v);
  }
  template <typename F>
  void Double(const F& f, double v) {
    f.set(message_, v);
  }
  template <typename F>
  void Bool(const F& f, bool v) {
    f.set(message_, v);
  }
  template <typename F, typename Items, typename Visit>
  void Messages(const F& f, const Items& items, Visit visit) {
    for (const auto& item : items) {
      auto* child = f.add(message_);
      ProtoBuilder<std::remove_pointer_t<decltype(child)>> builder(child);
      visit(item, builder);
    }
  }
  template <typename F>
  void VaryingNumber(const F& f, int i) {
    f.set(message_, this->varying(i).number);
  }
  template <typename F>
  void VaryingExact(const F& f, int i) {
    f.set(message_, this->varying(i).exact.ToString());
  }

 private:
  Message* const message_;
};

}  // namespace

CompositionInput CompositionInputFromProto(
    const v1::CompositionRecord& record) {
  CompositionInput in;
  in.id = record.id();
  in.formula = record.formula();
  if (record.has_charge()) in.net_charge = record.charge();
  in.declared_states = record.declared_states();
  in.geometry = record.geometry();
  in.spin_state = record.spin_state();
  in.variables = record.variables();
  if (record.has_measured_moment()) {
    in.measured_moment = record.measured_moment();
  }
  if (record.has_moment_tolerance()) {
    in.moment_tolerance = record.moment_tolerance();
  }
  if (record.has_max_alternatives()) {
    in.max_alternatives =
        std::clamp(record.max_alternatives(), 0, kMaxAlternatives);
  }
  return in;
}

void RecordReportToProto(const CompositionReport& report,
                         const v1::CompositionRecord& record,
                         v1::RecordReport* out, const ReportMask& mask) {
  out->Clear();
  ProtoBuilder<v1::RecordReport> builder(out);
  VisitRecordReport(report, record, mask, builder);
}

void AnalyzeRecord(const v1::CompositionRecord& record, v1::RecordReport* out,
                   const ReportMask& mask) {
  RecordReportToProto(AnalyzeComposition(CompositionInputFromProto(record)),
                      record, out, mask);
}

void MalformedRecordReport(const v1::CompositionRecord& partial,
                           absl::string_view problem, v1::RecordReport* out) {
  out->Clear();
  out->set_id(std::string(Utf8Prefix(partial.id(), kMaxRecordIdLength)));
  out->set_row(partial.row());
  out->set_formula(std::string(EchoedFormula(partial)));
  out->set_valid(false);
  v1::Diagnostic* d = out->add_diagnostics();
  d->set_severity(std::string(Name(Severity::kError)));
  d->set_code(codes::kMalformedRecord);
  d->set_message(absl::StrCat("row ", partial.row(), ": ", problem));
}

}  // namespace shellwright
