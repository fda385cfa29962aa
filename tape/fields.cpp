// Canonical field names, category spellings, US state codes and date parsing for tapes.
#include "tape/fields.h"
#include "tape/reader.h"

#include <algorithm>
#include <array>
#include <cctype>
#include <charconv>

namespace poolbid {
namespace {

constexpr std::array<std::string_view, kFieldCount> kFieldNames = {
    "loan_id", "seller",
    "current_balance", "original_balance", "note_rate", "servicing_fee",
    "original_term", "remaining_term", "maturity_date", "loan_age", "first_payment_date",
    "amortization_type", "io_months", "balloon_month",
    "arm_index", "arm_margin", "arm_first_reset", "arm_reset_period", "arm_periodic_cap",
    "arm_lifetime_cap", "arm_floor",
    "credit_score", "original_ltv", "combined_ltv", "property_value", "property_value_date", "dti",
    "occupancy", "property_type", "loan_purpose", "documentation", "state", "delinquency",
};

// source: USPS Publication 28, state and territory abbreviations (50 states, DC, 5 territories).
constexpr std::array<std::string_view, 57> kStateCodes = {
    "",   "AL", "AK", "AZ", "AR", "CA", "CO", "CT", "DE", "DC", "FL", "GA", "HI", "ID", "IL",
    "IN", "IA", "KS", "KY", "LA", "ME", "MD", "MA", "MI", "MN", "MS", "MO", "MT", "NE", "NV",
    "NH", "NJ", "NM", "NY", "NC", "ND", "OH", "OK", "OR", "PA", "RI", "SC", "SD", "TN", "TX",
    "UT", "VT", "VA", "WA", "WV", "WI", "WY", "PR", "VI", "GU", "AS", "MP",
};

struct Spelling {
  std::string_view folded;  // as fold_spelling() leaves it
  std::uint8_t value;
};

template <typename E>
constexpr std::uint8_t u8(E e) { return static_cast<std::uint8_t>(e); }

// Common spellings seen on sellers' tapes (common practice); a column map adds a seller's own.
constexpr Spelling kAmortization[] = {
    {"fixed", u8(Amortization::fixed)}, {"fixedrate", u8(Amortization::fixed)},
    {"frm", u8(Amortization::fixed)}, {"fix", u8(Amortization::fixed)},
    {"arm", u8(Amortization::arm)}, {"adjustable", u8(Amortization::arm)},
    {"adjustablerate", u8(Amortization::arm)}, {"variable", u8(Amortization::arm)},
    {"interestonly", u8(Amortization::interest_only)}, {"io", u8(Amortization::interest_only)},
    {"balloon", u8(Amortization::balloon)},
};
constexpr Spelling kOccupancy[] = {
    {"owner", u8(Occupancy::owner)}, {"owneroccupied", u8(Occupancy::owner)},
    {"primary", u8(Occupancy::owner)}, {"primaryresidence", u8(Occupancy::owner)},
    {"secondhome", u8(Occupancy::second_home)}, {"second", u8(Occupancy::second_home)},
    {"2ndhome", u8(Occupancy::second_home)}, {"vacation", u8(Occupancy::second_home)},
    {"investor", u8(Occupancy::investor)}, {"investment", u8(Occupancy::investor)},
    {"investmentproperty", u8(Occupancy::investor)}, {"nonowner", u8(Occupancy::investor)},
    {"nonowneroccupied", u8(Occupancy::investor)},
};
constexpr Spelling kPurpose[] = {
    {"purchase", u8(Purpose::purchase)}, {"purch", u8(Purpose::purchase)},
    {"ratetermrefi", u8(Purpose::rate_term_refi)}, {"rateterm", u8(Purpose::rate_term_refi)},
    {"ratetermrefinance", u8(Purpose::rate_term_refi)}, {"refi", u8(Purpose::rate_term_refi)},
    {"refinance", u8(Purpose::rate_term_refi)}, {"nocashoutrefi", u8(Purpose::rate_term_refi)},
    {"cashoutrefi", u8(Purpose::cash_out_refi)}, {"cashout", u8(Purpose::cash_out_refi)},
    {"cashoutrefinance", u8(Purpose::cash_out_refi)},
};
constexpr Spelling kDocumentation[] = {
    {"full", u8(Documentation::full)}, {"fulldoc", u8(Documentation::full)},
    {"fulldocumentation", u8(Documentation::full)},
    {"limited", u8(Documentation::limited)}, {"alt", u8(Documentation::limited)},
    {"altdoc", u8(Documentation::limited)}, {"reduced", u8(Documentation::limited)},
    {"lowdoc", u8(Documentation::limited)}, {"bankstatement", u8(Documentation::limited)},
    {"none", u8(Documentation::none)}, {"nodoc", u8(Documentation::none)},
    {"stated", u8(Documentation::none)}, {"statedincome", u8(Documentation::none)},
    {"noincome", u8(Documentation::none)},
};
constexpr Spelling kPropertyType[] = {
    {"singlefamily", u8(PropertyType::single_family)}, {"sf", u8(PropertyType::single_family)},
    {"sfr", u8(PropertyType::single_family)}, {"sfd", u8(PropertyType::single_family)},
    {"singlefamilydetached", u8(PropertyType::single_family)},
    {"condo", u8(PropertyType::condo)}, {"condominium", u8(PropertyType::condo)},
    {"pud", u8(PropertyType::pud)}, {"plannedunitdevelopment", u8(PropertyType::pud)},
    {"twotofour", u8(PropertyType::two_to_four)}, {"24unit", u8(PropertyType::two_to_four)},
    {"2to4", u8(PropertyType::two_to_four)}, {"24family", u8(PropertyType::two_to_four)},
    {"manufactured", u8(PropertyType::manufactured)}, {"mh", u8(PropertyType::manufactured)},
    {"manufacturedhousing", u8(PropertyType::manufactured)},
    {"mobilehome", u8(PropertyType::manufactured)},
    {"coop", u8(PropertyType::coop)}, {"cooperative", u8(PropertyType::coop)},
};
constexpr Spelling kDelinquency[] = {
    {"current", u8(Delinquency::current)}, {"0", u8(Delinquency::current)},
    {"c", u8(Delinquency::current)}, {"performing", u8(Delinquency::current)},
    {"30", u8(Delinquency::dq30)}, {"30days", u8(Delinquency::dq30)},
    {"30dpd", u8(Delinquency::dq30)},
    {"60", u8(Delinquency::dq60)}, {"60days", u8(Delinquency::dq60)},
    {"60dpd", u8(Delinquency::dq60)},
    {"90", u8(Delinquency::dq90_plus)}, {"90+", u8(Delinquency::dq90_plus)},
    {"90plus", u8(Delinquency::dq90_plus)}, {"90days", u8(Delinquency::dq90_plus)},
    {"90dpd", u8(Delinquency::dq90_plus)}, {"120", u8(Delinquency::dq90_plus)},
    {"120+", u8(Delinquency::dq90_plus)},
    {"foreclosure", u8(Delinquency::foreclosure)}, {"fc", u8(Delinquency::foreclosure)},
    {"inforeclosure", u8(Delinquency::foreclosure)},
};

template <std::size_t N>
std::optional<std::uint8_t> look_up(const Spelling (&table)[N], std::string_view folded) {
  for (const Spelling& s : table)
    if (s.folded == folded) return s.value;
  return std::nullopt;
}

bool parse_uint(std::string_view text, unsigned& out) {
  if (text.empty()) return false;
  auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), out);
  return ec == std::errc{} && end == text.data() + text.size();
}

}  // namespace

