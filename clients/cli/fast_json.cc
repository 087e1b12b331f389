#include "clients/cli/fast_json.h"

#include <array>
#include <charconv>
#include <cmath>
#include <cstring>
#include <memory>

#include "absl/strings/string_view.h"

namespace shellwright::cli {
namespace {

// The protobuf printer's escaping: short escapes for \b \t \n \f \r, \"
// and \\; \u00XX for other control characters, DEL, '<' and '>'; \u2028
// and \u2029; everything else (valid UTF-8) as is.
struct EscapeTable {
  bool needs[256];
  constexpr EscapeTable() : needs() {
    for (int c = 0; c < 256; ++c) {
      needs[c] = c < 0x20 || c == '"' || c == '\\' || c == 0x7f || c == '<' ||
                 c == '>' || c == 0xE2;
    }
  }
};
constexpr EscapeTable kEscape;

inline bool NeedsEscape(unsigned char c) { return kEscape.needs[c]; }

}  // namespace

char* WriteJsonString(absl::string_view s, char* out) {
  *out++ = '"';
  size_t run = 0;  // Start of the pending run of plain bytes.
  auto flush = [&](size_t i) {
    if (i == run) return;  // Also keeps a null empty view out of memcpy.
    std::memcpy(out, s.data() + run, i - run);
    out += i - run;
  };
  auto put = [&](absl::string_view text) {
    std::memcpy(out, text.data(), text.size());
    out += text.size();
  };
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
      flush(i);
      put(static_cast<unsigned char>(s[i + 2]) == 0xA8 ? "\\u2028" : "\\u2029");
      i += 2;
      run = i + 1;
      continue;
    }
    flush(i);
    run = i + 1;
    switch (c) {
      case '"':
        put("\\\"");
        break;
      case '\\':
        put("\\\\");
        break;
      case '\b':
        put("\\b");
        break;
      case '\t':
        put("\\t");
        break;
      case '\n':
        put("\\n");
        break;
      case '\f':
        put("\\f");
        break;
      case '\r':
        put("\\r");
        break;
      default: {
        static constexpr char kHex[] = "0123456789abcdef";
        put("\\u00");
        *out++ = kHex[c >> 4];
        *out++ = kHex[c & 15];
      }
    }
  }
  flush(s.size());
  *out++ = '"';
  return out;
}

