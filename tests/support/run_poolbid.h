// Test support: run the built `poolbid` command from the source root and capture what it says.
// Header-only; each call uses a scratch folder of its own, so tests may run in parallel.
#pragma once

#include <gtest/gtest.h>
#include <stdlib.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <ostream>
#include <string>
#include <vector>

namespace poolbid::testing_support {

struct Outcome {
  int exit_code;  // -1 if the command did not exit normally
  std::string out, err;
};

inline std::ostream& operator<<(std::ostream& os, const Outcome& r) {
  return os << "exit " << r.exit_code << "\n--- stderr:\n"
            << r.err << "--- stdout (first 2000 bytes):\n"
            << r.out.substr(0, 2000);
}

inline std::string read_file(const std::filesystem::path& path) {
  std::ifstream in(path, std::ios::binary);
  return std::string((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
}

// 'text' for a POSIX shell, with embedded single quotes kept.
inline std::string shell_quoted(const std::string& text) {
  std::string out = "'";
  for (char ch : text) out += ch == '\'' ? std::string("'\\''") : std::string(1, ch);
  return out + "'";
}

// Runs `poolbid args...` from the source root (POOLBID_SOURCE_DIR), standard input closed.
inline Outcome run_poolbid(const std::vector<std::string>& args) {
  namespace fs = std::filesystem;
  std::string scratch_name = (fs::temp_directory_path() / "poolbid_run_XXXXXX").string();
  if (::mkdtemp(scratch_name.data()) == nullptr) {
    ADD_FAILURE() << "cannot make a scratch folder " << scratch_name;
    return {-1, "", ""};
  }
  const fs::path scratch = scratch_name, out = scratch / "stdout", err = scratch / "stderr";
  std::string command = "cd " + shell_quoted(POOLBID_SOURCE_DIR) + " && " +
                        shell_quoted(POOLBID_BINARY);
  for (const std::string& a : args) command += " " + shell_quoted(a);
  command += " >" + shell_quoted(out.string()) + " 2>" + shell_quoted(err.string()) + " </dev/null";
  const int status = std::system(command.c_str());
  Outcome r{-1, read_file(out), read_file(err)};
  if (status != -1 && WIFEXITED(status)) r.exit_code = WEXITSTATUS(status);
  std::error_code ignored;
  fs::remove_all(scratch, ignored);
  return r;
}

// A fixture with a scratch folder of its own per test (tests run in parallel), removed afterwards;
// `poolbid(args)` runs the command from the repository root (relative paths are the README's).
class CommandTest : public testing::Test {
 protected:
  void SetUp() override {
    const auto* info = testing::UnitTest::GetInstance()->current_test_info();
    scratch_ = std::filesystem::temp_directory_path() /
               ("poolbid_" + std::string(info->test_suite_name()) + "_" +
                std::to_string(::getpid()) + "_" + info->name());
    std::filesystem::remove_all(scratch_);
    std::filesystem::create_directories(scratch_);
  }
  void TearDown() override { std::filesystem::remove_all(scratch_); }

  Outcome poolbid(const std::vector<std::string>& args) const { return run_poolbid(args); }

  std::filesystem::path scratch_;
};

}  // namespace poolbid::testing_support
