// A pipeline that reads batches on one thread, processes them on several,
// and hands them to a sink in the order they were read: `check`'s shape
// (read lines, analyse and format them, write the text in input order).
//
//   source (own thread) -> process (N worker threads) -> sink (Run's caller)
//
// Guarantees:
//   - order: the sink sees every batch the source produced, each exactly
//     once, in the source's order, whatever order the workers finish in;
//   - back-pressure: at most `max_in_flight` batches exist between the
//     source and the sink (read and not yet sunk), so memory stays bounded
//     however fast the source is; once full, the source waits until half
//     of them have been sunk;
//   - cancellation: the first error from any stage, or Cancel(), stops
//     every stage at its next batch; Run then joins its threads and
//     returns that error;
//   - no polling: every wait is on a condition that the change it waits for
//     signals.
//
// Example:
//
//   OrderedPipeline<std::string>::Options options;
//   options.workers = 2;
//   OrderedPipeline<std::string> pipeline(options);
//   int n = 0;
//   absl::Status s = pipeline.Run(
//       [&](std::string* next) -> absl::StatusOr<bool> {
//         if (n == 100) return false;  // End of input.
//         *next = std::to_string(n++);
//         return true;
//       },
//       [](int worker, std::string& batch) {
//         batch += "!";
//         return absl::OkStatus();
//       },
//       [](std::string& batch) {
//         std::cout << batch << "\n";  // "0!", "1!", ... in order.
//         return absl::OkStatus();
//       });
//
// Thread safety: Run() may be called once; Cancel() from any thread at any
// time, including from inside a stage.

#ifndef SHELLWRIGHT_CLIENTS_CLI_ORDERED_PIPELINE_H_
#define SHELLWRIGHT_CLIENTS_CLI_ORDERED_PIPELINE_H_

#include <algorithm>
#include <condition_variable>
#include <cstdint>
#include <deque>
#include <functional>
#include <map>
#include <mutex>
#include <thread>
#include <utility>
#include <vector>

#include "absl/status/status.h"
#include "absl/status/statusor.h"

namespace shellwright::cli {

template <typename Batch>
class OrderedPipeline {
 public:
  struct Options {
    int workers = 1;        // Threads running `process`; at least 1.
    int max_in_flight = 4;  // Batches read and not yet sunk; at least 1.
  };

  // Fills `next` (a default-constructed Batch) and returns true, or
  // returns false at the end of the input. Runs on the source thread.
  using Source = std::function<absl::StatusOr<bool>(Batch* next)>;
  // Processes one batch on worker `worker` (0 .. workers-1), so that a
  // worker may keep state of its own (a stream, a parser).
  using Process = std::function<absl::Status(int worker, Batch& batch)>;
  // Takes the batches in source order, on the thread that called Run().
  using Sink = std::function<absl::Status(Batch& batch)>;

  explicit OrderedPipeline(Options options)
      : workers_(std::max(1, options.workers)),
        max_in_flight_(std::max(1, options.max_in_flight)),
        refill_at_(max_in_flight_ / 2) {}
  OrderedPipeline(const OrderedPipeline&) = delete;
  OrderedPipeline& operator=(const OrderedPipeline&) = delete;

  // Runs the pipeline to the end of the source, or to the first error or
  // Cancel(). Returns OK when every batch reached the sink; otherwise the
  // first error of any stage, or CANCELLED. Returns only once every thread
  // it started has finished.
  absl::Status Run(Source source, Process process, Sink sink) {
    std::thread reader([&] { ReadAll(source); });
    std::vector<std::thread> workers;
    workers.reserve(workers_);
    for (int w = 0; w < workers_; ++w) {
      workers.emplace_back([&, w] { Work(w, process); });
    }
    SinkAll(sink);
    Stop(absl::OkStatus());  // Whatever is still running has no more use.
    reader.join();
    for (std::thread& worker : workers) worker.join();
    std::lock_guard<std::mutex> lock(mu_);
    return error_;
  }

  // Stops the pipeline: Run returns CANCELLED (unless a stage failed
  // first). A stage already running finishes its batch.
  void Cancel() { Stop(absl::CancelledError("cancelled")); }

