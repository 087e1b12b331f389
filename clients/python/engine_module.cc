// shellwright._engine: the in-process engine for the Python package
// (clients/python/shellwright), and the translation of a server's answers
// into the same dicts.
//
// Every answer goes through api/: atoms through DescribeAtomMessage,
// records through the engine and api/report_view.h's walk (see
// python_values.h), so the dicts are those of the CLI's JSON. The GIL is
// released while the engine works; analyze_many and annotate_columns run
// the engine on worker threads, chunk by chunk, and hand the reports back
// in input order.
//
// Example (Python):
//
//   from shellwright import _engine
//   _engine.describe("Fe3+", None, None, None, None)["unpaired_electrons"]
//   for report in _engine.analyze_many(["Fe2O3", "NaCl"], 2, 0): ...
//
// Thread safety: the Python objects follow Python's rules (the GIL).

#include <pybind11/pybind11.h>
#include <pybind11/stl.h>

#include <condition_variable>
#include <deque>
#include <functional>
#include <memory>
#include <mutex>
#include <string>
#include <thread>
#include <utility>
#include <vector>

#include "absl/status/status.h"
#include "absl/strings/str_cat.h"
#include "api/atoms.h"
#include "api/records.h"
#include "clients/python/python_values.h"
#include "engine/ligand_field.h"
#include "util/enum_names.h"