std::string_view field_name(Field f) { return kFieldNames[static_cast<std::size_t>(f)]; }

std::optional<Field> field_from_name(std::string_view name) {
  for (std::size_t i = 0; i < kFieldCount; ++i)
    if (kFieldNames[i] == name) return static_cast<Field>(i);
  return std::nullopt;
}

std::string_view to_string(Amortization v) {
  switch (v) {
    case Amortization::fixed: return "fixed";
    case Amortization::arm: return "arm";
    case Amortization::interest_only: return "interest_only";
    case Amortization::balloon: return "balloon";
  }
  return "?";
}
std::string_view to_string(Occupancy v) {
  switch (v) {
    case Occupancy::unknown: return "unknown";
    case Occupancy::owner: return "owner";
    case Occupancy::second_home: return "second_home";
    case Occupancy::investor: return "investor";
  }
  return "?";
}
std::string_view to_string(Purpose v) {
  switch (v) {
    case Purpose::unknown: return "unknown";
    case Purpose::purchase: return "purchase";
    case Purpose::rate_term_refi: return "rate_term_refi";
    case Purpose::cash_out_refi: return "cash_out_refi";
  }
  return "?";
}
std::string_view to_string(Documentation v) {
  switch (v) {
    case Documentation::unknown: return "unknown";
    case Documentation::full: return "full";
    case Documentation::limited: return "limited";
    case Documentation::none: return "none";
  }
  return "?";
}
std::string_view to_string(PropertyType v) {
  switch (v) {
    case PropertyType::unknown: return "unknown";
    case PropertyType::single_family: return "single_family";
    case PropertyType::condo: return "condo";
    case PropertyType::pud: return "pud";
    case PropertyType::two_to_four: return "two_to_four";
    case PropertyType::manufactured: return "manufactured";
    case PropertyType::coop: return "coop";
  }
  return "?";
}
std::string_view to_string(Delinquency v) {
  switch (v) {
    case Delinquency::unknown: return "unknown";
    case Delinquency::current: return "current";
    case Delinquency::dq30: return "30";
    case Delinquency::dq60: return "60";
    case Delinquency::dq90_plus: return "90+";
    case Delinquency::foreclosure: return "foreclosure";
  }
  return "?";
}

