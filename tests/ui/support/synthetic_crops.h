#pragma once
// SyntheticCrops: a CropSource for tests, the benchmark and the docs program
// only — it draws a trap cup with a mother cell whose bud grows between the
// bud and separation events it is given, with seeded noise. It exists so the
// strip view can be exercised before (and apart from) real image stacks; the
// workstation itself never ships it.
#include <map>
#include <vector>

#include "ui/crop_source.h"

namespace budledger::testsupport {

class SyntheticCrops : public ui::CropSource {
 public:
  // `events` say what to draw; `delayMs` makes every crop slow, to test async loading.
  explicit SyntheticCrops(const std::vector<Event>& events, int delayMs = 0);
  QSize cropSize() const override { return {48, 72}; }
  QImage crop(ui::TrapId trap, int frame) const override;

 private:
  std::map<ui::TrapId, std::vector<Event>> byTrap_;
  int delayMs_;
};

}  // namespace budledger::testsupport
