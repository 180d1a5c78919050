// Image formation: the drift in drift.csv is the shift of the rendered chip,
// and switching an artefact off removes it.
#include <gtest/gtest.h>

#include <cmath>

#include "demo/optics.h"
#include "sim_fixtures.h"

namespace budledger::demo {
namespace {

// Empty chip, no camera artefacts: what moves between frames is the stage alone.
Scenario staticChip() {
  Scenario s;
  s.seed = 77;
  s.frames = 25;
  s.device.rows = 3;
  s.device.cols = 3;
  s.optics.noise = 0;
  s.optics.flicker = 0;
  s.optics.dust = 0;
  s.optics.illumination = 0;
  s.optics.defocusRate = 0;
  s.optics.drift = 0.3;
  s.optics.jumpRate = 0.15;
  s.optics.jumpPx = 6;
  s.biology.initialOccupancy = 0;
  s.biology.arrivalPerHour = 0;
  s.biology.driftersPerFrame = 0;
  s.groups.push_back(GroupSpec{"chip", 1, s.biology});
  return s;
}

// Integer shift (dx, dy) that best maps frame a onto frame b: b(x, y) ≈ a(x − dx, y − dy).
std::pair<int, int> bestShift(const std::vector<std::uint16_t>& a,
                              const std::vector<std::uint16_t>& b, int w, int h, int range) {
  double best = 1e300;
  std::pair<int, int> arg{0, 0};
  for (int dy = -range; dy <= range; ++dy)
    for (int dx = -range; dx <= range; ++dx) {
      double ssd = 0;
      for (int y = range; y < h - range; y += 2)
        for (int x = range; x < w - range; x += 2) {
          const double d = static_cast<double>(b[static_cast<std::size_t>(y * w + x)]) -
                           a[static_cast<std::size_t>((y - dy) * w + (x - dx))];
          ssd += d * d;
        }
      if (ssd < best) {
        best = ssd;
        arg = {dx, dy};
      }
    }
  return arg;
}

TEST(Optics, DriftTableIsTheShiftOfTheChip) {
  const Scenario s = staticChip();
  const PositionModel m = modelPosition(s, positionsOf(s)[0]);
  std::vector<std::vector<std::uint16_t>> frames;
  const auto drift = renderPosition(
      s, m, [&](int, const std::vector<std::uint16_t>& px) { frames.push_back(px); });
  EXPECT_EQ(drift[0].x, 0.0);
  EXPECT_EQ(drift[0].y, 0.0);
  double maxShift = 0;
  for (int k = 1; k < s.frames; k += 3) {
    const auto& d = drift[static_cast<std::size_t>(k)];
    ASSERT_LT(std::max(std::fabs(d.x), std::fabs(d.y)), 28.0) << "test drift beyond its border";
    maxShift = std::max(maxShift, std::hypot(d.x, d.y));
    const auto [dx, dy] = bestShift(frames[0], frames[static_cast<std::size_t>(k)],
                                    m.device.width(), m.device.height(), 30);
    EXPECT_LE(std::fabs(dx - d.x), 0.75) << "frame " << k;
    EXPECT_LE(std::fabs(dy - d.y), 0.75) << "frame " << k;
  }
  EXPECT_GT(maxShift, 11.0);  // real motion, jumps included, well beyond the search window
}

TEST(Optics, ArtefactsSwitchOff) {
  Scenario s = staticChip();
  s.optics.drift = 0;
  s.optics.jumpRate = 0;
  const PositionModel m = modelPosition(s, positionsOf(s)[0]);
  std::vector<std::vector<std::uint16_t>> frames;
  const auto drift = renderPosition(
      s, m, [&](int, const std::vector<std::uint16_t>& px) { frames.push_back(px); });
  for (const auto& d : drift) EXPECT_EQ(std::hypot(d.x, d.y), 0.0);
  // No noise, flicker, drift or cells: every frame is the same image.
  for (const auto& f : frames) EXPECT_EQ(f, frames[0]);
  // With noise on, frames differ but keep their mean (shot noise is unbiased).
  s.optics.noise = 1;
  std::vector<std::vector<std::uint16_t>> noisy;
  renderPosition(s, m, [&](int, const std::vector<std::uint16_t>& px) { noisy.push_back(px); });
  EXPECT_NE(noisy[1], noisy[2]);
  double m0 = 0, m1 = 0;
  for (std::size_t i = 0; i < frames[0].size(); ++i) {
    m0 += frames[0][i];
    m1 += noisy[1][i];
  }
  EXPECT_NEAR(m1 / m0, 1.0, 1e-3);
}

TEST(Optics, TrapsFollowTheFlowDirection) {
  for (const char* flow : {"down", "up", "left", "right"}) {
    Scenario s = staticChip();
    s.device.flow = flow;
    const PositionModel m = modelPosition(s, positionsOf(s)[0]);
    for (const auto& t : m.device.traps()) {
      // The outlet lies downstream of the seat, at the seat distance for a young mother.
      const Vec2 d = t.originPx - t.seatPx;
      const Vec2 down = m.device.downstream();
      const double along = dot(d, down) * s.device.pixelUm;
      EXPECT_NEAR(along, -m.device.seatV(0.5 * s.biology.motherDiameterUm), 1e-9) << flow;
      EXPECT_GT(t.seatPx.x, 0);
      EXPECT_LT(t.seatPx.x, m.device.width());
      EXPECT_GT(t.seatPx.y, 0);
      EXPECT_LT(t.seatPx.y, m.device.height());
    }
  }
}

}  // namespace
}  // namespace budledger::demo
