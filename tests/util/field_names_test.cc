// Tests for util/field_names.h.

#include "util/field_names.h"

#include "gtest/gtest.h"

namespace shellwright {
namespace {

constexpr FieldName kFlags[] = {
    {"cert_file", "--tls-cert"}, {"key_file", "--tls-key"}, {"spec", "SPEC"}};

TEST(RenameField, RenamesTheLeadingField) {
  EXPECT_EQ(RenameField("cert_file: missing", kFlags), "--tls-cert: missing");
  EXPECT_EQ(RenameField("spec: unknown element 'Xx'", kFlags),
            "SPEC: unknown element 'Xx'");
}

TEST(RenameField, LeavesOtherMessagesAlone) {
  // Not a leading field, a longer name, no colon, an unknown field.
  EXPECT_EQ(RenameField("needs key_file", kFlags), "needs key_file");
  EXPECT_EQ(RenameField("spectrum: x", kFlags), "spectrum: x");
  EXPECT_EQ(RenameField("spec", kFlags), "spec");
  EXPECT_EQ(RenameField("charge: x", kFlags), "charge: x");
  EXPECT_EQ(RenameField("", kFlags), "");
}

}  // namespace
}  // namespace shellwright
