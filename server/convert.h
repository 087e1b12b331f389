// Translation between the shellwright.v1 proto messages and engine types.
//
// Both shellwrightd and the in-process mode of the shellwright CLI answer a
// request by translating it with these functions, so the two produce
// identical messages (and so identical JSON and human output).
//
// Example:
//
//   shellwright::v1::DescribeAtomRequest request;
//   request.set_spec("Fe3+");
//   shellwright::v1::AtomDescription response;
//   absl::Status status = shellwright::DescribeAtomMessage(request, &response);
//   // status.ok(); response.configuration() == "[Ar] 3d5"
//
// Thread safety: all functions are thread-safe.

#ifndef SHELLWRIGHT_SERVER_CONVERT_H_
#define SHELLWRIGHT_SERVER_CONVERT_H_

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "engine/atom.h"
#include "engine/composition.h"
#include "engine/element.h"
#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright {

// Most requests accepted in one DescribeAtoms call.
inline constexpr int kMaxDescribeAtomsBatch = 1000;

// Validates `request` and turns it into an engine query. INVALID_ARGUMENT
// messages name the request field ("spec", "atomic_number", "charge",
// "geometry", "spin_state", "configuration").
absl::StatusOr<AtomQuery> AtomQueryFromProto(
    const v1::DescribeAtomRequest& request);

// Fills `out` (cleared first) from an engine description.
void AtomDescriptionToProto(const AtomDescription& description,
                            v1::AtomDescription* out);

// Fills `out` (cleared first) from an element.
void ElementToProto(const Element& element, v1::Element* out);

// AtomQueryFromProto + DescribeAtom + AtomDescriptionToProto.
absl::Status DescribeAtomMessage(const v1::DescribeAtomRequest& request,
                                 v1::AtomDescription* out);

// Answers a DescribeAtoms request item by item. INVALID_ARGUMENT only when
// the request holds more than kMaxDescribeAtomsBatch items.
absl::Status DescribeAtomsMessage(const v1::DescribeAtomsRequest& request,
                                  v1::DescribeAtomsResponse* out);

// The whole element table.
void ListElementsMessage(v1::ListElementsResponse* out);

// Most alternatives a record may ask for.
inline constexpr int kMaxAlternatives = 5;

// Translates a record into engine input. Never fails: out-of-range values
// are clamped or left for AnalyzeComposition to diagnose.
CompositionInput CompositionInputFromProto(const v1::CompositionRecord& record);

// "ionic", "metallic" or "elemental".
absl::string_view CompositionKindName(CompositionKind kind);

// The record's formula as a report echoes it: cut to kMaxFormulaLength.
absl::string_view EchoedFormula(const v1::CompositionRecord& record);

// Fills `out` (cleared first) from one annotated ion. REQUIRES:
// ion.description is set (AnalyzeComposition always sets it).
void IonAnnotationToProto(const IonAnnotation& ion, v1::IonReport* out);

// Fills `out` (cleared first) from an engine report; `record` supplies the
// echoed row and formula.
void RecordReportToProto(const CompositionReport& report,
                         const v1::CompositionRecord& record,
                         v1::RecordReport* out);

// Analyses one record: exactly one report, never an error status.
void AnalyzeRecordToReport(const v1::CompositionRecord& record,
                           v1::RecordReport* out);

}  // namespace shellwright

#endif  // SHELLWRIGHT_SERVER_CONVERT_H_