namespace shellwright::python {
namespace {

namespace py = pybind11;

// Records per chunk handed to a worker.
constexpr int kChunkRecords = 1024;

[[noreturn]] void Raise(const RecordProblem& problem) {
  if (problem.type_error) throw py::type_error(problem.message);
  throw py::value_error(problem.message);
}

[[noreturn]] void Raise(const absl::Status& status) {
  if (status.code() == absl::StatusCode::kInvalidArgument) {
    throw py::value_error(std::string(status.message()));
  }
  throw std::runtime_error(std::string(status.message()));
}

// ---- Atoms --------------------------------------------------------------

template <typename E>
E ParseEnumArgument(const char* field, const py::object& value) {
  if (!py::isinstance<py::str>(value)) {
    throw py::type_error(absl::StrCat(field, ": expected str, got ",
                                      Py_TYPE(value.ptr())->tp_name));
  }
  absl::StatusOr<E> parsed = ParseName<E>(value.cast<std::string>());
  if (!parsed.ok()) {
    throw py::value_error(absl::StrCat(field, ": ", parsed.status().message()));
  }
  return *parsed;
}

// An int argument that must fit a proto int32 (the API checks its range).
int32_t Int32Argument(const char* field, const py::object& value) {
  int overflow = 0;
  const long long v =  // NOLINT(runtime/int): the C API's type.
      PyLong_AsLongLongAndOverflow(value.ptr(), &overflow);
  if (overflow != 0 || v < INT32_MIN || v > INT32_MAX) {
    throw py::value_error(absl::StrCat(
        field, ": ", py::repr(value).cast<std::string>(), " is out of range"));
  }
  return static_cast<int32_t>(v);
}

// The DescribeAtomRequest for describe()'s arguments; None means not given.
v1::DescribeAtomRequest AtomRequest(const py::object& spec,
                                    const py::object& charge,
                                    const py::object& geometry,
                                    const py::object& spin_state,
                                    const py::object& configuration) {
  v1::DescribeAtomRequest request;
  if (py::isinstance<py::bool_>(spec)) {
    throw py::type_error("spec: expected str or int, got bool");
  } else if (py::isinstance<py::int_>(spec)) {
    request.set_atomic_number(Int32Argument("atomic_number", spec));
  } else if (py::isinstance<py::str>(spec)) {
    request.set_spec(spec.cast<std::string>());
  } else {
    throw py::type_error(absl::StrCat("spec: expected str or int, got ",
                                      Py_TYPE(spec.ptr())->tp_name));
  }
  if (!charge.is_none()) {
    if (py::isinstance<py::bool_>(charge) ||
        !py::isinstance<py::int_>(charge)) {
      throw py::type_error(absl::StrCat("charge: expected int, got ",
                                        Py_TYPE(charge.ptr())->tp_name));
    }
    request.set_charge(Int32Argument("charge", charge));
  }
  if (!geometry.is_none()) {
    request.set_geometry(
        GeometryToProto(ParseEnumArgument<Geometry>("geometry", geometry)));
  }
  if (!spin_state.is_none()) {
    request.set_spin_state(SpinStatePreferenceToProto(
        ParseEnumArgument<SpinStatePreference>("spin_state", spin_state)));
  }
  if (!configuration.is_none()) {
    if (!py::isinstance<py::str>(configuration)) {
      throw py::type_error(absl::StrCat("configuration: expected str, got ",
                                        Py_TYPE(configuration.ptr())->tp_name));
    }
    request.set_configuration(configuration.cast<std::string>());
  }
  return request;
}

py::object Describe(const py::object& spec, const py::object& charge,
                    const py::object& geometry, const py::object& spin_state,
                    const py::object& configuration) {
  const v1::DescribeAtomRequest request =
      AtomRequest(spec, charge, geometry, spin_state, configuration);
  v1::AtomDescription description;
  absl::Status status;
  {
    py::gil_scoped_release release;
    status = DescribeAtomMessage(request, &description);
  }
  if (!status.ok()) Raise(status);
  return py::reinterpret_steal<py::object>(MessageDict(description));
}

py::bytes DescribeRequest(const py::object& spec, const py::object& charge,
                          const py::object& geometry,
                          const py::object& spin_state,
                          const py::object& configuration) {
  return py::bytes(
      AtomRequest(spec, charge, geometry, spin_state, configuration)
          .SerializeAsString());
}

// ---- Records ------------------------------------------------------------

// The record for analyze(formula, **fields); raises on a field that cannot
// be read.
v1::CompositionRecord RecordFromArguments(const py::object& formula,
                                          const py::dict& fields) {
  v1::CompositionRecord record;
  RecordProblem problem;
  if (!SetRecordField(record, "formula", formula.ptr(), &problem)) {
    Raise(problem);
  }
  for (const auto& [key, value] : fields) {
    const std::string name = py::str(key).cast<std::string>();
    if (name == "formula") {
      throw py::type_error("formula: given twice");
    }
    if (!SetRecordField(record, name, value.ptr(), &problem)) Raise(problem);
  }
  return record;
}

py::object Analyze(const py::object& formula, const py::dict& fields) {
  const v1::CompositionRecord record = RecordFromArguments(formula, fields);
  CompositionReport report;
  {
    py::gil_scoped_release release;
    report = AnalyzeComposition(CompositionInputFromProto(record));
  }
  return py::reinterpret_steal<py::object>(ReportDict(report, record));
}

py::bytes RecordBytes(const py::object& formula, const py::dict& fields) {
  return py::bytes(RecordFromArguments(formula, fields).SerializeAsString());
}

// A chunk of records on its way through the workers.
struct Chunk {
  int size = 0;  // Records in use (the vectors are reused).
  std::vector<v1::CompositionRecord> records;
  std::vector<std::string> problems;  // Per record; empty when readable.
  std::vector<CompositionReport> reports;
  bool done = false;

  // Starts record `i` (growing the vectors as needed).
  v1::CompositionRecord* Record(int i) {
    if (static_cast<int>(records.size()) <= i) {
      records.resize(i + 1);
      problems.resize(i + 1);
      reports.resize(i + 1);
    }
    problems[i].clear();
    return &records[i];
  }
};

// Reads chunks on the calling thread (with the GIL, through `fill`),
// analyses them on `jobs` worker threads (without it) and returns them in
// input order. The workers never touch Python objects.
class Pipeline {
 public:
  // Fills a chunk with up to kChunkRecords records; sets size 0 at the end
  // of the input. May throw (a Python error).
  using Fill = std::function<void(Chunk*)>;

  Pipeline(int jobs, Fill fill) : fill_(std::move(fill)) {
    if (jobs < 1) jobs = 1;
    in_flight_limit_ = 2 * jobs;
    for (int i = 0; i < jobs; ++i) threads_.emplace_back([this] { Work(); });
  }
  ~Pipeline() {
    {
      std::lock_guard<std::mutex> lock(mu_);
      stop_ = true;
    }
    work_cv_.notify_all();
    py::gil_scoped_release release;
    for (std::thread& t : threads_) t.join();
  }

