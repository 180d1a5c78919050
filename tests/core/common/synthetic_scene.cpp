#include "tests/core/common/synthetic_scene.h"

#include <opencv2/imgproc.hpp>

#include <cmath>

namespace budledger::testing {

std::vector<Capsule> SceneOptions::defaultCup() {
  // Two slanted walls and a floor piece with a narrow outlet: a cup open upstream (up).
  return {{{-11, -10}, {-7, 7}, 3.0},
          {{11, -10}, {7, 7}, 3.0},
          {{-7, 11}, {-3, 12}, 2.5},
          {{7, 11}, {3, 12}, 2.5}};
}

std::vector<Capsule> SceneOptions::roundPostCup() {
  return {{{-10, -2}, {-10, -2}, 5.0}, {{10, -2}, {10, -2}, 5.0}, {{0, 13}, {0, 13}, 4.5}};
}

SyntheticScene::SyntheticScene(const SceneOptions& options) : o_(options) {
  // Every lattice point whose trap could touch the frame.
  const double reach = std::hypot(o_.size.width, o_.size.height) * 2;
  const int n =
      static_cast<int>(reach / std::min(cv::norm(o_.latticeA), cv::norm(o_.latticeB))) + 2;
  for (int j = -n; j <= n; ++j)
    for (int i = -n; i <= n; ++i) {
      const cv::Point2d c = o_.origin + i * o_.latticeA + j * o_.latticeB;
      if (c.x > -40 && c.y > -40 && c.x < o_.size.width + 40 && c.y < o_.size.height + 40)
        allCentres_.push_back(c);
    }
  cv::RNG rng(o_.seed);
  for (int k = 0; k < o_.cellsInTraps && !allCentres_.empty(); ++k) {
    Cell c;
    c.trap = rng.uniform(0, static_cast<int>(allCentres_.size()));
    c.offset = {rng.uniform(-1.5, 1.5), rng.uniform(-1.0, 2.0)};
    c.velocity = {0, 0};
    c.radius = o_.cellRadius * rng.uniform(0.85, 1.1);
    cells_.push_back(c);
  }
  for (int k = 0; k < o_.freeCells; ++k) {
    Cell c;
    c.trap = -1;
    c.offset = {rng.uniform(0.0, 1.0 * o_.size.width), rng.uniform(0.0, 1.0 * o_.size.height)};
    c.velocity = {rng.uniform(-1.5, 1.5), rng.uniform(2.0, 6.0)};
    c.radius = o_.cellRadius * rng.uniform(0.7, 1.0);
    cells_.push_back(c);
  }
}

std::vector<cv::Point2d> SyntheticScene::trapCentres() const {
  std::vector<cv::Point2d> out;
  for (const auto& c : allCentres_)
    if (c.x >= 0 && c.y >= 0 && c.x < o_.size.width && c.y < o_.size.height) out.push_back(c);
  std::sort(out.begin(), out.end(), [](const cv::Point2d& a, const cv::Point2d& b) {
    return std::abs(a.y - b.y) > 3 ? a.y < b.y : a.x < b.x;
  });
  return out;
}

namespace {
double segmentDistance(cv::Point2d p, cv::Point2d a, cv::Point2d b) {
  const cv::Point2d ab = b - a;
  const double len2 = ab.dot(ab);
  const double t = len2 > 0 ? std::clamp((p - a).dot(ab) / len2, 0.0, 1.0) : 0.0;
  return cv::norm(p - (a + t * ab));
}
}  // namespace

cv::Mat SyntheticScene::render(const FrameEffects& fx) const {
  const int w = o_.size.width, h = o_.size.height;
  cv::Mat img(h, w, CV_32F);
  // Uneven illumination: a tilt and a gentle vignette, fixed to the camera.
  for (int y = 0; y < h; ++y) {
    auto* row = img.ptr<float>(y);
    for (int x = 0; x < w; ++x) {
      const double u = (x - w / 2.0) / w, v = (y - h / 2.0) / h;
      row[x] = static_cast<float>(
          o_.background * (1 + o_.illuminationTilt * (u + 0.5 * v) - 0.2 * (u * u + v * v)));
    }
  }
  // Posts: a dark body with a soft edge and a faint bright halo.
  cv::Mat posts(h, w, CV_32F, cv::Scalar(0));
  double extent = 0;
  for (const auto& c : o_.trap)
    extent = std::max({extent, cv::norm(c.a) + c.radius, cv::norm(c.b) + c.radius});
  extent += 4;
  for (const auto& centre0 : allCentres_) {
    const cv::Point2d centre = centre0 + fx.shift;
    const int x0 = std::max(0, static_cast<int>(centre.x - extent));
    const int x1 = std::min(w - 1, static_cast<int>(centre.x + extent));
    const int y0 = std::max(0, static_cast<int>(centre.y - extent));
    const int y1 = std::min(h - 1, static_cast<int>(centre.y + extent));
    for (int y = y0; y <= y1; ++y) {
      auto* row = posts.ptr<float>(y);
      for (int x = x0; x <= x1; ++x) {
        const cv::Point2d p(x - centre.x, y - centre.y);
        double d = 1e9;
        for (const auto& c : o_.trap) d = std::min(d, segmentDistance(p, c.a, c.b) - c.radius);
        const double body = 0.5 * (1 - std::tanh(d / o_.edgeSoftness));
        const double halo = -0.12 * std::exp(-(d - 2) * (d - 2) / 2.0);
        row[x] = std::max(row[x], static_cast<float>(body + halo));
      }
    }
  }
  img -= posts * o_.postDepth;
  // Cells: a dark rim, a slightly bright interior.
  for (const auto& cell : cells_) {
    cv::Point2d c;
    double r = cell.radius;
    if (cell.trap >= 0) {
      c = allCentres_[static_cast<size_t>(cell.trap)] + cell.offset + fx.shift;
      r *= 1 + 0.002 * fx.time;
    } else {
      c = cell.offset + cell.velocity * fx.time;
      c.x = std::fmod(std::fmod(c.x, w) + w, w);
      c.y = std::fmod(std::fmod(c.y, h) + h, h);
    }
    const int x0 = std::max(0, static_cast<int>(c.x - r - 4));
    const int x1 = std::min(w - 1, static_cast<int>(c.x + r + 4));
    const int y0 = std::max(0, static_cast<int>(c.y - r - 4));
    const int y1 = std::min(h - 1, static_cast<int>(c.y + r + 4));
    for (int y = y0; y <= y1; ++y) {
      auto* row = img.ptr<float>(y);
      for (int x = x0; x <= x1; ++x) {
        const double d = std::hypot(x - c.x, y - c.y) - r;
        const double rim = std::exp(-d * d / 1.5);
        const double interior = d < -1 ? 0.06 : 0.0;
        row[x] += static_cast<float>(o_.background * (interior - 0.35 * rim));
      }
    }
  }
  // Dust on the camera: soft dark spots at fixed image positions.
  cv::RNG dust(o_.seed * 31 + 5);
  for (int k = 0; k < o_.dustSpots; ++k) {
    const cv::Point2d c(dust.uniform(0.0, 1.0 * w), dust.uniform(0.0, 1.0 * h));
    const double r = dust.uniform(4.0, 14.0), depth = dust.uniform(0.1, 0.3);
    for (int y = std::max(0, int(c.y - 2 * r)); y < std::min(h, int(c.y + 2 * r)); ++y) {
      auto* row = img.ptr<float>(y);
      for (int x = std::max(0, int(c.x - 2 * r)); x < std::min(w, int(c.x + 2 * r)); ++x) {
        const double d2 = ((x - c.x) * (x - c.x) + (y - c.y) * (y - c.y)) / (r * r);
        row[x] *= static_cast<float>(1 - depth * std::exp(-d2));
      }
    }
  }
  if (fx.blurSigma > 0) cv::GaussianBlur(img, img, cv::Size(), fx.blurSigma);
  img *= fx.gain;
  cv::Mat noise(h, w, CV_32F);
  cv::RNG rng(o_.seed * 7919 + static_cast<std::uint64_t>(fx.time) * 104729 + 17);
  rng.fill(noise, cv::RNG::NORMAL, 0, o_.noiseSigma);
  img += noise;
  cv::Mat out;
  if (o_.bits == 8)
    img.convertTo(out, CV_8U, 255.0 / 4095.0);
  else
    img.convertTo(out, CV_16U);
  return out;
}

std::vector<cv::Point2d> makeDrift(int frames, double amplitude, std::uint64_t seed,
                                   const std::vector<std::pair<int, cv::Point2d>>& jumps) {
  cv::RNG rng(seed);
  const double px = rng.uniform(0.0, 6.28), py = rng.uniform(0.0, 6.28);
  std::vector<cv::Point2d> out;
  cv::Point2d offset(0, 0);
  for (int t = 0; t < frames; ++t) {
    for (const auto& [at, by] : jumps)
      if (at == t) offset += by;
    const double s = static_cast<double>(t) / std::max(frames - 1, 1);
    out.push_back(offset + cv::Point2d(amplitude * (std::sin(6.0 * s + px) - std::sin(px)) +
                                           0.7 * amplitude * s,
                                       amplitude * (std::sin(4.0 * s + py) - std::sin(py))));
  }
  return out;
}

}  // namespace budledger::testing
