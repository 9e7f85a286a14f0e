#pragma once
// The library's error model: functions that can fail on their input return Result<T>, a value or an
// Error with a message written for the person who supplied the input. No exceptions cross the
// library boundary for bad data; exceptions are reserved for programming errors and the edges
// (YAML parsing, start-up, main).
#include <string>
#include <utility>
#include <variant>

namespace rigcal {

struct Error {
  std::string message;
};

template <class T>
class Result {
 public:
  Result(T value) : v_(std::move(value)) {}        // NOLINT(google-explicit-constructor)
  Result(Error error) : v_(std::move(error)) {}    // NOLINT(google-explicit-constructor)

  bool ok() const { return v_.index() == 0; }
  explicit operator bool() const { return ok(); }
  // REQUIRES: ok()
  const T& value() const& { return std::get<0>(v_); }
  T& value() & { return std::get<0>(v_); }
  T&& value() && { return std::get<0>(std::move(v_)); }
  const T* operator->() const { return &std::get<0>(v_); }
  const T& operator*() const { return std::get<0>(v_); }
  // REQUIRES: !ok()
  const Error& error() const { return std::get<1>(v_); }

 private:
  std::variant<T, Error> v_;
};

// For operations that succeed with no value.
struct Done {};
using Status = Result<Done>;
inline Status ok_status() { return Done{}; }

}  // namespace rigcal
