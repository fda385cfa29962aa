// `poolbid price` and `poolbid cashflows --curve` run as a user runs them: exit codes, the price
// JSON's keys in order, the three bid targets agreeing, per-loan values adding up to the bid,
// outputs that do not depend on the thread count, and ARMs reset on a curve's index forwards.
#include <gtest/gtest.h>
#include <unistd.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstddef>
#include <filesystem>
#include <fstream>
#include <initializer_list>
#include <limits>
#include <nlohmann/json.hpp>
#include <set>
#include <sstream>
#include <string>
#include <system_error>
#include <vector>

#include "tests/support/command_constants.h"
#include "tests/support/csv_text.h"
#include "tests/support/run_poolbid.h"

namespace {

using namespace poolbid::testing_support;
namespace fs = std::filesystem;
using Ordered = nlohmann::ordered_json;  // keeps the document's key order
using Keys = std::vector<std::string>;

const fs::path kSource = POOLBID_SOURCE_DIR;

const std::string kSwapCurve = "demo-pools/curve-2026-12-01.json";
const std::string kTreasuryCurve = "demo-pools/treasury-2026-12-01.json";
// The demo tapes' cut-off (demo-pools/README.md): the strict tape needs it on the command line,
// the loose tape's column map carries it.
const std::string kCutoff = "2026-12-01";
// Month 1 of a 2026-12-01 cut-off is paid on 2027-01-01 + 17 days (DESIGN.md section 5).
const std::string kFirstPayment = "2027-01-18";
const std::vector<std::string> kStrictTape = {kStrict, "--cutoff", kCutoff};
const std::vector<std::string> kLooseTape = {kLoose, "--map", kLooseMap};
// The demo's assumptions (demo-pools/demo.sh): strict seller at 100% SDA, loose at 200% SDA.
const std::vector<std::string> kStrictAssumptions = {
    "--prepay", "psa:150", "--default", "sda:100", "--severity", "40", "--lag", "12"};
const std::vector<std::string> kLooseAssumptions = {"--prepay",   "psa:150", "--default", "sda:200",
                                                    "--severity", "40",      "--lag",     "12"};
// The per-loan values CSV's columns: a public interface (README).
const std::string kValuesHeader =
    "loan_id,row,seller,cutoff_balance,note_rate,value,dirty_price,wal_years,expected_loss,"
    "loss_pct";

// The rows of demo-pools/bad-tape.csv made invalid on purpose (header = row 1).
const std::set<std::size_t> kBadTapeRejectedRows = {3,  5,  7,  10, 12, 15, 17,
                                                    20, 22, 24, 27, 29, 32, 34};

std::vector<std::string> join(std::initializer_list<std::vector<std::string>> parts) {
  std::vector<std::string> all;
  for (const std::vector<std::string>& part : parts)
    all.insert(all.end(), part.begin(), part.end());
  return all;
}

std::vector<std::string> with(std::vector<std::string> args,
                              std::initializer_list<std::string> more) {
  args.insert(args.end(), more.begin(), more.end());
  return args;
}

std::string shown(const std::vector<std::string>& args) {
  std::string text = "poolbid";
  for (const std::string& a : args) text += " " + a;
  return text;
}

// The shortest text that reads back as exactly `x` (what a user pastes from the JSON).
std::string number_text(double x) {
  char buffer[64];
  const auto [end, ec] = std::to_chars(buffer, buffer + sizeof buffer, x);
  return ec == std::errc() ? std::string(buffer, end) : std::string("nan");
}

std::size_t line_count(const std::string& text) {
  return static_cast<std::size_t>(std::count(text.begin(), text.end(), '\n'));
}

// The keys of a JSON object, in the order the document has them.
Keys keys_of(const Ordered& object) {
  Keys keys;
  for (const auto& [key, value] : object.items()) keys.push_back(key);
  return keys;
}

// Splits a plain (unquoted) CSV line into cells.
std::vector<std::string> cells_of(const std::string& line) {
  std::vector<std::string> cells;
  std::istringstream in(line);
  for (std::string cell; std::getline(in, cell, ',');) cells.push_back(cell);
  if (!line.empty() && line.back() == ',') cells.emplace_back();
  return cells;
}

std::size_t column_of(const std::vector<std::string>& header, const std::string& name) {
  const auto it = std::find(header.begin(), header.end(), name);
  EXPECT_NE(it, header.end()) << "no column " << name;
  return static_cast<std::size_t>(it - header.begin());
}

// The number after `label` on the first line of `text` holding it; NaN when there is none.
double number_after(const std::string& text, const std::string& label) {
  for (const std::string& line : lines_of(text)) {
    const std::size_t at = line.find(label);
    if (at == std::string::npos) continue;
    double x = 0;
    if (std::istringstream(line.substr(at + label.size())) >> x) return x;
  }
  return std::numeric_limits<double>::quiet_NaN();
}

// A row number at the start of each indented line after `section` starts in `text`.
std::set<std::size_t> rows_listed_after(const std::string& text, const std::string& section) {
  std::set<std::size_t> rows;
  const std::size_t start = text.find(section);
  if (start == std::string::npos) return rows;
  for (const std::string& line : lines_of(text.substr(start))) {
    if (line.rfind("  ", 0) != 0) continue;
    std::size_t row = 0;
    if (std::istringstream(line) >> row) rows.insert(row);
  }
  return rows;
}

// One line on stderr starting "poolbid: " and holding each of `needles`; nothing on stdout.
void expect_one_error_line(const Outcome& r, int code, const std::vector<std::string>& needles,
                           const std::string& context) {
  EXPECT_EQ(r.exit_code, code) << context << "\n" << r;
  EXPECT_EQ(r.out, "") << context;
  EXPECT_EQ(line_count(r.err), 1u) << context << "\n" << r.err;
  EXPECT_EQ(r.err.rfind("poolbid: ", 0), 0u) << context << "\n" << r.err;
  for (const std::string& needle : needles)
    EXPECT_NE(r.err.find(needle), std::string::npos)
        << context << ": stderr does not say '" << needle << "': " << r.err;
}

// Each test has a scratch folder of its own (CommandTest).
class PriceCli : public CommandTest {
 protected:
  // Runs `price ... --json`, expects `code`, an empty stderr and a document that parses; returns
  // it (null after a failure).
  Ordered price_json(const std::vector<std::string>& args, int code = kOk) const {
    std::vector<std::string> full = {"price"};
    full.insert(full.end(), args.begin(), args.end());
    full.push_back("--json");
    const Outcome r = poolbid(full);
    EXPECT_EQ(r.exit_code, code) << shown(full) << "\n" << r;
    EXPECT_EQ(r.err, "") << shown(full);
    if (r.exit_code != code) return Ordered();
    try {
      return Ordered::parse(r.out);
    } catch (const std::exception& e) {
      ADD_FAILURE() << shown(full) << ": stdout is not JSON: " << e.what() << "\n" << r;
      return Ordered();
    }
  }

  // Writes `text` to the scratch file `name`; returns its path.
  fs::path write_scratch(const std::string& name, const std::string& text) const {
    const fs::path path = scratch_ / name;
    std::ofstream(path, std::ios::binary) << text;
    return path;
  }

  // The demo swap curve with its as-of date and indexes changed; `indexes` null = no key.
  fs::path curve_variant(const std::string& name, const std::string& as_of,
                         const Ordered& indexes) const {
    Ordered curve = Ordered::parse(read_file(kSource / kSwapCurve));
    curve["as_of"] = as_of;
    if (indexes.is_null())
      curve.erase("indexes");
    else
      curve["indexes"] = indexes;
    return write_scratch(name, curve.dump(2));
  }

  // The strict demo tape without its ARMs, written to the scratch folder.
  fs::path fixed_only_tape() const {
    const std::vector<std::string> tape = lines_of(read_file(kSource / kStrict));
    const std::size_t type_col = column_of(cells_of(tape.at(0)), "amortization_type");
    std::string fixed = tape.at(0) + "\n";
    for (std::size_t i = 1; i < tape.size(); ++i)
      if (cells_of(tape[i]).at(type_col) != "arm") fixed += tape[i] + "\n";
    return write_scratch("fixed-only.csv", fixed);
  }

