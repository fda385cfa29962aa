// Kick-outs (DESIGN.md section 6): the buyer's credit box (default and JSON file), each loan's
// reasons for being outside it, the break-even default probability, and the bid with and without
// the loans the buyer kicks out.
#include <fmt/core.h>

#include <algorithm>
#include <array>
#include <cctype>
#include <cmath>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

#include <nlohmann/json.hpp>

// Shared with curves/ for one JSON-file behaviour (duplicate keys refused, file errors worded
// alike); header-only.
#include "curves/json_duplicates.h"
#include "pricing/pricing.h"

namespace poolbid {
namespace {

using nlohmann::json;

constexpr std::string_view kBoxKeys =
    "description, min_score, max_ltv, max_cltv, max_dti, documentation, occupancy, "
    "property_types, states, missing_fields";

// A tape ratio equal to a limit in print may differ from it in the last bit (percent read as
// x / 100 on the tape, decimals as written): it is not above the limit.
constexpr double kRatioTolerance = 1e-12;
// A loan's value this close to its allocation (as a share of its balance) is not below it.
constexpr double kValueTolerance = 1e-9;

// "<source>[ key <key>][, value '<value>']: <message>", as the other JSON files say it.
AssumptionError box_error(std::string_view source, std::string_view key, std::string_view value,
                          std::string_view message) {
  std::string where(source);
  if (!key.empty()) where += fmt::format(" key {}", key);
  if (!value.empty()) {
    const std::string_view shown = value.substr(0, 80);
    where += fmt::format("{}'{}{}'", key.empty() ? " " : ", value ", shown,
                         shown.size() < value.size() ? "..." : "");
  }
  return AssumptionError(std::string(source), std::string(key), std::string(value),
                         fmt::format("{}: {}", where, message));
}

// ---- Reading the box file ------------------------------------------------------------------------

struct Reader {
  std::string_view source;

  [[noreturn]] void fail(std::string_view key, const json& value, std::string_view message) const {
    throw box_error(source, key, value.is_null() ? std::string() : detail::shown(value), message);
  }

  // A number from `low` to `high` (both included unless `low_open`).
  double number(std::string_view key, const json& value, double low, double high, bool low_open,
                std::string_view what) const {
    if (!value.is_number()) fail(key, value, fmt::format("must be a number: {}", what));
    const double x = value.get<double>();
    if (!std::isfinite(x) || (low_open ? !(x > low) : !(x >= low)) || !(x <= high))
      fail(key, value, fmt::format("out of range: {}", what));
    return x;
  }

  // A ratio limit written in percent, returned as a decimal the way the tape reads percent.
  double percent_limit(std::string_view key, const json& value, double high) const {
    const std::string what =
        fmt::format("a percent above 1 and at most {:g} (95 = 95%, not 0.95)", high);
    return number(key, value, 1, high, true, what) / 100;
  }

