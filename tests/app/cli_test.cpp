// The `poolbid` command run as a user runs it: exit codes, what goes to stdout and stderr, JSON
// that parses, files written whole or not at all, cash-flow tables and the README's test command
// matching CI's.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <nlohmann/json.hpp>
#include <set>
#include <sstream>
#include <string>
#include <utility>
#include <vector>

#include "tests/support/command_constants.h"
#include "tests/support/csv_text.h"
#include "tests/support/run_poolbid.h"

namespace {

using namespace poolbid::testing_support;
namespace fs = std::filesystem;
using nlohmann::json;

const fs::path kSource = POOLBID_SOURCE_DIR;

const std::string kCorpus = "tests/tape/malformed/";

std::size_t line_count(const std::string& text) {
  return static_cast<std::size_t>(std::count(text.begin(), text.end(), '\n'));
}

std::size_t count_at(const json& doc, const char* key) { return doc.at(key).get<std::size_t>(); }

// rows read = rows accepted + rows rejected, always (README).
bool rows_add_up(const json& doc) {
  return count_at(doc, "rows_read") ==
         count_at(doc, "rows_accepted") + count_at(doc, "rows_rejected");
}

// Each test has a scratch folder of its own (CommandTest).
class Cli : public CommandTest {};

// ---- Reading tapes that are fine ----------------------------------------------------------------

struct DemoTape {
  std::string name;
  std::vector<std::string> tape_args;
};

std::vector<DemoTape> demo_tapes() {
  return {{"strict", {kStrict}}, {"loose", {kLoose, "--map", kLooseMap}}};
}

TEST_F(Cli, CheckAndStratsOnBothDemoTapesExitZero) {
  for (const DemoTape& tape : demo_tapes()) {
    for (const std::string command : {"check", "strats"}) {
      std::vector<std::string> args = {command};
      args.insert(args.end(), tape.tape_args.begin(), tape.tape_args.end());
      const Outcome text = poolbid(args);
      EXPECT_EQ(text.exit_code, kOk) << command << " " << tape.name << "\n" << text;
      EXPECT_EQ(text.err, "") << command << " " << tape.name;
      EXPECT_NE(text.out.find("not investment advice"), std::string::npos) << text;
      if (command == std::string("check")) {
        EXPECT_NE(text.out.find("problems: none"), std::string::npos) << text;
      }
    }
  }
}

TEST_F(Cli, CheckJsonOnBothDemoTapes) {
  for (const DemoTape& tape : demo_tapes()) {
    std::vector<std::string> args = {"check"};
    args.insert(args.end(), tape.tape_args.begin(), tape.tape_args.end());
    args.push_back("--json");
    const Outcome r = poolbid(args);
    ASSERT_EQ(r.exit_code, kOk) << tape.name << "\n" << r;
    EXPECT_EQ(r.err, "");
    const json doc = json::parse(r.out);
    EXPECT_TRUE(rows_add_up(doc));
    EXPECT_EQ(count_at(doc, "rows_read"), 2000u);  // demo-pools/README.md: 2,000 loans
    EXPECT_EQ(count_at(doc, "rows_rejected"), 0u);
    EXPECT_TRUE(doc.at("problems").empty());
  }
}

TEST_F(Cli, StratsJsonOnBothDemoTapes) {
  for (const DemoTape& tape : demo_tapes()) {
    std::vector<std::string> args = {"strats"};
    args.insert(args.end(), tape.tape_args.begin(), tape.tape_args.end());
    args.push_back("--json");
    const Outcome r = poolbid(args);
    ASSERT_EQ(r.exit_code, kOk) << tape.name << "\n" << r;
    EXPECT_EQ(r.err, "");
    const json doc = json::parse(r.out);
    EXPECT_EQ(count_at(doc, "loans"), 2000u);  // demo-pools/README.md: 2,000 loans
    // Strats are of the accepted loans; the document must still account for every row read.
    ASSERT_TRUE(doc.contains("rows_read") && doc.contains("rows_accepted"))
        << tape.name << ": strats JSON has no rows_read / rows_accepted, so a reader of it "
                        "cannot see that no row went missing";
    EXPECT_TRUE(rows_add_up(doc));
    EXPECT_EQ(count_at(doc, "rows_accepted"), count_at(doc, "loans"));
  }
}

// ---- A tape with rejected rows ------------------------------------------------------------------

// The rows of demo-pools/bad-tape.csv made invalid on purpose (its README lists the 14 faults;
// rows counted in the file, header = row 1).
const std::set<std::size_t> kBadTapeRejectedRows = {3,  5,  7,  10, 12, 15, 17,
                                                    20, 22, 24, 27, 29, 32, 34};

TEST_F(Cli, BadTapeExitsThreeAndListsEveryRejectedRow) {
  const Outcome j = poolbid({"check", kBadTape, "--json"});
  ASSERT_EQ(j.exit_code, kRowsRejected) << j;
  EXPECT_EQ(j.err, "");
  const json doc = json::parse(j.out);
  EXPECT_EQ(count_at(doc, "rows_read"), 40u);
  EXPECT_EQ(count_at(doc, "rows_rejected"), kBadTapeRejectedRows.size());
  EXPECT_TRUE(rows_add_up(doc));
  std::set<std::size_t> rejected;
  for (const json& p : doc.at("problems"))
    if (p.at("severity") == "reject") rejected.insert(p.at("row").get<std::size_t>());
  EXPECT_EQ(rejected, kBadTapeRejectedRows);

  // The text report lists each rejected row too: a line starting with its number, marked REJECT.
  const Outcome t = poolbid({"check", kBadTape});
  ASSERT_EQ(t.exit_code, kRowsRejected) << t;
  EXPECT_EQ(t.err, "");
  std::set<std::size_t> listed;
  std::istringstream lines(t.out);
  for (std::string line; std::getline(lines, line);) {
    if (line.find("REJECT") == std::string::npos) continue;
    std::size_t row = 0;
    if (std::istringstream(line) >> row) listed.insert(row);
  }
  EXPECT_EQ(listed, kBadTapeRejectedRows) << t.out;

  // strats on it runs, says so with exit code 3, and lists the rejects in its JSON.
  const Outcome s = poolbid({"strats", kBadTape, "--json"});
  ASSERT_EQ(s.exit_code, kRowsRejected) << s;
  const json strats = json::parse(s.out);
  EXPECT_EQ(count_at(strats, "loans"), 40u - kBadTapeRejectedRows.size());
  std::set<std::size_t> strats_rejected;
  for (const json& p : strats.at("rejects")) strats_rejected.insert(p.at("row").get<std::size_t>());
  EXPECT_EQ(strats_rejected, kBadTapeRejectedRows);
}

// ---- Files that cannot be read as tapes ---------------------------------------------------------

// Each file of tests/tape/malformed/ (tapes and column maps) is run through `poolbid check`, and
// its exit code and output checked, by tests/tape/malformed_corpus_test.cpp.

// One line on stderr that names `file`, and nothing on stdout: nothing is written.
void expect_one_error_line(const Outcome& r, const std::string& file, int code) {
  EXPECT_EQ(r.exit_code, code) << file << "\n" << r;
  EXPECT_EQ(r.out, "") << file;
  EXPECT_EQ(line_count(r.err), 1u) << file << "\n" << r.err;
  EXPECT_EQ(r.err.rfind("poolbid: ", 0), 0u) << r.err;
  EXPECT_NE(r.err.find(file), std::string::npos) << "stderr does not name " << file << ": "
                                                 << r.err;
}

TEST_F(Cli, RunawayRowOfTwoMebibytesExitsFour) {
  const fs::path tape = scratch_ / "runaway.csv";
  {
    std::ofstream out(tape, std::ios::binary);
    out << read_file(kSource / kCorpus / "header-only.csv");
    out << "L001,Quillmoor Lending,200000.00,250000.00,6.5,0.25,360,348,12,740,80,80,36,owner,"
           "2025-11-15,CA\n";
    out << "L002,Quillmoor Lending," << std::string(std::size_t{2} << 20, 'x') << "\n";
  }
  const Outcome r = poolbid({"check", tape.string()});
  expect_one_error_line(r, tape.string(), kUnusableTape);
  EXPECT_NE(r.err.find("row 3"), std::string::npos) << r.err;
}

TEST_F(Cli, MissingTapeAndDirectoryExitFour) {
  expect_one_error_line(poolbid({"check", "demo-pools/no-such-tape.csv"}),
                        "demo-pools/no-such-tape.csv", kUnusableTape);
  expect_one_error_line(poolbid({"check", "demo-pools"}), "demo-pools", kUnusableTape);
}

// ---- Other unusable inputs ----------------------------------------------------------------------

TEST_F(Cli, MissingColumnMapExitsFive) {
  expect_one_error_line(poolbid({"check", kLoose, "--map", "demo-pools/no-such.map.json"}),
                        "demo-pools/no-such.map.json", kUnusableInput);
}

TEST_F(Cli, BadCutoffExitsFiveAndShowsTheValue) {
  for (const std::string cutoff : {"2026-13-01", "12/2026", "yesterday"}) {
    const Outcome r = poolbid({"check", kStrict, "--cutoff", cutoff});
    EXPECT_EQ(r.exit_code, kUnusableInput) << cutoff << "\n" << r;
    EXPECT_EQ(r.out, "");
    EXPECT_EQ(line_count(r.err), 1u) << r.err;
    EXPECT_NE(r.err.find("--cutoff"), std::string::npos) << r.err;
    EXPECT_NE(r.err.find(cutoff), std::string::npos) << "the message hides the value: " << r.err;
  }
}

TEST_F(Cli, ServicingFeeOutOfRangeExitsFiveAndNamesTheOption) {
  const Outcome r = poolbid({"check", kStrict, "--servicing-fee", "30"});
  EXPECT_EQ(r.exit_code, kUnusableInput) << r;
  EXPECT_EQ(r.out, "");
  EXPECT_EQ(line_count(r.err), 1u) << r.err;
  // The fault is the option, not a column of the tape.
  EXPECT_NE(r.err.find("--servicing-fee"), std::string::npos) << r.err;
}

TEST_F(Cli, DateColumnsWithoutACutoffExitFive) {
  const std::string file = kCorpus + "maturity-without-cutoff.csv";
  const Outcome r = poolbid({"check", file});
  expect_one_error_line(r, file, kUnusableInput);
  EXPECT_NE(r.err.find("--cutoff"), std::string::npos) << r.err;
  // With the cut-off given, the same tape reads.
  EXPECT_EQ(poolbid({"check", file, "--cutoff", "2026-12-01"}).exit_code, kOk);
}

// ---- The command line itself --------------------------------------------------------------------

TEST_F(Cli, BadUsageExitsTwo) {
  const std::vector<std::vector<std::string>> cases = {
      {"check", kStrict, "--no-such-option"},
      {"check"},
      {"strats", "--json"},
      {},
      {"no-such-command"},
      {"check", kStrict, "--servicing-fee", "abc"},
      {"demo-tape", "--profile", "medium"},
      {"demo-tape", "--loans", "0"},
  };
  for (const std::vector<std::string>& args : cases) {
    const Outcome r = poolbid(args);
    std::string shown;
    for (const std::string& a : args) shown += " " + a;
    EXPECT_EQ(r.exit_code, kUsage) << "poolbid" << shown << "\n" << r;
    EXPECT_EQ(r.out, "") << "poolbid" << shown;
    EXPECT_NE(r.err, "") << "poolbid" << shown;
  }
}

TEST_F(Cli, VersionExitsZero) {
  const Outcome r = poolbid({"--version"});
  EXPECT_EQ(r.exit_code, kOk) << r;
  EXPECT_EQ(r.out.rfind("poolbid ", 0), 0u) << r.out;
}

TEST_F(Cli, HelpExitsZero) {
  const Outcome r = poolbid({"--help"});
  EXPECT_EQ(r.exit_code, kOk) << r;
  EXPECT_NE(r.out.find("check"), std::string::npos) << r.out;
}

// ---- Writing files ------------------------------------------------------------------------------

const std::vector<std::string> kDemoArgs = {"demo-tape", "--loans", "25", "--profile", "loose",
                                            "--seed", "11", "--bad-rows", "3"};

std::vector<std::string> with(std::vector<std::string> args,
                              std::initializer_list<std::string> more) {
  args.insert(args.end(), more.begin(), more.end());
  return args;
}

TEST_F(Cli, DemoTapeOutWritesWhatStdoutWouldShow) {
  const Outcome to_stdout = poolbid(kDemoArgs);
  ASSERT_EQ(to_stdout.exit_code, kOk) << to_stdout;
  ASSERT_EQ(line_count(to_stdout.out), 26u);  // header + 25 loans
  const fs::path file = scratch_ / "demo.csv";
  const Outcome to_file = poolbid(with(kDemoArgs, {"--out", file.string()}));
  ASSERT_EQ(to_file.exit_code, kOk) << to_file;
  EXPECT_EQ(to_file.out, "");
  EXPECT_EQ(to_file.err, "");
  EXPECT_EQ(read_file(file), to_stdout.out);
  EXPECT_FALSE(fs::exists(file.string() + ".partial"));
  // A second run replaces the file whole.
  ASSERT_EQ(poolbid(with(kDemoArgs, {"--out", file.string()})).exit_code, kOk);
  EXPECT_EQ(read_file(file), to_stdout.out);
}

TEST_F(Cli, DemoTapeOutIntoAMissingFolderExitsSixAndLeavesNothing) {
  const fs::path folder = scratch_ / "no-such-folder";
  const fs::path file = folder / "demo.csv";
  const Outcome r = poolbid(with(kDemoArgs, {"--out", file.string()}));
  expect_one_error_line(r, file.string(), kCannotWrite);
  EXPECT_FALSE(fs::exists(file));
  EXPECT_FALSE(fs::exists(file.string() + ".partial"));
  EXPECT_FALSE(fs::exists(folder));
}

TEST_F(Cli, DemoTapeOutOntoAFolderExitsSixAndLeavesNothing) {
  const fs::path folder = scratch_ / "a-folder";
  fs::create_directories(folder);
  const Outcome r = poolbid(with(kDemoArgs, {"--out", folder.string()}));
  expect_one_error_line(r, folder.string(), kCannotWrite);
  EXPECT_TRUE(fs::is_directory(folder));
  EXPECT_TRUE(fs::is_empty(folder));
  EXPECT_FALSE(fs::exists(folder.string() + ".partial"));
  // Nothing else appeared beside it either.
  std::set<std::string> names;
  for (const fs::directory_entry& e : fs::directory_iterator(scratch_))
    names.insert(e.path().filename().string());
  EXPECT_EQ(names, (std::set<std::string>{"a-folder"}));
}

// ---- Cash flows ---------------------------------------------------------------------------------

// The demo tapes' cut-off (demo-pools/README.md); the strict tape does not carry it.
const std::string kDemoCutoff = "2026-12-01";
const std::vector<std::string> kCashflows = {"cashflows", kStrict, "--cutoff", kDemoCutoff,
                                             "--prepay", "psa:150", "--default", "cdr:1"};
// The monthly table's columns: a public interface (README).
const std::string kCashflowHeader =
    "month,date,begin_balance,sched_principal,prepayment,default,loss,recovery,gross_interest,"
    "servicing,net_interest,total_principal,cash_flow,end_balance,smm,mdr,cpr,cdr,cum_loss_pct";
const std::string kLoansHeader =
    "loan_id,row,seller,cutoff_balance,sched_principal,prepayment,default,loss,recovery,"
    "gross_interest,servicing,net_interest,advanced_interest,cash_flow,wal_years,last_month";

using poolbid::testing_support::cells_in;
using poolbid::testing_support::lines_of;

// Every file in `folder`, by name.
std::set<std::string> names_in(const fs::path& folder) {
  std::set<std::string> names;
  for (const fs::directory_entry& e : fs::directory_iterator(folder))
    names.insert(e.path().filename().string());
  return names;
}

TEST_F(Cli, CashflowsCsvHasNineteenColumnsAndOneRowPerMonth) {
  const fs::path csv = scratch_ / "pool.csv";
  const Outcome r = poolbid(with(kCashflows, {"--csv", csv.string()}));
  ASSERT_EQ(r.exit_code, kOk) << r;
  EXPECT_EQ(r.out, "");
  EXPECT_EQ(r.err, "");
  const std::string text = read_file(csv);
  const std::vector<std::string> lines = lines_of(text);
  ASSERT_GE(lines.size(), 2u);
  EXPECT_EQ(lines[0], kCashflowHeader);
  for (const std::string& line : lines) EXPECT_EQ(cells_in(line), 19u) << line;
  EXPECT_EQ(lines[1].substr(0, 13), "1,2027-01-18,");  // paid on the 18th of the next month
  EXPECT_EQ(text.back(), '\n');
  EXPECT_EQ(text.find('\r'), std::string::npos);
  EXPECT_EQ(names_in(scratch_), (std::set<std::string>{"pool.csv"}));  // no .partial left

  // As many rows as the JSON document's months, which number the months 1, 2, ...
  const Outcome j = poolbid(with(kCashflows, {"--json"}));
  ASSERT_EQ(j.exit_code, kOk) << j;
  const json doc = json::parse(j.out);
  const std::size_t months = doc.at("summary").at("months").get<std::size_t>();
  EXPECT_EQ(lines.size(), months + 1);
  EXPECT_GE(months, 340u);  // 30-year loans about 10 months old at cut-off
  ASSERT_EQ(doc.at("months").size(), months);
  for (std::size_t t = 1; t <= months; ++t) {
    EXPECT_EQ(doc["months"][t - 1]["month"], t);
    EXPECT_EQ(lines[t].substr(0, lines[t].find(',')), std::to_string(t));
  }

  // `--csv -` writes the same bytes to standard output.
  const Outcome to_stdout = poolbid(with(kCashflows, {"--csv", "-"}));
  ASSERT_EQ(to_stdout.exit_code, kOk) << to_stdout;
  EXPECT_EQ(to_stdout.out, text);
}

TEST_F(Cli, CashflowsCsvReadsWithPythonsCsvModule) {
  if (!fs::exists("/usr/bin/python3")) GTEST_SKIP() << "no /usr/bin/python3";
  const fs::path csv = scratch_ / "pool.csv", loans = scratch_ / "loans.csv";
  ASSERT_EQ(poolbid(with(kCashflows, {"--csv", csv.string(), "--loans", loans.string()}))
                .exit_code,
            kOk);
  // Every row 19 cells (16 for loans); every cell after the loan id, seller and date a number.
  const std::string script =
      "import csv, sys\n"
      "def check(path, width, text_cells):\n"
      "    with open(path, newline='') as f:\n"
      "        rows = list(csv.reader(f))\n"
      "    assert all(len(r) == width for r in rows), path\n"
      "    for r in rows[1:]:\n"
      "        for i, cell in enumerate(r):\n"
      "            if i not in text_cells:\n"
      "                float(cell)\n"
      "    return len(rows) - 1\n"
      "print(check(sys.argv[1], 19, {1}), check(sys.argv[2], 16, {0, 2}))\n";
  const fs::path script_file = scratch_ / "check.py", out = scratch_ / "out.txt";
  {
    std::ofstream(script_file) << script;
  }
  const std::string command = "/usr/bin/python3 " + shell_quoted(script_file.string()) + " " +
                              shell_quoted(csv.string()) + " " + shell_quoted(loans.string()) +
                              " >" + shell_quoted(out.string()) + " 2>&1";
  const int status = std::system(command.c_str());
  ASSERT_TRUE(WIFEXITED(status) && WEXITSTATUS(status) == 0) << read_file(out);
  std::istringstream counts(read_file(out));
  std::size_t months = 0, loan_rows = 0;
  counts >> months >> loan_rows;
  EXPECT_EQ(months + 1, lines_of(read_file(csv)).size());
  EXPECT_EQ(loan_rows, 2000u);  // demo-pools/README.md: 2,000 loans, all accepted
}

TEST_F(Cli, CashflowsBadPrepayExitsFiveAndWritesNothing) {
  const fs::path csv = scratch_ / "pool.csv";
  std::vector<std::string> args = {"cashflows", kStrict,   "--cutoff", kDemoCutoff,
                                   "--prepay",  "psb:150", "--csv",    csv.string()};
  const Outcome r = poolbid(args);
  EXPECT_EQ(r.exit_code, kUnusableInput) << r;
  EXPECT_EQ(r.out, "");
  EXPECT_EQ(line_count(r.err), 1u) << r.err;
  EXPECT_NE(r.err.find("--prepay"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("psb:150"), std::string::npos) << r.err;
  EXPECT_TRUE(fs::is_empty(scratch_)) << "a file was written";

  // Each assumption option names itself and its value.
  const std::vector<std::pair<std::string, std::string>> bad = {
      {"--default", "cdr:x"}, {"--severity", "140"},     {"--lag", "-3"},
      {"--advancing", "all"}, {"--prepay", "cpr:2..8/0"}};
  for (const auto& [option, value] : bad) {
    const Outcome b = poolbid({"cashflows", kStrict, "--cutoff", kDemoCutoff, option, value});
    EXPECT_EQ(b.exit_code, kUnusableInput) << option << " " << value << "\n" << b;
    EXPECT_EQ(b.out, "");
    EXPECT_NE(b.err.find(option), std::string::npos) << b.err;
    EXPECT_NE(b.err.find(value), std::string::npos) << b.err;
  }
}

TEST_F(Cli, CashflowsBadTapeExitsThreeListsRejectsAndWritesTheTable) {
  const fs::path csv = scratch_ / "pool.csv", loans = scratch_ / "loans.csv";
  const Outcome r = poolbid({"cashflows", kBadTape, "--cutoff", kDemoCutoff, "--prepay",
                             "psa:150", "--default", "cdr:1", "--csv", csv.string(), "--loans",
                             loans.string()});
  ASSERT_EQ(r.exit_code, kRowsRejected) << r;
  EXPECT_EQ(r.out, "");
  // Every rejected row on standard error: a line starting with its row number.
  std::set<std::size_t> listed;
  for (const std::string& line : lines_of(r.err)) {
    std::size_t row = 0;
    if (std::istringstream(line) >> row) listed.insert(row);
  }
  EXPECT_EQ(listed, kBadTapeRejectedRows) << r.err;
  EXPECT_NE(r.err.find("14 rows rejected"), std::string::npos) << r.err;
  // The outputs hold the accepted loans.
  const std::vector<std::string> table = lines_of(read_file(csv));
  ASSERT_GE(table.size(), 2u);
  EXPECT_EQ(table[0], kCashflowHeader);
  EXPECT_EQ(lines_of(read_file(loans)).size(), 1 + 40u - kBadTapeRejectedRows.size());

  // The JSON document carries them; the text report lists them. Both exit 3, stderr quiet.
  const Outcome j = poolbid({"cashflows", kBadTape, "--cutoff", kDemoCutoff, "--json"});
  ASSERT_EQ(j.exit_code, kRowsRejected) << j;
  EXPECT_EQ(j.err, "");
  const json doc = json::parse(j.out);
  std::set<std::size_t> in_json;
  for (const json& p : doc.at("rejected")) in_json.insert(p.at("row").get<std::size_t>());
  EXPECT_EQ(in_json, kBadTapeRejectedRows);
  EXPECT_EQ(doc.at("summary").at("loans"), 40u - kBadTapeRejectedRows.size());

  const Outcome t = poolbid({"cashflows", kBadTape, "--cutoff", kDemoCutoff});
  ASSERT_EQ(t.exit_code, kRowsRejected) << t;
  EXPECT_EQ(t.err, "");
  const std::size_t section = t.out.find("rejected rows: 14 rows rejected");
  ASSERT_NE(section, std::string::npos) << t.out;
  std::set<std::size_t> in_text;
  for (const std::string& line : lines_of(t.out.substr(section))) {
    if (line.rfind("  ", 0) != 0) continue;  // the table's lines are indented
    std::size_t row = 0;
    if (std::istringstream(line) >> row) in_text.insert(row);
  }
  EXPECT_EQ(in_text, kBadTapeRejectedRows) << t.out;
}

TEST_F(Cli, CashflowsOutputsDoNotDependOnThreads) {
  // 10,000 loans: three of the engine's 4,096-loan chunks, so two and three threads share the work
  // (the 2,000-loan demo tape is one chunk, which a single thread runs whatever --threads says).
  const fs::path tape = scratch_ / "tape-10000.csv";
  const Outcome made = poolbid({"demo-tape", "--loans", "10000", "--seed", "7", "--out",
                                tape.string()});
  ASSERT_EQ(made.exit_code, kOk) << made;
  ASSERT_EQ(line_count(read_file(tape)), 10001u);  // header + 10,000 loans
  std::vector<std::string> pools, loan_files;
  for (const std::string threads : {"1", "2", "3"}) {
    const fs::path csv = scratch_ / ("pool-" + threads + ".csv");
    const fs::path loans = scratch_ / ("loans-" + threads + ".csv");
    const Outcome r = poolbid({"cashflows", tape.string(), "--cutoff", kDemoCutoff, "--prepay",
                               "psa:150", "--default", "sda:200", "--severity", "45", "--lag",
                               "6", "--advancing", "interest", "--threads", threads, "--csv",
                               csv.string(), "--loans", loans.string()});
    ASSERT_EQ(r.exit_code, kOk) << "--threads " << threads << "\n" << r;
    pools.push_back(read_file(csv));
    loan_files.push_back(read_file(loans));
  }
  ASSERT_GE(line_count(pools[0]), 300u);
  ASSERT_EQ(line_count(loan_files[0]), 10001u);  // every loan accepted
  // Byte for byte (EXPECT_TRUE: a failing EXPECT_EQ would print megabytes).
  EXPECT_TRUE(pools[0] == pools[1]) << "monthly CSV: --threads 1 and 2 differ";
  EXPECT_TRUE(pools[0] == pools[2]) << "monthly CSV: --threads 1 and 3 differ";
  EXPECT_TRUE(loan_files[0] == loan_files[1]) << "--loans CSV: --threads 1 and 2 differ";
  EXPECT_TRUE(loan_files[0] == loan_files[2]) << "--loans CSV: --threads 1 and 3 differ";
}

TEST_F(Cli, CashflowsLoansCsvHasOneRowPerAcceptedLoan) {
  const fs::path loans = scratch_ / "loans.csv";
  const Outcome r = poolbid({"cashflows", kLoose, "--map", kLooseMap, "--prepay", "cpr:8",
                             "--loans", loans.string()});
  ASSERT_EQ(r.exit_code, kOk) << r;  // the map gives the cut-off
  EXPECT_NE(r.out.find("poolbid cashflows"), std::string::npos) << r;  // the text report
  const std::vector<std::string> lines = lines_of(read_file(loans));
  ASSERT_EQ(lines.size(), 2001u);  // header + 2,000 loans (demo-pools/README.md)
  EXPECT_EQ(lines[0], kLoansHeader);
  EXPECT_EQ(lines[1].rfind("SMF-000001,2,", 0), 0u) << lines[1];  // tape order, tape row
  EXPECT_EQ(lines[2000].rfind("SMF-002000,2001,", 0), 0u) << lines[2000];
  for (const std::string& line : lines) EXPECT_EQ(cells_in(line), 16u) << line;
}

// The keys of a JSON object, in the order the document has them.
std::vector<std::string> keys_of(const nlohmann::ordered_json& object) {
  std::vector<std::string> keys;
  for (const auto& [key, value] : object.items()) keys.push_back(key);
  return keys;
}

TEST_F(Cli, CashflowsJsonHasTheDocumentedKeys) {
  const Outcome r = poolbid(with(kCashflows, {"--json", "--delay", "24"}));
  ASSERT_EQ(r.exit_code, kOk) << r;
  EXPECT_EQ(r.err, "");
  // Parsed keeping the document's key order: the README promises these keys in this order.
  using Ordered = nlohmann::ordered_json;
  const Ordered doc = Ordered::parse(r.out);
  using Keys = std::vector<std::string>;
  EXPECT_EQ(keys_of(doc), (Keys{"file", "cutoff_date", "payment_delay_days", "assumptions",
                                "arm_curve", "summary", "months", "rejected", "caution"}));
  EXPECT_TRUE(doc["arm_curve"].is_null());  // no --curve: ARMs keep their note rate
  EXPECT_EQ(keys_of(doc["assumptions"]), (Keys{"prepay", "default", "severity", "lag_months",
                                               "advancing", "delinquent_default"}));
  EXPECT_EQ(keys_of(doc["summary"]),
            (Keys{"rows_read", "rows_accepted", "rows_rejected", "upb_rejected", "loans",
                  "cutoff_balance", "months", "last_payment_date", "sched_principal",
                  "prepayment", "default", "loss", "recovery", "gross_interest", "servicing",
                  "net_interest", "advanced_interest", "total_principal", "cash_flow",
                  "cum_loss_pct"}));
  EXPECT_EQ(doc["cutoff_date"], kDemoCutoff);
  EXPECT_EQ(doc["payment_delay_days"], 24);
  EXPECT_EQ(doc["assumptions"]["prepay"], "psa:150");
  EXPECT_EQ(doc["assumptions"]["default"], "cdr:1");
  EXPECT_EQ(doc["summary"]["loans"], 2000);
  EXPECT_TRUE(doc["rejected"].empty());
  ASSERT_FALSE(doc["months"].empty());
  EXPECT_EQ(doc["months"][0]["date"], "2027-01-25");
  // Each month: the monthly CSV's 19 columns in the CSV's order, then advanced_interest.
  Keys month_keys;
  std::istringstream cells(kCashflowHeader);
  for (std::string cell; std::getline(cells, cell, ',');) month_keys.push_back(cell);
  ASSERT_EQ(month_keys.size(), 19u);
  month_keys.push_back("advanced_interest");
  for (std::size_t m = 0; m < doc["months"].size(); ++m)
    ASSERT_EQ(keys_of(doc["months"][m]), month_keys) << "month " << m + 1;
}

TEST_F(Cli, CashflowsAssumptionsFileThenOptionsOverIt) {
  const fs::path file = scratch_ / "assumptions.json";
  std::ofstream(file) << R"({"prepay": "psa:200", "default": "sda:100", "severity": 50,
                              "lag_months": 9, "advancing": "interest"})";
  const Outcome r = poolbid({"cashflows", kStrict, "--cutoff", kDemoCutoff, "--assumptions",
                             file.string(), "--severity", "30", "--json"});
  ASSERT_EQ(r.exit_code, kOk) << r;
  const json a = json::parse(r.out).at("assumptions");
  EXPECT_EQ(a["prepay"], "psa:200");
  EXPECT_EQ(a["default"], "sda:100");
  EXPECT_EQ(a["severity"], "30");  // the option wins
  EXPECT_EQ(a["lag_months"], 9);
  EXPECT_EQ(a["advancing"], "interest");

