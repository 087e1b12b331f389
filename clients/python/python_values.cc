#include "clients/python/python_values.h"

#include <pybind11/numpy.h>
#include <pybind11/pybind11.h>

#include <array>
#include <cmath>
#include <cstdint>
#include <cstring>
#include <initializer_list>
#include <optional>
#include <string>
#include <type_traits>
#include <vector>

#include "absl/container/flat_hash_map.h"
#include "absl/container/inlined_vector.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/str_join.h"
#include "api/report_view.h"
#include "google/protobuf/descriptor.h"
#include "google/protobuf/reflection.h"
#include "util/utf8.h"

namespace shellwright::python {
namespace {

namespace py = pybind11;
using google::protobuf::Descriptor;
using google::protobuf::FieldDescriptor;
using google::protobuf::Message;
using google::protobuf::Reflection;

// Owns one reference.
class Ref {
 public:
  explicit Ref(PyObject* p = nullptr) : p_(p) {}
  Ref(const Ref&) = delete;
  Ref& operator=(const Ref&) = delete;
  ~Ref() { Py_XDECREF(p_); }
  PyObject* get() const { return p_; }
  PyObject* release() {
    PyObject* p = p_;
    p_ = nullptr;
    return p;
  }

 private:
  PyObject* p_;
};

// Interned dict keys by field name. The walks name fields with string
// literals, so the literal's address finds its key without hashing text.
PyObject* KeyFor(absl::string_view name) {
  static auto* by_address = new absl::flat_hash_map<const char*, PyObject*>;
  static auto* by_text = new absl::flat_hash_map<std::string, PyObject*>;
  auto it = by_address->find(name.data());
  if (it != by_address->end()) return it->second;
  PyObject*& key = (*by_text)[std::string(name)];
  if (key == nullptr) {
    key = PyUnicode_FromStringAndSize(name.data(), name.size());
    PyUnicode_InternInPlace(&key);
  }
  (*by_address)[name.data()] = key;
  return key;
}

// A str from engine or message text, which is UTF-8; any invalid byte
// becomes U+FFFD rather than an exception.
PyObject* Str(absl::string_view text) {
  return PyUnicode_DecodeUTF8(text.data(), text.size(), "replace");
}

// Stores `value` (a new reference, stolen) under `name`.
void Put(PyObject* dict, absl::string_view name, PyObject* value) {
  PyDict_SetItem(dict, KeyFor(name), value);
  Py_DECREF(value);
}

// A kept dict under its key (see Cached in api/report_view.h): the fields
// of a state or an ion with placeholders where the varying values go.
struct TemplateGap {
  PyObject* key;
  int index;
  bool exact;
};
// A template's gaps; the walk varies two values per message at most, kept
// inline, so that copying them costs no allocation.
using TemplateGaps = absl::InlinedVector<TemplateGap, 4>;
template <typename Key>
struct Template {
  std::optional<Key> key;
  uint64_t generation = 0;  // Counts the keys that held the slot.
  PyObject* dict = nullptr;
  TemplateGaps gaps;
};

// Kept per key slot (see report_view.h's kCacheSlots), under the GIL.
template <typename Key>
Template<Key>& CachedTemplate(const Key& key) {
  static auto* cache = new std::array<Template<Key>, Key::kCacheSlots>;
  return (*cache)[key.Hash() % Key::kCacheSlots];
}

PyObject* VaryingObject(const VaryingValue& v, bool exact) {
  return exact ? Str(v.exact.ToString()) : PyFloat_FromDouble(v.number);
}

}  // namespace

// A template (by address and generation) and its varying values: equal
// shares mean equal dicts.
struct SharedDicts::Share {
  const void* slot;
  uint64_t generation;
  uint64_t values[4];  // Two varying values: number bits, or num and den.

