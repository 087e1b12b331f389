#include "api/report_mask.h"

#include <cstdio>
#include <cstdlib>

#include "absl/strings/ascii.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_join.h"
#include "absl/strings/str_split.h"
#include "api/report_view.h"
#include "util/utf8.h"

namespace shellwright {
namespace {

// Collects the names of a walk's top-level fields.
class FieldNameCollector : public TopLevelVisitor {
 public:
  explicit FieldNameCollector(std::vector<std::string>* names)
      : names_(names) {}

  template <typename F>
  void String(const F& f, absl::string_view) {
    Add(f);
  }
  template <typename F>
  void Int(const F& f, int32_t) {
    Add(f);
  }
  template <typename F>
  void Double(const F& f, double) {
    Add(f);
  }
  template <typename F>
  void Bool(const F& f, bool) {
    Add(f);
  }
  template <typename F, typename Items, typename Visit>
  void Messages(const F& f, const Items&, Visit) {
    Add(f);
  }

 private:
  template <typename F>
  void Add(const F& f) {
    names_->emplace_back(f.name);
  }

  std::vector<std::string>* const names_;
};

// The bits of the fields `paths` name; 0 for no paths.
template <typename Paths>
absl::StatusOr<uint64_t> BitsOf(const Paths& paths) {
  const std::vector<std::string>& names = ReportMask::FieldNames();
  uint64_t bits = 0;
  for (const std::string& path : paths) {
    int index = -1;
    for (size_t i = 0; i < names.size(); ++i) {
      if (names[i] == path) index = static_cast<int>(i);
    }
    if (index < 0) {
      return absl::InvalidArgumentError(absl::StrCat(
          "report_mask: unknown field '", Utf8Prefix(path, 80), "'",
          path.find('.') != std::string::npos
              ? " (paths name whole top-level fields)"
              : "",
          "; RecordReport fields are ", absl::StrJoin(names, ", ")));
    }
    bits |= uint64_t{1} << index;
  }
  return bits;
}

}  // namespace

const std::vector<std::string>& ReportMask::FieldNames() {
  static const std::vector<std::string>* const names = [] {
    auto* names = new std::vector<std::string>;
    FieldNameCollector collector(names);
    // Without an assignment the walk still visits every field.
    VisitRecordReport(CompositionReport(), v1::CompositionRecord(), collector);
    if (names->size() > 64) {
      std::fprintf(stderr,
                   "ReportMask: %zu RecordReport fields, more than the 64 a "
                   "mask holds\n",
                   names->size());
      std::abort();
    }
    return names;
  }();
  return *names;
}

uint64_t ReportMask::AllBits() {
  static const uint64_t bits = [] {
    const size_t n = FieldNames().size();
    return n == 64 ? ~uint64_t{0} : (uint64_t{1} << n) - 1;
  }();
  return bits;
}

absl::StatusOr<ReportMask> ReportMask::FromBits(
    const absl::StatusOr<uint64_t>& bits) {
  if (!bits.ok()) return bits.status();
  return *bits == 0 ? ReportMask() : ReportMask(*bits);
}

absl::StatusOr<ReportMask> ReportMask::FromPaths(
    absl::Span<const std::string> paths) {
  return FromBits(BitsOf(paths));
}

absl::StatusOr<ReportMask> ReportMask::FromFieldMask(
    const google::protobuf::FieldMask& mask) {
  return FromBits(BitsOf(mask.paths()));
}

absl::StatusOr<ReportMask> ReportMask::FromList(absl::string_view list) {
  std::vector<std::string> paths;
  for (absl::string_view name : absl::StrSplit(list, ',')) {
    name = absl::StripAsciiWhitespace(name);
    if (name.empty()) {
      return absl::InvalidArgumentError(absl::StrCat(
          "report_mask: an empty field name in '", Utf8Prefix(list, 200),
          "'; expected names such as valid,diagnostics"));
    }
    paths.emplace_back(name);
  }
  return FromPaths(paths);
}

bool ReportMask::Has(absl::string_view name) const {
  const std::vector<std::string>& names = FieldNames();
  for (size_t i = 0; i < names.size(); ++i) {
    if (names[i] == name) return Has(static_cast<int>(i));
  }
  return false;
}

ReportMask ReportMask::With(absl::string_view name) const {
  ReportMask mask = *this;
  const std::vector<std::string>& names = FieldNames();
  for (size_t i = 0; i < names.size(); ++i) {
    if (names[i] == name) mask.bits_ |= uint64_t{1} << i;
  }
  return mask;
}

std::vector<std::string> ReportMask::Paths() const {
  std::vector<std::string> paths;
  if (all()) return paths;
  const std::vector<std::string>& names = FieldNames();
  for (size_t i = 0; i < names.size(); ++i) {
    if (Has(static_cast<int>(i))) paths.push_back(names[i]);
  }
  return paths;
}

void ReportMask::ToFieldMask(google::protobuf::FieldMask* out) const {
  out->Clear();
  for (std::string& path : Paths()) out->add_paths(std::move(path));
}

}  // namespace shellwright
