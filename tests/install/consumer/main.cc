// Uses the installed engine: describes an ion and analyses a formula, and
// prints one line for each (checked by tests/install/install_test.sh).

#include <iostream>
#include <optional>

#include "engine/atom.h"
#include "engine/composition.h"

int main() {
  absl::StatusOr<shellwright::AtomQuery> query =
      shellwright::ParseAtomQuery("Fe3+", std::nullopt);
  if (!query.ok()) {
    std::cerr << query.status() << "\n";
    return 1;
  }
  absl::StatusOr<shellwright::AtomDescriptionPtr> atom =
      shellwright::DescribeAtom(*query);
  if (!atom.ok()) {
    std::cerr << atom.status() << "\n";
    return 1;
  }
  std::cout << "Fe3+ " << (*atom)->configuration_notation << " unpaired "
            << (*atom)->unpaired_electrons << "\n";

  shellwright::CompositionInput input;
  input.id = "c1";
  input.formula = "Fe3O4";
  const shellwright::CompositionReport report =
      shellwright::AnalyzeComposition(input);
  std::cout << report.id << " Fe3O4 valid " << report.valid << " states";
  if (report.assignment.has_value()) {
    for (const shellwright::AssignedState& s : report.assignment->states) {
      std::cout << " " << s.element->symbol << s.state << ":"
                << s.count.ToString();
    }
  }
  std::cout << "\n";
  return 0;
}
