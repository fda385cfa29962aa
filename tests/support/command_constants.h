// Test support: the `poolbid` exit codes as the README's table gives them, and the demo files the
// command tests run on (paths relative to the repository root, where the commands run).
#pragma once

#include <string>

namespace poolbid::testing_support {

constexpr int kOk = 0, kInternal = 1, kUsage = 2, kRowsRejected = 3, kUnusableTape = 4,
              kUnusableInput = 5, kCannotWrite = 6, kNoSolution = 7;

const std::string kStrict = "demo-pools/brindlecote-strict.csv";
const std::string kLoose = "demo-pools/sallowmere-loose.csv";
const std::string kLooseMap = "demo-pools/sallowmere.map.json";
const std::string kBadTape = "demo-pools/bad-tape.csv";

}  // namespace poolbid::testing_support
