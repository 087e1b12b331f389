// Python values <-> shellwright.v1 messages for the Python package's
// extension (clients/python/engine_module.cc): a record's fields from
// Python objects, and plain dicts from reports and other messages.
//
// Reports become dicts through api/report_view.h's walk (from the engine
// report in process, from the message for a server's answer), so a dict
// has exactly the keys and values of the CLI's JSON and follows every
// field added to the walk. Other messages (AtomDescription) become dicts
// by reflection, with the keys and values the protobuf JSON printer writes
// when it prints every field.
//
// Example:
//
//   v1::CompositionRecord record;
//   RecordProblem problem;
//   if (SetRecordField(record, "formula", py_value, &problem)) {...}
//   PyObject* dict = ReportDict(engine_report, record);  // New reference.
//
// Thread safety: every function needs the GIL.

#ifndef SHELLWRIGHT_CLIENTS_PYTHON_PYTHON_VALUES_H_
#define SHELLWRIGHT_CLIENTS_PYTHON_PYTHON_VALUES_H_

#include <Python.h>

#include <string>
#include <vector>

#include "absl/strings/string_view.h"
#include "engine/composition.h"
#include "google/protobuf/message.h"
#include "shellwright/v1/electron_structure.pb.h"

namespace shellwright::python {

// Why a Python value could not fill a record field. A type problem is a
// TypeError when raised; a value problem a ValueError.
struct RecordProblem {
  bool type_error = false;
  std::string message;  // "charge: expected an integer, got str 'x'".
};

// Sets `record`'s field `name` (a CompositionRecord field name) from
// `value`. None and NaN leave the field unset ("not given"), except for
// `formula`, where they are a problem. Strings may be str or UTF-8 bytes;
// numbers may be Python or numpy numbers (an integer field takes a float
// only when it is integral). Returns false and fills `problem` otherwise.
bool SetRecordField(v1::CompositionRecord& record, absl::string_view name,
                    PyObject* value, RecordProblem* problem);

// The record for one item of analyze_many: a formula (str or bytes) or a
// mapping of record fields. `row` is used unless the item gives one;
// `alternatives` unless it gives max_alternatives. Returns false with
// `problem` when the item cannot be read (the record then holds what could
// be read, for the error report).
bool RecordFromItem(PyObject* item, int row, int alternatives,
                    v1::CompositionRecord* record, RecordProblem* problem);

// New references: the report as a dict, from the engine report (with the
// record it answers) or from a message.
PyObject* ReportDict(const CompositionReport& report,
                     const v1::CompositionRecord& record);
PyObject* ReportDict(const v1::RecordReport& report);

// New reference: `message` as a dict, every field present as the JSON
// printer prints it (proto field names, defaults included, unset optional
// fields left out).
PyObject* MessageDict(const google::protobuf::Message& message);

// The dicts of states and ions that reports share: one per distinct value,
// kept for as long as this lives (and then for as long as Python holds
// them).
class SharedDicts {
 public:
  SharedDicts();
  ~SharedDicts();
  SharedDicts(const SharedDicts&) = delete;
  SharedDicts& operator=(const SharedDicts&) = delete;

  struct Share;
  struct Map;
  Map* map_;
};

// A report's top-level fields as columns: Add() walks a report, Take()
// hands over the columns. Scalar fields fill numpy-ready vectors; string
// fields and repeated messages (lists of dicts) fill object columns. A
// million rows would hold millions of small dicts: equal states and ions
// share one dict (so they are to be read, not changed), and the cyclic
// garbage collector is paused while columns are built.
class ReportColumns {
 public:
  // Columns named in `skip` are left out (the input's own columns that a
  // report echoes).
  explicit ReportColumns(std::vector<std::string> skip = {});
  ~ReportColumns();
  ReportColumns(const ReportColumns&) = delete;
  ReportColumns& operator=(const ReportColumns&) = delete;

  void Reserve(size_t rows);
  void Add(const CompositionReport& report,
           const v1::CompositionRecord& record);
  void Add(const v1::RecordReport& report);
  // New reference: a dict of column name -> numpy array (float64, int32,
  // bool or object), in the report's field order. Clears the columns.
  PyObject* Take();

  struct Column;
  class Visitor;

 private:
  std::vector<Column>* columns_;
  const std::vector<std::string> skip_;
  SharedDicts shared_;
};

}  // namespace shellwright::python

#endif  // SHELLWRIGHT_CLIENTS_PYTHON_PYTHON_VALUES_H_
