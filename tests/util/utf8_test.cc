// Tests for util/utf8.h: validation against an independent decoder,
// repair, cuts at character boundaries, and quoting for messages.

#include "util/utf8.h"

#include <random>
#include <string>

#include "absl/strings/escaping.h"
#include "gtest/gtest.h"
#include "tests/testing/utf8_check.h"

namespace shellwright {
namespace {

TEST(Utf8, TheTestCheckerKnowsWellFormedText) {
  EXPECT_TRUE(testing::IsWellFormedUtf8("Fe³⁺ · ²P°₁/₂"));
  EXPECT_TRUE(testing::IsWellFormedUtf8(""));
  EXPECT_FALSE(testing::IsWellFormedUtf8("\xff\xfe"));
  EXPECT_FALSE(testing::IsWellFormedUtf8("\xc2"));          // Truncated.
  EXPECT_FALSE(testing::IsWellFormedUtf8("\xc0\xaf"));      // Overlong '/'.
  EXPECT_FALSE(testing::IsWellFormedUtf8("\xed\xa0\x80"));  // Surrogate.
}

TEST(Utf8, ValidityAgreesWithAnIndependentDecoder) {
  for (const char* text :
       {"", "Fe2O3", "Fe³⁺", "CuSO4·5H2O", "\xf0\x9f\x98\x80", "\xff", "\xc2",
        "\xc0\xaf", "\xe0\x80\xaf", "\xed\xa0\x80", "\xf4\x90\x80\x80",
        "\xf0\x8f\xbf\xbf", "a\x80"}) {
    EXPECT_EQ(IsValidUtf8(text), testing::IsWellFormedUtf8(text)) << text;
  }
  // Random short byte strings biased towards the lead and continuation
  // bytes where the rules have their edges.
  std::mt19937 rng(2026);
  const unsigned char kBytes[] = {'a',  0x7f, 0x80, 0x8f, 0x90, 0x9f, 0xa0,
                                  0xbf, 0xc0, 0xc1, 0xc2, 0xdf, 0xe0, 0xed,
                                  0xef, 0xf0, 0xf4, 0xf5, 0xff};
  for (int i = 0; i < 200000; ++i) {
    std::string text(rng() % 6, '\0');
    for (char& c : text) c = static_cast<char>(kBytes[rng() % sizeof(kBytes)]);
    ASSERT_EQ(IsValidUtf8(text), testing::IsWellFormedUtf8(text))
        << absl::CEscape(text);
  }
}

TEST(Utf8, SequenceLengthOfEachForm) {
  EXPECT_EQ(Utf8SequenceLength("a", 0), 0u);  // ASCII is not a sequence.
  EXPECT_EQ(Utf8SequenceLength("\xc2\xb7", 0), 2u);
  EXPECT_EQ(Utf8SequenceLength("\xe2\x82\x82", 0), 3u);
  EXPECT_EQ(Utf8SequenceLength("\xf0\x9f\x98\x80", 0), 4u);
  EXPECT_EQ(Utf8SequenceLength("\xe2\x82", 0), 0u);  // Truncated.
  EXPECT_EQ(Utf8SequenceLength("x\xc2\xb7", 1), 2u);
}

TEST(Utf8, PrefixStopsAtCharacterBoundaries) {
  EXPECT_EQ(Utf8Prefix("Fe3O4", 10), "Fe3O4");
  EXPECT_EQ(Utf8Prefix("Fe3O4", 3), "Fe3");
  // "CuSO4·5H2O": the middle dot is the two bytes c2 b7 at offsets 5, 6.
  EXPECT_EQ(Utf8Prefix("CuSO4\xc2\xb7"
                       "5H2O",
                       6),
            "CuSO4");
  EXPECT_EQ(Utf8Prefix("CuSO4\xc2\xb7"
                       "5H2O",
                       7),
            "CuSO4\xc2\xb7");
  // A three-byte character (U+2028) cut after one or two bytes.
  EXPECT_EQ(Utf8Prefix("a\xe2\x80\xa8", 2), "a");
  EXPECT_EQ(Utf8Prefix("a\xe2\x80\xa8", 3), "a");
  EXPECT_EQ(Utf8Prefix("", 0), "");
  // Every cut of valid text is valid.
  const std::string text = "Fe³⁺·₂O😀 ok";
  for (size_t n = 0; n <= text.size(); ++n) {
    EXPECT_TRUE(testing::IsWellFormedUtf8(Utf8Prefix(text, n))) << n;
  }
}

TEST(Utf8, ReplaceInvalidUtf8KeepsGoodTextAndReplacesEachBadByte) {
  std::string ascii = "Fe2O3";
  ReplaceInvalidUtf8(&ascii);
  EXPECT_EQ(ascii, "Fe2O3");
  std::string good = "Fe³⁺";
  ReplaceInvalidUtf8(&good);
  EXPECT_EQ(good, "Fe³⁺");
  std::string bad = "Fe\xb7O\xff\xfe";
  ReplaceInvalidUtf8(&bad);
  EXPECT_EQ(bad, "Fe\uFFFDO\uFFFD\uFFFD");
  std::string truncated = "ab\xe2\x82";
  ReplaceInvalidUtf8(&truncated);
  EXPECT_EQ(truncated, "ab\uFFFD\uFFFD");
  EXPECT_TRUE(testing::IsWellFormedUtf8(truncated));
}

TEST(Utf8, QuoteForMessageEscapesAndCuts) {
  EXPECT_EQ(QuoteForMessage("Fe"), "'Fe'");
  EXPECT_EQ(QuoteForMessage("Fe\x01"), "'Fe\\x01'");
  EXPECT_EQ(QuoteForMessage("it's"), "'it\\'s'");
  EXPECT_EQ(QuoteForMessage("Fe₂"), "'Fe₂'");
  EXPECT_EQ(QuoteForMessage("\xff"), "'\\xff'");
  EXPECT_EQ(QuoteForMessage("abcdef", 3), "'abc...'");
  EXPECT_EQ(QuoteForMessage("₁₂₃₄", 2), "'₁₂...'");  // Characters, not bytes.
}

}  // namespace
}  // namespace shellwright
