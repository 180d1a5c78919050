#pragma once
// SurvivalCurve: plain step-function data for one group's Kaplan–Meier curve,
// as the plot draws it — independent of how it was computed, so the plot can
// be fed by core/stats, tests or a file. Invariants: steps ordered by x, the
// first at x = 0 with survival 1; each step's value holds from its x to the
// next step's x; lower <= survival <= upper.
#include <QString>
#include <optional>
#include <vector>

namespace budledger::ui {

struct SurvivalStep {
  double x = 0;
  double survival = 1;
  double lower = 1;  // confidence band at this step
  double upper = 1;
};

struct CensorMark {
  double x = 0;
  double survival = 1;  // where the mark sits on the curve
  int count = 1;
};

struct SurvivalCurve {
  QString label;
  int subjects = 0;
  int events = 0;
  std::vector<SurvivalStep> steps;
  std::vector<CensorMark> censored;
  double lastX = 0;  // curve drawn flat to here (last observation)
  std::optional<double> median;
  std::optional<double> medianLower;
  std::optional<double> medianUpper;
};

}  // namespace budledger::ui
