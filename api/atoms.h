// Atoms and elements in the shellwright.v1 API: translation between the
// proto messages and engine types, and the answers to DescribeAtom,
// DescribeAtoms and ListElements.
//
// shellwrightd and the in-process mode of the shellwright CLI both answer
// through these functions, so the two give identical messages (and so
// identical JSON and human output).
//
// Errors are INVALID_ARGUMENT whose message starts with the request field
// at fault ("spec: unknown element 'Xx' ..."); a binary that takes the
// field from a flag may put the flag's name in its place.
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

#ifndef SHELLWRIGHT_API_ATOMS_H_
#define SHELLWRIGHT_API_ATOMS_H_

#include "absl/status/status.h"
#include "absl/status/statusor.h"
#include "engine/atom.h"
#include "engine/element.h"
#include "engine/ligand_field.h"
#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright {

// Most requests accepted in one DescribeAtoms call.
inline constexpr int kMaxDescribeAtomsBatch = 1000;

// The proto value of an engine geometry or spin-state preference.
v1::Geometry GeometryToProto(Geometry geometry);
v1::SpinStatePreference SpinStatePreferenceToProto(
    SpinStatePreference preference);

// Validates `request` and turns it into an engine query. INVALID_ARGUMENT
// messages start with the request field ("spec", "atomic_number",
// "charge", "geometry", "spin_state", "configuration").
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

// One DescribeAtoms item: `out` (cleared first) holds the description, or
// the error that DescribeAtomMessage returned (code and message).
void DescribeAtomItem(const v1::DescribeAtomRequest& request,
                      v1::DescribeAtomResult* out);

// Answers a DescribeAtoms request item by item (DescribeAtomItem).
// INVALID_ARGUMENT only when the request holds more than
// kMaxDescribeAtomsBatch items.
absl::Status DescribeAtomsMessage(const v1::DescribeAtomsRequest& request,
                                  v1::DescribeAtomsResponse* out);

// The whole element table.
void ListElementsMessage(v1::ListElementsResponse* out);

}  // namespace shellwright

#endif  // SHELLWRIGHT_API_ATOMS_H_