  std::ofstream(scratch_ / "bad.json") << R"({"prepay": "psa:200", "speed": 3})";
  const Outcome bad = poolbid({"cashflows", kStrict, "--cutoff", kDemoCutoff, "--assumptions",
                               (scratch_ / "bad.json").string()});
  EXPECT_EQ(bad.exit_code, kUnusableInput) << bad;
  EXPECT_EQ(bad.out, "");
  EXPECT_NE(bad.err.find("bad.json"), std::string::npos) << bad.err;
  EXPECT_NE(bad.err.find("speed"), std::string::npos) << bad.err;
  // A key given twice is refused, not read as its last value.
  std::ofstream(scratch_ / "twice.json") << R"({"prepay": "psa:200", "prepay": "psa:100"})";
  expect_one_error_line(poolbid({"cashflows", kStrict, "--cutoff", kDemoCutoff, "--assumptions",
                                 (scratch_ / "twice.json").string()}),
                        (scratch_ / "twice.json").string() + " key prepay: duplicate key",
                        kUnusableInput);
  expect_one_error_line(poolbid({"cashflows", kStrict, "--cutoff", kDemoCutoff, "--assumptions",
                                 "demo-pools/no-such.json"}),
                        "demo-pools/no-such.json", kUnusableInput);
}

TEST_F(Cli, CashflowsWithoutACutoffExitsFive) {
  const Outcome r = poolbid({"cashflows", kStrict, "--csv", (scratch_ / "pool.csv").string()});
  expect_one_error_line(r, kStrict, kUnusableInput);
  EXPECT_NE(r.err.find("--cutoff"), std::string::npos) << r.err;
  EXPECT_TRUE(fs::is_empty(scratch_));
}