namespace {

using uint128 = unsigned __int128;

constexpr std::array<uint128, 23> PowersOfTen() {
  std::array<uint128, 23> p{};
  p[0] = 1;
  for (size_t i = 1; i < p.size(); ++i) p[i] = p[i - 1] * 10;
  return p;
}
constexpr std::array<uint128, 23> kPow10 = PowersOfTen();

// The same as doubles, all exact (10^22 is the largest exact power).
constexpr std::array<double, 23> PowersOfTenAsDoubles() {
  std::array<double, 23> p{};
  for (size_t i = 0; i < p.size(); ++i) p[i] = static_cast<double>(kPow10[i]);
  return p;
}
constexpr std::array<double, 23> kPow10Double = PowersOfTenAsDoubles();

// m x 2^-s x 10^k rounded to the nearest integer, ties to even (as printf
// rounds an exact value). Requires m < 2^53, 1 <= s < 128, k <= 22.
uint64_t ScaledRound(uint64_t m, int s, int k) {
  const uint128 n = static_cast<uint128>(m) * kPow10[k];
  uint128 q = n >> s;
  const uint128 rest = n - (q << s);
  const uint128 half = static_cast<uint128>(1) << (s - 1);
  if (rest > half || (rest == half && (q & 1))) ++q;
  return static_cast<uint64_t>(q);
}

// The protobuf printer's text (%.15g if it round-trips, else %.17g) for
// 10^-4 <= |v| < 10^15, computed exactly: v = m x 2^-s, so the digits of
// a precision-P rendering are round(m x 10^(P-1-d) / 2^s) for the
// decimal exponent d, in 128-bit integers. Returns the length written to
// `buf`, or 0 outside that range (the caller falls back to the library
// formatter).
int FormatDoubleInRange(double v, char* buf) {
  const double a = std::fabs(v);
  if (!(a >= 1e-4 && a < 1e15)) return 0;
  uint64_t bits;
  std::memcpy(&bits, &a, sizeof(bits));
  const int biased = static_cast<int>(bits >> 52);  // Normal: a >= 1e-4.
  const uint64_t m = (bits & ((uint64_t{1} << 52) - 1)) | (uint64_t{1} << 52);
  const int s = 1075 - biased;  // a = m x 2^-s; 3 <= s <= 66 here.
  // Decimal exponent: 10^d <= a < 10^(d+1), settled exactly below.
  int d = -4;
  const double shifted = a * 1e4;  // Compared with 10^(d + 5).
  while (d < 14 && shifted >= kPow10Double[d + 5]) ++d;
  // `precision` digits of a; adjusts the exponent when the guess or the
  // rounding crosses a power of ten.
  auto round_to = [&](int precision, int* exponent) -> uint64_t {
    int e = *exponent;
    for (int tries = 0; tries < 3; ++tries) {
      const int k = precision - 1 - e;
      if (k < 0 || k > 22) return 0;
      const uint64_t q = ScaledRound(m, s, k);
      if (q >= static_cast<uint64_t>(kPow10[precision])) {
        ++e;
        continue;
      }
      if (q < static_cast<uint64_t>(kPow10[precision - 1])) {
        --e;
        continue;
      }
      *exponent = e;
      return q;
    }
    return 0;
  };
  int exponent = d;
  int precision = 15;
  uint64_t q = round_to(15, &exponent);
  if (q == 0) return 0;
  // Does the 15-digit text round-trip? q / 10^k is then an exact division
  // of exactly representable numbers (q < 2^53, k <= 18).
  const int k15 = 14 - exponent;
  const double back = k15 >= 0 ? static_cast<double>(q) / kPow10Double[k15] : 0;
  if (k15 < 0 || back != a) {
    precision = 17;
    exponent = d;
    q = round_to(17, &exponent);
    if (q == 0) return 0;
  }
  if (exponent < -4 || exponent >= precision) return 0;
  char digits[24];
  const int n = static_cast<int>(std::to_chars(digits, digits + 24, q).ptr -
                                 digits);  // == precision
  int used = n;
  while (used > 1 && digits[used - 1] == '0') --used;
  char* p = buf;
  if (v < 0) *p++ = '-';
  if (exponent >= 0) {
    for (int i = 0; i <= exponent; ++i) *p++ = i < used ? digits[i] : '0';
    if (used > exponent + 1) {
      *p++ = '.';
      std::memcpy(p, digits + exponent + 1, used - exponent - 1);
      p += used - exponent - 1;
    }
  } else {
    *p++ = '0';
    *p++ = '.';
    for (int i = 0; i < -exponent - 1; ++i) *p++ = '0';
    std::memcpy(p, digits, used);
    p += used;
  }
  return static_cast<int>(p - buf);
}

// Whole numbers below 10^15, which %.15g prints as plain integers.
bool IsSmallWhole(double v) {
  return std::fabs(v) < 1e15 &&
         static_cast<double>(static_cast<int64_t>(v)) == v;
}

// The shorter of %.15g / %.17g that round-trips, as the protobuf printer
// writes it, at `buf` (at least kJsonDoubleMax bytes); returns the length.
int FormatDouble(double v, char* buf) {
  char* const end = buf + kJsonDoubleMax;
  auto copy = [buf](absl::string_view text) {
    std::memcpy(buf, text.data(), text.size());
    return static_cast<int>(text.size());
  };
  if (std::isnan(v)) return copy("\"NaN\"");
  if (std::isinf(v)) return copy(v > 0 ? "\"Infinity\"" : "\"-Infinity\"");
  // Whole numbers (counts, states, zero moments) are most of a report's
  // doubles: %.15g prints them as plain integers below 10^15.
  if (IsSmallWhole(v) && !(v == 0 && std::signbit(v))) {
    return static_cast<int>(
        std::to_chars(buf, end, static_cast<int64_t>(v)).ptr - buf);
  }
  if (const int n = FormatDoubleInRange(v, buf); n > 0) return n;
  // Elsewhere (tiny, huge or subnormal values, rare in reports), the
  // printer's rule itself: %.15g if it reads back as v, else %.17g
  // (std::to_chars with a precision formats exactly as printf does).
  auto r = std::to_chars(buf, end, v, std::chars_format::general, 15);
  double back = 0;
  std::from_chars(buf, r.ptr, back);
  if (back != v) r = std::to_chars(buf, end, v, std::chars_format::general, 17);
  return static_cast<int>(r.ptr - buf);
}

// FormatDouble behind a small per-thread cache keyed by the value's bits:
// a report's moments come from a few dozen values (sqrt(n(n+2)), the J
// moments), and a hit costs a fraction of formatting.
absl::string_view DoubleText(double v, char* scratch) {
  struct Entry {
    uint64_t bits = 0;  // 0 is +0.0, which never reaches the cache.
    int size = 0;
    char text[kJsonDoubleMax];
  };
  // Whole numbers are cheap already (and many, and would flood the cache).
  if (IsSmallWhole(v)) {
    return absl::string_view(scratch, FormatDouble(v, scratch));
  }
  // On the heap, made on first use, like report_lines.cc's caches: TLS
  // is zeroed at every process and thread start.
  using Cache = std::array<Entry, 512>;
  thread_local std::unique_ptr<Cache> cache;
  if (cache == nullptr) cache = std::make_unique<Cache>();
  uint64_t bits;
  std::memcpy(&bits, &v, sizeof(bits));
  Entry& e = (*cache)[(bits * 0x9E3779B97F4A7C15ull) >> 55];
  if (e.bits != bits) {
    e.size = FormatDouble(v, e.text);
    e.bits = bits;
  }
  return absl::string_view(e.text, e.size);
}

}  // namespace

char* WriteJsonDouble(double v, char* out) {
  char scratch[kJsonDoubleMax];
  const absl::string_view text = DoubleText(v, scratch);
  std::memcpy(out, text.data(), text.size());
  return out + text.size();
}

}  // namespace shellwright::cli
