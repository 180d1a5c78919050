#pragma once
// A small renderer of trap crops for the measure tests, independent of the
// simulator on purpose: its optics (rim polarity, halo, post shape, pixel
// size) are test parameters, so the tests check that segmentation does not
// depend on one look.
#include <cmath>
#include <cstdint>
#include <opencv2/core.hpp>
#include <opencv2/imgproc.hpp>
#include <random>
#include <vector>

namespace budledger::measure::testing {

enum class PostShape { TwoRound, Wedge };
// Body: the cell is a region of one sign (phase-contrast-like); Rim: a thin outline of
// one sign around an interior of the other (bright-field-like).
enum class CellStyle { Body, Rim };

struct Optics {
  CellStyle style = CellStyle::Body;
  double polarity = -1;  // sign of the cell (Body) or of its rim (Rim) against the medium
  double rimContrast = 400;
  double interiorContrast = 120;  // sign follows -polarity: interior opposite to the rim
  double halo = 250;              // bright (opposite to the rim) ring outside the cell
  double haloWidthPx = 2.5;
  double noise = 40;
  double level = 3000;  // medium intensity
  PostShape posts = PostShape::TwoRound;
};

struct Blob {
  double x, y, rx, ry, angle = 0;
};

struct Scene {
  int width = 64, height = 64;
  double cupX = 32, cupY = 30;
  std::vector<Blob> cells;
};

inline cv::Mat renderBackground(const Scene& s, const Optics& o) {
  cv::Mat img(s.height, s.width, CV_32F, cv::Scalar(o.level));
  cv::Mat post(s.height, s.width, CV_8U, cv::Scalar(0));
  const int r = s.width / 6;
  if (o.posts == PostShape::TwoRound) {
    cv::circle(post, cv::Point(static_cast<int>(s.cupX) - 2 * r, static_cast<int>(s.cupY) + r), r,
               255, -1);
    cv::circle(post, cv::Point(static_cast<int>(s.cupX) + 2 * r, static_cast<int>(s.cupY) + r), r,
               255, -1);
  } else {
    std::vector<cv::Point> left{{0, static_cast<int>(s.cupY) - r},
                                {static_cast<int>(s.cupX) - r, static_cast<int>(s.cupY) + 2 * r},
                                {0, s.height - 1}};
    std::vector<cv::Point> right{{s.width - 1, static_cast<int>(s.cupY) - r},
                                 {static_cast<int>(s.cupX) + r, static_cast<int>(s.cupY) + 2 * r},
                                 {s.width - 1, s.height - 1}};
    cv::fillPoly(post, std::vector<std::vector<cv::Point>>{left, right}, 255);
  }
  img.setTo(o.level * 0.55, post);
  cv::GaussianBlur(img, img, cv::Size(0, 0), 1.2);
  return img;
}

// Signed distance (px) outside an ellipse boundary, approximate.
inline double outside(const Blob& b, double x, double y) {
  const double c = std::cos(b.angle), s = std::sin(b.angle);
  const double u = (x - b.x) * c + (y - b.y) * s, v = -(x - b.x) * s + (y - b.y) * c;
  const double q = std::sqrt(u * u / (b.rx * b.rx) + v * v / (b.ry * b.ry));
  return (q - 1) * std::sqrt(0.5 * (b.rx * b.rx + b.ry * b.ry));
}

inline cv::Mat render(const Scene& s, const Optics& o, std::uint64_t seed) {
  cv::Mat img = renderBackground(s, o);
  for (int y = 0; y < s.height; ++y)
    for (int x = 0; x < s.width; ++x) {
      double add = 0;
      bool inside = false;
      for (const auto& b : s.cells) {
        const double d = outside(b, x, y);
        if (o.style == CellStyle::Rim) {
          if (d < -1.2) inside = true;
          add += o.polarity * o.rimContrast * std::exp(-0.5 * d * d / 0.8);
        } else {
          add += o.polarity * o.rimContrast * 0.6 / (1 + std::exp(2.5 * d));  // soft-edged body
        }
        // The halo starts at the outline and fades outwards.
        if (d > 0)
          add -= o.polarity * o.halo *
                 std::exp(-0.5 * (d - 2) * (d - 2) / (o.haloWidthPx * o.haloWidthPx));
      }
      if (inside) {
        img.at<float>(y, x) = static_cast<float>(o.level - o.polarity * o.interiorContrast);
      }
      img.at<float>(y, x) += static_cast<float>(add);
    }
  std::mt19937_64 gen(seed);
  std::normal_distribution<float> noise(0.f, static_cast<float>(o.noise));
  for (int y = 0; y < s.height; ++y)
    for (int x = 0; x < s.width; ++x) img.at<float>(y, x) += noise(gen);
  return img;
}

}  // namespace budledger::measure::testing