std::string_view to_string(ErrorKind kind) {
  switch (kind) {
    case ErrorKind::cannot_open: return "cannot_open";
    case ErrorKind::empty: return "empty";
    case ErrorKind::binary: return "binary";
    case ErrorKind::no_data_rows: return "no_data_rows";
    case ErrorKind::wrong_delimiter: return "wrong_delimiter";
    case ErrorKind::record_too_long: return "record_too_long";
    case ErrorKind::unterminated_quote: return "unterminated_quote";
    case ErrorKind::missing_column: return "missing_column";
    case ErrorKind::duplicate_column: return "duplicate_column";
    case ErrorKind::bad_map: return "bad_map";
    case ErrorKind::bad_option: return "bad_option";
  }
  return "?";
}

std::string_view state_code(std::uint8_t index) {
  return index < kStateCodes.size() ? kStateCodes[index] : std::string_view{};
}

std::optional<std::uint8_t> state_index(std::string_view code) {
  if (code.size() != 2) return std::nullopt;
  const char upper[2] = {static_cast<char>(std::toupper(static_cast<unsigned char>(code[0]))),
                         static_cast<char>(std::toupper(static_cast<unsigned char>(code[1])))};
  const std::string_view key(upper, 2);
  for (std::size_t i = 1; i < kStateCodes.size(); ++i)
    if (kStateCodes[i] == key) return static_cast<std::uint8_t>(i);
  return std::nullopt;
}

std::optional<Date> parse_date(std::string_view text) {
  text = detail::trim_spaces(text);
  unsigned a = 0, b = 0, c = 0;
  std::string_view first, second, third;
  const char sep = text.find('-') != std::string_view::npos ? '-' : '/';
  const std::size_t p1 = text.find(sep);
  if (p1 == std::string_view::npos) return std::nullopt;
  const std::size_t p2 = text.find(sep, p1 + 1);
  if (p2 == std::string_view::npos) return std::nullopt;
  first = text.substr(0, p1);
  second = text.substr(p1 + 1, p2 - p1 - 1);
  third = text.substr(p2 + 1);
  if (!parse_uint(first, a) || !parse_uint(second, b) || !parse_uint(third, c)) return std::nullopt;
  unsigned year = 0, month = 0, day = 0;
  if (sep == '-') {  // ISO 8601: YYYY-MM-DD
    if (first.size() != 4) return std::nullopt;
    year = a, month = b, day = c;
  } else {           // US month/day/year, four-digit year
    if (third.size() != 4) return std::nullopt;
    year = c, month = a, day = b;
  }
  // Checked as integers first: std::chrono::month and day keep one byte, so month 257 would
  // become January. Years 1900-2200 hold every date a loan tape carries (originations of the
  // last century, maturities to 2100 and beyond) and keep month counts between dates small.
  if (!detail::plausible_date(year, month, day)) return std::nullopt;
  const Date date{std::chrono::year{static_cast<int>(year)}, std::chrono::month{month},
                  std::chrono::day{day}};
  if (!date.ok()) return std::nullopt;
  return date;
}

