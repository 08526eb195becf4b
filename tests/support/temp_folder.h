// A temporary folder for one test, removed with everything in it at the end.
// Names carry the process id and a counter, so parallel test processes never share one.
#pragma once

#include <unistd.h>

#include <atomic>
#include <filesystem>
#include <fstream>
#include <string>

namespace loupe::testing {

class TempFolder {
 public:
  explicit TempFolder(const std::string& label = "test") {
    static std::atomic<int> counter{0};
    path_ = std::filesystem::temp_directory_path() /
            ("loupe-" + label + "-" + std::to_string(::getpid()) + "-" + std::to_string(counter++));
    std::filesystem::remove_all(path_);
    std::filesystem::create_directories(path_);
  }
  ~TempFolder() {
    std::error_code ignored;
    std::filesystem::permissions(path_, std::filesystem::perms::owner_all, ignored);
    std::filesystem::remove_all(path_, ignored);
  }
  TempFolder(const TempFolder&) = delete;
  TempFolder& operator=(const TempFolder&) = delete;

  // Writes CONTENTS (bytes as given) to RELATIVE, creating folders; returns its path.
  std::string write(const std::string& relative, const std::string& contents) const {
    const std::filesystem::path file = path_ / relative;
    std::filesystem::create_directories(file.parent_path());
    std::ofstream(file, std::ios::binary) << contents;
    return file.string();
  }
  // The path of RELATIVE inside the folder (nothing is created).
  std::string file(const std::string& relative) const { return (path_ / relative).string(); }
  const std::filesystem::path& path() const { return path_; }
  std::string str() const { return path_.string(); }

 private:
  std::filesystem::path path_;
};

}  // namespace loupe::testing
