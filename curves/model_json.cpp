// Numbers and layout of the credit-model and scenario JSON files: exact percent reading and
// writing, range checks naming the key, curve values in text or object form, the written layout.
#include "curves/model_json.h"

#include <fmt/core.h>

#include <charconv>
#include <cmath>
#include <cstdint>
#include <limits>
#include <string>
#include <vector>

#include "curves/json_duplicates.h"

namespace poolbid::detail {
namespace {

using nlohmann::ordered_json;

// The value as the user wrote it: a string without its quotes, anything else as JSON.
std::string shown(const ordered_json& value) {
  return value.is_string() ? value.get<std::string>() : value.dump();
}

std::string range_text(double low, double high) {
  if (high == std::numeric_limits<double>::infinity()) return fmt::format("at least {}", low);
  return fmt::format("from {} to {}", low, high);
}

// Records the text of each number with a fraction or an exponent by its path, named as
// json_duplicates.h names paths ("quotes[2].rate").
class NumberRecorder : public nlohmann::json_sax<ordered_json> {
 public:
  explicit NumberRecorder(NumberTexts& out) : out_(out) {}

  bool null() override { return value_done(); }
  bool boolean(bool) override { return value_done(); }
  bool number_integer(number_integer_t) override { return value_done(); }
  bool number_unsigned(number_unsigned_t) override { return value_done(); }
  bool number_float(number_float_t, const string_t& text) override {
    out_[child_path()] = text;
    return value_done();
  }
  bool string(string_t&) override { return value_done(); }
  bool binary(binary_t&) override { return value_done(); }
  bool start_object(std::size_t) override { return open(false); }
  bool key(string_t& name) override {
    frames_.back().key = name;
    return true;
  }
  bool end_object() override { return close(); }
  bool start_array(std::size_t) override { return open(true); }
  bool end_array() override { return close(); }
  bool parse_error(std::size_t, const std::string&, const nlohmann::detail::exception&) override {
    return false;  // not reached: the text has been parsed already
  }

 private:
  struct Frame {
    std::string path;
    bool array;
    std::size_t count;
    std::string key;
  };
  std::string child_path() const {
    if (frames_.empty()) return "";
    const Frame& f = frames_.back();
    if (f.array) return fmt::format("{}[{}]", f.path, f.count);
    return f.path.empty() ? f.key : f.path + "." + f.key;
  }
  bool open(bool array) {
    frames_.push_back({child_path(), array, 0, ""});
    return true;
  }
  bool close() {
    frames_.pop_back();
    return value_done();
  }
  bool value_done() {
    if (!frames_.empty() && frames_.back().array) ++frames_.back().count;
    return true;
  }