  // A non-empty array of distinct strings, each read by `read` (nullopt = not a known value).
  template <class T, class Read>
  std::vector<T> list(std::string_view key, const json& value, std::string_view known,
                      Read read) const {
    if (!value.is_array() || value.empty())
      fail(key, value,
           fmt::format("must be a non-empty array of {} (leave the key out to allow any)", known));
    std::vector<T> out;
    std::vector<std::string> seen;
    for (std::size_t i = 0; i < value.size(); ++i) {
      const std::string at = fmt::format("{}[{}]", key, i);
      const json& item = value[i];
      if (!item.is_string()) fail(at, item, fmt::format("must be text, one of {}", known));
      const std::optional<T> parsed = read(item.get<std::string>());
      if (!parsed) fail(at, item, fmt::format("not one of {}", known));
      if (std::find(out.begin(), out.end(), *parsed) != out.end())
        fail(at, item, "listed twice");
      out.push_back(*parsed);
    }
    return out;
  }
};

// The tape's spelling of each category value but `unknown` (tape/tape.h to_string).
template <class E, std::size_t N>
std::optional<E> category(std::string_view text, const std::array<E, N>& values) {
  for (E v : values)
    if (to_string(v) == text) return v;
  return std::nullopt;
}

template <class E, std::size_t N>
std::string spellings(const std::array<E, N>& values) {
  std::string out;
  for (E v : values) out += fmt::format("{}{}", out.empty() ? "" : ", ", to_string(v));
  return out;
}

constexpr std::array kDocumentation = {Documentation::full, Documentation::limited,
                                        Documentation::none};
constexpr std::array kOccupancy = {Occupancy::owner, Occupancy::second_home, Occupancy::investor};
constexpr std::array kPropertyTypes = {
    PropertyType::single_family, PropertyType::condo,        PropertyType::pud,
    PropertyType::two_to_four,   PropertyType::manufactured, PropertyType::coop};

// ---- Screening -----------------------------------------------------------------------------------

// A number as typed: 620 -> "620", 619.5 -> "619.5" (up to 4 places).
std::string short_number(double x) {
  std::string text = fmt::format("{:.4f}", x);
  text.erase(text.find_last_not_of('0') + 1);
  if (text.back() == '.') text.pop_back();
  return text;
}

// A ratio and its limit in percent with as few places (1 to 4) as tell them apart:
// "97.0%", "95.0%"; "95.04%", "95.00%".
std::pair<std::string, std::string> percent_pair(double value, double limit) {
  for (int places = 1;; ++places) {
    std::string a = fmt::format("{:.{}f}%", 100 * value, places);
    std::string b = fmt::format("{:.{}f}%", 100 * limit, places);
    if (a != b || places == 4) return {std::move(a), std::move(b)};
  }
}

struct Screened {
  std::uint16_t screens = 0;
  std::vector<std::string> reasons;
};

void fail_screen(Screened& s, BoxScreen screen, std::string reason) {
  s.screens |= static_cast<std::uint16_t>(1u << static_cast<unsigned>(screen));
  s.reasons.push_back(std::move(reason));
}

void screen_missing(Screened& s, const CreditBox& box, BoxScreen screen) {
  if (!box.missing_inside)
    fail_screen(s, screen, fmt::format("{} not on the tape", to_string(screen)));
}

void screen_ratio(Screened& s, const CreditBox& box, BoxScreen screen,
                  const std::optional<double>& limit, double value) {
  if (!limit) return;
  if (std::isnan(value)) return screen_missing(s, box, screen);
  if (value > *limit + kRatioTolerance) {
    const auto [shown, bound] = percent_pair(value, *limit);
    fail_screen(s, screen, fmt::format("{} {} above {}", to_string(screen), shown, bound));
  }
}

template <class E>
void screen_category(Screened& s, const CreditBox& box, BoxScreen screen,
                     const std::vector<E>& allowed, E value) {
  if (allowed.empty()) return;
  if (value == E::unknown) return screen_missing(s, box, screen);
  if (std::find(allowed.begin(), allowed.end(), value) == allowed.end())
    fail_screen(s, screen, fmt::format("{} {} not allowed", to_string(screen), to_string(value)));
}

Screened screen_loan(const CreditBox& box, const LoanArrays& loans, std::size_t i) {
  Screened s;
  if (box.min_score) {
    const double score = loans.credit_score[i];
    if (std::isnan(score))
      screen_missing(s, box, BoxScreen::score);
    else if (score < *box.min_score)
      fail_screen(s, BoxScreen::score, fmt::format("score {} below {}", short_number(score),
                                                   short_number(*box.min_score)));
  }
  screen_ratio(s, box, BoxScreen::ltv, box.max_ltv, loans.original_ltv[i]);
  screen_ratio(s, box, BoxScreen::cltv, box.max_cltv, loans.combined_ltv[i]);
  screen_ratio(s, box, BoxScreen::dti, box.max_dti, loans.dti[i]);
  screen_category(s, box, BoxScreen::documentation, box.documentation, loans.documentation[i]);
  screen_category(s, box, BoxScreen::occupancy, box.occupancy, loans.occupancy[i]);
  screen_category(s, box, BoxScreen::property_type, box.property_types, loans.property_type[i]);
  if (!box.states.empty()) {
    const std::uint8_t state = loans.state[i];
    if (state == 0)
      screen_missing(s, box, BoxScreen::state);
    else if (std::find(box.states.begin(), box.states.end(), state) == box.states.end())
      fail_screen(s, BoxScreen::state, fmt::format("state {} not allowed", state_code(state)));
  }
  return s;
}

void add(KickoutTally& tally, double upb) {
  ++tally.loans;
  tally.upb += upb;
}

}  // namespace

std::string_view to_string(BoxScreen s) {
  switch (s) {
    case BoxScreen::score: return "score";
    case BoxScreen::ltv: return "LTV";
    case BoxScreen::cltv: return "CLTV";
    case BoxScreen::dti: return "DTI";
    case BoxScreen::documentation: return "documentation";
    case BoxScreen::occupancy: return "occupancy";
    case BoxScreen::property_type: return "property type";
    case BoxScreen::state: return "state";
    case BoxScreen::count_: break;
  }
  return "unknown";
}

CreditBox default_credit_box() {
  // Illustrative, not a recommendation: a buyer box of the kind DESIGN.md section 6 describes.
  CreditBox box;
  box.source = "default";
  box.description = "illustrative buyer box";
  box.min_score = 620;
  box.max_ltv = 95.0 / 100;
  box.max_cltv = 100.0 / 100;
  box.max_dti = 50.0 / 100;
  box.documentation = {Documentation::full, Documentation::limited};
  box.property_types = {PropertyType::single_family, PropertyType::condo, PropertyType::pud,
                        PropertyType::two_to_four, PropertyType::coop};
  box.missing_inside = false;
  return box;
}

CreditBox parse_credit_box(std::string_view json_text, std::string_view source_name) {
  const json doc = detail::parse_json_object(
      json_text, R"(it must hold one JSON object such as {"min_score": 620})",
      [source_name](std::string_view key, std::string_view message) {
        return box_error(source_name, key, "", message);
      });
  const Reader r{source_name};
  CreditBox box;
  box.source = std::string(source_name);
  for (const auto& [key, value] : doc.items()) {
    if (key == "description") {
      if (!value.is_string()) r.fail(key, value, "must be text");
      box.description = value.get<std::string>();
      continue;
    }
    if (key == "missing_fields") {
      if (value == "outside")
        box.missing_inside = false;
      else if (value == "inside")
        box.missing_inside = true;
      else
        r.fail(key, value,
               R"(must be "outside" (a loan missing a screened field is outside the box) or )"
               R"("inside")");
      continue;
    }
    const bool known = key == "min_score" || key == "max_ltv" || key == "max_cltv" ||
                       key == "max_dti" || key == "documentation" || key == "occupancy" ||
                       key == "property_types" || key == "states";
    if (!known) r.fail(key, value, fmt::format("unknown key; the keys are {}", kBoxKeys));
    if (value.is_null()) continue;  // screens nothing
    if (key == "min_score") {
      box.min_score = r.number(key, value, 300, 850, false, "a credit score from 300 to 850");
    } else if (key == "max_ltv") {
      box.max_ltv = r.percent_limit(key, value, 300);
    } else if (key == "max_cltv") {
      box.max_cltv = r.percent_limit(key, value, 300);
    } else if (key == "max_dti") {
      box.max_dti = r.percent_limit(key, value, 100);
    } else if (key == "documentation") {
      box.documentation = r.list<Documentation>(
          key, value, spellings(kDocumentation),
          [](std::string_view t) { return category(t, kDocumentation); });
    } else if (key == "occupancy") {
      box.occupancy = r.list<Occupancy>(key, value, spellings(kOccupancy), [](std::string_view t) {
        return category(t, kOccupancy);
      });
    } else if (key == "property_types") {
      box.property_types = r.list<PropertyType>(
          key, value, spellings(kPropertyTypes),
          [](std::string_view t) { return category(t, kPropertyTypes); });
    } else {  // states
      box.states = r.list<std::uint8_t>(
          key, value, "USPS state codes (CA, TX, ...)",
          [](std::string_view t) -> std::optional<std::uint8_t> {
            // Upper case only, as the tape prints them; state_index itself ignores case.
            if (t.size() != 2 || !std::isupper(static_cast<unsigned char>(t[0])) ||
                !std::isupper(static_cast<unsigned char>(t[1])))
              return std::nullopt;
            return state_index(t);
          });
    }
  }
  return box;
}

CreditBox load_credit_box(const std::string& path) {
  const std::string text = detail::read_text_file(
      path, "credit box file", [&path](std::string_view key, std::string_view message) {
        return box_error(path, key, "", message);
      });
  return parse_credit_box(text, path);
}

std::vector<std::string> box_reasons(const CreditBox& box, const LoanArrays& loans,
                                     std::size_t i) {
  if (i >= loans.size())
    throw std::out_of_range(fmt::format("box_reasons: loan {} of {}", i, loans.size()));
  return screen_loan(box, loans, i).reasons;
}

double break_even_default_probability(double margin, double loss) {
  if (!std::isfinite(margin) || !std::isfinite(loss) || margin < 0 || loss < 0 ||
      !(margin + loss > 0))
    throw std::invalid_argument(fmt::format(
        "break-even default probability: margin {} and loss {} must be finite, not negative, "
        "and not both 0",
        margin, loss));
  return margin / (margin + loss);
}

KickoutResult price_with_kickouts(const LoanArrays& loans, const YieldCurve& curve,
                                  const BidRequest& request, const CreditBox& box,
                                  const DecisionEconomics& economics) {
  if (!(economics.margin > 0) || !(economics.margin <= 1) || !(economics.bad_loan_loss > 0) ||
      !(economics.bad_loan_loss <= 2))
    throw std::invalid_argument(fmt::format(
        "kick-outs: margin {} must be above 0 and at most 1, bad-loan loss {} above 0 and at "
        "most 2 (decimals of the balance)",
        economics.margin, economics.bad_loan_loss));
  KickoutResult result;
  result.box = box;
  result.economics = economics;
  result.break_even = break_even_default_probability(economics.margin, economics.bad_loan_loss);

  BidRequest whole_request = request;
  whole_request.loan_values = true;
  result.whole = price_pool(loans, curve, whole_request);
  const LoanFlows& flows = result.whole.flows.loans;
  if (flows.size() != loans.size() || flows.present_value.size() != loans.size())
    throw std::logic_error("price_with_kickouts: price_pool gave no value for every loan");

  // The bid shared out by no-loss value: what each loan's coupon and term are worth at the pool's
  // yield, before credit.
  const std::vector<double>& no_loss = result.whole.no_loss_loan_values;
  if (no_loss.size() != loans.size())
    throw std::logic_error("price_with_kickouts: price_pool gave no no-loss value for every loan");
  double no_loss_total = 0;
  for (double v : no_loss) no_loss_total += v;
  const double share = no_loss_total > 0 ? result.whole.dirty_value / no_loss_total : 0.0;
  result.loans.resize(loans.size());
  result.by_screen.assign(kBoxScreenCount, KickoutTally{});
  for (std::size_t i = 0; i < loans.size(); ++i) {
    LoanDecision& d = result.loans[i];
    const double balance = loans.current_balance[i];
    const double defaults = flows.defaults[i];
    d.default_probability = defaults / balance;
    d.expected_loss = flows.loss[i];
    d.expected_loss_pct = 100 * d.expected_loss / balance;
    d.value = flows.present_value[i];
    d.value_price = 100 * d.value / balance;
    d.allocated = share * no_loss[i];
    d.allocated_price = 100 * d.allocated / balance;
    d.modelled_severity = defaults > 0;
    d.severity = d.modelled_severity ? std::max(0.0, flows.loss[i] / defaults)
                                     : economics.bad_loan_loss;
    d.break_even = break_even_default_probability(economics.margin, d.severity);
    Screened screened = screen_loan(box, loans, i);
    d.box_screens = screened.screens;
    d.box_reasons = std::move(screened.reasons);
    d.outside_box = d.box_screens != 0;
    d.below_price = d.value < d.allocated - kValueTolerance * balance;
    d.above_break_even = d.default_probability > d.break_even;

    const auto index = static_cast<std::uint32_t>(i);
    if (d.outside_box) add(result.outside_box, balance);
    if (d.below_price) add(result.below_price, balance);
    if (d.above_break_even) add(result.above_break_even, balance);
    for (std::size_t s = 0; s < kBoxScreenCount; ++s)
      if (d.box_screens & (1u << s)) add(result.by_screen[s], balance);
    if (d.kicked()) {
      result.kicked.push_back(index);
      add(result.kicked_total, balance);
    } else {
      result.kept.push_back(index);
      add(result.kept_total, balance);
    }
  }

  if (!result.kicked.empty() && !result.kept.empty())
    result.without = price_pool(select_loans(loans, result.kept), curve, request);
  return result;
}

}  // namespace poolbid