TapeError::TapeError(ErrorKind kind_, std::string file_, std::size_t row_, std::string column_,
                     std::string value_, const std::string& message)
    : std::runtime_error(message),
      kind(kind_),
      file(std::move(file_)),
      row(row_),
      column(std::move(column_)),
      value(std::move(value_)) {}

namespace detail {

std::string fold_spelling(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (char ch : text) {
    if (ch == ' ' || ch == '_' || ch == '-' || ch == '/' || ch == '.') continue;
    out.push_back(static_cast<char>(std::tolower(static_cast<unsigned char>(ch))));
  }
  return out;
}

bool is_category(Field f) {
  switch (f) {
    case Field::amortization_type:
    case Field::occupancy:
    case Field::property_type:
    case Field::loan_purpose:
    case Field::documentation:
    case Field::delinquency:
      return true;
    default:
      return false;
  }
}

std::optional<std::uint8_t> parse_category(Field f, std::string_view text) {
  const std::string folded = fold_spelling(text);
  switch (f) {
    case Field::amortization_type: return look_up(kAmortization, folded);
    case Field::occupancy: return look_up(kOccupancy, folded);
    case Field::property_type: return look_up(kPropertyType, folded);
    case Field::loan_purpose: return look_up(kPurpose, folded);
    case Field::documentation: return look_up(kDocumentation, folded);
    case Field::delinquency: return look_up(kDelinquency, folded);
    default: return std::nullopt;
  }
}

std::string_view category_spellings(Field f) {
  switch (f) {
    case Field::amortization_type: return "fixed, arm, interest_only, balloon";
    case Field::occupancy: return "owner, second_home, investor";
    case Field::property_type:
      return "single_family, condo, pud, two_to_four, manufactured, coop";
    case Field::loan_purpose: return "purchase, rate_term_refi, cash_out_refi";
    case Field::documentation: return "full, limited, none";
    case Field::delinquency: return "current, 30, 60, 90+, foreclosure";
    default: return "";
  }
}

bool is_rate_field(Field f) {
  switch (f) {
    case Field::note_rate:
    case Field::servicing_fee:
    case Field::arm_margin:
    case Field::arm_periodic_cap:
    case Field::arm_lifetime_cap:
    case Field::arm_floor:
    case Field::original_ltv:
    case Field::combined_ltv:
    case Field::dti:
      return true;
    default:
      return false;
  }
}

double decimal_detection_ceiling(Field f) {
  switch (f) {
    case Field::servicing_fee: return 0.02;      // fees are 0.125%-0.50%: 0.25 means percent
    case Field::arm_margin: return 0.15;         // margins 1.5%-5%
    case Field::arm_periodic_cap: return 0.15;   // periodic caps 1%-2%
    case Field::arm_lifetime_cap: return 0.30;   // caps 5%-6% over the start rate, or 10%-13%
    case Field::arm_floor: return 0.30;
    case Field::original_ltv:                    // a 105% CLTV is 1.05 as a decimal, and no loan
    case Field::combined_ltv: return 3.0;        // has an LTV of 3%: up to 3 (300%) is decimal
    default: return 1.0;                         // DESIGN.md section 2: values <= 1 -> decimal
  }
}

}  // namespace detail
}  // namespace poolbid
