// Tests of the grade catalogue reader: RFC 4180 fields (RFC 4180 §2 is the
// source of the quoting rules checked here), the columns, the settings, and
// every refusal with its file, line and column.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <string>

#include "thermargin/input/catalogue.hpp"
#include "thermargin/core/error.hpp"

namespace thermargin {
namespace {

std::string refusal(const std::string& text, const std::string& name = "cat.csv") {
  try {
    (void)parse_catalogue(text, name);
  } catch (const input_error& e) {
    return e.what();
  }
  return "(accepted)";
}

TEST(CsvRecords, QuotedFieldsHoldCommasQuotesAndLineBreaks) {
  // RFC 4180 §2 rules 5-7: a field in double quotes may hold commas, line
  // breaks and doubled double quotes, which stand for one.
  const auto r = parse_csv_records("a,\"b,c\",\"say \"\"hi\"\"\"\n\"two\nlines\",x,\n", "f.csv");
  ASSERT_EQ(r.size(), 2u);
  ASSERT_EQ(r[0].size(), 3u);
  EXPECT_EQ(r[0][1].text, "b,c");
  EXPECT_EQ(r[0][2].text, "say \"hi\"");
  EXPECT_TRUE(r[0][2].quoted);
  ASSERT_EQ(r[1].size(), 3u);
  EXPECT_EQ(r[1][0].text, "two\nlines");
  EXPECT_EQ(r[1][0].line, 2);
  EXPECT_EQ(r[1][1].line, 3);  // the field after the quoted line break is on line 3
  EXPECT_EQ(r[1][2].text, "");
}

TEST(CsvRecords, CrlfBlankLinesAndCommentsAreNotRecords) {
  const auto r = parse_csv_records("# invented prices\r\na,b\r\n\r\nc,d\r\n# end\r\n", "f.csv");
  ASSERT_EQ(r.size(), 2u);
  EXPECT_EQ(r[0][1].text, "b");
  EXPECT_EQ(r[0][0].line, 2);
  EXPECT_EQ(r[1][0].text, "c");
  EXPECT_EQ(r[1][0].line, 4);
}

TEST(CsvRecords, MalformedQuotingIsRefusedWithItsLine) {
  EXPECT_EQ(refusal("slot,grade\nx,\"open\n"),
            "cat.csv:2:2: a quoted field is never closed; add the closing double quote");
  EXPECT_EQ(refusal("slot,grade\nx,ab\"c\n"),
            "cat.csv:2:2: a double quote inside an unquoted field; quote the whole field and write each quote "
            "inside it twice (\"\"), as RFC 4180 does");
  EXPECT_EQ(refusal("slot,grade\nx,\"ab\"c\n"),
            "cat.csv:2:2: text after a closing double quote; quote the whole field and write each quote inside "
            "it twice (\"\")");
}

const char* const good =
    "# Invented prices for a test.\n"
    "grade,slot,settings,unit_cost,notes,setup_cost\n"
    "std,thermistor,sensor.r25_tol=1%;sensor.beta_tol=1%,0.10,as fitted,\n"
    "tight,thermistor,\"sensor.r25_tol=0.5%; sensor.beta_tol=0.5% ;\",0.25,\"sorted, 0.5 %\",120\n"
    "1%,resistor,divider.r_fixed_tol=1%,0.002,,\n"
    "0.1%,resistor,divider.r_fixed_tol=0.1%,0.03,,\n"
    "0.1%-25ppm,resistor,divider.r_fixed_tol=0.1%;divider.r_fixed_tempco=25ppm,0.05,,\n"
    "none,calibration,,0,,\n";

TEST(Catalogue, ColumnsInAnyOrderSlotsInFileOrder) {
  const Catalogue c = parse_catalogue(good, "dir/cat.csv");
  EXPECT_EQ(c.columns.grade, 1);
  EXPECT_EQ(c.columns.slot, 2);
  EXPECT_EQ(c.columns.settings, 3);
  EXPECT_EQ(c.columns.setup_cost, 6);
  ASSERT_EQ(c.slots.size(), 3u);
  EXPECT_EQ(c.slots[0].name, "thermistor");
  EXPECT_EQ(c.slots[1].name, "resistor");
  EXPECT_EQ(c.slots[2].name, "calibration");
  EXPECT_EQ(c.combinations(), 2u * 3u * 1u);
  EXPECT_TRUE(c.has_setup_costs());
  const GradeOption& tight = c.slots[0].options[1];
  EXPECT_EQ(tight.grade, "tight");
  EXPECT_DOUBLE_EQ(tight.unit_cost, 0.25);
  EXPECT_DOUBLE_EQ(tight.setup_cost, 120.0);
  EXPECT_EQ(tight.notes, "sorted, 0.5 %");
  EXPECT_EQ(tight.line, 4);
  ASSERT_EQ(tight.settings.size(), 2u);  // spaces trimmed, the trailing ';' ignored
  EXPECT_EQ(tight.settings[1].key, "sensor.beta_tol");
  EXPECT_EQ(tight.settings[1].value, "0.5%");
  EXPECT_EQ(tight.settings[1].where.line, 4);
  EXPECT_EQ(tight.settings[1].where.file, "dir/cat.csv");
  EXPECT_EQ(tight.settings[1].where.kind, Origin::catalogue);
  EXPECT_TRUE(c.slots[2].options[0].settings.empty());  // keeps the scenario's parts
  EXPECT_EQ(c.column_name(3), "settings");
  EXPECT_EQ(tight.settings[1].where.column, 3);
  EXPECT_EQ(tight.settings[1].where.origin(), "dir/cat.csv:4:3");
}

TEST(Catalogue, ReadsAFileWithAByteOrderMarkAndResolvesFilesBesideIt) {
  namespace fs = std::filesystem;
  const fs::path dir = fs::temp_directory_path() / "thermargin_catalogue_test";
  fs::create_directories(dir);
  const fs::path file = dir / "parts.csv";
  {
    std::ofstream out(file, std::ios::binary);
    out << "\xEF\xBB\xBFslot,grade,unit_cost,settings\r\n"
           "thermistor,from-table,0.3,sensor.model=table;sensor.table_file=ntc.csv\r\n";
  }
  const Catalogue c = read_catalogue(file.string());
  ASSERT_EQ(c.slots.size(), 1u);
  EXPECT_EQ(c.slots[0].name, "thermistor");  // the mark is not part of the first column's name
  EXPECT_EQ(c.slots[0].options[0].settings[1].value, (dir / "ntc.csv").string());
  fs::remove_all(dir);
}

TEST(Catalogue, EveryRefusalNamesFileLineAndColumn) {
  const std::string head = "slot,grade,unit_cost,settings\n";
  EXPECT_EQ(refusal("slot,grade,price,settings\nx,y,1,\n"),
            "header = price (cat.csv:1:3): unknown column; the columns are slot, grade, unit_cost, settings (required) "
            "and notes, setup_cost (optional)");
  EXPECT_EQ(refusal("slot,grade,unit_cost\nx,y,1\n"),
            "header = slot,grade,unit_cost (cat.csv:1): the required column 'settings' is missing; the columns are "
            "slot, grade, unit_cost, settings (required) and notes, setup_cost (optional)");
  EXPECT_EQ(refusal("slot,grade,unit_cost,settings,Slot\n"),
            "header = slot (cat.csv:1:5): the column is already column 1; each column appears once");
  EXPECT_EQ(refusal(head + "thermistor,std,-0.10,sensor.r25_tol=1%\n"),
            "unit_cost = -0.10 (cat.csv:2:3): a cost cannot be negative; expected a cost as a plain decimal "
            "number >= 0 in the catalogue's currency, without a currency sign or thousands separator, e.g. 0.35");
  EXPECT_EQ(refusal(head + "thermistor,std,0.1,sensor.r25_tol=1%\nthermistor,std,0.2,sensor.r25_tol=0.5%\n"),
            "grade = std (cat.csv:3:2): slot 'thermistor' already has this grade (line 2); each grade of a "
            "slot is named once");
  EXPECT_EQ(refusal(head + "thermistor,std,0.1,sensor.r25_toll=1%\n"),
            "settings = sensor.r25_toll=1% (cat.csv:2:4): 'sensor.r25_toll' names no scenario key; "
            "`thermargin check --help` lists them (section.key, e.g. sensor.r25_tol)");
  EXPECT_EQ(refusal(head + "thermistor,std,0.1,sensor.r25_tol 1%\n"),
            "settings = sensor.r25_tol 1% (cat.csv:2:4): a setting is key=value, e.g. sensor.r25_tol=1%; "
            "settings are separated by ';'");
  EXPECT_EQ(refusal(head + "thermistor,std,0.1,sensor.r25_tol=1%;sensor.r25_tol=2%\n"),
            "settings = sensor.r25_tol=2% (cat.csv:2:4): 'sensor.r25_tol' is set twice in this option");
  EXPECT_EQ(refusal(head + "thermistor,std,0.1,sensor.r25_tol=1%\nsorted,a,0.1,sensor.r25_tol=0.5%\n"),
            "settings = sensor.r25_tol=0.5% (cat.csv:3:4): 'sensor.r25_tol' is already graded by slot "
            "'thermistor' (line 2); a key belongs to one slot, or two slots would decide it together");
  EXPECT_EQ(refusal(head + "thermistor,std,0.1\n"),
            "cat.csv:2:4: the row has 3 fields and the header 4; every row has one field per column (an empty "
            "field is written as nothing between two commas)");
  EXPECT_EQ(refusal(head + ",std,0.1,\n"), "slot = (empty) (cat.csv:2:1): every row names its slot");
  EXPECT_EQ(refusal(head + "thermistor, ,0.1,\n"), "grade = (empty) (cat.csv:2:2): every row names its grade");
  EXPECT_EQ(refusal(head), "cat.csv: the catalogue has a header but no options; add one row per grade");
  // A spreadsheet in a locale with decimal commas writes "0,10" in quotes:
  // the reader asks for a decimal point rather than guessing.
  EXPECT_NE(refusal(head + "thermistor,std,\"0,10\",\n").find("unit_cost = 0,10 (cat.csv:2:3)"), std::string::npos);
  EXPECT_NE(refusal(head + "thermistor,std,$0.10,\n").find("without a currency sign"), std::string::npos);
}

TEST(Catalogue, TooManyCombinationsAreRefusedBeforeAnyWork) {
  // Five slots of ten grades: 10^5 combinations is the limit, a sixth slot of
  // two passes it.
  std::string text = "slot,grade,unit_cost,settings\n";
  const char* keys[] = {"adc.offset", "adc.inl", "adc.gain_error", "adc.noise", "sensor.r25_tol", "sensor.beta_tol"};
  for (int s = 0; s < 5; ++s)
    for (int g = 0; g < 10; ++g)
      text += "s" + std::to_string(s) + ",g" + std::to_string(g) + ",0," + keys[s] + "=" + std::to_string(g) + "\n";
  EXPECT_EQ(parse_catalogue(text, "big.csv").combinations(), max_grade_combinations);
  text += "s5,a,0,sensor.beta_tol=1%\ns5,b,0,sensor.beta_tol=2%\n";
  EXPECT_EQ(refusal(text, "big.csv"),
            "big.csv: the slots give 200000 combinations; at most 100000 are evaluated: split the catalogue or drop "
            "grades that cannot win");
}

}  // namespace
}  // namespace thermargin