  bool operator==(const Share& o) const {
    return slot == o.slot && generation == o.generation &&
           std::memcmp(values, o.values, sizeof(values)) == 0;
  }
  template <typename H>
  friend H AbslHashValue(H h, const Share& s) {
    return H::combine(std::move(h), s.slot, s.generation, s.values[0],
                      s.values[1], s.values[2], s.values[3]);
  }
};

struct SharedDicts::Map {
  absl::flat_hash_map<Share, PyObject*, absl::Hash<Share>> dicts;
};

SharedDicts::SharedDicts() : map_(new Map) {}
SharedDicts::~SharedDicts() {
  for (auto& [share, dict] : map_->dicts) Py_DECREF(dict);
  delete map_;
}

namespace {

// Builds a dict from a report walk (api/report_view.h's visitor). With a
// SharedDicts, the dicts of states and ions are shared between equal ones.
class DictBuilder {
 public:
  explicit DictBuilder(SharedDicts* shared = nullptr, Py_ssize_t size = 0)
      : dict_(size > 0 ? _PyDict_NewPresized(size) : PyDict_New()),
        shared_(shared) {}
  // The dict built (a new reference); the builder is done.
  PyObject* Release() {
    PyObject* d = dict_;
    dict_ = nullptr;
    return d;
  }
  ~DictBuilder() { Py_XDECREF(dict_); }

  template <typename F>
  void String(const F& f, absl::string_view v) {
    Put(dict_, f.name, Str(v));
  }
  template <typename F>
  void Int(const F& f, int32_t v) {
    Put(dict_, f.name, PyLong_FromLong(v));
  }
  template <typename F>
  void Double(const F& f, double v) {
    Put(dict_, f.name, PyFloat_FromDouble(v));
  }
  template <typename F>
  void Bool(const F& f, bool v) {
    Put(dict_, f.name, PyBool_FromLong(v));
  }
  template <typename F, typename Items, typename Visit>
  void Messages(const F& f, const Items& items, Visit visit) {
    Put(dict_, f.name, List(items, visit, shared_));
  }
  template <typename Items, typename Visit>
  static PyObject* List(const Items& items, Visit visit, SharedDicts* shared) {
    PyObject* list = PyList_New(static_cast<Py_ssize_t>(items.size()));
    Py_ssize_t i = 0;
    for (const auto& item : items) {
      DictBuilder member(shared);
      visit(item, member);
      PyList_SET_ITEM(list, i++, member.Release());
    }
    return list;
  }

  // A copy of the dict kept under `key`, made by `visit` the first time
  // (and whenever another key took the slot), with the varying values set;
  // with a SharedDicts, one such dict per template and values.
  template <typename Key, typename Visit>
  void Cached(const Key& key, std::initializer_list<VaryingValue> varying,
              Visit visit) {
    Template<Key>& t = CachedTemplate(key);
    if (!t.key.has_value() || !(*t.key == key)) {
      // The new template is built aside and put in the slot with no call
      // into Python in between: an allocation may run the garbage
      // collector, whose finalizers may let another thread use this slot.
      TemplateGaps gaps;
      DictBuilder recorder;
      recorder.gaps_ = &gaps;
      visit(recorder);
      PyObject* old = t.dict;
      t.dict = recorder.Release();
      t.gaps = gaps;
      t.key = key;
      t.key->Keep();
      ++t.generation;
      Py_XDECREF(old);
    }
    // What the slot holds now, held: copying may run the collector too.
    Ref kept(t.dict);
    Py_INCREF(kept.get());
    const TemplateGaps gaps = t.gaps;
    PyObject** slot = nullptr;
    if (shared_ != nullptr) {
      SharedDicts::Share share{&t, t.generation, {0, 0, 0, 0}};
      int at = 0;
      for (const VaryingValue& v : varying) {
        if (at + 2 > 4) break;
        if (v.kind == VaryingValue::Kind::kNumber) {
          share.values[at++] = report_view_internal::Bits(v.number);
        } else {
          share.values[at++] = static_cast<uint64_t>(v.exact.num());
          share.values[at++] = static_cast<uint64_t>(v.exact.den());
        }
      }
      slot = &shared_->map_->dicts[share];
      if (*slot != nullptr) {
        Py_DECREF(dict_);
        Py_INCREF(*slot);
        dict_ = *slot;
        return;
      }
    }
    Py_DECREF(dict_);
    dict_ = PyDict_Copy(kept.get());
    for (const TemplateGap& gap : gaps) {
      PyObject* value = VaryingObject(varying.begin()[gap.index], gap.exact);
      PyDict_SetItem(dict_, gap.key, value);
      Py_DECREF(value);
    }
    if (slot != nullptr) {  // Annotate pauses the collector: still valid.
      Py_INCREF(dict_);
      *slot = dict_;
    }
  }
  template <typename F>
  void VaryingNumber(const F& f, int i) {
    Gap(f.name, i, false);
  }
  template <typename F>
  void VaryingExact(const F& f, int i) {
    Gap(f.name, i, true);
  }

