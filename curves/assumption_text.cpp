// The command-line text forms of assumptions: cpr:8, psa:150, cpr:6,7,8, cpr:2..8/24, @age/@month;
// cdr/sda for defaults; bare percents for severity; the lag and the advancing choice.
#include <charconv>
#include <cmath>
#include <optional>

#include <fmt/core.h>

#include "curves/curve_forms.h"

namespace poolbid {
namespace detail {
namespace {

std::string_view trim(std::string_view s) {
  constexpr std::string_view kSpace = " \t\r\n";
  const auto first = s.find_first_not_of(kSpace);
  if (first == std::string_view::npos) return {};
  return s.substr(first, s.find_last_not_of(kSpace) - first + 1);
}

// ASCII case-insensitive equality ("CPR" == "cpr").
bool same_word(std::string_view a, std::string_view b) {
  if (a.size() != b.size()) return false;
  for (std::size_t i = 0; i < a.size(); ++i) {
    auto lower = [](char c) { return c >= 'A' && c <= 'Z' ? static_cast<char>(c - 'A' + 'a') : c; };
    if (lower(a[i]) != lower(b[i])) return false;
  }
  return true;
}

// One curve's text, parsed against one kind; every failure names the whole text.
struct CurveText {
  CurveKind kind;
  const KindInfo& info;
  std::string_view text;
  Place place;

  [[noreturn]] void fail(std::string_view problem) const {
    throw assumption_error(place, text, fmt::format("{}; {}", problem, info.forms));
  }

  Percent number(std::string_view token) const {
    token = trim(token);
    if (token.empty()) fail("a number is missing");
    double v = 0;
    const auto [end, ec] = std::from_chars(token.data(), token.data() + token.size(), v);
    if (end != token.data() + token.size() || ec == std::errc::invalid_argument)
      fail(fmt::format("'{}' is not a number", token));
    if (ec == std::errc::result_out_of_range) fail(fmt::format("'{}' is out of range", token));
    if (!std::isfinite(v)) fail(fmt::format("'{}' is not a finite number", token));
    return {v, token};
  }

  int ramp_months(std::string_view token) const {
    token = trim(token);
    int months = 0;
    const auto [end, ec] = std::from_chars(token.data(), token.data() + token.size(), months);
    if (token.empty() || ec != std::errc() || end != token.data() + token.size() || months < 1 ||
        months > kMaxRampMonths)
      fail(fmt::format("ramp months '{}' must be a whole number from 1 to {}", token,
                       kMaxRampMonths));
    return months;
  }

  double percent(std::string_view token) const {
    return checked_percent(kind, number(token), place, text);
  }

  SpeedCurve parse() const {
    std::string_view body = trim(text);
    std::optional<CurveClock> clock;
    if (const auto at = body.find('@'); at != std::string_view::npos) {
      const std::string_view suffix = trim(body.substr(at + 1));
      if (same_word(suffix, "age"))
        clock = CurveClock::loan_age;
      else if (same_word(suffix, "month"))
        clock = CurveClock::projection_month;
      else
        fail(fmt::format("unknown clock '@{}': @age reads loan age, @month the projection month",
                         suffix));
      body = trim(body.substr(0, at));
    }
    if (body.empty()) fail("empty");
    bool standard = false;
    std::string_view prefix;
    const auto colon = body.find(':');
    if (info.rate_prefix.empty()) {
      if (colon != std::string_view::npos) fail("unknown form");
    } else {
      if (colon == std::string_view::npos) fail("unknown form");
      prefix = trim(body.substr(0, colon));
      if (same_word(prefix, info.standard_prefix))
        standard = true;
      else if (!same_word(prefix, info.rate_prefix))
        fail("unknown form");
      body = trim(body.substr(colon + 1));
    }
    if (body.empty()) fail(prefix.empty() ? "empty" : fmt::format("no number after '{}:'", prefix));

    SpeedCurve curve;
    if (standard) {
      if (body.find_first_of(",/") != std::string_view::npos || body.find("..") != body.npos)
        fail(fmt::format("{0} takes one multiple, e.g. {0}:150", info.standard_prefix));
      curve.shape = kind == CurveKind::prepay ? CurveShape::psa : CurveShape::sda;
      curve.value = checked_multiple(kind, number(body), place, text);
    } else if (const auto dots = body.find(".."); dots != std::string_view::npos) {
      const auto slash = body.find('/', dots);
      if (slash == std::string_view::npos) fail("a ramp needs its length: FROM..TO/MONTHS");
      curve.shape = CurveShape::ramp;
      curve.ramp_from = percent(body.substr(0, dots));
      curve.ramp_to = percent(body.substr(dots + 2, slash - dots - 2));
      curve.ramp_months = ramp_months(body.substr(slash + 1));
    } else if (body.find(',') != std::string_view::npos) {
      curve.shape = CurveShape::vector;
      for (std::size_t start = 0;;) {
        const auto comma = body.find(',', start);
        curve.values.push_back(percent(body.substr(start, comma - start)));
        if (comma == std::string_view::npos) break;
        start = comma + 1;
      }
    } else {
      curve.value = percent(body);
    }
    curve.clock = clock.value_or(default_clock(curve.shape));
    return curve;
  }
};

}  // namespace

SpeedCurve parse_curve(CurveKind kind, std::string_view text, Place place) {
  return CurveText{kind, kind_info(kind), text, place}.parse();
}

}  // namespace detail

SpeedCurve parse_prepay(std::string_view text, std::string_view option) {
  return detail::parse_curve(detail::CurveKind::prepay, text, {option, ""});
}

SpeedCurve parse_default(std::string_view text, std::string_view option) {
  return detail::parse_curve(detail::CurveKind::default_rate, text, {option, ""});
}

SpeedCurve parse_severity(std::string_view text, std::string_view option) {
  return detail::parse_curve(detail::CurveKind::severity, text, {option, ""});
}

int parse_lag(std::string_view text, std::string_view option) {
  const std::string_view t = detail::trim(text);
  int months = -1;
  const auto [end, ec] = std::from_chars(t.data(), t.data() + t.size(), months);
  if (t.empty() || ec != std::errc() || end != t.data() + t.size() || months < 0 ||
      months > detail::kMaxLagMonths)
    throw detail::assumption_error(
        {option, ""}, text,
        fmt::format("{}; the lag is a whole number of months from 0 to {}",
                    t.empty() ? "empty" : "not a whole number in range", detail::kMaxLagMonths));
  return months;
}

Advancing parse_advancing(std::string_view text, std::string_view option) {
  const std::string_view t = detail::trim(text);
  if (detail::same_word(t, "none")) return Advancing::none;
  if (detail::same_word(t, "interest")) return Advancing::interest;
  throw detail::assumption_error(
      {option, ""}, text, fmt::format("{}; use none or interest", t.empty() ? "empty" : "unknown"));
}

}  // namespace poolbid
