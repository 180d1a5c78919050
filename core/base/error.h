#pragma once
// InputError: the one exception type for bad input. It always names what was
// wrong and where (file, and frame when known), so that every front end can
// print a single line a user can act on.
#include <optional>
#include <stdexcept>
#include <string>

namespace budledger {

class InputError : public std::runtime_error {
 public:
  InputError(std::string file, std::optional<long> frame, const std::string& what);
  explicit InputError(const std::string& what);

  const std::string& file() const { return file_; }
  std::optional<long> frame() const { return frame_; }

 private:
  std::string file_;
  std::optional<long> frame_;
};

// Thrown when a CancelToken was triggered; never a failure of the input.
class Cancelled : public std::runtime_error {
 public:
  Cancelled() : std::runtime_error("cancelled") {}
};

}  // namespace budledger
