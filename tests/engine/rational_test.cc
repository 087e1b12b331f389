// Tests for engine/rational.h: exact fractions in lowest terms.

#include "engine/rational.h"

#include <numeric>
#include <random>

#include "gtest/gtest.h"

namespace shellwright {
namespace {

TEST(Rational, KeepsLowestTermsWithThePositiveDenominator) {
  const Rational a(6, 4);
  EXPECT_EQ(a.num(), 3);
  EXPECT_EQ(a.den(), 2);
  const Rational b(3, -6);
  EXPECT_EQ(b.num(), -1);
  EXPECT_EQ(b.den(), 2);
  const Rational zero(0, 7);
  EXPECT_EQ(zero.num(), 0);
  EXPECT_EQ(zero.den(), 1);
  EXPECT_TRUE(zero.IsZero());
  EXPECT_TRUE(Rational(8, 4).IsInteger());
  EXPECT_FALSE(Rational(7, 10).IsInteger());
  EXPECT_EQ(Rational(), Rational(0));
}

TEST(Rational, WritesFractionsAndIntegers) {
  EXPECT_EQ(Rational(7, 10).ToString(), "7/10");
  EXPECT_EQ(Rational(10, 5).ToString(), "2");
  EXPECT_EQ(Rational(-3, 4).ToString(), "-3/4");
  EXPECT_EQ(Rational(0).ToString(), "0");
  EXPECT_DOUBLE_EQ(Rational(7, 10).ToDouble(), 0.7);
}

TEST(Rational, ArithmeticIsExact) {
  // 0.7 + 0.3 is exactly 1, where doubles give 0.99999999999999989.
  EXPECT_EQ(Rational(7, 10) + Rational(3, 10), Rational(1));
  EXPECT_EQ(Rational(1, 6) + Rational(1, 10), Rational(4, 15));
  EXPECT_EQ(Rational(1, 2) - Rational(3, 4), Rational(-1, 4));
  EXPECT_EQ(Rational(7, 10) * Rational(2), Rational(7, 5));
  EXPECT_EQ(Rational(-2, 3) * Rational(9, 4), Rational(-3, 2));
  EXPECT_EQ(Rational(0) * Rational(5, 7), Rational(0));
}

TEST(Rational, FastPathsKeepLowestTerms) {
  // Equal denominators, integers and a factor 1 skip the general gcd.
  EXPECT_EQ(Rational(1, 4) + Rational(1, 4), Rational(1, 2));
  EXPECT_EQ((Rational(1, 4) + Rational(1, 4)).den(), 2);
  EXPECT_EQ(Rational(1, 6) + Rational(5, 6), Rational(1));
  EXPECT_EQ((Rational(-1, 4) + Rational(1, 4)).den(), 1);
  EXPECT_EQ(Rational(3) + Rational(-5), Rational(-2));
  EXPECT_EQ(Rational(-3) * Rational(4), Rational(-12));
  EXPECT_EQ(Rational(7, 10) * Rational(1), Rational(7, 10));
  EXPECT_EQ(Rational(1) * Rational(-2, 6), Rational(-1, 3));
  // Small denominators take the fast paths often: the results must be
  // the values, in lowest terms, that integer arithmetic gives.
  std::mt19937 rng(7);
  std::uniform_int_distribution<int64_t> num(-12, 12), den(1, 4);
  for (int i = 0; i < 2000; ++i) {
    const int64_t a = num(rng), b = den(rng), c = num(rng), d = den(rng);
    for (const Rational& r :
         {Rational(a, b) + Rational(c, d), Rational(a, b) * Rational(c, d)}) {
      EXPECT_GT(r.den(), 0);
      // Lowest terms (zero as 0/1, since gcd(0, d) is d).
      EXPECT_EQ(std::gcd(r.num() < 0 ? -r.num() : r.num(), r.den()), 1)
          << r.ToString();
    }
    const Rational sum = Rational(a, b) + Rational(c, d);
    EXPECT_EQ(sum.num() * (b * d), (a * d + c * b) * sum.den());
    const Rational product = Rational(a, b) * Rational(c, d);
    EXPECT_EQ(product.num() * (b * d), (a * c) * product.den());
  }
}

TEST(Rational, OrdersByValue) {
  EXPECT_LT(Rational(1, 3), Rational(1, 2));
  EXPECT_LT(Rational(-1, 2), Rational(-1, 3));
  EXPECT_FALSE(Rational(2, 4) < Rational(1, 2));
  EXPECT_NE(Rational(1, 3), Rational(1, 2));
  // Cross products beyond 64 bits still compare correctly.
  const int64_t big = int64_t{1} << 40;
  EXPECT_LT(Rational(big - 1, big), Rational(big, big + 1));
}

TEST(Rational, AgreesWithIntegerArithmeticOnRandomFractions) {
  // a/b + c/d == (ad + cb)/bd and a/b * c/d == ac/bd, checked through the
  // cross-multiplied equality p/q == r/s <=> ps == rq.
  std::mt19937 rng(42);
  std::uniform_int_distribution<int64_t> num(-1000, 1000), den(1, 1000);
  for (int i = 0; i < 10000; ++i) {
    const int64_t a = num(rng), b = den(rng), c = num(rng), d = den(rng);
    const Rational sum = Rational(a, b) + Rational(c, d);
    EXPECT_EQ(sum.num() * (b * d), (a * d + c * b) * sum.den());
    const Rational product = Rational(a, b) * Rational(c, d);
    EXPECT_EQ(product.num() * (b * d), (a * c) * product.den());
    EXPECT_GT(sum.den(), 0);
    EXPECT_GT(product.den(), 0);
    EXPECT_EQ(Rational(a, b) < Rational(c, d), a * d < c * b);
    // Sums, differences and products come out in lowest terms (zero as
    // 0/1) without a final reduction: the equality operator compares
    // terms, so a result left unreduced would not equal its value.
    const Rational difference = Rational(a, b) - Rational(c, d);
    EXPECT_EQ(difference.num() * (b * d), (a * d - c * b) * difference.den());
    for (const Rational& r : {sum, difference, product}) {
      EXPECT_EQ(std::gcd(r.num() < 0 ? -r.num() : r.num(), r.den()), 1)
          << r.ToString();
      EXPECT_EQ(r, Rational(r.num(), r.den()));
    }
  }
}

TEST(Rational, DecimalIsTheReducedFraction) {
  // Every numerator of up to six decimals against the general constructor
  // (a gcd): 0.5 is 1/2, 0.25 is 1/4, 1.20 is 6/5, 0.000 is 0.
  std::mt19937 rng(7);
  std::uniform_int_distribution<int64_t> num(-2000000, 2000000);
  int64_t power = 1;
  for (int decimals = 0; decimals <= 6; ++decimals, power *= 10) {
    for (int i = 0; i < 2000; ++i) {
      const int64_t n = i < 100 ? i * power / 100 : num(rng);
      const Rational d = Rational::Decimal(n, decimals);
      EXPECT_EQ(d, Rational(n, power)) << n << " / 10^" << decimals;
      EXPECT_GT(d.den(), 0);
    }
  }
  EXPECT_EQ(Rational::Decimal(50, 2), Rational(1, 2));
  EXPECT_EQ(Rational::Decimal(120, 2), Rational(6, 5));
  EXPECT_EQ(Rational::Decimal(67, 2).den(), 100);
  EXPECT_EQ(Rational::Decimal(0, 3).den(), 1);
}

}  // namespace
}  // namespace shellwright
