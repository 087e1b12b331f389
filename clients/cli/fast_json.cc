#include "clients/cli/fast_json.h"

#include <algorithm>
#include <array>
#include <charconv>
#include <cmath>
#include <cstdint>
#include <cstring>

#include "absl/strings/string_view.h"

#if defined(__SSE2__)
#include <emmintrin.h>
#endif

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

#if defined(__SSE2__)
// The bytes of x that NeedsEscape, as a bit mask (bit i for byte i).
inline int EscapeMask(__m128i x) {
  const __m128i last_control = _mm_set1_epi8(0x1f);
  // A control character: x <= 0x1f unsigned, i.e. max(x, 0x1f) == 0x1f.
  __m128i hit = _mm_cmpeq_epi8(_mm_max_epu8(x, last_control), last_control);
  hit = _mm_or_si128(hit, _mm_cmpeq_epi8(x, _mm_set1_epi8('"')));
  hit = _mm_or_si128(hit, _mm_cmpeq_epi8(x, _mm_set1_epi8('\\')));
  hit = _mm_or_si128(hit, _mm_cmpeq_epi8(x, _mm_set1_epi8(0x7f)));
  hit = _mm_or_si128(hit, _mm_cmpeq_epi8(x, _mm_set1_epi8('<')));
  hit = _mm_or_si128(hit, _mm_cmpeq_epi8(x, _mm_set1_epi8('>')));
  hit = _mm_or_si128(hit,
                     _mm_cmpeq_epi8(x, _mm_set1_epi8(static_cast<char>(0xE2))));
  return _mm_movemask_epi8(hit);
}
#endif

// The length of the longest prefix of [p, p + n) made of whole 16-byte
// blocks with no byte that NeedsEscape: most text has none, and SSE2
// (part of every x86-64) tests 16 bytes in a few instructions. Elsewhere
// 0: the caller looks at every byte.
size_t PlainBlocks(const char* p, size_t n) {
  size_t i = 0;
#if defined(__SSE2__)
  for (; i + 16 <= n; i += 16) {
    const __m128i x = _mm_loadu_si128(reinterpret_cast<const __m128i*>(p + i));
    if (EscapeMask(x) != 0) break;
  }
#endif
  return i;
}

#if defined(__SSE2__)
// Whether the bytes that `mask` marks in the 16 bytes of `s` from `at`
// are all lead bytes 0xE2 of characters other than U+2028 and U+2029,
// the only multi-byte characters that are escaped ("–" is E2 80 93).
bool OnlyPlainE2(absl::string_view s, size_t at, int mask) {
  for (; mask != 0; mask &= mask - 1) {
    const size_t i = at + __builtin_ctz(mask);
    if (static_cast<unsigned char>(s[i]) != 0xE2) return false;
    if (i + 2 < s.size() && static_cast<unsigned char>(s[i + 1]) == 0x80 &&
        (static_cast<unsigned char>(s[i + 2]) == 0xA8 ||
         static_cast<unsigned char>(s[i + 2]) == 0xA9)) {
      return false;
    }
  }
  return true;
}
#endif

// Whether `s` is written as it is, quoted (the common case: ids,
// formulas, names, notes), tested 16 bytes at a time without reading
// outside `s`: a short string is first copied into a zeroed block, and a
// longer one's last block overlaps the one before it. False when SSE2 is
// missing.
inline bool AllPlain(absl::string_view s) {
#if defined(__SSE2__)
  const size_t n = s.size();
  if (n < 16) {
    alignas(16) char block[16] = {};
    CopyShortText(s.data(), n, block);
    const int mask =
        EscapeMask(_mm_load_si128(reinterpret_cast<const __m128i*>(block))) &
        ((1 << n) - 1);
    return mask == 0 || OnlyPlainE2(s, 0, mask);
  }
  size_t i = 0;
  for (; i + 16 <= n; i += 16) {
    const int mask = EscapeMask(
        _mm_loadu_si128(reinterpret_cast<const __m128i*>(s.data() + i)));
    if (mask != 0 && !OnlyPlainE2(s, i, mask)) return false;
  }
  if (i == n) return true;
  // The last block overlaps bytes already tested: they pass again.
  const int mask = EscapeMask(
      _mm_loadu_si128(reinterpret_cast<const __m128i*>(s.data() + n - 16)));
  return mask == 0 || OnlyPlainE2(s, n - 16, mask);
#else
  return false;
#endif
}

}  // namespace