TEST_F(Cli, CashflowsUnwritableSecondOutputLeavesNoFile) {
  const fs::path csv = scratch_ / "pool.csv";
  const fs::path loans = scratch_ / "no-such-folder" / "loans.csv";
  const Outcome r = poolbid(with(kCashflows, {"--csv", csv.string(), "--loans", loans.string()}));
  expect_one_error_line(r, loans.string(), kCannotWrite);
  EXPECT_TRUE(fs::is_empty(scratch_)) << "left behind: " << *names_in(scratch_).begin();
}

TEST_F(Cli, CashflowsUsageErrorsExitTwo) {
  const std::string csv = (scratch_ / "pool.csv").string();
  const std::vector<std::vector<std::string>> cases = {
      with(kCashflows, {"--csv", csv, "--json"}),
      with(kCashflows, {"--loans", "-"}),
      with(kCashflows, {"--csv", csv, "--loans", csv}),
      with(kCashflows, {"--csv", kStrict}),  // would overwrite the tape
      with(kCashflows, {"--threads", "-1"}),
      with(kCashflows, {"--delay", "x"}),
      {"cashflows"},
  };
  for (const std::vector<std::string>& args : cases) {
    const Outcome r = poolbid(args);
    std::string shown;
    for (const std::string& a : args) shown += " " + a;
    EXPECT_EQ(r.exit_code, kUsage) << "poolbid" << shown << "\n" << r;
    EXPECT_EQ(r.out, "") << shown;
    EXPECT_NE(r.err, "") << shown;
  }
  EXPECT_TRUE(fs::is_empty(scratch_));
  EXPECT_EQ(read_file(kSource / kStrict).substr(0, 8), "loan_id,");
}

