// Private to curves/: reading the JSON files curves/ takes (assumptions, yield curves) -- the file
// as text, and a parse into one object that refuses a key given twice in one object (nlohmann would
// keep the last silently), naming the key by its path: "quotes[2].rate".
#pragma once

#include <fmt/core.h>

#include <cerrno>
#include <cstddef>
#include <cstdio>
#include <nlohmann/json.hpp>
#include <set>
#include <string>
#include <string_view>
#include <system_error>
#include <utility>
#include <vector>

namespace poolbid::detail {

// `fail(path)` is called with the duplicate key's path and must throw. Keeps one frame per open
// object or array; `count` numbers an array's elements, `keys` holds an object's keys so far.
// Use: json::parse(text, [&d](int depth, json::parse_event_t e, json& j) { return d(depth, e, j);
// })
template <class Fail>
class DuplicateKeys {
 public:
  explicit DuplicateKeys(Fail fail) : fail_(std::move(fail)) {}

  bool operator()(int /*depth*/, nlohmann::json::parse_event_t event, nlohmann::json& parsed) {
    using Event = nlohmann::json::parse_event_t;
    switch (event) {
      case Event::object_start:
      case Event::array_start:
        frames_.push_back({child_path(), event == Event::array_start, 0, "", {}});
        break;
      case Event::key: {
        Frame& f = frames_.back();
        f.key = parsed.get<std::string>();
        if (!f.keys.insert(f.key).second) fail_(joined(f.path, f.key));
        break;
      }
      case Event::object_end:
      case Event::array_end:
        frames_.pop_back();
        element_done();
        break;
      case Event::value:
        element_done();
        break;
    }
    return true;  // keep everything
  }

 private:
  struct Frame {
    std::string path;  // "" for the document itself
    bool array;
    std::size_t count;  // arrays: elements read so far
    std::string key;    // objects: the key whose value is being read
    std::set<std::string> keys;
  };

  static std::string joined(const std::string& path, const std::string& key) {
    return path.empty() ? key : path + "." + key;
  }
  // The path of the value starting now.
  std::string child_path() const {
    if (frames_.empty()) return "";
    const Frame& f = frames_.back();
    return f.array ? fmt::format("{}[{}]", f.path, f.count) : joined(f.path, f.key);
  }
  void element_done() {
    if (!frames_.empty() && frames_.back().array) ++frames_.back().count;
  }

  Fail fail_;
  std::vector<Frame> frames_;
};

// The value as the user wrote it: a string without its quotes, anything else as JSON.
inline std::string shown(const nlohmann::json& value) {
  return value.is_string() ? value.get<std::string>() : value.dump();
}

// nlohmann's message without its "[json.exception.parse_error.101] " prefix.
inline std::string_view plain_message(const char* what) {
  std::string_view text(what);
  if (!text.empty() && text.front() == '[') {
    if (const auto end = text.find("] "); end != std::string_view::npos)
      text.remove_prefix(end + 2);
  }
  return text;
}

// In the two readers below, `error(key, message)` returns the exception to throw for a problem at
// `key` ("" for the whole file): an AssumptionError or a CurveError naming the file.

// The whole file at `path`. Throws error("", "cannot open the <what> (<reason>)") or "cannot read
// the <what> (<reason>)"; `what` is "curve file", "assumptions file".
template <class Error>
std::string read_text_file(const std::string& path, std::string_view what, Error error) {
  std::FILE* file = std::fopen(path.c_str(), "rb");
  if (file == nullptr)
    throw error("", fmt::format("cannot open the {} ({})", what,
                                std::error_code(errno, std::generic_category()).message()));
  std::string text;
  char buffer[1 << 16];
  std::size_t got = 0;
  while ((got = std::fread(buffer, 1, sizeof buffer, file)) > 0) text.append(buffer, got);
  const bool failed = std::ferror(file) != 0;
  const int code = errno;
  std::fclose(file);
  if (failed)
    throw error("", fmt::format("cannot read the {} ({})", what,
                                std::error_code(code, std::generic_category()).message()));
  return text;
}

// `json_text` parsed whole; it must hold one JSON object. Throws error(key, message) for a key
// given twice (key: its path), error("", ...) for text that is not JSON ("not valid JSON at byte
// 12: ...") and for a document that is not an object ("holds an array; <must_hold>").
template <class Error>
nlohmann::json parse_json_object(std::string_view json_text, std::string_view must_hold,
                                 Error error) {
  using nlohmann::json;
  json doc;
  try {
    auto duplicate = [&error](const std::string& path) {
      throw error(path, "duplicate key; each key may appear only once");
    };
    DuplicateKeys<decltype(duplicate)> duplicates(duplicate);
    doc = json::parse(json_text, [&duplicates](int depth, json::parse_event_t event, json& parsed) {
      return duplicates(depth, event, parsed);
    });
  } catch (const json::parse_error& e) {
    throw error("", fmt::format("not valid JSON at byte {}: {}", e.byte, plain_message(e.what())));
  } catch (const json::exception& e) {
    throw error("", fmt::format("not valid JSON: {}", plain_message(e.what())));
  }
  if (!doc.is_object())
    throw error("", fmt::format("holds {} {}; {}", doc.is_array() ? "an" : "a", doc.type_name(),
                                must_hold));
  return doc;
}

}  // namespace poolbid::detail