 private:
  // Only a template's recorder meets the Varying* calls.
  void Gap(absl::string_view name, int i, bool exact) {
    gaps_->push_back({KeyFor(name), i, exact});
    PyDict_SetItem(dict_, KeyFor(name), Py_None);
  }

  PyObject* dict_;
  SharedDicts* shared_;
  TemplateGaps* gaps_ = nullptr;
};

std::string TypeName(PyObject* value) { return Py_TYPE(value)->tp_name; }

// A short repr of `value` for messages: "str 'x'", "int 42".
std::string Describe(PyObject* value) {
  std::string out = TypeName(value);
  Ref repr(PyObject_Repr(value));
  if (repr.get() == nullptr) {
    PyErr_Clear();
    return out;
  }
  Py_ssize_t size = 0;
  const char* text = PyUnicode_AsUTF8AndSize(repr.get(), &size);
  if (text == nullptr) {
    PyErr_Clear();
    return out;
  }
  return absl::StrCat(out, " ", Utf8Prefix(absl::string_view(text, size), 80));
}

// "None", "float nan", "NAType <NA>": what a missing value was.
std::string Missing(PyObject* value) {
  return value == Py_None ? "None" : Describe(value);
}

bool IsMissing(PyObject* value) {
  if (value == Py_None) return true;
  if (PyFloat_Check(value)) return std::isnan(PyFloat_AS_DOUBLE(value));
  if (PyUnicode_Check(value) || PyBytes_Check(value) || PyLong_Check(value)) {
    return false;
  }
  // numpy floats and pandas' NA: anything that is a float but not equal to
  // itself, or pandas' NA/NaT singletons (named so by their type).
  const std::string type = TypeName(value);
  if (type == "NAType" || type == "NaTType") return true;
  if (!PyLong_Check(value) && PyNumber_Check(value) &&
      PyObject_HasAttrString(value, "dtype")) {
    const double d = PyFloat_AsDouble(value);
    if (d == -1.0 && PyErr_Occurred()) {
      PyErr_Clear();
      return false;
    }
    return std::isnan(d);
  }
  return false;
}

bool Fail(RecordProblem* problem, bool type_error, std::string message) {
  problem->type_error = type_error;
  problem->message = std::move(message);
  return false;
}

// `value` as UTF-8 text (str, or bytes that are valid UTF-8).
bool TextOf(absl::string_view name, PyObject* value, std::string* out,
            RecordProblem* problem) {
  if (PyUnicode_Check(value)) {
    Py_ssize_t size = 0;
    const char* text = PyUnicode_AsUTF8AndSize(value, &size);
    if (text == nullptr) {  // Lone surrogates.
      PyErr_Clear();
      return Fail(problem, false,
                  absl::StrCat(name,
                               ": not valid Unicode text (it holds a "
                               "lone surrogate)"));
    }
    out->assign(text, size);
    return true;
  }
  if (PyBytes_Check(value)) {
    const absl::string_view bytes(PyBytes_AS_STRING(value),
                                  PyBytes_GET_SIZE(value));
    if (!IsValidUtf8(bytes)) {
      size_t at = 0;  // The first byte that starts no character.
      while (at < bytes.size()) {
        if (static_cast<unsigned char>(bytes[at]) < 0x80) {
          ++at;
          continue;
        }
        const size_t n = Utf8SequenceLength(bytes, at);
        if (n == 0) break;
        at += n;
      }
      return Fail(
          problem, false,
          absl::StrCat(name, ": bytes are not valid UTF-8 (at byte ", at, ")"));
    }
    out->assign(bytes.data(), bytes.size());
    return true;
  }
  return Fail(problem, true,
              absl::StrCat(name, ": expected str, got ", Describe(value)));
}

bool DoubleOf(absl::string_view name, PyObject* value, double* out,
              RecordProblem* problem) {
  if (!PyBool_Check(value) && !PyUnicode_Check(value) &&
      !PyBytes_Check(value) && PyNumber_Check(value)) {
    const double d = PyFloat_AsDouble(value);
    if (!(d == -1.0 && PyErr_Occurred())) {
      *out = d;
      return true;
    }
    PyErr_Clear();
  }
  return Fail(problem, true,
              absl::StrCat(name, ": expected a number, got ", Describe(value)));
}

bool IntOf(absl::string_view name, PyObject* value, int32_t* out,
           RecordProblem* problem) {
  if (PyBool_Check(value)) {
    return Fail(problem, true,
                absl::StrCat(name, ": expected an integer, got bool"));
  }
  Ref index(PyNumber_Index(value));
  long long v = 0;  // NOLINT(runtime/int): the C API's type.
  if (index.get() != nullptr) {
    int overflow = 0;
    v = PyLong_AsLongLongAndOverflow(index.get(), &overflow);
    if (overflow != 0 || v < INT32_MIN || v > INT32_MAX) {
      return Fail(problem, false,
                  absl::StrCat(name, ": ", Describe(value),
                               " is out of range for a 32-bit integer"));
    }
  } else {
    PyErr_Clear();
    // A float column holding integers (pandas turns an int column with a
    // gap into floats): integral values only.
    double d = 0;
    if (!DoubleOf(name, value, &d, problem)) {
      problem->message =
          absl::StrCat(name, ": expected an integer, got ", Describe(value));
      return false;
    }
    if (!std::isfinite(d) || d != std::floor(d) || d < INT32_MIN ||
        d > INT32_MAX) {
      return Fail(
          problem, false,
          absl::StrCat(name, ": expected an integer, got ", Describe(value)));
    }
    v = static_cast<long long>(d);  // NOLINT(runtime/int)
  }
  *out = static_cast<int32_t>(v);
  return true;
}

std::string FieldList(const Descriptor* d) {
  std::vector<std::string> names;
  for (int i = 0; i < d->field_count(); ++i)
    names.push_back(d->field(i)->name());
  return absl::StrJoin(names, ", ");
}

}  // namespace

bool SetRecordField(v1::CompositionRecord& record, absl::string_view name,
                    PyObject* value, RecordProblem* problem) {
  const Descriptor* d = v1::CompositionRecord::descriptor();
  const FieldDescriptor* f = d->FindFieldByName(std::string(name));
  if (f == nullptr) {
    return Fail(problem, true,
                absl::StrCat("unknown record field '", name, "' (expected ",
                             FieldList(d), ")"));
  }
  if (IsMissing(value)) {
    if (f->name() == "formula") {
      return Fail(problem, false,
                  absl::StrCat("formula: missing (", Missing(value), ")"));
    }
    return true;  // Not given.
  }
  const Reflection* r = record.GetReflection();
  switch (f->cpp_type()) {
    case FieldDescriptor::CPPTYPE_STRING: {
      std::string text;
      if (!TextOf(f->name(), value, &text, problem)) return false;
      r->SetString(&record, f, std::move(text));
      return true;
    }
    case FieldDescriptor::CPPTYPE_INT32: {
      int32_t v = 0;
      if (!IntOf(f->name(), value, &v, problem)) return false;
      r->SetInt32(&record, f, v);
      return true;
    }
    case FieldDescriptor::CPPTYPE_DOUBLE: {
      double v = 0;
      if (!DoubleOf(f->name(), value, &v, problem)) return false;
      r->SetDouble(&record, f, v);
      return true;
    }
    default:
      return Fail(problem, true,
                  absl::StrCat(f->name(),
                               ": a field of this kind is not "
                               "taken from Python"));
  }
}

bool RecordFromItem(PyObject* item, int row, int alternatives,
                    v1::CompositionRecord* record, RecordProblem* problem) {
  record->Clear();
  record->set_row(row);
  if (alternatives > 0) record->set_max_alternatives(alternatives);
  if (PyDict_Check(item) ||
      (!PyUnicode_Check(item) && !PyBytes_Check(item) &&
       PyMapping_Check(item) && PyObject_HasAttrString(item, "items"))) {
    // A dict is read in place; another mapping through its items.
    Ref items(PyDict_Check(item) ? nullptr : PyMapping_Items(item));
    if (!PyDict_Check(item) &&
        (items.get() == nullptr || !PyList_Check(items.get()))) {
      PyErr_Clear();
      return Fail(
          problem, true,
          absl::StrCat("record: cannot read the items of ", TypeName(item)));
    }
    bool has_formula = false;
    bool ok = true;
    RecordProblem first;
    Py_ssize_t position = 0;
    PyObject* key = nullptr;
    PyObject* value = nullptr;
    const auto next = [&] {
      if (items.get() == nullptr) {
        return PyDict_Next(item, &position, &key, &value) != 0;
      }
      if (position >= PyList_GET_SIZE(items.get())) return false;
      PyObject* pair = PyList_GET_ITEM(items.get(), position++);
      if (!PyTuple_Check(pair) || PyTuple_GET_SIZE(pair) != 2) return false;
      key = PyTuple_GET_ITEM(pair, 0);
      value = PyTuple_GET_ITEM(pair, 1);
      return true;
    };
    while (next()) {
      if (!PyUnicode_Check(key)) {
        if (ok) {
          Fail(&first, true,
               absl::StrCat("record: field names must be str, got ",
                            Describe(key)));
        }
        ok = false;
        continue;
      }
      Py_ssize_t size = 0;
      const char* text = PyUnicode_AsUTF8AndSize(key, &size);
      if (text == nullptr) {
        PyErr_Clear();
        if (ok) Fail(&first, true, "record: a field name is not valid text");
        ok = false;
        continue;
      }
      const absl::string_view name(text, size);
      if (name == "formula") has_formula = true;
      RecordProblem p;
      if (!SetRecordField(*record, name, value, &p)) {
        if (ok) first = p;
        ok = false;
      }
    }
    if (ok && !has_formula) {
      return Fail(problem, true, "record: no 'formula' field");
    }
    if (!ok) *problem = first;
    return ok;
  }
  if (PyUnicode_Check(item) || PyBytes_Check(item)) {
    return SetRecordField(*record, "formula", item, problem);
  }
  if (IsMissing(item)) {
    return SetRecordField(*record, "formula", item, problem);
  }
  return Fail(problem, true,
              absl::StrCat("record: expected a formula (str) or a mapping "
                           "of record fields, got ",
                           Describe(item)));
}

namespace {
// Presized for a report's top level, which has fewer fields.
constexpr Py_ssize_t kReportFields = 24;
}  // namespace

PyObject* ReportDict(const CompositionReport& report,
                     const v1::CompositionRecord& record) {
  DictBuilder builder(nullptr, kReportFields);
  VisitRecordReport(report, record, builder);
  return builder.Release();
}

PyObject* ReportDict(const v1::RecordReport& report) {
  DictBuilder builder(nullptr, kReportFields);
  VisitRecordReport(report, builder);
  return builder.Release();
}

namespace {

PyObject* ScalarValue(const Message& m, const FieldDescriptor* f, int i) {
  const Reflection* r = m.GetReflection();
  const bool rep = f->is_repeated();
  switch (f->cpp_type()) {
    case FieldDescriptor::CPPTYPE_INT32:
      return PyLong_FromLong(rep ? r->GetRepeatedInt32(m, f, i)
                                 : r->GetInt32(m, f));
    case FieldDescriptor::CPPTYPE_UINT32:
      return PyLong_FromUnsignedLong(rep ? r->GetRepeatedUInt32(m, f, i)
                                         : r->GetUInt32(m, f));
    // The JSON printer writes 64-bit integers as strings.
    case FieldDescriptor::CPPTYPE_INT64:
      return Str(
          absl::StrCat(rep ? r->GetRepeatedInt64(m, f, i) : r->GetInt64(m, f)));
    case FieldDescriptor::CPPTYPE_UINT64:
      return Str(absl::StrCat(rep ? r->GetRepeatedUInt64(m, f, i)
                                  : r->GetUInt64(m, f)));
    case FieldDescriptor::CPPTYPE_DOUBLE:
      return PyFloat_FromDouble(rep ? r->GetRepeatedDouble(m, f, i)
                                    : r->GetDouble(m, f));
    case FieldDescriptor::CPPTYPE_FLOAT:
      return PyFloat_FromDouble(rep ? r->GetRepeatedFloat(m, f, i)
                                    : r->GetFloat(m, f));
    case FieldDescriptor::CPPTYPE_BOOL:
      return PyBool_FromLong(rep ? r->GetRepeatedBool(m, f, i)
                                 : r->GetBool(m, f));
    case FieldDescriptor::CPPTYPE_ENUM:
      return Str(
          (rep ? r->GetRepeatedEnum(m, f, i) : r->GetEnum(m, f))->name());
    case FieldDescriptor::CPPTYPE_STRING:
      return Str(rep ? r->GetRepeatedString(m, f, i) : r->GetString(m, f));
    case FieldDescriptor::CPPTYPE_MESSAGE:
      return MessageDict(rep ? r->GetRepeatedMessage(m, f, i)
                             : r->GetMessage(m, f));
  }
  Py_RETURN_NONE;
}

}  // namespace

PyObject* MessageDict(const Message& message) {
  const Descriptor* d = message.GetDescriptor();
  const Reflection* r = message.GetReflection();
  PyObject* dict = PyDict_New();
  for (int i = 0; i < d->field_count(); ++i) {
    const FieldDescriptor* f = d->field(i);
    if (f->is_repeated()) {
      const int n = r->FieldSize(message, f);
      PyObject* list = PyList_New(n);
      for (int j = 0; j < n; ++j) {
        PyList_SET_ITEM(list, j, ScalarValue(message, f, j));
      }
      Put(dict, f->name(), list);
    } else if (f->has_presence() && !r->HasField(message, f)) {
      continue;  // Unset optional or oneof member: the printer omits it.
    } else {
      Put(dict, f->name(), ScalarValue(message, f, 0));
    }
  }
  return dict;
}

// ---- Columns ----------------------------------------------------------

struct ReportColumns::Column {
  enum class Kind { kDouble, kInt, kBool, kObject };
  absl::string_view name;
  Kind kind;
  std::vector<double> doubles;
  std::vector<int32_t> ints;
  std::vector<uint8_t> bools;
  std::vector<PyObject*> objects;  // Owned references.
  std::string last_text;           // The text of objects.back(), if str.
  bool last_is_text = false;
  bool skip = false;  // Not wanted: walked past, not stored.
};

// Walks a report's top level into the columns; repeated messages become
// lists of dicts (DictBuilder).
class ReportColumns::Visitor : public TopLevelVisitor {
 public:
  Visitor(std::vector<Column>* columns, const std::vector<std::string>* skip,
          SharedDicts* shared)
      : columns_(columns), skip_(skip), shared_(shared) {}

