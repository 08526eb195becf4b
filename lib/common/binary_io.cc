#include "common/binary_io.h"

#include <unistd.h>
#include <algorithm>
#include <cerrno>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>
#include <system_error>

#include "common/checksum.h"
#include "common/error.h"

namespace loupe {

namespace {
constexpr std::size_t kHeaderSize = 8 + sizeof(std::uint32_t) + sizeof(std::uint64_t);
constexpr std::size_t kTrailerSize = sizeof(std::uint64_t);
}  // namespace

void BinaryReader::fail(const std::string& what) const {
  std::ostringstream message;
  message << file_name_ << ": corrupt at byte " << offset_ << ": " << what
          << ". The file is damaged; rebuild it from its sources.";
  throw Error(message.str());
}

std::size_t BinaryReader::get_count(std::size_t element_size) {
  const auto count = get<std::uint64_t>();
  const auto left = bytes_.size() - offset_;
  if (element_size > 0 && count > left / element_size) {
    fail("a length field (" + std::to_string(count) + ") runs past the end of the data");
  }
  return static_cast<std::size_t>(count);
}

const char* BinaryReader::take(std::size_t size) {
  if (size > bytes_.size() - offset_) fail("unexpected end of data");
  const char* p = bytes_.data() + offset_;
  offset_ += size;
  return p;
}

void write_file_atomically(const std::string& path, std::string_view contents) {
  namespace fs = std::filesystem;
  const fs::path target(path);
  const fs::path folder = target.has_parent_path() ? target.parent_path() : fs::path(".");
  std::error_code ec;
  if (!fs::is_directory(folder, ec)) {
    throw Error("cannot write " + path + ": the folder " + folder.string() +
                " does not exist. Create it first or choose another output path.");
  }
  std::random_device entropy;
  // Built with += : GCC 12 gives a false -Wrestrict on "." + std::string.
  std::string name(1, '.');
  name += target.filename().string();
  name += ".tmp-";
  name += std::to_string(::getpid());
  name += '-';
  name += std::to_string(entropy());
  const fs::path temporary = folder / name;
  {
    std::ofstream out(temporary, std::ios::binary | std::ios::trunc);
    if (!out) {
      throw Error("cannot write " + path + ": " + std::strerror(errno) +
                  ". Check that the folder is writable, or choose another output path.");
    }
    out.write(contents.data(), static_cast<std::streamsize>(contents.size()));
    out.flush();
    if (!out) {
      const std::string reason = std::strerror(errno);
      out.close();
      fs::remove(temporary, ec);
      throw Error("cannot write " + path + ": " + reason + " (disk full?). Nothing was written.");
    }
  }
  fs::rename(temporary, target, ec);
  if (ec) {
    std::error_code ignored;
    fs::remove(temporary, ignored);
    throw Error("cannot write " + path + ": " + ec.message() + ". Nothing was written.");
  }
}

std::string read_whole_file(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    throw Error("cannot read " + path + ": " + std::strerror(errno) + ". Check the path.");
  }
  std::ostringstream buffer;
  buffer << in.rdbuf();
  if (in.bad()) throw Error("cannot read " + path + ": read error.");
  return std::move(buffer).str();
}

void write_binary_file(const std::string& path, const FileFormat& format, const std::vector<char>& payload) {
  std::string out;
  out.reserve(kHeaderSize + payload.size() + kTrailerSize);
  out.append(format.magic, 8);
  const std::uint32_t version = format.version;
  out.append(reinterpret_cast<const char*>(&version), sizeof(version));
  const std::uint64_t size = payload.size();
  out.append(reinterpret_cast<const char*>(&size), sizeof(size));
  out.append(payload.data(), payload.size());
  const std::uint64_t checksum = fnv1a64(payload.data(), payload.size());
  out.append(reinterpret_cast<const char*>(&checksum), sizeof(checksum));
  write_file_atomically(path, out);
}

BinaryFileReader::BinaryFileReader(const std::string& path, const FileFormat& format)
    : path_(path), kind_(format.kind) {
  std::error_code ec;
  if (!std::filesystem::exists(path, ec)) {
    throw Error(std::string("cannot read ") + format.kind + " file " + path + ": no such file. Check the path.");
  }
  const auto file_size = std::filesystem::file_size(path, ec);
  in_.open(path, std::ios::binary);
  if (ec || !in_) {
    throw Error("cannot read " + path + ": " + (ec ? ec.message() : std::string(std::strerror(errno))) +
                ". Check the path and that this process may read it.");
  }
  char header[kHeaderSize] = {};
  if (file_size < kHeaderSize || !in_.read(header, kHeaderSize) || std::memcmp(header, format.magic, 8) != 0) {
    throw Error(path + ": not a loupe " + kind_ +
                " file (its first bytes do not match). Pass a file that loupe wrote as a " + kind_ + ".");
  }
  std::memcpy(&version_, header + 8, sizeof(version_));
  if (version_ > format.version || version_ == 0) {
    throw Error(path + ": " + kind_ + " file format version " + std::to_string(version_) +
                " is newer than this loupe reads (version " + std::to_string(format.version) +
                "). Upgrade loupe, or rebuild the file with this version.");
  }
  std::memcpy(&payload_size_, header + 12, sizeof(payload_size_));
  const std::uint64_t held = file_size >= kHeaderSize + kTrailerSize ? file_size - kHeaderSize - kTrailerSize : 0;
  if (file_size < kHeaderSize + kTrailerSize || payload_size_ != held) {
    throw Error(path + ": " + kind_ + " file is truncated or has extra bytes (header says " +
                std::to_string(payload_size_) + " payload bytes, file holds " + std::to_string(held) +
                "). The file is damaged; rebuild it.");
  }
}

