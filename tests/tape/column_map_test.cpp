// Tests for column maps: parsing the JSON file (and each way it can be wrong), and matching a
// tape's header cells to fields with and without a map.
#include <gtest/gtest.h>

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <string>

#include "tape/reader.h"
#include "tape/tape.h"

namespace {

using namespace poolbid;
using namespace std::chrono;

// The error parse_column_map throws for `json`; fails the test if it throws none.
TapeError map_error(const std::string& json) {
  try {
    parse_column_map(json, "seller.json");
  } catch (const TapeError& e) {
    return e;
  }
  ADD_FAILURE() << "no error for " << json;
  return TapeError(ErrorKind::bad_option, "", 0, "", "", "");
}

TEST(ColumnMap, ParsesEveryKey) {
  const ColumnMap map = parse_column_map(R"({
    "seller": "Quillmoor Lending",
    "cutoff_date": "2026-12-01",
    "columns": {"loan_id": "LOAN_NO", "current_balance": ["CURR_UPB", "UPB"]},
    "units": {"note_rate": "decimal", "original_ltv": "percent"},
    "values": {"occupancy": {"O": "owner", "I": "investor"}},
    "defaults": {"servicing_fee": 0.25}
  })",
                                         "harbor.json");
  EXPECT_EQ(map.source, "harbor.json");
  EXPECT_EQ(map.seller, "Quillmoor Lending");
  EXPECT_EQ(map.cutoff, Date(year{2026}, month{12}, day{1}));
  EXPECT_EQ(map.columns.at(Field::loan_id), (std::vector<std::string>{"LOAN_NO"}));
  EXPECT_EQ(map.columns.at(Field::current_balance), (std::vector<std::string>{"CURR_UPB", "UPB"}));
  EXPECT_EQ(map.units.at(Field::note_rate), Unit::decimal);
  EXPECT_EQ(map.units.at(Field::original_ltv), Unit::percent);
  EXPECT_EQ(map.values.at(Field::occupancy).at("I"), "investor");
  ASSERT_TRUE(map.default_servicing_fee);
  EXPECT_DOUBLE_EQ(*map.default_servicing_fee, 0.0025);  // given in percent, kept as decimal
}

TEST(ColumnMap, EmptyObjectIsAnEmptyMap) {
  const ColumnMap map = parse_column_map("{}", "m.json");
  EXPECT_TRUE(map.columns.empty());
  EXPECT_FALSE(map.cutoff);
  EXPECT_FALSE(map.seller);
}

TEST(ColumnMap, BadJsonReportsWhere) {
  const TapeError e = map_error("{\n  \"columns\": {\"loan_id\": \"A\",}\n}");
  EXPECT_EQ(e.kind, ErrorKind::bad_map);
  EXPECT_EQ(e.file, "seller.json");
  EXPECT_NE(std::string(e.what()).find("line 2"), std::string::npos) << e.what();
  EXPECT_NE(std::string(e.what()).find("byte"), std::string::npos) << e.what();
}

TEST(ColumnMap, UnknownTopLevelKey) {
  const TapeError e = map_error(R"({"colums": {}})");
  EXPECT_EQ(e.kind, ErrorKind::bad_map);
  EXPECT_EQ(e.column, "colums");
  EXPECT_NE(std::string(e.what()).find("seller.json"), std::string::npos);
}

TEST(ColumnMap, UnknownFieldName) {
  const TapeError e = map_error(R"({"columns": {"loan_number": "LN"}})");
  EXPECT_EQ(e.column, "columns.loan_number");
  EXPECT_NE(std::string(e.what()).find("unknown field"), std::string::npos);
}

TEST(ColumnMap, UnknownUnit) {
  const TapeError e = map_error(R"({"units": {"note_rate": "bps"}})");
  EXPECT_EQ(e.column, "units.note_rate");
  EXPECT_EQ(e.value, "bps");
  EXPECT_STREQ(e.what(),
               "seller.json, key units.note_rate: unknown unit 'bps' (percent or decimal)");
  EXPECT_NE(std::string(map_error(R"({"units": {"dti": 100}})").what())
                .find("units.dti: unknown unit '100' (percent or decimal)"),
            std::string::npos);
}

TEST(ColumnMap, UnitOnAFieldThatIsNotARate) {
  EXPECT_EQ(map_error(R"({"units": {"credit_score": "percent"}})").column, "units.credit_score");
}

