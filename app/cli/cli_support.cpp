#include "app/cli/cli_support.h"

#include <fmt/format.h>
#include <unistd.h>

#include <algorithm>
#include <cstdio>
#include <string>

namespace budledger::cli {

void printError(std::string_view message) { fmt::print(stderr, "budledger-cli: {}\n", message); }

TerminalProgress::TerminalProgress() : tty_(isatty(fileno(stderr)) != 0) {}

TerminalProgress::~TerminalProgress() {
  if (barOpen_) fmt::print(stderr, "\n");
}

Progress TerminalProgress::sink(const CancelToken* cancel) {
  return Progress{[this](std::string_view s, double f) { report(s, f); }, cancel};
}

void TerminalProgress::report(std::string_view stage, double fraction) {
  fraction = std::clamp(fraction, 0.0, 1.0);
  const bool newStage = stage != stage_;
  if (newStage) {
    stage_ = std::string(stage);
    lastTenth_ = -1;
  }
  if (tty_) {
    constexpr int kWidth = 30;
    const int filled = static_cast<int>(fraction * kWidth + 0.5);
    if (newStage && barOpen_) fmt::print(stderr, "\n");
    fmt::print(stderr, "\r{:<12} [{}{}] {:3.0f}%", stage_,
               std::string(static_cast<size_t>(filled), '#'),
               std::string(static_cast<size_t>(kWidth - filled), ' '), fraction * 100);
    barOpen_ = true;
    std::fflush(stderr);
    return;
  }
  const int tenth = static_cast<int>(fraction * 10);
  if (tenth != lastTenth_) {
    lastTenth_ = tenth;
    fmt::print(stderr, "{}: {:.0f}%\n", stage_, fraction * 100);
  }
}

}  // namespace budledger::cli
