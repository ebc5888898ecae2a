// The catalogue as data: lookup, order, parameter tables and the checks Add()
// makes on a spec.
#include <gtest/gtest.h>

#include <cmath>
#include <set>
#include <string>
#include <vector>

#include "porofit/models/registry.h"

namespace porofit {
namespace {

TEST(ModelRegistry, BuiltinListsTheSevenModelsInCatalogueOrder) {
  const std::vector<std::string> expected = {"linear",    "exp-modulus",  "exp-compliance",
                                             "linear-exp", "power-ref",   "power-offset",
                                             "grain-contact"};
  EXPECT_EQ(ModelRegistry::Builtin().ids(), expected);
}

TEST(ModelRegistry, FindOfUnknownIdIsNull) {
  EXPECT_EQ(ModelRegistry::Builtin().Find("exp-modulu"), nullptr);
  EXPECT_EQ(ModelRegistry::Builtin().Find(""), nullptr);
  EXPECT_EQ(ModelRegistry::Builtin().Find("EXP-MODULUS"), nullptr) << "ids are case-sensitive";
}

TEST(ModelRegistry, FindReturnsTheModelWithThatId) {
  for (const std::string& id : ModelRegistry::Builtin().ids()) {
    const ModelSpec* m = ModelRegistry::Builtin().Find(id);
    ASSERT_NE(m, nullptr);
    EXPECT_EQ(m->id, id);
  }
}

TEST(ModelRegistry, IdsAreUnique) {
  const auto ids = ModelRegistry::Builtin().ids();
  EXPECT_EQ(std::set<std::string>(ids.begin(), ids.end()).size(), ids.size());
}

TEST(ModelRegistry, EveryBuiltinSpecIsCompleteAndConsistent) {
  for (const ModelSpec& m : ModelRegistry::Builtin().models()) {
    SCOPED_TRACE(m.id);
    EXPECT_FALSE(m.name.empty());
    EXPECT_FALSE(m.formula.empty());
    EXPECT_FALSE(m.reference.empty());
    EXPECT_FALSE(m.notes.empty());
    EXPECT_EQ(m.x_unit, "MPa");
    EXPECT_EQ(m.y_unit, "GPa");
    EXPECT_DOUBLE_EQ(m.x_si_factor, 1e6);
    EXPECT_DOUBLE_EQ(m.y_si_factor, 1e9);
    for (const ParameterSpec& p : m.parameters) {
      EXPECT_LT(p.lower, p.upper) << p.name;
      if (p.transform == ParameterTransform::kLog) {
        EXPECT_GE(p.lower, 0.0) << p.name;
      }
      EXPECT_FALSE(p.meaning.empty()) << p.name;
      EXPECT_EQ(m.ParameterIndex(p.name), &p - m.parameters.data());
    }
    EXPECT_EQ(m.ParameterIndex("no-such-parameter"), -1);
  }
}

// The parameter tables are a contract with study files (names) and reports
// (units, SI factors): pin them.
struct Row {
  const char* name;
  const char* unit;
  double si;
  double lower, upper;
  bool log;
};

void ExpectTable(const char* id, const std::vector<Row>& rows) {
  const ModelSpec* m = ModelRegistry::Builtin().Find(id);
  ASSERT_NE(m, nullptr) << id;
  ASSERT_EQ(m->parameters.size(), rows.size()) << id;
  for (size_t j = 0; j < rows.size(); ++j) {
    const ParameterSpec& p = m->parameters[j];
    SCOPED_TRACE(std::string(id) + " " + rows[j].name);
    EXPECT_EQ(p.name, rows[j].name);
    EXPECT_EQ(p.unit, rows[j].unit);
    EXPECT_DOUBLE_EQ(p.si_factor, rows[j].si);
    EXPECT_EQ(p.lower, rows[j].lower);
    EXPECT_EQ(p.upper, rows[j].upper);
    EXPECT_EQ(p.transform == ParameterTransform::kLog, rows[j].log);
  }
}

TEST(ModelRegistry, ParameterTablesHaveTheDocumentedNamesUnitsAndBounds) {
  const double inf = INFINITY;
  ExpectTable("linear", {{"K_0", "GPa", 1e9, 0, inf, false}, {"b", "GPa/MPa", 1e3, -inf, inf, false}});
  ExpectTable("exp-modulus", {{"K_inf", "GPa", 1e9, 0, inf, false},
                              {"K_0", "GPa", 1e9, 0, inf, false},
                              {"P_close", "MPa", 1e6, 0, inf, true}});
  ExpectTable("exp-compliance", {{"C_inf", "1/GPa", 1e-9, 0, inf, false},
                                 {"C_0", "1/GPa", 1e-9, 0, inf, false},
                                 {"P_close", "MPa", 1e6, 0, inf, true}});
  ExpectTable("linear-exp", {{"A", "GPa", 1e9, 0, inf, false},
                             {"B", "GPa/MPa", 1e3, 0, inf, false},
                             {"C", "GPa", 1e9, 0, inf, false},
                             {"D", "1/MPa", 1e-6, 0, inf, true}});
  ExpectTable("power-ref", {{"K_ref", "GPa", 1e9, 0, inf, false},
                            {"n", "1", 1, 0, 1, false},
                            {"P_ref", "MPa", 1e6, 0, inf, true}});
  ExpectTable("power-offset", {{"K_0", "GPa", 1e9, 0, inf, false},
                               {"n", "1", 1, 0, 1, false},
                               {"P_r", "MPa", 1e6, 0, inf, true}});
  ExpectTable("grain-contact", {{"a", "GPa/MPa^(1/3)", 1e7, 0, inf, false}});
}

TEST(ModelRegistry, OnlyTheReferencePressureIsFixedByDefault) {
  for (const ModelSpec& m : ModelRegistry::Builtin().models())
    for (const ParameterSpec& p : m.parameters)
      EXPECT_EQ(p.fixed_by_default, m.id == "power-ref" && p.name == "P_ref") << m.id << " " << p.name;
}

TEST(ModelRegistry, OnlyPowerRefRequiresPositivePressure) {
  for (const ModelSpec& m : ModelRegistry::Builtin().models())
    EXPECT_EQ(m.requires_positive_x, m.id == "power-ref") << m.id;
}

TEST(ModelRegistry, ClosureScalesPointAtThePressureScaleParameters) {
  const auto& r = ModelRegistry::Builtin();
  EXPECT_EQ(r.Find("exp-modulus")->closure_parameter, 2);
  EXPECT_EQ(r.Find("exp-compliance")->closure_parameter, 2);
  EXPECT_EQ(r.Find("power-offset")->closure_parameter, 2);
  for (const char* id : {"linear", "linear-exp", "power-ref", "grain-contact"})
    EXPECT_EQ(r.Find(id)->closure_parameter, -1) << id;
  // linear-exp's closure scale is 1/D, available through closure_pressure.
  const ModelSpec& m3 = *r.Find("linear-exp");
  const double t3[] = {18, 0.03, 10, 0.25};
  EXPECT_TRUE(m3.has_closure_pressure());
  EXPECT_DOUBLE_EQ(m3.ClosurePressure(t3), 4.0);
  const double t1[] = {20, 8, 12.5};
  EXPECT_DOUBLE_EQ(r.Find("exp-modulus")->ClosurePressure(t1), 12.5);
  EXPECT_FALSE(r.Find("linear")->has_closure_pressure());
  EXPECT_TRUE(std::isnan(r.Find("linear")->ClosurePressure(t1)));
  // Where both are set they agree.
  for (const ModelSpec& m : r.models())
    if (m.closure_parameter >= 0) {
      const double th[] = {1.5, 0.4, 7.0};
      EXPECT_DOUBLE_EQ(m.closure_pressure(th), th[m.closure_parameter]) << m.id;
    }
}

TEST(ModelRegistryDeathTest, AddingADuplicateIdAborts) {
  ModelRegistry r;
  r.Add(*ModelRegistry::Builtin().Find("linear"));
  EXPECT_DEATH(r.Add(*ModelRegistry::Builtin().Find("linear")), "duplicate model id 'linear'");
}

TEST(ModelRegistryDeathTest, AddingAnIncompleteSpecAborts) {
  ModelSpec no_start = *ModelRegistry::Builtin().Find("exp-modulus");
  no_start.start = nullptr;
  ModelRegistry r;
  EXPECT_DEATH(r.Add(no_start), "start heuristic not set");

  ModelSpec no_reference = *ModelRegistry::Builtin().Find("exp-modulus");
  no_reference.reference.clear();
  EXPECT_DEATH(r.Add(no_reference), "reference is empty");

  ModelSpec bad_log = *ModelRegistry::Builtin().Find("exp-modulus");
  bad_log.parameters[2].lower = -1;
  EXPECT_DEATH(r.Add(bad_log), "kLog but lower < 0");

  ModelSpec twice = *ModelRegistry::Builtin().Find("exp-modulus");
  twice.parameters[1].name = "K_inf";
  EXPECT_DEATH(r.Add(twice), "duplicate parameter name K_inf");

  ModelSpec bad_closure = *ModelRegistry::Builtin().Find("exp-modulus");
  bad_closure.closure_parameter = 3;
  EXPECT_DEATH(r.Add(bad_closure), "closure_parameter out of range");
}

TEST(ModelRegistry, AcceptsACompleteUserModel) {
  ModelRegistry r;
  ModelSpec m = *ModelRegistry::Builtin().Find("grain-contact");
  m.id = "grain-contact-copy";
  r.Add(m);
  ASSERT_NE(r.Find("grain-contact-copy"), nullptr);
  EXPECT_EQ(r.ids(), std::vector<std::string>{"grain-contact-copy"});
}

}  // namespace
}  // namespace porofit