TEST(ColumnMap, ValueSpellingThatMapsToNothingWeKnow) {
  const TapeError e = map_error(R"({"values": {"occupancy": {"O": "castle"}}})");
  EXPECT_EQ(e.column, "values.occupancy.O");
  EXPECT_EQ(e.value, "castle");
  EXPECT_NE(std::string(e.what()).find("owner, second_home, investor"), std::string::npos);
}

TEST(ColumnMap, ValuesOnlyForCategoryFields) {
  EXPECT_EQ(map_error(R"({"values": {"state": {"Calif": "CA"}}})").column, "values.state");
}

TEST(ColumnMap, WrongTypes) {
  EXPECT_EQ(map_error(R"({"columns": {"loan_id": 5}})").column, "columns.loan_id");
  EXPECT_EQ(map_error(R"({"columns": {"loan_id": []}})").column, "columns.loan_id");
  EXPECT_EQ(map_error(R"({"columns": {"loan_id": ""}})").column, "columns.loan_id");
  EXPECT_EQ(map_error(R"({"columns": []})").column, "columns");
  EXPECT_EQ(map_error(R"({"seller": 3})").column, "seller");
  EXPECT_EQ(map_error(R"([1, 2])").kind, ErrorKind::bad_map);
}

TEST(ColumnMap, BadCutoffDate) {
  const TapeError e = map_error(R"({"cutoff_date": "2026-13-01"})");
  EXPECT_EQ(e.column, "cutoff_date");
  EXPECT_EQ(e.value, "2026-13-01");
}

TEST(ColumnMap, CutoffDateMustBeTheFirstOfAMonth) {
  const TapeError e = map_error(R"({"cutoff_date": "2026-12-15"})");
  EXPECT_EQ(e.kind, ErrorKind::bad_map);
  EXPECT_EQ(e.value, "2026-12-15");
}

TEST(ColumnMap, BadDefaults) {
  EXPECT_EQ(map_error(R"({"defaults": {"note_rate": 5}})").column, "defaults.note_rate");
  const TapeError negative = map_error(R"({"defaults": {"servicing_fee": -1}})");
  EXPECT_EQ(negative.column, "defaults.servicing_fee");
  EXPECT_NE(std::string(negative.what()).find("from 0 to below 25 (0.25 = 0.25%), got -1"),
            std::string::npos)
      << negative.what();
  const TapeError text = map_error(R"({"defaults": {"servicing_fee": "0.25%"}})");
  EXPECT_EQ(text.column, "defaults.servicing_fee");
  EXPECT_EQ(text.value, "0.25%");
  EXPECT_NE(std::string(text.what())
                .find(R"(defaults.servicing_fee: must be a number, got "0.25%")"),
            std::string::npos)
      << text.what();
}

TEST(ColumnMap, MessagesShowTheValueAtFault) {
  auto what = [](const std::string& json) { return std::string(map_error(json).what()); };
  EXPECT_NE(what(R"({"columns": {"loan_id": 5}})").find("must be a string, got 5"),
            std::string::npos);
  EXPECT_NE(what(R"({"units": []})").find("must be a JSON object, got []"), std::string::npos);
  EXPECT_NE(what(R"({"cutoff_date": "12/2026"})").find("'12/2026' is not a date"),
            std::string::npos);
  EXPECT_NE(what(R"({"colums": {}})").find("unknown key 'colums'"), std::string::npos);
  EXPECT_NE(what(R"({"units": {"credit_score": "percent"}})").find("not credit_score"),
            std::string::npos);
  // A long value is cut in the message.
  const std::string long_value = what(R"({"seller": [")" + std::string(200, 'x') + "\"]}");
  EXPECT_NE(long_value.find("got [\"xxx"), std::string::npos) << long_value;
  EXPECT_LT(long_value.size(), 150u) << long_value;
}

TEST(ColumnMap, OneHeaderNameForTwoFields) {
  const TapeError e = map_error(R"({"columns": {"loan_id": "ID", "seller": "id"}})");
  EXPECT_EQ(e.kind, ErrorKind::bad_map);
  EXPECT_EQ(e.value, "id");
}

