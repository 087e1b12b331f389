// Exact rational numbers for fractional stoichiometry and charges.
//
// Formula counts such as 0.7 or 1.25 are kept exact (7/10, 5/4) so that
// charge balance never suffers from floating-point rounding. Values may be
// negative (charge sums); the sign is kept in the numerator and the
// denominator is always positive, with the fraction in lowest terms.
//
// Example:
//
//   shellwright::Rational a(7, 10), b(3, 10);
//   (a + b) == shellwright::Rational(1);   // true
//   (a * shellwright::Rational(2)).ToString();  // "7/5"
//
// Thread safety: value type.

#ifndef SHELLWRIGHT_ENGINE_RATIONAL_H_
#define SHELLWRIGHT_ENGINE_RATIONAL_H_

#include <cstdint>
#include <numeric>
#include <string>

namespace shellwright {

class Rational {
 public:
  constexpr Rational() = default;
  // REQUIRES: den != 0.
  Rational(int64_t num, int64_t den = 1) : num_(num), den_(den) { Reduce(); }

  // num / 10^decimals, in lowest terms. A power of ten has no prime
  // factors but 2 and 5, so those are all there is to take out: no gcd
  // (decimal counts such as 0.67 or 0.25).
  // REQUIRES: 0 <= decimals <= 18.
  static Rational Decimal(int64_t num, int decimals) {
    if (num == 0) return Rational();
    int twos = 0, fives = 0;
    while (twos < decimals && num % 2 == 0) {
      num /= 2;
      ++twos;
    }
    while (fives < decimals && num % 5 == 0) {
      num /= 5;
      ++fives;
    }
    int64_t den = 1;
    for (int i = twos; i < decimals; ++i) den *= 2;
    for (int i = fives; i < decimals; ++i) den *= 5;
    return Lowest(num, den);
  }

  int64_t num() const { return num_; }
  int64_t den() const { return den_; }
  double ToDouble() const { return static_cast<double>(num_) / den_; }
  bool IsInteger() const { return den_ == 1; }
  bool IsZero() const { return num_ == 0; }

  // "7/10", or "3" for integers.
  std::string ToString() const {
    return den_ == 1 ? std::to_string(num_)
                     : std::to_string(num_) + "/" + std::to_string(den_);
  }

  // The callers keep magnitudes far below overflow: counts are bounded by
  // the formula parser (see formula.h).
  friend Rational operator+(const Rational& a, const Rational& b) {
    // Fast paths for the common cases, which need no gcd of denominators.
    if (a.den_ == b.den_) {
      return a.den_ == 1 ? Integer(a.num_ + b.num_)
                         : Rational(a.num_ + b.num_, a.den_);
    }
    // Both in lowest terms, with g = gcd(a.den, b.den): the sum's
    // numerator t over a.den / g * b.den shares no factor with the
    // denominator but what it shares with g (Knuth, The Art of Computer
    // Programming, vol. 2, 4.5.1, from memory), so the second gcd is
    // taken with g, and skipped when g is 1.
    const int64_t g = std::gcd(a.den_, b.den_);
    const int64_t t = a.num_ * (b.den_ / g) + b.num_ * (a.den_ / g);
    if (g == 1) return Lowest(t, a.den_ * b.den_);
    const int64_t g2 = std::gcd(t < 0 ? -t : t, g);
    return Lowest(t / g2, a.den_ / g * (b.den_ / g2));
  }
  friend Rational operator-(const Rational& a, const Rational& b) {
    return a + Lowest(-b.num_, b.den_);
  }
  friend Rational operator*(const Rational& a, const Rational& b) {
    // Fast paths: integers, and a factor 1 (most multipliers).
    if (a.den_ == 1 && b.den_ == 1) return Integer(a.num_ * b.num_);
    if (b.num_ == 1 && b.den_ == 1) return a;
    if (a.num_ == 1 && a.den_ == 1) return b;
    // Both in lowest terms: with the cross factors taken out, so is the
    // product.
    const int64_t g1 = std::gcd(a.num_, b.den_);
    const int64_t g2 = std::gcd(b.num_, a.den_);
    return Lowest((a.num_ / (g1 ? g1 : 1)) * (b.num_ / (g2 ? g2 : 1)),
                  (a.den_ / (g2 ? g2 : 1)) * (b.den_ / (g1 ? g1 : 1)));
  }
  friend bool operator==(const Rational& a, const Rational& b) {
    return a.num_ == b.num_ && a.den_ == b.den_;
  }
  friend bool operator!=(const Rational& a, const Rational& b) {
    return !(a == b);
  }
  friend bool operator<(const Rational& a, const Rational& b) {
    return static_cast<__int128>(a.num_) * b.den_ <
           static_cast<__int128>(b.num_) * a.den_;
  }

 private:
  // An integer, already in lowest terms: no gcd to take.
  static Rational Integer(int64_t n) {
    Rational r;
    r.num_ = n;
    return r;
  }

  // num / den known to be in lowest terms, den > 0 (and 1 when num is 0).
  static Rational Lowest(int64_t num, int64_t den) {
    Rational r;
    r.num_ = num;
    r.den_ = den;
    return r;
  }

  void Reduce() {
    if (den_ == 1) return;  // Integers, most counts: nothing to reduce.
    if (den_ < 0) {
      num_ = -num_;
      den_ = -den_;
    }
    const int64_t g = std::gcd(num_ < 0 ? -num_ : num_, den_);
    if (g > 1) {
      num_ /= g;
      den_ /= g;
    }
  }

  int64_t num_ = 0;
  int64_t den_ = 1;
};

}  // namespace shellwright

#endif  // SHELLWRIGHT_ENGINE_RATIONAL_H_
