#include "engine/aufbau.h"

#include <algorithm>
#include <array>
#include <vector>

#include "absl/strings/str_cat.h"
#include "engine/element.h"
#include "engine/internal/data_tables.h"

namespace shellwright {
namespace {

struct NeutralTable {
  std::array<Configuration, kMaxAtomicNumber + 1> configurations;
  std::array<absl::string_view, kMaxAtomicNumber + 1> exception_sources;
};

const NeutralTable& Neutrals() {
  static const NeutralTable* const kTable = [] {
    auto* t = new NeutralTable;
    for (int z = 1; z <= kMaxAtomicNumber; ++z) {
      t->configurations[z] = Configuration::Madelung(z);
    }
    for (const internal::ConfigurationExceptionRow& row :
         internal::ConfigurationExceptionRows()) {
      // compile_tables has already checked that the string parses and holds Z
      // electrons, so a failure here means a corrupted build.
      absl::StatusOr<Configuration> c = Configuration::Parse(row.configuration);
      if (c.ok()) {
        t->configurations[row.atomic_number] = *c;
        t->exception_sources[row.atomic_number] = row.source;
      }
    }
    return t;
  }();
  return *kTable;
}

// Subshells of `c` ordered for electron removal: highest n first, then
// highest l, with the valence subshells (outside the core of
// `core_electrons`) all before the core subshells.
std::vector<Subshell> RemovalOrder(int core_electrons) {
  std::array<bool, kNumSubshells> in_core{};
  int remaining = core_electrons;
  for (Subshell s : MadelungOrder()) {
    if (remaining <= 0) break;
    in_core[s.Index()] = true;
    remaining -= s.Capacity();
  }
  std::vector<Subshell> order;
  for (bool core_pass : {false, true}) {
    for (int i = kNumSubshells - 1; i >= 0; --i) {
      // Index order is (n, then l), so walking it backwards gives highest n
      // first and highest l first within one n.
      if (in_core[i] == core_pass) order.push_back(Subshell::FromIndex(i));
    }
  }
  return order;
}

}  // namespace

int CoreElectronsBelow(int z) {
  int core = 0;
  for (const NobleGasCore& c : NobleGasCores()) {
    if (c.electrons < z) core = c.electrons;
  }
  return core;
}

absl::StatusOr<Configuration> NeutralGroundConfiguration(int z) {
  if (z < 1 || z > kMaxAtomicNumber) {
    return absl::InvalidArgumentError(absl::StrCat(
        "atomic number ", z, " is out of range (1 to ", kMaxAtomicNumber, ")"));
  }
  return Neutrals().configurations[z];
}

absl::string_view MadelungExceptionSource(int z) {
  if (z < 1 || z > kMaxAtomicNumber) return {};
  return Neutrals().exception_sources[z];
}

absl::Status CheckIonCharge(const Element& e, int charge) {
  if (charge > e.atomic_number) {
    return absl::InvalidArgumentError(absl::StrCat(
        e.symbol, " with charge +", charge, ": would remove ", charge,
        " electrons, but ", e.name, " has only ", e.atomic_number));
  }
  if (charge < -kMaxAnionCharge) {
    return absl::InvalidArgumentError(absl::StrCat(
        e.symbol, " with charge ", charge,
        ": anion charge is beyond the supported bound of -", kMaxAnionCharge));
  }
  return absl::OkStatus();
}

absl::StatusOr<Configuration> IonConfiguration(int z, int charge) {
  absl::StatusOr<const Element*> element = ElementByAtomicNumber(z);
  if (!element.ok()) return element.status();
  if (absl::Status s = CheckIonCharge(**element, charge); !s.ok()) return s;
  absl::StatusOr<Configuration> neutral = NeutralGroundConfiguration(z);
  if (!neutral.ok()) return neutral.status();
  Configuration c = *neutral;
  if (charge > 0) {
    int to_remove = charge;
    for (Subshell s : RemovalOrder(CoreElectronsBelow(z))) {
      if (to_remove == 0) break;
      const int have = c.occupancy(s);
      const int take = std::min(have, to_remove);
      if (take > 0) {
        (void)c.SetOccupancy(s, have - take);
        to_remove -= take;
      }
    }
  } else if (charge < 0) {
    int to_add = -charge;
    for (Subshell s : MadelungOrder()) {
      if (to_add == 0) break;
      const int have = c.occupancy(s);
      const int add = std::min(s.Capacity() - have, to_add);
      if (add > 0) {
        (void)c.SetOccupancy(s, have + add);
        to_add -= add;
      }
    }
  }
  return c;
}

}  // namespace shellwright
