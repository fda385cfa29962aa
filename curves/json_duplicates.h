// Private to curves/: a nlohmann parser callback that refuses a key given twice in one object
// (nlohmann would keep the last silently), naming the key by its path: "quotes[2].rate".
#pragma once

#include <fmt/core.h>

#include <cstddef>
#include <nlohmann/json.hpp>
#include <set>
#include <string>
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

}  // namespace poolbid::detail