void BinaryFileReader::fail(const std::string& what) const {
  std::ostringstream message;
  message << path_ << ": corrupt at byte " << offset_ << ": " << what
          << ". The file is damaged; rebuild it from its sources.";
  throw Error(message.str());
}

std::uint64_t BinaryFileReader::get_count(std::size_t element_size) {
  const auto count = get<std::uint64_t>();
  const auto left = payload_size_ - offset_;
  if (element_size > 0 && count > left / element_size) {
    fail("a length field (" + std::to_string(count) + ") runs past the end of the data");
  }
  return count;
}

std::string BinaryFileReader::get_string() {
  const auto size = get_count(1);
  std::string text(size, '\0');
  read(text.data(), size);
  return text;
}

std::vector<std::string> BinaryFileReader::get_strings() {
  const auto size = get_count(sizeof(std::uint64_t));
  std::vector<std::string> values;
  values.reserve(size);
  for (std::uint64_t i = 0; i < size; ++i) values.push_back(get_string());
  return values;
}

void BinaryFileReader::read(void* out, std::uint64_t size) {
  if (size > payload_size_ - offset_) fail("unexpected end of data");
  in_.seekg(static_cast<std::streamoff>(kHeaderSize + offset_));
  if (!in_.read(static_cast<char*>(out), static_cast<std::streamsize>(size))) {
    in_.clear();
    fail("the file could not be read here (" + std::string(std::strerror(errno)) + ")");
  }
  offset_ += size;
}

void BinaryFileReader::skip(std::uint64_t size) {
  if (size > payload_size_ - offset_) fail("unexpected end of data");
  offset_ += size;
}

void BinaryFileReader::verify_checksum(const std::function<void(std::uint64_t, const char*, std::size_t)>& on_chunk) {
  constexpr std::size_t kChunk = std::size_t{1} << 22;
  std::vector<char> buffer(kChunk);
  Fnv1a64 hash;
  in_.clear();
  in_.seekg(static_cast<std::streamoff>(kHeaderSize));
  for (std::uint64_t done = 0; done < payload_size_;) {
    const auto size = static_cast<std::size_t>(std::min<std::uint64_t>(kChunk, payload_size_ - done));
    if (!in_.read(buffer.data(), static_cast<std::streamsize>(size))) {
      in_.clear();
      throw Error(path_ + ": the " + kind_ + " file could not be read at byte " + std::to_string(done) +
                  ". The file is damaged or was changed while loupe read it; rebuild it.");
    }
    hash.update(buffer.data(), size);
    if (on_chunk) on_chunk(done, buffer.data(), size);
    done += size;
  }
  std::uint64_t stored = 0;
  if (!in_.read(reinterpret_cast<char*>(&stored), sizeof(stored)) || stored != hash.digest()) {
    in_.clear();
    throw Error(path_ + ": " + kind_ + " file checksum mismatch: the file is corrupted. Rebuild it from its sources.");
  }
}

std::string read_binary_file(const std::string& path, const FileFormat& format, std::uint32_t* version) {
  std::error_code ec;
  if (!std::filesystem::exists(path, ec)) {
    throw Error(std::string("cannot read ") + format.kind + " file " + path + ": no such file. Check the path.");
  }
  std::string bytes = read_whole_file(path);
  const std::string kind = format.kind;
  if (bytes.size() < kHeaderSize || std::memcmp(bytes.data(), format.magic, 8) != 0) {
    throw Error(path + ": not a loupe " + kind +
                " file (its first bytes do not match). "
                "Pass a file that loupe wrote as a " +
                kind + ".");
  }
  std::uint32_t file_version;
  std::memcpy(&file_version, bytes.data() + 8, sizeof(file_version));
  if (file_version > format.version || file_version == 0) {
    throw Error(path + ": " + kind + " file format version " + std::to_string(file_version) +
                " is newer than this loupe reads (version " + std::to_string(format.version) +
                "). Upgrade loupe, or rebuild the file with this version.");
  }
  std::uint64_t size;
  std::memcpy(&size, bytes.data() + 12, sizeof(size));
  if (bytes.size() < kHeaderSize + kTrailerSize || size != bytes.size() - kHeaderSize - kTrailerSize) {
    throw Error(
        path + ": " + kind + " file is truncated or has extra bytes (header says " + std::to_string(size) +
        " payload bytes, file holds " +
        std::to_string(bytes.size() >= kHeaderSize + kTrailerSize ? bytes.size() - kHeaderSize - kTrailerSize : 0) +
        "). The file is damaged; rebuild it.");
  }
  std::uint64_t stored;
  std::memcpy(&stored, bytes.data() + kHeaderSize + size, sizeof(stored));
  const std::uint64_t actual = fnv1a64(bytes.data() + kHeaderSize, size);
  if (stored != actual) {
    throw Error(path + ": " + kind +
                " file checksum mismatch: the file is corrupted. "
                "Rebuild it from its sources.");
  }
  *version = file_version;
  return bytes.substr(kHeaderSize, size);
}

}  // namespace loupe
