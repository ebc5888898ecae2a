// End-to-end: `porofit minerals` prints the mineral table with each entry's
// source and how it was checked, on separate lines; an unknown mineral in a
// study lists the close matches; `porofit check` and `porofit fit` carry the
// invented-data notice only when the study declares `invented: true`; and
// grain_modulus.csv reports sources and provenance in separate columns.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include "porofit/io/csv.h"

namespace porofit {
namespace {
namespace fs = std::filesystem;

// Invented test data (K roughly an exp-modulus curve); the description says in
// words that nothing is invented, which must not trigger the notice.
const char* kStudyBody =
    "description: measured plugs; nothing here is invented\n"
    "minerals:\n"
    "  dry_clay_aggregate:\n"
    "    bulk: 9 GPa\n"
    "    sigma_bulk: 3 GPa\n"
    "    shear: 4 GPa\n"
    "    sigma_shear: 2 GPa\n"
    "    density: 2.6 g/cc\n"
    "    clay: true\n"
    "    source: \"Vanorio, Prasad & Nur 2003, Geophysical Journal International 155\"\n"
    "    checked: from memory\n"
    "samples:\n"
    "  - id: S1\n"
    "    lithology: shaly sandstone\n"
    "    porosity: 0.2\n"
    "    bulk_density: 2.12 g/cc\n"
    "    measurement: static\n"
    "    data:\n"
    "      columns: [P_c MPa, P_p MPa, K GPa]\n"
    "      rows:\n"
    "        - [5, 0, 8.1]\n"
    "        - [10, 0, 10.2]\n"
    "        - [20, 0, 12.9]\n"
    "        - [40, 0, 15.0]\n"
    "    models: [linear]\n"
    "    grain_modulus:\n"
    "      mineralogy:\n"
    "        basis: weight\n"
    "        fractions: {quartz: 0.7, illite: 0.2, dry_clay_aggregate: 0.1}\n";

const char* kNotice = "NOTE: this study's data are invented";

std::string Slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

class MineralsCli : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = fs::temp_directory_path() / ("porofit-e2e-minerals-" + std::to_string(::getpid()) + "-" +
                                        ::testing::UnitTest::GetInstance()->current_test_info()->name());
    fs::remove_all(dir_);
    fs::create_directories(dir_);
    Write("name: plug program\n");
  }
  void TearDown() override { fs::remove_all(dir_); }
  void Write(const std::string& head, const std::string& body = kStudyBody) {
    std::ofstream(dir_ / "study.yaml") << head << body;
  }
  int Run(const std::string& args) {
    const std::string cmd = "POROFIT_FIXED_TIMESTAMP=2026-02-03T04:05:06Z '" + std::string(POROFIT_EXE) + "' " + args +
                            " >'" + (dir_ / "o.txt").string() + "' 2>'" + (dir_ / "e.txt").string() + "'";
    const int status = std::system(cmd.c_str());
    out_ = Slurp(dir_ / "o.txt");
    err_ = Slurp(dir_ / "e.txt");
    return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  }
  std::string Study() const { return "'" + (dir_ / "study.yaml").string() + "'"; }
  fs::path dir_;
  std::string out_, err_;
};

TEST_F(MineralsCli, MineralsPrintsEveryEntryWithSourceAndCheckedOnSeparateLines) {
  ASSERT_EQ(Run("minerals"), 0) << err_;
  EXPECT_NE(out_.find("\nillite (clay)\n"), std::string::npos) << out_;
  EXPECT_NE(out_.find("\nsiderite\n"), std::string::npos);
  EXPECT_NE(out_.find("  source:  Zhang 2019, Applied Petroleum Geomechanics, Gulf Professional Publishing, Table 2.5\n"
                      "  checked: against source excerpt\n"),
            std::string::npos);
  EXPECT_NE(out_.find("decision support only"), std::string::npos);
  EXPECT_EQ(out_.find("dry_clay_aggregate"), std::string::npos);
  ASSERT_EQ(Run("minerals " + Study()), 0) << err_;
  EXPECT_NE(out_.find("\ndry_clay_aggregate (clay) [from the study file]\n"), std::string::npos) << out_;
  ASSERT_EQ(Run("minerals --help"), 0);
  EXPECT_NE(out_.find("porofit minerals"), std::string::npos);
  ASSERT_EQ(Run("--help"), 0);
  EXPECT_NE(out_.find("minerals [STUDY.yaml]"), std::string::npos);
}

TEST_F(MineralsCli, UnknownMineralListsCloseMatchesAndHowToSeeTheTable) {
  std::string body = kStudyBody;
  body.replace(body.find("illite: 0.2"), 11, "illit: 0.2");
  Write("name: plug program\n", body);
  EXPECT_EQ(Run("check " + Study()), 2);
  EXPECT_NE(err_.find("error: unknown mineral 'illit' (did you mean 'illite'?); known minerals are the built-in "
                      "table plus the study's 'minerals:' section ('porofit minerals STUDY.yaml' lists them)"),
            std::string::npos)
      << err_;
}

TEST_F(MineralsCli, InventedNoticeOnlyWhenDeclared) {
  ASSERT_EQ(Run("check " + Study()), 0) << err_;
  EXPECT_EQ(out_.find(kNotice), std::string::npos) << out_;
  ASSERT_EQ(Run("fit " + Study() + " --out '" + (dir_ / "plain").string() + "'"), 0) << err_;
  EXPECT_EQ(out_.find(kNotice), std::string::npos);
  for (const char* f : {"summary.txt", "grain_modulus.csv", "results.json", "report.html"})
    EXPECT_EQ(Slurp(dir_ / "plain" / f).find("data are invented"), std::string::npos) << f;

  Write("name: plug program\ninvented: true\n");
  ASSERT_EQ(Run("check " + Study()), 0) << err_;
  EXPECT_NE(out_.find(kNotice), std::string::npos) << out_;
  ASSERT_EQ(Run("fit " + Study() + " --out '" + (dir_ / "declared").string() + "' --quiet"), 0) << err_;
  for (const char* f : {"summary.txt", "grain_modulus.csv", "results.json", "report.html"})
    EXPECT_NE(Slurp(dir_ / "declared" / f).find("data are invented"), std::string::npos) << f;
}

TEST_F(MineralsCli, GrainModulusCsvHasSourcesAndCheckedAsSeparateColumns) {
  ASSERT_EQ(Run("fit " + Study() + " --out '" + (dir_ / "out").string() + "' --quiet"), 0) << err_;
  const csv::Table t = csv::ReadCsvFile((dir_ / "out" / "grain_modulus.csv").string());
  const int sources = t.ColumnIndex("sources"), checked = t.ColumnIndex("checked");
  ASSERT_GE(sources, 0);
  ASSERT_GE(checked, 0);
  ASSERT_EQ(t.rows.size(), 1u);
  const std::string& s = t.rows[0].fields[static_cast<size_t>(sources)];
  const std::string& c = t.rows[0].fields[static_cast<size_t>(checked)];
  EXPECT_NE(s.find("illite: Wang, Wang & Cates 2001, Effective elastic properties of solid clays"), std::string::npos)
      << s;
  EXPECT_EQ(s.find("memory"), std::string::npos) << s;
  EXPECT_EQ(c, "quartz: against secondary citation | illite: from memory | dry_clay_aggregate: from memory");
}

}  // namespace
}  // namespace porofit