  // The next analysed chunk, or nullptr at the end. Needs the GIL (for
  // `fill`); releases it while waiting. The chunk is valid until the next
  // call.
  Chunk* Next() {
    if (current_ != nullptr) free_.push_back(std::move(current_));
    while (!input_done_ &&
           static_cast<int>(in_flight_.size()) < in_flight_limit_) {
      std::unique_ptr<Chunk> chunk;
      if (free_.empty()) {
        chunk = std::make_unique<Chunk>();
      } else {
        chunk = std::move(free_.back());
        free_.pop_back();
      }
      chunk->size = 0;
      chunk->done = false;
      fill_(chunk.get());
      if (chunk->size == 0) {
        input_done_ = true;
        free_.push_back(std::move(chunk));
        break;
      }
      std::lock_guard<std::mutex> lock(mu_);
      todo_.push_back(chunk.get());
      in_flight_.push_back(std::move(chunk));
      work_cv_.notify_one();
    }
    if (in_flight_.empty()) return nullptr;
    {
      py::gil_scoped_release release;
      std::unique_lock<std::mutex> lock(mu_);
      done_cv_.wait(lock, [this] { return in_flight_.front()->done; });
      current_ = std::move(in_flight_.front());
      in_flight_.pop_front();
    }
    return current_.get();
  }

 private:
  void Work() {
    for (;;) {
      Chunk* chunk = nullptr;
      {
        std::unique_lock<std::mutex> lock(mu_);
        work_cv_.wait(lock, [this] { return stop_ || !todo_.empty(); });
        if (stop_) return;
        chunk = todo_.front();
        todo_.pop_front();
      }
      for (int i = 0; i < chunk->size; ++i) {
        if (chunk->problems[i].empty()) {
          chunk->reports[i] =
              AnalyzeComposition(CompositionInputFromProto(chunk->records[i]));
        }
      }
      {
        std::lock_guard<std::mutex> lock(mu_);
        chunk->done = true;
      }
      done_cv_.notify_all();
    }
  }

  Fill fill_;
  int in_flight_limit_;
  std::vector<std::thread> threads_;
  std::mutex mu_;
  std::condition_variable work_cv_, done_cv_;
  std::deque<Chunk*> todo_;                       // Guarded by mu_.
  bool stop_ = false;                             // Guarded by mu_.
  std::deque<std::unique_ptr<Chunk>> in_flight_;  // Input order.
  std::vector<std::unique_ptr<Chunk>> free_;
  std::unique_ptr<Chunk> current_;
  bool input_done_ = false;
};

// The report of record `i` of an analysed chunk: the engine's, or the
// malformed-record report of its problem. New reference.
PyObject* ChunkReportDict(const Chunk& chunk, int i) {
  if (chunk.problems[i].empty()) {
    return ReportDict(chunk.reports[i], chunk.records[i]);
  }
  v1::RecordReport malformed;
  MalformedRecordReport(chunk.records[i], chunk.problems[i], &malformed);
  return ReportDict(malformed);
}

int Jobs(const py::object& jobs) {
  if (jobs.is_none()) {
    return std::max(1u, std::thread::hardware_concurrency());
  }
  const int n = jobs.cast<int>();
  if (n < 1) throw py::value_error("jobs: must be at least 1");
  return n;
}

int Alternatives(int alternatives) {
  if (alternatives < 0 || alternatives > kMaxAlternatives) {
    throw py::value_error(absl::StrCat(
        "alternatives: must be 0..", kMaxAlternatives, ", got ", alternatives));
  }
  return alternatives;
}

// Reads the items of a Python iterable as records.
class ItemReader {
 public:
  ItemReader(const py::object& items, int alternatives)
      : iterator_(py::iter(items)), alternatives_(alternatives) {}

  void Fill(Chunk* chunk) {
    while (chunk->size < kChunkRecords) {
      py::object item =
          py::reinterpret_steal<py::object>(PyIter_Next(iterator_.ptr()));
      if (!item) {
        if (PyErr_Occurred()) throw py::error_already_set();
        return;
      }
      const int i = chunk->size++;
      RecordProblem problem;
      if (!RecordFromItem(item.ptr(), ++row_, alternatives_, chunk->Record(i),
                          &problem)) {
        chunk->problems[i] = problem.message;
      }
    }
  }

