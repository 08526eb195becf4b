// Tests for the checksummed binary file container and atomic writes.
#include "common/binary_io.h"

#include <filesystem>
#include <fstream>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "common/error.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

namespace fs = std::filesystem;
using ::testing::HasSubstr;

constexpr FileFormat kTestFormat{{'L', 'O', 'U', 'P', 'E', 'T', 'S', 'T'}, 2, "test"};

class BinaryIoTest : public ::testing::Test {
 protected:
  std::string path(const std::string& name) const { return (dir_ / name).string(); }
  static std::vector<char> payload() {
    BinaryWriter w;
    w.put<std::uint32_t>(7);
    w.put_string("harbour");
    w.put_vector(std::vector<std::uint64_t>{1, 2, 3});
    w.put_strings({"a", "", "ccc"});
    return w.bytes();
  }
  loupe::testing::TempFolder folder_{"binary-io"};
  const fs::path& dir_ = folder_.path();
};

TEST_F(BinaryIoTest, RoundTripsValues) {
  write_binary_file(path("f.bin"), kTestFormat, payload());
  std::uint32_t version = 0;
  const std::string bytes = read_binary_file(path("f.bin"), kTestFormat, &version);
  EXPECT_EQ(version, 2u);
  BinaryReader r(bytes, "f.bin");
  EXPECT_EQ(r.get<std::uint32_t>(), 7u);
  EXPECT_EQ(r.get_string(), "harbour");
  EXPECT_EQ(r.get_vector<std::uint64_t>(), (std::vector<std::uint64_t>{1, 2, 3}));
  EXPECT_EQ(r.get_strings(), (std::vector<std::string>{"a", "", "ccc"}));
  EXPECT_TRUE(r.at_end());
}

TEST_F(BinaryIoTest, ReaderRefusesToRunPastTheEnd) {
  BinaryWriter w;
  w.put<std::uint64_t>(1000);  // claims a 1000-byte string that is not there
  const std::string bytes(w.bytes().begin(), w.bytes().end());
  BinaryReader r(bytes, "short.bin");
  try {
    r.get_string();
    FAIL() << "expected an error";
  } catch (const Error& e) {
    EXPECT_THAT(e.what(), HasSubstr("short.bin: corrupt at byte 8"));
  }
}

TEST_F(BinaryIoTest, TruncatedFileIsAnError) {
  write_binary_file(path("f.bin"), kTestFormat, payload());
  fs::resize_file(path("f.bin"), fs::file_size(path("f.bin")) - 5);
  std::uint32_t version = 0;
  EXPECT_THAT([&] { read_binary_file(path("f.bin"), kTestFormat, &version); },
              ::testing::ThrowsMessage<Error>(HasSubstr("truncated")));
}

TEST_F(BinaryIoTest, FlippedByteFailsTheChecksum) {
  write_binary_file(path("f.bin"), kTestFormat, payload());
  {
    std::fstream f(path("f.bin"), std::ios::in | std::ios::out | std::ios::binary);
    f.seekp(25);
    f.put('\x5a');
  }
  std::uint32_t version = 0;
  EXPECT_THAT([&] { read_binary_file(path("f.bin"), kTestFormat, &version); },
              ::testing::ThrowsMessage<Error>(HasSubstr("checksum mismatch")));
}

TEST_F(BinaryIoTest, WrongKindAndNewerVersionAreNamed) {
  write_file_atomically(path("notes.txt"), "Sir, the pier is mended.");
  std::uint32_t version = 0;
  EXPECT_THAT([&] { read_binary_file(path("notes.txt"), kTestFormat, &version); },
              ::testing::ThrowsMessage<Error>(HasSubstr("not a loupe test file")));
  const FileFormat newer{{'L', 'O', 'U', 'P', 'E', 'T', 'S', 'T'}, 9, "test"};
  write_binary_file(path("new.bin"), newer, payload());
  EXPECT_THAT([&] { read_binary_file(path("new.bin"), kTestFormat, &version); },
              ::testing::ThrowsMessage<Error>(HasSubstr("version 9 is newer")));
}

TEST_F(BinaryIoTest, MissingFileIsNamed) {
  std::uint32_t version = 0;
  EXPECT_THAT([&] { read_binary_file(path("absent.bin"), kTestFormat, &version); },
              ::testing::ThrowsMessage<Error>(HasSubstr("absent.bin: no such file")));
}

TEST_F(BinaryIoTest, UnwritableOutputLeavesNothingBehind) {
  EXPECT_THAT([&] { write_file_atomically(path("no-such-folder/out.bin"), "x"); },
              ::testing::ThrowsMessage<Error>(HasSubstr("does not exist")));
  // A failed rename (target is a folder) keeps the folder and leaves no temporary.
  fs::create_directories(dir_ / "taken");
  EXPECT_THROW(write_file_atomically(path("taken"), "x"), Error);
  EXPECT_TRUE(fs::is_directory(dir_ / "taken"));
  std::size_t files = 0;
  for (const auto& entry : fs::directory_iterator(dir_)) files += entry.is_regular_file() ? 1 : 0;
  EXPECT_EQ(files, 0u);
}

TEST_F(BinaryIoTest, RewriteReplacesWholeFile) {
  write_file_atomically(path("out.txt"), "first version, long");
  write_file_atomically(path("out.txt"), "second");
  EXPECT_EQ(read_whole_file(path("out.txt")), "second");
}

}  // namespace
}  // namespace loupe
