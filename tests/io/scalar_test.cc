#include "scalar.h"

#include <gtest/gtest.h>

namespace porofit::io::detail {
namespace {

TEST(NumberWithUnit, SplitsValueAndUnitWithOrWithoutSpace) {
  auto a = SplitNumberUnit("12.5 GPa");
  ASSERT_TRUE(a);
  EXPECT_DOUBLE_EQ(a->value, 12.5);
  EXPECT_EQ(a->unit, "GPa");
  auto b = SplitNumberUnit("3%");
  ASSERT_TRUE(b);
  EXPECT_DOUBLE_EQ(b->value, 3);
  EXPECT_EQ(b->unit, "%");
  auto c = SplitNumberUnit("0.21");
  ASSERT_TRUE(c);
  EXPECT_EQ(c->unit, "");
  EXPECT_FALSE(SplitNumberUnit("GPa 12"));
}

TEST(UnitExpression, ComposesPressureUnitsWithPowers) {
  // 1 GPa/MPa = 1e3 (dimensionless); 1 1/MPa = 1e-6 /Pa; GPa/MPa^(1/3) = 1e9 / 1e2.
  auto a = ParseUnitExpression("GPa/MPa");
  ASSERT_TRUE(a);
  EXPECT_DOUBLE_EQ(a->si_factor, 1e3);
  EXPECT_DOUBLE_EQ(a->pressure_exponent, 0);
  auto b = ParseUnitExpression("1/MPa");
  ASSERT_TRUE(b);
  EXPECT_DOUBLE_EQ(b->si_factor, 1e-6);
  EXPECT_DOUBLE_EQ(b->pressure_exponent, -1);
  auto c = ParseUnitExpression("GPa/MPa^(1/3)");
  ASSERT_TRUE(c);
  EXPECT_NEAR(c->si_factor, 1e7, 1e-3);
  EXPECT_NEAR(c->pressure_exponent, 2.0 / 3.0, 1e-12);
  auto d = ParseUnitExpression("1/psi");
  ASSERT_TRUE(d);
  EXPECT_NEAR(d->si_factor, 1 / 6894.757, 1e-9);  // check value 7 (docs/check-values.md): 1 psi = 6.894757 kPa
}

TEST(UnitExpression, RejectsUnknownNamesAndDanglingOperators) {
  EXPECT_FALSE(ParseUnitExpression("GPa/"));
  EXPECT_FALSE(ParseUnitExpression("furlong"));
  EXPECT_FALSE(ParseUnitExpression("MPa^"));
  EXPECT_FALSE(ParseUnitExpression(""));
}

}  // namespace
}  // namespace porofit::io::detail