 private:
  py::iterator iterator_;
  int alternatives_;
  int row_ = 0;
};

// analyze_many's iterator: one report per item, in input order.
class ReportIterator {
 public:
  ReportIterator(const py::object& items, int jobs, int alternatives)
      : reader_(std::make_shared<ItemReader>(items, alternatives)),
        pipeline_(std::make_unique<Pipeline>(
            jobs, [reader = reader_](Chunk* c) { reader->Fill(c); })) {}

  py::object Next() {
    while (chunk_ == nullptr || position_ == chunk_->size) {
      if (pipeline_ == nullptr) throw py::stop_iteration();
      chunk_ = pipeline_->Next();
      position_ = 0;
      if (chunk_ == nullptr) {
        pipeline_.reset();
        throw py::stop_iteration();
      }
    }
    return py::reinterpret_steal<py::object>(
        ChunkReportDict(*chunk_, position_++));
  }

 private:
  std::shared_ptr<ItemReader> reader_;
  std::unique_ptr<Pipeline> pipeline_;
  Chunk* chunk_ = nullptr;
  int position_ = 0;
};

// Pauses the cyclic garbage collector: building millions of containers
// would otherwise run it over all of them again and again.
class GcPause {
 public:
  GcPause() : was_enabled_(PyGC_Disable() == 1) {}
  ~GcPause() {
    if (was_enabled_) PyGC_Enable();
  }

 private:
  bool was_enabled_;
};

// annotate's columnar path: record fields from columns (lists of equal
// length, one per record field), reports into columns but those in
// `skip`.
py::object AnnotateColumns(const py::dict& columns, int jobs, int alternatives,
                           int first_row, std::vector<std::string> skip) {
  std::vector<std::pair<std::string, py::list>> inputs;
  Py_ssize_t rows = -1;
  for (const auto& [key, value] : columns) {
    py::list list(py::reinterpret_borrow<py::object>(value));
    if (rows >= 0 && static_cast<Py_ssize_t>(py::len(list)) != rows) {
      throw py::value_error("annotate_columns: columns differ in length");
    }
    rows = py::len(list);
    inputs.emplace_back(py::str(key).cast<std::string>(), list);
  }
  if (rows < 0) rows = 0;
  for (const auto& input : inputs) {
    RecordProblem problem;
    v1::CompositionRecord scratch;
    if (!SetRecordField(scratch, input.first, Py_None, &problem) &&
        problem.type_error) {
      Raise(problem);  // An unknown field: no row could be read.
    }
  }
  GcPause pause;
  Py_ssize_t next = 0;
  Pipeline pipeline(jobs, [&](Chunk* chunk) {
    while (chunk->size < kChunkRecords && next < rows) {
      const int i = chunk->size++;
      v1::CompositionRecord* record = chunk->Record(i);
      record->Clear();
      record->set_row(first_row + static_cast<int>(next));
      if (alternatives > 0) record->set_max_alternatives(alternatives);
      RecordProblem problem;
      for (const auto& [name, list] : inputs) {
        if (!SetRecordField(*record, name, PyList_GET_ITEM(list.ptr(), next),
                            &problem)) {
          if (chunk->problems[i].empty()) chunk->problems[i] = problem.message;
        }
      }
      ++next;
    }
  });
  ReportColumns out(std::move(skip));
  bool reserved = false;
  while (Chunk* chunk = pipeline.Next()) {
    for (int i = 0; i < chunk->size; ++i) {
      if (chunk->problems[i].empty()) {
        out.Add(chunk->reports[i], chunk->records[i]);
      } else {
        v1::RecordReport malformed;
        MalformedRecordReport(chunk->records[i], chunk->problems[i],
                              &malformed);
        out.Add(malformed);
      }
      if (!reserved) {
        out.Reserve(rows);
        reserved = true;
      }
    }
  }
  if (rows == 0) {  // The columns, empty: the schema comes from one walk.
    out.Add(CompositionReport{}, v1::CompositionRecord{});
  }
  return py::reinterpret_steal<py::object>(out.Take());
}

// ---- A server's answers -------------------------------------------------

// A RecordBatch for items[0..n) (rows first_row, first_row+1, ...), and
// the malformed-record reports of the items that could not be read, by
// position (they are not sent).
py::tuple RecordBatchBytes(const py::list& items, int first_row,
                           int alternatives) {
  v1::RecordBatch batch;
  py::list malformed;
  v1::CompositionRecord record;
  for (size_t i = 0; i < py::len(items); ++i) {
    RecordProblem problem;
    if (RecordFromItem(items[i].ptr(), first_row + static_cast<int>(i),
                       alternatives, &record, &problem)) {
      *batch.add_records() = record;
    } else {
      v1::RecordReport report;
      MalformedRecordReport(record, problem.message, &report);
      malformed.append(py::make_tuple(
          i, py::reinterpret_steal<py::object>(ReportDict(report))));
    }
  }
  return py::make_tuple(py::bytes(batch.SerializeAsString()), malformed);
}

template <typename Message>
Message Parse(const py::bytes& bytes) {
  Message m;
  const std::string data = bytes;
  if (!m.ParseFromString(data)) {
    throw py::value_error(
        absl::StrCat("cannot parse a ", Message::descriptor()->full_name()));
  }
  return m;
}

py::list ReportBatchDicts(const py::bytes& bytes) {
  const v1::ReportBatch batch = Parse<v1::ReportBatch>(bytes);
  py::list out;
  for (const v1::RecordReport& r : batch.reports()) {
    out.append(py::reinterpret_steal<py::object>(ReportDict(r)));
  }
  return out;
}

}  // namespace
}  // namespace shellwright::python

