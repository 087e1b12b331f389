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
    const int64_t g = std::gcd(a.den_, b.den_);
    return Rational(a.num_ * (b.den_ / g) + b.num_ * (a.den_ / g),
                    a.den_ / g * b.den_);
  }
  friend Rational operator-(const Rational& a, const Rational& b) {
    return a + Rational(-b.num_, b.den_);
  }
  friend Rational operator*(const Rational& a, const Rational& b) {
    // Fast paths: integers, and a factor 1 (most multipliers).
    if (a.den_ == 1 && b.den_ == 1) return Integer(a.num_ * b.num_);
    if (b.num_ == 1 && b.den_ == 1) return a;
    if (a.num_ == 1 && a.den_ == 1) return b;
    const int64_t g1 = std::gcd(a.num_, b.den_);
    const int64_t g2 = std::gcd(b.num_, a.den_);
    return Rational((a.num_ / (g1 ? g1 : 1)) * (b.num_ / (g2 ? g2 : 1)),
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