  template <typename F>
  void String(const F& f, absl::string_view v) {
    Column* c = At(f.name, Column::Kind::kObject);
    if (c == nullptr) return;
    // Verdicts, kinds and echoes repeat: share the previous row's str.
    if (c->last_is_text && !c->objects.empty() && c->last_text == v) {
      Py_INCREF(c->objects.back());
      c->objects.push_back(c->objects.back());
      return;
    }
    c->objects.push_back(Str(v));
    c->last_text.assign(v.data(), v.size());
    c->last_is_text = true;
  }
  template <typename F>
  void Int(const F& f, int32_t v) {
    if (Column* c = At(f.name, Column::Kind::kInt)) c->ints.push_back(v);
  }
  template <typename F>
  void Double(const F& f, double v) {
    if (Column* c = At(f.name, Column::Kind::kDouble)) c->doubles.push_back(v);
  }
  template <typename F>
  void Bool(const F& f, bool v) {
    if (Column* c = At(f.name, Column::Kind::kBool)) c->bools.push_back(v);
  }
  template <typename F, typename Items, typename Visit>
  void Messages(const F& f, const Items& items, Visit visit) {
    Column* c = At(f.name, Column::Kind::kObject);
    if (c == nullptr) return;
    c->objects.push_back(DictBuilder::List(items, visit, shared_));
    c->last_is_text = false;
  }

