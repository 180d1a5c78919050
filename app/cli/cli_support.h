#pragma once
// Small helpers every verb of budledger-cli shares: error reporting in one
// line and a terminal progress bar (plain lines when not a terminal).
#include <string_view>

#include "core/base/progress.h"

namespace budledger::cli {

// Prints "budledger-cli: <message>" to stderr.
void printError(std::string_view message);

// A Progress sink that draws a bar on a terminal, or prints a line per stage
// change and per 10% when stderr is not a terminal (logs, CI).
class TerminalProgress {
 public:
  TerminalProgress();
  ~TerminalProgress();
  TerminalProgress(const TerminalProgress&) = delete;
  TerminalProgress& operator=(const TerminalProgress&) = delete;
  Progress sink(const CancelToken* cancel = nullptr);

 private:
  void report(std::string_view stage, double fraction);
  bool tty_;
  std::string stage_;
  int lastTenth_ = -1;
  bool barOpen_ = false;
};

}  // namespace budledger::cli