  NumberTexts& out_;
  std::vector<Frame> frames_;
};

// The digits of the number at `key` as the file writes them (checked to be that number's).
std::string written(const NumberTexts& numbers, const ordered_json& value, std::string_view key) {
  if (value.is_number_float()) {
    if (const auto it = numbers.find(std::string(key)); it != numbers.end()) {
      const std::string& text = it->second;
      double read = 0;
      std::from_chars(text.data(), text.data() + text.size(), read);
      if (read == value.get<double>()) return text;
    }
  }
  return value.dump();
}

// The curve object of the assumptions file: {"cdr": 1 | [..]} or {"sda": 60}, optional "clock".
SpeedCurve curve_object(const NumberTexts& numbers, CurveKind kind, const ordered_json& object,
                        Place place) {
  const KindInfo& info = kind_info(kind);
  SpeedCurve curve;
  bool has_rate = false, has_standard = false, has_clock = false;
  for (const auto& [name, value] : object.items()) {
    const std::string key = fmt::format("{}.{}", place.key, name);
    const Place at{place.source, key};
    if (name == "clock") {
      has_clock = true;
      if (value == "loan_age")
        curve.clock = CurveClock::loan_age;
      else if (value == "projection_month")
        curve.clock = CurveClock::projection_month;
      else
        model_fail(at, value, R"(must be "loan_age" or "projection_month")");
    } else if (name == info.rate_prefix) {
      has_rate = true;
      const auto percent = [&](const ordered_json& v, Place where) {
        if (!v.is_number()) model_fail(where, v, "must be a number (percent)");
        return checked_percent(kind, {v.get<double>(), written(numbers, v, where.key)}, where,
                               shown(v));
      };
      if (value.is_number()) {
        curve.value = percent(value, at);
      } else if (value.is_array() && !value.empty()) {
        curve.shape = CurveShape::vector;
        for (std::size_t i = 0; i < value.size(); ++i) {
          const std::string element = fmt::format("{}[{}]", key, i);
          curve.values.push_back(percent(value[i], {place.source, element}));
        }
      } else {
        model_fail(at, value, "must be a percent or a non-empty array of percents by month");
      }
    } else if (name == info.standard_prefix) {
      has_standard = true;
      if (!value.is_number())
        model_fail(at, value, "must be a number: the multiple in percent, 100 = standard");
      curve.shape = kind == CurveKind::prepay ? CurveShape::psa : CurveShape::sda;
      curve.value = checked_multiple(kind, {value.get<double>(), written(numbers, value, key)}, at,
                                     shown(value));
    } else {
      model_fail(at, value,
                 fmt::format("unknown key; a curve object takes {} or {} and clock",
                             info.rate_prefix, info.standard_prefix));
    }
  }
  if (has_rate == has_standard)
    model_fail(place, object,
               fmt::format("{} {} or {}", has_rate ? "give one, not both, of" : "needs",
                           info.rate_prefix, info.standard_prefix));
  if (!has_clock) curve.clock = default_clock(curve.shape);
  return curve;
}

// Whether `value` holds an object anywhere below it (such a value is written over several lines).
bool holds_object(const ordered_json& value) {
  if (!value.is_structured()) return false;
  for (const auto& element : value) {
    if (element.is_object() || holds_object(element)) return true;
  }
  return false;
}

std::string one_line(const ordered_json& value) {
  if (value.is_binary()) return std::string(value.get_binary().begin(), value.get_binary().end());
  if (value.is_array()) {
    std::string text = "[";
    for (std::size_t i = 0; i < value.size(); ++i)
      text += (i == 0 ? "" : ", ") + one_line(value[i]);
    return text + "]";
  }
  if (value.is_object()) {
    std::string text = "{";
    bool first = true;
    for (const auto& [key, element] : value.items()) {
      text +=
          fmt::format("{}{}: {}", first ? "" : ", ", ordered_json(key).dump(), one_line(element));
      first = false;
    }
    return text + "}";
  }
  return value.dump();
}

constexpr std::size_t kLineWidth = 100;

void lay_out(const ordered_json& value, std::size_t indent, std::size_t used, std::string& out) {
  if (!value.is_structured() || value.empty() ||
      (!holds_object(value) && used + one_line(value).size() <= kLineWidth)) {
    out += one_line(value);
    return;
  }
  const std::string inner(indent + 2, ' ');
  out += value.is_object() ? "{\n" : "[\n";
  bool first = true;
  for (const auto& [key, element] : value.items()) {
    if (!first) out += ",\n";
    first = false;
    out += inner;
    std::size_t width = inner.size();
    if (value.is_object()) {
      const std::string head = ordered_json(key).dump() + ": ";
      out += head;
      width += head.size();
    }
    lay_out(element, indent + 2, width + 1, out);  // + 1 for the comma
  }
  out += "\n" + std::string(indent, ' ') + (value.is_object() ? "}" : "]");
}

}  // namespace

ModelDocument parse_model_document(std::string_view json_text, std::string_view source_name,
                                   std::string_view must_hold) {
  // The checking parse (syntax, duplicate keys by path, an object at the top) sorts keys; the
  // second keeps the file's order, which tables (categories, states) keep; the third records how
  // the file writes its numbers.
  parse_json_object(json_text, must_hold,
                    [source_name](std::string_view key, std::string_view message) {
                      return assumption_error({source_name, key}, "", message);
                    });
  ModelDocument doc{ordered_json::parse(json_text), {}};
  NumberRecorder recorder(doc.numbers);
  ordered_json::sax_parse(json_text, &recorder);
  return doc;
}

std::string read_model_file(const std::string& path, std::string_view what) {
  return read_text_file(path, what, [&path](std::string_view key, std::string_view message) {
    return assumption_error({path, key}, "", message);
  });
}

void model_fail(Place place, const nlohmann::ordered_json& value, std::string_view message) {
  throw assumption_error(place, value.is_string() ? value.get<std::string>() : value.dump(),
                         message);
}

double number_in(const nlohmann::ordered_json& value, Place place, double low, double high,
                 std::string_view form) {
  const double number = value.is_number() ? value.get<double>() : 0.0;
  if (!value.is_number() || !(number >= low && number <= high))
    model_fail(place, value, fmt::format("must be {}, {}", form, range_text(low, high)));
  return number;
}

double percent_in(const NumberTexts& numbers, const nlohmann::ordered_json& value, Place place,
                  double low, double high, std::string_view form) {
  number_in(value, place, low, high, form);
  return hundredth(written(numbers, value, place.key)) + 0.0;  // -0 reads as 0
}

int whole_in(const nlohmann::ordered_json& value, Place place, int low, int high,
             std::string_view form) {
  const double number = value.is_number() ? value.get<double>() : 0.5;
  if (!(number >= low && number <= high) || number != std::floor(number))
    model_fail(place, value,
               fmt::format("must be {}, a whole number {}", form, range_text(low, high)));
  return static_cast<int>(number);
}

void require_object(const nlohmann::ordered_json& value, Place place, std::string_view example) {
  if (!value.is_object())
    model_fail(place, value, fmt::format("must be an object such as {}", example));
}

SpeedCurve speed_curve_at(const NumberTexts& numbers, CurveKind kind,
                          const nlohmann::ordered_json& value, Place place) {
  if (value.is_string()) return parse_curve(kind, value.get<std::string>(), place);
  if (value.is_object()) return curve_object(numbers, kind, value, place);
  model_fail(place, value,
             kind == CurveKind::prepay
                 ? R"(must be text such as "cpr:0..6/30@age" or "psa:100", or an object such )"
                   R"(as {"cpr": [1, 2, 3]})"
                 : R"(must be text such as "sda:60" or "cdr:0.5", or an object such as )"
                   R"({"cdr": [0.1, 0.2, 0.3]})");
}

std::string speed_curve_text(CurveKind kind, const SpeedCurve& curve) {
  return kind == CurveKind::prepay ? prepay_text(curve) : default_text(curve);
}

nlohmann::ordered_json percent_number(double decimal) {
  if (decimal == 0 || !std::isfinite(decimal)) return plain_number(decimal);
  // The decimal's shortest digits with the point moved two places: 0.011 -> "1.1" (not the
  // 1.0999999999999999 that 0.011 x 100 gives). hundredth reads them back to `decimal` exactly.
  const std::string percent = shortest_percent_text(decimal);
  // Written as the double nearest them when that double's own text reads back the same
  // (110, 0.75); else as the digits themselves.
  double nearest = 0;
  std::from_chars(percent.data(), percent.data() + percent.size(), nearest);
  if (const ordered_json number = plain_number(nearest); hundredth(number.dump()) == decimal)
    return number;
  return ordered_json::binary(std::vector<std::uint8_t>(percent.begin(), percent.end()));
}

nlohmann::ordered_json plain_number(double value) {
  constexpr double kExactIntegers = 9007199254740992.0;  // 2^53
  if (value == std::floor(value) && std::fabs(value) < kExactIntegers && !std::signbit(value))
    return static_cast<std::uint64_t>(value);
  if (value == std::floor(value) && std::fabs(value) < kExactIntegers && value != 0)
    return static_cast<std::int64_t>(value);
  return value;  // written as the shortest digits that read back to it (-0 as -0.0)
}

std::string laid_out(const nlohmann::ordered_json& document) {
  std::string out;
  lay_out(document, 0, 0, out);
  return out + "\n";
}

}  // namespace poolbid::detail