 private:
  // The next column, which the first report's walk creates; every walk
  // visits the same fields in the same order.
  // Null for a skipped column.
  Column* At(absl::string_view name, Column::Kind kind) {
    if (next_ == columns_->size()) {
      Column c;
      c.name = name;
      c.kind = kind;
      for (const std::string& s : *skip_) c.skip = c.skip || s == name;
      columns_->push_back(std::move(c));
    }
    Column* c = &(*columns_)[next_++];
    return c->skip ? nullptr : c;
  }

  std::vector<Column>* columns_;
  const std::vector<std::string>* skip_;
  SharedDicts* shared_;
  size_t next_ = 0;
};

ReportColumns::ReportColumns(std::vector<std::string> skip)
    : columns_(new std::vector<Column>), skip_(std::move(skip)) {}

ReportColumns::~ReportColumns() {
  for (Column& c : *columns_) {
    for (PyObject* o : c.objects) Py_DECREF(o);
  }
  delete columns_;
}

void ReportColumns::Reserve(size_t rows) {
  for (Column& c : *columns_) {
    switch (c.kind) {
      case Column::Kind::kDouble:
        c.doubles.reserve(rows);
        break;
      case Column::Kind::kInt:
        c.ints.reserve(rows);
        break;
      case Column::Kind::kBool:
        c.bools.reserve(rows);
        break;
      case Column::Kind::kObject:
        c.objects.reserve(rows);
        break;
    }
  }
}

void ReportColumns::Add(const CompositionReport& report,
                        const v1::CompositionRecord& record) {
  Visitor v(columns_, &skip_, &shared_);
  VisitRecordReport(report, record, v);
}

void ReportColumns::Add(const v1::RecordReport& report) {
  Visitor v(columns_, &skip_, &shared_);
  VisitRecordReport(report, v);
}

namespace {

template <typename T>
py::array ToArray(std::vector<T>* values) {
  py::array_t<T> a(static_cast<py::ssize_t>(values->size()));
  if (!values->empty()) {
    std::memcpy(a.mutable_data(), values->data(), values->size() * sizeof(T));
  }
  std::vector<T>().swap(*values);
  return std::move(a);
}

}  // namespace

PyObject* ReportColumns::Take() {
  py::dict out;
  for (Column& c : *columns_) {
    if (c.skip) continue;
    py::object array;
    switch (c.kind) {
      case Column::Kind::kDouble:
        array = ToArray(&c.doubles);
        break;
      case Column::Kind::kInt:
        array = ToArray(&c.ints);
        break;
      case Column::Kind::kBool: {
        py::array_t<bool> a(static_cast<py::ssize_t>(c.bools.size()));
        if (!c.bools.empty()) {
          std::memcpy(a.mutable_data(), c.bools.data(), c.bools.size());
        }
        std::vector<uint8_t>().swap(c.bools);
        array = std::move(a);
        break;
      }
      case Column::Kind::kObject: {
        py::array a(py::dtype("O"),
                    std::vector<py::ssize_t>{
                        static_cast<py::ssize_t>(c.objects.size())});
        auto** data = static_cast<PyObject**>(a.mutable_data());
        for (size_t i = 0; i < c.objects.size(); ++i) {
          Py_XDECREF(data[i]);     // numpy fills object arrays with None.
          data[i] = c.objects[i];  // The array takes the reference.
        }
        std::vector<PyObject*>().swap(c.objects);
        array = std::move(a);
        break;
      }
    }
    out[py::str(std::string(c.name))] = array;
  }
  columns_->clear();
  return out.release().ptr();
}

}  // namespace shellwright::python
