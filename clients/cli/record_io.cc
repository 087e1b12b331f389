#include "clients/cli/record_io.h"

#include <poll.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cmath>
#include <cstring>
#include <set>
#include <vector>

#include "absl/strings/ascii.h"
#include "absl/strings/numbers.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/strip.h"
#include "engine/composition.h"
#include "engine/diagnostic_codes.h"
#include "google/protobuf/descriptor.h"
#include "google/protobuf/util/json_util.h"
#include "util/utf8.h"

#if defined(__SSE2__)
#include <emmintrin.h>
#endif

namespace shellwright::cli {
namespace {

// At most `n` bytes of `text` for a message, cut at a character boundary.
std::string Clip(absl::string_view text, size_t n = 40) {
  std::string out(Utf8Prefix(text, n));
  if (text.size() > out.size()) out += "...";
  return out;
}

// The first line of a protobuf JSON parse error, without the caret dump.
std::string FirstLine(absl::string_view message) {
  const size_t nl = message.find('\n');
  std::string out(message.substr(0, nl));
  ReplaceInvalidUtf8(&out);
  return out;
}

// Edit distance between two short names (for "did you mean").
size_t EditDistance(absl::string_view a, absl::string_view b) {
  std::vector<size_t> row(b.size() + 1);
  for (size_t j = 0; j <= b.size(); ++j) row[j] = j;
  for (size_t i = 1; i <= a.size(); ++i) {
    size_t diagonal = row[0];
    row[0] = i;
    for (size_t j = 1; j <= b.size(); ++j) {
      const size_t up = row[j];
      row[j] = std::min({row[j] + 1, row[j - 1] + 1,
                         diagonal + (a[i - 1] == b[j - 1] ? 0 : 1)});
      diagonal = up;
    }
  }
  return row[b.size()];
}

// "Measured Moment" -> "measured_moment".
std::string FieldSpelling(absl::string_view name) {
  std::string out = absl::AsciiStrToLower(absl::StripAsciiWhitespace(name));
  for (char& c : out) {
    if (c == ' ' || c == '-') c = '_';
  }
  return out;
}

// The " (did you mean 'x'?)" hint for an unknown name, or "".
std::string DidYouMean(absl::string_view name) {
  const std::string nearest = NearestRecordField(name);
  return nearest.empty() ? ""
                         : absl::StrCat(" (did you mean '", nearest, "'?)");
}

// One top-level member of a JSON object: its key and the first byte of its
// value ('"' string, '{' object, '[' array, 't'/'f' bool, 'n' null, else a
// number), with the value's text.
struct JsonMember {
  std::string key;
  char kind;
  absl::string_view value;
};

// Skips a JSON string starting at text[i] == '"'; returns the index after
// it, or npos when it does not end.
size_t SkipString(absl::string_view text, size_t i) {
  for (++i; i < text.size(); ++i) {
    if (text[i] == '\\') {
      ++i;
    } else if (text[i] == '"') {
      return i + 1;
    }
  }
  return absl::string_view::npos;
}

// The top-level members of the JSON object `text`, for messages only: the
// protobuf parser has already accepted or rejected the line. Stops at the
// first thing it cannot read.
std::vector<JsonMember> TopLevelMembers(absl::string_view text) {
  std::vector<JsonMember> members;
  size_t i = text.find('{');
  if (i == absl::string_view::npos) return members;
  ++i;
  auto skip_space = [&] {
    while (i < text.size() && absl::ascii_isspace(text[i])) ++i;
  };
  while (true) {
    skip_space();
    if (i >= text.size() || text[i] != '"') return members;
    const size_t key_end = SkipString(text, i);
    if (key_end == absl::string_view::npos) return members;
    JsonMember m;
    m.key = std::string(text.substr(i + 1, key_end - i - 2));
    i = key_end;
    skip_space();
    if (i >= text.size() || text[i] != ':') return members;
    ++i;
    skip_space();
    if (i >= text.size()) return members;
    const size_t start = i;
    m.kind = text[i];
    int depth = 0;
    while (i < text.size()) {
      const char c = text[i];
      if (c == '"') {
        i = SkipString(text, i);
        if (i == absl::string_view::npos) return members;
        if (depth == 0) break;
        continue;
      }
      if (c == '{' || c == '[') ++depth;
      if (c == '}' || c == ']') {
        if (depth == 0) break;
        if (--depth == 0) {
          ++i;
          break;
        }
      }
      if (c == ',' && depth == 0) break;
      ++i;
    }
    m.value = absl::StripAsciiWhitespace(text.substr(start, i - start));
    members.push_back(std::move(m));
    skip_space();
    if (i >= text.size() || text[i] != ',') return members;
    ++i;
  }
}

// The record field a JSON key names (by its proto name or its JSON
// name, as the protobuf parser accepts both), or nullptr.
const google::protobuf::FieldDescriptor* RecordField(absl::string_view key) {
  const google::protobuf::Descriptor* record =
      v1::CompositionRecord::descriptor();
  for (int i = 0; i < record->field_count(); ++i) {
    const google::protobuf::FieldDescriptor* f = record->field(i);
    if (f->name() == key || f->json_name() == key) return f;
  }
  return nullptr;
}

// What a JSON value of kind `kind` is, in words.
absl::string_view KindInWords(char kind) {
  switch (kind) {
    case '"':
      return "text";
    case '{':
      return "an object";
    case '[':
      return "a list";
    case 't':
    case 'f':
      return "true/false";
    case 'n':
      return "null";
    default:
      return "a number";
  }
}

// The message for a JSON line that the protobuf parser refused, in the
// user's words where the fault can be named: not an object, or a field
// holding a value of the wrong type. `parser_message` otherwise.
std::string JsonRecordError(absl::string_view text,
                            absl::string_view parser_message) {
  const absl::string_view trimmed = absl::StripAsciiWhitespace(text);
  if (trimmed.empty() || trimmed.front() != '{') {
    return absl::StrCat(
        "a record must be one JSON object per line, like {\"id\": \"s1\", "
        "\"formula\": \"Fe2O3\"}; this line holds ",
        trimmed.empty() ? "nothing" : KindInWords(trimmed.front()));
  }
  for (const JsonMember& m : TopLevelMembers(text)) {
    const google::protobuf::FieldDescriptor* field = RecordField(m.key);
    if (field == nullptr || m.kind == 'n') continue;
    using Cpp = google::protobuf::FieldDescriptor;
    // A number, bare or in quotes (protobuf's JSON form allows both).
    double number = 0;
    const bool is_number =
        (m.kind == '"' || m.kind == '-' || absl::ascii_isdigit(m.kind)) &&
        absl::SimpleAtod(
            absl::StripPrefix(absl::StripSuffix(m.value, "\""), "\""), &number);
    absl::string_view needs;
    bool fits = true;
    switch (field->cpp_type()) {
      case Cpp::CPPTYPE_STRING:
        needs = "text in double quotes";
        fits = m.kind == '"';
        break;
      case Cpp::CPPTYPE_INT32:
      case Cpp::CPPTYPE_INT64:
        needs = "a whole number";
        fits = is_number && number == std::floor(number) &&
               std::abs(number) <= 2147483647.0;
        break;
      case Cpp::CPPTYPE_DOUBLE:
      case Cpp::CPPTYPE_FLOAT:
        needs = "a number";
        fits = is_number;
        break;
      default:
        continue;
    }
    if (!fits) {
      return absl::StrCat("field '", field->name(), "' must be ", needs,
                          ", but holds ", KindInWords(m.kind), " ",
                          Clip(m.value, 40));
    }
  }
  return absl::StrCat("not a valid JSON record: ",
                      Clip(FirstLine(std::string(parser_message)), 120));
}

}  // namespace

void AddReaderWarnings(const ParsedLine& line, v1::RecordReport* report) {
  for (const ReaderWarning& w : line.warnings) {
    v1::Diagnostic* d = report->add_diagnostics();
    d->set_severity(std::string(Name(Severity::kWarning)));
    d->set_code(w.code);
    d->set_message(w.message);
  }
}

std::string NearestRecordField(absl::string_view name) {
  const std::string spelled = FieldSpelling(name);
  const google::protobuf::Descriptor* record =
      v1::CompositionRecord::descriptor();
  std::string best;
  size_t best_distance = 3;  // At most two edits.
  for (int i = 0; i < record->field_count(); ++i) {
    const std::string& field = record->field(i)->name();
    if (field == "row") continue;  // Set by the reader, not the user.
    if (spelled == field) return field;
    const size_t d = EditDistance(spelled, field);
    if (d < best_distance) {
      best_distance = d;
      best = field;
    }
  }
  return best;
}

LineSource::LineSource(int fd, int stop_fd)
    : fd_(fd), stop_fd_(stop_fd), buffer_(1 << 16) {}

bool LineSource::Fill() {
  if (at_end_ || stopped_ || error_ != 0) return false;
  pos_ = 0;
  end_ = 0;
  while (true) {
    if (stop_fd_ >= 0) {
      // Wait for input or for a stop, whichever comes first; a regular
      // file is always readable, so this costs one call per buffer.
      pollfd fds[2] = {{stop_fd_, POLLIN, 0}, {fd_, POLLIN, 0}};
      if (poll(fds, 2, -1) < 0) {
        if (errno == EINTR) continue;  // The stop fd will say if it was.
        error_ = errno;
        return false;
      }
      if (fds[0].revents != 0) {
        stopped_ = true;
        return false;
      }
    }
    const ssize_t n = read(fd_, buffer_.data(), buffer_.size());
    if (n < 0) {
      if (errno == EINTR) continue;
      error_ = errno;
      return false;
    }
    if (n == 0) {
      at_end_ = true;
      return false;
    }
    end_ = static_cast<size_t>(n);
    break;
  }
  // The mark can only be whole in the first read when that read has at
  // least three bytes; a pipe handing over fewer is taken as having none.
  if (at_start_ && end_ >= 3 &&
      static_cast<unsigned char>(buffer_[0]) == 0xEF &&
      static_cast<unsigned char>(buffer_[1]) == 0xBB &&
      static_cast<unsigned char>(buffer_[2]) == 0xBF) {
    pos_ = 3;
    bytes_read_ += 3;
  }
  at_start_ = false;
  return true;
}

bool LineSource::Ready() {
  if (at_end_ || stopped_ || error_ != 0) return true;
  if (pos_ < end_ && std::memchr(buffer_.data() + pos_, '\n', end_ - pos_)) {
    return true;
  }
  pollfd fd = {fd_, POLLIN, 0};
  return poll(&fd, 1, 0) != 0;
}

bool LineSource::Next(std::string* line, int* line_no, bool* too_long) {
  line->clear();
  *too_long = false;
  bool any = false;
  bool ended = false;  // By "\n".
  while (true) {
    if (pos_ == end_ && !Fill()) break;
    any = true;
    const char* start = buffer_.data() + pos_;
    const char* nl =
        static_cast<const char*>(std::memchr(start, '\n', end_ - pos_));
    const size_t len = nl ? static_cast<size_t>(nl - start) : end_ - pos_;
    const size_t room =
        kMaxLineBytes + 1 - std::min(line->size(), kMaxLineBytes + 1);
    line->append(start, std::min(len, room));
    if (line->size() > kMaxLineBytes) {
      line->resize(kMaxLineBytes);
      *too_long = true;
    }
    pos_ += len;
    bytes_read_ += len;
    if (nl != nullptr) {
      ++pos_;
      ++bytes_read_;
      ended = true;
      break;
    }
  }
  if (!any || (stopped_ && !ended)) return false;
  if (!line->empty() && line->back() == '\r') line->pop_back();
  *line_no = ++line_no_;
  return true;
}

ParsedLine TooLongLine(absl::string_view prefix, int row, bool csv_id_first) {
  ParsedLine p;
  p.record.set_row(row);
  p.error = absl::StrCat("line is longer than ", kMaxLineBytes, " bytes");
  if (csv_id_first) {
    const size_t comma = prefix.find(',');
    if (comma != absl::string_view::npos && comma <= 256 &&
        prefix.substr(0, comma).find('"') == absl::string_view::npos) {
      std::string id(prefix.substr(0, comma));
      ReplaceInvalidUtf8(&id);
      p.record.set_id(std::move(id));
    }
  }
  return p;
}

namespace {

// Whether every byte of `text` is ASCII: then so is every field cut from
// it, and no field needs ReplaceInvalidUtf8. 16 bytes at a time with SSE2
// (part of every x86-64), the rest byte by byte.
bool AllAscii(absl::string_view text) {
  size_t i = 0;
#if defined(__SSE2__)
  for (; i + 16 <= text.size(); i += 16) {
    const __m128i x =
        _mm_loadu_si128(reinterpret_cast<const __m128i*>(text.data() + i));
    if (_mm_movemask_epi8(x) != 0) return false;
  }
#endif
  for (; i < text.size(); ++i) {
    if (static_cast<unsigned char>(text[i]) >= 0x80) return false;
  }
  return true;
}

// The index of the first ',' or '"' in line[from, line.size()), or
// line.size(): 16 bytes at a time with SSE2, the rest byte by byte.
size_t FindCommaOrQuote(absl::string_view line, size_t from) {
  size_t i = from;
#if defined(__SSE2__)
  const __m128i comma = _mm_set1_epi8(',');
  const __m128i quote = _mm_set1_epi8('"');
  for (; i + 16 <= line.size(); i += 16) {
    const __m128i x =
        _mm_loadu_si128(reinterpret_cast<const __m128i*>(line.data() + i));
    const int hit = _mm_movemask_epi8(
        _mm_or_si128(_mm_cmpeq_epi8(x, comma), _mm_cmpeq_epi8(x, quote)));
    if (hit != 0) return i + __builtin_ctz(hit);
  }
#endif
  while (i < line.size() && line[i] != ',' && line[i] != '"') ++i;
  return i;
}

}  // namespace

bool SplitCsvLine(absl::string_view line, std::vector<std::string>* fields,
                  std::string* error) {
  const bool ascii = AllAscii(line);
  // Fields already in `fields` are reused, keeping their memory.
  size_t n = 0;
  auto next_field = [&]() -> std::string& {
    if (n == fields->size()) fields->emplace_back();
    std::string& f = (*fields)[n++];
    f.clear();
    return f;
  };
  size_t i = 0;
  while (true) {
    std::string& field = next_field();
    if (i < line.size() && line[i] == '"') {
      ++i;
      bool closed = false;
      while (i < line.size()) {
        const size_t quote = line.find('"', i);
        if (quote == absl::string_view::npos) {
          field.append(line.data() + i, line.size() - i);
          i = line.size();
          break;
        }
        field.append(line.data() + i, quote - i);
        i = quote + 1;
        if (i < line.size() && line[i] == '"') {
          field.push_back('"');
          ++i;
          continue;
        }
        closed = true;
        break;
      }
      if (!closed) {
        *error = absl::StrCat("unterminated quote in field ", n);
        fields->resize(n);
        return false;
      }
      if (i < line.size() && line[i] != ',') {
        *error = absl::StrCat("text after the closing quote of field ", n);
        fields->resize(n);
        return false;
      }
    }
    const size_t end = FindCommaOrQuote(line, i);
    if (end < line.size() && line[end] == '"') {
      *error = absl::StrCat("stray quote inside unquoted field ", n);
      fields->resize(n);
      return false;
    }
    field.append(line.data() + i, end - i);
    i = end;
    if (!ascii) ReplaceInvalidUtf8(&field);
    if (i >= line.size()) break;
    ++i;  // The comma.
  }
  fields->resize(n);
  return true;
}

absl::Status CsvRecordReader::ReadHeader(absl::string_view line) {
  static constexpr const char* kNames[kColumns] = {
      "id",
      "formula",
      "charge",
      "declared_states",
      "geometry",
      "spin_state",
      "measured_moment",
      "moment_tolerance",
      "max_alternatives",
      "variables",
      "measured_saturation_moment",
      "saturation_moment_tolerance",
      "structure_family",
      "temperature"};
  std::vector<std::string> columns;
  std::string error;
  if (!SplitCsvLine(line, &columns, &error)) {
    return absl::InvalidArgumentError(absl::StrCat("CSV header: ", error));
  }
  std::set<std::string> seen;
  std::fill(std::begin(column_), std::end(column_), -1);
  unknown_columns_.clear();
  for (size_t i = 0; i < columns.size(); ++i) {
    // Column names match case-insensitively ("Formula" from spreadsheets).
    std::string name =
        absl::AsciiStrToLower(absl::StripAsciiWhitespace(columns[i]));
    if (!seen.insert(name).second) {
      return absl::InvalidArgumentError(
          absl::StrCat("CSV header names column '", name, "' twice"));
    }
    bool known = false;
    for (int k = 0; k < kColumns; ++k) {
      if (name == kNames[k]) {
        column_[k] = static_cast<int>(i);
        known = true;
      }
    }
    if (!known && !name.empty()) {
      unknown_columns_.push_back(absl::StrCat(
          "column ", QuoteForMessage(absl::StripAsciiWhitespace(columns[i])),
          " is not a record field and is ignored", DidYouMean(columns[i])));
    }
  }
  for (Column required : {kId, kFormula}) {
    if (column_[required] < 0) {
      return absl::InvalidArgumentError(
          absl::StrCat("CSV header has no '", kNames[required], "' column"));
    }
  }
  header_size_ = columns.size();
  return absl::OkStatus();
}

ParsedLine CsvRecordReader::ParseLine(absl::string_view line, int row) {
  ParsedLine p;
  ParseLine(line, row, &p);
  return p;
}

void CsvRecordReader::ParseLine(absl::string_view line, int row,
                                ParsedLine* out) {
  // Cleared, not made anew: the record's strings keep their memory.
  out->record.Clear();
  out->error.clear();
  out->warnings.clear();
  ParsedLine& p = *out;
  p.record.set_row(row);
  std::string error;
  if (line.size() > kMaxLineBytes) {
    p.error = absl::StrCat("line is longer than ", kMaxLineBytes, " bytes");
    return;
  }
  if (!SplitCsvLine(line, &fields_, &error)) {
    p.error = error;
    // Recover the id when the damage is later in the line.
    const size_t comma = line.find(',');
    if (id_is_first_column() && comma != absl::string_view::npos &&
        line.substr(0, comma).find('"') == absl::string_view::npos) {
      std::string id(line.substr(0, comma));
      ReplaceInvalidUtf8(&id);
      p.record.set_id(std::move(id));
    }
    return;
  }
  p.record.set_id(Field(kId));
  p.record.set_formula(Field(kFormula));
  if (fields_.size() != header_size_) {
    p.error = absl::StrCat("line has ", fields_.size(), " fields, the header ",
                           header_size_);
    return;
  }
  // Spaces around a value are CSV padding, not part of the formula.
  const absl::string_view formula = absl::StripAsciiWhitespace(Field(kFormula));
  if (formula.size() != p.record.formula().size()) {
    p.record.set_formula(std::string(formula));
  }
  // Empty fields stay unset: setting one would allocate a string.
  if (!Field(kDeclaredStates).empty()) {
    p.record.set_declared_states(Field(kDeclaredStates));
  }
  if (!Field(kGeometry).empty()) p.record.set_geometry(Field(kGeometry));
  if (!Field(kSpinState).empty()) p.record.set_spin_state(Field(kSpinState));
  if (!Field(kVariables).empty()) p.record.set_variables(Field(kVariables));
  if (!Field(kStructureFamily).empty()) {
    p.record.set_structure_family(
        std::string(absl::StripAsciiWhitespace(Field(kStructureFamily))));
  }
  // Most optional columns are empty: they are told apart before the
  // spaces are stripped.
  auto parse_int = [&](Column k, const char* name, auto setter) {
    if (Field(k).empty()) return true;
    const absl::string_view v = absl::StripAsciiWhitespace(Field(k));
    if (v.empty()) return true;
    int value = 0;
    if (!absl::SimpleAtoi(v, &value)) {
      p.error = absl::StrCat("column '", name, "': '", Clip(v),
                             "' is not an integer");
      return false;
    }
    setter(value);
    return true;
  };
  auto parse_double = [&](Column k, const char* name, auto setter) {
    if (Field(k).empty()) return true;
    const absl::string_view v = absl::StripAsciiWhitespace(Field(k));
    if (v.empty()) return true;
    double value = 0;
    if (!absl::SimpleAtod(v, &value) || !std::isfinite(value)) {
      p.error =
          absl::StrCat("column '", name, "': '", Clip(v), "' is not a number");
      return false;
    }
    setter(value);
    return true;
  };
  if (!parse_int(kCharge, "charge", [&](int v) { p.record.set_charge(v); }) ||
      !parse_int(kMaxAlternatives, "max_alternatives",
                 [&](int v) { p.record.set_max_alternatives(v); }) ||
      !parse_double(kMeasuredMoment, "measured_moment",
                    [&](double v) { p.record.set_measured_moment(v); }) ||
      !parse_double(kMomentTolerance, "moment_tolerance",
                    [&](double v) { p.record.set_moment_tolerance(v); }) ||
      !parse_double(
          kMeasuredSaturationMoment, "measured_saturation_moment",
          [&](double v) { p.record.set_measured_saturation_moment(v); }) ||
      !parse_double(
          kSaturationMomentTolerance, "saturation_moment_tolerance",
          [&](double v) { p.record.set_saturation_moment_tolerance(v); }) ||
      !parse_double(kTemperature, "temperature",
                    [&](double v) { p.record.set_temperature(v); })) {
    return;
  }
  if (absl::StripAsciiWhitespace(p.record.id()).empty()) {
    p.error = "the id field is empty";
  }
}

ParsedLine ParseJsonLine(absl::string_view line, int row) {
  ParsedLine p;
  if (line.size() > kMaxLineBytes) {
    p.error = absl::StrCat("line is longer than ", kMaxLineBytes, " bytes");
  } else {
    // Proto strings must be UTF-8: repair the text first, so that a bad
    // byte costs one U+FFFD, not the record.
    std::string text(line);
    ReplaceInvalidUtf8(&text);
    google::protobuf::util::JsonParseOptions options;
    // Strict first: almost every line has only known keys.
    auto status =
        google::protobuf::util::JsonStringToMessage(text, &p.record, options);
    if (!status.ok()) {
      options.ignore_unknown_fields = true;
      p.record.Clear();
      status =
          google::protobuf::util::JsonStringToMessage(text, &p.record, options);
      if (status.ok()) {
        // Only unknown keys: name them.
        for (const JsonMember& m : TopLevelMembers(text)) {
          if (RecordField(m.key) != nullptr) continue;
          p.warnings.push_back(
              {codes::kUnknownField,
               absl::StrCat("key ", QuoteForMessage(m.key),
                            " is not a record field and is ignored",
                            DidYouMean(m.key))});
        }
      }
    }
    if (!status.ok()) {
      p.error = JsonRecordError(text, std::string(status.message()));
      p.record.Clear();
      // Keep a plain string id, so the report can be matched to its record.
      for (const JsonMember& m : TopLevelMembers(text)) {
        if (m.key == "id" && m.kind == '"' && m.value.size() <= 258 &&
            m.value.find('\\') == absl::string_view::npos) {
          p.record.set_id(std::string(m.value.substr(1, m.value.size() - 2)));
        }
      }
    } else if (absl::StripAsciiWhitespace(p.record.id()).empty()) {
      p.error = "the id field is missing or empty";
    }
  }
  p.record.set_row(row);
  return p;
}

}  // namespace shellwright::cli
