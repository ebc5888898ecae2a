#include "plot/xml_check.h"

#include <gtest/gtest.h>

using porofit::plot::testing::XmlChecker;

TEST(XmlChecker, AcceptsNestedElementsAttributesAndEntities) {
  EXPECT_EQ(XmlChecker::Check("<?xml version=\"1.0\"?>\n<a x=\"1\" y='2'><b/>t &amp; &#38; <c>z</c></a>"), "");
}

TEST(XmlChecker, RejectsMismatchedEndTag) {
  EXPECT_NE(XmlChecker::Check("<a><b></a></b>"), "");
}

TEST(XmlChecker, RejectsBareAmpersandAndLessThan) {
  EXPECT_NE(XmlChecker::Check("<a>x & y</a>"), "");
  EXPECT_NE(XmlChecker::Check("<a>x < y</a>"), "");
  EXPECT_NE(XmlChecker::Check("<a t=\"<\"/>"), "");
}

TEST(XmlChecker, RejectsDuplicateOrUnquotedAttributes) {
  EXPECT_NE(XmlChecker::Check("<a x=\"1\" x=\"2\"/>"), "");
  EXPECT_NE(XmlChecker::Check("<a x=1/>"), "");
}

TEST(XmlChecker, RejectsUnclosedElementAndSecondRoot) {
  EXPECT_NE(XmlChecker::Check("<a><b></b>"), "");
  EXPECT_NE(XmlChecker::Check("<a/><b/>"), "");
}
