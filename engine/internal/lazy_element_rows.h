// Per-element rows of values, each made on first use. Not part of the API.
//
// A whole table made up front is tens or hundreds of KB that a process
// asking about a few ions would zero page by page, at a page fault each;
// these rows are allocated one element at a time instead.
//
// Example:
//   static auto* const kSquares = new LazyElementRows<std::array<int, 3>>;
//   const std::array<int, 3>& row =
//       kSquares->Get(26, [] { return std::array<int, 3>{0, 1, 4}; });
//
// Thread safety: Get may be called from any thread; `make` runs once per
// element (std::call_once; see engine/atom.cc for why not absl::call_once).

#ifndef SHELLWRIGHT_ENGINE_INTERNAL_LAZY_ELEMENT_ROWS_H_
#define SHELLWRIGHT_ENGINE_INTERNAL_LAZY_ELEMENT_ROWS_H_

#include <array>
#include <atomic>
#include <memory>
#include <mutex>

#include "engine/element.h"

namespace shellwright::internal {

// A std::once_flag with a flag of its own that says the work is done, read
// before std::call_once: once a slot is built, a lookup costs one acquire
// load instead of a call into pthread_once.
class OnceSlot {
 public:
  // Runs `make()` on the first call, once, however many threads call.
  template <typename Make>
  void Run(Make make) {
    if (done_.load(std::memory_order_acquire)) return;
    std::call_once(flag_, [&] {
      make();
      done_.store(true, std::memory_order_release);
    });
  }

 private:
  std::once_flag flag_;
  std::atomic<bool> done_{false};
};

template <typename Row>
class LazyElementRows {
 public:
  // The row of element `z`, made by `make()` (returning a Row) on the
  // first call for `z`. REQUIRES: 0 <= z <= kMaxAtomicNumber.
  template <typename Make>
  const Row& Get(int z, Make make) {
    once_[z].Run([&] { rows_[z] = std::make_unique<Row>(make()); });
    return *rows_[z];
  }

 private:
  std::array<OnceSlot, kMaxAtomicNumber + 1> once_;
  std::array<std::unique_ptr<Row>, kMaxAtomicNumber + 1> rows_;
};

}  // namespace shellwright::internal

#endif  // SHELLWRIGHT_ENGINE_INTERNAL_LAZY_ELEMENT_ROWS_H_