// ---- The README and CI run one command ----------------------------------------------------------

// The fenced ```sh blocks of a Markdown text, in order, each without its fences.
std::vector<std::string> sh_blocks(const std::string& markdown) {
  std::vector<std::string> blocks;
  std::istringstream lines(markdown);
  bool inside = false;
  std::string block;
  for (std::string line; std::getline(lines, line);) {
    if (!inside && line == "```sh") {
      inside = true;
      block.clear();
    } else if (inside && line == "```") {
      inside = false;
      if (!block.empty() && block.back() == '\n') block.pop_back();
      blocks.push_back(block);
    } else if (inside) {
      block += line + "\n";
    }
  }
  return blocks;
}

TEST(ReadmeAndCi, ReadmeTestCommandIsTheLastLineOfCiRun) {
  const std::vector<std::string> blocks = sh_blocks(read_file(kSource / "README.md"));
  ASSERT_GE(blocks.size(), 2u) << "README.md has fewer than two ```sh blocks";
  const std::string ci = read_file(kSource / ".ci" / "run");
  ASSERT_FALSE(ci.empty()) << ".ci/run is missing or empty";
  std::istringstream lines(ci);
  std::string last;
  for (std::string line; std::getline(lines, line);)
    if (!line.empty()) last = line;
  EXPECT_EQ(blocks[1], last);
}

}  // namespace