TEST(ColumnMap, LoadReadsAFileAndNamesIt) {
  const std::string path =
      (std::filesystem::temp_directory_path() / "poolbid_column_map_test.json").string();
  std::ofstream(path) << R"({"seller": "Quillmoor"})";
  EXPECT_EQ(load_column_map(path).seller, "Quillmoor");
  EXPECT_EQ(load_column_map(path).source, path);
  std::ofstream(path) << R"({"seller": 1})";
  try {
    load_column_map(path);
    ADD_FAILURE() << "expected bad_map";
  } catch (const TapeError& e) {
    EXPECT_EQ(e.file, path);
  }
  std::remove(path.c_str());
}

TEST(ColumnMap, LoadMissingFileOrDirectory) {
  try {
    load_column_map("/nonexistent/map.json");
    ADD_FAILURE() << "expected bad_map";
  } catch (const TapeError& e) {
    EXPECT_EQ(e.kind, ErrorKind::bad_map);
    EXPECT_EQ(e.file, "/nonexistent/map.json");
  }
  EXPECT_THROW(load_column_map(std::filesystem::temp_directory_path().string()), TapeError);
}

// ---- Header resolution --------------------------------------------------------------------------

detail::ColumnIndex resolve(std::vector<std::string_view> header, const ColumnMap* map = nullptr) {
  return detail::resolve_columns(header, map, "t.csv", 1);
}

TEST(ResolveColumns, CanonicalNamesIgnoreCaseAndSpaces) {
  const auto index = resolve({" Loan_ID ", "NOTE_RATE", "whatever"});
  EXPECT_EQ(index.at(Field::loan_id), 0u);
  EXPECT_EQ(index.at(Field::note_rate), 1u);
  EXPECT_FALSE(index.has(Field::current_balance));
  EXPECT_EQ(index.name(Field::loan_id), "Loan_ID");
  EXPECT_EQ(index.ignored, (std::vector<std::string>{"whatever"}));
}

TEST(ResolveColumns, DuplicateCanonicalColumn) {
  try {
    resolve({"loan_id", "note_rate", "Note_Rate"});
    FAIL() << "expected duplicate_column";
  } catch (const TapeError& e) {
    EXPECT_EQ(e.kind, ErrorKind::duplicate_column);
    EXPECT_EQ(e.column, "Note_Rate");
    EXPECT_NE(std::string(e.what()).find("note_rate"), std::string::npos);
  }
}

TEST(ResolveColumns, MapTakesTheFirstListedNameFound) {
  const ColumnMap map =
      parse_column_map(R"({"columns": {"loan_id": ["LOAN_NO", "LoanNumber"]}})", "m.json");
  const auto index = resolve({"loannumber", "loan_no"}, &map);
  EXPECT_EQ(index.at(Field::loan_id), 1u);
  EXPECT_EQ(index.ignored, (std::vector<std::string>{"loannumber"}));
}

TEST(ResolveColumns, MapNameAppearingTwiceIsADuplicate) {
  const ColumnMap map = parse_column_map(R"({"columns": {"loan_id": "LOAN_NO"}})", "m.json");
  try {
    resolve({"LOAN_NO", "x", "loan_no"}, &map);
    FAIL() << "expected duplicate_column";
  } catch (const TapeError& e) {
    EXPECT_EQ(e.kind, ErrorKind::duplicate_column);
  }
}

TEST(ResolveColumns, WithAMapCanonicalNamesStillCountForUnlistedFields) {
  const ColumnMap map = parse_column_map(R"({"columns": {"loan_id": "LOAN_NO"}})", "m.json");
  const auto index = resolve({"LOAN_NO", "loan_id", "note_rate"}, &map);
  EXPECT_EQ(index.at(Field::loan_id), 0u);
  EXPECT_EQ(index.at(Field::note_rate), 2u);
  // loan_id is listed in the map, so a cell with its canonical name is not used.
  EXPECT_EQ(index.ignored, (std::vector<std::string>{"loan_id"}));
}

TEST(ResolveColumns, NamesLookedForComeFromTheMap) {
  const ColumnMap map = parse_column_map(R"({"columns": {"loan_id": ["A", "B"]}})", "m.json");
  EXPECT_EQ(detail::names_looked_for(Field::loan_id, &map), (std::vector<std::string>{"A", "B"}));
  EXPECT_EQ(detail::names_looked_for(Field::state, &map), (std::vector<std::string>{"state"}));
}

}  // namespace
