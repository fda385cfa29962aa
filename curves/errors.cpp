// AssumptionError and CurveError: where the bad input is (option or file, key, value), then what is
// accepted.
#include <fmt/core.h>

#include "curves/curve_errors.h"
#include "curves/curve_forms.h"

namespace poolbid {
namespace {

constexpr std::size_t kValueShownBytes = 80;  // what() quotes at most this much; `value` keeps all

// The first `bytes` bytes of `text`, not cutting a UTF-8 sequence in two.
std::string_view shown_prefix(std::string_view text, std::size_t bytes) {
  if (text.size() <= bytes) return text;
  while (bytes > 0 && (static_cast<unsigned char>(text[bytes]) & 0xC0) == 0x80) --bytes;
  return text.substr(0, bytes);
}

// "<source>[ key <key>][, value]'<value>': <message>".
std::string located_message(detail::Place place, std::string_view value, std::string_view message) {
  std::string where(place.source);
  if (!place.key.empty()) where += fmt::format(" key {}", place.key);
  if (!value.empty()) {
    const std::string_view shown = shown_prefix(value, kValueShownBytes);
    where += fmt::format("{}'{}{}'", place.key.empty() ? " " : ", value ", shown,
                         shown.size() < value.size() ? "..." : "");
  }
  return fmt::format("{}: {}", where, message);
}

}  // namespace

AssumptionError::AssumptionError(std::string source_, std::string key_, std::string value_,
                                 const std::string& message)
    : std::runtime_error(message),
      source(std::move(source_)),
      key(std::move(key_)),
      value(std::move(value_)) {}

CurveError::CurveError(std::string source_, std::string key_, std::string value_,
                       const std::string& message)
    : std::runtime_error(message),
      source(std::move(source_)),
      key(std::move(key_)),
      value(std::move(value_)) {}

namespace detail {

AssumptionError assumption_error(Place place, std::string_view value, std::string_view message) {
  return AssumptionError(std::string(place.source), std::string(place.key), std::string(value),
                         located_message(place, value, message));
}

CurveError curve_error(Place place, std::string_view value, std::string_view message) {
  return CurveError(std::string(place.source), std::string(place.key), std::string(value),
                    located_message(place, value, message));
}

}  // namespace detail
}  // namespace poolbid
