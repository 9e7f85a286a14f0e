#pragma once
// Little-endian binary encoding for checkpoints and journal frames. The writer appends to a string;
// the reader never reads past its input: any short, oversized or malformed field puts it in a failed
// state (sticky), after which every read returns zero values and ok() is false. Callers check ok()
// once at the end, so a corrupt file can never cause undefined behaviour.
#include <cstdint>
#include <cstring>
#include <string>
#include <string_view>

namespace rigcal::state {

class BinaryWriter {
 public:
  void u8(std::uint8_t v) { out_.push_back(static_cast<char>(v)); }
  void u32(std::uint32_t v) { raw(&v, 4); }
  void u64(std::uint64_t v) { raw(&v, 8); }
  void i64(std::int64_t v) { raw(&v, 8); }
  void f64(double v) { raw(&v, 8); }
  void boolean(bool v) { u8(v ? 1 : 0); }
  void text(std::string_view s) {
    u32(static_cast<std::uint32_t>(s.size()));
    out_.append(s);
  }
  void raw(const void* p, std::size_t n) { out_.append(static_cast<const char*>(p), n); }

  std::string& buffer() { return out_; }
  const std::string& buffer() const { return out_; }
  std::size_t size() const { return out_.size(); }

 private:
  std::string out_;
};

class BinaryReader {
 public:
  explicit BinaryReader(std::string_view in) : in_(in) {}

  std::uint8_t u8() {
    std::uint8_t v = 0;
    raw(&v, 1);
    return v;
  }
  std::uint32_t u32() {
    std::uint32_t v = 0;
    raw(&v, 4);
    return v;
  }
  std::uint64_t u64() {
    std::uint64_t v = 0;
    raw(&v, 8);
    return v;
  }
  std::int64_t i64() {
    std::int64_t v = 0;
    raw(&v, 8);
    return v;
  }
  double f64() {
    double v = 0;
    raw(&v, 8);
    return v;
  }
  bool boolean() {
    const std::uint8_t v = u8();
    if (v > 1) fail();
    return v == 1;
  }
  // REQUIRES: max_size bounds what a valid file can hold, so a corrupt length cannot allocate wildly.
  std::string text(std::size_t max_size = 1 << 20) {
    const std::uint32_t n = u32();
    if (n > max_size || n > remaining()) {
      fail();
      return {};
    }
    std::string s(in_.substr(pos_, n));
    pos_ += n;
    return s;
  }
  // A count of following items of at least `min_item_bytes` each: fails if they cannot all fit.
  std::uint64_t count(std::size_t min_item_bytes) {
    const std::uint64_t n = u64();
    if (min_item_bytes > 0 && n > remaining() / min_item_bytes) {
      fail();
      return 0;
    }
    return n;
  }
  void raw(void* p, std::size_t n) {
    if (!ok_ || n > remaining()) {
      fail();
      std::memset(p, 0, n);
      return;
    }
    std::memcpy(p, in_.data() + pos_, n);
    pos_ += n;
  }

  void fail() {
    ok_ = false;
    pos_ = in_.size();
  }
  bool ok() const { return ok_; }
  bool at_end() const { return pos_ == in_.size(); }
  std::size_t remaining() const { return in_.size() - pos_; }
  std::size_t position() const { return pos_; }

 private:
  std::string_view in_;
  std::size_t pos_ = 0;
  bool ok_ = true;
};

}  // namespace rigcal::state