 private:
  // Records the first error and wakes every stage to stop.
  void Stop(absl::Status status) {
    std::lock_guard<std::mutex> lock(mu_);
    if (error_.ok()) error_ = std::move(status);
    stopped_ = true;
    room_.notify_all();
    work_.notify_all();
    sinkable_.notify_all();
  }

  void ReadAll(Source& source) {
    while (true) {
      {
        // Once full, the source waits until half the batches in flight
        // have been sunk, then reads until full again: one wake-up per
        // half a window of batches, not one per batch.
        std::unique_lock<std::mutex> lock(mu_);
        if (read_ - sunk_ >= max_in_flight_) {
          room_.wait(lock,
                     [&] { return read_ - sunk_ <= refill_at_ || stopped_; });
        }
        if (stopped_) return;
      }
      Batch batch;
      absl::StatusOr<bool> more = source(&batch);
      if (!more.ok()) {
        Stop(more.status());
        return;
      }
      std::lock_guard<std::mutex> lock(mu_);
      if (!*more) {
        source_done_ = true;
        work_.notify_all();      // Idle workers may end.
        sinkable_.notify_all();  // The sink may have sunk every batch.
        return;
      }
      to_process_.emplace_back(read_++, std::move(batch));
      work_.notify_one();
    }
  }

  void Work(int worker, Process& process) {
    while (true) {
      std::pair<int64_t, Batch> item;
      {
        std::unique_lock<std::mutex> lock(mu_);
        work_.wait(lock, [&] {
          return !to_process_.empty() || source_done_ || stopped_;
        });
        if (stopped_ || to_process_.empty()) return;
        item = std::move(to_process_.front());
        to_process_.pop_front();
      }
      absl::Status status = process(worker, item.second);
      if (!status.ok()) {
        Stop(std::move(status));
        return;
      }
      std::lock_guard<std::mutex> lock(mu_);
      // Only the batch the sink is at can let it go on.
      if (item.first == sunk_) sinkable_.notify_one();
      done_.emplace(item.first, std::move(item.second));
    }
  }

  void SinkAll(Sink& sink) {
    while (true) {
      Batch batch;
      {
        std::unique_lock<std::mutex> lock(mu_);
        sinkable_.wait(lock, [&] {
          return done_.count(sunk_) > 0 || stopped_ ||
                 (source_done_ && sunk_ == read_);
        });
        if (stopped_ || (source_done_ && sunk_ == read_)) return;
        auto it = done_.find(sunk_);
        batch = std::move(it->second);
        done_.erase(it);
      }
      absl::Status status = sink(batch);
      if (!status.ok()) {
        Stop(std::move(status));
        return;
      }
      std::lock_guard<std::mutex> lock(mu_);
      ++sunk_;
      // Only the source waits for room, and only for this much.
      if (read_ - sunk_ <= refill_at_) room_.notify_one();
    }
  }

  const int workers_;
  const int64_t max_in_flight_;
  const int64_t refill_at_;  // In flight when a full source reads again.

  // One lock, and one condition per kind of waiter, signalled by exactly
  // the changes it waits for (a stop signals all), so that a batch wakes
  // no thread that cannot use it. Stages hold the lock only to move
  // batches, never while running the callbacks.
  std::mutex mu_;
  std::condition_variable room_;      // The source: room in flight.
  std::condition_variable work_;      // Workers: a batch to process.
  std::condition_variable sinkable_;  // The sink: batch sunk_ is done.
  std::deque<std::pair<int64_t, Batch>> to_process_;  // Guarded by mu_.
  std::map<int64_t, Batch> done_;  // Processed, not yet sunk; by mu_.
  int64_t read_ = 0;               // Batches read; guarded by mu_.
  int64_t sunk_ = 0;               // Batches sunk; guarded by mu_.
  bool source_done_ = false;       // Guarded by mu_.
  bool stopped_ = false;           // Guarded by mu_.
  absl::Status error_;             // Guarded by mu_.
};

}  // namespace shellwright::cli

#endif  // SHELLWRIGHT_CLIENTS_CLI_ORDERED_PIPELINE_H_
