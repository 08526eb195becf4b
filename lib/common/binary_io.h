// Versioned, checksummed binary files (corpus, model, checkpoints).
// Layout: 8-byte magic, u32 format version, u64 payload size, payload, u64
// FNV-1a checksum of the payload. Writes go to a temporary file that is renamed
// into place, so a failed or interrupted write never leaves a half-written file.
#pragma once

#include <cstdint>
#include <cstring>
#include <fstream>
#include <functional>
#include <string>
#include <string_view>
#include <type_traits>
#include <vector>

namespace loupe {

// Appends little-endian (host-order; loupe files are read on the machine
// family that wrote them) values to a byte buffer.
class BinaryWriter {
 public:
  template <typename T>
  void put(const T& value) {
    static_assert(std::is_trivially_copyable_v<T>);
    append(&value, sizeof(T));
  }
  void put_string(std::string_view text) {
    put<std::uint64_t>(text.size());
    append(text.data(), text.size());
  }
  template <typename T>
  void put_vector(const std::vector<T>& values) {
    static_assert(std::is_trivially_copyable_v<T>);
    put<std::uint64_t>(values.size());
    append(values.data(), values.size() * sizeof(T));
  }
  void put_strings(const std::vector<std::string>& values) {
    put<std::uint64_t>(values.size());
    for (const auto& v : values) put_string(v);
  }
  const std::vector<char>& bytes() const { return bytes_; }

 private:
  void append(const void* data, std::size_t size) {
    const auto* p = static_cast<const char*>(data);
    bytes_.insert(bytes_.end(), p, p + size);
  }
  std::vector<char> bytes_;
};

// Reads what BinaryWriter wrote, with bounds checks: running past the end
// throws loupe::Error naming the file and the byte offset.
class BinaryReader {
 public:
  BinaryReader(std::string_view bytes, std::string file_name) : bytes_(bytes), file_name_(std::move(file_name)) {}

  template <typename T>
  T get() {
    static_assert(std::is_trivially_copyable_v<T>);
    T value;
    std::memcpy(&value, take(sizeof(T)), sizeof(T));
    return value;
  }
  std::string get_string() {
    const auto size = get_count(1);
    return std::string(take(size), size);
  }
  template <typename T>
  std::vector<T> get_vector() {
    static_assert(std::is_trivially_copyable_v<T>);
    const auto size = get_count(sizeof(T));
    std::vector<T> values(size);
    if (size > 0) std::memcpy(values.data(), take(size * sizeof(T)), size * sizeof(T));
    return values;
  }
  std::vector<std::string> get_strings() {
    const auto size = get_count(sizeof(std::uint64_t));
    std::vector<std::string> values;
    values.reserve(size);
    for (std::size_t i = 0; i < size; ++i) values.push_back(get_string());
    return values;
  }
  std::size_t offset() const { return offset_; }
  bool at_end() const { return offset_ == bytes_.size(); }
  const std::string& file_name() const { return file_name_; }
  // Throws loupe::Error "FILE: corrupt at byte N: WHAT".
  [[noreturn]] void fail(const std::string& what) const;

 private:
  std::size_t get_count(std::size_t element_size);
  const char* take(std::size_t size);
  std::string_view bytes_;
  std::size_t offset_ = 0;
  std::string file_name_;
};

struct FileFormat {
  char magic[8];          // e.g. "LOUPECRP"
  std::uint32_t version;  // the newest version this build writes and reads
  const char* kind;       // "corpus", "model": used in messages
};

// Wraps the payload with magic, version and checksum and writes it atomically.
void write_binary_file(const std::string& path, const FileFormat& format, const std::vector<char>& payload);

// Reads and verifies a file written by write_binary_file. Returns the payload
// and sets *version. Throws loupe::Error for a missing file, a wrong magic, a
// newer version, a truncated file or a checksum mismatch.
std::string read_binary_file(const std::string& path, const FileFormat& format, std::uint32_t* version);

// Reads a file written by write_binary_file piece by piece, without holding it in
// memory: a process that needs only part of a large file (one share of a corpus's
// tokens) reads the fields before it, skips to it and reads just that. The header
// (magic, version, payload size against the file size) is checked on opening; the
// checksum only by verify_checksum(), which streams the whole payload once.
// Offsets in messages count from the start of the payload, as BinaryReader's do.
class BinaryFileReader {
 public:
  // Throws loupe::Error like read_binary_file for a missing, foreign, newer or truncated file.
  BinaryFileReader(const std::string& path, const FileFormat& format);

  std::uint32_t version() const { return version_; }
  std::uint64_t payload_size() const { return payload_size_; }
  std::uint64_t offset() const { return offset_; }  // the next payload byte to read

  template <typename T>
  T get() {
    static_assert(std::is_trivially_copyable_v<T>);
    T value;
    read(&value, sizeof(T));
    return value;
  }
  std::string get_string();
  std::vector<std::string> get_strings();
  template <typename T>
  std::vector<T> get_vector() {
    static_assert(std::is_trivially_copyable_v<T>);
    const auto size = get_count(sizeof(T));
    std::vector<T> values(size);
    if (size > 0) read(values.data(), size * sizeof(T));
    return values;
  }
  // A vector's length field, checked against the bytes left; the caller reads or skips the values.
  std::uint64_t get_count(std::size_t element_size);
  void read(void* out, std::uint64_t size);
  void skip(std::uint64_t size);
  bool at_end() const { return offset_ == payload_size_; }
  // Throws loupe::Error "FILE: corrupt at byte N: WHAT".
  [[noreturn]] void fail(const std::string& what) const;

  // Streams the whole payload from its start, calling on_chunk(payload offset, bytes,
  // size) for consecutive chunks, and checks the checksum at the end (loupe::Error
  // naming the file when it differs). Leaves the reading position where it was.
  void verify_checksum(const std::function<void(std::uint64_t, const char*, std::size_t)>& on_chunk = {});

 private:
  std::string path_;
  std::string kind_;
  std::ifstream in_;
  std::uint32_t version_ = 0;
  std::uint64_t payload_size_ = 0;
  std::uint64_t offset_ = 0;
};

// Writes text to PATH via a temporary file in the same folder and a rename.
void write_file_atomically(const std::string& path, std::string_view contents);

// Reads a whole file; throws loupe::Error naming it when it cannot be read.
std::string read_whole_file(const std::string& path);

}  // namespace loupe