  std::set<std::string> names_in_scratch() const {
    std::set<std::string> names;
    for (const fs::directory_entry& e : fs::directory_iterator(scratch_))
      names.insert(e.path().filename().string());
    return names;
  }
};

// ---- The JSON document --------------------------------------------------------------------------

// Checks the README's keys, in its order, at every level, and the identities that tie the numbers
// of one document together.
void expect_documented_price_json(const Ordered& doc, const std::string& context) {
  ASSERT_TRUE(doc.is_object()) << context;
  EXPECT_EQ(keys_of(doc), (Keys{"file", "cutoff_date", "settlement_date", "payment_delay_days",
                                "curve", "assumptions", "target", "bid", "loss_adjusted", "no_loss",
                                "credit", "risk", "loans_priced", "rejected", "caution"}))
      << context;
  EXPECT_EQ(keys_of(doc.at("curve")), (Keys{"source", "as_of", "description", "flat", "flat_rate",
                                            "quotes", "parallel_shift_bp", "key_rate_shifts"}))
      << context;
  for (const Ordered& quote : doc.at("curve").at("quotes"))
    EXPECT_EQ(keys_of(quote), (Keys{"kind", "tenor", "rate"})) << context;
  EXPECT_EQ(keys_of(doc.at("assumptions")), (Keys{"prepay", "default", "severity", "lag_months",
                                                  "advancing", "delinquent_default"}))
      << context;
  EXPECT_EQ(keys_of(doc.at("target")), (Keys{"kind", "value"})) << context;
  EXPECT_EQ(keys_of(doc.at("bid")), (Keys{"clean_price", "dirty_price", "accrued_pct", "accrued",
                                          "clean_value", "dirty_value"}))
      << context;
  const Keys view_keys = {"cash_flow_yield", "bey",       "z_spread",         "par_yield_at_wal",
                          "spread_at_wal",   "wal_years", "modified_duration"};
  EXPECT_EQ(keys_of(doc.at("loss_adjusted")), view_keys) << context;
  EXPECT_EQ(keys_of(doc.at("no_loss")), view_keys) << context;
  EXPECT_EQ(keys_of(doc.at("credit")),
            (Keys{"credit_cost_bp", "expected_loss", "expected_loss_pct"}))
      << context;
  EXPECT_EQ(keys_of(doc.at("risk")),
            (Keys{"effective_duration", "effective_convexity", "dv01", "shock_bp",
                  "key_rate_durations", "arm_loans"}))
      << context;
  EXPECT_EQ(keys_of(doc.at("loans_priced")), (Keys{"loans", "cutoff_balance", "net_coupon",
                                                   "rows_read", "rows_rejected", "upb_rejected"}))
      << context;
  ASSERT_TRUE(doc.at("rejected").is_array()) << context;
  for (const Ordered& reject : doc.at("rejected"))
    EXPECT_EQ(keys_of(reject), (Keys{"row", "loan_id", "field", "column", "value", "reason"}))
        << context;
  EXPECT_NE(doc.at("caution").get<std::string>().find("not investment advice"), std::string::npos);

  // Every measure a number (null only where a value could not be computed; none here).
  for (const char* section : {"bid", "loss_adjusted", "no_loss", "credit", "risk"})
    for (const auto& [key, value] : doc.at(section).items()) {
      if (key == "key_rate_durations") {
        ASSERT_EQ(value.size(), 4u) << context;  // 2, 5, 10 and 30 years
        for (const Ordered& k : value)
          EXPECT_EQ(keys_of(k), (Keys{"years", "duration"})) << context;
        continue;
      }
      EXPECT_TRUE(value.is_number()) << context << ": " << section << "." << key << " = " << value;
    }

  const Ordered& bid = doc.at("bid");
  const double upb = doc.at("loans_priced").at("cutoff_balance").get<double>();
  const double clean = bid.at("clean_price").get<double>(),
               dirty = bid.at("dirty_price").get<double>();
  // identity: dirty = clean + accrued, in percent and in dollars; value = price x UPB / 100.
  EXPECT_NEAR(dirty, clean + bid.at("accrued_pct").get<double>(), 1e-9) << context;
  EXPECT_NEAR(bid.at("accrued_pct").get<double>(), 100 * bid.at("accrued").get<double>() / upb,
              1e-9)
      << context;
  EXPECT_NEAR(bid.at("clean_value").get<double>(), clean * upb / 100, 1e-6) << context;
  EXPECT_NEAR(bid.at("dirty_value").get<double>(), dirty * upb / 100, 1e-6) << context;
  for (const char* view : {"loss_adjusted", "no_loss"}) {
    const Ordered& v = doc.at(view);
    const double cfy = v.at("cash_flow_yield").get<double>();
    // identity: BEY = 2[(1 + cfy/12)^6 - 1] (DESIGN.md section 5).
    EXPECT_NEAR(v.at("bey").get<double>(), 2 * (std::pow(1 + cfy / 12, 6) - 1), 1e-12)
        << context << " " << view;
    // identity: spread at WAL = BEY - the curve's par yield at the WAL.
    EXPECT_NEAR(v.at("spread_at_wal").get<double>(),
                v.at("bey").get<double>() - v.at("par_yield_at_wal").get<double>(), 1e-12)
        << context << " " << view;
  }
  // identity: credit cost = no-loss Z-spread - loss-adjusted Z-spread, in bp.
  EXPECT_NEAR(doc.at("credit").at("credit_cost_bp").get<double>(),
              1e4 * (doc.at("no_loss").at("z_spread").get<double>() -
                     doc.at("loss_adjusted").at("z_spread").get<double>()),
              1e-9)
      << context;
  // identity: expected loss in percent of the cut-off UPB.
  EXPECT_NEAR(doc.at("credit").at("expected_loss_pct").get<double>(),
              100 * doc.at("credit").at("expected_loss").get<double>() / upb, 1e-9)
      << context;
  const Ordered& priced = doc.at("loans_priced");
  // identity: rows read = loans priced + rows rejected.
  EXPECT_EQ(priced.at("rows_read").get<std::size_t>(),
            priced.at("loans").get<std::size_t>() + priced.at("rows_rejected").get<std::size_t>())
      << context;
  EXPECT_EQ(priced.at("rows_rejected").get<std::size_t>(), doc.at("rejected").size()) << context;
}

TEST_F(PriceCli, JsonHasTheDocumentedKeysOnBothDemoTapes) {
  struct Case {
    std::string name;
    std::vector<std::string> args;
  };
  const std::vector<Case> cases = {
      {"strict, swap curve, yield target",
       join({kStrictTape,
             {"--curve", kSwapCurve, "--settle", "2026-12-17", "--target-yield", "6.5"},
             kStrictAssumptions})},
      {"loose, treasury curve, spread target",
       join({kLooseTape,
             {"--curve", kTreasuryCurve, "--settle", "2026-12-17", "--target-spread", "250"},
             kLooseAssumptions})},
      {"loose, flat curve, price", join({kLooseTape, {"--curve", "4.25", "--price", "98.5"}})},
  };
  for (const Case& c : cases) {
    const Ordered doc = price_json(c.args);
    expect_documented_price_json(doc, c.name);
    if (!doc.is_object()) continue;
    EXPECT_EQ(doc.at("cutoff_date"), kCutoff) << c.name;
    EXPECT_EQ(doc.at("payment_delay_days"), 17) << c.name;
    EXPECT_EQ(doc.at("loans_priced").at("loans"), 2000) << c.name;  // demo-pools/README.md
    EXPECT_EQ(doc.at("loans_priced").at("rows_rejected"), 0) << c.name;
    EXPECT_TRUE(doc.at("rejected").empty()) << c.name;
    EXPECT_EQ(doc.at("risk").at("arm_loans"), 151) << c.name;  // the demo tapes' ARMs (SOFR30A)
    EXPECT_EQ(doc.at("risk").at("shock_bp"), 25.0) << c.name;
  }

  // The yield target: its value is the loss-adjusted BEY, decimal, and the bid meets it.
  const Ordered y = price_json(cases[0].args);
  ASSERT_TRUE(y.is_object());
  EXPECT_EQ(y.at("file"), kStrict);
  EXPECT_EQ(y.at("settlement_date"), "2026-12-17");
  EXPECT_EQ(y.at("target").at("kind"), "yield");
  EXPECT_DOUBLE_EQ(y.at("target").at("value").get<double>(), 0.065);
  EXPECT_NEAR(y.at("loss_adjusted").at("bey").get<double>(), 0.065, 1e-10);
  EXPECT_EQ(y.at("assumptions").at("prepay"), "psa:150");
  EXPECT_EQ(y.at("assumptions").at("default"), "sda:100");
  EXPECT_EQ(y.at("curve").at("source"), kSwapCurve);
  EXPECT_EQ(y.at("curve").at("as_of"), kCutoff);
  EXPECT_EQ(y.at("curve").at("flat"), false);
  EXPECT_TRUE(y.at("curve").at("flat_rate").is_null());
  EXPECT_EQ(y.at("curve").at("quotes").size(), 15u);  // the file's 15 quotes
  EXPECT_EQ(y.at("curve").at("quotes").at(0).at("kind"), "deposit");
  EXPECT_EQ(y.at("curve").at("quotes").at(0).at("tenor"), "1M");
  EXPECT_NEAR(y.at("curve").at("quotes").at(0).at("rate").get<double>(), 0.0388, 1e-15);
  // Accrued: UPB x net coupon x 16 days / 360 (30/360 bond basis, 2026-12-01 -> 2026-12-17).
  const double upb = y.at("loans_priced").at("cutoff_balance").get<double>();
  const double net_coupon = y.at("loans_priced").at("net_coupon").get<double>();
  EXPECT_NEAR(y.at("bid").at("accrued").get<double>(), upb * net_coupon * 16 / 360,
              1e-6);  // common practice
  // Losses cost yield: the no-loss view of the same price yields more.
  EXPECT_GT(y.at("no_loss").at("bey").get<double>(), y.at("loss_adjusted").at("bey").get<double>());
  EXPECT_GT(y.at("credit").at("credit_cost_bp").get<double>(), 0);
  EXPECT_GT(y.at("credit").at("expected_loss").get<double>(), 0);

  // The spread target: value in decimal (250 bp = 0.025).
  const Ordered z = price_json(cases[1].args);
  ASSERT_TRUE(z.is_object());
  EXPECT_EQ(z.at("file"), kLoose);
  EXPECT_EQ(z.at("target").at("kind"), "spread");
  EXPECT_DOUBLE_EQ(z.at("target").at("value").get<double>(), 0.025);
  EXPECT_NEAR(z.at("loss_adjusted").at("z_spread").get<double>(), 0.025, 1e-12);
  EXPECT_EQ(z.at("curve").at("quotes").at(0).at("kind"), "par_yield");
}

// ---- The three target forms ---------------------------------------------------------------------

// A yield target's clean price, read back with --price, gives the yield; the loss-adjusted
// Z-spread of that bid, given with --target-spread, gives the same price. Text and JSON agree.
TEST_F(PriceCli, TargetYieldSpreadAndPriceAgreeOnBothDemoTapes) {
  struct Case {
    std::string name;
    std::vector<std::string> common;
  };
  const std::vector<Case> cases = {
      {"strict",
       join({kStrictTape, {"--curve", kSwapCurve, "--settle", "2026-12-17"}, kStrictAssumptions})},
      {"loose",
       join(
           {kLooseTape, {"--curve", kTreasuryCurve, "--settle", "2026-12-17"}, kLooseAssumptions})},
  };
  for (const Case& c : cases) {
    const Ordered from_yield = price_json(with(c.common, {"--target-yield", "6.5"}));
    ASSERT_TRUE(from_yield.is_object()) << c.name;
    const double clean = from_yield.at("bid").at("clean_price").get<double>();
    const double z_bp = 1e4 * from_yield.at("loss_adjusted").at("z_spread").get<double>();
    EXPECT_NEAR(from_yield.at("loss_adjusted").at("bey").get<double>(), 0.065, 1e-10) << c.name;
    EXPECT_GT(clean, 80) << c.name;  // a plausible bid for 6% loans at a 6.5% yield
    EXPECT_LT(clean, 105) << c.name;

    const Ordered from_price = price_json(with(c.common, {"--price", number_text(clean)}));
    ASSERT_TRUE(from_price.is_object()) << c.name;
    EXPECT_EQ(from_price.at("target").at("kind"), "price");
    EXPECT_DOUBLE_EQ(from_price.at("target").at("value").get<double>(), clean);
    // identity: price(yield(P)) = P, so the yield at the yield target's price is the target.
    EXPECT_NEAR(from_price.at("loss_adjusted").at("bey").get<double>(), 0.065, 1e-8) << c.name;
    // identity: one price, one Z-spread.
    EXPECT_NEAR(1e4 * from_price.at("loss_adjusted").at("z_spread").get<double>(), z_bp, 1e-6)
        << c.name;

    const Ordered from_spread = price_json(with(c.common, {"--target-spread", number_text(z_bp)}));
    ASSERT_TRUE(from_spread.is_object()) << c.name;
    EXPECT_EQ(from_spread.at("target").at("kind"), "spread");
    // identity: price(spread(P)) = P.
    EXPECT_NEAR(from_spread.at("bid").at("clean_price").get<double>(), clean, 1e-8) << c.name;
    EXPECT_NEAR(from_spread.at("loss_adjusted").at("bey").get<double>(), 0.065, 1e-8) << c.name;
    // Everything that does not depend on the target form is the same in all three.
    for (const Ordered* other : {&from_price, &from_spread}) {
      EXPECT_EQ((*other).at("loans_priced"), from_yield.at("loans_priced")) << c.name;
      EXPECT_EQ((*other).at("curve"), from_yield.at("curve")) << c.name;
      EXPECT_EQ((*other).at("assumptions"), from_yield.at("assumptions")) << c.name;
      EXPECT_NEAR((*other).at("credit").at("expected_loss").get<double>(),
                  from_yield.at("credit").at("expected_loss").get<double>(), 1e-6)
          << c.name;
    }

    // The text reports: each names its target and shows the same bid, rounded to 3 places.
    const std::vector<std::pair<std::vector<std::string>, std::string>> texts = {
        {with(c.common, {"--target-yield", "6.5"}), "target: loss-adjusted yield 6.500% BEY"},
        {with(c.common, {"--target-spread", "250"}), "target: loss-adjusted Z-spread 250 bp"},
        {with(c.common, {"--price", number_text(clean)}), "target: clean price "},
    };
    for (const auto& [args, target_line] : texts) {
      std::vector<std::string> full = {"price"};
      full.insert(full.end(), args.begin(), args.end());
      const Outcome t = poolbid(full);
      ASSERT_EQ(t.exit_code, kOk) << shown(full) << "\n" << t;
      EXPECT_EQ(t.err, "") << shown(full);
      EXPECT_EQ(t.out.rfind("poolbid price: " + (c.name == "strict" ? kStrict : kLoose), 0), 0u)
          << t.out;
      EXPECT_NE(t.out.find(target_line), std::string::npos) << shown(full) << "\n" << t.out;
      EXPECT_NE(t.out.find("not investment advice"), std::string::npos) << t.out;
      EXPECT_NE(t.out.find("rejected rows: none"), std::string::npos) << t.out;
      if (target_line != "target: loss-adjusted Z-spread 250 bp") {
        EXPECT_NEAR(number_after(t.out, "clean price "), clean, 0.0005 + 1e-9) << t.out;
      }
    }
  }
}

// ---- Two sellers, one yield ---------------------------------------------------------------------

// The demo: both pools bid at a 6.50% loss-adjusted yield on one curve, the loosely underwritten
// one at twice the default curve. Its expected loss and credit cost are higher and its bid lower.
TEST_F(PriceCli, LooserSellerAtTwiceTheDefaultCurveBidsLower) {
  const std::vector<std::string> common = {"--curve",    kSwapCurve,       "--settle",
                                           "2026-12-17", "--target-yield", "6.5"};
  const Ordered strict = price_json(join({kStrictTape, common, kStrictAssumptions}));
  const Ordered loose = price_json(join({kLooseTape, common, kLooseAssumptions}));
  ASSERT_TRUE(strict.is_object() && loose.is_object());
  // The tapes carry the same balances loan by loan (demo-pools/README.md).
  EXPECT_EQ(strict.at("loans_priced").at("cutoff_balance"),
            loose.at("loans_priced").at("cutoff_balance"));
  EXPECT_LT(loose.at("bid").at("clean_price").get<double>(),
            strict.at("bid").at("clean_price").get<double>());
  EXPECT_LT(loose.at("bid").at("dirty_value").get<double>(),
            strict.at("bid").at("dirty_value").get<double>());
  EXPECT_GT(loose.at("credit").at("expected_loss").get<double>(),
            strict.at("credit").at("expected_loss").get<double>());
  EXPECT_GT(loose.at("credit").at("expected_loss_pct").get<double>(),
            strict.at("credit").at("expected_loss_pct").get<double>());
  EXPECT_GT(loose.at("credit").at("credit_cost_bp").get<double>(),
            strict.at("credit").at("credit_cost_bp").get<double>());
  // Both at the target yield.
  EXPECT_NEAR(strict.at("loss_adjusted").at("bey").get<double>(), 0.065, 1e-10);
  EXPECT_NEAR(loose.at("loss_adjusted").at("bey").get<double>(), 0.065, 1e-10);

  // Under the same assumptions the two tapes (same balances, coupons and terms; the curves are
  // pool-wide) price the same, so the gap above is the default assumption's alone.
  const Ordered loose_at_100 = price_json(join({kLooseTape, common, kStrictAssumptions}));
  ASSERT_TRUE(loose_at_100.is_object());
  EXPECT_NEAR(loose_at_100.at("bid").at("clean_price").get<double>(),
              strict.at("bid").at("clean_price").get<double>(), 1e-9);
}

// ---- The curve option ---------------------------------------------------------------------------

TEST_F(PriceCli, FlatCurveIsANumberInPercentDatedAtTheCutoff) {
  const Ordered doc = price_json(join({kStrictTape, {"--curve", "4.25", "--target-yield", "6.5"}}));
  ASSERT_TRUE(doc.is_object());
  expect_documented_price_json(doc, "flat 4.25");
  EXPECT_EQ(doc.at("curve").at("flat"), true);
  EXPECT_EQ(doc.at("curve").at("flat_rate").get<double>(), 0.0425);  // the double nearest 4.25%
  EXPECT_TRUE(doc.at("curve").at("quotes").empty());
  EXPECT_EQ(doc.at("curve").at("as_of"), kCutoff);
  EXPECT_NE(doc.at("curve").at("source").get<std::string>().find("4.25"), std::string::npos)
      << doc.at("curve").at("source");
  // Without --settle, settlement is the cut-off (the curve is dated there too): no accrued.
  EXPECT_EQ(doc.at("settlement_date"), kCutoff);
  EXPECT_EQ(doc.at("bid").at("accrued").get<double>(), 0.0);
  EXPECT_EQ(doc.at("bid").at("clean_price"), doc.at("bid").at("dirty_price"));
  // The flat curve has every index: the ARMs reset on it.
  EXPECT_EQ(doc.at("risk").at("arm_loans"), 151);

  const Outcome text =
      poolbid(join({{"price"}, kStrictTape, {"--curve", "4.25", "--price", "98.5"}}));
  ASSERT_EQ(text.exit_code, kOk) << text;
  EXPECT_NE(text.out.find("flat 4.250%"), std::string::npos) << text.out;
  EXPECT_NE(text.out.find("target: clean price 98.500"), std::string::npos) << text.out;
  EXPECT_NEAR(number_after(text.out, "clean price "), 98.5, 1e-12) << text.out;
}

TEST_F(PriceCli, EveryRowRejectedListsThemAndExitsThree) {
  // The bad tape's header and two of its rejected rows (negative balance, note rate 31%).
  const std::vector<std::string> bad = lines_of(read_file(kSource / kBadTape));
  std::string text = bad[0] + "\n";
  for (const std::string& line : bad)
    if (line.find(",-") != std::string::npos) text += line + "\n";
  const fs::path tape = write_scratch("all-bad.csv", text);
  const std::vector<std::string> args = {"price", tape.string(), "--cutoff", kCutoff, "--curve",
                                         "4",     "--price",     "98"};
  const Outcome r = poolbid(args);
  EXPECT_EQ(r.exit_code, kRowsRejected) << shown(args) << "\n" << r;
  EXPECT_EQ(r.out, "");
  EXPECT_NE(r.err.find("no accepted loan to price"), std::string::npos) << r;
  EXPECT_NE(r.err.find("row"), std::string::npos) << r;
}

TEST_F(PriceCli, LoansThroughASymlinkOrIntoAPipe) {
  // A symbolic link is followed: the file it names gets the values, the link stays a link.
  const fs::path real = write_scratch("real.csv", "");
  const fs::path link = scratch_ / "link.csv";
  fs::create_symlink(real, link);
  const std::vector<std::string> args = {"price",  kStrict, "--cutoff", kCutoff,      "--curve",
                                         "4",      "--price", "98",     "--loans", link.string()};
  const Outcome r = poolbid(args);
  ASSERT_EQ(r.exit_code, kOk) << r;
  EXPECT_TRUE(fs::is_symlink(link));
  EXPECT_EQ(lines_of(read_file(real)).size(), 2001u);  // header + 2,000 loans
  // A path that is not a regular file (here /dev/null) is written, not replaced.
  const Outcome null_out = poolbid({"price", kStrict, "--cutoff", kCutoff, "--curve", "4",
                                    "--price", "98", "--loans", "/dev/null"});
  ASSERT_EQ(null_out.exit_code, kOk) << null_out;
  EXPECT_TRUE(fs::is_character_file("/dev/null"));
}

TEST_F(PriceCli, KeyRateTenorsAreChosenOrTurnedOff) {
  const std::vector<std::string> base = join({kStrictTape, {"--curve", "4.25", "--price", "98.5"}});
  const Ordered standard = price_json(base);
  ASSERT_TRUE(standard.is_object());
  const Ordered& keys = standard.at("risk").at("key_rate_durations");
  ASSERT_EQ(keys.size(), 4u);
  double sum = 0;
  for (const Ordered& k : keys) sum += k.at("duration").get<double>();
  // identity: the key-rate triangles add up to a parallel shift (to first order in the shock).
  EXPECT_NEAR(sum, standard.at("risk").at("effective_duration").get<double>(), 2e-3);

  const Ordered none = price_json(join({base, {"--key-rates", "none"}}));
  ASSERT_TRUE(none.is_object());
  EXPECT_TRUE(none.at("risk").at("key_rate_durations").empty());
  EXPECT_EQ(none.at("risk").at("effective_duration"), standard.at("risk").at("effective_duration"));

  const Ordered three = price_json(join({base, {"--key-rates", "1,3.5,7"}}));
  ASSERT_TRUE(three.is_object());
  ASSERT_EQ(three.at("risk").at("key_rate_durations").size(), 3u);
  EXPECT_EQ(three.at("risk").at("key_rate_durations")[1].at("years").get<double>(), 3.5);

  for (const std::string bad : {"5,2", "x", "2,,5", "0", "60", ""}) {
    const std::vector<std::string> args = join({{"price"}, base, {"--key-rates", bad}});
    const Outcome r = poolbid(args);
    EXPECT_EQ(r.exit_code, kUnusableInput) << shown(args) << "\n" << r;
    EXPECT_NE(r.err.find("--key-rates"), std::string::npos) << r;
    EXPECT_EQ(r.out, "");
  }
}

// A flat rate written with an exponent is the same number of percent as without (or refused).
TEST_F(PriceCli, FlatCurveWithAnExponentIsNeverAnotherRate) {
  const Ordered plain = price_json(join({kStrictTape, {"--curve", "4.25", "--price", "98.5"}}));
  ASSERT_TRUE(plain.is_object());
  for (const std::string spelling : {"425e-2", "4.25e0", "0.0425e2"}) {
    const std::vector<std::string> args =
        join({{"price"}, kStrictTape, {"--curve", spelling, "--price", "98.5", "--json"}});
    const Outcome r = poolbid(args);
    if (r.exit_code == kUnusableInput) {  // refused: fine, if it says which option
      EXPECT_NE(r.err.find("--curve"), std::string::npos) << shown(args) << "\n" << r;
      continue;
    }
    ASSERT_EQ(r.exit_code, kOk) << shown(args) << "\n" << r;
    const Ordered doc = Ordered::parse(r.out);
    EXPECT_NEAR(doc.at("curve").at("flat_rate").get<double>(), 0.0425, 1e-15) << spelling;
    EXPECT_NEAR(doc.at("loss_adjusted").at("z_spread").get<double>(),
                plain.at("loss_adjusted").at("z_spread").get<double>(), 1e-12)
        << spelling;
  }
}

TEST_F(PriceCli, UnusableCurveExitsFiveAndNamesIt) {
  const fs::path not_json = write_scratch("not-a-curve.json", "deposit 1M 3.88\n");
  const fs::path no_quotes = write_scratch("no-quotes.json", R"({"as_of": "2026-12-01"})");
  struct Case {
    std::string curve;
    std::vector<std::string> needles;
  };
  const std::vector<Case> cases = {
      {"demo-pools/no-such-curve.json", {"demo-pools/no-such-curve.json"}},
      {not_json.string(), {not_json.string()}},
      {no_quotes.string(), {no_quotes.string()}},
      {"99", {"--curve", "99"}},
      {"-7", {"--curve", "-7"}},
      {"30", {"--curve", "30"}},
  };
  for (const Case& c : cases) {
    const std::vector<std::string> args =
        join({{"price"}, kStrictTape, {"--curve", c.curve, "--target-yield", "6.5"}});
    expect_one_error_line(poolbid(args), kUnusableInput, c.needles, shown(args));
  }
  // Just inside the range reads.
  EXPECT_EQ(poolbid(join({{"price"}, kStrictTape, {"--curve", "29.5", "--price", "90"}})).exit_code,
            kOk);
}

// A curve without the tape's ARM index cannot reset them: exit 5, naming the file and the index.
TEST_F(PriceCli, CurveWithoutTheTapesIndexExitsFive) {
  const fs::path none = curve_variant("no-indexes.json", kCutoff, Ordered());
  const fs::path other =
      curve_variant("cmt-only.json", kCutoff, Ordered::parse(R"({"CMT1Y": {"tenor": "12M"}})"));
  for (const fs::path& curve : {none, other}) {
    const std::vector<std::string> price_args =
        join({{"price"}, kStrictTape, {"--curve", curve.string(), "--target-yield", "6.5"}});
    expect_one_error_line(poolbid(price_args), kUnusableInput, {curve.string(), "SOFR30A"},
                          shown(price_args));
    const fs::path csv = scratch_ / "pool.csv";
    const std::vector<std::string> cashflow_args =
        join({{"cashflows"}, kStrictTape, {"--curve", curve.string(), "--csv", csv.string()}});
    expect_one_error_line(poolbid(cashflow_args), kUnusableInput, {curve.string(), "SOFR30A"},
                          shown(cashflow_args));
    EXPECT_FALSE(fs::exists(csv));
  }
  // A tape without ARMs needs no index.
  const std::vector<std::string> fixed_args = {
      "price",       fixed_only_tape().string(), "--cutoff", kCutoff, "--curve",
      none.string(), "--target-yield",           "6.5"};
  const Outcome fixed = poolbid(fixed_args);
  EXPECT_EQ(fixed.exit_code, kOk) << shown(fixed_args) << "\n" << fixed;
}

// ---- Usage --------------------------------------------------------------------------------------

TEST_F(PriceCli, UsageErrorsExitTwo) {
  const std::vector<std::string> base = join({{"price"}, kStrictTape, {"--curve", kSwapCurve}});
  const std::vector<std::vector<std::string>> cases = {
      base,  // no target
      with(base, {"--target-yield", "6.5", "--target-spread", "250"}),
      with(base, {"--target-yield", "6.5", "--price", "98"}),
      with(base, {"--target-spread", "250", "--price", "98"}),
      with(base, {"--target-yield", "6.5", "--target-spread", "250", "--price", "98"}),
      with(base, {"--target-yield", "6.5", "--loans", "-"}),
      with(base, {"--target-yield", "abc"}),
      with(base, {"--price", "0"}),
      with(base, {"--target-yield", "6.5", "--shock", "0"}),
      with(base, {"--target-yield", "6.5", "--threads", "-1"}),
      join({{"price"}, kStrictTape, {"--target-yield", "6.5"}}),  // no curve
      {"price"},
  };
  for (const std::vector<std::string>& args : cases) {
    const Outcome r = poolbid(args);
    EXPECT_EQ(r.exit_code, kUsage) << shown(args) << "\n" << r;
    EXPECT_EQ(r.out, "") << shown(args);
    EXPECT_NE(r.err, "") << shown(args);
  }
  // The missing target: the message says what would do.
  const Outcome none = poolbid(base);
  EXPECT_NE(none.err.find("--target-yield"), std::string::npos) << none.err;
  EXPECT_NE(none.err.find("--price"), std::string::npos) << none.err;
  EXPECT_TRUE(fs::is_empty(scratch_));
}

// ---- Settlement ---------------------------------------------------------------------------------

TEST_F(PriceCli, SettlementOutsideItsWindowExitsFiveWithTheDate) {
  const std::vector<std::string> base =
      join({{"price"}, kStrictTape, {"--curve", kSwapCurve, "--target-yield", "6.5"}});
  // A curve dated after the cut-off.
  const fs::path later_curve =
      curve_variant("curve-2026-12-10.json", "2026-12-10",
                    Ordered::parse(R"({"SOFR30A": {"tenor": "1M", "spread": 0}})"));
  const std::vector<std::string> later =
      join({{"price"}, kStrictTape, {"--curve", later_curve.string(), "--target-yield", "6.5"}});
  struct Case {
    std::vector<std::string> args;
    std::vector<std::string> needles;
  };
  const std::vector<Case> cases = {
      {with(base, {"--settle", "2026-11-30"}), {"--settle", "2026-11-30", kCutoff}},
      {with(later, {"--settle", "2026-12-05"}), {"--settle", "2026-12-05", "2026-12-10"}},
      {with(base, {"--settle", kFirstPayment}), {"--settle", kFirstPayment}},
      {with(base, {"--settle", "2027-02-01"}), {"--settle", "2027-02-01", kFirstPayment}},
      {with(base, {"--settle", "2027-01-01", "--delay", "0"}), {"--settle", "2027-01-01"}},
      {with(base, {"--settle", "tomorrow"}), {"--settle", "tomorrow"}},
      {with(base, {"--settle", "2026-13-01"}), {"--settle", "2026-13-01"}},
      {with(base, {"--settle", "2026-12-32"}), {"--settle", "2026-12-32"}},
  };
  for (const Case& c : cases)
    expect_one_error_line(poolbid(c.args), kUnusableInput, c.needles, shown(c.args));

  // The last day before the first payment settles; so does the M/D/YYYY spelling.
  const Ordered last_day = price_json(
      with(std::vector<std::string>(base.begin() + 1, base.end()), {"--settle", "2027-01-17"}));
  ASSERT_TRUE(last_day.is_object());
  EXPECT_EQ(last_day.at("settlement_date"), "2027-01-17");
  // 30/360 bond basis: 2026-12-01 -> 2027-01-17 is 46 days.
  EXPECT_NEAR(last_day.at("bid").at("accrued").get<double>(),
              last_day.at("loans_priced").at("cutoff_balance").get<double>() *
                  last_day.at("loans_priced").at("net_coupon").get<double>() * 46 / 360,
              1e-6);  // common practice
  const Ordered us_date = price_json(
      with(std::vector<std::string>(base.begin() + 1, base.end()), {"--settle", "12/17/2026"}));
  ASSERT_TRUE(us_date.is_object());
  EXPECT_EQ(us_date.at("settlement_date"), "2026-12-17");

  // Without --settle, settlement is the later of the cut-off and the curve's date (a tape of
  // fixed-rate loans: ARMs on a curve dated after the cut-off are the next test's).
  const Ordered by_curve = price_json({fixed_only_tape().string(), "--cutoff", kCutoff, "--curve",
                                       later_curve.string(), "--target-yield", "6.5"});
  ASSERT_TRUE(by_curve.is_object());
  EXPECT_EQ(by_curve.at("settlement_date"), "2026-12-10");
  EXPECT_EQ(by_curve.at("curve").at("as_of"), "2026-12-10");
  // ... and when that is on or after the first payment, the command says so with the date.
  const fs::path too_late =
      curve_variant("curve-2027-02-01.json", "2027-02-01",
                    Ordered::parse(R"({"SOFR30A": {"tenor": "1M", "spread": 0}})"));
  const std::vector<std::string> late =
      join({{"price"}, kStrictTape, {"--curve", too_late.string(), "--target-yield", "6.5"}});
  expect_one_error_line(poolbid(late), kUnusableInput, {"--settle", "2027-02-01", kFirstPayment},
                        shown(late));
}

// ARMs on a curve dated after the cut-off: months before the curve's date have no index forward.
// The command either prices them or says why (exit 5, naming the curve's date), never exit 1.
TEST_F(PriceCli, ArmsOnACurveDatedAfterTheCutoffAreNotAnInternalError) {
  const fs::path later_curve =
      curve_variant("curve-2026-12-10.json", "2026-12-10",
                    Ordered::parse(R"({"SOFR30A": {"tenor": "1M", "spread": 0}})"));
  const std::vector<std::vector<std::string>> cases = {
      join({{"price"}, kStrictTape, {"--curve", later_curve.string(), "--target-yield", "6.5"}}),
      join({{"price"},
            kStrictTape,
            {"--curve", later_curve.string(), "--target-yield", "6.5", "--settle", "2026-12-17"}}),
      join({{"cashflows"}, kStrictTape, {"--curve", later_curve.string()}}),
  };
  for (const std::vector<std::string>& args : cases) {
    const Outcome r = poolbid(args);
    EXPECT_TRUE(r.exit_code == kOk || r.exit_code == kUnusableInput) << shown(args) << "\n" << r;
    if (r.exit_code == kUnusableInput) {
      EXPECT_NE(r.err.find("2026-12-10"), std::string::npos) << r.err;
      EXPECT_EQ(r.out, "");
    }
  }
}

// ---- A target no price meets --------------------------------------------------------------------

TEST_F(PriceCli, PriceNoYieldMeetsExitsSevenAndWritesNothing) {
  // Two loans with one and two payments left: their cash totals about 100.7% of UPB.
  const std::string header = lines_of(read_file(kSource / kStrict)).at(0);
  const std::string tail =
      ",0.25,360,{remaining},{age},fixed,,,,,,,,,,784,67.83,67.83,588162,2025-12-11,31.41,owner,"
      "single_family,purchase,full,ID,current\n";
  auto loan = [&](const std::string& id, const std::string& balance, int remaining) {
    std::string row = id + ",Brindlecote Home Loans," + balance + ",200000.00,6.5" + tail;
    row.replace(row.find("{remaining}"), 11, std::to_string(remaining));
    row.replace(row.find("{age}"), 5, std::to_string(360 - remaining));
    return row;
  };
  const fs::path tape = write_scratch(
      "short.csv", header + "\n" + loan("S-1", "1500.00", 1) + loan("S-2", "3000.00", 2));
  const std::vector<std::string> base = {"price", tape.string(), "--cutoff",
                                         kCutoff, "--curve",     "4"};
  // A fair price reads: the tape is fine.
  const Outcome fair = poolbid(with(base, {"--price", "100", "--json"}));
  ASSERT_EQ(fair.exit_code, kOk) << fair;
  EXPECT_EQ(Ordered::parse(fair.out).at("loans_priced").at("loans"), 2);

  const fs::path values = scratch_ / "values.csv";
  for (const std::string price : {"1000", "500"}) {
    for (const std::string form : {"text", "json"}) {
      std::vector<std::string> args = with(base, {"--price", price, "--loans", values.string()});
      if (form == "json") args.push_back("--json");
      expect_one_error_line(poolbid(args), kNoSolution, {price}, shown(args));
      EXPECT_FALSE(fs::exists(values)) << shown(args);
      EXPECT_FALSE(fs::exists(values.string() + ".partial")) << shown(args);
    }
  }
  EXPECT_EQ(names_in_scratch(), (std::set<std::string>{"short.csv"}));
}

// ---- A tape with rejected rows ------------------------------------------------------------------

TEST_F(PriceCli, BadTapeExitsThreePricesTheRestAndListsTheRejects) {
  const std::vector<std::string> args = {kBadTape, "--cutoff",       kCutoff, "--curve",
                                         "4.25",   "--target-yield", "6.5"};
  const Ordered doc = price_json(args, kRowsRejected);
  ASSERT_TRUE(doc.is_object());
  expect_documented_price_json(doc, "bad tape");
  EXPECT_EQ(doc.at("loans_priced").at("rows_read"), 40);
  EXPECT_EQ(doc.at("loans_priced").at("rows_rejected"), kBadTapeRejectedRows.size());
  EXPECT_EQ(doc.at("loans_priced").at("loans"), 40 - kBadTapeRejectedRows.size());
  std::set<std::size_t> in_json;
  for (const Ordered& p : doc.at("rejected")) in_json.insert(p.at("row").get<std::size_t>());
  EXPECT_EQ(in_json, kBadTapeRejectedRows);
  EXPECT_NEAR(doc.at("loss_adjusted").at("bey").get<double>(), 0.065, 1e-10);  // still priced

  const Outcome text = poolbid(join({{"price"}, args}));
  ASSERT_EQ(text.exit_code, kRowsRejected) << text;
  EXPECT_EQ(text.err, "");
  EXPECT_NE(text.out.find("target: loss-adjusted yield 6.500% BEY"), std::string::npos);
  EXPECT_NE(text.out.find("clean price"), std::string::npos);
  EXPECT_EQ(rows_listed_after(text.out, "rejected rows: 14 rows rejected"), kBadTapeRejectedRows)
      << text.out;

  // The values file holds the priced loans only.
  const fs::path values = scratch_ / "values.csv";
  const Outcome with_values = poolbid(join({{"price"}, args, {"--loans", values.string()}}));
  ASSERT_EQ(with_values.exit_code, kRowsRejected) << with_values;
  EXPECT_EQ(with_values.out, text.out);
  EXPECT_EQ(lines_of(read_file(values)).size(), 1 + 40 - kBadTapeRejectedRows.size());
}

// ---- Per-loan values ----------------------------------------------------------------------------

TEST_F(PriceCli, LoansFileHasOneLinePerLoanAndSumsToTheDirtyValue) {
  struct Case {
    std::string name;
    std::vector<std::string> args;
    std::string first, last;  // loan id and row of the first and last lines
  };
  const std::vector<Case> cases = {
      {"strict",
       join({kStrictTape,
             {"--curve", kSwapCurve, "--settle", "2026-12-17", "--target-yield", "6.5"},
             kStrictAssumptions}),
       "BHL-000001,2,Brindlecote Home Loans,", "BHL-002000,2001,Brindlecote Home Loans,"},
      {"loose",
       join({kLooseTape, {"--curve", kTreasuryCurve, "--target-spread", "250"}, kLooseAssumptions}),
       "SMF-000001,2,Sallowmere Funding,", "SMF-002000,2001,Sallowmere Funding,"},
  };
  for (const Case& c : cases) {
    const fs::path values = scratch_ / ("values-" + c.name + ".csv");
    const Ordered without = price_json(c.args);
    const Ordered doc = price_json(with(c.args, {"--loans", values.string()}));
    ASSERT_TRUE(doc.is_object() && without.is_object()) << c.name;
    // Asking for loan values changes no pool number.
    EXPECT_EQ(doc, without) << c.name;

    const std::string text = read_file(values);
    ASSERT_FALSE(text.empty()) << c.name;
    EXPECT_EQ(text.back(), '\n');
    EXPECT_EQ(text.find('\r'), std::string::npos);
    const std::vector<std::string> lines = lines_of(text);
    ASSERT_EQ(lines.size(), 2001u) << c.name;  // header + 2,000 loans (demo-pools/README.md)
    EXPECT_EQ(lines[0], kValuesHeader);
    EXPECT_EQ(lines[1].rfind(c.first, 0), 0u) << lines[1];  // tape order, tape row
    EXPECT_EQ(lines[2000].rfind(c.last, 0), 0u) << lines[2000];

    const std::vector<std::string> header = cells_of(lines[0]);
    const std::size_t balance_col = column_of(header, "cutoff_balance"),
                      value_col = column_of(header, "value"),
                      price_col = column_of(header, "dirty_price"),
                      loss_col = column_of(header, "expected_loss"),
                      loss_pct_col = column_of(header, "loss_pct");
    double value_sum = 0, balance_sum = 0, loss_sum = 0;
    for (std::size_t i = 1; i < lines.size(); ++i) {
      const std::vector<std::string> cells = cells_of(lines[i]);
      ASSERT_EQ(cells.size(), 10u) << lines[i];
      const double balance = std::stod(cells[balance_col]), value = std::stod(cells[value_col]);
      const double loss = std::stod(cells[loss_col]);
      value_sum += value;
      balance_sum += balance;
      loss_sum += loss;
      // dirty_price = value / balance x 100, the value before its rounding to the cent.
      EXPECT_NEAR(std::stod(cells[price_col]), 100 * value / balance, 100 * 0.005 / balance + 5e-7)
          << lines[i];
      EXPECT_NEAR(std::stod(cells[loss_pct_col]), 100 * loss / balance,
                  100 * 0.005 / balance + 5e-5)
          << lines[i];
      EXPECT_GT(value, 0) << lines[i];
    }
    const double loans = static_cast<double>(lines.size() - 1);
    const double dirty_value = doc.at("bid").at("dirty_value").get<double>();
    // identity: the loans' values at the pool's yield add up to the pool's dirty value (each
    // rounded to the cent).
    EXPECT_NEAR(value_sum, dirty_value, 0.01 * loans) << c.name;
    EXPECT_NEAR(value_sum / dirty_value, 1.0, 1e-6) << c.name;
    // identity: balances and expected losses add up to the pool's.
    EXPECT_NEAR(balance_sum, doc.at("loans_priced").at("cutoff_balance").get<double>(), 1e-4);
    EXPECT_NEAR(loss_sum, doc.at("credit").at("expected_loss").get<double>(), 0.01 * loans);
    EXPECT_FALSE(fs::exists(values.string() + ".partial"));
  }
}

TEST_F(PriceCli, LoansNamingAnInputExitsTwoAndLeavesItUnchanged) {
  // Copies, so a failure cannot harm the repository's demo files.
  const fs::path tape = scratch_ / "tape.csv", map = scratch_ / "map.json",
                 curve = scratch_ / "curve.json", assumptions = scratch_ / "assumptions.json";
  fs::copy_file(kSource / kLoose, tape);
  fs::copy_file(kSource / kLooseMap, map);
  fs::copy_file(kSource / kSwapCurve, curve);
  std::ofstream(assumptions) << R"({"prepay": "psa:150", "default": "sda:200"})";
  const std::set<std::string> before = names_in_scratch();
  const std::vector<std::string> base = {
      "price",          tape.string(),  "--map",         map.string(),
      "--curve",        curve.string(), "--assumptions", assumptions.string(),
      "--target-yield", "6.5"};
  const Outcome fine = poolbid(base);
  ASSERT_EQ(fine.exit_code, kOk) << fine;
  const fs::path other_spelling = scratch_ / ".." / scratch_.filename() / "tape.csv";
  for (const fs::path& input : {tape, map, curve, assumptions, other_spelling}) {
    const std::string bytes = read_file(input);
    const std::vector<std::string> args = with(base, {"--loans", input.string()});
    const Outcome r = poolbid(args);
    EXPECT_EQ(r.exit_code, kUsage) << shown(args) << "\n" << r;
    EXPECT_EQ(r.out, "") << shown(args);
    EXPECT_NE(r.err.find("--loans"), std::string::npos) << r.err;
    EXPECT_EQ(read_file(input), bytes) << input << " changed";
    EXPECT_EQ(names_in_scratch(), before) << shown(args);
  }
}

TEST_F(PriceCli, UnwritableLoansFileExitsSixAndLeavesNothing) {
  const std::vector<std::string> base =
      join({{"price"}, kStrictTape, {"--curve", kSwapCurve, "--target-yield", "6.5"}});
  const fs::path folder = scratch_ / "no-such-folder";
  const fs::path in_missing_folder = folder / "values.csv";
  for (const std::string form : {"text", "json"}) {
    std::vector<std::string> args = with(base, {"--loans", in_missing_folder.string()});
    if (form == "json") args.push_back("--json");
    expect_one_error_line(poolbid(args), kCannotWrite, {in_missing_folder.string()}, shown(args));
    EXPECT_FALSE(fs::exists(folder)) << shown(args);
    EXPECT_TRUE(fs::is_empty(scratch_)) << shown(args);
  }
  // Onto a folder: refused, the folder untouched, nothing beside it.
  const fs::path a_folder = scratch_ / "a-folder";
  fs::create_directories(a_folder);
  const std::vector<std::string> args = with(base, {"--loans", a_folder.string()});
  expect_one_error_line(poolbid(args), kCannotWrite, {a_folder.string()}, shown(args));
  EXPECT_TRUE(fs::is_empty(a_folder));
  EXPECT_EQ(names_in_scratch(), (std::set<std::string>{"a-folder"}));
}

// ---- Threads ------------------------------------------------------------------------------------

TEST_F(PriceCli, OutputsDoNotDependOnThreads) {
  // 10,000 loans: three of the engine's 4,096-loan chunks, so two and three threads share work.
  const fs::path tape = scratch_ / "loose-10000.csv";
  const Outcome made = poolbid({"demo-tape", "--loans", "10000", "--profile", "loose", "--seed",
                                "7", "--out", tape.string()});
  ASSERT_EQ(made.exit_code, kOk) << made;
  const std::vector<std::string> tape_lines = lines_of(read_file(tape));
  ASSERT_EQ(tape_lines.size(), 10001u);  // header + 10,000 loans
  const std::size_t type_col = column_of(cells_of(tape_lines[0]), "amortization_type");
  std::size_t arms = 0;
  for (std::size_t i = 1; i < tape_lines.size(); ++i)
    if (cells_of(tape_lines[i]).at(type_col) == "arm") ++arms;
  ASSERT_GT(arms, 100u) << "the generated tape should carry ARMs";

  std::vector<std::string> documents, value_files;
  for (const std::string threads : {"1", "2", "3"}) {
    const fs::path values = scratch_ / ("values-" + threads + ".csv");
    const std::vector<std::string> args = {
        "price",          tape.string(), "--cutoff",    kCutoff,    "--curve",    kSwapCurve,
        "--prepay",       "psa:150",     "--default",   "sda:200",  "--severity", "45",
        "--lag",          "6",           "--advancing", "interest", "--settle",   "2026-12-17",
        "--target-yield", "6.5",         "--threads",   threads,    "--loans",    values.string(),
        "--json"};
    const Outcome r = poolbid(args);
    ASSERT_EQ(r.exit_code, kOk) << shown(args) << "\n" << r;
    documents.push_back(r.out);
    value_files.push_back(read_file(values));
  }
  const Ordered doc = Ordered::parse(documents[0]);
  EXPECT_EQ(doc.at("risk").at("arm_loans"), arms);
  EXPECT_EQ(doc.at("loans_priced").at("loans"), 10000);
  ASSERT_EQ(line_count(value_files[0]), 10001u);
  // Byte for byte (EXPECT_TRUE: a failing EXPECT_EQ would print megabytes).
  EXPECT_TRUE(documents[0] == documents[1]) << "JSON: --threads 1 and 2 differ";
  EXPECT_TRUE(documents[0] == documents[2]) << "JSON: --threads 1 and 3 differ";
  EXPECT_TRUE(value_files[0] == value_files[1]) << "--loans CSV: --threads 1 and 2 differ";
  EXPECT_TRUE(value_files[0] == value_files[2]) << "--loans CSV: --threads 1 and 3 differ";
}

// ---- cashflows --curve --------------------------------------------------------------------------

// The monthly CSV of `cashflows TAPE --cutoff ... --csv FILE` plus `more`, as lines.
class CashflowsCurve : public PriceCli {
 protected:
  std::vector<std::string> monthly(const fs::path& tape, const std::string& name,
                                   const std::vector<std::string>& more) const {
    const fs::path csv = scratch_ / name;
    std::vector<std::string> args = {"cashflows", tape.string(), "--cutoff", kCutoff, "--prepay",
                                     "psa:150",   "--default",   "sda:100",  "--csv", csv.string()};
    args.insert(args.end(), more.begin(), more.end());
    const Outcome r = poolbid(args);
    EXPECT_EQ(r.exit_code, kOk) << shown(args) << "\n" << r;
    EXPECT_EQ(r.out, "") << shown(args);
    return lines_of(read_file(csv));
  }
};

double column_total(const std::vector<std::string>& table, const std::string& column) {
  if (table.empty()) return std::numeric_limits<double>::quiet_NaN();
  const std::size_t col = column_of(cells_of(table[0]), column);
  double total = 0;
  for (std::size_t i = 1; i < table.size(); ++i) total += std::stod(cells_of(table[i]).at(col));
  return total;
}

// The first month whose line differs; 0 when the tables are the same.
std::size_t first_differing_month(const std::vector<std::string>& a,
                                  const std::vector<std::string>& b) {
  for (std::size_t t = 1; t < std::min(a.size(), b.size()); ++t)
    if (a[t] != b[t]) return t;
  return a.size() == b.size() ? 0 : std::min(a.size(), b.size());
}

// An ARM's coupon resets in projection month t when its age then (age at cut-off + t,
// DESIGN.md section 3) is the first reset month or a whole number of reset periods after it.
int first_reset_month(int age, int first_reset, int period) {
  for (int t = 1; t <= 480; ++t) {
    const int age_then = age + t;
    if (age_then >= first_reset && (age_then - first_reset) % period == 0) return t;
  }
  return 0;
}

TEST_F(CashflowsCurve, ReportsSayWhereTheArmCouponsCameFrom) {
  const std::vector<std::string> base = {"cashflows", kStrict, "--cutoff", kCutoff};
  const Outcome plain = poolbid(base);
  ASSERT_EQ(plain.exit_code, kOk) << plain;
  EXPECT_NE(plain.out.find("held at the cut-off note rate (no --curve)"), std::string::npos);
  std::vector<std::string> with_curve = base;
  with_curve.insert(with_curve.end(), {"--curve", kSwapCurve});
  const Outcome text = poolbid(with_curve);
  ASSERT_EQ(text.exit_code, kOk) << text;
  EXPECT_NE(text.out.find("reset on the index forwards of " + kSwapCurve + " (as of 2026-12-01)"),
            std::string::npos)
      << text.out.substr(0, 1500);
  with_curve.push_back("--json");
  const Outcome json = poolbid(with_curve);
  ASSERT_EQ(json.exit_code, kOk) << json;
  const Ordered doc = Ordered::parse(json.out);
  EXPECT_EQ(doc.at("arm_curve").at("source"), kSwapCurve);
  EXPECT_EQ(doc.at("arm_curve").at("as_of"), "2026-12-01");
}

TEST_F(CashflowsCurve, ArmsResetOnTheCurvesIndexForwards) {
  // The demo tape as it is: 151 SOFR30A ARMs, two of them (age 60, first reset at 61) due to reset
  // in month 1, which the tape's note rate is taken to include: their first projected reset is
  // month 13.
  const fs::path strict = kSource / kStrict;
  const std::vector<std::string> note_rate = monthly(strict, "note-rate.csv", {});
  const std::vector<std::string> on_curve = monthly(strict, "curve.csv", {"--curve", kSwapCurve});
  ASSERT_GE(note_rate.size(), 300u);
  ASSERT_EQ(on_curve.size(), note_rate.size());  // the same terms
  EXPECT_EQ(on_curve[0], note_rate[0]);          // the header
  EXPECT_NE(column_total(on_curve, "cash_flow"), column_total(note_rate, "cash_flow"));
  EXPECT_NE(column_total(on_curve, "gross_interest"), column_total(note_rate, "gross_interest"));
  // Month 1 pays every loan's tape rate, with or without the curve.
  EXPECT_EQ(on_curve[1], note_rate[1]);

  // The first month that differs is the first projected reset of any ARM.
  const std::vector<std::string> tape = lines_of(read_file(strict));
  const std::vector<std::string> header = cells_of(tape[0]);
  const std::size_t type_col = column_of(header, "amortization_type"),
                    age_col = column_of(header, "loan_age"),
                    first_col = column_of(header, "arm_first_reset"),
                    period_col = column_of(header, "arm_reset_period");
  std::size_t arms = 0, due_in_month_1 = 0;
  int earliest_reset = 1000;
  for (std::size_t i = 1; i < tape.size(); ++i) {
    const std::vector<std::string> cells = cells_of(tape[i]);
    if (cells.at(type_col) != "arm") continue;
    ++arms;
    const int period = std::stoi(cells.at(period_col));
    int reset =
        first_reset_month(std::stoi(cells.at(age_col)), std::stoi(cells.at(first_col)), period);
    if (reset == 1) {
      ++due_in_month_1;
      reset += period;
    }
    earliest_reset = std::min(earliest_reset, reset);
  }
  EXPECT_EQ(arms, 151u);
  EXPECT_EQ(due_in_month_1, 2u);
  EXPECT_EQ(first_differing_month(note_rate, on_curve), static_cast<std::size_t>(earliest_reset));

  // Fixed-rate loans only: the curve changes nothing.
  const fs::path fixed_tape = fixed_only_tape();
  EXPECT_EQ(monthly(fixed_tape, "fixed-curve.csv", {"--curve", kSwapCurve}),
            monthly(fixed_tape, "fixed-plain.csv", {}));
  EXPECT_EQ(monthly(fixed_tape, "fixed-flat.csv", {"--curve", "4"}),
            monthly(fixed_tape, "fixed-plain.csv", {}));
}

TEST_F(CashflowsCurve, FlatCurveResetsTheArmsToo) {
  const fs::path strict = kSource / kStrict;
  const std::vector<std::string> plain = monthly(strict, "plain.csv", {});
  const std::vector<std::string> flat = monthly(strict, "flat.csv", {"--curve", "4"});
  const std::vector<std::string> file = monthly(strict, "file.csv", {"--curve", kSwapCurve});
  ASSERT_EQ(flat.size(), plain.size());
  EXPECT_NE(column_total(flat, "gross_interest"), column_total(plain, "gross_interest"));
  EXPECT_NE(flat, file);  // a different curve, different coupons
  // Text and JSON reports run with it too.
  for (const std::string form : {"text", "json"}) {
    std::vector<std::string> args =
        join({{"cashflows"}, kStrictTape, {"--prepay", "psa:150", "--curve", "4"}});
    if (form == "json") args.push_back("--json");
    const Outcome r = poolbid(args);
    EXPECT_EQ(r.exit_code, kOk) << shown(args) << "\n" << r;
    EXPECT_EQ(r.err, "") << shown(args);
  }
}

TEST_F(CashflowsCurve, UnusableCurveExitsFiveAndWritesNothing) {
  const fs::path csv = scratch_ / "pool.csv";
  for (const std::string curve : {"99", "-6", "demo-pools/no-such-curve.json"}) {
    const std::vector<std::string> args =
        join({{"cashflows"}, kStrictTape, {"--curve", curve, "--csv", csv.string()}});
    expect_one_error_line(poolbid(args), kUnusableInput, {curve}, shown(args));
    EXPECT_TRUE(fs::is_empty(scratch_)) << shown(args);
  }
  // An output naming the curve file would overwrite it.
  const fs::path curve = scratch_ / "curve.json";
  fs::copy_file(kSource / kSwapCurve, curve);
  const std::string bytes = read_file(curve);
  for (const std::string option : {"--csv", "--loans"}) {
    const std::vector<std::string> args =
        join({{"cashflows"}, kStrictTape, {"--curve", curve.string(), option, curve.string()}});
    const Outcome r = poolbid(args);
    EXPECT_EQ(r.exit_code, kUsage) << shown(args) << "\n" << r;
    EXPECT_EQ(r.out, "");
    EXPECT_EQ(read_file(curve), bytes);
  }
}

}  // namespace
