#pragma once
// Cuts a byte stream into lines, whatever the read boundaries: bytes arrive in chunks from a socket,
// a serial port or a file, lines may span chunks, and ends may be LF or CRLF. Memory is bounded by
// max_line_bytes: a longer line is reported once, cut to its first max_line_bytes bytes, and the rest
// of it is discarded up to the next newline, however long it runs.
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>

namespace rigcal::protocol {

struct Line {
  std::string_view text;    // without the line ending; valid only during the callback
  std::uint64_t number = 0;  // 1-based line number in the stream
  bool too_long = false;     // text holds the first max_line_bytes bytes of a longer line
};

class LineSplitter {
 public:
  explicit LineSplitter(std::size_t max_line_bytes) : max_(max_line_bytes) {}

  // Calls on_line(const Line&) for every line completed by `bytes`.
  template <class OnLine>
  void feed(std::string_view bytes, OnLine&& on_line);
  // End of stream: a final line without a newline is delivered.
  template <class OnLine>
  void finish(OnLine&& on_line);

  std::uint64_t lines_seen() const { return number_; }
  std::size_t buffered_bytes() const { return partial_.size(); }
  std::size_t max_line_bytes() const { return max_; }

 private:
  static std::string_view strip_cr(std::string_view s) {
    if (!s.empty() && s.back() == '\r') s.remove_suffix(1);
    return s;
  }

  std::size_t max_;
  std::string partial_;     // start of a line whose newline has not arrived
  bool discarding_ = false;  // inside an over-long line already reported
  std::uint64_t number_ = 0;
};

template <class OnLine>
void LineSplitter::feed(std::string_view bytes, OnLine&& on_line) {
  while (!bytes.empty()) {
    const std::size_t nl = bytes.find('\n');
    const bool complete = nl != std::string_view::npos;
    const std::string_view piece = complete ? bytes.substr(0, nl) : bytes;
    bytes.remove_prefix(complete ? nl + 1 : bytes.size());

    if (discarding_) {
      if (complete) discarding_ = false;  // the over-long line ends here
      continue;
    }
    if (partial_.empty() && complete && piece.size() <= max_ + 1) {
      // The common case: a whole line inside this chunk, delivered without copying. (+1 allows the CR.)
      const std::string_view text = strip_cr(piece);
      if (text.size() <= max_) {
        on_line(Line{text, ++number_, false});
        continue;
      }
    }
    if (partial_.size() + piece.size() > max_ + 1) {
      // Over-long: report the first max_ bytes now and drop the rest until the newline.
      const std::size_t take = max_ > partial_.size() ? max_ - partial_.size() : 0;
      partial_.append(piece.substr(0, take));
      on_line(Line{std::string_view(partial_).substr(0, max_), ++number_, true});
      partial_.clear();
      discarding_ = !complete;
      continue;
    }
    partial_.append(piece);
    if (complete) {
      const std::string_view text = strip_cr(partial_);
      if (text.size() > max_) {
        on_line(Line{text.substr(0, max_), ++number_, true});
      } else {
        on_line(Line{text, ++number_, false});
      }
      partial_.clear();
    }
  }
}

template <class OnLine>
void LineSplitter::finish(OnLine&& on_line) {
  if (!partial_.empty() && !discarding_) {
    // partial_ may hold max_ + 1 bytes (room for a CR before the newline that never came).
    const std::string_view text = strip_cr(partial_);
    if (text.size() > max_)
      on_line(Line{text.substr(0, max_), ++number_, true});
    else
      on_line(Line{text, ++number_, false});
  }
  partial_.clear();
  discarding_ = false;
}

}  // namespace rigcal::protocol