char* WriteJsonString(absl::string_view s, char* out) {
  *out++ = '"';
  if (AllPlain(s)) {
    if (s.size() <= 16) {
      CopyShortText(s.data(), s.size(), out);
    } else {
      std::memcpy(out, s.data(), s.size());
    }
    out += s.size();
    *out++ = '"';
    return out;
  }
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
  // Writes the escape of the character at s[i], whose first byte
  // NeedsEscape, if it has one; returns the index of its last byte.
  auto escape = [&](size_t i) -> size_t {
    const unsigned char c = static_cast<unsigned char>(s[i]);
    if (c == 0xE2) {
      // Only U+2028 and U+2029 are escaped among multi-byte characters.
      if (!(i + 2 < s.size() && static_cast<unsigned char>(s[i + 1]) == 0x80 &&
            (static_cast<unsigned char>(s[i + 2]) == 0xA8 ||
             static_cast<unsigned char>(s[i + 2]) == 0xA9))) {
        return i;
      }
      flush(i);
      put(static_cast<unsigned char>(s[i + 2]) == 0xA8 ? "\\u2028" : "\\u2029");
      run = i + 3;
      return i + 2;
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
    return i;
  };
  size_t i = 0;
  while (i < s.size()) {
    // Skip plain blocks, then look at the bytes of the next block (or of
    // the short rest) one by one.
    i += PlainBlocks(s.data() + i, s.size() - i);
    const size_t block_end = std::min(i + 16, s.size());
    for (; i < block_end; ++i) {
      if (NeedsEscape(static_cast<unsigned char>(s[i]))) i = escape(i);
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

// "00" to "99", for writing two digits at a time.
struct DigitPairs {
  char pairs[200];
  constexpr DigitPairs() : pairs() {
    for (int i = 0; i < 100; ++i) {
      pairs[2 * i] = static_cast<char>('0' + i / 10);
      pairs[2 * i + 1] = static_cast<char>('0' + i % 10);
    }
  }
};
constexpr DigitPairs kDigitPairs;

// Writes the 8 decimal digits of v < 10^8, leading zeros included, at
// `out`: two independent halves of four, each two pairs.
inline void WriteEightDigits(uint32_t v, char* out) {
  const char* const pairs = kDigitPairs.pairs;
  const uint32_t high = v / 10000;
  const uint32_t low = v % 10000;
  std::memcpy(out, &pairs[2 * (high / 100)], 2);
  std::memcpy(out + 2, &pairs[2 * (high % 100)], 2);
  std::memcpy(out + 4, &pairs[2 * (low / 100)], 2);
  std::memcpy(out + 6, &pairs[2 * (low % 100)], 2);
}

// Writes the `count` decimal digits of q < 10^count, leading zeros
// included, at `out`: eight at a time from 64 bits, then pairs from 32.
inline void WriteDigits(uint64_t q, int count, char* out) {
  char* p = out + count;
  while (count >= 8) {
    p -= 8;
    WriteEightDigits(static_cast<uint32_t>(q % 100000000), p);
    q /= 100000000;
    count -= 8;
  }
  uint32_t rest = static_cast<uint32_t>(q);
  for (; count >= 2; count -= 2) {
    p -= 2;
    std::memcpy(p, &kDigitPairs.pairs[2 * (rest % 100)], 2);
    rest /= 100;
  }
  if (count == 1) *--p = static_cast<char>('0' + rest);
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
  // Decimal exponent: 10^d <= a < 10^(d+1), settled exactly below,
  // from just under floor(log10(2^e)) for a's binary exponent e
  // (78913 / 2^18 is just under log10(2)), so at most two steps up.
  const int binary_exponent = biased - 1023;
  int d = std::max(-4, ((binary_exponent * 78913) >> 18) - 1);
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
  // 17 digits, and from them the 15-digit rounding: the 17 cut to 15 and
  // rounded by the two cut off, but for a cut-off "50", where the 17 are
  // themselves rounded and only the exact value tells which way 15 go.
  int exponent = d;
  const uint64_t q17 = round_to(17, &exponent);
  if (q17 == 0) return 0;
  int exponent15 = exponent;
  uint64_t q15;
  const uint64_t cut = q17 % 100;
  if (cut != 50) {
    q15 = q17 / 100 + (cut > 50 ? 1 : 0);
    if (q15 == static_cast<uint64_t>(kPow10[15])) {  // 99..9 rounded up.
      q15 /= 10;
      ++exponent15;
    }
  } else {
    q15 = round_to(15, &exponent15);
    if (q15 == 0) return 0;
  }
  // Does the 15-digit text round-trip? q15 / 10^k is then an exact
  // division of exactly representable numbers (q15 < 2^53, k <= 18).
  const int k15 = 14 - exponent15;
  const bool fifteen =
      k15 >= 0 && static_cast<double>(q15) / kPow10Double[k15] == a;
  const int n = fifteen ? 15 : 17;
  if (fifteen) exponent = exponent15;
  if (exponent < -4 || exponent >= n) return 0;
  // Room for fixed-size copies past the digits (see below).
  char digits[40];
  WriteDigits(fifteen ? q15 : q17, n, digits);
  int used = n;
  while (used > 1 && digits[used - 1] == '0') --used;
  char* p = buf;
  if (v < 0) *p++ = '-';
  // The digits go in with fixed-size copies, which write past the text's
  // end but within buf's kJsonDoubleMax bytes (at most 1 + 16 + 1 + 16 or
  // 1 + 5 + 24), the same bytes as byte-sized ones.
  if (exponent >= 0 && used > exponent) {  // 1 <= |v|, digits past the point.
    // exponent <= 14 (|v| < 10^15): 16 bytes hold the whole part.
    std::memcpy(p, digits, 16);
    p += exponent + 1;
    if (used > exponent + 1) {
      *p++ = '.';
      std::memcpy(p, digits + exponent + 1, 16);
      p += used - exponent - 1;
    }
  } else if (exponent >= 0) {  // Whole, with zeros the digits leave out.
    for (int i = 0; i <= exponent; ++i) *p++ = i < used ? digits[i] : '0';
  } else {
    std::memcpy(p, "0.000", 5);  // exponent >= -4.
    p += 1 - exponent;
    std::memcpy(p, digits, 24);
    p += used;
  }
  return static_cast<int>(p - buf);
}

// Whole numbers below 10^15, which %.15g prints as plain integers.
bool IsSmallWhole(double v) {
  return std::fabs(v) < 1e15 &&
         static_cast<double>(static_cast<int64_t>(v)) == v;
}

// The protobuf printer's text for a short decimal: v is the double nearest
// to n / 10^6 for a whole n, and 10^-4 <= |v| < 10^6 (counts such as 0.16,
// figures such as 22.37). Such a decimal has at most 12 significant
// digits and v lies within half an ulp of it, far inside the rounding
// interval of %.15g's last digit, so %.15g prints exactly that decimal,
// and it reads back as v. Returns the length written to `buf`, or 0 when
// v is not such a decimal (or is whole).
int FormatShortDecimal(double v, char* buf) {
  const double a = std::fabs(v);
  if (!(a >= 1e-4 && a < 1e6)) return 0;
  // A short decimal times 10^6 lies within 2e-4 of a whole number (the
  // product's rounding and v's own, below 10^12): one test rules out
  // most other values. The division decides: of exact operands, it is
  // correctly rounded, so equality means v is the double nearest to
  // n / 10^6.
  const double scaled = a * 1e6;
  const uint64_t n = static_cast<uint64_t>(scaled + 0.5);
  if (std::fabs(scaled - static_cast<double>(n)) > 1e-3 ||
      static_cast<double>(n) / 1e6 != a) {
    return 0;
  }
  const uint64_t whole = n / 1000000;
  const uint32_t fraction = static_cast<uint32_t>(n % 1000000);
  if (fraction == 0) return 0;  // Whole numbers are not this function's.
  char* p = buf;
  if (v < 0) *p++ = '-';
  if (whole < 10) {  // Most counts and figures.
    *p++ = static_cast<char>('0' + whole);
  } else {
    int whole_digits = 2;
    while (whole >= static_cast<uint64_t>(kPow10[whole_digits])) {
      ++whole_digits;
    }
    WriteDigits(whole, whole_digits, p);
    p += whole_digits;
  }
  *p++ = '.';
  // Six places, then %g's cut of the trailing zeros: "22.370000" is
  // "22.37".
  const char* const pairs = kDigitPairs.pairs;
  std::memcpy(p, &pairs[2 * (fraction / 10000)], 2);
  std::memcpy(p + 2, &pairs[2 * (fraction / 100 % 100)], 2);
  std::memcpy(p + 4, &pairs[2 * (fraction % 100)], 2);
  p += 6;
  // The fraction is not 0, so a pair of it is not "00": whole pairs of
  // zeros, then at most one zero more, are cut by arithmetic on the
  // fraction (reading the digits back would wait for their stores).
  uint32_t kept = fraction;  // The fraction's digits that stay.
  if (kept % 10000 == 0) {
    kept /= 10000;
    p -= 4;
  } else if (kept % 100 == 0) {
    kept /= 100;
    p -= 2;
  }
  p -= kept % 10 == 0;
  return static_cast<int>(p - buf);
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

}  // namespace

char* WriteJsonDouble(double v, char* out) {
  // Whole numbers (counts, states, zero moments) and short decimals
  // (counts such as 0.16) are most of a report's doubles.
  if (IsSmallWhole(v) && !(v == 0 && std::signbit(v))) {
    return std::to_chars(out, out + kJsonDoubleMax, static_cast<int64_t>(v))
        .ptr;
  }
  if (const int n = FormatShortDecimal(v, out); n > 0) return out + n;
  return out + FormatDouble(v, out);
}

}  // namespace shellwright::cli