PYBIND11_MODULE(_engine, m) {
  namespace py = pybind11;
  using namespace shellwright::python;  // NOLINT(build/namespaces)
  m.doc() = "Shellwright's engine in process (see shellwright/__init__.py).";
  m.def("describe", &Describe, py::arg("spec"), py::arg("charge"),
        py::arg("geometry"), py::arg("spin_state"), py::arg("configuration"));
  m.def("describe_request", &DescribeRequest, py::arg("spec"),
        py::arg("charge"), py::arg("geometry"), py::arg("spin_state"),
        py::arg("configuration"));
  m.def("analyze", &Analyze, py::arg("formula"), py::arg("fields"));
  m.def("record_bytes", &RecordBytes, py::arg("formula"), py::arg("fields"));
  py::class_<ReportIterator>(m, "ReportIterator")
      .def("__iter__", [](py::object self) { return self; })
      .def("__next__", &ReportIterator::Next);
  m.def(
      "analyze_many",
      [](const py::object& records, const py::object& jobs, int alternatives) {
        return std::make_unique<ReportIterator>(records, Jobs(jobs),
                                                Alternatives(alternatives));
      },
      py::arg("records"), py::arg("jobs"), py::arg("alternatives"));
  m.def(
      "annotate_columns",
      [](const py::dict& columns, const py::object& jobs, int alternatives,
         int first_row, std::vector<std::string> skip) {
        return AnnotateColumns(columns, Jobs(jobs), Alternatives(alternatives),
                               first_row, std::move(skip));
      },
      py::arg("columns"), py::arg("jobs"), py::arg("alternatives"),
      py::arg("first_row"), py::arg("skip"));
  m.def("record_batch", &RecordBatchBytes, py::arg("items"),
        py::arg("first_row"), py::arg("alternatives"));
  m.def("report_batch_dicts", &ReportBatchDicts, py::arg("data"));
  m.def("report_dict", [](const py::bytes& data) {
    return py::reinterpret_steal<py::object>(
        ReportDict(Parse<shellwright::v1::RecordReport>(data)));
  });
  m.def("atom_dict", [](const py::bytes& data) {
    return py::reinterpret_steal<py::object>(
        MessageDict(Parse<shellwright::v1::AtomDescription>(data)));
  });
  m.attr("MAX_ALTERNATIVES") = shellwright::kMaxAlternatives;
  m.attr("MAX_RECORDS_PER_BATCH") = shellwright::kMaxRecordsPerBatch;
}
