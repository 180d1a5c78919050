#include "core/base/error.h"

#include <fmt/format.h>

namespace budledger {
namespace {
std::string compose(const std::string& file, std::optional<long> frame, const std::string& what) {
  if (file.empty()) return what;
  if (frame) return fmt::format("{}: frame {}: {}", file, *frame, what);
  return fmt::format("{}: {}", file, what);
}
}  // namespace

InputError::InputError(std::string file, std::optional<long> frame, const std::string& what)
    : std::runtime_error(compose(file, frame, what)), file_(std::move(file)), frame_(frame) {}

InputError::InputError(const std::string& what) : std::runtime_error(what) {}

}  // namespace budledger
