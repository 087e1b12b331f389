// Fuzzes the species spec parser (ParseSpeciesSpec, ParseAtomQuery in
// engine/atom.h) and DescribeAtom on whatever it accepts, with an optional
// separate charge, geometry, spin state and configuration override drawn
// from the input.
//
// Properties: an accepted spec with a charge prints with FormatSpecies to
// a spec that parses back to the same element and charge; a description
// holds Z - charge electrons and Hund-consistent counts; its notations are
// UTF-8.

#include <fuzzer/FuzzedDataProvider.h>

#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>

#include "engine/atom.h"
#include "engine/configuration.h"
#include "tests/fuzz/fuzz_checks.h"

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  FuzzedDataProvider input(data, size);
  std::optional<int> charge;
  if (input.ConsumeBool()) charge = input.ConsumeIntegralInRange(-200, 200);
  const auto geometry =
      static_cast<shellwright::Geometry>(input.ConsumeIntegralInRange(0, 3));
  const auto spin = static_cast<shellwright::SpinStatePreference>(
      input.ConsumeIntegralInRange(0, 2));
  const std::string configuration =
      input.ConsumeBool() ? input.ConsumeRandomLengthString(600) : "";
  const std::string spec = input.ConsumeRemainingBytesAsString();

  absl::StatusOr<shellwright::SpeciesSpec> parsed =
      shellwright::ParseSpeciesSpec(spec);
  if (parsed.ok()) {
    FUZZ_CHECK(parsed->element != nullptr, spec);
    const std::string written = shellwright::FormatSpecies(
        parsed->element->symbol, parsed->charge.value_or(0));
    absl::StatusOr<shellwright::SpeciesSpec> again =
        shellwright::ParseSpeciesSpec(written);
    FUZZ_CHECK(again.ok() && again->element == parsed->element &&
                   again->charge.value_or(0) == parsed->charge.value_or(0),
               written);
  } else {
    FUZZ_CHECK(parsed.status().code() == absl::StatusCode::kInvalidArgument,
               spec);
  }

  absl::StatusOr<shellwright::AtomQuery> query =
      shellwright::ParseAtomQuery(spec, charge);
  if (!query.ok()) return 0;
  query->geometry = geometry;
  query->spin_state = spin;
  if (!configuration.empty()) {
    absl::StatusOr<shellwright::Configuration> c =
        shellwright::Configuration::Parse(configuration);
    if (!c.ok()) return 0;
    query->configuration = *c;
  }
  absl::StatusOr<shellwright::AtomDescriptionPtr> description =
      shellwright::DescribeAtom(*query);
  if (!description.ok()) {
    FUZZ_CHECK(
        description.status().code() == absl::StatusCode::kInvalidArgument,
        spec);
    return 0;
  }
  const shellwright::AtomDescription& d = **description;
  FUZZ_CHECK(d.electrons == d.element->atomic_number - d.charge, spec);
  FUZZ_CHECK(d.configuration.electrons() == d.electrons, spec);
  FUZZ_CHECK(d.unpaired_electrons >= 0 &&
                 d.unpaired_electrons <= d.configuration.UnpairedElectrons(),
             spec);
  FUZZ_CHECK(d.moments.recommended >= 0, spec);
  for (const std::string& text :
       {d.configuration_notation, d.full_notation, d.filling_order_notation,
        d.term.ToUnicode()}) {
    FUZZ_CHECK(shellwright::testing::IsWellFormedUtf8(text), text);
  }
  for (const std::string& note : d.notes) {
    FUZZ_CHECK(shellwright::testing::IsWellFormedUtf8(note), note);
  }
  return 0;
}
