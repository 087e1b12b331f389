#include "api/records.h"

#include <algorithm>
#include <array>
#include <memory>
#include <optional>
#include <string>
#include <type_traits>

#include "absl/strings/str_cat.h"
#include "api/report_view.h"
#include "engine/diagnostic_codes.h"
#include "engine/formula.h"
#include "util/utf8.h"

namespace shellwright {
namespace {

// A message kept per thread under the key of the Cached walk that built
// it (api/report_view.h), and the setters of its varying fields, so that
// the next message with that key is a copy plus those values.
template <typename Key, typename Message>
struct CachedMessage {
  // The most varying values a Cached walk has (a state's count and exact
  // count).
  static constexpr int kMaxVarying = 2;

  std::optional<Key> key;
  Message message;
  // Setter i applies varying value i: a number or an exact count.
  void (*set_number[kMaxVarying])(Message*, const double&) = {};
  void (*set_exact[kMaxVarying])(Message*, const std::string&) = {};
  int varying = 0;
};

// The slot for `key` in this thread's cache of messages: a few hundred
// distinct states and ions make up most reports, so each is built once
// per thread (as the JSON writer keeps their text).
template <typename Key, typename Message>
CachedMessage<Key, Message>& CachedSlot(const Key& key) {
  // On the heap, made on first use: as thread_local storage it would be
  // zeroed by the loader at every process and thread start (the caches
  // made some 0.6 MB of TLS, docs/performance.md). Each slot is made when
  // first used too: a whole table of messages is some 0.35 MB that a
  // one-record process would zero, and every page costs a fault.
  using Cache = std::array<std::unique_ptr<CachedMessage<Key, Message>>,
                           Key::kCacheSlots>;
  thread_local std::unique_ptr<Cache> cache;
  if (cache == nullptr) cache = std::make_unique<Cache>();
  std::unique_ptr<CachedMessage<Key, Message>>& slot =
      (*cache)[key.Hash() % Key::kCacheSlots];
  if (slot == nullptr) slot = std::make_unique<CachedMessage<Key, Message>>();
  return *slot;
}

// Builds a message from VisitRecordReport's calls, through each field's
// setter and adder. A Cached walk's message is copied from the thread's
// cache (made by the walk the first time), with its varying values set.
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

  template <typename Key, typename Visit>
  void Cached(const Key& key, std::initializer_list<VaryingValue> varying,
              Visit visit) {
    using Slot = CachedMessage<Key, Message>;
    if (varying.size() > Slot::kMaxVarying) {  // Not kept: build it.
      FieldByFieldVisitor<ProtoBuilder<Message>>::Cached(key, varying, visit);
      return;
    }
    Slot& slot = CachedSlot<Key, Message>(key);
    if (!slot.key.has_value() || !(*slot.key == key)) {
      slot.key.reset();
      slot.message.Clear();
      slot.varying = 0;
      ProtoBuilder<Message> builder(&slot.message);
      builder.set_number_ = slot.set_number;
      builder.set_exact_ = slot.set_exact;
      builder.FieldByFieldVisitor<ProtoBuilder<Message>>::Cached(key, varying,
                                                                 visit);
      slot.varying = builder.varying_count_;
      slot.key = key;
      slot.key->Keep();
    }
    message_->MergeFrom(slot.message);
    for (int i = 0; i < slot.varying; ++i) {
      const VaryingValue& v = varying.begin()[i];
      if (slot.set_number[i] != nullptr) {
        slot.set_number[i](message_, v.number);
      } else {
        slot.set_exact[i](message_, v.exact.ToString());
      }
    }
  }
  template <typename F>
  void VaryingNumber(const F& f, int i) {
    f.set(message_, this->varying(i).number);
    Record(i, static_cast<void (*)(Message*, const double&)>(f.set), nullptr);
  }
  template <typename F>
  void VaryingExact(const F& f, int i) {
    f.set(message_, this->varying(i).exact.ToString());
    Record(i, nullptr,
           static_cast<void (*)(Message*, const std::string&)>(f.set));
  }

 private:
  // While a cached message is built: varying value i's setter.
  void Record(int i, void (*number)(Message*, const double&),
              void (*exact)(Message*, const std::string&)) {
    if (set_number_ == nullptr) return;
    set_number_[i] = number;
    set_exact_[i] = exact;
    varying_count_ = std::max(varying_count_, i + 1);
  }

  Message* const message_;
  // Set while this builder makes a cached message: where its varying
  // values' setters go.
  void (**set_number_)(Message*, const double&) = nullptr;
  void (**set_exact_)(Message*, const std::string&) = nullptr;
  int varying_count_ = 0;
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
  if (record.has_measured_saturation_moment()) {
    in.measured_saturation_moment = record.measured_saturation_moment();
  }
  if (record.has_saturation_moment_tolerance()) {
    in.saturation_moment_tolerance = record.saturation_moment_tolerance();
  }
  in.structure_family = record.structure_family();
  if (record.has_temperature()) in.temperature = record.temperature();
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
