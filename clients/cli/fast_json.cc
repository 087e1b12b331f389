#include "clients/cli/fast_json.h"

#include <array>
#include <charconv>
#include <cstring>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <limits>

#include "absl/container/flat_hash_map.h"
#include "absl/strings/str_cat.h"
#include "absl/strings/string_view.h"
#include "google/protobuf/descriptor.h"

namespace shellwright::cli {
namespace {

using google::protobuf::FieldDescriptor;
using google::protobuf::Message;
using google::protobuf::Reflection;

// The protobuf printer's escaping: short escapes for \b \t \n \f \r, \"
// and \\; \u00XX for other control characters, DEL, '<' and '>'; \u2028
// and \u2029; everything else (valid UTF-8) as is.
struct EscapeTable {
  bool needs[256];
  constexpr EscapeTable() : needs() {
    for (int c = 0; c < 256; ++c) {
      needs[c] = c < 0x20 || c == '"' || c == '\\' || c == 0x7f ||
                 c == '<' || c == '>' || c == 0xE2;
    }
  }
};
constexpr EscapeTable kEscape;

inline bool NeedsEscape(unsigned char c) { return kEscape.needs[c]; }

void AppendEscaped(absl::string_view s, std::string* out) {
  out->push_back('"');
  size_t run = 0;  // Start of the pending run of plain bytes.
  for (size_t i = 0; i < s.size(); ++i) {
    const unsigned char c = static_cast<unsigned char>(s[i]);
    if (!NeedsEscape(c)) continue;
    if (c == 0xE2) {
      // Only U+2028 and U+2029 are escaped among multi-byte characters.
      if (!(i + 2 < s.size() && static_cast<unsigned char>(s[i + 1]) == 0x80 &&
            (static_cast<unsigned char>(s[i + 2]) == 0xA8 ||
             static_cast<unsigned char>(s[i + 2]) == 0xA9))) {
        continue;
      }
      out->append(s.data() + run, i - run);
      out->append(static_cast<unsigned char>(s[i + 2]) == 0xA8 ? "\\u2028"
                                                              : "\\u2029");
      i += 2;
      run = i + 1;
      continue;
    }
    out->append(s.data() + run, i - run);
    run = i + 1;
    switch (c) {
      case '"':
        out->append("\\\"");
        break;
      case '\\':
        out->append("\\\\");
        break;
      case '\b':
        out->append("\\b");
        break;
      case '\t':
        out->append("\\t");
        break;
      case '\n':
        out->append("\\n");
        break;
      case '\f':
        out->append("\\f");
        break;
      case '\r':
        out->append("\\r");
        break;
      default: {
        char buf[8];
        std::snprintf(buf, sizeof(buf), "\\u%04x", c);
        out->append(buf);
      }
    }
  }
  out->append(s.data() + run, s.size() - run);
  out->push_back('"');
}

// Shortest of %.15g / %.17g that round-trips, as the protobuf printer does,
// written to `buf` (at least kDoubleTextMax bytes); returns the length.
// std::to_chars with a precision formats exactly as printf would, much
// faster.
constexpr int kDoubleTextMax = 40;

int FormatDouble(double v, char* buf) {
  char* const end = buf + kDoubleTextMax;
  auto copy = [buf](absl::string_view text) {
    std::memcpy(buf, text.data(), text.size());
    return static_cast<int>(text.size());
  };
  if (std::isnan(v)) return copy("\"NaN\"");
  if (std::isinf(v)) return copy(v > 0 ? "\"Infinity\"" : "\"-Infinity\"");
  // Whole numbers (counts, states, zero moments) are most of a report's
  // doubles: %.15g prints them as plain integers below 10^15.
  if (std::fabs(v) < 1e15) {
    const int64_t whole = static_cast<int64_t>(v);
    if (static_cast<double>(whole) == v && !(v == 0 && std::signbit(v))) {
      return static_cast<int>(std::to_chars(buf, end, whole).ptr - buf);
    }
  }
  // Short decimals (counts such as 0.69 or 0.125). When v is the double
  // nearest m / 10^k, those digits round-trip, no other k-place decimal
  // does (below 10^9 with k <= 6 the double is finer than 10^-k), and
  // %.15g prints them, as m has at most 15 significant digits.
  const double magnitude = std::fabs(v);
  if (magnitude >= 1e-4 && magnitude < 1e9) {
    static constexpr double kPower[] = {1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6};
    static constexpr int64_t kIntPower[] = {1,      10,      100,    1000,
                                            10000, 100000, 1000000};
    for (int k = 1; k <= 6; ++k) {
      // The nearest integer, without a libm call; a wrong neighbour only
      // fails the test below.
      const int64_t digits =
          static_cast<int64_t>(magnitude * kPower[k] + 0.5);
      if (static_cast<double>(digits) / kPower[k] != magnitude) continue;
      char* p = buf;
      if (v < 0) *p++ = '-';
      p = std::to_chars(p, end, digits / kIntPower[k]).ptr;
      // The fraction's k digits with leading zeros: 10^k + fraction,
      // written over the '.', whose leading 1 becomes the point.
      char* const point = p;
      p = std::to_chars(p, end, kIntPower[k] + digits % kIntPower[k]).ptr;
      *point = '.';
      return static_cast<int>(p - buf);
    }
  }
  // Shortest round-trip digits first (fast). When they number 15 or fewer,
  // %.15g round-trips and prints exactly those digits, so render them in
  // %g layout here; otherwise %.17g is what the protobuf printer uses.
  char sci[kDoubleTextMax];
  const auto sr = std::to_chars(sci, sci + sizeof(sci), v,
                                std::chars_format::scientific);
  const char* q = sci;
  const bool negative = *q == '-';
  if (negative) ++q;
  char digits[24];
  int n = 0;
  while (q < sr.ptr && *q != 'e') {
    if (*q != '.') digits[n++] = *q;
    ++q;
  }
  int exponent = 0;
  std::from_chars(q + 1 + (q[1] == '+' ? 1 : 0), sr.ptr, exponent);
  while (n > 1 && digits[n - 1] == '0') --n;
  // Subnormals carry too few bits for the digit argument above; leave them
  // to the exact formatter.
  if (std::fabs(v) < std::numeric_limits<double>::min()) {
    auto r = std::to_chars(buf, end, v, std::chars_format::general, 15);
    double back = 0;
    std::from_chars(buf, r.ptr, back);
    if (back != v) r = std::to_chars(buf, end, v, std::chars_format::general, 17);
    return static_cast<int>(r.ptr - buf);
  }
  if (n == 16) {
    // No 15-digit form round-trips, so %.15g would not: %.17g it is, and
    // its 17th digit needs the exact formatter.
    return static_cast<int>(
        std::to_chars(buf, end, v, std::chars_format::general, 17).ptr - buf);
  }
  // With 17 shortest digits, they are the correctly rounded 17 digits
  // (those always round-trip, and the shortest form picks the candidate
  // closest to v), which is what %.17g prints.
  const int precision = n > 15 ? 17 : 15;
  char* p = buf;
  if (negative) *p++ = '-';
  if (exponent >= -4 && exponent < precision) {
    if (exponent >= 0) {
      for (int i = 0; i <= exponent; ++i) *p++ = i < n ? digits[i] : '0';
      if (n > exponent + 1) {
        *p++ = '.';
        std::memcpy(p, digits + exponent + 1, n - exponent - 1);
        p += n - exponent - 1;
      }
    } else {
      *p++ = '0';
      *p++ = '.';
      for (int i = 0; i < -exponent - 1; ++i) *p++ = '0';
      std::memcpy(p, digits, n);
      p += n;
    }
    return static_cast<int>(p - buf);
  }
  *p++ = digits[0];
  if (n > 1) {
    *p++ = '.';
    std::memcpy(p, digits + 1, n - 1);
    p += n - 1;
  }
  *p++ = 'e';
  *p++ = exponent < 0 ? '-' : '+';
  const int exponent_magnitude = exponent < 0 ? -exponent : exponent;
  if (exponent_magnitude < 10) *p++ = '0';
  p = std::to_chars(p, end, exponent_magnitude).ptr;
  return static_cast<int>(p - buf);
}

// FormatDouble behind a small per-thread cache keyed by the value's bits.
// A report's moments come from a few dozen values (sqrt(n(n+2)), the J
// moments), and most need the slower 17-digit form.
void AppendDouble(double v, std::string* out) {
  struct Entry {
    uint64_t bits = 0;  // 0 is +0.0, which never reaches the cache.
    int size = 0;
    char text[kDoubleTextMax];
  };
  // Whole numbers are cheap already (and many, and would flood the cache).
  if (std::fabs(v) < 1e15 &&
      static_cast<double>(static_cast<int64_t>(v)) == v) {
    char buf[kDoubleTextMax];
    out->append(buf, FormatDouble(v, buf));
    return;
  }
  thread_local std::array<Entry, 512> cache;
  uint64_t bits;
  std::memcpy(&bits, &v, sizeof(bits));
  Entry& e = cache[(bits * 0x9E3779B97F4A7C15ull) >> 55];
  if (e.bits != bits) {
    e.size = FormatDouble(v, e.text);
    e.bits = bits;
  }
  out->append(e.text, e.size);
}

void AppendFloat(float v, std::string* out) {
  if (std::isnan(v) || std::isinf(v)) {
    AppendDouble(v, out);
    return;
  }
  char buf[40];
  std::snprintf(buf, sizeof(buf), "%.6g", v);
  if (std::strtof(buf, nullptr) != v) {
    std::snprintf(buf, sizeof(buf), "%.9g", v);
  }
  out->append(buf);
}

void AppendValue(const Message& m, const Reflection& r,
                 const FieldDescriptor& f, int index, std::string* out) {
  const bool rep = f.is_repeated();
  switch (f.cpp_type()) {
    case FieldDescriptor::CPPTYPE_INT32:
      absl::StrAppend(out, rep ? r.GetRepeatedInt32(m, &f, index)
                               : r.GetInt32(m, &f));
      break;
    case FieldDescriptor::CPPTYPE_UINT32:
      absl::StrAppend(out, rep ? r.GetRepeatedUInt32(m, &f, index)
                               : r.GetUInt32(m, &f));
      break;
    case FieldDescriptor::CPPTYPE_INT64:
      absl::StrAppend(out, "\"",
                      rep ? r.GetRepeatedInt64(m, &f, index)
                          : r.GetInt64(m, &f),
                      "\"");
      break;
    case FieldDescriptor::CPPTYPE_UINT64:
      absl::StrAppend(out, "\"",
                      rep ? r.GetRepeatedUInt64(m, &f, index)
                          : r.GetUInt64(m, &f),
                      "\"");
      break;
    case FieldDescriptor::CPPTYPE_DOUBLE:
      AppendDouble(rep ? r.GetRepeatedDouble(m, &f, index) : r.GetDouble(m, &f),
                   out);
      break;
    case FieldDescriptor::CPPTYPE_FLOAT:
      AppendFloat(rep ? r.GetRepeatedFloat(m, &f, index) : r.GetFloat(m, &f),
                  out);
      break;
    case FieldDescriptor::CPPTYPE_BOOL:
      out->append((rep ? r.GetRepeatedBool(m, &f, index) : r.GetBool(m, &f))
                      ? "true"
                      : "false");
      break;
    case FieldDescriptor::CPPTYPE_ENUM: {
      const auto* value =
          rep ? r.GetRepeatedEnum(m, &f, index) : r.GetEnum(m, &f);
      AppendEscaped(value->name(), out);
      break;
    }
    case FieldDescriptor::CPPTYPE_STRING: {
      std::string scratch;
      const std::string& s =
          rep ? r.GetRepeatedStringReference(m, &f, index, &scratch)
              : r.GetStringReference(m, &f, &scratch);
      AppendEscaped(s, out);
      break;
    }
    case FieldDescriptor::CPPTYPE_MESSAGE:
      AppendCompactJson(
          rep ? r.GetRepeatedMessage(m, &f, index) : r.GetMessage(m, &f), out);
      break;
  }
}

}  // namespace

void AppendJsonString(absl::string_view s, std::string* out) {
  AppendEscaped(s, out);
}

void AppendJsonDouble(double v, std::string* out) { AppendDouble(v, out); }

void AppendCompactJson(const Message& message, std::string* out) {
  const auto* descriptor = message.GetDescriptor();
  const Reflection* r = message.GetReflection();
  out->push_back('{');
  bool first = true;
  // Field names never change: escape each once per thread.
  thread_local absl::flat_hash_map<const FieldDescriptor*, std::string> keys;
  auto key = [&](const FieldDescriptor* f) {
    if (!first) out->push_back(',');
    first = false;
    auto it = keys.find(f);
    if (it == keys.end()) {
      std::string k;
      AppendEscaped(f->name(), &k);
      k.push_back(':');
      it = keys.emplace(f, std::move(k)).first;
    }
    out->append(it->second);
  };
  // The protobuf printer emits, in declaration order, repeated fields,
  // plain scalars (always) and set message fields; then the set scalars
  // that track presence (proto3 optional and oneof members), again in
  // declaration order.
  auto scalar_with_presence = [](const FieldDescriptor* f) {
    return !f->is_repeated() && f->has_presence() &&
           f->cpp_type() != FieldDescriptor::CPPTYPE_MESSAGE;
  };
  for (int i = 0; i < descriptor->field_count(); ++i) {
    const FieldDescriptor* f = descriptor->field(i);
    if (f->is_repeated()) {
      key(f);
      out->push_back('[');
      const int n = r->FieldSize(message, f);
      for (int k = 0; k < n; ++k) {
        if (k > 0) out->push_back(',');
        AppendValue(message, *r, *f, k, out);
      }
      out->push_back(']');
      continue;
    }
    if (scalar_with_presence(f)) continue;
    if (f->has_presence() && !r->HasField(message, f)) continue;
    key(f);
    AppendValue(message, *r, *f, -1, out);
  }
  for (int i = 0; i < descriptor->field_count(); ++i) {
    const FieldDescriptor* f = descriptor->field(i);
    if (!scalar_with_presence(f) || !r->HasField(message, f)) continue;
    key(f);
    AppendValue(message, *r, *f, -1, out);
  }
  out->push_back('}');
}

}  // namespace shellwright::cli
