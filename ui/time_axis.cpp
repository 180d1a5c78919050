#include "ui/time_axis.h"

#include <algorithm>
#include <array>
#include <cmath>

namespace budledger::ui {

TimeAxis::TimeAxis(int frameCount, std::optional<double> intervalMinutes, double pixelsPerFrame) {
  setFrameCount(frameCount);
  setIntervalMinutes(intervalMinutes);
  setPixelsPerFrame(pixelsPerFrame);
}

void TimeAxis::setFrameCount(int n) { frameCount_ = std::max(0, n); }

void TimeAxis::setIntervalMinutes(std::optional<double> minutes) {
  if (minutes && !(*minutes > 0)) minutes.reset();
  intervalMinutes_ = minutes;
}

double TimeAxis::setPixelsPerFrame(double ppf) {
  if (!std::isfinite(ppf)) ppf = kMinPixelsPerFrame;
  ppf_ = std::clamp(ppf, kMinPixelsPerFrame, kMaxPixelsPerFrame);
  return ppf_;
}

int TimeAxis::clampFrame(int frame) const {
  if (frameCount_ == 0) return 0;
  return std::clamp(frame, 0, frameCount_ - 1);
}

int TimeAxis::frameAt(double x) const { return clampFrame(static_cast<int>(std::floor(x / ppf_))); }

std::pair<int, int> TimeAxis::framesIn(double x0, double x1) const {
  if (frameCount_ == 0 || x1 <= x0) return {0, -1};
  const int first = static_cast<int>(std::floor(x0 / ppf_));
  // x1 is exclusive: a slot starting exactly at x1 is not included.
  const int last = static_cast<int>(std::ceil(x1 / ppf_)) - 1;
  if (last < 0 || first >= frameCount_) return {0, -1};
  return {std::max(first, 0), std::min(last, frameCount_ - 1)};
}

std::optional<double> TimeAxis::hoursAt(int frame) const {
  if (!intervalMinutes_) return std::nullopt;
  return frame * *intervalMinutes_ / 60.0;
}

QString TimeAxis::clockLabel(int frame) const {
  if (!intervalMinutes_) return {};
  const long minutes = std::lround(frame * *intervalMinutes_);
  const long h = minutes / 60;
  const long m = minutes % 60;
  return QStringLiteral("%1:%2").arg(h).arg(m, 2, 10, QLatin1Char('0'));
}

int TimeAxis::majorStepFrames(double minLabelGap) const {
  const double needFrames = std::max(1.0, minLabelGap / ppf_);
  if (intervalMinutes_) {
    // Round clock steps that land on whole frames keep labels like 1:00, 2:00.
    static constexpr std::array<int, 14> kMinutes{1,   2,   5,   10,  15,  30,   60,
                                                  120, 180, 240, 360, 720, 1440, 2880};
    for (int step : kMinutes) {
      const double frames = step / *intervalMinutes_;
      const double whole = std::round(frames);
      if (whole < 1 || std::abs(frames - whole) > 1e-6) continue;
      if (whole >= needFrames) return static_cast<int>(whole);
    }
  }
  for (int decade = 1;; decade *= 10) {
    for (int m : {1, 2, 5}) {
      const int step = m * decade;
      if (step >= needFrames || step > 1'000'000) return step;
    }
  }
}

std::vector<TimeAxis::Tick> TimeAxis::ticks(double x0, double x1, double minLabelGap) const {
  std::vector<Tick> out;
  const auto [first, last] = framesIn(x0, x1);
  if (first > last) return out;
  const int major = majorStepFrames(minLabelGap);
  // Minor ticks: a fifth or a half of the major step, if they stay 6 px apart.
  int minor = major;
  for (int div : {5, 4, 2}) {
    if (major % div == 0 && (major / div) * ppf_ >= 6.0) {
      minor = major / div;
      break;
    }
  }
  const int start = (first / minor) * minor;
  for (int f = start; f <= last; f += minor) {
    if (f < first) continue;
    out.push_back({f, frameLeft(f), f % major == 0});
  }
  return out;
}

}  // namespace budledger::ui
